"""Validity ranges: root-finding precision, several intervals, robustness, rules of thumb."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from dossier.analysis.batch import Variation, solution_for
from dossier.analysis.validity import error_at, validity
from dossier.chemistry import CATALOGUE, Component, Protolyte, Solution, equilibrium
from dossier.inputs.substances import load_table

from tests.builders import MethodBuilder, component
from tests.builders import pka as pka_entry

from .helpers import acid


def _spec(value: float, limit: float = 0.02, **kw):  # noqa: ANN003, ANN202
    m = MethodBuilder(limit=limit).solution(acid(value, **kw), shortcuts=["weak-acid-square-root"]).build()
    return m, m.solutions[0]


@pytest.mark.parametrize("pka", [4.0, 7.0, 8.0])
def test_interval_ends_are_found_to_0p1_percent(pka: float) -> None:
    m, spec = _spec(pka)
    v = validity("weak-acid-square-root", spec, m.conditions, 0.02)
    approx = CATALOGUE["weak-acid-square-root"]
    c0 = spec.components[0].concentration
    ivs = v.concentration_intervals
    splits = {a.high for a, b in zip(ivs, ivs[1:]) if a.high == b.low}  # robust / not robust boundaries
    checked = 0
    for iv in ivs:
        for end, is_sweep_end, inward in ((iv.low, iv.low_is_sweep_end, 1.001), (iv.high, iv.high_is_sweep_end, 1 / 1.001)):
            if is_sweep_end or end in splits:
                continue
            e_in = abs(float(error_at(approx, spec, m.conditions, Variation(scale=end * inward / c0))))
            e_out = abs(float(error_at(approx, spec, m.conditions, Variation(scale=end / inward / c0))))
            # 0.1 % inside the end the shortcut holds, 0.1 % outside it does not
            assert e_in <= 0.02 < e_out, (end, e_in, e_out)
            checked += 1
    assert checked >= 1


def test_errors_of_opposite_sign_give_several_intervals_and_a_non_robust_one() -> None:
    # pKa 7: the water error (+) and the dissociation error (−) cancel in a
    # narrow band of dilute concentrations, apart from the main interval.
    m, spec = _spec(7.0)
    v = validity("weak-acid-square-root", spec, m.conditions, 0.02)
    ivs = v.concentration_intervals
    assert len(ivs) >= 2
    assert not ivs[0].robust and ivs[0].high < 1e-6  # the cancellation band
    assert ivs[-1].robust and ivs[-1].high == pytest.approx(10.0)


def test_max_error_over_working_range_matches_a_dense_scan() -> None:
    m, spec = _spec(4.0, lo="0.1 mmol/L", hi="100 mmol/L")
    v = validity("weak-acid-square-root", spec, m.conditions, 0.02)
    c0 = spec.components[0].concentration
    scan = np.geomspace(1e-4, 0.1, 2001)
    dense = np.abs(error_at(CATALOGUE["weak-acid-square-root"], spec, m.conditions, Variation(scale=scan / c0)))
    assert v.max_abs_error == pytest.approx(dense.max(), abs=1e-6)
    assert v.max_abs_error_at == pytest.approx(scan[int(np.argmax(dense))], rel=0.01)


def test_square_root_formula_rule_of_thumb_at_0p01_mol_per_l() -> None:
    # Common practice, no source: at about 0.01 mol/L the square-root formula
    # is taken as good to a few hundredths of a pH unit for pKa from about 4
    # to about 10, failing below (dissociation no longer small) and above
    # (water's own H+ no longer negligible).
    m, spec = _spec(6.0, limit=0.03)
    v = validity("weak-acid-square-root", spec, m.conditions, 0.03)
    (iv,) = v.pka_intervals
    assert iv.low < 4.0 and iv.high > 10.0
    assert iv.low > 3.0 and iv.high < 12.0


@settings(max_examples=60)
@given(st.floats(-2.0, 16.0), st.floats(-10.0, 1.0))
def test_neglecting_dissociation_always_makes_the_ph_too_low(pka: float, log_c: float) -> None:
    # Common practice, no source: [HA] ≈ C overstates the acid, so [H+] is
    # overestimated and the pH comes out too low (water-corrected formula,
    # which makes only that assumption; ideal solution).
    s = Solution([Component(Protolyte("a", (pka,)), 10**log_c)])
    assert CATALOGUE["weak-acid-water-corrected"].error(s) <= 1e-12


def test_water_alone_gives_about_1e_7_mol_per_l() -> None:
    # Common practice, no source: pure water holds about 1e-7 mol/L of H+ at 25 °C.
    h = 10 ** -equilibrium(Solution(temperature=25.0)).ph_conc
    assert h == pytest.approx(1.0e-7, rel=0.02)


def test_carboxylic_acid_at_1_mol_per_l_is_dissociated_well_under_1_percent() -> None:
    # Common practice, no source: a typical carboxylic acid at 1 mol/L is
    # dissociated by well under one per cent (acetic acid from the table).
    acetic = load_table().get("acetic-acid")
    s = Solution([Component(Protolyte("acetic", (acetic.steps[0].pka.value,)), 1.0)])
    assert equilibrium(s).fractions[0][1] < 0.005


def test_validity_ranges_agree_with_the_rules_of_thumb() -> None:
    # The concentration interval of the square-root formula for pKa 4.8 at a
    # limit of a few hundredths starts at about a millimole per litre and
    # runs to the top of the sweep: "ordinary concentrations" pass.
    m, spec = _spec(4.8, limit=0.03)
    v = validity("weak-acid-square-root", spec, m.conditions, 0.03)
    main = v.concentration_intervals[-1]
    assert main.robust and 1e-4 < main.low < 5e-3 and main.high == pytest.approx(10.0)
    assert any(iv.low <= 0.01 <= iv.high for iv in v.concentration_intervals)


def test_pka_sweep_shifts_every_step_of_the_substance() -> None:
    phosphate = [component("phosphoric-acid", form=form, pka=[pka_entry(uncertainty=0.01)] * 3) for form in (1, 2)]
    m = MethodBuilder().solution(*phosphate, shortcuts=["henderson-hasselbalch"]).build()
    spec = m.solutions[0]
    v = validity("henderson-hasselbalch", spec, m.conditions, 0.02)
    assert v.pka_step == (0, 1)  # the H2PO4-/HPO4 2- step
    sol = solution_for(spec, m.conditions, Variation(pka_shift_all={0: 0.5, 1: 0.5}))
    assert sol.components[0].protolyte.pka[1] == sol.components[1].protolyte.pka[1] == pytest.approx(7.698)


def test_a_crossing_is_refined_in_batches_to_the_inside_of_the_limit() -> None:
    """|f| = limit for f(x) = x² − 2 at x = √(2 ± limit): found between two grid points to within a
    hundredth of the tolerance, on the side where |f| ≤ limit; a cell where |f| passes the limit
    twice gives the first crossing seen from the inside end."""
    import math

    from dossier.analysis.validity import _crossing, _peak

    f = lambda x: np.asarray(x) ** 2 - 2.0  # noqa: E731
    limit, tol = 0.05, 1e-3
    up = _crossing(f, 1.40, 1.50, float(f(1.40)), float(f(1.50)), limit, tol)  # inside at 1.40
    assert abs(f(up)) <= limit and 0 <= math.sqrt(2 + limit) - up <= tol / 50
    down = _crossing(f, 1.30, 1.42, float(f(1.30)), float(f(1.42)), limit, tol)  # inside at 1.42, outside below
    assert abs(f(down)) <= limit and 0 <= down - math.sqrt(2 - limit) <= tol / 50
    wave = lambda x: np.sin(np.asarray(x))  # noqa: E731 - inside at both ends; |sin| passes 0.5 at π/6 first, back at 5π/6
    assert _crossing(wave, 0.0, 2.8, 0.0, float(wave(2.8)), 0.5, tol) == pytest.approx(math.pi / 6, abs=tol)
    flat = lambda x: np.zeros_like(np.asarray(x, dtype=float))  # noqa: E731 - the "outside" end holds when solved again
    assert _crossing(flat, 1.0, 2.0, 0.0, 0.06, limit, tol) == 1.0  # the inside end, as when no crossing is bracketed
    peak, at = _peak(lambda x: 1.0 - (np.asarray(x) - 0.3137) ** 2, 0.0, 1.0, 1e-4)
    assert at == pytest.approx(0.3137, abs=1e-4) and peak == pytest.approx(1.0, abs=1e-8)
