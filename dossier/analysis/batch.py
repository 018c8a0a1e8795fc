"""The uncertain inputs of a method solution, and the variation that moves them.

The uncertainty analyses (GUM and Monte Carlo) see a solution as a list of
typed :class:`Input` values; :func:`variation_from` turns deviations of those
inputs into the :class:`~dossier.inputs.convert.Variation` that
:func:`~dossier.inputs.convert.solution_for` applies in one vectorized
engine call.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum

import numpy as np
from numpy.typing import NDArray

from ..inputs.convert import Variation, solution_for
from .. import limits
from ..inputs.model import ConditionsSpec, Distribution, SolutionSpec
from ..inputs.quality import Concern, data_flags, unknown_enthalpy_pka_half_width

__all__ = ["Variation", "solution_for", "InputKind", "Input", "inputs_of", "variation_from", "same_substance", "TOTAL_MAX"]

TOTAL_MAX = limits.SWEEP_CONCENTRATION[1]
"""Highest concentration any component reaches in a sweep [mol/L]."""

Arr = NDArray[np.float64] | float


class InputKind(StrEnum):
    """What an uncertain input is."""

    PKA = "pka"
    """A 25 °C thermodynamic pKa of one substance and step."""
    CONCENTRATION = "log_c"
    """The total of one component, varied on log10 c."""
    TEMPERATURE = "temperature"
    """The working temperature."""
    BACKGROUND = "background"
    """The background ionic strength."""
    PKA_AT_TEMPERATURE = "pka_at_t"
    """The shift of a pKa at the working temperature that a missing ΔH° leaves open."""


@dataclass(frozen=True)
class Input:
    """An uncertain input of a solution, as the uncertainty analyses see it.

    Attributes
    ----------
    kind : InputKind
    component : int or None
        For a pKa or a concentration: the component (for a pKa, the first
        component of its substance); None for the concentration of a strong
        acid or base alone (``strong`` says which).
    step : int or None
        For a pKa: the ionization step (0 = first).
    label : str
        For people, e.g. ``pKa2 of phosphoric acid``, ``concentration of
        potassium dihydrogen phosphate, KH₂PO₄``.
    unit : str
        Unit of the input as varied (``pKa``, ``log10(c/(mol/L))``, ``°C``, ``mol/kg``).
    nominal : float
        Nominal value in that unit.
    u : float
        Standard uncertainty in that unit.
    distribution : Distribution
    half_width : float
        Half-width of a rectangular distribution, in the input's own quantity
        (pKa, °C, mol/kg; for a concentration, the relative tolerance a of
        c·(1 ± a)). 0 for a normal distribution.
    targets : tuple of (int, int)
        For a pKa: every (component, step) it belongs to — one substance
        added in two forms has one pKa, not two.
    strong : str
        ``acid`` or ``base`` for the concentration of a strong acid or base
        alone in its solution (it scales the whole solution); empty otherwise.
    """

    kind: InputKind
    component: int | None
    step: int | None
    label: str
    unit: str
    nominal: float
    u: float
    distribution: Distribution
    half_width: float
    targets: tuple[tuple[int, int], ...] = ()
    strong: str = ""

    @property
    def key(self) -> str:
        """The stable identifier results.json and the tables use: ``pka[0][1]``
        (component 0, step 2), ``log_c[1]``, ``log_c[strong_acid]``, ``temperature``, ``background``."""
        if self.kind in (InputKind.PKA, InputKind.PKA_AT_TEMPERATURE):
            return f"{self.kind}[{self.component}][{self.step}]"
        if self.kind == InputKind.CONCENTRATION:
            return f"log_c[{self.component}]" if self.component is not None else f"log_c[strong_{self.strong}]"
        return str(self.kind)

    def draw(self, rng: np.random.Generator, n: int) -> NDArray[np.float64]:
        """``n`` deviations from nominal, in the input's unit, from its distribution.

        Concentrations are drawn uniformly in c (not in log c) and returned as
        log10 of the factor.
        """
        if self.u == 0.0:
            return np.zeros(n)
        if self.kind == InputKind.CONCENTRATION:
            return np.log10(1.0 + self.half_width * rng.uniform(-1.0, 1.0, n))
        if self.distribution == Distribution.NORMAL:
            # truncated (a change of the distribution below 1e-15), so that no
            # draw leaves the range the method file was checked for
            cut = limits.DRAW_TRUNCATION_SIGMAS * self.u
            return np.clip(rng.normal(0.0, self.u, n), -cut, cut)
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
        if inp.kind in (InputKind.PKA, InputKind.PKA_AT_TEMPERATURE):
            for t in inp.targets:
                pka_shift[t] = pka_shift.get(t, 0.0) + d
        elif inp.kind == InputKind.CONCENTRATION:
            if inp.component is None:  # a strong acid or base alone: it is the whole solution
                scale = scale * np.power(10.0, d)
            else:
                total_factor[inp.component] = np.power(10.0, d)
        elif inp.kind == InputKind.TEMPERATURE:
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
    return tuple((k, step) for k in spec.same_substance(component))


def inputs_of(spec: SolutionSpec, conditions: ConditionsSpec) -> tuple[Input, ...]:
    """Every input of a solution with a stated uncertainty (u may be 0).

    pKa values: standard uncertainty as stated, on the 25 °C thermodynamic
    value; one input per substance and step. Concentrations: the tolerance ±a
    is a rectangular distribution, so u(c) = a/√3, taken on log10 c with
    u = u(c)/(c ln 10). Temperature and background ionic strength: their
    tolerances ±a, rectangular (JCGM 100:2008 §4.3.7). Last, for each pKa
    without ΔH° when the working temperature ± tolerance leaves 25 °C: the
    pKa shift at the working temperature, rectangular over ±a/(R ln 10)·|1/T −
    1/T₀| with a = 50 kJ/mol (:func:`dossier.inputs.quality.unknown_enthalpy_pka_half_width`),
    so that an unknown temperature dependence enters the budget instead of zero.
    """
    out: list[Input] = []
    root3 = float(np.sqrt(3.0))
    seen: set[str] = set()
    for k, c in enumerate(spec.components):
        if c.substance in seen:
            continue
        seen.add(c.substance)
        for j, p in enumerate(c.pka):
            half = root3 * p.uncertainty if p.distribution == Distribution.RECTANGULAR else 0.0
            out.append(Input(InputKind.PKA, k, j, f"pKa{j + 1} of {c.name}", "pKa", p.thermodynamic, p.uncertainty,
                             p.distribution, half, same_substance(spec, k, j)))
    for k, c in enumerate(spec.components):
        rel = c.tolerance / c.concentration
        u_log = (rel / root3) / np.log(10.0)  # first order: u(log10 c) = u(c) / (c ln 10)
        out.append(Input(InputKind.CONCENTRATION, k, None, f"concentration of {c.added_as}", "log10(c/(mol/L))",
                         float(np.log10(c.concentration)), float(u_log), Distribution.RECTANGULAR, rel))
    alone = spec.strong_alone
    if alone is not None:
        rel = alone.tolerance / alone.concentration
        out.append(Input(InputKind.CONCENTRATION, None, None, f"concentration of {alone.name}", "log10(c/(mol/L))",
                         float(np.log10(alone.concentration)), float((rel / root3) / np.log(10.0)), Distribution.RECTANGULAR, rel,
                         strong=alone.kind))
    out.append(Input(InputKind.TEMPERATURE, None, None, "temperature", "°C", conditions.temperature,
                     conditions.temperature_tolerance / root3, Distribution.RECTANGULAR, conditions.temperature_tolerance))
    if conditions.background > 0.0 or conditions.background_tolerance > 0.0:
        tol = conditions.background_tolerance
        out.append(Input(InputKind.BACKGROUND, None, None, "background ionic strength", "mol/kg", conditions.background,
                         tol / root3, Distribution.RECTANGULAR, tol))
    for flag in data_flags(spec, conditions, {}):
        if flag.concern == Concern.NO_ENTHALPY:
            a = unknown_enthalpy_pka_half_width(conditions)
            name = spec.components[flag.component].name
            out.append(Input(InputKind.PKA_AT_TEMPERATURE, flag.component, flag.step, f"pKa{flag.step + 1} of {name} at the working temperature (ΔH° unknown)",
                             "pKa", 0.0, a / root3, Distribution.RECTANGULAR, a, same_substance(spec, flag.component, flag.step)))
    return tuple(out)
