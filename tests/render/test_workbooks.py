"""The workbook writer, read back with openpyxl's reader: what each CSV field becomes
in a sheet, bold headers, the index sheet, and the same bytes for the same tables."""

from __future__ import annotations

import io

from openpyxl import load_workbook

from dossier.render.workbooks import workbook

TABLE = (
    "solution,count,low [mol/L],robust [true/false],note\n"
    "buffer,-2,1e-10,True,\n"
    "rinse,3,0.5,False,nan\n"
)


def test_each_field_becomes_a_number_a_truth_value_an_empty_cell_or_text() -> None:
    book = load_workbook(io.BytesIO(workbook({"validity.csv": TABLE})))
    assert book.sheetnames == ["tables", "validity"]
    assert [tuple(r) for r in book["tables"].iter_rows(values_only=True)] == [("sheet", "table (CSV file of the dossier)"), ("validity", "validity.csv")]
    rows = list(book["validity"].iter_rows(values_only=True))
    assert rows[0] == ("solution", "count", "low [mol/L]", "robust [true/false]", "note")
    assert rows[1] == ("buffer", -2, 1e-10, True, None)
    assert rows[2] == ("rinse", 3, 0.5, False, "nan")  # a sheet has no NaN: the text stays text
    assert isinstance(rows[1][1], int) and isinstance(rows[1][2], float) and rows[1][3] is True
    assert all(cell.font.b for cell in book["validity"][1])  # headers in bold
    assert not book["validity"]["A2"].font.b


def test_same_tables_same_bytes_and_long_names_get_a_sheet_name_that_fits() -> None:
    long = "solution-weak-acid-square-root-concentration-sweep.csv"
    tables = {"validity.csv": TABLE, long: "total [mol/L],exact pH [pH]\n0.1,2.87\n"}
    data = workbook(tables)
    assert data == workbook(tables)
    book = load_workbook(io.BytesIO(data))
    assert book.sheetnames == ["tables", "validity", "table 2"]
    assert list(book["table 2"].iter_rows(values_only=True))[1] == (0.1, 2.87)
