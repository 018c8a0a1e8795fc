r"""The decision rule: simple acceptance with a conformity probability (JCGM 106:2012).

The property judged is the deviation of the pH the procedure states (the
shortcut at nominal inputs) from the true pH of the solution,

.. math::
    \Delta = pH_{shortcut} - pH_{true}, \qquad \text{tolerance interval } [-L, +L],

where L is the method's acceptance limit. The true pH is known only through
the exact calculation and carries its uncertainty: the stated input
uncertainties (pKa values, concentrations, temperature, background) and a
model uncertainty of the activity model at the working ionic strength
(:func:`model_uncertainty`). The conformity probability is

.. math::
    p_c = \Pr(-L \le \Delta \le +L).

For a normal distribution of Δ with expectation y (the shortcut's error at
nominal inputs) and standard uncertainty u (the GUM u_c of the exact pH and
the model uncertainty, combined in quadrature) this is the closed form of
JCGM 106:2012 §7.3 (two-sided tolerance interval, normal PDF):

.. math::
    p_c = \Phi\!\left(\frac{T_U - y}{u}\right) - \Phi\!\left(\frac{T_L - y}{u}\right).

Where the GUM result of the exact pH is not validated by the Monte Carlo
comparison (JCGM 101:2008 §8), p_c is counted over the Monte Carlo draws
instead (each draw of the exact pH, plus a normal draw of the model error).
The rule is *simple acceptance* (JCGM 106 §8.2, no guard band): the criterion
is met when p_c is at least the probability the method requires.

References
----------
.. [1] JCGM 106:2012, Evaluation of measurement data — The role of measurement
   uncertainty in conformity assessment, §7.3 (conformity probability, normal
   PDF), §8.2 (simple acceptance). Section numbers recalled from memory.
.. [2] JCGM 101:2008, Supplement 1 to the GUM, §8 (validation of the GUM
   uncertainty framework).
.. [3] R. A. Robinson and R. H. Stokes, Electrolyte Solutions, 2nd ed.
   (Butterworths, 1959), appendix 8.10: mean activity coefficient of NaCl at
   25 °C, γ± = 0.778 at 0.1 mol/kg and 0.681 at 0.5 mol/kg (values recalled
   from memory, not read in the source for this module).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from enum import StrEnum

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy.special import ndtr

from ..chemistry.activity import ActivityModelId, log_gamma_unit

__all__ = [
    "DecisionRule",
    "ResultUsed",
    "ModelUncertainty",
    "NACL_MEAN_GAMMA",
    "model_uncertainty",
    "conformity_normal",
    "conformity_counted",
]


class DecisionRule(StrEnum):
    """The decision rule applied (stable identifier, recorded in results.json)."""

    SIMPLE_ACCEPTANCE = "simple-acceptance"
    """Accept when the conformity probability is at least the required one (JCGM 106 §8.2)."""


class ResultUsed(StrEnum):
    """Which uncertainty result the conformity probability came from."""

    GUM = "gum"
    """Closed form with the GUM u_c (validated against Monte Carlo)."""
    MONTE_CARLO = "monte-carlo"
    """Counted over the Monte Carlo draws (GUM not validated)."""


NACL_MEAN_GAMMA = ((0.1, 0.778), (0.5, 0.681))
"""(ionic strength [mol/kg], measured γ± of NaCl at 25 °C): Robinson & Stokes
(1959), appendix 8.10 — recalled from memory. For a 1:1 salt I = m."""


@dataclass(frozen=True)
class ModelUncertainty:
    """The standard uncertainty of the activity model at one ionic strength.

    Attributes
    ----------
    u : float
        Standard uncertainty of pH from the activity model [pH].
    ionic_strength : float
        Where it was taken [mol/kg].
    source : str
        Where the number comes from (in words, for the report).
    """

    u: float
    ionic_strength: float
    source: str


MODEL_UNCERTAINTY_SOURCE = (
    "the model against measured NaCl mean activity coefficients, Robinson & Stokes 1959 (recalled from memory); "
    "the difference as half-width of a rectangular distribution (common practice, no source)"
)


def _discrepancy(activity: str, ionic_strength: NDArray[np.float64]) -> NDArray[np.float64]:
    """|log γ_model − log γ±(NaCl)| at the tabulated points, interpolated linearly in I (0 at I = 0)."""
    points = np.array([0.0] + [i for i, _ in NACL_MEAN_GAMMA])
    measured = np.log10(np.array([g for _, g in NACL_MEAN_GAMMA]))
    model = np.asarray(log_gamma_unit(points[1:], 25.0, activity), dtype=np.float64)
    diffs = np.concatenate([[0.0], np.abs(model - measured)])
    # beyond the last point: the last slope carries on (a model past its range only gets worse)
    slope = (diffs[-1] - diffs[-2]) / (points[-1] - points[-2])
    inside = np.interp(ionic_strength, points, diffs)
    return np.where(ionic_strength > points[-1], diffs[-1] + slope * (ionic_strength - points[-1]), inside)


def model_uncertainty(activity: str, ionic_strength: float) -> ModelUncertainty:
    r"""Standard uncertainty of the exact pH from the activity model at ionic strength I.

    .. math::
        u_{model}(I) = \frac{|\log\gamma_{model}(I) - \log\gamma_\pm^{NaCl}(I)|}{\sqrt 3},

    the discrepancy from measured NaCl data (:data:`NACL_MEAN_GAMMA`) taken as
    the half-width of a rectangular distribution (JCGM 100:2008 §4.3.7),
    interpolated linearly in I between 0 (where every model agrees) and the
    tabulated points. The single-ion activity of H⁺ is not measurable; NaCl
    stands for a typical 1:1 background (an assumption: common practice, no source).

    Parameters
    ----------
    activity : str
        Activity-model id. ``ideal`` is compared with the same data (log γ = 0).
    ionic_strength : float
        [mol/kg].

    Returns
    -------
    ModelUncertainty

    Examples
    --------
    Davies at 0.1 mol/kg (log γ −0.1074) differs from NaCl (log 0.778 = −0.1090)
    by 0.0016 in log γ, so u = 0.0016/√3:

    >>> round(model_uncertainty("davies", 0.1).u, 4)
    0.0009
    """
    i = max(float(ionic_strength), 0.0)
    d = float(_discrepancy(str(ActivityModelId(activity)), np.asarray(i)))
    return ModelUncertainty(d / math.sqrt(3.0), i, MODEL_UNCERTAINTY_SOURCE)


def conformity_normal(estimate: ArrayLike, u: ArrayLike, low: float, high: float) -> NDArray[np.float64] | float:
    r"""Conformity probability for a normal PDF and a two-sided tolerance interval.

    .. math::
        p_c = \Phi\!\left(\frac{T_U - y}{u}\right) - \Phi\!\left(\frac{T_L - y}{u}\right)

    (JCGM 106:2012 §7.3). With u = 0 it is 1 inside the interval and 0 outside.

    Parameters
    ----------
    estimate : float or array
        Best estimate y of the property.
    u : float or array
        Its standard uncertainty (≥ 0).
    low, high : float
        Tolerance limits T_L < T_U.

    Returns
    -------
    float or array
        p_c in [0, 1].
    """
    y = np.asarray(estimate, dtype=np.float64)
    s = np.asarray(u, dtype=np.float64)
    with np.errstate(divide="ignore", invalid="ignore"):
        p = ndtr((high - y) / s) - ndtr((low - y) / s)
    p = np.where(s > 0, p, ((y >= low) & (y <= high)).astype(np.float64))
    return float(p) if p.ndim == 0 else p


def conformity_counted(deviations: NDArray[np.float64], limit: float) -> float:
    """Conformity probability counted over draws: the fraction with |Δ| ≤ L (JCGM 101 §7, JCGM 106 §7)."""
    d = np.asarray(deviations, dtype=np.float64)
    return float(np.count_nonzero(np.abs(d) <= limit)) / d.size
