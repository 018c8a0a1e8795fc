"""Content-hash cache: a method whose inputs have not changed is not recomputed.

The key of a method is the SHA-256 of its method file's bytes, the substance
table, the tool's own code and templates (its *fingerprint*), the analysis
settings and whether PDFs are made. The key of the dossier-wide pages adds
the keys of all methods. The build also keeps what it drew that does not
depend on the methods (``drawings``: the equations and the page-number
lines, :mod:`dossier.render.memo`), keyed by the tool's fingerprint and the
versions of matplotlib and WeasyPrint.
Entries are pickles in a folder beside the output (``.NAME.cache``); after a
successful build the entries it did not use are removed. The folder is the
user's own: like any cache of pickles it must not be writable by others.

``dossier verify`` keeps its own re-computations apart, in the user's cache
folder (:func:`verify_cache_root`), never beside a dossier: a dossier that
travels with a cache folder cannot bring its own "re-computed" numbers to the
verification. Its entries are trimmed to the most recently used
(:meth:`Cache.trim`).
"""

from __future__ import annotations

import hashlib
import json
import os
import pickle
import tempfile
from functools import lru_cache
from pathlib import Path
from typing import Any, TypeVar

from .. import __version__

__all__ = ["Cache", "tool_fingerprint", "method_key", "dossier_key", "verify_cache_root"]

T = TypeVar("T")


@lru_cache(maxsize=1)
def tool_fingerprint() -> str:
    """SHA-256 over the tool's code, data and templates (changes whenever the tool does)."""
    pkg = Path(__file__).resolve().parents[1]  # the dossier package
    from importlib import resources

    templates = Path(str(resources.files("dossier.templates")))
    h = hashlib.sha256(__version__.encode())
    for root in (pkg, templates):
        for f in sorted(root.rglob("*")):
            if f.is_file() and f.suffix in (".py", ".yaml", ".html", ".css", ".svg"):
                h.update(str(f.relative_to(root)).encode())
                h.update(f.read_bytes())
    return h.hexdigest()


def method_key(source_sha256: str, table_sha256: str, settings: dict[str, Any], pdf: bool) -> str:
    """Cache key of one method's artefacts."""
    blob = json.dumps({"source": source_sha256, "table": table_sha256, "tool": tool_fingerprint(), "settings": settings, "pdf": pdf}, sort_keys=True)
    return hashlib.sha256(blob.encode()).hexdigest()


def dossier_key(method_keys: list[str], extra: dict[str, Any]) -> str:
    """Cache key of the dossier-wide pages and PDF."""
    blob = json.dumps({"methods": method_keys, "tool": tool_fingerprint(), "extra": extra}, sort_keys=True)
    return hashlib.sha256(blob.encode()).hexdigest()


def verify_cache_root() -> Path:
    """The verify cache's folder: ``ph-dossier/verify`` in ``$XDG_CACHE_HOME`` (the XDG Base
    Directory convention), else in ``~/.cache``."""
    base = os.environ.get("XDG_CACHE_HOME") or ""
    root = Path(base) if os.path.isabs(base) else Path.home() / ".cache"
    return root / "ph-dossier" / "verify"


class Cache:
    """Pickled entries under ``root/kind/key.pickle``; a missing or unreadable entry is a miss."""

    def __init__(self, root: Path) -> None:
        self.root = root
        self.used: set[Path] = set()

    @classmethod
    def beside(cls, output: Path) -> Cache:
        out = output.resolve()
        return cls(out.with_name(f".{out.name}.cache"))

    def _path(self, kind: str, key: str) -> Path:
        return self.root / kind / f"{key}.pickle"

    def get(self, kind: str, key: str, expected: type[T]) -> T | None:
        """The entry stored under ``kind``/``key`` if it is an ``expected``, else None (a miss)."""
        path = self._path(kind, key)
        try:
            with open(path, "rb") as fh:
                value = pickle.load(fh)
        except (OSError, pickle.UnpicklingError, EOFError, AttributeError, ImportError, TypeError, ValueError):
            return None
        if not isinstance(value, expected):
            return None
        self.used.add(path)
        try:
            os.utime(path)  # last used: what :meth:`trim` keeps
        except OSError:
            pass
        return value

    def put(self, kind: str, key: str, value: object) -> None:
        """Store an entry (atomically); a cache that cannot be written is skipped, not an error."""
        path = self._path(kind, key)
        try:
            path.parent.mkdir(parents=True, exist_ok=True)
            fd, tmp = tempfile.mkstemp(dir=path.parent, suffix=".tmp")
            with os.fdopen(fd, "wb") as fh:
                pickle.dump(value, fh, protocol=pickle.HIGHEST_PROTOCOL)
            os.replace(tmp, path)
            self.used.add(path)
        except OSError:
            return

    def prune(self) -> None:
        """Remove every entry this build did not use."""
        if not self.root.is_dir():
            return
        for f in self.root.rglob("*.pickle"):
            if f not in self.used:
                try:
                    f.unlink()
                except OSError:
                    pass

    def trim(self, limit: int) -> None:
        """Remove the least recently used entries (by modification time, which :meth:`get`
        and :meth:`put` renew) until the entries take at most ``limit`` bytes."""
        if not self.root.is_dir():
            return
        found = []
        for f in self.root.rglob("*.pickle"):
            try:
                st = f.stat()
            except OSError:
                continue
            found.append((st.st_mtime, st.st_size, f))
        total = sum(size for _, size, _ in found)
        for _, size, f in sorted(found, key=lambda t: t[0]):
            if total <= limit:
                break
            try:
                f.unlink()
                total -= size
            except OSError:
                pass
