"""Build speed: a cold build of the demo dossier (HTML and PDF, 10^6 draws per
solution), a rebuild with nothing changed, and a rebuild with one method changed."""

from __future__ import annotations

import shutil
import tempfile
import time
from pathlib import Path

from dossier.app import build

from .run import Row

ROOT = Path(__file__).resolve().parents[2]


def _timed_build(methods: Path, out: Path):  # noqa: ANN202
    t0 = time.perf_counter()
    outcome = build([methods], out)
    assert outcome.ok
    return time.perf_counter() - t0, outcome


def run() -> list[Row]:
    with tempfile.TemporaryDirectory() as tmp:
        methods = Path(tmp) / "methods"
        shutil.copytree(ROOT / "methods", methods)
        out = Path(tmp) / "output"
        cold, outcome = _timed_build(methods, out)
        unchanged, again = _timed_build(methods, out)
        f = methods / "benzoate-extract.yaml"
        f.write_text(f.read_text(encoding="utf-8").replace("max_ph_error: 0.05", "max_ph_error: 0.04"), encoding="utf-8")
        one, changed = _timed_build(methods, out)
    rows = [Row(f"cold build of the demo dossier ({len(outcome.analyses)} methods, HTML + PDF)", cold, "s", "aim < 30 s")]
    rows += [Row(f"  stage: {name}", seconds, "s") for name, seconds in outcome.timings.items()]
    rows.append(Row("  files written", len(outcome.files), "files"))
    rows.append(Row(f"rebuild, nothing changed (recomputed: {len(again.recomputed)} methods)", unchanged, "s", "aim < 1 s"))
    rows.append(Row(f"rebuild, one method changed (recomputed: {', '.join(changed.recomputed)})", one, "s"))
    return rows
