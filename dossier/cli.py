"""The ``dossier`` command line. Thin: it parses arguments, calls the stages,
prints, and turns every expected failure into a message and an exit code.

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
from pathlib import Path

from typing import TYPE_CHECKING

from . import __version__

if TYPE_CHECKING:
    from .inputs.model import Method

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


def _form_to_removed(form: str, steps: int) -> int:
    if form == "acid":
        return 0
    if form == "base":
        return steps
    try:
        return int(form)
    except ValueError:
        raise InputFailure(f"--form: expected 'acid', 'base' or a whole number of protons removed (0 … {steps}); got {form!r}") from None


_INLINE_ONLY = ("pka", "conc", "dh", "molar_mass", "strong_acid", "strong_base", "pkw", "shortcut")


def _run_solve(args: argparse.Namespace) -> int:
    if args.file is not None:
        given = [f"--{name.replace('_', '-')}" for name in _INLINE_ONLY if getattr(args, name)]
        if given:
            raise InputFailure(f"give either a method FILE or {', '.join(given)}, not both", EXIT_USAGE)
        return _solve_file(args)
    if args.pka is None or args.conc is None:
        raise InputFailure("give a method FILE, or --pka and --conc for one solution", EXIT_USAGE)
    return _solve_inline(args)


def _load_one(path: str) -> Method:
    from .inputs.loader import load_paths
    from .problems import format_problems

    inputs = load_paths([path])
    if inputs.problems:
        print(format_problems(list(inputs.problems)), file=sys.stderr)
    if not inputs.ok or not inputs.methods:
        raise InputFailure(f"{path}: not solved, the file has errors" if inputs.loads else "")
    return inputs.methods[0]


def _solve_file(args: argparse.Namespace) -> int:
    from .analysis.pointwise import evaluate_method
    from .render.terminal import method_points_as_dict, point_table, print_json

    method = _load_one(args.file)
    results = evaluate_method(method)
    if args.json:
        print_json(method_points_as_dict(method, results))
        return EXIT_OK
    console = _console()
    for solution_id, result in results:
        console.print(point_table(f"{method.id} · {solution_id}", result))
        console.print()
    return EXIT_OK


def _solve_inline(args: argparse.Namespace) -> int:
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
        pka = ", ".join(f"{p:g}" for p in args.pka)
        _console().print(point_table(f"{args.conc}, pKa {pka}, form as added: {args.form}", result))
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


# ---------------------------------------------------------------- analyse
def _add_analyse(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser(
        "analyse",
        help="validity ranges, sensitivity and Monte Carlo: write results.json, CSV tables and figures",
        description="Analyse method files and write, per method, OUTPUT/ID/results.json, CSV tables and figures (SVG and PNG).",
    )
    p.add_argument("paths", nargs="*", default=["methods"], metavar="PATH", help="method files or folders (default: methods)")
    p.add_argument("-o", "--output", default="analysis", metavar="DIR", help="folder to write into (default: analysis)")
    p.add_argument("--draws", type=_positive_int, default=None, metavar="N", help="Monte-Carlo draws per solution (default 1000000)")
    p.add_argument("--seed", type=int, default=None, metavar="N", help="seed of the Monte-Carlo generator (default 20261202)")
    p.add_argument("--no-figures", action="store_true", help="write results and tables only")
    p.set_defaults(run=_run_analyse)


def _positive_int(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"expected a whole number; got {text!r}") from None
    if not 1_000 <= value <= 100_000_000:
        raise argparse.ArgumentTypeError(f"must be 1000 … 100000000; got {value}")
    return value


def _run_analyse(args: argparse.Namespace) -> int:
    import json
    import time
    from pathlib import Path

    from .analysis.method import AnalysisSettings, analyse_method
    from .analysis.results import csv_tables, results_document
    from .inputs.loader import load_paths
    from .problems import format_problems

    inputs = load_paths(args.paths)
    if inputs.problems:
        print(format_problems(list(inputs.problems)), file=sys.stderr)
    if not inputs.ok:
        raise InputFailure("nothing analysed: fix the errors above")
    if not inputs.methods:
        raise InputFailure("no method files found")
    defaults = AnalysisSettings()
    settings = AnalysisSettings(draws=args.draws or defaults.draws, seed=defaults.seed if args.seed is None else args.seed)
    out = Path(args.output)
    for method in inputs.methods:
        t0 = time.perf_counter()
        analysis = analyse_method(method, settings)
        folder = out / method.id
        try:
            folder.mkdir(parents=True, exist_ok=True)
            (folder / "results.json").write_text(json.dumps(results_document(analysis), indent=2, ensure_ascii=False) + "\n", encoding="utf-8")
            for name, text in csv_tables(analysis).items():
                (folder / name).write_text(text, encoding="utf-8")
            if not args.no_figures:
                from .render.figures import method_figures

                (folder / "figures").mkdir(exist_ok=True)
                for fig in method_figures(analysis):
                    (folder / "figures" / f"{fig.stem}.svg").write_bytes(fig.svg)
                    (folder / "figures" / f"{fig.stem}.png").write_bytes(fig.png)
        except OSError as exc:
            raise InputFailure(f"cannot write {folder}: {exc.strerror or exc}") from None
        verdicts = ", ".join(f"{sa.spec.id}/{s.id}: {s.verdict.status}" for sa in analysis.solutions for s in sa.shortcuts)
        print(f"{method.id}: {verdicts} ({time.perf_counter() - t0:.1f} s) → {folder}")
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
    p.add_argument("--draws", type=_positive_int, default=None, metavar="N", help="Monte-Carlo draws per solution (default 1000000)")
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
    from .analysis.method import AnalysisSettings
    from .pipeline import build
    from .problems import format_problems
    from .publish.staging import PublishError

    defaults = AnalysisSettings()
    settings = AnalysisSettings(draws=args.draws or defaults.draws, seed=defaults.seed if args.seed is None else args.seed)
    try:
        with _Reporter(args.quiet) as rep:
            outcome = build(args.paths, args.output, settings=settings, pdf=not args.no_pdf, strict=args.strict, reporter=rep,
                            workers=args.workers, previous=args.previous, cache=not args.no_cache)
    except PublishError as exc:
        raise InputFailure(f"{exc}; the previous dossier is unchanged") from None
    except ValueError as exc:
        raise InputFailure(f"--previous: {exc}") from None
    if outcome.problems:
        print(format_problems(list(outcome.problems)), file=sys.stderr)
    if args.timings:
        from .render.terminal import timing_lines

        print("\n".join(timing_lines(outcome.timings)))
    if not outcome.ok:
        raise InputFailure("nothing built: fix the errors above (the previous dossier is unchanged)")
    index = outcome.output.resolve() / "index.html"
    cached = len(outcome.analyses) - len(outcome.recomputed)
    reuse = f" ({cached} of {len(outcome.analyses)} methods unchanged, taken from the cache)" if cached else ""
    print(f"built {len(outcome.files)} files into {outcome.output}{reuse}; open {index.as_uri()} or run: dossier serve {outcome.output}")
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
    p.set_defaults(run=_run_verify)


def _run_verify(args: argparse.Namespace) -> int:
    from .publish.verify import NotADossierError, verify

    try:
        report = verify(args.output, methods=args.methods, progress=lambda mid: print(f"re-computing {mid}", file=sys.stderr, flush=True))
    except NotADossierError as exc:
        raise InputFailure(str(exc)) from None
    for note in report.notes:
        print(f"note: {note}")
    for m in report.mismatches:
        print(str(m))
    if report.ok:
        print(f"{args.output}: everything matches ({report.files_checked} files, {report.entries_checked} ledger entries re-computed)")
        return EXIT_OK
    print(f"{args.output}: {len(report.mismatches)} mismatch(es)")
    return EXIT_INPUT


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

    from .publish.diff import diff_dossiers
    from .render.terminal import print_json

    try:
        d = diff_dossiers(Path(args.old), Path(args.new))
    except (OSError, ValueError, KeyError) as exc:
        raise InputFailure(f"not a built dossier: {exc}") from None
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
                    print(f"    {c.what}: {c.old!r} → {c.new!r}")
    return EXIT_OK


def _add_serve(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("serve", help="preview a built dossier on a local port (loopback only)",
                       description="Serve a built dossier over HTTP on 127.0.0.1 for preview; stop with Ctrl-C.")
    p.add_argument("folder", nargs="?", default="output", metavar="DIR", help="the built dossier (default: output)")
    p.add_argument("--port", type=int, default=8765, help="port on 127.0.0.1 (0: any free port; default 8765)")
    p.set_defaults(run=_run_serve)


def _not_a_built_dossier(folder: Path) -> str:
    """Why ``folder`` cannot be served ('' when it holds a built dossier)."""
    needs = "serve needs a dossier folder built by `dossier build`"
    if folder.is_file():
        example = f"dossier build {folder} -o output, then dossier serve output" if folder.suffix in (".yaml", ".yml") else "dossier build methods -o output, then dossier serve output"
        return f"{folder} is a file, not a dossier folder: {needs} (e.g. {example})"
    if not folder.is_dir():
        return f"no such folder {folder}: {needs} (e.g. dossier build methods -o {folder})"
    if not (folder / "index.html").is_file():
        return f"{folder} holds no built dossier (no index.html): {needs} (e.g. dossier build methods -o output, then dossier serve output)"
    return ""


def _run_serve(args: argparse.Namespace) -> int:
    import functools
    from http.server import SimpleHTTPRequestHandler, ThreadingHTTPServer
    from pathlib import Path

    folder = Path(args.folder)
    problem = _not_a_built_dossier(folder)
    if problem:
        raise InputFailure(problem)

    class Quiet(SimpleHTTPRequestHandler):
        def log_message(self, format: str, *a: object) -> None:  # noqa: A002 - the base class's name
            pass

    handler = functools.partial(Quiet, directory=str(folder))
    try:
        server = ThreadingHTTPServer(("127.0.0.1", args.port), handler)
    except OSError as exc:
        raise InputFailure(f"cannot listen on 127.0.0.1:{args.port}: {exc.strerror or exc}") from None
    print(f"serving {folder} at http://127.0.0.1:{server.server_address[1]}/ (Ctrl-C to stop)", flush=True)
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
    from .inputs.loader import load_paths
    from .problems import Severity, format_problems

    inputs = load_paths(args.paths, strict=args.strict)
    if inputs.problems:
        print(format_problems(list(inputs.problems)))
    errors = sum(p.severity is Severity.ERROR for p in inputs.problems)
    warnings = len(inputs.problems) - errors
    files = len(inputs.loads)
    noun = "file" if files == 1 else "files"
    if errors:
        print(f"{files} method {noun} checked: {errors} error(s), {warnings} warning(s)")
        return EXIT_INPUT
    if files == 0:
        print("no method files found")
        return EXIT_INPUT
    print(f"{files} method {noun} checked: no errors, {warnings} warning(s)")
    return EXIT_OK


def _method_id(text: str) -> str:
    import re

    from .inputs.schema import ID_PATTERN, ID_RULE

    if not re.match(ID_PATTERN, text):
        raise argparse.ArgumentTypeError(f"a method id is {ID_RULE}; got {text!r}")
    return text


def _add_new(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("new", help="write a commented starter method file",
                       description="Write a commented starter method file that `dossier check` accepts as it stands.")
    p.add_argument("id", type=_method_id, metavar="ID", help="method id (also the default file name)")
    p.add_argument("-o", "--output", metavar="FILE", help="where to write (default: ID.yaml; '-' for standard output)")
    p.add_argument("--title", default=None, help="title of the method (default: the id)")
    p.add_argument("--force", action="store_true", help="overwrite an existing file")
    p.set_defaults(run=_run_new)


def _run_new(args: argparse.Namespace) -> int:
    from .inputs.starter import starter_text

    text = starter_text(args.id, args.title or args.id)
    if args.output == "-":
        sys.stdout.write(text)
        return EXIT_OK
    from pathlib import Path

    out = Path(args.output or f"{args.id}.yaml")
    if out.exists() and not args.force:
        raise InputFailure(f"{out} exists; choose another name with -o or add --force")
    try:
        out.parent.mkdir(parents=True, exist_ok=True)
        out.write_text(text, encoding="utf-8")
    except OSError as exc:
        raise InputFailure(f"cannot write {out}: {exc.strerror or exc}") from None
    print(f"wrote {out}; edit it, then run: dossier check {out}")
    return EXIT_OK


def _add_schema(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("schema", help="print the JSON Schema of the method-file format",
                       description="Print the JSON Schema (draft 2020-12) of the method-file format, for editors that complete and check YAML.")
    p.set_defaults(run=_run_schema)


def _run_schema(args: argparse.Namespace) -> int:
    import json

    from .inputs.schema import json_schema

    print(json.dumps(json_schema(), indent=2, ensure_ascii=False))
    return EXIT_OK


def _add_substances(sub: argparse._SubParsersAction) -> None:
    p = sub.add_parser("substances", help="list the bundled substance table with its sources",
                       description="List the bundled substance table: pKa values (25 °C, I = 0), enthalpies of ionization, each with its source and how it was checked.")
    p.add_argument("--json", action="store_true", help="print JSON instead of tables")
    p.set_defaults(run=_run_substances)


def _run_substances(args: argparse.Namespace) -> int:
    from .inputs.substances import load_table
    from .render.terminal import print_json, substances_as_dict, substances_tables

    table = load_table()
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


_COMMANDS: list[Callable[[argparse._SubParsersAction], None]] = [_add_new, _add_check, _add_solve, _add_analyse, _add_build, _add_serve, _add_verify, _add_diff, _add_schema, _add_substances]


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
