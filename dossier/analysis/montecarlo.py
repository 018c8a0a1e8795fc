r"""Monte Carlo propagation of distributions (JCGM 101:2008).

Every uncertain input (:func:`dossier.analysis.batch.inputs_of`) is drawn
from its stated distribution — normal for a pKa with a standard uncertainty,
rectangular for a tolerance — with a seeded ``numpy.random.Generator``; the
exact pH and each shortcut's error are computed for every draw in one
vectorized engine call. Reported: the mean, the standard deviation (the
standard uncertainty) and the probabilistically symmetric 95 % coverage
interval (JCGM 101 §7.7), and for each shortcut the probability that
|error| exceeds the acceptance limit.

The GUM result is validated against Monte Carlo as JCGM 101 §8 describes:
with u(y) written to two significant digits, u = c × 10^l, the numerical
tolerance is δ = ½ × 10^l; the GUM interval y ± U (U = 1.96 u_c, normal
coverage factor for 95 %) is validated when both of

.. math::
    d_{low} = |y - U - y_{low}|, \qquad d_{high} = |y + U - y_{high}|

are at most δ, where [y_low, y_high] is the Monte-Carlo coverage interval.

References
----------
.. [1] JCGM 101:2008, Evaluation of measurement data — Supplement 1 to the
   GUM — Propagation of distributions using a Monte Carlo method, §7.7, §8.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from ..chemistry import equilibrium
from ..inputs.model import ConditionsSpec, SolutionSpec
from .batch import inputs_of, solution_for, variation_from
from .decision import conformity_counted
from .sensitivity import GumResult

__all__ = ["Summary", "Comparison", "McResult", "monte_carlo", "compare", "DEFAULT_DRAWS", "COVERAGE", "K95"]

DEFAULT_DRAWS = 1_000_000
COVERAGE = 0.95
K95 = 1.959963984540054
"""Coverage factor of a normal distribution for 95 % (two-sided)."""
HIST_BINS = 80


@dataclass(frozen=True)
class Summary:
    """Summary of a Monte-Carlo output distribution.

    Attributes
    ----------
    mean, u : float
        Mean and standard deviation (standard uncertainty) [pH].
    coverage : (float, float)
        Probabilistically symmetric 95 % coverage interval [pH].
    histogram : (tuple, tuple)
        (counts, bin edges) for plots.
    """

    mean: float
    u: float
    coverage: tuple[float, float]
    histogram: tuple[tuple[int, ...], tuple[float, ...]]


@dataclass(frozen=True)
class Comparison:
    """GUM against Monte Carlo (JCGM 101 §8)."""

    gum_interval: tuple[float, float]
    mc_interval: tuple[float, float]
    d_low: float
    d_high: float
    tolerance: float
    validated: bool


@dataclass(frozen=True)
class McResult:
    """Monte Carlo for one solution: the exact pH and each shortcut's error.

    Attributes
    ----------
    draws : int
    seed : int
        Entropy of the ``numpy.random.SeedSequence``.
    spawn_key : tuple of int
        Its spawn key (which solution of which method).
    exact : Summary
    errors : dict
        ``{shortcut id: Summary}``.
    p_exceed : dict
        ``{shortcut id: P(|error| > limit)}``.
    limit : float
    p_conform : dict
        ``{shortcut id: fraction of draws with |pH_shortcut − pH_true| ≤ limit}``: the
        shortcut at nominal inputs against each draw of the exact pH plus a
        normal draw of the activity model's error (:mod:`dossier.analysis.decision`).
    model_u : float
        Standard uncertainty of the activity model used for those draws [pH].
    """

    draws: int
    seed: int
    spawn_key: tuple[int, ...]
    exact: Summary
    errors: dict[str, Summary]
    p_exceed: dict[str, float]
    limit: float
    p_conform: dict[str, float] = field(default_factory=dict)
    model_u: float = 0.0


def _summary(values: NDArray[np.float64]) -> Summary:
    lo, hi = np.quantile(values, [(1 - COVERAGE) / 2, (1 + COVERAGE) / 2])
    span = float(values.max() - values.min())
    edges = np.linspace(float(values.min()) - 1e-12, float(values.max()) + 1e-12 + (1e-9 if span == 0 else 0.0), HIST_BINS + 1)
    counts, edges = np.histogram(values, bins=edges)
    return Summary(float(values.mean()), float(values.std(ddof=1)), (float(lo), float(hi)),
                        (tuple(int(c) for c in counts), tuple(float(e) for e in edges)))


def monte_carlo(
    approx_ids: tuple[str, ...],
    spec: SolutionSpec,
    conditions: ConditionsSpec,
    limit: float,
    *,
    draws: int = DEFAULT_DRAWS,
    seed: int = 20261202,
    spawn_key: tuple[int, ...] = (),
    model_u: float = 0.0,
) -> McResult:
    """Propagate the input distributions through the exact pH and the shortcuts.

    Parameters
    ----------
    approx_ids : tuple of str
    spec : SolutionSpec
    conditions : ConditionsSpec
    limit : float
        Acceptance limit on |error| [pH].
    draws : int
        Number of Monte-Carlo trials (10⁶ by default).
    seed : int
        Entropy of the seed sequence (recorded in the results).
    spawn_key : tuple of int
        Distinguishes the solutions of a dossier drawn from the same seed.
    model_u : float
        Standard uncertainty of the activity model [pH]; drawn (normal) after
        the inputs, so that the input draws do not depend on it.

    Returns
    -------
    McResult
    """
    rng = np.random.Generator(np.random.PCG64(np.random.SeedSequence(seed, spawn_key=spawn_key)))
    inputs = inputs_of(spec, conditions)
    deltas = {inp.key: inp.draw(rng, draws) for inp in inputs}
    sol = solution_for(spec, conditions, variation_from(inputs, deltas, conditions))
    exact = np.broadcast_to(np.asarray(equilibrium(sol).ph, dtype=np.float64), (draws,))
    errors: dict[str, Summary] = {}
    p_exceed: dict[str, float] = {}
    for sid in approx_ids:
        err = np.broadcast_to(np.asarray(spec.approximation(sid).ph(sol), dtype=np.float64), (draws,)) - exact
        errors[sid] = _summary(err)
        p_exceed[sid] = float(np.count_nonzero(np.abs(err) > limit)) / draws
    model = rng.normal(0.0, model_u, draws) if model_u > 0.0 else 0.0
    nominal = solution_for(spec, conditions)
    p_conform = {sid: conformity_counted(float(spec.approximation(sid).ph(nominal)) - exact - model, limit) for sid in approx_ids}
    return McResult(draws, seed, tuple(spawn_key), _summary(np.asarray(exact)), errors, p_exceed, limit, p_conform, model_u)


def _two_digits_tolerance(u: float) -> float:
    """δ = ½ × 10^l where u = c × 10^l with c a two-digit integer (JCGM 101 §7.9.2)."""
    if u <= 0.0 or not math.isfinite(u):
        return 0.0
    exponent = math.floor(math.log10(u)) - 1
    return 0.5 * 10.0**exponent


def compare(gum_result: GumResult, mc: Summary) -> Comparison:
    """Validate the GUM interval y ± 1.96 u_c against the Monte-Carlo interval (JCGM 101 §8)."""
    y, u = gum_result.value, gum_result.u
    lo, hi = y - K95 * u, y + K95 * u
    d_low = abs(lo - mc.coverage[0])
    d_high = abs(hi - mc.coverage[1])
    delta = _two_digits_tolerance(u)
    return Comparison((lo, hi), mc.coverage, d_low, d_high, delta, bool(d_low <= delta and d_high <= delta))
