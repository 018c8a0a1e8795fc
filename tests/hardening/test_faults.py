"""Faults: a file where the folder should be, a folder that is not a dossier,
a read-only output, a full disk, an interrupted build, two builds at once —
each a clear error, the previous dossier intact, no staging folder left."""

from __future__ import annotations

import errno
import hashlib
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from dossier import cli
from dossier.publish import staging as staging_module
from dossier.publish import writer as writer_module

ROOT = Path(__file__).resolve().parents[2]


def tree(folder: Path) -> dict[str, str]:
    return {p.relative_to(folder).as_posix(): hashlib.sha256(p.read_bytes()).hexdigest() for p in sorted(folder.rglob("*")) if p.is_file()}


def leftovers(parent: Path) -> list[str]:
    return [p.name for p in parent.iterdir() if ".staging-" in p.name or ".old-" in p.name]


@pytest.fixture()
def project(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    (tmp_path / "methods").mkdir()
    for name in ("benzoate-extract.yaml", "ammonia-reagent.yaml"):
        shutil.copy(ROOT / "methods" / name, tmp_path / "methods" / name)
    monkeypatch.chdir(tmp_path)
    return tmp_path


def build_args(*extra: str) -> list[str]:
    return ["build", "methods", "-o", "output", "--draws", "1000", "--no-pdf", "--quiet", "--workers", "1", *extra]


def test_a_file_where_the_folder_should_be(project: Path, capsys: pytest.CaptureFixture[str]) -> None:
    (project / "output").write_text("not a folder", encoding="utf-8")
    assert cli.main(build_args()) == 1
    assert "dossier build: output exists and is not a folder; remove it or choose another output; the previous dossier is unchanged" in capsys.readouterr().err
    assert (project / "output").read_text(encoding="utf-8") == "not a folder"


def test_a_folder_that_is_not_a_dossier_is_not_replaced(project: Path, capsys: pytest.CaptureFixture[str]) -> None:
    (project / "output").mkdir()
    (project / "output" / "thesis.docx").write_text("years of work", encoding="utf-8")
    assert cli.main(build_args()) == 1
    assert "is not empty and is not a dossier built by ph-dossier (no manifest.json)" in capsys.readouterr().err
    assert (project / "output" / "thesis.docx").read_text(encoding="utf-8") == "years of work"


def test_a_read_only_output(project: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]) -> None:
    assert cli.main(build_args()) == 0
    before = tree(project / "output")

    def refuse(*args, **kwargs):  # noqa: ANN002, ANN003, ANN202
        raise OSError(errno.EROFS, "Read-only file system")

    monkeypatch.setattr(staging_module, "_exchange", refuse)
    monkeypatch.setattr(staging_module.os, "rename", refuse)
    assert cli.main(build_args("--no-cache")) == 1
    err = capsys.readouterr().err
    assert "dossier build: cannot replace" in err and "Read-only file system; the previous dossier is unchanged" in err
    assert tree(project / "output") == before
    assert leftovers(project) == []


def test_a_full_disk_in_the_middle_of_writing(project: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str]) -> None:
    assert cli.main(build_args()) == 0
    before = tree(project / "output")
    real = writer_module.Writer.write
    count = {"n": 0}

    def fill_up(self, rel, data):  # noqa: ANN001, ANN202
        count["n"] += 1
        if count["n"] == 25:
            raise OSError(errno.ENOSPC, "No space left on device", str(self.path_of(rel)))
        return real(self, rel, data)

    monkeypatch.setattr(writer_module.Writer, "write", fill_up)
    assert cli.main(build_args("--no-cache")) == 1
    err = capsys.readouterr().err
    assert "cannot write the dossier into output: No space left on device" in err
    assert err.rstrip().endswith("the previous dossier is unchanged")
    assert "Traceback" not in err
    assert tree(project / "output") == before
    assert leftovers(project) == []


def test_a_killed_build_leaves_its_staging_folder_to_the_next_build(project: Path) -> None:
    assert cli.main(build_args()) == 0
    (project / ".output.staging-abandoned").mkdir()
    (project / ".output.staging-abandoned" / "half.html").write_text("<p>half", encoding="utf-8")
    assert cli.main(build_args()) == 0
    assert leftovers(project) == []


def start(project: Path, *extra: str) -> subprocess.Popen[str]:
    return subprocess.Popen([sys.executable, "-m", "dossier", "build", "methods", "-o", "output", "--draws", "1000000", *extra],
                            cwd=project, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)


def wait_for(proc: subprocess.Popen[str], text: str, timeout: float = 120.0) -> None:
    t0 = time.time()
    while time.time() - t0 < timeout:
        line = proc.stderr.readline()
        if text in line:
            return
        if not line and proc.poll() is not None:
            break
    raise AssertionError(f"never saw {text!r}")


@pytest.mark.parametrize("sig", [signal.SIGTERM, signal.SIGINT], ids=["SIGTERM", "SIGINT"])
def test_an_interrupted_build_leaves_the_previous_dossier(project: Path, sig: signal.Signals) -> None:
    assert cli.main(build_args()) == 0
    before = tree(project / "output")
    proc = start(project, "--no-cache")
    wait_for(proc, "method files checked")
    time.sleep(1.0)
    proc.send_signal(sig)
    _, err = proc.communicate(timeout=300)
    assert proc.returncode == 130, err
    assert "dossier build: interrupted; the previous dossier is unchanged" in err
    assert "Traceback" not in err
    assert tree(project / "output") == before
    assert leftovers(project) == []


def test_two_builds_at_once_one_refuses_and_the_result_is_whole(project: Path) -> None:
    first = start(project, "--no-pdf", "--no-cache")
    wait_for(first, "method files checked")
    second = subprocess.run([sys.executable, "-m", "dossier", "build", "methods", "-o", "output", "--draws", "1000", "--no-pdf"],
                            cwd=project, capture_output=True, text=True, timeout=300)
    assert second.returncode == 1
    assert "another build is writing output (pid" in second.stderr and "try again when it has finished" in second.stderr
    _, err = first.communicate(timeout=600)
    assert first.returncode == 0, err
    from dossier.audit.verify import verify

    assert verify(project / "output").ok
