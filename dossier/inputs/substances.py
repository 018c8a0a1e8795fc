"""The bundled substance table (dossier/data/substances.yaml).

Thermodynamic pKa values at 25 °C and zero ionic strength, enthalpies and
heat-capacity changes of ionization, each with its published source and a
status saying how it was checked (see the header of the data file). Molar
masses are computed from each form's formula.
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources

import yaml

from .formulas import molar_mass

__all__ = ["TableValue", "TableStep", "TableForm", "TableSource", "Substance", "SubstanceTable", "load_table", "STATUSES", "SOURCE_KINDS"]

STATUSES = ("confirmed", "derived", "computed", "recalled")
"""How a table value was checked: read in a public copy, converted from one,
evaluated from a published equation, or recalled from memory (not checked)."""

SOURCE_KINDS = (
    "primary-measurement",
    "critically-evaluated-compilation",
    "secondary-compilation",
    "handbook",
    "in-house-measurement",
    "estimate",
)
"""Kinds of source, from most to least direct."""


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
class TableForm:
    """A compound in which the substance is added: protons removed, name, formula, molar mass [g/mol]."""

    removed: int
    compound: str
    formula: str
    molar_mass: float


@dataclass(frozen=True)
class TableSource:
    """A published source of table values."""

    key: str
    citation: str
    kind: str
    checked_in: str
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
    TableValue(value=4.757, source='nist46', status='derived')
    >>> t.get("phosphoric-acid").form(1).molar_mass
    136.084
    """
    raw = resources.files("dossier").joinpath("data/substances.yaml").read_bytes()
    data = yaml.safe_load(raw)
    sources = {
        key: TableSource(key, s["citation"], s["kind"], s["checked_in"], s.get("doi"))
        for key, s in data["sources"].items()
    }
    substances = {}
    for s in data["substances"]:
        steps = tuple(
            TableStep(_value(st, "pka"), _value(st, "enthalpy"), _value(st, "heat_capacity"))  # type: ignore[arg-type]
            for st in s["steps"]
        )
        forms = tuple(TableForm(f["removed"], f["compound"], f["formula"], molar_mass(f["formula"])) for f in s["forms"])
        substances[s["id"]] = Substance(s["id"], s["name"], int(s["charge"]), steps, forms, s.get("note", ""))
    return SubstanceTable(substances, sources, hashlib.sha256(raw).hexdigest(), len(raw))
