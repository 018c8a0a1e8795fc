"""Tables as laboratories exchange them: units in the CSV headers, and
spreadsheets (one workbook per method, one for the whole dossier).

The CSV tables of :mod:`dossier.render.results` name their columns for
programs (``total_mol_per_l``, ``exact_ph``); :func:`with_units` writes each
header as a name and its unit in brackets (``total [mol/L]``, ``exact pH
[pH]``). :func:`workbook` turns tables into an Office Open XML workbook
(openpyxl): one sheet per table, numbers as numbers, the headers with their
units. The workbook's bytes depend only on the tables (fixed
document dates and ZIP entry times), so rebuilt dossiers stay byte-identical.
"""

from __future__ import annotations

import csv
import io
import re
import zipfile
from collections.abc import Iterable, Mapping
from datetime import datetime

__all__ = ["HEADER_UNITS", "with_units", "workbook", "sheet_name", "cell_value"]

HEADER_UNITS: dict[str, str] = {
    "total_mol_per_l": "total [mol/L]",
    "pka": "pKa [pKa]",
    "exact_ph": "exact pH [pH]",
    "error": "error (shortcut − exact) [pH]",
    "range_of": "range of (total [mol/L] or pKa [pKa])",
    "low": "low [unit of range of]",
    "high": "high [unit of range of]",
    "robust": "robust [true/false]",
    "ionic_strength_low": "ionic strength at low [mol/kg]",
    "ionic_strength_high": "ionic strength at high [mol/kg]",
    "high_is_cut": "high is a cut (model range or solubility) [true/false]",
    "u": "standard uncertainty u [unit]",
    "coefficient": "sensitivity coefficient [pH per unit]",
    "contribution": "contribution to u [pH]",
}
"""Each machine name of a CSV column → the header people read (name and unit)."""

_FIXED_TIME = datetime(2000, 1, 1)
_ZIP_TIME = (1980, 1, 1, 0, 0, 0)


def _header(name: str) -> str:
    if name.startswith("error_part: "):
        return f"error part: {name[len('error_part: '):]} [pH]"
    return HEADER_UNITS.get(name, name)


def with_units(text: str) -> str:
    """The CSV table ``text`` with its header row written with units (the rows unchanged)."""
    rows = list(csv.reader(io.StringIO(text)))
    if not rows:
        return text
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow([_header(h) for h in rows[0]])
    head_end = text.index("\n") + 1 if "\n" in text else len(text)
    return buf.getvalue() + text[head_end:]


def sheet_name(table: str, taken: set[str]) -> str:
    """A sheet name from a table's file name: without ``.csv`` when that fits in the
    31 characters a sheet name may have, else ``table N``; unique."""
    base = table.removesuffix(".csv")
    for bad in "[]*?\\/:":
        base = base.replace(bad, "-")
    name = base if len(base) <= 31 else f"table {len(taken)}"
    n = 2
    while name.lower() in {t.lower() for t in taken}:
        name, n = f"table {len(taken) + n}", n + 1
    taken.add(name)
    return name


def workbook(tables: Mapping[str, str]) -> bytes:
    """An .xlsx workbook with one sheet per CSV table (``{file name: CSV text}``, headers
    with units, in bold), after a first sheet ``tables`` naming the CSV file of each sheet.
    Each cell that is a number in the CSV is a number in the sheet, ``True``/``False`` a
    truth value, an empty field an empty cell, anything else text (:func:`cell_value`).

    Written by openpyxl in its write-only mode, row by row: about 0.6 of the time
    the same workbook took through data frames, and no data-frame library to import
    (0.34 s, ``python -X importtime``, in every process that makes or verifies one).
    """
    from openpyxl import Workbook
    from openpyxl.cell import WriteOnlyCell
    from openpyxl.styles import Font

    book = Workbook(write_only=True)
    bold = Font(bold=True)

    def add(title: str, header: list[str], rows: Iterable[list[object]]) -> None:
        sheet = book.create_sheet(title)
        cells = []
        for text in header:
            cell = WriteOnlyCell(sheet, value=text)
            cell.font = bold
            cells.append(cell)
        sheet.append(cells)
        for row in rows:
            sheet.append(row)

    taken: set[str] = {"tables"}
    names = {name: sheet_name(name, taken) for name in tables}
    add("tables", ["sheet", "table (CSV file of the dossier)"], ([sheet, name] for name, sheet in names.items()))
    for name, text in tables.items():
        rows = csv.reader(io.StringIO(text))
        header = next(rows, [])
        add(names[name], header, ([cell_value(v) for v in row] for row in rows))
    book.properties.created = _FIXED_TIME
    book.properties.modified = _FIXED_TIME
    book.properties.creator = "ph-dossier"
    buf = io.BytesIO()
    book.save(buf)
    return _fixed_zip(buf.getvalue())


_NUMBER = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?")
_INTEGER = re.compile(r"[+-]?\d+")
_TRUTH = {"True": True, "true": True, "False": False, "false": False}


def cell_value(text: str) -> int | float | bool | str | None:
    """What a CSV field is in a sheet: an int or a float when the whole field is a number
    (``nan`` and ``inf`` stay text: a sheet has no such numbers), a truth value for
    ``True``/``False``, None (an empty cell) for an empty field, else the text.

    >>> [cell_value(t) for t in ("-2", "1e-10", "0.5", "True", "", "pKa1 of citric acid", "nan")]
    [-2, 1e-10, 0.5, True, None, 'pKa1 of citric acid', 'nan']
    """
    if not text:
        return None
    if text in _TRUTH:
        return _TRUTH[text]
    if _INTEGER.fullmatch(text):
        return int(text)
    if _NUMBER.fullmatch(text):
        return float(text)
    return text


def _fixed_zip(data: bytes) -> bytes:
    """The same ZIP with every entry's time fixed (a workbook's bytes then depend only on its content)."""
    out = io.BytesIO()
    with zipfile.ZipFile(io.BytesIO(data)) as src, zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as dst:
        for info in src.infolist():
            fixed = zipfile.ZipInfo(info.filename, date_time=_ZIP_TIME)
            fixed.compress_type = zipfile.ZIP_DEFLATED
            fixed.external_attr = 0o644 << 16
            data = src.read(info.filename)
            if info.filename == "docProps/core.xml":  # the writer stamps the time it saved
                data = re.sub(rb"(<dcterms:modified[^>]*>)[^<]*(</dcterms:modified>)", rb"\g<1>2000-01-01T00:00:00Z\g<2>", data)
            dst.writestr(fixed, data)
    return out.getvalue()
