"""Many variants of one method solution in a single vectorized engine call.

Every analysis varies a few inputs of a :class:`~dossier.inputs.model.SolutionSpec`
(the whole solution diluted, one pKa shifted, a temperature drawn, ...) over
many cases at once. :class:`Variation` says what changes; :func:`solution_for`
builds the engine's :class:`~dossier.chemistry.Solution` with array inputs, so
that the analyses never loop over points in Python.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from ..chemistry import Component, Protolyte, Solution
from ..inputs.model import ConditionsSpec, SolutionSpec

__all__ = ["Variation", "solution_for", "Input", "inputs_of", "variation_from", "same_substance", "TOTAL_MAX"]

TOTAL_MAX = 10.0
"""Highest concentration any component reaches in a sweep [mol/L]."""

Arr = NDArray[np.float64] | float


@dataclass(frozen=True)
class Variation:
    """Changes applied to a solution, each a float or an array (all broadcast together).

    Attributes
    ----------
    scale : float or array
        Factor on every concentration (the whole solution diluted or concentrated).
    total_factor : dict
        ``{component index: factor}`` on one component's total.
    pka_shift : dict
        ``{(component index, step index): shift}`` added to a 25 °C pKa.
    pka_shift_all : dict
        ``{component index: shift}`` added to every pKa of a component.
    temperature : float or array, optional
        Working temperature [°C] instead of the method's.
    background : float or array, optional
        Background ionic strength [mol/kg] instead of the method's.
    """

    scale: Arr = 1.0
    total_factor: dict[int, Arr] = field(default_factory=dict)
    pka_shift: dict[tuple[int, int], Arr] = field(default_factory=dict)
    pka_shift_all: dict[int, Arr] = field(default_factory=dict)
    temperature: Arr | None = None
    background: Arr | None = None


def solution_for(spec: SolutionSpec, conditions: ConditionsSpec, variation: Variation | None = None) -> Solution:
    """The engine's solution for ``spec`` under ``variation`` (arrays broadcast).

    Parameters
    ----------
    spec : SolutionSpec
    conditions : ConditionsSpec
    variation : Variation, optional

    Returns
    -------
    Solution
    """
    v = variation or Variation()
    comps = []
    for k, c in enumerate(spec.components):
        base = c.protolyte()
        pka = []
        for j, p in enumerate(base.pka):
            value = p + v.pka_shift_all.get(k, 0.0) + v.pka_shift.get((k, j), 0.0)
            pka.append(value)
        protolyte = Protolyte(base.name, tuple(pka), charge=base.charge, dh=base.dh, dcp=base.dcp)
        total = c.concentration * v.scale * v.total_factor.get(k, 1.0)
        comps.append(Component(protolyte, total, c.removed))
    return Solution(
        comps,
        temperature=conditions.temperature if v.temperature is None else v.temperature,
        activity=conditions.activity,
        strong_acid=spec.strong_acid * v.scale,
        strong_base=spec.strong_base * v.scale,
        background=conditions.background if v.background is None else v.background,
    )


@dataclass(frozen=True)
class Input:
    """An uncertain input of a solution, as the uncertainty analyses see it.

    Attributes
    ----------
    key : str
        Stable identifier, e.g. ``pka[0][1]`` (substance of component 0, step
        2), ``log_c[1]``, ``temperature``, ``background``.
    label : str
        For people, e.g. ``pKa2 of phosphoric-acid``.
    unit : str
        Unit of the input as varied (``pKa``, ``log10(c/(mol/L))``, ``°C``, ``mol/kg``).
    nominal : float
        Nominal value in that unit.
    u : float
        Standard uncertainty in that unit.
    distribution : str
        ``normal`` or ``rectangular``.
    half_width : float
        Half-width of a rectangular distribution, in the input's own quantity
        (pKa, °C, mol/kg; for a concentration, the relative tolerance a of
        c·(1 ± a)). 0 for a normal distribution.
    targets : tuple of (int, int)
        For a pKa: every (component, step) it belongs to — one substance
        added in two forms has one pKa, not two.
    """

    key: str
    label: str
    unit: str
    nominal: float
    u: float
    distribution: str
    half_width: float
    targets: tuple[tuple[int, int], ...] = ()

    def draw(self, rng: np.random.Generator, n: int) -> NDArray[np.float64]:
        """``n`` deviations from nominal, in the input's unit, from its distribution.

        Concentrations are drawn uniformly in c (not in log c) and returned as
        log10 of the factor.
        """
        if self.u == 0.0:
            return np.zeros(n)
        if self.key.startswith("log_c"):
            return np.log10(1.0 + self.half_width * rng.uniform(-1.0, 1.0, n))
        if self.distribution == "normal":
            # truncated at ±8 standard deviations (a change of the distribution below 1e-15),
            # so that no draw leaves the range the method file was checked for
            return np.clip(rng.normal(0.0, self.u, n), -8.0 * self.u, 8.0 * self.u)
        return rng.uniform(-self.half_width, self.half_width, n)


def variation_from(inputs: tuple[Input, ...], deltas: dict[str, Arr], conditions: ConditionsSpec, *, scale: Arr = 1.0,
                   key_shift: tuple[tuple[tuple[int, int], ...], Arr] | None = None) -> Variation:
    """The variation that moves each input by its delta (missing keys: 0).

    ``key_shift`` = (targets, delta) adds a further pKa shift (for ∂/∂pKa of a key step).
    """
    pka_shift: dict[tuple[int, int], Arr] = {}
    total_factor: dict[int, Arr] = {}
    temperature: Arr = conditions.temperature
    background: Arr = conditions.background
    for inp in inputs:
        d = deltas.get(inp.key)
        if d is None:
            continue
        kind = inp.key.split("[")[0]
        if kind == "pka":
            for t in inp.targets:
                pka_shift[t] = pka_shift.get(t, 0.0) + d
        elif kind == "log_c":
            total_factor[int(inp.key[6:-1])] = np.power(10.0, d)
        elif kind == "temperature":
            temperature = temperature + d
        else:
            background = np.maximum(background + d, 0.0)
    if key_shift is not None:
        targets, d = key_shift
        for t in targets:
            pka_shift[t] = pka_shift.get(t, 0.0) + d
    return Variation(scale=scale, total_factor=total_factor, pka_shift=pka_shift, temperature=temperature, background=background)


def same_substance(spec: SolutionSpec, component: int, step: int) -> tuple[tuple[int, int], ...]:
    """Every (component, step) holding the same pKa as ``(component, step)``."""
    name = spec.components[component].substance
    return tuple((k, step) for k, c in enumerate(spec.components) if c.substance == name)


def inputs_of(spec: SolutionSpec, conditions: ConditionsSpec) -> tuple[Input, ...]:
    """Every input of a solution with a stated uncertainty (u may be 0).

    pKa values: standard uncertainty as stated, on the 25 °C thermodynamic
    value; one input per substance and step. Concentrations: the tolerance ±a
    is a rectangular distribution, so u(c) = a/√3, taken on log10 c with
    u = u(c)/(c ln 10). Temperature and background ionic strength: their
    tolerances ±a, rectangular (JCGM 100:2008 §4.3.7).
    """
    out: list[Input] = []
    root3 = float(np.sqrt(3.0))
    seen: set[str] = set()
    for k, c in enumerate(spec.components):
        if c.substance in seen:
            continue
        seen.add(c.substance)
        for j, p in enumerate(c.pka):
            half = root3 * p.uncertainty if p.distribution == "rectangular" else 0.0
            out.append(Input(f"pka[{k}][{j}]", f"pKa{j + 1} of {c.substance}", "pKa", p.thermodynamic, p.uncertainty,
                             p.distribution, half, same_substance(spec, k, j)))
    for k, c in enumerate(spec.components):
        rel = c.tolerance / c.concentration
        u_log = (rel / root3) / np.log(10.0)  # first order: u(log10 c) = u(c) / (c ln 10)
        out.append(Input(f"log_c[{k}]", f"concentration of {c.substance} ({c.form})", "log10(c/(mol/L))",
                         float(np.log10(c.concentration)), float(u_log), "rectangular", rel))
    out.append(Input("temperature", "temperature", "°C", conditions.temperature, conditions.temperature_tolerance / root3,
                     "rectangular", conditions.temperature_tolerance))
    if conditions.background > 0.0 or conditions.background_tolerance > 0.0:
        tol = conditions.background_tolerance
        out.append(Input("background", "background ionic strength", "mol/kg", conditions.background, tol / root3, "rectangular", tol))
    return tuple(out)
