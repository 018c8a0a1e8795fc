"""An independent arbitrary-precision route to the same equations (mpmath, 50 digits).

Written separately from dossier.chemistry on purpose: the species fractions
come from cumulative constants β_j h^(n−j), the charge balance is written
directly as Σ z·c = 0 over every ion (counter-ions included) rather than as a
proton condition, log10 h is found by plain bisection, and the ionic strength
by the Illinois variant of regula falsi. Only the physical constants and
formulas are shared (IAPWS R11-07, Kell 1975, Malmberg & Maryott 1956,
CODATA 2018, van 't Hoff, Plummer & Busenberg 1982 for CO₂), each typed in
again here from its source. Open CO₂ is written as [HCO₃⁻] = K₁ K_H p/(γ₁² h),
[CO₃²⁻] = K₂ [HCO₃⁻] /(γ₂ h) (γ of H₂CO₃* = 1); closed CO₂ as one more
diprotic component.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import mpmath as mp

mp.mp.dps = 50

# IAPWS R11-07 (Bandura & Lvov 2006)
_ALPHA = (mp.mpf("-0.864671"), mp.mpf("8659.19"), mp.mpf("-22786.2"))
_BETA = (mp.mpf("0.642044"), mp.mpf("-56.8534"), mp.mpf("-0.375754"))
_GAMMA = (mp.mpf("0.61415"), mp.mpf("48251.33"), mp.mpf("-67707.93"), mp.mpf("10102100"))
_MW = mp.mpf("18.015268")
# Kell (1975)
_KELL = [mp.mpf(s) for s in ("999.83952", "16.945176", "-7.9870401e-3", "-46.170461e-6", "105.56302e-9", "-280.54253e-12")]
_KELL_B = mp.mpf("16.879850e-3")
# Malmberg & Maryott (1956)
_MM = [mp.mpf(s) for s in ("87.740", "-0.40008", "9.398e-4", "-1.410e-6")]
# CODATA 2018
_E = mp.mpf("1.602176634e-19")
_KB = mp.mpf("1.380649e-23")
_NA = mp.mpf("6.02214076e23")
_EPS0 = mp.mpf("8.8541878128e-12")
_R = mp.mpf("8.314462618")
# Plummer & Busenberg (1982): log10 K = a + b T + c/T + d log10 T + e/T²
_PB = {
    "KH": [mp.mpf(v) for v in ("108.3865", "0.01985076", "-6919.53", "-40.45154", "669365")],
    "K1": [mp.mpf(v) for v in ("-356.3094", "-0.06091964", "21834.37", "126.8339", "-1684915")],
    "K2": [mp.mpf(v) for v in ("-107.8871", "-0.03252849", "5151.79", "38.92561", "-563713.9")],
}


def pb_log_k(name: str, t: mp.mpf) -> mp.mpf:
    a, b, c, d, e = _PB[name]
    T = t + mp.mpf("273.15")
    return a + b * T + c / T + d * mp.log10(T) + e / T**2


def density(t: mp.mpf) -> mp.mpf:
    """kg/m^3."""
    return sum(c * t**i for i, c in enumerate(_KELL)) / (1 + _KELL_B * t)


def pkw(t: mp.mpf) -> mp.mpf:
    T = t + mp.mpf("273.15")
    rho = density(t) / 1000
    z = rho * mp.exp(_ALPHA[0] + _ALPHA[1] / T + _ALPHA[2] / T**2 * rho ** (mp.mpf(2) / 3))
    g = _GAMMA[0] + _GAMMA[1] / T + _GAMMA[2] / T**2 + _GAMMA[3] / T**3
    return -12 * (mp.log10(1 + z) - z / (z + 1) * rho * (_BETA[0] + _BETA[1] / T + _BETA[2] * rho)) + g + 2 * mp.log10(_MW / 1000)


def dh_a(t: mp.mpf) -> mp.mpf:
    T = t + mp.mpf("273.15")
    eps = sum(c * t**i for i, c in enumerate(_MM))
    lb = _E**2 / (4 * mp.pi * _EPS0 * eps * _KB * T)
    return mp.sqrt(2 * mp.pi * _NA * density(t)) * lb ** mp.mpf(1.5) / mp.log(10)


def dh_b(t: mp.mpf) -> mp.mpf:
    T = t + mp.mpf("273.15")
    eps = sum(c * t**i for i, c in enumerate(_MM))
    return mp.sqrt(2 * _NA * density(t) * _E**2 / (_EPS0 * eps * _KB * T)) * mp.mpf("1e-10")


def pka_at(pka: mp.mpf, t: mp.mpf, dh: float | None, dcp: float | None) -> mp.mpf:
    T = t + mp.mpf("273.15")
    T0 = mp.mpf("298.15")
    out = pka
    if dh is not None:
        out += mp.mpf(dh) * 1000 / (_R * mp.log(10)) * (1 / T - 1 / T0)
    if dcp is not None:
        out -= mp.mpf(dcp) / (_R * mp.log(10)) * (T0 / T - 1 + mp.log(T / T0))
    return out


@dataclass
class Comp:
    pka: list[float]
    total: float
    removed: int = 0
    charge: int = 0
    dh: list[float | None] | None = None
    dcp: list[float | None] | None = None


@dataclass
class Case:
    comps: list[Comp] = field(default_factory=list)
    temperature: float = 25.0
    activity: str = "ideal"
    strong_acid: float = 0.0
    strong_base: float = 0.0
    background: float = 0.0
    pkw: float | None = None
    davies_coefficient: float = 0.3
    ion_size: float | None = None
    co2_mode: str = "none"  # none | open | closed
    pco2: float = 0.0  # atm (open)
    dic: float = 0.0  # mol/L (closed)


def log_gamma1(case: Case, i: mp.mpf, t: mp.mpf) -> mp.mpf:
    if case.activity == "ideal":
        return mp.mpf(0)
    a = dh_a(t)
    s = mp.sqrt(i)
    if case.activity == "debye-huckel":
        return -a * s
    if case.activity == "extended-debye-huckel":
        ba = mp.mpf("1.5") if case.ion_size is None else dh_b(t) * mp.mpf(case.ion_size)
        return -a * s / (1 + ba * s)
    if case.activity == "davies":
        return -a * (s / (1 + s) - mp.mpf(case.davies_coefficient) * i)
    raise ValueError(case.activity)


def _species(case: Case, log_h: mp.mpf, f: mp.mpf, t: mp.mpf):
    """(list of (charge, concentration) of every ion, h) at log10 h and log10 γ1 = f."""
    h = mp.power(10, log_h)
    gamma = lambda z: mp.power(10, f * z * z)  # noqa: E731
    kw_t = mp.power(10, -(mp.mpf(case.pkw) if case.pkw is not None else pkw(t)))
    ions = [(1, h), (-1, kw_t / (gamma(1) ** 2 * h)), (-1, mp.mpf(case.strong_acid)), (1, mp.mpf(case.strong_base))]
    for c in case.comps:
        n = len(c.pka)
        pks = [pka_at(mp.mpf(p), t, (c.dh or [None] * n)[i], (c.dcp or [None] * n)[i]) for i, p in enumerate(c.pka)]
        # activity-based: a_H a_{j} / a_{j-1} = K_j  →  [j]/[j-1] = K_j γ_{j-1} / (γ_H γ_j h)
        # cumulative: [j]/[0] = prod_i K_i γ_{i-1} / (γ_H γ_i h)
        terms = [mp.mpf(1)]
        for i in range(1, n + 1):
            k = mp.power(10, -pks[i - 1])
            zi, zprev = c.charge - i, c.charge - i + 1
            terms.append(terms[-1] * k * gamma(zprev) / (gamma(1) * gamma(zi) * h))
        s = sum(terms)
        for j, term in enumerate(terms):
            ions.append((c.charge - j, mp.mpf(c.total) * term / s))
        q = c.charge - c.removed  # counter-ions balance the form as added
        if q > 0:
            ions.append((-1, mp.mpf(c.total) * q))
        elif q < 0:
            ions.append((1, mp.mpf(c.total) * -q))
    if case.co2_mode != "none":
        k1 = mp.power(10, pb_log_k("K1", t))
        k2 = mp.power(10, pb_log_k("K2", t))
        if case.co2_mode == "open":
            s = mp.power(10, pb_log_k("KH", t)) * mp.mpf(case.pco2)
            hco3 = k1 * s / (gamma(1) ** 2 * h)
            ions.append((-1, hco3))
            ions.append((-2, k2 * hco3 * gamma(1) / (gamma(1) * gamma(2) * h)))
        else:
            r1 = k1 / (gamma(1) ** 2 * h)
            r2 = r1 * k2 * gamma(1) / (gamma(1) * gamma(2) * h)
            den = 1 + r1 + r2
            ions.append((-1, mp.mpf(case.dic) * r1 / den))
            ions.append((-2, mp.mpf(case.dic) * r2 / den))
    return ions, h


def _solve_at(case: Case, f: mp.mpf, t: mp.mpf) -> mp.mpf:
    """log10 h at fixed log10 γ1 = f, by bisection of the charge balance."""
    lo, hi = mp.mpf(-40), mp.mpf(5)
    for _ in range(200):
        mid = (lo + hi) / 2
        ions, _ = _species(case, mid, f, t)
        charge = sum(z * c for z, c in ions)
        if charge > 0:
            hi = mid
        else:
            lo = mid
        if hi - lo < mp.mpf("1e-28"):
            break
    return (lo + hi) / 2


def _ionic(case: Case, log_h: mp.mpf, f: mp.mpf, t: mp.mpf) -> mp.mpf:
    ions, _ = _species(case, log_h, f, t)
    return mp.mpf(case.background) + sum(z * z * c for z, c in ions) / 2


def solve(case: Case) -> dict[str, mp.mpf]:
    """{'ph', 'ph_conc', 'ionic_strength'} at 50 digits."""
    t = mp.mpf(case.temperature)
    if case.activity == "ideal":
        lh = _solve_at(case, mp.mpf(0), t)
        return {"ph": -lh, "ph_conc": -lh, "ionic_strength": _ionic(case, lh, mp.mpf(0), t)}

    def psi(i: mp.mpf) -> tuple[mp.mpf, mp.mpf, mp.mpf]:
        f = log_gamma1(case, i, t)
        lh = _solve_at(case, f, t)
        return _ionic(case, lh, f, t) - i, lh, f

    # Illinois regula falsi on psi(I) = I(speciation at I) − I over [0, upper].
    a = mp.mpf(0)
    fa, _, _ = psi(a)
    b = mp.mpf(1)
    fb, lh, f = psi(b)
    while fb > 0:
        a, fa = b, fb
        b *= 4
        fb, lh, f = psi(b)
    side = 0
    for _ in range(300):
        c = (a * fb - b * fa) / (fb - fa)
        fc, lh, f = psi(c)
        if abs(fc) < mp.mpf("1e-24") * max(c, mp.mpf("1e-30")):
            return {"ph": -lh - f, "ph_conc": -lh, "ionic_strength": c}
        if fc * fb > 0:
            b, fb = c, fc
            if side == -1:
                fa /= 2
            side = -1
        else:
            a, fa = c, fc
            if side == 1:
                fb /= 2
            side = 1
    raise RuntimeError("mp reference: ionic strength did not converge")
