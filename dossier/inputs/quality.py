"""Data a reviewer cannot take on trust: which values of a method are flagged.

A value is flagged when it was recalled from memory or only seen in a
secondary copy (substance-table status ``recalled`` or ``unverified``), when
its reference is an estimate, when a pKa has no uncertainty (u = 0), or when
ΔH° is missing although the working temperature (± its tolerance) leaves
25 °C, so that the pKa's change with temperature is unknown. A ΔH° or ΔCp° is
only flagged when it is used, i.e. when the temperature range is not 25 °C
alone.

``check`` turns each flag into a located warning (an error under
``--strict``); the analysis (:mod:`dossier.analysis.quality`) puts a number on
what each would do to the verdict, and a missing ΔH° enters the uncertainty
budget (:func:`dossier.analysis.batch.inputs_of`).
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum

from ..chemistry.temperature import REFERENCE_TEMPERATURE, pka_at_temperature
from .model import TABLE, ConditionsSpec, SolutionSpec

__all__ = [
    "Concern",
    "Quantity",
    "DataFlag",
    "data_flags",
    "farthest_temperature",
    "temperature_matters",
    "unknown_enthalpy_pka_half_width",
    "UNKNOWN_ENTHALPY_HALF_WIDTH",
    "UNTRUSTED_STATUSES",
]

UNTRUSTED_STATUSES = ("recalled", "unverified")
"""Substance-table statuses of values not read in their source's own text."""

UNKNOWN_ENTHALPY_HALF_WIDTH = 50.0
"""Half-width [kJ/mol] of the rectangular distribution taken for a missing
ΔH° of ionization: the ΔH° of common acid–base buffers lie within about
−10 … +60 kJ/mol (common practice, no source)."""


class Concern(StrEnum):
    """Why a value is flagged (stable identifiers; words belong to the render layer)."""

    RECALLED = "recalled"
    UNVERIFIED = "unverified"
    ESTIMATE = "estimate"
    NO_UNCERTAINTY = "no-uncertainty"
    NO_ENTHALPY = "no-enthalpy"


class Quantity(StrEnum):
    """Which value of an ionization step is flagged."""

    PKA = "pka"
    ENTHALPY = "enthalpy"
    HEAT_CAPACITY = "heat_capacity"


@dataclass(frozen=True)
class DataFlag:
    """One flagged value of a solution.

    Attributes
    ----------
    component : int
        The first component of the substance (0-based).
    step : int
        Ionization step (0-based).
    quantity : Quantity
    concern : Concern
    value : float or None
        The value as used (pKa; ΔH° [kJ/mol]; ΔCp° [J/(K·mol)]); None for a missing ΔH°.
    reference : str
        Source key (table) or reference key (method file); empty for a missing ΔH°.
    origin : str
        ``method file`` or ``substance table`` (where the value came from).
    """

    component: int
    step: int
    quantity: Quantity
    concern: Concern
    value: float | None
    reference: str
    origin: str


def farthest_temperature(conditions: ConditionsSpec) -> float:
    """The end of working temperature ± tolerance farthest from 25 °C [°C]."""
    lo = conditions.temperature - conditions.temperature_tolerance
    hi = conditions.temperature + conditions.temperature_tolerance
    return lo if abs(lo - REFERENCE_TEMPERATURE) > abs(hi - REFERENCE_TEMPERATURE) else hi


def temperature_matters(conditions: ConditionsSpec) -> bool:
    """True when the working temperature ± tolerance is not 25 °C alone (ΔH° is then used)."""
    return farthest_temperature(conditions) != REFERENCE_TEMPERATURE


def unknown_enthalpy_pka_half_width(conditions: ConditionsSpec) -> float:
    r"""Half-width of the pKa shift a missing ΔH° leaves open [pKa units].

    With ΔH° rectangular on ±a (a = :data:`UNKNOWN_ENTHALPY_HALF_WIDTH`), van 't
    Hoff gives the pKa at T within ±a/(R ln 10)·|1/T − 1/T₀|, taken at the end
    of the temperature range farthest from 25 °C.

    Examples
    --------
    >>> round(unknown_enthalpy_pka_half_width(ConditionsSpec(37.0, 0.0, "davies", 0.0)), 3)
    0.34
    """
    t = farthest_temperature(conditions)
    return abs(float(pka_at_temperature(0.0, t, UNKNOWN_ENTHALPY_HALF_WIDTH, None)))


def data_flags(spec: SolutionSpec, conditions: ConditionsSpec, reference_kinds: dict[str, str]) -> tuple[DataFlag, ...]:
    """Every flagged value of a solution, once per substance and step.

    Parameters
    ----------
    spec : SolutionSpec
    conditions : ConditionsSpec
    reference_kinds : dict
        ``{reference key: kind}`` of the method's references.
    """
    out: list[DataFlag] = []
    seen: set[str] = set()
    warm = temperature_matters(conditions)
    for k, c in enumerate(spec.components):
        if c.substance in seen:
            continue
        seen.add(c.substance)
        for j, p in enumerate(c.pka):
            if p.origin == TABLE and p.status in UNTRUSTED_STATUSES:
                out.append(DataFlag(k, j, Quantity.PKA, Concern(p.status), p.stated, p.reference, p.origin))
            elif p.origin != TABLE and reference_kinds.get(p.reference) == "estimate":
                out.append(DataFlag(k, j, Quantity.PKA, Concern.ESTIMATE, p.stated, p.reference, p.origin))
            if p.uncertainty == 0.0:
                out.append(DataFlag(k, j, Quantity.PKA, Concern.NO_UNCERTAINTY, p.stated, p.reference, p.origin))
            if not warm:
                continue
            if p.enthalpy is None:
                out.append(DataFlag(k, j, Quantity.ENTHALPY, Concern.NO_ENTHALPY, None, "", "none"))
                continue
            if p.enthalpy_origin == TABLE and p.enthalpy_status in UNTRUSTED_STATUSES:
                out.append(DataFlag(k, j, Quantity.ENTHALPY, Concern(p.enthalpy_status), p.enthalpy, p.enthalpy_source, TABLE))
            if p.heat_capacity is not None and p.heat_capacity_status in UNTRUSTED_STATUSES:
                out.append(DataFlag(k, j, Quantity.HEAT_CAPACITY, Concern(p.heat_capacity_status), p.heat_capacity, p.heat_capacity_source, TABLE))
    return tuple(out)
