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


# ---------------------------------------------------------------- a weak titrant (a substance and its form)
# Phosphoric acid at 25 °C, I = 0: pKa 2.148, 7.198, 12.35 (Bates & Acree 1943;
# Bates 1951; Vanderzee & Quist 1961), ΔH° of step 2 3.6 kJ/mol — recalled from memory.
PHOSPHATE = Protolyte("phosphoric", (2.148, 7.198, 12.35), dh=(-7.9, 3.6, 16.0))

WEAK_CASES = {
    # NaH2PO4 titrated with Na2HPO4 (the everyday "mix the two phosphates to pH 7.2")
    "phosphate-1-with-2": ([Component(PHOSPHATE, 0.01, removed=1)], Component(PHOSPHATE, 1.0, removed=2), 7.2, 25.0),
    "phosphate-at-37C": ([Component(PHOSPHATE, 0.05, removed=1)], Component(PHOSPHATE, 1.0, removed=2), 7.4, 37.0),
    # Na2HPO4 titrated down with phosphoric acid
    "phosphate-2-with-acid": ([Component(PHOSPHATE, 0.02, removed=2)], Component(PHOSPHATE, 1.0, removed=0), 6.5, 25.0),
    # TRIS base titrated with TRIS·HCl (form 0 of the cation)
    "tris-with-its-salt": ([Component(TRIS, 0.05, removed=1)], Component(TRIS, 1.0, removed=0), 8.0, 25.0),
    # acetic acid titrated with a different substance: trisodium phosphate
    "acetic-with-phosphate": ([Component(ACETIC, 0.1)], Component(PHOSPHATE, 1.0, removed=3), 5.0, 25.0),
}


def _mp_case(comps: list[Component], titrant: Component, amount: float, model: str, temperature: float):  # noqa: ANN202
    from . import mp_reference as ref

    def mp_comp(c: Component, total: float) -> ref.Comp:
        p = c.protolyte
        return ref.Comp(list(p.pka), total, c.removed, p.charge, list(p.dh) if p.dh else None, list(p.dcp) if p.dcp else None)

    parts = [mp_comp(c, float(c.total)) for c in comps] + [mp_comp(titrant, amount)]
    return ref.Case(parts, temperature=temperature, activity=model)


@pytest.mark.parametrize("model", ["ideal", "davies", "extended-debye-huckel"])
@pytest.mark.parametrize("case", sorted(WEAK_CASES))
def test_weak_titrant_amount_gives_the_target_by_the_50_digit_route(case: str, model: str) -> None:
    # Independent check (mpmath, tests/chemistry/mp_reference.py): the solution made with
    # the computed amount, solved from Σ z·c = 0 over every ion at 50 digits, has the target pH.
    from . import mp_reference as ref

    comps, titrant, target, temperature = WEAK_CASES[case]
    s = Solution(comps, temperature=temperature, activity=model)
    amount = titrant_for_ph(s, target, titrant)
    assert amount > 0.0
    ph = float(ref.solve(_mp_case(comps, titrant, amount, model, temperature))["ph"])
    assert abs(ph - target) <= 1e-9


def test_phosphate_buffer_from_the_two_salts_follows_henderson_hasselbalch() -> None:
    # Textbook case (recalled): a phosphate buffer of pH 7.2 from NaH2PO4 and Na2HPO4.
    # Henderson–Hasselbalch, pH = pKa2 + log([HPO4²⁻]/[H2PO4⁻]) (Henderson, Am. J.
    # Physiol. 21, 173 (1908); Hasselbalch, Biochem. Z. 78, 112 (1916); e.g. D. C.
    # Harris, Quantitative Chemical Analysis, ch. "Buffers" — recalled): ideal, at
    # 10 mmol/L the amount ratio is 10^(pH − pKa2); [H⁺], [OH⁻] and the other two
    # steps change it by far less than 0.1 %.
    c = 0.01
    s = Solution([Component(PHOSPHATE, c, removed=1)], pkw=14.0)
    for target in (6.5, 7.2, 7.8):
        x = titrant_for_ph(s, target, Component(PHOSPHATE, 1.0, removed=2))
        assert x / c == pytest.approx(10 ** (target - 7.198), rel=1e-3)


def test_weak_titrant_is_vectorized_and_matches_point_by_point() -> None:
    s = Solution([Component(PHOSPHATE, 0.01, removed=1)], activity="davies")
    na2hpo4 = Component(PHOSPHATE, 1.0, removed=2)
    targets = np.array([6.0, 6.8, 7.2, 7.9])
    amounts = titrant_for_ph(s, targets, na2hpo4)
    assert amounts.shape == (4,) and np.all(np.diff(amounts) > 0)
    for t, a in zip(targets, amounts):
        assert titrant_for_ph(s, float(t), na2hpo4) == pytest.approx(a, rel=1e-12)


def test_a_form_behaves_as_the_strong_titrant_where_it_is_fully_converted() -> None:
    # Trisodium phosphate at pH 5 takes up two protons per mole (to H2PO4⁻), so
    # acetic acid needs half as much of it as of NaOH: q = 3 − r̄ with r̄ = 1.005 there
    # (the H3PO4 and HPO4²⁻ fractions, 0.14 % and 0.63 %), so to within 0.5 %.
    s = Solution([Component(ACETIC, 0.1)], pkw=14.0)
    na3po4 = titrant_for_ph(s, 5.0, Component(PHOSPHATE, 1.0, removed=3))
    naoh = titrant_for_ph(s, 5.0, "strong-base")
    assert 2.0 * na3po4 == pytest.approx(naoh, rel=5e-3)
    assert 2.0 * na3po4 != pytest.approx(naoh, rel=1e-4)  # and not exactly: the fractions count


def test_weak_titrant_refuses_the_wrong_direction_and_a_titrant_that_carries_no_charge_there() -> None:
    s = Solution([Component(PHOSPHATE, 0.01, removed=1)])
    with pytest.raises(InputRangeError, match="cannot be reached with phosphoric \\(form 2\\).*already beyond it"):
        titrant_for_ph(s, 3.0, Component(PHOSPHATE, 1.0, removed=2))
    # an acid of pKa 14 added as the acid is uncharged at pH 3 (q ≈ −1e-11): it cannot move the pH
    inert = Component(Protolyte("very-weak", (14.0,)), 1.0, removed=0)
    with pytest.raises(InputRangeError, match="does not change the charge balance"):
        titrant_for_ph(Solution([Component(ACETIC, 0.01)]), 3.0, inert)
