"""Buffer robustness: buffer capacity, dilution value and ΔpH under small variations.

Each check names its source beside it; values recalled from memory are marked so.
"""

from __future__ import annotations

import math

import pytest

from dossier import limits
from dossier.analysis.co2 import co2_result
from dossier.analysis.ledger import ledger_entries
from dossier.analysis.method import AnalysisSettings, analyse_method
from dossier.analysis.robustness import RobustnessResult, robustness
from dossier.chemistry import equilibrium
from dossier.inputs.model import Method
from dossier.render.results import results_document

from tests.builders import MethodBuilder, component, pka

LN10 = math.log(10.0)
HH = ["henderson-hasselbalch"]
R = 8.314462618  # J/(K·mol), CODATA 2018 (exact since the 2019 SI)


def _robust(m: Method, i: int = 0) -> RobustnessResult:
    spec = m.solutions[i]
    nominal = spec.to_solution(m.conditions)
    eq = equilibrium(nominal)
    return robustness(spec, m.conditions, nominal, eq, co2_result(nominal, eq, m.conditions.co2_as_written, m.criteria.max_ph_error))


def _acetate_buffer(acid: str = "50 mmol/L", base: str = "50 mmol/L", **kw) -> Method:  # noqa: ANN003
    return (MethodBuilder(**kw)
            .solution(component("acetic-acid", form="acid", concentration=acid, working_range=("1 mmol/L", "200 mmol/L")),
                      component("acetic-acid", form="base", concentration=base, working_range=("0.1 mmol/L", "200 mmol/L")), shortcuts=HH)
            .build())


@pytest.mark.parametrize(("acid", "base"), [("50 mmol/L", "50 mmol/L"), ("90 mmol/L", "10 mmol/L"), ("1 mmol/L", "0.2 mmol/L")])
def test_buffer_capacity_is_van_slykes_closed_form_for_a_monoprotic_buffer(acid: str, base: str) -> None:
    # D. D. Van Slyke, J. Biol. Chem. 52, 525 (1922): for a monoprotic acid of total C,
    # β = ln 10 (C Ka h/(Ka + h)² + h + Kw/h) (ideal solution, concentration scale).
    m = _acetate_buffer(acid, base)
    r = _robust(m)
    eq = equilibrium(m.solutions[0].to_solution(m.conditions))
    h, kw = 10.0 ** -eq.ph_conc, 10.0 ** -eq.pkw
    ka = 10.0 ** -m.solutions[0].components[0].pka[0].at_working_temperature
    c = sum(comp.concentration for comp in m.solutions[0].components)
    closed = LN10 * (c * ka * h / (ka + h) ** 2 + h + kw / h)
    assert r.buffer_capacity_mol_per_l_per_ph == pytest.approx(closed, rel=1e-9)


def test_buffer_capacity_agrees_with_the_small_additions() -> None:
    # β = dC_b/dpH; the small additions give the difference quotient 2a/(ΔpH_base − ΔpH_acid),
    # which differs from the derivative by O(a²): within 1 % for 1 mmol/L in a 0.1 mol/L buffer.
    r = _robust(_acetate_buffer())
    quotient = 2 * r.strong_addition_mol_per_l / (r.delta_ph_strong_base - r.delta_ph_strong_acid)
    assert quotient == pytest.approx(r.buffer_capacity_mol_per_l_per_ph, rel=0.01)
    assert r.delta_ph_strong_acid < 0 < r.delta_ph_strong_base
    assert r.strong_addition_mol_per_l == limits.ROBUSTNESS_STRONG_ADDITION


# Dilution values ΔpH½ of the IUPAC primary standards at 25 °C, R. G. Bates, Determination of pH,
# 2nd ed. (Wiley, 1973), Table 4-8 and the IUPAC 2002 recommendations (Buck et al., Pure Appl. Chem.
# 74, 2169) — both recalled from memory, not read in either. The exact model with the
# Bates–Guggenheim convention (extended Debye–Hückel, Bå = 1.5) applied to every ion has no
# ion-specific terms: about 0.01 pH, the same allowance as tests/references/test_ph_standards.py.
DILUTION_STANDARDS = [
    ("phosphate 0.025/0.025 mol/kg", [("phosphoric-acid", 1, "0.025 mol/kg"), ("phosphoric-acid", 2, "0.025 mol/kg")], 0.080),
    ("hydrogen phthalate 0.05 mol/kg", [("phthalic-acid", 1, "0.05 mol/kg")], 0.052),
]


@pytest.mark.parametrize(("name", "parts", "published"), DILUTION_STANDARDS, ids=[d[0] for d in DILUTION_STANDARDS])
def test_dilution_value_of_iupac_standards(name: str, parts: list[tuple[str, int, str]], published: float) -> None:
    b = MethodBuilder(activity_model="extended-debye-huckel")
    comps = []
    for substance, form, conc in parts:
        n = 3 if substance == "phosphoric-acid" else 2
        comps.append(component(substance, form=form, concentration=conc, working_range=("10 mmol/L", "60 mmol/L"),
                               pka=[pka(uncertainty=0.01) for _ in range(n)]))
    r = _robust(b.solution(*comps, shortcuts=["henderson-hasselbalch" if len(comps) == 2 else "ampholyte-mean"]).build())
    assert r.dilution_value == pytest.approx(published, abs=0.01), name


def test_dilution_value_of_a_weak_acid_alone_is_half_log_two() -> None:
    # pH = ½(pKa − log C) for a weak acid (textbook square-root law, e.g. D. C. Harris,
    # Quantitative Chemical Analysis): halving C raises the pH by ½ log 2 = 0.1505.
    m = MethodBuilder().solution(component("acetic-acid", concentration="100 mmol/L", working_range=("1 mmol/L", "200 mmol/L")),
                                   shortcuts=["weak-acid-square-root"]).build()
    assert _robust(m).dilution_value == pytest.approx(0.5 * math.log10(2.0), abs=0.002)


def test_a_strong_acid_alone_dilutes_and_neutralises_as_its_closed_form() -> None:
    # 1 mmol/L HCl alone (no components), ideal: [H+] = C/2 + sqrt(C²/4 + Kw),
    # so pH ≈ −log C while C ≫ sqrt(Kw) (the charge balance, derived here):
    # 1 + 1 with water gives +log 2; 1 mmol/L more HCl −log 2; 1 mmol/L NaOH
    # neutralises it to pure water's pH ½ pKw.
    m = (MethodBuilder()
         .solution(shortcuts=("strong-acid",), strong_acid={"concentration": "1 mmol/L", "working_range": ["0.1 mmol/L", "10 mmol/L"],
                                                            "name": "hydrochloric acid"})
         .build())
    r = _robust(m)
    assert r.components == ()
    assert r.dilution_value == pytest.approx(math.log10(2.0), abs=1e-6)
    assert r.delta_ph_strong_acid == pytest.approx(-math.log10(2.0), abs=1e-6)
    assert r.ph + r.delta_ph_strong_base == pytest.approx(equilibrium(m.solutions[0].to_solution(m.conditions)).pkw / 2.0, abs=1e-6)


@pytest.mark.parametrize(("tolerance", "percent", "source"), [("0.05 mmol/L", 5.0, "tolerance"), (None, limits.ROBUSTNESS_COMPONENT_PERCENT, "default")])
def test_a_strong_acid_alone_gets_its_concentration_row(tolerance: str | None, percent: float, source: str) -> None:
    # 1 mmol/L HCl alone, ideal: [H+] = C/2 + sqrt(C²/4 + Kw) (the charge balance, derived
    # here), so ±x % of C moves the pH by −log10 of the ratio of those roots.
    strong = {"concentration": "1 mmol/L", "working_range": ["0.1 mmol/L", "10 mmol/L"], "name": "hydrochloric acid"}
    if tolerance is not None:
        strong["tolerance"] = tolerance
    m = MethodBuilder().solution(shortcuts=("strong-acid",), strong_acid=strong).build()
    r = _robust(m)
    kw = 10.0 ** -equilibrium(m.solutions[0].to_solution(m.conditions)).pkw
    h = lambda c: c / 2 + math.sqrt(c * c / 4 + kw)  # noqa: E731
    v = r.strong_alone
    assert v is not None and v.component is None and (v.percent, v.from_tolerance) == (pytest.approx(percent), source == "tolerance")
    assert v.delta_ph_minus == pytest.approx(-math.log10(h(1e-3 * (1 - percent / 100)) / h(1e-3)), abs=1e-9)
    assert v.delta_ph_plus == pytest.approx(-math.log10(h(1e-3 * (1 + percent / 100)) / h(1e-3)), abs=1e-9)
    a = analyse_method(m, AnalysisSettings(draws=1000, map_pka=11, map_conc=11, adaptive=False))
    doc = results_document(a, "0" * 64)["solutions"][0]["robustness"]["strong_alone_variation"]
    assert doc == {"name": "hydrochloric acid", "percent": v.percent, "percent_source": source,
                   "delta_ph_minus": v.delta_ph_minus, "delta_ph_plus": v.delta_ph_plus}
    led = {e.id: e.value for e in ledger_entries(a)}
    assert (led["s/robustness/strong_alone/minus"], led["s/robustness/strong_alone/plus"]) == (v.delta_ph_minus, v.delta_ph_plus)


def test_a_buffer_has_no_strong_alone_row() -> None:
    r = _robust(_acetate_buffer())
    assert r.strong_alone is None


def test_one_component_alone_moves_the_ratio_by_the_tolerance() -> None:
    # Henderson–Hasselbalch (ideal, equal totals of 50 mmol/L): +x % of the salt alone gives
    # ΔpH = log10(1 + x/100), −x % of it log10(1 − x/100); the acid the opposite sign.
    b = (MethodBuilder()
         .solution(component("acetic-acid", form="acid", concentration="50 mmol/L", tolerance="2 %", working_range=("1 mmol/L", "200 mmol/L")),
                   component("acetic-acid", form="base", concentration="50 mmol/L", working_range=("1 mmol/L", "200 mmol/L")), shortcuts=HH))
    r = _robust(b.build())
    acid, base = r.components
    assert acid.from_tolerance and acid.percent == pytest.approx(2.0)
    assert not base.from_tolerance and base.percent == limits.ROBUSTNESS_COMPONENT_PERCENT
    assert acid.delta_ph_plus == pytest.approx(-math.log10(1.02), rel=0.02)
    assert acid.delta_ph_minus == pytest.approx(-math.log10(0.98), rel=0.02)
    x = base.percent / 100
    assert base.delta_ph_plus == pytest.approx(math.log10(1 + x), rel=0.02)
    assert base.delta_ph_minus == pytest.approx(math.log10(1 - x), rel=0.02)


def test_dph_dt_of_a_tris_buffer_follows_van_t_hoff() -> None:
    # At a 1:1 ratio pH ≈ pKa, so dpH/dT ≈ dpKa/dT = −ΔH°/(R T² ln 10) (van 't Hoff), with ΔH°
    # the method's own (substance table); −0.028 /K for TRIS (Bates & Hetzer 1961 report
    # about −0.028 /K, recalled from memory).
    m = (MethodBuilder(temperature_tolerance=2.0)
         .solution(component("tris", form=0, concentration="50 mmol/L", working_range=("1 mmol/L", "200 mmol/L")),
                   component("tris", form=1, concentration="50 mmol/L", working_range=("1 mmol/L", "200 mmol/L")), shortcuts=HH)
         .build())
    r = _robust(m)
    dh = m.solutions[0].components[0].pka[0].enthalpy * 1e3
    assert r.temperature_step_from_tolerance and r.temperature_step_c == 2.0
    assert (r.temperature_low_c, r.temperature_high_c) == (23.0, 27.0)
    assert r.dph_dt_per_k == pytest.approx(-dh / (R * 298.15**2 * LN10), rel=0.03)
    assert r.delta_ph_temperature_low > 0 > r.delta_ph_temperature_high


def test_temperature_step_defaults_when_no_tolerance_and_stays_in_range() -> None:
    m = MethodBuilder(temperature=0.0).solution(component("acetic-acid"), shortcuts=["weak-acid-square-root"]).build()
    r = _robust(m)
    assert not r.temperature_step_from_tolerance and r.temperature_step_c == limits.ROBUSTNESS_TEMPERATURE_STEP
    assert r.temperature_low_c == 0.0 and r.temperature_high_c == 1.0


def test_co2_shift_of_an_unbuffered_solution_and_a_stated_condition() -> None:
    # Water or a very dilute salt open to air falls towards pH 5.6 (Stumm & Morgan, Aquatic
    # Chemistry, 3rd ed., ch. 4): a CO₂-free sodium acetate solution near pH 8.3 drops by more than 1.
    salt = component("acetic-acid", form="base", concentration="1 mmol/L", working_range=("0.1 mmol/L", "10 mmol/L"))
    none = _robust(MethodBuilder().solution(salt, shortcuts=["conjugate-base-square-root"]).build())
    assert none.co2_shift_compares == "open-to-air-minus-co2-free" and none.co2_shift_ph < -1.0
    air = _robust(MethodBuilder(co2="air").solution(salt, shortcuts=["conjugate-base-square-root"]).build())
    assert air.co2_shift_compares == "as-stated-minus-co2-free"
    assert air.co2_shift_ph == pytest.approx(none.co2_shift_ph, abs=1e-9)  # the same two pH values, the other way round


def test_titration_curve_rises_and_passes_through_the_solution_as_stated() -> None:
    r = _robust(_acetate_buffer())
    x, ph = r.curve.added_mol_per_l, r.curve.ph
    assert x[0] < 0 < x[-1] and (ph[1:] > ph[:-1]).all()
    mid = len(x) // 2
    assert x[mid] == 0.0 and ph[mid] == pytest.approx(r.ph, abs=1e-12)


def test_results_and_ledger_carry_the_robustness_numbers() -> None:
    m = _acetate_buffer(activity_model="davies")
    a = analyse_method(m, AnalysisSettings(draws=1000, map_pka=11, map_conc=11, adaptive=False))
    r = a.solutions[0].robustness
    doc = results_document(a, "0" * 64)["solutions"][0]["robustness"]
    assert doc["buffer_capacity_mol_per_l_per_ph"] == r.buffer_capacity_mol_per_l_per_ph
    assert doc["dilution_value"] == r.dilution_value
    assert [v["percent_source"] for v in doc["component_variations"]] == ["default", "default"]
    assert doc["co2_shift_compares"] == "open-to-air-minus-co2-free"
    led = {e.id: e.value for e in ledger_entries(a)}
    assert led["s/robustness/buffer_capacity"] == r.buffer_capacity_mol_per_l_per_ph
    assert led["s/robustness/dilution_value"] == r.dilution_value
    assert led["s/robustness/component/1/plus"] == r.components[1].delta_ph_plus
    assert led["s/robustness/dph_dt"] == r.dph_dt_per_k
