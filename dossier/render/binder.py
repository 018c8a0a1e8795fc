"""Bind the method reports into the dossier PDF, with continuous page numbers.

The dossier is a binder: its own front matter (cover, contents, verdicts at
a glance), then every method report exactly as its own PDF has it (cover,
pages numbered "page X of Y" within the report, signature block), then the
dossier's signature page. Each page also carries "dossier page N of T",
stamped by this module, so that the contents and an auditor can name any
page of the whole.

Binding re-uses the method PDFs instead of laying every report out a second
time, which was half the cost of a cold build (docs/performance.md).

Links in the front and back matter whose target is ``bind:report/ID`` or
``bind:signatures`` become links to the first page of that report or of the
back matter. The reports' own links use named destinations that carry the
method id (``ID-summary``, ``ID-L-…``), so they stay unique when merged.
"""

from __future__ import annotations

import io
from collections.abc import Sequence
from dataclasses import dataclass

from pypdf import PdfReader, PdfWriter
from pypdf.generic import ArrayObject, DecodedStreamObject, DictionaryObject, NameObject

__all__ = ["BoundReport", "bind", "page_count", "LINK_PREFIX", "STAMP_FORMAT"]

LINK_PREFIX = "bind:"
"""Front- and back-matter links to a report (``bind:report/ID``) or the signatures (``bind:signatures``)."""

STAMP_FORMAT = "dossier page {n} of {total}"
"""The continuous page number stamped on every page of the dossier."""

_STAMP_FONT = "/PhdStampFont"
_STAMP_X, _STAMP_Y, _STAMP_SIZE = 45.35, 24.0, 7.5  # pt: the left page margin (16 mm), inside the bottom margin


@dataclass(frozen=True)
class BoundReport:
    """One method report to bind: its id, title (for the outline) and PDF bytes."""

    id: str
    title: str
    pdf: bytes


def page_count(pdf: bytes) -> int:
    """Number of pages of a PDF."""
    return len(PdfReader(io.BytesIO(pdf)).pages)


def bind(front: bytes, reports: Sequence[BoundReport], back: bytes, *, title: str, creator: str) -> bytes:
    """One PDF: ``front``, every report in order, ``back``; links resolved, every page stamped.

    Parameters
    ----------
    front, back : bytes
        PDFs of the dossier's front matter and back matter.
    reports : sequence of BoundReport
        The method reports, in the order of the contents.
    title, creator : str
        Document information: title and creating tool.

    Returns
    -------
    bytes
        The dossier PDF. Same inputs give the same bytes.
    """
    writer = PdfWriter()
    writer.append(PdfReader(io.BytesIO(front)))
    n_front = len(writer.pages)
    targets: dict[str, int] = {}
    for r in reports:
        targets[f"report/{r.id}"] = len(writer.pages)
        writer.append(PdfReader(io.BytesIO(r.pdf)), outline_item=f"{r.id} — {r.title}")
    targets["signatures"] = len(writer.pages)
    back_start = len(writer.pages)
    writer.append(PdfReader(io.BytesIO(back)))
    _resolve_links(writer, list(range(n_front)) + list(range(back_start, len(writer.pages))), targets)
    _stamp(writer)
    writer.add_metadata({"/Title": title, "/Creator": creator, "/Producer": creator})
    out = io.BytesIO()
    writer.write(out)
    return out.getvalue()


def _resolve_links(writer: PdfWriter, pages: list[int], targets: dict[str, int]) -> None:
    """Turn ``bind:`` links on the given pages into links to the first page of their target."""
    for i in pages:
        for ref in writer.pages[i].get("/Annots") or []:
            annot = ref.get_object()
            action = annot.get("/A")
            uri = action.get_object().get("/URI") if action is not None else None
            if not (isinstance(uri, str) and uri.startswith(LINK_PREFIX)):
                continue
            key = uri[len(LINK_PREFIX):]
            if key not in targets:
                raise ValueError(f"front matter links to {uri!r}, which is not in the dossier")
            del annot[NameObject("/A")]
            annot[NameObject("/Dest")] = ArrayObject([writer.pages[targets[key]].indirect_reference, NameObject("/Fit")])


def _stamp(writer: PdfWriter) -> None:
    """Add "dossier page N of T" at the foot of every page, outside the page's own drawing state.

    Each page's content is wrapped in q … Q so that whatever transformation
    it leaves in force does not move the stamp; the stamp uses the standard
    Helvetica font (WinAnsi, ASCII text), so nothing is embedded for it.
    ``PdfWriter._add_object`` is how pypdf adds an indirect object (stable
    from pypdf 3 to 7; the tests cover it).
    """
    font = writer._add_object(DictionaryObject({
        NameObject("/Type"): NameObject("/Font"),
        NameObject("/Subtype"): NameObject("/Type1"),
        NameObject("/BaseFont"): NameObject("/Helvetica"),
        NameObject("/Encoding"): NameObject("/WinAnsiEncoding"),
    }))
    save, restore = DecodedStreamObject(), DecodedStreamObject()
    save.set_data(b"q\n")
    restore.set_data(b"\nQ\n")
    save_ref, restore_ref = writer._add_object(save), writer._add_object(restore)
    total = len(writer.pages)
    for n, page in enumerate(writer.pages, start=1):
        resources = page[NameObject("/Resources")].get_object() if "/Resources" in page else None
        if resources is None:
            resources = DictionaryObject()
            page[NameObject("/Resources")] = resources
        fonts = resources.get("/Font")
        if fonts is None:
            fonts = DictionaryObject()
            resources[NameObject("/Font")] = fonts
        fonts.get_object()[NameObject(_STAMP_FONT)] = font
        box = page.mediabox
        text = STAMP_FORMAT.format(n=n, total=total).encode("ascii")
        stamp = DecodedStreamObject()
        stamp.set_data(
            b"q BT %s %.2f Tf 0.29 0.33 0.39 rg %.2f %.2f Td (%s) Tj ET Q\n"
            % (_STAMP_FONT.encode(), _STAMP_SIZE, float(box.left) + _STAMP_X, float(box.bottom) + _STAMP_Y, text)
        )
        contents = page.get("/Contents")
        old = [] if contents is None else (list(contents.get_object()) if isinstance(contents.get_object(), ArrayObject) else [contents])
        page[NameObject("/Contents")] = ArrayObject([save_ref, *old, restore_ref, writer._add_object(stamp)])
