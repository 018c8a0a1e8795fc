r"""Exact acid–base equilibrium: charge balance with water autoprotolysis.

The unknown is h = [H⁺] [mol/L]. For component k added in state r_k (protons
removed) with fractions α_kj of its states j = 0 … n_k, the charge balance,
written as a proton condition relative to the forms as added, is

.. math::
    \underbrace{h + C_b + \sum_k C_k \sum_{j<r_k}(r_k - j)\,\alpha_{kj}}_{P(h)}
    \;=\;
    \underbrace{\frac{K_w'}{h} + C_a + \sum_k C_k \sum_{j>r_k}(j - r_k)\,\alpha_{kj}}_{N(h)}

    \alpha_{kj} = \frac{D_{kj}}{\sum_i D_{ki}},\qquad
    D_{k0} = 1,\quad D_{kj} = D_{k,j-1}\,\frac{K'_{kj}}{h}

where C_a and C_b are the added strong acid and base, K' are the conditional
(concentration) constants and K_w' the conditional ion product. The counter-
ions of the added forms cancel out of this form of the balance. P rises and N
falls with h, so G(x) = ln P − ln N is strictly increasing in x = ln h and has
exactly one root. It is found by Newton's method on G, safeguarded by a
bracket that is proved to contain the root:

.. math::
    h_{hi} = \tfrac12\left(a + \sqrt{a^2 + 4K_w'}\right),\; a = C_a + \sum_k C_k (n_k - r_k);
    \qquad
    h_{lo} = \frac{2K_w'}{b + \sqrt{b^2 + 4K_w'}},\; b = C_b + \sum_k C_k r_k

With an activity model, log γ_z = z² f(I) and

.. math::
    \log K'_{kj} = \log K_{kj} + 2 f(I)\,(z_{k0} - j), \qquad \log K_w' = \log K_w - 2 f(I)

    I = I_{bg} + \tfrac12\Bigl(h + \frac{K_w'}{h} + C_a + C_b
        + \sum_k C_k\bigl(|z_{k0} - r_k| + \sum_j \alpha_{kj}(z_{k0} - j)^2\bigr)\Bigr)

Carbon dioxide (see :mod:`dossier.chemistry.carbonate`) enters through one
hook. *Closed*: a total C_T of H₂CO₃* added, i.e. one more component
(removed = 0, charge 0, pK₁ and pK₂ of Plummer & Busenberg at the
temperature). *Open*: the dissolved s = [H₂CO₃*] = K_H p_CO₂ is fixed, so its
ions enter the balance unnormalized,

.. math::
    N(h) \mathrel{+}= \frac{sK_1'}{h} + \frac{2sK_1'K_2'}{h^2},\qquad
    \frac{dN}{d\ln h} \mathrel{+}= -\frac{sK_1'}{h} - \frac{4sK_1'K_2'}{h^2}

and the upper bracket becomes h_hi = ½(a + √(a² + 4(K_w' + sK_1'))) + (2sK_1'K_2')^{1/3}.

The ionic strength is the root of ψ(I) = I(h(I)) − I, found per point by a
secant iteration kept inside a bracket [0, I_max]; each step re-solves the
charge balance from the previous h.

The pH is reported on the activity scale, pH = −log10(γ_H h), and on the
concentration scale, pH_c = −log10 h.

References
----------
.. [1] W. Stumm and J. J. Morgan, Aquatic Chemistry, 3rd ed. (Wiley, 1996),
   ch. 3 (proton condition, charge balance).
.. [2] J. N. Butler, Ionic Equilibrium: Solubility and pH Calculations
   (Wiley, 1998), ch. 3.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .activity import BATES_GUGGENHEIM_BA, ActivityModelId, activity_model
from .carbonate import carbonic_pka, log_henry
from .errors import ConvergenceError, InputRangeError
from .species import Component, Number, Solution
from .water import debye_huckel_a, debye_huckel_b
from .water import pkw as pkw_iapws_01mpa

__all__ = ["Equilibrium", "CarbonateState", "equilibrium", "buffer_capacity", "titrant_for_ph", "TOLERANCE"]

LN10 = float(np.log(10.0))
TOLERANCE = 1e-12
"""Convergence tolerance on ln h (and relative, on the ionic strength)."""
_MAX_NEWTON = 200
_MAX_OUTER = 150
_SECANT_STEPS = 40
I_CEILING = 1000.0
"""Largest ionic strength the iteration searches [mol/kg], far beyond any activity model's range."""


@dataclass(frozen=True, eq=False)
class CarbonateState:
    """The carbonic acid system of a solved equilibrium (mode open or closed).

    Every numeric field is a float or an array of the solution's shape.

    Attributes
    ----------
    mode : str
        ``open`` or ``closed`` (see :class:`~dossier.chemistry.species.CarbonDioxide`).
    partial_pressure_atm : float or array or None
        CO₂ partial pressure [atm] (open), None (closed).
    henry_mol_per_l_atm : float or array or None
        Henry's constant K_H at the temperature [mol/(L·atm)] (open), None (closed).
    dissolved_co2, bicarbonate, carbonate : float or array
        [H₂CO₃*], [HCO₃⁻], [CO₃²⁻] [mol/L].
    total : float or array
        Dissolved inorganic carbon C_T, the sum of the three [mol/L].
    pk1, pk2 : float or array
        Thermodynamic pK₁, pK₂ at the temperature (Plummer & Busenberg 1982).
    """

    mode: str
    partial_pressure_atm: Number | None
    henry_mol_per_l_atm: Number | None
    dissolved_co2: Number
    bicarbonate: Number
    carbonate: Number
    total: Number
    pk1: Number
    pk2: Number


@dataclass(frozen=True, eq=False)
class Equilibrium:
    """The solved equilibrium of a :class:`~dossier.chemistry.species.Solution`.

    Every numeric field is a float for a scalar solution, or an array of the
    solution's broadcast shape.

    Attributes
    ----------
    ph : float or array
        pH on the activity scale, −log10 a(H⁺).
    ph_conc : float or array
        pH on the concentration scale, −log10([H⁺]/(mol/L)).
    ionic_strength : float or array
        Ionic strength I [mol/kg], self-consistent with the speciation.
    fractions : tuple of arrays
        One array per component, of shape ``(n + 1,) + shape``: the fraction
        of that component in each protonation state j = 0 … n (j protons
        removed). Each sums to 1 over the first axis.
    residual : float or array
        Charge-balance residual (P − N)/max(P, N), relative to the largest side.
    iterations : int
        Solver iterations needed by the slowest point (all loops together).
    pkw : float or array
        Thermodynamic pKw used at the solution's temperature.
    log_gamma : float or array
        log10 γ of a monovalent ion at the final ionic strength (0 if ideal).
    carbonate : CarbonateState or None
        The carbonic acid system; None when the solution's CO₂ mode is none.
    """

    ph: Number
    ph_conc: Number
    ionic_strength: Number
    fractions: tuple[NDArray[np.float64], ...]
    residual: Number
    iterations: int
    pkw: Number
    log_gamma: Number
    carbonate: CarbonateState | None = None


# ---------------------------------------------------------------- kernels
@dataclass
class _Comp:
    """One component flattened for the kernels (arrays are 1-D or 0-d)."""

    total: NDArray[np.float64]
    log_k: list[NDArray[np.float64]]  # thermodynamic log10 K per step
    removed: int
    charge: int  # of the fully protonated form
    fixed: bool = False  # open gas: ``total`` is the fixed concentration of the neutral form

    def take(self, sel: NDArray[np.intp], *, constants: bool = True) -> _Comp:
        """The points ``sel``; ``constants=False`` leaves ``log_k`` as is (the Newton loop uses only K')."""
        log_k = [_take(v, sel) for v in self.log_k] if constants else self.log_k
        return _Comp(_take(self.total, sel), log_k, self.removed, self.charge, self.fixed)


def _take(a: NDArray[np.float64], sel: NDArray[np.intp]) -> NDArray[np.float64]:
    return a if a.ndim == 0 else a[sel]


class _Work:
    """Work arrays, one per name, reused across Newton iterations and blocks.

    Every temporary of the kernels is written into one of these with ``out=``
    instead of a new array: a block's dozen temporaries of 128 KiB each would
    otherwise be taken from and given back to the C heap on every evaluation,
    and the heap hands such memory back to the system when it shrinks, so each
    evaluation paid page faults for fresh pages (measured: 86 → 9 ns per point
    for one evaluation of a monoprotic balance on 16 384 points).

    ``shape`` is the largest shape served; :meth:`size` sets how many leading
    points a 1-D work set uses now (after compaction, fewer).
    """

    def __init__(self, shape: tuple[int, ...]) -> None:
        self.shape = shape
        self.k: int | None = None
        self._bufs: dict[object, NDArray] = {}

    @classmethod
    def of(cls, *arrays) -> _Work:  # noqa: ANN002
        """A fresh work set for the broadcast shape of ``arrays`` (callers outside the solve loop)."""
        return cls(np.broadcast_shapes(*(np.shape(v) for v in arrays)))

    def size(self, x: NDArray[np.float64]) -> None:
        """Serve arrays of x's length from now on (1-D work sets only)."""
        self.k = x.shape[0] if len(self.shape) == 1 and x.ndim == 1 else None

    def __call__(self, key: object, dtype: type = np.float64) -> NDArray:
        buf = self._bufs.get((key, dtype))
        if buf is None:
            buf = self._bufs[(key, dtype)] = np.empty(self.shape, dtype=dtype)
        return buf if self.k is None else buf[: self.k]


def _fractions(k: list[NDArray[np.float64]], inv_h: NDArray[np.float64], ws: _Work, tag: object = 0) -> list[NDArray[np.float64]]:
    """α_j = D_j / Σ D with D_0 = 1, D_j = D_{j−1} K_j / h, in the work arrays ``(tag, j)``."""
    d = [np.multiply(k[0], inv_h, out=ws((tag, 1)))]
    for j, kj in enumerate(k[1:], start=2):
        dj = np.multiply(kj, inv_h, out=ws((tag, j)))
        d.append(np.multiply(d[-1], dj, out=dj))
    alpha0 = ws((tag, 0))
    if len(d) > 1:
        np.add(d[0], d[1], out=alpha0)
        for dj in d[2:]:
            alpha0 += dj
        alpha0 += 1.0
    else:
        np.add(d[0], 1.0, out=alpha0)
    np.reciprocal(alpha0, out=alpha0)
    for dj in d:
        dj *= alpha0
    return [alpha0] + d


def _ratios(k: list[NDArray[np.float64]], inv_h: NDArray[np.float64]) -> list[NDArray[np.float64]]:
    """D_j / D_0 for a species held at a fixed concentration of state 0 (open CO₂)."""
    d = [np.ones_like(inv_h), k[0] * inv_h]
    for kj in k[1:]:
        d.append(d[-1] * (kj * inv_h))
    return d


def _is_zero(a: NDArray[np.float64]) -> bool:
    return a.ndim == 0 and not a


def _balance(x, kw, comps_k, comps, ca, cb, derivative=True, ws=None):  # noqa: ANN001, ANN202 - hot kernel
    """G = ln(P/N) and dG/dx at x = ln h; also P, N and the fractions.

    Every array is formed in the work set ``ws`` (a fresh one if None): the
    results are valid until the next call with the same work set. The
    derivative of N is kept negated, −dN/dx, so that every term adds. With
    ``derivative=False`` only P, N and the fractions are formed, and h and
    K_w'/h take the place of G and dG/dx (the final evaluation at the root
    needs no more, and the ionic strength reuses them).
    """
    if ws is None:
        ws = _Work.of(x, kw, ca, cb, *(c.total for c in comps), *(v for k in comps_k for v in k))
    ws.size(x)
    h = np.exp(x, out=ws("h"))
    inv_h = np.reciprocal(h, out=ws("inv_h"))
    oh = np.multiply(kw, inv_h, out=ws("oh"))
    p = h if _is_zero(cb) else np.add(h, cb, out=ws("p"))
    n = oh if _is_zero(ca) else np.add(oh, ca, out=ws("n"))
    # p, dp, n, dn_neg may still be h or oh: the first term goes into their own array
    dp = h
    dn_neg = oh  # −dN/dx
    w, dw = ws("w"), ws("dw")
    alphas = []
    for i, (comp, k) in enumerate(zip(comps, comps_k)):
        # An open gas's ions scale with 1/h^j at fixed state 0: d ln D_j / d ln h = −j, i.e. r̄ = 0.
        a = _ratios(k, inv_h) if comp.fixed else _fractions(k, inv_h, ws, i)
        alphas.append(a)
        two = len(a) == 2 and not comp.fixed  # one step: r̄ = α₁ and 1 − r̄ = α₀
        rbar = 0.0
        if derivative and not (comp.fixed or two):
            rbar = ws("rbar")
            np.copyto(rbar, a[1])
            for j in range(2, len(a)):
                rbar += np.multiply(a[j], j, out=dw)
        r = comp.removed
        for j, aj in enumerate(a):
            if j == r:
                continue
            if abs(r - j) == 1:
                np.multiply(comp.total, aj, out=w)
            else:
                np.multiply(abs(r - j), comp.total, out=w)
                w *= aj
            if j < r:
                p = np.add(p, w, out=p if p is not h else ws("p"))
                if not derivative:
                    continue
                if two:
                    np.multiply(w, a[1], out=dw)  # d w / dx = w (r̄ − j)
                else:
                    np.multiply(w, np.subtract(rbar, j, out=dw), out=dw)
                dp = np.add(dp, dw, out=dp if dp is not h else ws("dp"))
            else:
                n = np.add(n, w, out=n if n is not oh else ws("n"))
                if not derivative:
                    continue
                if two:
                    np.multiply(w, a[0], out=dw)  # −d w / dx = w (j − r̄)
                else:
                    np.multiply(w, np.subtract(j, rbar, out=dw), out=dw)
                dn_neg = np.add(dn_neg, dw, out=dn_neg if dn_neg is not oh else ws("dn"))
    if not derivative:
        return h, oh, p, n, alphas
    g = np.log(np.divide(p, n, out=ws("g")), out=ws("g"))
    dg = np.divide(dn_neg, n, out=ws("dg"))
    if dp is p:  # P = h alone: dP/dx / P = 1
        dg += 1.0
    else:
        dg += np.divide(dp, p, out=w)
    return g, dg, p, n, alphas


def _h_upper(a, kw, comps, comps_k):  # noqa: ANN001, ANN202
    """An upper bound on h at the root (module docstring), with the open-gas terms."""
    q = kw
    extra = 0.0
    for comp, k in zip(comps, comps_k):
        if comp.fixed:  # s K1/h and 2 s K1 K2/h² on the N side
            q = q + comp.total * k[0]
            if len(k) > 1:
                extra = extra + np.cbrt(2.0 * comp.total * k[0] * k[1])
    return 0.5 * (a + np.sqrt(a * a + 4.0 * q)) + extra


def _start(kw, comps_k, comps, ca, cb, lo, hi, out):  # noqa: ANN001, ANN202
    r"""A start for Newton's method: the weak-acid and weak-base limits combined.

    .. math::
        h_0^2 = K_w'\,\frac{K_w' + C_a^2 + \sum_k C_k K'_{k,r_k+1}}{K_w' + C_b^2 + \sum_k C_k K_w'/K'_{k,r_k}}

    Each component gives off its next proton as a weak acid (h² ≈ C K) and
    takes one up as a weak base ([OH⁻]² ≈ C K_w/K); for an acid alone this is
    h ≈ √(C K + K_w), for a base alone [OH⁻] ≈ √(C K_w/K + K_w), and for an
    acid with as much of its conjugate base h ≈ K (Henderson–Hasselbalch).
    Any start inside the bracket [lo, hi] gives the same root; this one only
    saves steps. Written into ``out``.
    """
    acid = kw if _is_zero(ca) else kw + ca * ca
    base = kw if _is_zero(cb) else kw + cb * cb
    for c, k in zip(comps, comps_k):
        if c.fixed:
            continue
        if c.removed < len(k):
            acid = acid + c.total * k[c.removed]
        if c.removed > 0:
            base = base + c.total * (kw / k[c.removed - 1])
    x = np.multiply(acid, kw, out=out)
    x /= base
    np.log(x, out=x)
    x *= 0.5
    np.fmax(x, lo, out=x)  # fmax: an overflowed (NaN) start becomes lo
    return np.fmin(x, hi, out=x)


def _solve_h(m, x0, kw, comps_k, comps, ca, cb, tol, ws=None):  # noqa: ANN001, ANN202
    """Safeguarded Newton on G(ln h) = 0 for all ``m`` points; returns (x, iterations, failed).

    ``x0`` is a start per point (NaN: none) or None (no starts at all: the
    bracket's midpoint). The bracket is kept by arithmetic instead of masked
    copies: with w = −∞·G, lo ← fmax(lo, min(x, w)) and hi ← fmin(hi, max(x, w))
    move lo to x where G < 0 and hi to x where G > 0, and leave both where G
    is 0 or not a number (min/max pass the NaN, fmax/fmin drop it). The
    evaluations use the work set ``ws`` (a new one if None); the returned x
    is an array of its own.
    """
    if ws is None:
        ws = _Work((m,))
    pos_k = [c.total * (len(c.log_k) - c.removed) if len(c.log_k) - c.removed != 1 else c.total for c in comps if not c.fixed and len(c.log_k) > c.removed]
    a = sum(pos_k, ca)
    b = sum((c.total * c.removed if c.removed != 1 else c.total for c in comps if not c.fixed and c.removed), cb)
    ws.k = m
    hi, lo = ws("hi"), ws("lo")
    np.copyto(hi, _h_upper(a, kw, comps, comps_k))
    np.log(hi, out=hi)
    hi += 1e-9
    np.copyto(lo, np.log(2.0 * kw / (b + np.sqrt(b * b + 4.0 * kw))) - 1e-9)
    x = _start(kw, comps_k, comps, ca, cb, lo, hi, ws("x_odd"))  # the first step goes to x_even
    if x0 is not None:
        x = np.clip(np.where(np.isfinite(x0), x0, x), lo, hi)
    out = np.empty(m)
    pos = None  # positions in the caller's arrays of the working set (None: all, in order)
    w_kw, w_k, w_c, w_ca, w_cb = kw, comps_k, comps, ca, cb
    newton_stop = max(0.1 * np.sqrt(tol), tol)
    for it in range(1, _MAX_NEWTON + 1):
        g, dg, _, _, _ = _balance(x, w_kw, w_k, w_c, w_ca, w_cb, ws=ws)
        k = x.shape[0]
        wk, tk = ws("bracket"), ws("bracket_t")
        np.multiply(g, -np.inf, out=wk)  # −∞ where G > 0, +∞ where G < 0, NaN where G is 0 or NaN
        np.fmax(lo, np.minimum(x, wk, out=tk), out=lo)
        np.fmin(hi, np.maximum(x, wk, out=tk), out=hi)
        step = np.divide(g, dg, out=g)
        x_new = np.subtract(x, step, out=ws("x_even" if it % 2 else "x_odd"))  # never the array x is in
        # Newton's step unless it leaves the bracket (or is not finite): bisect.
        newton = np.greater_equal(x_new, lo, out=ws("newton", bool))
        newton &= np.less_equal(x_new, hi, out=ws("newton_t", bool))
        # A Newton step of size d leaves an error of order d²: stop once d² is
        # below the tolerance (with a factor 100 to spare), or any step is below it.
        if newton.all():  # the usual case: no bisection, |step| is the step taken
            done = np.less_equal(np.abs(step, out=step), newton_stop, out=newton)
        else:
            x_new = np.where(newton, x_new, 0.5 * (lo + hi))
            step = np.abs(x_new - x)
            done = (step <= tol) | (newton & (step <= newton_stop))
        x = x_new
        n_done = np.count_nonzero(done)
        if n_done == k:
            if pos is None:
                return x.copy(), it, np.zeros(m, dtype=bool)
            out[pos] = x
            return out, it, np.zeros(m, dtype=bool)
        if 4 * n_done >= k:
            keep = np.flatnonzero(~done)
            if pos is None:
                out[done] = x[done]
                pos = keep
            else:
                out[pos[done]] = x[done]
                pos = pos[keep]
            x, lo, hi = x[keep], lo[keep], hi[keep]
            w_kw, w_ca, w_cb = _take(np.asarray(w_kw), keep), _take(np.asarray(w_ca), keep), _take(np.asarray(w_cb), keep)
            w_k = [[_take(v, keep) for v in k_] for k_ in w_k]
            w_c = [c.take(keep, constants=False) for c in w_c]
    failed = np.zeros(m, dtype=bool)
    if pos is None:
        failed[:] = True
        out[:] = x
    else:
        failed[pos] = True
        out[pos] = x
    return out, _MAX_NEWTON, failed


def _ionic_strength(x, kw, alphas, comps, ca, cb, background, h_oh=None, ws=None):  # noqa: ANN001, ANN202
    """I from the speciation at x = ln h (``h_oh``: h and K_w'/h there, if already formed).

    Formed in the work set ``ws`` when given (valid until its next use), else in new arrays.
    """
    h, oh = h_oh if h_oh is not None else (np.exp(x), None)
    if ws is None:
        ws = _Work.of(x, kw, ca, cb, background, *(c.total for c in comps))
    ws.size(np.asarray(x))
    s = np.add(h, kw / h if oh is None else oh, out=ws("s"))
    if not (_is_zero(ca) and _is_zero(cb)):
        s += ca + cb
    z2, term = ws("z2"), ws("term")
    for comp, a in zip(comps, alphas):
        # Σ_j α_j (z_0 − j)², leaving out the uncharged state
        first = True
        for j, aj in enumerate(a):
            zz = (comp.charge - j) ** 2
            if zz:
                t = aj if zz == 1 else np.multiply(aj, zz, out=term)
                if first:
                    np.copyto(z2, t)
                    first = False
                else:
                    z2 += t
        q = abs(comp.charge - comp.removed)
        if first:  # a single uncharged state: only the counter-ions of the form added
            if q:
                s += np.multiply(comp.total, q, out=z2)
            continue
        if q:
            z2 += q
        s += np.multiply(comp.total, z2, out=z2)
    s *= 0.5
    if not _is_zero(background):
        s += background
    return s


def _conditional(log_kw, comps, f):  # noqa: ANN001, ANN202
    """K' and Kw' at log10 γ1 = f (f = 0: thermodynamic).

    10^y is taken as exp(y ln 10): six times cheaper than ``numpy.power`` and
    within a few ulp of it (a relative error of about |y| · 2⁻⁵³ · ln 10 in K,
    below 10⁻¹⁴ in pH).
    """
    zero = not (np.ndim(f) or f)
    kw = _pow10(log_kw if zero else log_kw - 2.0 * f)
    ks = []
    for c in comps:
        ks.append([_pow10(lk if zero else lk + 2.0 * f * (c.charge - (i + 1))) for i, lk in enumerate(c.log_k)])
    return kw, ks


def _pow10(y):  # noqa: ANN001, ANN202
    """10^y [same shape as y]."""
    out = np.multiply(y, LN10)
    return np.exp(out, out=out) if out.ndim else np.exp(out)


# ---------------------------------------------------------------- driver
CHUNK = 16384
"""Points solved together: small enough for the temporaries to stay in cache."""


def _flat(a: Number, shape: tuple[int, ...]) -> NDArray[np.float64]:
    arr = np.asarray(a, dtype=np.float64)
    if arr.ndim == 0:
        return arr
    return np.broadcast_to(arr, shape).reshape(-1)


@dataclass
class _Block:
    """Flattened inputs of a run of points (each array 1-D or 0-d)."""

    log_kw: NDArray[np.float64]
    comps: list[_Comp]
    ca: NDArray[np.float64]
    cb: NDArray[np.float64]
    background: NDArray[np.float64]
    a_dh: NDArray[np.float64]
    ba: NDArray[np.float64]

    def take(self, sel: NDArray[np.intp] | slice) -> _Block:
        return _Block(
            _take(self.log_kw, sel),
            [c.take(sel) for c in self.comps],
            _take(self.ca, sel),
            _take(self.cb, sel),
            _take(self.background, sel),
            _take(self.a_dh, sel),
            _take(self.ba, sel),
        )


def _prepare(solution: Solution, shape: tuple[int, ...]) -> _Block:
    t = solution.temperature
    log_kw = -np.asarray(solution.pkw if solution.pkw is not None else pkw_iapws_01mpa(t), dtype=np.float64)
    comps = []
    for comp in solution.components:
        log_k = [_flat(-np.asarray(pk), shape) for pk in comp.protolyte.pka_at(t)]
        comps.append(_Comp(_flat(comp.total, shape), log_k, comp.removed, comp.protolyte.charge))
    co2 = solution.co2
    if co2.mode != "none":  # the carbon dioxide hook: always the last component
        log_k = [_flat(-np.asarray(pk), shape) for pk in carbonic_pka(t)]
        if co2.mode == "open":
            s = np.power(10.0, np.asarray(log_henry(t))) * np.asarray(co2.partial_pressure)
            comps.append(_Comp(_flat(s, shape), log_k, 0, 0, fixed=True))
        else:
            comps.append(_Comp(_flat(co2.total, shape), log_k, 0, 0))
    if solution.activity == ActivityModelId.IDEAL:
        a_dh, ba = np.asarray(0.0), np.asarray(0.0)
    else:
        a_dh = _flat(debye_huckel_a(t), shape)
        if solution.ion_size is None:
            ba = np.asarray(BATES_GUGGENHEIM_BA)
        else:
            ba = _flat(np.asarray(debye_huckel_b(t)) * solution.ion_size, shape)
    return _Block(
        _flat(log_kw, shape),
        comps,
        _flat(solution.strong_acid, shape),
        _flat(solution.strong_base, shape),
        _flat(solution.background, shape),
        a_dh,
        ba,
    )


def _point_description(solution: Solution, flat_index: int) -> tuple[tuple[int, ...], str]:
    shape = solution.shape
    idx = tuple(int(i) for i in np.unravel_index(flat_index, shape)) if shape else ()

    def at(v: Number) -> float:
        arr = np.asarray(v, dtype=np.float64)
        return float(np.broadcast_to(arr, shape)[idx]) if shape else float(arr)

    parts = [f"temperature={at(solution.temperature):g} °C"]
    for c in solution.components:
        pk = ", ".join(f"{at(v):g}" for v in c.protolyte.pka)
        parts.append(f"{c.protolyte.name}: total={at(c.total):g} mol/L, pKa=({pk}), removed={c.removed}")
    if np.any(np.asarray(solution.strong_acid)) or np.any(np.asarray(solution.strong_base)):
        parts.append(f"strong acid={at(solution.strong_acid):g}, strong base={at(solution.strong_base):g} mol/L")
    return idx, "; ".join(parts)


def _raise_unconverged(solution: Solution, first: int, count: int, what: str) -> None:
    idx, desc = _point_description(solution, first)
    where = f" at index {idx}" if idx else ""
    raise ConvergenceError(f"{what} did not converge{where} ({count} point(s) failed; first: {desc})", idx)


def equilibrium(solution: Solution, *, tolerance: float = TOLERANCE) -> Equilibrium:
    r"""Solve the exact acid–base equilibrium of a solution.

    Solves the charge balance with water autoprotolysis (see the module
    docstring for the equations) for every point of the solution's broadcast
    grid at once; with an activity model, iterates the ionic strength to
    self-consistency.

    Parameters
    ----------
    solution : Solution
        What is dissolved, at which temperature, with which activity model.
    tolerance : float
        Convergence tolerance on ln h [dimensionless] and, relative, on I.

    Returns
    -------
    Equilibrium
        pH on both scales, ionic strength, fractions, residual, iterations.

    Raises
    ------
    ConvergenceError
        If any point does not converge; the message names the first one.

    Examples
    --------
    1.0×10⁻⁸ mol/L HCl with Kw = 1.0×10⁻¹⁴ (Hill, Petrucci et al., General
    Chemistry, 4th ed., problem 15.109: pH = 6.98):

    >>> round(equilibrium(Solution(strong_acid=1e-8, pkw=14.0)).ph, 2)
    6.98

    0.100 mol/L HF, Ka = 7.0×10⁻⁴ (Brown, LeMay & Bursten, ch. 16: pH 2.10):

    >>> from dossier.chemistry import Protolyte, Component
    >>> hf = Protolyte("hydrofluoric", (-np.log10(7.0e-4),))
    >>> round(equilibrium(Solution([Component(hf, 0.100)], pkw=14.0)).ph, 2)
    2.1

    References
    ----------
    .. [1] W. Stumm and J. J. Morgan, Aquatic Chemistry, 3rd ed. (1996), ch. 3.
    """
    shape = solution.shape
    size = int(np.prod(shape)) if shape else 1
    block = _prepare(solution, shape)
    model = activity_model(solution.activity)
    davies = float(solution.davies_coefficient)

    ideal = model.id == ActivityModelId.IDEAL
    ph_conc = np.empty(size)
    # Ideal: pH on both scales is the same number, and log γ is zero.
    ph = ph_conc if ideal else np.empty(size)
    log_gamma1 = np.zeros(size)
    ionic = np.empty(size)
    residual = np.empty(size)
    fractions = [np.empty((c.protolyte.steps + 1, size)) for c in solution.components]
    has_co2 = solution.co2.mode != "none"
    co2_species = np.empty((3, size)) if has_co2 else None
    iterations = 0
    ws = _Work((min(size, CHUNK),))  # the work arrays of every block
    # Overflow at trial points far from the root is expected and handled by the brackets.
    with np.errstate(over="ignore", invalid="ignore", divide="ignore", under="ignore"):
        for start in range(0, size, CHUNK):
            sl = slice(start, min(start + CHUNK, size))
            part = block.take(sl) if shape else block
            m = sl.stop - sl.start
            last = None
            if ideal:
                args = _kernel_args(part, 0.0)
                x, its, failed = _solve_h(m, None, *args, tolerance, ws)
                what = "the charge balance"
            else:
                x, f, its, failed, what, last = _solve_with_activity(part, m, model.unit_log_gamma, davies, tolerance, ws)
            if failed.any():
                _raise_unconverged(solution, start + int(np.flatnonzero(failed)[0]), int(failed.sum()), what)
            iterations = max(iterations, its)
            if last is not None:  # the ionic-strength loop's final evaluation is at this x and f already
                (kw, ks, comps, ca, cb), p, n, alphas, ionic[sl] = last
            else:
                if not ideal:
                    args = _kernel_args(part, f)
                kw, ks, comps, ca, cb = args
                h, oh, p, n, alphas = _balance(x, kw, ks, comps, ca, cb, derivative=False, ws=ws)
                ionic[sl] = _ionic_strength(x, kw, alphas, comps, ca, cb, part.background, (h, oh), ws)
            np.divide(np.subtract(p, n, out=residual[sl]), np.maximum(p, n, out=ws("w")), out=residual[sl])
            np.multiply(x, -1.0 / LN10, out=ph_conc[sl])
            if not ideal:
                np.subtract(ph_conc[sl], f, out=ph[sl])
                log_gamma1[sl] = f
            for dest, a in zip(fractions, alphas):
                for j, aj in enumerate(a):
                    dest[j, sl] = aj
            if co2_species is not None:
                for j, aj in enumerate(alphas[-1]):
                    co2_species[j, sl] = comps[-1].total * aj
    if not (np.all(np.isfinite(ph)) and np.all(np.isfinite(ionic))):
        bad = ~(np.isfinite(ph) & np.isfinite(ionic))
        _raise_unconverged(solution, int(np.flatnonzero(bad)[0]), int(bad.sum()), "the solve (a value overflowed)")

    def shaped(v: NDArray[np.float64]) -> Number:
        if not shape:
            return float(v[0])
        arr = v.reshape(shape)
        arr.setflags(write=False)
        return arr

    for i, fr in enumerate(fractions):
        fractions[i] = fr.reshape((fr.shape[0],) + shape)
        fractions[i].setflags(write=False)
    # one temperature: a read-only view of the one value instead of a filled array
    pkw_used = np.broadcast_to(-block.log_kw, (size,))
    pkw_used = pkw_used if block.log_kw.ndim == 0 else pkw_used.copy()
    carbonate = _carbonate_state(solution, co2_species, shaped) if co2_species is not None else None
    return Equilibrium(
        ph=shaped(ph),
        ph_conc=shaped(ph_conc),
        ionic_strength=shaped(ionic),
        fractions=tuple(fractions),
        residual=shaped(residual),
        iterations=int(iterations),
        pkw=shaped(pkw_used),
        log_gamma=shaped(log_gamma1),
        carbonate=carbonate,
    )


def _carbonate_state(solution: Solution, species: NDArray[np.float64], shaped) -> CarbonateState:  # noqa: ANN001
    t = solution.temperature

    def full(v: Number) -> Number:
        return shaped(np.broadcast_to(np.asarray(v, dtype=np.float64), solution.shape).reshape(-1).copy()) if solution.shape else float(v)

    pk1, pk2 = carbonic_pka(t)
    co2 = solution.co2
    is_open = co2.mode == "open"
    return CarbonateState(
        mode=co2.mode,
        partial_pressure_atm=full(co2.partial_pressure) if is_open else None,
        henry_mol_per_l_atm=full(np.power(10.0, np.asarray(log_henry(t)))) if is_open else None,
        dissolved_co2=shaped(species[0]),
        bicarbonate=shaped(species[1]),
        carbonate=shaped(species[2]),
        total=shaped(species.sum(axis=0)),
        pk1=full(pk1),
        pk2=full(pk2),
    )


def _kernel_args(block: _Block, f):  # noqa: ANN001, ANN202
    kw, ks = _conditional(block.log_kw, block.comps, f)
    return kw, ks, block.comps, block.ca, block.cb


def _solve_with_activity(block: _Block, m: int, unit_log_gamma, davies: float, tol: float, ws: _Work):  # noqa: ANN001, ANN202
    """Secant iteration on ψ(I) = I(h(I)) − I, bracketed in [0, I_max], per point.

    Returns (x, f, iterations, failed, what, last): ``last`` is the final
    evaluation — (kernel arguments, P, N, fractions, I) at the returned x and
    f, in the work set ``ws`` — when every point of the block stopped at the
    same outer iteration (the usual case on Monte Carlo draws), else None.
    """

    def log_gamma(b: _Block, i):  # noqa: ANN001, ANN202
        return unit_log_gamma(np.sqrt(i), i, b.a_dh, b.ba, davies)

    # Bounds on the ionic strength: every species in its most highly charged state ...
    i_max = block.background + 0.5 * (4.0 * (block.ca + block.cb) + 2.0e-6)
    for c in block.comps:
        if c.fixed:
            continue
        zmax = max(abs(c.charge - j) for j in range(len(c.log_k) + 1))
        i_max = i_max + 0.5 * c.total * (abs(c.charge - c.removed) + zmax**2 + 4.0 * len(c.log_k))
    i_max = np.broadcast_to(i_max, (m,)).astype(np.float64)
    # ... plus water at the conditional ion product reached at that bound.
    i_max = i_max + 2.0 * np.sqrt(np.power(10.0, block.log_kw - 2.0 * log_gamma(block, np.minimum(i_max, I_CEILING))))
    if any(c.fixed for c in block.comps):
        # Open gas: its ions' charge equals, at the root, at most P = h + C_b + Σ C r,
        # and their ionic strength at most twice that (|z| ≤ 2).
        f_b = log_gamma(block, np.minimum(i_max, I_CEILING))
        kw_b, ks_b = _conditional(block.log_kw, block.comps, f_b)
        a_b = block.ca + sum(c.total * (len(c.log_k) - c.removed) for c in block.comps if not c.fixed)
        b_b = block.cb + sum(c.total * c.removed for c in block.comps if not c.fixed)
        i_max = i_max + 2.0 * (b_b + _h_upper(a_b, kw_b, block.comps, ks_b))

    # Start from the ionic strength of the forms as added.
    i_now = block.background + 0.5 * (block.ca + block.cb)
    for c in block.comps:
        if c.fixed:
            continue
        q = abs(c.charge - c.removed)
        i_now = i_now + 0.5 * c.total * (q + q * q)
    i_now = np.broadcast_to(i_now + 1e-7, (m,)).astype(np.float64)

    hi = np.minimum(i_max, I_CEILING)
    i_now = np.minimum(i_now, hi)
    x_all = np.full(m, np.nan)
    f_all = np.zeros(m)
    lo = np.zeros(m)
    prev_i = np.full(m, np.nan)
    prev_psi = np.full(m, np.nan)
    pos = np.arange(m)
    sub = block
    total_iterations = 0
    for outer in range(_MAX_OUTER):
        f = log_gamma(sub, i_now)
        kw, ks, comps, ca, cb = _kernel_args(sub, f)
        x, its, failed = _solve_h(pos.size, x_all[pos], kw, ks, comps, ca, cb, tol, ws)
        total_iterations += its
        if failed.any():
            bad = np.zeros(m, dtype=bool)
            bad[pos[failed]] = True
            return x_all, f_all, total_iterations, bad, "the charge balance", None
        h, oh, p, n, alphas = _balance(x, kw, ks, comps, ca, cb, derivative=False, ws=ws)
        phi = _ionic_strength(x, kw, alphas, comps, ca, cb, sub.background, (h, oh), ws)
        psi = phi - i_now
        x_all[pos] = x
        f_all[pos] = f
        scale = np.maximum(i_now, phi)
        l_, h_ = lo[pos], hi[pos]
        l_ = np.where(psi > 0.0, i_now, l_)
        h_ = np.where((psi < 0.0) | ~np.isfinite(psi), i_now, h_)  # an overflow only happens far above the root
        lo[pos], hi[pos] = l_, h_
        converged = np.abs(psi) <= tol * scale + 1e-300
        # The bracket can shrink below what ψ resolves: stop there when ψ is small too.
        pinched = (h_ - l_ <= 4.0 * tol * scale) & (np.abs(psi) <= 1e-8 * scale)
        stuck = (h_ - l_ <= 4.0 * tol * scale) & ~(converged | pinched)
        if stuck.any():
            bad = np.zeros(m, dtype=bool)
            bad[pos[stuck]] = True
            beyond = bool(np.any(l_[stuck] >= I_CEILING * (1 - 1e-9)))
            why = f"the ionic-strength iteration (the ionic strength passes {I_CEILING:g} mol/kg, beyond the range of any activity model)" if beyond else "the ionic-strength iteration"
            return x_all, f_all, total_iterations, bad, why, None
        done = converged | pinched
        if done.all():
            # ``pos`` still the whole block: every point is at this evaluation
            last = ((kw, ks, comps, ca, cb), p, n, alphas, phi) if pos.size == m else None
            return x_all, f_all, total_iterations, np.zeros(m, dtype=bool), "", last
        p_i, p_psi = prev_i[pos], prev_psi[pos]
        with np.errstate(divide="ignore", invalid="ignore"):
            secant = i_now - psi * (i_now - p_i) / (psi - p_psi)
        mid = 0.5 * (l_ + h_)
        if outer >= _SECANT_STEPS:  # safeguard: plain bisection from here on
            nxt = mid
        else:
            nxt = np.where(np.isfinite(secant), secant, phi)
            nxt = np.where((nxt > l_) & (nxt < h_), nxt, np.where((phi > l_) & (phi < h_), phi, mid))
        prev_i[pos], prev_psi[pos] = i_now, psi
        keep = np.flatnonzero(~done)
        pos, i_now = pos[keep], nxt[keep]
        sub = sub.take(keep)
    bad = np.zeros(m, dtype=bool)
    bad[pos] = True
    return x_all, f_all, total_iterations, bad, "the ionic-strength iteration", None


# ---------------------------------------------------------------- derived quantities
def _solved_args(solution: Solution, eq: Equilibrium):  # noqa: ANN202
    """Kernel arguments at the solved ionic strength, and x = ln h, all flattened."""
    shape = solution.shape
    block = _prepare(solution, shape)
    f = _flat(eq.log_gamma, shape)
    x = _flat(eq.ph_conc, shape) * -LN10
    return _kernel_args(block, f), x, block


def _shaped_out(v: NDArray[np.float64], shape: tuple[int, ...]) -> Number:
    v = np.asarray(v, dtype=np.float64)
    return float(v.reshape(-1)[0]) if not shape else np.broadcast_to(v, (int(np.prod(shape)),)).reshape(shape).copy()


def buffer_capacity(solution: Solution, exact: Equilibrium | None = None) -> Number:
    r"""Buffer capacity β = dC_b/dpH [mol/L per pH], exact and analytic.

    The strong base C_b needed to hold the solution at h is, from the charge
    balance, C_b(h) = N(h) − P₀(h) (P₀: P without C_b), so

    .. math::
        \beta = \frac{dC_b}{d\mathrm{pH}} = \ln 10\left(\frac{dP}{d\ln h} - \frac{dN}{d\ln h}\right)
             = \ln 10\;P\,\frac{dG}{d\ln h}

    at the root (where P = N), with the derivative the solver already forms.
    For one monoprotic acid of total C this is the closed form of Van Slyke,

    .. math::
        \beta = \ln 10\left(\frac{C K_a h}{(K_a + h)^2} + h + \frac{K_w}{h}\right)

    The derivative is taken at the equilibrium ionic strength held fixed
    (conditional constants) and with respect to the concentration-scale pH;
    an open CO₂ system contributes its own capacity (the gas is taken up or
    released), a closed one as a component of fixed total.

    Parameters
    ----------
    solution : Solution
    exact : Equilibrium, optional
        The solved equilibrium of ``solution``, if already at hand.

    Returns
    -------
    float or array
        β [mol/(L·pH)], of the solution's shape.

    Examples
    --------
    Pure water at Kw = 1e-14: β = ln 10 · 2 × 10⁻⁷:

    >>> round(buffer_capacity(Solution(pkw=14.0)) / 1e-7, 4)
    4.6052

    References
    ----------
    .. [1] D. D. Van Slyke, J. Biol. Chem. 52, 525–570 (1922).
    .. [2] J. N. Butler, Ionic Equilibrium (Wiley, 1998), ch. 4 (buffer index).
    """
    eq = exact if exact is not None else equilibrium(solution)
    (kw, ks, comps, ca, cb), x, _ = _solved_args(solution, eq)
    with np.errstate(over="ignore", under="ignore"):
        _, dg, p, _, _ = _balance(x, kw, ks, comps, ca, cb)
    return _shaped_out(LN10 * p * dg, solution.shape)


TITRANTS = ("strong-base", "strong-acid")
"""The strong titrants :func:`titrant_for_ph` knows by name: monovalent, fully dissociated."""
Q_FLOOR = 1e-9
"""Smallest |q| [charge per mole] a weak titrant may carry at the target: below it
the titrant hardly changes the charge balance there and cannot move the pH."""


def _titrant_kernel(titrant: Component, solution: Solution, shape: tuple[int, ...]) -> _Comp:
    """A weak titrant flattened for the kernels (its total is set per iteration)."""
    log_k = [_flat(-np.asarray(pk), shape) for pk in titrant.protolyte.pka_at(solution.temperature)]
    return _Comp(np.zeros(()), log_k, titrant.removed, titrant.protolyte.charge)


def titrant_for_ph(solution: Solution, target_ph: ArrayLike, titrant: str | Component = "strong-base", *, tolerance: float = TOLERANCE) -> Number:
    r"""Amount of titrant that brings the solution to a target pH.

    The titrant enters the charge balance linearly. Per mole added it
    contributes its net charge at h, q(h), to P − N: for a strong base
    q = +1 (P gains C_b), for a strong acid q = −1 (N gains C_a), and for a
    weak acid–base substance added in form r (r protons removed from the
    fully protonated form, its counter-ions inert)

    .. math::
        q(h) = \sum_j (r - j)\,\alpha_j(h) = r - \bar r(h),

    the charges of its states weighted by their fractions plus those of its
    counter-ions. At the target h* = 10^(−pH*)/γ_H the balance
    P(h*) − N(h*) + x q(h*) = 0 gives the amount in closed form,

    .. math::
        x = \frac{N(h^*) - P(h^*)}{q(h^*)}.

    With an activity model the titrant's own ions change the ionic strength,
    so this is repeated at the ionic strength of the titrated solution until
    it no longer changes (a fixed-point iteration).

    Parameters
    ----------
    solution : Solution
        The solution before adjustment (it may already hold strong acid or base,
        or the titrant's own substance).
    target_ph : float or array
        Target pH on the activity scale (the concentration scale when ideal).
    titrant : str or Component
        ``strong-base``, ``strong-acid``, or a weak titrant: a
        :class:`~dossier.chemistry.Component` whose protolyte and ``removed``
        (the form added) are used; its ``total`` is ignored.

    Returns
    -------
    float or array
        Titrant to add [mol per litre of final solution] (volume change neglected).

    Raises
    ------
    InputRangeError
        Unknown titrant; a target this titrant cannot reach (the solution is
        already beyond it: it needs a titrant that pushes the other way); or a
        weak titrant whose net charge at the target is nearly zero (|q| < 1e-9).
    ConvergenceError
        If the ionic-strength iteration does not settle.

    Examples
    --------
    Acetic acid 0.1 mol/L (pKa 4.756) to pH 4.756 with NaOH, ideal: very
    nearly half of it, 0.05 mol/L (plus the [H⁺] it leaves):

    >>> from dossier.chemistry import Protolyte, Component
    >>> ac = Protolyte("acetic", (4.756,))
    >>> round(titrant_for_ph(Solution([Component(ac, 0.1)], pkw=14.0), 4.756), 5)
    0.04998

    The same acid to the same pH with sodium acetate (form 1): about as much
    acetate as acid, 0.1 mol/L (Henderson–Hasselbalch):

    >>> round(titrant_for_ph(Solution([Component(ac, 0.1)], pkw=14.0), 4.756, Component(ac, 1.0, 1)), 3)
    0.1
    """
    weak = isinstance(titrant, Component)
    if not weak and titrant not in TITRANTS:
        raise InputRangeError("titrant", f"must be one of {', '.join(TITRANTS)} or a component; got {titrant!r}")
    target = np.asarray(target_ph, dtype=np.float64)
    if not np.all(np.isfinite(target)) or np.any((target < 0.0) | (target > 16.0)):
        raise InputRangeError("target_ph", f"must be a finite pH in 0 … 16; got {target_ph!r}")
    shape = tuple(np.broadcast_shapes(solution.shape, target.shape))
    block = _prepare(solution, shape)
    tgt = _flat(target, shape) if shape else target
    model = activity_model(solution.activity)
    ideal = model.id == ActivityModelId.IDEAL
    sign = 1.0 if titrant == "strong-base" else -1.0
    t_comp = _titrant_kernel(titrant, solution, shape) if weak else None  # type: ignore[arg-type]
    f = np.zeros(tgt.shape)
    amount = np.zeros(tgt.shape)
    q = np.asarray(sign)
    with np.errstate(over="ignore", under="ignore", divide="ignore", invalid="ignore"):
        for _ in range(_MAX_OUTER):
            kw, ks, comps, ca, cb = _kernel_args(block, f)
            x = (-tgt - f) * LN10
            _, _, p, n, alphas = _balance(x, kw, ks, comps, ca, cb, derivative=False)
            extra_ca = extra_cb = 0.0
            if t_comp is not None:
                _, (t_ks,) = _conditional(block.log_kw, [t_comp], f)
                t_alpha = _fractions(t_ks, np.exp(-x), _Work.of(x, *t_ks))
                q = t_comp.removed - sum(j * a for j, a in enumerate(t_alpha) if j)
                new = np.where(np.abs(q) >= Q_FLOOR, (n - p) / q, np.nan)
            else:
                new = sign * (n - p)
            if ideal or not np.all(np.isfinite(new)):
                amount = new
                break
            if t_comp is not None:
                t_comp.total = np.maximum(new, 0.0)
                i_new = _ionic_strength(x, kw, alphas + [t_alpha], comps + [t_comp], ca, cb, block.background)
            else:
                extra_cb, extra_ca = (np.maximum(new, 0.0), 0.0) if sign > 0 else (0.0, np.maximum(new, 0.0))
                i_new = _ionic_strength(x, kw, alphas, comps, ca + extra_ca, cb + extra_cb, block.background)
            f_new = model.unit_log_gamma(np.sqrt(i_new), i_new, block.a_dh, block.ba, float(solution.davies_coefficient))
            done = np.all(np.abs(new - amount) <= tolerance * np.maximum(np.abs(new), 1e-300)) and np.all(np.abs(f_new - f) <= tolerance)
            amount, f = new, f_new
            if done:
                break
        else:
            raise ConvergenceError("titrant_for_ph: the ionic-strength iteration did not converge")

    def first(bad: NDArray[np.bool_]) -> float:
        return float(np.ravel(np.broadcast_to(tgt, np.shape(bad)))[int(np.flatnonzero(np.ravel(bad))[0])]) if np.ndim(bad) else float(tgt)

    name = f"{titrant.protolyte.name} (form {titrant.removed})" if weak else titrant  # type: ignore[union-attr]
    flat_q = np.broadcast_to(q, np.shape(amount))
    if weak and np.any(np.abs(flat_q) < Q_FLOOR):
        raise InputRangeError("target_ph", f"pH {first(np.abs(flat_q) < Q_FLOOR):g} cannot be reached with {name}: "
                              "at that pH the titrant stays almost entirely in the form added, so it does not change the charge balance")
    if np.any(amount < 0.0):
        if weak:
            other = "a titrant that moves the pH the other way"
        else:
            other = "strong-acid" if titrant == "strong-base" else "strong-base"
        raise InputRangeError("target_ph", f"pH {first(amount < 0.0):g} cannot be reached with {name}: the solution is already beyond it (it needs {other})")
    return _shaped_out(amount, shape)
