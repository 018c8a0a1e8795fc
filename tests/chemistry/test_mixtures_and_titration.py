"""Strong acids and bases alone, mixtures of two substances, buffer capacity,
and the titrant needed for a target pH."""

from __future__ import annotations

import numpy as np
import pytest

from dossier.chemistry import (
    CATALOGUE,
    CarbonDioxide,
    Component,
    InputRangeError,
    Protolyte,
    Solution,
    applicable,
    buffer_capacity,
    equilibrium,
    titrant_for_ph,
)

# pKa at 25 °C, I = 0: acetic acid 4.756 (Harned & Ehlers, J. Am. Chem. Soc. 55,
# 652 (1933)); ammonium 9.245 (Bates & Pinching, J. Res. NBS 42, 419 (1949));
# formic acid 3.745 (Harned & Embree 1934); TRIS·H⁺ 8.072 (Bates & Hetzer 1961).
# All recalled from memory.
ACETIC = Protolyte("acetic", (4.756,), dh=(-0.41,))
AMMONIUM = Protolyte("ammonium", (9.245,), charge=1, dh=(51.95,))
FORMIC = Protolyte("formic", (3.745,))
TRIS = Protolyte("tris", (8.072,), charge=1, dh=(47.45,))


def test_dilute_hcl_textbook_example() -> None:
    # 1.0e-8 mol/L HCl, Kw = 1.0e-14: pH 6.98 (Hill, Petrucci et al., General
    # Chemistry, 4th ed., problem 15.109, worked solution; REFERENCES §6, confirmed).
    s = Solution(strong_acid=1e-8, pkw=14.0)
    assert round(CATALOGUE["strong-acid-water-corrected"].ph(s), 2) == 6.98
    assert round(equilibrium(s).ph, 2) == 6.98
    assert CATALOGUE["strong-acid"].ph(s) == pytest.approx(8.0)  # the shortcut's famous failure
    assert [a.id for a in applicable(s) if a.formula] == ["strong-acid", "strong-acid-water-corrected"]


def test_strong_base_alone_and_its_shortcuts() -> None:
    # 0.01 mol/L NaOH at Kw = 1e-14: pH 12.00 (any general chemistry text).
    s = Solution(strong_base=np.array([1e-2, 1e-8]), pkw=14.0)
    exact = equilibrium(s).ph
    assert exact[0] == pytest.approx(12.0, abs=1e-6)
    corrected = CATALOGUE["strong-base-water-corrected"].ph(s)
    assert np.allclose(corrected, exact, atol=1e-9)  # ideal, fully dissociated: the corrected form is exact
    assert CATALOGUE["strong-base"].ph(s)[1] == pytest.approx(6.0)  # below neutral: impossible for a base
    assert CATALOGUE["strong-base"].key_step(s) is None


def test_strong_shortcuts_refuse_a_weak_component_or_both_strongs() -> None:
    assert "weak" in CATALOGUE["strong-acid"].why_not(Solution([Component(ACETIC, 0.1)], strong_acid=0.1))
    assert "both" in CATALOGUE["strong-base"].why_not(Solution(strong_acid=1e-3, strong_base=1e-3))


@pytest.mark.parametrize("c", [0.1, 0.01, 0.001])
def test_ammonium_acetate_is_near_neutral(c: float) -> None:
    # Ammonium acetate: pH = ½(pKa,HOAc + pKa,NH4+) = 7.0 (D. C. Harris,
    # Quantitative Chemical Analysis, chapter on polyprotic/ampholyte systems,
    # recalled; J. N. Butler, Ionic Equilibrium (1998), ch. 3, recalled).
    s = Solution([Component(AMMONIUM, c), Component(ACETIC, c, removed=1)], activity="davies")
    assert abs(equilibrium(s).ph - 7.0) <= 0.01
    salt = CATALOGUE["weak-acid-weak-base-salt"]
    assert salt.applies(s)
    assert salt.ph(s) == pytest.approx(0.5 * (4.756 + 9.245))
    assert salt.key_step(s) == (0, 0)


def test_salt_formula_needs_equal_amounts_and_two_substances() -> None:
    unequal = Solution([Component(AMMONIUM, 0.01), Component(ACETIC, 0.02, removed=1)])
    assert "equal amounts" in CATALOGUE["weak-acid-weak-base-salt"].why_not(unequal)
    pair = Solution([Component(ACETIC, 0.01), Component(ACETIC, 0.01, removed=1)])
    assert "one substance" in CATALOGUE["weak-acid-weak-base-salt"].why_not(pair)


def test_henderson_hasselbalch_with_conjugate_from_another_substance() -> None:
    # Acetic acid 0.10 + TRIS base 0.05 mol/L: TRIS takes 0.05 mol/L of protons,
    # leaving acetic acid 0.05 / acetate 0.05: pH ≈ pKa(acetic) = 4.756 (the
    # Henderson–Hasselbalch equation). The key step is acetic acid's.
    hh = CATALOGUE["henderson-hasselbalch-two-substances"]
    acid_excess = Solution([Component(ACETIC, 0.10), Component(TRIS, 0.05, removed=1)])
    assert hh.ph(acid_excess) == pytest.approx(4.756)
    assert hh.key_step(acid_excess) == (0, 0)
    assert abs(hh.error(acid_excess)) < 0.01
    # The other way round: TRIS base in excess; the pair left is TRIS·H⁺/TRIS, in component 1.
    base_excess = Solution([Component(ACETIC, 0.02), Component(TRIS, 0.05, removed=1)])
    assert hh.key_step(base_excess) == (1, 0)
    assert hh.ph(base_excess) == pytest.approx(8.072 + np.log10(0.03 / 0.02))
    assert abs(hh.error(base_excess)) < 0.01
    # Formate 1 mmol/L from formic acid + ammonia: at such dilution HH fails visibly.
    dilute = Solution([Component(FORMIC, 2e-4), Component(AMMONIUM, 1e-4, removed=1)])
    assert abs(hh.error(dilute)) > 0.05


@pytest.mark.parametrize("seed", range(3))
def test_buffer_capacity_matches_van_slyke_for_a_monoprotic_buffer(seed: int) -> None:
    # β = ln10 (C Ka h/(Ka + h)² + h + Kw/h) (D. D. Van Slyke, J. Biol. Chem. 52,
    # 525 (1922); also J. N. Butler, Ionic Equilibrium (1998), ch. 4).
    rng = np.random.default_rng(seed)
    pka = rng.uniform(2.0, 12.0, 40)
    c = 10 ** rng.uniform(-6.0, 0.0, 40)
    frac = rng.uniform(0.0, 1.0, 40)
    s = Solution([Component(Protolyte("x", (pka,)), c)], strong_base=frac * c, pkw=14.0)
    eq = equilibrium(s)
    h, ka, kw = 10 ** -eq.ph, 10 ** -pka, 1e-14
    want = np.log(10) * (c * ka * h / (ka + h) ** 2 + h + kw / h)
    assert np.allclose(buffer_capacity(s, eq), want, rtol=1e-9)


@pytest.mark.parametrize("co2", [CarbonDioxide(), CarbonDioxide.air(), CarbonDioxide.closed(1e-3)])
def test_buffer_capacity_is_the_slope_of_the_titration(co2: CarbonDioxide) -> None:
    # β = dC_b/dpH: the analytic value against a central difference of titrant_for_ph.
    s = Solution([Component(Protolyte("phosphoric", (2.148, 7.198, 12.35)), 0.01, removed=1)], co2=co2)
    ph = equilibrium(s).ph
    d = 1e-4
    slope = (titrant_for_ph(s, ph + d, "strong-base") + titrant_for_ph(s, ph - d, "strong-acid")) / (2 * d)
    assert buffer_capacity(s) == pytest.approx(slope, rel=1e-6)


@pytest.mark.parametrize("model", ["ideal", "davies", "extended-debye-huckel"])
@pytest.mark.parametrize(("titrant", "target"), [("strong-base", 4.75), ("strong-acid", 3.5)])
def test_titrant_reaches_the_target_when_added(model: str, titrant: str, target: float) -> None:
    s = Solution([Component(ACETIC, 0.1, removed=1 if titrant == "strong-acid" else 0)], activity=model)
    amount = titrant_for_ph(s, target, titrant)
    key = "strong_base" if titrant == "strong-base" else "strong_acid"
    made = Solution([Component(ACETIC, 0.1, removed=s.components[0].removed)], activity=model, **{key: amount})
    assert abs(equilibrium(made).ph - target) <= 1e-9
    assert 0.0 < amount < 0.1


def test_titrant_is_vectorized_over_targets() -> None:
    s = Solution([Component(ACETIC, 0.1)], pkw=14.0)
    targets = np.array([3.5, 4.756, 6.0])
    amounts = titrant_for_ph(s, targets)
    assert amounts.shape == (3,) and np.all(np.diff(amounts) > 0)


def test_titrant_refuses_an_unreachable_target_and_an_unknown_titrant() -> None:
    s = Solution([Component(ACETIC, 0.1)])
    with pytest.raises(InputRangeError, match="cannot be reached with strong-base.*needs strong-acid"):
        titrant_for_ph(s, 2.0, "strong-base")
    with pytest.raises(InputRangeError, match="titrant"):
        titrant_for_ph(s, 5.0, "sodium hydroxide")
