"""dossier.app.solve: one solution from options; errors name the option from the engine's argument."""

from __future__ import annotations

import math

import pytest

from dossier.app import InlineSolution, OptionError, solve_inline


def test_acetic_acid_0p1_molar_by_the_exact_solution() -> None:
    # 0.100 mol/L acetic acid, pKa 4.756, ideal: pH 2.88 (textbook value, e.g. D. C. Harris,
    # Quantitative Chemical Analysis, weak-acid example; recalled from memory: pH 2.88)
    r = solve_inline(InlineSolution(pka=(4.756,), conc="0.1 mol/L"))
    assert r.ph == pytest.approx(2.88, abs=0.005)
    assert math.isfinite(r.ph_conc)


@pytest.mark.parametrize(
    ("request_", "option", "words"),
    [
        (InlineSolution(pka=(4.756,), conc="0.1 mol/L", form="4"), "--form", "protons removed must be 0 … 1"),
        (InlineSolution(pka=(4.756,), conc="0.1 mol/L", temperature=120.0), "--temperature", "must be in 0 … 100 °C"),
        (InlineSolution(pka=(4.756,), conc="lots"), "--conc", ""),
        (InlineSolution(pka=(4.756,), conc="0.1 mol/L", activity="pitzer"), "--activity", ""),
        (InlineSolution(pka=(4.756,), conc="0.1 mol/L", shortcuts=("nope",)), "--shortcut", "unknown id 'nope'"),
        (InlineSolution(pka=(30.0,), conc="0.1 mol/L"), "--pka", ""),
    ],
)
def test_each_bad_value_names_its_option(request_: InlineSolution, option: str, words: str) -> None:
    with pytest.raises(OptionError) as info:
        solve_inline(request_)
    assert info.value.option.startswith(option)
    assert words in str(info.value)
