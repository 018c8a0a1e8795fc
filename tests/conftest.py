"""Shared test helpers.

Real components (a browser, pdftoppm) are used where users meet them. A test
that needs one is skipped with a reason on a machine without it. Under
``CI=true`` such a skip fails the run instead (:func:`pytest_runtest_makereport`),
so CI cannot go green by skipping: a skip raised by :func:`require_executable`,
or any skip of a test marked ``browser`` or ``pdf_pages``, is reported as a
failure with its reason.
"""

from __future__ import annotations

import atexit
import os
import shutil
import tempfile
from collections.abc import Iterator

import pytest
from hypothesis import HealthCheck, settings

# `dossier verify` keeps its re-computations in the user's cache folder ($XDG_CACHE_HOME);
# the tests keep theirs in a folder of their own, removed at the end (each xdist worker its own).
os.environ["XDG_CACHE_HOME"] = _CACHE_HOME = tempfile.mkdtemp(prefix="dossier-tests-cache-")
atexit.register(shutil.rmtree, _CACHE_HOME, ignore_errors=True)

pytest_plugins = ["pytester"]  # tests/test_conftest.py runs small pytest sessions

settings.register_profile(
    "dossier",
    derandomize=True,  # the same cases on every run and every machine
    deadline=None,
    suppress_health_check=[HealthCheck.too_slow],
)
settings.load_profile("dossier")

COMPONENT_MARKERS = ("browser", "pdf_pages")
"""Markers of tests that need a system component; their skips fail under CI=true."""


class MissingComponent(pytest.skip.Exception):
    """The skip of a test whose system component (an executable) is missing."""


def pytest_collection_modifyitems(config: pytest.Config, items: list[pytest.Item]) -> None:
    """Keep shared fixtures on one worker when the tests run in parallel.

    ``make test`` runs the suite on every core with pytest-xdist
    (``-n auto --dist loadgroup``). Each test module becomes one group, so
    its module-scoped fixtures (a built dossier, drawn figures) are made
    once; the end-to-end tests share one session-scoped demo build and form
    a single group. Without xdist nothing changes.
    """
    if not config.pluginmanager.hasplugin("xdist"):
        return
    for item in items:
        parts = item.path.parts
        group = "e2e" if "e2e" in parts else str(item.path)
        item.add_marker(pytest.mark.xdist_group(group))


def in_ci() -> bool:
    """Whether the tests run under CI (CI=true)."""
    return os.environ.get("CI", "").lower() in ("1", "true", "yes")


def require_executable(name: str, why: str) -> str:
    """Path of an executable the test needs; skip without it (a failure under CI=true)."""
    path = shutil.which(name)
    if path:
        return path
    raise MissingComponent(f"{name} is not installed ({why}); `make test` installs it (tools/system-packages test)")


def _needs_component(item: pytest.Item, call: pytest.CallInfo[None]) -> bool:
    if call.excinfo is not None and isinstance(call.excinfo.value, MissingComponent):
        return True
    return any(item.get_closest_marker(m) is not None for m in COMPONENT_MARKERS)


@pytest.hookimpl(hookwrapper=True)
def pytest_runtest_makereport(item: pytest.Item, call: pytest.CallInfo[None]) -> Iterator[None]:
    """Under CI=true, a skipped test that needs a browser or pdftoppm fails the run."""
    outcome = yield
    report = outcome.get_result()
    if not (report.skipped and in_ci() and _needs_component(item, call)):
        return
    if hasattr(report, "wasxfail"):
        return
    skip = call.excinfo.value if call.excinfo is not None else None
    reason = skip.msg if isinstance(skip, pytest.skip.Exception) else str(report.longrepr)
    report.outcome = "failed"
    report.longrepr = f"skipped under CI=true, which needs every browser and PDF-page test to run: {reason}"
