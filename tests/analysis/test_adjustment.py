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
