"""The build: load → solve and analyse → render → publish.

The only module that knows every stage. Everything is loaded and checked
before anything is analysed, everything is analysed and rendered (in memory)
before anything is written, and the files are written into a staging folder
that replaces the output in one step at the end: a build that fails leaves
the previous dossier exactly as it was.
"""

from __future__ import annotations

import multiprocessing
import os
import platform
import time
from concurrent.futures import ProcessPoolExecutor, as_completed
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from datetime import datetime, timezone
from importlib import metadata
from pathlib import Path
from typing import Protocol

from . import __version__
from .analysis.method import AnalysisSettings, MethodAnalysis, analyse_method
from .inputs.loader import load_paths
from .inputs.substances import load_table
from .problems import Problem
from .publish.staging import staging_folder, swap_into_place
from .publish.writer import Writer
from .inputs.model import Method
from .render.figures import FigureFile
from .render.site import BuildInfo, dossier_pdf, method_pdf, render_method, render_site, shared_assets

__all__ = ["Reporter", "BuildOutcome", "build", "build_time", "DEPENDENCIES"]

DEPENDENCIES = ("numpy", "scipy", "pandas", "matplotlib", "jinja2", "markdown-it-py", "weasyprint", "pydantic", "pint", "pyyaml", "rich")
"""The libraries whose versions every build records."""


class Reporter(Protocol):
    """Receives progress: a stage with a number of steps, then each step."""

    def stage(self, name: str, total: int) -> None: ...

    def step(self, label: str) -> None: ...


class _Silent:
    def stage(self, name: str, total: int) -> None:
        pass

    def step(self, label: str) -> None:
        pass


@dataclass(frozen=True)
class BuildOutcome:
    """What a build did.

    Attributes
    ----------
    ok : bool
        True when the dossier was published.
    problems : tuple of Problem
        Every input problem (warnings too).
    output : Path
    files : dict
        {relative path: SHA-256} of everything written.
    timings : dict
        Seconds per stage.
    analyses : tuple of MethodAnalysis
    """

    ok: bool
    problems: tuple[Problem, ...]
    output: Path
    files: dict[str, str] = field(default_factory=dict)
    timings: dict[str, float] = field(default_factory=dict)
    analyses: tuple[MethodAnalysis, ...] = ()


def build_time() -> str:
    """The build time: ``SOURCE_DATE_EPOCH`` when set (reproducible builds), else now; UTC."""
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    moment = datetime.fromtimestamp(int(epoch), tz=timezone.utc) if epoch and epoch.isdigit() else datetime.now(tz=timezone.utc)
    return moment.strftime("%Y-%m-%d %H:%M UTC")


def _versions() -> tuple[tuple[str, str], ...]:
    out = []
    for name in DEPENDENCIES:
        try:
            out.append((name, metadata.version(name)))
        except metadata.PackageNotFoundError:
            out.append((name, "not installed"))
    return tuple(out)


@contextmanager
def _timed(timings: dict[str, float], name: str) -> Iterator[None]:
    t0 = time.perf_counter()
    try:
        yield
    finally:
        timings[name] = timings.get(name, 0.0) + time.perf_counter() - t0


def build(
    paths: list[str | Path],
    output: str | Path,
    *,
    settings: AnalysisSettings | None = None,
    pdf: bool = True,
    strict: bool = False,
    reporter: Reporter | None = None,
    workers: int | None = None,
) -> BuildOutcome:
    """Build the dossier of the method files under ``paths`` into ``output``.

    Returns
    -------
    BuildOutcome
        ``ok`` False (and nothing written) when any input has an error.

    Raises
    ------
    dossier.publish.staging.PublishError
        When the output cannot be written or replaced (the previous output is kept).
    """
    out = Path(output)
    rep = reporter or _Silent()
    timings: dict[str, float] = {}
    settings = settings or AnalysisSettings()
    with _timed(timings, "check inputs"):
        rep.stage("checking method files", 1)
        inputs = load_paths(list(paths), strict=strict)
        rep.step("method files checked")
    if not inputs.ok or not inputs.methods:
        return BuildOutcome(False, inputs.problems, out, timings=timings)
    info = BuildInfo(
        version=__version__,
        time=build_time(),
        python=platform.python_version(),
        dependencies=_versions(),
        table_sha256=load_table().sha256,
        draws=settings.draws,
        seed=settings.seed,
    )
    methods = inputs.methods
    n_workers = max(1, min(workers if workers else (os.cpu_count() or 1), len(methods)))
    with _Pool(n_workers) as pool:
        with _timed(timings, "analyse, plot and render methods"):
            rep.stage("analysing and rendering methods", len(methods))
            results = pool.run(_method_job, [(m, settings, info) for m in methods], [m.id for m in methods], rep)
        analyses = tuple(r[0] for r in results)
        figures = {a.method.id: figs for a, _, figs in results}
        files: dict[str, bytes] = shared_assets()
        for _, method_files, _ in results:
            files.update(method_files)
        files.update(render_site(analyses, info))
        if pdf:
            with _timed(timings, "PDF"):
                rep.stage("writing PDFs", len(methods) + 1)
                jobs = [(dossier_pdf, (analyses, figures, info, files))]
                jobs += [(method_pdf, (a, figures[a.method.id], info, _method_files(files, a.method.id))) for a in analyses]
                labels = ["whole dossier"] + [a.method.id for a in analyses]
                for part in pool.run(_call, jobs, labels, rep):
                    files.update(part)
    with _timed(timings, "publish"):
        rep.stage("publishing", 1)
        with staging_folder(out) as staging:
            writer = Writer(staging)
            for rel in sorted(files):
                writer.write(rel, files[rel])
            swap_into_place(staging, out)
        rep.step(f"published {len(files)} files")
    return BuildOutcome(True, inputs.problems, out, dict(writer.written), timings, analyses)


def _method_job(method: Method, settings: AnalysisSettings, info: BuildInfo) -> tuple[MethodAnalysis, dict[str, bytes], tuple[FigureFile, ...]]:
    """Everything one method needs but its PDF, in one process: analysis, figures, page."""
    analysis = analyse_method(method, settings)
    files, figures = render_method(analysis, info)
    return analysis, files, figures


def _call(fn, args):  # noqa: ANN001, ANN202
    return fn(*args)


def _method_files(files: dict[str, bytes], method_id: str) -> dict[str, bytes]:
    """What one method's PDF reads: its own files and the shared assets."""
    return {k: v for k, v in files.items() if k.startswith((f"methods/{method_id}/", "assets/"))}


class _Pool:
    """Runs jobs in worker processes (spawned) when there is more than one core, else in this one."""

    def __init__(self, workers: int) -> None:
        self.workers = workers
        self.executor: ProcessPoolExecutor | None = None

    def __enter__(self) -> _Pool:
        if self.workers > 1:
            self.executor = ProcessPoolExecutor(max_workers=self.workers, mp_context=multiprocessing.get_context("spawn"))
        return self

    def __exit__(self, *exc: object) -> None:
        if self.executor is not None:
            self.executor.shutdown(wait=True, cancel_futures=True)

    def run(self, fn, arg_list, labels, rep):  # noqa: ANN001, ANN201
        """``fn(*args)`` for each args, in order of submission; reports each as it finishes."""
        if self.executor is None:
            out = []
            for args, label in zip(arg_list, labels):
                out.append(fn(*args))
                rep.step(label)
            return out
        futures = {self.executor.submit(fn, *args): i for i, args in enumerate(arg_list)}
        done: dict[int, object] = {}
        for fut in as_completed(futures):
            i = futures[fut]
            done[i] = fut.result()
            rep.step(labels[i])
        return [done[i] for i in range(len(arg_list))]
