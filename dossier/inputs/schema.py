"""The method-file format, as typed pydantic models whose fields carry their
own descriptions (they become the JSON Schema of ``dossier schema`` and the
tables of docs/method-format.md).

These models check types and single-value ranges only; checks that need
several values or the substance table live in :mod:`dossier.inputs.checks`.
"""

from __future__ import annotations

from typing import Annotated, Any, Literal

from pydantic import BaseModel, BeforeValidator, ConfigDict, Field, WithJsonSchema, field_validator

from .forms import parse_form
from .substances import SOURCE_KINDS
from .units import TEMPERATURE_PATTERN, celsius, celsius_difference

__all__ = [
    "FORMAT",
    "ID_PATTERN",
    "MethodFile",
    "MethodInfo",
    "Acceptance",
    "Conditions",
    "SolutionIn",
    "ComponentIn",
    "PkaIn",
    "ReferenceIn",
    "json_schema",
]

FORMAT = "ph-dossier-method/1"
ID_PATTERN = r"^[A-Za-z0-9][A-Za-z0-9._-]{0,62}$"
ID_RULE = "letters (a-z, A-Z), digits, '-', '_' or '.', starting with a letter or digit, at most 63 characters"
"""Ids become folder and file names. Upper case is allowed (``QC-M-0042``); two
ids of one dossier that differ only in case are refused by the checks, since a
case-insensitive file system would give them one folder."""

ActivityId = Literal["ideal", "debye-huckel", "extended-debye-huckel", "davies"]
SourceKind = Literal[SOURCE_KINDS]  # type: ignore[valid-type]


def _unit(unit: str) -> dict[str, Any]:
    return {"unit": unit}


class _Model(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True, strict=True)


def _temperature_schema(low: float, high: float) -> WithJsonSchema:
    """A number of °C in [low, high], or text with its unit ('20 °C', '293.15 K')."""
    return WithJsonSchema({
        "anyOf": [{"type": "number", "minimum": low, "maximum": high}, {"type": "string", "pattern": TEMPERATURE_PATTERN}],
    })


Celsius = Annotated[float, BeforeValidator(celsius), _temperature_schema(0.0, 100.0)]
"""A temperature [°C]: a plain number is °C; text may carry °C or K."""
CelsiusDifference = Annotated[float, BeforeValidator(celsius_difference), _temperature_schema(0.0, 20.0)]
"""A temperature difference [°C = K]: a plain number, or text with °C or K."""

Text = Annotated[str, Field(min_length=1, max_length=10_000)]
ShortText = Annotated[str, Field(min_length=1, max_length=300)]
Identifier = Annotated[str, Field(pattern=ID_PATTERN, description=f"Identifier: {ID_RULE}.")]
ConcentrationText = Annotated[
    str,
    Field(
        min_length=1,
        max_length=100,
        description="A number with a unit: mol/L, mmol/L, µmol/L (or umol/L), mol/kg, mg/L or g/L, % w/v.",
        examples=["10 mmol/L", "0.1 mol/kg", "250 mg/L"],
    ),
]


class MethodInfo(_Model):
    """Who and what: the identity of the method."""

    id: Identifier = Field(description=f"Method identifier, used as the folder name of its report: {ID_RULE}.")
    title: ShortText = Field(description="Title of the method as in the SOP.")
    revision: ShortText = Field(description="Revision of this method file (text, e.g. '3' or '2026-01').")
    purpose: Text = Field(description="What the calculated pH is used for, in one or two sentences.")
    prepared_by: ShortText | None = Field(None, description="Who prepared the method file (name or role).")
    reviewed_by: ShortText | None = Field(None, description="Who reviewed it (name or role).")
    notes: str = Field("", max_length=20_000, description="Free notes in Markdown (raw HTML is not rendered).")
    change_reason: Text | None = Field(
        None,
        description=("Why this revision differs from the previous one, in a sentence or two. When a dossier is built "
                     "with --previous and the method's content changed, the revision must be higher and this reason "
                     "stated (a warning otherwise; an error with --strict); the changes page shows it."),
    )

    @field_validator("revision", mode="before")
    @classmethod
    def _revision_as_text(cls, v: Any) -> Any:
        return str(v) if isinstance(v, int) and not isinstance(v, bool) else v


class Acceptance(_Model):
    """The acceptance criterion of the shortcut."""

    max_ph_error: float = Field(
        gt=0.0, le=2.0, allow_inf_nan=False, json_schema_extra=_unit("pH"),
        description="Largest tolerated |shortcut pH − exact pH| over the working range.",
    )
    probability: float = Field(
        0.95, ge=0.5, le=0.9999, allow_inf_nan=False,
        description="Required probability that |error| stays within max_ph_error when the inputs vary within their uncertainties (Monte-Carlo verdict).",
    )


class Conditions(_Model):
    """Conditions of use, common to every solution of the method."""

    temperature: Celsius = Field(
        25.0, ge=0.0, le=100.0, allow_inf_nan=False, json_schema_extra=_unit("°C"),
        description="Working temperature: a number of °C, or text with its unit ('20 °C', '293.15 K').",
    )
    temperature_tolerance: CelsiusDifference = Field(
        0.0, ge=0.0, le=20.0, allow_inf_nan=False, json_schema_extra=_unit("°C"),
        description="Half-width of the allowed temperature range (± value; a number of °C, or '2 °C', '2 K'), treated as a rectangular distribution.",
    )
    activity_model: ActivityId = Field(
        "davies",
        description="Activity model of the exact calculation: ideal, debye-huckel, extended-debye-huckel or davies (coefficient 0.3).",
    )
    background_ionic_strength: float = Field(
        0.0, ge=0.0, le=5.0, allow_inf_nan=False, json_schema_extra=_unit("mol/kg"),
        description="Ionic strength of an inert 1:1 electrolyte in the solution (e.g. 0.15 for 0.15 mol/kg NaCl).",
    )
    background_ionic_strength_tolerance: float = Field(
        0.0, ge=0.0, le=5.0, allow_inf_nan=False, json_schema_extra=_unit("mol/kg"),
        description="Half-width of the allowed background ionic strength (± value), rectangular distribution.",
    )


class PkaIn(_Model):
    """One ionization step's pKa, with its uncertainty and where it came from."""

    value: float | None = Field(
        None, ge=-2.0, le=16.0, allow_inf_nan=False,
        description="pKa as stated by the source. Leave out to take the value of the substance table.",
    )
    uncertainty: float = Field(
        ge=0.0, le=2.0, allow_inf_nan=False,
        description="Standard uncertainty of the pKa (always stated, never guessed from the digits).",
    )
    distribution: Literal["normal", "rectangular"] = Field(
        "normal", description="Distribution of the pKa for the Monte-Carlo propagation; for rectangular, the half-width is √3 × uncertainty.",
    )
    temperature: Celsius = Field(
        25.0, ge=0.0, le=100.0, allow_inf_nan=False, json_schema_extra=_unit("°C"),
        description="Temperature at which the stated value holds: a number of °C, or text with its unit ('37 °C', '310.15 K').",
    )
    ionic_strength: float = Field(
        0.0, ge=0.0, le=5.0, allow_inf_nan=False, json_schema_extra=_unit("mol/kg"),
        description="Ionic strength at which the stated value holds (0: thermodynamic). Otherwise the value is converted to I = 0 with the method's activity model, by its convention.",
    )
    convention: Literal["mixed", "concentration"] = Field(
        "mixed",
        description="For a value stated at I > 0: 'mixed' (a(H⁺)·[A]/[HA], as measured with a pH meter) or 'concentration' ([H⁺][A]/[HA]).",
    )
    enthalpy: float | None = Field(
        None, ge=-300.0, le=300.0, allow_inf_nan=False, json_schema_extra=_unit("kJ/mol"),
        description="Standard enthalpy of ionization, for van 't Hoff. Leave out to take the table's value (when the pKa is from the table).",
    )
    heat_capacity: float | None = Field(
        None, ge=-2000.0, le=2000.0, allow_inf_nan=False, json_schema_extra=_unit("J/(K·mol)"),
        description="Standard heat-capacity change of ionization.",
    )
    reference: str | None = Field(None, description="Key of the reference (under references:) that gives the stated value.")


Form = Annotated[
    str | int,
    Field(description="Form as added: 'acid' (fully protonated), 'base' (fully deprotonated: free base or salt), or the number of protons removed (e.g. 1 for NaH2PO4)."),
]


class ComponentIn(_Model):
    """One substance in the solution."""

    substance: ShortText = Field(description="Substance-table id (see `dossier substances`) or a name of your own (then give charge and every pKa value).")
    form: Form
    concentration: ConcentrationText = Field(description="Nominal total concentration, with unit.")
    tolerance: str | None = Field(
        None, min_length=1, max_length=100,
        description="Half-width of the allowed concentration range, as a concentration with unit or a percentage ('2 %'); rectangular distribution.",
    )
    working_range: list[ConcentrationText] = Field(
        min_length=2, max_length=2,
        description="[lowest, highest] concentration the method covers; the whole solution is diluted or concentrated together.",
    )
    molar_mass: float | None = Field(
        None, gt=0.0, le=5000.0, allow_inf_nan=False, json_schema_extra=_unit("g/mol"),
        description="Molar mass of the form as added, for mass units (default: from the table's formula for that form).",
    )
    charge: int | None = Field(None, ge=-6, le=6, description="Charge of the fully protonated form (0 acetic acid, +1 ammonium). Taken from the table for table substances.")
    pka: list[PkaIn] = Field(min_length=1, max_length=6, description="One entry per ionization step, in order.")

    @field_validator("form", mode="before")
    @classmethod
    def _form(cls, v: Any) -> Any:
        return parse_form(v)


class SolutionIn(_Model):
    """One solution whose pH the SOP calculates."""

    id: Identifier = Field(description=f"Solution identifier, unique in the method: {ID_RULE}.")
    description: str = Field("", max_length=2000, description="What the solution is, in words.")
    components: list[ComponentIn] = Field(min_length=1, max_length=10, description="The substances dissolved.")
    strong_acid: ConcentrationText | None = Field(None, description="Added strong acid (e.g. HCl), with unit.")
    strong_base: ConcentrationText | None = Field(None, description="Added strong base (e.g. NaOH), with unit.")
    shortcuts: list[str] = Field(min_length=1, max_length=12, description="Ids of the shortcuts the SOP relies on (see docs/calculations.md).")


class ReferenceIn(_Model):
    """A cited source."""

    citation: Text = Field(description="Full citation.")
    doi: str | None = Field(None, max_length=200, description="DOI, where there is one.")
    document: str | None = Field(None, max_length=300, description="Document number (report, SOP, certificate), where there is one.")
    kind: SourceKind = Field(description="primary-measurement, critically-evaluated-compilation, secondary-compilation, handbook, in-house-measurement or estimate.")


class MethodFile(_Model):
    """A ph-dossier method file: one method, its solutions and its references."""

    format: Literal["ph-dossier-method/1"] = Field(description="Format version of the file: ph-dossier-method/1.")
    method: MethodInfo = Field(description="Identity of the method: id, title, revision, purpose.")
    acceptance: Acceptance = Field(description="Acceptance criterion: max_ph_error and probability.")
    conditions: Conditions = Field(default_factory=Conditions, description="Conditions of use: temperature, activity model, background ionic strength.")
    solutions: list[SolutionIn] = Field(min_length=1, max_length=50, description="The solutions whose pH the SOP calculates.")
    references: dict[str, ReferenceIn] = Field(default_factory=dict, description="Cited sources by key.")


def json_schema() -> dict[str, Any]:
    """JSON Schema (draft 2020-12) of the method-file format."""
    schema = MethodFile.model_json_schema()
    schema["$schema"] = "https://json-schema.org/draft/2020-12/schema"
    schema["$id"] = "urn:ph-dossier:schema:method:1"
    schema["title"] = "ph-dossier method file (format ph-dossier-method/1)"
    return schema
