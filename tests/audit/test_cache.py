"""The content-hash cache: a hit returns what was stored, anything else is a miss."""

from __future__ import annotations

import os
import pickle
from pathlib import Path

import pytest

from dossier.audit.cache import Cache, dossier_key, method_key, verify_cache_root


def test_a_stored_entry_comes_back_and_a_wrong_type_or_damage_is_a_miss(tmp_path: Path) -> None:
    store = Cache(tmp_path / "c")
    store.put("methods", "k1", {"a": 1})
    assert store.get("methods", "k1", dict) == {"a": 1}
    assert store.get("methods", "k1", list) is None  # another type than expected
    assert store.get("methods", "absent", dict) is None
    (tmp_path / "c" / "methods" / "k2.pickle").write_bytes(b"not a pickle")
    assert store.get("methods", "k2", dict) is None


def test_prune_keeps_only_what_this_build_used(tmp_path: Path) -> None:
    old = Cache(tmp_path / "c")
    old.put("methods", "old", 1)
    new = Cache(tmp_path / "c")
    new.put("methods", "new", 2)
    new.prune()
    assert sorted(p.name for p in (tmp_path / "c").rglob("*.pickle")) == ["new.pickle"]
    assert pickle.loads((tmp_path / "c" / "methods" / "new.pickle").read_bytes()) == 2


def test_trim_removes_the_least_recently_used_entries_beyond_the_limit(tmp_path: Path) -> None:
    store = Cache(tmp_path / "c")
    for i, name in enumerate(("a", "b", "c")):
        store.put("recomputed", name, b"x" * 1000)
        os.utime(tmp_path / "c" / "recomputed" / f"{name}.pickle", (1000 + i, 1000 + i))  # a oldest, c newest
    assert store.get("recomputed", "a", bytes) == b"x" * 1000  # using an entry makes it the most recent
    size = (tmp_path / "c" / "recomputed" / "a.pickle").stat().st_size
    store.trim(2 * size)
    assert sorted(p.stem for p in (tmp_path / "c").rglob("*.pickle")) == ["a", "c"]
    store.trim(0)
    assert list((tmp_path / "c").rglob("*.pickle")) == []
    Cache(tmp_path / "absent").trim(0)  # no folder: nothing to do


def test_the_verify_cache_lives_in_the_users_cache_folder(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path))
    assert verify_cache_root() == tmp_path / "ph-dossier" / "verify"
    monkeypatch.setenv("XDG_CACHE_HOME", "relative/path")  # not absolute: ignored, as the XDG convention says
    monkeypatch.setenv("HOME", str(tmp_path / "home"))
    assert verify_cache_root() == tmp_path / "home" / ".cache" / "ph-dossier" / "verify"
    monkeypatch.delenv("XDG_CACHE_HOME")
    assert verify_cache_root() == tmp_path / "home" / ".cache" / "ph-dossier" / "verify"


def test_keys_change_with_every_input() -> None:
    base = method_key("a" * 64, "t" * 64, {"draws": 1000}, True)
    assert base == method_key("a" * 64, "t" * 64, {"draws": 1000}, True)
    others = {method_key("b" * 64, "t" * 64, {"draws": 1000}, True), method_key("a" * 64, "u" * 64, {"draws": 1000}, True),
              method_key("a" * 64, "t" * 64, {"draws": 2000}, True), method_key("a" * 64, "t" * 64, {"draws": 1000}, False)}
    assert base not in others and len(others) == 4
    assert dossier_key([base], {"pdf": True}) != dossier_key([base], {"pdf": False})
