"""Real PDFs: text extracted with pypdf, every page rendered by pdftoppm, none blank."""

from __future__ import annotations

import re
import subprocess
from pathlib import Path

import pytest
from pypdf import PdfReader

from ..conftest import require_executable
from .conftest import method_ids

VERDICTS = ("pass", "conditional", "fail")


def text_of(path: Path) -> tuple[str, int]:
    reader = PdfReader(str(path))
    return "\n".join(page.extract_text() or "" for page in reader.pages), len(reader.pages)


def test_dossier_pdf_holds_every_method_verdict_and_page_numbers(built: Path) -> None:
    text, pages = text_of(built / "dossier.pdf")
    for mid in method_ids():
        assert mid in text, mid
    for word in VERDICTS:
        assert word in text
    assert f"page 1 of {pages}" in text and f"page {pages} of {pages}" in text
    assert "Contents" in text and "Signatures" in text and "Approved" in text
    assert "does not replace measurement" in text


@pytest.mark.parametrize("mid", method_ids())
def test_method_pdf(built: Path, mid: str) -> None:
    text, pages = text_of(built / "methods" / mid / f"{mid}.pdf")
    assert mid in text
    assert re.search(r"revision \S+", text)
    assert any(word in text for word in VERDICTS)
    for n in range(1, pages + 1):
        assert f"page {n} of {pages}" in text
    assert "Prepared" in text and "Reviewed" in text and "Approved" in text


def _pgm_pixels(data: bytes) -> tuple[int, int, bytes]:
    """Width, height and pixels of a binary PGM (P5, maxval 255)."""
    parts = re.match(rb"P5\s+(\d+)\s+(\d+)\s+(\d+)\s", data)
    assert parts, data[:20]
    w, h = int(parts.group(1)), int(parts.group(2))
    return w, h, data[parts.end():]


def test_every_page_renders_and_none_is_blank(built: Path, tmp_path: Path) -> None:
    pdftoppm = require_executable("pdftoppm", "renders PDF pages")
    pdfs = [built / "dossier.pdf"] + [built / "methods" / mid / f"{mid}.pdf" for mid in method_ids()]
    for pdf in pdfs:
        pages = len(PdfReader(str(pdf)).pages)
        prefix = tmp_path / pdf.stem
        subprocess.run([pdftoppm, "-r", "24", "-gray", str(pdf), str(prefix)], check=True, timeout=300)
        images = sorted(tmp_path.glob(f"{pdf.stem}-*.pgm"))
        assert len(images) == pages, pdf
        for img in images:
            w, h, px = _pgm_pixels(img.read_bytes())
            dark = sum(1 for b in px if b < 200)
            assert dark > 0.002 * w * h, f"{img.name} looks blank"
            img.unlink()
