"""The build manifest (``manifest.json``, format ``ph-dossier-manifest/1``).

Tool version and git commit, Python and every dependency's version, every
input and output file with its SHA-256, the solver and analysis settings,
the seeds, and the build time (``SOURCE_DATE_EPOCH`` respected). No absolute
path of the machine is written: inputs are named relative to the folder the
build ran in (or by their file name when outside it).
"""

from __future__ import annotations

import hashlib
import json
import os
import re
import subprocess
from dataclasses import dataclass, field
from functools import lru_cache
from importlib import metadata
from pathlib import Path
from typing import Any

from .. import __version__

__all__ = ["MANIFEST_FORMAT", "MANIFEST_NAME", "STAMPED_SUFFIXES", "Manifest", "is_stamped", "stamp_text", "ManifestError", "InputRecord", "MethodRecord", "OutputRecord", "new_manifest", "dependency_versions", "git_commit", "portable_path", "sha256_file"]

MANIFEST_FORMAT = "ph-dossier-manifest/1"
MANIFEST_NAME = "manifest.json"


STAMPED_SUFFIXES = (".html", ".pdf")
"""Files that show the fingerprint (pages and PDFs): listed in ``outputs`` but not sealed by it."""


def is_stamped(path: str) -> bool:
    """True for an output that shows the fingerprint (a page or a PDF), so cannot be sealed by it."""
    return path.endswith(STAMPED_SUFFIXES)


def stamp_text(fingerprint: str, version: str, commit: str | None, dirty: bool | None) -> str:
    """The line every page and PDF page shows: fingerprint, tool version and commit (ASCII only).

    >>> stamp_text("ab" * 32, "1.0", "0123456789abcdef0123", False)
    'Dossier fingerprint abababababababababababababababababababababababababababababababab - ph-dossier 1.0, commit 0123456789ab'
    """
    tool = f"ph-dossier {version}, " + (f"commit {commit[:12]}" + (" with local changes" if dirty else "") if commit else "no git commit")
    return f"Dossier fingerprint {fingerprint} - {tool}"


def sha256_file(path: Path) -> str:
    """SHA-256 of a file's bytes."""
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 20), b""):
            h.update(chunk)
    return h.hexdigest()


def portable_path(path: str | Path) -> str:
    """A path as the manifest records it: relative to the working folder, or the file name."""
    p = Path(path)
    try:
        rel = os.path.relpath(p.resolve(), Path.cwd().resolve())
    except ValueError:
        return p.name
    if rel.startswith(".."):
        return p.name
    return rel.replace(os.sep, "/")


@lru_cache(maxsize=1)
def dependency_versions() -> tuple[tuple[str, str], ...]:
    """Every installed distribution ph-dossier needs at run time, transitively, with its version."""
    seen: dict[str, str] = {}
    todo = ["ph-dossier"]
    while todo:
        name = todo.pop()
        key = re.sub(r"[-_.]+", "-", name).lower()
        if key in seen:
            continue
        try:
            dist = metadata.distribution(name)
        except metadata.PackageNotFoundError:
            continue
        seen[key] = dist.version
        for req in dist.requires or []:
            if "extra ==" in req:
                continue
            m = re.match(r"\s*([A-Za-z0-9][A-Za-z0-9._-]*)", req)
            if m:
                todo.append(m.group(1))
    seen.pop("ph-dossier", None)
    return tuple(sorted(seen.items()))


@lru_cache(maxsize=1)
def git_commit() -> tuple[str | None, bool | None]:
    """(commit, dirty) of the checkout the tool runs from, or (None, None) when it is not one."""
    root = Path(__file__).resolve().parents[2]
    if not (root / ".git").exists():
        return None, None
    try:
        commit = subprocess.run(["git", "-C", str(root), "rev-parse", "HEAD"], capture_output=True, text=True, timeout=10, check=True).stdout.strip()
        status = subprocess.run(["git", "-C", str(root), "status", "--porcelain", "--untracked-files=no"], capture_output=True, text=True, timeout=10, check=True).stdout
    except (OSError, subprocess.SubprocessError):
        return None, None
    return commit or None, bool(status.strip())


class ManifestError(ValueError):
    """A manifest that cannot be read (the message says what is wrong)."""


@dataclass(frozen=True)
class InputRecord:
    """An input file of the build: its path, SHA-256, size and role."""

    path: str
    sha256: str
    bytes: int | None
    role: str


@dataclass(frozen=True)
class MethodRecord:
    """A method of the dossier: id, revision, source file and its SHA-256, cache key."""

    id: str
    revision: str
    source: str
    source_sha256: str
    cache_key: str


@dataclass(frozen=True)
class OutputRecord:
    """A file the build wrote: path, SHA-256, size."""

    path: str
    sha256: str
    bytes: int


@dataclass(frozen=True)
class Manifest:
    """The manifest of one build (``manifest.json``, format ``ph-dossier-manifest/1``).

    Attributes
    ----------
    tool_version : str
    git_commit : str or None
    git_dirty : bool or None
    python : str
    dependencies : tuple of (name, version)
    build_time : str
    source_date_epoch : int or None
    settings : dict
        Solver and analysis settings (JSON data).
    inputs, methods, outputs : tuples of records
        Outputs are every file written except the manifest, sorted by path.
    recorded_fingerprint : str or None
        The ``fingerprint`` a manifest file states (``verify`` compares it
        with :meth:`fingerprint`); None for a manifest being made.
    """

    tool_version: str
    git_commit: str | None
    git_dirty: bool | None
    python: str
    dependencies: tuple[tuple[str, str], ...]
    build_time: str
    source_date_epoch: int | None
    settings: dict[str, Any]
    inputs: tuple[InputRecord, ...]
    methods: tuple[MethodRecord, ...]
    outputs: tuple[OutputRecord, ...]
    recorded_fingerprint: str | None = field(default=None, compare=False)  # as read from a file

    def sealed_document(self) -> dict[str, Any]:
        """What the fingerprint seals: the manifest without its ``fingerprint`` key and
        without the outputs that show the fingerprint (pages and PDFs, :func:`is_stamped`)."""
        doc = self._document()
        doc["outputs"] = [o for o in doc["outputs"] if not is_stamped(o["path"])]
        return doc

    def fingerprint(self) -> str:
        """The dossier's fingerprint: SHA-256 of the sealed part of the manifest.

        The sealed part (:meth:`sealed_document`) is written as canonical JSON
        (keys sorted, no spaces, UTF-8) and hashed. It holds the tool and
        its commit, the dependencies, the build time, the settings, every
        input and every data file (results, ledgers, tables, figures, method
        files) with its SHA-256; the pages and PDFs show the fingerprint,
        so they are listed in ``outputs`` (hashed after the stamp) but not sealed.
        """
        blob = json.dumps(self.sealed_document(), sort_keys=True, separators=(",", ":"), ensure_ascii=False).encode("utf-8")
        return hashlib.sha256(blob).hexdigest()

    def to_document(self) -> dict[str, Any]:
        """The JSON document (keys in the order of docs/manifest-format.md), its fingerprint included."""
        doc = self._document()
        return {"format": doc.pop("format"), "fingerprint": self.fingerprint(), **doc}

    def _document(self) -> dict[str, Any]:
        return {
            "format": MANIFEST_FORMAT,
            "tool": {"name": "ph-dossier", "version": self.tool_version, "git_commit": self.git_commit, "git_dirty": self.git_dirty},
            "python": self.python,
            "dependencies": [{"name": n, "version": v} for n, v in self.dependencies],
            "build_time": self.build_time,
            "source_date_epoch": self.source_date_epoch,
            "settings": self.settings,
            "inputs": [{"path": i.path, "sha256": i.sha256, "bytes": i.bytes, "role": i.role} for i in self.inputs],
            "methods": [
                {"id": m.id, "revision": m.revision, "source": m.source, "source_sha256": m.source_sha256, "cache_key": m.cache_key}
                for m in self.methods
            ],
            "outputs": [{"path": o.path, "sha256": o.sha256, "bytes": o.bytes} for o in self.outputs],
        }

    def to_bytes(self) -> bytes:
        """The file's bytes (indented JSON, UTF-8, newline at the end)."""
        return (json.dumps(self.to_document(), indent=2, ensure_ascii=False) + "\n").encode("utf-8")

    @classmethod
    def from_document(cls, d: Any) -> Manifest:
        """Read a manifest document back.

        Raises
        ------
        ManifestError
            When ``d`` is not a manifest of this format.
        """
        if not isinstance(d, dict) or d.get("format") != MANIFEST_FORMAT:
            got = d.get("format") if isinstance(d, dict) else type(d).__name__
            raise ManifestError(f"expected format {MANIFEST_FORMAT!r}; got {got!r}")
        try:
            return cls(
                tool_version=str(d["tool"]["version"]),
                git_commit=d["tool"].get("git_commit"),
                git_dirty=d["tool"].get("git_dirty"),
                python=str(d["python"]),
                dependencies=tuple((str(x["name"]), str(x["version"])) for x in d["dependencies"]),
                build_time=str(d["build_time"]),
                source_date_epoch=d.get("source_date_epoch"),
                settings=dict(d["settings"]),
                inputs=tuple(InputRecord(i["path"], i["sha256"], i.get("bytes"), i["role"]) for i in d["inputs"]),
                methods=tuple(MethodRecord(m["id"], str(m["revision"]), m["source"], m["source_sha256"], m["cache_key"]) for m in d["methods"]),
                outputs=tuple(OutputRecord(o["path"], o["sha256"], int(o["bytes"])) for o in d["outputs"]),
                recorded_fingerprint=d.get("fingerprint"),
            )
        except (KeyError, TypeError, ValueError, AttributeError) as exc:
            raise ManifestError(f"the manifest is incomplete or malformed: {type(exc).__name__}: {exc}") from None

    @classmethod
    def read(cls, folder: Path) -> Manifest:
        """The manifest of a built dossier.

        Raises
        ------
        ManifestError
            When the folder holds no readable manifest.
        """
        path = folder / MANIFEST_NAME
        if not folder.exists():
            raise ManifestError(f"no such folder: {folder}")
        try:
            data = json.loads(path.read_text(encoding="utf-8"))
        except FileNotFoundError:
            raise ManifestError(f"{folder} is not a built dossier (no {MANIFEST_NAME})") from None
        except NotADirectoryError:
            raise ManifestError(f"{folder} is not a folder") from None
        except (OSError, ValueError) as exc:
            raise ManifestError(f"cannot read {path}: {exc}") from None
        return cls.from_document(data)


def new_manifest(
    *,
    build_time: str,
    python: str,
    settings: dict[str, Any],
    inputs: tuple[InputRecord, ...],
    methods: tuple[MethodRecord, ...],
    outputs: dict[str, tuple[str, int]],
) -> Manifest:
    """The manifest of a build being published: this tool's version and commit,
    the dependencies installed, ``SOURCE_DATE_EPOCH`` when set.

    Parameters
    ----------
    outputs : dict
        ``{relative path: (sha256, size)}`` of every file written (not the manifest).
    """
    commit, dirty = git_commit()
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    return Manifest(
        tool_version=__version__,
        git_commit=commit,
        git_dirty=dirty,
        python=python,
        dependencies=dependency_versions(),
        build_time=build_time,
        source_date_epoch=int(epoch) if epoch and epoch.isdigit() else None,
        settings=settings,
        inputs=inputs,
        methods=methods,
        outputs=tuple(OutputRecord(p, h, n) for p, (h, n) in sorted(outputs.items())),
    )
