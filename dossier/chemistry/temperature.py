r"""Temperature dependence of ionization constants (van 't Hoff).

For an ionization step with standard enthalpy ΔH° and heat-capacity change
ΔCp° (taken as constant), integrating the van 't Hoff and Kirchhoff equations
from the reference temperature T0 = 298.15 K gives

.. math::
    \mathrm{p}K(T) = \mathrm{p}K(T_0)
      + \frac{\Delta H^\circ}{R\ln 10}\left(\frac{1}{T} - \frac{1}{T_0}\right)
      - \frac{\Delta C_p^\circ}{R\ln 10}\left(\frac{T_0}{T} - 1 + \ln\frac{T}{T_0}\right)

With ΔCp° = 0 this is the integrated van 't Hoff equation.

References
----------
.. [1] R. N. Goldberg, N. Kishore and R. M. Lennen, "Thermodynamic
   Quantities for the Ionization Reactions of Buffers", J. Phys. Chem. Ref.
   Data 31, 231–370 (2002), Eq. (8). doi:10.1063/1.1416902
.. [2] CODATA 2018: R = 8.314462618 J/(K·mol).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .water import KELVIN

__all__ = ["GAS_CONSTANT", "REFERENCE_TEMPERATURE", "pka_at_temperature"]

GAS_CONSTANT = 8.314462618
"""Molar gas constant R [J/(K·mol)] (CODATA 2018, exact)."""

REFERENCE_TEMPERATURE = 25.0
"""Temperature at which stated pKa values hold [°C]."""


def pka_at_temperature(
    pka: ArrayLike,
    temperature: ArrayLike,
    dh: float | ArrayLike | None = None,
    dcp: float | ArrayLike | None = None,
) -> float | NDArray[np.float64]:
    r"""pKa at another temperature from its value at 25 °C.

    .. math::
        \mathrm{p}K(T) = \mathrm{p}K(T_0)
          + \frac{\Delta H^\circ}{R\ln 10}\left(\frac{1}{T} - \frac{1}{T_0}\right)
          - \frac{\Delta C_p^\circ}{R\ln 10}\left(\frac{T_0}{T} - 1 + \ln\frac{T}{T_0}\right)

    Parameters
    ----------
    pka : float or array
        pKa at 25 °C [dimensionless].
    temperature : float or array
        Temperature t [°C].
    dh : float, optional
        Standard enthalpy of ionization ΔH° [kJ/mol]. None: the pKa is taken
        as independent of temperature.
    dcp : float, optional
        Standard heat-capacity change of ionization ΔCp° [J/(K·mol)].

    Returns
    -------
    float or array
        pKa at t [dimensionless].

    Examples
    --------
    TRIS·H⁺, pKa 8.072 and ΔH° = 47.45 kJ/mol at 25 °C (Goldberg et al. 2002);
    at 37 °C the Bates & Hetzer (1961) equation gives 7.752:

    >>> round(pka_at_temperature(8.072, 37.0, dh=47.45), 3)
    7.75

    References
    ----------
    .. [1] R. N. Goldberg, N. Kishore and R. M. Lennen, J. Phys. Chem. Ref.
       Data 31, 231 (2002). doi:10.1063/1.1416902
    """
    p = np.asarray(pka, dtype=np.float64)
    T = np.asarray(temperature, dtype=np.float64) + KELVIN
    T0 = REFERENCE_TEMPERATURE + KELVIN
    k = 1.0 / (GAS_CONSTANT * np.log(10.0))
    out = p
    if dh is not None:
        out = out + np.asarray(dh, dtype=np.float64) * 1e3 * k * (1.0 / T - 1.0 / T0)
    if dcp is not None:
        out = out - np.asarray(dcp, dtype=np.float64) * k * (T0 / T - 1.0 + np.log(T / T0))
    out = np.asarray(out, dtype=np.float64)
    return float(out) if out.ndim == 0 else out
