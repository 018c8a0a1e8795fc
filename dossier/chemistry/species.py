"""The engine's description of a solution: protolytes, components, solution.

These are plain frozen value objects, validated on construction. A numeric
field may be a float or a numpy array; arrays broadcast against each other,
so one :class:`Solution` can stand for a whole grid of cases (a concentration
sweep, a pKa × concentration map, a million Monte-Carlo draws).

Conventions
-----------
* Concentrations are amount concentrations [mol/L]. The thermodynamic
  constants are on the molality scale; like the textbook formulas, the
  engine identifies c/(mol/L) with m/(mol/kg) (see docs/calculations.md).
* A protolyte with n pKa values has n + 1 protonation states, indexed by the
  number j of protons removed from the fully protonated form, whose charge
  is ``charge``: state j carries charge ``charge - j``.
* A component is added in state ``removed``; the charge of that form is
  balanced by implied monovalent counter-ions (Na⁺ for an anion, Cl⁻ for a
  cation), which enter the charge balance and the ionic strength.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .. import limits
from .activity import DAVIES_COEFFICIENT, MODELS
from .carbonate import AIR_PARTIAL_PRESSURE_ATM
from .errors import InputRangeError
from .temperature import pka_at_temperature

__all__ = [
    "PKA_LIMITS",
    "TOTAL_LIMITS",
    "TEMPERATURE_LIMITS",
    "PKW_LIMITS",
    "MAX_STEPS",
    "Protolyte",
    "Component",
    "Solution",
    "CarbonDioxide",
    "CO2_MODES",
]

PKA_LIMITS = limits.PKA_ENGINE
"""Allowed pKa values (at 25 °C) [dimensionless]."""
TOTAL_LIMITS = limits.TOTAL_ENGINE
"""Allowed concentrations of components, strong acid and strong base [mol/L]."""
BACKGROUND_LIMITS = limits.BACKGROUND_ENGINE
"""Allowed background ionic strength [mol/kg]."""
TEMPERATURE_LIMITS = limits.TEMPERATURE
"""Allowed temperatures [°C]."""
PKW_LIMITS = limits.PKW_OVERRIDE
"""Allowed override of pKw [dimensionless]."""
MAX_STEPS = limits.MAX_STEPS
"""Largest number of ionization steps of one protolyte."""
CHARGE_LIMITS = limits.CHARGE

Number = float | NDArray[np.float64]


def _fmt_range(lo: float, hi: float, unit: str) -> str:
    u = f" {unit}" if unit else ""
    return f"{lo:g} … {hi:g}{u}"


def checked_number(name: str, value: ArrayLike, lo: float, hi: float, unit: str = "") -> Number:
    """Return ``value`` as a float or a read-only float array, or raise.

    Parameters
    ----------
    name : str
        Argument name used in the message.
    value : float or array
        The value to check.
    lo, hi : float
        Inclusive allowed range.
    unit : str
        Unit named in the message.

    Returns
    -------
    float or array

    Raises
    ------
    InputRangeError
        If the value is not numeric, not finite, or outside [lo, hi].

    Examples
    --------
    >>> checked_number("total", -1.0, 0.0, 20.0, "mol/L")
    Traceback (most recent call last):
    ...
    dossier.chemistry.errors.InputRangeError: total: must be a finite number in 0 … 20 mol/L; got -1
    """
    try:
        arr = np.array(value, dtype=np.float64)
    except (TypeError, ValueError):
        raise InputRangeError(name, f"must be a number in {_fmt_range(lo, hi, unit)}; got {value!r}") from None
    bad = ~np.isfinite(arr) | (arr < lo) | (arr > hi)
    if bad.any():
        if arr.ndim == 0:
            where, got = "", arr.item()
        else:
            idx = tuple(int(i) for i in np.argwhere(bad)[0])
            where, got = f" at index {idx}", arr[idx]
        raise InputRangeError(name, f"must be a finite number in {_fmt_range(lo, hi, unit)}; got {got:g}{where}")
    if arr.ndim == 0:
        return float(arr)
    arr.setflags(write=False)
    return arr


def _optional_steps(name: str, values: Sequence[float | None] | None, n: int, lo: float, hi: float, unit: str) -> tuple[Number | None, ...] | None:
    if values is None:
        return None
    if isinstance(values, (str, bytes)) or not isinstance(values, Sequence):
        values = [values]  # type: ignore[list-item]
    if len(values) != n:
        raise InputRangeError(name, f"needs one value per ionization step ({n}); got {len(values)}")
    return tuple(None if v is None else checked_number(f"{name}[{i}]", v, lo, hi, unit) for i, v in enumerate(values))


@dataclass(frozen=True, eq=False)
class Protolyte:
    """A Brønsted acid–base system with one or more ionization steps.

    Parameters
    ----------
    name : str
        Name used in messages and reports.
    pka : sequence of float or array
        Stepwise thermodynamic pKa values at 25 °C and zero ionic strength,
        ascending [dimensionless], each within :data:`PKA_LIMITS`.
    charge : int
        Charge of the fully protonated form (0 for acetic or phosphoric acid,
        +1 for ammonium, TRIS·H⁺ or H₂-glycine⁺).
    dh : sequence of float or None, optional
        Standard enthalpy of each ionization step ΔH° [kJ/mol]; None (or a None
        entry) leaves that pKa independent of temperature.
    dcp : sequence of float or None, optional
        Standard heat-capacity change of each step ΔCp° [J/(K·mol)].

    Examples
    --------
    >>> Protolyte("phosphoric", (2.148, 7.198, 12.35)).steps
    3
    """

    name: str
    pka: tuple[Number, ...]
    charge: int = 0
    dh: tuple[Number | None, ...] | None = None
    dcp: tuple[Number | None, ...] | None = None

    def __post_init__(self) -> None:
        label = f"Protolyte({self.name}).pka"
        raw = self.pka
        if isinstance(raw, (int, float, np.ndarray)) and np.ndim(raw) == 0:
            raw = (raw,)
        if isinstance(raw, (str, bytes)) or not isinstance(raw, (Sequence, np.ndarray)):
            raise InputRangeError(label, f"must be a sequence of 1 … {MAX_STEPS} pKa values; got {raw!r}")
        if not 1 <= len(raw) <= MAX_STEPS:
            raise InputRangeError(label, f"must hold 1 … {MAX_STEPS} pKa values; got {len(raw)}")
        pka = tuple(checked_number(f"{label}[{i}]", p, *PKA_LIMITS) for i, p in enumerate(raw))
        for i in range(1, len(pka)):
            if np.any(np.asarray(pka[i]) < np.asarray(pka[i - 1])):
                raise InputRangeError(label, f"values must be ascending (pKa{i} ≤ pKa{i + 1}); got {np.min(pka[i - 1]):g} then {np.min(pka[i]):g}")
        if isinstance(self.charge, bool) or not isinstance(self.charge, (int, np.integer)) or not CHARGE_LIMITS[0] <= self.charge <= CHARGE_LIMITS[1]:
            raise InputRangeError(f"Protolyte({self.name}).charge", f"must be an integer in {CHARGE_LIMITS[0]} … {CHARGE_LIMITS[1]}; got {self.charge!r}")
        object.__setattr__(self, "pka", pka)
        object.__setattr__(self, "charge", int(self.charge))
        object.__setattr__(self, "dh", _optional_steps(f"Protolyte({self.name}).dh", self.dh, len(pka), *limits.ENTHALPY, "kJ/mol"))
        object.__setattr__(self, "dcp", _optional_steps(f"Protolyte({self.name}).dcp", self.dcp, len(pka), *limits.HEAT_CAPACITY, "J/(K·mol)"))

    @property
    def steps(self) -> int:
        """Number of ionization steps n (so n + 1 protonation states)."""
        return len(self.pka)

    def charges(self) -> tuple[int, ...]:
        """Charge of each protonation state j = 0 … n (j protons removed)."""
        return tuple(self.charge - j for j in range(self.steps + 1))

    def pka_at(self, temperature: ArrayLike) -> tuple[Number, ...]:
        """Thermodynamic pKa of every step at ``temperature`` [°C] (van 't Hoff
        with ΔCp°, :func:`~dossier.chemistry.temperature.pka_at_temperature`;
        a step without ΔH° keeps its 25 °C value).

        Examples
        --------
        >>> [round(p, 3) for p in Protolyte("tris", (8.072,), charge=1, dh=(47.45,)).pka_at(37.0)]
        [7.75]
        """
        return tuple(
            pka_at_temperature(pk, temperature, self.dh[i] if self.dh else None, self.dcp[i] if self.dcp else None)
            for i, pk in enumerate(self.pka)
        )

    def is_same_substance(self, other: Protolyte) -> bool:
        """Whether two protolytes are one substance (added in two forms, say).

        The one definition of "the same substance" in ph-dossier: the same name,
        charge and number of steps. (A method's components name their
        substance by its id, which becomes the protolyte's name.)
        """
        return self is other or (self.name == other.name and self.charge == other.charge and self.steps == other.steps)


@dataclass(frozen=True, eq=False)
class Component:
    """A protolyte added to the solution in a stated protonation state.

    Parameters
    ----------
    protolyte : Protolyte
        The acid–base system.
    total : float or array
        Total (analytical) concentration [mol/L], within :data:`TOTAL_LIMITS`.
    removed : int
        Protons removed in the form as added: 0 = fully protonated (e.g. acetic
        acid), ``protolyte.steps`` = fully deprotonated (e.g. trisodium
        phosphate). The added form's charge is balanced by monovalent
        counter-ions.

    Examples
    --------
    Sodium dihydrogen phosphate, 0.1 mol/L:

    >>> c = Component(Protolyte("phosphoric", (2.148, 7.198, 12.35)), 0.1, removed=1)
    >>> c.form_charge, c.counter_ion_charge
    (-1, 1)
    """

    protolyte: Protolyte
    total: Number
    removed: int = 0

    def __post_init__(self) -> None:
        if not isinstance(self.protolyte, Protolyte):
            raise InputRangeError("Component.protolyte", f"must be a Protolyte; got {type(self.protolyte).__name__}")
        name = self.protolyte.name
        object.__setattr__(self, "total", checked_number(f"Component({name}).total", self.total, *TOTAL_LIMITS, "mol/L"))
        n = self.protolyte.steps
        if isinstance(self.removed, bool) or not isinstance(self.removed, (int, np.integer)) or not 0 <= self.removed <= n:
            raise InputRangeError(f"Component({name}).removed", f"must be an integer in 0 … {n} (protons removed from the fully protonated form); got {self.removed!r}")
        object.__setattr__(self, "removed", int(self.removed))

    @property
    def form_charge(self) -> int:
        """Charge of the form as added."""
        return self.protolyte.charge - self.removed

    @property
    def counter_ion_charge(self) -> int:
        """Total charge of the implied counter-ions per formula unit added."""
        return -self.form_charge


CO2_MODES = ("none", "open", "closed")
"""How a solution meets carbon dioxide: none (CO₂-free), open (to a gas at a
fixed partial pressure), closed (a stated total of dissolved inorganic carbon)."""


@dataclass(frozen=True, eq=False)
class CarbonDioxide:
    r"""The carbon dioxide condition of a solution.

    Parameters
    ----------
    mode : str
        ``none``: CO₂-free water. ``open``: in equilibrium with a gas at
        ``partial_pressure``, so the dissolved [H₂CO₃*] = K_H p_CO₂ is fixed and
        the solution takes up or gives off CO₂ as its pH requires. ``closed``:
        ``total`` mol/L of dissolved inorganic carbon added as CO₂ (as H₂CO₃*),
        conserved: C_T = [H₂CO₃*] + [HCO₃⁻] + [CO₃²⁻].
    partial_pressure : float or array
        CO₂ partial pressure p_CO₂ [atm] (open only), within
        :data:`dossier.limits.CO2_PARTIAL_PRESSURE`.
    total : float or array
        Total dissolved inorganic carbon C_T [mol/L] (closed only).

    Examples
    --------
    >>> CarbonDioxide.air().partial_pressure
    0.00042
    >>> CarbonDioxide.closed(5e-5).mode
    'closed'
    """

    mode: str = "none"
    partial_pressure: Number = 0.0
    total: Number = 0.0

    def __post_init__(self) -> None:
        if self.mode not in CO2_MODES:
            raise InputRangeError("CarbonDioxide.mode", f"must be one of {', '.join(CO2_MODES)}; got {self.mode!r}")
        p = checked_number("CarbonDioxide.partial_pressure", self.partial_pressure, *limits.CO2_PARTIAL_PRESSURE, "atm")
        c = checked_number("CarbonDioxide.total", self.total, *TOTAL_LIMITS, "mol/L")
        if self.mode != "open" and np.any(np.asarray(p) != 0.0):
            raise InputRangeError("CarbonDioxide.partial_pressure", f"applies to the open mode only (mode is {self.mode})")
        if self.mode != "closed" and np.any(np.asarray(c) != 0.0):
            raise InputRangeError("CarbonDioxide.total", f"applies to the closed mode only (mode is {self.mode})")
        object.__setattr__(self, "partial_pressure", p)
        object.__setattr__(self, "total", c)

    @classmethod
    def air(cls) -> CarbonDioxide:
        """Open to air: p_CO₂ = :data:`~dossier.chemistry.carbonate.AIR_PARTIAL_PRESSURE_ATM`."""
        return cls("open", partial_pressure=AIR_PARTIAL_PRESSURE_ATM)

    @classmethod
    def open(cls, partial_pressure: ArrayLike) -> CarbonDioxide:
        """Open to a gas at ``partial_pressure`` [atm]."""
        return cls("open", partial_pressure=partial_pressure)  # type: ignore[arg-type]

    @classmethod
    def closed(cls, total: ArrayLike) -> CarbonDioxide:
        """Closed, with ``total`` [mol/L] of dissolved inorganic carbon added as CO₂."""
        return cls("closed", total=total)  # type: ignore[arg-type]


NO_CO2 = CarbonDioxide()
"""The default: CO₂-free water."""


@dataclass(frozen=True, eq=False)
class Solution:
    """An aqueous solution of protolytes, strong acid/base and inert salt.

    Parameters
    ----------
    components : sequence of Component
        The protolytes and the forms in which they were added.
    temperature : float or array
        Temperature [°C], within :data:`TEMPERATURE_LIMITS`.
    activity : str
        Activity model: ``ideal``, ``debye-huckel``, ``extended-debye-huckel``
        or ``davies`` (see :mod:`dossier.chemistry.activity`).
    strong_acid, strong_base : float or array
        Added monovalent strong acid (e.g. HCl) and strong base (e.g. NaOH)
        [mol/L], fully dissociated.
    background : float or array
        Ionic strength of an inert 1:1 electrolyte such as NaCl [mol/kg].
    pkw : float or array, optional
        Thermodynamic pKw to use instead of IAPWS R11-07 at the temperature.
    davies_coefficient : float
        Linear coefficient of the Davies equation (0.3, Davies 1962).
    ion_size : float, optional
        Ion-size parameter å [Å] of the extended Debye–Hückel equation;
        None uses Bå = 1.5 (Bates–Guggenheim convention).
    co2 : CarbonDioxide
        The carbon dioxide condition (default: none, CO₂-free water).

    Examples
    --------
    >>> acetic = Protolyte("acetic", (4.756,))
    >>> Solution([Component(acetic, [0.1, 0.01])]).shape
    (2,)
    """

    components: tuple[Component, ...] = ()
    temperature: Number = 25.0
    activity: str = "ideal"
    strong_acid: Number = 0.0
    strong_base: Number = 0.0
    background: Number = 0.0
    pkw: Number | None = None
    davies_coefficient: float = DAVIES_COEFFICIENT
    ion_size: float | None = None
    co2: CarbonDioxide = NO_CO2
    shape: tuple[int, ...] = field(init=False, repr=False)

    def __post_init__(self) -> None:
        comps = tuple(self.components)
        for i, c in enumerate(comps):
            if not isinstance(c, Component):
                raise InputRangeError(f"Solution.components[{i}]", f"must be a Component; got {type(c).__name__}")
        object.__setattr__(self, "components", comps)
        object.__setattr__(self, "temperature", checked_number("Solution.temperature", self.temperature, *TEMPERATURE_LIMITS, "°C"))
        if self.activity not in MODELS:
            raise InputRangeError("Solution.activity", f"unknown activity model {self.activity!r}; allowed: {', '.join(MODELS)}")
        for name in ("strong_acid", "strong_base"):
            object.__setattr__(self, name, checked_number(f"Solution.{name}", getattr(self, name), *TOTAL_LIMITS, "mol/L"))
        object.__setattr__(self, "background", checked_number("Solution.background", self.background, *BACKGROUND_LIMITS, "mol/kg"))
        if self.pkw is not None:
            object.__setattr__(self, "pkw", checked_number("Solution.pkw", self.pkw, *PKW_LIMITS))
        object.__setattr__(self, "davies_coefficient", checked_number("Solution.davies_coefficient", self.davies_coefficient, *limits.DAVIES_COEFFICIENT_RANGE))
        if self.ion_size is not None:
            object.__setattr__(self, "ion_size", checked_number("Solution.ion_size", self.ion_size, *limits.ION_SIZE, "Å"))
        if not isinstance(self.co2, CarbonDioxide):
            raise InputRangeError("Solution.co2", f"must be a CarbonDioxide; got {type(self.co2).__name__}")
        object.__setattr__(self, "shape", self._broadcast_shape())

    def _arrays(self) -> list[Number]:
        out: list[Number] = [self.temperature, self.strong_acid, self.strong_base, self.background]
        if self.pkw is not None:
            out.append(self.pkw)
        out.extend((self.co2.partial_pressure, self.co2.total))
        for c in self.components:
            out.append(c.total)
            out.extend(c.protolyte.pka)
            for extra in (c.protolyte.dh, c.protolyte.dcp):
                out.extend(v for v in (extra or ()) if v is not None)
        return out

    def _broadcast_shape(self) -> tuple[int, ...]:
        shapes = [np.shape(a) for a in self._arrays()]
        try:
            return tuple(np.broadcast_shapes(*shapes))
        except ValueError:
            distinct = ", ".join(str(s) for s in dict.fromkeys(s for s in shapes if s))
            raise InputRangeError("Solution", f"array inputs do not broadcast together (shapes {distinct})") from None
