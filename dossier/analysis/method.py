"""The whole analysis of one method: every solution, every shortcut.

For each solution: the exact equilibrium at nominal inputs; GUM and Monte
Carlo for the exact pH and for each claimed shortcut's error; validity ranges,
an error map and pKa curves for each claimed shortcut; verdicts and drafted
justifications; and, as an appendix, the validity ranges of every other
shortcut that applies.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

from ..chemistry import CATALOGUE, applicable, debye_huckel_a, equilibrium
from ..inputs.model import Method, SolutionSpec
from .maps import ErrorMap, PkaCurves, error_map, pka_curves
from .montecarlo import DEFAULT_DRAWS, Comparison, McResult, compare, monte_carlo
from .sensitivity import GumResult, gum
from .validity import ValidityResult, key_step, validity
from .verdicts import Verdict, justification, verdict

__all__ = ["AnalysisSettings", "ExactResult", "ShortcutAnalysis", "SolutionAnalysis", "MethodAnalysis", "analyse_method", "DEFAULT_SEED"]

DEFAULT_SEED = 20261202
"""Default entropy of the Monte-Carlo seed sequence (recorded in every result)."""


@dataclass(frozen=True)
class AnalysisSettings:
    """Settings of the analyses (recorded in results and manifests).

    Attributes
    ----------
    draws : int
        Monte-Carlo draws per solution (10⁶ by default).
    seed : int
        Entropy of the seed sequence; solution i of a method draws with spawn key (i,).
    map_pka, map_conc : int
        Resolution of the error maps.
    adaptive : bool
        Monte Carlo in batches until the results are stable and each verdict's
        probability is decided, ``draws`` being the cap (JCGM 101 §7.9,
        :func:`~dossier.analysis.montecarlo.monte_carlo`); False: exactly ``draws``.
    """

    draws: int = DEFAULT_DRAWS
    seed: int = DEFAULT_SEED
    map_pka: int = 121
    map_conc: int = 141
    adaptive: bool = True


@dataclass(frozen=True)
class ExactResult:
    """The exact equilibrium at nominal inputs."""

    ph: float
    ph_conc: float
    ionic_strength: float
    pkw: float
    debye_huckel_a: float


@dataclass(frozen=True)
class ShortcutAnalysis:
    """Everything about one shortcut of one solution.

    ``gum``, ``comparison``, ``verdict`` and ``justification`` are None for
    an appendix shortcut (one the SOP does not claim).
    """

    id: str
    title: str
    claimed: bool
    ph: float
    error: float
    validity: ValidityResult
    gum: GumResult | None
    comparison: Comparison | None
    verdict: Verdict | None
    justification: str | None
    map: ErrorMap | None
    curves: PkaCurves | None


@dataclass(frozen=True)
class SolutionAnalysis:
    """One solution: exact result, uncertainty of the exact pH, its shortcuts."""

    spec: SolutionSpec
    exact: ExactResult
    gum: GumResult
    monte_carlo: McResult
    comparison: Comparison
    shortcuts: tuple[ShortcutAnalysis, ...]
    appendix: tuple[ShortcutAnalysis, ...]


@dataclass(frozen=True)
class MethodAnalysis:
    """The analysis of one method, ready to render."""

    method: Method
    settings: AnalysisSettings
    solutions: tuple[SolutionAnalysis, ...]


def _solution(method: Method, index: int, spec: SolutionSpec, settings: AnalysisSettings) -> SolutionAnalysis:
    c = method.conditions
    limit = method.criteria.max_ph_error
    nominal = spec.to_solution(c)
    eq = equilibrium(nominal)
    exact = ExactResult(float(eq.ph), float(eq.ph_conc), float(eq.ionic_strength), float(eq.pkw), float(debye_huckel_a(c.temperature)))
    claimed = spec.shortcuts
    keys = {sid: key_step(sid, spec, c) for sid in claimed}
    gum_exact, gum_errors = gum(claimed, spec, c, keys)
    mc = monte_carlo(claimed, spec, c, limit, draws=settings.draws, seed=settings.seed, spawn_key=(index,),
                     adaptive=settings.adaptive, thresholds=(1.0 - method.criteria.probability,))
    shortcuts = []
    for sid in claimed:
        v = validity(sid, spec, c, limit)
        vd = verdict(v, mc, method.criteria.probability)
        shortcuts.append(
            ShortcutAnalysis(
                id=sid,
                title=CATALOGUE[sid].title,
                claimed=True,
                ph=float(CATALOGUE[sid].ph(nominal)),
                error=v.nominal_error,
                validity=v,
                gum=gum_errors[sid],
                comparison=compare(gum_errors[sid], mc.errors[sid]),
                verdict=vd,
                justification=justification(method, spec, v, exact.ph, gum_exact.u, mc, vd),
                map=error_map(sid, spec, c, n_pka=settings.map_pka, n_conc=settings.map_conc),
                curves=pka_curves(sid, spec, c),
            )
        )
    appendix = []
    for approx in applicable(nominal):
        if approx.id in claimed:
            continue
        v = validity(approx.id, spec, c, limit)
        appendix.append(ShortcutAnalysis(approx.id, approx.title, False, float(approx.ph(nominal)), v.nominal_error, v, None, None, None, None, None, None))
    return SolutionAnalysis(spec, exact, gum_exact, mc, compare(gum_exact, mc.exact), tuple(shortcuts), tuple(appendix))


def analyse_method(method: Method, settings: AnalysisSettings | None = None, *, progress: Callable[[str], None] | None = None) -> MethodAnalysis:
    """Analyse every solution of a method.

    Parameters
    ----------
    method : Method
    settings : AnalysisSettings, optional
    progress : callable, optional
        Called with a short label before each solution (for progress bars).

    Returns
    -------
    MethodAnalysis
    """
    settings = settings or AnalysisSettings()
    out = []
    for i, spec in enumerate(method.solutions):
        if progress:
            progress(f"{method.id} · {spec.id}")
        out.append(_solution(method, i, spec, settings))
    return MethodAnalysis(method, settings, tuple(out))
