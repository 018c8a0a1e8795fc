"""How to make it: the mass of each component and the volume of each titrant per litre."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
import yaml

from dossier.analysis.method import AnalysisSettings, analyse_method
from dossier.analysis.preparation import preparation
from dossier.inputs.loader import load_method, load_method_bytes
from dossier.inputs.serialize import method_from_dict, method_to_dict
from dossier.inputs.substances import load_table
from dossier.render.html import environment
from dossier.render.results import results_document

from tests.builders import MethodBuilder, component

ROOT = Path(__file__).resolve().parents[2]
QUICK = AnalysisSettings(draws=2000, map_pka=5, map_conc=5)


def _load(doc: dict):  # noqa: ANN202
    return load_method_bytes(yaml.safe_dump(doc, allow_unicode=True).encode(), "t.yaml")


def test_worked_check_of_the_demo_phosphate_buffer() -> None:
    # methods/phosphate-buffer-hh.yaml: KH2PO4 written as 2.722 g/L, Na2HPO4 as 20 mmol/L.
    # By hand, with the IUPAC abridged atomic weights (Na 22.990, H 1.008, P 30.974, O 15.999):
    #   M(Na2HPO4) = 2 × 22.990 + 1.008 + 30.974 + 4 × 15.999 = 141.958 g/mol
    #   (141.96 g/mol in the CRC Handbook, recalled from memory)
    #   m = 0.020 mol/L × 141.958 g/mol = 2.83916 g per litre.
    # The stated mass of KH2PO4 is the mass weighed: 2.722 g.
    m = load_method(ROOT / "methods" / "phosphate-buffer-hh.yaml").method
    p = preparation(m.solutions[0])
    kh2po4, na2hpo4 = p.components
    assert (kh2po4.compound, kh2po4.formula, kh2po4.stated_mass) == ("potassium dihydrogen phosphate", "KH2PO4", True)
    assert kh2po4.mass_g_per_l == pytest.approx(2.722, abs=1e-12)
    assert (na2hpo4.formula, na2hpo4.stated_mass) == ("Na2HPO4", False)
    assert na2hpo4.mass_g_per_l == pytest.approx(0.020 * (2 * 22.990 + 1.008 + 30.974 + 4 * 15.999), rel=1e-12)
    assert na2hpo4.mass_g_per_l == pytest.approx(2.83916, abs=1e-5)
    assert p.titrants == ()


def test_the_demo_saline_buffer_weighs_the_dodecahydrate() -> None:
    # 8.1 mmol/L × 358.14 g/mol (Na2HPO4·12H2O, CRC Handbook, recalled from memory) = 2.901 g
    m = load_method(ROOT / "methods" / "saline-phosphate-buffer.yaml").method
    comp = m.solutions[0].components[1]
    w = preparation(m.solutions[0]).components[1]
    assert comp.weighed_compound == "disodium hydrogen phosphate dodecahydrate" and w.water == 12
    assert comp.concentration == pytest.approx(8.1e-3)  # mol/L as written: the hydrate does not change the analysis
    assert w.mass_g_per_l == pytest.approx(8.1e-3 * 358.14, abs=2e-4)


def test_a_mass_of_the_hydrate_is_converted_with_the_hydrate_molar_mass() -> None:
    # 13.608 g/L of sodium acetate trihydrate (136.08 g/mol) is 0.1 mol/L of acetate;
    # read as the anhydrous salt (82.03 g/mol) it would be 0.166 mol/L.
    base = component("acetic-acid", form="base", concentration="13.608 g/L", working_range=("5 g/L", "30 g/L"))
    hydrate = _load(MethodBuilder().solution({**base, "weighed_as": "sodium acetate trihydrate"}, shortcuts=["conjugate-base-square-root"]).document()).method
    anhydrous = _load(MethodBuilder().solution(base, shortcuts=["conjugate-base-square-root"]).document()).method
    assert hydrate.solutions[0].components[0].concentration == pytest.approx(13.608 / 136.08, rel=1e-4)
    assert anhydrous.solutions[0].components[0].concentration == pytest.approx(13.608 / 82.03, rel=1e-4)
    w = preparation(hydrate.solutions[0]).components[0]
    assert (w.compound, w.formula, w.stated_mass) == ("sodium acetate trihydrate", "C2H3NaO2·3H2O", True)
    assert w.mass_g_per_l == pytest.approx(13.608, abs=1e-12)
    # the formula is accepted in place of the name, with a period for the middle dot
    by_formula = _load(MethodBuilder().solution({**base, "weighed_as": "C2H3NaO2.3H2O"}, shortcuts=["conjugate-base-square-root"]).document()).method
    assert by_formula.solutions[0].components[0].weighed_compound == "sodium acetate trihydrate"


def test_another_alkali_salt_of_the_same_form() -> None:
    # NaH2PO4·H2O for the table's KH2PO4 form (1 proton removed): 10 mmol/L × 137.99 g/mol = 1.380 g
    comp = component("phosphoric-acid", form=1, concentration="10 mmol/L", working_range=("5 mmol/L", "20 mmol/L"),
                     pka=[{"uncertainty": 0.01}] * 3, weighed_as="sodium dihydrogen phosphate monohydrate")
    m = _load(MethodBuilder().solution(comp, shortcuts=["ampholyte-mean"]).document()).method
    assert preparation(m.solutions[0]).components[0].mass_g_per_l == pytest.approx(1.37991, abs=1e-5)
    assert m.solutions[0].components[0].added_as == "sodium dihydrogen phosphate monohydrate, NaH₂PO₄·H₂O"


def test_titrants_stated_and_adjusted_with_their_stocks() -> None:
    acetic = component("acetic-acid", concentration="100 mmol/L", working_range=("10 mmol/L", "200 mmol/L"))
    doc = MethodBuilder(activity_model="davies").solution(acetic, shortcuts=["ideal-activity"]).document()
    doc["solutions"][0]["adjusted_to"] = {"ph": 4.75, "with": "strong-base", "stock": "1 mol/L"}
    doc["solutions"][0]["strong_acid"] = "2 mmol/L"
    doc["solutions"][0]["strong_acid_stock"] = "0.1 mol/L"
    load = _load(doc)
    m = load.method
    assert m is not None, load.problems
    s = m.solutions[0]
    acid, adj = preparation(s).titrants
    assert (acid.role, acid.amount_mol_per_l, acid.volume_ml_per_l) == ("strong_acid", 0.002, pytest.approx(20.0))
    assert adj.role == "adjustment" and adj.target_ph == 4.75
    assert adj.amount_mol_per_l == s.adjustment.amount == s.strong_base
    assert adj.volume_ml_per_l == pytest.approx(1000.0 * s.strong_base / 1.0)
    assert s.strong_acid == 0.002  # the stated acid is not part of the adjustment
    assert method_from_dict(method_to_dict(m)) == m


def test_a_stated_base_and_the_adjustment_with_the_same_titrant_are_listed_apart() -> None:
    acetic = component("acetic-acid", concentration="100 mmol/L", working_range=("10 mmol/L", "200 mmol/L"))
    doc = MethodBuilder().solution(acetic, shortcuts=["henderson-hasselbalch"]).document()
    doc["solutions"][0].update({"strong_base": "10 mmol/L", "adjusted_to": {"ph": 4.75, "with": "strong-base"}})
    s = _load(doc).method.solutions[0]
    stated, adj = preparation(s).titrants
    assert stated.amount_mol_per_l == pytest.approx(0.010) and stated.volume_ml_per_l is None
    assert stated.amount_mol_per_l + adj.amount_mol_per_l == pytest.approx(s.strong_base, rel=1e-12)


def test_results_json_and_the_page_table() -> None:
    comp = component("acetic-acid", form="base", concentration="0.1 mol/L", working_range=("0.05 mol/L", "0.2 mol/L"),
                     weighed_as="sodium acetate trihydrate")
    doc = MethodBuilder(activity_model="davies").solution(comp, shortcuts=["ideal-activity"]).document()
    doc["solutions"][0].update({"strong_base": "1 mmol/L", "strong_base_stock": "0.1 mol/L"})
    load = _load(doc)
    assert load.method is not None, load.problems
    a = analyse_method(load.method, QUICK)
    sol = json.loads(json.dumps(results_document(a, load_table().sha256)))["solutions"][0]
    prep = sol["preparation"]
    w = prep["components"][0]
    assert w["compound"] == "sodium acetate trihydrate" and w["water_of_crystallisation"] == 3 and w["mass_stated"] is False
    assert w["mass_g_per_l"] == pytest.approx(0.1 * w["molar_mass_g_per_mol"]) and w["molar_mass_g_per_mol"] == pytest.approx(136.08, abs=0.01)
    assert prep["titrants"] == [{"role": "strong_base", "titrant": "strong-base", "amount_mol_per_l": 0.001, "stock_mol_per_l": 0.1,
                                 "volume_ml_per_l": pytest.approx(10.0), "target_ph": None,
                                 "compound": None, "formula": None, "molar_mass_g_per_mol": None, "mass_g_per_l": None}]
    html = environment().from_string('{% import "_preparation.html" as p %}{{ p.preparation_table(sa) }}').render(sa=a.solutions[0])
    assert "sodium acetate trihydrate, C₂H₃NaO₂·3H₂O" in html
    assert "13.608 g" in html and "10 mL" in html and "strong base, as stated" in html


def test_a_stock_without_its_acid_is_ignored_with_a_warning() -> None:
    doc = MethodBuilder().solution(component("acetic-acid"), shortcuts=["weak-acid-quadratic"]).document()
    doc["solutions"][0]["strong_base_stock"] = "1 mol/L"
    load = _load(doc)
    assert load.method is not None and load.method.solutions[0].strong_base_stock is None
    assert any(p.field == "solutions[0].strong_base_stock" and "ignored: the solution states no strong_base" in p.message for p in load.problems)
