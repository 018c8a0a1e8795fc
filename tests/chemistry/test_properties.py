"""Properties of the exact solver that must hold everywhere (hypothesis, derandomized)."""

from __future__ import annotations

import numpy as np
from hypothesis import given
from hypothesis import strategies as st

from dossier.chemistry import Component, Protolyte, Solution, equilibrium, pkw

pka_st = st.floats(-2.0, 16.0)
log_c_st = st.floats(-10.0, 1.0)
temp_st = st.floats(0.0, 95.0)
model_st = st.sampled_from(["ideal", "debye-huckel", "extended-debye-huckel", "davies"])


@st.composite
def solutions(draw: st.DrawFn) -> Solution:
    comps = []
    for i in range(draw(st.integers(1, 3))):
        n = draw(st.integers(1, 3))
        pka = sorted(draw(st.lists(pka_st, min_size=n, max_size=n)))
        comps.append(
            Component(
                Protolyte(f"p{i}", tuple(pka), charge=draw(st.integers(-1, 2))),
                10 ** draw(log_c_st),
                draw(st.integers(0, n)),
            )
        )
    return Solution(
        comps,
        temperature=draw(temp_st),
        activity=draw(model_st),
        strong_acid=draw(st.sampled_from([0.0, 1e-6, 1e-3, 0.1])),
        strong_base=draw(st.sampled_from([0.0, 1e-6, 1e-3, 0.1])),
        background=draw(st.sampled_from([0.0, 0.01, 0.15])),
    )


@given(solutions())
def test_residual_is_small_and_fractions_sum_to_one(s: Solution) -> None:
    eq = equilibrium(s)
    assert np.isfinite(eq.ph) and np.isfinite(eq.ionic_strength)
    assert abs(eq.residual) < 1e-12
    for fr in eq.fractions:
        assert abs(fr.sum() - 1.0) < 1e-12
        assert (fr >= 0).all()


@given(pka_st, st.floats(0.01, 3.0), log_c_st, temp_st)
def test_weak_acid_ph_rises_with_pka(pka: float, step: float, log_c: float, t: float) -> None:
    lo = equilibrium(Solution([Component(Protolyte("a", (pka,)), 10**log_c)], temperature=t)).ph
    hi = equilibrium(Solution([Component(Protolyte("a", (min(pka + step, 16.0),)), 10**log_c)], temperature=t)).ph
    assert hi >= lo - 1e-12


@given(pka_st, log_c_st, st.floats(0.05, 2.0), temp_st)
def test_weak_acid_ph_falls_with_concentration(pka: float, log_c: float, step: float, t: float) -> None:
    acid = Protolyte("a", (pka,))
    dilute = equilibrium(Solution([Component(acid, 10**log_c)], temperature=t)).ph
    strong = equilibrium(Solution([Component(acid, 10 ** min(log_c + step, 1.0))], temperature=t)).ph
    assert strong <= dilute + 1e-12


@given(pka_st, log_c_st, temp_st)
def test_acid_and_mirror_base_sum_to_pkw(pka: float, log_c: float, t: float) -> None:
    """A weak acid of pKa p and a weak base of pKb = p (the conjugate base of
    an acid with pKa = pKw − p) at the same concentration: the base's charge
    balance in [OH⁻] is the acid's in [H⁺], so the two pH values sum to pKw
    exactly (ideal solution)."""
    pkw_t = float(pkw(t))
    c = 10**log_c
    ph_acid = equilibrium(Solution([Component(Protolyte("HA", (pka,)), c, 0)], temperature=t)).ph
    ph_base = equilibrium(Solution([Component(Protolyte("HB+", (pkw_t - pka,), charge=1), c, 1)], temperature=t)).ph
    assert abs(ph_acid + ph_base - pkw_t) < 1e-9


@given(pka_st, st.integers(1, 3), temp_st, model_st)
def test_infinite_dilution_gives_neutral_water(pka: float, n: int, t: float, model: str) -> None:
    pkas = tuple(sorted(pka + 0.5 * i for i in range(n)))
    pkas = tuple(min(p, 16.0) for p in pkas)
    eq = equilibrium(Solution([Component(Protolyte("a", pkas), 1e-14, 0)], temperature=t, activity=model))
    assert abs(eq.ph - float(pkw(t)) / 2) < 1e-4
