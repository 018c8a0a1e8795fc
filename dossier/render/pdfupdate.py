"""An incremental update of a PDF: new and changed objects appended after its bytes.

A PDF may be changed by appending to it (ISO 32000-1:2008, 7.5.6,
"Incremental updates"): the objects that change are written again with
their old numbers, new objects with new numbers, followed by a
cross-reference section for those objects only, whose ``Prev`` points to
the one before. The original bytes are kept as they were, so a change that
touches a few objects of every page (the fingerprint stamp) costs a read of
the page tree and a write of those objects, instead of parsing, copying and
writing the whole file again (about 0.1 – 1 s a report, several seconds for
``dossier.pdf``; docs/performance.md). Incremental updates are allowed in
PDF/A (ISO 19005-3:2012 inherits them from ISO 32000-1 and does not forbid
them; recalled from memory, not checked against the standard's text here).

The cross-reference section is written as a cross-reference stream
(ISO 32000-1, 7.5.8), which PDF 1.5 and later readers read whether the
section before it is a table or a stream; every PDF of a dossier is PDF 1.7.
"""

from __future__ import annotations

import io
import re
import zlib

from pypdf import PdfReader
from pypdf.generic import (
    ArrayObject,
    DecodedStreamObject,
    DictionaryObject,
    EncodedStreamObject,
    IndirectObject,
    NameObject,
    NumberObject,
    PdfObject,
    StreamObject,
)

__all__ = ["Update"]

_STARTXREF = re.compile(rb"startxref\s+(\d+)\s+%%EOF\s*$")


class Update:
    """Objects to append to ``pdf`` as one incremental update.

    Parameters
    ----------
    pdf : bytes
        The PDF as it is; it is parsed lazily (only the objects asked for).

    Notes
    -----
    Use: ``update = Update(pdf)``; read what to change from ``update.reader``;
    ``update.replace(ref, changed)`` for each changed object and
    ``update.add(obj)`` for each new one; ``update.write(ids)`` gives the new PDF.
    """

    def __init__(self, pdf: bytes) -> None:
        found = _STARTXREF.search(pdf[-64:])
        if found is None:
            raise ValueError("not a complete PDF: it does not end with startxref … %%EOF")
        self.original = pdf
        self.reader = PdfReader(io.BytesIO(pdf))
        self._prev = int(found.group(1))
        self._next = int(self.reader.trailer["/Size"])
        self._objects: dict[int, tuple[int, PdfObject]] = {}

    def add(self, obj: PdfObject) -> IndirectObject:
        """A new object, numbered after every object of the PDF; its reference."""
        number, self._next = self._next, self._next + 1
        self._objects[number] = (0, obj)
        return IndirectObject(number, 0, self.reader)

    def replace(self, ref: IndirectObject, obj: PdfObject) -> None:
        """Object ``ref`` of the PDF, as it is to be from now on."""
        self._objects[ref.idnum] = (ref.generation, obj)

    def imported(self, obj: PdfObject, memo: dict[int, IndirectObject] | None = None) -> PdfObject:
        """``obj`` of another PDF, with every object it refers to added to this one.

        ``memo`` (object number there → reference here) lets several calls
        share what they refer to. References to page-tree parents are not
        followed: a form's or font's resources never hold one.
        """
        memo = {} if memo is None else memo
        return _import(obj, self, memo)

    def write(self, ids: ArrayObject) -> bytes:
        """The PDF with this update appended, and ``startxref``.

        The objects that are not streams go into one compressed object
        stream (ISO 32000-1, 7.5.7; the page dictionaries and resources a
        stamp writes again compress about 15-fold); the streams follow it,
        each an object of its own. Then a cross-reference stream: ``Prev``
        the previous section, ``Root`` and ``Info`` as before, ``ids`` the
        file identifier.
        """
        trailer, objects = self.reader.trailer, dict(self._objects)
        out = io.BytesIO()
        out.write(self.original)
        if not self.original.endswith(b"\n"):
            out.write(b"\n")
        entries: dict[int, tuple[int, int, int]] = {}  # object number → (type, field 2, field 3) of its xref entry
        packed = [n for n in sorted(objects) if objects[n][0] == 0 and not isinstance(objects[n][1], StreamObject)]
        number = self._next
        if packed:
            head, body = [], io.BytesIO()
            for i, n in enumerate(packed):
                head.append(f"{n} {body.tell()}")
                entries[n] = (2, number, i)
                objects[n][1].write_to_stream(body)
                body.write(b"\n")
            first = (" ".join(head) + "\n").encode()
            box = EncodedStreamObject()
            box.update({
                NameObject("/Type"): NameObject("/ObjStm"),
                NameObject("/N"): NumberObject(len(packed)),
                NameObject("/First"): NumberObject(len(first)),
                NameObject("/Filter"): NameObject("/FlateDecode"),
            })
            box._data = zlib.compress(first + body.getvalue(), 9)
            objects[number] = (0, box)
            number += 1
        for n in sorted(objects):
            if n in entries:
                continue
            generation, obj = objects[n]
            entries[n] = (1, out.tell(), generation)
            out.write(f"{n} {generation} obj\n".encode())
            obj.write_to_stream(out)
            out.write(b"\nendobj\n")
        xref_at = out.tell()
        entries[number] = (1, xref_at, 0)
        width = max(4, (xref_at.bit_length() + 7) // 8)
        third = max(2, (max(e[2] for e in entries.values()).bit_length() + 7) // 8)
        rows, index = [], ArrayObject()
        for start, count in _runs(sorted(entries)):
            index.extend([NumberObject(start), NumberObject(count)])
            for n in range(start, start + count):
                kind, second, last = entries[n]
                rows.append(bytes([kind]) + second.to_bytes(width, "big") + last.to_bytes(third, "big"))
        xref = EncodedStreamObject()
        xref.update({
            NameObject("/Type"): NameObject("/XRef"),
            NameObject("/Size"): NumberObject(number + 1),
            NameObject("/Index"): index,
            NameObject("/W"): ArrayObject([NumberObject(1), NumberObject(width), NumberObject(third)]),
            NameObject("/Prev"): NumberObject(self._prev),
            NameObject("/Root"): trailer.raw_get("/Root"),
            NameObject("/ID"): ids,
            NameObject("/Filter"): NameObject("/FlateDecode"),
        })
        if "/Info" in trailer:
            xref[NameObject("/Info")] = trailer.raw_get("/Info")
        xref._data = zlib.compress(b"".join(rows), 9)
        out.write(f"{number} 0 obj\n".encode())
        xref.write_to_stream(out)
        out.write(f"\nendobj\nstartxref\n{xref_at}\n%%EOF\n".encode())
        return out.getvalue()


def _runs(numbers: list[int]) -> list[tuple[int, int]]:
    """Sorted object numbers as (first, count) runs of consecutive numbers."""
    runs: list[list[int]] = []
    for n in numbers:
        if runs and runs[-1][0] + runs[-1][1] == n:
            runs[-1][1] += 1
        else:
            runs.append([n, 1])
    return [(a, b) for a, b in runs]


def _import(obj: PdfObject, update: Update, memo: dict[int, IndirectObject]) -> PdfObject:
    """A copy of ``obj`` whose references point to copies added to ``update`` (:meth:`Update.imported`)."""
    if isinstance(obj, IndirectObject):
        if obj.idnum not in memo:
            ref = memo[obj.idnum] = update.add(DictionaryObject())  # numbered first: cycles end here
            update.replace(ref, _import(obj.get_object(), update, memo))
        return memo[obj.idnum]
    if isinstance(obj, StreamObject):
        copy: StreamObject = EncodedStreamObject() if "/Filter" in obj else DecodedStreamObject()
        copy.update({k: _import(v, update, memo) for k, v in obj.items() if k != "/Parent"})
        copy._data = obj._data  # as stored, still encoded by its /Filter
        return copy
    if isinstance(obj, DictionaryObject):
        return DictionaryObject({k: _import(v, update, memo) for k, v in obj.items() if k != "/Parent"})
    if isinstance(obj, ArrayObject):
        return ArrayObject(_import(v, update, memo) for v in obj)
    return obj
