"""``dossier verify``: does a published dossier still match what made it?

1. Every file the manifest lists exists and hashes to its recorded SHA-256;
   no other file is there.
2. Every ledger entry is re-computed from the inputs the ledger records (the
   whole analysis is re-run with the recorded settings and seed) and compared.
3. The fingerprint the manifest records is the SHA-256 of its sealed part,
   and every page and every PDF page shows it (with the tool's version and commit).
4. When method files are given, each hashes to what the manifest recorded.
5. Every signature beside the dossier is the signer's and signed this
   dossier's fingerprint and manifest (:mod:`dossier.audit.signatures`).

Each mismatch is reported by file and entry.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from .. import __version__
from ..analysis.ledger import ledger_entries
from ..analysis.method import analyse_method
from ..inputs.loader import find_method_files
from ..layout import LAYOUT
from ..publish.manifest import Manifest, ManifestError, sha256_file, stamp_text
from .diff import NotADossier, read_ledger
from .signatures import SignatureCheck, check_signatures, manifest_sha256

__all__ = ["Mismatch", "VerifyReport", "verify", "check_integrity", "REL_TOL", "ABS_TOL"]

REL_TOL = 1e-9
ABS_TOL = 1e-12


@dataclass(frozen=True)
class Mismatch:
    """One thing that does not match: where, and what."""

    file: str
    entry: str
    message: str

    def __str__(self) -> str:
        where = f"{self.file}: {self.entry}" if self.entry else self.file
        return f"{where}: {self.message}"


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

    @property
    def ok(self) -> bool:
        return not self.mismatches


def _close(a: float, b: float) -> bool:
    if math.isnan(a) and math.isnan(b):
        return True
    return math.isclose(a, b, rel_tol=REL_TOL, abs_tol=ABS_TOL)


def verify(output: str | Path, *, methods: list[str | Path] | None = None, progress: Callable[[str], None] | None = None) -> VerifyReport:
    """Check a built dossier against its manifest and ledgers.

    Parameters
    ----------
    output : str or Path
        The dossier folder.
    methods : list of paths, optional
        Method files (or folders) whose hashes must match the manifest.
    progress : callable, optional
        Called with a label before each method is re-computed.

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
    mm = _check_files(out, manifest)
    mm += _check_fingerprint(out, manifest)
    entries_checked = 0
    for m in manifest.methods:
        found, checked = _check_ledger(out, m.id, progress)
        mm += found
        entries_checked += checked
    if methods is not None:
        mm += _check_method_files(manifest, methods)
    signed = check_signatures(out, manifest.fingerprint(), manifest_sha256(out))
    mm += [Mismatch(s.file, "signature", s.problem) for s in signed if not s.applies]
    return VerifyReport(tuple(mm), tuple(notes), len(manifest.outputs), entries_checked, manifest.fingerprint(), signed)


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
    return manifest, _check_files(out, manifest) + _check_fingerprint(out, manifest)


def _check_fingerprint(out: Path, manifest: Manifest) -> list[Mismatch]:
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
            for n, text in enumerate(pdf_page_texts(p), start=1):
                if line not in text:
                    mm.append(Mismatch(o.path, f"page {n}", f"does not show this dossier's fingerprint line {line!r}"))
    return mm


def pdf_page_texts(path: Path) -> list[str]:
    """The text of each page of a PDF (pypdf's extraction; an unreadable PDF gives one empty page)."""
    from pypdf import PdfReader
    from pypdf.errors import PdfReadError

    try:
        return [page.extract_text() or "" for page in PdfReader(path).pages]
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


def _check_ledger(out: Path, method_id: str, progress: Callable[[str], None] | None) -> tuple[list[Mismatch], int]:
    """Re-compute one method from its ledger's recorded inputs and compare every entry."""
    rel = LAYOUT.ledger(method_id)
    try:
        ledger = read_ledger(out, method_id)
    except NotADossier as exc:
        return [Mismatch(rel, "", f"cannot read the ledger: {exc}")], 0
    if progress:
        progress(method_id)
    recorded = ledger.values()
    fresh = {e.id: e.value for e in ledger_entries(analyse_method(ledger.method, ledger.settings))}
    mm: list[Mismatch] = []
    for eid, value in recorded.items():
        if eid not in fresh:
            mm.append(Mismatch(rel, eid, "recorded, but the re-computation has no such number"))
        elif not _close(value, fresh[eid]):
            mm.append(Mismatch(rel, eid, f"recorded {value!r}, re-computed {fresh[eid]!r}"))
    for eid in fresh.keys() - recorded.keys():
        mm.append(Mismatch(rel, eid, "re-computed, but not recorded in the ledger"))
    return mm, len(recorded)


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
