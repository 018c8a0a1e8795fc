"""The build manifest (``manifest.json``, format ``ph-dossier-manifest/1``).

Tool version and git commit, Python and every dependency's version, every
input and output file with its SHA-256, the solver and analysis settings,
the seeds, and the build time (``SOURCE_DATE_EPOCH`` respected). No absolute
path of the machine is written: inputs are named relative to the folder the
build ran in (or by their file name when outside it).
"""

from __future__ import annotations

import hashlib
import os
import re
import subprocess
from functools import lru_cache
from importlib import metadata
from pathlib import Path
from typing import Any

from .. import __version__

__all__ = ["MANIFEST_FORMAT", "MANIFEST_NAME", "manifest_document", "dependency_versions", "git_commit", "portable_path", "sha256_file"]

MANIFEST_FORMAT = "ph-dossier-manifest/1"
MANIFEST_NAME = "manifest.json"


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


def manifest_document(
    *,
    build_time: str,
    python: str,
    settings: dict[str, Any],
    inputs: list[dict[str, Any]],
    methods: list[dict[str, Any]],
    outputs: dict[str, tuple[str, int]],
) -> dict[str, Any]:
    """The manifest of one build.

    Parameters
    ----------
    build_time : str
    python : str
    settings : dict
        Solver and analysis settings.
    inputs : list of dict
        ``{"path", "sha256", "bytes", "role"}`` per input file.
    methods : list of dict
        ``{"id", "revision", "source", "source_sha256", "cache_key"}`` per method.
    outputs : dict
        ``{relative path: (sha256, size)}`` of every file written (not the manifest).
    """
    commit, dirty = git_commit()
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    return {
        "format": MANIFEST_FORMAT,
        "tool": {"name": "ph-dossier", "version": __version__, "git_commit": commit, "git_dirty": dirty},
        "python": python,
        "dependencies": [{"name": n, "version": v} for n, v in dependency_versions()],
        "build_time": build_time,
        "source_date_epoch": int(epoch) if epoch and epoch.isdigit() else None,
        "settings": settings,
        "inputs": inputs,
        "methods": methods,
        "outputs": [{"path": p, "sha256": h, "bytes": n} for p, (h, n) in sorted(outputs.items())],
    }
