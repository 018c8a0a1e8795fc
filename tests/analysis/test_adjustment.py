"""'Adjust to pH X with …': the exact amount, the shortcut's amount and its recipe pH."""

from __future__ import annotations

import json

import pytest
import yaml

from dossier.analysis.adjustment import adjustment_result
from dossier.analysis.method import AnalysisSettings, analyse_method
from dossier.chemistry import equilibrium, working_constants
from dossier.inputs.loader import load_method_bytes
from dossier.inputs.serialize import method_from_dict, method_to_dict
from dossier.inputs.substances import load_table
from dossier.render.results import results_document

from tests.builders import MethodBuilder, component

_ACETIC = component("acetic-acid", concentration="100 mmol/L", working_range=("10 mmol/L", "200 mmol/L"))


def _load(adjusted_to: dict, activity: str = "davies", shortcuts: tuple[str, ...] = ("henderson-hasselbalch",), form: str = "acid"):  # noqa: ANN202
    doc = MethodBuilder(activity_model=activity).solution({**_ACETIC, "form": form}, shortcuts=list(shortcuts)).document()
    doc["solutions"][0]["adjusted_to"] = adjusted_to
    return load_method_bytes(yaml.safe_dump(doc, allow_unicode=True).encode(), "t.yaml")


@pytest.mark.parametrize("activity", ["ideal", "davies"])
def test_the_adjusted_solution_has_the_target_ph(activity: str) -> None:
    m = _load({"ph": 4.75, "with": "strong-base", "stock": "1 mol/L"}, activity).method
    s = m.solutions[0]
    assert s.adjustment is not None and s.strong_base == s.adjustment.amount
    assert abs(equilibrium(s.to_solution(m.conditions)).ph - 4.75) <= 1e-9


def test_shortcut_amount_inverts_henderson_hasselbalch_and_its_recipe_misses_with_activity() -> None:
    # Henderson–Hasselbalch for acid HA titrated with NaOH: pH = pKa + log(x/(C − x)), so
    # x = C/(1 + 10^(pKa − pH)) (Henderson 1908; Hasselbalch 1916).
    m = _load({"ph": 4.75, "with": "strong-base", "stock": "1 mol/L"}).method
    s = m.solutions[0]
    r = adjustment_result(s, m.conditions)
    pka = working_constants(s.to_solution(m.conditions)).pka[0][0]
    assert r.shortcut == "henderson-hasselbalch"
    assert r.shortcut_amount_mol_per_l == pytest.approx(0.1 / (1 + 10 ** (pka - 4.75)), rel=1e-9)
    # The recipe pH is the exact pH of the solution made with that amount: with
    # activity (I ≈ 0.05) it falls short of the target by about 0.08.
    assert 0.05 < 4.75 - r.shortcut_recipe_ph < 0.12
    assert r.volume_ml_per_l == pytest.approx(1000 * r.amount_mol_per_l)
    assert r.shortcut_volume_ml_per_l == pytest.approx(1000 * r.shortcut_amount_mol_per_l)


def test_adjusting_with_acid_from_the_salt() -> None:
    m = _load({"ph": 4.0, "with": "strong-acid"}, form="base").method
    s = m.solutions[0]
    r = adjustment_result(s, m.conditions)
    assert r.titrant == "strong-acid" and s.strong_acid == pytest.approx(r.amount_mol_per_l)
    assert r.stock_mol_per_l is None and r.volume_ml_per_l is None
    assert abs(equilibrium(s.to_solution(m.conditions)).ph - 4.0) <= 1e-9


def test_unreachable_target_names_the_field() -> None:
    result = _load({"ph": 2.0, "with": "strong-base"})
    assert result.method is None
    text = " ".join(str(p) for p in result.problems)
    assert "adjusted_to.ph" in text and "needs strong-acid" in text


def test_too_weak_a_stock_is_refused() -> None:
    result = _load({"ph": 4.75, "with": "strong-base", "stock": "10 mmol/L"})
    assert result.method is None
    assert any("adjusted_to.stock" in str(p) for p in result.problems)


def test_round_trip_and_results_json() -> None:
    m = _load({"ph": 4.75, "with": "strong-base", "stock": "1 mol/L"}).method
    assert method_from_dict(method_to_dict(m)) == m
    a = analyse_method(m, AnalysisSettings(draws=2000, map_pka=5, map_conc=5))
    sol = json.loads(json.dumps(results_document(a, load_table().sha256)))["solutions"][0]
    assert set(sol["adjustment"]) == {"target_ph", "titrant", "amount_mol_per_l", "shortcut_amount_mol_per_l", "shortcut_recipe_ph"}
    assert sol["adjustment"]["target_ph"] == 4.75 and sol["adjustment"]["titrant"] == "strong-base"
    assert sol["adjustment_stock"]["volume_ml_per_l"] == pytest.approx(1000 * sol["adjustment"]["amount_mol_per_l"])
    assert sol["exact"]["ph"] == pytest.approx(4.75, abs=1e-9)


def test_no_adjustment_gives_null() -> None:
    m = MethodBuilder().solution(_ACETIC, shortcuts=["weak-acid-quadratic"]).build()
    a = analyse_method(m, AnalysisSettings(draws=2000, map_pka=5, map_conc=5))
    sol = results_document(a, load_table().sha256)["solutions"][0]
    assert sol["adjustment"] is None and sol["adjustment_stock"] is None


# ---------------------------------------------------------------- a weak titrant: a substance and its form
_P3 = [{"uncertainty": 0.01}] * 3
_NAH2PO4 = component("phosphoric-acid", form=1, concentration="10 mmol/L", working_range=("1 mmol/L", "50 mmol/L"), pka=_P3)


def _phosphate(with_: object, ph: float = 7.2, activity: str = "davies", stock: str | None = "0.5 mol/L",
               shortcuts: tuple[str, ...] = ("henderson-hasselbalch",)):  # noqa: ANN202
    doc = MethodBuilder(activity_model=activity).solution(_NAH2PO4, shortcuts=list(shortcuts)).document()
    adj = {"ph": ph, "with": with_}
    if stock is not None:
        adj["stock"] = stock
    doc["solutions"][0]["adjusted_to"] = adj
    return load_method_bytes(yaml.safe_dump(doc, allow_unicode=True).encode(), "t.yaml")


@pytest.mark.parametrize("activity", ["ideal", "davies"])
def test_weak_titrant_becomes_the_last_component_and_reaches_the_target(activity: str) -> None:
    load = _phosphate({"substance": "phosphoric-acid", "form": 2}, activity=activity)
    assert load.method is not None, load.problems
    m = load.method
    s = m.solutions[0]
    assert s.adjustment is not None and s.adjustment.component == 1 and len(s.components) == 2
    added = s.components[1]
    assert added.removed == 2 and added.concentration == s.adjustment.amount and added.compound.startswith("disodium hydrogen phosphate")
    # one substance, one set of constants: the titrant takes the component's pKa values
    assert [p.thermodynamic for p in added.pka] == [p.thermodynamic for p in s.components[0].pka]
    # the whole solution is diluted together: the titrant's working range is in proportion
    assert added.working_range[1] / added.concentration == pytest.approx(50.0 / 10.0)
    assert s.strong_base == 0.0 and s.strong_acid == 0.0
    assert abs(equilibrium(s.to_solution(m.conditions)).ph - 7.2) <= 1e-9


def test_weak_titrant_shortcut_amount_is_henderson_hasselbalch_and_the_recipe_misses_with_activity() -> None:
    # Henderson–Hasselbalch with the conjugate added as a second form: pH = pKa2 + log(x/C)
    # (Henderson 1908; Hasselbalch 1916), so x = C·10^(pH − pKa2).
    m = _phosphate({"substance": "phosphoric-acid", "form": 2}).method
    s = m.solutions[0]
    r = adjustment_result(s, m.conditions)
    pka2 = working_constants(s.to_solution(m.conditions)).pka[0][1]
    assert r.titrant == "phosphoric-acid, form 2" and r.titrant_compound == s.components[1].compound
    assert r.shortcut == "henderson-hasselbalch"
    assert r.shortcut_amount_mol_per_l == pytest.approx(0.01 * 10 ** (7.2 - pka2), rel=1e-9)
    # With activity (I ≈ 0.07) the exact amount is near twice the shortcut's, and the
    # shortcut's recipe falls well short of the target (by more than 0.1).
    assert 1.5 < r.amount_mol_per_l / r.shortcut_amount_mol_per_l < 2.5
    assert 7.2 - r.shortcut_recipe_ph > 0.1
    assert r.volume_ml_per_l == pytest.approx(1000 * r.amount_mol_per_l / 0.5)


def test_weak_titrant_preparation_and_results_json() -> None:
    m = _phosphate({"substance": "phosphoric-acid", "form": 2}, stock=None).method
    assert method_from_dict(method_to_dict(m)) == m
    a = analyse_method(m, AnalysisSettings(draws=2000, map_pka=5, map_conc=5))
    sa = a.solutions[0]
    # the titrant is listed once: as the adjustment's titrant, with the mass it amounts to
    assert [w.index for w in sa.preparation.components] == [0]
    (t,) = sa.preparation.titrants
    assert t.role == "adjustment" and t.weighed is not None and t.weighed.formula == "Na2HPO4"
    assert t.weighed.mass_g_per_l == pytest.approx(t.amount_mol_per_l * t.weighed.molar_mass_g_per_mol, rel=1e-9)
    sol = json.loads(json.dumps(results_document(a, load_table().sha256)))["solutions"][0]
    assert set(sol["adjustment"]) == {"target_ph", "titrant", "amount_mol_per_l", "shortcut_amount_mol_per_l", "shortcut_recipe_ph"}
    assert sol["adjustment"]["titrant"] == "phosphoric-acid, form 2"
    assert sol["components"][-1]["removed"] == 2 and sol["components"][-1]["total_mol_per_l"] == pytest.approx(sol["adjustment"]["amount_mol_per_l"])
    assert sol["exact"]["ph"] == pytest.approx(7.2, abs=1e-9)
    # results.json gives the weighed titrant as the page does (compound, formula, molar mass, mass per litre)
    (tj,) = sol["preparation"]["titrants"]
    assert tj["formula"] == "Na2HPO4" and tj["mass_g_per_l"] == pytest.approx(t.weighed.mass_g_per_l, rel=1e-12)
    assert tj["molar_mass_g_per_mol"] == pytest.approx(t.weighed.molar_mass_g_per_mol) and tj["compound"] == t.weighed.compound


def test_weak_titrant_of_another_substance_needs_its_pka_entries() -> None:
    missing = _phosphate({"substance": "acetic-acid", "form": "base"}, ph=5.0)
    assert missing.method is None
    assert any(p.field == "solutions[0].adjusted_to.with.substance" and "give its pka entries" in p.message for p in missing.problems)
    given = _phosphate({"substance": "acetic-acid", "form": "base", "pka": [{"uncertainty": 0.01}]}, ph=5.0, shortcuts=("ideal-activity",))
    assert given.method is not None, given.problems
    assert given.method.solutions[0].components[1].substance == "acetic-acid"


@pytest.mark.parametrize(("with_", "field", "words"), [
    ({"substance": "phosphoric-acd", "form": 2}, "adjusted_to.with.substance", "did you mean 'phosphoric-acid'"),
    ({"substance": "phosphoric-acid", "form": 4}, "adjusted_to.with.form", "protons removed must be 0 … 3"),
    ({"substance": "phosphoric-acid", "form": 0}, "adjusted_to.ph", "cannot be reached with phosphoric-acid (form 0)"),
])
def test_weak_titrant_errors_name_the_field(with_: dict, field: str, words: str) -> None:
    load = _phosphate(with_)
    assert load.method is None
    assert any(p.field == f"solutions[0].{field}" and words in p.message for p in load.problems), [str(p) for p in load.problems]
