"""Bad input to the engine: a clear ValueError naming the argument and the allowed range."""

from __future__ import annotations

import math

import numpy as np
import pytest

from dossier.chemistry import Component, ConvergenceError, InputRangeError, Protolyte, Solution, equilibrium
from dossier.chemistry import solver as solver_module

ACETIC = Protolyte("acetic", (4.756,))


@pytest.mark.parametrize(
    ("make", "message"),
    [
        (lambda: Component(ACETIC, math.nan), "Component(acetic).total: must be a finite number in 0 … 20 mol/L; got nan"),
        (lambda: Component(ACETIC, math.inf), "Component(acetic).total: must be a finite number in 0 … 20 mol/L; got inf"),
        (lambda: Component(ACETIC, -0.1), "Component(acetic).total: must be a finite number in 0 … 20 mol/L; got -0.1"),
        (lambda: Component(ACETIC, np.array([0.1, -1.0])), "Component(acetic).total: must be a finite number in 0 … 20 mol/L; got -1 at index (1,)"),
        (lambda: Component(ACETIC, "lots"), "Component(acetic).total: must be a number in 0 … 20 mol/L; got 'lots'"),
        (lambda: Protolyte("x", (7.0, 4.0)), "Protolyte(x).pka: values must be ascending (pKa1 ≤ pKa2); got 7 then 4"),
        (lambda: Protolyte("x", (math.nan,)), "Protolyte(x).pka[0]: must be a finite number in -5 … 20; got nan"),
        (lambda: Protolyte("x", (25.0,)), "Protolyte(x).pka[0]: must be a finite number in -5 … 20; got 25"),
        (lambda: Protolyte("x", ()), "Protolyte(x).pka: must hold 1 … 6 pKa values; got 0"),
        (lambda: Protolyte("x", (4.0,), charge=1.5), "Protolyte(x).charge: must be an integer in -6 … 6; got 1.5"),
        (lambda: Protolyte("x", (4.0, 6.0), dh=(1.0,)), "Protolyte(x).dh: needs one value per ionization step (2); got 1"),
        (lambda: Component(ACETIC, 0.1, removed=2), "Component(acetic).removed: must be an integer in 0 … 1 (protons removed from the fully protonated form); got 2"),
        (lambda: Component(ACETIC, 0.1, removed=-1), "Component(acetic).removed: must be an integer in 0 … 1 (protons removed from the fully protonated form); got -1"),
        (lambda: Solution([Component(ACETIC, 0.1)], activity="pitzer"), "Solution.activity: unknown activity model 'pitzer'; allowed: ideal, debye-huckel, extended-debye-huckel, davies"),
        (lambda: Solution([Component(ACETIC, 0.1)], temperature=120.0), "Solution.temperature: must be a finite number in 0 … 100 °C; got 120"),
        (lambda: Solution([Component(ACETIC, 0.1)], temperature=-5.0), "Solution.temperature: must be a finite number in 0 … 100 °C; got -5"),
        (lambda: Solution([Component(ACETIC, 0.1)], strong_base=math.nan), "Solution.strong_base: must be a finite number in 0 … 20 mol/L; got nan"),
        (lambda: Solution([Component(ACETIC, 0.1)], pkw=3.0), "Solution.pkw: must be a finite number in 10 … 18; got 3"),
        (lambda: Solution([Component(ACETIC, np.ones(3))], temperature=np.ones(2) * 25), "Solution: array inputs do not broadcast together (shapes (2,), (3,))"),
    ],
)
def test_bad_input_names_the_argument_and_the_range(make, message: str) -> None:
    with pytest.raises(InputRangeError) as info:
        make()
    assert str(info.value) == message
    assert isinstance(info.value, ValueError)


def test_non_convergence_raises_and_names_the_point(monkeypatch: pytest.MonkeyPatch) -> None:
    # Force the failure by allowing a single Newton iteration.
    monkeypatch.setattr(solver_module, "_MAX_NEWTON", 1)
    s = Solution([Component(ACETIC, np.array([0.1, 0.01]))])
    with pytest.raises(ConvergenceError) as info:
        equilibrium(s)
    assert "the charge balance did not converge at index (0,)" in str(info.value)
    assert "acetic: total=0.1 mol/L, pKa=(4.756), removed=0" in str(info.value)
    assert info.value.index == (0,)


def test_ionic_strength_non_convergence_raises(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(solver_module, "_MAX_OUTER", 1)
    with pytest.raises(ConvergenceError, match="the ionic-strength iteration did not converge"):
        equilibrium(Solution([Component(ACETIC, 0.1, 1)], activity="davies"))
