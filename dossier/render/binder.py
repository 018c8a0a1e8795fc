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
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from datetime import datetime
from functools import cached_property

from pypdf import PdfReader, PdfWriter
from pypdf import PageObject
from pypdf.generic import (ArrayObject, DecodedStreamObject, DictionaryObject, FloatObject, IndirectObject, NameObject, PdfObject, StreamObject,
                           TextStringObject)

from . import archival
from .memo import Memo
from .pdfupdate import Update

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
    writer.compress_identical_objects(remove_duplicates=True, remove_unreferenced=True)  # pypdf copies a shared object once per referring page (the sRGB profile)
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
    if not writer.pages:
        return
    box = writer.pages[0].mediabox
    distinct = tuple(dict.fromkeys(lines))
    overlay = PdfReader(io.BytesIO(_overlay(distinct, float(box.width), float(box.height), bottom, size)))
    names = {t: _stamp_name(t) for t in distinct}
    forms = {t: writer._add_object(_form(over, over["/Resources"].get_object().clone(writer))) for t, over in zip(distinct, overlay.pages)}
    draws = {t: writer._add_object(_stream(b"Q\nq " + names[t].encode() + b" Do Q\n")) for t in distinct}
    push = writer._add_object(_stream(b"q\n"))
    shared: dict[tuple[object, str], IndirectObject] = {}  # (the page's resources, line) → resources with the stamp
    for page, t in zip(writer.pages, lines):
        own = page.get("/Resources")
        key = (own.idnum if isinstance(own, IndirectObject) else id(page), t)
        if key not in shared:
            shared[key] = writer._add_object(_with_form(own, names[t], forms[t]))
        page[NameObject("/Resources")] = shared[key]
        page[NameObject("/Contents")] = ArrayObject([push, *_content_streams(page), draws[t]])


def _overlay(lines: tuple[str, ...], width: float, height: float, bottom: float, size: float) -> bytes:
    """A PDF of one page per line, ``width`` × ``height`` pt, the line ``bottom`` pt from the
    foot, in the reports' font at ``size`` pt; laid out by WeasyPrint once for the same
    arguments (the fingerprint line is the same on every PDF of a build, the page numbers of
    dossier.pdf the same from build to build while its page count is), :mod:`.memo`."""
    return _LAID_OUT((lines, width, height, bottom, size))


def _lay_out(key: tuple[tuple[str, ...], float, float, float, float]) -> bytes:
    lines, width, height, bottom, size = key
    from weasyprint import HTML  # slow to import

    pages = "".join(f'<section><p>{html.escape(t)}</p></section>' for t in lines)
    doc = (
        f"<style>@page {{ size: {width:.2f}pt {height:.2f}pt; margin: 0 }} body {{ margin: 0 }}"
        f"section {{ position: relative; height: {height - 2:.2f}pt; break-after: page; margin: 0 }}"
        f"p {{ position: absolute; left: {_STAMP_X:.2f}pt; bottom: {bottom - 2:.2f}pt; margin: 0; font: {size:.2f}pt 'DejaVu Sans'; color: #4a5463; white-space: nowrap }}"
        f"</style>{pages}"
    )
    out = HTML(string=doc).write_pdf()
    if page_count(out) != len(lines):  # pragma: no cover - one section is one page
        raise RuntimeError(f"the page stamps took {page_count(out)} pages for {len(lines)} lines")
    return out


_LAID_OUT = Memo("page stamps", _lay_out, spare=4)
"""The page-stamp overlays; beside those a build used it keeps four more of the build before
(the page-number lines of a dossier a page longer or shorter, as an edit undone gives)."""


def _stream(data: bytes) -> StreamObject:
    """A content stream of ``data``, Flate-compressed (deterministic)."""
    raw = DecodedStreamObject()
    raw.set_data(data)
    return raw.flate_encode()


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
    associated files of the document (:func:`archival.associated_file`, with
    ``modified`` as their date), still PDF/A-3b: its XMP metadata rewritten
    from the document information, its file identifier's second part hashed
    from the content (:func:`archival.identifier`).

    The stamp is an incremental update (:mod:`.pdfupdate`): the original
    bytes are kept, and appended to them are the line as one form XObject
    (laid out as in :func:`overlay_lines`), each page again with that form
    drawn after its own content, the attachments, the catalog and the
    metadata. Same inputs give the same bytes; document information, outline
    and every other object are kept as they were.
    """
    update = Update(pdf)
    reader = update.reader
    root_ref = reader.trailer.raw_get("/Root")
    root = DictionaryObject(root_ref.get_object())
    if "/OutputIntents" not in root:
        raise ValueError("the PDF has no output intent: it was not laid out as PDF/A")
    pages = list(reader.pages)
    if pages:
        box = pages[0].mediabox
        overlay = PdfReader(io.BytesIO(_overlay((line,), float(box.width), float(box.height), bottom, size))).pages[0]
        name = _stamp_name(line)
        form = update.add(_form(overlay, update.imported(overlay.raw_get("/Resources"))))
        push, draw = update.add(_stream(b"q\n")), update.add(_stream(b"Q\nq " + name.encode() + b" Do Q\n"))
        shared: dict[int, IndirectObject] = {}  # the page's resources (object number) → resources with the stamp
        for page in pages:
            own = page.raw_get("/Resources") if "/Resources" in page else None
            if isinstance(own, IndirectObject):
                if own.idnum not in shared:
                    shared[own.idnum] = update.add(_with_form(own, name, form))
                resources: PdfObject = shared[own.idnum]
            else:
                resources = _with_form(own, name, form)
            changed = DictionaryObject(page)
            changed[NameObject("/Resources")] = resources
            changed[NameObject("/Contents")] = ArrayObject([push, *_content_streams(page), draw])
            update.replace(page.indirect_reference, changed)
    files = sorted((attachments or {}).items())
    if files:
        specs = [archival.associated_file(update.add, n, data, modified=modified) for n, data in files]
        names_ref = root.raw_get("/Names") if "/Names" in root else None
        names = DictionaryObject(names_ref.get_object()) if names_ref is not None else DictionaryObject()
        if "/EmbeddedFiles" in names:
            raise ValueError("the PDF has attached files already")
        names[NameObject("/EmbeddedFiles")] = DictionaryObject({NameObject("/Names"): ArrayObject(
            item for (n, _), spec in zip(files, specs) for item in (TextStringObject(n), spec))})
        if isinstance(names_ref, IndirectObject):
            update.replace(names_ref, names)
        else:
            root[NameObject("/Names")] = names
        root[NameObject("/AF")] = ArrayObject([*(root["/AF"] if "/AF" in root else []), *specs])
    metadata = DecodedStreamObject()
    metadata.set_data(archival.xmp_packet({k: str(v) for k, v in (reader.metadata or {}).items()}))
    metadata.update({NameObject("/Type"): NameObject("/Metadata"), NameObject("/Subtype"): NameObject("/XML")})
    if isinstance(root.raw_get("/Metadata") if "/Metadata" in root else None, IndirectObject):
        update.replace(root.raw_get("/Metadata"), metadata)
    else:
        root[NameObject("/Metadata")] = update.add(metadata)
    if not pdf.startswith(b"%PDF-1.7"):
        root[NameObject("/Version")] = NameObject("/1.7")
    update.replace(root_ref, root)
    stated = [line.encode(), (modified.isoformat() if modified else "").encode()]
    new = archival.identifier([pdf, *stated, *(n.encode() + b"\0" + d for n, d in files)])
    ids = reader.trailer.get("/ID")
    return update.write(ArrayObject([ids[0] if ids else new, new]))


def _stamp_name(line: str) -> NameObject:
    """The XObject name of the stamp of ``line``: one of its own per line, so that a page
    stamped twice (dossier.pdf: page number, then fingerprint) keeps both."""
    return NameObject("/Stamp" + hashlib.sha256(line.encode()).hexdigest()[:16])


def _content_streams(page: PageObject) -> list[PdfObject]:
    """The page's content streams as references (none, one, or an array's)."""
    contents = page.raw_get("/Contents") if "/Contents" in page else None
    if contents is None:
        return []
    return list(contents.get_object()) if isinstance(contents.get_object(), ArrayObject) else [contents]


def _form(page: PageObject, resources: PdfObject) -> StreamObject:
    """Page ``page`` of another PDF as a form XObject, with ``resources`` (its own, copied
    into the PDF the form goes into)."""
    form = _stream(page.get_contents().get_data() if page.get_contents() is not None else b"")
    form.update({
        NameObject("/Type"): NameObject("/XObject"),
        NameObject("/Subtype"): NameObject("/Form"),
        NameObject("/BBox"): ArrayObject([FloatObject(float(v)) for v in page.mediabox]),
        NameObject("/Resources"): resources,
    })
    return form
