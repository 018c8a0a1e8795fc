"""What changed between two sets of ledgers — per method, the inputs, the
numbers and the verdicts. Pure: the ledgers come from memory (a build in
progress) or from disk (:mod:`dossier.audit.diff`); the changes page and
``dossier diff`` show the result.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from ..inputs.serialize import method_to_dict
from .ledger import Ledger, settings_to_dict

__all__ = ["Change", "MethodDiff", "DossierDiff", "diff_ledgers", "input_unit", "REL_TOL", "INPUT_UNITS"]

REL_TOL = 1e-9
"""Relative tolerance under which two numbers count as the same."""


@dataclass(frozen=True)
class Change:
    """One changed item: what (a field path or a ledger id), before, after."""

    what: str
    old: Any
    new: Any
    unit: str | None = None

    @property
    def numeric(self) -> bool:
        """Each side is a number or absent (an entry added or removed), and one is a number."""
        sides = [v for v in (self.old, self.new) if v is not None]
        return bool(sides) and all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in sides)

    @property
    def difference(self) -> float | None:
        """new − old for two numbers, else None."""
        if self.numeric and self.old is not None and self.new is not None:
            return float(self.new) - float(self.old)
        return None


@dataclass(frozen=True)
class MethodDiff:
    """Changes of one method; ``status`` is ``added``, ``removed``, ``changed`` or ``unchanged``."""

    id: str
    status: str
    old_revision: str | None
    new_revision: str | None
    inputs: tuple[Change, ...]
    numbers: tuple[Change, ...]
    verdicts: tuple[Change, ...]
    reason: str | None = None
    old_reason: str | None = None


@dataclass(frozen=True)
class DossierDiff:
    """Every method of either dossier, in id order; the previous dossier's fingerprint
    and build time when it was read from disk."""

    old_label: str
    new_label: str
    methods: tuple[MethodDiff, ...]
    old_fingerprint: str | None = None
    old_built: str | None = None

    @property
    def changed(self) -> tuple[MethodDiff, ...]:
        return tuple(m for m in self.methods if m.status != "unchanged")


def _flatten(value: Any, prefix: str = "") -> dict[str, Any]:
    out: dict[str, Any] = {}
    if isinstance(value, dict):
        for k, v in value.items():
            out.update(_flatten(v, f"{prefix}.{k}" if prefix else str(k)))
    elif isinstance(value, (list, tuple)):
        for i, v in enumerate(value):
            out.update(_flatten(v, f"{prefix}[{i}]"))
    else:
        out[prefix] = value
    return out


def _same(a: Any, b: Any) -> bool:
    if isinstance(a, float) and isinstance(b, float):
        return math.isclose(a, b, rel_tol=REL_TOL, abs_tol=1e-12)
    return a == b


def _pairs(old: dict[str, Any], new: dict[str, Any]) -> list[Change]:
    out = []
    for k in sorted(old.keys() | new.keys()):
        a, b = old.get(k), new.get(k)
        if not _same(a, b):
            out.append(Change(k, a, b))
    return out


_NOT_INPUTS = ("source_sha256", "path", "change_reason")  # the reason is shown on its own

INPUT_UNITS: dict[str, str] = {
    "concentration": "mol/L", "tolerance": "mol/L", "working_range": "mol/L", "strong_acid": "mol/L", "strong_base": "mol/L",
    "solubility": "mol/L", "co2_total": "mol/L", "amount": "mol/L", "stock": "mol/L",
    "temperature": "°C", "temperature_tolerance": "°C", "stated_temperature": "°C",
    "background": "mol/kg", "background_tolerance": "mol/kg", "stated_ionic_strength": "mol/kg",
    "stated": "pKa", "thermodynamic": "pKa", "at_working_temperature": "pKa", "uncertainty": "pKa",
    "enthalpy": "kJ/mol", "heat_capacity": "J/(K·mol)", "molar_mass": "g/mol", "co2_partial_pressure": "atm",
    "max_ph_error": "pH", "target_ph": "pH",
}
"""Unit of each numeric field of a method as the ledger records it (:class:`~dossier.inputs.model.Method`,
the units the loader converts to), by the field's name; a field not listed (a word, a count,
a fraction such as ``criteria.probability``) has none."""


def input_unit(path: str) -> str | None:
    """The unit of an input by its field path (``solutions[0].components[0].working_range[1]`` → mol/L).

    >>> input_unit("conditions.temperature")
    '°C'
    """
    leaf = path.rsplit(".", 1)[-1].split("[", 1)[0]
    return INPUT_UNITS.get(leaf)


def _inputs(ledger: Ledger) -> dict[str, Any]:
    """Every input of a method and the settings, by field path; the texts as written
    (``concentration_text`` …) are left out: their numbers are compared, with units."""
    flat = {k: v for k, v in _flatten(method_to_dict(ledger.method)).items()
            if k not in _NOT_INPUTS and not k.rsplit(".", 1)[-1].split("[", 1)[0].endswith("_text")}
    flat.update({f"settings.{k}": v for k, v in settings_to_dict(ledger.settings).items()})
    return flat


def diff_ledgers(old: dict[str, Ledger], new: dict[str, Ledger], old_label: str = "old", new_label: str = "new") -> DossierDiff:
    """Compare two sets of ledgers method by method."""
    methods = []
    for mid in sorted(old.keys() | new.keys()):
        a, b = old.get(mid), new.get(mid)
        if a is None or b is None:
            methods.append(MethodDiff(mid, "added" if a is None else "removed",
                                      None if a is None else a.method.revision, None if b is None else b.method.revision, (), (), ()))
            continue
        inputs = [Change(c.what, c.old, c.new, input_unit(c.what)) for c in _pairs(_inputs(a), _inputs(b))]
        units = {**{e.id: e.unit for e in a.entries}, **{e.id: e.unit for e in b.entries}}
        numbers = [Change(c.what, c.old, c.new, units.get(c.what)) for c in _pairs(a.values(), b.values())]
        verdicts = _pairs(dict(a.verdicts), dict(b.verdicts))
        status = "changed" if inputs or numbers or verdicts else "unchanged"
        methods.append(MethodDiff(mid, status, a.method.revision, b.method.revision, tuple(inputs), tuple(numbers), tuple(verdicts),
                                  b.method.change_reason, a.method.change_reason))
    return DossierDiff(old_label, new_label, tuple(methods))
