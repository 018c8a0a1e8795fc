"""The words and numbers a reader meets on the demo pages and PDFs.

- Components are named by the form as added (compound and formula from the
  substance table) and the substance's name, never by its id or "(1)", "(2)".
- Every "GUM validated" cell is explained, and the page says which result the
  verdict used (JCGM 101:2008 §8 for the comparison itself).
- Displayed numbers use one minus sign (U+2212); results.json and the CSV
  tables keep plain numbers.
"""

from __future__ import annotations

import csv
import io
import json
import re
import subprocess
import xml.etree.ElementTree as ET
from html.parser import HTMLParser
from pathlib import Path

from dossier.analysis.montecarlo import Comparison
from dossier.inputs.substances import load_table
from dossier.render.html import environment

from ..conftest import require_executable
from .conftest import method_ids

# a hyphen-minus that starts a number ("-0.025", " -7.9", "(-2"), or an exponent
# written the programmer's way ("1e-10"); not a hyphen inside a word or an id
# ("QC-M-0042", "2024-05-01", "phosphate-buffer-hh")
HYPHEN_NUMBER = re.compile(r"(?<![\w\-/#:.])-(?=\.?\d)|\de[-+]\d")


class _Text(HTMLParser):
    """The text a reader sees: no tags, scripts or styles; attribute values left out."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.parts: list[str] = []
        self._skip = 0

    def handle_starttag(self, tag: str, attrs: list) -> None:  # noqa: ARG002
        if tag in ("script", "style"):
            self._skip += 1

    def handle_endtag(self, tag: str) -> None:
        if tag in ("script", "style"):
            self._skip -= 1

    def handle_data(self, data: str) -> None:
        if not self._skip:
            self.parts.append(data)


def page_text(path: Path) -> str:
    parser = _Text()
    parser.feed(path.read_text(encoding="utf-8"))
    return " ".join(parser.parts)


def hyphen_numbers(text: str) -> list[str]:
    return [text[max(0, m.start() - 40): m.end() + 15] for m in HYPHEN_NUMBER.finditer(text)]


def test_the_check_sees_a_hyphen_minus_number_and_passes_ids() -> None:
    # the pattern the page test relies on, on both sides of the line
    assert hyphen_numbers("error at the nominal composition -0.025 pH")
    assert hyphen_numbers("ΔH° -7.9 kJ/mol") and hyphen_numbers("swept over 1e-10 mol/L")
    assert not hyphen_numbers("method QC-M-0042 built 2024-05-01, phosphate-buffer-hh, error −0.025, 10⁻¹⁰")


def test_no_page_writes_a_number_with_a_hyphen_minus(built: Path) -> None:
    pages = sorted(built.rglob("*.html"))
    assert len(pages) >= 2 * len(method_ids()) + 4
    found = {str(p.relative_to(built)): hits for p in pages if (hits := hyphen_numbers(page_text(p)))}
    assert not found, found
    # and the pages do show negative numbers, with the minus sign
    assert "−" in page_text(built / "methods" / "benzoate-extract" / "index.html")


def pdf_text(built: Path, mid: str) -> str:
    exe = require_executable("pdftotext", "reads the text of the PDF reports")
    pdf = built / "methods" / mid / f"{mid}.pdf"
    return subprocess.run([exe, "-enc", "UTF-8", str(pdf), "-"], capture_output=True, text=True, check=True, timeout=120).stdout


def figure_texts(built: Path, mid: str) -> set[str]:
    """Every text element of the method's figures (their numbers are the figures' own
    concern, tested with dossier/render/figures.py)."""
    out = set()
    for svg in (built / "methods" / mid / "figures").glob("*.svg"):
        for el in ET.parse(svg).getroot().iter("{http://www.w3.org/2000/svg}text"):
            out.add(" ".join("".join(el.itertext()).split()))
    return out


def report_text(built: Path, mid: str) -> str:
    """The PDF's text without the lines its figures drew."""
    figures = figure_texts(built, mid)
    assert figures, mid
    return "\n".join(line for line in pdf_text(built, mid).splitlines() if " ".join(line.split()) not in figures)


def test_no_method_pdf_writes_a_number_with_a_hyphen_minus(built: Path) -> None:
    found = {mid: hits for mid in method_ids() if (hits := hyphen_numbers(report_text(built, mid)))}
    assert not found, found
    assert "−" in report_text(built, "benzoate-extract")


def test_results_json_and_csv_keep_plain_numbers(built: Path) -> None:
    root = built / "methods" / "benzoate-extract"
    raw = (root / "results.json").read_text(encoding="utf-8")
    doc = json.loads(raw)
    ap = doc["solutions"][0]["approximations"][0]
    assert isinstance(ap["error"], float) and ap["error"] < 0
    assert isinstance(ap["monte_carlo"]["error_coverage"][0], float)
    assert f'"error": {ap["error"]!r}' in raw  # written as a JSON number, hyphen-minus and all
    rows = list(csv.DictReader(io.StringIO((root / "sensitivity.csv").read_text(encoding="utf-8"))))
    from dossier.render.workbooks import HEADER_UNITS  # the headers carry their units

    coefficient = HEADER_UNITS["coefficient"]
    negative = [r[coefficient] for r in rows if r[coefficient].startswith("-")]
    assert negative and all(float(v) < 0 for v in negative)
    assert not any("−" in v for r in rows for k, v in r.items() if k in (HEADER_UNITS[n] for n in ("u", "coefficient", "contribution")))


def test_components_are_named_by_form_as_added_and_substance(built: Path) -> None:
    page = page_text(built / "methods" / "phosphate-buffer-hh" / "index.html")
    # the two forms of the substance table's phosphoric acid, with their formulas
    assert "potassium dihydrogen phosphate, KH₂PO₄" in page
    assert "disodium hydrogen phosphate (anhydrous), Na₂HPO₄" in page
    assert "concentration of potassium dihydrogen phosphate, KH₂PO₄" in page  # the contributions table
    assert "pKa2 of phosphoric acid" in page
    ledger = page_text(built / "methods" / "phosphate-buffer-hh" / "ledger.html")
    assert "total of potassium dihydrogen phosphate, KH₂PO₄" in ledger
    # no substance id or numbered form in the prose of any method page or ledger
    ids = [s for s in load_table().substances if "-" in s]
    for mid in method_ids():
        for name in ("index.html", "ledger.html"):
            text = page_text(built / "methods" / mid / name)
            # a substance id as a word of its own (a method id may contain one: citric-acid-solution)
            assert not [i for i in ids if re.search(rf"(?<![\w-]){i}(?![\w-])", text)], (mid, name)
            assert not re.search(r"\w \(\d\)", text), (mid, name, re.search(r".{30}\w \(\d\)", text))


def test_every_gum_validated_cell_is_explained(built: Path) -> None:
    seen = {True: 0, False: 0}
    for mid in method_ids():
        doc = json.loads((built / "methods" / mid / "results.json").read_text(encoding="utf-8"))
        flags = []
        for sol in doc["solutions"]:
            flags.append(sol["exact"]["gum_vs_monte_carlo"]["validated"])
            flags += [ap["gum_vs_monte_carlo"]["validated"] for ap in sol["approximations"] if ap["claimed"]]
        claimed = sum(1 for sol in doc["solutions"] for ap in sol["approximations"] if ap["claimed"])
        text = page_text(built / "methods" / mid / "index.html")
        # one statement per comparison on the page, matching its outcome
        assert text.count("GUM validated: the GUM interval") == flags.count(True), mid
        assert text.count("GUM not validated: the GUM interval") == flags.count(False), mid
        assert text.count("The Monte Carlo interval is the result to use") == flags.count(False), mid
        assert text.count("The verdict's conformity probability rests on the uncertainty of the exact pH") == claimed, mid
        for f in flags:
            seen[f] += 1
    assert seen[False], seen  # at the test's 20,000 draws no comparison is validated


def test_the_gum_statement_follows_the_comparison() -> None:
    # the validated wording, which the demo at 20,000 draws does not reach, from the same template
    macros = environment().get_template("_macros.html").module
    for validated in (True, False):
        cmp = Comparison((7.0, 7.1), (7.0, 7.1), 0.0004, 0.0002, 0.0005 if validated else 0.0001, validated)
        text = str(macros.gum_check(cmp, "the exact pH", False))
        assert ("was confirmed by" in text) is validated and ("was not confirmed by" in text) is not validated
        assert ("The Monte Carlo interval is the result to use" in text) is not validated
        assert "JCGM 101 §8" in text and "The verdict" not in text
        assert "conformity probability rests on the uncertainty of the exact pH" in str(macros.gum_check(cmp, "the shortcut's error", True))


def test_the_pdf_names_the_forms_and_explains_the_gum_check(built: Path) -> None:
    flat = " ".join(pdf_text(built, "phosphate-buffer-hh").split())
    assert "potassium dihydrogen phosphate, KH₂PO₄" in flat
    assert "disodium hydrogen phosphate (anhydrous), Na₂HPO₄" in flat
    assert "Monte Carlo comparison" in flat and "conformity probability rests on the uncertainty of the exact pH" in flat
