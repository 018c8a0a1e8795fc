r"""Activity-coefficient models for single ions.

Every model here has the form log10 γ_z = z² f(I): the activity coefficient of
an ion of charge z is the one of a monovalent ion raised to the power z². The
engine therefore only needs :func:`log_gamma_unit`, the base-10 logarithm of
the activity coefficient of a monovalent ion, and multiplies by z².

Models (``MODELS`` maps id → :class:`ActivityModel`):

``ideal``
    γ = 1.
``debye-huckel``
    limiting law, :math:`f = -A\sqrt{I}`.
``extended-debye-huckel``
    :math:`f = -A\sqrt{I}/(1 + B\mathring{a}\sqrt{I})`. With no ion size given,
    Bå = 1.5 (kg/mol)^½ at every temperature, the Bates–Guggenheim
    convention; with an ion size å [Å], Bå = B(T)·å.
``davies``
    :math:`f = -A\left(\frac{\sqrt{I}}{1+\sqrt{I}} - c\,I\right)` with
    c = 0.3 (Davies 1962) unless another coefficient is given (0.2 is the
    1938 original).

Each model carries the largest ionic strength at which it is used in practice
(``max_ionic_strength``, from :data:`dossier.limits.ACTIVITY_MODEL_RANGE`;
limiting law 0.005, extended Debye–Hückel 0.1, Davies 0.5 mol/kg) with the
source of that range; the ideal model has none (it is an approximation at
every ionic strength). The engine solves beyond the range; the method-file
checks warn there and the validity sweeps stop there.

References
----------
.. [1] P. Debye and E. Hückel, Phys. Z. 24, 185–206 (1923).
.. [2] R. G. Bates and E. A. Guggenheim, "Report on the standardization of
   pH and related terminology", Pure Appl. Chem. 1, 163–168 (1960).
   doi:10.1351/pac196001010163
.. [3] C. W. Davies, Ion Association (Butterworths, London, 1962), p. 41.
.. [4] C. W. Davies, J. Chem. Soc. 1938, 2093–2098.
.. [5] W. Stumm and J. J. Morgan, Aquatic Chemistry, 3rd ed. (Wiley, New
   York, 1996), Table 3.3 (the ranges of the three equations; recalled from
   memory, not checked against the book).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from enum import StrEnum

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .. import limits
from .errors import InputRangeError
from .water import debye_huckel_a, debye_huckel_b

__all__ = [
    "ActivityModel",
    "MODELS",
    "DAVIES_COEFFICIENT",
    "BATES_GUGGENHEIM_BA",
    "activity_model",
    "log_gamma_unit",
    "log_gamma",
    "CONVENTIONS",
    "pka_shift_at_ionic_strength",
    "thermodynamic_pka",
    "conditional_pka",
]

DAVIES_COEFFICIENT = 0.3
"""Linear coefficient of the Davies equation (Davies 1962) [kg/mol]."""

BATES_GUGGENHEIM_BA = 1.5
"""Product B·å of the Bates–Guggenheim convention [(kg/mol)^½]."""

# f(sqrt_i, i, A, Ba, davies_coefficient) -> log10 gamma of a monovalent ion
UnitLogGamma = Callable[[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], float], NDArray[np.float64]]


class ActivityModelId(StrEnum):
    """The activity models of the catalogue, by the id method files and results use."""

    IDEAL = "ideal"
    DEBYE_HUCKEL = "debye-huckel"
    EXTENDED_DEBYE_HUCKEL = "extended-debye-huckel"
    DAVIES = "davies"


@dataclass(frozen=True)
class ActivityModel:
    """One activity-coefficient model of the catalogue.

    Attributes
    ----------
    id : ActivityModelId
        Stable identifier used in method files and results.
    title : str
        Human-readable name.
    equation : str
        The equation in LaTeX, for reports.
    max_ionic_strength : float or None
        Largest ionic strength I [mol/kg] at which the model is used in
        practice (:data:`dossier.limits.ACTIVITY_MODEL_RANGE`); None for the
        ideal model, which has no range (an approximation everywhere).
    reference : str
        Published source of the equation.
    unit_log_gamma : callable
        ``f(sqrt_i, i, A, Ba, c)`` → log10 γ of a monovalent ion.
    range_source : str
        Where the range comes from (a published source, marked when recalled
        from memory).
    """

    id: ActivityModelId
    title: str
    equation: str
    max_ionic_strength: float | None
    reference: str
    unit_log_gamma: UnitLogGamma
    range_source: str = ""

    def in_range(self, ionic_strength: float) -> bool:
        """Whether ``ionic_strength`` [mol/kg] is within the model's range (always for the ideal model).

        Examples
        --------
        >>> MODELS["davies"].in_range(0.4), MODELS["davies"].in_range(0.6)
        (True, False)
        """
        return self.max_ionic_strength is None or ionic_strength <= self.max_ionic_strength


def _ideal(sqrt_i, i, a, ba, c):  # noqa: ANN001, ANN202 - private kernels
    return np.zeros_like(sqrt_i)


def _limiting(sqrt_i, i, a, ba, c):  # noqa: ANN001, ANN202
    return -a * sqrt_i


def _extended(sqrt_i, i, a, ba, c):  # noqa: ANN001, ANN202
    return -a * sqrt_i / (1.0 + ba * sqrt_i)


def _davies(sqrt_i, i, a, ba, c):  # noqa: ANN001, ANN202
    return -a * (sqrt_i / (1.0 + sqrt_i) - c * i)


_STUMM_MORGAN = "W. Stumm and J. J. Morgan, Aquatic Chemistry, 3rd ed. (Wiley, 1996), Table 3.3 (recalled from memory, not checked)"

MODELS: dict[str, ActivityModel] = {
    m.id: m
    for m in (
        ActivityModel(
            ActivityModelId.IDEAL,
            "Ideal solution (activity = concentration)",
            r"\log_{10}\gamma_i = 0",
            limits.ACTIVITY_MODEL_RANGE[ActivityModelId.IDEAL],
            "definition",
            _ideal,
            "no range: an approximation at every ionic strength",
        ),
        ActivityModel(
            ActivityModelId.DEBYE_HUCKEL,
            "Debye–Hückel limiting law",
            r"\log_{10}\gamma_i = -A z_i^2 \sqrt{I}",
            limits.ACTIVITY_MODEL_RANGE[ActivityModelId.DEBYE_HUCKEL],
            "P. Debye and E. Hückel, Phys. Z. 24, 185 (1923)",
            _limiting,
            _STUMM_MORGAN,
        ),
        ActivityModel(
            ActivityModelId.EXTENDED_DEBYE_HUCKEL,
            "Extended Debye–Hückel equation",
            r"\log_{10}\gamma_i = -\frac{A z_i^2 \sqrt{I}}{1 + B\mathring{a}\sqrt{I}}",
            limits.ACTIVITY_MODEL_RANGE[ActivityModelId.EXTENDED_DEBYE_HUCKEL],
            "P. Debye and E. Hückel, Phys. Z. 24, 185 (1923); Bå = 1.5 (kg/mol)^½ by the "
            "Bates–Guggenheim convention, Pure Appl. Chem. 1, 163 (1960)",
            _extended,
            "the range of the Bates–Guggenheim convention, R. G. Bates and E. A. Guggenheim, Pure Appl. Chem. 1, 163 (1960); " + _STUMM_MORGAN,
        ),
        ActivityModel(
            ActivityModelId.DAVIES,
            "Davies equation",
            r"\log_{10}\gamma_i = -A z_i^2\left(\frac{\sqrt{I}}{1+\sqrt{I}} - c\,I\right)",
            limits.ACTIVITY_MODEL_RANGE[ActivityModelId.DAVIES],
            "C. W. Davies, Ion Association (Butterworths, London, 1962), p. 41",
            _davies,
            _STUMM_MORGAN,
        ),
    )
}


def activity_model(model_id: str) -> ActivityModel:
    """Look up an activity model by id.

    Parameters
    ----------
    model_id : str
        One of ``ideal``, ``debye-huckel``, ``extended-debye-huckel``, ``davies``.

    Returns
    -------
    ActivityModel

    Raises
    ------
    InputRangeError
        For an unknown id; the message lists the known ones.

    Examples
    --------
    >>> activity_model("davies").title
    'Davies equation'
    """
    try:
        return MODELS[model_id]
    except (KeyError, TypeError):
        known = ", ".join(MODELS)
        raise InputRangeError("activity", f"unknown activity model {model_id!r}; allowed: {known}") from None


def log_gamma_unit(
    ionic_strength: ArrayLike,
    temperature: ArrayLike = 25.0,
    model: str = "davies",
    *,
    davies_coefficient: float = DAVIES_COEFFICIENT,
    ion_size: float | None = None,
) -> NDArray[np.float64]:
    r"""log10 of the activity coefficient of a monovalent ion.

    Parameters
    ----------
    ionic_strength : float or array
        Ionic strength I [mol/kg].
    temperature : float or array
        Temperature [°C]; sets A(T) and B(T).
    model : str
        Activity-model id (see :data:`MODELS`).
    davies_coefficient : float
        Linear coefficient c of the Davies equation [kg/mol]; 0.3 (1962).
    ion_size : float, optional
        Ion-size parameter å [Å] of the extended Debye–Hückel equation. When
        not given, Bå = 1.5 (kg/mol)^½ (Bates–Guggenheim convention).

    Returns
    -------
    array
        log10 γ(z = ±1) [dimensionless].

    Examples
    --------
    Davies at I = 0.1 mol/kg and 25 °C: γ ≈ 0.78 (common textbook figure):

    >>> round(10 ** float(log_gamma_unit(0.1, 25.0, "davies")), 3)
    0.781

    References
    ----------
    .. [1] C. W. Davies, Ion Association (Butterworths, 1962), p. 41.
    """
    m = activity_model(model)
    i = np.asarray(ionic_strength, dtype=np.float64)
    sqrt_i = np.sqrt(i)
    a = np.asarray(debye_huckel_a(temperature), dtype=np.float64)
    if ion_size is None:
        ba = np.asarray(BATES_GUGGENHEIM_BA)
    else:
        ba = np.asarray(debye_huckel_b(temperature), dtype=np.float64) * ion_size
    return m.unit_log_gamma(sqrt_i, i, a, ba, davies_coefficient)


def log_gamma(
    charge: int,
    ionic_strength: ArrayLike,
    temperature: ArrayLike = 25.0,
    model: str = "davies",
    **options: float | None,
) -> NDArray[np.float64]:
    r"""log10 of the activity coefficient of an ion of the given charge.

    .. math::
        \log_{10}\gamma_z = z^2 \log_{10}\gamma_{\pm 1}

    Parameters
    ----------
    charge : int
        Charge number z of the ion.
    ionic_strength, temperature, model, options
        As for :func:`log_gamma_unit`.

    Returns
    -------
    array
        log10 γ_z [dimensionless].

    Examples
    --------
    Limiting law, divalent ion, I = 0.001 mol/kg, 25 °C: γ = 10^(−4·0.5108·0.0316):

    >>> round(10 ** float(log_gamma(2, 0.001, 25.0, "debye-huckel")), 4)
    0.8617
    """
    return charge * charge * log_gamma_unit(ionic_strength, temperature, model, **options)


CONVENTIONS = ("mixed", "concentration")
"""Conventions of a pKa stated at I > 0: the mixed (Brønsted) constant
K″ = a(H⁺)[A]/[HA], as a pH meter measures it, and the concentration constant
K′ = [H⁺][A]/[HA]."""


def pka_shift_at_ionic_strength(
    ionic_strength: ArrayLike,
    temperature: ArrayLike,
    base_charge: int,
    model: str,
    convention: str = "mixed",
    *,
    davies_coefficient: float = DAVIES_COEFFICIENT,
    ion_size: float | None = None,
) -> NDArray[np.float64]:
    r"""pK (thermodynamic) − pK (conditional at ionic strength I) of one step.

    For the step HA ⇌ H⁺ + A with the base A of charge z (the acid HA has
    z + 1) and log10 γ_z = z² f(I):

    .. math::
        \mathrm{p}K = \mathrm{p}K' + 2z\,f(I)
        \quad\text{(concentration constant } K' = [\mathrm{H^+}][\mathrm{A}]/[\mathrm{HA}])

        \mathrm{p}K = \mathrm{p}K'' + (2z + 1)\,f(I)
        \quad\text{(mixed constant } K'' = a(\mathrm{H^+})[\mathrm{A}]/[\mathrm{HA}])

    Parameters
    ----------
    ionic_strength : float or array
        I [mol/kg] at which the conditional constant holds.
    temperature : float or array
        [°C]; sets the Debye–Hückel A (and B).
    base_charge : int
        Charge z of the base form of the step (e.g. −2 for HPO₄²⁻ in the
        second step of phosphoric acid, 0 for ammonia).
    model : str
        Activity-model id.
    convention : str
        ``mixed`` or ``concentration``.

    Returns
    -------
    array
        pK − pK(conditional) [dimensionless].

    Examples
    --------
    Second step of phosphoric acid (z = −2), mixed constant at I = 0.1 mol/kg,
    Davies, 25 °C: the thermodynamic pK is 0.32 above the mixed one
    (−3 f with f = log10 γ(z = ±1) = −0.107):

    >>> round(float(pka_shift_at_ionic_strength(0.1, 25.0, -2, "davies")), 3)
    0.322

    References
    ----------
    .. [1] R. G. Bates, Determination of pH, 2nd ed. (Wiley, 1973), ch. 4
       (mixed and concentration constants).
    .. [2] R. N. Goldberg, N. Kishore and R. M. Lennen, J. Phys. Chem. Ref.
       Data 31, 231 (2002), section on the ionic-strength dependence.
    """
    if convention not in CONVENTIONS:
        raise InputRangeError("convention", f"must be one of {', '.join(CONVENTIONS)}; got {convention!r}")
    f = log_gamma_unit(ionic_strength, temperature, model, davies_coefficient=davies_coefficient, ion_size=ion_size)
    return (2.0 * base_charge + (1.0 if convention == "mixed" else 0.0)) * f


def thermodynamic_pka(
    stated: ArrayLike,
    ionic_strength: ArrayLike,
    temperature: ArrayLike,
    base_charge: int,
    model: str,
    convention: str = "mixed",
    **options: float | None,
) -> float | NDArray[np.float64]:
    """The thermodynamic pKa (I → 0) of a pKa stated at ionic strength I.

    ``stated + pka_shift_at_ionic_strength(...)``; see
    :func:`pka_shift_at_ionic_strength` for the equations and parameters.

    Examples
    --------
    >>> round(thermodynamic_pka(6.86, 0.1, 25.0, -2, "davies"), 2)
    7.18
    """
    out = np.asarray(stated, dtype=np.float64) + pka_shift_at_ionic_strength(ionic_strength, temperature, base_charge, model, convention, **options)
    return float(out) if out.ndim == 0 else out


def conditional_pka(
    thermodynamic: ArrayLike,
    ionic_strength: ArrayLike,
    temperature: ArrayLike,
    base_charge: int,
    model: str,
    convention: str = "mixed",
    **options: float | None,
) -> float | NDArray[np.float64]:
    """The conditional pKa at ionic strength I of a thermodynamic pKa (the inverse
    of :func:`thermodynamic_pka`).

    Examples
    --------
    >>> round(conditional_pka(7.198, 0.1, 25.0, -2, "davies"), 3)
    6.876
    """
    out = np.asarray(thermodynamic, dtype=np.float64) - pka_shift_at_ionic_strength(ionic_strength, temperature, base_charge, model, convention, **options)
    return float(out) if out.ndim == 0 else out
