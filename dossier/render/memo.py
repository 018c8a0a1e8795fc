"""Drawings made once: slow, deterministic renderings kept per process and handed to the next build.

Two steps of a build draw the same things every time: the 27 equations of
the catalogue (matplotlib mathtext, about 1 s) and the "dossier page N of T"
lines of ``dossier.pdf`` (WeasyPrint, about 0.6 s for 220 pages). Each is a
:class:`Memo`: a result is made the first time it is asked for in a process
and reused after. The build keeps what a memo used (:func:`kept`) in its
cache and hands it to the next build's process (:func:`reuse`), keyed by
everything that changes the drawings (the tool's code and the versions of
matplotlib and WeasyPrint), so that a rebuild draws neither again. The
results are the same bytes either way: what is reused is what would be made.
"""

from __future__ import annotations

from collections.abc import Callable, Hashable, Mapping
from typing import Any

__all__ = ["Memo", "kept", "reuse"]

_MEMOS: dict[str, Memo] = {}


class Memo:
    """Results by key, made by ``make(key)`` the first time one is asked for in this process.

    Parameters
    ----------
    name : str
        Its name among the memos a build keeps (unique).
    make : callable
        Makes the result of a key; must give the same result for the same key.
    """

    def __init__(self, name: str, make: Callable[[Any], Any]) -> None:
        if name in _MEMOS:
            raise ValueError(f"a memo named {name!r} exists already")
        self.name, self._make = name, make
        self._done: dict[Hashable, Any] = {}
        self._used: set[Hashable] = set()
        _MEMOS[name] = self

    def __call__(self, key: Hashable) -> Any:
        """The result of ``key``: made now if this process has not made or been given it."""
        if key not in self._done:
            self._done[key] = self._make(key)
        self._used.add(key)
        return self._done[key]

    def used(self) -> dict[Hashable, Any]:
        """The results asked for in this process, {key: result}."""
        return {k: self._done[k] for k in self._used}

    def take(self, results: Mapping[Hashable, Any]) -> None:
        """Results made by an earlier process, {key: result}, to use instead of making them."""
        self._done.update(results)


def kept() -> dict[str, dict[Hashable, Any]]:
    """What every memo was asked for in this process, {memo name: {key: result}} (to keep)."""
    return {name: memo.used() for name, memo in _MEMOS.items()}


def reuse(results: Mapping[str, Mapping[Hashable, Any]]) -> None:
    """Hand results an earlier build kept (:func:`kept`) to the memos of this process."""
    for name, done in results.items():
        if name in _MEMOS:
            _MEMOS[name].take(done)
