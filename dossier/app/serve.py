"""``dossier serve``: preview a built dossier over HTTP on the loopback interface."""

from __future__ import annotations

import functools
from http.server import SimpleHTTPRequestHandler, ThreadingHTTPServer
from pathlib import Path

from ..layout import LAYOUT
from .errors import UserError

__all__ = ["preview_server"]


class _Quiet(SimpleHTTPRequestHandler):
    def log_message(self, format: str, *args: object) -> None:  # noqa: A002 - the base class's name
        pass


def preview_server(folder: str | Path, port: int) -> ThreadingHTTPServer:
    """A server for ``folder`` on 127.0.0.1:``port`` (0: any free port); the caller runs and closes it.

    Raises
    ------
    UserError
        When the folder holds no built dossier or the port cannot be used.
    """
    root = Path(folder)
    if not (root / LAYOUT.index).is_file():
        raise UserError(f"{root} holds no built dossier (no {LAYOUT.index}); run: dossier build -o {root}")
    handler = functools.partial(_Quiet, directory=str(root))
    try:
        return ThreadingHTTPServer(("127.0.0.1", port), handler)
    except OSError as exc:
        raise UserError(f"cannot listen on 127.0.0.1:{port}: {exc.strerror or exc}") from None
