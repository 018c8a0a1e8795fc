"""``dossier verify``: does a published dossier still match what made it?

1. Every file the manifest lists exists and hashes to its recorded SHA-256;
   no other file is there.
2. Every ledger entry is re-computed from the inputs the ledger records (the
   whole analysis is re-run with the recorded settings and seed) and compared.
3. Every number shown — in results.json, the CSV tables and the workbooks
   (each method's and dossier.xlsx, against the same files made afresh), on
   the pages (each number linked to its ledger entry, each row of a ledger
   page) and in the PDFs (each number of the body linked to its ledger entry,
   each row of the ledger appendix) — is the re-computed one at the precision shown.
4. The fingerprint the manifest records is the SHA-256 of its sealed part,
   and every page and every PDF page shows it (with the tool's version and commit).
5. Each published method file (``methods/ID/ID.yaml``) is the one the
   manifest records, and every PDF carries the method files attached to it.
6. When method files are given, each hashes to what the manifest recorded.
7. Every signature beside the dossier is the signer's and signed this
   dossier's fingerprint and manifest (:mod:`dossier.audit.signatures`).

Each mismatch is reported by file and place, with both values.
"""

from __future__ import annotations

import hashlib
import json
import multiprocessing
import os
import sys
from collections.abc import Callable
from concurrent.futures import Future, ProcessPoolExecutor, ThreadPoolExecutor
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from .. import __version__
from ..analysis.ledger import Ledger, LedgerError, ledger_entries
from ..analysis.method import MethodAnalysis, analyse_method
from ..inputs.loader import find_method_files
from ..layout import LAYOUT
from ..publish.manifest import Manifest, ManifestError, sha256_file, stamp_text
from .cache import Cache, tool_fingerprint, verify_cache_root
from .diff import NotADossier
from .numbers import (ABS_TOL, REL_TOL, Mismatch, PdfPage, PdfTextUnavailable, close, compare_csv, compare_json, compare_workbook, ledger_lines,
                      page_numbers, pdf_linked_numbers, read_pdf_pages, shown_matches)
from .signatures import EARLIER, SignatureCheck, check_signatures, earlier_signatures, manifest_sha256, signatures_folder

__all__ = ["Mismatch", "VerifyReport", "verify", "check_integrity", "recomputation_key", "REL_TOL", "ABS_TOL", "VERIFY_CACHE_BYTES"]

VERIFY_CACHE_BYTES = 200 * 1024 * 1024
"""The verify cache keeps the most recently used re-computations up to this size (a
dossier of 13 methods takes about 4 MB)."""

@dataclass(frozen=True)
class VerifyReport:
    """The outcome: mismatches (empty when all matches), notes, what was checked, and
    the fingerprint re-computed from the manifest (empty when it could not be read)."""

    mismatches: tuple[Mismatch, ...]
    notes: tuple[str, ...]
    files_checked: int
    entries_checked: int
    fingerprint: str = ""
    signatures: tuple[SignatureCheck, ...] = ()
    reused: tuple[str, ...] = ()
    """Ids of the methods whose re-computation was taken from the verify cache."""

    @property
    def ok(self) -> bool:
        return not self.mismatches


DataFiles = Callable[[MethodAnalysis, str], dict[str, bytes]]
"""Makes a method's data files (results.json, CSV tables; {dossier path: bytes}) afresh
from a re-computed analysis and the substance table's SHA-256 (the application layer
passes the renderer's own function; audit does not import render)."""

DossierDataFiles = Callable[[dict[str, dict[str, bytes]]], dict[str, bytes]]
"""Makes the dossier-wide data files (dossier.xlsx; {dossier path: bytes}) afresh from
every method's data files made afresh ({method id: {dossier path: bytes}}, in the
manifest's order of methods), as the build makes them."""


def verify(output: str | Path, *, methods: list[str | Path] | None = None, progress: Callable[[str], None] | None = None,
           data_files: DataFiles | None = None, dossier_data_files: DossierDataFiles | None = None, cache: bool = True) -> VerifyReport:
    """Check a built dossier against its manifest and ledgers, and every number it shows.

    Parameters
    ----------
    output : str or Path
        The dossier folder.
    methods : list of paths, optional
        Method files (or folders) whose hashes must match the manifest.
    progress : callable, optional
        Called with a method's id as its re-computation is taken up (the
        methods are re-computed in worker processes, one per core, on Linux).
    data_files : callable, optional
        Makes a method's data files afresh (:data:`DataFiles`); with it, every
        value of results.json, of the CSV tables and of the method's workbook is
        compared with the re-computation.
    dossier_data_files : callable, optional
        Makes the dossier-wide data files afresh (:data:`DossierDataFiles`); with
        it (and ``data_files``), every cell of dossier.xlsx is compared too.
    cache : bool
        Take a method's re-computation (and its data files made afresh) from the verify
        cache in the user's cache folder (:func:`~dossier.audit.cache.verify_cache_root`)
        when an earlier verify on this machine, with the same code, re-computed it from the
        same recorded inputs, and keep each new re-computation there. The recorded values
        and every file are still compared with it; only the re-computation is reused.
        ``False`` re-computes every method and neither reads nor writes the cache.

    Raises
    ------
    NotADossier
        When the folder holds no manifest at all (it is not a dossier).
    """
    out = Path(output)
    if not out.is_dir():
        raise NotADossier(f"not a dossier: no folder {out}")
    if not (out / LAYOUT.manifest).exists():
        raise NotADossier(f"not a dossier: no {LAYOUT.manifest} in {out}")
    try:
        manifest = Manifest.read(out)
    except ManifestError as exc:
        return VerifyReport((Mismatch(LAYOUT.manifest, "", f"cannot read the manifest: {exc}"),), (), 0, 0)
    notes: list[str] = []
    if manifest.tool_version != __version__:
        notes.append(f"built with ph-dossier {manifest.tool_version}, verified with {__version__}: re-computed numbers may differ for that reason")
    texts = _PdfTexts(out)
    try:
        return _verify(out, manifest, texts, notes, methods, progress, data_files, dossier_data_files, verify_cache_root() if cache else None)
    finally:
        texts.close()


def _verify(out: Path, manifest: Manifest, texts: _PdfTexts, notes: list[str], methods: list[str | Path] | None,
            progress: Callable[[str], None] | None, data_files: DataFiles | None, dossier_data_files: DossierDataFiles | None,
            reuse: Path | None) -> VerifyReport:
    """:func:`verify` of a dossier whose manifest is read: the PDFs are read in the background
    (:meth:`_PdfTexts.start`) while the methods are re-computed."""
    ids = [m.id for m in manifest.methods]
    pool = _forked_pool(len(ids))  # forked before the reading threads start
    try:
        pending = [pool.submit(_recompute, out, mid, data_files, reuse) for mid in ids] if pool else []
        pdfs = [o.path for o in manifest.outputs if o.path.endswith(".pdf") and (out / o.path).is_file()]
        texts.start(sorted(pdfs, key=lambda rel: (out / rel).stat().st_size, reverse=True))  # the longest read (dossier.pdf) first
        mm = _check_files(out, manifest)
        seal = len(mm)  # the fingerprint's findings go here, once the PDFs are read
        entries_checked = 0
        fresh: dict[str, Fresh] = {}
        made: dict[str, dict[str, bytes]] = {}
        reused: list[str] = []
        for i, mid in enumerate(ids):
            if progress:
                progress(mid)
            try:
                found, checked, recomputed, files, kept = pending[i].result() if pool else _recompute(out, mid, data_files, reuse)
            except BrokenProcessPool:  # a worker died (killed, out of memory): this process does it instead
                found, checked, recomputed, files, kept = _recompute(out, mid, data_files, reuse)
            if kept:
                reused.append(mid)
            mm += found
            entries_checked += checked
            if recomputed is not None:
                fresh[mid] = recomputed
                if files is not None:
                    made[mid] = files
    finally:
        if pool is not None:
            pool.shutdown(wait=True, cancel_futures=True)
    if dossier_data_files is not None and data_files is not None and len(made) == len(manifest.methods):
        mm += _compare_files(out, dossier_data_files(made))
    mm[seal:seal] = _check_fingerprint(out, manifest, texts)
    mm += _check_shown_numbers(out, manifest, fresh, texts, notes)
    mm += _check_sources(out, manifest, texts)
    if methods is not None:
        mm += _check_method_files(manifest, methods)
    signed = check_signatures(out, manifest.fingerprint(), manifest_sha256(out))
    if earlier := earlier_signatures(out):
        notes.append(f"{len(earlier)} signature(s) of earlier builds kept in {signatures_folder(out).name}/{EARLIER}/ (moved aside by a rebuild; "
                     "they do not apply to this build)")
    mm += [Mismatch(s.file, "signature", s.problem) for s in signed if not s.applies]
    if reuse is not None:
        Cache(reuse).trim(VERIFY_CACHE_BYTES)
    return VerifyReport(tuple(mm), tuple(notes), len(manifest.outputs), entries_checked, manifest.fingerprint(), signed, tuple(reused))


def check_integrity(output: str | Path) -> tuple[Manifest, list[Mismatch]]:
    """The quick part of :func:`verify`: every file's hash and the fingerprint (no re-computation).

    Raises
    ------
    NotADossier
        When the folder is no dossier or its manifest cannot be read.
    """
    out = Path(output)
    if not (out / LAYOUT.manifest).is_file():
        raise NotADossier(f"not a dossier: no {LAYOUT.manifest} in {out}")
    try:
        manifest = Manifest.read(out)
    except ManifestError as exc:
        raise NotADossier(f"{out}: cannot read the manifest: {exc}") from None
    return manifest, _check_files(out, manifest) + _check_fingerprint(out, manifest, _PdfTexts(out))


def _check_fingerprint(out: Path, manifest: Manifest, texts: _PdfTexts | None = None) -> list[Mismatch]:
    """The recorded fingerprint is the re-computed one, and every page and PDF page shows it."""
    fingerprint = manifest.fingerprint()
    if manifest.recorded_fingerprint != fingerprint:
        return [Mismatch(LAYOUT.manifest, "fingerprint", f"recorded {manifest.recorded_fingerprint!r}, but the manifest's sealed part hashes to {fingerprint!r}")]
    line = stamp_text(fingerprint, manifest.tool_version, manifest.git_commit, manifest.git_dirty)
    mm: list[Mismatch] = []
    for o in manifest.outputs:
        p = out / o.path
        if not p.is_file():
            continue  # reported as missing
        if o.path.endswith(".html"):
            if line not in p.read_text(encoding="utf-8", errors="replace"):
                mm.append(Mismatch(o.path, "footer", f"does not show this dossier's fingerprint line {line!r}"))
        elif o.path.endswith(".pdf"):
            for n, text in enumerate((texts or _PdfTexts(out)).texts(o.path), start=1):
                if line not in text:
                    mm.append(Mismatch(o.path, f"page {n}", f"does not show this dossier's fingerprint line {line!r}"))
    return mm


def pdf_page_texts(path: Path, reader: Any = None) -> list[str]:
    """The text of each page of a PDF (pypdf's extraction, with ``reader`` when one is open;
    an unreadable PDF gives one empty page)."""
    from pypdf import PdfReader
    from pypdf.errors import PdfReadError

    try:
        return [page.extract_text() or "" for page in (reader or PdfReader(path)).pages]
    except (PdfReadError, ValueError, KeyError, TypeError, OSError):
        return [""]


def _check_files(out: Path, manifest: Manifest) -> list[Mismatch]:
    """Every listed file is there with its hash; no other file is there."""
    mm: list[Mismatch] = []
    listed = {o.path: o for o in manifest.outputs}
    for rel, o in listed.items():
        p = out / rel
        if not p.is_file():
            mm.append(Mismatch(rel, "", "missing (listed in the manifest)"))
        elif (digest := sha256_file(p)) != o.sha256:
            mm.append(Mismatch(rel, "", f"changed: SHA-256 {digest[:16]}… is not the recorded {o.sha256[:16]}…"))
    for p in sorted(out.rglob("*")):
        rel = p.relative_to(out).as_posix()
        if p.is_file() and rel != LAYOUT.manifest and rel not in listed:
            mm.append(Mismatch(rel, "", "extra file, not in the manifest"))
    return mm


@dataclass(frozen=True)
class Fresh:
    """One method re-computed: every ledger entry's value and unit."""

    method_id: str
    values: dict[str, float]
    units: dict[str, str]


@dataclass(frozen=True)
class Recomputation:
    """What :func:`_recompute` keeps in the verify cache for one method: the re-computation,
    and the method's data files made afresh from it (None when verify makes none)."""

    fresh: Fresh
    made: dict[str, bytes] | None


REUSE = "recomputed"
"""Kind of the verify cache's entries (:class:`~dossier.audit.cache.Cache`)."""


def _forked_pool(methods: int) -> ProcessPoolExecutor | None:
    """Worker processes to re-compute the methods in, one per core, forked from this
    process (which has the analysis code imported: a worker starts at once); ``None``
    for a single method or core, or where forking is not the platform's way (the
    methods are then re-computed here, one after the other)."""
    workers = min(os.cpu_count() or 1, methods)
    if workers < 2 or sys.platform != "linux":
        return None
    return ProcessPoolExecutor(max_workers=workers, mp_context=multiprocessing.get_context("fork"))


def recomputation_key(ledger: dict[str, Any], table_sha256: str | None) -> str:
    """Key of a method's re-computation in the verify cache: SHA-256 over the tool's code
    (:func:`~dossier.audit.cache.tool_fingerprint`), the inputs the ledger records (its
    ``method`` and ``settings``, on which the re-computation alone depends) and, when the data
    files are made afresh, the substance table's SHA-256 that results.json records."""
    blob = json.dumps({"tool": tool_fingerprint(), "method": ledger.get("method"), "settings": ledger.get("settings"), "table": table_sha256},
                      sort_keys=True, default=str)
    return hashlib.sha256(blob.encode()).hexdigest()


def _recompute(out: Path, method_id: str, data_files: DataFiles | None, reuse: Path | None) -> tuple[list[Mismatch], int, Fresh | None, dict[str, bytes] | None, bool]:
    """One method re-computed from its ledger's recorded inputs, every entry compared, and
    (with ``data_files``) its results.json, CSV tables and workbook compared value by value
    with the same files made afresh: mismatches, entries checked, the re-computation, the
    data files made afresh, and whether the re-computation was taken from the verify cache
    in ``reuse`` (made by an earlier verify on this machine, with the same code, from the
    same recorded inputs). Runs in a worker process."""
    rel = LAYOUT.ledger(method_id)
    try:
        document = json.loads((out / rel).read_text(encoding="utf-8"))
        ledger = Ledger.from_document(document)
    except (OSError, ValueError, LedgerError) as exc:
        return [Mismatch(rel, "", f"cannot read the ledger: {exc}")], 0, None, None, False
    mm: list[Mismatch] = []
    table: str | None = None
    if data_files is not None:
        try:
            table = str(json.loads((out / LAYOUT.results(method_id)).read_text(encoding="utf-8")).get("substance_table_sha256", ""))
        except (OSError, ValueError, AttributeError) as exc:
            mm.append(Mismatch(LAYOUT.results(method_id), "", f"cannot read: {exc}"))
    store = Cache(reuse) if reuse is not None else None
    key = recomputation_key(document, table)
    kept = store.get(REUSE, key, Recomputation) if store is not None else None
    reused = kept is not None
    if kept is None:
        analysis = analyse_method(ledger.method, ledger.settings)
        entries = ledger_entries(analysis)
        fresh = Fresh(method_id, {e.id: e.value for e in entries}, {e.id: e.unit for e in entries})
        kept = Recomputation(fresh, data_files(analysis, table) if data_files is not None and table is not None else None)
        if store is not None:
            store.put(REUSE, key, kept)
    recorded = ledger.values()
    fresh = kept.fresh
    for eid, value in recorded.items():
        if eid not in fresh.values:
            mm.append(Mismatch(rel, eid, "recorded, but the re-computation has no such number"))
        elif not close(value, fresh.values[eid]):
            mm.append(Mismatch(rel, eid, f"recorded {value!r}, re-computed {fresh.values[eid]!r}"))
    for eid in fresh.values.keys() - recorded.keys():
        mm.append(Mismatch(rel, eid, "re-computed, but not recorded in the ledger"))
    if kept.made is not None:
        mm += _compare_files(out, kept.made)
    return mm, len(recorded), fresh, kept.made, reused


def _compare_files(out: Path, made: dict[str, bytes]) -> list[Mismatch]:
    """Each published data file (JSON, CSV, workbook) value by value against the same file made afresh
    (a file byte for byte the one made afresh, as a build made with the same code writes it, has
    every value the same and is not read value by value)."""
    mm: list[Mismatch] = []
    for rel, data in sorted(made.items()):
        p = out / rel
        if not p.is_file():
            continue  # reported as missing
        published = p.read_bytes()
        if published == data:
            continue
        if rel.endswith(".json"):
            try:
                shown = json.loads(published.decode("utf-8"))
            except ValueError as exc:
                mm.append(Mismatch(rel, "", f"not JSON any more: {exc}"))
                continue
            mm += compare_json(rel, shown, json.loads(data))
        elif rel.endswith(".csv"):
            mm += compare_csv(rel, published.decode("utf-8", errors="replace"), data.decode("utf-8"))
        elif rel.endswith(".xlsx"):
            mm += compare_workbook(rel, published, data)
    return mm


def _check_shown_numbers(out: Path, manifest: Manifest, fresh: dict[str, Fresh], texts: _PdfTexts, notes: list[str]) -> list[Mismatch]:
    """Every number a page or a PDF's body links to its ledger entry, every value of a ledger
    page, and every value of the PDFs' ledger appendices, at the precision shown, against the
    re-computation."""
    by_ledger_page = {LAYOUT.ledger_page(mid): f for mid, f in fresh.items()}
    mm: list[Mismatch] = []
    for o in manifest.outputs:
        p = out / o.path
        if not p.is_file():
            continue
        if o.path.endswith(".html"):
            for ledger_page, eid, shown in page_numbers(o.path, p.read_text(encoding="utf-8", errors="replace")):
                f = by_ledger_page.get(ledger_page)
                if f is None:
                    continue  # a method not re-computed (its ledger is reported)
                place = f"number linked to {eid}" if ledger_page != o.path else f"ledger row {eid}"
                mm += _shown(o.path, place, shown, eid, f)
        elif o.path.endswith(".pdf"):
            mm += _check_pdf_numbers(o.path, texts, fresh)
            try:
                mm += _check_pdf_links(o.path, p, fresh, texts)
            except ValueError as exc:
                mm.append(Mismatch(o.path, "", f"the numbers of its body cannot be read: {exc}"))
            except PdfTextUnavailable as exc:
                if not any(n.startswith("the numbers in the body of the PDFs") for n in notes):
                    notes.append(f"the numbers in the body of the PDFs were not read: {exc} (their ledger appendices were)")
    return mm


def _shown(rel: str, place: str, shown: str, eid: str, f: Fresh) -> list[Mismatch]:
    """A number shown for ledger entry ``eid``, at the precision shown, against the re-computation."""
    if eid not in f.values:
        return [Mismatch(rel, place, f"shows {shown!r} for an entry the re-computation does not have")]
    if shown_matches(shown, f.values[eid]) is False:
        return [Mismatch(rel, place, f"shows {shown}, re-computed {f.values[eid]!r}")]
    return []


def _check_pdf_numbers(rel: str, texts: _PdfTexts, fresh: dict[str, Fresh]) -> list[Mismatch]:
    """The ledger appendix of a method PDF, or of each method report bound into the dossier PDF:
    every entry has its row (the named destination ``METHOD-L-ID``), and each row's value, read
    from the pages those destinations point to, is the re-computed one at the precision shown."""
    own = LAYOUT.method_of(rel)
    mm: list[Mismatch] = []
    pages = texts.ledger_pages(rel)
    if pages is not None:
        anchors = pages[1]
        for mid, f in fresh.items():
            if own is not None and mid != own:
                continue
            missing = [eid for eid in f.values if f"{mid}-L-{eid}" not in anchors]
            mm += [Mismatch(rel, f"ledger row {eid}", "missing: the PDF has no ledger row for this entry") for eid in missing]
    for n, text in (pages[0] if pages is not None else dict(enumerate(texts.texts(rel), start=1))).items():
        mid = own if own is not None else next((m for m in fresh if f"{m} · revision" in text), None)
        f = fresh.get(mid) if mid is not None else None
        if f is None:
            continue
        for eid, shown in ledger_lines(text, f.units):
            mm += _shown(rel, f"page {n}, ledger row {eid}", shown, eid, f)
    return mm


def _check_pdf_links(rel: str, path: Path, fresh: dict[str, Fresh], texts: _PdfTexts) -> list[Mismatch]:
    """Every number of a PDF's body that links to its ledger entry (named destination
    ``METHOD-L-ID``), at the precision shown."""
    own = LAYOUT.method_of(rel)
    mm: list[Mismatch] = []
    for n, dest, shown in pdf_linked_numbers(path, lambda dest: "-L-" in dest, texts.reader(rel), texts.pages(rel)):
        mid = own if own is not None and dest.startswith(f"{own}-L-") else next((m for m in fresh if dest.startswith(f"{m}-L-")), None)
        f = fresh.get(mid) if mid is not None else None
        if f is None:
            continue  # no ledger link, or a method not re-computed (its ledger is reported)
        eid = dest[len(f"{mid}-L-"):]
        mm += _shown(rel, f"page {n}, number linked to {eid}", shown, eid, f)
    return mm


def _check_sources(out: Path, manifest: Manifest, texts: _PdfTexts | None = None) -> list[Mismatch]:
    """Each published method file is the one the manifest records for its method, and every
    PDF's attachments are the published method files (a method PDF its own, dossier.pdf all)."""
    mm: list[Mismatch] = []
    listed = {o.path for o in manifest.outputs}
    for m in manifest.methods:
        rel = LAYOUT.method_source(m.id)
        if rel not in listed:
            continue  # a dossier built before method files were published
        p = out / rel
        if p.is_file() and (digest := sha256_file(p)) != m.source_sha256:
            mm.append(Mismatch(rel, "", f"SHA-256 {digest[:16]}… is not the method file the manifest records for {m.id} ({m.source_sha256[:16]}…)"))
    for o in manifest.outputs:
        if not o.path.endswith(".pdf") or not (out / o.path).is_file():
            continue
        mid = LAYOUT.method_of(o.path)
        expected = {LAYOUT.method_source(m.id).rsplit("/", 1)[-1]: m.source_sha256 for m in manifest.methods
                    if (mid is None or m.id == mid) and LAYOUT.method_source(m.id) in listed}
        found = pdf_attachments(out / o.path, texts.reader(o.path) if texts is not None else None)
        for name, digest in sorted(expected.items()):
            if name not in found:
                mm.append(Mismatch(o.path, f"attachment {name}", "missing (the method file is not attached)"))
            elif found[name] != digest:
                mm.append(Mismatch(o.path, f"attachment {name}", f"SHA-256 {found[name][:16]}… is not the method file the manifest records ({digest[:16]}…)"))
        for name in sorted(found.keys() - expected.keys()):
            mm.append(Mismatch(o.path, f"attachment {name}", "not a method file of this dossier"))
    return mm


def pdf_attachments(path: Path, reader: Any = None) -> dict[str, str]:
    """{file name: SHA-256} of the files embedded in a PDF (``reader``: a ``PdfReader`` of it
    already open, else one is opened; empty when it cannot be read)."""
    import hashlib

    from pypdf import PdfReader
    from pypdf.errors import PdfReadError

    try:
        return {name: hashlib.sha256(data[0] if isinstance(data, list) else data).hexdigest() for name, data in (reader or PdfReader(path)).attachments.items()}
    except (PdfReadError, ValueError, KeyError, TypeError, OSError):
        return {}


_READERS = 2
"""PDFs read at once in the background (the project's machines have two cores)."""


class _PdfTexts:
    """Each PDF of a dossier, read once per verification.

    ``pages``: every page's text and words with their positions, by one ``pdftotext
    -bbox-layout`` run per PDF (:func:`~dossier.audit.numbers.read_pdf_pages`); they serve
    the fingerprint line of every page, the rows of the ledger appendix
    (:func:`~dossier.audit.numbers.ledger_lines`) and the words inside the body's links.
    ``reader``: pypdf's reader of the PDF, opened once, for what pdftotext does not read —
    the named destinations of the ledger rows, the link annotations and the attachments.
    Without pdftotext, ``texts`` falls back to pypdf's text extraction (slow) and the body's
    links are not read (``pages`` raises :class:`~dossier.audit.numbers.PdfTextUnavailable`).
    """

    def __init__(self, out: Path) -> None:
        self.out = out
        self.read: dict[str, list[PdfPage] | Exception] = {}
        self.fallback: dict[str, list[str]] = {}
        self.readers: dict[str, Any] = {}
        self.pool: ThreadPoolExecutor | None = None
        self.started: dict[str, Future[list[PdfPage]]] = {}

    def start(self, rels: list[str]) -> None:
        """Start reading these PDFs with pdftotext in two background threads (each read is a
        pdftotext process, so the reads run beside the caller's re-computation on a second core)."""
        self.pool = ThreadPoolExecutor(max_workers=_READERS, thread_name_prefix="pdftotext")
        self.started = {rel: self.pool.submit(read_pdf_pages, self.out / rel) for rel in rels}

    def close(self) -> None:
        """Stop the background reads not yet started (a verification that ends early)."""
        if self.pool is not None:
            self.pool.shutdown(wait=True, cancel_futures=True)
            self.pool = None

    def reader(self, rel: str) -> Any:
        """pypdf's reader of a PDF (None when it cannot be opened)."""
        if rel not in self.readers:
            from pypdf import PdfReader
            from pypdf.errors import PdfReadError

            try:
                self.readers[rel] = PdfReader(self.out / rel)
            except (PdfReadError, ValueError, KeyError, TypeError, OSError):
                self.readers[rel] = None
        return self.readers[rel]

    def pages(self, rel: str) -> list[PdfPage]:
        """pdftotext's reading of every page of a PDF.

        Raises
        ------
        PdfTextUnavailable
            When pdftotext is not installed.
        ValueError
            When pdftotext cannot read the PDF.
        """
        if rel not in self.read:
            try:
                self.read[rel] = self.started[rel].result() if rel in self.started else read_pdf_pages(self.out / rel)
            except (PdfTextUnavailable, ValueError) as exc:
                self.read[rel] = exc
        found = self.read[rel]
        if isinstance(found, Exception):
            raise found
        return found

    def texts(self, rel: str) -> list[str]:
        """The text of every page (pdftotext's; pypdf's extraction when pdftotext cannot read it)."""
        try:
            return [p.text for p in self.pages(rel)] or [""]
        except (PdfTextUnavailable, ValueError):
            if rel not in self.fallback:
                self.fallback[rel] = pdf_page_texts(self.out / rel, self.reader(rel))
            return self.fallback[rel]

    def ledger_pages(self, rel: str) -> tuple[dict[int, str], set[str]] | None:
        """({page number: text} of the pages the named destinations ``…-L-…`` point to,
        every such destination), or None when the destinations cannot be read."""
        from pypdf.errors import PdfReadError

        r = self.reader(rel)
        if r is None:
            return None
        try:
            names = {name: r.get_destination_page_number(d) + 1 for name, d in r.named_destinations.items() if "-L-" in name}
        except (PdfReadError, ValueError, KeyError, TypeError, IndexError, OSError):
            return None
        texts = self.texts(rel)
        return {n: texts[n - 1] if 0 < n <= len(texts) else "" for n in sorted(set(names.values()))}, set(names)


def _check_method_files(manifest: Manifest, methods: list[str | Path]) -> list[Mismatch]:
    """Each given method file hashes to what the manifest recorded for its method."""
    files, problems = find_method_files(list(methods))
    mm = [Mismatch(p.file, "", p.message) for p in problems]
    by_hash = {m.source_sha256: m for m in manifest.methods}
    by_name = {Path(m.source).name: m for m in manifest.methods}
    seen = set()
    for f in files:
        digest = sha256_file(f)
        if digest in by_hash:
            seen.add(by_hash[digest].id)
            continue
        match = by_name.get(f.name)
        if match is not None:
            seen.add(match.id)
            mm.append(Mismatch(str(f), "", f"changed since the build: SHA-256 {digest[:16]}… is not the recorded {match.source_sha256[:16]}… (method {match.id})"))
        else:
            mm.append(Mismatch(str(f), "", "not part of this dossier"))
    for m in manifest.methods:
        if m.id not in seen:
            mm.append(Mismatch(m.source, "", f"method {m.id} of the dossier: no such method file given"))
    return mm
