"""The two ways the input cells are read give the same building and the same input hash: the
compiled reader (python-calamine) for ordinary sheets, openpyxl's streaming reader for a sheet
with cells far beyond its rows. Workbook round trip, no engineering values."""

import zipfile

from conftest import edit

from xlcore import layout
from xlcore.pipeline import load
from xlcore.workbook import reader


def test_both_readers_give_the_same_values_and_hash(demo_book):
    fast = reader.read_workbook(demo_book)
    slow = reader._read_openpyxl(demo_book, list(fast.sheets))
    assert reader._hash(slow) == fast.input_hash
    for name, sheet in fast.sheets.items():
        a = reader._canonical(sheet.rows)
        b = reader._canonical(slow[name].rows)
        assert a == b, name


def test_a_stray_far_cell_sends_the_sheet_to_the_streaming_reader_with_the_same_result(demo_book, tmp_path):
    base, _ = load(demo_book)
    far = edit(demo_book, {(layout.WALLS.name, "ABC500000"): "note far to the right"}, tmp_path / "far.xlsx")
    with_note = reader.read_workbook(far)
    with zipfile.ZipFile(far) as z:
        part = reader.sheet_parts(z)[layout.WALLS.name]
        assert not reader._scan(z.read(part)).compact  # so openpyxl reads it
        near = z.read(part).replace(b'r="ABC500000"', b"r='ABC7'").replace(b'r="500000"', b'r="7"')
        assert reader._scan(near).compact  # a wide but short grid is small: the compiled reader
    assert with_note.sheets[layout.WALLS.name].rows[499999][-1] == "note far to the right"
    b, _ = load(far)
    assert [w.model_dump() for w in b.walls] == [w.model_dump() for w in base.walls]
    assert b.input_hash != base.input_hash  # a value was added, so the results would be stale
