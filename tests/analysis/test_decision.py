"""The decision rule: conformity probability (JCGM 106:2012) and the activity model's uncertainty."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.stats import norm

from dossier.analysis.decision import NACL_MEAN_GAMMA, conformity_counted, conformity_normal, model_uncertainty
from dossier.analysis.method import AnalysisSettings, analyse_method

from tests.builders import MethodBuilder

from .helpers import acid

FAST = AnalysisSettings(draws=20_000, map_pka=11, map_conc=11)


def test_closed_form_is_the_normal_probability_of_the_tolerance_interval() -> None:
    # JCGM 106:2012 §7.3 (recalled): p_c = Φ((T_U − y)/u) − Φ((T_L − y)/u); checked against scipy's normal CDF
    for y, u in [(0.0, 0.01), (0.013, 0.004), (-0.03, 0.02), (0.05, 0.001)]:
        expected = norm.cdf(0.02, loc=y, scale=u) - norm.cdf(-0.02, loc=y, scale=u)
        assert conformity_normal(y, u, -0.02, 0.02) == pytest.approx(expected, abs=1e-12)


def test_jcgm_106_landmarks_of_the_normal_case() -> None:
    # JCGM 106:2012 (recalled, §7.3 and §8.3): a measured value on a tolerance limit has p_c = 50 %
    # (the other limit far away); with a guard band of U = 2u inside the limit, p_c = Φ(2) = 97.7 %.
    assert conformity_normal(10.0, 0.1, 0.0, 10.0) == pytest.approx(0.5, abs=1e-12)
    assert conformity_normal(10.0 - 2 * 0.1, 0.1, 0.0, 10.0) == pytest.approx(0.97725, abs=1e-5)
    # the centre of an interval of ±2u: Φ(2) − Φ(−2) = 95.45 %
    assert conformity_normal(0.0, 0.5, -1.0, 1.0) == pytest.approx(0.9545, abs=1e-4)
    # no uncertainty: inside is certain, outside impossible
    assert conformity_normal(0.01, 0.0, -0.02, 0.02) == 1.0 and conformity_normal(0.03, 0.0, -0.02, 0.02) == 0.0


def test_counted_probability_agrees_with_the_closed_form() -> None:
    rng = np.random.default_rng(7)
    draws = rng.normal(0.006, 0.012, 400_000)
    assert conformity_counted(draws, 0.02) == pytest.approx(conformity_normal(0.006, 0.012, -0.02, 0.02), abs=3e-3)


def test_ammonia_like_case_meets_only_with_a_small_uncertainty() -> None:
    # Error +0.007 pH against ±0.02 (as the ammonia reagent): fine with u(pH) = 0.005, not with 0.056.
    assert conformity_normal(0.007, 0.005, -0.02, 0.02) >= 0.95
    assert conformity_normal(0.007, 0.056, -0.02, 0.02) < 0.5


def test_model_uncertainty_from_measured_nacl() -> None:
    # Davies at 25 °C: log γ = −A(√I/(1+√I) − 0.3 I), A ≈ 0.509 (textbook value at 25 °C, recalled;
    # the engine computes A from water properties, hence the tolerance);
    # the discrepancy from NaCl (Robinson & Stokes 1959, recalled) over √3.
    a = 0.5092
    for i, g in NACL_MEAN_GAMMA:
        davies = -a * (math.sqrt(i) / (1 + math.sqrt(i)) - 0.3 * i)
        expected = abs(davies - math.log10(g)) / math.sqrt(3)
        assert model_uncertainty("davies", i).u == pytest.approx(expected, abs=5e-4)
    assert model_uncertainty("davies", 0.0).u == 0.0
    assert model_uncertainty("davies", 0.3).u < model_uncertainty("davies", 0.5).u
    # ideal activity at 0.1 mol/kg misses the whole log γ (about 0.11)
    assert model_uncertainty("ideal", 0.1).u == pytest.approx(abs(math.log10(0.778)) / math.sqrt(3), rel=1e-9)
    assert "recalled" in model_uncertainty("davies", 0.1).source


def test_the_verdict_quotes_the_result_it_used() -> None:
    m = MethodBuilder(limit=0.05).solution(acid(4.76, u=0.02), shortcuts=["weak-acid-square-root"]).build()
    a = analyse_method(m, FAST)
    sa = a.solutions[0]
    v = sa.shortcuts[0].verdict
    if sa.comparison.validated:
        assert v.result_used == "gum" and v.exact_u == pytest.approx(sa.gum.u)
        assert v.conformity == pytest.approx(conformity_normal(v.nominal_error, math.hypot(sa.gum.u, v.model.u), -0.05, 0.05))
    else:
        assert v.result_used == "monte-carlo" and v.exact_u == pytest.approx(sa.monte_carlo.exact.u)
        assert v.conformity == sa.monte_carlo.p_conform["weak-acid-square-root"]
