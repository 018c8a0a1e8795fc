"""Worked examples with stated answers, each with its source beside it.

Textbook examples use Kw = 1.0e-14 and concentrations for activities, so
these run with pkw=14 and the ideal model, as the books do.
"""

from __future__ import annotations

import math

import pytest

from dossier.chemistry import CATALOGUE, Component, Protolyte, Solution, equilibrium


def _acid(ka: float) -> Protolyte:
    return Protolyte("acid", (-math.log10(ka),))


def test_hcl_1e_8_hill_petrucci() -> None:
    # Hill, Petrucci, McCreary & Perry, General Chemistry, 4th ed., problem
    # 15.109 (worked solution read at bilbo.chm.uri.edu): [H3O+] = 1.05e-7,
    # pH = 6.979 ≈ 6.98. The book takes pH from the rounded 1.05e-7, whose
    # third significant figure carries ±0.002 in pH.
    eq = equilibrium(Solution(strong_acid=1.0e-8, pkw=14.0))
    assert eq.ph == pytest.approx(6.979, abs=0.002)
    assert 10 ** -eq.ph_conc == pytest.approx(1.05e-7, abs=0.005e-7)


def test_hf_quadratic_brown_lemay_bursten() -> None:
    # Course slides accompanying Brown, LeMay & Bursten, Chemistry: The Central
    # Science, ch. 16 (read at public.asu.edu): 0.100 M HF, Ka 7.0e-4,
    # [H3O+] = 8.02e-3 M, pH 2.096.
    s = Solution([Component(_acid(7.0e-4), 0.100)], pkw=14.0)
    eq = equilibrium(s)
    assert 10 ** -eq.ph == pytest.approx(8.02e-3, abs=0.005e-3)
    assert eq.ph == pytest.approx(2.096, abs=0.0005)
    assert CATALOGUE["weak-acid-quadratic"].ph(s) == pytest.approx(2.096, abs=0.0005)


def test_koh_1e_8() -> None:
    # 1.0e-8 M KOH: pH 7.02 ([H+] = 9.51e-8). A public Q&A answer (low
    # authority, REFERENCES.md §6.1); the same example is in Harris,
    # Quantitative Chemical Analysis, "Systematic Treatment of Equilibrium" —
    # recalled from memory, section not verified.
    eq = equilibrium(Solution(strong_base=1.0e-8, pkw=14.0))
    assert eq.ph == pytest.approx(7.02, abs=0.005)
    assert 10 ** -eq.ph == pytest.approx(9.51e-8, abs=0.005e-8)


def test_sodium_acetate_hydrolysis() -> None:
    # 0.10 M sodium acetate, Ka 1.8e-5: [OH-] = 7.45e-6, pH 8.87 (a public
    # Q&A answer, low authority, REFERENCES.md §6.1).
    s = Solution([Component(_acid(1.8e-5), 0.10, removed=1)], pkw=14.0)
    eq = equilibrium(s)
    assert eq.ph == pytest.approx(8.87, abs=0.005)
    assert 10 ** (eq.ph - 14.0) == pytest.approx(7.45e-6, abs=0.005e-6)
    assert CATALOGUE["conjugate-base-square-root"].ph(s) == pytest.approx(8.87, abs=0.005)


def test_nitrous_acid_skoog() -> None:
    # Skoog, West, Holler & Crouch, Fundamentals of Analytical Chemistry,
    # 9th ed.: 0.120 M HNO2, Ka 7.1e-4, [H3O+] ≈ 8.9e-3 M by the quadratic —
    # recalled from memory, example number not verified. The square-root
    # shortcut gives 9.23e-3 (a public answer page), which shows its error.
    s = Solution([Component(_acid(7.1e-4), 0.120)], pkw=14.0)
    assert 10 ** -equilibrium(s).ph == pytest.approx(8.9e-3, abs=0.05e-3)
    assert 10 ** -CATALOGUE["weak-acid-square-root"].ph(s) == pytest.approx(9.23e-3, abs=0.005e-3)
