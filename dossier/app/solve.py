"""``dossier solve``: the exact pH and every applicable shortcut at one
point, for a method file or for one solution given on the command line."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from .. import limits
from ..analysis.pointwise import PointResult, evaluate_method, evaluate_point
from ..chemistry import CATALOGUE, Component, InputRangeError, Protolyte, Solution
from ..inputs.forms import FormError, protons_removed
from ..inputs.loader import load_paths
from ..inputs.model import Method
from ..inputs.units import UnitError, parse_concentration
from ..problems import Problem
from .errors import OptionError, UserError

__all__ = ["InlineSolution", "MethodPoints", "solve_file", "solve_inline"]


@dataclass(frozen=True)
class InlineSolution:
    """One solution as the command line gives it (texts as typed).

    Attributes
    ----------
    pka : tuple of float
        25 °C thermodynamic pKa values, in order.
    conc : str
        Total with its unit, e.g. ``10 mmol/L``.
    form : str
        ``acid``, ``base`` or a number of protons removed.
    """

    pka: tuple[float, ...]
    conc: str
    form: str = "acid"
    charge: int = 0
    dh: tuple[float, ...] | None = None
    molar_mass: float | None = None
    temperature: float = 25.0
    activity: str = "ideal"
    ionic_strength: float = 0.0
    strong_acid: str | None = None
    strong_base: str | None = None
    pkw: float | None = None
    shortcuts: tuple[str, ...] | None = None


@dataclass(frozen=True)
class MethodPoints:
    """The points of every solution of a method file, and the file's problems (warnings)."""

    method: Method
    points: tuple[tuple[str, PointResult], ...]
    problems: tuple[Problem, ...]


OPTION_OF = {
    "Protolyte(acid).pka": "--pka",
    "Protolyte(acid).charge": "--charge",
    "Protolyte(acid).dh": "--dh",
    "Component(acid).total": "--conc",
    "Component(acid).removed": "--form",
    "Solution.temperature": "--temperature",
    "Solution.activity": "--activity",
    "Solution.strong_acid": "--strong-acid",
    "Solution.strong_base": "--strong-base",
    "Solution.background": "--ionic-strength",
    "Solution.pkw": "--pkw",
}
"""The command-line option of each engine argument (from :attr:`InputRangeError.argument`)."""


def solve_file(path: str | Path) -> MethodPoints:
    """Every solution of one method file at its nominal composition.

    Raises
    ------
    UserError
        When the file has errors (they are in the message).
    """
    inputs = load_paths([path])
    if not inputs.ok or not inputs.methods:
        raise UserError(f"{path}: not solved, the file has errors" if inputs.loads else "", inputs.problems)
    method = inputs.methods[0]
    return MethodPoints(method, evaluate_method(method), inputs.problems)


def _concentration(option: str, text: str | None, temperature: float, molar_mass: float | None = None) -> float:
    if text is None:
        return 0.0
    try:
        return parse_concentration(text, molar_mass=molar_mass, temperature=temperature).mol_per_l
    except UnitError as exc:
        raise OptionError(option, str(exc)) from None


def solve_inline(request: InlineSolution) -> PointResult:
    """The point of one solution given option by option.

    Raises
    ------
    OptionError
        Naming the option whose value is out of range.
    """
    r = request
    if r.shortcuts:
        unknown = [s for s in r.shortcuts if s not in CATALOGUE]
        if unknown:
            raise OptionError("--shortcut", f"unknown id {unknown[0]!r}; known: {', '.join(CATALOGUE)}")
    low, high = limits.TEMPERATURE
    if not low <= r.temperature <= high:
        raise OptionError("--temperature", f"must be in {low:g} … {high:g} °C; got {r.temperature:g}")
    try:
        removed = protons_removed(r.form, len(r.pka))
    except FormError as exc:
        raise OptionError("--form", str(exc)) from None
    try:
        protolyte = Protolyte("acid", tuple(r.pka), charge=r.charge, dh=r.dh)
        solution = Solution(
            [Component(protolyte, _concentration("--conc", r.conc, r.temperature, r.molar_mass), removed)],
            temperature=r.temperature,
            activity=r.activity,
            strong_acid=_concentration("--strong-acid", r.strong_acid, r.temperature),
            strong_base=_concentration("--strong-base", r.strong_base, r.temperature),
            background=r.ionic_strength,
            pkw=r.pkw,
        )
        return evaluate_point(solution, r.shortcuts or None)
    except InputRangeError as exc:
        raise OptionError(_option_of(exc.argument), exc.message) from None


def _option_of(argument: str) -> str:
    """The option of an engine argument: ``Protolyte(acid).pka[1]`` → ``--pka[1]``."""
    for name in sorted(OPTION_OF, key=len, reverse=True):
        if argument.startswith(name):
            return OPTION_OF[name] + argument[len(name):]
    return argument
