r"""The operating region: every condition the method allows, and the worst point in it.

The region is the box

    first component's total ∈ working range (the whole solution scaled)
    × temperature ∈ nominal ± tolerance
    × background ionic strength ∈ nominal ± tolerance (where a background is given)

The shortcut's error (shortcut pH − exact pH, both at the same point) is
evaluated on a grid over the box in one vectorized engine call (corners
included: the grid runs to every edge); from the worst grid point a bounded
local search (L-BFGS-B, on log c, T and I_b scaled to the unit cube) finds the
worst point inside. The parts of the working range where the shortcut holds
at every temperature and background of the box are found on the same grid,
their ends refined by Brent's method on max |error| over the other axes.

References
----------
.. [1] R. H. Byrd, P. Lu, J. Nocedal and C. Zhu, SIAM J. Sci. Comput. 16 (1995)
   1190 (L-BFGS-B, scipy.optimize.minimize).
.. [2] R. P. Brent, Algorithms for Minimization without Derivatives
   (Prentice-Hall, 1973), ch. 4 (scipy.optimize.brentq).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from .. import limits
from ..inputs.model import ConditionsSpec, SolutionSpec
from .batch import Variation, solution_for
from .validity import runs_of

__all__ = ["RegionPoint", "RegionResult", "operating_region", "CONCENTRATION_POINTS", "TEMPERATURE_POINTS", "BACKGROUND_POINTS"]

CONCENTRATION_POINTS = 41
"""Grid points over the working range (log-spaced)."""
TEMPERATURE_POINTS = 5
"""Grid points over nominal ± tolerance (ends included)."""
BACKGROUND_POINTS = 3
"""Grid points over the background ± its tolerance (ends included)."""
_REL_TOL_LOG = float(np.log10(1.0 + limits.VALIDITY_CONCENTRATION_REL_TOLERANCE))


@dataclass(frozen=True)
class RegionPoint:
    """One point of the operating region and the shortcut's error there.

    Attributes
    ----------
    concentration : float
        First component's total [mol/L].
    temperature : float
        [°C].
    background : float
        Background ionic strength [mol/kg].
    error : float
        Shortcut pH − exact pH [pH].
    """

    concentration: float
    temperature: float
    background: float
    error: float


@dataclass(frozen=True)
class RegionResult:
    """The shortcut over the operating region.

    Attributes
    ----------
    concentration, temperature, background : (float, float)
        The box [mol/L, °C, mol/kg].
    worst : RegionPoint
        Where |error| is largest.
    corners : tuple of RegionPoint
        The error at each corner of the box.
    holds : tuple of (float, float)
        Parts of the working range [mol/L] where |error| ≤ limit at every
        temperature and background of the box.
    limit : float
    """

    concentration: tuple[float, float]
    temperature: tuple[float, float]
    background: tuple[float, float]
    worst: RegionPoint
    corners: tuple[RegionPoint, ...]
    holds: tuple[tuple[float, float], ...]
    limit: float

    @property
    def holds_everywhere(self) -> bool:
        return abs(self.worst.error) <= self.limit


def _errors(approx_id: str, spec: SolutionSpec, conditions: ConditionsSpec, c: NDArray[np.float64], t: NDArray[np.float64], b: NDArray[np.float64]) -> NDArray[np.float64]:
    """The shortcut's error at points (c, t, b), one engine call."""
    c0 = spec.lead_concentration
    sol = solution_for(spec, conditions, Variation(scale=c / c0, temperature=t, background=b))
    return np.broadcast_to(np.asarray(spec.approximation(approx_id).error(sol), dtype=np.float64), np.shape(c))


def _span(nominal: float, tolerance: float, floor: float) -> tuple[float, float]:
    return (max(nominal - tolerance, floor), nominal + tolerance)


def operating_region(approx_id: str, spec: SolutionSpec, conditions: ConditionsSpec, limit: float) -> RegionResult:
    """Evaluate a shortcut over the method's operating region.

    Parameters
    ----------
    approx_id : str
        Catalogue id of the shortcut.
    spec : SolutionSpec
    conditions : ConditionsSpec
        Temperature ± tolerance [°C], background ± tolerance [mol/kg].
    limit : float
        Acceptance limit on |error| [pH].

    Returns
    -------
    RegionResult
    """
    from scipy.optimize import brentq, minimize  # imported on use: scipy.optimize takes about 0.45 s to import

    lo, hi = spec.working_range
    t_span = _span(conditions.temperature, conditions.temperature_tolerance, limits.TEMPERATURE[0])
    b_span = _span(conditions.background, conditions.background_tolerance, 0.0)
    cs = np.geomspace(lo, hi, CONCENTRATION_POINTS) if hi > lo else np.array([lo])
    ts = np.linspace(*t_span, TEMPERATURE_POINTS) if t_span[1] > t_span[0] else np.array([t_span[0]])
    bs = np.linspace(*b_span, BACKGROUND_POINTS) if b_span[1] > b_span[0] else np.array([b_span[0]])
    C, T, B = np.meshgrid(cs, ts, bs, indexing="ij")
    err = _errors(approx_id, spec, conditions, C.ravel(), T.ravel(), B.ravel()).reshape(C.shape)
    absval = np.abs(err)

    corners = tuple(
        RegionPoint(float(cs[i]), float(ts[j]), float(bs[k]), float(err[i, j, k]))
        for i in sorted({0, len(cs) - 1}) for j in sorted({0, len(ts) - 1}) for k in sorted({0, len(bs) - 1})
    )

    # local refinement from the worst grid point, on the unit cube
    i, j, k = np.unravel_index(int(np.argmax(absval)), absval.shape)
    lows = np.array([np.log10(lo), t_span[0], b_span[0]])
    widths = np.array([np.log10(hi) - np.log10(lo), t_span[1] - t_span[0], b_span[1] - b_span[0]])
    free = widths > 0

    def point(z: NDArray[np.float64]) -> tuple[float, float, float]:
        x = lows + np.where(free, z, 0.0) * widths
        return 10.0 ** x[0], x[1], x[2]

    def neg_abs(z: NDArray[np.float64]) -> float:
        c, t, b = point(z)
        return -abs(float(_errors(approx_id, spec, conditions, np.asarray(c), np.asarray(t), np.asarray(b))))

    start = np.array([
        (np.log10(cs[i]) - lows[0]) / widths[0] if free[0] else 0.0,
        (ts[j] - lows[1]) / widths[1] if free[1] else 0.0,
        (bs[k] - lows[2]) / widths[2] if free[2] else 0.0,
    ])
    best = (float(absval[i, j, k]), (float(cs[i]), float(ts[j]), float(bs[k])))
    if free.any():
        res = minimize(neg_abs, start, method="L-BFGS-B", bounds=[(0.0, 1.0)] * 3, options={"maxiter": 50})
        if -float(res.fun) > best[0]:
            best = (-float(res.fun), point(np.clip(res.x, 0.0, 1.0)))
    c, t, b = best[1]
    worst_err = float(_errors(approx_id, spec, conditions, np.asarray(c), np.asarray(t), np.asarray(b)))
    worst = RegionPoint(float(c), float(t), float(b), worst_err)

    # parts of the working range that hold over every temperature and background of the box
    tb_t, tb_b = np.meshgrid(ts, bs, indexing="ij")

    def over_box(log_c: float) -> float:
        cc = np.full(tb_t.size, 10.0**log_c)
        return float(np.max(np.abs(_errors(approx_id, spec, conditions, cc, tb_t.ravel(), tb_b.ravel())))) - limit

    per_c = absval.reshape(len(cs), -1).max(axis=1)
    inside = per_c <= limit
    holds = []
    n = len(cs)
    for m, e in runs_of(inside):
        a = cs[0] if m == 0 else 10.0 ** brentq(over_box, np.log10(cs[m - 1]), np.log10(cs[m]), xtol=_REL_TOL_LOG)
        z = cs[-1] if e == n - 1 else 10.0 ** brentq(over_box, np.log10(cs[e]), np.log10(cs[e + 1]), xtol=_REL_TOL_LOG)
        holds.append((float(a), float(z)))
    return RegionResult((float(lo), float(hi)), t_span, b_span, worst, corners, tuple(holds), limit)
