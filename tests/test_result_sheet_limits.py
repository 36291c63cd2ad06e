"""Result sheets stay within the worksheet limit of 1,048,576 rows (Excel's published
specifications and limits; LibreOffice Calc has the same row limit, from memory since 3.3):
a longer table is split into consecutive sheets, each with the stamp, the header and a line
naming its table rows. The limit is lowered here so that the demo's tables cross it."""

import openpyxl
import pandas as pd

from xlcore import pipeline, results
from xlcore.results import ResultSheet
from xlcore.workbook import sheetxml
from xlcore.workbook.reader import stored_input_hash
from xlcore.workbook.writer import write_results


def test_split_keeps_every_row_once_in_order_within_the_limit():
    cols = results.SHEAR_COLUMNS[:3]
    table = pd.DataFrame({c.key: [f"{c.key}{i}" for i in range(25)] for c in cols})
    sheet = ResultSheet("Results x", "title", cols, table, preamble=[("A", 1), ("B", 2)])
    limit = 14  # row 1 title, 2-3 stamp, 4 continuation, 5 blank, 6 header: rows 7-14 hold 8 table rows
    parts = sheetxml.split(sheet, row_limit=limit)
    assert [p.name for p in parts] == ["Results x", "Results x (2)", "Results x (3)", "Results x (4)"]
    assert pd.concat([p.table for p in parts]).equals(table)
    for p in parts:
        header = sheetxml._header_row(p)
        assert header + len(p.table) <= limit
        assert p.preamble[-1][0] == "Continued"
    assert [len(p.table) for p in parts] == [8, 8, 8, 1]
    assert "rows 25 to 25 of 25" in parts[-1].preamble[-1][1]
    assert sheetxml.split(sheet, row_limit=1000) == [sheet]  # short tables untouched


def test_long_result_sheets_are_split_in_the_workbook_and_replaced_on_rerun(demo_book, monkeypatch):
    b, f = pipeline.load(demo_book)
    outcome = pipeline.compute(b, f)
    shear = next(s for s in outcome.sheets if s.name == results.SHEAR_SHEET)
    shear_rows = len(shear.table)
    header = sheetxml._header_row(shear, extra=1)  # title, stamp, continuation line, blank, header
    monkeypatch.setattr(sheetxml, "ROW_LIMIT", 500)
    write_results(demo_book, demo_book, outcome.sheets)
    wb = openpyxl.load_workbook(demo_book, read_only=True)
    parts = [n for n in wb.sheetnames if n == results.SHEAR_SHEET or n.startswith(results.SHEAR_SHEET + " (")]
    assert len(parts) == -(-shear_rows // (500 - header)) > 1
    read = 0
    for name in parts:
        ws = wb[name]
        rows = list(ws.iter_rows(values_only=True))
        assert len(rows) <= 500
        header = next(i for i, r in enumerate(rows) if r[0] == "Storey")
        read += sum(1 for r in rows[header + 1 :] if r[0] is not None)
    wb.close()
    assert read == shear_rows
    assert stored_input_hash(demo_book) == b.input_hash
    monkeypatch.undo()
    write_results(demo_book, demo_book, outcome.sheets)  # a rerun removes every part
    wb = openpyxl.load_workbook(demo_book, read_only=True)
    assert not any(n.startswith(results.SHEAR_SHEET + " (") for n in wb.sheetnames)
    wb.close()


def test_no_zip64_extension_unless_a_part_needs_it(demo_book, monkeypatch):
    """Excel refuses or repairs packages whose small parts carry the ZIP64 extension (reported
    against other xlsx writers, e.g. duckdb-excel PR #64, XlsxWriter issue #656): every part of
    an ordinary result workbook is plain (version needed to extract 2.0)."""
    import zipfile

    b, f = pipeline.load(demo_book)
    sheets = pipeline.compute(b, f).sheets
    write_results(demo_book, demo_book, sheets)
    with zipfile.ZipFile(demo_book) as z:
        assert {i.extract_version for i in z.infolist()} == {20}
    # a part beyond the ZIP64 limit (lowered here) makes the writer start again with ZIP64 on
    monkeypatch.setattr(zipfile, "ZIP64_LIMIT", 50_000)
    write_results(demo_book, demo_book, sheets)
    with zipfile.ZipFile(demo_book) as z:
        assert z.testzip() is None
        assert 45 in {i.extract_version for i in z.infolist()}
    monkeypatch.undo()
    assert stored_input_hash(demo_book) == b.input_hash  # and it reads back
