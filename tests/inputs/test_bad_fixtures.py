"""Bad-input fixtures: one file per failure, named after it, each ending with
the exact messages expected (``# expect:`` lines; ``{file}`` is its path)."""

from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from dossier.inputs.loader import load_paths
from dossier.problems import Severity, format_problems

ROOT = Path(__file__).resolve().parents[2]
BAD = Path(__file__).parent / "bad"
FIXTURES = sorted(BAD.glob("*.yaml"))


def expected(path: Path, display: str) -> list[str]:
    lines = path.read_text(encoding="utf-8").splitlines()
    return [line[len("# expect: "):].replace("{file}", display) for line in lines if line.startswith("# expect: ")]


def test_there_is_a_fixture_per_failure() -> None:
    assert len(FIXTURES) >= 30
    for f in FIXTURES:
        assert expected(f, "x"), f"{f.name} has no '# expect:' line"


@pytest.mark.parametrize("fixture", FIXTURES, ids=lambda p: p.stem)
def test_fixture_gives_exactly_the_expected_messages(fixture: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(ROOT)
    display = str(fixture.relative_to(ROOT))
    inputs = load_paths([display])
    assert format_problems(list(inputs.problems)).splitlines() == expected(fixture, display)
    has_error = any(p.severity is Severity.ERROR for p in inputs.problems)
    assert (len(inputs.methods) == 0) == has_error


def run(*args: str, cwd: Path = ROOT) -> subprocess.CompletedProcess[str]:
    return subprocess.run([sys.executable, "-m", "dossier", *args], capture_output=True, text=True, cwd=cwd, timeout=120)


def test_check_exit_codes() -> None:
    bad = run("check", "tests/inputs/bad/unknown-substance.yaml")
    assert bad.returncode == 1
    assert bad.stdout.splitlines()[-1] == "1 method file checked: 1 error(s), 0 warning(s)"
    assert "Traceback" not in bad.stdout + bad.stderr
    warn = run("check", "tests/inputs/bad/unknown-key.yaml")
    assert warn.returncode == 0
    # the unknown key, and the table's acetic acid pKa (unverified: a data-quality warning)
    assert warn.stdout.splitlines()[-1] == "1 method file checked: no errors, 2 warning(s)"
    strict = run("check", "--strict", "tests/inputs/bad/unknown-key.yaml")
    assert strict.returncode == 1
    assert strict.stdout.splitlines()[0] == (
        "tests/inputs/bad/unknown-key.yaml:10:3: conditions.temprature: unknown key 'temprature' (ignored); did you mean 'temperature'?"
    )
    assert run("check", "--frobnicate").returncode == 2


def test_all_problems_of_all_files_are_reported_at_once() -> None:
    r = run("check", "tests/inputs/bad")
    assert r.returncode == 1
    lines = r.stdout.splitlines()
    for f in FIXTURES:
        for line in expected(f, str(f.relative_to(ROOT))):
            assert line in lines


def test_duplicate_method_ids_across_a_dossier(tmp_path: Path) -> None:
    for name in ("one.yaml", "two.yaml"):
        shutil.copy(ROOT / "methods" / "benzoate-extract.yaml", tmp_path / name)
    r = run("check", ".", cwd=tmp_path)
    assert r.returncode == 1
    assert (
        "two.yaml:6:7: method.id: method id 'benzoate-extract' is also used by one.yaml; ids must be unique in a dossier"
    ) in r.stdout.splitlines()


def test_method_ids_that_differ_only_in_case(tmp_path: Path) -> None:
    """QC-M-0042 and qc-m-0042 would share one report folder on a case-insensitive file system."""
    text = (ROOT / "methods" / "benzoate-extract.yaml").read_text(encoding="utf-8")
    (tmp_path / "a.yaml").write_text(text.replace("id: benzoate-extract", "id: QC-M-0042", 1), encoding="utf-8")
    (tmp_path / "b.yaml").write_text(text.replace("id: benzoate-extract", "id: qc-m-0042", 1), encoding="utf-8")
    r = run("check", ".", cwd=tmp_path)
    assert r.returncode == 1
    assert (
        "b.yaml:6:7: method.id: method id 'qc-m-0042' differs only in case from 'QC-M-0042' in a.yaml; "
        "a case-insensitive file system would give both reports one folder: ids must differ by more than case"
    ) in r.stdout.splitlines()
    (tmp_path / "b.yaml").unlink()
    assert run("check", ".", cwd=tmp_path).returncode == 0  # upper case alone is fine


def test_missing_path_is_an_error(tmp_path: Path) -> None:
    r = run("check", "no-such.yaml", cwd=tmp_path)
    assert r.returncode == 1
    assert r.stdout.splitlines()[0] == "no-such.yaml:0:0: no such file or folder"
