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
A memo may also keep a few results an earlier build handed over and this
one did not use (``spare``): the page-number lines of ``dossier.pdf`` change
with its page count, and a method edited back and forth (a limit tried and
undone) changes the count back and forth.
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
    spare : int
        How many results handed over by an earlier build and not used in this
        process are kept beside those used (the most recent first).
    """

    def __init__(self, name: str, make: Callable[[Any], Any], *, spare: int = 0) -> None:
        if name in _MEMOS:
            raise ValueError(f"a memo named {name!r} exists already")
        self.name, self._make, self.spare = name, make, spare
        self._done: dict[Hashable, Any] = {}
        self._used: dict[Hashable, None] = {}  # in the order first asked for
        self._handed: list[Hashable] = []  # the keys handed over, in the earlier build's order
        self.made: list[Hashable] = []
        """The keys whose results this process made (not given), in order."""
        _MEMOS[name] = self
        if name in _PENDING:  # handed over before this memo's module was imported
            self.take(_PENDING.pop(name))

    def __call__(self, key: Hashable) -> Any:
        """The result of ``key``: made now if this process has not made or been given it."""
        if key not in self._done:
            self._done[key] = self._make(key)
            self.made.append(key)
        self._used.setdefault(key)
        return self._done[key]

    def used(self) -> dict[Hashable, Any]:
        """The results to keep: those asked for in this process, then up to ``spare`` of those
        handed over and not asked for, {key: result} in that order (most recent first)."""
        unused = [k for k in self._handed if k not in self._used][: self.spare]
        return {k: self._done[k] for k in [*self._used, *unused]}

    def take(self, results: Mapping[Hashable, Any]) -> None:
        """Results made by an earlier process, {key: result}, to use instead of making them."""
        self._done.update(results)
        self._handed = [*results, *(k for k in self._handed if k not in results)]


_PENDING: dict[str, dict[Hashable, Any]] = {}
"""Results handed over for memos whose module this process has not imported yet."""


def kept() -> dict[str, dict[Hashable, Any]]:
    """What to keep for the next build, {memo name: {key: result}}: what each memo keeps
    (:meth:`Memo.used`), and as they were the results handed over to memos this process
    never made (their module was not imported: a build without PDFs draws no page stamps)."""
    return {**_PENDING, **{name: memo.used() for name, memo in _MEMOS.items()}}


def reuse(results: Mapping[str, Mapping[Hashable, Any]]) -> None:
    """Hand results an earlier build kept (:func:`kept`) to the memos of this process; a memo
    whose module is imported later (the binder, when the dossier PDF is bound) takes its
    results as it is made."""
    for name, done in results.items():
        if name in _MEMOS:
            _MEMOS[name].take(done)
        else:
            _PENDING[name] = dict(done)
