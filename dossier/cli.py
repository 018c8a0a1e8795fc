"""The ``dossier`` command line. Thin: it parses arguments, calls the stages,
prints, and turns every expected failure into a message and an exit code.

Exit codes: 0 success; 1 bad input (a method file, a value); 2 usage error
(unknown option, missing argument); 3 internal error (a bug: please report).
"""

from __future__ import annotations

import argparse
import os
import sys
from collections.abc import Callable, Sequence

from . import __version__

__all__ = ["main", "EXIT_OK", "EXIT_INPUT", "EXIT_USAGE", "EXIT_INTERNAL"]

EXIT_OK = 0
EXIT_INPUT = 1
EXIT_USAGE = 2
EXIT_INTERNAL = 3


class InputFailure(Exception):
    """Bad input already explained to the user; carries the exit code."""

    def __init__(self, message: str = "", code: int = EXIT_INPUT) -> None:
        super().__init__(message)
        self.code = code


# ---------------------------------------------------------------- solve
def _add_solve(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "solve",
        help="exact pH of one solution and the error of each textbook shortcut",
        description=(
            "Solve the exact acid–base equilibrium of one solution given on the command line "
            "and print the pH on both scales and each applicable shortcut's pH and error."
        ),
    )
    p.add_argument("--pka", type=float, action="append", required=True, metavar="P",
                   help="stepwise pKa at 25 °C and zero ionic strength; repeat for a polyprotic acid (ascending)")
    p.add_argument("--conc", required=True, metavar="TEXT",
                   help="total concentration with its unit, e.g. '10 mmol/L', '0.1 mol/kg', '250 mg/L'")
    p.add_argument("--charge", type=int, default=0, metavar="Z",
                   help="charge of the fully protonated form (0 acetic acid, +1 ammonium); default 0")
    p.add_argument("--form", default="acid", metavar="FORM",
                   help="form as added: 'acid' (fully protonated), 'base' (fully deprotonated) or the number of protons removed; default acid")
    p.add_argument("--dh", type=float, action="append", metavar="KJ",
                   help="enthalpy of ionization of each step [kJ/mol], for van 't Hoff; repeat per step")
    p.add_argument("--molar-mass", type=float, metavar="G_PER_MOL", help="molar mass of the form as added, for mass units")
    p.add_argument("--temperature", type=float, default=25.0, metavar="CELSIUS", help="temperature [°C]; default 25")
    p.add_argument("--activity", default="ideal", metavar="MODEL",
                   help="activity model: ideal, debye-huckel, extended-debye-huckel, davies; default ideal")
    p.add_argument("--strong-acid", metavar="TEXT", help="added strong acid (HCl), with unit")
    p.add_argument("--strong-base", metavar="TEXT", help="added strong base (NaOH), with unit")
    p.add_argument("--ionic-strength", type=float, default=0.0, metavar="MOL_PER_KG",
                   help="ionic strength of an inert background electrolyte [mol/kg]; default 0")
    p.add_argument("--pkw", type=float, metavar="P", help="use this pKw instead of IAPWS R11-07 at the temperature")
    p.add_argument("--shortcut", action="append", metavar="ID", help="evaluate only this shortcut (repeatable)")
    p.add_argument("--json", action="store_true", help="print JSON instead of a table")
    p.set_defaults(run=_run_solve)


def _form_to_removed(form: str, steps: int) -> int:
    if form == "acid":
        return 0
    if form == "base":
        return steps
    try:
        return int(form)
    except ValueError:
        raise InputFailure(f"--form: expected 'acid', 'base' or a whole number of protons removed (0 … {steps}); got {form!r}") from None


def _run_solve(args: argparse.Namespace) -> int:
    from .analysis.pointwise import evaluate_point
    from .chemistry import CATALOGUE, Component, Protolyte, Solution
    from .chemistry.errors import InputRangeError
    from .inputs.units import UnitError, parse_concentration
    from .render.terminal import point_as_dict, point_table, print_json

    def conc(option: str, text: str | None, molar_mass: float | None = None) -> float:
        if text is None:
            return 0.0
        try:
            return parse_concentration(text, molar_mass=molar_mass, temperature=args.temperature).mol_per_l
        except UnitError as exc:
            raise InputFailure(f"{option}: {exc}") from None

    if args.shortcut:
        unknown = [s for s in args.shortcut if s not in CATALOGUE]
        if unknown:
            raise InputFailure(f"--shortcut: unknown id {unknown[0]!r}; known: {', '.join(CATALOGUE)}")
    try:
        if not 0.0 <= args.temperature <= 100.0:
            raise InputRangeError("--temperature", f"must be in 0 … 100 °C; got {args.temperature:g}")
        removed = _form_to_removed(args.form, len(args.pka))
        protolyte = Protolyte("acid", tuple(args.pka), charge=args.charge, dh=tuple(args.dh) if args.dh else None)
        solution = Solution(
            [Component(protolyte, conc("--conc", args.conc, args.molar_mass), removed)],
            temperature=args.temperature,
            activity=args.activity,
            strong_acid=conc("--strong-acid", args.strong_acid),
            strong_base=conc("--strong-base", args.strong_base),
            background=args.ionic_strength,
            pkw=args.pkw,
        )
        result = evaluate_point(solution, tuple(args.shortcut) if args.shortcut else None)
    except InputRangeError as exc:
        raise InputFailure(_option_message(exc)) from None
    if args.json:
        print_json(point_as_dict(result))
    else:
        from rich.console import Console

        pka = ", ".join(f"{p:g}" for p in args.pka)
        Console().print(point_table(f"{args.conc}, pKa {pka}, form as added: {args.form}", result))
    return EXIT_OK


_OPTION_OF = {
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


def _option_message(exc: Exception) -> str:
    """Name the command-line option rather than the engine's argument."""
    text = str(exc)
    for argument, option in sorted(_OPTION_OF.items(), key=lambda kv: -len(kv[0])):
        if text.startswith(argument):
            return option + text[len(argument):]
    return text


# ---------------------------------------------------------------- entry point
def build_parser() -> argparse.ArgumentParser:
    """The argument parser with every sub-command."""
    parser = argparse.ArgumentParser(
        prog="dossier",
        description="Exact acid–base equilibrium and audit-ready validity dossiers for calculated pH.",
    )
    parser.add_argument("--version", action="version", version=f"ph-dossier {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    sub.required = True
    for add in _COMMANDS:
        add(sub)
    return parser


_COMMANDS: list[Callable[[argparse._SubParsersAction], None]] = [_add_solve]


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit code (also used by ``python -m dossier``)."""
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse: --help/--version exit 0, usage errors exit 2
        return int(exc.code or 0)
    try:
        return int(args.run(args))
    except InputFailure as exc:
        if str(exc):
            print(f"dossier {args.command}: {exc}", file=sys.stderr)
        return exc.code
    except KeyboardInterrupt:
        print(f"dossier {args.command}: interrupted", file=sys.stderr)
        return 130
    except Exception as exc:  # a bug: one line, not a traceback, unless asked for
        if os.environ.get("DOSSIER_DEBUG"):
            raise
        print(
            f"dossier {args.command}: internal error: {type(exc).__name__}: {exc} "
            "(set DOSSIER_DEBUG=1 for the traceback, and please report it)",
            file=sys.stderr,
        )
        return EXIT_INTERNAL


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
