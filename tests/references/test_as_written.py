"""The procedure's calculation as written: a shortcut evaluated with the
constants the procedure states (a mixed pKa″, the 25 °C value at 37 °C),
against a published buffer.

Sources
-------
- Equimolal phosphate standard, 0.025 mol/kg KH₂PO₄ + 0.025 mol/kg Na₂HPO₄:
  pH(S) = 6.865 at 25 °C, I = 0.1 mol/kg. R. P. Buck et al., "Measurement of
  pH. Definition, standards, and procedures", Pure Appl. Chem. 74, 2169–2200
  (2002), Table 3 (value recalled from memory, as in REFERENCES.md).
- pK2 of phosphoric acid, thermodynamic, 25 °C: 7.1965. J. I. Partanen and
  P. O. Minkkinen, Acta Chem. Scand. 50, 1081–1086 (1996) (recalled from memory).
- The mixed pK2″ at I = 0.1 from pK2 with the extended Debye–Hückel model
  (Bates–Guggenheim å·B = 1.5): :func:`dossier.chemistry.activity.conditional_pka`.
"""

from __future__ import annotations

import json

import pytest

from dossier.analysis.method import AnalysisSettings, analyse_method
from dossier.chemistry import CATALOGUE, Component, Protolyte, Solution, StatedConstants, equilibrium
from dossier.chemistry.activity import conditional_pka
from dossier.inputs.serialize import method_from_dict, method_to_dict
from dossier.render.results import results_document
from tests.builders import MethodBuilder, component, pka

PK2_PARTANEN_1996 = 7.1965
PH_S_EQUIMOLAL_PHOSPHATE = 6.865  # Buck et al. 2002
PK2_MIXED_AT_0P1 = float(conditional_pka(PK2_PARTANEN_1996, 0.1, 25.0, -2, "extended-debye-huckel"))
PHOSPHORIC = Protolyte("phosphoric acid", (2.148, PK2_PARTANEN_1996, 12.35), charge=0)


def test_mixed_pk2_henderson_hasselbalch_meets_the_equimolal_phosphate_standard() -> None:
    # Equal molalities: log(c_base/c_acid) = 0, so the procedure's pH is pK2″ itself.
    s = Solution([Component(PHOSPHORIC, 0.025, 1), Component(PHOSPHORIC, 0.025, 2)], activity="extended-debye-huckel")
    hh = CATALOGUE["henderson-hasselbalch"].as_written(StatedConstants(pka=(None, PK2_MIXED_AT_0P1, None)))
    ph = hh.ph(s)
    assert ph == pytest.approx(PK2_MIXED_AT_0P1 + 0.0, abs=1e-12)
    assert ph == pytest.approx(PH_S_EQUIMOLAL_PHOSPHATE, abs=0.01)
    # with the thermodynamic pK2 the same equation is off by the activity term, about +0.33
    assert CATALOGUE["henderson-hasselbalch"].ph(s) - PH_S_EQUIMOLAL_PHOSPHATE > 0.3
    # the shortcut's error is against the exact pH of the thermodynamic model
    assert abs(hh.error(s)) < 0.01
    assert hh.error(s) == pytest.approx(ph - equilibrium(s).ph, abs=1e-12)


def test_stated_constant_does_not_follow_the_models_pka() -> None:
    hh = CATALOGUE["henderson-hasselbalch"].as_written(StatedConstants(pka=(None, 6.87, None)))
    shifted = Protolyte("phosphoric acid", (2.148, 7.5, 12.35), charge=0)
    s = Solution([Component(shifted, 0.025, 1), Component(shifted, 0.025, 2)])
    assert hh.ph(s) == pytest.approx(6.87, abs=1e-12)
    assert CATALOGUE["henderson-hasselbalch"].ph(s) == pytest.approx(7.5, abs=1e-12)


def test_exact_solution_variant_refuses_stated_constants() -> None:
    from dossier.chemistry import InputRangeError

    with pytest.raises(InputRangeError):
        CATALOGUE["constants-at-25c"].as_written(StatedConstants(pka=(8.07,)))


def _phosphate_method(as_written: dict | None) -> MethodBuilder:
    claim: object = "henderson-hasselbalch" if as_written is None else {"id": "henderson-hasselbalch", "as_written": as_written}
    pkas = [pka(uncertainty=0.005), pka(PK2_PARTANEN_1996, uncertainty=0.005), pka(uncertainty=0.005)]
    return MethodBuilder(limit=0.02, activity_model="extended-debye-huckel").solution(
        component("phosphoric-acid", form=1, concentration="25 mmol/L", working_range=("20 mmol/L", "30 mmol/L"), pka=pkas),
        component("phosphoric-acid", form=2, concentration="25 mmol/L", working_range=("20 mmol/L", "30 mmol/L"), pka=pkas),
        shortcuts=[claim],  # type: ignore[list-item]
    )


def test_method_analysis_judges_the_calculation_as_written() -> None:
    settings = AnalysisSettings(draws=2000, map_pka=11, map_conc=11)
    written = analyse_method(_phosphate_method({"pka": [None, round(PK2_MIXED_AT_0P1, 3), None]}).build(), settings)
    model = analyse_method(_phosphate_method(None).build(), settings)
    (s_w,), (s_m,) = written.solutions[0].shortcuts, model.solutions[0].shortcuts
    assert s_w.ph == pytest.approx(round(PK2_MIXED_AT_0P1, 3), abs=1e-9)
    assert abs(s_w.error) < 0.01 < abs(s_m.error)
    # the exact pH is the same model either way
    assert written.solutions[0].exact.ph == model.solutions[0].exact.ph
    # validity, GUM and Monte Carlo use the stated constant: the key pKa no longer moves the shortcut
    assert s_w.gum is not None and s_m.gum is not None
    exact_d = written.solutions[0].gum.coefficients.d_pka
    assert s_w.gum.coefficients.d_pka == pytest.approx(-exact_d, abs=1e-6)
    assert abs(s_m.gum.coefficients.d_pka) < 0.01  # model constants: shortcut and exact move together
    doc = results_document(written, "0" * 64)
    approx = doc["solutions"][0]["approximations"][0]
    assert set(approx["constants_used"]) == {"pka", "pkw"}
    assert approx["constants_used"]["pka"] == [None, round(PK2_MIXED_AT_0P1, 3), None]
    assert approx["constants_used"]["pkw"] is None
    assert approx["constants_stated"] == {"pka": [False, True, False], "pkw": False}
    plain = results_document(model, "0" * 64)["solutions"][0]["approximations"][0]
    assert plain["constants_used"]["pka"][1] == pytest.approx(model.solutions[0].spec.components[0].pka[1].at_working_temperature)
    assert plain["constants_stated"]["pka"] == [False, False, False]


def test_as_written_round_trips_through_the_ledger_form() -> None:
    m = _phosphate_method({"pka": [None, 6.87, None], "pkw": 14.0}).build()
    back = method_from_dict(json.loads(json.dumps(method_to_dict(m))))
    assert back == m
    assert back.solutions[0].stated("henderson-hasselbalch") == StatedConstants((None, 6.87, None), 14.0)
