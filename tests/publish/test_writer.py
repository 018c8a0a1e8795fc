"""The one writer: safe paths only, never the same path twice, a hash for each file."""

from __future__ import annotations

import hashlib
import os
from pathlib import Path

import pytest

from dossier.publish.writer import UnsafePath, Writer, WrittenTwice


@pytest.mark.parametrize("path", ["/etc/passwd", "../outside.html", "a/../../b", "a\\b.html", "", "C:/x", "con", "methods/NUL.txt", "a/./b", "tab\there"])
def test_unsafe_paths_are_refused(tmp_path: Path, path: str) -> None:
    with pytest.raises(UnsafePath):
        Writer(tmp_path).write(path, b"x")
    assert list(tmp_path.iterdir()) == []


def test_each_path_once_and_its_hash(tmp_path: Path) -> None:
    w = Writer(tmp_path)
    w.write("methods/a/index.html", "<p>é</p>")
    assert (tmp_path / "methods/a/index.html").read_bytes() == "<p>é</p>".encode()
    assert w.written["methods/a/index.html"] == hashlib.sha256("<p>é</p>".encode()).hexdigest()
    assert w.sizes["methods/a/index.html"] == len("<p>é</p>".encode())
    with pytest.raises(WrittenTwice):
        w.write("methods/a/index.html", "again")


def test_a_symlink_placed_in_the_staging_folder_is_not_followed(tmp_path: Path) -> None:
    target = tmp_path / "target.txt"
    target.write_text("keep", encoding="utf-8")
    staging = tmp_path / "staging"
    staging.mkdir()
    os.symlink(target, staging / "index.html")
    with pytest.raises(UnsafePath):
        Writer(staging).write("index.html", "overwrite")
    assert target.read_text(encoding="utf-8") == "keep"
