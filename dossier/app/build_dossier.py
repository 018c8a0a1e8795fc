"""The build: load → solve and analyse → render → publish.

Everything is loaded and checked before anything is analysed, everything is
analysed and rendered (in memory) before anything is written, and the files
are written through the one writer into a staging folder that replaces the
output in one step at the end: a build that fails leaves the previous
dossier exactly as it was.

A content-hash cache (:mod:`dossier.audit.cache`) keeps each method's
outcome: an unchanged method is not recomputed, and a rebuild with nothing
changed recomputes nothing.
"""

from __future__ import annotations

import hashlib
import os
import platform
import time
from collections.abc import Callable, Iterator, Sequence
from contextlib import contextmanager
from dataclasses import dataclass, field, replace
from datetime import datetime, timezone
from pathlib import Path
from typing import Any

from .. import __version__, limits
from ..analysis.ledger import Ledger
from ..analysis.method import AnalysisSettings, MethodAnalysis
from ..audit.cache import Cache, dossier_key, method_key, tool_fingerprint
from ..audit.diff import DossierDiff, NotADossier, diff_ledgers, read_ledgers
from ..audit.signatures import check_signatures, retire_signatures
from ..chemistry import solver
from ..inputs.loader import load_paths
from ..inputs.model import Method
from ..inputs.substances import SubstanceTable, load_table
from ..layout import LAYOUT
from ..problems import Problem, has_errors
from ..publish.manifest import InputRecord, Manifest, ManifestError, MethodRecord, dependency_versions, is_stamped, new_manifest, portable_path, stamp_text
from ..publish.staging import PublishError, check_replaceable, output_lock, remove_stale_staging, staging_folder, swap_into_place
from ..publish.writer import Writer
from ..render.buildinfo import STAMP_PLACEHOLDER, BuildInfo, RecordedSignature
from ..render.context import BuildContext
from ..render import memo
from ..render.site import render_dossier, shared_assets
from .errors import UserError
from .revisions import revision_problems
from .jobs import MethodOutcome, Reporter, Silent, WorkerPool, expected_cost, method_job

__all__ = ["BuildOptions", "BuildOutcome", "PreviousDossierError", "OutputError", "build", "analyse", "build_time", "solver_settings"]


class PreviousDossierError(UserError):
    """The dossier given as ``--previous`` cannot be read (the message says why)."""


class OutputError(UserError):
    """The output cannot be written or replaced; the previous output is unchanged."""


@dataclass(frozen=True)
class BuildOptions:
    """How to build.

    Attributes
    ----------
    settings : AnalysisSettings
    pdf : bool
        Make the PDFs.
    site : bool
        Make the pages (False: results, tables, figures, ledgers; ``dossier analyse``).
    figures : bool
        Draw the figures (a site always has them).
    strict : bool
        Warnings in method files are errors.
    workers : int, optional
        Processes to use (default: one per core).
    previous : Path, optional
        A dossier built before (it may be the output itself): the new dossier
        gets a page of the changes since it.
    cache : bool
        Use the content-hash cache beside the output.
    """

    settings: AnalysisSettings = field(default_factory=AnalysisSettings)
    pdf: bool = True
    site: bool = True
    figures: bool = True
    strict: bool = False
    workers: int | None = None
    previous: Path | None = None
    cache: bool = True


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
    fingerprint : str
        The dossier's fingerprint (docs/manifest-format.md); empty when nothing was built.
    """

    ok: bool
    problems: tuple[Problem, ...]
    output: Path
    files: dict[str, str] = field(default_factory=dict)
    timings: dict[str, float] = field(default_factory=dict)
    analyses: tuple[MethodAnalysis, ...] = ()
    recomputed: tuple[str, ...] = ()
    fingerprint: str = ""


BUILD_TIME_FORMAT = "%Y-%m-%d %H:%M UTC"
"""How the build time is written (cover, manifest); read back to date the PDFs' attachments."""


def build_time() -> str:
    """The build time: ``SOURCE_DATE_EPOCH`` when set (reproducible builds), else now; UTC."""
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    moment = datetime.fromtimestamp(int(epoch), tz=timezone.utc) if epoch and epoch.isdigit() else datetime.now(tz=timezone.utc)
    return moment.strftime(BUILD_TIME_FORMAT)


def solver_settings(settings: AnalysisSettings, pdf: bool) -> dict[str, Any]:
    """The settings a manifest records: solver tolerances, grids, Monte Carlo, outputs."""
    from ..analysis import validity

    return {
        "solver": {"tolerance_ln_h": solver.TOLERANCE, "max_newton_iterations": solver._MAX_NEWTON, "max_ionic_strength_iterations": solver._MAX_OUTER, "block_points": solver.CHUNK},
        "validity": {
            "concentration_span_mol_per_l": list(limits.SWEEP_CONCENTRATION),
            "concentration_points": validity.CONCENTRATION_POINTS,
            "pka_span": list(limits.SWEEP_PKA),
            "pka_points": validity.PKA_POINTS,
            "concentration_rel_tolerance": limits.VALIDITY_CONCENTRATION_REL_TOLERANCE,
            "pka_tolerance": limits.VALIDITY_PKA_TOLERANCE,
        },
        "monte_carlo": {"draws": settings.draws, "adaptive": settings.adaptive, "seed": settings.seed, "generator": "numpy PCG64, SeedSequence(seed, spawn_key=(solution index,))"},
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


def build(paths: Sequence[str | Path], output: str | Path, options: BuildOptions | None = None, *, reporter: Reporter | None = None) -> BuildOutcome:
    """Build the dossier of the method files under ``paths`` into ``output``.

    Returns
    -------
    BuildOutcome
        ``ok`` False (and nothing written) when any input has an error.

    Raises
    ------
    OutputError
        When the output cannot be written or replaced (the previous output is kept).
    PreviousDossierError
        When ``options.previous`` is not a readable built dossier.
    """
    try:
        return _build(paths, output, options or BuildOptions(), reporter or Silent())
    except PublishError as exc:
        raise OutputError(f"{exc}; the previous dossier is unchanged") from None


def analyse(paths: Sequence[str | Path], output: str | Path, settings: AnalysisSettings | None = None, *, figures: bool = True,
            reporter: Reporter | None = None, workers: int | None = None) -> BuildOutcome:
    """Analyse method files and publish only the machine-readable part: per
    method its results, CSV tables, figures and ledger, with the manifest
    (the same writer, staging and swap as :func:`build`; no pages, no PDFs)."""
    options = BuildOptions(settings=settings or AnalysisSettings(), pdf=False, site=False, figures=figures, workers=workers)
    return build(paths, output, options, reporter=reporter)


def _build(paths: Sequence[str | Path], output: str | Path, opts: BuildOptions, rep: Reporter) -> BuildOutcome:
    out = Path(output)
    timings: dict[str, float] = {}
    table = load_table()
    with _timed(timings, "check inputs"):
        rep.stage("checking method files", 1)
        inputs = load_paths(list(paths), strict=opts.strict, table=table)
        rep.step("method files checked")
    if not inputs.ok or not inputs.methods:
        return BuildOutcome(False, inputs.problems, out, timings=timings)
    previous = _previous_ledgers(opts.previous)
    previous_identity = _previous_identity(opts.previous)
    problems = inputs.problems
    if previous is not None:
        problems += revision_problems(inputs.methods, previous, portable_path(opts.previous or ""), strict=opts.strict)
        if has_errors(problems):
            return BuildOutcome(False, problems, out, timings=timings)
    check_replaceable(out)
    with output_lock(out):
        remove_stale_staging(out)
        info = BuildInfo(__version__, build_time(), platform.python_version(), dependency_versions(), table.sha256, opts.settings.draws, opts.settings.seed, opts.settings.adaptive)
        ctx = BuildContext(table, opts.settings, info, pdf=opts.pdf and opts.site, site=opts.site, figures=opts.figures or opts.site)
        store = Cache.beside(out) if opts.cache else None
        drawn = _reuse_drawings(store)
        with WorkerPool(max(1, opts.workers or os.cpu_count() or 1)) as pool:
            outcomes, recomputed = _method_outcomes(inputs.methods, ctx, store, pool, rep, timings)
            diff = None if previous is None else replace(
                diff_ledgers(previous, {o.analysis.method.id: o.ledger for o in outcomes}, portable_path(opts.previous or ""), "this build"),
                old_fingerprint=previous_identity[0], old_built=previous_identity[1])
            files = _method_files(outcomes)
            with _timed(timings, "stamp the fingerprint"):
                seal = _seal(files, inputs.methods, ctx)
                reports = _stamp_beside(files, seal, pool)  # the method PDFs, in a worker while the dossier is laid out here
            files.update(_dossier_site(outcomes, ctx, diff, _recorded_signatures(out), store, rep, timings))
            written, fingerprint = _publish(files, seal, reports, inputs.methods, ctx, out, rep, timings, pool)
        kept = memo.kept()
        if store and kept != drawn:  # what this build used differs from what it was handed
            store.put("drawings", _drawings_key(), kept)
        retire_signatures(out, fingerprint)  # they signed the build this one replaced (listed on its pages)
        if store:
            store.prune()  # what this build did not use
    return BuildOutcome(True, problems, out, written, timings, tuple(o.analysis for o in outcomes), recomputed, fingerprint)


def _drawings_key() -> str:
    """Cache key of the drawings kept from build to build (:mod:`~dossier.render.memo`): this
    code and the versions of the libraries that draw them."""
    from importlib.metadata import version

    return hashlib.sha256(f"{tool_fingerprint()} matplotlib {version('matplotlib')} weasyprint {version('weasyprint')}".encode()).hexdigest()


def _reuse_drawings(store: Cache | None) -> dict[str, Any]:
    """Hand the drawings an earlier build kept in ``store`` (equations, page stamps) to this
    process, before any worker is forked from it, so that neither draws them again; what was
    handed over ({} if nothing)."""
    kept = store.get("drawings", _drawings_key(), dict) if store else None
    if kept:
        memo.reuse(kept)
    return kept or {}


def _previous_ledgers(previous: Path | None) -> dict[str, Ledger] | None:
    if previous is None:
        return None
    try:
        return read_ledgers(Path(previous))
    except NotADossier as exc:
        raise PreviousDossierError(f"--previous: {exc}") from None


def _previous_identity(previous: Path | None) -> tuple[str | None, str | None]:
    """The previous dossier's fingerprint (None when it predates fingerprints) and build time."""
    if previous is None:
        return None, None
    try:
        m = Manifest.read(Path(previous))
    except ManifestError:
        return None, None
    return (m.fingerprint() if m.recorded_fingerprint else None), m.build_time


def _keys(methods: tuple[Method, ...], ctx: BuildContext) -> dict[str, str]:
    config = solver_settings(ctx.settings, ctx.pdf)
    return {m.id: method_key(m.source_sha256, ctx.table.sha256, {**config, "site": ctx.site, "figures": ctx.figures}, ctx.pdf) for m in methods}


def _method_outcomes(methods: tuple[Method, ...], ctx: BuildContext, store: Cache | None, pool: WorkerPool, rep: Reporter,
                     timings: dict[str, float]) -> tuple[tuple[MethodOutcome, ...], tuple[str, ...]]:
    """Each method's outcome: from the cache where its inputs are unchanged, else from its job."""
    keys = _keys(methods, ctx)
    cached = {m.id: (store.get("methods", keys[m.id], MethodOutcome) if store else None) for m in methods}
    todo = sorted((m for m in methods if cached[m.id] is None), key=expected_cost, reverse=True)  # longest first
    stage = "analyse, plot and render methods" + (" (pages and PDFs)" if ctx.pdf else " (pages)" if ctx.site else "")
    with _timed(timings, stage):
        rep.stage("analysing and rendering methods", len(todo))
        fresh = pool.run(method_job, todo, ctx, [m.id for m in todo], rep)
    got = {**{mid: o for mid, o in cached.items() if o is not None}, **{m.id: o for m, o in zip(todo, fresh)}}
    if store:
        for m, o in zip(todo, fresh):
            store.put("methods", keys[m.id], o)
    return tuple(got[m.id] for m in methods), tuple(m.id for m in todo)


def dossier_data_files(methods: dict[str, dict[str, bytes]]) -> dict[str, bytes]:
    """The dossier-wide data files made from every method's ({method id: {dossier path:
    bytes}}, in the dossier's order): dossier.xlsx. ``dossier verify`` makes them afresh
    the same way."""
    return {LAYOUT.dossier_workbook: _dossier_workbook(methods)}


def _dossier_workbook(methods: dict[str, dict[str, bytes]]) -> bytes:
    """One workbook for the whole dossier: the validity and sensitivity tables of every
    method, one sheet each, with a first column naming the method (the sweeps are in each
    method's own workbook)."""
    import csv
    import io

    from ..render.workbooks import workbook

    sheets = {}
    for name in ("validity.csv", "sensitivity.csv"):
        buf = io.StringIO()
        w = csv.writer(buf, lineterminator="\n")
        header_written = False
        for mid, files in methods.items():
            rows = list(csv.reader(io.StringIO(files[LAYOUT.table(mid, name)].decode("utf-8"))))
            if not header_written:
                w.writerow(["method", *rows[0]])
                header_written = True
            w.writerows([mid, *r] for r in rows[1:])
        sheets[name] = buf.getvalue()
    return workbook(sheets)


def _recorded_signatures(out: Path) -> tuple[RecordedSignature, ...]:
    """The signatures beside the output before this build (each signed an earlier build)."""
    return tuple(RecordedSignature(c.statement.signer, c.statement.meaning, c.statement.signed_at, c.statement.key_id, c.statement.fingerprint, c.valid)
                 for c in check_signatures(out, None, None) if c.statement is not None)


def _method_files(outcomes: tuple[MethodOutcome, ...]) -> dict[str, bytes]:
    """Each method's files, and the dossier-wide data files made from them (dossier.xlsx)."""
    files: dict[str, bytes] = {}
    for o in outcomes:
        files.update(o.files)
    files.update(dossier_data_files({o.analysis.method.id: o.files for o in outcomes}))
    return files


def _dossier_site(outcomes: tuple[MethodOutcome, ...], ctx: BuildContext, diff: DossierDiff | None, recorded: tuple[RecordedSignature, ...],
                  store: Cache | None, rep: Reporter, timings: dict[str, float]) -> dict[str, bytes]:
    """The dossier-wide pages, shared assets and PDF (cached too); none without the site."""
    files: dict[str, bytes] = {}
    if not ctx.site:
        return files
    diff_key = None if diff is None else hashlib.sha256(repr(diff).encode()).hexdigest()
    key = dossier_key(list(_keys(tuple(o.analysis.method for o in outcomes), ctx).values()), {"pdf": ctx.pdf, "diff": diff_key, "signatures": [repr(r) for r in recorded]})
    site = store.get("dossier", key, dict) if store else None
    if site is None:
        with _timed(timings, "render the dossier pages" + (" and bind the dossier PDF" if ctx.pdf else "")):
            rep.stage("rendering the dossier", 1)
            pdfs = {o.analysis.method.id: o.files[LAYOUT.method_pdf(o.analysis.method.id)] for o in outcomes} if ctx.pdf else {}
            site = render_dossier(tuple(o.analysis for o in outcomes), pdfs, ctx, diff, recorded)
            rep.step("index, references, calculations, provenance" + (", dossier.pdf" if ctx.pdf else ""))
        if store:
            store.put("dossier", key, site)
    files.update(site)
    return files


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


def _inputs_record(methods: tuple[Method, ...], table: SubstanceTable) -> tuple[InputRecord, ...]:
    """Every input file: each method file, and the substance table."""
    out = []
    for m in methods:
        p = Path(m.path)
        out.append(InputRecord(portable_path(p), m.source_sha256, p.stat().st_size if p.exists() else None, "method"))
    out.append(InputRecord("dossier/data/substances.yaml", table.sha256, table.size, "substance table"))
    return tuple(out)


def _manifest_of(methods: tuple[Method, ...], ctx: BuildContext, outputs: dict[str, tuple[str, int]]) -> Manifest:
    """The build's manifest listing ``outputs`` ({path: (SHA-256, bytes)})."""
    keys = _keys(methods, ctx)
    return new_manifest(
        build_time=ctx.info.time,
        python=ctx.info.python,
        settings=solver_settings(ctx.settings, ctx.pdf),
        inputs=_inputs_record(methods, ctx.table),
        methods=tuple(MethodRecord(m.id, m.revision, portable_path(m.path), m.source_sha256, keys[m.id]) for m in methods),
        outputs=outputs,
    )


@dataclass(frozen=True)
class Seal:
    """The fingerprint and what it seals: the line every page shows, the method files
    published (and attached to the PDFs), the build time, and the sealed files."""

    fingerprint: str
    line: str
    sources: dict[str, bytes]
    built: datetime
    sealed: dict[str, tuple[str, int]]


def _sealed(files: dict[str, bytes]) -> dict[str, tuple[str, int]]:
    """{path: (SHA-256, bytes)} of the files the fingerprint seals (all but pages and PDFs)."""
    return {rel: (hashlib.sha256(data).hexdigest(), len(data)) for rel, data in files.items() if not is_stamped(rel)}


def _seal(files: dict[str, bytes], methods: tuple[Method, ...], ctx: BuildContext) -> Seal:
    """The fingerprint of the build, before the dossier-wide pages and PDF are made.

    The fingerprint seals the manifest without the stamped files
    (:meth:`~dossier.publish.manifest.Manifest.fingerprint`). Of the dossier-wide
    files only the shared assets are sealed (the rest are pages and dossier.pdf,
    which show it), so it is known once the methods are done: the method PDFs can
    be stamped while the dossier is laid out. :func:`_publish` checks that the
    dossier-wide files added nothing else to the sealed part.
    """
    sources = _method_sources(methods)
    sealed = _sealed({**files, **(shared_assets() if ctx.site else {}), **sources})
    manifest = _manifest_of(methods, ctx, sealed)
    fingerprint = manifest.fingerprint()
    return Seal(fingerprint, stamp_text(fingerprint, manifest.tool_version, manifest.git_commit, manifest.git_dirty), sources,
                datetime.strptime(ctx.info.time, BUILD_TIME_FORMAT).replace(tzinfo=timezone.utc), sealed)


def _publish(files: dict[str, bytes], seal: Seal, reports: Callable[[], dict[str, bytes]], methods: tuple[Method, ...], ctx: BuildContext,
             out: Path, rep: Reporter, timings: dict[str, float], pool: WorkerPool) -> tuple[dict[str, str], str]:
    """Stamp the pages and the dossier PDF with the fingerprint (the method PDFs
    are stamped already, ``reports`` waits for them), write every file into a
    staging folder, the manifest last, and swap it into place."""
    fingerprint = seal.fingerprint
    with _timed(timings, "stamp the fingerprint"):
        files = {**files, **seal.sources}
        if _sealed(files) != seal.sealed:  # pragma: no cover - the dossier-wide files seal only the shared assets
            raise RuntimeError("the dossier-wide files changed what the fingerprint seals after it was computed")
        stamped = _stamp(files, seal, pool, done=reports())
    with _timed(timings, "publish"), _as_publish_error(out):
        rep.stage("publishing", 1)
        with staging_folder(out) as staging:
            writer = Writer(staging)
            for rel in sorted(stamped):
                writer.write(rel, stamped[rel])
            manifest = _manifest_of(methods, ctx, {rel: (writer.written[rel], writer.sizes[rel]) for rel in writer.written})
            if manifest.fingerprint() != fingerprint:  # pragma: no cover - the sealed files are written as they are
                raise RuntimeError("the fingerprint changed while the dossier was written")
            writer.write(LAYOUT.manifest, manifest.to_bytes())
            swap_into_place(staging, out)
        rep.step(f"published {len(writer.written)} files")
    return dict(writer.written), fingerprint


def _method_sources(methods: tuple[Method, ...]) -> dict[str, bytes]:
    """Each method file as it was checked, under its dossier path (read again; it must not have changed)."""
    out = {}
    for m in methods:
        try:
            raw = Path(m.path).read_bytes()
        except OSError as exc:
            raise UserError(f"{m.path}: cannot read the method file again to publish it: {exc.strerror or exc}") from None
        if hashlib.sha256(raw).hexdigest() != m.source_sha256:
            raise UserError(f"{m.path}: the method file changed during the build; build again")
        out[LAYOUT.method_source(m.id)] = raw
    return out


def _stamp_jobs(files: dict[str, bytes], seal: Seal) -> list[tuple[str, StampJob]]:
    """A stamp job for every PDF of ``files`` (its method files to attach: a method PDF its
    own, dossier.pdf all), largest first: dossier.pdf takes as long as several reports."""
    name = {rel: rel.rsplit("/", 1)[-1] for rel in seal.sources}
    jobs = []
    for rel, data in files.items():
        if rel.endswith(".pdf"):
            mid = LAYOUT.method_of(rel)
            own = {name[s]: seal.sources[s] for s in seal.sources if mid is None or LAYOUT.method_of(s) == mid}
            jobs.append((rel, StampJob(data, seal.line, own, seal.built)))
    return sorted(jobs, key=lambda job: len(job[1].pdf), reverse=True)


def _stamp_beside(files: dict[str, bytes], seal: Seal, pool: WorkerPool) -> Callable[[], dict[str, bytes]]:
    """Start stamping the PDFs of ``files`` (the method PDFs) in a worker (:meth:`WorkerPool.beside`);
    returns the call that waits for them, {path: stamped PDF}."""
    jobs = _stamp_jobs(files, seal)
    results = pool.beside(stamp_job, [job for _, job in jobs], "stamping the PDFs with the fingerprint")
    return lambda: dict(zip((rel for rel, _ in jobs), results()))


def _stamp(files: dict[str, bytes], seal: Seal, pool: WorkerPool, done: dict[str, bytes]) -> dict[str, bytes]:
    """Every page with its placeholder replaced by the fingerprint line; every PDF not in ``done``
    (stamped already) with the line at the foot of each page and its method files attached,
    dated with the build time (:func:`stamp_job`, in the build's workers when they are running)."""
    placeholder, text = STAMP_PLACEHOLDER.encode(), seal.line.encode()
    out = {rel: data.replace(placeholder, text) if rel.endswith(".html") else data for rel, data in files.items() if not rel.endswith(".pdf")}
    jobs = _stamp_jobs({rel: data for rel, data in files.items() if rel not in done}, seal)
    out.update(done)
    out.update(zip((rel for rel, _ in jobs), pool.map(stamp_job, [job for _, job in jobs], "stamping the PDFs with the fingerprint")))
    return out


@dataclass(frozen=True)
class StampJob:
    """One PDF to stamp: its bytes, the line, the method files to attach, the build time."""

    pdf: bytes
    line: str
    attachments: dict[str, bytes]
    built: datetime


def stamp_job(job: StampJob) -> bytes:
    """The stamped PDF of ``job`` (:func:`~dossier.render.binder.stamp_every_page`); runs in a worker."""
    from ..render.binder import stamp_every_page

    return stamp_every_page(job.pdf, job.line, attachments=job.attachments, modified=job.built)
