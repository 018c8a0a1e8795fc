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

import hashlib
import html
import io
import logging
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from datetime import datetime
from functools import cached_property

from pypdf import PdfReader, PdfWriter
from pypdf import PageObject
from pypdf.generic import ArrayObject, DecodedStreamObject, DictionaryObject, FloatObject, IndirectObject, NameObject, StreamObject

from . import archival

__all__ = ["BoundReport", "bind", "page_count", "stamp_every_page", "overlay_lines", "LINK_PREFIX", "STAMP_FORMAT", "FOOTER_BOTTOM"]

LINK_PREFIX = "bind:"
"""Front- and back-matter links to a report (``bind:report/ID``) or the signatures (``bind:signatures``)."""

STAMP_FORMAT = "dossier page {n} of {total}"
"""The continuous page number stamped on every page of the dossier."""

_STAMP_X, _STAMP_Y, _STAMP_SIZE = 45.35, 24.0, 7.5  # pt: the left page margin (16 mm), inside the bottom margin

FOOTER_BOTTOM = 10.0
"""pt from the bottom edge: the fingerprint line, below the page numbers."""


@dataclass(frozen=True)
class BoundReport:
    """One method report to bind: its id, title (for the outline) and PDF bytes.

    The PDF is parsed once, when first needed (:attr:`reader`), and that one
    parse serves both counting its pages for the contents and binding it.
    """

    id: str
    title: str
    pdf: bytes

    @cached_property
    def reader(self) -> PdfReader:
        """The report, parsed."""
        return PdfReader(io.BytesIO(self.pdf))

    @property
    def pages(self) -> int:
        """Number of pages of the report."""
        return len(self.reader.pages)


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
    front_reader = PdfReader(io.BytesIO(front))
    writer.append(front_reader)
    n_front = len(writer.pages)
    targets: dict[str, int] = {}
    for r in reports:
        targets[f"report/{r.id}"] = len(writer.pages)
        writer.append(r.reader, outline_item=f"{r.id} — {r.title}")
    targets["signatures"] = len(writer.pages)
    back_start = len(writer.pages)
    writer.append(PdfReader(io.BytesIO(back)))
    _resolve_links(writer, list(range(n_front)) + list(range(back_start, len(writer.pages))), targets)
    _stamp(writer)
    writer.add_metadata({"/Title": title, "/Creator": creator, "/Producer": creator})
    archival.declare(writer, [front, *(r.pdf for r in reports), back, title.encode(), creator.encode()], intents_from=front_reader)
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
    """Add "dossier page N of T" at the foot of every page (:func:`overlay_lines`)."""
    total = len(writer.pages)
    overlay_lines(writer, [STAMP_FORMAT.format(n=n, total=total) for n in range(1, total + 1)], bottom=_STAMP_Y, size=_STAMP_SIZE)


def overlay_lines(writer: PdfWriter, lines: Sequence[str], *, bottom: float, size: float) -> None:
    """Draw one line of text at the foot of each page of ``writer`` (``lines[i]`` on page i).

    Each distinct line is laid out once by WeasyPrint, as a page of its own,
    in the reports' font, embedded (subset) like every other font of the
    reports, so the stamped PDF stays archival. That page becomes a form
    XObject (named by a hash of the line), drawn on every page that carries
    the line: the page's own content is wrapped in q … Q (so whatever
    transformation it leaves in force does not move the line) and followed
    by one ``Do``. The pages' content streams are neither parsed nor
    rewritten, and a line repeated on every page (the fingerprint) is stored
    once. (Merging a laid-out page over each page instead parsed every
    page's content and cost 3–4× the time; docs/performance.md.)

    Parameters
    ----------
    lines : sequence of str
        One line per page of ``writer``.
    bottom : float
        Distance of the line's box from the bottom edge, pt.
    size : float
        Font size, pt.
    """
    from weasyprint import HTML  # slow to import

    if not writer.pages:
        return
    box = writer.pages[0].mediabox
    width, height = float(box.width), float(box.height)
    distinct = list(dict.fromkeys(lines))
    pages = "".join(f'<section><p>{html.escape(t)}</p></section>' for t in distinct)
    doc = (
        f"<style>@page {{ size: {width:.2f}pt {height:.2f}pt; margin: 0 }} body {{ margin: 0 }}"
        f"section {{ position: relative; height: {height - 2:.2f}pt; break-after: page; margin: 0 }}"
        f"p {{ position: absolute; left: {_STAMP_X:.2f}pt; bottom: {bottom - 2:.2f}pt; margin: 0; font: {size:.2f}pt 'DejaVu Sans'; color: #4a5463; white-space: nowrap }}"
        f"</style>{pages}"
    )
    overlay = PdfReader(io.BytesIO(HTML(string=doc).write_pdf()))
    if len(overlay.pages) != len(distinct):  # pragma: no cover - one section is one page
        raise RuntimeError(f"the page stamps took {len(overlay.pages)} pages for {len(distinct)} lines")
    # a name of its own per line, so that a page stamped twice (dossier.pdf: page number, then fingerprint) keeps both
    names = {t: NameObject("/Stamp" + hashlib.sha256(t.encode()).hexdigest()[:16]) for t in distinct}
    forms = {t: _form_xobject(writer, over) for t, over in zip(distinct, overlay.pages)}
    draws = {t: writer._add_object(_stream(b"Q\nq " + names[t].encode() + b" Do Q\n")) for t in distinct}
    push = writer._add_object(_stream(b"q\n"))
    shared: dict[tuple[object, str], IndirectObject] = {}  # (the page's resources, line) → resources with the stamp
    for page, t in zip(writer.pages, lines):
        own = page.get("/Resources")
        key = (own.idnum if isinstance(own, IndirectObject) else id(page), t)
        if key not in shared:
            shared[key] = writer._add_object(_with_form(own, names[t], forms[t]))
        page[NameObject("/Resources")] = shared[key]
        contents = page.get("/Contents")
        streams = [] if contents is None else list(contents.get_object()) if isinstance(contents.get_object(), ArrayObject) else [contents]
        page[NameObject("/Contents")] = ArrayObject([push, *streams, draws[t]])


def _stream(data: bytes) -> StreamObject:
    """A content stream of ``data``, Flate-compressed (deterministic)."""
    raw = DecodedStreamObject()
    raw.set_data(data)
    return raw.flate_encode()


def _form_xobject(writer: PdfWriter, page: PageObject) -> IndirectObject:
    """Page ``page`` of another PDF as a form XObject of ``writer`` (its resources copied in)."""
    form = _stream(page.get_contents().get_data() if page.get_contents() is not None else b"")
    form.update({
        NameObject("/Type"): NameObject("/XObject"),
        NameObject("/Subtype"): NameObject("/Form"),
        NameObject("/BBox"): ArrayObject([FloatObject(float(v)) for v in page.mediabox]),
        NameObject("/Resources"): page["/Resources"].get_object().clone(writer),
    })
    return writer._add_object(form)


def _with_form(resources: object, name: NameObject, form: IndirectObject) -> DictionaryObject:
    """A copy of a page's resources (``None`` for none) with ``form`` as XObject ``name``."""
    out = DictionaryObject(resources.get_object()) if resources is not None else DictionaryObject()
    xobjects = DictionaryObject(out["/XObject"].get_object()) if "/XObject" in out else DictionaryObject()
    xobjects[name] = form
    out[NameObject("/XObject")] = xobjects
    return out


def stamp_every_page(pdf: bytes, line: str, *, attachments: Mapping[str, bytes] | None = None, modified: datetime | None = None,
                     bottom: float = FOOTER_BOTTOM, size: float = 6.0) -> bytes:
    """The PDF with ``line`` at the foot of every page (the dossier's fingerprint, say)
    and ``attachments`` ({file name: bytes}, the method files) embedded as
    associated files of the document (:func:`archival.attach`, with
    ``modified`` as their date), still PDF/A-3b (:func:`archival.declare`).

    Same inputs give the same bytes; document information and outline are kept.
    """
    writer = _clone(pdf)
    overlay_lines(writer, [line] * len(writer.pages), bottom=bottom, size=size)
    for name, data in sorted((attachments or {}).items()):
        archival.attach(writer, name, data, modified=modified)
    stated = [line.encode(), (modified.isoformat() if modified else "").encode()]
    archival.declare(writer, [pdf, *stated, *(n.encode() + b"\0" + d for n, d in sorted((attachments or {}).items()))])
    writer.compress_identical_objects(remove_duplicates=True, remove_unreferenced=True)
    out = io.BytesIO()
    writer.write(out)
    return out.getvalue()


class _CloneCount(logging.Filter):
    """Drops pypdf's "Object count … exceeds defined trailer size" while a PDF is cloned."""

    def filter(self, record: logging.LogRecord) -> bool:
        return not record.getMessage().startswith("Object count")


def _clone(pdf: bytes) -> PdfWriter:
    """A writer holding a copy of ``pdf`` (catalog, outline, names, metadata, identifier).

    pypdf copies an object that many others refer to from inside direct
    dictionaries once per reference (the sRGB profile of WeasyPrint's
    transparency groups, about 90 copies of 2.5 kB in a report), and says
    so in a warning meant for damaged files; the copies are merged again
    before writing (``compress_identical_objects``), so the warning is
    silenced here, for this clone only.
    """
    log, quiet = logging.getLogger("pypdf._writer"), _CloneCount()
    log.addFilter(quiet)
    try:
        return PdfWriter(clone_from=PdfReader(io.BytesIO(pdf)))
    finally:
        log.removeFilter(quiet)
