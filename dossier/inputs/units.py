r"""Concentrations with units, read through the pint units library.

Accepted (DESIGN §4): mol/L, mmol/L, µmol/L (also umol/L), M, mM, mol/kg,
mg/L or g/L with a molar mass, and % w/v (grams per 100 mL) with a molar
mass. Everything is converted to amount concentration [mol/L]:

.. math::
    c = m\,\rho_w(t) \quad\text{(molality, dilute solution)}, \qquad
    c = \frac{\rho_B}{M_B} \quad\text{(mass concentration)}

where ρw is the density of water at the working temperature [kg/L]
(Kell 1975) — the dilute-solution approximation, in which the mass of
solvent per litre of solution is that of a litre of water.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

from ..chemistry.water import water_density
from ..display import significant

__all__ = ["UnitError", "Concentration", "parse_concentration", "format_concentration", "ALLOWED_UNITS",
           "celsius", "celsius_difference", "TEMPERATURE_PATTERN", "parse_pressure", "PRESSURE_UNITS"]

ALLOWED_UNITS = "mol/L, mmol/L, µmol/L (or umol/L), mol/kg, mg/L or g/L (with a molar mass), % w/v (with a molar mass)"

_WV = re.compile(r"%\s*\(?\s*w\s*/\s*v\s*\)?\s*$", re.IGNORECASE)


PRESSURE_UNITS = "µatm (or uatm), atm, Pa, kPa"
_PRESSURE = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(µatm|μatm|uatm|atm|Pa|kPa)\s*$")
_PRESSURE_ATM = {"µatm": 1e-6, "μatm": 1e-6, "uatm": 1e-6, "atm": 1.0, "Pa": 1.0 / 101325.0, "kPa": 1000.0 / 101325.0}
"""Factor to atm: 1 atm = 101325 Pa exactly (CGPM 1954, Resolution 4)."""


def parse_pressure(text: str | float | int) -> float:
    """A partial pressure with its unit, in atm.

    Parameters
    ----------
    text : str
        A number and one of µatm (uatm), atm, Pa, kPa, e.g. ``"1000 µatm"``.

    Returns
    -------
    float
        The pressure [atm] (1 atm = 101325 Pa).

    Raises
    ------
    UnitError
        When the text is not a number with one of those units, or is negative.

    Examples
    --------
    >>> parse_pressure("420 µatm")
    0.00042
    >>> round(parse_pressure("101.325 kPa"), 12)
    1.0
    """
    if isinstance(text, (int, float)) and not isinstance(text, bool):
        raise UnitError(f"needs a unit: write e.g. '{text} µatm' (allowed: {PRESSURE_UNITS})")
    m = _PRESSURE.match(str(text))
    if not m:
        raise UnitError(f"must be a number with a unit such as '1000 µatm' (allowed: {PRESSURE_UNITS}); got {text!r}")
    value = float(m.group(1))
    if value < 0.0:
        raise UnitError(f"a partial pressure cannot be negative; got {text!r}")
    return _tidy(value * _PRESSURE_ATM[m.group(2)])


class UnitError(ValueError):
    """A concentration or unit that cannot be read or converted (message says why)."""


@lru_cache(maxsize=1)
def _registry():  # noqa: ANN202 - pint's registry type
    import pint  # imported lazily: building the registry takes a noticeable time

    ureg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    ureg.define("percent_weight_per_volume = gram / (100 * milliliter)")
    return ureg


def _tidy(value: float) -> float:
    """Drop the last-digit noise of unit conversion (5 µmol/L → 5e-06, not 4.9999999999999996e-06)."""
    return float(f"{float(value):.15g}")


@dataclass(frozen=True)
class Concentration:
    """A concentration as written and its value in mol/L.

    Attributes
    ----------
    text : str
        What was written, e.g. ``"10 mmol/L"``.
    mol_per_l : float
        Amount concentration [mol/L].
    kind : str
        ``amount``, ``molality`` or ``mass`` — which conversion was applied.
    """

    text: str
    mol_per_l: float
    kind: str


def parse_concentration(text: str | float | int, *, molar_mass: float | None = None, temperature: float = 25.0) -> Concentration:
    r"""Read a concentration with its unit and convert it to mol/L.

    Parameters
    ----------
    text : str
        A number and a unit, e.g. ``"10 mmol/L"``, ``"250 mg/L"``, ``"0.9 % w/v"``.
        A bare number is refused: the unit is always stated.
    molar_mass : float, optional
        Molar mass of the substance as added [g/mol]; needed for mass units.
    temperature : float
        Working temperature [°C]; sets the water density for mol/kg.

    Returns
    -------
    Concentration

    Raises
    ------
    UnitError
        Unreadable text, a missing unit, a unit of the wrong kind, or a mass
        unit without a molar mass. The message lists the allowed units.

    Examples
    --------
    >>> parse_concentration("10 mmol/L").mol_per_l
    0.01
    >>> round(parse_concentration("0.9 % w/v", molar_mass=58.44).mol_per_l, 4)
    0.154
    """
    if isinstance(text, bool) or isinstance(text, (int, float)):
        raise UnitError(f"needs a unit: write e.g. '{text} mmol/L' (allowed: {ALLOWED_UNITS})")
    if not isinstance(text, str) or not text.strip():
        raise UnitError(f"must be a number with a unit such as '10 mmol/L' (allowed: {ALLOWED_UNITS})")
    raw = text.strip()
    spec = _WV.sub(" percent_weight_per_volume", raw)
    ureg = _registry()
    try:
        q = ureg.Quantity(spec)
    except Exception:  # pint raises many kinds of errors on bad text
        raise UnitError(f"cannot read {raw!r} as a number with a unit (allowed: {ALLOWED_UNITS})") from None
    magnitude = q.magnitude
    if not isinstance(magnitude, (int, float)) or isinstance(magnitude, bool):
        raise UnitError(f"cannot read {raw!r} as a number with a unit (allowed: {ALLOWED_UNITS})")
    if not math.isfinite(magnitude):
        raise UnitError(f"{raw!r} is not a finite number")
    if magnitude < 0:
        raise UnitError(f"{raw!r} is negative; a concentration is 0 or more")
    if q.dimensionless:
        raise UnitError(f"{raw!r} has no unit (allowed: {ALLOWED_UNITS})")
    dims = q.dimensionality
    try:
        if dims == ureg.mol.dimensionality / ureg.liter.dimensionality:
            return Concentration(raw, _tidy(q.to("mol/L").magnitude), "amount")
        if dims == ureg.mol.dimensionality / ureg.kg.dimensionality:
            rho = float(water_density(temperature)) / 1000.0  # kg/L
            return Concentration(raw, _tidy(q.to("mol/kg").magnitude * rho), "molality")
        if dims == ureg.gram.dimensionality / ureg.liter.dimensionality:
            if molar_mass is None:
                raise UnitError(f"{raw!r} is a mass concentration: state the molar mass (g/mol) to convert it")
            if not (math.isfinite(molar_mass) and molar_mass > 0):
                raise UnitError(f"molar mass must be a positive number of g/mol; got {molar_mass!r}")
            return Concentration(raw, _tidy(q.to("g/L").magnitude / molar_mass), "mass")
    except UnitError:
        raise
    except Exception:
        pass
    raise UnitError(f"{raw!r} is not a concentration (allowed: {ALLOWED_UNITS})")


def format_concentration(c: float) -> str:
    """A concentration in the unit that reads best (mol/L, mmol/L, µmol/L, nmol/L)."""
    for factor, unit in ((1.0, "mol/L"), (1e-3, "mmol/L"), (1e-6, "µmol/L"), (1e-9, "nmol/L")):
        if c >= factor * 0.9995:
            return f"{significant(c / factor, 3)} {unit}"
    return f"{significant(c, 3)} mol/L"


TEMPERATURE_PATTERN = r"^\s*([-+]?[0-9]+(?:\.[0-9]*)?(?:[eE][-+]?[0-9]+)?)\s*(°C|℃|K)\s*$"
"""A temperature written with its unit: a number, then °C (or ℃) or K."""

_TEMPERATURE = re.compile(TEMPERATURE_PATTERN)
KELVIN_AT_ZERO_CELSIUS = 273.15
"""0 °C in kelvin (exact, by the definition of the Celsius scale)."""


def _temperature_parts(value: object, what: str) -> tuple[float, str] | object:
    if isinstance(value, bool) or not isinstance(value, str):
        return value  # numbers are °C; other types are refused by the schema's type check
    m = _TEMPERATURE.match(value)
    if not m:
        raise ValueError(f"must be {what} in °C (a number, or e.g. '25 °C') or in kelvin (e.g. '298.15 K'); got {value!r}")
    return float(m.group(1)), m.group(2)


def celsius(value: object) -> object:
    r"""A temperature as written in a method file, in °C.

    A plain number is °C; text is a number with ``°C`` (or ``℃``) or ``K``:

    .. math:: t\,[°C] = T\,[K] - 273.15

    Anything else is returned unchanged, for the type check to refuse.

    Raises
    ------
    ValueError
        Text that is not a number with one of those units (the message says so).

    Examples
    --------
    >>> celsius(20), celsius("20 °C"), celsius("310.15 K")
    (20, 20.0, 37.0)
    """
    parts = _temperature_parts(value, "a temperature")
    if not isinstance(parts, tuple):
        return parts
    number, unit = parts
    return _tidy(number - KELVIN_AT_ZERO_CELSIUS) if unit == "K" else number


def celsius_difference(value: object) -> object:
    """A temperature difference (a tolerance) in °C; 1 K and 1 °C are the same step.

    Examples
    --------
    >>> celsius_difference("2 K"), celsius_difference("0.5 °C"), celsius_difference(2)
    (2.0, 0.5, 2)
    """
    parts = _temperature_parts(value, "a temperature difference")
    return parts[0] if isinstance(parts, tuple) else parts
