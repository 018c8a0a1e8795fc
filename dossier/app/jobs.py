"""One method's job, and the worker processes that run the jobs.

A method's job is everything that depends on that method alone: its
analysis, its ledger, and its files (results, tables, figures, page, PDF).
It runs in a worker process and returns a frozen :class:`MethodOutcome`,
which the content-hash cache stores as it is.
"""

from __future__ import annotations

import multiprocessing
import os
import sys
from collections.abc import Callable, Iterator, Mapping, Sequence
from concurrent.futures import ProcessPoolExecutor, as_completed
from concurrent.futures.process import BrokenProcessPool
from dataclasses import dataclass
from typing import Any, Protocol, TypeVar

from ..analysis.ledger import Ledger, ledger_of
from ..analysis.method import MethodAnalysis, analyse_method
from ..inputs.model import Method
from ..render.context import BuildContext
from ..render.site import render_method
from .errors import UserError

__all__ = ["FileSet", "MethodOutcome", "method_job", "expected_cost", "Reporter", "Silent", "WorkerPool", "WorkerLost", "KILL_JOB_FOR_TESTS"]


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


A = TypeVar("A")
R = TypeVar("R")

KILL_JOB_FOR_TESTS = "DOSSIER_TEST_KILL_JOB"
"""For tests only: a worker process given the job labelled with this environment
variable's value kills itself (SIGKILL, as the kernel's out-of-memory killer does)
as the job starts. Never honoured in the main process."""

_started = None  # in a worker: where it tells the main process which job it starts


def _worker_init(started: object = None) -> None:
    """Workers leave Ctrl-C and SIGTERM to the main process, which stops the build cleanly;
    each tells the main process, through ``started``, which job it starts."""
    import signal

    global _started
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    _started = started


def _tracked(fn: Callable[[A, BuildContext], R], item: A, ctx: BuildContext, index: int, label: str) -> R:
    """In a worker: say that job ``index`` starts (and in which process), then run it."""
    if _started is not None:
        _started.put((index, os.getpid()))  # type: ignore[attr-defined]
    if os.environ.get(KILL_JOB_FOR_TESTS) == label:
        import signal

        os.kill(os.getpid(), signal.SIGKILL)
    return fn(item, ctx)


class WorkerLost(UserError):
    """A worker process ended abruptly (killed, or out of memory) during a job: the
    jobs it and the other workers were running are lost; nothing was written.

    Attributes
    ----------
    labels : tuple of str
        The jobs that had started and not finished when the worker died (one of
        them was the dead worker's).
    """

    def __init__(self, labels: Sequence[str], *, during: str | None = None) -> None:
        self.labels = tuple(labels)
        if during is not None:
            during = f"while {during}"
        elif len(self.labels) == 1:
            during = f"during the job of method {self.labels[0]!r}, which was lost"
        elif self.labels:
            during = f"during the job of one of the methods {', '.join(repr(x) for x in self.labels)}; their jobs were lost"
        else:
            during = "as it started, before any job had begun"
        super().__init__(f"a worker process ended abruptly (killed, or out of memory?) {during}. Nothing already published was changed. "
                         "Run the command again; with --workers 1 it needs less memory")


def _preload() -> None:
    """Import what every method job needs and the application does not import at start
    (matplotlib, through the figure modules, and scipy.optimize), so that forked workers
    find it imported."""
    import scipy.optimize  # noqa: F401

    from ..render import figure_robustness, figures  # noqa: F401


class WorkerPool:
    """Runs jobs in worker processes when there are workers and more than one
    job, else in this one.

    The workers are started by the first :meth:`run` that needs them, and
    stay for the rest of the build: :meth:`map` hands its jobs (the stamp of
    dossier.pdf) to them only if they are already running, since starting
    workers for a few short jobs costs more than it saves; :meth:`beside`
    (the stamps of the method PDFs, while this process lays out the
    dossier) starts one worker if none is running. On Linux the workers are
    forked from this process, which has imported the analysis and rendering
    code already and has started no thread (the build starts none), so a
    worker starts without importing the whole stack again (about 1.4 s of
    CPU each); elsewhere they are spawned. (A fork server
    would do the same, but its workers are not this process's children, so
    their CPU time would be missing from what the benchmarks measure.)

    A worker process that dies (killed, out of memory) ends :meth:`run` or
    :meth:`map` with :class:`WorkerLost`, which names the jobs that were
    running; the pool is shut down and nothing else happens.
    """

    def __init__(self, workers: int) -> None:
        self.workers = workers
        self.executor: ProcessPoolExecutor | None = None
        self._starts: Any = None  # the workers say here which job they start

    def __enter__(self) -> WorkerPool:
        return self

    def __exit__(self, *exc: object) -> None:
        if self.executor is not None:
            self.executor.shutdown(wait=True, cancel_futures=True)
        if self._starts is not None:
            self._starts.close()

    def _start(self, jobs: int, most: int | None = None) -> ProcessPoolExecutor | None:
        if self.executor is None and self.workers > 1 and jobs > 1:
            _preload()
            context = multiprocessing.get_context("fork" if sys.platform == "linux" else "spawn")
            self._starts = context.SimpleQueue()
            self.executor = ProcessPoolExecutor(max_workers=min(self.workers, jobs, most or jobs), mp_context=context, initializer=_worker_init,
                                                initargs=(self._starts,))
        return self.executor

    def run(self, fn: Callable[[A, BuildContext], R], items: Sequence[A], ctx: BuildContext, labels: Sequence[str], reporter: Reporter) -> list[R]:
        """``fn(item, ctx)`` for each item, results in the order of ``items``; reports each as it finishes.

        Raises
        ------
        WorkerLost
            When a worker process dies during a job.
        """
        executor = self._start(len(items))
        if executor is None:
            out = []
            for item, label in zip(items, labels):
                out.append(fn(item, ctx))
                reporter.step(label)
            return out
        futures = {executor.submit(_tracked, fn, item, ctx, i, labels[i]): i for i, item in enumerate(items)}
        processes = dict(getattr(executor, "_processes", None) or {})  # {pid: Process}, all started by now
        done: dict[int, R] = {}
        try:
            for fut in as_completed(futures):
                i = futures[fut]
                done[i] = fut.result()
                reporter.step(labels[i])
        except BrokenProcessPool:
            executor.shutdown(wait=True, cancel_futures=True)
            raise WorkerLost([labels[i] for i in self._lost_jobs(processes, done)]) from None
        return [done[i] for i in range(len(items))]

    def map(self, fn: Callable[[A], R], items: Sequence[A], what: str) -> list[R]:
        """``fn(item)`` for each item, results in the order of ``items``: in the
        workers if they are running, else here. Give the longest jobs first.
        ``what``: the jobs, as :class:`WorkerLost` names them if a worker dies."""
        if self.executor is None or len(items) <= 1:
            return [fn(item) for item in items]
        try:
            return list(self.executor.map(fn, items))
        except BrokenProcessPool:
            self.executor.shutdown(wait=True, cancel_futures=True)
            raise WorkerLost([], during=what) from None

    def beside(self, fn: Callable[[A], R], items: Sequence[A], what: str) -> Callable[[], list[R]]:
        """Start ``fn(item)`` for each item in the workers, to run beside what this process does
        next; returns the call that waits for the results (in the order of ``items``). When no
        worker is running yet (a rebuild whose one changed method ran here), one is started for
        them, since this process has its own work meanwhile (for a single item none is started);
        without a worker the jobs run here when the results are asked for.
        ``what``: the jobs, as :class:`WorkerLost` names them if a worker dies."""
        executor = self._start(2, most=1) if len(items) > 1 else self.executor
        if executor is None:
            return lambda: [fn(item) for item in items]
        futures = [executor.submit(fn, item) for item in items]

        def results() -> list[R]:
            try:
                return [f.result() for f in futures]
            except BrokenProcessPool:
                executor.shutdown(wait=True, cancel_futures=True)
                raise WorkerLost([], during=what) from None

        return results

    def _lost_jobs(self, processes: Mapping[int, multiprocessing.process.BaseProcess], done: Mapping[int, object]) -> list[int]:
        """The unfinished jobs of the worker that died; when that cannot be told apart,
        every job that had started and not finished.

        A worker that died of itself (killed by SIGKILL, out of memory, or exited) has
        an exit code other than −SIGTERM, which the pool sends to the others once one
        has died.
        """
        import signal

        assert self._starts is not None
        running: list[tuple[int, int]] = []
        while not self._starts.empty():
            index, pid = self._starts.get()
            if index not in done:
                running.append((index, pid))
        dead = {pid for pid, p in processes.items() if p.exitcode not in (None, 0, -signal.SIGTERM)}
        return [i for i, pid in running if pid in dead] or [i for i, _ in running]
