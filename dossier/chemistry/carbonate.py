r"""The carbonic acid system: Henry's constant and both ionization constants.

Dissolved carbon dioxide is counted as H₂CO₃* = CO₂(aq) + H₂CO₃ (the usual
convention). The three equilibria and their thermodynamic constants are

.. math::
    \mathrm{CO_2(g)} \rightleftharpoons \mathrm{H_2CO_3^*},\qquad
        K_H = \frac{m(\mathrm{H_2CO_3^*})}{p_{\mathrm{CO_2}}}\quad[\mathrm{mol\,kg^{-1}\,atm^{-1}}]

    \mathrm{H_2CO_3^*} \rightleftharpoons \mathrm{H^+} + \mathrm{HCO_3^-},\qquad
    \mathrm{HCO_3^-} \rightleftharpoons \mathrm{H^+} + \mathrm{CO_3^{2-}}

each as a function of the absolute temperature T [K] (Plummer & Busenberg
1982, valid 0–90 °C at 1 atm total pressure):

.. math::
    \log_{10} K = a + bT + \frac{c}{T} + d\log_{10}T + \frac{e}{T^2}

============  ===========  ============  ==========  ==========  ============
constant      a            b             c           d           e
============  ===========  ============  ==========  ==========  ============
K_H           108.3865     0.01985076    −6919.53    −40.45154   669365
K_1           −356.3094    −0.06091964   21834.37    126.8339    −1684915
K_2           −107.8871    −0.03252849   5151.79     38.92561    −563713.9
============  ===========  ============  ==========  ==========  ============

At 25 °C they give log K_H = −1.468, pK₁ = 6.352, pK₂ = 10.329.

Like the rest of the engine, concentrations in mol/L are identified with
molalities in mol/kg (so K_H is used in mol/(L·atm)); the partial pressure is
the CO₂ fugacity (ideal gas).

References
----------
.. [1] L. N. Plummer and E. Busenberg, "The solubilities of calcite, aragonite
   and vaterite in CO2–H2O solutions between 0 and 90 °C, and an evaluation of
   the aqueous model for the system CaCO3–CO2–H2O", Geochim. Cosmochim. Acta
   46, 1011–1040 (1982), doi:10.1016/0016-7037(82)90056-4. The K₁ and K₂
   equations are confirmed against the paper's abstract; the K_H equation is
   recalled from memory (it agrees with several secondary copies citing the
   paper).
.. [2] World Meteorological Organization, WMO Greenhouse Gas Bulletin No. 20
   (2024): globally averaged CO₂ mole fraction 420.0 ppm in 2023.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .water import KELVIN

__all__ = [
    "AIR_PARTIAL_PRESSURE_ATM",
    "PLUMMER_BUSENBERG_KH",
    "PLUMMER_BUSENBERG_K1",
    "PLUMMER_BUSENBERG_K2",
    "log_henry",
    "carbonic_pka",
]

AIR_PARTIAL_PRESSURE_ATM = 420e-6
"""Partial pressure of CO₂ in air [atm]: 420 µatm, i.e. a mole fraction of
420 ppm in dry air at 1 atm, the global mean of 2023 (WMO Greenhouse Gas
Bulletin No. 20, 2024). Water vapour lowers it by a few per cent at room
temperature; the engine neglects that (common practice, no source)."""

# (a, b, c, d, e) of log10 K = a + b T + c/T + d log10 T + e/T², Plummer & Busenberg (1982).
PLUMMER_BUSENBERG_KH = (108.3865, 0.01985076, -6919.53, -40.45154, 669365.0)
"""Coefficients of log10 K_H [mol/(kg·atm)] (Plummer & Busenberg 1982; recalled)."""
PLUMMER_BUSENBERG_K1 = (-356.3094, -0.06091964, 21834.37, 126.8339, -1684915.0)
"""Coefficients of log10 K₁ (Plummer & Busenberg 1982)."""
PLUMMER_BUSENBERG_K2 = (-107.8871, -0.03252849, 5151.79, 38.92561, -563713.9)
"""Coefficients of log10 K₂ (Plummer & Busenberg 1982)."""


def _log_k(coef: tuple[float, ...], temperature: ArrayLike) -> NDArray[np.float64]:
    T = np.asarray(temperature, dtype=np.float64) + KELVIN
    a, b, c, d, e = coef
    return a + b * T + c / T + d * np.log10(T) + e / (T * T)


def _out(v: NDArray[np.float64]) -> float | NDArray[np.float64]:
    return float(v) if np.ndim(v) == 0 else v


def log_henry(temperature: ArrayLike) -> float | NDArray[np.float64]:
    r"""log10 of Henry's constant of CO₂ in water (Plummer & Busenberg 1982).

    .. math::
        \log_{10} K_H = 108.3865 + 0.01985076\,T - \frac{6919.53}{T}
            - 40.45154\log_{10}T + \frac{669365}{T^2}

    Parameters
    ----------
    temperature : float or array
        Temperature t [°C] (T = t + 273.15 K); the equation holds 0–90 °C.

    Returns
    -------
    float or array
        log10(K_H / (mol kg⁻¹ atm⁻¹)).

    Examples
    --------
    >>> round(log_henry(25.0), 3)
    -1.468
    """
    return _out(_log_k(PLUMMER_BUSENBERG_KH, temperature))


def carbonic_pka(temperature: ArrayLike) -> tuple[float | NDArray[np.float64], float | NDArray[np.float64]]:
    r"""Thermodynamic pK₁ and pK₂ of carbonic acid (H₂CO₃*) at a temperature.

    .. math::
        \log_{10} K_1 = -356.3094 - 0.06091964\,T + \frac{21834.37}{T}
            + 126.8339\log_{10}T - \frac{1684915}{T^2}

        \log_{10} K_2 = -107.8871 - 0.03252849\,T + \frac{5151.79}{T}
            + 38.92561\log_{10}T - \frac{563713.9}{T^2}

    Parameters
    ----------
    temperature : float or array
        Temperature t [°C]; the equations hold 0–90 °C.

    Returns
    -------
    (pK1, pK2) : floats or arrays
        −log10 K at zero ionic strength [dimensionless].

    Examples
    --------
    >>> [round(p, 3) for p in carbonic_pka(25.0)]
    [6.352, 10.329]

    References
    ----------
    .. [1] L. N. Plummer and E. Busenberg, Geochim. Cosmochim. Acta 46, 1011 (1982).
    """
    return _out(-_log_k(PLUMMER_BUSENBERG_K1, temperature)), _out(-_log_k(PLUMMER_BUSENBERG_K2, temperature))
