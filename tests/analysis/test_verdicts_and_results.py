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
from dossier.inputs.loader import load_method, load_method_bytes
from dossier.inputs.substances import load_table
from dossier.render.figures import method_figures
from dossier.render.prose import prose
from dossier.inputs.units import format_concentration

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
        # the square root errs by −0.019 at nominal against ±0.02: conformity probability far below 95 %
        ("formic-mobile-phase", {"weak-acid-square-root": "fail", "weak-acid-quadratic": "pass"}),
        # u(pH) of the exact value 0.056 (±3 °C on ΔH°) against ±0.02, and open to air: must not meet the criterion
        ("ammonia-reagent", {"weak-base-square-root": "fail"}),
        # open to air, and error +0.086 at nominal against ±0.1 with u(pH) 0.02 before that
        ("acetate-salt-diluent", {"conjugate-base-square-root": "fail"}),
        # ampholyte mean −0.009 against ±0.02 with u(pH) 0.018: about 65 %
        ("glycine-diluent", {"ampholyte-mean": "fail"}),
        ("tris-buffer-37c", {"henderson-hasselbalch": "fail", "constants-at-25c": "fail"}),
        ("saline-phosphate-buffer", {"henderson-hasselbalch": "fail", "ideal-activity": "fail"}),
        # the method holds two solutions, and the verdicts of both are listed by shortcut:
        # ammonium acetate open to air: carbonic acid pulls the poorly buffered salt
        # about 0.19 below ½(pKa,HA + pKa,BH⁺); formate at 1 mmol/L: Henderson–Hasselbalch
        # errs by −0.11 (the acid's own dissociation at that dilution)
        ("lcms-mobile-phases", {"weak-acid-weak-base-salt": "fail", "henderson-hasselbalch": "fail"}),
        # a strong acid alone: −log C errs by the activity coefficient only (−0.016 at 1 mmol/L)
        ("hydrochloric-acid-rinse", {"strong-acid": "pass"}),
    ],
)
def test_demo_verdicts(name: str, expected: dict[str, str]) -> None:
    assert verdicts(demo(name)) == expected


def test_demo_dihydrogen_phosphate_and_adjusted_acetate() -> None:
    # 10 mmol/L dihydrogen phosphate: the ampholyte mean ½(pKa1 + pKa2) = 4.67 errs
    # by about −0.05 (at this dilution pKa1's dissociation is not negligible); the
    # acetate adjusted to pH 4.75 with sodium hydroxide reaches the target by the
    # exact model, and the volume Henderson–Hasselbalch prescribes gives less.
    a = demo("phosphate-acetate-diluents")
    by = {sa.spec.id: sa for sa in a.solutions}
    amp = by["dihydrogen-phosphate"].shortcuts[0]
    assert amp.id == "ampholyte-mean" and amp.error < -0.03 and amp.verdict.status == "fail"
    adj = by["acetate-buffer"].adjustment
    assert adj is not None and abs(by["acetate-buffer"].exact.ph - 4.75) < 1e-6
    assert adj.shortcut_amount_mol_per_l < adj.amount_mol_per_l and adj.shortcut_recipe_ph < 4.75
    assert adj.volume_ml_per_l == pytest.approx(adj.amount_mol_per_l * 1000.0)


def test_restricted_range_states_the_part_of_the_working_range() -> None:
    # the boric rinse as if prepared with CO2-free water (the demo states it open to air,
    # where carbonic acid sets the pH and the shortcut fails everywhere)
    text = (ROOT / "methods" / "boric-rinse.yaml").read_text(encoding="utf-8").replace("co2: air", "co2: none")
    load = load_method_bytes(text.encode(), "boric-rinse.yaml")
    assert load.method is not None, [str(p) for p in load.problems]
    a = analyse_method(load.method, FAST)
    sa = a.solutions[0]
    s = next(s for s in sa.shortcuts if s.id == "weak-acid-square-root")
    assert s.verdict.status == "conditional"
    (low, high), = s.verdict.region.holds
    assert high == pytest.approx(5e-3) and 1.2e-4 < low < 1.8e-4  # the dilute end fails
    words = prose(a.method, sa, s)
    assert words.words == "meets it within a restricted range"
    assert words.condition.startswith(f"within the limit only for {format_concentration(low)} – 5 mmol/L of the working range 50 µmol/L – 5 mmol/L")


def test_holds_at_nominal_but_too_uncertain_does_not_meet_it() -> None:
    # TRIS at 26 ± 2 °C with the 25 °C constants: fine at 26 °C, but the true pH moves
    # about 0.03 pH/K: the conformity probability of ±0.04 is far below 95 %.
    comp = tris_buffer("50 mmol/L", "40 mmol/L", "60 mmol/L", 0.001)
    m = MethodBuilder(limit=0.04, temperature=26.0, temperature_tolerance=2.0).solution(*comp, shortcuts=["constants-at-25c"]).build()
    a = analyse_method(m, FAST)
    (s,) = a.solutions[0].shortcuts
    assert abs(s.verdict.nominal_error) < 0.04
    assert s.verdict.status == "fail" and s.verdict.conformity < 0.95
    assert "conformity-below-required" in s.verdict.findings
    assert abs(s.verdict.worst.temperature - 26.0) == pytest.approx(2.0)  # the worst point is at an edge of the tolerance


def test_justification_has_every_number_and_the_cautions() -> None:
    a = demo("benzoate-extract")
    s = a.solutions[0].shortcuts[0]
    text = prose(a.method, a.solutions[0], s).justification
    assert s.error < 0  # the check below is about the sign of a negative number
    # numbers are written as on the pages: U+2212 minus, never a hyphen-minus
    assert display.signed(s.error, 3) in text and display.MINUS in text and f"{s.error:+.3f}" not in text
    assert display.fixed(abs(s.verdict.worst.error)) in text
    assert "±0.05 pH" in text and "conformity probability" in text and "simple acceptance" in text
    assert "does not replace measurement" in text and "qualified staff" in text
    assert "meets the criterion over the whole operating region" in text
    # it quotes the result the verdict used, never the other one
    if s.verdict.result_used == "gum":
        assert "GUM, 95 % interval" in text and "Monte Carlo, " not in text
    else:
        assert f"{FAST.draws:,} draws" in text and "the GUM result is not validated and not used" in text


def test_justification_and_input_labels_name_the_forms_as_added() -> None:
    a = demo("phosphate-buffer-hh")
    sa = a.solutions[0]
    text = prose(a.method, sa, sa.shortcuts[0]).justification
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
        assert ap["verdict"] in {"pass", "conditional", "fail"} and isinstance(ap["justification"], str) and ap["reasons"]
        d = ap["decision"]
        assert d["rule"] == "simple-acceptance" and d["result_used"] in {"gum", "monte-carlo"}
        assert 0.0 <= d["conformity_probability"] <= 1.0
        worst = d["operating_region"]["worst"]
        assert set(worst) == {"total_mol_per_l", "temperature_c", "background_ionic_strength", "error"}
        assert 36.5 <= worst["temperature_c"] <= 37.5  # tris-buffer-37c: 37 ± 0.5 °C
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
        assert f.svg == g.svg, f.stem
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
