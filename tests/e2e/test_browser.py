"""A real headless Chromium opens every page over file:// and over the preview
server: no console errors, no failed requests, every image loaded, every
internal link and anchor resolves, every table has header cells."""

from __future__ import annotations

import re
import subprocess
import sys
import urllib.parse
from pathlib import Path

import pytest

from ..conftest import require_executable
from .conftest import ROOT, method_ids

pytestmark = pytest.mark.browser

ARTIFACTS = ROOT / "tests" / "artifacts"
CHROMIUM_ARGS = ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking",
                 "--disable-component-update", "--disable-sync"]


@pytest.fixture(scope="module")
def browser():  # noqa: ANN201
    chromium = require_executable("chromium", "the site is tested in a real browser")
    from playwright.sync_api import sync_playwright

    with sync_playwright() as p:
        b = p.chromium.launch(executable_path=chromium, args=CHROMIUM_ARGS)
        yield b
        b.close()


@pytest.fixture(scope="module")
def server(built: Path):  # noqa: ANN201
    proc = subprocess.Popen([sys.executable, "-m", "dossier", "serve", str(built), "--port", "0"], stdout=subprocess.PIPE, text=True, cwd=ROOT)
    line = proc.stdout.readline()
    m = re.search(r"http://127\.0\.0\.1:(\d+)/", line)
    assert m, line
    yield f"http://127.0.0.1:{m.group(1)}/"
    proc.terminate()
    proc.wait(timeout=10)


def pages(built: Path) -> list[str]:
    return sorted(str(p.relative_to(built)) for p in built.rglob("*.html"))


def check_site(browser, base: str, built: Path) -> None:  # noqa: ANN001
    page = browser.new_page(viewport={"width": 1280, "height": 900})
    problems: list[str] = []
    page.on("console", lambda msg: problems.append(f"console {msg.type}: {msg.text}") if msg.type == "error" else None)
    page.on("pageerror", lambda exc: problems.append(f"page error: {exc}"))
    page.on("requestfailed", lambda req: problems.append(f"failed request: {req.url}"))
    page.on("response", lambda resp: problems.append(f"HTTP {resp.status}: {resp.url}") if resp.status >= 400 else None)
    ids: dict[str, set[str]] = {}
    links: list[tuple[str, str]] = []
    for rel in pages(built):
        url = urllib.parse.urljoin(base, rel)
        # Wait until no request is in flight (the favicon is fetched after "load"), so that
        # opening the next page never cuts one off and every request is judged on its outcome.
        page.goto(url, wait_until="networkidle")
        broken = page.evaluate("""() => [...document.images].filter(i => !i.complete || i.naturalWidth === 0).map(i => i.src)""")
        assert not broken, (rel, broken)
        untitled = page.evaluate("""() => [...document.images].filter(i => !i.alt || i.alt.length < 5).map(i => i.src)""")
        assert not untitled, (rel, "images without alt text", untitled)
        headless = page.evaluate("""() => [...document.querySelectorAll('table')].filter(t => t.querySelectorAll('th').length === 0).length""")
        assert headless == 0, (rel, "tables without header cells")
        assert page.evaluate("() => !!document.querySelector('a.skip[href=\"#content\"]') && !!document.getElementById('content')"), rel
        ids[url.split("#")[0]] = set(page.evaluate("() => [...document.querySelectorAll('[id]')].map(e => e.id)"))
        for href in page.evaluate("() => [...document.querySelectorAll('a[href]')].map(a => a.getAttribute('href'))"):
            links.append((url, href))
        if rel in ("index.html", "methods/boric-rinse/index.html"):
            ARTIFACTS.mkdir(parents=True, exist_ok=True)
            scheme = base.split(":")[0]
            page.screenshot(path=str(ARTIFACTS / f"{scheme}-{rel.replace('/', '-')}.png"), full_page=False)
    for url, href in links:
        if re.match(r"^[a-z]+:", href) and not href.startswith(("file:", "http://127.0.0.1")):
            continue  # no external links are expected; none is followed
        target = urllib.parse.urljoin(url, href)
        doc, _, frag = target.partition("#")
        if doc.endswith(".html"):
            assert doc in ids, (url, href, "page not found")
            if frag:
                assert frag in ids[doc], (url, href, "anchor not found")
        else:
            path = built / urllib.parse.unquote(doc[len(base):]) if doc.startswith(base) else None
            assert path is not None and path.is_file(), (url, href)
    page.close()
    assert not problems, problems


def test_site_over_file_urls(browser, built: Path) -> None:  # noqa: ANN001
    check_site(browser, built.as_uri() + "/", built)


def test_site_over_the_preview_server(browser, server: str, built: Path) -> None:  # noqa: ANN001
    check_site(browser, server, built)
    assert server.startswith("http://127.0.0.1:")


MIN_EQUATION_HEIGHT = 12  # CSS px: about the height of 9 pt text; common practice, no source


@pytest.mark.parametrize("width", [1280, 390])
def test_every_equation_renders_at_a_readable_size(browser, built: Path, width: int) -> None:  # noqa: ANN001
    """A wide equation in a table cell must not be shrunk to a sliver (at desktop and phone widths)."""
    page = browser.new_page(viewport={"width": width, "height": 900})
    small: list[tuple[str, str, float]] = []
    seen = 0
    for rel in ["calculations.html"] + [f"methods/{mid}/index.html" for mid in method_ids()]:
        page.goto((built / rel).as_uri(), wait_until="load")
        sizes = page.evaluate("""() => [...document.querySelectorAll('img[src*="equations/"]')].map(
            i => [i.getAttribute('src'), i.getBoundingClientRect().height, i.naturalHeight])""")
        assert sizes, (rel, "no equation images")
        seen += len(sizes)
        small += [(rel, src, h) for src, h, natural in sizes if h < MIN_EQUATION_HEIGHT or natural == 0]
    page.close()
    assert seen > 20
    assert not small, small


def test_the_cautions_appear_once_on_every_page_and_are_visible(browser, built: Path) -> None:  # noqa: ANN001
    from dossier.render.html import CAUTIONS

    page = browser.new_page(viewport={"width": 1280, "height": 900})
    for rel in pages(built):
        page.goto((built / rel).as_uri(), wait_until="load")
        text = page.evaluate("() => document.body.innerText")  # rendered text: what a reader sees
        for caution in CAUTIONS:
            assert text.count(caution) == 1, (rel, caution, text.count(caution))
        visible = page.evaluate("""(c) => [...document.querySelectorAll('li')].some(
            li => li.textContent.trim() === c && li.getBoundingClientRect().height > 0)""", CAUTIONS[0])
        assert visible, rel
    page.close()
