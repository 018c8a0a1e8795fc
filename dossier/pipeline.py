"""The build: load → solve and analyse → render → publish.

The only module that knows every stage. Everything is loaded and checked
before anything is analysed, everything is analysed and rendered (in memory)
before anything is written, and the files are written through one writer
into a staging folder that replaces the output in one step at the end: a
build that fails leaves the previous dossier exactly as it was.

A content-hash cache (:mod:`dossier.publish.cache`) keeps each method's
analysis and files: an unchanged method is not recomputed, and a rebuild
with nothing changed recomputes nothing.
"""

from __future__ import annotations

import json
import multiprocessing
import os
import platform
import time
from collections.abc import Iterator
from concurrent.futures import ProcessPoolExecutor, as_completed
from contextlib import contextmanager
from dataclasses import dataclass, field
from datetime import datetime, timezone
from pathlib import Path
from typing import Any, Protocol

from . import __version__
from .analysis.method import AnalysisSettings, MethodAnalysis
from .inputs.loader import load_paths
from .inputs.model import Method
from .inputs.substances import load_table
from .problems import Problem
from .publish.cache import Cache, dossier_key, method_key
from .publish.manifest import MANIFEST_NAME, dependency_versions, manifest_document, portable_path
from .publish.staging import PublishError, check_replaceable, output_lock, remove_stale_staging, staging_folder, swap_into_place
from .publish.writer import Writer
from .render.buildinfo import BuildInfo

__all__ = ["Reporter", "BuildOutcome", "build", "build_time", "solver_settings"]


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
        {relative path: SHA-256} of everything written (the manifest included).
    timings : dict
        Seconds per stage.
    analyses : tuple of MethodAnalysis
    recomputed : tuple of str
        Ids of the methods analysed in this build (the others came from the cache).
    """

    ok: bool
    problems: tuple[Problem, ...]
    output: Path
    files: dict[str, str] = field(default_factory=dict)
    timings: dict[str, float] = field(default_factory=dict)
    analyses: tuple[MethodAnalysis, ...] = ()
    recomputed: tuple[str, ...] = ()


def build_time() -> str:
    """The build time: ``SOURCE_DATE_EPOCH`` when set (reproducible builds), else now; UTC."""
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    moment = datetime.fromtimestamp(int(epoch), tz=timezone.utc) if epoch and epoch.isdigit() else datetime.now(tz=timezone.utc)
    return moment.strftime("%Y-%m-%d %H:%M UTC")


def solver_settings(settings: AnalysisSettings, pdf: bool) -> dict[str, Any]:
    """The settings a manifest records: solver tolerances, grids, Monte Carlo, outputs."""
    from .analysis import validity
    from .chemistry import solver

    return {
        "solver": {"tolerance_ln_h": solver.TOLERANCE, "max_newton_iterations": solver._MAX_NEWTON, "max_ionic_strength_iterations": solver._MAX_OUTER, "block_points": solver.CHUNK},
        "validity": {
            "concentration_span_mol_per_l": list(validity.CONCENTRATION_SPAN),
            "concentration_points": validity.CONCENTRATION_POINTS,
            "pka_span": list(validity.PKA_SPAN),
            "pka_points": validity.PKA_POINTS,
            "concentration_rel_tolerance": 1e-3,
            "pka_tolerance": 1e-3,
        },
        "monte_carlo": {"draws": settings.draws, "seed": settings.seed, "generator": "numpy PCG64, SeedSequence(seed, spawn_key=(solution index,))"},
        "maps": {"pka_points": settings.map_pka, "concentration_points": settings.map_conc},
        "pdf": pdf,
    }


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
    previous: str | Path | None = None,
    cache: bool = True,
) -> BuildOutcome:
    """Build the dossier of the method files under ``paths`` into ``output``.

    Parameters
    ----------
    previous : path, optional
        A dossier built before (it may be ``output`` itself): the new dossier
        gets a "changes since the previous revision" page.
    cache : bool
        Use the content-hash cache beside the output.

    Returns
    -------
    BuildOutcome
        ``ok`` False (and nothing written) when any input has an error.

    Raises
    ------
    dossier.publish.staging.PublishError
        When the output cannot be written or replaced (the previous output is kept).
    ValueError
        When ``previous`` is not a built dossier.
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
    check_replaceable(out)
    with output_lock(out):
        remove_stale_staging(out)
        return _build_locked(inputs, out, settings, pdf, rep, workers, previous, cache, timings)


def _build_locked(inputs, out, settings, pdf, rep, workers, previous, cache, timings) -> BuildOutcome:  # noqa: ANN001
    """The build once the inputs are valid and the output is locked."""
    old_ledgers = _previous_ledgers(previous)
    table = load_table()
    info = BuildInfo(__version__, build_time(), platform.python_version(), dependency_versions(), table.sha256, settings.draws, settings.seed)
    store = Cache.beside(out) if cache else None
    config = solver_settings(settings, pdf)
    methods = inputs.methods
    keys = {m.id: method_key(m.source_sha256, table.sha256, config, pdf) for m in methods}
    cached = {m.id: store.get("methods", keys[m.id]) for m in methods} if store else {m.id: None for m in methods}
    todo = [m for m in methods if cached[m.id] is None]
    n_workers = max(1, min(workers if workers else (os.cpu_count() or 1), max(len(todo), 1)))

    with _Pool(n_workers if todo else 1) as pool:
        with _timed(timings, "analyse, plot and render methods" + (" (pages and PDFs)" if pdf else "")):
            rep.stage("analysing and rendering methods", len(todo))
            order = sorted(todo, key=_expected_cost, reverse=True)  # longest first: the workers finish together
            fresh = pool.run(_method_job, [(m, settings, info, pdf) for m in order], [m.id for m in order], rep)
    results = {m.id: r for m, r in zip(order, fresh)}
    results.update({mid: (c[0], c[1], c[2]) for mid, c in cached.items() if c is not None})
    analyses = tuple(results[m.id][0] for m in methods)
    new_ledgers = {m.id: _ledger_of(results[m.id][1], m.id) for m in methods}
    diff = _diff(old_ledgers, new_ledgers, previous)
    site_key = dossier_key([keys[m.id] for m in methods], {"pdf": pdf, "diff": _diff_key(diff)})
    site = store.get("dossier", site_key) if store else None
    assets: dict[str, bytes] = {}
    if site is None:
        from .render.site import shared_assets

        assets = shared_assets()
    if pdf and site is None:
        with _timed(timings, "bind the dossier PDF"):
            from .render.site import dossier_pdf, method_pdf_path

            rep.stage("binding the dossier PDF", 1)
            site = dossier_pdf(analyses, {m.id: results[m.id][1][method_pdf_path(m.id)] for m in methods}, info, assets)
            rep.step("dossier.pdf")
    if site is None or "index.html" not in site:
        from .render.site import render_site

        site = {**(site or {}), **assets, **render_site(analyses, info, diff)}
    if store:
        for m in todo:
            store.put("methods", keys[m.id], results[m.id])
        store.put("dossier", site_key, site)
    files: dict[str, bytes] = {}
    for m in methods:
        files.update(results[m.id][1])
    files.update(site)
    with _timed(timings, "publish"), _as_publish_error(out):
        rep.stage("publishing", 1)
        with staging_folder(out) as staging:
            writer = Writer(staging)
            for rel in sorted(files):
                writer.write(rel, files[rel])
            manifest = manifest_document(
                build_time=info.time,
                python=info.python,
                settings=config,
                inputs=_inputs_record(methods, table.sha256),
                methods=[{"id": m.id, "revision": m.revision, "source": portable_path(m.path), "source_sha256": m.source_sha256, "cache_key": keys[m.id]} for m in methods],
                outputs={rel: (writer.written[rel], writer.sizes[rel]) for rel in writer.written},
            )
            writer.write(MANIFEST_NAME, json.dumps(manifest, indent=2, ensure_ascii=False) + "\n")
            swap_into_place(staging, out)
        rep.step(f"published {len(writer.written)} files")
    if store:
        store.prune()
    return BuildOutcome(True, inputs.problems, out, dict(writer.written), timings, analyses, tuple(m.id for m in todo))


# ---------------------------------------------------------------- helpers
@contextmanager
def _as_publish_error(out: Path) -> Iterator[None]:
    """A file-system error while writing becomes a PublishError that says what and where."""
    try:
        yield
    except PublishError:
        raise
    except OSError as exc:
        where = f" ({exc.filename})" if getattr(exc, "filename", None) else ""
        raise PublishError(f"cannot write the dossier into {out}: {exc.strerror or exc}{where}") from None



def _inputs_record(methods: tuple[Method, ...], table_sha256: str) -> list[dict[str, Any]]:
    """Every input file: each method file, and the substance table."""
    from importlib import resources

    out = []
    for m in methods:
        p = Path(m.path)
        out.append({"path": portable_path(p), "sha256": m.source_sha256, "bytes": p.stat().st_size if p.exists() else None, "role": "method"})
    size = len(resources.files("dossier").joinpath("data/substances.yaml").read_bytes())
    out.append({"path": "dossier/data/substances.yaml", "sha256": table_sha256, "bytes": size, "role": "substance table"})
    return out


def _ledger_of(files: dict[str, bytes], method_id: str) -> dict[str, Any]:
    return json.loads(files[f"methods/{method_id}/ledger.json"])


def _previous_ledgers(previous: str | Path | None) -> dict[str, dict[str, Any]] | None:
    if previous is None:
        return None
    from .publish.diff import read_ledgers

    try:
        return read_ledgers(Path(previous))
    except (OSError, ValueError, KeyError) as exc:
        raise ValueError(f"{previous} is not a built dossier (no readable manifest.json and ledgers): {exc}") from None


def _diff(old, new, previous):  # noqa: ANN001, ANN202
    if old is None:
        return None
    from .publish.diff import diff_ledgers

    return diff_ledgers(old, new, portable_path(previous), "this build")


def _diff_key(diff) -> str | None:  # noqa: ANN001
    if diff is None:
        return None
    import hashlib

    return hashlib.sha256(repr(diff).encode()).hexdigest()


def _method_job(method: Method, settings: AnalysisSettings, info: BuildInfo, pdf: bool) -> tuple[MethodAnalysis, dict[str, bytes], tuple]:
    """Everything of one method, in one process: analysis, figures, page, ledger and (with ``pdf``) its PDF."""
    from .analysis.method import analyse_method
    from .render.site import method_pdf, render_method, shared_assets

    analysis = analyse_method(method, settings)
    files, figures = render_method(analysis, info)
    if pdf:
        files.update(method_pdf(analysis, figures, info, {**shared_assets(), **files}))
    return analysis, files, figures


def _expected_cost(method: Method) -> int:
    """A rough relative cost of a method's job, only to start the longest jobs first:
    per solution, (1 + claimed shortcuts) × (1 + ionization steps)."""
    return sum((1 + len(s.shortcuts)) * (1 + sum(len(c.pka) for c in s.components)) for s in method.solutions)


def _worker_init() -> None:
    """Workers leave Ctrl-C and SIGTERM to the main process, which stops the build cleanly."""
    import signal

    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)


class _Pool:
    """Runs jobs in worker processes (spawned) when there is more than one, else in this one."""

    def __init__(self, workers: int) -> None:
        self.workers = workers
        self.executor: ProcessPoolExecutor | None = None

    def __enter__(self) -> _Pool:
        if self.workers > 1:
            self.executor = ProcessPoolExecutor(max_workers=self.workers, mp_context=multiprocessing.get_context("spawn"), initializer=_worker_init)
        return self

    def __exit__(self, *exc: object) -> None:
        if self.executor is not None:
            self.executor.shutdown(wait=True, cancel_futures=True)

    def run(self, fn, arg_list, labels, rep):  # noqa: ANN001, ANN201
        """``fn(*args)`` for each args, results in order of submission; reports each as it finishes."""
        if self.executor is None or len(arg_list) <= 1:
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
