"""Terminal output: tables for people (rich) and JSON for machines."""

from __future__ import annotations

import json
from dataclasses import asdict
from typing import Any

from rich.console import Console
from rich.table import Table

from ..analysis.pointwise import PointResult

__all__ = ["point_table", "point_as_dict", "print_json"]


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


def print_json(data: Any, console: Console | None = None) -> None:
    """Print data as indented JSON (UTF-8, keys in order)."""
    text = json.dumps(data, indent=2, ensure_ascii=False)
    if console is None:
        print(text)
    else:
        console.print_json(text) if console.is_terminal else print(text)
