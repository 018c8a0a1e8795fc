r"""The catalogue of textbook pH shortcuts.

Each :class:`Approximation` has a stable id, a title, its equation (LaTeX),
its assumptions in words, a test of whether it applies to a solution, and a
vectorized pH. Its *error* is always approximate pH − exact pH, where the
exact pH is the activity-scale pH of :func:`~dossier.chemistry.equilibrium`.

All shortcuts use the constants at the solution's temperature (pKa by van 't
Hoff, pKw from IAPWS R11-07 or the stated override) and concentrations in
place of activities, unless the procedure states the constants its own
calculation uses (:class:`StatedConstants`: a mixed pKa″ at the working ionic
strength, the 25 °C value at 37 °C, Kw = 1e-14); the assumption that the 25 °C
constants hold at another temperature is also a shortcut of its own
(``constants-at-25c``).

Each shortcut knows which of the first component's steps its equation uses
(``steps``; the *key step* is the one a pKa sweep varies, and may belong to
another component for a mixture of two substances; None for the strong acid
and base formulas, which use no pKa) and whether pKw enters it (``uses_pkw``).

Symbols: C total concentration of the (single) component [mol/L]; Ka, Kb the
acid and base constants of the step involved, Kb = Kw/Ka; h = [H⁺].

References
----------
.. [1] D. C. Harris, Quantitative Chemical Analysis, 9th ed. (Freeman, 2015),
   chapters "Monoprotic Acid–Base Equilibria" and "Polyprotic Acid–Base
   Equilibria".
.. [2] D. A. Skoog, D. M. West, F. J. Holler and S. R. Crouch, Fundamentals of
   Analytical Chemistry, 9th ed. (Brooks/Cole, 2014), chapter "Solving
   Equilibrium Problems for Complex Systems".
.. [3] L. J. Henderson, Am. J. Physiol. 21, 173–179 (1908);
   K. A. Hasselbalch, Biochem. Z. 78, 112–144 (1916).
.. [4] J. N. Butler, Ionic Equilibrium: Solubility and pH Calculations
   (Wiley, 1998), ch. 3 (salts of a weak acid and a weak base; strong acids
   and bases with water's own ions).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, replace

import numpy as np

from ..limits import SALT_EQUAL_AMOUNTS_REL
from .activity import ActivityModelId
from .errors import InputRangeError
from .solver import Equilibrium, equilibrium
from .species import Component, Number, Protolyte, Solution
from .water import pkw as pkw_iapws

__all__ = [
    "Approximation",
    "Constants",
    "StatedConstants",
    "buffer_pair",
    "donor_acceptor",
    "CATALOGUE",
    "NotApplicable",
    "approximation",
    "applicable",
    "working_constants",
]


class NotApplicable(InputRangeError):
    """The shortcut does not apply to this solution (the message says why)."""


def _np(v: Number) -> np.ndarray:
    return np.asarray(v, dtype=np.float64)


def _out(v: np.ndarray) -> Number:
    v = np.asarray(v, dtype=np.float64)
    return float(v) if v.ndim == 0 else v


@dataclass(frozen=True)
class StatedConstants:
    """The constants a procedure's own calculation puts into a shortcut.

    Attributes
    ----------
    pka : tuple of (float or None)
        One entry per step of the first component: the procedure's value, or
        None for the model's value (thermodynamic, at the working temperature).
        Empty: every step takes the model's value.
    pkw : float, optional
        The procedure's pKw (e.g. 14.0); None: the model's value.
    """

    pka: tuple[float | None, ...] = ()
    pkw: float | None = None

    @property
    def empty(self) -> bool:
        """True when the procedure states no constant of its own."""
        return self.pkw is None and all(v is None for v in self.pka)


@dataclass(frozen=True)
class Constants:
    """The constants a shortcut's equation is evaluated with.

    ``pka[k][i]``: pKa of step i + 1 of component k; ``pkw``: pKw. Each a float
    or an array of the solution's shape.
    """

    pka: tuple[tuple[Number, ...], ...]
    pkw: Number


def working_constants(solution: Solution, stated: StatedConstants | None = None) -> Constants:
    """The constants a shortcut uses: the model's values at the solution's
    temperature, replaced by the procedure's own where it states them.

    Parameters
    ----------
    solution : Solution
    stated : StatedConstants, optional
        The procedure's values (first component's steps, pKw).

    Returns
    -------
    Constants
        ``pka[k][i]``: pKa of step i + 1 of component k at the temperature
        (van 't Hoff where ΔH° is known, :meth:`Protolyte.pka_at`) or as
        stated; pKw (the solution's override, IAPWS R11-07, or as stated).

    Examples
    --------
    >>> sol = Solution([Component(Protolyte("tris", (8.072,), charge=1, dh=(47.45,)), 0.05)], temperature=37.0)
    >>> k = working_constants(sol)
    >>> round(k.pka[0][0], 2), round(k.pkw, 3)
    (7.75, 13.621)
    >>> working_constants(sol, StatedConstants(pka=(8.07,), pkw=14.0)).pka[0][0]
    8.07
    """
    pkas = [list(c.protolyte.pka_at(solution.temperature)) for c in solution.components]
    pkw = solution.pkw if solution.pkw is not None else pkw_iapws(solution.temperature)
    if stated is not None:
        for i, v in enumerate(stated.pka):
            if v is not None and pkas:
                pkas[0][i] = v
        if stated.pkw is not None:
            pkw = stated.pkw
    return Constants(tuple(tuple(p) for p in pkas), pkw)


def _no_strong(solution: Solution) -> str | None:
    if np.any(_np(solution.strong_acid) > 0) or np.any(_np(solution.strong_base) > 0):
        return "the solution contains added strong acid or base"
    return None


def _single(solution: Solution) -> str | None:
    if len(solution.components) != 1:
        return f"needs exactly one acid–base component (the solution has {len(solution.components)})"
    return _no_strong(solution)


# ---------------------------------------------------------------- applicability tests
def _weak_acid_applies(s: Solution) -> str | None:
    why = _single(s)
    if why:
        return why
    if s.components[0].removed != 0:
        return "the component is not added in its fully protonated (acid) form"
    return None


def _base_applies(neutral: bool) -> Callable[[Solution], str | None]:
    def test(s: Solution) -> str | None:
        why = _single(s)
        if why:
            return why
        c = s.components[0]
        if c.removed != c.protolyte.steps:
            return "the component is not added in its fully deprotonated (base) form"
        if neutral and c.form_charge != 0:
            return "the base as added is charged (a salt): use conjugate-base-square-root"
        if not neutral and c.form_charge == 0:
            return "the base as added is uncharged: use weak-base-square-root"
        return None

    return test


def _ampholyte_applies(s: Solution) -> str | None:
    why = _single(s)
    if why:
        return why
    c = s.components[0]
    if not 0 < c.removed < c.protolyte.steps:
        return "the component is not added in an intermediate (amphiprotic) form"
    return None


def buffer_pair(s: Solution) -> tuple[int, int, int] | None:
    """(acid component, base component, step) when the solution is an acid and its
    conjugate base (two forms of one substance one proton apart), else None."""
    if len(s.components) != 2:
        return None
    c0, c1 = s.components
    if not c0.protolyte.is_same_substance(c1.protolyte):
        return None
    if c1.removed == c0.removed + 1:
        return 0, 1, c1.removed
    if c0.removed == c1.removed + 1:
        return 1, 0, c0.removed
    return None


def _hh_applies(s: Solution) -> str | None:
    ca, cb = _np(s.strong_acid), _np(s.strong_base)
    if buffer_pair(s) is not None:
        return _no_strong(s)
    if len(s.components) == 1:
        c = s.components[0]
        total = _np(c.total)
        if np.any(cb > 0) and not np.any(ca > 0):
            if c.removed == c.protolyte.steps:
                return "strong base added to a fully deprotonated form leaves no conjugate pair"
            if np.any(cb >= total):
                return "the strong base is not less than the component it neutralizes"
            return None
        if np.any(ca > 0) and not np.any(cb > 0):
            if c.removed == 0:
                return "strong acid added to a fully protonated form leaves no conjugate pair"
            if np.any(ca >= total):
                return "the strong acid is not less than the component it neutralizes"
            return None
    return "needs an acid and its conjugate base: two forms of one substance differing by one proton, or one form partly neutralized by strong acid or base"


def _strong_only(kind: str) -> Callable[[Solution], str | None]:
    """Only a strong acid (kind 'acid') or only a strong base ('base'), no weak component."""

    def test(s: Solution) -> str | None:
        if s.components:
            return f"the solution holds weak acid–base components ({len(s.components)}), not only a strong {kind}"
        mine, other = (s.strong_acid, s.strong_base) if kind == "acid" else (s.strong_base, s.strong_acid)
        if np.any(_np(other) > 0):
            return "the solution holds both strong acid and strong base"
        if np.any(_np(mine) <= 0):
            return f"the solution holds no strong {kind}, where a formula in log C has no value"
        return None

    return test


def donor_acceptor(s: Solution) -> tuple[int, int] | str:
    """(proton donor, proton acceptor) components of a mixture of two substances,
    or the reason in words why the solution is not one.

    The donor is added in a form that can lose a proton (removed < steps), the
    acceptor in one that can take one up (removed > 0); the two must be
    different substances and the assignment unambiguous.
    """
    if len(s.components) != 2:
        return f"needs exactly two acid–base components (the solution has {len(s.components)})"
    c0, c1 = s.components
    if c0.protolyte.is_same_substance(c1.protolyte):
        return "the two components are forms of one substance (a conjugate pair: use henderson-hasselbalch)"
    why = _no_strong(s)
    if why:
        return why
    options = [(i, j) for i, j in ((0, 1), (1, 0)) if s.components[i].removed < s.components[i].protolyte.steps and s.components[j].removed > 0]
    if not options:
        return "neither component is added in a form that gives a proton to the other"
    if len(options) == 2:
        return "both components are added in amphiprotic forms: which one is the acid is ambiguous"
    return options[0]


def _equal_totals(s: Solution, i: int, j: int) -> np.ndarray:
    a, b = _np(s.components[i].total), _np(s.components[j].total)
    return np.abs(a - b) <= 1e-9 * np.maximum(a, b)


def _salt_applies(s: Solution) -> str | None:
    pair = donor_acceptor(s)
    if isinstance(pair, str):
        return pair
    a, b = _np(s.components[pair[0]].total), _np(s.components[pair[1]].total)
    if np.any(np.abs(a - b) > SALT_EQUAL_AMOUNTS_REL * np.maximum(a, b)):
        return (f"the acid and the base are not in equal amounts (within {SALT_EQUAL_AMOUNTS_REL:.0%}; "
                "the salt formula holds for the 1:1 salt)")
    return None


def _cross_hh_applies(s: Solution) -> str | None:
    pair = donor_acceptor(s)
    if isinstance(pair, str):
        return pair
    equal = _equal_totals(s, *pair)
    if np.any(equal):
        return "the acid and the base are in equal amounts: no conjugate pair is left over (use weak-acid-weak-base-salt)"
    a, b = _np(s.components[pair[0]].total), _np(s.components[pair[1]].total)
    if np.any(a > b) and np.any(a < b):
        return "the acid is in excess at some points and the base at others"
    return None


def _first_step_applies(s: Solution) -> str | None:
    poly = [c for c in s.components if c.protolyte.steps > 1]
    if not poly:
        return "no component has more than one ionization step"
    for c in poly:
        if c.removed not in (0, c.protolyte.steps):
            return f"{c.protolyte.name} is added in an intermediate form, where no single step dominates"
    return None


def _ideal_applies(s: Solution) -> str | None:
    if s.activity == ActivityModelId.IDEAL:
        return "the method already treats the solution as ideal"
    return None


def _at_25_applies(s: Solution) -> str | None:
    if np.all(_np(s.temperature) == 25.0):
        return "the working temperature is 25 °C"
    return None


# ---------------------------------------------------------------- which step each shortcut uses
def _first_step(s: Solution) -> int | None:
    return 0 if s.components else None  # None: a strong acid or base alone has no pKa


def _last_step(s: Solution) -> int:
    return s.components[0].protolyte.steps - 1


def _first_or_last_step(s: Solution) -> int:
    c = s.components[0]
    return 0 if c.removed == 0 else c.protolyte.steps - 1


def _ampholyte_steps(s: Solution) -> tuple[int, ...]:
    r = s.components[0].removed
    return (r - 1, r)


def _hh_step(s: Solution) -> int:
    """The step of the conjugate pair: between the two forms, or the one the strong acid or base titrates."""
    pair = buffer_pair(s)
    if pair is not None:
        return pair[2] - 1
    c = s.components[0]
    return c.removed if np.any(_np(s.strong_base) > 0) else c.removed - 1


def _salt_steps(s: Solution) -> tuple[tuple[int, int], tuple[int, int]]:
    """((component, step) of the acid's pKa, (component, step) of the base's conjugate acid's pKa)."""
    i, j = donor_acceptor(s)  # type: ignore[misc]
    return (i, s.components[i].removed), (j, s.components[j].removed - 1)


def _first_component_steps(pairs: tuple[tuple[int, int], ...]) -> tuple[int, ...]:
    return tuple(sorted({step for comp, step in pairs if comp == 0}))


def _cross_key(s: Solution) -> tuple[int, int]:
    """The pair left over: the acid's when it is in excess, else the base's conjugate."""
    acid, base = _salt_steps(s)
    i, j = acid[0], base[0]
    return acid if np.all(_np(s.components[i].total) > _np(s.components[j].total)) else base


def _no_pka(s: Solution) -> tuple[int, ...]:
    return ()


# ---------------------------------------------------------------- pH formulas
def _ph_strong_acid(s: Solution, k: Constants) -> Number:
    return _out(-np.log10(_np(s.strong_acid)))


def _oh_or_h_water(c: np.ndarray, pkw: np.ndarray) -> np.ndarray:
    """[H⁺] (or [OH⁻]) of a strong acid (base) with water: C/2 + √(C²/4 + Kw) = (C + √(C² + 4Kw))/2."""
    return 0.5 * (c + np.sqrt(c * c + 4.0 * 10.0**-pkw))


def _ph_strong_acid_water(s: Solution, k: Constants) -> Number:
    return _out(-np.log10(_oh_or_h_water(_np(s.strong_acid), _np(k.pkw))))


def _ph_strong_base(s: Solution, k: Constants) -> Number:
    return _out(_np(k.pkw) + np.log10(_np(s.strong_base)))


def _ph_strong_base_water(s: Solution, k: Constants) -> Number:
    pkw = _np(k.pkw)
    return _out(pkw + np.log10(_oh_or_h_water(_np(s.strong_base), pkw)))


def _ph_salt(s: Solution, k: Constants) -> Number:
    (i, a), (j, b) = _salt_steps(s)
    return _out(0.5 * (_np(k.pka[i][a]) + _np(k.pka[j][b])))


def _ph_cross_hh(s: Solution, k: Constants) -> Number:
    acid, base = _salt_steps(s)
    ca, cb = _np(s.components[acid[0]].total), _np(s.components[base[0]].total)
    comp, step = _cross_key(s)
    pka = _np(k.pka[comp][step])
    if comp == acid[0]:  # HA left over, A⁻ made from it by the base: pH = pKa + log(C_B / (C_HA − C_B))
        return _out(pka + np.log10(cb) - np.log10(ca - cb))
    return _out(pka + np.log10(cb - ca) - np.log10(ca))  # B left over, BH⁺ made from it by the acid



def _weak_acid_parts(s: Solution, k: Constants) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    return _np(k.pka[0][0]), _np(s.components[0].total), _np(k.pkw)


def _ph_weak_acid_sqrt(s: Solution, k: Constants) -> Number:
    pka, c, _ = _weak_acid_parts(s, k)
    return _out(0.5 * (pka - np.log10(c)))


def _ph_weak_acid_quadratic(s: Solution, k: Constants) -> Number:
    pka, c, _ = _weak_acid_parts(s, k)
    ka = 10.0**-pka
    # h = 2KaC / (Ka + √(Ka² + 4KaC)), in logs so that a tiny C cannot underflow to 0
    return _out(-(np.log10(2.0 * ka) + np.log10(c) - np.log10(ka + np.sqrt(ka * ka + 4.0 * ka * c))))


def _ph_weak_acid_water(s: Solution, k: Constants) -> Number:
    pka, c, pkw = _weak_acid_parts(s, k)
    return _out(-0.5 * np.log10(10.0**-pka * c + 10.0**-pkw))


def _base_parts(s: Solution, k: Constants) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    c = s.components[0]
    pk_last = _np(k.pka[0][c.protolyte.steps - 1])
    pkw = _np(k.pkw)
    return pkw - pk_last, _np(c.total), pkw


def _ph_base_sqrt(s: Solution, k: Constants) -> Number:
    pkb, c, pkw = _base_parts(s, k)
    return _out(pkw - 0.5 * (pkb - np.log10(c)))


def _ph_base_water(s: Solution, k: Constants) -> Number:
    pkb, c, pkw = _base_parts(s, k)
    return _out(pkw + 0.5 * np.log10(10.0**-pkb * c + 10.0**-pkw))


def _ph_base_quadratic(s: Solution, k: Constants) -> Number:
    pkb, c, pkw = _base_parts(s, k)
    kb = 10.0**-pkb
    return _out(pkw + np.log10(2.0 * kb) + np.log10(c) - np.log10(kb + np.sqrt(kb * kb + 4.0 * kb * c)))


def _ph_hh(s: Solution, k: Constants) -> Number:
    pka = _np(k.pka[0][_hh_step(s)])
    pair = buffer_pair(s)
    # log of each concentration, not of their ratio: the ratio can overflow
    if pair is not None:
        acid, base, _ = pair
        return _out(pka + np.log10(_np(s.components[base].total)) - np.log10(_np(s.components[acid].total)))
    total = _np(s.components[0].total)
    cb = _np(s.strong_base)
    if np.any(cb > 0):
        return _out(pka + np.log10(cb) - np.log10(total - cb))
    ca = _np(s.strong_acid)
    return _out(pka + np.log10(total - ca) - np.log10(ca))


def _ph_ampholyte(s: Solution, k: Constants) -> Number:
    a, b = _ampholyte_steps(s)
    return _out(0.5 * (_np(k.pka[0][a]) + _np(k.pka[0][b])))


def _first_step_solution(s: Solution) -> Solution:
    comps = []
    for c in s.components:
        p = c.protolyte
        n = p.steps
        if n == 1:
            comps.append(c)
            continue
        i = 0 if c.removed == 0 else n - 1
        mono = Protolyte(
            f"{p.name} (step {i + 1} only)",
            (p.pka[i],),
            charge=p.charge - i,
            dh=None if p.dh is None else (p.dh[i],),
            dcp=None if p.dcp is None else (p.dcp[i],),
        )
        comps.append(Component(mono, c.total, removed=0 if c.removed == 0 else 1))
    return replace(s, components=tuple(comps))


def _ph_first_step(s: Solution, k: Constants) -> Number:
    return equilibrium(_first_step_solution(s)).ph


def _ph_ideal(s: Solution, k: Constants) -> Number:
    return equilibrium(replace(s, activity=ActivityModelId.IDEAL)).ph


def _at_25_solution(s: Solution) -> Solution:
    comps = tuple(
        Component(replace(c.protolyte, dh=None, dcp=None), c.total, c.removed) for c in s.components
    )
    pkw25 = s.pkw if s.pkw is not None else pkw_iapws(25.0)
    return replace(s, components=comps, pkw=pkw25)


def _ph_at_25(s: Solution, k: Constants) -> Number:
    return equilibrium(_at_25_solution(s)).ph


# ---------------------------------------------------------------- the catalogue
@dataclass(frozen=True)
class Approximation:
    """One textbook shortcut for the pH of a solution.

    Attributes
    ----------
    id : str
        Stable identifier (used in method files, results and reports).
    title : str
        Published or customary name.
    equation : str
        The shortcut in LaTeX.
    assumptions : tuple of str
        What the shortcut neglects, in words.
    applies_when : str
        The kind of solution it is meant for, in words.
    reference : str
        Where the formula is published.
    formula : bool
        True for a closed-form textbook formula (which also takes
        concentrations for activities, and may be evaluated with the
        procedure's own constants); False for the exact-solution variants
        (first-step-only, ideal-activity, constants-at-25c), whose error is
        their one assumption's alone.
    uses_pkw : bool
        Whether pKw enters the equation.
    partials : tuple of (label, pH function)
        Single-assumption relatives (see :meth:`partial_ph`).
    stated : StatedConstants, optional
        The procedure's own constants, bound by :meth:`as_written`: every
        pH, error and constant of this shortcut then uses them unless a call
        states others. None for the catalogue's entries (the model's values).
    """

    id: str
    title: str
    equation: str
    assumptions: tuple[str, ...]
    applies_when: str
    reference: str
    _why_not: Callable[[Solution], str | None]
    _ph: Callable[[Solution, Constants], Number]
    _steps: Callable[[Solution], tuple[int, ...]]
    _key_step: Callable[[Solution], int | tuple[int, int] | None]
    formula: bool = True
    uses_pkw: bool = False
    partials: tuple[tuple[str, Callable[[Solution, Constants], Number]], ...] = ()
    stated: StatedConstants | None = None

    def as_written(self, stated: StatedConstants | None) -> Approximation:
        """This shortcut evaluated with the procedure's own constants.

        A stated constant is a fixed number of the procedure: it does not
        follow a swept or drawn pKa of the solution, while every constant left
        to the model (None) does.

        Raises
        ------
        InputRangeError
            When constants are stated for an exact-solution variant.

        Examples
        --------
        >>> hh = CATALOGUE["henderson-hasselbalch"].as_written(StatedConstants(pka=(None, 6.86, None)))
        >>> p = Protolyte("phosphoric", (2.148, 7.198, 12.35), charge=0)
        >>> round(hh.ph(Solution([Component(p, 0.02, 1), Component(p, 0.02, 2)])), 3)
        6.86
        """
        if stated is None or stated.empty:
            return replace(self, stated=None)
        if not self.formula:
            raise InputRangeError(self.id, "the procedure's own constants apply to a formula; this shortcut is an exact solution with one assumption changed")
        return replace(self, stated=stated)

    def _stated(self, stated: StatedConstants | None) -> StatedConstants | None:
        return stated if stated is not None else self.stated

    def steps(self, solution: Solution) -> tuple[int, ...]:
        """Steps (0-based) of the first component whose pKa the equation uses."""
        return self._steps(solution)

    def key_step(self, solution: Solution) -> tuple[int, int] | None:
        """(component, step) of the pKa the shortcut turns on: the one a pKa
        sweep varies and the named ∂/∂pKa differentiates (0-based). A mixture
        shortcut may name another component than the first; a shortcut that
        uses no pKa (strong acid or base alone) returns None."""
        key = self._key_step(solution)
        return key if key is None or isinstance(key, tuple) else (0, key)

    def constants_used(self, solution: Solution, stated: StatedConstants | None = None) -> tuple[tuple[Number | None, ...], Number | None]:
        """The values put into the equation: (first component's pKa per step,
        None where the equation does not use a step; pKw or None).

        Empty for an exact-solution variant, whose "equation" is the whole model.
        """
        if not self.formula:
            return (), None
        k = working_constants(solution, self._stated(stated))
        used = set(self.steps(solution))
        pka = tuple(v if i in used else None for i, v in enumerate(k.pka[0] if k.pka else ()))
        return pka, (k.pkw if self.uses_pkw else None)

    def partial_ph(self, solution: Solution, stated: StatedConstants | None = None) -> dict[str, Number]:
        """pH of each single-assumption relative of the shortcut (see ``partials``).

        A shortcut that makes two assumptions (the square-root formulas:
        no dissociation *and* no water) has one relative per assumption, each
        making only that one; their errors show whether the shortcut holds
        only because two errors cancel. Empty for the other shortcuts.
        """
        k = working_constants(solution, self._stated(stated))
        return {label: fn(solution, k) for label, fn in self.partials}

    def why_not(self, solution: Solution) -> str | None:
        """None when the shortcut applies to ``solution``, else the reason in words."""
        if self.formula:
            for c in solution.components:
                if np.any(_np(c.total) <= 0.0):
                    return f"the concentration of {c.protolyte.name} is zero, where a formula in log C has no value"
        return self._why_not(solution)

    def applies(self, solution: Solution) -> bool:
        """Whether the shortcut applies to ``solution``."""
        return self.why_not(solution) is None

    def ph(self, solution: Solution, stated: StatedConstants | None = None) -> Number:
        """The shortcut's pH (float or array of the solution's shape).

        Parameters
        ----------
        solution : Solution
        stated : StatedConstants, optional
            The constants the procedure's own calculation uses, where it
            states them (formula shortcuts only).

        Raises
        ------
        NotApplicable
            When the shortcut does not apply; the message says why.
        InputRangeError
            When constants are stated for an exact-solution variant, or for a
            step the first component does not have.
        """
        why = self.why_not(solution)
        if why is not None:
            raise NotApplicable(self.id, why)
        stated = self._stated(stated)
        if stated is not None and not stated.empty:
            if not self.formula:
                raise InputRangeError(self.id, "the procedure's own constants apply to a formula; this shortcut is an exact solution with one assumption changed")
            steps = solution.components[0].protolyte.steps
            if len(stated.pka) > steps:
                raise InputRangeError(self.id, f"{len(stated.pka)} stated pKa values for a component with {steps} step(s)")
        return self._ph(solution, working_constants(solution, stated))

    def error(self, solution: Solution, exact: Equilibrium | None = None, stated: StatedConstants | None = None) -> Number:
        """Approximate pH − exact pH (activity scale).

        Parameters
        ----------
        solution : Solution
        exact : Equilibrium, optional
            The solved equilibrium of ``solution``, if already at hand.
        stated : StatedConstants, optional
            The procedure's own constants (see :meth:`ph`); the exact pH
            always uses the thermodynamic model.

        Examples
        --------
        Acetic acid 1e-4 mol/L, Ka 1.8e-5: the square-root formula gives 4.372
        where the exact pH is 4.464 (REFERENCES §6.2, computed values):

        >>> ac = Protolyte("acetic", (-np.log10(1.8e-5),))
        >>> s = Solution([Component(ac, 1e-4)], pkw=14.0)
        >>> round(CATALOGUE["weak-acid-square-root"].error(s), 3)
        -0.091
        """
        approx = _np(self.ph(solution, stated))
        ex = exact if exact is not None else equilibrium(solution)
        return _out(approx - _np(ex.ph))


_T = "D. C. Harris, Quantitative Chemical Analysis, 9th ed. (2015); D. A. Skoog et al., Fundamentals of Analytical Chemistry, 9th ed. (2014)"


def _one(step: Callable[[Solution], int]) -> Callable[[Solution], tuple[int, ...]]:
    return lambda s: (step(s),)


def _all_steps(s: Solution) -> tuple[int, ...]:
    return tuple(range(s.components[0].protolyte.steps)) if s.components else ()


CATALOGUE: dict[str, Approximation] = {
    a.id: a
    for a in (
        Approximation(
            "weak-acid-square-root",
            "Square-root formula for a weak acid",
            r"\mathrm{pH} = \frac{1}{2}\left(\mathrm{p}K_a - \log_{10} C\right)",
            (
                "the acid barely dissociates: [HA] ≈ C",
                "water contributes no H⁺",
                "activities equal concentrations",
            ),
            "a single weak acid added in its fully protonated form",
            _T,
            _weak_acid_applies,
            _ph_weak_acid_sqrt,
            _one(_first_step),
            _first_step,
            partials=(("dissociation neglected", _ph_weak_acid_water), ("water neglected", _ph_weak_acid_quadratic)),
        ),
        Approximation(
            "weak-acid-quadratic",
            "Quadratic formula for a weak acid (water neglected)",
            r"[\mathrm{H^+}] = \frac{-K_a + \sqrt{K_a^2 + 4K_aC}}{2}",
            ("water contributes no H⁺", "activities equal concentrations"),
            "a single weak acid added in its fully protonated form",
            _T,
            _weak_acid_applies,
            _ph_weak_acid_quadratic,
            _one(_first_step),
            _first_step,
        ),
        Approximation(
            "weak-acid-water-corrected",
            "Weak acid with water's H⁺ (dissociation neglected)",
            r"[\mathrm{H^+}]^2 = K_aC + K_w",
            ("the acid barely dissociates: [HA] ≈ C", "activities equal concentrations"),
            "a single weak acid added in its fully protonated form, very dilute or very weak",
            _T,
            _weak_acid_applies,
            _ph_weak_acid_water,
            _one(_first_step),
            _first_step,
            uses_pkw=True,
        ),
        Approximation(
            "weak-base-square-root",
            "Square-root formula for a weak base",
            r"\mathrm{pOH} = \frac{1}{2}\left(\mathrm{p}K_b - \log_{10} C\right),\quad \mathrm{p}K_b = \mathrm{p}K_w - \mathrm{p}K_a",
            (
                "the base barely reacts with water: [B] ≈ C",
                "water contributes no OH⁻",
                "activities equal concentrations",
            ),
            "a single uncharged weak base (e.g. ammonia, TRIS) added as the free base",
            _T,
            _base_applies(neutral=True),
            _ph_base_sqrt,
            _one(_last_step),
            _last_step,
            uses_pkw=True,
            partials=(("reaction with water neglected", _ph_base_water), ("water's own OH⁻ neglected", _ph_base_quadratic)),
        ),
        Approximation(
            "weak-base-quadratic",
            "Quadratic formula for a weak base (water neglected)",
            r"[\mathrm{OH^-}] = \frac{-K_b + \sqrt{K_b^2 + 4K_bC}}{2}",
            ("water contributes no OH⁻", "activities equal concentrations"),
            "a single uncharged weak base added as the free base",
            _T,
            _base_applies(neutral=True),
            _ph_base_quadratic,
            _one(_last_step),
            _last_step,
            uses_pkw=True,
        ),
        Approximation(
            "conjugate-base-square-root",
            "Square-root formula for the salt of a weak acid",
            r"\mathrm{pH} = \frac{1}{2}\left(\mathrm{p}K_w + \mathrm{p}K_a + \log_{10} C\right)",
            (
                "the anion barely hydrolyses: [A⁻] ≈ C",
                "water contributes no OH⁻",
                "activities equal concentrations",
            ),
            "a single salt of a weak acid (e.g. sodium acetate) in its fully deprotonated form",
            _T,
            _base_applies(neutral=False),
            _ph_base_sqrt,
            _one(_last_step),
            _last_step,
            uses_pkw=True,
            partials=(("hydrolysis neglected", _ph_base_water), ("water's own OH⁻ neglected", _ph_base_quadratic)),
        ),
        Approximation(
            "henderson-hasselbalch",
            "Henderson–Hasselbalch equation",
            r"\mathrm{pH} = \mathrm{p}K_a + \log_{10}\frac{C_{\mathrm{base}}}{C_{\mathrm{acid}}}",
            (
                "acid and base keep their analytical concentrations (no dissociation or hydrolysis)",
                "water contributes neither H⁺ nor OH⁻",
                "activities equal concentrations",
            ),
            "a buffer: an acid and its conjugate base, or one form partly neutralized by strong acid or base",
            "L. J. Henderson, Am. J. Physiol. 21, 173 (1908); K. A. Hasselbalch, Biochem. Z. 78, 112 (1916)",
            _hh_applies,
            _ph_hh,
            _one(_hh_step),
            _hh_step,
        ),
        Approximation(
            "ampholyte-mean",
            "Mean of the two pKa values of an ampholyte",
            r"\mathrm{pH} = \frac{1}{2}\left(\mathrm{p}K_{a,r} + \mathrm{p}K_{a,r+1}\right)",
            (
                "the concentration is large compared with Ka,r and with Kw/Ka,r+1",
                "activities equal concentrations",
            ),
            "a single amphiprotic form such as NaH₂PO₄, NaHCO₃ or potassium hydrogen phthalate",
            _T,
            _ampholyte_applies,
            _ph_ampholyte,
            _ampholyte_steps,
            lambda s: s.components[0].removed - 1,
        ),
        Approximation(
            "strong-acid",
            "Strong acid: pH from its concentration",
            r"\mathrm{pH} = -\log_{10} C_a",
            ("the acid is fully dissociated", "water contributes no H⁺", "activities equal concentrations"),
            "a solution of a strong acid alone (e.g. hydrochloric acid)",
            _T,
            _strong_only("acid"),
            _ph_strong_acid,
            _no_pka,
            lambda s: None,
        ),
        Approximation(
            "strong-acid-water-corrected",
            "Strong acid with water's own H⁺",
            r"[\mathrm{H^+}] = \frac{C_a}{2} + \sqrt{\frac{C_a^2}{4} + K_w}",
            ("the acid is fully dissociated", "activities equal concentrations"),
            "a solution of a strong acid alone, also very dilute (below about 1 µmol/L)",
            _T,
            _strong_only("acid"),
            _ph_strong_acid_water,
            _no_pka,
            lambda s: None,
            uses_pkw=True,
        ),
        Approximation(
            "strong-base",
            "Strong base: pOH from its concentration",
            r"\mathrm{pH} = \mathrm{p}K_w + \log_{10} C_b",
            ("the base is fully dissociated", "water contributes no OH⁻", "activities equal concentrations"),
            "a solution of a strong base alone (e.g. sodium hydroxide)",
            _T,
            _strong_only("base"),
            _ph_strong_base,
            _no_pka,
            lambda s: None,
            uses_pkw=True,
        ),
        Approximation(
            "strong-base-water-corrected",
            "Strong base with water's own OH⁻",
            r"[\mathrm{OH^-}] = \frac{C_b}{2} + \sqrt{\frac{C_b^2}{4} + K_w}",
            ("the base is fully dissociated", "activities equal concentrations"),
            "a solution of a strong base alone, also very dilute (below about 1 µmol/L)",
            _T,
            _strong_only("base"),
            _ph_strong_base_water,
            _no_pka,
            lambda s: None,
            uses_pkw=True,
        ),
        Approximation(
            "weak-acid-weak-base-salt",
            "Salt of a weak acid and a weak base",
            r"\mathrm{pH} = \frac{1}{2}\left(\mathrm{p}K_{a,\mathrm{HA}} + \mathrm{p}K_{a,\mathrm{BH^+}}\right)",
            (
                "equal amounts of the acid and the base (the 1:1 salt, e.g. ammonium acetate)",
                "the concentration is large compared with Ka,HA and with Kw/Ka,BH⁺: the proton transfer between them sets the pH, not water",
                "activities equal concentrations",
            ),
            "equal amounts of a weak acid and a weak base of two different substances, e.g. ammonium acetate or ammonium formate",
            "J. N. Butler, Ionic Equilibrium (Wiley, 1998), ch. 3; D. A. Skoog et al., Fundamentals of Analytical Chemistry, 9th ed. (2014)",
            _salt_applies,
            _ph_salt,
            lambda s: _first_component_steps(_salt_steps(s)),
            lambda s: _salt_steps(s)[0],
        ),
        Approximation(
            "henderson-hasselbalch-two-substances",
            "Henderson–Hasselbalch equation with the conjugate made by another substance",
            r"\mathrm{pH} = \mathrm{p}K_{a,\mathrm{HA}} + \log_{10}\frac{C_\mathrm{B}}{C_\mathrm{HA} - C_\mathrm{B}}"
            r"\quad\text{or}\quad \mathrm{p}K_{a,\mathrm{BH^+}} + \log_{10}\frac{C_\mathrm{B} - C_\mathrm{HA}}{C_\mathrm{HA}}",
            (
                "the smaller of the two reacts completely with the other (proton transfer complete)",
                "the pair left over keeps its analytical concentrations (no dissociation or hydrolysis)",
                "water contributes neither H⁺ nor OH⁻",
                "activities equal concentrations",
            ),
            "a weak acid partly neutralized by a weak base of another substance, or a weak base partly neutralized by a weak acid (e.g. acetic acid with TRIS)",
            "L. J. Henderson, Am. J. Physiol. 21, 173 (1908); K. A. Hasselbalch, Biochem. Z. 78, 112 (1916); J. N. Butler, Ionic Equilibrium (1998), ch. 3",
            _cross_hh_applies,
            _ph_cross_hh,
            lambda s: _first_component_steps((_cross_key(s),)),
            _cross_key,
        ),
        Approximation(
            "first-step-only",
            "Polyprotic acid treated as monoprotic",
            r"\text{exact solution with only the step the added form takes part in}",
            ("the further ionization steps do not contribute",),
            "a polyprotic acid added fully protonated, or its base added fully deprotonated",
            _T,
            _first_step_applies,
            _ph_first_step,
            _one(_first_or_last_step),
            _first_or_last_step,
            formula=False,
        ),
        Approximation(
            "ideal-activity",
            "Activities taken equal to concentrations",
            r"\gamma_i = 1",
            ("every activity coefficient is 1",),
            "any solution whose method uses an activity model",
            "R. G. Bates, Determination of pH, 2nd ed. (Wiley, 1973)",
            _ideal_applies,
            _ph_ideal,
            _all_steps,
            _first_step,
            formula=False,
        ),
        Approximation(
            "constants-at-25c",
            "Equilibrium constants at 25 °C used at the working temperature",
            r"\mathrm{p}K_a(T) = \mathrm{p}K_a(25\,^\circ\mathrm{C}),\quad \mathrm{p}K_w(T) = \mathrm{p}K_w(25\,^\circ\mathrm{C})",
            ("pKa and pKw do not change with temperature",),
            "any solution used at a temperature other than 25 °C",
            "J. H. van 't Hoff, Études de dynamique chimique (1884); R. N. Goldberg et al., J. Phys. Chem. Ref. Data 31, 231 (2002)",
            _at_25_applies,
            _ph_at_25,
            _all_steps,
            _first_step,
            formula=False,
        ),
    )
}


def approximation(approximation_id: str) -> Approximation:
    """Look up a shortcut by id.

    Raises
    ------
    InputRangeError
        For an unknown id; the message lists the known ones.

    Examples
    --------
    >>> approximation("henderson-hasselbalch").title
    'Henderson–Hasselbalch equation'
    """
    try:
        return CATALOGUE[approximation_id]
    except KeyError:
        raise InputRangeError("approximation", f"unknown shortcut {approximation_id!r}; known: {', '.join(CATALOGUE)}") from None


def applicable(solution: Solution) -> list[Approximation]:
    """Every shortcut of the catalogue that applies to ``solution``, in catalogue order.

    Examples
    --------
    >>> ac = Protolyte("acetic", (4.756,))
    >>> [a.id for a in applicable(Solution([Component(ac, 0.1)]))]
    ['weak-acid-square-root', 'weak-acid-quadratic', 'weak-acid-water-corrected']
    """
    return [a for a in CATALOGUE.values() if a.applies(solution)]
