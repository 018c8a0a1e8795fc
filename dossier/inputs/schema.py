"""The method-file format, as typed pydantic models whose fields carry their
own descriptions (they become the JSON Schema of ``dossier schema`` and the
tables of docs/method-format.md).

These models check types and single-value ranges only; checks that need
several values or the substance table live in :mod:`dossier.inputs.checks`.
"""

from __future__ import annotations

from typing import Annotated, Any, Literal

from pydantic import BaseModel, BeforeValidator, ConfigDict, Field, WithJsonSchema, field_validator

from .. import limits
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
    "Co2Open",
    "Co2Closed",
    "SolutionIn",
    "AdjustedTo",
    "TitrantIn",
    "StrongIn",
    "ComponentIn",
    "PkaIn",
    "ShortcutIn",
    "AsWrittenIn",
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


Celsius = Annotated[float, BeforeValidator(celsius), _temperature_schema(*limits.TEMPERATURE)]
"""A temperature [°C]: a plain number is °C; text may carry °C or K."""
CelsiusDifference = Annotated[float, BeforeValidator(celsius_difference), _temperature_schema(*limits.TEMPERATURE_TOLERANCE)]
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
        gt=limits.MAX_PH_ERROR[0], le=limits.MAX_PH_ERROR[1], allow_inf_nan=False, json_schema_extra=_unit("pH"),
        description="Largest tolerated |shortcut pH − exact pH| over the working range.",
    )
    probability: float = Field(
        0.95, ge=limits.PROBABILITY[0], le=limits.PROBABILITY[1], allow_inf_nan=False,
        description="Required conformity probability that the shortcut's pH lies within max_ph_error of the true pH, given the uncertainty of the exact pH (simple acceptance, JCGM 106:2012).",
    )


class Co2Open(_Model):
    """Open to a gas at a stated CO₂ partial pressure."""

    partial_pressure: str = Field(
        min_length=1, max_length=100,
        description="CO₂ partial pressure with its unit: µatm (or uatm), atm, Pa, kPa (e.g. '1000 µatm'); at most 1 atm.",
        examples=["1000 µatm", "0.1 kPa"],
    )


class Co2Closed(_Model):
    """Closed: a stated total of dissolved inorganic carbon added (as CO₂)."""

    dissolved: ConcentrationText = Field(description="Total dissolved inorganic carbon added, with unit (e.g. '0.05 mmol/L').")


class Conditions(_Model):
    """Conditions of use, common to every solution of the method."""

    temperature: Celsius = Field(
        25.0, ge=limits.TEMPERATURE[0], le=limits.TEMPERATURE[1], allow_inf_nan=False, json_schema_extra=_unit("°C"),
        description="Working temperature: a number of °C, or text with its unit ('20 °C', '293.15 K').",
    )
    temperature_tolerance: CelsiusDifference = Field(
        0.0, ge=limits.TEMPERATURE_TOLERANCE[0], le=limits.TEMPERATURE_TOLERANCE[1], allow_inf_nan=False, json_schema_extra=_unit("°C"),
        description="Half-width of the allowed temperature range (± value; a number of °C, or '2 °C', '2 K'), treated as a rectangular distribution.",
    )
    activity_model: ActivityId = Field(
        "davies",
        description="Activity model of the exact calculation: ideal, debye-huckel, extended-debye-huckel or davies (coefficient 0.3).",
    )
    background_ionic_strength: float = Field(
        0.0, ge=limits.BACKGROUND[0], le=limits.BACKGROUND[1], allow_inf_nan=False, json_schema_extra=_unit("mol/kg"),
        description="Ionic strength of an inert 1:1 electrolyte in the solution (e.g. 0.15 for 0.15 mol/kg NaCl).",
    )
    background_ionic_strength_tolerance: float = Field(
        0.0, ge=limits.BACKGROUND[0], le=limits.BACKGROUND[1], allow_inf_nan=False, json_schema_extra=_unit("mol/kg"),
        description="Half-width of the allowed background ionic strength (± value), rectangular distribution.",
    )
    co2: Literal["none", "air"] | Co2Open | Co2Closed = Field(
        "none",
        description=(
            "Carbon dioxide: 'none' (CO₂-free water, the default), 'air' (open to air: 420 µatm, Henry's law at the working temperature), "
            "{partial_pressure: 1000 µatm} (open at a stated partial pressure), or {dissolved: 0.05 mmol/L} (closed: this total dissolved inorganic carbon added)."
        ),
    )


class PkaIn(_Model):
    """One ionization step's pKa, with its uncertainty and where it came from."""

    value: float | None = Field(
        None, ge=limits.PKA_STATED[0], le=limits.PKA_STATED[1], allow_inf_nan=False,
        description="pKa as stated by the source. Leave out to take the value of the substance table.",
    )
    uncertainty: float = Field(
        ge=limits.PKA_UNCERTAINTY[0], le=limits.PKA_UNCERTAINTY[1], allow_inf_nan=False,
        description="Standard uncertainty of the pKa (always stated, never guessed from the digits).",
    )
    distribution: Literal["normal", "rectangular"] = Field(
        "normal", description="Distribution of the pKa for the Monte-Carlo propagation; for rectangular, the half-width is √3 × uncertainty.",
    )
    temperature: Celsius = Field(
        25.0, ge=limits.TEMPERATURE[0], le=limits.TEMPERATURE[1], allow_inf_nan=False, json_schema_extra=_unit("°C"),
        description="Temperature at which the stated value holds: a number of °C, or text with its unit ('37 °C', '310.15 K').",
    )
    ionic_strength: float = Field(
        0.0, ge=limits.BACKGROUND[0], le=limits.BACKGROUND[1], allow_inf_nan=False, json_schema_extra=_unit("mol/kg"),
        description="Ionic strength at which the stated value holds (0: thermodynamic). Otherwise the value is converted to I = 0 with the method's activity model, by its convention.",
    )
    convention: Literal["mixed", "concentration"] = Field(
        "mixed",
        description="For a value stated at I > 0: 'mixed' (a(H⁺)·[A]/[HA], as measured with a pH meter) or 'concentration' ([H⁺][A]/[HA]).",
    )
    enthalpy: float | None = Field(
        None, ge=limits.ENTHALPY[0], le=limits.ENTHALPY[1], allow_inf_nan=False, json_schema_extra=_unit("kJ/mol"),
        description="Standard enthalpy of ionization, for van 't Hoff. Leave out to take the table's value (when the pKa is from the table).",
    )
    heat_capacity: float | None = Field(
        None, ge=limits.HEAT_CAPACITY[0], le=limits.HEAT_CAPACITY[1], allow_inf_nan=False, json_schema_extra=_unit("J/(K·mol)"),
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
        None, gt=limits.MOLAR_MASS[0], le=limits.MOLAR_MASS[1], allow_inf_nan=False, json_schema_extra=_unit("g/mol"),
        description="Molar mass of the form as added, for mass units (default: from the table's formula for that form).",
    )
    charge: int | None = Field(None, ge=limits.CHARGE[0], le=limits.CHARGE[1], description="Charge of the fully protonated form (0 acetic acid, +1 ammonium). Taken from the table for table substances.")
    weighed_as: ShortText | None = Field(
        None,
        description=("The compound weighed for this form, by its name or formula in the substance table (`dossier substances`): "
                     "the form's own compound or one it is sold as, e.g. a hydrate ('sodium acetate trihydrate', 'Na2HPO4·12H2O'). "
                     "Its molar mass converts a mass concentration and gives the mass per litre of the preparation table."),
    )
    pka: list[PkaIn] = Field(min_length=1, max_length=limits.MAX_STEPS, description="One entry per ionization step, in order.")

    @field_validator("form", mode="before")
    @classmethod
    def _form(cls, v: Any) -> Any:
        return parse_form(v)


class TitrantIn(_Model):
    """A weak titrant: a substance and the form it is added in (the keys of a component)."""

    substance: ShortText = Field(description="Substance-table id (see `dossier substances`) or a name of your own (then give charge and every pKa value).")
    form: Form
    charge: int | None = Field(None, ge=limits.CHARGE[0], le=limits.CHARGE[1], description="Charge of the fully protonated form; taken from the table for table substances.")
    pka: list[PkaIn] | None = Field(
        None, min_length=1, max_length=limits.MAX_STEPS,
        description="One entry per ionization step, as for a component. Leave out when the solution has a component of the same substance: "
                    "the titrant then takes that component's pKa values (one substance, one set of constants).",
    )

    @field_validator("form", mode="before")
    @classmethod
    def _form(cls, v: Any) -> Any:
        return parse_form(v)


class AdjustedTo(_Model):
    """'Adjust to pH X with …': the titrant is added until the exact pH reaches the target."""

    ph: float = Field(ge=limits.TARGET_PH[0], le=limits.TARGET_PH[1], allow_inf_nan=False, json_schema_extra=_unit("pH"), description="Target pH (activity scale, as a pH meter reads it).")
    with_: Literal["strong-base", "strong-acid"] | TitrantIn = Field(
        alias="with", description="Titrant: strong-base (e.g. NaOH) or strong-acid (e.g. HCl), monovalent and fully dissociated; "
        "or a weak acid–base substance and its form, {substance: phosphoric-acid, form: 2}.",
    )
    stock: ConcentrationText | None = Field(None, description="Concentration of the titrant stock, with unit, for the volume per litre (optional).")


class StrongIn(_Model):
    """A strong acid or base that stands alone in its solution (no weak component):
    its concentration, tolerance and the working range the analyses sweep."""

    concentration: ConcentrationText = Field(description="Nominal concentration of the strong acid (base), with unit (mol/L, mmol/L, µmol/L).")
    tolerance: str | None = Field(
        None, min_length=1, max_length=100,
        description="Half-width of the allowed concentration range, as a concentration with unit or a percentage ('2 %'); rectangular distribution.",
    )
    working_range: list[ConcentrationText] = Field(
        min_length=2, max_length=2, description="[lowest, highest] concentration the method covers.",
    )
    name: ShortText | None = Field(None, description="What it is, for the report (e.g. 'hydrochloric acid'); default 'strong acid' or 'strong base'.")


StrongText = Annotated[ConcentrationText | StrongIn, Field(description=(
    "With unit (e.g. '10 mmol/L'); or, for a solution of a strong acid or base alone (no components), "
    "{concentration, tolerance, working_range, name}."))]


class AsWrittenIn(_Model):
    """The constants the procedure's own calculation puts into the shortcut."""

    pka: list[float | None] | None = Field(
        None, min_length=1, max_length=6,
        description="The procedure's pKa for each step of the first component, in order (one entry per step); "
        "null: the model's value at the working conditions (thermodynamic, at the working temperature). "
        "Used in the shortcut's equation as written, without conversion.",
    )
    pkw: float | None = Field(
        None, allow_inf_nan=False,
        description="The procedure's pKw (e.g. 14.0); leave out for the model's value at the working temperature.",
    )


class ShortcutIn(_Model):
    """A claimed shortcut with the constants the procedure's own calculation uses."""

    id: str = Field(description="Shortcut id (see docs/calculations.md).")
    as_written: AsWrittenIn | None = Field(
        None, description="The constants the procedure puts into the shortcut's equation (pka, pkw); leave out for the model's values.",
    )


def _shortcut_item(v: Any) -> Any:
    return {"id": v} if isinstance(v, str) else v


ShortcutItem = Annotated[ShortcutIn, BeforeValidator(_shortcut_item, json_schema_input_type=str | ShortcutIn)]
"""A shortcut claim: a plain id, or ``{id, as_written}``."""


class SolutionIn(_Model):
    """One solution whose pH the SOP calculates."""

    id: Identifier = Field(description=f"Solution identifier, unique in the method: {ID_RULE}.")
    description: str = Field("", max_length=2000, description="What the solution is, in words.")
    components: list[ComponentIn] = Field(
        default_factory=list, max_length=10,
        description="The weak acid–base substances dissolved; may be left out when the solution holds only a strong acid or base.",
    )
    strong_acid: StrongText | None = Field(
        None, description="Added strong acid (e.g. HCl): a concentration with unit, or alone in the solution {concentration, tolerance, working_range, name}.",
    )
    strong_base: StrongText | None = Field(
        None, description="Added strong base (e.g. NaOH): a concentration with unit, or alone in the solution {concentration, tolerance, working_range, name}.",
    )
    shortcuts: list[ShortcutItem] = Field(
        min_length=1, max_length=12,
        description="The shortcuts the SOP relies on (see docs/calculations.md): each a plain id, or "
        "{id, as_written: {pka, pkw}} with the constants the procedure's own calculation uses.",
    )
    adjusted_to: AdjustedTo | None = Field(
        None,
        description="'Adjust to pH X with …': {ph: 4.75, with: strong-base, stock: 1 mol/L}, or with a substance and its form, "
        "{ph: 7.2, with: {substance: phosphoric-acid, form: 2}}. The exact amount of titrant is added to the solution as listed; the analyses use the adjusted solution.",
    )
    strong_acid_stock: ConcentrationText | None = Field(
        None, description="Concentration of the stock the strong acid is measured from, with unit: the preparation table gives its volume per litre.",
    )
    strong_base_stock: ConcentrationText | None = Field(
        None, description="Concentration of the stock the strong base is measured from, with unit: the preparation table gives its volume per litre.",
    )


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
