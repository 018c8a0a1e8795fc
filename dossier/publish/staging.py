"""Build into a staging folder beside the output, then swap it into place.

A build that fails for any reason leaves the previous output exactly as it
was and no staging folder behind. The swap uses the Linux ``renameat2``
system call with ``RENAME_EXCHANGE`` where it exists (one atomic step), and
two renames otherwise.
"""

from __future__ import annotations

import ctypes
import ctypes.util
import os
import shutil
import tempfile
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import IO

__all__ = ["staging_folder", "swap_into_place", "PublishError", "BuildLocked", "output_lock", "check_replaceable", "remove_stale_staging"]

_AT_FDCWD = -100
_RENAME_EXCHANGE = 2


class PublishError(OSError):
    """The output folder cannot be replaced (the message says why)."""


class BuildLocked(PublishError):
    """Another build is writing the same output."""


_KEEP = {"README.md", ".gitkeep"}


def check_replaceable(output: Path) -> None:
    """Refuse to replace a folder that is not a dossier: it would be deleted.

    An output may be new, empty, hold only a README.md or .gitkeep, or be a
    dossier built before (it has a manifest.json).
    """
    if not output.exists():
        return
    if not output.is_dir():
        raise PublishError(f"{output} exists and is not a folder; remove it or choose another output")
    names = {p.name for p in output.iterdir()}
    if names and "manifest.json" not in names and not names <= _KEEP:
        raise PublishError(
            f"{output} is not empty and is not a dossier built by ph-dossier (no manifest.json): "
            "building would replace its contents; choose a new or empty folder"
        )


_HELD: set[IO[str]] = set()
"""The lock files this process holds open (see :func:`_drop_locks_in_child`)."""


def _drop_locks_in_child() -> None:
    """In a forked child (a build's worker), close the copies of the lock files.

    A lock taken with ``flock`` lasts while any copy of its file descriptor
    is open, and a fork copies them all: a worker that outlived its build
    would keep the output locked.
    """
    for fh in list(_HELD):
        try:
            fh.close()
        except OSError:
            pass
    _HELD.clear()


if hasattr(os, "register_at_fork"):
    os.register_at_fork(after_in_child=_drop_locks_in_child)


@contextmanager
def output_lock(output: Path) -> Iterator[None]:
    """Hold an exclusive lock beside ``output`` for the whole build; refuse if another build holds it."""
    import fcntl

    out = output.resolve()
    lock_path = out.with_name(f".{out.name}.lock")
    try:
        out.parent.mkdir(parents=True, exist_ok=True)
        fh = open(lock_path, "a+")
    except OSError as exc:
        raise PublishError(f"cannot create the lock {lock_path.name} in {out.parent}: {exc.strerror or exc}") from None
    _HELD.add(fh)
    try:
        try:
            fcntl.flock(fh.fileno(), fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            fh.seek(0)
            holder = fh.read().strip() or "another process"
            raise BuildLocked(f"another build is writing {output} ({holder}); try again when it has finished") from None
        fh.seek(0)
        fh.truncate()
        fh.write(f"pid {os.getpid()}")
        fh.flush()
        yield
    finally:
        _HELD.discard(fh)
        try:
            fh.close()
        except OSError:
            pass


def remove_stale_staging(output: Path) -> None:
    """Remove staging folders a killed build left behind (call while holding the lock)."""
    out = output.resolve()
    for p in out.parent.glob(f".{out.name}.staging-*"):
        shutil.rmtree(p, ignore_errors=True)
    for p in out.parent.glob(f".{out.name}.old-*"):
        shutil.rmtree(p, ignore_errors=True)


def _exchange(a: Path, b: Path) -> bool:
    """Atomically exchange two paths; False when the system cannot."""
    try:
        libc = ctypes.CDLL(ctypes.util.find_library("c") or "libc.so.6", use_errno=True)
        renameat2 = libc.renameat2
    except (OSError, AttributeError):
        return False
    renameat2.argtypes = [ctypes.c_int, ctypes.c_char_p, ctypes.c_int, ctypes.c_char_p, ctypes.c_uint]
    res = renameat2(_AT_FDCWD, os.fsencode(a), _AT_FDCWD, os.fsencode(b), _RENAME_EXCHANGE)
    if res == 0:
        return True
    err = ctypes.get_errno()
    if err in (38, 22, 95):  # ENOSYS, EINVAL, EOPNOTSUPP: fall back
        return False
    raise OSError(err, os.strerror(err), str(b))


@contextmanager
def staging_folder(output: Path) -> Iterator[Path]:
    """A fresh folder beside ``output`` (same file system), removed on failure."""
    parent = output.resolve().parent
    if output.exists() and not output.is_dir():
        raise PublishError(f"{output} exists and is not a folder; remove it or choose another output")
    try:
        parent.mkdir(parents=True, exist_ok=True)
        staging = Path(tempfile.mkdtemp(prefix=f".{output.name}.staging-", dir=parent))
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(staging, 0o777 & ~umask)  # mkdtemp makes it private; the output is an ordinary folder
    except OSError as exc:
        raise PublishError(f"cannot create a staging folder in {parent}: {exc.strerror or exc}") from None
    try:
        yield staging
    except BaseException:
        shutil.rmtree(staging, ignore_errors=True)
        raise


def swap_into_place(staging: Path, output: Path) -> None:
    """Make ``staging`` the new ``output``; the old output is removed afterwards."""
    output = output.resolve()
    try:
        if not output.exists():
            os.rename(staging, output)
            return
        if _exchange(staging, output):
            shutil.rmtree(staging, ignore_errors=True)  # staging now holds the old output
            return
        old = output.with_name(f".{output.name}.old-{os.getpid()}")
        os.rename(output, old)
        try:
            os.rename(staging, output)
        except OSError:
            os.rename(old, output)
            raise
        shutil.rmtree(old, ignore_errors=True)
    except OSError as exc:
        shutil.rmtree(staging, ignore_errors=True)
        raise PublishError(f"cannot replace {output}: {exc.strerror or exc}") from None
