"""The one writer of a build: every file goes through it.

It joins paths safely under its root (no absolute paths, no '..', no
reserved names), refuses to write the same path twice, and records the
SHA-256 of everything it writes (for the manifest).
"""

from __future__ import annotations

import hashlib
import os
import re
from dataclasses import dataclass, field
from pathlib import Path, PurePosixPath

__all__ = ["Writer", "UnsafePath", "WrittenTwice", "write_one_file", "move_one_file"]

_RESERVED = re.compile(r"^(con|prn|aux|nul|com[0-9]|lpt[0-9])(\..*)?$", re.IGNORECASE)


class UnsafePath(ValueError):
    """A path that would leave the output folder or cannot be a file name."""


class WrittenTwice(RuntimeError):
    """The build tried to write one path twice (a bug in the build)."""


def safe_relative(path: str) -> PurePosixPath:
    """Check a relative output path and return it normalized.

    Raises
    ------
    UnsafePath
        Absolute, empty, containing '..', '.', a backslash, a NUL, a control
        character, or a reserved device name.
    """
    if not path or path.startswith("/") or "\\" in path or "\x00" in path or re.match(r"^[A-Za-z]:", path):
        raise UnsafePath(f"unsafe output path {path!r}")
    for part in path.split("/"):
        if part in ("", ".", "..") or _RESERVED.match(part) or any(ord(ch) < 32 for ch in part):
            raise UnsafePath(f"unsafe output path {path!r}")
    return PurePosixPath(path)


@dataclass
class Writer:
    """Writes files under ``root`` (a staging folder) and remembers each one."""

    root: Path
    written: dict[str, str] = field(default_factory=dict)  # relative path -> sha256
    sizes: dict[str, int] = field(default_factory=dict)  # relative path -> bytes

    def path_of(self, relative: str) -> Path:
        """The absolute path a relative output path would be written to."""
        return self.root.joinpath(*safe_relative(relative).parts)

    def write(self, relative: str, data: bytes | str) -> Path:
        """Write one file (text is UTF-8); refuses a path already written."""
        rel = str(safe_relative(relative))
        if rel in self.written:
            raise WrittenTwice(f"{rel} was already written in this build")
        raw = data.encode("utf-8") if isinstance(data, str) else data
        target = self.path_of(rel)
        target.parent.mkdir(parents=True, exist_ok=True)
        if target.is_symlink():
            raise UnsafePath(f"{rel} is a symbolic link in the staging folder")
        with open(target, "xb") as fh:  # never follows or overwrites an existing file
            fh.write(raw)
            fh.flush()
            os.fsync(fh.fileno())
        self.written[rel] = hashlib.sha256(raw).hexdigest()
        self.sizes[rel] = len(raw)
        return target


def write_one_file(path: Path, data: bytes, *, overwrite: bool = False, mode: int = 0o666) -> Path:
    """Write a single file outside a build (a starter method file, a key, a signature), atomically.

    The bytes go to a temporary file beside ``path`` that then replaces it in
    one step, so a reader never sees half a file. ``mode`` is the permission
    the file is created with (before the umask): ``0o600`` for a private key,
    readable and writable by its owner only, from the first byte on.

    Raises
    ------
    FileExistsError
        When ``path`` exists and ``overwrite`` is False.
    OSError
        When the folder cannot be made or the file written.
    """
    path = Path(path)
    if path.exists() and not overwrite:
        raise FileExistsError(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    tmp = path.with_name(f".{path.name}.{os.getpid()}.tmp")
    try:
        fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, mode)
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        if mode & 0o077 == 0:
            os.chmod(tmp, mode)  # whatever the umask: owner only
        os.replace(tmp, path)
    finally:
        if tmp.exists():
            tmp.unlink()
    return path


def move_one_file(source: Path, target: Path) -> Path:
    """Move a single file outside a build (a signature of an earlier build) in one step.

    The target's folder is made when missing; an existing target is replaced.

    Raises
    ------
    OSError
        When the folder cannot be made or the file moved.
    """
    target = Path(target)
    target.parent.mkdir(parents=True, exist_ok=True)
    os.replace(source, target)
    return target
