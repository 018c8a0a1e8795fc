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


def _not_a_built_dossier(folder: Path) -> str:
    """Why ``folder`` cannot be served ('' when it holds a built dossier)."""
    needs = "serve needs a dossier folder built by `dossier build`"
    if folder.is_file():
        example = f"dossier build {folder} -o output, then dossier serve output" if folder.suffix in (".yaml", ".yml") else "dossier build methods -o output, then dossier serve output"
        return f"{folder} is a file, not a dossier folder: {needs} (e.g. {example})"
    if not folder.is_dir():
        return f"no such folder {folder}: {needs} (e.g. dossier build methods -o {folder})"
    if not (folder / LAYOUT.index).is_file():
        return f"{folder} holds no built dossier (no {LAYOUT.index}): {needs} (e.g. dossier build methods -o output, then dossier serve output)"
    return ""


def preview_server(folder: str | Path, port: int) -> ThreadingHTTPServer:
    """A server for ``folder`` on 127.0.0.1:``port`` (0: any free port); the caller runs and closes it.

    Raises
    ------
    UserError
        When the folder holds no built dossier or the port cannot be used.
    """
    root = Path(folder)
    problem = _not_a_built_dossier(root)
    if problem:
        raise UserError(problem)
    handler = functools.partial(_Quiet, directory=str(root))
    try:
        return ThreadingHTTPServer(("127.0.0.1", port), handler)
    except OSError as exc:
        raise UserError(f"cannot listen on 127.0.0.1:{port}: {exc.strerror or exc}") from None
