"""The shortcut catalogue: applicability, formulas, and where each one is right."""

from __future__ import annotations

import math

import numpy as np
import pytest

from dossier.chemistry import CATALOGUE, Component, NotApplicable, Protolyte, Solution, applicable, approximation, equilibrium

ACETIC = Protolyte("acetic", (-math.log10(1.8e-5),))  # Ka 1.8e-5, the textbook value
PHOSPHORIC = Protolyte("phosphoric", (2.148, 7.198, 12.35))
CARBONIC = Protolyte("carbonic", (6.35, 10.33))
AMMONIUM = Protolyte("ammonium", (9.25,), charge=1)
TRIS = Protolyte("tris", (8.072,), charge=1, dh=(47.45,))


def ids(s: Solution) -> list[str]:
    return [a.id for a in applicable(s)]


def test_every_entry_is_documented() -> None:
    assert len(CATALOGUE) >= 10
    for a in CATALOGUE.values():
        assert a.id and a.title and a.equation and a.assumptions and a.applies_when and a.reference
        assert approximation(a.id) is a


def test_unknown_shortcut_is_refused() -> None:
    with pytest.raises(ValueError, match="unknown shortcut 'square-root'; known: weak-acid-square-root"):
        approximation("square-root")


@pytest.mark.parametrize(
    ("solution", "expected"),
    [
        (Solution([Component(ACETIC, 0.1)]), ["weak-acid-square-root", "weak-acid-quadratic", "weak-acid-water-corrected"]),
        (Solution([Component(ACETIC, 0.1, 1)]), ["conjugate-base-square-root"]),
        (Solution([Component(AMMONIUM, 0.1, 1)]), ["weak-base-square-root", "weak-base-quadratic"]),
        (Solution([Component(AMMONIUM, 0.1, 0)]), ["weak-acid-square-root", "weak-acid-quadratic", "weak-acid-water-corrected"]),
        (Solution([Component(ACETIC, 0.1), Component(ACETIC, 0.1, 1)]), ["henderson-hasselbalch"]),
        (Solution([Component(ACETIC, 0.1)], strong_base=0.05), ["henderson-hasselbalch"]),
        (Solution([Component(PHOSPHORIC, 0.1, 1)]), ["ampholyte-mean"]),
        (Solution([Component(PHOSPHORIC, 0.1, 0)]), ["weak-acid-square-root", "weak-acid-quadratic", "weak-acid-water-corrected", "first-step-only"]),
        (Solution([Component(PHOSPHORIC, 0.1, 3)]), ["conjugate-base-square-root", "first-step-only"]),
        (Solution([Component(ACETIC, 0.1)], activity="davies"), ["weak-acid-square-root", "weak-acid-quadratic", "weak-acid-water-corrected", "ideal-activity"]),
        (Solution([Component(TRIS, 0.05, 1)], temperature=37.0), ["weak-base-square-root", "weak-base-quadratic", "constants-at-25c"]),
    ],
)
def test_which_shortcuts_apply(solution: Solution, expected: list[str]) -> None:
    assert ids(solution) == expected


def test_not_applicable_says_why() -> None:
    s = Solution([Component(ACETIC, 0.1), Component(PHOSPHORIC, 0.1)])
    with pytest.raises(NotApplicable, match="henderson-hasselbalch: needs an acid and its conjugate base"):
        CATALOGUE["henderson-hasselbalch"].ph(s)
    assert CATALOGUE["weak-acid-square-root"].why_not(s) == "needs exactly one acid–base component (the solution has 2)"


def test_square_root_formula_is_half_pka_minus_log_c() -> None:
    s = Solution([Component(Protolyte("a", (4.0,)), 1e-2)])
    assert CATALOGUE["weak-acid-square-root"].ph(s) == pytest.approx(3.0, abs=1e-12)


def test_quadratic_is_exact_when_water_is_negligible() -> None:
    # 0.1 mol/L acetic acid: water's H⁺ (~1e-11) is negligible.
    s = Solution([Component(ACETIC, 0.1)], pkw=14.0)
    assert abs(CATALOGUE["weak-acid-quadratic"].error(s)) < 1e-8


def test_water_corrected_is_exact_when_dissociation_is_negligible() -> None:
    # HCN-like acid, pKa 9.21, 1e-4 mol/L: dissociated by about 0.2 %.
    s = Solution([Component(Protolyte("hcn", (9.21,)), 1e-4)], pkw=14.0)
    assert abs(CATALOGUE["weak-acid-water-corrected"].error(s)) < 1e-3
    # ... where the square-root formula is off by 0.03 (water dominates).
    assert CATALOGUE["weak-acid-square-root"].error(s) > 0.03


def test_henderson_hasselbalch_holds_for_a_concentrated_buffer_and_fails_dilute() -> None:
    strong = Solution([Component(ACETIC, 0.1), Component(ACETIC, 0.1, 1)], pkw=14.0)
    weak = Solution([Component(ACETIC, 1e-4), Component(ACETIC, 1e-4, 1)], pkw=14.0)
    assert abs(CATALOGUE["henderson-hasselbalch"].error(strong)) < 0.001
    assert CATALOGUE["henderson-hasselbalch"].error(weak) < -0.1


def test_henderson_hasselbalch_by_partial_neutralization() -> None:
    s = Solution([Component(ACETIC, 0.1)], strong_base=0.025, pkw=14.0)
    assert CATALOGUE["henderson-hasselbalch"].ph(s) == pytest.approx(-math.log10(1.8e-5) + math.log10(0.025 / 0.075), abs=1e-12)


def test_ampholyte_mean_for_bicarbonate() -> None:
    # 0.1 mol/L NaHCO3: the mean (8.34) is close; at 1 mmol/L it is not.
    assert abs(CATALOGUE["ampholyte-mean"].error(Solution([Component(CARBONIC, 0.1, 1)], pkw=14.0))) < 0.005
    assert CATALOGUE["ampholyte-mean"].error(Solution([Component(CARBONIC, 1e-3, 1)], pkw=14.0)) > 0.03


def test_weak_base_square_root_for_ammonia() -> None:
    s = Solution([Component(AMMONIUM, 0.1, 1)], pkw=14.0)
    assert CATALOGUE["weak-base-square-root"].ph(s) == pytest.approx(14.0 - 0.5 * (14.0 - 9.25 + 1.0), abs=1e-12)
    assert abs(CATALOGUE["weak-base-quadratic"].error(s)) < 1e-6


def test_first_step_only_is_good_for_phosphoric_acid() -> None:
    s = Solution([Component(PHOSPHORIC, 0.1)], pkw=14.0)
    assert abs(CATALOGUE["first-step-only"].error(s)) < 1e-4


def test_ideal_activity_error_is_the_activity_correction() -> None:
    s = Solution([Component(ACETIC, 0.1), Component(ACETIC, 0.1, 1)], activity="davies")
    err = CATALOGUE["ideal-activity"].error(s)
    assert err == pytest.approx(equilibrium(Solution(s.components)).ph - equilibrium(s).ph, abs=1e-12)
    assert err > 0.05  # log γ of the acetate ion at I = 0.1


def test_constants_at_25c_fails_for_tris_at_37c() -> None:
    # TRIS·H⁺ changes by −0.032 pKa per kelvin: 12 K costs about 0.3 pH.
    s = Solution([Component(TRIS, 0.05), Component(TRIS, 0.05, 1)], temperature=37.0)
    assert CATALOGUE["constants-at-25c"].error(s) == pytest.approx(0.32, abs=0.02)


def test_errors_are_vectorized() -> None:
    c = np.logspace(-8, 0, 9)
    s = Solution([Component(Protolyte("weak", (8.0,)), c)])
    err = CATALOGUE["weak-acid-square-root"].error(s)
    assert err.shape == (9,)
    # pKa 8: water dominates when dilute (error > 0), dissociation when
    # concentrated (error < 0); the error changes sign in between.
    assert err[0] > 0 > err[-1]
