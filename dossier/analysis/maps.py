"""Error maps and families of curves for the plots: pKa × log C, and error
against pKa at several concentrations. Numbers only; render/figures.py draws."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from ..inputs.model import ConditionsSpec, SolutionSpec
from .batch import TOTAL_MAX, Variation, solution_for
from .validity import concentration_scales, key_step, pka_shifts

__all__ = ["ErrorMap", "PkaCurves", "error_map", "pka_curves"]


@dataclass(frozen=True)
class ErrorMap:
    """Shortcut error over (key-step pKa) × (log10 of the first component's total).

    ``error[i, j]`` is at ``pka[i]``, ``log_c[j]``.
    """

    shortcut: str
    pka: NDArray[np.float64]
    log_c: NDArray[np.float64]
    error: NDArray[np.float64]
    nominal: tuple[float, float]  # (pKa, log10 c)


@dataclass(frozen=True)
class PkaCurves:
    """Error against the key-step pKa at several concentrations."""

    shortcut: str
    pka: NDArray[np.float64]
    concentrations: NDArray[np.float64]
    error: NDArray[np.float64]  # [concentration, pka]


def error_map(approx_id: str, spec: SolutionSpec, conditions: ConditionsSpec, *, n_pka: int = 121, n_conc: int = 141) -> ErrorMap | None:
    """The error on a pKa × concentration grid, in one vectorized call (whole solution scaled);
    None for a shortcut that uses no pKa (a strong acid or base alone)."""
    if key_step(approx_id, spec, conditions) is None:
        return None
    shifts, key, same = pka_shifts(approx_id, spec, conditions, n_pka)
    c0 = spec.lead_concentration
    scales = concentration_scales(spec, n_conc)
    sol = solution_for(spec, conditions, Variation(scale=scales[None, :], pka_shift_all={i: shifts[:, None] for i in same}))
    err = np.asarray(spec.approximation(approx_id).error(sol), dtype=np.float64)
    return ErrorMap(approx_id, key + shifts, np.log10(scales * c0), err, (key, float(np.log10(c0))))


def pka_curves(approx_id: str, spec: SolutionSpec, conditions: ConditionsSpec, *, n_pka: int = 181) -> PkaCurves | None:
    """Error against pKa at the nominal concentration and at 1/100, 1/10, 10× and 100× it (where allowed);
    None for a shortcut that uses no pKa (a strong acid or base alone)."""
    if key_step(approx_id, spec, conditions) is None:
        return None
    shifts, key, same = pka_shifts(approx_id, spec, conditions, n_pka)
    c0 = spec.lead_concentration
    biggest = max(c.concentration for c in spec.components)
    factors = np.array([f for f in (0.01, 0.1, 1.0, 10.0, 100.0) if 1e-10 <= f * c0 and f * biggest <= TOTAL_MAX])
    sol = solution_for(spec, conditions, Variation(scale=factors[:, None], pka_shift_all={i: shifts[None, :] for i in same}))
    err = np.asarray(spec.approximation(approx_id).error(sol), dtype=np.float64)
    return PkaCurves(approx_id, key + shifts, factors * c0, err)
