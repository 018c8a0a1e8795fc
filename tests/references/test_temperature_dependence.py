"""pKa at other temperatures: van 't Hoff against published temperature equations."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import quad

from dossier.chemistry import pka_at_temperature
from dossier.chemistry.temperature import GAS_CONSTANT


def tris_bates_hetzer(t_c: float) -> float:
    """TRIS·H⁺: pK = 2981.4/T − 3.5888 + 0.005571 T (Bates & Hetzer, J. Phys. Chem.
    65, 667 (1961); the equation as quoted in a secondary copy citing the paper,
    not read in the paper itself — unverified)."""
    T = t_c + 273.15
    return 2981.4 / T - 3.5888 + 0.005571 * T


def carbonic_pk1_plummer_busenberg(t_c: float) -> float:
    """CO₂(aq): log K1 = −356.3094 − 0.06091964 T + 21834.37/T + 126.8339 log T − 1684915/T²
    (Plummer & Busenberg, Geochim. Cosmochim. Acta 46, 1011 (1982); equation
    read in the paper's abstract)."""
    T = t_c + 273.15
    return -(-356.3094 - 0.06091964 * T + 21834.37 / T + 126.8339 * np.log10(T) - 1684915 / T**2)


@pytest.mark.parametrize("t", [37.0, 15.0, 5.0])
def test_tris_from_enthalpy_matches_bates_hetzer(t: float) -> None:
    # ΔH° = 47.45 kJ/mol (Goldberg, Kishore & Lennen 2002, J. Phys. Chem. Ref.
    # Data 31, 231; as quoted in a secondary copy citing it, not read in the
    # compilation itself — unverified). ΔCp° = −59 J/(K·mol) from the same
    # compilation — recalled from memory, not checked. Tolerance 0.005: the spread of evaluated ΔH data
    # (REFERENCES.md §7 item 5).
    got = pka_at_temperature(tris_bates_hetzer(25.0), t, dh=47.45, dcp=-59.0)
    assert got == pytest.approx(tris_bates_hetzer(t), abs=0.005)


def test_carbonic_from_enthalpy_matches_plummer_busenberg_at_37c() -> None:
    # ΔH° = 9.11 kJ/mol (Plummer & Busenberg 1982: R T² ln 10 · d log K1/dT of
    # their equation at 298.15 K, as in the substance table); ΔCp° = −371 J/(K·mol)
    # (Goldberg 2002) — recalled from memory, not checked.
    got = pka_at_temperature(carbonic_pk1_plummer_busenberg(25.0), 37.0, dh=9.11, dcp=-371.0)
    assert got == pytest.approx(carbonic_pk1_plummer_busenberg(37.0), abs=0.005)


@pytest.mark.parametrize("t", [0.0, 37.0, 95.0])
def test_closed_form_equals_integrated_van_t_hoff(t: float) -> None:
    # d ln K / dT = ΔH(T) / (R T²) with ΔH(T) = ΔH° + ΔCp° (T − T0), integrated
    # numerically (scipy.integrate.quad) as an independent route.
    dh, dcp, pk0 = 30.0, -150.0, 7.0
    T0, T = 298.15, t + 273.15
    integral, _ = quad(lambda x: (dh * 1e3 + dcp * (x - T0)) / (GAS_CONSTANT * x * x), T0, T)
    want = pk0 - integral / np.log(10.0)
    assert pka_at_temperature(pk0, t, dh=dh, dcp=dcp) == pytest.approx(want, abs=1e-10)


def test_no_enthalpy_means_no_temperature_dependence() -> None:
    assert pka_at_temperature(4.756, 60.0) == 4.756
