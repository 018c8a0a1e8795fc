"""A solution that holds only a strong acid or base: loaded from a method file,
analysed over its working range, and judged against published values."""

from __future__ import annotations

import math

import pytest

from dossier.analysis.method import AnalysisSettings, analyse_method
from dossier.analysis.validity import validity
from dossier.inputs.serialize import method_from_dict, method_to_dict
from tests.builders import MethodBuilder

FAST = AnalysisSettings(draws=2000, map_pka=11, map_conc=11)


def _hcl(concentration: str, working_range: tuple[str, str], *, shortcuts: tuple[str, ...], limit: float = 0.02,
         tolerance: str | None = "2 %", temperature_tolerance: float = 0.0) -> MethodBuilder:
    acid: dict[str, object] = {"concentration": concentration, "working_range": list(working_range), "name": "hydrochloric acid"}
    if tolerance is not None:
        acid["tolerance"] = tolerance
    return MethodBuilder(limit=limit, temperature_tolerance=temperature_tolerance).solution(shortcuts=shortcuts, strong_acid=acid)


def test_hcl_1e_8_through_a_method_file() -> None:
    # 1.0e-8 mol/L HCl: pH 6.98, not 8 — the worked example of the systematic
    # treatment of equilibrium in D. C. Harris, Quantitative Chemical Analysis,
    # 8th ed. (W. H. Freeman, 2010), ch. 8 (recalled from memory; edition and
    # section not verified), also Hill, Petrucci et al., General Chemistry, 4th
    # ed., problem 15.109 (tests/references/test_textbook_examples.py). The
    # books take Kw = 1.0e-14; at 25 °C IAPWS R11-07 gives pKw 13.995, which
    # leaves the rounded answer unchanged.
    m = _hcl("1e-8 mol/L", ("1e-9 mol/L", "1e-6 mol/L"), shortcuts=("strong-acid", "strong-acid-water-corrected")).build()
    spec = m.solutions[0]
    assert spec.components == ()
    assert spec.strong_alone is not None and spec.strong_alone.name == "hydrochloric acid"
    a = analyse_method(m, FAST).solutions[0]
    assert round(a.exact.ph, 2) == 6.98
    by_id = {s.id: s for s in a.shortcuts}
    assert round(by_id["strong-acid-water-corrected"].ph, 2) == 6.98
    assert by_id["strong-acid"].ph == pytest.approx(8.0)  # pH = −log C, the shortcut's failure
    assert by_id["strong-acid"].verdict.status.value != by_id["strong-acid-water-corrected"].verdict.status.value


def test_validity_lower_end_matches_its_closed_form() -> None:
    # Ideal activities: [H+] = C/2 + sqrt(C²/4 + Kw) (charge balance). The
    # shortcut −log C errs by −L where [H+] = C·10^L, i.e. (C·10^L − C/2)² =
    # C²/4 + Kw, so C = sqrt(Kw / (10^(2L) − 10^L)) — derived here by hand,
    # independent of the engine's solver.
    limit = 0.02
    m = _hcl("1 mmol/L", ("1 µmol/L", "10 mmol/L"), shortcuts=("strong-acid",), limit=limit).build()
    spec, c = m.solutions[0], m.conditions
    v = validity("strong-acid", spec, c, limit)
    kw = 10.0 ** -analyse_method(m, FAST).solutions[0].exact.pkw
    expected_low = math.sqrt(kw / (10 ** (2 * limit) - 10**limit))
    assert v.pka_step is None and v.pka_intervals == ()
    assert v.concentration_intervals[0].low == pytest.approx(expected_low, rel=1e-4)
    assert v.working_range == (1e-6, 1e-2)


def test_tolerance_is_an_uncertain_input_with_slope_minus_one() -> None:
    # pH = −log10 C for 1 mmol/L HCl (ideal): ∂pH/∂log10 C = −1 (to the water
    # term, 1e-8 relative), so u(pH) = u(log10 C) = (0.02/√3)/ln 10.
    m = _hcl("1 mmol/L", ("0.1 mmol/L", "10 mmol/L"), shortcuts=("strong-acid",)).build()
    a = analyse_method(m, FAST).solutions[0]
    contrib = {k.key: k for k in a.gum.contributions}
    assert contrib["log_c[strong_acid]"].coefficient == pytest.approx(-1.0, abs=1e-4)
    assert a.gum.u == pytest.approx((0.02 / math.sqrt(3)) / math.log(10), rel=1e-3)


def test_strong_base_alone_and_round_trip() -> None:
    # 1.0e-8 mol/L KOH: pH 7.02 (tests/references/test_textbook_examples.py,
    # Harris, recalled). The ledger's round trip keeps the strong base alone.
    b = MethodBuilder(limit=0.02).solution(
        shortcuts=["strong-base-water-corrected"],
        strong_base={"concentration": "1e-8 mol/L", "working_range": ["1e-9 mol/L", "1e-6 mol/L"]})
    m = b.build()
    assert method_from_dict(method_to_dict(m)) == m
    a = analyse_method(m, FAST).solutions[0]
    assert round(a.exact.ph, 2) == 7.02
    assert m.solutions[0].lead_name == "strong base"
