"""Comparing ledgers (dossier.analysis.changes) and reading them from disk (dossier.audit.diff)."""

from __future__ import annotations

import json
from dataclasses import replace
from pathlib import Path

import pytest

from dossier.analysis.changes import diff_ledgers
from dossier.analysis.ledger import Entry, Ledger
from dossier.analysis.method import AnalysisSettings
from dossier.audit.diff import NotADossier, diff_dossiers, read_ledgers
from tests.builders import MethodBuilder, component

METHOD = MethodBuilder().solution(component("acetic-acid"), shortcuts=["weak-acid-square-root"]).build()
LEDGER = Ledger(METHOD, AnalysisSettings(draws=1000), (("s/weak-acid-square-root", "pass"),),
                (Entry("s/exact/ph", 3.39, "pH", "exact pH", "exact-equilibrium", "s"),))


def test_equal_ledgers_are_unchanged_and_each_kind_of_change_is_listed() -> None:
    assert diff_ledgers({"t": LEDGER}, {"t": LEDGER}).changed == ()
    moved = replace(LEDGER, verdicts=(("s/weak-acid-square-root", "fail"),), entries=(replace(LEDGER.entries[0], value=3.40),))
    (d,) = diff_ledgers({"t": LEDGER}, {"t": moved}).methods
    assert d.status == "changed"
    assert [(c.what, c.old, c.new) for c in d.numbers] == [("s/exact/ph", 3.39, 3.40)]
    assert [(c.what, c.old, c.new) for c in d.verdicts] == [("s/weak-acid-square-root", "pass", "fail")]
    within = replace(LEDGER, entries=(replace(LEDGER.entries[0], value=3.39 * (1 + 1e-12)),))
    assert diff_ledgers({"t": LEDGER}, {"t": within}).changed == ()  # below the relative tolerance


def test_added_and_removed_methods() -> None:
    d = diff_ledgers({"t": LEDGER}, {"u": replace(LEDGER, method=replace(METHOD, id="u"))})
    assert [(m.id, m.status) for m in d.methods] == [("t", "removed"), ("u", "added")]


def test_a_ledger_round_trips_and_a_folder_that_is_no_dossier_says_so(tmp_path: Path) -> None:
    assert Ledger.from_document(json.loads(json.dumps(LEDGER.to_document()))) == LEDGER
    with pytest.raises(NotADossier, match="no manifest.json"):
        read_ledgers(tmp_path)
    with pytest.raises(NotADossier):
        diff_dossiers(tmp_path, tmp_path)
