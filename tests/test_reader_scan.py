"""The input-sheet scan's fast route (sheets written the plain way: `<c r="...`, `<row r="...`,
no prefixed tags) gives the same answers as the general scan, which reads any attribute order,
quoting and prefix: error values, formulas without saved values, whether the cell extent is
small enough for the compiled reader, rows out of order, shared strings out of range. Workbook
mechanics only (ECMA-376 Part 1, 18.3.1: sheetData, row, c), no engineering values."""

import zipfile

import pytest

from xlcore import layout
from xlcore.diagnostics import FileProblem
from xlcore.workbook import reader
from xlcore.workbook.package import sheet_parts

HEAD = (
    b'<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main">'
    b'<cols><col min="1" max="2"/></cols><sheetData>'
)
TAIL = (
    b"</sheetData><dataValidations><dataValidation><formula1>1</formula1></dataValidation>"
    b"</dataValidations></worksheet>"
)


def sheet(*rows: bytes) -> bytes:
    return HEAD + b"".join(rows) + TAIL


def row(r: int, *cells: bytes) -> bytes:
    return b'<row r="%d">' % r + b"".join(cells) + b"</row>"


NUM = b'<c r="%s"><v>1</v></c>'
PLAIN_CASES = {
    "numbers": sheet(row(1, NUM % b"A1", NUM % b"B1"), row(2, NUM % b"A2")),
    "far row": sheet(row(1, NUM % b"A1"), row(9_000_000, NUM % b"A9000000")),
    "far row, leading zeros": sheet(row(1, NUM % b"A1"), row(7, NUM % b"A0000007")),
    "just inside": sheet(row(1, NUM % b"A1"), row(153_846, NUM % b"Z153846")),
    "just outside": sheet(row(1, NUM % b"A1"), row(153_847, NUM % b"Z153847")),
    "wide column": sheet(row(1, NUM % b"A1", NUM % b"ABC7")),
    "too many letters": sheet(row(1, NUM % b"ABCD7")),
    "error": sheet(
        row(1, b'<c r="B1" t="e"><v>#REF!</v></c>', b'<c r="C1" t="e"><f>1/0</f><v>#DIV/0!</v></c>')
    ),
    "formula without value": sheet(row(1, b'<c r="A1"><f>1+1</f></c>')),
    "formula with value": sheet(row(1, b'<c r="A1"><f>1+1</f><v>2</v></c>')),
    "formatted blanks": sheet(row(1, b'<c r="A1" s="5"/>', b'<c r="B1" s="5"/>')),
}


@pytest.mark.parametrize("name", sorted(PLAIN_CASES))
def test_fast_route_answers_as_the_general_scan(name):
    xml = PLAIN_CASES[name]
    plain = reader._plain(xml)
    assert plain is not None  # these are written the plain way, so the fast route is taken
    assert reader._scan(xml, plain) == reader._scan_general(xml)


def test_the_extent_limit_is_the_same_either_way():
    # 4 000 000 + 8 per cell over 26 columns: 2 cells give 153 846 rows (MAX_GRID in reader.py)
    assert reader._scan(PLAIN_CASES["just inside"]).compact
    assert not reader._scan(PLAIN_CASES["just outside"]).compact
    assert not reader._scan(PLAIN_CASES["far row"]).compact
    assert reader._scan(PLAIN_CASES["far row, leading zeros"]).compact  # row 7
    assert reader._scan(PLAIN_CASES["error"]).errors == {(1, 1): "#REF!", (1, 2): "#DIV/0!"}
    assert reader._scan(PLAIN_CASES["formula without value"]).uncached
    assert not reader._scan(PLAIN_CASES["formula with value"]).uncached


@pytest.mark.parametrize(
    "xml",
    [
        sheet(row(1, b"<c r='A1'><v>1</v></c>")),  # single quotes
        sheet(row(1, b'<c s="1" r="A1"><v>1</v></c>')),  # reference not first
        sheet(row(1, b'<x:c r="A1"><v>1</v></x:c>')),  # prefixed cell
        sheet(row(1, b'<c r="A1"><x:f>1+1</x:f></c>')),  # prefixed formula
        sheet(b'<row spans="1:2" r="1"><c r="A1"/></row>'),  # row number not first
        HEAD.replace(b"<sheetData>", b'<c r="XFD1048576"/><sheetData>') + row(1, NUM % b"A1") + TAIL,
        b'<worksheet><x:sheetData><row r="1"><c r="A1"/></row></x:sheetData></worksheet>',
    ],
)
def test_other_forms_take_the_general_route(xml):
    assert reader._plain(xml) is None


def test_rows_out_of_order_and_strings_out_of_range_are_refused_on_the_fast_route(tmp_path):
    back = sheet(row(2, NUM % b"A2"), row(1, NUM % b"A1"))
    assert reader._plain(back) is not None
    with pytest.raises(FileProblem, match="lists row 1 after row 2"):
        reader._check_sheet(tmp_path, "S", back, 0, reader._plain(back))
    shared = sheet(row(1, b'<c r="A1" t="s"><v>3</v></c>'))
    reader._check_sheet(tmp_path, "S", shared, 4, reader._plain(shared))  # indices 0..3 exist
    with pytest.raises(FileProblem, match="uses shared string 3, but the workbook holds 3"):
        reader._check_sheet(tmp_path, "S", shared, 3, reader._plain(shared))
    spaced = sheet(row(1, b'<c r="A1" t = "s"><v>3</v></c>'))  # unusual quoting: the general scan
    with pytest.raises(FileProblem, match="uses shared string 3"):
        reader._check_sheet(tmp_path, "S", spaced, 3, reader._plain(spaced))


def test_the_demo_workbook_takes_the_fast_route_with_the_same_answers(demo_book):
    with zipfile.ZipFile(demo_book) as z:
        parts = sheet_parts(z)
        for name in layout.INPUT_SHEET_NAMES:
            if name not in parts:
                continue
            xml = z.read(parts[name])
            assert reader._plain(xml) is not None, name
            assert reader._scan(xml) == reader._scan_general(xml), name
