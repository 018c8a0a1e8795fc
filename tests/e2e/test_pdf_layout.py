"""Every word of every demo PDF page lies inside the page's printable area.

Word boxes come from poppler's ``pdftotext -bbox`` (a real PDF reader, not the
renderer that made the file); the page size comes from the same output and the
margins from the ``@page`` rule of templates/pdf.css. Body text must lie inside
the page's content box; the running header and footer live in the top and bottom
margins, so a word there must lie wholly inside that band. In every case a word
must keep to the left and right margins: a table that runs off the right edge of
the page is caught here.
"""

from __future__ import annotations

import re
import subprocess
from dataclasses import dataclass
from html.parser import HTMLParser
from pathlib import Path

from ..conftest import require_executable
from .conftest import ROOT, method_ids

MM = 72.0 / 25.4  # PDF points per millimetre
TOLERANCE = 1.0  # pt: rounding of glyph boxes (a glyph's side bearing), about 0.35 mm


@dataclass(frozen=True)
class Word:
    text: str
    x0: float
    y0: float
    x1: float
    y1: float


@dataclass
class Page:
    width: float
    height: float
    words: list[Word]


class _BBoxParser(HTMLParser):
    """The pages and word boxes of ``pdftotext -bbox`` output (XHTML)."""

    def __init__(self) -> None:
        super().__init__()
        self.pages: list[Page] = []
        self._word: dict[str, str] | None = None
        self._text: list[str] = []

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        a = {k: v or "" for k, v in attrs}
        if tag == "page":
            self.pages.append(Page(float(a["width"]), float(a["height"]), []))
        elif tag == "word":
            self._word, self._text = a, []

    def handle_data(self, data: str) -> None:
        if self._word is not None:
            self._text.append(data)

    def handle_endtag(self, tag: str) -> None:
        if tag == "word" and self._word is not None:
            w = self._word
            self.pages[-1].words.append(Word("".join(self._text), float(w["xmin"]), float(w["ymin"]), float(w["xmax"]), float(w["ymax"])))
            self._word = None


def page_margins() -> tuple[float, float, float, float]:
    """Top, right, bottom, left margin in pt, read from the first ``@page`` rule of templates/pdf.css."""
    css = (ROOT / "templates" / "pdf.css").read_text(encoding="utf-8")
    rule = re.search(r"@page\s*\{(.*?)\}", css, re.S)
    assert rule, "no @page rule in pdf.css"
    margin = re.search(r"(?<![-\w])margin\s*:\s*([^;]+);", rule.group(1))
    assert margin, "the @page rule sets no margin"
    parts = margin.group(1).split()
    assert 1 <= len(parts) <= 4 and all(v.endswith("mm") for v in parts), margin.group(1)
    v = [float(x.removesuffix("mm")) * MM for x in parts]
    # CSS shorthand: 1 value for all sides; 2: vertical, horizontal; 3: top, horizontal, bottom; 4: clockwise from the top
    top, right, bottom, left = {1: v * 4, 2: v * 2, 3: v + v[1:2], 4: v}[len(v)]
    return top, right, bottom, left


def pdf_pages(pdftotext: str, pdf: Path) -> list[Page]:
    r = subprocess.run([pdftotext, "-bbox", str(pdf), "-"], capture_output=True, text=True, check=True, timeout=300)
    parser = _BBoxParser()
    parser.feed(r.stdout)
    return parser.pages


def stray_words(page: Page, margins: tuple[float, float, float, float]) -> list[str]:
    """Words outside the printable area of their page, each as 'text (x0, y0, x1, y1)'."""
    top, right, bottom, left = margins
    t = TOLERANCE
    out = []
    for w in page.words:
        within_sides = w.x0 >= left - t and w.x1 <= page.width - right + t
        in_body = w.y0 >= top - t and w.y1 <= page.height - bottom + t
        in_header = 0 <= w.y0 and w.y1 <= top + t
        in_footer = w.y0 >= page.height - bottom - t and w.y1 <= page.height
        if not (within_sides and (in_body or in_header or in_footer)):
            out.append(f"{w.text!r} ({w.x0:.1f}, {w.y0:.1f}, {w.x1:.1f}, {w.y1:.1f})")
    return out


def test_every_word_of_every_demo_pdf_lies_inside_the_printable_area(built: Path) -> None:
    pdftotext = require_executable("pdftotext", "reads the position of every word of a PDF")
    margins = page_margins()
    pdfs = [built / "dossier.pdf"] + [built / "methods" / mid / f"{mid}.pdf" for mid in method_ids()]
    problems = []
    for pdf in pdfs:
        pages = pdf_pages(pdftotext, pdf)
        assert pages and any(p.words for p in pages), f"{pdf.name}: no words read"
        for n, page in enumerate(pages, start=1):
            stray = stray_words(page, margins)
            if stray:
                problems.append(f"{pdf.name} p. {n}: {len(stray)} words outside, e.g. {stray[:3]}")
    assert not problems, "\n".join(problems)


def test_the_margin_check_sees_a_word_past_the_right_margin() -> None:
    """The check itself: a word that crosses the right margin of an A4 page is reported."""
    top, right, bottom, left = margins = page_margins()
    width, height = 210 * MM, 297 * MM
    inside = Word("inside", left, top + 10, width - right, top + 20)
    past = Word("past", width - right - 5, top + 30, width - right + 3 * TOLERANCE, top + 40)
    below = Word("below", left, height - 2, left + 10, height + 5)
    assert stray_words(Page(width, height, [inside]), margins) == []
    assert len(stray_words(Page(width, height, [inside, past, below]), margins)) == 2


class _LineParser(HTMLParser):
    """Text blocks of ``pdftotext -bbox-layout``: per block its width and its lines (width, words)."""

    def __init__(self) -> None:
        super().__init__()
        self.blocks: list[tuple[int, float, list[list]]] = []
        self._page = 0
        self._in_word = False

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        a = {k: v or "" for k, v in attrs}
        if tag == "page":
            self._page += 1
        elif tag == "block":
            self.blocks.append((self._page, float(a["xmax"]) - float(a["xmin"]), []))
        elif tag == "line":
            self.blocks[-1][2].append([float(a["xmax"]) - float(a["xmin"]), []])
        elif tag == "word":
            self._in_word = True

    def handle_endtag(self, tag: str) -> None:
        if tag == "word":
            self._in_word = False

    def handle_data(self, data: str) -> None:
        if self._in_word:
            self.blocks[-1][2][-1][1].append(data)


def test_no_paragraph_breaks_after_its_first_word(built: Path) -> None:
    """A line of one word followed by a full line in the same paragraph is a broken line, not prose.

    (Tick labels of figures are numbers and are not looked at: only a word of letters counts.)
    """
    pdftotext = require_executable("pdftotext", "reads the lines of a PDF")
    found = []
    for pdf in [built / "methods" / mid / f"{mid}.pdf" for mid in method_ids()]:
        out = subprocess.run([pdftotext, "-bbox-layout", str(pdf), "-"], capture_output=True, text=True, check=True, timeout=300).stdout
        parser = _LineParser()
        parser.feed(out)
        for page, width, lines in parser.blocks:
            for (w1, words1), (w2, _) in zip(lines, lines[1:]):
                if width > 100 * MM and len(words1) == 1 and words1[0].isalpha() and w1 < 0.15 * width and w2 > 0.8 * width:
                    found.append(f"{pdf.name} p. {page}: line {words1[0]!r} then a full line")
    assert not found, found
