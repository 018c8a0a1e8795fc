"""The whole analysis of one method: every solution, every shortcut.

For each solution: the exact equilibrium at nominal inputs; GUM and Monte
Carlo for the exact pH and for each claimed shortcut's error; validity ranges,
an error map and pKa curves for each claimed shortcut; the operating region
and a verdict under the decision rule (:mod:`dossier.analysis.verdicts`; the
words are written by render); and, as an appendix, the validity ranges of every other
shortcut that applies.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

from ..chemistry import CATALOGUE, applicable, debye_huckel_a, equilibrium
from ..inputs.model import Method, SolutionSpec
from .adjustment import AdjustmentResult, adjustment_result
from .co2 import Co2Result, co2_result
from .preparation import Preparation, preparation
from .aswritten import ConstantsUsed, constants_used
from .maps import ErrorMap, PkaCurves, error_map, pka_curves
from .decision import ModelUncertainty, model_uncertainty
from .quality import DataQualityItem, data_quality
from .robustness import RobustnessResult, robustness
from .montecarlo import DEFAULT_DRAWS, Comparison, McResult, compare, monte_carlo
from .region import operating_region
from .sensitivity import GumResult, gum
from .validity import ValidityResult, key_step, validity
from .verdicts import Verdict, verdict

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

    ``gum``, ``comparison`` and ``verdict`` are None for an appendix
    shortcut (one the SOP does not claim).
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
    map: ErrorMap | None
    curves: PkaCurves | None
    constants_used: ConstantsUsed | None = None
    """The constants put into the shortcut's equation at nominal conditions, beside the model's."""


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
    model: ModelUncertainty
    co2: Co2Result | None = None
    adjustment: AdjustmentResult | None = None
    data_quality: tuple[DataQualityItem, ...] = ()
    """Values a reviewer cannot take on trust, each with what a plausible error would do."""
    robustness: RobustnessResult | None = None
    """Buffer capacity, dilution value and ΔpH under small deliberate variations."""

    @property
    def preparation(self) -> Preparation:
        """What to weigh and measure out per litre (:func:`dossier.analysis.preparation.preparation`)."""
        return preparation(self.spec)


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
    model = model_uncertainty(c.activity, exact.ionic_strength)
    mc = monte_carlo(claimed, spec, c, limit, draws=settings.draws, seed=settings.seed, spawn_key=(index,), model_u=model.u,
                     adaptive=settings.adaptive, required_probability=method.criteria.probability)
    exact_cmp = compare(gum_exact, mc.exact)
    shortcuts = []
    for sid in claimed:
        v = validity(sid, spec, c, limit)
        region = operating_region(sid, spec, c, limit)
        vd = verdict(sid, v.nominal_error, region, gum_exact, mc, exact_cmp, model, method.criteria.probability)
        shortcuts.append(
            ShortcutAnalysis(
                id=sid,
                title=CATALOGUE[sid].title,
                claimed=True,
                ph=float(spec.approximation(sid).ph(nominal)),
                constants_used=constants_used(spec.approximation(sid), nominal),
                error=v.nominal_error,
                validity=v,
                gum=gum_errors[sid],
                comparison=compare(gum_errors[sid], mc.errors[sid]),
                verdict=vd,
                map=error_map(sid, spec, c, n_pka=settings.map_pka, n_conc=settings.map_conc),
                curves=pka_curves(sid, spec, c),
            )
        )
    appendix = []
    for approx in applicable(nominal):
        if approx.id in claimed:
            continue
        v = validity(approx.id, spec, c, limit)
        appendix.append(ShortcutAnalysis(approx.id, approx.title, False, float(approx.ph(nominal)), v.nominal_error, v, None, None, None, None, None,
                                         constants_used(approx, nominal)))
    quality = data_quality(method, spec, gum_exact, gum_errors, {s.id: s.error for s in shortcuts})
    co2 = co2_result(nominal, eq, c.co2_as_written, limit)
    return SolutionAnalysis(spec, exact, gum_exact, mc, exact_cmp, tuple(shortcuts), tuple(appendix), model,
                            co2=co2, adjustment=adjustment_result(spec, c), data_quality=quality,
                            robustness=robustness(spec, c, nominal, eq, co2))


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
