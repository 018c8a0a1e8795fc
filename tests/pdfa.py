"""What the tests check of an archival PDF (PDF/A-3b, ISO 19005-3), read back
independently of dossier.render.archival: pypdf for the objects, ElementTree
for the XMP. Not a full PDF/A validation (docs/reliability.md, "Archival PDF")."""

from __future__ import annotations

import io
import subprocess
import xml.etree.ElementTree as ET
from pathlib import Path

from pypdf import PdfReader

NS = {
    "rdf": "http://www.w3.org/1999/02/22-rdf-syntax-ns#",
    "pdfaid": "http://www.aiim.org/pdfa/ns/id/",
    "dc": "http://purl.org/dc/elements/1.1/",
    "xmp": "http://ns.adobe.com/xap/1.0/",
    "pdf": "http://ns.adobe.com/pdf/1.3/",
}

# ISO 32000-1, table 165 (annotation flags): bit 1 Invisible, 2 Hidden, 3 Print, 6 NoView, 9 ToggleNoView
_PRINT, _NOT_SHOWN = 1 << 2, (1 << 0) | (1 << 1) | (1 << 5) | (1 << 8)


def _xmp_value(rdf: ET.Element, prefix: str, name: str) -> str | None:
    """A simple XMP property, written as an attribute or as an element, or the first rdf:li of an array."""
    key = f"{{{NS[prefix]}}}{name}"
    for desc in rdf.iter(f"{{{NS['rdf']}}}Description"):
        if key in desc.attrib:
            return desc.attrib[key]
        el = desc.find(key)
        if el is not None:
            li = el.find(".//rdf:li", NS)
            return (li.text if li is not None else el.text) or ""
    return None


def archival_problems(pdf: bytes | Path) -> list[str]:
    """Every way ``pdf`` falls short of what the dossier's PDFs promise (empty: none found).

    Checked: header version at most 1.7; XMP metadata declaring pdfaid:part 3
    and conformance B; title, author, creating tool and producer the same in
    the XMP and in the document information (ISO 19005-3, 6.6.3); an output
    intent GTS_PDFA1 with an embedded ICC profile; a file identifier; no
    encryption, no JavaScript; every annotation printable and not hidden;
    every embedded file with a MIME type, F and UF names, AFRelationship and
    listed in the catalog's AF (ISO 19005-3, 6.8).
    """
    data = pdf.read_bytes() if isinstance(pdf, Path) else pdf
    reader = PdfReader(io.BytesIO(data))
    out: list[str] = []
    header = data[:8]
    if not (header.startswith(b"%PDF-1.") and header[7:8] in b"4567"):
        out.append(f"header {header!r} is not PDF 1.4 to 1.7")
    root = reader.trailer["/Root"]
    meta = root.get("/Metadata")
    if meta is None:
        return [*out, "no XMP metadata in the catalog"]
    rdf = ET.fromstring(meta.get_object().get_data()).find("rdf:RDF", NS)
    if rdf is None:
        return [*out, "the XMP metadata holds no rdf:RDF"]
    if _xmp_value(rdf, "pdfaid", "part") != "3":
        out.append(f"pdfaid:part is {_xmp_value(rdf, 'pdfaid', 'part')!r}, not '3'")
    if _xmp_value(rdf, "pdfaid", "conformance") != "B":
        out.append(f"pdfaid:conformance is {_xmp_value(rdf, 'pdfaid', 'conformance')!r}, not 'B'")
    info = reader.metadata or {}
    for key, (prefix, name) in {"/Title": ("dc", "title"), "/Author": ("dc", "creator"), "/Creator": ("xmp", "CreatorTool"),
                                "/Producer": ("pdf", "Producer")}.items():
        if info.get(key) and _xmp_value(rdf, prefix, name) != str(info[key]):
            out.append(f"document information {key} {str(info[key])!r} differs from XMP {prefix}:{name} {_xmp_value(rdf, prefix, name)!r}")
    intents = root.get("/OutputIntents")
    intents = intents.get_object() if intents is not None else []
    if not any(i.get_object().get("/S") == "/GTS_PDFA1" and "/DestOutputProfile" in i.get_object() for i in intents):
        out.append("no output intent GTS_PDFA1 with an ICC profile")
    ids = reader.trailer.get("/ID")
    if ids is None or len(ids) != 2:
        out.append("no file identifier (trailer /ID)")
    if "/Encrypt" in reader.trailer:
        out.append("encrypted")
    if "/JavaScript" in (root.get("/Names") or {}) or "/OpenAction" in root:
        out.append("JavaScript or an open action")
    for n, page in enumerate(reader.pages, start=1):
        for ref in page.get("/Annots") or []:
            flags = int(ref.get_object().get("/F", 0))
            if not flags & _PRINT or flags & _NOT_SHOWN:
                out.append(f"page {n}: an annotation with flags {flags} (must print and be shown)")
                break
    af = {ref.idnum for ref in (root.get("/AF") or [])}
    for ef in reader.attachment_list:
        spec = ef.pdf_object
        name = ef.name
        for key in ("/F", "/UF", "/AFRelationship"):
            if key not in spec:
                out.append(f"attachment {name}: no {key}")
        if not ef.subtype:
            out.append(f"attachment {name}: no MIME type (/Subtype)")
        if spec.indirect_reference is None or spec.indirect_reference.idnum not in af:
            out.append(f"attachment {name}: not listed in the catalog's /AF")
    return out


def unembedded_fonts(path: Path, pdffonts: str) -> list[str]:
    """The rows of ``pdffonts`` (poppler-utils) whose font is not embedded; raises if it lists none."""
    rows = subprocess.run([pdffonts, str(path)], capture_output=True, text=True, check=True).stdout.splitlines()[2:]
    if not rows:
        raise AssertionError(f"{path.name}: pdffonts lists no font")
    return [row for row in rows if row.split()[-5] != "yes"]


def qpdf_problems(pdf: bytes | Path) -> list[str]:
    """What qpdf (through pikepdf, independent of pypdf and poppler) finds wrong in the file's
    structure: its syntax check, and any warning while every object is read (a cross-reference
    it had to repair, a stream of the wrong length). Empty: none."""
    import pikepdf

    source = io.BytesIO(pdf) if isinstance(pdf, bytes) else pdf
    with pikepdf.open(source) as doc:
        for _ in doc.objects:
            pass
        return [*doc.check_pdf_syntax(), *doc.get_warnings()]
