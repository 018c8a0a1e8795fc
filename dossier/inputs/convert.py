"""The one conversion of a method's solution into the engine's :class:`~dossier.chemistry.Solution`.

Every analysis varies a few inputs of a :class:`~dossier.inputs.model.SolutionSpec`
(the whole solution diluted, one pKa shifted, a temperature drawn, ...) over
many cases at once. :class:`Variation` says what changes; :func:`solution_for`
builds the engine's solution with array inputs, so that the analyses never
loop over points in Python. The nominal solution is the empty variation
(:meth:`SolutionSpec.to_solution` calls this module).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import NDArray

from ..chemistry import Component, Solution

if TYPE_CHECKING:  # the model imports this module
    from .model import ConditionsSpec, SolutionSpec

__all__ = ["Variation", "solution_for"]

Arr = NDArray[np.float64] | float


@dataclass(frozen=True)
class Variation:
    """Changes applied to a solution, each a float or an array (all broadcast together).

    Attributes
    ----------
    scale : float or array
        Factor on every concentration (the whole solution diluted or
        concentrated), strong acid and strong base included.
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


NOMINAL = Variation()
"""No change: the solution as the method states it."""


def solution_for(spec: SolutionSpec, conditions: ConditionsSpec, variation: Variation = NOMINAL) -> Solution:
    """The engine's solution for ``spec`` under ``variation`` (arrays broadcast).

    Parameters
    ----------
    spec : SolutionSpec
        A checked solution of a method file.
    conditions : ConditionsSpec
        The method's conditions (temperature [°C], activity model, background
        [mol/kg], carbon dioxide: none, open at a partial pressure, or closed
        with a total).
    variation : Variation, optional
        What to change; by default nothing.

    Returns
    -------
    Solution
        Components with their 25 °C thermodynamic pKa values (shifted as the
        variation says), totals in mol/L, and the conditions.
    """
    v = variation
    comps = []
    for k, c in enumerate(spec.components):
        base = c.protolyte()
        if v.pka_shift_all or v.pka_shift:
            pka = tuple(p + v.pka_shift_all.get(k, 0.0) + v.pka_shift.get((k, j), 0.0) for j, p in enumerate(base.pka))
            base = dataclasses.replace(base, pka=pka)
        comps.append(Component(base, c.concentration * v.scale * v.total_factor.get(k, 1.0), c.removed))
    return Solution(
        comps,
        temperature=conditions.temperature if v.temperature is None else v.temperature,
        activity=conditions.activity,
        strong_acid=spec.strong_acid * v.scale,
        strong_base=spec.strong_base * v.scale,
        background=conditions.background if v.background is None else v.background,
        co2=conditions.carbon_dioxide(),
    )


