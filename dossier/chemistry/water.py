r"""Properties of liquid water at 0.1 MPa: density, ion product, permittivity
and the Debye–Hückel constants derived from them.

Everything here is vectorized: a temperature may be a float or a numpy array,
and the result has the same shape.

The ion product follows the IAPWS release R11-07 (Bandura & Lvov 2006). The
release needs the density of water; at 0.1 MPa it is taken from the Kell
(1975) correlation, which is valid from 0 to 150 °C at one atmosphere. The
relative permittivity is the Malmberg & Maryott (1956) polynomial, valid from
0 to 100 °C. The fundamental constants are the exact SI values of CODATA 2018.

References
----------
.. [1] A. V. Bandura and S. N. Lvov, "The Ionization Constant of Water over
   Wide Ranges of Temperature and Density", J. Phys. Chem. Ref. Data 35,
   15–30 (2006). doi:10.1063/1.1928231. Adopted as IAPWS R11-07 (2007).
.. [2] G. S. Kell, "Density, thermal expansivity, and compressibility of
   liquid water from 0 °C to 150 °C", J. Chem. Eng. Data 20, 97–105 (1975).
   doi:10.1021/je60064a005
.. [3] C. G. Malmberg and A. A. Maryott, "Dielectric constant of water from
   0 °C to 100 °C", J. Res. Natl. Bur. Stand. 56, 1–8 (1956).
   doi:10.6028/jres.056.001
.. [4] E. Tiesinga et al., "CODATA recommended values of the fundamental
   physical constants: 2018", Rev. Mod. Phys. 93, 025010 (2021).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = [
    "KELVIN",
    "water_density",
    "pkw_iapws",
    "pkw",
    "relative_permittivity",
    "debye_huckel_a",
    "debye_huckel_b",
]

KELVIN = 273.15
"""Offset between the Celsius and Kelvin scales [K]."""

# CODATA 2018 exact SI values and the derived electric constant.
_E = 1.602176634e-19  # elementary charge [C]
_K_B = 1.380649e-23  # Boltzmann constant [J/K]
_N_A = 6.02214076e23  # Avogadro constant [1/mol]
_EPS0 = 8.8541878128e-12  # electric constant [F/m]

# IAPWS R11-07 coefficients (Bandura & Lvov 2006, Table 1 of the release).
_N = 6
_ALPHA = (-0.864671, 8659.19, -22786.2)
_BETA = (0.642044, -56.8534, -0.375754)
_GAMMA = (0.61415, 48251.33, -67707.93, 10102100.0)
_MW = 18.015268  # molar mass of water [g/mol]

# Kell (1975) coefficients, t in °C, density in kg/m^3.
_KELL_NUM = (999.83952, 16.945176, -7.9870401e-3, -46.170461e-6, 105.56302e-9, -280.54253e-12)
_KELL_DEN = 16.879850e-3

# Malmberg & Maryott (1956), t in °C.
_MM = (87.740, -0.40008, 9.398e-4, -1.410e-6)


def _as_float_array(x: ArrayLike) -> NDArray[np.float64]:
    return np.asarray(x, dtype=np.float64)


def _scalar_or_array(x: NDArray[np.float64]) -> float | NDArray[np.float64]:
    return float(x) if x.ndim == 0 else x


def water_density(temperature: ArrayLike) -> float | NDArray[np.float64]:
    r"""Density of air-free liquid water at 0.1 MPa (Kell 1975).

    .. math::
        \rho = \frac{a_0 + a_1 t + a_2 t^2 + a_3 t^3 + a_4 t^4 + a_5 t^5}{1 + b t}

    Parameters
    ----------
    temperature : float or array
        Temperature t [°C]; the correlation holds from 0 to 150 °C.

    Returns
    -------
    float or array
        Density [kg/m³].

    Notes
    -----
    The denominator coefficient is b = 16.879850e-3; a widespread mis-copy
    (16.897850e-3) lowers the density at 25 °C by 0.32 kg/m³.

    Examples
    --------
    Tanaka et al. (2001) give 997.0470 kg/m³ at 25 °C; Kell agrees to 0.003:

    >>> round(water_density(25.0), 2)
    997.04

    References
    ----------
    .. [1] G. S. Kell, J. Chem. Eng. Data 20, 97–105 (1975).
    """
    t = _as_float_array(temperature)
    a0, a1, a2, a3, a4, a5 = _KELL_NUM
    num = a0 + t * (a1 + t * (a2 + t * (a3 + t * (a4 + t * a5))))
    return _scalar_or_array(num / (1.0 + _KELL_DEN * t))


def pkw_iapws(temperature_k: ArrayLike, density: ArrayLike) -> float | NDArray[np.float64]:
    r"""Ionization constant of water, IAPWS R11-07, at a given temperature and density.

    .. math::
        Z = \rho \exp\!\left(\alpha_0 + \frac{\alpha_1}{T} + \frac{\alpha_2}{T^2}\rho^{2/3}\right)

        \mathrm{p}K_w = -2n\left[\log_{10}(1+Z) - \frac{Z}{Z+1}\,\rho
            \left(\beta_0 + \frac{\beta_1}{T} + \beta_2\rho\right)\right]
            + \mathrm{p}K_w^G + 2\log_{10}\frac{M_w}{1000}

        \mathrm{p}K_w^G = \gamma_0 + \frac{\gamma_1}{T} + \frac{\gamma_2}{T^2} + \frac{\gamma_3}{T^3}

    Parameters
    ----------
    temperature_k : float or array
        Temperature T [K].
    density : float or array
        Density of water ρ [g/cm³].

    Returns
    -------
    float or array
        pKw = −log10(Kw/(mol/kg)²) on the molality scale [dimensionless].

    Examples
    --------
    Check value of the release (Table 3): T = 300 K, ρ = 1 g/cm³ gives 13.906565.

    >>> round(pkw_iapws(300.0, 1.0), 6)
    13.906565

    References
    ----------
    .. [1] A. V. Bandura and S. N. Lvov, J. Phys. Chem. Ref. Data 35, 15 (2006).
       doi:10.1063/1.1928231
    .. [2] IAPWS R11-07, Release on the Ionization Constant of H2O (2007).
    """
    T = _as_float_array(temperature_k)
    rho = _as_float_array(density)
    a0, a1, a2 = _ALPHA
    b0, b1, b2 = _BETA
    g0, g1, g2, g3 = _GAMMA
    z = rho * np.exp(a0 + a1 / T + a2 / T**2 * rho ** (2.0 / 3.0))
    pkw_g = g0 + g1 / T + g2 / T**2 + g3 / T**3
    value = (
        -2.0 * _N * (np.log10(1.0 + z) - z / (z + 1.0) * rho * (b0 + b1 / T + b2 * rho))
        + pkw_g
        + 2.0 * np.log10(_MW / 1000.0)
    )
    return _scalar_or_array(value)


def pkw(temperature: ArrayLike) -> float | NDArray[np.float64]:
    r"""Ionization constant of water at 0.1 MPa, IAPWS R11-07 with Kell density.

    .. math::
        \mathrm{p}K_w(t) = \mathrm{p}K_w^{\mathrm{IAPWS}}\bigl(T = t + 273.15,\;
        \rho = \rho_{\mathrm{Kell}}(t)/1000\bigr)

    Parameters
    ----------
    temperature : float or array
        Temperature t [°C], 0 to 100 °C.

    Returns
    -------
    float or array
        pKw on the molality scale [dimensionless].

    Examples
    --------
    The CRC Handbook table of pKw at 0.1 MPa (computed from the same release)
    gives 13.995 at 25 °C:

    >>> round(pkw(25.0), 3)
    13.995

    References
    ----------
    .. [1] A. V. Bandura and S. N. Lvov, J. Phys. Chem. Ref. Data 35, 15 (2006).
    .. [2] G. S. Kell, J. Chem. Eng. Data 20, 97 (1975).
    """
    t = _as_float_array(temperature)
    return pkw_iapws(t + KELVIN, _as_float_array(water_density(t)) / 1000.0)


def relative_permittivity(temperature: ArrayLike) -> float | NDArray[np.float64]:
    r"""Relative permittivity of liquid water at 0.1 MPa (Malmberg & Maryott 1956).

    .. math::
        \varepsilon_r = 87.740 - 0.40008\,t + 9.398\times10^{-4}\,t^2 - 1.410\times10^{-6}\,t^3

    Parameters
    ----------
    temperature : float or array
        Temperature t [°C], 0 to 100 °C.

    Returns
    -------
    float or array
        εr [dimensionless].

    Examples
    --------
    >>> round(relative_permittivity(25.0), 2)
    78.3

    References
    ----------
    .. [1] C. G. Malmberg and A. A. Maryott, J. Res. Natl. Bur. Stand. 56, 1 (1956).
    """
    t = _as_float_array(temperature)
    c0, c1, c2, c3 = _MM
    return _scalar_or_array(c0 + t * (c1 + t * (c2 + t * c3)))


def _state(temperature: ArrayLike) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64]]:
    """(T [K], density [kg/m³], relative permittivity) of water at t [°C]."""
    t = _as_float_array(temperature)
    return t + KELVIN, _as_float_array(water_density(t)), _as_float_array(relative_permittivity(t))


def debye_huckel_a(temperature: ArrayLike) -> float | NDArray[np.float64]:
    r"""Debye–Hückel limiting-law constant A (base-10, molality scale).

    .. math::
        A = \frac{1}{\ln 10}\,(2\pi N_A \rho_w)^{1/2}
            \left(\frac{e^2}{4\pi\varepsilon_0\varepsilon_r k_B T}\right)^{3/2}

    with ρw the density of water (Kell 1975) and εr its relative permittivity
    (Malmberg & Maryott 1956).

    Parameters
    ----------
    temperature : float or array
        Temperature t [°C], 0 to 100 °C.

    Returns
    -------
    float or array
        A [(kg/mol)^½], for log10 γ = −A z² √I.

    Examples
    --------
    Robinson & Stokes tabulate 0.5108 at 25 °C (recalled from memory); the
    value quoted in many textbooks is 0.509:

    >>> round(debye_huckel_a(25.0), 4)
    0.5108

    References
    ----------
    .. [1] R. A. Robinson and R. H. Stokes, Electrolyte Solutions, 2nd ed.
       (Butterworths, 1959), Appendix 7.1.
    .. [2] C. G. Malmberg and A. A. Maryott, J. Res. Natl. Bur. Stand. 56, 1 (1956).
    """
    T, rho, eps = _state(temperature)
    bjerrum = _E**2 / (4.0 * np.pi * _EPS0 * eps * _K_B * T)  # [m]
    a = np.sqrt(2.0 * np.pi * _N_A * rho) * bjerrum**1.5 / np.log(10.0)
    return _scalar_or_array(a)


def debye_huckel_b(temperature: ArrayLike) -> float | NDArray[np.float64]:
    r"""Debye–Hückel constant B of the extended law (molality scale).

    .. math::
        B = \left(\frac{2 N_A \rho_w e^2}{\varepsilon_0\varepsilon_r k_B T}\right)^{1/2}

    Parameters
    ----------
    temperature : float or array
        Temperature t [°C], 0 to 100 °C.

    Returns
    -------
    float or array
        B [Å⁻¹ (kg/mol)^½], for log10 γ = −A z² √I / (1 + B å √I) with å in Å.

    Examples
    --------
    >>> round(debye_huckel_b(25.0), 4)
    0.3287

    References
    ----------
    .. [1] R. A. Robinson and R. H. Stokes, Electrolyte Solutions, 2nd ed.
       (Butterworths, 1959), Appendix 7.1.
    """
    T, rho, eps = _state(temperature)
    b = np.sqrt(2.0 * _N_A * rho * _E**2 / (_EPS0 * eps * _K_B * T))  # [1/m (kg/mol)^½]
    return _scalar_or_array(b * 1e-10)
