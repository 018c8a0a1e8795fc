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

Adaptive Monte Carlo (JCGM 101 §7.9): the draws are made in batches of
M = 10⁴ (§7.9.4: M = max(100/(1 − p), 10⁴) for p = 95 %). After h ≥ 2
batches, for each output quantity — the exact pH and each shortcut's error —
and each of its reported results q (the mean, the standard uncertainty u and
the two ends of the coverage interval),

.. math::
    s_q = \sqrt{\frac{1}{h(h-1)}\sum_{r=1}^{h}\bigl(q^{(r)} - \bar q\bigr)^2}

from the batch results q^(r). The results are stable when 2 s_q ≤ δ for all
four, δ being the numerical tolerance of u written to two significant
digits (above) with u from all h·M draws. The draws also continue until the
conformity probability of the decision rule (:mod:`dossier.analysis.decision`,
JCGM 106) decides each verdict: for every claimed shortcut, the count of
draws with |pH_shortcut − pH_true| ≤ L (the shortcut at nominal inputs
against each draw of the exact pH plus a draw of the activity model's error)
gives p_c, and its Wilson score interval at confidence 99 % (Bonferroni-
corrected over the largest possible number of checks: one per batch and
shortcut) must lie wholly on one side of the required probability P. That
is the probability the verdict uses when the GUM result is not validated;
when it is, the verdict uses the closed form and the counted p_c, decided
the same way, stands as its check. Drawing stops when both hold, or at the
``draws`` cap; the draws used, the tolerance δ, the largest 2 s_q reached
and each p_c's interval are recorded (:class:`Stopping`). The inputs
continue one seeded generator and the model errors a second one spawned
from the same seed, so a run is reproducible from its seed and the input
draws do not depend on the model uncertainty; a fixed run is one batch of
``draws``.

References
----------
.. [1] JCGM 101:2008, Evaluation of measurement data — Supplement 1 to the
   GUM — Propagation of distributions using a Monte Carlo method, §7.7, §7.9, §8.
.. [2] E. B. Wilson, Probable inference, the law of succession, and
   statistical inference, J. Am. Stat. Assoc. 22 (1927) 209–212.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from statistics import NormalDist

import numpy as np
from numpy.typing import NDArray

from ..chemistry import equilibrium
from ..inputs.model import ConditionsSpec, SolutionSpec
from .batch import inputs_of, solution_for, variation_from
from .sensitivity import GumResult

__all__ = ["Summary", "Comparison", "McResult", "Stopping", "monte_carlo", "compare", "DEFAULT_DRAWS", "COVERAGE", "K95",
           "BATCH_DRAWS", "DECISION_CONFIDENCE"]

DEFAULT_DRAWS = 1_000_000
COVERAGE = 0.95
K95 = 1.959963984540054
"""Coverage factor of a normal distribution for 95 % (two-sided)."""
HIST_BINS = 80
BATCH_DRAWS = 10_000
"""Draws per batch of the adaptive procedure: M = max(100/(1 − p), 10⁴) (JCGM 101 §7.9.4)."""
DECISION_CONFIDENCE = 0.99
"""Confidence with which an adaptive run decides a probability against its threshold (over all checks)."""
MODEL_STREAM = 0x6D6F64
"""Last word of the spawn key of the model-error stream (the input stream's key without it)."""


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
class Stopping:
    """How many draws a run used, and why it stopped (JCGM 101 §7.9).

    Attributes
    ----------
    adaptive : bool
        False: a fixed run of ``draws_max`` draws in one batch.
    draws_max : int
        The cap (``--draws``).
    batch_size : int
        Draws per batch M.
    batches : int
        Batches drawn h.
    digits_stable : bool or None
        2 s_q ≤ δ for every reported result of every output quantity; None
        when not checked (a fixed run, or a single batch at the cap).
    probabilities_decided : bool or None
        Every probability compared with a threshold lies, with
        ``confidence``, on one side of it (True when none is compared; None
        when not checked).
    confidence : float
        Confidence of those decisions, over all checks of the run.
    tolerance : dict
        ``{quantity: (δ, largest 2 s_q)}`` [pH], quantity ``"exact"`` or a
        shortcut id; both 0 for a fixed run or a single batch.
    required_probability : float or None
        The P each conformity probability was decided against (None: none was).
    conformity_interval : dict
        ``{shortcut id: (low, high)}``: the Wilson score interval of the
        counted conformity probability at the stop, at the corrected
        confidence of each single check (empty when not checked).
    """

    adaptive: bool
    draws_max: int
    batch_size: int
    batches: int
    digits_stable: bool | None
    probabilities_decided: bool | None
    confidence: float
    tolerance: dict[str, tuple[float, float]]
    required_probability: float | None = None
    conformity_interval: dict[str, tuple[float, float]] = field(default_factory=dict)


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
    stopping : Stopping or None
        Draws used and the tolerance reached (None: built without the record).
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
    stopping: Stopping | None = None


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
    adaptive: bool = False,
    required_probability: float | None = None,
    batch: int = BATCH_DRAWS,
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
        Number of Monte-Carlo trials (10⁶ by default); with ``adaptive``, the cap.
    seed : int
        Entropy of the seed sequence (recorded in the results).
    spawn_key : tuple of int
        Distinguishes the solutions of a dossier drawn from the same seed.
    model_u : float
        Standard uncertainty of the activity model [pH]; drawn (normal) from a
        stream of its own, so that the input draws do not depend on it.
    adaptive : bool
        Draw in batches until the results are stable and the conformity
        probabilities decided (module docstring, JCGM 101 §7.9); otherwise one
        batch of ``draws``.
    required_probability : float, optional
        The probability P of the decision rule each counted conformity
        probability is to be decided against (adaptive only).
    batch : int
        Draws per batch (adaptive only).

    Returns
    -------
    McResult
        ``draws`` is the number of draws used; ``stopping`` says why the run stopped.
    """
    rng = np.random.Generator(np.random.PCG64(np.random.SeedSequence(seed, spawn_key=spawn_key)))
    model_rng = np.random.Generator(np.random.PCG64(np.random.SeedSequence(seed, spawn_key=(*spawn_key, MODEL_STREAM))))
    inputs = inputs_of(spec, conditions)
    nominal = solution_for(spec, conditions)
    stated = {sid: float(spec.approximation(sid).ph(nominal)) for sid in approx_ids}
    size = min(batch, draws) if adaptive else draws
    to_decide = approx_ids if required_probability is not None else ()
    checks = max(1, math.ceil(draws / size) - 1) * max(1, len(to_decide))  # looks after batches 2 … h_max, per shortcut
    z = NormalDist().inv_cdf(1.0 - (1.0 - DECISION_CONFIDENCE) / (2.0 * checks))
    exact_parts: list[NDArray[np.float64]] = []
    error_parts: dict[str, list[NDArray[np.float64]]] = {sid: [] for sid in approx_ids}
    batch_results: dict[str, list[tuple[float, float, float, float]]] = {k: [] for k in ("exact", *approx_ids)}
    sizes: list[int] = []
    conforming = dict.fromkeys(approx_ids, 0)  # draws so far with |Δ| ≤ limit
    used = 0
    stable = decided = False
    tolerance: dict[str, tuple[float, float]] = {}
    while used < draws:
        n = min(size, draws - used)
        deltas = {inp.key: inp.draw(rng, n) for inp in inputs}
        sol = solution_for(spec, conditions, variation_from(inputs, deltas, conditions))
        exact = np.broadcast_to(np.asarray(equilibrium(sol).ph, dtype=np.float64), (n,))
        exact_parts.append(exact)
        for sid in approx_ids:
            error_parts[sid].append(np.broadcast_to(np.asarray(spec.approximation(sid).ph(sol), dtype=np.float64), (n,)) - exact)
        # the true pH: each draw of the exact pH plus a draw of the activity model's error
        true_ph = exact + model_rng.normal(0.0, model_u, n) if model_u > 0.0 else exact
        for sid in approx_ids:
            conforming[sid] += int(np.count_nonzero(np.abs(stated[sid] - true_ph) <= limit))
        used += n
        if not adaptive:
            break
        sizes.append(n)
        batch_results["exact"].append(_batch_results(exact))
        for sid in approx_ids:
            batch_results[sid].append(_batch_results(error_parts[sid][-1]))
        if len(exact_parts) < 2:
            continue
        tolerance = {k: _stability(v, sizes) for k, v in batch_results.items()}
        stable = all(spread <= delta for delta, spread in tolerance.values())
        decided = all(_decided(conforming[sid], used, required_probability, z) for sid in to_decide)  # type: ignore[arg-type]
        if stable and decided:
            break
    exact = _joined(exact_parts)
    errors: dict[str, Summary] = {}
    p_exceed: dict[str, float] = {}
    for sid in approx_ids:
        err = _joined(error_parts[sid])
        errors[sid] = _summary(err)
        p_exceed[sid] = float(np.count_nonzero(np.abs(err) > limit)) / used
    checked = adaptive and len(exact_parts) >= 2
    intervals = {sid: _wilson(conforming[sid], used, z) for sid in to_decide} if checked else {}
    stopping = Stopping(adaptive, draws, size, len(exact_parts), stable if checked else None,
                        (decided or not to_decide) if checked else None, DECISION_CONFIDENCE, tolerance,
                        required_probability if to_decide else None, intervals)
    p_conform = {sid: conforming[sid] / used for sid in approx_ids}
    return McResult(used, seed, tuple(spawn_key), _summary(np.asarray(exact)), errors, p_exceed, limit, p_conform, model_u, stopping)


def _joined(parts: list[NDArray[np.float64]]) -> NDArray[np.float64]:
    return parts[0] if len(parts) == 1 else np.concatenate(parts)


def _batch_results(values: NDArray[np.float64]) -> tuple[float, float, float, float]:
    """Mean, standard deviation and the two ends of the 95 % coverage interval of one batch."""
    lo, hi = np.quantile(values, [(1 - COVERAGE) / 2, (1 + COVERAGE) / 2])
    return float(values.mean()), float(values.std(ddof=1)), float(lo), float(hi)


def _stability(results: list[tuple[float, float, float, float]], sizes: list[int]) -> tuple[float, float]:
    """(δ, largest 2 s_q) over the batch results (JCGM 101 §7.9.4).

    δ comes from u of all draws, pooled exactly from the batch means and
    standard deviations: (N − 1) u² = Σ (n_r − 1) s_r² + Σ n_r (m_r − m̄)².
    """
    h = len(results)
    arr = np.asarray(results)
    s = np.sqrt(np.sum((arr - arr.mean(axis=0)) ** 2, axis=0) / (h * (h - 1)))
    n = np.asarray(sizes, dtype=np.float64)
    mean = float(np.sum(n * arr[:, 0]) / n.sum())
    u = math.sqrt(float(np.sum((n - 1) * arr[:, 1] ** 2) + np.sum(n * (arr[:, 0] - mean) ** 2)) / (n.sum() - 1))
    return _two_digits_tolerance(u), float(2.0 * s.max())


def _wilson(count: int, n: int, z: float) -> tuple[float, float]:
    """The Wilson score interval of the proportion count/n at normal quantile z (Wilson 1927)."""
    p = count / n
    centre = (p + z * z / (2 * n)) / (1 + z * z / n)
    half = z / (1 + z * z / n) * math.sqrt(p * (1 - p) / n + z * z / (4 * n * n))
    # at count 0 (or n) the lower (upper) end is exactly 0 (1); say so rather than leave a rounding residue
    return (0.0 if count == 0 else max(0.0, centre - half)), (1.0 if count == n else min(1.0, centre + half))


def _decided(count: int, n: int, threshold: float, z: float) -> bool:
    """Whether the Wilson score interval of count/n at normal quantile z excludes ``threshold``."""
    low, high = _wilson(count, n, z)
    return low > threshold or high < threshold


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
