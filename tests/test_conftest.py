"""The CI rule of tests/conftest.py: under CI=true a skipped browser or
PDF-page test fails the run; elsewhere it stays a skip. Each case runs a small
real pytest session (pytester) with the project's hook."""

from __future__ import annotations

import pytest

CONFTEST = "from tests.conftest import pytest_runtest_makereport, MissingComponent, require_executable  # noqa: F401\n"

TESTS = '''
import pytest
from tests.conftest import require_executable

def test_needs_a_missing_program():
    require_executable("no-such-program-for-dossier-tests", "checks the CI rule")

@pytest.mark.browser
def test_marked_browser_skips_for_another_reason():
    pytest.skip("playwright is not importable")

def test_ordinary_skip():
    pytest.skip("not relevant on this platform")

def test_passes():
    pass
'''

INI = """
[pytest]
markers =
    browser: needs Chromium
    pdf_pages: needs pdftoppm
"""


def _run(pytester: pytest.Pytester, monkeypatch: pytest.MonkeyPatch, ci: str | None) -> pytest.RunResult:
    if ci is None:
        monkeypatch.delenv("CI", raising=False)
    else:
        monkeypatch.setenv("CI", ci)
    pytester.makeini(INI)
    pytester.makeconftest(CONFTEST)
    pytester.makepyfile(test_rule=TESTS)
    return pytester.runpytest_inprocess("-p", "no:cacheprovider", "-rfs")


def test_without_ci_a_missing_component_is_a_skip(pytester: pytest.Pytester, monkeypatch: pytest.MonkeyPatch) -> None:
    result = _run(pytester, monkeypatch, None)
    result.assert_outcomes(passed=1, skipped=3)
    assert result.ret == 0
    result.stdout.fnmatch_lines(["*no-such-program-for-dossier-tests is not installed (checks the CI rule)*"])


@pytest.mark.parametrize("ci", ["true", "1"])
def test_under_ci_component_skips_fail_and_other_skips_stay(pytester: pytest.Pytester, monkeypatch: pytest.MonkeyPatch, ci: str) -> None:
    result = _run(pytester, monkeypatch, ci)
    result.assert_outcomes(passed=1, skipped=1, failed=2)
    assert result.ret == 1
    result.stdout.fnmatch_lines([
        "*FAILED*test_needs_a_missing_program*",
        "*FAILED*test_marked_browser_skips_for_another_reason*",
        "*SKIPPED*not relevant on this platform*",
    ])
    result.stdout.fnmatch_lines(["*skipped under CI=true, which needs every browser and PDF-page test to run: no-such-program-for-dossier-tests is not installed (checks the CI rule)*"])


def test_ci_false_is_not_ci(pytester: pytest.Pytester, monkeypatch: pytest.MonkeyPatch) -> None:
    result = _run(pytester, monkeypatch, "false")
    result.assert_outcomes(passed=1, skipped=3)


def test_a_missing_program_in_a_shared_fixture_fails_every_test_using_it(pytester: pytest.Pytester, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("CI", "true")
    pytester.makeini(INI)
    pytester.makeconftest(CONFTEST)
    pytester.makepyfile(test_fixture='''
import pytest
from tests.conftest import require_executable

@pytest.fixture(scope="module")
def program():
    return require_executable("no-such-program-for-dossier-tests", "a module fixture")

def test_one(program):
    pass

def test_two(program):
    pass
''')
    result = pytester.runpytest_inprocess("-p", "no:cacheprovider")
    result.assert_outcomes(errors=2)
