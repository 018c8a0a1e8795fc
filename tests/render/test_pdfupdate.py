"""The incremental update (ISO 32000-1:2008, 7.5.6) on real PDFs: one laid out by
WeasyPrint (object streams, cross-reference stream) and one written by pypdf
(cross-reference table). The update's cross-reference stream is decoded here by
hand and every entry checked against the bytes, because pypdf and poppler both
repair a broken cross-reference quietly and would read a wrong one anyway."""

from __future__ import annotations

import io
import re
import shutil
import subprocess
import zlib

import pytest
from pypdf import PdfReader, PdfWriter
from pypdf.generic import ArrayObject, ByteStringObject, DictionaryObject, IndirectObject, NameObject, NumberObject, TextStringObject

from dossier.render.pdfupdate import Update
from tests.pdfa import qpdf_problems


def _weasyprint_pdf() -> bytes:
    from weasyprint import HTML

    return HTML(string="<p>first page</p><p style='break-before: page'>second page</p>").write_pdf()


def _pypdf_pdf() -> bytes:
    writer = PdfWriter()
    writer.add_blank_page(200, 200)
    writer.add_blank_page(200, 200)
    out = io.BytesIO()
    writer.write(out)
    return out.getvalue()


def _last_xref(pdf: bytes) -> tuple[dict, list[tuple[int, int, int, int]]]:
    """The last cross-reference stream of ``pdf``, decoded here: its dictionary's /W, /Index, /Prev, /Size and its rows."""
    at = int(re.search(rb"startxref\s+(\d+)\s+%%EOF\s*$", pdf).group(1))
    head = pdf[at:at + 2000]
    assert re.match(rb"\d+ 0 obj\s*<<", head), "startxref does not point to an object"
    w = [int(x) for x in re.search(rb"/W\s*\[\s*(\d+)\s+(\d+)\s+(\d+)\s*\]", head).groups()]
    index = [int(x) for x in re.search(rb"/Index\s*\[([\d\s]+)\]", head).group(1).split()]
    length = int(re.search(rb"/Length (\d+)", head).group(1))
    start = pdf.index(b"stream\n", at) + len(b"stream\n")
    data = zlib.decompress(pdf[start:start + length])
    size = sum(w)
    numbers = [n for first, count in zip(index[::2], index[1::2]) for n in range(first, first + count)]
    rows = [(n, *(int.from_bytes(data[i * size + sum(w[:k]):i * size + sum(w[:k + 1])], "big") for k in range(3)))
            for i, n in enumerate(numbers)]
    assert len(data) == size * len(numbers)
    fields = {"prev": int(re.search(rb"/Prev (\d+)", head).group(1)), "size": int(re.search(rb"/Size (\d+)", head).group(1))}
    return fields, rows


@pytest.mark.parametrize("make", [_weasyprint_pdf, _pypdf_pdf], ids=["xref-stream", "xref-table"])
def test_an_update_keeps_the_original_bytes_and_points_at_every_object_it_wrote(make) -> None:  # noqa: ANN001
    original = make()
    update = Update(original)
    page = update.reader.pages[1]
    changed = DictionaryObject(page)
    note = update.add(DictionaryObject({NameObject("/Note"): TextStringObject("added")}))
    changed[NameObject("/PieceInfo")] = note
    update.replace(page.indirect_reference, changed)
    out = update.write(ArrayObject([ByteStringObject(b"a" * 16), ByteStringObject(b"b" * 16)]))

    assert out.startswith(original)
    fields, rows = _last_xref(out)
    assert fields["prev"] == int(re.search(rb"startxref\s+(\d+)", original[-64:]).group(1))
    assert fields["size"] == max(n for n, *_ in rows) + 1
    packed = {}
    for n, kind, second, third in rows:
        if kind == 1:  # at byte `second`, generation `third`
            assert out[second:].startswith(f"{n} {third} obj".encode()), f"object {n}: offset {second} is wrong"
        else:  # in object stream `second`, at index `third`
            assert kind == 2
            packed[n] = (second, third)
    assert {page.indirect_reference.idnum, note.idnum} <= set(packed)

    assert qpdf_problems(out) == []
    reader = PdfReader(io.BytesIO(out), strict=True)
    assert reader.pages[1]["/PieceInfo"]["/Note"] == "added"
    if make is _weasyprint_pdf:
        assert "first page" in reader.pages[0].extract_text()
    assert [x.original_bytes for x in reader.trailer["/ID"]] == [b"a" * 16, b"b" * 16]


@pytest.mark.skipif(shutil.which("pdfinfo") is None, reason="needs poppler-utils (pdfinfo)")
def test_poppler_reads_an_updated_pdf_without_complaint() -> None:
    update = Update(_weasyprint_pdf())
    update.add(DictionaryObject({NameObject("/Count"): NumberObject(3)}))
    out = update.write(ArrayObject([ByteStringObject(b"a" * 16), ByteStringObject(b"b" * 16)]))
    run = subprocess.run(["pdfinfo", "-"], input=out, capture_output=True, check=True)
    assert run.stderr == b""  # poppler reports a cross-reference it had to repair as a syntax error here
    assert re.search(rb"Pages:\s+2", run.stdout)


def _references(obj) -> list[IndirectObject]:  # noqa: ANN001
    if isinstance(obj, IndirectObject):
        return [obj]
    if isinstance(obj, dict):
        return [r for v in obj.values() for r in _references(v)]
    if isinstance(obj, list):
        return [r for v in obj for r in _references(v)]
    return []


def test_imported_objects_are_renumbered_into_the_update() -> None:
    source = PdfReader(io.BytesIO(_weasyprint_pdf()))
    update = Update(_pypdf_pdf())
    before = int(update.reader.trailer["/Size"])
    imported = update.imported(source.pages[0]["/Resources"])
    refs = _references(imported)
    assert refs and all(ref.idnum >= before for ref in refs)
    out = update.write(ArrayObject([ByteStringObject(b"a" * 16), ByteStringObject(b"b" * 16)]))
    reader = PdfReader(io.BytesIO(out), strict=True)
    resolved = [reader.get_object(ref.idnum) for ref in refs]
    assert all(obj is not None for obj in resolved)
    fonts = reader.get_object(imported.raw_get("/Font").idnum)
    assert fonts and all(ref.get_object()["/Type"] == "/Font" and ref.get_object()["/BaseFont"] for ref in fonts.values())


def test_a_pdf_cut_short_is_refused() -> None:
    with pytest.raises(ValueError, match="startxref"):
        Update(_pypdf_pdf()[:-20])


def test_the_structure_check_fails_an_update_whose_offsets_are_wrong() -> None:
    """The qpdf check used on every PDF of the demo (tests/pdfa.py) can fail: bytes slipped in
    before the update leave every offset of its cross-reference stream a few bytes off."""
    original = _weasyprint_pdf()
    update = Update(original)
    update.add(DictionaryObject({NameObject("/Count"): NumberObject(3)}))
    out = update.write(ArrayObject([ByteStringObject(b"a" * 16), ByteStringObject(b"b" * 16)]))
    assert qpdf_problems(out) == []
    shifted = out[:len(original)] + b"%slipped%\n" + out[len(original):]
    assert any("xref" in p or "damaged" in p for p in qpdf_problems(shifted))
