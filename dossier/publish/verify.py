"""``dossier verify``: does a published dossier still match what made it?

1. Every file the manifest lists exists and hashes to its recorded SHA-256;
   no other file is there.
2. Every ledger entry is re-computed from the inputs the ledger records (the
   whole analysis is re-run with the recorded settings and seed) and compared.
3. When method files are given, each hashes to what the manifest recorded.

Each mismatch is reported by file and entry.
"""

from __future__ import annotations

import json
import math
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from .. import __version__
from .manifest import MANIFEST_FORMAT, MANIFEST_NAME, sha256_file

__all__ = ["Mismatch", "VerifyReport", "NotADossierError", "verify", "REL_TOL", "ABS_TOL"]

REL_TOL = 1e-9
ABS_TOL = 1e-12


class NotADossierError(ValueError):
    """The folder is not a built dossier at all (no manifest): nothing to verify."""


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
    """The outcome: mismatches (empty when all matches), notes, and what was checked."""

    mismatches: tuple[Mismatch, ...]
    notes: tuple[str, ...]
    files_checked: int
    entries_checked: int

    @property
    def ok(self) -> bool:
        return not self.mismatches


def _close(a: float, b: float) -> bool:
    if isinstance(a, float) and isinstance(b, float) and math.isnan(a) and math.isnan(b):
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
    NotADossierError
        ``output`` is not a folder, or holds no manifest.json: it was never a
        dossier, so there is nothing to compare (a manifest that cannot be read
        is a mismatch instead: the dossier was damaged).
    """
    from ..analysis.ledger import ledger_entries, settings_from_dict
    from ..analysis.method import analyse_method
    from ..inputs.serialize import method_from_dict

    out = Path(output)
    mm: list[Mismatch] = []
    notes: list[str] = []
    manifest_path = out / MANIFEST_NAME
    if not out.is_dir():
        raise NotADossierError(f"not a dossier: no folder {out}")
    if not manifest_path.exists():
        raise NotADossierError(f"not a dossier: no {MANIFEST_NAME} in {out}")
    try:
        manifest = json.loads(manifest_path.read_text(encoding="utf-8"))
    except (OSError, ValueError) as exc:
        return VerifyReport((Mismatch(MANIFEST_NAME, "", f"cannot read the manifest: {exc}"),), (), 0, 0)
    if manifest.get("format") != MANIFEST_FORMAT:
        return VerifyReport((Mismatch(MANIFEST_NAME, "format", f"expected {MANIFEST_FORMAT!r}; got {manifest.get('format')!r}"),), (), 0, 0)
    if manifest["tool"]["version"] != __version__:
        notes.append(f"built with ph-dossier {manifest['tool']['version']}, verified with {__version__}: re-computed numbers may differ for that reason")

    listed = {o["path"]: o for o in manifest["outputs"]}
    for rel, o in listed.items():
        p = out / rel
        if not p.is_file():
            mm.append(Mismatch(rel, "", "missing (listed in the manifest)"))
        elif sha256_file(p) != o["sha256"]:
            mm.append(Mismatch(rel, "", f"changed: SHA-256 {sha256_file(p)[:16]}… is not the recorded {o['sha256'][:16]}…"))
    for p in sorted(out.rglob("*")):
        rel = p.relative_to(out).as_posix()
        if p.is_file() and rel != MANIFEST_NAME and rel not in listed:
            mm.append(Mismatch(rel, "", "extra file, not in the manifest"))

    entries_checked = 0
    for m in manifest["methods"]:
        rel = f"methods/{m['id']}/ledger.json"
        try:
            ledger = json.loads((out / rel).read_text(encoding="utf-8"))
            method = method_from_dict(ledger["method"])
            settings = settings_from_dict(ledger["settings"])
        except (OSError, ValueError, KeyError, TypeError) as exc:
            mm.append(Mismatch(rel, "", f"cannot read the ledger: {exc}"))
            continue
        if progress:
            progress(m["id"])
        recorded = {e["id"]: e for e in ledger["entries"]}
        fresh = {e.id: e for e in ledger_entries(analyse_method(method, settings))}
        for eid, e in recorded.items():
            entries_checked += 1
            if eid not in fresh:
                mm.append(Mismatch(rel, eid, "recorded, but the re-computation has no such number"))
            elif not _close(float(e["value"]), float(fresh[eid].value)):
                mm.append(Mismatch(rel, eid, f"recorded {e['value']!r}, re-computed {fresh[eid].value!r}"))
        for eid in fresh.keys() - recorded.keys():
            mm.append(Mismatch(rel, eid, "re-computed, but not recorded in the ledger"))

    if methods is not None:
        from ..inputs.loader import find_method_files

        files, problems = find_method_files(list(methods))
        for p in problems:
            mm.append(Mismatch(p.file, "", p.message))
        by_hash = {m["source_sha256"]: m for m in manifest["methods"]}
        by_name = {Path(m["source"]).name: m for m in manifest["methods"]}
        seen = set()
        for f in files:
            digest = sha256_file(f)
            if digest in by_hash:
                seen.add(by_hash[digest]["id"])
                continue
            match = by_name.get(f.name)
            if match is not None:
                seen.add(match["id"])
                mm.append(Mismatch(str(f), "", f"changed since the build: SHA-256 {digest[:16]}… is not the recorded {match['source_sha256'][:16]}… (method {match['id']})"))
            else:
                mm.append(Mismatch(str(f), "", "not part of this dossier"))
        for m in manifest["methods"]:
            if m["id"] not in seen:
                mm.append(Mismatch(m["source"], "", f"method {m['id']} of the dossier: no such method file given"))
    return VerifyReport(tuple(mm), tuple(notes), len(listed), entries_checked)
