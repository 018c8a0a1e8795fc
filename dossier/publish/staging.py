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

__all__ = ["staging_folder", "swap_into_place", "PublishError"]

_AT_FDCWD = -100
_RENAME_EXCHANGE = 2


class PublishError(OSError):
    """The output folder cannot be replaced (the message says why)."""


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
