"""Real PDFs: text extracted with pypdf, every page rendered by pdftoppm, none blank."""

from __future__ import annotations

import re
import subprocess
from pathlib import Path

import pytest
from pypdf import PdfReader

from ..conftest import require_executable
from .conftest import method_ids, statuses

VERDICTS = ("meets the criterion", "restricted range", "does not meet it")  # the words of dossier.render.prose


def text_of(path: Path) -> tuple[str, int]:
    reader = PdfReader(str(path))
    return "\n".join(page.extract_text() or "" for page in reader.pages), len(reader.pages)


def test_dossier_pdf_holds_every_method_verdict_and_page_numbers(built: Path) -> None:
    text, pages = text_of(built / "dossier.pdf")
    for mid in method_ids():
        assert mid in text, mid
    words = dict(zip(("pass", "conditional", "fail"), VERDICTS))
    for status in statuses(built):
        assert words[status] in " ".join(text.split()), status
    assert f"page 1 of {pages}" in text and f"page {pages} of {pages}" in text
    assert "Contents" in text and "Signatures" in text and "Approved" in text
    assert "does not replace measurement" in text


def test_every_dossier_page_carries_its_dossier_page_number(built: Path) -> None:
    reader = PdfReader(str(built / "dossier.pdf"))
    total = len(reader.pages)
    for n, page in enumerate(reader.pages, start=1):
        stamps = re.findall(r"dossier page (\d+) of (\d+)", page.extract_text() or "")
        assert stamps == [(str(n), str(total))], (n, stamps)


def test_dossier_contents_name_the_page_where_each_report_starts(built: Path) -> None:
    reader = PdfReader(str(built / "dossier.pdf"))
    contents = reader.pages[1].extract_text() or ""
    assert "Contents" in contents
    for mid in method_ids():
        found = re.search(rf"{re.escape(mid)} — .*?\.{{3,}} ?(\d+)", contents, re.S)
        assert found, mid
        start = int(found.group(1))
        cover = reader.pages[start - 1].extract_text() or ""
        assert f"Method {mid}, revision" in cover, (mid, start)
        assert "page 1 of" in cover.replace(f"dossier page {start} of", "")  # the report's own numbering starts again


def test_dossier_links_and_outline_resolve(built: Path) -> None:
    reader = PdfReader(str(built / "dossier.pdf"))
    names = reader.named_destinations
    index = {p.indirect_reference.idnum: i for i, p in enumerate(reader.pages)}
    from_contents = set()
    for i, page in enumerate(reader.pages):
        for ref in page.get("/Annots") or []:
            annot = ref.get_object()
            if annot.get("/Subtype") != "/Link":
                continue
            assert "/A" not in annot, f"page {i + 1}: a link that is not to a page of the dossier: {annot['/A']}"
            dest = annot["/Dest"]
            if isinstance(dest, str):
                assert dest in names, f"page {i + 1}: link to a missing destination {dest!r}"
            else:
                assert dest[0].idnum in index, f"page {i + 1}: link to a page outside the dossier"
                if i == 1:
                    from_contents.add(index[dest[0].idnum])
    covers = {mid: next(j for j in sorted(from_contents) if f"Method {mid}, revision" in (reader.pages[j].extract_text() or "")) for mid in method_ids()}
    assert len(set(covers.values())) == len(method_ids())
    assert len(reader.pages) - 1 in from_contents  # the dossier's signature page
    titles = [item["/Title"] for item in reader.outline if not isinstance(item, list)]
    for mid in method_ids():
        assert any(t.startswith(f"{mid} — ") for t in titles), mid


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


@pytest.mark.pdf_pages
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


def test_the_cautions_stand_once_in_each_report_on_its_cover(built: Path) -> None:
    from dossier.render.html import CAUTIONS

    def pages_of(pdf: Path) -> list[str]:
        return [" ".join((p.extract_text() or "").split()) for p in PdfReader(str(pdf)).pages]

    for mid in method_ids():
        texts = pages_of(built / "methods" / mid / f"{mid}.pdf")
        for caution in CAUTIONS:
            assert [t.count(caution) for t in texts] == [1] + [0] * (len(texts) - 1), (mid, caution)
    texts = pages_of(built / "dossier.pdf")
    for caution in CAUTIONS:
        counts = [t.count(caution) for t in texts]
        assert max(counts) == 1 and sum(counts) == len(method_ids()) + 1, caution  # each report's cover and the dossier's


def test_every_demo_pdf_is_archival_with_its_fonts_embedded_and_method_files_attached(built: Path) -> None:
    """PDF/A-3b as far as tests/pdfa.py reads it (XMP part 3 / conformance B, output intent,
    identifier, printable annotations, associated files), a structure qpdf reads without a
    warning, every font embedded by pdffonts (poppler-utils), and the method files attached:
    a report its own, dossier.pdf every one."""
    from ..pdfa import archival_problems, qpdf_problems, unembedded_fonts

    pdffonts = require_executable("pdffonts", "lists the PDFs' fonts")
    sources = {f"{mid}.yaml": (built / "methods" / mid / f"{mid}.yaml").read_bytes() for mid in method_ids()}
    pdfs = {built / "dossier.pdf": sources} | {built / "methods" / mid / f"{mid}.pdf": {f"{mid}.yaml": sources[f"{mid}.yaml"]} for mid in method_ids()}
    for pdf, attached in pdfs.items():
        assert archival_problems(pdf) == [], pdf.name
        assert qpdf_problems(pdf) == [], pdf.name  # the stamp's incremental update included
        assert unembedded_fonts(pdf, pdffonts) == [], pdf.name
        assert {name: data[0] for name, data in PdfReader(str(pdf)).attachments.items()} == attached, pdf.name
