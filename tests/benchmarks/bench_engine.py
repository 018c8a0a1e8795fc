"""Engine speed: a million points in one call, against a per-point brentq loop
and against the floor of one numpy.power(10, x) over the same array.

The two ratios are measured in :data:`RUNS` consecutive runs in this one
process (issue 16: ≥ 200× the brentq loop and ≤ 30× numpy.power in three
consecutive runs); each run times the engine, the loop and the floor side by
side."""

from __future__ import annotations

import math

import numpy as np
from scipy.optimize import brentq

from dossier.chemistry import Component, Protolyte, Solution, equilibrium, pkw
from dossier.chemistry.solver import TOLERANCE

from .run import Row, timed

N_SIDE = 1000  # 1000 × 1000 = 10⁶ points
N_BRENTQ = 20_000  # the per-point loop is timed on a subset and compared per point
RUNS = 3


def _grids() -> tuple[np.ndarray, np.ndarray]:
    pka = np.linspace(-2.0, 16.0, N_SIDE)[:, None]
    total = np.logspace(-10.0, 1.0, N_SIDE)[None, :]
    return np.broadcast_to(pka, (N_SIDE, N_SIDE)), np.broadcast_to(total, (N_SIDE, N_SIDE))


def _brentq_loop(pka: np.ndarray, total: np.ndarray) -> np.ndarray:
    """What a user would otherwise write: one scipy.optimize.brentq per point.

    A fair loop: the same balance as the engine solves (monoprotic acid in
    water, ideal), bracketed over the whole pH range, to the engine's own
    tolerance (:data:`dossier.chemistry.solver.TOLERANCE` on ln h, i.e.
    TOLERANCE / ln 10 on log10 h), with the inputs as Python floats (numpy
    scalars would make every evaluation slower and flatter the engine).
    """
    kw = 10.0 ** -float(pkw(25.0))
    xtol = TOLERANCE / math.log(10.0)
    out = []
    for p, c in zip(pka.ravel().tolist(), total.ravel().tolist()):
        ka = 10.0**-p

        def balance(log_h: float) -> float:
            h = 10.0**log_h
            return h - kw / h - c * ka / (ka + h)

        out.append(-brentq(balance, -16.0, 2.0, xtol=xtol))
    return np.asarray(out)


def run() -> list[Row]:
    pka, total = _grids()
    mono = Solution([Component(Protolyte("mono", (pka,)), total)])
    tri_total = np.broadcast_to(np.logspace(-6.0, -1.0, N_SIDE)[None, :], (N_SIDE, N_SIDE))
    tri_t = np.broadcast_to(np.linspace(5.0, 45.0, N_SIDE)[:, None], (N_SIDE, N_SIDE))
    tri = Solution(
        [Component(Protolyte("phosphoric", (2.148, 7.198, 12.35), dh=(-7.9, 3.0, 15.0)), tri_total, 1)],
        temperature=tri_t,
        activity="davies",
    )
    n = pka.size
    x = -np.asarray(pka, dtype=np.float64).copy()

    rng = np.random.default_rng(0)
    pick = rng.choice(n, N_BRENTQ, replace=False)
    sub_p, sub_c = pka.ravel()[pick], total.ravel()[pick]
    rows: list[Row] = []
    vs_loop, vs_pow = [], []
    for k in range(1, RUNS + 1):
        t_mono = timed(lambda: equilibrium(mono), repeat=5)
        t_pow = timed(lambda: np.power(10.0, x), repeat=9)
        t_loop = timed(lambda: _brentq_loop(sub_p, sub_c), repeat=1)
        vs_loop.append((t_loop / N_BRENTQ) / (t_mono / n))
        vs_pow.append(t_mono / t_pow)
        rows.append(Row(f"run {k}: monoprotic ideal grid, 10^6 points", n / t_mono, "points/s", f"{t_mono:.3f} s"))
        rows.append(Row(f"run {k}: engine / brentq loop, per point", vs_loop[-1], "× faster", "aim ≥ 200×"))
        rows.append(Row(f"run {k}: engine / one numpy.power(10, x), 10^6", vs_pow[-1], "× the floor", "aim ≤ 30×"))
    t_tri = timed(lambda: equilibrium(tri), repeat=3)
    t_loop = timed(lambda: _brentq_loop(sub_p, sub_c), repeat=1)
    t_vec_sub = timed(lambda: equilibrium(Solution([Component(Protolyte("mono", (sub_p,)), sub_c)])), repeat=5)
    t_pow = timed(lambda: np.power(10.0, x), repeat=9)

    # the loop and the engine agree, so the comparison is like for like
    diff = np.max(np.abs(_brentq_loop(sub_p[:500], sub_c[:500]) - equilibrium(Solution([Component(Protolyte("m", (sub_p[:500],)), sub_c[:500])])).ph))
    met = sum(a >= 200.0 and b <= 30.0 for a, b in zip(vs_loop, vs_pow))
    return rows + [
        Row("runs meeting both aims", met, f"of {RUNS}"),
        Row("triprotic Davies grid (with temperature), 10^6 points", n / t_tri, "points/s", f"{t_tri:.3f} s"),
        Row("per-point brentq loop (monoprotic ideal)", N_BRENTQ / t_loop, "points/s", f"timed on {N_BRENTQ} points"),
        Row("engine on the same 2·10^4 points / brentq loop", t_loop / t_vec_sub, "× faster"),
        Row("triprotic Davies grid / one numpy.power(10, x)", t_tri / t_pow, "× the floor"),
        Row("max |pH(engine) − pH(brentq)| on 500 points", diff, "pH", f"brentq xtol {TOLERANCE / math.log(10.0):.2g} in log10 h"),
    ]
