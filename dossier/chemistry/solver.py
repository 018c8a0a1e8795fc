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
from numpy.typing import NDArray

from .activity import BATES_GUGGENHEIM_BA, ActivityModelId, activity_model
from .errors import ConvergenceError
from .species import Number, Solution
from .water import debye_huckel_a, debye_huckel_b
from .water import pkw as pkw_iapws_01mpa

__all__ = ["Equilibrium", "equilibrium", "TOLERANCE"]

LN10 = float(np.log(10.0))
TOLERANCE = 1e-12
"""Convergence tolerance on ln h (and relative, on the ionic strength)."""
_MAX_NEWTON = 200
_MAX_OUTER = 150
_SECANT_STEPS = 40
I_CEILING = 1000.0
"""Largest ionic strength the iteration searches [mol/kg], far beyond any activity model's range."""


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
    """

    ph: Number
    ph_conc: Number
    ionic_strength: Number
    fractions: tuple[NDArray[np.float64], ...]
    residual: Number
    iterations: int
    pkw: Number
    log_gamma: Number


# ---------------------------------------------------------------- kernels
@dataclass
class _Comp:
    """One component flattened for the kernels (arrays are 1-D or 0-d)."""

    total: NDArray[np.float64]
    log_k: list[NDArray[np.float64]]  # thermodynamic log10 K per step
    removed: int
    charge: int  # of the fully protonated form

    def take(self, sel: NDArray[np.intp], *, constants: bool = True) -> _Comp:
        """The points ``sel``; ``constants=False`` leaves ``log_k`` as is (the Newton loop uses only K')."""
        log_k = [_take(v, sel) for v in self.log_k] if constants else self.log_k
        return _Comp(_take(self.total, sel), log_k, self.removed, self.charge)


def _take(a: NDArray[np.float64], sel: NDArray[np.intp]) -> NDArray[np.float64]:
    return a if a.ndim == 0 else a[sel]


def _fractions(k: list[NDArray[np.float64]], inv_h: NDArray[np.float64]) -> list[NDArray[np.float64]]:
    """α_j = D_j / Σ D with D_0 = 1, D_j = D_{j−1} K_j / h."""
    d = [k[0] * inv_h]
    for kj in k[1:]:
        d.append(d[-1] * (kj * inv_h))
    alpha0 = 1.0 / (1.0 + sum(d[1:], d[0]))
    return [alpha0] + [dj * alpha0 for dj in d]


def _is_zero(a: NDArray[np.float64]) -> bool:
    return a.ndim == 0 and not a


def _balance(x, kw, comps_k, comps, ca, cb):  # noqa: ANN001, ANN202 - hot kernel
    """G = ln(P/N) and dG/dx at x = ln h; also P, N and the fractions."""
    h = np.exp(x)
    inv_h = 1.0 / h
    oh = kw * inv_h
    p = h if _is_zero(cb) else h + cb
    n = oh if _is_zero(ca) else oh + ca
    dp = h
    dn = -oh
    alphas = []
    for comp, k in zip(comps, comps_k):
        a = _fractions(k, inv_h)
        alphas.append(a)
        rbar = a[1] if len(a) == 2 else sum(j * aj for j, aj in enumerate(a) if j)
        r = comp.removed
        for j, aj in enumerate(a):
            if j == r:
                continue
            w = comp.total * aj if abs(r - j) == 1 else (abs(r - j) * comp.total) * aj
            if j < r:
                p = p + w
                dp = dp + w * (rbar - j)
            else:
                n = n + w
                dn = dn + w * (rbar - j)
    g = np.log(p / n)
    dg = dp / p - dn / n
    return g, dg, p, n, alphas


def _solve_h(x0, kw, comps_k, comps, ca, cb, tol):  # noqa: ANN001, ANN202
    """Safeguarded Newton on G(ln h) = 0 for all points; returns (x, iterations, failed)."""
    a = ca + sum(c.total * (len(c.log_k) - c.removed) for c in comps)
    b = cb + sum(c.total * c.removed for c in comps)
    m = x0.shape[0]
    kw_full = np.broadcast_to(kw, (m,))
    a = np.broadcast_to(a, (m,))
    b = np.broadcast_to(b, (m,))
    hi = np.log(0.5 * (a + np.sqrt(a * a + 4.0 * kw_full))) + 1e-9
    lo = np.log(2.0 * kw_full / (b + np.sqrt(b * b + 4.0 * kw_full))) - 1e-9
    x = np.where(np.isfinite(x0), x0, 0.5 * (lo + hi))
    x = np.clip(x, lo, hi)
    out = x.copy()
    pos = np.arange(m)  # positions in the caller's arrays of the working set
    w_kw, w_k, w_c, w_ca, w_cb = kw, comps_k, comps, ca, cb
    newton_stop = 0.1 * np.sqrt(tol)
    for it in range(1, _MAX_NEWTON + 1):
        g, dg, _, _, _ = _balance(x, w_kw, w_k, w_c, w_ca, w_cb)
        lo = np.where(g < 0.0, x, lo)  # a non-finite G (overflow) updates neither end
        hi = np.where(g > 0.0, x, hi)
        step = np.divide(g, dg, out=g)
        x_new = x - step
        # Newton's step unless it leaves the bracket (or is not finite): bisect.
        newton = (x_new >= lo) & (x_new <= hi)
        # A Newton step of size d leaves an error of order d²: stop once d² is
        # below the tolerance (with a factor 100 to spare), or any step is below it.
        if newton.all():  # the usual case: no bisection, |step| is the step taken
            done = np.abs(step, out=step) <= max(newton_stop, tol)
        else:
            x_new = np.where(newton, x_new, 0.5 * (lo + hi))
            step = np.abs(x_new - x)
            done = (step <= tol) | (newton & (step <= newton_stop))
        x = x_new
        n_done = np.count_nonzero(done)
        if n_done == done.size:
            out[pos] = x
            return out, it, np.zeros(m, dtype=bool)
        if 4 * n_done >= done.size:
            out[pos[done]] = x[done]
            keep = np.flatnonzero(~done)
            pos, x, lo, hi = pos[keep], x[keep], lo[keep], hi[keep]
            w_kw, w_ca, w_cb = _take(np.asarray(w_kw), keep), _take(np.asarray(w_ca), keep), _take(np.asarray(w_cb), keep)
            w_k = [[_take(v, keep) for v in k] for k in w_k]
            w_c = [c.take(keep, constants=False) for c in w_c]
    failed = np.zeros(m, dtype=bool)
    failed[pos] = True
    out[pos] = x
    return out, _MAX_NEWTON, failed


def _ionic_strength(x, kw, alphas, comps, ca, cb, background):  # noqa: ANN001, ANN202
    h = np.exp(x)
    s = h + kw / h
    if not (_is_zero(ca) and _is_zero(cb)):
        s = s + (ca + cb)
    for comp, a in zip(comps, alphas):
        # Σ_j α_j (z_0 − j)², leaving out the uncharged state
        z2 = None
        for j, aj in enumerate(a):
            zz = (comp.charge - j) ** 2
            if zz:
                term = aj if zz == 1 else zz * aj
                z2 = term if z2 is None else z2 + term
        q = abs(comp.charge - comp.removed)
        if z2 is None:  # a single uncharged state
            z2 = 0.0
        s = s + comp.total * (q + z2) if q else s + comp.total * z2
    return background + 0.5 * s if not _is_zero(background) else 0.5 * s


def _conditional(log_kw, comps, f):  # noqa: ANN001, ANN202
    """K' and Kw' at log10 γ1 = f (f = 0: thermodynamic)."""
    kw = np.power(10.0, log_kw - 2.0 * f) if np.ndim(f) or f else np.power(10.0, log_kw)
    ks = []
    for c in comps:
        ks.append([np.power(10.0, lk + 2.0 * f * (c.charge - (i + 1))) for i, lk in enumerate(c.log_k)])
    return kw, ks


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
    iterations = 0
    # Overflow at trial points far from the root is expected and handled by the brackets.
    with np.errstate(over="ignore", invalid="ignore", divide="ignore", under="ignore"):
        for start in range(0, size, CHUNK):
            sl = slice(start, min(start + CHUNK, size))
            part = block.take(sl) if shape else block
            m = sl.stop - sl.start
            if ideal:
                args = _kernel_args(part, 0.0)
                x, its, failed = _solve_h(np.full(m, np.nan), *args, tolerance)
                what = "the charge balance"
            else:
                x, f, its, failed, what = _solve_with_activity(part, m, model.unit_log_gamma, davies, tolerance)
                args = _kernel_args(part, f)
            if failed.any():
                _raise_unconverged(solution, start + int(np.flatnonzero(failed)[0]), int(failed.sum()), what)
            iterations = max(iterations, its)
            kw, ks, comps, ca, cb = args
            _, _, p, n, alphas = _balance(x, kw, ks, comps, ca, cb)
            ionic[sl] = _ionic_strength(x, kw, alphas, comps, ca, cb, part.background)
            residual[sl] = (p - n) / np.maximum(p, n)
            np.multiply(x, -1.0 / LN10, out=ph_conc[sl])
            if not ideal:
                np.subtract(ph_conc[sl], f, out=ph[sl])
                log_gamma1[sl] = f
            for dest, a in zip(fractions, alphas):
                for j, aj in enumerate(a):
                    dest[j, sl] = aj
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
    pkw_used = np.broadcast_to(-block.log_kw, (size,)).copy()
    return Equilibrium(
        ph=shaped(ph),
        ph_conc=shaped(ph_conc),
        ionic_strength=shaped(ionic),
        fractions=tuple(fractions),
        residual=shaped(residual),
        iterations=int(iterations),
        pkw=shaped(pkw_used),
        log_gamma=shaped(log_gamma1),
    )


def _kernel_args(block: _Block, f):  # noqa: ANN001, ANN202
    kw, ks = _conditional(block.log_kw, block.comps, f)
    return kw, ks, block.comps, block.ca, block.cb


def _solve_with_activity(block: _Block, m: int, unit_log_gamma, davies: float, tol: float):  # noqa: ANN001, ANN202
    """Secant iteration on ψ(I) = I(h(I)) − I, bracketed in [0, I_max], per point."""

    def log_gamma(b: _Block, i):  # noqa: ANN001, ANN202
        return unit_log_gamma(np.sqrt(i), i, b.a_dh, b.ba, davies)

    # Bounds on the ionic strength: every species in its most highly charged state ...
    i_max = block.background + 0.5 * (4.0 * (block.ca + block.cb) + 2.0e-6)
    for c in block.comps:
        zmax = max(abs(c.charge - j) for j in range(len(c.log_k) + 1))
        i_max = i_max + 0.5 * c.total * (abs(c.charge - c.removed) + zmax**2 + 4.0 * len(c.log_k))
    i_max = np.broadcast_to(i_max, (m,)).astype(np.float64)
    # ... plus water at the conditional ion product reached at that bound.
    i_max = i_max + 2.0 * np.sqrt(np.power(10.0, block.log_kw - 2.0 * log_gamma(block, np.minimum(i_max, I_CEILING))))

    # Start from the ionic strength of the forms as added.
    i_now = block.background + 0.5 * (block.ca + block.cb)
    for c in block.comps:
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
        x, its, failed = _solve_h(x_all[pos], kw, ks, comps, ca, cb, tol)
        total_iterations += its
        if failed.any():
            bad = np.zeros(m, dtype=bool)
            bad[pos[failed]] = True
            return x_all, f_all, total_iterations, bad, "the charge balance"
        _, _, _, _, alphas = _balance(x, kw, ks, comps, ca, cb)
        phi = _ionic_strength(x, kw, alphas, comps, ca, cb, sub.background)
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
            return x_all, f_all, total_iterations, bad, why
        done = converged | pinched
        if done.all():
            return x_all, f_all, total_iterations, np.zeros(m, dtype=bool), ""
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
    return x_all, f_all, total_iterations, bad, "the ionic-strength iteration"
