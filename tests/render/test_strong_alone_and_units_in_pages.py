"""A strong acid alone on its page and in its PDF: its robustness section is titled for
what it is and has its concentration rows; quantities in the inputs table keep their
unit on one line (the PDF's narrow cells broke "mmol/ L")."""

from __future__ import annotations

import re
import shutil
import subprocess
from collections.abc import Iterator
from pathlib import Path

import pytest

from dossier.analysis.method import AnalysisSettings
from dossier.app import BuildOptions
from dossier.app import build_dossier as build_module
from tests.conftest import require_executable

ROOT = Path(__file__).resolve().parents[2]
METHODS = ["hydrochloric-acid-rinse.yaml", "tris-buffer-37c.yaml"]


@pytest.fixture(scope="module")
def dossier(tmp_path_factory: pytest.TempPathFactory) -> Iterator[Path]:
    tmp = tmp_path_factory.mktemp("strong-alone")
    (tmp / "methods").mkdir()
    for n in METHODS:
        shutil.copy(ROOT / "methods" / n, tmp / "methods" / n)
    out = tmp / "output"
    outcome = build_module.build([tmp / "methods"], out, BuildOptions(settings=AnalysisSettings(draws=2000, map_pka=21, map_conc=31), workers=1))
    assert outcome.ok
    yield out


def _pdf_text(pdf: Path) -> str:
    exe = require_executable("pdftotext", "reads the PDFs back")
    return subprocess.run([exe, "-layout", str(pdf), "-"], capture_output=True, text=True, check=True, timeout=120).stdout


def test_a_strong_acid_alone_has_a_robustness_section_with_its_concentration_rows(dossier: Path) -> None:
    page = (dossier / "methods" / "hydrochloric-acid-rinse" / "index.html").read_text(encoding="utf-8")
    assert re.search(r'<h2 id="robustness">Robustness</h2>', page)
    assert "Buffer robustness" not in page
    assert "Concentration of hydrochloric acid: −2&nbsp;%" in page and "Concentration of hydrochloric acid: +2&nbsp;%" in page
    assert 'href="ledger.html#L-rinse/robustness/strong_alone/minus"' in page
    text = _pdf_text(dossier / "methods" / "hydrochloric-acid-rinse" / "hydrochloric-acid-rinse.pdf")
    assert re.search(r"^\s*Robustness \.{3,}", text, re.MULTILINE)  # the contents
    assert "Buffer robustness" not in text


def test_a_buffer_keeps_its_buffer_robustness_title(dossier: Path) -> None:
    page = (dossier / "methods" / "tris-buffer-37c" / "index.html").read_text(encoding="utf-8")
    assert '<h2 id="robustness">Buffer robustness</h2>' in page and "strong_alone" not in page
    assert re.search(r"^\s*Buffer robustness \.{3,}", _pdf_text(dossier / "methods" / "tris-buffer-37c" / "tris-buffer-37c.pdf"), re.MULTILINE)


@pytest.mark.parametrize(("method", "ends"), [("hydrochloric-acid-rinse", ("10 µmol/L", "10 mmol/L")), ("tris-buffer-37c", ("10 mmol/L", "100 mmol/L"))])
def test_quantities_in_the_inputs_table_keep_their_unit_on_one_line(dossier: Path, method: str, ends: tuple[str, str]) -> None:
    text = _pdf_text(dossier / "methods" / method / f"{method}.pdf")
    start = text.index("Inputs and their sources\n")
    inputs = text[start:text.index("How to make it\n", start)]
    # a unit cut after its "/" at the end of a cell's line
    assert not re.search(r"mol/(?=\s{2}|\s*$)", inputs, re.MULTILINE), inputs
    for q in ends:  # each end of the working range whole, its number with its unit
        assert re.search(rf"(?<![\d.]){re.escape(q)}", inputs), (q, inputs)
    page = (dossier / "methods" / method / "index.html").read_text(encoding="utf-8")
    assert f'<span class="q">{ends[0]}</span> – <span class="q">{ends[1]}</span>' in page
