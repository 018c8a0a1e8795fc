"""Hostile text, ids and paths: shown as text everywhere, never run; nothing leaves the output."""

from __future__ import annotations

import os
import re
import subprocess
import sys
import time
import tracemalloc
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest
from pypdf import PdfReader

from dossier.inputs.loader import load_method_bytes
from dossier.inputs.yamlpos import YamlError, load_yaml

from ..conftest import require_executable

ROOT = Path(__file__).resolve().parents[2]
SCRIPT = "<script>window.__pwned = 1</script>"
IMG = "<img src=x onerror='window.__pwned=2'>"
SVG = "<svg onload='window.__pwned=3'></svg>"
CSS = "<style>body{display:none}</style>"

HOSTILE = f"""format: ph-dossier-method/1
method:
  id: hostile
  title: "Title {SCRIPT} {CSS}"
  revision: "1 {IMG}"
  purpose: "Purpose {SVG} &amp; $\\\\frac{{1}}{{0}}$"
  prepared_by: "{IMG}"
  notes: |
    Raw HTML in Markdown: {SCRIPT}

    [a javascript link](javascript:window.__pwned=4) and [a data link](data:text/html,<b>x</b>)

    <iframe src="https://example.invalid/"></iframe>
acceptance: {{max_ph_error: 0.05}}
conditions: {{temperature: 25, activity_model: davies}}
solutions:
  - id: s
    description: "{SVG}"
    components:
      - substance: "acid {IMG} $\\\\sqrt{{x}}$"
        charge: 0
        form: acid
        concentration: 10 mmol/L
        working_range: [5 mmol/L, 20 mmol/L]
        pka: [{{value: 4.5, uncertainty: 0.01, reference: "r"}}]
    shortcuts: [weak-acid-square-root]
references:
  r:
    citation: "Citation {SCRIPT} {CSS}"
    kind: estimate
"""


@pytest.fixture(scope="module")
def hostile_build(tmp_path_factory: pytest.TempPathFactory) -> Path:
    tmp = tmp_path_factory.mktemp("hostile")
    (tmp / "methods").mkdir()
    (tmp / "methods" / "hostile.yaml").write_text(HOSTILE, encoding="utf-8")
    out = tmp / "output"
    r = subprocess.run([sys.executable, "-m", "dossier", "build", "methods", "-o", str(out), "--draws", "2000", "--quiet"],
                       cwd=tmp, capture_output=True, text=True, timeout=600)
    assert r.returncode == 0, r.stderr
    return out


def test_the_hostile_method_file_is_accepted() -> None:
    load = load_method_bytes(HOSTILE.encode(), "hostile.yaml")
    assert load.method is not None, [str(p) for p in load.problems]


def test_every_page_shows_the_text_escaped(hostile_build: Path) -> None:
    for page in hostile_build.rglob("*.html"):
        html = page.read_text(encoding="utf-8")
        assert "<script" not in html.lower(), page
        assert "onerror=" not in html.replace("onerror=&#39;", ""), page
        assert 'href="javascript:' not in html and "<iframe" not in html and "<style>" not in html, page
    method = (hostile_build / "methods" / "hostile" / "index.html").read_text(encoding="utf-8")
    assert "&lt;script&gt;window.__pwned = 1&lt;/script&gt;" in method


def test_figures_carry_the_text_as_text(hostile_build: Path) -> None:
    for svg in (hostile_build / "methods" / "hostile" / "figures").glob("*.svg"):
        root = ET.fromstring(svg.read_bytes())
        assert not [e for e in root.iter() if e.tag.endswith(("script", "foreignObject"))], svg
        assert not [e for e in root.iter() if any(k.startswith("on") for k in e.attrib)], svg


@pytest.mark.browser
def test_the_browser_runs_nothing(hostile_build: Path) -> None:
    chromium = require_executable("chromium", "hostile text is checked in a real browser")
    from playwright.sync_api import sync_playwright

    with sync_playwright() as p:
        browser = p.chromium.launch(executable_path=chromium, args=["--no-sandbox", "--disable-gpu", "--disable-background-networking"])
        page = browser.new_page()
        dialogs: list[str] = []
        page.on("dialog", lambda d: (dialogs.append(d.message), d.dismiss()))
        for rel in ("index.html", "references.html", "methods/hostile/index.html", "methods/hostile/ledger.html"):
            page.goto((hostile_build / rel).as_uri())
            assert page.evaluate("() => window.__pwned === undefined"), rel
            assert page.evaluate("() => getComputedStyle(document.body).display") != "none", rel
        page.goto((hostile_build / "methods/hostile/index.html").as_uri())
        link_targets = page.evaluate("() => [...document.querySelectorAll('a[href]')].map(a => a.href)")
        assert not [h for h in link_targets if h.startswith(("javascript:", "data:"))]
        browser.close()
    assert dialogs == []


def test_the_pdfs_show_the_text_literally(hostile_build: Path) -> None:
    text = "\n".join(page.extract_text() for page in PdfReader(str(hostile_build / "methods/hostile/hostile.pdf")).pages)
    assert "<script>window.__pwned" in text.replace("\n", "")


@pytest.mark.parametrize("bad_id", ["con", "nul", "lpt1", "com3.x", "trailing."])
def test_reserved_ids_are_refused(bad_id: str) -> None:
    text = HOSTILE.replace("id: hostile", f"id: {bad_id}")
    load = load_method_bytes(text.encode(), "m.yaml")
    assert load.method is None
    assert any(p.field == "method.id" and "cannot be a file name on every system" in p.message for p in load.problems)


@pytest.mark.parametrize("bad_id", ["../etc", "/abs", "a/b", "a\\\\b", "..", "with space", "-dash"])
def test_ids_that_would_leave_the_folder_are_refused(bad_id: str) -> None:
    text = HOSTILE.replace("id: hostile", f'id: "{bad_id}"')
    load = load_method_bytes(text.encode(), "m.yaml")
    assert load.method is None
    assert any(p.field == "method.id" for p in load.problems)


def test_a_symlink_placed_in_the_output_is_not_followed(tmp_path: Path) -> None:
    victim = tmp_path / "victim.txt"
    victim.write_text("precious", encoding="utf-8")
    (tmp_path / "methods").mkdir()
    (tmp_path / "methods" / "m.yaml").write_bytes((ROOT / "methods" / "benzoate-extract.yaml").read_bytes())
    run = lambda: subprocess.run([sys.executable, "-m", "dossier", "build", "methods", "-o", "output", "--draws", "1000", "--no-pdf", "--quiet"], cwd=tmp_path, capture_output=True, text=True, timeout=600)  # noqa: E731
    assert run().returncode == 0
    os.symlink(victim, tmp_path / "output" / "index.html.bak")
    (tmp_path / "output" / "methods" / "benzoate-extract" / "index.html").unlink()
    os.symlink(victim, tmp_path / "output" / "methods" / "benzoate-extract" / "index.html")
    r = run()
    assert r.returncode == 0, r.stderr
    assert victim.read_text(encoding="utf-8") == "precious"
    assert not (tmp_path / "output" / "methods" / "benzoate-extract" / "index.html").is_symlink()


def test_alias_bombs_and_deep_nesting_are_refused_quickly_within_a_memory_bound() -> None:
    bomb = ["a0: &a0 [" + ", ".join(["lol"] * 10) + "]"]
    for i in range(1, 12):
        bomb.append(f"a{i}: &a{i} [" + ", ".join([f"*a{i - 1}"] * 10) + "]")
    deep = "x: " + "[" * 10_000 + "]" * 10_000
    for text, message in (("\n".join(bomb), "expands to more than 100000 values"), (deep, "nesting deeper than 64 levels")):
        t0 = time.perf_counter()
        with pytest.raises(YamlError, match=message):
            load_yaml(text)
        assert time.perf_counter() - t0 < 10.0  # refused by the budget, long before exhausting the machine
    tracemalloc.start()
    with pytest.raises(YamlError):
        load_yaml("\n".join(bomb))
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    assert peak < 200 * 2**20, f"peak {peak / 2**20:.0f} MiB"


def test_oversized_file_is_refused_with_the_limit_named(tmp_path: Path) -> None:
    big = tmp_path / "big.yaml"
    big.write_bytes(b"# padding\n" * 120_000)
    r = subprocess.run([sys.executable, "-m", "dossier", "check", str(big)], capture_output=True, text=True, timeout=120)
    assert r.returncode == 1
    assert "the limit is 1048576 bytes (1 MiB)" in r.stdout
