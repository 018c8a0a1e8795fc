"""The validated method, as frozen values: what the load stage hands on.

Every number is in the engine's units (mol/L, °C, kJ/mol), every pKa carries
both the stated value and the converted ones, and every value says where it
came from (the method file or the substance table, with the source key).
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum

import numpy as np

from ..chemistry import CATALOGUE, Approximation, CarbonDioxide, Protolyte, Solution, StatedConstants
from .formulas import subscripted

__all__ = [
    "PkaValue",
    "ComponentSpec",
    "SolutionSpec",
    "AdjustmentSpec",
    "StrongAlone",
    "ClaimedShortcut",
    "ConditionsSpec",
    "Criteria",
    "Distribution",
    "ReferenceSpec",
    "Method",
    "TABLE",
    "METHOD_FILE",
]

TABLE = "substance table"
METHOD_FILE = "method file"


class Distribution(StrEnum):
    """The probability distribution of an uncertain input (JCGM 100:2008 §4.3)."""

    NORMAL = "normal"
    """Gaussian, with the stated standard uncertainty u."""
    RECTANGULAR = "rectangular"
    """Uniform over ±a, with u = a/√3."""


@dataclass(frozen=True)
class PkaValue:
    """One ionization step of a component.

    Attributes
    ----------
    stated : float
        pKa as the source gives it, at ``stated_temperature`` and ``stated_ionic_strength``.
    stated_temperature : float
        [°C].
    stated_ionic_strength : float
        [mol/kg]; 0 for a thermodynamic value.
    thermodynamic : float
        Converted to I = 0 and 25 °C: what the engine takes.
    at_working_temperature : float
        Thermodynamic value at the method's temperature (van 't Hoff).
    uncertainty : float
        Standard uncertainty [pKa units].
    distribution : Distribution
        How the value is drawn in the Monte-Carlo propagation.
    enthalpy, heat_capacity : float or None
        ΔH° [kJ/mol], ΔCp° [J/(K·mol)].
    origin : str
        ``method file`` or ``substance table`` (for the value).
    reference : str
        Key of the method's reference, or of the table's source.
    status : str
        ``stated`` for a method-file value; the table status otherwise.
    enthalpy_origin : str
        Where ΔH° came from (``method file``, ``substance table`` or ``none``).
    enthalpy_status, heat_capacity_status : str
        The table status of ΔH° and ΔCp° when they came from the table
        (``confirmed`` … ``recalled``); empty otherwise.
    enthalpy_source, heat_capacity_source : str
        The table's source key of ΔH° and ΔCp°; empty otherwise.
    """

    stated: float
    stated_temperature: float
    stated_ionic_strength: float
    thermodynamic: float
    at_working_temperature: float
    uncertainty: float
    distribution: Distribution
    enthalpy: float | None
    heat_capacity: float | None
    origin: str
    reference: str
    status: str
    enthalpy_origin: str
    enthalpy_status: str = ""
    heat_capacity_status: str = ""
    enthalpy_source: str = ""
    heat_capacity_source: str = ""


@dataclass(frozen=True)
class ComponentSpec:
    """One substance of a solution, validated and converted.

    Concentrations are in mol/L; ``tolerance`` is the half-width of a
    rectangular distribution; ``working_range`` is (low, high). ``substance``
    is the id as written (a table id or the method's own name), ``name`` the
    substance's name for people, ``compound`` and ``formula`` the form as
    added (the table's compound and formula for that form; ``formula`` is
    None for a form the table does not list). ``solubility`` is that form's
    solubility in water at 25 °C [mol/L] when the substance table gives one
    (``solubility_source`` its source key), else None.

    ``weighed_compound``, ``weighed_formula``, ``weighed_molar_mass`` [g/mol]
    and ``weighed_water`` (molecules of water of crystallisation) name the
    compound the method says is weighed (``weighed_as:``, a hydrate or
    another salt of the same form), None (0) when it says none: then the
    form's own compound is weighed. ``concentration_kind`` says how the
    concentration was written: ``amount`` (mol/L), ``molality`` (mol/kg) or
    ``mass`` (g/L, mg/L, % w/v: a mass of the weighed compound).
    """

    substance: str
    name: str
    from_table: bool
    charge: int
    removed: int
    form: str
    compound: str
    concentration: float
    concentration_text: str
    tolerance: float
    tolerance_text: str
    working_range: tuple[float, float]
    working_range_text: tuple[str, str]
    molar_mass: float | None
    pka: tuple[PkaValue, ...]
    formula: str | None = None
    solubility: float | None = None
    solubility_source: str | None = None
    weighed_compound: str | None = None
    weighed_formula: str | None = None
    weighed_molar_mass: float | None = None
    weighed_water: int = 0
    concentration_kind: str = "amount"

    @property
    def mass_basis(self) -> tuple[str, str | None, float | None]:
        """What is weighed: (compound, formula, molar mass [g/mol]); the formula
        and molar mass are None where neither the table nor the file gives them."""
        if self.weighed_compound is not None:
            return self.weighed_compound, self.weighed_formula, self.weighed_molar_mass
        return self.compound, self.formula, self.molar_mass

    @property
    def form_words(self) -> str:
        """The form as added, in words: ``fully protonated``, ``1 proton removed``, ``fully deprotonated``."""
        if self.removed == 0:
            return "fully protonated"
        if self.removed == len(self.pka):
            return "fully deprotonated"
        return f"{self.removed} proton{'' if self.removed == 1 else 's'} removed"

    @property
    def added_as(self) -> str:
        """What is weighed or measured out, for people: ``potassium dihydrogen phosphate, KH₂PO₄``.

        With ``weighed_as``: the compound weighed, ``sodium acetate trihydrate, C₂H₃NaO₂·3H₂O``.
        Without a formula (a form the substance table does not list): the
        substance's name and the form in words, ``glycine, 1 proton removed``.
        """
        if self.weighed_compound is not None and self.weighed_formula:
            return f"{self.weighed_compound}, {subscripted(self.weighed_formula)}"
        if self.formula:
            return f"{self.compound}, {subscripted(self.formula)}"
        return f"{self.name}, {self.form_words}"

    def protolyte(self) -> Protolyte:
        """The engine's protolyte (25 °C thermodynamic values, enthalpies)."""
        dh = tuple(p.enthalpy for p in self.pka)
        dcp = tuple(p.heat_capacity for p in self.pka)
        return Protolyte(
            self.substance,
            tuple(p.thermodynamic for p in self.pka),
            charge=self.charge,
            dh=dh if any(v is not None for v in dh) else None,
            dcp=dcp if any(v is not None for v in dcp) else None,
        )


@dataclass(frozen=True)
class ConditionsSpec:
    """Temperature [°C] with its tolerance, activity model, background ionic strength [mol/kg] with its tolerance,
    and carbon dioxide.

    ``co2`` is the engine's mode (``none``, ``open``, ``closed``);
    ``co2_partial_pressure`` [atm] for open, ``co2_total`` [mol/L] for closed;
    ``co2_as_written`` what the method file says (``none``, ``air``,
    ``partial_pressure: 1000 µatm``, ``dissolved: 0.05 mmol/L``).
    """

    temperature: float
    temperature_tolerance: float
    activity: str
    background: float
    background_tolerance: float = 0.0
    co2: str = "none"
    co2_partial_pressure: float = 0.0
    co2_total: float = 0.0
    co2_as_written: str = "none"

    def carbon_dioxide(self) -> CarbonDioxide:
        """The engine's CO₂ condition."""
        return CarbonDioxide(self.co2, partial_pressure=self.co2_partial_pressure, total=self.co2_total)


@dataclass(frozen=True)
class Criteria:
    """Acceptance: largest tolerated |error| [pH] and the Monte-Carlo probability."""

    max_ph_error: float
    probability: float


@dataclass(frozen=True)
class AdjustmentSpec:
    """'Adjust to pH X with …' as checked: the target, the titrant and the exact amount added.

    Attributes
    ----------
    target_ph : float
        Target pH (activity scale).
    titrant : str
        ``strong-base``, ``strong-acid``, or a weak titrant as ``<substance>, form <protons removed>``
        (``phosphoric-acid, form 2``).
    amount : float
        Titrant added by the exact model [mol per litre of final solution];
        already included in the solution's ``strong_base`` or ``strong_acid``,
        or, for a weak titrant, the total of the component ``component``.
    stock : float or None
        Stock concentration [mol/L], when stated.
    stock_text : str or None
        The stock as written.
    component : int or None
        Index of the component that holds a weak titrant (the last one); None for a strong titrant.
    """

    target_ph: float
    titrant: str
    amount: float
    stock: float | None = None
    stock_text: str | None = None
    component: int | None = None

    @property
    def strong(self) -> bool:
        """True for ``strong-base`` / ``strong-acid``, False for a weak titrant (a component)."""
        return self.component is None

@dataclass(frozen=True)
class StrongAlone:
    """A strong acid or base that stands alone in its solution (no weak component).

    Attributes
    ----------
    kind : str
        ``acid`` or ``base``.
    name : str
        For people: as the method file names it, else ``strong acid`` / ``strong base``.
    concentration : float
        Nominal concentration [mol/L] (the solution's ``strong_acid`` or ``strong_base``).
    concentration_text : str
    tolerance : float
        Half-width of a rectangular distribution [mol/L].
    tolerance_text : str
    working_range : (float, float)
        [mol/L]; the analyses dilute or concentrate the solution over it.
    working_range_text : (str, str)
    """

    kind: str
    name: str
    concentration: float
    concentration_text: str
    tolerance: float
    tolerance_text: str
    working_range: tuple[float, float]
    working_range_text: tuple[str, str]


@dataclass(frozen=True)
class ClaimedShortcut:
    """A shortcut the procedure relies on, and the constants its own calculation uses.

    Attributes
    ----------
    id : str
        Catalogue id.
    stated : StatedConstants or None
        The procedure's own values (``as_written:`` in the method file): one
        pKa per step of the first component (None: the model's value at the
        working conditions) and pKw (None: the model's). None when the
        procedure states none: the shortcut then uses the model's values.
    """

    id: str
    stated: StatedConstants | None = None


@dataclass(frozen=True)
class SolutionSpec:
    """One solution: its components, strong acid/base [mol/L] and claimed shortcuts.

    With ``adjustment``, the strong acid or base already includes the titrant
    the exact model adds to reach the target pH.
    ``shortcuts`` are the claimed ids in the file's order; ``as_written``
    holds the claims that state the procedure's own constants (see
    :meth:`approximation`).
    """

    id: str
    description: str
    components: tuple[ComponentSpec, ...]
    strong_acid: float
    strong_base: float
    shortcuts: tuple[str, ...]
    adjustment: AdjustmentSpec | None = None
    as_written: tuple[ClaimedShortcut, ...] = ()
    strong_acid_stock: float | None = None
    """Stock the stated strong acid is measured from [mol/L] (``strong_acid_stock:``), None when not stated."""
    strong_base_stock: float | None = None
    """Stock the stated strong base is measured from [mol/L] (``strong_base_stock:``), None when not stated."""
    strong_alone: StrongAlone | None = None
    """The strong acid or base when it is the whole solution (no components), with its tolerance and working range."""

    @property
    def lead_concentration(self) -> float:
        """Concentration [mol/L] that sets the scale of the whole solution: the first
        component's, or the strong acid's (base's) when it stands alone."""
        return self.strong_alone.concentration if self.strong_alone is not None else self.components[0].concentration

    @property
    def working_range(self) -> tuple[float, float]:
        """[mol/L] of the lead (:attr:`lead_concentration`): the range the analyses sweep the whole solution over."""
        return self.strong_alone.working_range if self.strong_alone is not None else self.components[0].working_range

    @property
    def lead_name(self) -> str:
        """The lead substance's name for people (``acetic acid``, ``hydrochloric acid``)."""
        return self.strong_alone.name if self.strong_alone is not None else self.components[0].name

    @property
    def lead_added_as(self) -> str:
        """What is weighed or measured out for the lead (:attr:`ComponentSpec.added_as`, or the strong acid's name)."""
        return self.strong_alone.name if self.strong_alone is not None else self.components[0].added_as

    @property
    def claims(self) -> tuple[ClaimedShortcut, ...]:
        """Every claimed shortcut with the constants it states (None where it states none)."""
        stated = {c.id: c.stated for c in self.as_written}
        return tuple(ClaimedShortcut(sid, stated.get(sid)) for sid in self.shortcuts)

    def stated(self, shortcut_id: str) -> StatedConstants | None:
        """The constants the procedure states for a claimed shortcut (None: the model's)."""
        return next((c.stated for c in self.as_written if c.id == shortcut_id), None)

    def approximation(self, shortcut_id: str) -> Approximation:
        """The catalogue's shortcut as this solution's procedure evaluates it:
        bound to the procedure's stated constants where the claim states them
        (:meth:`dossier.chemistry.Approximation.as_written`), else the
        catalogue's entry (model constants), also for a shortcut not claimed."""
        return CATALOGUE[shortcut_id].as_written(self.stated(shortcut_id))

    def same_substance(self, component: int) -> tuple[int, ...]:
        """Indices of every component that is the same substance as ``component``
        (one substance added in two forms has one set of pKa values); see
        :meth:`dossier.chemistry.Protolyte.is_same_substance`."""
        ref = self.components[component].protolyte()
        return tuple(k for k, c in enumerate(self.components) if c.protolyte().is_same_substance(ref))

    def to_solution(self, conditions: ConditionsSpec, *, scale: float | np.ndarray = 1.0) -> Solution:
        """The engine's solution at nominal inputs, optionally diluted or concentrated.

        Parameters
        ----------
        conditions : ConditionsSpec
        scale : float or array
            Factor applied to every concentration (the whole solution diluted
            or concentrated together), including strong acid and base.
        """
        from .convert import Variation, solution_for

        return solution_for(self, conditions, Variation(scale=scale))


@dataclass(frozen=True)
class ReferenceSpec:
    """A reference cited by the method file."""

    key: str
    citation: str
    kind: str
    doi: str | None
    document: str | None


@dataclass(frozen=True)
class Method:
    """A validated method file.

    Attributes
    ----------
    path : str
        The file as the user named it.
    source_sha256 : str
        SHA-256 of the file's bytes.
    change_reason : str or None
        Why this revision differs from the previous one (``method.change_reason``).
    """

    path: str
    source_sha256: str
    id: str
    title: str
    revision: str
    purpose: str
    prepared_by: str | None
    reviewed_by: str | None
    notes: str
    criteria: Criteria
    conditions: ConditionsSpec
    solutions: tuple[SolutionSpec, ...]
    references: tuple[ReferenceSpec, ...]
    change_reason: str | None = None

    def solution(self, solution_id: str) -> SolutionSpec:
        """The solution with this id (KeyError if none)."""
        for s in self.solutions:
            if s.id == solution_id:
                return s
        raise KeyError(solution_id)
