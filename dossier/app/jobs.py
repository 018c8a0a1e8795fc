"""One method's job, and the worker processes that run the jobs.

A method's job is everything that depends on that method alone: its
analysis, its ledger, and its files (results, tables, figures, page, PDF).
It runs in a worker process and returns a frozen :class:`MethodOutcome`,
which the content-hash cache stores as it is.
"""

from __future__ import annotations

import multiprocessing
import sys
from collections.abc import Callable, Iterator, Mapping, Sequence
from concurrent.futures import ProcessPoolExecutor, as_completed
from dataclasses import dataclass
from typing import Protocol, TypeVar

from ..analysis.ledger import Ledger, ledger_of
from ..analysis.method import MethodAnalysis, analyse_method
from ..inputs.model import Method
from ..render.context import BuildContext
from ..render.site import render_method

__all__ = ["FileSet", "MethodOutcome", "method_job", "expected_cost", "Reporter", "Silent", "WorkerPool"]


@dataclass(frozen=True)
class FileSet(Mapping[str, bytes]):
    """Files as (relative path, bytes), read-only; paths in sorted order."""

    items_: tuple[tuple[str, bytes], ...] = ()

    @classmethod
    def of(cls, files: Mapping[str, bytes]) -> FileSet:
        return cls(tuple(sorted(files.items())))

    def __getitem__(self, path: str) -> bytes:
        for p, data in self.items_:
            if p == path:
                return data
        raise KeyError(path)

    def __iter__(self) -> Iterator[str]:
        return (p for p, _ in self.items_)

    def __len__(self) -> int:
        return len(self.items_)


@dataclass(frozen=True)
class MethodOutcome:
    """What one method's job returns.

    Attributes
    ----------
    analysis : MethodAnalysis
    ledger : Ledger
        Every published number of the method, with its inputs.
    files : FileSet
        The method's files under their dossier paths (its PDF included when
        the build makes PDFs).
    """

    analysis: MethodAnalysis
    ledger: Ledger
    files: FileSet


def method_job(method: Method, ctx: BuildContext) -> MethodOutcome:
    """Everything of one method, in one process: analysis, ledger, files."""
    analysis = analyse_method(method, ctx.settings)
    ledger = ledger_of(analysis)
    return MethodOutcome(analysis, ledger, FileSet.of(render_method(analysis, ledger, ctx)))


def expected_cost(method: Method) -> int:
    """A rough relative cost of a method's job, only to start the longest jobs first:
    per solution, (1 + claimed shortcuts) × (1 + ionization steps)."""
    return sum((1 + len(s.shortcuts)) * (1 + sum(len(c.pka) for c in s.components)) for s in method.solutions)


class Reporter(Protocol):
    """Receives progress: a stage with a number of steps, then each step."""

    def stage(self, name: str, total: int) -> None: ...

    def step(self, label: str) -> None: ...


class Silent:
    """A reporter that reports nothing."""

    def stage(self, name: str, total: int) -> None:
        pass

    def step(self, label: str) -> None:
        pass


def _worker_init() -> None:
    """Workers leave Ctrl-C and SIGTERM to the main process, which stops the build cleanly."""
    import signal

    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)


A = TypeVar("A")
R = TypeVar("R")


class WorkerPool:
    """Runs jobs in worker processes when there are workers and more than one
    job, else in this one.

    The workers are started by the first :meth:`run` that needs them, and
    stay for the rest of the build: :meth:`map` hands its jobs (the
    fingerprint stamps) to them only if they are already running, since
    starting workers for a few short jobs costs more than it saves. On Linux
    the workers are forked from this process, which has imported the
    analysis and rendering code already (and has started no thread, opened
    no renderer), so a worker starts without importing the whole stack again
    (about 1.4 s of CPU each); elsewhere they are spawned. (A fork server
    would do the same, but its workers are not this process's children, so
    their CPU time would be missing from what the benchmarks measure.)
    """

    def __init__(self, workers: int) -> None:
        self.workers = workers
        self.executor: ProcessPoolExecutor | None = None

    def __enter__(self) -> WorkerPool:
        return self

    def __exit__(self, *exc: object) -> None:
        if self.executor is not None:
            self.executor.shutdown(wait=True, cancel_futures=True)

    @property
    def started(self) -> bool:
        """Whether worker processes are running."""
        return self.executor is not None

    def _start(self, jobs: int) -> ProcessPoolExecutor | None:
        if self.executor is None and self.workers > 1 and jobs > 1:
            context = multiprocessing.get_context("fork" if sys.platform == "linux" else "spawn")
            self.executor = ProcessPoolExecutor(max_workers=min(self.workers, jobs), mp_context=context, initializer=_worker_init)
        return self.executor

    def run(self, fn: Callable[[A, BuildContext], R], items: Sequence[A], ctx: BuildContext, labels: Sequence[str], reporter: Reporter) -> list[R]:
        """``fn(item, ctx)`` for each item, results in the order of ``items``; reports each as it finishes."""
        executor = self._start(len(items))
        if executor is None:
            out = []
            for item, label in zip(items, labels):
                out.append(fn(item, ctx))
                reporter.step(label)
            return out
        futures = {executor.submit(fn, item, ctx): i for i, item in enumerate(items)}
        done: dict[int, R] = {}
        for fut in as_completed(futures):
            i = futures[fut]
            done[i] = fut.result()
            reporter.step(labels[i])
        return [done[i] for i in range(len(items))]

    def map(self, fn: Callable[[A], R], items: Sequence[A]) -> list[R]:
        """``fn(item)`` for each item, results in the order of ``items``: in the
        workers if they are running, else here. Give the longest jobs first."""
        if self.executor is None or len(items) <= 1:
            return [fn(item) for item in items]
        return list(self.executor.map(fn, items))
