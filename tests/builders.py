"""A small builder for method files in tests: write the parts a test is
about, take sensible defaults for the rest, and get a checked
:class:`~dossier.inputs.model.Method` (or the YAML text, or a file on disk).

Examples
--------
>>> m = (MethodBuilder(limit=0.05)
...      .solution(component("acetic-acid", pka=[pka(uncertainty=0.01)]), shortcuts=["weak-acid-square-root"])
...      .build())
>>> m.solutions[0].components[0].pka[0].thermodynamic
4.756
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any

import yaml

from dossier.inputs.loader import MethodLoad, load_method_bytes
from dossier.inputs.model import Method

__all__ = ["MethodBuilder", "component", "pka", "INVENTED_REFERENCE"]

INVENTED_REFERENCE = {"r": {"citation": "Invented test value", "kind": "estimate"}}
"""A reference for invented pKa values (key ``r``)."""


def pka(value: float | None = None, *, uncertainty: float = 0.01, reference: str | None = None, **more: Any) -> dict[str, Any]:
    """One ``pka`` entry; a stated ``value`` cites reference ``r`` unless told otherwise."""
    out: dict[str, Any] = {"uncertainty": uncertainty}
    if value is not None:
        out["value"] = value
        out["reference"] = reference or "r"
    elif reference is not None:
        out["reference"] = reference
    out.update(more)
    return out


def component(substance: str, *, form: str | int = "acid", concentration: str = "10 mmol/L",
              working_range: tuple[str, str] = ("1 mmol/L", "100 mmol/L"), pka: list[dict[str, Any]] | None = None,
              tolerance: str | None = None, **more: Any) -> dict[str, Any]:
    """One component; ``pka`` defaults to table values with u = 0.01 (one step)."""
    out: dict[str, Any] = {"substance": substance, "form": form, "concentration": concentration,
                           "working_range": list(working_range), "pka": pka if pka is not None else [{"uncertainty": 0.01}]}
    if tolerance is not None:
        out["tolerance"] = tolerance
    out.update(more)
    return out


@dataclass(frozen=True)
class MethodBuilder:
    """A method file under construction (immutable: each call returns a new builder)."""

    id: str = "t"
    title: str = "T"
    revision: str = "1"
    change_reason: str | None = None
    purpose: str = "P"
    limit: float = 0.02
    probability: float | None = None
    temperature: float = 25.0
    temperature_tolerance: float = 0.0
    activity_model: str = "ideal"
    background: float | None = None
    background_tolerance: float | None = None
    co2: Any = None  # conditions.co2 as written: "none", "air", {"partial_pressure": ...}, {"dissolved": ...}
    solutions: tuple[dict[str, Any], ...] = ()
    references: dict[str, dict[str, Any]] = field(default_factory=dict)

    def solution(self, *components: dict[str, Any], id: str | None = None, shortcuts: list[str] | tuple[str, ...] = (),  # noqa: A002
                 strong_acid: str | dict[str, Any] | None = None, strong_base: str | dict[str, Any] | None = None) -> MethodBuilder:
        """Add a solution (id ``s``, ``s2``, ... unless given); a strong acid or base alone is a mapping
        ``{concentration, tolerance, working_range, name}``."""
        sol: dict[str, Any] = {"id": id or ("s" if not self.solutions else f"s{len(self.solutions) + 1}"),
                               "components": list(components), "shortcuts": list(shortcuts)}
        if strong_acid:
            sol["strong_acid"] = strong_acid
        if strong_base:
            sol["strong_base"] = strong_base
        return replace(self, solutions=(*self.solutions, sol))

    def reference(self, key: str = "r", citation: str = "Invented test value", kind: str = "estimate") -> MethodBuilder:
        """Add a reference under ``references:``."""
        return replace(self, references={**self.references, key: {"citation": citation, "kind": kind}})

    def document(self) -> dict[str, Any]:
        """The method file as data."""
        conditions: dict[str, Any] = {"temperature": self.temperature, "temperature_tolerance": self.temperature_tolerance,
                                      "activity_model": self.activity_model}
        if self.background is not None:
            conditions["background_ionic_strength"] = self.background
        if self.background_tolerance is not None:
            conditions["background_ionic_strength_tolerance"] = self.background_tolerance
        if self.co2 is not None:
            conditions["co2"] = self.co2
        acceptance: dict[str, Any] = {"max_ph_error": self.limit}
        if self.probability is not None:
            acceptance["probability"] = self.probability
        method: dict[str, Any] = {"id": self.id, "title": self.title, "revision": self.revision, "purpose": self.purpose}
        if self.change_reason is not None:
            method["change_reason"] = self.change_reason
        doc: dict[str, Any] = {
            "format": "ph-dossier-method/1",
            "method": method,
            "acceptance": acceptance,
            "conditions": conditions,
            "solutions": list(self.solutions),
        }
        cited = any("reference" in p for s in self.solutions for c in s["components"] for p in c["pka"])
        refs = self.references or (INVENTED_REFERENCE if cited else {})
        if refs:
            doc["references"] = refs
        return doc

    def yaml(self) -> str:
        """The method file's text."""
        return yaml.safe_dump(self.document(), sort_keys=False, allow_unicode=True)

    def load(self, name: str = "t.yaml") -> MethodLoad:
        """Load and check the text as the loader would a file called ``name``."""
        return load_method_bytes(self.yaml().encode(), name)

    def build(self, name: str = "t.yaml") -> Method:
        """The checked method; fails the test when the file has an error."""
        result = self.load(name)
        errors = [str(p) for p in result.problems if p.severity.value == "error"]
        assert not errors, errors
        assert result.method is not None
        return result.method

    def write(self, folder: Path, name: str | None = None) -> Path:
        """Write the file into ``folder`` (as ``<id>.yaml``) and return its path."""
        path = Path(folder) / (name or f"{self.id}.yaml")
        path.write_text(self.yaml(), encoding="utf-8")
        return path
