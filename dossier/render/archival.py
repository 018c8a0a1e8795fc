"""Archival PDF: what makes the reports and the dossier PDF PDF/A-3b (ISO 19005-3, level B).

WeasyPrint lays out every PDF of the dossier as PDF/A-3b (:data:`PDF_VARIANT`):
every font embedded (as a subset), an sRGB output intent with its ICC
profile, XMP metadata that declares part 3, conformance B, a file
identifier, and printable annotations. The binder then merges with pypdf,
which knows nothing of PDF/A, and stamps and attaches by an incremental
update; this module gives both what PDF/A asks of the file they write:

- :func:`declare`: the catalog's XMP metadata, rewritten from the document
  information so the two agree (ISO 19005-3, 6.6.2 and 6.6.3), the output
  intent (copied from a laid-out part when the writer has none), the header
  ``%PDF-1.7`` and a file identifier derived from the content
  (:func:`identifier`: same inputs, same bytes).
- :func:`associated_file`: an embedded file as an *associated file*
  (ISO 19005-3, 6.8): its MIME type, the ``F`` and ``UF`` names,
  ``AFRelationship`` and its modification date (:func:`pdf_date`); the caller
  lists its file specification in the catalog's ``AF``.

What is checked of the result and what is not is in docs/reliability.md
("Archival PDF"); no full PDF/A validator runs here.
"""

from __future__ import annotations

import hashlib
from collections.abc import Callable, Iterable
from datetime import datetime
from xml.sax.saxutils import escape

from pypdf import PdfReader, PdfWriter
from pypdf.generic import (ArrayObject, ByteStringObject, DecodedStreamObject, DictionaryObject, IndirectObject, NameObject, NumberObject,
                           PdfObject, TextStringObject)

__all__ = ["PDF_VARIANT", "PDFA_PART", "PDFA_CONFORMANCE", "RELATIONSHIP", "declare", "associated_file", "identifier", "pdf_date", "xmp_packet"]

PDF_VARIANT = "pdf/a-3b"
"""WeasyPrint's name of the PDF variant every PDF of the dossier is laid out as."""

PDFA_PART, PDFA_CONFORMANCE = 3, "B"
"""What the XMP metadata declares (``pdfaid:part``, ``pdfaid:conformance``)."""

RELATIONSHIP = "/Source"
"""``AFRelationship`` of an attached method file: the source the report was made from."""

_MIME = {".yaml": "application/yaml", ".yml": "application/yaml", ".json": "application/json", ".csv": "text/csv"}

# (document information key, XMP element) pairs that must agree (ISO 19005-3, 6.6.3, table from ISO 19005-1 6.7.3)
_XMP_OF_INFO = (
    ("/Title", "dc:title"),
    ("/Author", "dc:creator"),
    ("/Subject", "dc:description"),
    ("/Keywords", "pdf:Keywords"),
    ("/Creator", "xmp:CreatorTool"),
    ("/Producer", "pdf:Producer"),
)


def xmp_packet(info: dict[str, str]) -> bytes:
    """The XMP metadata packet declaring PDF/A-3b with the document information ``info``.

    Parameters
    ----------
    info : dict
        Document information, keys as in the PDF (``/Title``, ``/Author``,
        ``/Creator``, ``/Producer``, ``/Subject``, ``/Keywords``); empty
        values are left out, as they are in the document information.

    Returns
    -------
    bytes
        UTF-8 XML, an ``xpacket`` around one ``rdf:Description``.
    """
    fields = []
    for key, element in _XMP_OF_INFO:
        value = info.get(key)
        if not value:
            continue
        text = escape(str(value))
        if element in ("dc:title", "dc:description"):
            fields.append(f'<{element}><rdf:Alt><rdf:li xml:lang="x-default">{text}</rdf:li></rdf:Alt></{element}>')
        elif element == "dc:creator":
            fields.append(f"<{element}><rdf:Seq><rdf:li>{text}</rdf:li></rdf:Seq></{element}>")
        else:
            fields.append(f"<{element}>{text}</{element}>")
    body = "\n".join(fields)
    return (
        '<?xpacket begin="\ufeff" id="W5M0MpCehiHzreSzNTczkc9d"?>\n'
        '<x:xmpmeta xmlns:x="adobe:ns:meta/">\n'
        '<rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#">\n'
        '<rdf:Description rdf:about="" xmlns:pdfaid="http://www.aiim.org/pdfa/ns/id/" xmlns:dc="http://purl.org/dc/elements/1.1/"'
        ' xmlns:xmp="http://ns.adobe.com/xap/1.0/" xmlns:pdf="http://ns.adobe.com/pdf/1.3/">\n'
        f"<pdfaid:part>{PDFA_PART}</pdfaid:part>\n<pdfaid:conformance>{PDFA_CONFORMANCE}</pdfaid:conformance>\n"
        f"{body}\n"
        "</rdf:Description>\n</rdf:RDF>\n</x:xmpmeta>\n"
        '<?xpacket end="r"?>'
    ).encode("utf-8")


def declare(writer: PdfWriter, content: Iterable[bytes], *, intents_from: PdfReader | None = None) -> None:
    """Make what ``writer`` will write declare PDF/A-3b, consistently with its document information.

    Parameters
    ----------
    writer : PdfWriter
        The document, its document information already final.
    content : iterable of bytes
        What the document is made from (its parts, stamps, attachments):
        the file identifier is a hash of it, so the same inputs give the
        same bytes (``SOURCE_DATE_EPOCH`` builds are byte-identical).
    intents_from : PdfReader, optional
        A part laid out as PDF/A whose output intent (sRGB, with its ICC
        profile) is copied when ``writer`` has none (a merged document).
    """
    root = writer.root_object
    if "/OutputIntents" not in root:
        if intents_from is None or "/OutputIntents" not in intents_from.root_object:
            raise ValueError("the PDF has no output intent and no laid-out part to take one from")
        root[NameObject("/OutputIntents")] = intents_from.root_object["/OutputIntents"].clone(writer)
    info = {k: str(v) for k, v in (writer.metadata or {}).items()}
    writer.xmp_metadata = xmp_packet(info)  # the catalog's stream rewritten in place, or a new one
    root["/Metadata"].get_object().update({NameObject("/Type"): NameObject("/Metadata"), NameObject("/Subtype"): NameObject("/XML")})
    writer.pdf_header = b"%PDF-1.7"
    new = identifier(content)
    first = writer._ID[0] if writer._ID else new  # a stamped report keeps the identifier it was laid out with
    writer._ID = ArrayObject([first, new])


def pdf_date(moment: datetime) -> str:
    """``moment`` as a PDF date, ``D:YYYYMMDDHHmmSS+HH'mm'`` (ISO 32000-1, 7.9.4); a naive moment is taken as UTC.

    >>> from datetime import timedelta, timezone
    >>> pdf_date(datetime(2026, 1, 2, 3, 4, 5, tzinfo=timezone(timedelta(hours=-5, minutes=-30))))
    "D:20260102030405-05'30'"
    """
    offset = moment.utcoffset()
    minutes = 0 if offset is None else int(offset.total_seconds()) // 60
    sign = "-" if minutes < 0 else "+"
    return f"D:{moment:%Y%m%d%H%M%S}{sign}{abs(minutes) // 60:02d}'{abs(minutes) % 60:02d}'"


def identifier(content: Iterable[bytes]) -> ByteStringObject:
    """A file identifier (16 bytes) hashed from what the document is made from: same inputs, same identifier."""
    digest = hashlib.sha256()
    for part in content:
        digest.update(hashlib.sha256(part).digest())
    return ByteStringObject(digest.digest()[:16])


def associated_file(add: Callable[[PdfObject], IndirectObject], name: str, data: bytes, *,
                    modified: datetime | None = None) -> IndirectObject:
    """``data`` embedded as ``name``, an associated file of the document (PDF/A-3, ISO 19005-3 6.8).

    The embedded file stream (Flate-compressed) carries its MIME type
    (``application/yaml`` for a method file), its size and, when given, its
    modification date; its file specification the ``F`` and ``UF`` names and
    ``AFRelationship`` :data:`RELATIONSHIP`. Both objects are added with
    ``add`` (``Update.add`` of :mod:`.pdfupdate`); the caller lists the
    returned specification in the catalog's ``AF`` array and in the
    ``EmbeddedFiles`` name tree. Read back with
    ``pypdf.PdfReader(path).attachments`` ({name: [bytes]}).
    """
    raw = DecodedStreamObject()
    raw.set_data(data)
    stream = raw.flate_encode(level=9)
    suffix = name[name.rfind("."):].lower() if "." in name else ""
    params = DictionaryObject({NameObject("/Size"): NumberObject(len(data))})
    if modified is not None:
        params[NameObject("/ModDate")] = TextStringObject(pdf_date(modified))
    stream.update({
        NameObject("/Type"): NameObject("/EmbeddedFile"),
        NameObject("/Subtype"): NameObject("/" + _MIME.get(suffix, "application/octet-stream")),
        NameObject("/Params"): params,
    })
    return add(DictionaryObject({
        NameObject("/Type"): NameObject("/Filespec"),
        NameObject("/F"): TextStringObject(name),
        NameObject("/UF"): TextStringObject(name),
        NameObject("/EF"): DictionaryObject({NameObject("/F"): add(stream)}),
        NameObject("/AFRelationship"): NameObject(RELATIONSHIP),
    }))
