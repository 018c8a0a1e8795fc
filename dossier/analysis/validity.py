r"""Validity ranges of a shortcut: where |shortcut pH − exact pH| ≤ the limit.

Concentration: the whole solution is diluted or concentrated together (every
total, and any strong acid or base, times one factor); the range is stated
as the first component's total, swept over 1e-10 … 10 mol/L (less where
another component would pass 10 mol/L). pKa: the pKa of the step the shortcut
uses (with the other steps of that substance shifted alike) over −2 … 16, at
the nominal concentration.

The error is evaluated on a grid and every crossing of ±limit is then found
on the error itself, to 0.1 % in concentration and 0.001 in pKa, by
subdividing the grid cell it lies in: :data:`REFINE_POINTS` points at a
time, each batch one solve of the engine (which costs about what one point
does), so that two batches reach a hundredth of the tolerance where Brent's
method took five to seven solves one point at a time for the tolerance; the
end returned is the last point on the side where the shortcut holds (never
beyond the crossing). The
largest |error| over the working range is found the same way, around the
largest grid value. Because the assumptions of a shortcut can
err in opposite directions, the set can be several intervals; each says
whether it holds *without compensating errors* — every single assumption's
own error (see
:meth:`~dossier.chemistry.approximations.Approximation.partial_ph`, and the
activity correction when the method uses an activity model) also stays within
the limit over it — or only because errors of opposite sign cancel
(``Interval.robust`` is the flag; the pages never call it "robust", a word
that means something else in method validation).

The model's range: no interval reaches beyond the ionic strength at which the
method's activity model is used in practice
(:attr:`~dossier.chemistry.activity.ActivityModel.max_ionic_strength`) nor,
in the concentration sweep, beyond the solubility of a component's form (when
the substance table gives one). The ionic strength is the engine's, solved on
the grid; where it crosses the model's limit the crossing is found by Brent's
method to the same tolerances. Each interval carries the ionic strength at its
two ends, solved again by the engine at those points.

References
----------
.. [1] R. P. Brent, Algorithms for Minimization without Derivatives
   (Prentice-Hall, 1973), ch. 4 (scipy.optimize.brentq), for the ionic strength's crossing of the model's limit.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
from numpy.typing import NDArray

from .. import limits
from ..chemistry import CATALOGUE, ActivityModelId, Approximation, Solution, activity_model, equilibrium
from ..inputs.model import ConditionsSpec, SolutionSpec
from .batch import TOTAL_MAX, Variation, solution_for

__all__ = [
    "Interval",
    "Sweep",
    "ValidityResult",
    "validity",
    "error_at",
    "key_step",
    "pka_shifts",
    "concentration_scales",
    "CONCENTRATION_SPAN",
    "PKA_SPAN",
    "CONCENTRATION_POINTS",
    "PKA_POINTS",
]

CONCENTRATION_SPAN = limits.SWEEP_CONCENTRATION
"""Sweep of the first component's total [mol/L]."""
PKA_SPAN = limits.SWEEP_PKA
"""Sweep of the key step's pKa."""
CONCENTRATION_POINTS = 221
"""Grid points of the concentration sweep (20 per decade)."""
PKA_POINTS = 181
"""Grid points of the pKa sweep (0.1 apart)."""
_REL_TOL_LOG = float(np.log10(1.0 + limits.VALIDITY_CONCENTRATION_REL_TOLERANCE))  # on log10 c
_PKA_TOL = limits.VALIDITY_PKA_TOLERANCE
REFINE_POINTS = 129
"""Points per batch when a crossing or the largest |error| is refined within grid cells."""
_FINER = 100  # refined to a hundredth of the stated tolerance: the second batch that takes costs one solve


@dataclass(frozen=True)
class Interval:
    """A range where the shortcut holds.

    Attributes
    ----------
    low, high : float
        Ends [mol/L, or pKa units].
    robust : bool
        True when it holds without compensating errors; False when it holds
        only because errors of opposite sign cancel (see
        :attr:`without_compensating_errors`).
    low_is_sweep_end, high_is_sweep_end : bool
        True when the end is the end of the sweep, not a crossing of the limit.
    low_is_cut, high_is_cut : bool
        True when the end is where the sweep leaves the activity model's range
        or reaches a solubility (the shortcut is not judged beyond it).
    ionic_strength_low, ionic_strength_high : float
        Ionic strength of the exact solution at each end [mol/kg].
    """

    low: float
    high: float
    robust: bool
    low_is_sweep_end: bool
    high_is_sweep_end: bool
    low_is_cut: bool = False
    high_is_cut: bool = False
    ionic_strength_low: float = float("nan")
    ionic_strength_high: float = float("nan")

    @property
    def without_compensating_errors(self) -> bool:
        """Whether it holds without compensating errors (each assumption alone within the limit)."""
        return self.robust


@dataclass(frozen=True)
class Sweep:
    """A sweep on its grid: the varied quantity, the exact pH, the error, the
    single assumptions' errors, the exact solution's ionic strength [mol/kg]
    and the parts of the sweep outside the model's range (or above a
    solubility), as (low, high) in the swept quantity."""

    x: NDArray[np.float64]
    exact_ph: NDArray[np.float64]
    error: NDArray[np.float64]
    parts: dict[str, NDArray[np.float64]]
    ionic_strength: NDArray[np.float64] | None = None
    outside: tuple[tuple[float, float], ...] = ()


@dataclass(frozen=True)
class ValidityResult:
    """Where one shortcut holds for one solution.

    Attributes
    ----------
    shortcut : str
    limit : float
        The acceptance limit [pH].
    nominal_error : float
        Error at nominal inputs [pH].
    concentration_intervals : tuple of Interval
        First component's total [mol/L].
    concentration_sweep : Sweep
    concentration_span : (float, float)
        The swept range of the first component's total [mol/L].
    pka_intervals : tuple of Interval
    pka_sweep : Sweep
    pka_step : (int, int) or None
        (component, step) whose pKa is swept (0-based); None for a shortcut
        that uses no pKa (a strong acid or base alone: empty pKa sweep).
    working_range : (float, float)
        First component's working range [mol/L].
    max_abs_error : float
        Largest |error| over the working range [pH].
    max_abs_error_at : float
        Where it occurs (first component's total) [mol/L].
    holds_within_working_range : tuple of (float, float)
        The parts of the working range where the shortcut holds (within the
        model's range and the solubility).
    max_ionic_strength : float or None
        The activity model's range [mol/kg]; None for the ideal model.
    model_range_cut : float or None
        First component's total [mol/L] where the ionic strength reaches the
        model's range (the sweep's low end when it starts beyond it); None
        when the sweep stays within it.
    solubility_cut : float or None
        First component's total [mol/L] where a component reaches its
        solubility (``solubility_component``); None when none is reached.
    """

    shortcut: str
    limit: float
    nominal_error: float
    concentration_intervals: tuple[Interval, ...]
    concentration_sweep: Sweep
    concentration_span: tuple[float, float]
    pka_intervals: tuple[Interval, ...]
    pka_sweep: Sweep
    pka_step: tuple[int, int] | None
    working_range: tuple[float, float]
    max_abs_error: float
    max_abs_error_at: float
    holds_within_working_range: tuple[tuple[float, float], ...]
    max_ionic_strength: float | None = None
    model_range_cut: float | None = None
    solubility_cut: float | None = None
    solubility_component: int | None = None

    @property
    def concentration_cut(self) -> float | None:
        """First component's total [mol/L] beyond which the shortcut is not judged (model's range or solubility), or None."""
        cuts = [c for c in (self.model_range_cut, self.solubility_cut) if c is not None]
        return min(cuts) if cuts else None

    @property
    def holds_on_whole_working_range(self) -> bool:
        lo, hi = self.working_range
        return len(self.holds_within_working_range) == 1 and np.isclose(self.holds_within_working_range[0][0], lo) and np.isclose(self.holds_within_working_range[0][1], hi)


# ---------------------------------------------------------------- errors on a batch
def _errors(approx: Approximation, solution: Solution) -> tuple[NDArray[np.float64], NDArray[np.float64], dict[str, NDArray[np.float64]], NDArray[np.float64]]:
    """(exact pH, shortcut error, errors of the single assumptions, exact ionic strength [mol/kg]) for a batch."""
    exact = equilibrium(solution)
    err = np.asarray(approx.ph(solution), dtype=np.float64) - np.asarray(exact.ph)
    parts: dict[str, NDArray[np.float64]] = {}
    if approx.formula:
        ideal = exact if solution.activity == ActivityModelId.IDEAL else equilibrium(replace(solution, activity=ActivityModelId.IDEAL))
        partial = approx.partial_ph(solution)
        if partial:
            for label, ph in partial.items():
                parts[label] = np.asarray(ph, dtype=np.float64) - np.asarray(ideal.ph)
        elif solution.activity != "ideal":
            parts["formula"] = np.asarray(approx.ph(solution), dtype=np.float64) - np.asarray(ideal.ph)
        if solution.activity != "ideal":
            parts["activity neglected"] = np.asarray(ideal.ph) - np.asarray(exact.ph)
    ionic = np.broadcast_to(np.asarray(exact.ionic_strength, dtype=np.float64), err.shape).copy()
    return np.broadcast_to(np.asarray(exact.ph, dtype=np.float64), err.shape).copy(), err, parts, ionic


def _worst_part(approx: Approximation, solution: Solution) -> NDArray[np.float64]:
    """Largest |error| of the single assumptions at each point of a batch (0 where there are none)."""
    err, parts = _errors(approx, solution)[1:3]
    return np.max(np.abs(np.array(list(parts.values()))), axis=0) if parts else np.zeros_like(err)


def error_at(approx: Approximation, spec: SolutionSpec, conditions: ConditionsSpec, variation: Variation | None = None) -> float | NDArray[np.float64]:
    """The shortcut's error for ``spec`` under a variation (vectorized)."""
    sol = solution_for(spec, conditions, variation)
    return approx.error(sol)


def key_step(approx_id: str, spec: SolutionSpec, conditions: ConditionsSpec) -> tuple[int, int] | None:
    """(component, step) of the pKa a shortcut uses (the catalogue says which): the one its pKa sweep varies;
    None for a shortcut that uses no pKa (a strong acid or base alone)."""
    return CATALOGUE[approx_id].key_step(solution_for(spec, conditions))


def pka_shifts(approx_id: str, spec: SolutionSpec, conditions: ConditionsSpec, n: int) -> tuple[NDArray[np.float64], float, list[int]]:
    """Shifts that sweep the key step's pKa over −2 … 16 (every pKa of the
    substance kept within the engine's −5 … 20); the key pKa; the components
    of that substance."""
    k, j = key_step(approx_id, spec, conditions)
    pks = [p.thermodynamic for p in spec.components[k].pka]
    key = pks[j]
    lo = max(PKA_SPAN[0] - key, limits.PKA_ENGINE[0] - min(pks))
    hi = min(PKA_SPAN[1] - key, limits.PKA_ENGINE[1] - max(pks))
    same = list(spec.same_substance(k))
    return np.linspace(lo, hi, n), key, same


def concentration_scales(spec: SolutionSpec, n: int) -> NDArray[np.float64]:
    """Factors that sweep the first component's total (a strong acid's or base's
    alone) over 1e-10 … 10 mol/L (less where another component would pass 10 mol/L)."""
    c0 = spec.lead_concentration
    biggest = max([c.concentration for c in spec.components] or [c0])
    return np.geomspace(CONCENTRATION_SPAN[0] / c0, min(CONCENTRATION_SPAN[1] / c0, TOTAL_MAX / biggest), n)


# ---------------------------------------------------------------- intervals
def _intervals(
    x: NDArray[np.float64],
    err: NDArray[np.float64],
    parts: dict[str, NDArray[np.float64]],
    limit: float,
    refine,  # noqa: ANN001 - callable(a, b, f_a, f_b) -> where |error| crosses the limit
    refine_parts,  # noqa: ANN001 - callable(a, b, g_a, g_b) -> where max |part| crosses the limit
) -> tuple[Interval, ...]:
    """Runs of grid points with |error| ≤ limit, ends refined; each run split
    where it changes between robust and not robust."""
    inside = np.abs(err) <= limit
    worst_part = np.max(np.abs(np.array(list(parts.values()))), axis=0) if parts else np.zeros_like(err)
    robust = worst_part <= limit
    out = []
    n = len(x)
    for i, j in runs_of(inside):
        low_end, high_end = i == 0, j == n - 1
        low = x[0] if low_end else refine(x[i - 1], x[i], err[i - 1], err[i])
        high = x[-1] if high_end else refine(x[j], x[j + 1], err[j], err[j + 1])
        # split [i, j] where robustness changes
        start, start_x, start_is_end = i, low, low_end
        for k in range(i + 1, j + 1):
            if robust[k] != robust[k - 1]:
                cut = refine_parts(x[k - 1], x[k], worst_part[k - 1], worst_part[k])
                out.append(Interval(float(start_x), float(cut), bool(robust[start]), start_is_end, False))
                start, start_x, start_is_end = k, cut, False
        out.append(Interval(float(start_x), float(high), bool(robust[start]), start_is_end, high_end))
    return tuple(out)


def _crossing(f, a: float, b: float, fa: float, fb: float, limit: float, tol: float) -> float:  # noqa: ANN001 - f: array → array
    """Where |f| first passes ``limit`` going from the end of [a, b] inside (|f| ≤ limit)
    to the end outside, to within ``tol``: the last point found inside.

    The cell is cut into :data:`REFINE_POINTS` points at a time, ``f`` evaluated on
    all of them in one call, and the cut repeated on the sub-cell where |f| first
    passes the limit, until that sub-cell is narrower than a hundredth of ``tol``
    (two batches from a grid cell of the sweeps). When no point of a batch passes the
    limit (the outside end, solved again, holds after all), or the inside end itself
    does not hold when solved again, the inside end is returned as it is, as Brent's
    method did when the crossing was not bracketed.
    """
    inside, outside = (a, b) if abs(fa) <= limit else (b, a)
    while abs(outside - inside) > tol / _FINER:
        x = np.linspace(inside, outside, REFINE_POINTS)
        out = np.abs(np.asarray(f(x), dtype=np.float64)) > limit
        k = int(np.argmax(out))  # the first point past the limit, walking from the inside end
        if k == 0:  # nothing past the limit, or the inside end itself past it
            return float(inside)
        inside, outside = float(x[k - 1]), float(x[k])
    return float(inside)


def _peak(f, a: float, b: float, tol: float) -> tuple[float, float]:  # noqa: ANN001 - f: array → array
    """(largest |f|, where) on [a, b] to within ``tol`` in x: :data:`REFINE_POINTS` points at
    a time, each round on the two cells around the largest value found so far."""
    best, where = -np.inf, a
    lo, hi = a, b
    while True:
        x = np.linspace(lo, hi, REFINE_POINTS)
        v = np.abs(np.asarray(f(x), dtype=np.float64))
        k = int(np.nanargmax(v))
        if v[k] > best:
            best, where = float(v[k]), float(x[k])
        if (hi - lo) / (REFINE_POINTS - 1) <= tol / _FINER:
            return best, where
        lo, hi = float(x[max(k - 1, 0)]), float(x[min(k + 1, REFINE_POINTS - 1)])


def runs_of(inside: NDArray[np.bool_]) -> list[tuple[int, int]]:
    """(first, last) grid index of every run of consecutive True values.

    >>> runs_of(np.array([False, True, True, False, True]))
    [(1, 2), (4, 4)]
    """
    out, i, n = [], 0, len(inside)
    while i < n:
        if not inside[i]:
            i += 1
            continue
        j = i
        while j + 1 < n and inside[j + 1]:
            j += 1
        out.append((i, j))
        i = j + 1
    return out


def _runs(x: NDArray[np.float64], inside: NDArray[np.bool_], refine) -> tuple[tuple[float, float], ...]:  # noqa: ANN001 - callable(a, b) -> crossing
    """Runs of grid points where ``inside`` holds, as (low, high) with the ends refined between grid points."""
    n = len(x)
    return tuple((float(x[0]) if i == 0 else refine(x[i - 1], x[i]), float(x[-1]) if j == n - 1 else refine(x[j], x[j + 1]))
                 for i, j in runs_of(inside))


def _complement(allowed: tuple[tuple[float, float], ...], lo: float, hi: float) -> tuple[tuple[float, float], ...]:
    """The parts of [lo, hi] outside ``allowed`` (sorted, disjoint)."""
    out, start = [], lo
    for a, b in allowed:
        if a > start:
            out.append((start, a))
        start = max(start, b)
    if start < hi:
        out.append((start, hi))
    return tuple(out)


def _clip(intervals: tuple[Interval, ...], allowed: tuple[tuple[float, float], ...]) -> tuple[Interval, ...]:
    """Each interval cut to the allowed parts of the sweep; an end moved there is marked as a cut."""
    out = []
    for iv in intervals:
        for a, b in allowed:
            lo, hi = max(iv.low, a), min(iv.high, b)
            if lo < hi:
                low_cut, high_cut = lo > iv.low, hi < iv.high
                out.append(replace(iv, low=lo, high=hi, low_is_sweep_end=iv.low_is_sweep_end and not low_cut, high_is_sweep_end=iv.high_is_sweep_end and not high_cut,
                                   low_is_cut=low_cut, high_is_cut=high_cut))
    return tuple(out)


def _level(f, a: float, b: float, fa: float, level: float, tol: float) -> float:  # noqa: ANN001
    """Where f crosses ``level`` between a and b (one side each); the end inside (f ≤ level) when no root is bracketed."""
    from scipy.optimize import brentq  # imported on use: scipy.optimize takes about 0.45 s to import

    try:
        return float(brentq(lambda v: f(v) - level, a, b, xtol=tol, rtol=4 * np.finfo(float).eps))
    except ValueError:
        return a if fa <= level else b


def _with_ionic_strength(intervals: tuple[Interval, ...], ionic_at) -> tuple[Interval, ...]:  # noqa: ANN001 - callable(array of x) -> array of I
    """Each interval with the engine's ionic strength at its two ends."""
    if not intervals:
        return intervals
    ends = np.array([[iv.low, iv.high] for iv in intervals], dtype=np.float64)
    ionic = np.asarray(ionic_at(ends.ravel()), dtype=np.float64).reshape(ends.shape)
    return tuple(replace(iv, ionic_strength_low=float(i_lo), ionic_strength_high=float(i_hi)) for iv, (i_lo, i_hi) in zip(intervals, ionic, strict=True))


def _working_parts(intervals: tuple[Interval, ...], lo: float, hi: float) -> tuple[tuple[float, float], ...]:
    out = []
    for iv in intervals:
        a, b = max(iv.low, lo), min(iv.high, hi)
        if a <= b * (1 + 1e-12):
            out.append((a, min(b, hi)))
    return tuple(out)


def validity(approx_id: str, spec: SolutionSpec, conditions: ConditionsSpec, limit: float) -> ValidityResult:
    """Validity ranges of one shortcut for one solution.

    Parameters
    ----------
    approx_id : str
        A catalogue id that applies to the solution.
    spec : SolutionSpec
    conditions : ConditionsSpec
    limit : float
        Largest tolerated |error| [pH].

    Returns
    -------
    ValidityResult

    Examples
    --------
    Benzoic acid (pKa 4.202), square-root formula, limit 0.05 pH: holds from
    about 1.2 mmol/L up (and, by cancellation only, in a sliver near 1e-10).

    >>> from dossier.inputs.loader import load_method
    >>> m = load_method("methods/benzoate-extract.yaml").method
    >>> v = validity("weak-acid-square-root", m.solutions[0], m.conditions, 0.05)
    >>> [(round(i.low * 1e3, 2), i.robust) for i in v.concentration_intervals][1]  # mmol/L
    (1.22, True)
    """
    approx = spec.approximation(approx_id)  # with the procedure's own constants where it states them
    top = activity_model(conditions.activity).max_ionic_strength
    c0 = spec.lead_concentration
    scales = concentration_scales(spec, CONCENTRATION_POINTS)
    exact, err, parts, ionic = _errors(approx, solution_for(spec, conditions, Variation(scale=scales)))
    x_conc = scales * c0

    def ionic_conc(x: NDArray[np.float64] | float) -> NDArray[np.float64]:
        return np.asarray(equilibrium(solution_for(spec, conditions, Variation(scale=np.asarray(x, dtype=np.float64) / c0))).ionic_strength, dtype=np.float64)

    # the part of the sweep within the model's range and below every solubility
    model_range_cut = None
    in_model = (ionic <= top) if top is not None else np.ones_like(ionic, dtype=bool)
    if not in_model.all():
        first_out = int(np.argmin(in_model))
        model_range_cut = float(x_conc[0]) if first_out == 0 else 10.0 ** _level(
            lambda lx: float(ionic_conc(10.0**lx)), np.log10(x_conc[first_out - 1]), np.log10(x_conc[first_out]), float(ionic[first_out - 1]), top, _REL_TOL_LOG)
    solubility_cut, solubility_component = None, None
    for k, comp in enumerate(spec.components):
        if comp.solubility is not None:
            cut_k = comp.solubility * c0 / comp.concentration
            if cut_k < x_conc[-1] and (solubility_cut is None or cut_k < solubility_cut):
                solubility_cut, solubility_component = float(max(cut_k, x_conc[0])), k
    conc_cuts = [c for c in (model_range_cut, solubility_cut) if c is not None]
    conc_end = min(conc_cuts) if conc_cuts else float(x_conc[-1])
    conc_allowed = ((float(x_conc[0]), conc_end),) if conc_end > x_conc[0] else ()

    def err_conc(log_x: NDArray[np.float64] | float) -> NDArray[np.float64]:
        return np.asarray(error_at(approx, spec, conditions, Variation(scale=10.0 ** np.asarray(log_x, dtype=np.float64) / c0)), dtype=np.float64)

    def refine_conc(a: float, b: float, fa: float, fb: float) -> float:
        return 10.0 ** _crossing(err_conc, np.log10(a), np.log10(b), fa, fb, limit, _REL_TOL_LOG)

    def parts_conc(log_x: NDArray[np.float64]) -> NDArray[np.float64]:
        return _worst_part(approx, solution_for(spec, conditions, Variation(scale=10.0**log_x / c0)))

    def refine_parts_conc(a: float, b: float, ga: float, gb: float) -> float:
        return 10.0 ** _crossing(parts_conc, np.log10(a), np.log10(b), ga, gb, limit, _REL_TOL_LOG)

    conc_iv = _with_ionic_strength(_clip(_intervals(x_conc, err, parts, limit, refine_conc, refine_parts_conc), conc_allowed), ionic_conc)

    # pKa sweep of the key step (all steps of that substance shifted alike);
    # none for a shortcut that uses no pKa (a strong acid or base alone)
    pka_step = key_step(approx_id, spec, conditions)
    if pka_step is None:
        empty = np.zeros(0)
        pka_iv: tuple[Interval, ...] = ()
        pka_sweep = Sweep(empty, empty, empty, {}, empty)
    else:
        shifts, key, same = pka_shifts(approx_id, spec, conditions, PKA_POINTS)
        exact_p, err_p, parts_p, ionic_p = _errors(approx, solution_for(spec, conditions, Variation(pka_shift_all={i: shifts for i in same})))

        def ionic_pka(value: NDArray[np.float64] | float) -> NDArray[np.float64]:
            shift = np.asarray(value, dtype=np.float64) - key
            return np.asarray(equilibrium(solution_for(spec, conditions, Variation(pka_shift_all={i: shift for i in same}))).ionic_strength, dtype=np.float64)

        def err_pka(value: NDArray[np.float64]) -> NDArray[np.float64]:
            return np.asarray(error_at(approx, spec, conditions, Variation(pka_shift_all={i: value - key for i in same})), dtype=np.float64)

        def refine_pka(a: float, b: float, fa: float, fb: float) -> float:
            return _crossing(err_pka, a, b, fa, fb, limit, _PKA_TOL)

        def parts_pka(value: NDArray[np.float64]) -> NDArray[np.float64]:
            return _worst_part(approx, solution_for(spec, conditions, Variation(pka_shift_all={i: value - key for i in same})))

        def refine_parts_pka(a: float, b: float, ga: float, gb: float) -> float:
            return _crossing(parts_pka, a, b, ga, gb, limit, _PKA_TOL)

        x_pka = key + shifts
        if top is None:
            pka_allowed = ((float(x_pka[0]), float(x_pka[-1])),)
        else:
            pka_allowed = _runs(x_pka, ionic_p <= top, lambda a, b: _level(lambda v: float(ionic_pka(v)), a, b, float(ionic_pka(a)), top, _PKA_TOL))
        pka_iv = _with_ionic_strength(_clip(_intervals(x_pka, err_p, parts_p, limit, refine_pka, refine_parts_pka), pka_allowed), ionic_pka)
        pka_sweep = Sweep(x_pka, exact_p, err_p, parts_p, ionic_p, _complement(pka_allowed, float(x_pka[0]), float(x_pka[-1])))

    # largest |error| over the working range
    lo, hi = spec.working_range
    in_range = (x_conc >= lo) & (x_conc <= hi)
    ends = np.abs(err_conc(np.log10(np.array([lo, hi]))))
    cands = [(float(ends[0]), lo), (float(ends[1]), hi)]
    if in_range.any():
        idx = int(np.argmax(np.where(in_range, np.abs(err), -np.inf)))
        a = np.log10(x_conc[max(idx - 1, 0)])
        b = np.log10(x_conc[min(idx + 1, len(x_conc) - 1)])
        a, b = max(a, np.log10(lo)), min(b, np.log10(hi))
        if b > a:
            peak, at = _peak(err_conc, float(a), float(b), _REL_TOL_LOG)
            cands.append((peak, 10.0**at))
        cands.append((float(abs(err[idx])), float(x_conc[idx])))
    worst, where = max(cands)
    return ValidityResult(
        shortcut=approx_id,
        limit=limit,
        nominal_error=float(err_conc(np.log10(c0))),
        concentration_intervals=conc_iv,
        concentration_sweep=Sweep(x_conc, exact, err, parts, ionic, _complement(conc_allowed, float(x_conc[0]), float(x_conc[-1]))),
        concentration_span=(float(x_conc[0]), float(x_conc[-1])),
        pka_intervals=pka_iv,
        pka_sweep=pka_sweep,
        pka_step=pka_step,
        working_range=(lo, hi),
        max_abs_error=float(worst),
        max_abs_error_at=float(where),
        holds_within_working_range=_working_parts(conc_iv, lo, hi),
        max_ionic_strength=top,
        model_range_cut=model_range_cut,
        solubility_cut=solubility_cut,
        solubility_component=solubility_component,
    )
