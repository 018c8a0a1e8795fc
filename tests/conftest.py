"""Shared test helpers.

Real components (a browser, pdftoppm) are used where users meet them. A test
that needs one is skipped with a reason on a machine without it — but when
``CI=true`` a missing component fails the run instead, so CI cannot go green
by skipping.
"""

from __future__ import annotations

import os
import shutil

import pytest
from hypothesis import HealthCheck, settings

settings.register_profile(
    "dossier",
    derandomize=True,  # the same cases on every run and every machine
    deadline=None,
    suppress_health_check=[HealthCheck.too_slow],
)
settings.load_profile("dossier")


def in_ci() -> bool:
    """Whether the tests run under CI (CI=true)."""
    return os.environ.get("CI", "").lower() in ("1", "true", "yes")


def require_executable(name: str, why: str) -> str:
    """Path of an executable the test needs; skip (or, in CI, fail) without it."""
    path = shutil.which(name)
    if path:
        return path
    message = f"{name} is not installed ({why}); .ci/run installs it"
    if in_ci():
        pytest.fail(message)
    pytest.skip(message)
