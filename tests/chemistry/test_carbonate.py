"""Carbon dioxide: the constants against their sources, air-equilibrated water,
the IUPAC carbonate standard, and the open/closed conditions."""

from __future__ import annotations

import numpy as np
import pytest

from dossier.chemistry import (
    AIR_PARTIAL_PRESSURE_ATM,
    CarbonDioxide,
    InputRangeError,
    Solution,
    carbonic_pka,
    equilibrium,
    log_henry,
    pkw,
)

# Measured constants that the Plummer & Busenberg (1982) equations were fitted
# to, RECALLED FROM MEMORY (not re-read): pK1 from H. S. Harned and R. Davis,
# J. Am. Chem. Soc. 65, 2030 (1943); pK2 from H. S. Harned and S. R. Scholes,
# J. Am. Chem. Soc. 63, 1706 (1941); log K_H from Harned and Davis (1943).
# t/°C: (log KH, pK1, pK2)
MEASURED = {
    0.0: (-1.11, 6.579, 10.625),
    10.0: (-1.27, 6.464, 10.490),
    25.0: (-1.47, 6.352, 10.329),
    40.0: (-1.63, 6.298, 10.220),
    50.0: (-1.71, 6.285, 10.172),
}


@pytest.mark.parametrize("t", sorted(MEASURED))
def test_constants_against_the_measurements_plummer_busenberg_fitted(t: float) -> None:
    kh, pk1, pk2 = MEASURED[t]
    got1, got2 = carbonic_pka(t)
    assert abs(got1 - pk1) <= 0.005  # the fit reproduces the data to a few 0.001
    assert abs(got2 - pk2) <= 0.006
    assert abs(log_henry(t) - kh) <= 0.01  # the recalled values have two decimals


def test_constants_at_25_and_37_c_as_computed_from_the_published_equations() -> None:
    # REFERENCES.md §5: pK1 6.3519, pK2 10.3289 at 25 °C; 6.3045 / 10.2395 at 37 °C,
    # evaluated from the equations of Plummer & Busenberg (1982) confirmed in the abstract.
    pk = carbonic_pka(np.array([25.0, 37.0]))
    assert np.allclose(pk[0], [6.3519, 6.3045], atol=6e-5)
    assert np.allclose(pk[1], [10.3289, 10.2395], atol=6e-5)


def test_constants_are_vectorized() -> None:
    t = np.linspace(0.0, 50.0, 11)
    pk1, pk2 = carbonic_pka(t)
    assert pk1.shape == pk2.shape == np.shape(log_henry(t)) == (11,)
    assert np.all(np.diff(pk1) < 0) and np.all(np.diff(pk2) < 0)  # both fall from 0 to 50 °C
    assert np.all(np.diff(log_henry(t)) < 0)  # CO2 is less soluble when warm


def test_pure_water_open_to_air_is_near_ph_5_6() -> None:
    # Rain or distilled water in equilibrium with atmospheric CO2 has pH ≈ 5.6
    # (W. Stumm and J. J. Morgan, Aquatic Chemistry, 3rd ed. (1996), ch. 4;
    # recalled from memory; at the 2023 CO2 level 420 µatm it is 5.60).
    eq = equilibrium(Solution(co2=CarbonDioxide.air()))
    assert abs(eq.ph - 5.6) <= 0.02
    # and the closed form: h² = Kw + K1·KH·p (+ 2 K1 K2 KH p / h, negligible here)
    s = 10 ** log_henry(25.0) * AIR_PARTIAL_PRESSURE_ATM
    k1, k2 = (10 ** -p for p in carbonic_pka(25.0))
    kw = 10 ** -pkw(25.0)
    h = np.sqrt(kw + k1 * s)
    for _ in range(5):
        h = np.sqrt(kw + k1 * s * (1 + 2 * k2 / h))
    assert abs(eq.ph - -np.log10(h)) <= 1e-9
    c = eq.carbonate
    assert c.mode == "open" and abs(c.dissolved_co2 - s) <= 1e-12 * s
    assert abs(c.total - (c.dissolved_co2 + c.bicarbonate + c.carbonate)) <= 1e-15
    assert abs(c.bicarbonate - s * k1 / h) <= 1e-9 * c.bicarbonate


@pytest.mark.parametrize(("model", "tolerance"), [("davies", 0.015), ("extended-debye-huckel", 0.02)])
def test_iupac_carbonate_standard(model: str, tolerance: float) -> None:
    # 0.025 mol/kg NaHCO3 + 0.025 mol/kg Na2CO3: pH(S) 10.012 at 25 °C
    # (R. P. Buck et al., Pure Appl. Chem. 74, 2169 (2002); the IUPAC table is
    # recalled, the same 25 °C value is confirmed in the NBS sources, REFERENCES §4.1).
    # Made as 0.050 mol/L total carbonate added as CO2 plus 0.075 mol/L NaOH: the
    # same proton condition and the same Na+. Tolerance: pH(S) is defined with the
    # Bates–Guggenheim convention for γ(Cl⁻) only, while here one simple model serves
    # every ion at I = 0.1; REFERENCES §4.3 finds such models reproduce the seven
    # primary standards to about ±0.015 (0.02 for the Bates–Guggenheim form at a
    # doubly charged ion).
    eq = equilibrium(Solution(co2=CarbonDioxide.closed(0.05), strong_base=0.075, activity=model))
    assert abs(eq.ph - 10.012) <= tolerance
    assert abs(eq.ionic_strength - 0.1) <= 0.003  # 0.025·1 + 0.025·3, less a little CO3²⁻ → HCO3⁻
    assert eq.carbonate.mode == "closed" and eq.carbonate.partial_pressure_atm is None
    assert abs(eq.carbonate.total - 0.05) <= 1e-15


def test_carbonate_standard_follows_temperature_like_the_nbs_table() -> None:
    # NBS carbonate standard: 10.317 at 0 °C, 10.062 at 20 °C, 9.828 at 50 °C
    # (REFERENCES §4.2; attributed to Bates 1962 / Bower et al., recalled). The
    # slope, not the offset, is what the temperature equations decide.
    t = np.array([0.0, 20.0, 50.0])
    eq = equilibrium(Solution(co2=CarbonDioxide.closed(0.05), strong_base=0.075, activity="davies", temperature=t))
    table = np.array([10.317, 10.062, 9.828])
    assert np.all(np.abs((eq.ph - eq.ph[1]) - (table - table[1])) <= 0.02)


def test_no_co2_leaves_the_equilibrium_unchanged_and_carbonate_empty() -> None:
    eq = equilibrium(Solution(strong_base=1e-3))
    assert eq.carbonate is None
    assert abs(eq.ph - equilibrium(Solution(strong_base=1e-3, co2=CarbonDioxide())).ph) == 0.0


def test_open_co2_pulls_a_base_down_and_an_acid_barely() -> None:
    # 1 mmol/L NaOH open to air takes up CO2 until it is nearly all bicarbonate:
    # [HCO3⁻] ≈ C_b, so h ≈ K1 K_H p / C_b (Stumm & Morgan, Aquatic Chemistry,
    # ch. 4, alkalinity of an open system; recalled), pH ≈ 8.19.
    base = equilibrium(Solution(strong_base=1e-3, co2=CarbonDioxide.air()))
    s = 10 ** log_henry(25.0) * AIR_PARTIAL_PRESSURE_ATM
    assert abs(base.ph - -np.log10(10 ** -carbonic_pka(25.0)[0] * s / 1e-3)) <= 0.02
    assert base.carbonate.total > 9.9e-4
    acid_free = equilibrium(Solution(strong_acid=1e-3)).ph
    acid_air = equilibrium(Solution(strong_acid=1e-3, co2=CarbonDioxide.air())).ph
    assert abs(acid_air - acid_free) < 1e-3


def test_partial_pressure_is_vectorized() -> None:
    p = np.array([1e-4, 4.2e-4, 1e-3, 1e-2])
    eq = equilibrium(Solution(co2=CarbonDioxide.open(p)))
    assert eq.ph.shape == (4,) and np.all(np.diff(eq.ph) < 0)
    # Pure water open to CO2: h ≈ √(K1 KH p), so pH falls by ½ per decade of p.
    assert abs((eq.ph[3] - eq.ph[2]) - -0.5) <= 0.01


@pytest.mark.parametrize(
    ("kwargs", "field"),
    [
        ({"mode": "sealed"}, "CarbonDioxide.mode"),
        ({"mode": "open", "partial_pressure": 2.0}, "CarbonDioxide.partial_pressure"),
        ({"mode": "open", "partial_pressure": -1e-6}, "CarbonDioxide.partial_pressure"),
        ({"mode": "closed", "total": 1e-3, "partial_pressure": 1e-3}, "CarbonDioxide.partial_pressure"),
        ({"mode": "none", "total": 1e-3}, "CarbonDioxide.total"),
    ],
)
def test_bad_co2_condition_is_refused_with_its_field(kwargs: dict, field: str) -> None:
    with pytest.raises(InputRangeError) as err:
        CarbonDioxide(**kwargs)
    assert err.value.argument == field
