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


def test_changed_inputs_carry_their_unit_and_difference_and_not_the_text_as_written() -> None:
    """The changes page shows inputs with units, old → new and new − old (issue 15); the
    written text ("20 mmol/L") is not listed beside its number."""
    other = MethodBuilder(temperature=30.0).solution(component("acetic-acid", concentration="20 mmol/L"), shortcuts=["weak-acid-square-root"]).build()
    (d,) = diff_ledgers({"t": LEDGER}, {"t": replace(LEDGER, method=other)}).methods
    inputs = {c.what: c for c in d.inputs}
    conc = inputs["solutions[0].components[0].concentration"]
    assert (conc.old, conc.new, conc.unit) == (pytest.approx(0.010), pytest.approx(0.020), "mol/L")
    assert conc.difference == pytest.approx(0.010)
    temp = inputs["conditions.temperature"]
    assert (temp.unit, temp.difference) == ("°C", pytest.approx(5.0))
    assert not any(w.endswith("_text") or "_text[" in w for w in inputs)
    assert all(c.unit for c in d.inputs if c.numeric), [c for c in d.inputs if c.numeric and not c.unit]


def test_a_number_as_shown_is_compared_at_the_precision_shown() -> None:
    """dossier.audit.numbers reads numbers as the pages write them (dossier.display)."""
    from dossier.audit.numbers import shown_matches
    from dossier.display import fixed, significant

    assert shown_matches(fixed(3.27649, 4), 3.27649) and shown_matches("3.2765", 3.27649)
    assert shown_matches("3.2768", 3.27649) is False
    assert shown_matches("99.9 %", 0.9994) and shown_matches("5 mmol/L", 0.005)
    assert shown_matches(significant(1.25e-7, 3) + " mol/L", 1.25e-7)
    tiny = 1.3886358928893486e-131  # a conformity probability of the demo, shown as "10⁻¹²⁹ %" (one significant digit)
    assert shown_matches(significant(tiny * 100, 1) + " %", tiny)
    assert shown_matches(significant(tiny * 100, 1) + " %", 3 * tiny) is False
    assert shown_matches("< 0.1 %", 0.0004) is None  # not one number: not compared
