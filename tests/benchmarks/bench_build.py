"""Build speed: a cold build of the demo dossier (HTML and PDF, 10^6 draws per solution)."""

from __future__ import annotations

import tempfile
import time
from pathlib import Path

from dossier.pipeline import build

from .run import Row

ROOT = Path(__file__).resolve().parents[2]


def run() -> list[Row]:
    with tempfile.TemporaryDirectory() as tmp:
        t0 = time.perf_counter()
        outcome = build([ROOT / "methods"], Path(tmp) / "output")
        total = time.perf_counter() - t0
    assert outcome.ok
    rows = [Row(f"cold build of the demo dossier ({len(outcome.analyses)} methods, HTML + PDF)", total, "s", "aim < 30 s")]
    rows += [Row(f"  stage: {name}", seconds, "s") for name, seconds in outcome.timings.items()]
    rows.append(Row("  files written", len(outcome.files), "files"))
    return rows
