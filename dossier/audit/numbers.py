"""Every published number, read back and compared with the re-computed one.

``dossier verify`` re-computes each method from its ledger's recorded
inputs. This module compares what the dossier *shows* with that
re-computation, wherever it shows it:

- **data files** (``results.json``, the CSV tables): every value against the
  same file made afresh from the re-computed analysis (numbers within a
  relative 1e-9, words exactly), named by JSON path or CSV row and column;
- **pages**: every number that links to its ledger entry
  (``…ledger.html#L-ID``) and every value of the ledger page, at the
  precision shown (a number shown with three decimals must be the
  re-computed one rounded to three decimals, units such as mmol/L and % converted);
- **PDFs**: every number of the body that links to its ledger entry (a link
  annotation whose named destination is ``METHOD-L-ID``; the words inside its
  rectangle), and every value of the "Calculation ledger" appendix (each row
  from its entry id to the next), at the precision shown; both from one
  ``pdftotext -bbox-layout`` reading of the PDF (:func:`read_pdf_pages`:
  the words with their positions, grouped in blocks and lines).

Each difference is a :class:`Mismatch`: file, place, and the message with both
values (the one record of :mod:`dossier.audit.verify` too).
"""

from __future__ import annotations

import csv
import html
import io
import json
import math
import re
import shutil
import subprocess
from collections.abc import Callable, Iterator, Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any

__all__ = ["Mismatch", "close", "REL_TOL", "ABS_TOL", "compare_json", "pdf_linked_numbers", "read_pdf_pages", "PdfPage", "PdfTextUnavailable", "compare_csv", "compare_workbook", "parse_shown", "shown_matches", "page_numbers", "ledger_lines"]

REL_TOL = 1e-9
ABS_TOL = 1e-12


@dataclass(frozen=True)
class Mismatch:
    """One thing of a dossier that does not match: the file, the place in it
    (a JSON path, a CSV line and column, a sheet and cell, a PDF page and
    entry; empty for the whole file) and the message with both values."""

    file: str
    place: str
    message: str

    def __str__(self) -> str:
        where = f"{self.file}: {self.place}" if self.place else self.file
        return f"{where}: {self.message}"


def close(a: float, b: float) -> bool:
    """Two numbers of a data file are the same: within :data:`REL_TOL` relative (:data:`ABS_TOL` near zero), or both NaN."""
    if math.isnan(a) and math.isnan(b):
        return True
    return math.isclose(a, b, rel_tol=REL_TOL, abs_tol=ABS_TOL)


# ---------------------------------------------------------------- data files
def compare_json(file: str, shown: Any, fresh: Any, place: str = "") -> Iterator[Mismatch]:
    """Every value of the published JSON ``shown`` against ``fresh`` (same structure expected)."""
    where = place or "(top)"
    if isinstance(fresh, dict):
        if not isinstance(shown, dict):
            yield Mismatch(file, where, f"shows {_short(shown)}, re-computed an object")
            return
        for k in fresh.keys() | shown.keys():
            sub = f"{place}.{k}" if place else k
            if k not in shown:
                yield Mismatch(file, sub, "missing (the re-computation has it)")
            elif k not in fresh:
                yield Mismatch(file, sub, f"shows {_short(shown[k])}, which the re-computation does not have")
            else:
                yield from compare_json(file, shown[k], fresh[k], sub)
    elif isinstance(fresh, list):
        if not isinstance(shown, list) or len(shown) != len(fresh):
            yield Mismatch(file, where, f"shows {_short(shown)}, re-computed {_short(fresh)}")
            return
        for i, (s, f) in enumerate(zip(shown, fresh)):
            yield from compare_json(file, s, f, f"{place}[{i}]")
    elif isinstance(fresh, bool) or fresh is None or isinstance(fresh, str):
        if shown != fresh:
            yield Mismatch(file, where, f"shows {_short(shown)}, re-computed {_short(fresh)}")
    elif isinstance(fresh, (int, float)):
        if isinstance(shown, bool) or not isinstance(shown, (int, float)) or not close(float(shown), float(fresh)):
            yield Mismatch(file, where, f"shows {_short(shown)}, re-computed {fresh!r}")


def _short(v: Any) -> str:
    text = json.dumps(v, ensure_ascii=False) if not isinstance(v, float) else repr(v)
    return text if len(text) <= 60 else text[:57] + "…"


def compare_csv(file: str, shown: str, fresh: str) -> Iterator[Mismatch]:
    """Every cell of a published CSV table against the same table made afresh."""
    a, b = list(csv.reader(io.StringIO(shown))), list(csv.reader(io.StringIO(fresh)))
    if not a or not b or a[0] != b[0]:
        yield Mismatch(file, "header", f"shows {a[0] if a else []}, re-computed {b[0] if b else []}")
        return
    header = b[0]
    if len(a) != len(b):
        yield Mismatch(file, "rows", f"shows {len(a) - 1} rows, re-computed {len(b) - 1}")
    for r, (row_a, row_b) in enumerate(zip(a[1:], b[1:]), start=2):
        for c, name in enumerate(header):
            x = row_a[c] if c < len(row_a) else ""
            y = row_b[c] if c < len(row_b) else ""
            if x == y:
                continue
            try:
                same = close(float(x), float(y))
            except ValueError:
                same = False
            if not same:
                yield Mismatch(file, f"line {r}, column {name}", f"shows {x!r}, re-computed {y!r}")


def compare_workbook(file: str, shown: bytes, fresh: bytes) -> Iterator[Mismatch]:
    """Every cell of every sheet of a published workbook against the same workbook made afresh."""
    from openpyxl import load_workbook

    try:
        a = load_workbook(io.BytesIO(shown), read_only=True, data_only=True)
    except Exception as exc:  # noqa: BLE001 - any damage of the file is a finding, not a crash
        yield Mismatch(file, "", f"cannot be read as a workbook: {type(exc).__name__}: {exc}")
        return
    b = load_workbook(io.BytesIO(fresh), read_only=True, data_only=True)
    if a.sheetnames != b.sheetnames:
        yield Mismatch(file, "sheets", f"shows {a.sheetnames}, re-computed {b.sheetnames}")
        return
    for name in b.sheetnames:
        rows_a, rows_b = list(a[name].iter_rows(values_only=True)), list(b[name].iter_rows(values_only=True))
        if len(rows_a) != len(rows_b):
            yield Mismatch(file, f"sheet {name}", f"shows {len(rows_a)} rows, re-computed {len(rows_b)}")
        for r, (ra, rb) in enumerate(zip(rows_a, rows_b), start=1):
            for c, (x, y) in enumerate(zip(ra, rb)):
                same = x == y or (isinstance(x, (int, float)) and isinstance(y, (int, float)) and not isinstance(x, bool) and close(float(x), float(y)))
                if not same:
                    yield Mismatch(file, f"sheet {name}, cell {_column(c)}{r}", f"shows {x!r}, re-computed {y!r}")


def _column(index: int) -> str:
    name = ""
    index += 1
    while index:
        index, rest = divmod(index - 1, 26)
        name = chr(65 + rest) + name
    return name


# ---------------------------------------------------------------- numbers as people read them
_SUPERSCRIPT = str.maketrans("⁰¹²³⁴⁵⁶⁷⁸⁹⁻⁺", "0123456789-+")
_SHOWN = re.compile(r"^\s*([-+]?)(\d+)(?:\.(\d+))?(?:\s*[×x]\s*10([⁻⁺]?[⁰¹²³⁴⁵⁶⁷⁸⁹]+|\^?[-+]?\d+))?(?:[eE]([-+]?\d+))?\s*(.*?)\s*$")
_BARE_POWER = re.compile(r"^\s*([-+]?)10([⁻⁺]?[⁰¹²³⁴⁵⁶⁷⁸⁹]+)\s*(.*?)\s*$")
_UNITS = {"": 1.0, "%": 0.01, "mol/L": 1.0, "mmol/L": 1e-3, "µmol/L": 1e-6, "μmol/L": 1e-6, "nmol/L": 1e-9,
          "pH": 1.0, "pKa": 1.0, "mol/kg": 1.0, "mmol/kg": 1e-3}


def parse_shown(text: str) -> tuple[float, float] | None:
    """A number as a page shows it → (value in the ledger's unit, half a unit of its last digit).

    Understands the minus sign U+2212, ``1.28 × 10⁻¹⁰``, ``1.28e-10``, and the
    units mol/L, mmol/L, µmol/L, nmol/L, % (converted); None for text that is
    not one number (``< 0.1 %``, a range, words).

    >>> parse_shown("\u22120.0250")
    (-0.025, 5e-05)
    >>> parse_shown("5 mmol/L")
    (0.005, 0.0005)

    A power of ten written alone ("10⁻¹²⁹ %", as one significant digit of
    1.39 × 10⁻¹²⁹ % is written) shows the digit 1: half a unit of it is half
    the power.

    >>> parse_shown("10⁻³")
    (0.001, 0.0005)
    """
    t = html.unescape(text).replace("\u2212", "-").replace("\u2009", " ").replace("\u00a0", " ").replace("\u202f", " ")
    bare = _BARE_POWER.match(t)
    if bare is not None:  # "10⁻¹⁰": a power of ten written alone, the digit 1 with no decimals
        sign, power, unit = bare.groups()
        if unit not in _UNITS:
            return None
        value = float(f"{sign}1e{power.translate(_SUPERSCRIPT)}") * _UNITS[unit]
        return value, 0.5 * abs(value)
    m = _SHOWN.match(t)
    if m is None:
        return None
    sign, whole, frac, power, e_power, unit = m.groups()
    if unit not in _UNITS:
        return None
    exponent = 0
    if power is not None:
        exponent = int(power.translate(_SUPERSCRIPT).lstrip("^"))
    elif e_power is not None:
        exponent = int(e_power)
    decimals = len(frac or "")
    factor = _UNITS[unit] * 10.0**exponent
    value = float(f"{sign}{whole}.{frac or '0'}") * factor
    return value, 0.5 * 10.0**-decimals * factor


def shown_matches(text: str, fresh: float) -> bool | None:
    """Is ``fresh`` what ``text`` shows, at the precision shown? None when ``text`` is not one number."""
    parsed = parse_shown(text)
    if parsed is None:
        return None
    value, half = parsed
    if math.isnan(fresh):
        return False
    return abs(value - fresh) <= half * (1 + 1e-9) + 1e-300


# ---------------------------------------------------------------- where pages and PDFs show numbers
_LINK = re.compile(r'<a\b[^>]*\bhref="([^"#]*ledger\.html)#L-([^"]+)"[^>]*>(.*?)</a>', re.S)
_LEDGER_ROW = re.compile(r'<tr id="L-([^"]+)">.*?<td class="n">(.*?)</td>', re.S)
_TAGS = re.compile(r"<[^>]+>")


def page_numbers(page: str, text: str) -> Iterator[tuple[str, str, str]]:
    """(ledger page path, entry id, shown text) of every number a page links to its
    ledger entry, and of every value row of a ledger page. Paths are relative to the dossier."""
    folder = page.rsplit("/", 1)[0] + "/" if "/" in page else ""
    for href, eid, inner in _LINK.findall(text):
        yield _join(folder, href), html.unescape(eid), _TAGS.sub("", inner).strip()
    if page.endswith("/ledger.html"):
        for eid, inner in _LEDGER_ROW.findall(text):
            yield page, html.unescape(eid), _TAGS.sub("", inner).strip()


def _join(folder: str, href: str) -> str:
    parts = [p for p in (folder + href).split("/") if p not in ("", ".")]
    out: list[str] = []
    for p in parts:
        if p == "..":
            if out:
                out.pop()
        else:
            out.append(p)
    return "/".join(out)


_TOKEN_NUMBER = re.compile(r"(?<!\S)([-+\u2212]?(?:\d+(?:\.\d+)?(?: [×x] 10[⁻⁺]?[⁰¹²³⁴⁵⁶⁷⁸⁹]+)?|10[⁻⁺]?[⁰¹²³⁴⁵⁶⁷⁸⁹]+))(?!\S)")


_FURNITURE = re.compile(r"^((dossier )?page \d+ of \d+|Dossier fingerprint .*|.* · revision .*|pH calculation dossier.*)$")
"""Lines of a PDF page that are no part of its body: page numbers, the fingerprint line, running headers."""


def ledger_lines(page_text: str, units: Mapping[str, str]) -> Iterator[tuple[str, str]]:
    """(entry id, shown value) of each ledger row on a PDF page's text (the
    "Calculation ledger" appendix: entry id, quantity, value, unit, equation).

    The text is the page's as :func:`read_pdf_pages` gives it (the table's cells
    row by row, each cell's lines wrapped as they are printed): lines
    broken after "/" or "-" are joined, the rest become spaces, page numbers,
    headers and the fingerprint line are left out; each row runs from its
    entry id to the next; its value is the last number of the row that stands
    alone and is followed by the entry's unit (``units``: entry id → unit).
    """
    ids = units
    body = "\n".join(line for line in page_text.splitlines() if not _FURNITURE.match(line.strip()))
    flat = re.sub(r"([/-])\n", r"\1", body).replace("\n", " ")
    pattern = re.compile(r"(?<!\S)(" + "|".join(re.escape(i) for i in sorted(ids, key=len, reverse=True)) + r")(?!\S)") if ids else None
    if pattern is None:
        return
    hits = list(pattern.finditer(flat))
    for k, hit in enumerate(hits):
        row = flat[hit.end(): hits[k + 1].start() if k + 1 < len(hits) else len(flat)]
        unit = units[hit.group(1)].replace(" ", "")
        found = [m.group(1) for m in _TOKEN_NUMBER.finditer(row) if row[m.end():].replace(" ", "").startswith(unit)]
        if found:
            yield hit.group(1), found[-1]


class PdfTextUnavailable(RuntimeError):
    """pdftotext (poppler-utils), which reads the words of a PDF with their positions, is not installed."""


_PAGE = re.compile(r'<page width="[\d.]+" height="([\d.]+)">(.*?)</page>', re.S)
_PARTS = re.compile(r'<block xMin="([\d.]+)" yMin="([\d.]+)"|<(line) |<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">([^<]*)</word>')
"""The start of each block and line and each word of a page of ``pdftotext -bbox-layout``, in one pass."""
_ROW_TOLERANCE = 3.0
"""Blocks whose tops lie within this many points are one row of a page (the cells of a table
row start within a few hundredths of a point of each other; rows are a line, about 10 pt, apart)."""


@dataclass(frozen=True)
class PdfPage:
    """One page of a PDF as ``pdftotext -bbox-layout`` reads it (through the fonts' ToUnicode
    maps, as a reader sees it).

    ``text``: the page's blocks (a table cell, a paragraph, a running header) row by row from
    the top, left to right within a row, each block's lines on lines of their own, words
    joined by a space. ``words``: every word with the centre of its box (x, y in points, y
    upwards from the page's bottom edge as PDF coordinates are).
    """

    number: int
    text: str
    words: tuple[tuple[float, float, str], ...]


def read_pdf_pages(path: Path) -> list[PdfPage]:
    """Every page of a PDF, its text and its words with their positions, in one ``pdftotext -bbox-layout`` run.

    Raises
    ------
    PdfTextUnavailable
        When pdftotext is not installed.
    ValueError
        When pdftotext cannot read the PDF (the message says why).
    """
    exe = shutil.which("pdftotext")
    if exe is None:
        raise PdfTextUnavailable("pdftotext (poppler-utils) is not installed")
    try:
        run = subprocess.run([exe, "-bbox-layout", str(path), "-"], capture_output=True, timeout=600, check=True)
    except (OSError, subprocess.SubprocessError) as exc:
        raise ValueError(f"pdftotext cannot read it: {exc}") from None
    return [_page(n, float(height), body) for n, (height, body) in enumerate(_PAGE.findall(run.stdout.decode("utf-8", "replace")), start=1)]


def _page(n: int, height: float, body: str) -> PdfPage:
    """One ``<page>`` element of pdftotext's output: its blocks in rows, and its words."""
    blocks: list[tuple[float, float, list[list[str]]]] = []  # top, left, lines of words
    words: list[tuple[float, float, str]] = []
    for bx, by, line, x0, y0, x1, y1, w in _PARTS.findall(body):
        if bx:
            blocks.append((float(by), float(bx), []))
        elif line:
            if blocks:
                blocks[-1][2].append([])
        elif blocks and blocks[-1][2]:
            word = html.unescape(w) if "&" in w else w
            words.append((0.5 * (float(x0) + float(x1)), height - 0.5 * (float(y0) + float(y1)), word))
            blocks[-1][2][-1].append(word)
    blocks.sort(key=lambda b: (b[0], b[1]))
    rows: list[list[tuple[float, float, list[list[str]]]]] = []
    for block in blocks:
        if rows and block[0] - rows[-1][0][0] <= _ROW_TOLERANCE:
            rows[-1].append(block)
        else:
            rows.append([block])
    text = "\n".join("\n".join(" ".join(line) for line in lines) for row in rows for _, _, lines in sorted(row, key=lambda b: b[1]))
    return PdfPage(n, text, tuple(words))


def pdf_linked_numbers(path: Path, wanted: Callable[[str], bool] = lambda dest: True, reader: Any = None,
                       pages: list[PdfPage] | None = None) -> Iterator[tuple[int, str, str]]:
    """(page number, named destination, shown text) of every link of a PDF's body
    whose named destination is ``wanted``.

    The link annotations and their named destinations are read with pypdf
    (``reader``: a ``PdfReader`` of ``path`` already open, else one is opened);
    the words each link's rectangle covers (a word counts when its centre is
    inside) from ``pages`` (:func:`read_pdf_pages` of ``path``, read when not
    given), which reads the text as a reader sees it (through the fonts'
    ToUnicode maps). A link broken over two lines is two annotations with one
    destination: their words are joined.

    Raises
    ------
    PdfTextUnavailable
        When pdftotext is not installed.
    ValueError
        When the PDF cannot be read (the message says why).
    """
    from pypdf import PdfReader
    from pypdf.errors import PdfReadError
    from pypdf.generic import ArrayObject

    if pages is None:
        pages = read_pdf_pages(path)
    links: dict[int, list[tuple[str, tuple[float, float, float, float]]]] = {}
    try:
        for n, page in enumerate((reader or PdfReader(path)).pages, start=1):
            for ref in page.get("/Annots", None) or ArrayObject():
                a = ref.get_object()
                dest, rect = a.get("/Dest"), a.get("/Rect")
                if a.get("/Subtype") == "/Link" and isinstance(dest, str) and rect is not None and wanted(str(dest)):
                    x0, y0, x1, y1 = (float(v) for v in rect)
                    links.setdefault(n, []).append((str(dest), (min(x0, x1), min(y0, y1), max(x0, x1), max(y0, y1))))
    except (PdfReadError, ValueError, KeyError, TypeError, OSError) as exc:
        raise ValueError(f"cannot read the links: {type(exc).__name__}: {exc}") from None
    for page in pages:
        if page.number in links:
            yield from _linked_words(page.number, page.words, links[page.number])


def _linked_words(n: int, words: tuple[tuple[float, float, str], ...], found: list[tuple[str, tuple[float, float, float, float]]]) -> Iterator[tuple[int, str, str]]:
    """The words (centre x, centre y, text) inside each link's rectangle on page ``n``."""
    groups: list[tuple[str, float, list[str]]] = []  # destination, bottom of its last line, words
    for dest, (x0, y0, x1, y1) in found:
        inside = [w for x, y, w in words if x0 <= x <= x1 and y0 <= y <= y1]
        if groups and groups[-1][0] == dest and y1 <= groups[-1][1] + 1.0:  # the same link, wrapped to the next line
            groups[-1] = (dest, y0, groups[-1][2] + inside)
        else:
            groups.append((dest, y0, inside))
    for dest, _, inside in groups:
        yield n, dest, " ".join(inside).strip(";,:()")
