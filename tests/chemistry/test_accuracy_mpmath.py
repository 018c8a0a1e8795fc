"""The engine against an independent 50-digit route (tests/chemistry/mp_reference.py).

DESIGN §5: |ΔpH| ≤ 1e-9 over pKa −2…16, total 1e-10…10 mol/L, 0…95 °C, for
mono-, di- and triprotic acids in every protonation state, cations, mixtures,
strong acid/base additions and each activity model. Cases are drawn with a
seeded generator so that every run checks the same points.
"""

from __future__ import annotations

import numpy as np
import pytest

from dossier.chemistry import CarbonDioxide, Component, Protolyte, Solution, equilibrium

from . import mp_reference as ref

TOL_PH = 1e-9
MODELS = ("ideal", "debye-huckel", "extended-debye-huckel", "davies")


def _random_comp(rng: np.random.Generator) -> ref.Comp:
    n = int(rng.integers(1, 4))
    pka = sorted(float(v) for v in rng.uniform(-2.0, 16.0, n))
    total = float(10 ** rng.uniform(-10.0, 1.0))
    removed = int(rng.integers(0, n + 1))
    charge = int(rng.integers(-1, 3))
    dh = [float(v) for v in rng.uniform(-20, 60, n)] if rng.random() < 0.5 else None
    dcp = [float(v) for v in rng.uniform(-300, 100, n)] if dh is not None and rng.random() < 0.5 else None
    return ref.Comp(pka, total, removed, charge, dh, dcp)


def _cases(seed: int, count: int, model: str) -> list[ref.Case]:
    rng = np.random.default_rng(seed)
    out = []
    for _ in range(count):
        comps = [_random_comp(rng) for _ in range(int(rng.integers(1, 3)))]
        case = ref.Case(comps=comps, temperature=float(rng.uniform(0.0, 95.0)), activity=model)
        kind = rng.random()
        if kind < 0.2:
            case.strong_acid = float(10 ** rng.uniform(-10, 0))
        elif kind < 0.4:
            case.strong_base = float(10 ** rng.uniform(-10, 0))
        if rng.random() < 0.2:
            case.background = float(rng.uniform(0.0, 0.5))
        if model == "extended-debye-huckel" and rng.random() < 0.5:
            case.ion_size = float(rng.uniform(3.0, 9.0))
        out.append(case)
    return out


def _engine(case: ref.Case):
    comps = [
        Component(Protolyte(f"p{i}", tuple(c.pka), charge=c.charge, dh=c.dh, dcp=c.dcp), c.total, c.removed)
        for i, c in enumerate(case.comps)
    ]
    return equilibrium(
        Solution(
            comps,
            temperature=case.temperature,
            activity=case.activity,
            strong_acid=case.strong_acid,
            strong_base=case.strong_base,
            background=case.background,
            pkw=case.pkw,
            ion_size=case.ion_size,
            co2=CarbonDioxide(case.co2_mode, partial_pressure=case.pco2, total=case.dic),
        )
    )


def _check(case: ref.Case) -> None:
    got = _engine(case)
    want = ref.solve(case)
    assert abs(got.ph - float(want["ph"])) <= TOL_PH, (case, got.ph, float(want["ph"]))
    assert abs(got.ph_conc - float(want["ph_conc"])) <= TOL_PH, case
    i_want = float(want["ionic_strength"])
    assert abs(got.ionic_strength - i_want) <= 1e-9 * i_want + 1e-300, case


@pytest.mark.parametrize("model", MODELS)
def test_random_cases_agree_with_50_digit_route(model: str) -> None:
    for case in _cases(seed=20261202 + MODELS.index(model), count=30, model=model):
        _check(case)


@pytest.mark.parametrize(
    "case",
    [
        # corners of the domain
        ref.Case([ref.Comp([-2.0], 10.0)]),
        ref.Case([ref.Comp([16.0], 1e-10)]),
        ref.Case([ref.Comp([16.0], 10.0, removed=1)], temperature=95.0),
        ref.Case([ref.Comp([-2.0], 1e-10, removed=1)], temperature=0.0),
        ref.Case([ref.Comp([-2.0, 7.0, 16.0], 10.0, removed=0)], activity="davies"),
        ref.Case([ref.Comp([-2.0, 7.0, 16.0], 10.0, removed=3)], activity="extended-debye-huckel"),
        ref.Case([ref.Comp([2.0, 9.0, 12.0], 10.0, removed=2, charge=1)], activity="debye-huckel", temperature=95.0),
        ref.Case([], strong_acid=1e-8, pkw=14.0),
        ref.Case([], strong_base=10.0, activity="davies"),
        ref.Case([ref.Comp([9.25], 1e-10, removed=0, charge=1)], temperature=0.0),
        # pure water at the limits of temperature
        ref.Case([], temperature=0.0),
        ref.Case([], temperature=95.0),
    ],
    ids=lambda c: f"{len(c.comps)}comp-{c.activity}-{c.temperature:g}C",
)
def test_domain_corners(case: ref.Case) -> None:
    _check(case)


def test_vectorized_solve_matches_pointwise() -> None:
    """One broadcast call gives the same numbers as point-by-point calls."""
    rng = np.random.default_rng(7)
    pka = np.sort(rng.uniform(-2, 16, (50, 2)), axis=1)
    total = 10 ** rng.uniform(-10, 1, 50)
    t = rng.uniform(0, 95, 50)
    grid = equilibrium(Solution([Component(Protolyte("x", (pka[:, 0], pka[:, 1])), total, 1)], temperature=t, activity="davies"))
    for i in range(0, 50, 7):
        one = equilibrium(Solution([Component(Protolyte("x", tuple(pka[i])), float(total[i]), 1)], temperature=float(t[i]), activity="davies"))
        assert abs(grid.ph[i] - one.ph) <= 1e-12


# Carbon dioxide (open to a gas, closed with a total) and mixtures of two
# substances, against the same 50-digit route (its CO₂ terms are written from
# Plummer & Busenberg 1982 independently of dossier.chemistry.carbonate).
_AMMONIUM = ref.Comp([9.245], 0.01, removed=0, charge=1, dh=[51.95])
_ACETATE = ref.Comp([4.756], 0.01, removed=1, dh=[-0.41])


@pytest.mark.parametrize(
    "case",
    [
        ref.Case([], co2_mode="open", pco2=420e-6),
        ref.Case([], co2_mode="open", pco2=420e-6, temperature=0.0),
        ref.Case([], co2_mode="open", pco2=420e-6, temperature=50.0, activity="davies"),
        ref.Case([], co2_mode="open", pco2=1.0, temperature=90.0, activity="extended-debye-huckel"),
        ref.Case([], co2_mode="open", pco2=420e-6, strong_base=0.01, activity="davies"),
        ref.Case([], co2_mode="open", pco2=1e-3, strong_base=1.0, activity="debye-huckel"),
        ref.Case([ref.Comp([9.236], 0.05)], co2_mode="open", pco2=420e-6),
        ref.Case([ref.Comp([9.245], 0.1, removed=1, charge=1)], co2_mode="open", pco2=420e-6, activity="davies"),
        ref.Case([], co2_mode="closed", dic=0.05, strong_base=0.075, activity="davies"),
        ref.Case([], co2_mode="closed", dic=5e-5, temperature=37.0),
        ref.Case([ref.Comp([4.756], 0.01, removed=1)], co2_mode="closed", dic=1e-4, activity="extended-debye-huckel"),
        ref.Case([_AMMONIUM, _ACETATE], activity="davies"),
        ref.Case([_AMMONIUM, _ACETATE], co2_mode="open", pco2=420e-6, temperature=37.0, activity="davies"),
        ref.Case([ref.Comp([4.756], 0.1), ref.Comp([8.072], 0.05, removed=1, charge=1)], activity="extended-debye-huckel"),
        ref.Case([ref.Comp([3.128, 4.761, 6.396], 0.02), ref.Comp([2.148, 7.198, 12.35], 0.03, removed=2)], activity="davies"),
    ],
    ids=lambda c: f"{c.co2_mode}-{len(c.comps)}comp-{c.activity}-{c.temperature:g}C",
)
def test_co2_and_mixtures_agree_with_50_digit_route(case: ref.Case) -> None:
    _check(case)
