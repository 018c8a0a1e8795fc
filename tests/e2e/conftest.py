"""The demo dossier, built once per test session by the real command line."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
DRAWS = "20000"  # the structure of the dossier does not depend on the number of draws; time does


@pytest.fixture(scope="session")
def built(tmp_path_factory: pytest.TempPathFactory) -> Path:
    out = tmp_path_factory.mktemp("dossier") / "output"
    r = subprocess.run(
        [sys.executable, "-m", "dossier", "build", "methods", "-o", str(out), "--draws", DRAWS, "--timings"],
        cwd=ROOT, capture_output=True, text=True, timeout=900,
    )
    assert r.returncode == 0, r.stderr + r.stdout
    return out


def method_ids() -> list[str]:
    import yaml

    return sorted(yaml.safe_load(p.read_text(encoding="utf-8"))["method"]["id"] for p in (ROOT / "methods").glob("*.yaml"))


def statuses(built: Path) -> set[str]:
    """The verdict statuses (results.json values) of every claimed shortcut of the built demo."""
    import json

    return {a["verdict"] for mid in method_ids() for sol in json.loads((built / "methods" / mid / "results.json").read_text(encoding="utf-8"))["solutions"]
            for a in sol["approximations"]}
