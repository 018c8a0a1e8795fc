"""Verdicts, drafted text, results.json and CSV tables, figures."""

from __future__ import annotations

import csv
import io
import json
import xml.etree.ElementTree as ET
from functools import lru_cache
from pathlib import Path

import pytest

from dossier import display
from dossier.analysis.method import AnalysisSettings, analyse_method
from dossier.render.results import csv_tables, results_document
from dossier.inputs.loader import load_method
from dossier.inputs.substances import load_table
from dossier.render.figures import method_figures

from tests.builders import MethodBuilder

from .helpers import tris_buffer

ROOT = Path(__file__).resolve().parents[2]
FAST = AnalysisSettings(draws=20_000, map_pka=31, map_conc=41)


@lru_cache(maxsize=None)
def demo(name: str):  # noqa: ANN201
    return analyse_method(load_method(ROOT / "methods" / f"{name}.yaml").method, FAST)


def verdicts(a) -> dict[str, str]:  # noqa: ANN001
    return {s.id: s.verdict.status for sa in a.solutions for s in sa.shortcuts}


@pytest.mark.parametrize(
    ("name", "expected"),
    [
        ("benzoate-extract", {"weak-acid-square-root": "pass"}),
        # open to air (co2: air): carbonic acid, not boric acid, sets the pH of the rinse
        ("boric-rinse", {"weak-acid-square-root": "fail", "weak-acid-water-corrected": "fail"}),
        ("acetate-salt-diluent", {"conjugate-base-square-root": "fail"}),
        ("ammonia-reagent", {"weak-base-square-root": "fail"}),
        ("formic-mobile-phase", {"weak-acid-square-root": "conditional", "weak-acid-quadratic": "pass"}),
        ("tris-buffer-37c", {"henderson-hasselbalch": "fail", "constants-at-25c": "fail"}),
        ("saline-phosphate-buffer", {"henderson-hasselbalch": "fail", "ideal-activity": "fail"}),
    ],
)
def test_demo_verdicts(name: str, expected: dict[str, str]) -> None:
    assert verdicts(demo(name)) == expected


def test_conditional_states_the_part_of_the_working_range() -> None:
    s = next(s for s in demo("formic-mobile-phase").solutions[0].shortcuts if s.id == "weak-acid-square-root")
    assert s.verdict.condition.startswith("holds only for 23.4 mmol/L – 50 mmol/L of the working range 5 mmol/L – 50 mmol/L")


def test_conditional_only_at_nominal_inputs() -> None:
    # TRIS at 26 ± 2 °C with the 25 °C constants: fine at 26 °C, not over the tolerance.
    comp = tris_buffer("50 mmol/L", "40 mmol/L", "60 mmol/L", 0.001)
    m = MethodBuilder(limit=0.04, temperature=26.0, temperature_tolerance=2.0).solution(*comp, shortcuts=["constants-at-25c"]).build()
    a = analyse_method(m, FAST)
    (s,) = a.solutions[0].shortcuts
    assert s.verdict.status == "conditional"
    assert "holds only at nominal inputs" in s.verdict.condition
    assert a.solutions[0].monte_carlo.p_exceed["constants-at-25c"] > 0.05


def test_justification_has_every_number_and_the_cautions() -> None:
    a = demo("benzoate-extract")
    s = a.solutions[0].shortcuts[0]
    text = s.justification
    assert s.error < 0  # the check below is about the sign of a negative number
    # numbers are written as on the pages: U+2212 minus, never a hyphen-minus
    assert display.signed(s.error, 3) in text and display.MINUS in text and f"{s.error:+.3f}" not in text
    assert f"{s.validity.max_abs_error:.3f}" in text
    assert "±0.05 pH" in text and "20,000 draws" in text and f"seed {FAST.seed}" in text
    assert "does not replace measurement" in text and "qualified staff" in text
    assert "fit for this purpose over the whole working range" in text


def test_justification_and_input_labels_name_the_forms_as_added() -> None:
    a = demo("phosphate-buffer-hh")
    sa = a.solutions[0]
    text = sa.shortcuts[0].justification
    # the two forms of phosphoric acid, by name and formula as the substance table gives them
    assert "potassium dihydrogen phosphate (KH₂PO₄) 20 mmol/L" in text
    assert "disodium hydrogen phosphate (anhydrous) (Na₂HPO₄) 20 mmol/L" in text
    assert "pKa1 of phosphoric acid" in text and "phosphoric-acid" not in text
    labels = [c.label for c in sa.gum.contributions]
    assert "concentration of potassium dihydrogen phosphate, KH₂PO₄" in labels
    assert "concentration of disodium hydrogen phosphate (anhydrous), Na₂HPO₄" in labels
    assert "pKa2 of phosphoric acid" in labels
    assert not any("phosphoric-acid" in x or "(1)" in x or "(2)" in x for x in labels)


def test_results_document_has_the_documented_keys() -> None:
    doc = json.loads(json.dumps(results_document(demo("tris-buffer-37c"), load_table().sha256)))
    assert doc["format"] == "ph-dossier-results/1"
    assert set(doc["method"]) >= {"id", "revision", "source_sha256"}
    assert set(doc["criteria"]) == {"max_ph_error", "probability"}
    sol = doc["solutions"][0]
    assert set(sol["conditions"]) >= {"temperature_c", "pkw", "activity", "debye_huckel_a", "background_ionic_strength"}
    assert sol["components"][0]["formula"] == "C4H12ClNO3"  # TRIS hydrochloride, ASCII as in the table
    assert set(sol["components"][0]) >= {"substance", "compound", "formula", "pka", "charge", "removed", "total_mol_per_l", "working_range_mol_per_l"}
    assert set(sol["exact"]) >= {"ph", "ph_conc", "ionic_strength"}
    for ap in sol["approximations"]:
        assert set(ap) >= {"id", "ph", "error", "verdict", "validity_total_mol_per_l", "validity_pka", "max_abs_error_working_range", "monte_carlo"}
        assert set(ap["monte_carlo"]) >= {"draws", "seed", "error_coverage", "p_exceed"}
    # the pKa echoed is the thermodynamic value at the working temperature (37 °C)
    assert sol["components"][0]["pka"][0] == pytest.approx(7.75, abs=0.01)
    assert sol["appendix"], "every other applicable shortcut is in the appendix"


def test_csv_tables_parse() -> None:
    tables = csv_tables(demo("boric-rinse"))
    assert "validity.csv" in tables and "sensitivity.csv" in tables
    rows = list(csv.DictReader(io.StringIO(tables["validity.csv"])))
    assert {r["shortcut"] for r in rows} >= {"weak-acid-square-root", "weak-acid-water-corrected"}
    sweep = list(csv.DictReader(io.StringIO(tables["rinse-weak-acid-square-root-concentration-sweep.csv"])))
    assert len(sweep) == 221 and float(sweep[0]["total_mol_per_l"]) == pytest.approx(1e-10)


def test_figures_are_valid_deterministic_and_described() -> None:
    a = demo("boric-rinse")
    first, second = method_figures(a), method_figures(a)
    assert len(first) == 10  # five kinds per claimed shortcut
    for f, g in zip(first, second):
        assert f.svg == g.svg and f.png == g.png, f.stem
        assert f.png.startswith(b"\x89PNG\r\n\x1a\n")
        root = ET.fromstring(f.svg)
        assert root.tag.endswith("svg")
        assert b"<dc:date>" not in f.svg
        assert len(f.alt) > 40 and f.caption


def test_results_document_echoes_the_co2_condition() -> None:
    # Open to air: 420 µatm, K_H and pK1/pK2 of Plummer & Busenberg (1982) at 20 °C.
    doc = json.loads(json.dumps(results_document(demo("boric-rinse"), load_table().sha256)))
    sol = doc["solutions"][0]
    co2 = sol["co2"]
    assert set(co2) == {"mode", "partial_pressure_atm", "henry_mol_per_l_atm", "total_mol_per_l", "pka"}
    assert co2["mode"] == "open" and co2["partial_pressure_atm"] == pytest.approx(420e-6)
    assert co2["henry_mol_per_l_atm"] == pytest.approx(10 ** -1.407, rel=0.01)  # log K_H(20 °C) = −1.407
    assert co2["pka"] == pytest.approx([6.382, 10.376], abs=0.001)
    assert co2["total_mol_per_l"] > co2["henry_mol_per_l_atm"] * co2["partial_pressure_atm"]
    assert sol["co2_open_to_air"] is None
    # Water near pH 5.6 open to air: the boric acid barely matters.
    assert abs(sol["exact"]["ph"] - 5.6) < 0.06


def test_results_document_gives_the_ph_open_to_air_when_co2_is_not_stated() -> None:
    doc = json.loads(json.dumps(results_document(demo("benzoate-extract"), load_table().sha256)))
    sol = doc["solutions"][0]
    assert sol["co2"] == {"mode": "none", "partial_pressure_atm": None, "henry_mol_per_l_atm": None, "total_mol_per_l": None, "pka": None}
    air = sol["co2_open_to_air"]
    assert air["shift"] == pytest.approx(air["ph"] - sol["exact"]["ph"])
    assert air["exceeds_acceptance_limit"] == (abs(air["shift"]) > doc["criteria"]["max_ph_error"])
