"""Verdicts on each claimed shortcut: numbers and a status, never words.

The decision rule (:mod:`dossier.analysis.decision`) is simple acceptance with
a conformity probability (JCGM 106:2012). With L the acceptance limit and P
the probability the method requires, for each solution and claimed shortcut:

``pass`` (meets the criterion)
    |error| ≤ L at every point of the operating region (working range ×
    temperature ± tolerance × background ± tolerance), and the conformity
    probability p_c = P(|pH_shortcut − pH_true| ≤ L) is at least P.
``conditional`` (meets it within a restricted range)
    |error| ≤ L at the nominal composition and p_c ≥ P, but the worst point of
    the operating region is outside the limit: the shortcut holds on part of
    the region only (:attr:`Verdict.holds` says which part of the working range).
``fail`` (does not meet it)
    |error| > L at the nominal composition, or p_c < P: the stated pH is not
    shown to lie within the limit of the true pH.

p_c comes from the closed form with the GUM u_c where the GUM result of the
exact pH is validated by Monte Carlo (JCGM 101 §8), and is counted over the
Monte Carlo draws where it is not. The words for each status, the reasons and
the drafted justification are written by :mod:`dossier.render.prose`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from enum import StrEnum

from .decision import DecisionRule, ModelUncertainty, ResultUsed, conformity_normal
from .montecarlo import K95, Comparison, McResult
from .region import RegionPoint, RegionResult
from .sensitivity import GumResult

__all__ = ["VerdictStatus", "Finding", "Verdict", "verdict", "PASS", "FAIL", "CONDITIONAL"]


class VerdictStatus(StrEnum):
    """The outcome of a shortcut against the acceptance criterion (rules: module docstring).

    The values are stable identifiers (results.json); the words a reader sees
    belong to the render layer.
    """

    PASS = "pass"
    CONDITIONAL = "conditional"
    FAIL = "fail"


PASS, FAIL, CONDITIONAL = VerdictStatus.PASS, VerdictStatus.FAIL, VerdictStatus.CONDITIONAL


class Finding(StrEnum):
    """Why a shortcut does not meet the criterion everywhere (stable identifiers)."""

    NOMINAL_OUTSIDE = "nominal-outside-limit"
    """|error| > L at the nominal composition and conditions."""
    REGION_OUTSIDE = "region-outside-limit"
    """|error| > L somewhere in the operating region."""
    CONFORMITY_LOW = "conformity-below-required"
    """p_c below the required probability."""


@dataclass(frozen=True)
class Verdict:
    """The outcome for one shortcut of one solution, with every number its reasons need.

    Attributes
    ----------
    status : VerdictStatus
    findings : tuple of Finding
        Each criterion not met (empty for ``pass``).
    rule : DecisionRule
    limit : float
        Acceptance limit L [pH].
    required_probability : float
        P, the method's acceptance.probability.
    nominal_error : float
        Shortcut pH − exact pH at nominal inputs [pH].
    region : RegionResult
        The operating region: its box, worst point, corners and the parts of
        the working range that hold over the whole box.
    conformity : float
        p_c = P(|pH_shortcut − pH_true| ≤ L).
    result_used : ResultUsed
        GUM (closed form) or Monte Carlo (counted), per JCGM 101 §8.
    exact_ph : float
        The exact pH of the result used (GUM value or Monte Carlo mean).
    exact_u : float
        Its standard uncertainty from the inputs (GUM u_c or Monte Carlo u) [pH].
    exact_interval : (float, float)
        Its 95 % interval: y ± 1.96 u_c (GUM) or the Monte Carlo coverage interval.
    model : ModelUncertainty
        The activity model's uncertainty at the working ionic strength.
    draws : int
        Monte Carlo draws behind the result (recorded even when GUM is used).
    """

    status: VerdictStatus
    findings: tuple[Finding, ...]
    rule: DecisionRule
    limit: float
    required_probability: float
    nominal_error: float
    region: RegionResult
    conformity: float
    result_used: ResultUsed
    exact_ph: float
    exact_u: float
    exact_interval: tuple[float, float]
    model: ModelUncertainty
    draws: int

    @property
    def worst(self) -> RegionPoint:
        """The worst point of the operating region."""
        return self.region.worst

    @property
    def u_total(self) -> float:
        """√(u_exact² + u_model²) [pH]: the standard uncertainty of the true pH."""
        return math.hypot(self.exact_u, self.model.u)


def verdict(
    shortcut: str,
    nominal_error: float,
    region: RegionResult,
    exact_gum: GumResult,
    mc: McResult,
    comparison: Comparison,
    model: ModelUncertainty,
    required_probability: float,
) -> Verdict:
    """Apply the decision rule of the module docstring.

    Parameters
    ----------
    shortcut : str
        Catalogue id.
    nominal_error : float
        Shortcut pH − exact pH at nominal inputs [pH].
    region : RegionResult
        The shortcut over the operating region.
    exact_gum : GumResult
        GUM result of the exact pH.
    mc : McResult
        Monte Carlo of the solution (its ``p_conform`` drawn with ``model.u``).
    comparison : Comparison
        GUM against Monte Carlo for the exact pH (JCGM 101 §8).
    model : ModelUncertainty
    required_probability : float

    Returns
    -------
    Verdict
    """
    limit = region.limit
    if comparison.validated:
        used = ResultUsed.GUM
        y, u = exact_gum.value, exact_gum.u
        interval = (y - K95 * u, y + K95 * u)
        p_c = float(conformity_normal(nominal_error, math.hypot(u, model.u), -limit, limit))
    else:
        used = ResultUsed.MONTE_CARLO
        y, u, interval = mc.exact.mean, mc.exact.u, mc.exact.coverage
        p_c = mc.p_conform[shortcut]
    findings = []
    if abs(nominal_error) > limit:
        findings.append(Finding.NOMINAL_OUTSIDE)
    if not region.holds_everywhere:
        findings.append(Finding.REGION_OUTSIDE)
    if p_c < required_probability:
        findings.append(Finding.CONFORMITY_LOW)
    if Finding.NOMINAL_OUTSIDE in findings or Finding.CONFORMITY_LOW in findings:
        status = FAIL
    elif findings:
        status = CONDITIONAL
    else:
        status = PASS
    return Verdict(status, tuple(findings), DecisionRule.SIMPLE_ACCEPTANCE, limit, required_probability, nominal_error,
                   region, p_c, used, float(y), float(u), (float(interval[0]), float(interval[1])), model, mc.draws)
