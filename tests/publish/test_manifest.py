"""The typed manifest: a document round-trips, a wrong or damaged one is refused with a reason."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from dossier.publish.manifest import MANIFEST_FORMAT, InputRecord, Manifest, ManifestError, MethodRecord, new_manifest


def _manifest() -> Manifest:
    return new_manifest(
        build_time="2026-01-01 00:00 UTC",
        python="3.11.7",
        settings={"monte_carlo": {"draws": 1000, "seed": 7}},
        inputs=(InputRecord("methods/a.yaml", "a" * 64, 120, "method"),),
        methods=(MethodRecord("a", "2", "methods/a.yaml", "a" * 64, "k" * 64),),
        outputs={"b.txt": ("b" * 64, 3), "a.txt": ("c" * 64, 5)},
    )


def test_a_manifest_round_trips_through_its_bytes(tmp_path: Path) -> None:
    m = _manifest()
    (tmp_path / "manifest.json").write_bytes(m.to_bytes())
    again = Manifest.read(tmp_path)
    assert again == m
    assert [o.path for o in again.outputs] == ["a.txt", "b.txt"]  # sorted by path
    assert json.loads(m.to_bytes())["format"] == MANIFEST_FORMAT


def test_a_folder_without_a_manifest_is_not_a_dossier(tmp_path: Path) -> None:
    with pytest.raises(ManifestError, match=r"is not a built dossier \(no manifest.json\)"):
        Manifest.read(tmp_path)


def test_another_format_and_a_damaged_manifest_are_refused_with_the_reason(tmp_path: Path) -> None:
    doc = _manifest().to_document()
    with pytest.raises(ManifestError, match="expected format 'ph-dossier-manifest/1'; got 'other/1'"):
        Manifest.from_document({**doc, "format": "other/1"})
    del doc["outputs"]
    with pytest.raises(ManifestError, match="incomplete or malformed: KeyError"):
        Manifest.from_document(doc)
    (tmp_path / "manifest.json").write_text("{not json", encoding="utf-8")
    with pytest.raises(ManifestError, match="cannot read"):
        Manifest.read(tmp_path)
