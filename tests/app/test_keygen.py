"""``dossier keygen`` refuses a folder that does not exist instead of making it."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path


def keygen(path: Path, cwd: Path) -> subprocess.CompletedProcess[str]:
    return subprocess.run([sys.executable, "-m", "dossier", "keygen", str(path), "--name", "A. Analyst"], cwd=cwd,
                          capture_output=True, text=True, timeout=120)


def test_keygen_refuses_a_missing_folder_and_names_it(tmp_path: Path) -> None:
    missing = tmp_path / "keys" / "personal"
    r = keygen(missing / "me.key", tmp_path)
    assert r.returncode == 1 and "Traceback" not in r.stderr
    assert r.stderr.strip().startswith(f"dossier keygen: {missing}: no such folder; keygen does not create folders")
    assert not (tmp_path / "keys").exists()


def test_keygen_refuses_a_file_in_place_of_the_folder(tmp_path: Path) -> None:
    (tmp_path / "keys").write_text("not a folder", encoding="utf-8")
    r = keygen(tmp_path / "keys" / "me.key", tmp_path)
    assert (r.returncode, r.stderr.strip()) == (1, f"dossier keygen: {tmp_path / 'keys'} is not a folder")


def test_keygen_writes_into_a_folder_that_exists(tmp_path: Path) -> None:
    (tmp_path / "keys").mkdir()
    r = keygen(Path("keys") / "me.key", tmp_path)
    assert r.returncode == 0, r.stderr
    assert (tmp_path / "keys" / "me.key").stat().st_mode & 0o777 == 0o600
