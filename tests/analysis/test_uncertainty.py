"""GUM and Monte Carlo: agreement, a closed-form case, reproducibility, comparison (JCGM 101 §8)."""

from __future__ import annotations

import numpy as np
import pytest

from dossier.analysis.batch import inputs_of
from dossier.analysis.montecarlo import K95, compare, monte_carlo
from dossier.analysis.sensitivity import gum
from dossier.analysis.validity import key_step
from dossier.chemistry import equilibrium

from tests.builders import MethodBuilder, component, pka

from .helpers import acid, tris_buffer


def buffer(u: float = 0.02, distribution: str = "normal", tol: str = "0 %", ttol: float = 0.0):  # noqa: ANN202
    """An acetate buffer, 0.5/0.5 mol/L, ideal: pH = pKa + log(1) to 1e-5, so linear in pKa."""
    comp = [component("acetic-acid", form=form, concentration="0.5 mol/L", tolerance=tol, working_range=("0.1 mol/L", "1 mol/L"),
                      pka=[pka(uncertainty=u, distribution=distribution)]) for form in ("acid", "base")]
    m = MethodBuilder(limit=0.05, temperature_tolerance=ttol).solution(*comp, shortcuts=["henderson-hasselbalch"]).build()
    return m, m.solutions[0]


def test_one_pka_input_per_substance() -> None:
    m, spec = buffer()
    keys = [i.key for i in inputs_of(spec, m.conditions)]
    assert keys == ["pka[0][0]", "log_c[0]", "log_c[1]", "temperature"]


def test_normal_pka_coverage_interval_is_the_closed_form() -> None:
    # pH = pKa + const with pKa ~ N(µ, u²): the 95 % interval is µ ± 1.96 u.
    m, spec = buffer(u=0.02)
    mc = monte_carlo(("henderson-hasselbalch",), spec, m.conditions, 0.05, draws=1_000_000, seed=1)
    ph0 = float(equilibrium(spec.to_solution(m.conditions)).ph)
    lo, hi = mc.exact.coverage
    # Monte-Carlo standard error of a 2.5 % quantile with 10^6 draws is about 0.004 u
    assert lo == pytest.approx(ph0 - K95 * 0.02, abs=0.0005)
    assert hi == pytest.approx(ph0 + K95 * 0.02, abs=0.0005)
    assert mc.exact.u == pytest.approx(0.02, rel=0.005)


def test_rectangular_pka_coverage_interval_is_the_closed_form() -> None:
    # pKa rectangular with half-width a = √3 u: the 95 % interval is µ ± 0.95 a.
    m, spec = buffer(u=0.02, distribution="rectangular")
    mc = monte_carlo(("henderson-hasselbalch",), spec, m.conditions, 0.05, draws=1_000_000, seed=2)
    ph0 = float(equilibrium(spec.to_solution(m.conditions)).ph)
    a = np.sqrt(3.0) * 0.02
    assert mc.exact.coverage[0] == pytest.approx(ph0 - 0.95 * a, abs=0.0005)
    assert mc.exact.coverage[1] == pytest.approx(ph0 + 0.95 * a, abs=0.0005)


def test_monte_carlo_agrees_with_gum_for_a_nearly_linear_model() -> None:
    m, spec = buffer(u=0.02, tol="1 %", ttol=1.0)
    g, errors = gum(("henderson-hasselbalch",), spec, m.conditions, {"henderson-hasselbalch": key_step("henderson-hasselbalch", spec, m.conditions)})
    mc = monte_carlo(("henderson-hasselbalch",), spec, m.conditions, 0.05, draws=200_000, seed=3)
    assert mc.exact.u == pytest.approx(g.u, rel=0.01)
    assert mc.exact.mean == pytest.approx(g.value, abs=0.001)
    assert compare(g, mc.exact).validated  # normal-dominated output: GUM validated (JCGM 101 §8)


def test_gum_not_validated_when_a_rectangular_input_dominates() -> None:
    # The output is then nearly rectangular and y ± 1.96 u_c overstates the
    # 95 % interval: JCGM 101 §8 flags it.
    m2, spec2 = buffer(u=0.02, distribution="rectangular")
    g2, _ = gum(("henderson-hasselbalch",), spec2, m2.conditions, {"henderson-hasselbalch": (0, 0)})
    mc2 = monte_carlo(("henderson-hasselbalch",), spec2, m2.conditions, 0.05, draws=200_000, seed=4)
    assert not compare(g2, mc2.exact).validated


def test_runs_are_reproducible_with_a_seed() -> None:
    m, spec = buffer(u=0.02, tol="2 %", ttol=1.0)
    a = monte_carlo(("henderson-hasselbalch",), spec, m.conditions, 0.05, draws=50_000, seed=11)
    b = monte_carlo(("henderson-hasselbalch",), spec, m.conditions, 0.05, draws=50_000, seed=11)
    c = monte_carlo(("henderson-hasselbalch",), spec, m.conditions, 0.05, draws=50_000, seed=12)
    assert a == b
    assert a.exact.coverage != c.exact.coverage
    d = monte_carlo(("henderson-hasselbalch",), spec, m.conditions, 0.05, draws=50_000, seed=11, spawn_key=(1,))
    assert d.exact.coverage != a.exact.coverage


def test_sensitivity_coefficients_match_the_textbook_limits() -> None:
    # Concentrated weak acid: pH ≈ ½(pKa − log C): ∂pH/∂pKa = ½, ∂pH/∂log C = −½.
    m = MethodBuilder().solution(acid(4.0, conc="0.5 mol/L", lo="0.1 mol/L", hi="1 mol/L", tol="1 %"), shortcuts=["weak-acid-square-root"]).build()
    spec = m.solutions[0]
    g, errors = gum(("weak-acid-square-root",), spec, m.conditions, {"weak-acid-square-root": (0, 0)})
    assert g.coefficients.d_pka == pytest.approx(0.5, abs=0.005)
    assert g.coefficients.d_log_c == pytest.approx(-0.5, abs=0.005)
    pka_input = next(c for c in g.contributions if c.key == "pka[0][0]")
    assert pka_input.coefficient == pytest.approx(0.5, abs=0.005)
    assert g.u == pytest.approx(np.sqrt(sum((c.coefficient * c.u) ** 2 for c in g.contributions)), rel=1e-12)


def test_temperature_coefficient_of_tris_buffer() -> None:
    # TRIS buffer: pH ≈ pKa(T); d pKa/dT = −ΔH°/(R ln10 T²) with ΔH° = 47.45 kJ/mol
    # (Goldberg et al. 2002) and the ΔCp° term: about −0.028 per K at 25 °C.
    comp = tris_buffer("0.1 mol/L", "0.01 mol/L", "0.2 mol/L", 0.005)
    m = MethodBuilder(temperature_tolerance=1.0).solution(*comp, shortcuts=["henderson-hasselbalch"]).build()
    g, _ = gum(("henderson-hasselbalch",), m.solutions[0], m.conditions, {"henderson-hasselbalch": (0, 0)})
    want = -47450 / (8.314462618 * np.log(10) * 298.15**2)
    assert g.coefficients.d_temperature == pytest.approx(want, abs=0.002)
