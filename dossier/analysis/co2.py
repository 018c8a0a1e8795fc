r"""What carbon dioxide does to a solution: the CO₂ condition as solved, and,
for a method that assumes CO₂-free water, the pH the solution would reach open
to air.

Open to air means p_CO₂ = 420 µatm with Henry's law at the working temperature
(:mod:`dossier.chemistry.carbonate`); the shift is pH(open to air) − pH(as
stated), both exact. A shift larger than the method's acceptance limit means
the stated "exact" pH is not the pH a bottle left open will have.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

from ..chemistry import CarbonDioxide, Equilibrium, Solution, carbonic_pka, equilibrium, log_henry

__all__ = ["Co2Result", "co2_result"]


@dataclass(frozen=True)
class Co2Result:
    """The CO₂ condition of one solution, with numbers only.

    Attributes
    ----------
    mode : str
        ``none``, ``open`` or ``closed``.
    as_written : str
        The method file's statement (``none``, ``air``, ``partial_pressure: …``, ``dissolved: …``).
    partial_pressure_atm : float or None
        CO₂ partial pressure [atm] (open).
    henry_mol_per_l_atm : float or None
        Henry's constant K_H at the working temperature [mol/(L·atm)] (open).
    total_mol_per_l : float or None
        Dissolved inorganic carbon C_T [mol/L]: at equilibrium (open), as added (closed).
    pka : tuple of float or None
        Thermodynamic pK₁, pK₂ of carbonic acid at the working temperature (open, closed).
    ph_open_to_air : float or None
        Exact pH open to air (only when the mode is none).
    shift_open_to_air : float or None
        ph_open_to_air − exact pH [pH].
    exceeds_limit : bool
        |shift| larger than the acceptance limit (only when the mode is none).
    """

    mode: str
    as_written: str
    partial_pressure_atm: float | None
    henry_mol_per_l_atm: float | None
    total_mol_per_l: float | None
    pka: tuple[float, float] | None
    ph_open_to_air: float | None
    shift_open_to_air: float | None
    exceeds_limit: bool


def co2_result(solution: Solution, exact: Equilibrium, as_written: str, limit: float) -> Co2Result:
    """The CO₂ condition of a solved solution, and its pH open to air when it assumes none.

    Parameters
    ----------
    solution : Solution
        The nominal engine solution (scalar).
    exact : Equilibrium
        Its solved equilibrium.
    as_written : str
        The method's statement of the CO₂ condition.
    limit : float
        Acceptance limit on |error| [pH].
    """
    t = solution.temperature
    co2 = solution.co2
    if co2.mode == "none":
        air = equilibrium(dataclasses.replace(solution, co2=CarbonDioxide.air()))
        shift = float(air.ph) - float(exact.ph)
        return Co2Result("none", as_written, None, None, None, None, float(air.ph), shift, abs(shift) > limit)
    pk1, pk2 = carbonic_pka(t)
    c = exact.carbonate
    is_open = co2.mode == "open"
    return Co2Result(
        co2.mode,
        as_written,
        float(co2.partial_pressure) if is_open else None,
        float(10.0 ** log_henry(t)) if is_open else None,
        float(c.total) if is_open else float(co2.total),
        (float(pk1), float(pk2)),
        None,
        None,
        False,
    )
