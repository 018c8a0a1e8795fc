"""Adaptive Monte Carlo (JCGM 101:2008 §7.9): agreement with a fixed 10⁶-draw
run within the numerical tolerance, reproducibility from the seed, the cap,
and the decision of a probability against its threshold."""

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


def test_adaptive_agrees_with_a_fixed_million_draws_within_the_tolerance() -> None:
    m, spec = _phosphate()
    limit, allowed = m.criteria.max_ph_error, 1.0 - m.criteria.probability
    adaptive = monte_carlo(spec.shortcuts, spec, m.conditions, limit, seed=7, adaptive=True, thresholds=(allowed,))
    fixed = monte_carlo(spec.shortcuts, spec, m.conditions, limit, seed=8, draws=1_000_000)
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
    for sid in spec.shortcuts:  # the verdict's side of the threshold is the same
        assert (adaptive.p_exceed[sid] > allowed) == (fixed.p_exceed[sid] > allowed)


def test_adaptive_run_is_reproducible_from_its_seed() -> None:
    m, spec = _phosphate()
    args = (spec.shortcuts, spec, m.conditions, m.criteria.max_ph_error)
    one = monte_carlo(*args, seed=11, adaptive=True, draws=200_000)
    two = monte_carlo(*args, seed=11, adaptive=True, draws=200_000)
    other = monte_carlo(*args, seed=12, adaptive=True, draws=200_000)
    assert one.draws == two.draws and _results(one.exact) == _results(two.exact)
    assert one.exact.histogram == two.exact.histogram and one.p_exceed == two.p_exceed
    assert _results(one.exact) != _results(other.exact)


def test_a_fixed_run_is_one_batch_and_the_cap_holds() -> None:
    m, spec = _phosphate()
    args = (spec.shortcuts, spec, m.conditions, m.criteria.max_ph_error)
    capped = monte_carlo(*args, seed=3, adaptive=True, draws=25_000, batch=10_000)
    assert capped.draws <= 25_000 and capped.stopping.draws_max == 25_000
    # The first batch of an adaptive run is the same stream as a fixed run of that size.
    first = monte_carlo(*args, seed=3, draws=10_000)
    single = monte_carlo(*args, seed=3, adaptive=True, draws=10_000)
    assert _results(first.exact) == _results(single.exact) and single.stopping.digits_stable is None


def test_an_undecidable_probability_runs_to_the_cap() -> None:
    # A limit at the median |error| and a threshold at the probability itself: never decided.
    m, spec = _phosphate()
    sid = spec.shortcuts[0]
    probe = monte_carlo(spec.shortcuts, spec, m.conditions, 1.0, seed=5, draws=40_000)
    limit = abs(probe.errors[sid].mean)
    p = monte_carlo(spec.shortcuts, spec, m.conditions, limit, seed=5, draws=40_000).p_exceed[sid]
    assert 0.1 < p < 0.9
    run = monte_carlo(spec.shortcuts, spec, m.conditions, limit, seed=5, adaptive=True, draws=60_000, thresholds=(p,))
    assert run.draws == 60_000 and run.stopping.probabilities_decided is False
    # The same run against a threshold far from p stops as soon as the digits are stable.
    easy = monte_carlo(spec.shortcuts, spec, m.conditions, limit, seed=5, adaptive=True, draws=60_000, thresholds=(0.99,))
    assert easy.stopping.probabilities_decided is True


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
        exact = st["tolerance"]["exact"]
        assert exact["numerical_tolerance"] == _two_digits_tolerance(sa.monte_carlo.exact.u) and exact["largest_two_s"] > 0
    fixed = analyse_method(m, AnalysisSettings(draws=40_000, map_pka=11, map_conc=11, adaptive=False))
    st = results_document(fixed, "0" * 64)["solutions"][0]["monte_carlo_stopping"]
    assert st["adaptive"] is False and st["draws_used"] == 40_000 and st["digits_stable"] is None
