"""Adaptive Monte Carlo (JCGM 101:2008 §7.9): agreement with a fixed 10⁶-draw
run within the numerical tolerance, reproducibility from the seed, the cap,
and the decision of the conformity probability (JCGM 106) against the
required probability."""

from __future__ import annotations

from pathlib import Path
from statistics import NormalDist

import numpy as np
import pytest

from dossier.analysis.montecarlo import _decided, _two_digits_tolerance, monte_carlo
from dossier.inputs.loader import load_method

ROOT = Path(__file__).resolve().parents[2]


def _phosphate():  # noqa: ANN202 - triprotic, Davies, a claimed shortcut with an error spread of its own
    m = load_method(ROOT / "tests" / "benchmarks" / "demo-set" / "phosphate-buffer-hh.yaml").method
    return m, m.solutions[0]


def _results(s) -> tuple[float, float, float, float]:  # noqa: ANN001
    return (s.mean, s.u, *s.coverage)


@pytest.mark.parametrize(
    "limit",
    # the method's own limit (the shortcut's error, about 0.30 pH, is far outside: p_c = 0, decided below)
    # and 0.34 pH, where p_c is about 0.97: decided above the required 0.95 from its counted value
    [None, 0.34],
)
def test_adaptive_agrees_with_a_fixed_million_draws_within_the_tolerance(limit: float | None) -> None:
    m, spec = _phosphate()
    limit, required = limit or m.criteria.max_ph_error, m.criteria.probability
    model_u = 0.002  # an activity-model uncertainty of the size the decision rule adds at I ≈ 0.1 mol/kg
    adaptive = monte_carlo(spec.shortcuts, spec, m.conditions, limit, seed=7, adaptive=True, required_probability=required, model_u=model_u)
    fixed = monte_carlo(spec.shortcuts, spec, m.conditions, limit, seed=8, draws=1_000_000, model_u=model_u)
    st = adaptive.stopping
    assert st is not None and st.adaptive and st.digits_stable and st.probabilities_decided
    assert adaptive.draws < 1_000_000 and adaptive.draws == st.batches * st.batch_size
    assert fixed.stopping is not None and not fixed.stopping.adaptive and fixed.draws == 1_000_000
    pairs = [("exact", adaptive.exact, fixed.exact)] + [(sid, adaptive.errors[sid], fixed.errors[sid]) for sid in spec.shortcuts]
    for name, a, f in pairs:
        delta, two_s = st.tolerance[name]
        assert delta == _two_digits_tolerance(a.u) and 0.0 < two_s <= delta
        # 2 s ≤ δ: each result is within δ of the limit of infinitely many draws with
        # about 95 % probability; the fixed run has a spread of its own, so the two
        # are compared within 2 δ (4 s).
        for got, want in zip(_results(a), _results(f)):
            assert abs(got - want) <= 2.0 * delta, (name, got, want, delta)
    assert st.required_probability == required
    for sid in spec.shortcuts:
        # the verdict's side of the required probability is the same, and the fixed
        # run's conformity probability lies in the interval the adaptive run stopped on
        # (the fixed run's own spread, √(p(1 − p)/10⁶), is added)
        assert (adaptive.p_conform[sid] >= required) == (fixed.p_conform[sid] >= required)
        low, high = st.conformity_interval[sid]
        assert low <= adaptive.p_conform[sid] <= high and (low > required or high < required)
        pf = fixed.p_conform[sid]
        spread = 3.0 * (pf * (1.0 - pf) / 1e6) ** 0.5
        assert low - spread <= pf <= high + spread, (sid, low, pf, high)


def test_adaptive_run_is_reproducible_from_its_seed() -> None:
    m, spec = _phosphate()
    args = (spec.shortcuts, spec, m.conditions, m.criteria.max_ph_error)
    one = monte_carlo(*args, seed=11, adaptive=True, draws=200_000)
    two = monte_carlo(*args, seed=11, adaptive=True, draws=200_000)
    other = monte_carlo(*args, seed=12, adaptive=True, draws=200_000)
    assert one.draws == two.draws and _results(one.exact) == _results(two.exact)
    assert one.exact.histogram == two.exact.histogram and one.p_exceed == two.p_exceed
    assert _results(one.exact) != _results(other.exact)
    # the model errors come from a stream of their own: the input draws do not depend on them
    with_model = monte_carlo(*args, seed=11, draws=20_000, model_u=0.01)
    without = monte_carlo(*args, seed=11, draws=20_000)
    assert _results(with_model.exact) == _results(without.exact)
    again = monte_carlo(*args, seed=11, draws=20_000, model_u=0.01)
    assert with_model.p_conform == again.p_conform


def test_a_fixed_run_is_one_batch_and_the_cap_holds() -> None:
    m, spec = _phosphate()
    args = (spec.shortcuts, spec, m.conditions, m.criteria.max_ph_error)
    capped = monte_carlo(*args, seed=3, adaptive=True, draws=25_000, batch=10_000)
    assert capped.draws <= 25_000 and capped.stopping.draws_max == 25_000
    # The first batch of an adaptive run is the same stream as a fixed run of that size.
    first = monte_carlo(*args, seed=3, draws=10_000)
    single = monte_carlo(*args, seed=3, adaptive=True, draws=10_000)
    assert _results(first.exact) == _results(single.exact) and single.stopping.digits_stable is None
    assert first.p_conform == single.p_conform


def test_an_undecidable_conformity_probability_runs_to_the_cap() -> None:
    # A limit at the median |Δ| and the required probability at p_c itself: never decided.
    m, spec = _phosphate()
    sid = spec.shortcuts[0]
    probe = monte_carlo(spec.shortcuts, spec, m.conditions, 1.0, seed=5, draws=40_000)
    stated = probe.exact.mean + probe.errors[sid].mean  # about the shortcut's pH
    limit = abs(stated - probe.exact.mean) + 0.5 * probe.exact.u
    p = monte_carlo(spec.shortcuts, spec, m.conditions, limit, seed=5, draws=40_000).p_conform[sid]
    assert 0.1 < p < 0.9
    run = monte_carlo(spec.shortcuts, spec, m.conditions, limit, seed=5, adaptive=True, draws=60_000, required_probability=p)
    assert run.draws == 60_000 and run.stopping.probabilities_decided is False
    low, high = run.stopping.conformity_interval[sid]
    assert low <= p <= high
    # The same run against a required probability far from p_c stops as soon as the digits are stable.
    easy = monte_carlo(spec.shortcuts, spec, m.conditions, limit, seed=5, adaptive=True, draws=60_000, required_probability=0.999)
    assert easy.stopping.probabilities_decided is True and easy.stopping.conformity_interval[sid][1] < 0.999
    # Without a required probability nothing is decided, and the record says so.
    free = monte_carlo(spec.shortcuts, spec, m.conditions, limit, seed=5, adaptive=True, draws=60_000)
    assert free.stopping.required_probability is None and free.stopping.conformity_interval == {}


@pytest.mark.parametrize(
    ("count", "n", "low", "high"),
    # Wilson score intervals at 95 %, Newcombe, Stat. Med. 17 (1998) 857, table I
    # (values recalled from memory): 81/263 → 0.2553–0.3662, 15/148 → 0.0624–0.1605,
    # 0/20 → 0–0.1611.
    [(81, 263, 0.2553, 0.3662), (15, 148, 0.0624, 0.1605), (0, 20, 0.0, 0.1611)],
)
def test_the_decision_uses_the_wilson_score_interval(count: int, n: int, low: float, high: float) -> None:
    z = NormalDist().inv_cdf(0.975)
    assert _decided(count, n, high + 0.0002, z) and not _decided(count, n, high - 0.0002, z)
    if low > 0:
        assert _decided(count, n, low - 0.0002, z) and not _decided(count, n, low + 0.0002, z)
    assert not _decided(count, n, count / n, z)
    assert np.isfinite(z)


def test_results_json_records_the_draws_used_and_the_tolerance_reached() -> None:
    from dossier.analysis.method import AnalysisSettings, analyse_method
    from dossier.render.results import results_document

    m, _ = _phosphate()
    a = analyse_method(m, AnalysisSettings(draws=40_000, map_pka=11, map_conc=11))
    doc = results_document(a, "0" * 64)
    assert doc["settings"]["monte_carlo_adaptive"] is True and doc["settings"]["monte_carlo_draws"] == 40_000
    for sol, sa in zip(doc["solutions"], a.solutions, strict=True):
        st = sol["monte_carlo_stopping"]
        assert st["draws_used"] == sa.monte_carlo.draws == st["batches"] * st["batch_size"] <= st["draws_max"] == 40_000
        assert set(st["tolerance"]) == {"exact", *sa.spec.shortcuts}
        assert st["decided_against_required_probability"] == m.criteria.probability
        assert set(st["conformity_interval"]) == set(sa.spec.shortcuts)
        for sid, (low, high) in st["conformity_interval"].items():
            assert 0.0 <= low <= sa.monte_carlo.p_conform[sid] <= high <= 1.0
        exact = st["tolerance"]["exact"]
        assert exact["numerical_tolerance"] == _two_digits_tolerance(sa.monte_carlo.exact.u) and exact["largest_two_s"] > 0
    fixed = analyse_method(m, AnalysisSettings(draws=40_000, map_pka=11, map_conc=11, adaptive=False))
    st = results_document(fixed, "0" * 64)["solutions"][0]["monte_carlo_stopping"]
    assert st["adaptive"] is False and st["draws_used"] == 40_000 and st["digits_stable"] is None
