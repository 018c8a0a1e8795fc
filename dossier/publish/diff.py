"""``dossier diff``: what changed between two built dossiers — per method, the
inputs, the numbers and the verdicts. Regulatory change control reads this.

Both sides are read from their ``manifest.json`` and ``methods/*/ledger.json``
(or, for a build in progress, from the same documents in memory).
"""

from __future__ import annotations

import json
import math
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from .manifest import MANIFEST_NAME

__all__ = ["Change", "MethodDiff", "DossierDiff", "read_ledgers", "diff_ledgers", "diff_dossiers"]

REL_TOL = 1e-9


@dataclass(frozen=True)
class Change:
    """One changed item: what (a field path or a ledger id), before, after."""

    what: str
    old: Any
    new: Any


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


@dataclass(frozen=True)
class DossierDiff:
    """Every method of either dossier, in id order."""

    old_label: str
    new_label: str
    methods: tuple[MethodDiff, ...]

    @property
    def changed(self) -> tuple[MethodDiff, ...]:
        return tuple(m for m in self.methods if m.status != "unchanged")


def read_ledgers(folder: Path) -> dict[str, dict[str, Any]]:
    """{method id: ledger document} of a built dossier.

    Raises
    ------
    OSError, ValueError
        When the folder is not a built dossier.
    """
    manifest = json.loads((folder / MANIFEST_NAME).read_text(encoding="utf-8"))
    return {m["id"]: json.loads((folder / "methods" / m["id"] / "ledger.json").read_text(encoding="utf-8")) for m in manifest["methods"]}


def _flatten(value: Any, prefix: str = "") -> dict[str, Any]:
    out: dict[str, Any] = {}
    if isinstance(value, dict):
        for k, v in value.items():
            out.update(_flatten(v, f"{prefix}.{k}" if prefix else str(k)))
    elif isinstance(value, list):
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


_NOT_INPUTS = ("source_sha256", "path")


def diff_ledgers(old: dict[str, dict[str, Any]], new: dict[str, dict[str, Any]], old_label: str = "old", new_label: str = "new") -> DossierDiff:
    """Compare two sets of ledgers method by method."""
    methods = []
    for mid in sorted(old.keys() | new.keys()):
        a, b = old.get(mid), new.get(mid)
        if a is None or b is None:
            methods.append(MethodDiff(mid, "added" if a is None else "removed",
                                      None if a is None else a["method"]["revision"], None if b is None else b["method"]["revision"], (), (), ()))
            continue
        ia = {k: v for k, v in _flatten(a["method"]).items() if k not in _NOT_INPUTS}
        ib = {k: v for k, v in _flatten(b["method"]).items() if k not in _NOT_INPUTS}
        inputs = _pairs(ia, ib)
        inputs += _pairs({f"settings.{k}": v for k, v in a["settings"].items()}, {f"settings.{k}": v for k, v in b["settings"].items()})
        numbers = _pairs({e["id"]: e["value"] for e in a["entries"]}, {e["id"]: e["value"] for e in b["entries"]})
        verdicts = _pairs(a["verdicts"], b["verdicts"])
        status = "changed" if inputs or numbers or verdicts else "unchanged"
        methods.append(MethodDiff(mid, status, a["method"]["revision"], b["method"]["revision"], tuple(inputs), tuple(numbers), tuple(verdicts)))
    return DossierDiff(old_label, new_label, tuple(methods))


def diff_dossiers(old: Path, new: Path) -> DossierDiff:
    """Compare two built dossiers on disk."""
    return diff_ledgers(read_ledgers(old), read_ledgers(new), str(old), str(new))
