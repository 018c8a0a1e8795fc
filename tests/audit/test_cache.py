"""The content-hash cache: a hit returns what was stored, anything else is a miss."""

from __future__ import annotations

import pickle
from pathlib import Path

from dossier.audit.cache import Cache, dossier_key, method_key


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


def test_keys_change_with_every_input() -> None:
    base = method_key("a" * 64, "t" * 64, {"draws": 1000}, True)
    assert base == method_key("a" * 64, "t" * 64, {"draws": 1000}, True)
    others = {method_key("b" * 64, "t" * 64, {"draws": 1000}, True), method_key("a" * 64, "u" * 64, {"draws": 1000}, True),
              method_key("a" * 64, "t" * 64, {"draws": 2000}, True), method_key("a" * 64, "t" * 64, {"draws": 1000}, False)}
    assert base not in others and len(others) == 4
    assert dossier_key([base], {"pdf": True}) != dossier_key([base], {"pdf": False})
