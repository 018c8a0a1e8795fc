"""Terminal output: tables for people (rich) and JSON for machines."""

from __future__ import annotations

import json
from dataclasses import asdict
from typing import Any

from rich.console import Console
from rich.table import Table

from ..analysis.pointwise import PointResult
from ..inputs.model import Method
from ..inputs.substances import STATUS_MEANINGS, SubstanceTable

__all__ = ["timing_lines", "point_table", "point_as_dict", "method_points_as_dict", "print_json", "substances_tables", "substances_as_dict"]


def _signed(x: float, digits: int = 4) -> str:
    return f"{x:+.{digits}f}".replace("-", "−")


def point_table(title: str, result: PointResult) -> Table:
    """A two-part table: the exact equilibrium, then each shortcut's pH and error."""
    table = Table(title=title, title_justify="left", show_edge=False, pad_edge=False)
    table.add_column("quantity")
    table.add_column("pH", justify="right")
    table.add_column("error (shortcut − exact)", justify="right")
    table.add_row("exact pH, activity scale (−log a(H⁺))", f"{result.ph:.4f}", "")
    table.add_row("exact pH, concentration scale (−log [H⁺])", f"{result.ph_conc:.4f}", "")
    for s in result.shortcuts:
        table.add_row(s.id, f"{s.ph:.4f}", _signed(s.error))
    for sid, why in result.not_applicable:
        table.add_row(sid, "—", f"does not apply: {why}")
    table.caption = (
        f"{result.temperature:g} °C · activity model {result.activity} · pKw {result.pkw:.4f} · "
        f"ionic strength {result.ionic_strength:.4g} mol/kg"
    )
    table.caption_justify = "left"
    return table


def point_as_dict(result: PointResult) -> dict[str, Any]:
    """The result as plain JSON-ready data."""
    d = asdict(result)
    d["not_applicable"] = [{"id": i, "reason": r} for i, r in result.not_applicable]
    return d


def method_points_as_dict(method: Method, results: tuple[tuple[str, PointResult], ...]) -> dict[str, Any]:
    """``dossier solve FILE --json``: the method's identity and each solution's result."""
    return {
        "method": {"id": method.id, "revision": method.revision, "source_sha256": method.source_sha256},
        "solutions": [{"id": sid, **point_as_dict(r)} for sid, r in results],
    }


def timing_lines(timings: dict[str, float]) -> list[str]:
    """``dossier build --timings``: one line per stage, names in one column, seconds right-aligned.

    The name column is as wide as the longest stage name, so the seconds line
    up whatever the stages are called.

    Examples
    --------
    >>> print("\\n".join(timing_lines({"check inputs": 0.5, "analyse methods": 12.25})))
      check inputs        0.50 s
      analyse methods    12.25 s
    """
    width = max((len(name) for name in timings), default=0)
    return [f"  {name:<{width}} {seconds:>8.2f} s" for name, seconds in timings.items()]


def print_json(data: Any, console: Console | None = None) -> None:
    """Print data as indented JSON (UTF-8, keys in order)."""
    text = json.dumps(data, indent=2, ensure_ascii=False)
    if console is None:
        print(text)
    else:
        console.print_json(text) if console.is_terminal else print(text)


def substances_tables(table: SubstanceTable) -> list[Table]:
    """The substance table for people: values, the forms with the compounds they may be weighed as, then sources."""
    values = Table(title="Substance table (pKa at 25 °C and I = 0; ΔH° in kJ/mol, ΔCp° in J/(K·mol))", title_justify="left")
    for col in ("id", "name", "charge", "step", "pKa", "ΔH°", "ΔCp°", "sources (status)"):
        values.add_column(col, justify="right" if col in ("charge", "step", "pKa", "ΔH°", "ΔCp°") else "left")
    for s in table.substances.values():
        for i, st in enumerate(s.steps, start=1):
            parts = [f"pKa {st.pka.source} ({st.pka.status})"]
            if st.enthalpy:
                parts.append(f"ΔH° {st.enthalpy.source} ({st.enthalpy.status})")
            if st.heat_capacity:
                parts.append(f"ΔCp° {st.heat_capacity.source} ({st.heat_capacity.status})")
            values.add_row(
                s.id if i == 1 else "",
                s.name if i == 1 else "",
                (f"{s.charge:+d}" if s.charge else "0") if i == 1 else "",
                str(i),
                f"{st.pka.value:g}",
                f"{st.enthalpy.value:g}" if st.enthalpy else "—",
                f"{st.heat_capacity.value:g}" if st.heat_capacity else "—",
                "; ".join(parts),
            )
    forms = Table(title="Forms as added, and the compounds each may be weighed as (weighed_as: name or formula; g/mol)", title_justify="left")
    for col in ("id", "protons removed", "compound", "formula", "g/mol"):
        forms.add_column(col, justify="right" if col in ("protons removed", "g/mol") else "left")
    for s in table.substances.values():
        for i, f in enumerate(s.forms):
            for j, c in enumerate(f.weighable):
                forms.add_row(s.id if i == j == 0 else "", str(f.removed) if j == 0 else "", c.compound, c.formula, f"{c.molar_mass:.3f}")
    sources = Table(title="Sources", title_justify="left")
    for col in ("key", "kind", "citation", "checked"):
        sources.add_column(col)
    for src in table.sources.values():
        sources.add_row(src.key, src.kind, src.citation + (f" doi:{src.doi}" if src.doi else ""), src.checked)
    values.caption = "status: " + "; ".join(f"{k} ({v})" for k, v in STATUS_MEANINGS.items())
    values.caption_justify = "left"
    return [values, forms, sources]


def substances_as_dict(table: SubstanceTable) -> dict[str, Any]:
    """The substance table as JSON-ready data."""
    return {
        "format": "ph-dossier-substances/1",
        "sha256": table.sha256,
        "sources": {k: asdict(v) for k, v in table.sources.items()},
        "substances": [asdict(s) for s in table.substances.values()],
    }
