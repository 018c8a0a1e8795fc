"""The output lock and forked worker processes."""

from __future__ import annotations

import multiprocessing
import sys
import time
from pathlib import Path

import pytest

from dossier.publish.staging import BuildLocked, output_lock


def _linger(started: object, seconds: float) -> None:
    started.set()  # type: ignore[attr-defined]  # the fork's handlers have run by now
    time.sleep(seconds)


@pytest.mark.skipif(sys.platform != "linux", reason="the build forks its workers on Linux only")
def test_a_forked_worker_does_not_keep_the_output_locked(tmp_path: Path) -> None:
    out = tmp_path / "output"
    context = multiprocessing.get_context("fork")
    started = context.Event()
    with output_lock(out):
        worker = context.Process(target=_linger, args=(started, 10.0))
        worker.start()  # forked while the lock is held, as the build's workers are
        assert started.wait(10)
    try:
        assert worker.is_alive()
        with output_lock(out):  # the build is over: the next one may start although the worker lingers
            pass
    finally:
        worker.kill()
        worker.join()


def test_a_second_build_is_refused_while_the_first_holds_the_lock(tmp_path: Path) -> None:
    out = tmp_path / "output"
    context = multiprocessing.get_context("spawn")
    with output_lock(out):
        with pytest.raises(BuildLocked):
            with context.Pool(1) as pool:
                pool.apply(_enter, (out,))


def _enter(out: Path) -> None:
    with output_lock(out):
        pass
