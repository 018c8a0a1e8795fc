"""The bundled substance table (dossier/data/substances.yaml).

Thermodynamic pKa values at 25 °C and zero ionic strength, enthalpies and
heat-capacity changes of ionization. Every value cites published literature
(a primary measurement paper, a critically evaluated compilation or a
handbook edition; :data:`TABLE_SOURCE_KINDS`) and carries a status saying how
far it was checked against that literature's own text (:data:`STATUSES`, and
the header of the data file). Molar masses are computed from each form's
formula.
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

import yaml

from .formulas import molar_mass, water_of_crystallisation

__all__ = ["TableValue", "TableStep", "TableCompound", "TableForm", "TableSource", "Substance", "SubstanceTable", "load_table", "STATUSES", "SOURCE_KINDS",
           "TABLE_SOURCE_KINDS", "STATUS_MEANINGS"]

STATUSES = ("confirmed", "derived", "computed", "unverified", "recalled")
"""How far a table value was checked against its source's own published text:
read there (confirmed), converted from a number read there (derived),
evaluated at 25 °C from an equation read there (computed), attributed to the
source by a secondary copy but not read in the source itself (unverified), or
recalled from memory and not checked at all (recalled)."""

STATUS_MEANINGS = {
    "confirmed": "read in the source's own published text",
    "derived": "converted from a number read in the source's own text",
    "computed": "evaluated at 25 °C from an equation read in the source's own text",
    "unverified": "attributed to the source by a secondary copy, not read in the source itself",
    "recalled": "recalled from memory, not checked against any text",
}
"""What each status means, in the words the pages and the terminal show."""

SOURCE_KINDS = (
    "primary-measurement",
    "critically-evaluated-compilation",
    "secondary-compilation",
    "handbook",
    "in-house-measurement",
    "estimate",
)
"""Kinds of source a method file may cite, from most to least direct."""

TABLE_SOURCE_KINDS = ("primary-measurement", "critically-evaluated-compilation", "handbook")
"""Kinds of source the bundled table may cite: published literature only."""


@dataclass(frozen=True)
class TableValue:
    """A number with its source key and status."""

    value: float
    source: str
    status: str


@dataclass(frozen=True)
class TableStep:
    """One ionization step: pKa, ΔH° [kJ/mol], ΔCp° [J/(K·mol)]."""

    pka: TableValue
    enthalpy: TableValue | None
    heat_capacity: TableValue | None


@dataclass(frozen=True)
class TableCompound:
    """A compound that may be weighed to deliver a form: name, formula, molar mass [g/mol].

    ``water`` is the number of water molecules of crystallisation the formula
    carries (3 for ``C2H3NaO2·3H2O``; 0 for an anhydrous compound).
    """

    compound: str
    formula: str
    molar_mass: float
    water: int = 0


@dataclass(frozen=True)
class TableForm:
    """A compound in which the substance is added: protons removed, name, formula, molar mass [g/mol].

    ``solubility`` is the compound's solubility in water at 25 °C [mol/L]
    with its source and status, where the table gives one (None otherwise).
    ``sold_as`` lists the other compounds that deliver the same form and may
    be weighed instead (hydrates, or a salt of another alkali cation).
    """

    removed: int
    compound: str
    formula: str
    molar_mass: float
    solubility: TableValue | None = None
    sold_as: tuple[TableCompound, ...] = ()

    @property
    def weighable(self) -> tuple[TableCompound, ...]:
        """Every compound that may be weighed for this form: the form's own compound first, then ``sold_as``."""
        own = TableCompound(self.compound, self.formula, self.molar_mass, water_of_crystallisation(self.formula))
        return (own,) + self.sold_as


@dataclass(frozen=True)
class TableSource:
    """A published source of table values.

    ``checked`` says which of the source's own text was read to check its
    values, or that they were not checked against it.
    """

    key: str
    citation: str
    kind: str
    checked: str
    doi: str | None = None


@dataclass(frozen=True)
class Substance:
    """One substance of the table."""

    id: str
    name: str
    charge: int
    steps: tuple[TableStep, ...]
    forms: tuple[TableForm, ...]
    note: str = ""

    def form(self, removed: int) -> TableForm | None:
        """The compound added with ``removed`` protons removed, if the table names one."""
        return next((f for f in self.forms if f.removed == removed), None)


@dataclass(frozen=True)
class SubstanceTable:
    """The whole table and the SHA-256 of its file (recorded in every result)."""

    substances: dict[str, Substance]
    sources: dict[str, TableSource]
    sha256: str
    size: int = 0
    """Bytes of the file."""

    def get(self, substance_id: str) -> Substance | None:
        return self.substances.get(substance_id)


def _value(d: dict, key: str) -> TableValue | None:
    if key not in d:
        return None
    return TableValue(float(d[key]), d[f"{key}_source"], d[f"{key}_status"])


@lru_cache(maxsize=1)
def load_table() -> SubstanceTable:
    """Read and check the bundled table.

    Returns
    -------
    SubstanceTable

    Examples
    --------
    >>> t = load_table()
    >>> t.get("acetic-acid").steps[0].pka
    TableValue(value=4.757, source='nist46', status='unverified')
    >>> t.get("phosphoric-acid").form(1).molar_mass
    136.084
    >>> t.get("benzoic-acid").form(0).solubility.value  # mol/L at 25 °C
    0.0278
    >>> t.get("acetic-acid").form(1).sold_as[0]
    TableCompound(compound='sodium acetate trihydrate', formula='C2H3NaO2·3H2O', molar_mass=136.08, water=3)
    """
    raw = resources.files("dossier").joinpath("data/substances.yaml").read_bytes()
    data = yaml.safe_load(raw)
    sources = {
        key: TableSource(key, s["citation"], s["kind"], s["checked"], s.get("doi"))
        for key, s in data["sources"].items()
    }
    for src in sources.values():
        if src.kind not in TABLE_SOURCE_KINDS:
            raise ValueError(f"substances.yaml: source {src.key!r} has kind {src.kind!r}; the table cites only {', '.join(TABLE_SOURCE_KINDS)}")
    substances = {}
    for s in data["substances"]:
        steps = tuple(
            TableStep(_value(st, "pka"), _value(st, "enthalpy"), _value(st, "heat_capacity"))  # type: ignore[arg-type]
            for st in s["steps"]
        )
        forms = tuple(
            TableForm(f["removed"], f["compound"], f["formula"], molar_mass(f["formula"]), _value(f, "solubility"),
                      tuple(TableCompound(c["compound"], c["formula"], molar_mass(c["formula"]), water_of_crystallisation(c["formula"]))
                            for c in f.get("sold_as", ())))
            for f in s["forms"]
        )
        for st in steps:
            for v in (st.pka, st.enthalpy, st.heat_capacity):
                if v is not None and (v.source not in sources or v.status not in STATUSES):
                    raise ValueError(f"substances.yaml: substance {s['id']!r} cites source {v.source!r} with status {v.status!r}; "
                                     f"sources: {', '.join(sources)}; statuses: {', '.join(STATUSES)}")
        for f in forms:
            v = f.solubility
            if v is not None and (v.source not in sources or v.status not in STATUSES or not v.value > 0.0):
                raise ValueError(f"substances.yaml: form {f.compound!r} of {s['id']!r} has solubility {v.value!r} from source {v.source!r} "
                                 f"with status {v.status!r}; a positive number [mol/L], sources: {', '.join(sources)}; statuses: {', '.join(STATUSES)}")
        substances[s["id"]] = Substance(s["id"], s["name"], int(s["charge"]), steps, forms, s.get("note", ""))
    return SubstanceTable(substances, sources, hashlib.sha256(raw).hexdigest(), len(raw))
