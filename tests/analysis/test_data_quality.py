"""Data a reviewer cannot take on trust: flagged values, their effect on the
verdict, and a missing ΔH° away from 25 °C as an input of the budget.

The van 't Hoff bound is checked against its closed form,
ΔpKa = a/(R ln 10)·|1/T − 1/T₀| (J. H. van 't Hoff 1884; R from CODATA 2018,
8.314462618 J/(K·mol)).
"""

from __future__ import annotations

import math

import pytest

from dossier.analysis.batch import InputKind, inputs_of
from dossier.analysis.method import AnalysisSettings, analyse_method
from dossier.inputs.quality import Concern, Quantity
from dossier.render.results import results_document
from tests.builders import MethodBuilder, component, pka

R = 8.314462618
SETTINGS = AnalysisSettings(draws=4000, map_pka=11, map_conc=11)


def _acid(temperature: float, enthalpy: float | None, u: float = 0.02, kind: str = "primary-measurement") -> MethodBuilder:
    extra = {} if enthalpy is None else {"enthalpy": enthalpy}
    return (MethodBuilder(limit=0.05, temperature=temperature, activity_model="davies")
            .solution(component("acid-x", charge=0, pka=[pka(4.0, uncertainty=u, **extra)]), shortcuts=["weak-acid-quadratic"])
            .reference("r", kind=kind))


def test_missing_enthalpy_away_from_25c_is_an_input_of_the_budget() -> None:
    m = _acid(37.0, None).build()
    spec = m.solutions[0]
    (extra,) = [i for i in inputs_of(spec, m.conditions) if i.kind == InputKind.PKA_AT_TEMPERATURE]
    a = 50e3 / (R * math.log(10.0)) * abs(1 / 310.15 - 1 / 298.15)
    assert extra.half_width == pytest.approx(a, rel=1e-9)
    assert extra.u == pytest.approx(a / math.sqrt(3.0), rel=1e-9)
    assert extra.key == "pka_at_t[0][0]"
    with_dh = analyse_method(_acid(37.0, 0.0).build(), SETTINGS).solutions[0]
    without = analyse_method(m, SETTINGS).solutions[0]
    # the unknown temperature dependence enters the exact pH's uncertainty instead of zero
    assert without.gum.u > 3 * with_dh.gum.u
    assert without.monte_carlo.exact.u > 3 * with_dh.monte_carlo.exact.u
    (q,) = [q for q in without.data_quality if q.flag.concern == Concern.NO_ENTHALPY]
    assert q.in_budget and q.pka_shift == pytest.approx(a, rel=1e-9)
    assert q.shift_exact == pytest.approx(q.coefficient * a, rel=1e-12)
    # at 25 °C with no tolerance ΔH° is not used: nothing to flag, nothing added
    at25 = _acid(25.0, None).build()
    assert not [i for i in inputs_of(at25.solutions[0], at25.conditions) if i.kind == InputKind.PKA_AT_TEMPERATURE]


def test_flagged_values_carry_sensitivity_times_plausible_error() -> None:
    a = analyse_method(_acid(25.0, None, u=0.0, kind="estimate").build(), SETTINGS)
    sa = a.solutions[0]
    concerns = sorted(str(q.flag.concern) for q in sa.data_quality)
    assert concerns == ["estimate", "no-uncertainty"]
    (s,) = sa.shortcuts
    for q in sa.data_quality:
        assert q.flag.quantity == Quantity.PKA and q.plausible_error == 0.05 and q.common_practice
        # weak acid: ∂pH/∂pKa about 1/2
        assert 0.4 < q.coefficient < 0.6
        assert q.worst_abs_error[s.id] == pytest.approx(abs(s.error) + abs(q.shift_error[s.id]), abs=1e-15)
    doc = results_document(a, "0" * 64)["solutions"][0]["data_quality"]
    assert {d["concern"] for d in doc} == {"estimate", "no-uncertainty"}
    assert {"quantity", "value", "plausible_error", "pka_shift", "d_ph_d_pka", "shift_exact_ph", "worst_abs_error"} <= set(doc[0])


def test_unverified_table_value_is_flagged_with_its_source() -> None:
    m = (MethodBuilder(limit=0.05).solution(component("acetic-acid", pka=[pka(uncertainty=0.01)]), shortcuts=["weak-acid-quadratic"]).build())
    sa = analyse_method(m, SETTINGS).solutions[0]
    (q,) = sa.data_quality
    assert q.flag.concern == Concern.UNVERIFIED and q.flag.origin == "substance table" and q.flag.value == pytest.approx(4.757)
