"""Reasons for change: a method whose content changed against --previous needs a higher
revision and a stated reason; the changes page lists only what changed, with units,
old → new, the difference and the reasons, and is part of dossier.pdf."""

from __future__ import annotations

import json
import subprocess
import sys
from dataclasses import replace
from pathlib import Path

from dossier.analysis.ledger import Ledger
from dossier.analysis.method import AnalysisSettings
from dossier.app.revisions import content_changed, revision_is_higher, revision_problems
from dossier.problems import Severity
from tests.builders import MethodBuilder, component, pka
from tests.conftest import require_executable

BASE = (
    MethodBuilder(id="rinse", revision="3")
    # a stated value from an in-house measurement: nothing for the data-quality checks to flag under --strict
    .solution(component("acetic-acid", concentration="10 mmol/L", pka=[pka(4.76, uncertainty=0.01)]), id="s", shortcuts=["weak-acid-square-root"])
    .reference("r", "Invented test value of the invented laboratory", kind="in-house-measurement")
)


def test_revisions_compare_numbers_as_numbers() -> None:
    assert revision_is_higher("9", "10") and revision_is_higher("2026-01", "2026-02") and revision_is_higher("A", "B")
    assert not revision_is_higher("3", "3") and not revision_is_higher("10", "9") and not revision_is_higher("B", "A")


def test_content_excludes_the_revision_and_the_reason_only() -> None:
    old = BASE.build()
    assert not content_changed(old, replace(BASE, revision="4", change_reason="Why.").build())
    assert content_changed(old, replace(BASE, title="Another title").build())
    assert content_changed(old, BASE.solution(component("formic-acid"), id="s2", shortcuts=["weak-acid-square-root"]).build())


def test_a_changed_method_without_higher_revision_or_reason_is_named_by_field() -> None:
    old = Ledger(BASE.build(), AnalysisSettings(), (), ())
    edited = replace(BASE, limit=0.1).build()
    warnings = revision_problems((edited,), {"rinse": old}, "before", strict=False)
    assert {(p.field, p.severity) for p in warnings} == {("method.revision", Severity.WARNING), ("method.change_reason", Severity.WARNING)}
    assert "its revision '3' is not higher than the previous '3': raise it" in next(p.message for p in warnings if p.field == "method.revision")
    errors = revision_problems((edited,), {"rinse": old}, "before", strict=True)
    assert {p.severity for p in errors} == {Severity.ERROR}
    fine = replace(BASE, limit=0.1, revision="4", change_reason="The limit follows the 2026 specification.").build()
    assert revision_problems((fine,), {"rinse": old}, "before", strict=True) == ()
    # a reason copied unchanged from the previous revision is no reason for this one
    old_with_reason = Ledger(replace(BASE, change_reason="First issue.").build(), AnalysisSettings(), (), ())
    stale = replace(BASE, limit=0.1, revision="4", change_reason="First issue.").build()
    (p,) = revision_problems((stale,), {"rinse": old_with_reason}, "before", strict=False)
    assert p.field == "method.change_reason" and "previous revision's (3) unchanged" in p.message


def run(*args: str, cwd: Path) -> subprocess.CompletedProcess[str]:
    return subprocess.run([sys.executable, "-m", "dossier", *args], cwd=cwd, capture_output=True, text=True, timeout=900)


def test_build_against_previous_warns_refuses_under_strict_and_shows_the_reasons(tmp_path: Path) -> None:
    BASE.write(tmp_path)
    fast = ("--draws", "2000", "--workers", "1", "--quiet")
    assert run("build", "rinse.yaml", "-o", "out", "--no-pdf", *fast, cwd=tmp_path).returncode == 0
    old_manifest = json.loads((tmp_path / "out" / "manifest.json").read_text(encoding="utf-8"))
    replace(BASE, limit=0.1).write(tmp_path)
    strict = run("build", "rinse.yaml", "-o", "out", "--no-pdf", "--previous", "out", "--strict", *fast, cwd=tmp_path)
    assert strict.returncode == 1 and "rinse.yaml:" in strict.stdout + strict.stderr
    assert "method.revision: the method changed since the previous dossier (out), but its revision '3' is not higher than the previous '3': raise it" in strict.stdout + strict.stderr
    assert json.loads((tmp_path / "out" / "manifest.json").read_text(encoding="utf-8")) == old_manifest  # nothing built
    warned = run("build", "rinse.yaml", "-o", "warned", "--no-pdf", "--previous", "out", *fast, cwd=tmp_path)
    assert warned.returncode == 0 and "method.change_reason: warning: the method changed" in warned.stdout + warned.stderr
    assert "none stated" in (tmp_path / "warned" / "changes.html").read_text(encoding="utf-8")

    reason = "The limit follows the 2026 specification."
    replace(BASE, limit=0.1, revision="4", change_reason=reason).write(tmp_path)
    done = run("build", "rinse.yaml", "-o", "out", "--previous", "out", "--strict", *fast, cwd=tmp_path)
    assert done.returncode == 0, done.stdout + done.stderr
    page = (tmp_path / "out" / "changes.html").read_text(encoding="utf-8")
    assert "rinse — changed (revision 3 → 4)" in page and reason in page
    assert f"fingerprint <code class=\"hash\">{old_manifest['fingerprint']}</code>, built {old_manifest['build_time']}" in page
    assert "criteria.max_ph_error" in page and "<td class=\"n\">0.02</td>" in page and "<td class=\"n\">0.1</td>" in page
    assert "<td class=\"n\">+0.08</td><td>pH</td>" in page  # the difference, with its unit
    pdftotext = require_executable("pdftotext", "reads dossier.pdf")
    text = subprocess.run([pdftotext, "-layout", str(tmp_path / "out" / "dossier.pdf"), "-"], capture_output=True, text=True, check=True).stdout
    assert "Changes since the previous revision" in text and reason in text and old_manifest["fingerprint"][:40] in text.replace("\n", "")
