"""What each value a reviewer cannot take on trust would do to the verdict.

For every flagged value of a solution (:func:`dossier.inputs.quality.data_flags`:
recalled or unverified table values, estimates, pKa values without an
uncertainty, a missing ΔH° away from 25 °C) this module takes a *plausible
error* of the value, turns it into a shift of the pKa at the working
temperature, and multiplies by the GUM sensitivity coefficients
(:mod:`dossier.analysis.sensitivity`): the shift of the exact pH and of each
claimed shortcut's error. Numbers only; the words are the render layer's.

Plausible errors (common practice, no source): 0.05 in a pKa; 5 kJ/mol in a
ΔH°; 50 J/(K·mol) in a ΔCp°. A missing ΔH° is taken as unknown within
±50 kJ/mol (rectangular), which through van 't Hoff bounds the pKa at the end
of the temperature range farthest from 25 °C; that bound also enters the
uncertainty budget (:func:`dossier.analysis.batch.inputs_of`).
"""

from __future__ import annotations

from dataclasses import dataclass

from ..chemistry.temperature import pka_at_temperature
from ..inputs.model import ConditionsSpec, Method, SolutionSpec
from ..inputs.quality import (
    UNKNOWN_ENTHALPY_HALF_WIDTH,
    Concern,
    DataFlag,
    Quantity,
    data_flags,
    farthest_temperature,
    unknown_enthalpy_pka_half_width,
)
from .sensitivity import GumResult

__all__ = ["DataQualityItem", "data_quality", "PLAUSIBLE_ERRORS"]

PLAUSIBLE_ERRORS = {Quantity.PKA: 0.05, Quantity.ENTHALPY: 5.0, Quantity.HEAT_CAPACITY: 50.0}
"""Plausible error of a value not checked against its source, in the value's
unit (pKa; kJ/mol; J/(K·mol)): common practice, no source."""


@dataclass(frozen=True)
class DataQualityItem:
    """One flagged value and what a plausible error in it would do.

    Attributes
    ----------
    flag : DataFlag
        Which value, and why it is flagged.
    plausible_error : float
        In the value's unit (pKa; kJ/mol; J/(K·mol)); for a missing ΔH°, the
        half-width of its rectangular distribution (50 kJ/mol).
    common_practice : bool
        True when the plausible error is a rule of thumb (no source).
    pka_shift : float
        The resulting shift of the pKa at the working temperature [pKa].
    temperature : float
        Where that shift is evaluated: the end of the temperature range
        farthest from 25 °C [°C].
    coefficient : float
        ∂(exact pH)/∂pKa of that step (GUM) [pH per pKa].
    shift_exact : float
        coefficient × pka_shift [pH].
    shift_error : dict
        ``{shortcut id: ∂(error)/∂pKa × pka_shift}`` [pH] for each claimed shortcut.
    worst_abs_error : dict
        ``{shortcut id: |error at nominal| + |shift_error|}`` [pH].
    in_budget : bool
        True when the value's uncertainty is already an input of the budget
        (a missing ΔH°); otherwise the shift is beside the budget.
    """

    flag: DataFlag
    plausible_error: float
    common_practice: bool
    pka_shift: float
    temperature: float
    coefficient: float
    shift_exact: float
    shift_error: dict[str, float]
    worst_abs_error: dict[str, float]
    in_budget: bool


def _coefficient(g: GumResult, key: str) -> float:
    return next((c.coefficient for c in g.contributions if c.key == key), 0.0)


def _pka_shift(flag: DataFlag, conditions: ConditionsSpec, t: float) -> tuple[float, float]:
    """(plausible error of the value, resulting pKa shift at t)."""
    if flag.concern == Concern.NO_ENTHALPY:
        return UNKNOWN_ENTHALPY_HALF_WIDTH, unknown_enthalpy_pka_half_width(conditions)
    err = PLAUSIBLE_ERRORS[flag.quantity]
    if flag.quantity == Quantity.PKA:
        return err, err
    if flag.quantity == Quantity.ENTHALPY:
        return err, abs(float(pka_at_temperature(0.0, t, err, None)))
    return err, abs(float(pka_at_temperature(0.0, t, 0.0, err)))


def data_quality(method: Method, spec: SolutionSpec, gum_exact: GumResult, gum_errors: dict[str, GumResult],
                 nominal_errors: dict[str, float]) -> tuple[DataQualityItem, ...]:
    """Every flagged value of one solution with its effect on the exact pH and on each claimed shortcut's error.

    Parameters
    ----------
    method : Method
    spec : SolutionSpec
    gum_exact, gum_errors : GumResult
        The GUM results of the exact pH and of each claimed shortcut's error.
    nominal_errors : dict
        ``{shortcut id: error at nominal inputs}`` [pH].
    """
    c = method.conditions
    kinds = {r.key: r.kind for r in method.references}
    t = farthest_temperature(c)
    out = []
    for flag in data_flags(spec, c, kinds):
        plausible, shift = _pka_shift(flag, c, t)
        key = f"pka[{flag.component}][{flag.step}]"
        coef = _coefficient(gum_exact, key)
        shift_err = {sid: _coefficient(g, key) * shift for sid, g in gum_errors.items()}
        out.append(DataQualityItem(
            flag=flag,
            plausible_error=plausible,
            common_practice=flag.concern != Concern.NO_ENTHALPY,
            pka_shift=shift,
            temperature=t,
            coefficient=coef,
            shift_exact=coef * shift,
            shift_error=shift_err,
            worst_abs_error={sid: abs(nominal_errors[sid]) + abs(v) for sid, v in shift_err.items()},
            in_budget=flag.concern == Concern.NO_ENTHALPY,
        ))
    return tuple(out)
