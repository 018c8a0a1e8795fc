r"""Buffer robustness: what small, deliberate variations do to a solution's pH.

In the sense of ICH Q2(R2) and Q14 (robustness: the effect of small,
deliberate variations of method parameters), every number here is the exact
pH of the varied solution minus the exact pH as stated, both on the activity
scale and with the method's activity model, temperature and CO₂ condition:

- **buffer capacity** β = dC_b/dpH [mol/(L·pH)], from the analytic derivative
  of the charge balance (:func:`dossier.chemistry.buffer_capacity`; Van
  Slyke 1922);
- **dilution value** ΔpH½ = pH(1 + 1 with water) − pH: every concentration
  halved, strong acid and base included (the quantity the IUPAC pH standards
  tabulate; R. G. Bates, Determination of pH, 2nd ed., Wiley 1973, ch. 4);
- **one component on its own** moved by ± its stated tolerance (relative to
  its nominal), or by ±\ :data:`~dossier.limits.ROBUSTNESS_COMPONENT_PERCENT` %
  when the method states none: the ratio of a buffer pair changes, which the
  whole-solution sweep of the validity analysis cannot see;
- **a strong acid or base alone** (no components): its concentration moved
  by ± its stated tolerance (relative to its nominal), or by the same
  default percentage, the solution otherwise as stated;
- **a small addition** of strong acid and of strong base
  (:data:`~dossier.limits.ROBUSTNESS_STRONG_ADDITION` mol/L, counter-ions inert);
- **dpH/dT**, the central difference over the method's temperature tolerance
  (± :data:`~dossier.limits.ROBUSTNESS_TEMPERATURE_STEP` °C when it states
  none), the ends kept within the engine's temperature range;
- **the CO₂ shift**: pH with CO₂ − pH CO₂-free, where "with CO₂" is open to air
  (420 µatm) for a method that assumes none, and the stated condition
  otherwise;
- **a titration curve**: pH against strong base added (negative: strong acid),
  over ± max(10 × the small addition, the sum of the components' totals).

Every variation except the CO₂ shift is one point of a single vectorized
call of the engine. The CO₂ condition is kept as stated for every varied
point (open: the dissolved CO₂ stays at its Henry's-law value; closed: the
stated total is not diluted).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from .. import limits
from ..chemistry import CarbonDioxide, Equilibrium, Solution, buffer_capacity, equilibrium
from ..inputs.convert import Variation, solution_for
from ..inputs.model import ConditionsSpec, SolutionSpec
from .co2 import Co2Result

__all__ = ["ComponentVariation", "TitrationCurve", "RobustnessResult", "robustness"]

TITRATION_POINTS = 201
"""Points of the titration curve (odd: the solution as stated is one of them)."""


@dataclass(frozen=True)
class ComponentVariation:
    """One component moved on its own.

    Attributes
    ----------
    component : int or None
        Index of the component in the solution; None for the strong acid or
        base of a solution that holds nothing else (:attr:`RobustnessResult.strong_alone`).
    percent : float
        The relative variation x [%] applied as −x and +x.
    from_tolerance : bool
        True: x is the component's stated tolerance; False: the default
        :data:`~dossier.limits.ROBUSTNESS_COMPONENT_PERCENT`.
    delta_ph_minus, delta_ph_plus : float
        pH at (1 − x/100) and (1 + x/100) times the component's total, minus the pH as stated [pH].
    """

    component: int | None
    percent: float
    from_tolerance: bool
    delta_ph_minus: float
    delta_ph_plus: float


@dataclass(frozen=True, eq=False)
class TitrationCurve:
    """pH against added strong base (negative values: strong acid added).

    Attributes
    ----------
    added_mol_per_l : array
        Strong base added [mol per litre of solution]; negative: strong acid.
    ph : array
        Exact pH (activity scale) at each addition.
    """

    added_mol_per_l: NDArray[np.float64]
    ph: NDArray[np.float64]


@dataclass(frozen=True)
class RobustnessResult:
    """The robustness of one solution, numbers only (the words belong to render).

    Attributes
    ----------
    ph : float
        Exact pH as stated (the reference of every ΔpH).
    buffer_capacity_mol_per_l_per_ph : float
        β [mol/(L·pH)].
    dilution_value : float
        pH after dilution 1 + 1 with water minus pH [pH].
    components : tuple of ComponentVariation
    strong_addition_mol_per_l : float
        The small addition of strong acid or base [mol/L].
    delta_ph_strong_acid, delta_ph_strong_base : float
        pH after that addition minus pH [pH].
    temperature_step_c : float
        Half-width of the temperature step [°C] (the tolerance, or the default).
    temperature_step_from_tolerance : bool
    temperature_low_c, temperature_high_c : float
        The temperatures actually used (within the engine's range) [°C].
    delta_ph_temperature_low, delta_ph_temperature_high : float
        pH at those temperatures minus pH [pH].
    dph_dt_per_k : float
        (pH(T_high) − pH(T_low)) / (T_high − T_low) [pH/K].
    co2_shift_ph : float
        pH with CO₂ minus pH CO₂-free [pH].
    co2_shift_compares : str
        ``open-to-air-minus-co2-free`` (the method assumes none) or
        ``as-stated-minus-co2-free``.
    curve : TitrationCurve
    strong_alone : ComponentVariation or None
        The strong acid or base of a solution that holds nothing else, its
        concentration moved by ± x % (``component`` None); None otherwise.
    """

    ph: float
    buffer_capacity_mol_per_l_per_ph: float
    dilution_value: float
    components: tuple[ComponentVariation, ...]
    strong_addition_mol_per_l: float
    delta_ph_strong_acid: float
    delta_ph_strong_base: float
    temperature_step_c: float
    temperature_step_from_tolerance: bool
    temperature_low_c: float
    temperature_high_c: float
    delta_ph_temperature_low: float
    delta_ph_temperature_high: float
    dph_dt_per_k: float
    co2_shift_ph: float
    co2_shift_compares: str
    curve: TitrationCurve
    strong_alone: ComponentVariation | None = None


def _percent(tolerance: float, concentration: float) -> tuple[float, bool]:
    """x [%]: a tolerance relative to its nominal, or the default when none is stated."""
    if tolerance > 0.0 and concentration > 0.0:
        return 100.0 * tolerance / concentration, True
    return limits.ROBUSTNESS_COMPONENT_PERCENT, False


def _component_percents(spec: SolutionSpec) -> list[tuple[float, bool]]:
    """x [%] for each component: its tolerance relative to its nominal, or the default."""
    return [_percent(c.tolerance, c.concentration) for c in spec.components]


def _co2_shift(nominal: Solution, exact: Equilibrium, co2: Co2Result | None) -> tuple[float, str]:
    if co2 is not None and co2.mode == "none" and co2.shift_open_to_air is not None:
        return co2.shift_open_to_air, "open-to-air-minus-co2-free"
    if nominal.co2.mode == "none":  # no CO₂ result at hand: solve open to air here
        air = equilibrium(dataclasses.replace(nominal, co2=CarbonDioxide.air()))
        return float(air.ph) - float(exact.ph), "open-to-air-minus-co2-free"
    free = equilibrium(dataclasses.replace(nominal, co2=CarbonDioxide()))
    return float(exact.ph) - float(free.ph), "as-stated-minus-co2-free"


def robustness(spec: SolutionSpec, conditions: ConditionsSpec, nominal: Solution, exact: Equilibrium,
               co2: Co2Result | None = None) -> RobustnessResult:
    """The robustness numbers of one solution (see the module's description).

    Parameters
    ----------
    spec : SolutionSpec
        The solution as checked.
    conditions : ConditionsSpec
        The method's conditions (temperature and its tolerance, activity model, CO₂).
    nominal : Solution
        ``spec.to_solution(conditions)``.
    exact : Equilibrium
        Its solved equilibrium.
    co2 : Co2Result, optional
        The CO₂ result already computed (its pH open to air is reused).

    Returns
    -------
    RobustnessResult
    """
    n_comp = len(spec.components)
    percents = _component_percents(spec)
    add = limits.ROBUSTNESS_STRONG_ADDITION
    from_tol = conditions.temperature_tolerance > 0.0
    step = conditions.temperature_tolerance if from_tol else limits.ROBUSTNESS_TEMPERATURE_STEP
    t_lo = max(conditions.temperature - step, limits.TEMPERATURE[0])
    t_hi = min(conditions.temperature + step, limits.TEMPERATURE[1])
    span = max(10.0 * add, sum(c.concentration for c in spec.components) + spec.strong_acid + spec.strong_base)
    span = min(span, limits.TOTAL_ENGINE[1] / 2.0)
    curve_x = np.linspace(-span, span, TITRATION_POINTS)

    # one row per point: scale, factor of each component, temperature, strong acid added, strong base added
    rows: list[tuple[float, list[float], float, float, float]] = [(1.0, [1.0] * n_comp, conditions.temperature, 0.0, 0.0),
                                                                   (0.5, [1.0] * n_comp, conditions.temperature, 0.0, 0.0)]
    for k, (p, _) in enumerate(percents):
        for sign in (-1.0, 1.0):
            f = [1.0] * n_comp
            f[k] = 1.0 + sign * p / 100.0
            rows.append((1.0, f, conditions.temperature, 0.0, 0.0))
    rows += [(1.0, [1.0] * n_comp, conditions.temperature, add, 0.0), (1.0, [1.0] * n_comp, conditions.temperature, 0.0, add),
             (1.0, [1.0] * n_comp, t_lo, 0.0, 0.0), (1.0, [1.0] * n_comp, t_hi, 0.0, 0.0)]
    alone = spec.strong_alone
    alone_percent = _percent(alone.tolerance, alone.concentration) if alone is not None else None
    if alone_percent is not None:  # nothing else in the solution: scaling it moves only the strong acid or base
        rows += [(1.0 + sign * alone_percent[0] / 100.0, [1.0] * n_comp, conditions.temperature, 0.0, 0.0) for sign in (-1.0, 1.0)]
    head = len(rows)
    scale = np.array([r[0] for r in rows] + [1.0] * TITRATION_POINTS)
    factors = np.ones((head + TITRATION_POINTS, n_comp))  # (points, components); no columns for a strong acid or base alone
    for j, r in enumerate(rows):
        factors[j] = r[1]
    temperature = np.array([r[2] for r in rows] + [conditions.temperature] * TITRATION_POINTS)
    acid = np.array([r[3] for r in rows] + list(np.maximum(-curve_x, 0.0)))
    base = np.array([r[4] for r in rows] + list(np.maximum(curve_x, 0.0)))

    varied = solution_for(spec, conditions, Variation(scale=scale, total_factor={k: factors[:, k] for k in range(n_comp)}, temperature=temperature))
    varied = dataclasses.replace(varied, strong_acid=np.asarray(varied.strong_acid) + acid, strong_base=np.asarray(varied.strong_base) + base)
    ph = np.asarray(equilibrium(varied).ph, dtype=np.float64)
    ref = float(ph[0])
    d = ph[:head] - ref

    comps = tuple(ComponentVariation(k, p, stated, float(d[2 + 2 * k]), float(d[3 + 2 * k])) for k, (p, stated) in enumerate(percents))
    i = 2 + 2 * n_comp
    shift, compares = _co2_shift(nominal, exact, co2)
    dt = t_hi - t_lo
    return RobustnessResult(
        ph=ref,
        buffer_capacity_mol_per_l_per_ph=float(buffer_capacity(nominal, exact)),
        dilution_value=float(d[1]),
        components=comps,
        strong_addition_mol_per_l=add,
        delta_ph_strong_acid=float(d[i]),
        delta_ph_strong_base=float(d[i + 1]),
        temperature_step_c=float(step),
        temperature_step_from_tolerance=from_tol,
        temperature_low_c=float(t_lo),
        temperature_high_c=float(t_hi),
        delta_ph_temperature_low=float(d[i + 2]),
        delta_ph_temperature_high=float(d[i + 3]),
        dph_dt_per_k=float((ph[i + 3] - ph[i + 2]) / dt) if dt > 0 else 0.0,
        co2_shift_ph=float(shift),
        co2_shift_compares=compares,
        curve=TitrationCurve(curve_x, ph[head:].copy()),
        strong_alone=None if alone_percent is None else ComponentVariation(None, alone_percent[0], alone_percent[1], float(d[i + 4]), float(d[i + 5])),
    )
