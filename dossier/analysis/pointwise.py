"""The exact pH of one solution and the pH and error of every shortcut that applies.

This is the smallest analysis: one point, no sweep. The richer analyses
(validity ranges, sensitivity, verdicts) build on the same pieces.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..chemistry import CATALOGUE, Solution, StatedConstants, equilibrium
from ..inputs.model import Method

__all__ = ["ShortcutPoint", "PointResult", "evaluate_point", "evaluate_method"]


@dataclass(frozen=True)
class ShortcutPoint:
    """One shortcut at one point.

    Attributes
    ----------
    id, title : str
        From the catalogue.
    ph : float
        The shortcut's pH.
    error : float
        Shortcut pH − exact pH (activity scale).
    """

    id: str
    title: str
    ph: float
    error: float


@dataclass(frozen=True)
class PointResult:
    """The exact equilibrium of one solution and its shortcuts.

    Attributes
    ----------
    ph, ph_conc : float
        Exact pH on the activity and on the concentration scale.
    ionic_strength : float
        [mol/kg].
    pkw : float
        pKw used.
    temperature : float
        [°C].
    activity : str
        Activity-model id.
    shortcuts : tuple of ShortcutPoint
        Every applicable shortcut (or only those asked for).
    not_applicable : tuple of (str, str)
        (shortcut id, reason) for shortcuts asked for that do not apply.
    """

    ph: float
    ph_conc: float
    ionic_strength: float
    pkw: float
    temperature: float
    activity: str
    shortcuts: tuple[ShortcutPoint, ...]
    not_applicable: tuple[tuple[str, str], ...]


def evaluate_point(solution: Solution, shortcut_ids: tuple[str, ...] | None = None, *,
                   as_written: dict[str, StatedConstants | None] | None = None) -> PointResult:
    """Solve one (scalar) solution and evaluate its shortcuts.

    Parameters
    ----------
    solution : Solution
        A scalar solution (no array inputs).
    shortcut_ids : tuple of str, optional
        Shortcuts to evaluate; None: every one that applies.
    as_written : dict, optional
        ``{shortcut id: StatedConstants}``: the procedure's own constants of a
        shortcut (the exact pH keeps the model's).

    Returns
    -------
    PointResult

    Examples
    --------
    >>> from dossier.chemistry import Protolyte, Component
    >>> r = evaluate_point(Solution([Component(Protolyte("acetic", (4.756,)), 0.01)]))
    >>> round(r.ph, 3), [s.id for s in r.shortcuts][:1]
    (3.387, ['weak-acid-square-root'])
    """
    if solution.shape:
        raise ValueError("evaluate_point needs a scalar solution; use the sweep analyses for arrays")
    exact = equilibrium(solution)
    ids = tuple(CATALOGUE) if shortcut_ids is None else shortcut_ids
    points = []
    skipped = []
    for sid in ids:
        approx = CATALOGUE[sid].as_written((as_written or {}).get(sid))
        why = approx.why_not(solution)
        if why is not None:
            if shortcut_ids is not None:
                skipped.append((sid, why))
            continue
        ph = float(approx.ph(solution))
        points.append(ShortcutPoint(sid, approx.title, ph, ph - float(exact.ph)))
    return PointResult(
        ph=float(exact.ph),
        ph_conc=float(exact.ph_conc),
        ionic_strength=float(exact.ionic_strength),
        pkw=float(exact.pkw),
        temperature=float(solution.temperature),
        activity=solution.activity,
        shortcuts=tuple(points),
        not_applicable=tuple(skipped),
    )


def evaluate_method(method: Method) -> tuple[tuple[str, PointResult], ...]:
    """Each solution of a method at nominal inputs, with the shortcuts it claims.

    Returns
    -------
    tuple of (solution id, PointResult)
    """
    return tuple(
        (s.id, evaluate_point(s.to_solution(method.conditions), s.shortcuts, as_written={c.id: c.stated for c in s.claims}))
        for s in method.solutions
    )
