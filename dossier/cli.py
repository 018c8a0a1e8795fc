"""The ``dossier`` command line. Thin: each command parses its arguments,
calls one function of the application layer (:mod:`dossier.app`), prints
what it returns, and turns every expected failure into a message and an
exit code. It imports nothing else of the package but the terminal printer
and the problem list.

Exit codes: 0 success; 1 bad input (a method file, a value); 2 usage error
(unknown option, missing argument); 3 internal error (a bug: please report);
130 interrupted (Ctrl-C, SIGTERM); 141 the reader of the output went away
(``dossier diff A B | head``): the command stops quietly with the status a
shell reports for a program ended by SIGPIPE (128 + 13).
"""

from __future__ import annotations

import argparse
import os
import sys
from collections.abc import Callable, Sequence

from . import __version__

__all__ = ["main", "EXIT_OK", "EXIT_INPUT", "EXIT_USAGE", "EXIT_INTERNAL", "EXIT_CLOSED_PIPE"]

EXIT_OK = 0
EXIT_INPUT = 1
EXIT_USAGE = 2
EXIT_INTERNAL = 3
EXIT_CLOSED_PIPE = 141
"""128 + SIGPIPE (13): what a shell reports for a tool whose reader closed the pipe."""


class InputFailure(Exception):
    """Bad input already explained to the user; carries the exit code."""

    def __init__(self, message: str = "", code: int = EXIT_INPUT) -> None:
        super().__init__(message)
        self.code = code


def _console():  # noqa: ANN202 - rich.console.Console, imported lazily
    """A rich console; wide and without colour when the output is not a terminal.

    A closed output pipe raises BrokenPipeError (handled once, in :func:`main`)
    instead of rich's own exit with status 1.
    """
    from rich.console import Console

    class _PipeAwareConsole(Console):
        def on_broken_pipe(self) -> None:
            self.quiet = True
            raise BrokenPipeError

    return _PipeAwareConsole() if sys.stdout.isatty() else _PipeAwareConsole(width=150, no_color=True, highlight=False)


# ---------------------------------------------------------------- solve
def _add_solve(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "solve",
        help="exact pH and shortcut errors: of a method file's solutions, or of one solution given by options",
        description=(
            "With a method FILE: for each solution, the exact pH and each claimed shortcut's pH and error. "
            "Without: solve the one solution given by --pka and --conc (and the options below) and print "
            "the pH on both scales and every applicable shortcut's pH and error."
        ),
    )
    p.add_argument("file", nargs="?", metavar="FILE", help="a method file")
    p.add_argument("--pka", type=float, action="append", metavar="P",
                   help="stepwise pKa at 25 °C and zero ionic strength; repeat for a polyprotic acid (ascending)")
    p.add_argument("--conc", metavar="TEXT",
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


_INLINE_ONLY = ("pka", "conc", "dh", "molar_mass", "strong_acid", "strong_base", "pkw", "shortcut")


def _run_solve(args: argparse.Namespace) -> int:
    if args.file is not None:
        given = [f"--{name.replace('_', '-')}" for name in _INLINE_ONLY if getattr(args, name)]
        if given:
            raise InputFailure(f"give either a method FILE or {', '.join(given)}, not both", EXIT_USAGE)
        return _solve_file(args)
    if not args.pka or args.conc is None:
        raise InputFailure("give a method FILE, or --pka and --conc for one solution", EXIT_USAGE)
    return _solve_inline(args)


def _solve_file(args: argparse.Namespace) -> int:
    from .app import solve_file
    from .problems import format_problems
    from .render.terminal import method_points_as_dict, point_table, print_json

    solved = solve_file(args.file)
    if solved.problems:
        print(format_problems(list(solved.problems)), file=sys.stderr)
    if args.json:
        print_json(method_points_as_dict(solved.method, solved.points))
        return EXIT_OK
    console = _console()
    for solution_id, result in solved.points:
        console.print(point_table(f"{solved.method.id} · {solution_id}", result))
        console.print()
    return EXIT_OK


def _solve_inline(args: argparse.Namespace) -> int:
    from .app import InlineSolution, solve_inline
    from .render.terminal import point_as_dict, point_table, print_json

    result = solve_inline(InlineSolution(
        pka=tuple(args.pka), conc=args.conc, form=args.form, charge=args.charge, dh=tuple(args.dh) if args.dh else None,
        molar_mass=args.molar_mass, temperature=args.temperature, activity=args.activity, ionic_strength=args.ionic_strength,
        strong_acid=args.strong_acid, strong_base=args.strong_base, pkw=args.pkw, shortcuts=tuple(args.shortcut) if args.shortcut else None,
    ))
    if args.json:
        print_json(point_as_dict(result))
    else:
        pka = ", ".join(f"{p:g}" for p in args.pka)
        _console().print(point_table(f"{args.conc}, pKa {pka}, form as added: {args.form}", result))
    return EXIT_OK


# ---------------------------------------------------------------- analyse
def _add_analyse(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "analyse",
        help="validity ranges, sensitivity and Monte Carlo: write results.json, CSV tables and figures",
        description=("Analyse method files and publish, per method, OUTPUT/methods/ID/results.json, CSV tables, figures (SVG) "
                     "and the calculation ledger, with OUTPUT/manifest.json: the machine-readable part of a dossier, without pages or PDFs. "
                     "The previous OUTPUT is replaced only when the analysis succeeds."),
    )
    p.add_argument("paths", nargs="*", default=["methods"], metavar="PATH", help="method files or folders (default: methods)")
    p.add_argument("-o", "--output", default="analysis", metavar="DIR", help="folder to write into (default: analysis)")
    p.add_argument("--draws", type=_positive_int, default=None, metavar="N",
                   help="largest number of Monte-Carlo draws per solution (default 1000000); drawing stops earlier once the results are stable")
    p.add_argument("--fixed-draws", action="store_true", help="draw exactly --draws per solution instead of stopping once the results are stable")
    p.add_argument("--seed", type=int, default=None, metavar="N", help="seed of the Monte-Carlo generator (default 20261202)")
    p.add_argument("--no-figures", action="store_true", help="write results, tables and ledgers only")
    p.add_argument("--workers", type=int, default=None, metavar="N", help="processes to use (default: one per core)")
    p.set_defaults(run=_run_analyse)


def _positive_int(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number; got {text!r}") from None
    if not 1_000 <= value <= 100_000_000:
        raise argparse.ArgumentTypeError(f"must be 1000 … 100000000; got {value}")
    return value


def _settings(args: argparse.Namespace):  # noqa: ANN202 - dossier.app.AnalysisSettings
    from .app import AnalysisSettings

    defaults = AnalysisSettings()
    return AnalysisSettings(draws=args.draws or defaults.draws, seed=defaults.seed if args.seed is None else args.seed,
                            adaptive=not args.fixed_draws)


def _print_problems(problems: Sequence[object]) -> None:
    from .problems import format_problems

    if problems:
        print(format_problems(list(problems)), file=sys.stderr)  # type: ignore[arg-type]


def _run_analyse(args: argparse.Namespace) -> int:
    from .app import analyse

    outcome = analyse(args.paths, args.output, _settings(args), figures=not args.no_figures, workers=args.workers)
    _print_problems(outcome.problems)
    if not outcome.ok:
        raise InputFailure("nothing analysed: fix the errors above" if outcome.problems else "no method files found")
    for a in outcome.analyses:
        verdicts = ", ".join(f"{sa.spec.id}/{s.id}: {s.verdict.status}" for sa in a.solutions for s in sa.shortcuts)
        print(f"{a.method.id}: {verdicts}")
    print(f"wrote {len(outcome.files)} files into {outcome.output}")
    return EXIT_OK


# ---------------------------------------------------------------- build, serve
def _add_build(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "build",
        help="check, analyse and publish the dossier: HTML site, PDFs, results",
        description=(
            "Check every method file (nothing is built if any has an error), analyse each method, and publish "
            "the dossier into OUTPUT: an HTML site, a PDF per method and for the whole dossier, results.json, "
            "CSV tables and figures. The previous OUTPUT is replaced only when the build succeeds."
        ),
    )
    p.add_argument("paths", nargs="*", default=["methods"], metavar="PATH", help="method files or folders (default: methods)")
    p.add_argument("-o", "--output", default="output", metavar="DIR", help="folder to publish into (default: output)")
    p.add_argument("--draws", type=_positive_int, default=None, metavar="N",
                   help="largest number of Monte-Carlo draws per solution (default 1000000); drawing stops earlier once the results are stable")
    p.add_argument("--fixed-draws", action="store_true", help="draw exactly --draws per solution instead of stopping once the results are stable")
    p.add_argument("--seed", type=int, default=None, metavar="N", help="seed of the Monte-Carlo generator (default 20261202)")
    p.add_argument("--no-pdf", action="store_true", help="skip the PDFs")
    p.add_argument("--strict", action="store_true", help="treat warnings in method files as errors")
    p.add_argument("--quiet", action="store_true", help="print only problems and the final line")
    p.add_argument("--timings", action="store_true", help="print the time each stage took")
    p.add_argument("--workers", type=int, default=None, metavar="N", help="processes to use (default: one per core)")
    p.add_argument("--previous", metavar="DIR", help="a dossier built before (may be OUTPUT itself): add a page of the changes since it")
    p.add_argument("--no-cache", action="store_true", help="recompute every method even if its inputs are unchanged")
    p.set_defaults(run=_run_build)


class _Reporter:
    """Progress of a build: a bar on a terminal, plain lines otherwise, nothing with --quiet."""

    def __init__(self, quiet: bool) -> None:
        self.quiet = quiet
        self.tty = sys.stderr.isatty()
        self.progress = None
        self.task = None
        self.name = ""
        self.done = 0
        self.total = 0

    def __enter__(self) -> _Reporter:
        if self.tty and not self.quiet:
            from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeElapsedColumn

            self.progress = Progress(TextColumn("{task.description}"), BarColumn(), MofNCompleteColumn(), TimeElapsedColumn(), transient=False)
            self.progress.start()
        return self

    def __exit__(self, *exc: object) -> None:
        if self.progress is not None:
            self.progress.stop()

    def stage(self, name: str, total: int) -> None:
        self.name, self.done, self.total = name, 0, total
        if self.progress is not None:
            self.task = self.progress.add_task(name, total=total)

    def step(self, label: str) -> None:
        self.done += 1
        if self.quiet:
            return
        if self.progress is not None:
            self.progress.update(self.task, advance=1, description=f"{self.name}: {label}")
        else:
            print(f"{self.name}: {label} ({self.done}/{self.total})", file=sys.stderr, flush=True)


def _run_build(args: argparse.Namespace) -> int:
    from pathlib import Path

    from .app import BuildOptions, build

    options = BuildOptions(settings=_settings(args), pdf=not args.no_pdf, strict=args.strict, workers=args.workers,
                           previous=Path(args.previous) if args.previous else None, cache=not args.no_cache)
    with _Reporter(args.quiet) as rep:
        outcome = build(args.paths, args.output, options, reporter=rep)
    _print_problems(outcome.problems)
    if args.timings:
        from .render.terminal import timing_lines

        print("\n".join(timing_lines(outcome.timings)))
    if not outcome.ok:
        raise InputFailure("nothing built: fix the errors above (the previous dossier is unchanged)")
    index = outcome.output.resolve() / "index.html"
    cached = len(outcome.analyses) - len(outcome.recomputed)
    reuse = f" ({cached} of {len(outcome.analyses)} methods unchanged, taken from the cache)" if cached else ""
    print(f"built {len(outcome.files)} files into {outcome.output}{reuse}; open {index.as_uri()} or run: dossier serve {outcome.output}")
    print(f"fingerprint {outcome.fingerprint}")
    return EXIT_OK


def _add_verify(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "verify",
        help="re-compute a built dossier and report every file or number that no longer matches",
        description=(
            "Re-hash every file of a built dossier against its manifest, re-compute every ledger entry from the "
            "recorded inputs, and, with --methods, check that the method files still hash to what the manifest "
            "recorded. Exit 0 only when everything matches."
        ),
    )
    p.add_argument("output", nargs="?", default="output", metavar="DIR", help="the built dossier (default: output)")
    p.add_argument("--methods", nargs="+", metavar="PATH", help="method files or folders to check against the manifest")
    p.add_argument("--no-cache", action="store_true",
                   help="re-compute every method, even one an earlier verify on this machine re-computed from the same recorded inputs with the same code")
    p.set_defaults(run=_run_verify)


def _run_verify(args: argparse.Namespace) -> int:
    from .app import verify

    report = verify(args.output, methods=args.methods, progress=lambda mid: print(f"re-computing {mid}", file=sys.stderr, flush=True),
                    cache=not args.no_cache)
    for note in report.notes:
        print(f"note: {note}")
    if report.fingerprint:
        print(f"fingerprint {report.fingerprint}")
    for c in report.signatures:
        if c.statement is not None:
            state = "valid" if c.applies else "DOES NOT APPLY"
            print(f"signature: {c.statement.signer} ({c.statement.meaning}, {c.statement.signed_at}, key {c.statement.key_id}): {state}")
    for m in report.mismatches:
        print(str(m))
    if report.ok:
        signed = f", {len(report.signatures)} signature(s)" if report.signatures else ""
        print(f"{args.output}: everything matches ({report.files_checked} files, {report.entries_checked} ledger entries re-computed{signed})")
        if report.reused:
            print(f"re-computations of {len(report.reused)} method(s) taken from this machine's verify cache "
                  "(an earlier verify, same code, same recorded inputs); --no-cache re-computes them")
        return EXIT_OK
    print(f"{args.output}: {len(report.mismatches)} mismatch(es)")
    return EXIT_INPUT


def _add_keygen(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("keygen", help="make a personal key pair for signing dossiers",
                       description=("Make a personal Ed25519 key pair: the private key in FILE, readable by you only "
                                    "(never inside a dossier), the public key in FILE.pub for your laboratory's register of keys."))
    p.add_argument("file", metavar="FILE", help="where to write the private key (FILE.pub gets the public key)")
    p.add_argument("--name", required=True, help='your name as it appears with your signatures, e.g. "A. Analyst"')
    p.set_defaults(run=_run_keygen)


def _run_keygen(args: argparse.Namespace) -> int:
    from .app import keygen

    made = keygen(args.file, args.name)
    print(f"wrote the private key {made.private} (readable by you only; keep it secret) and the public key {made.public}")
    print(f"key id {made.key_id}")
    return EXIT_OK


def _add_sign(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("sign", help="sign a built dossier (a detached signature beside it)",
                       description=("Check a built dossier against its manifest, then record a detached signature over its "
                                    "fingerprint and manifest, with your name, the meaning and the time, in DOSSIER.signatures/ "
                                    "beside it. No byte of the dossier changes."))
    p.add_argument("dossier", metavar="DOSSIER", help="the built dossier folder")
    p.add_argument("--key", required=True, metavar="FILE", help="your private key (from dossier keygen)")
    p.add_argument("--meaning", required=True, choices=["prepared", "reviewed", "approved"], help="what your signature says you did")
    p.set_defaults(run=_run_sign)


def _run_sign(args: argparse.Namespace) -> int:
    from .app import sign

    done = sign(args.dossier, args.key, args.meaning)
    st = done.statement
    print(f"{st.signer} signed {args.dossier} as {st.meaning} at {st.signed_at} (key {st.key_id})")
    print(f"fingerprint {st.fingerprint}")
    print(f"signature {done.file}")
    return EXIT_OK


def _add_diff(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("diff", help="list the inputs, numbers and verdicts that changed between two built dossiers",
                       description="Compare two built dossiers method by method: changed inputs, numbers and verdicts.")
    p.add_argument("old", metavar="OLD", help="the earlier dossier")
    p.add_argument("new", metavar="NEW", help="the later dossier")
    p.add_argument("--json", action="store_true", help="print JSON")
    p.set_defaults(run=_run_diff)


def _run_diff(args: argparse.Namespace) -> int:
    from dataclasses import asdict
    from pathlib import Path

    from .app import diff_dossiers
    from .render.terminal import print_json

    d = diff_dossiers(Path(args.old), Path(args.new))
    if args.json:
        print_json(asdict(d))
        return EXIT_OK
    print(f"{len(d.changed)} of {len(d.methods)} methods changed ({args.old} → {args.new})")
    for md in d.methods:
        if md.status == "unchanged":
            continue
        rev = f", revision {md.old_revision} → {md.new_revision}" if md.old_revision != md.new_revision and md.old_revision and md.new_revision else ""
        print(f"\n{md.id}: {md.status}{rev}")
        for title, rows in (("verdicts", md.verdicts), ("inputs", md.inputs), ("numbers", md.numbers)):
            if rows:
                print(f"  {title}:")
                for c in rows:
                    print(f"    {c.what}: {c.old!r} → {c.new!r}" + (f" [{c.unit}]" if c.unit else ""))
    return EXIT_OK


def _add_serve(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("serve", help="preview a built dossier on a local port (loopback only)",
                       description="Serve a built dossier over HTTP on 127.0.0.1 for preview; stop with Ctrl-C.")
    p.add_argument("folder", nargs="?", default="output", metavar="DIR", help="the built dossier (default: output)")
    p.add_argument("--port", type=int, default=8765, help="port on 127.0.0.1 (0: any free port; default 8765)")
    p.set_defaults(run=_run_serve)


def _run_serve(args: argparse.Namespace) -> int:
    from .app import preview_server

    server = preview_server(args.folder, args.port)
    print(f"serving {args.folder} at http://127.0.0.1:{server.server_address[1]}/ (Ctrl-C to stop)", flush=True)
    try:
        server.serve_forever()
    except KeyboardInterrupt:
        pass
    finally:
        server.server_close()
    return EXIT_OK


# ---------------------------------------------------------------- check, new, schema, substances
def _add_check(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("check", help="validate method files and print every problem",
                       description="Validate method files (or every .yaml/.yml file under folders) and print every problem as path:line:column: field: message.")
    p.add_argument("paths", nargs="*", default=["methods"], metavar="PATH", help="method files or folders (default: methods)")
    p.add_argument("--strict", action="store_true", help="treat warnings as errors")
    p.set_defaults(run=_run_check)


def _run_check(args: argparse.Namespace) -> int:
    from .app import check
    from .problems import format_problems

    outcome = check(args.paths, strict=args.strict)
    if outcome.problems:
        print(format_problems(list(outcome.problems)))
    noun = "file" if outcome.files == 1 else "files"
    if outcome.errors:
        print(f"{outcome.files} method {noun} checked: {outcome.errors} error(s), {outcome.warnings} warning(s)")
        return EXIT_INPUT
    if outcome.files == 0:
        print("no method files found")
        return EXIT_INPUT
    print(f"{outcome.files} method {noun} checked: no errors, {outcome.warnings} warning(s)")
    return EXIT_OK


def _method_id(text: str) -> str:
    from .app import UserError, check_method_id

    try:
        return check_method_id(text)
    except UserError as exc:
        raise argparse.ArgumentTypeError(str(exc)) from None


def _add_new(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("new", help="write a commented starter method file",
                       description="Write a commented starter method file that `dossier check` accepts as it stands.")
    p.add_argument("id", type=_method_id, metavar="ID", help="method id (also the default file name)")
    p.add_argument("-o", "--output", metavar="FILE", help="where to write (default: ID.yaml; '-' for standard output)")
    p.add_argument("--title", default=None, help="title of the method (default: the id)")
    p.add_argument("--force", action="store_true", help="overwrite an existing file")
    p.set_defaults(run=_run_new)


def _run_new(args: argparse.Namespace) -> int:
    from .app import starter, write_starter

    if args.output == "-":
        sys.stdout.write(starter(args.id, args.title))
        return EXIT_OK
    out = write_starter(args.id, args.output, title=args.title, force=args.force)
    print(f"wrote {out}; edit it, then run: dossier check {out}")
    return EXIT_OK


def _add_schema(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("schema", help="print the JSON Schema of the method-file format",
                       description="Print the JSON Schema (draft 2020-12) of the method-file format, for editors that complete and check YAML.")
    p.set_defaults(run=_run_schema)


def _run_schema(args: argparse.Namespace) -> int:
    import json

    from .app import schema_document

    print(json.dumps(schema_document(), indent=2, ensure_ascii=False))
    return EXIT_OK


def _add_substances(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("substances", help="list the bundled substance table with its sources",
                       description="List the bundled substance table: pKa values (25 °C, I = 0), enthalpies of ionization, each with its source and how it was checked.")
    p.add_argument("--json", action="store_true", help="print JSON instead of tables")
    p.set_defaults(run=_run_substances)


def _run_substances(args: argparse.Namespace) -> int:
    from .app import substance_table
    from .render.terminal import print_json, substances_as_dict, substances_tables

    table = substance_table()
    if args.json:
        print_json(substances_as_dict(table))
        return EXIT_OK
    console = _console()
    for t in substances_tables(table):
        console.print(t)
        console.print()
    return EXIT_OK


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


_COMMANDS: list[Callable[[argparse._SubParsersAction], None]] = [_add_new, _add_check, _add_solve, _add_analyse, _add_build, _add_serve, _add_verify, _add_keygen, _add_sign, _add_diff, _add_schema, _add_substances]


def _terminate_as_interrupt() -> None:
    """SIGTERM unwinds like Ctrl-C, so that a build removes its staging folder."""
    import signal
    import threading

    if threading.current_thread() is not threading.main_thread():
        return

    def handler(signum: int, frame: object) -> None:
        raise KeyboardInterrupt

    signal.signal(signal.SIGTERM, handler)


def _closed_pipe() -> int:
    """The reader of standard output went away: stop quietly.

    Standard output is pointed at the null device so that Python's final flush
    of the unwritable buffer raises nothing at exit.
    """
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        os.close(devnull)
    except (OSError, ValueError):  # stdout without a file descriptor (embedded use)
        pass
    return EXIT_CLOSED_PIPE


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; returns the exit code (also used by ``python -m dossier``)."""
    parser = build_parser()
    _terminate_as_interrupt()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:  # argparse: --help/--version exit 0, usage errors exit 2
        return int(exc.code or 0)
    from .problems import UserError

    try:
        code = int(args.run(args))
        sys.stdout.flush()  # a closed pipe shows here, not at interpreter exit
        return code
    except BrokenPipeError:
        return _closed_pipe()
    except InputFailure as exc:
        if str(exc):
            print(f"dossier {args.command}: {exc}", file=sys.stderr)
        return exc.code
    except UserError as exc:
        _print_problems(exc.problems)
        if str(exc):
            print(f"dossier {args.command}: {exc}", file=sys.stderr)
        return exc.exit_code
    except KeyboardInterrupt:
        extra = "; the previous dossier is unchanged" if args.command == "build" else ""
        print(f"dossier {args.command}: interrupted{extra}", file=sys.stderr)
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
