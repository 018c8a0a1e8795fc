r"""'Adjust to pH X with …': the exact amount of titrant, the amount the
procedure's shortcut prescribes, and the pH that shortcut's recipe really gives.

The exact amount comes from the charge balance (titrant enters it linearly;
:func:`dossier.chemistry.titrant_for_ph`) and is computed when the method is
checked. A strong titrant is part of the solution's strong base (acid), a
weak one (a substance and its form) is its last component; x varies that. The shortcut's amount is the x at which the first claimed formula
shortcut that applies gives the target,

.. math::
    \mathrm{pH}_{\text{shortcut}}(C_{\text{titrant}} = x) = \mathrm{pH}^*

found by scanning x over eight decades around the exact amount (within the
engine's range) and bisecting
the bracket where the difference changes sign. The recipe pH is the exact
pH of the solution made with x. Volumes are per litre of final solution,
amount / stock (volume change of mixing neglected).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from ..limits import TOTAL_ENGINE
from ..chemistry import CATALOGUE, ChemistryError, Solution, equilibrium
from ..inputs.model import ConditionsSpec, SolutionSpec

__all__ = ["AdjustmentResult", "adjustment_result"]

_SCAN = 161
_BISECT = 80


@dataclass(frozen=True)
class AdjustmentResult:
    """The titrant for a target pH, exact and by the shortcut (numbers only).

    Attributes
    ----------
    target_ph : float
    titrant : str
        ``strong-base``, ``strong-acid``, or a weak titrant ``<substance>, form <n>``.
    amount_mol_per_l : float
        Exact amount [mol per litre of final solution].
    shortcut : str or None
        Id of the shortcut used for the prescribed amount (None: no claimed formula shortcut applies).
    shortcut_amount_mol_per_l : float or None
        Amount that shortcut prescribes (None when it cannot reach the target).
    shortcut_recipe_ph : float or None
        Exact pH of the solution made with the shortcut's amount.
    stock_mol_per_l : float or None
    volume_ml_per_l, shortcut_volume_ml_per_l : float or None
        Volume of stock per litre of final solution [mL/L], when a stock is stated.
    """

    target_ph: float
    titrant: str
    amount_mol_per_l: float
    shortcut: str | None
    shortcut_amount_mol_per_l: float | None
    shortcut_recipe_ph: float | None
    stock_mol_per_l: float | None
    volume_ml_per_l: float | None
    shortcut_volume_ml_per_l: float | None
    titrant_compound: str | None = None
    """For a weak titrant, the compound of its form (from the substance table; None for a strong titrant)."""


@dataclass(frozen=True)
class _Titrant:
    """Where the titrant sits in the engine's solution: ``field`` ``strong_base`` /
    ``strong_acid``, or ``component`` (its index); ``start`` is what is there without it."""

    field: str
    start: float
    component: int | None = None


def _with_titrant(solution: Solution, where: _Titrant, x: float | np.ndarray) -> Solution:
    if where.component is None:
        return dataclasses.replace(solution, **{where.field: where.start + x})
    comps = list(solution.components)
    comps[where.component] = dataclasses.replace(comps[where.component], total=where.start + x)
    return dataclasses.replace(solution, components=tuple(comps))


def _shortcut_amount(sid: str, solution: Solution, where: _Titrant, target: float, guide: float) -> float | None:
    approx = CATALOGUE[sid]

    def diff(x: float) -> float | None:
        try:
            s = _with_titrant(solution, where, x)
            if not approx.applies(s):
                return None
            return float(approx.ph(s)) - target
        except ChemistryError:  # beyond the engine's range, or not solvable there
            return None

    xs = guide * np.logspace(-4.0, 4.0, _SCAN) if guide > 0 else np.logspace(-12.0, 0.0, _SCAN)
    xs = xs[(xs <= TOTAL_ENGINE[1] - where.start) & (where.start + xs >= TOTAL_ENGINE[0])]
    values = [diff(float(x)) for x in xs]
    for i in range(len(xs) - 1):
        a, b = values[i], values[i + 1]
        if a is None or b is None or (a > 0) == (b > 0):
            continue
        lo, hi, f_lo = float(xs[i]), float(xs[i + 1]), a
        for _ in range(_BISECT):
            mid = 0.5 * (lo + hi)
            f_mid = diff(mid)
            if f_mid is None:
                break
            if (f_mid > 0) == (f_lo > 0):
                lo, f_lo = mid, f_mid
            else:
                hi = mid
        return 0.5 * (lo + hi)
    return None


def adjustment_result(spec: SolutionSpec, conditions: ConditionsSpec) -> AdjustmentResult | None:
    """The adjustment of a solution that states ``adjusted_to`` (None otherwise).

    Parameters
    ----------
    spec : SolutionSpec
        The checked solution; its strong base (or acid) includes the exact amount.
    conditions : ConditionsSpec

    Returns
    -------
    AdjustmentResult or None
    """
    adj = spec.adjustment
    if adj is None:
        return None
    solution = spec.to_solution(conditions)
    if adj.component is not None:
        where = _Titrant("component", 0.0, adj.component)
    else:
        field = "strong_base" if adj.titrant == "strong-base" else "strong_acid"
        where = _Titrant(field, float(getattr(solution, field)) - adj.amount)
    sid = next((s for s in spec.shortcuts if CATALOGUE[s].formula), None)
    amount = recipe = None
    if sid is not None:
        try:
            amount = _shortcut_amount(sid, solution, where, adj.target_ph, adj.amount)
            if amount is not None:
                recipe = float(equilibrium(_with_titrant(solution, where, amount)).ph)
        except ChemistryError:
            amount = recipe = None

    def volume(x: float | None) -> float | None:
        return None if x is None or adj.stock is None else 1000.0 * x / adj.stock

    compound = spec.components[adj.component].compound if adj.component is not None else None
    return AdjustmentResult(adj.target_ph, adj.titrant, adj.amount, sid, amount, recipe, adj.stock, volume(adj.amount), volume(amount), compound)
