"""The build's worker processes (dossier.app.jobs.WorkerPool): jobs run beside this process."""

from __future__ import annotations

import os
import signal
import sys

import pytest

from dossier.app.jobs import WorkerLost, WorkerPool

pytestmark = pytest.mark.skipif(sys.platform != "linux", reason="the workers are forked on Linux")


def square_and_pid(x: int) -> tuple[int, int]:
    return x * x, os.getpid()


def die(x: int) -> int:
    os.kill(os.getpid(), signal.SIGKILL)  # as the out-of-memory killer does
    return x


def test_jobs_beside_run_in_a_worker_started_for_them_and_come_back_in_order() -> None:
    with WorkerPool(2) as pool:
        assert pool.executor is None  # no method job needed workers (a one-method rebuild)
        results = pool.beside(square_and_pid, [3, 1, 2], "squaring")
        assert pool.executor is not None and pool.executor._max_workers == 1  # one: this process has its own work meanwhile
        got = results()
    assert [v for v, _ in got] == [9, 1, 4]
    assert {pid for _, pid in got} != {os.getpid()}


def test_without_workers_or_with_one_job_the_jobs_run_here_when_asked_for() -> None:
    for workers, items in ((1, [2, 3]), (2, [5])):
        with WorkerPool(workers) as pool:
            results = pool.beside(square_and_pid, items, "squaring")
            assert pool.executor is None
            assert results() == [(x * x, os.getpid()) for x in items]


def test_a_worker_killed_beside_ends_with_worker_lost_naming_the_jobs() -> None:
    with WorkerPool(2) as pool:
        results = pool.beside(die, [1, 2], "stamping the PDFs with the fingerprint")
        with pytest.raises(WorkerLost, match="while stamping the PDFs with the fingerprint"):
            results()
