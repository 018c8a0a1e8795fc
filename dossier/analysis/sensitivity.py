r"""Sensitivity coefficients and the law of propagation of uncertainty (GUM).

For the exact pH y = f(x₁ … x_N) and for each shortcut's error e = g(x₁ … x_N),
with uncorrelated inputs x_i of standard uncertainty u(x_i):

.. math::
    c_i = \frac{\partial f}{\partial x_i}, \qquad
    u_c^2(y) = \sum_i c_i^2\,u^2(x_i)

The inputs are the 25 °C pKa values, log10 of each concentration, the
temperature and (when stated) the background ionic strength
(:func:`dossier.analysis.batch.inputs_of`). Coefficients are central
differences (one-sided at the edge of the allowed range), all evaluated in one
vectorized engine call. Besides them, each input is moved alone by ±u(x_i)
(one at a time) and half the change of y is its *contribution*, used to rank
the inputs; for a nearly linear model it equals |c_i| u(x_i).

The four coefficients the dossier names are also given for the solution as a
whole: ∂pH/∂pKa (the key step), ∂pH/∂log C (every concentration together),
∂pH/∂T [per K] and ∂pH/∂I [per mol/kg of background ionic strength].

References
----------
.. [1] JCGM 100:2008, Evaluation of measurement data — Guide to the
   expression of uncertainty in measurement (GUM), §5.1.2 (law of propagation
   of uncertainty), §4.3.7 (rectangular distribution, u = a/√3).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
from numpy.typing import NDArray

from ..chemistry import equilibrium
from .. import limits
from ..inputs.model import ConditionsSpec, SolutionSpec
from .batch import Input, InputKind, inputs_of, same_substance, solution_for, variation_from

__all__ = ["Contribution", "Coefficients", "GumResult", "gum"]

_STEP = {InputKind.PKA: 1e-3, InputKind.CONCENTRATION: 1e-3, InputKind.TEMPERATURE: 0.02, InputKind.BACKGROUND: 1e-4,
         InputKind.PKA_AT_TEMPERATURE: 1e-3}


@dataclass(frozen=True)
class Contribution:
    """One input's part in the uncertainty of a quantity.

    Attributes
    ----------
    key, label, unit : str
        The input (see :class:`~dossier.analysis.batch.Input`).
    u : float
        Its standard uncertainty [unit].
    coefficient : float
        Sensitivity coefficient ∂y/∂x [pH per unit].
    contribution : float
        One-at-a-time half-change of y when x moves by ±u [pH].
    """

    key: str
    label: str
    unit: str
    u: float
    coefficient: float
    contribution: float


@dataclass(frozen=True)
class Coefficients:
    """∂y/∂pKa (key step), ∂y/∂log10 C (whole solution), ∂y/∂T [1/K], ∂y/∂I [kg/mol]."""

    d_pka: float
    d_log_c: float
    d_temperature: float
    d_ionic_strength: float


@dataclass(frozen=True)
class GumResult:
    """GUM propagation for one quantity (the exact pH, or a shortcut's error).

    Attributes
    ----------
    quantity : str
        ``exact pH`` or the shortcut id (its error).
    value : float
        At nominal inputs [pH].
    u : float
        Combined standard uncertainty u_c by the law of propagation [pH].
    contributions : tuple of Contribution
        Sorted, largest first.
    coefficients : Coefficients
    """

    quantity: str
    value: float
    u: float
    contributions: tuple[Contribution, ...]
    coefficients: Coefficients


def _steps(inp: Input) -> tuple[float, float]:
    """(−h, +h) for a central difference, one-sided where the input's range ends."""
    h = _STEP[inp.kind]
    lo, hi = -h, h
    if inp.kind == InputKind.TEMPERATURE:
        lo = max(-h, limits.TEMPERATURE[0] - inp.nominal)
        hi = min(h, limits.TEMPERATURE[1] - inp.nominal)
    if inp.kind == InputKind.BACKGROUND:
        lo = max(-h, -inp.nominal)
    return lo, hi


@dataclass(frozen=True)
class _Case:
    deltas: dict[str, float]
    log_scale: float = 0.0
    key_shift: float = 0.0
    background: float = 0.0


def gum(approx_ids: tuple[str, ...], spec: SolutionSpec, conditions: ConditionsSpec,
        key_steps: dict[str, tuple[int, int] | None]) -> tuple[GumResult, dict[str, GumResult]]:
    """GUM propagation for the exact pH and for each shortcut's error.

    Parameters
    ----------
    approx_ids : tuple of str
        Shortcuts (each must apply to the solution).
    spec : SolutionSpec
    conditions : ConditionsSpec
    key_steps : dict
        ``{shortcut id: (component, step)}`` whose pKa the named ∂/∂pKa uses
        (None: the shortcut uses no pKa, ∂/∂pKa is 0).

    Returns
    -------
    (GumResult for the exact pH, {shortcut id: GumResult for its error})
    """
    inputs = inputs_of(spec, conditions)
    cases: list[_Case] = [_Case({})]
    index: dict[tuple[str, str], int] = {}

    def add(name: str, kind: str, case: _Case) -> None:
        index[(name, kind)] = len(cases)
        cases.append(case)

    for inp in inputs:
        lo, hi = _steps(inp)
        add(inp.key, "h-", _Case({inp.key: lo}))
        add(inp.key, "h+", _Case({inp.key: hi}))
        add(inp.key, "u-", _Case({inp.key: max(-inp.u, -inp.nominal) if inp.kind == InputKind.BACKGROUND else -inp.u}))
        add(inp.key, "u+", _Case({inp.key: inp.u}))
    add("@scale", "h-", _Case({}, log_scale=-1e-3))
    add("@scale", "h+", _Case({}, log_scale=1e-3))
    add("@pka", "h-", _Case({}, key_shift=-1e-3))
    add("@pka", "h+", _Case({}, key_shift=1e-3))
    bg_lo = -min(_STEP[InputKind.BACKGROUND], conditions.background)
    add("@background", "h-", _Case({}, background=bg_lo))
    add("@background", "h+", _Case({}, background=_STEP[InputKind.BACKGROUND]))

    deltas = {inp.key: np.array([c.deltas.get(inp.key, 0.0) for c in cases]) for inp in inputs}
    scale = np.power(10.0, np.array([c.log_scale for c in cases]))
    key_shift = np.array([c.key_shift for c in cases])
    bg_extra = np.array([c.background for c in cases])
    y: dict[str, NDArray[np.float64]] = {}
    exact_cache: dict[tuple[int, int], NDArray[np.float64]] = {}
    for sid in ("", *approx_ids):
        ks = key_steps[sid] if sid else next(iter(key_steps.values()), (0, 0))
        targets = same_substance(spec, *ks) if ks is not None else ()
        variation = variation_from(inputs, deltas, conditions, scale=scale, key_shift=(targets, key_shift))
        variation = replace(variation, background=np.maximum(np.asarray(variation.background) + bg_extra, 0.0))
        sol = solution_for(spec, conditions, variation)
        if ks not in exact_cache:
            exact_cache[ks] = np.asarray(equilibrium(sol).ph)
        exact = exact_cache[ks]
        y[sid] = exact if not sid else np.asarray(spec.approximation(sid).ph(sol)) - exact

    def pair(values: NDArray[np.float64], name: str, kind: str) -> tuple[float, float]:
        lo, hi = index[(name, kind + "-")], index[(name, kind + "+")]
        return float(values[lo]), float(values[hi])

    def step_of(name: str, kind: str) -> tuple[float, float]:
        lo, hi = cases[index[(name, kind + "-")]], cases[index[(name, kind + "+")]]
        if name.startswith("@"):
            attr = {"@scale": "log_scale", "@pka": "key_shift", "@background": "background"}[name]
            return getattr(lo, attr), getattr(hi, attr)
        return lo.deltas[name], hi.deltas[name]

    def slope(values: NDArray[np.float64], name: str) -> float:
        (a, b), (ya, yb) = step_of(name, "h"), pair(values, name, "h")
        return (yb - ya) / (b - a) if b != a else 0.0

    def summarize(name: str, values: NDArray[np.float64]) -> GumResult:
        contribs = []
        for inp in inputs:
            coef = slope(values, inp.key)
            ylo, yhi = pair(values, inp.key, "u")
            contribs.append(Contribution(inp.key, inp.label, inp.unit, inp.u, coef, abs(yhi - ylo) / 2.0 if inp.u > 0 else 0.0))
        u_c = float(np.sqrt(sum((c.coefficient * c.u) ** 2 for c in contribs)))
        temperature = next(c.coefficient for c in contribs if c.key == InputKind.TEMPERATURE)
        coefs = Coefficients(slope(values, "@pka"), slope(values, "@scale"), temperature, slope(values, "@background"))
        return GumResult(name, float(values[0]), u_c, tuple(sorted(contribs, key=lambda c: -c.contribution)), coefs)

    return summarize("exact pH", y[""]), {sid: summarize(sid, y[sid]) for sid in approx_ids}
