"""The model's range: validity sweeps stop where the activity model leaves
the ionic-strength range it is used in, and at a component's solubility;
results.json gives the ionic strength at each end of every interval.

Ranges (mol/kg): limiting law 0.005, extended Debye–Hückel 0.1 (the
Bates–Guggenheim convention, Bates & Guggenheim, Pure Appl. Chem. 1, 163
(1960)), Davies 0.5 — W. Stumm and J. J. Morgan, Aquatic Chemistry, 3rd ed.
(1996), Table 3.3, recalled from memory. Benzoic acid dissolves to about
3.4 g/L in water at 25 °C (CRC Handbook, recalled from memory).
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from dossier import limits
from dossier.analysis.method import AnalysisSettings, analyse_method
from dossier.analysis.validity import validity
from dossier.chemistry import ACTIVITY_MODELS, Component, Protolyte, Solution, equilibrium
from dossier.inputs.loader import load_method
from dossier.inputs.substances import load_table
from dossier.render.results import results_document

from tests.builders import MethodBuilder, component

ROOT = Path(__file__).resolve().parents[2]
SALT = "conjugate-base-square-root"


def test_every_activity_model_carries_its_range() -> None:
    ranges = {m: ACTIVITY_MODELS[m].max_ionic_strength for m in ACTIVITY_MODELS}
    assert ranges == {"ideal": None, "debye-huckel": 0.005, "extended-debye-huckel": 0.1, "davies": 0.5}
    assert ranges == limits.ACTIVITY_MODEL_RANGE
    for m in ACTIVITY_MODELS.values():
        assert m.range_source  # a source, or the statement that there is no range
    assert ACTIVITY_MODELS["ideal"].in_range(1e3)
    assert ACTIVITY_MODELS["davies"].in_range(0.5) and not ACTIVITY_MODELS["davies"].in_range(0.5001)


def _sodium_acetate(model: str, limit: float):  # noqa: ANN202
    m = (MethodBuilder(limit=limit, activity_model=model)
         .solution(component("acetic-acid", form="base", concentration="0.01 mol/L", working_range=("1 mmol/L", "0.05 mol/L")), shortcuts=[SALT])
         .build())
    return m, m.solutions[0]


def _independent_ionic_strength(total: float, model: str) -> float:
    """Sodium acetate at ``total`` mol/L, built from the engine's primitives (acetic acid pKa 4.757, NIST SRD 46)."""
    acetic = Protolyte("acetic", (load_table().get("acetic-acid").steps[0].pka.value,), charge=0,
                       dh=(load_table().get("acetic-acid").steps[0].enthalpy.value,))
    return float(equilibrium(Solution((Component(acetic, total, removed=1),), temperature=25.0, activity=model)).ionic_strength)


@pytest.mark.parametrize(("model", "top"), [("davies", 0.5), ("extended-debye-huckel", 0.1)])
def test_sodium_acetate_sweep_is_cut_where_the_ionic_strength_reaches_the_models_range(model: str, top: float) -> None:
    # Limit 0.2 pH: uncut, the interval ran on towards 10 mol/L.
    m, spec = _sodium_acetate(model, 0.2)
    v = validity(SALT, spec, m.conditions, 0.2)
    assert v.max_ionic_strength == top
    last = v.concentration_intervals[-1]
    assert last.high_is_cut and not last.high_is_sweep_end
    assert last.high == pytest.approx(v.model_range_cut, rel=1e-12)
    # the ionic strength there is the model's range, by an independent solve
    assert _independent_ionic_strength(last.high, model) == pytest.approx(top, rel=2e-3)
    assert last.ionic_strength_high == pytest.approx(top, rel=2e-3)
    assert last.high < 1.0
    assert all(iv.high <= v.model_range_cut for iv in v.concentration_intervals)
    # the sweep itself still runs to 10 mol/L; the part beyond the cut is marked outside
    assert v.concentration_span[1] == pytest.approx(10.0)
    assert v.concentration_sweep.outside[0] == (pytest.approx(v.model_range_cut), pytest.approx(10.0))


def test_the_ideal_model_has_no_cut() -> None:
    m, spec = _sodium_acetate("ideal", 0.2)
    v = validity(SALT, spec, m.conditions, 0.2)
    assert v.max_ionic_strength is None and v.model_range_cut is None and v.concentration_sweep.outside == ()


def test_benzoic_acid_is_cut_at_its_solubility() -> None:
    method = load_method(ROOT / "methods" / "benzoate-extract.yaml").method
    spec = method.solutions[0]
    solubility = load_table().get("benzoic-acid").form(0).solubility
    assert solubility is not None and solubility.status == "recalled"
    assert spec.components[0].solubility == solubility.value
    v = validity("weak-acid-square-root", spec, method.conditions, method.criteria.max_ph_error)
    assert v.solubility_cut == pytest.approx(solubility.value) and v.solubility_component == 0
    last = v.concentration_intervals[-1]
    assert last.high == pytest.approx(solubility.value) and last.high_is_cut
    assert max(iv.high for iv in v.concentration_intervals) <= solubility.value * (1 + 1e-12)


def test_a_background_beyond_the_range_leaves_nothing_to_judge() -> None:
    m = (MethodBuilder(limit=0.2, activity_model="davies", background=1.0)
         .solution(component("acetic-acid", form="base"), shortcuts=[SALT]).build())
    v = validity(SALT, m.solutions[0], m.conditions, 0.2)
    assert v.concentration_intervals == () and v.pka_intervals == ()
    assert v.model_range_cut == pytest.approx(v.concentration_span[0])


def test_results_give_the_ionic_strength_at_every_interval_end() -> None:
    m, spec = _sodium_acetate("davies", 0.2)
    doc = json.loads(json.dumps(results_document(analyse_method(m, AnalysisSettings(draws=2_000, map_pka=11, map_conc=11)), load_table().sha256)))
    sc = doc["solutions"][0]["approximations"][0]
    objects = sc["validity_total_intervals"]
    assert [[o["low"], o["high"]] for o in objects] == sc["validity_total_mol_per_l"]  # the old key is kept
    assert [o["without_compensating_errors"] for o in objects] == sc["validity_total_robust"]
    for o in objects:
        for end in ("low", "high"):
            assert o[f"ionic_strength_{end}"] == pytest.approx(_independent_ionic_strength(o[end], "davies"), rel=1e-9)
    assert objects[-1]["high_is_cut"] and objects[-1]["ionic_strength_high"] == pytest.approx(0.5, rel=2e-3)
    assert sc["model_range"]["max_ionic_strength_mol_per_kg"] == 0.5
    assert sc["model_range"]["cut_total_mol_per_l"] == pytest.approx(objects[-1]["high"])
    for o in sc["validity_pka_intervals"]:
        assert np.isfinite(o["ionic_strength_low"]) and np.isfinite(o["ionic_strength_high"])
