"""The read and validate fast paths (issue 15) give what the general paths give, cell for cell
and bit for bit: columns sliced from one object array, number columns converted at once, blank
optional cells set column-wise, the compiled reader in a worker thread, the extent question
settled in one search. And the input hash is today's value for the same workbook: computed
workbooks' stamps are compared against it. Workbook mechanics only, no engineering values."""

from __future__ import annotations

import math
import random
from types import SimpleNamespace

import numpy as np
import openpyxl
import pandas as pd
import pytest

from xlcore import layout, validate
from xlcore.diagnostics import Findings
from xlcore.layout import Kind
from xlcore.workbook import reader

# The input hash of `_synthetic_book`, as the reader gave it before issue 15's changes.
SYNTHETIC_HASH = "e658dbf6bc08e3fb29b483d7d639974dd2af9b8d78e1b9355c36b34dafec6624"


def _synthetic_book(path):
    """A workbook of two input sheets: storeys, and member actions longer than 64 rows with an
    optional column left blank (the shape whose rows the hash trims by slices)."""
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = layout.STOREYS.name
    ws.append([c.header for c in layout.STOREYS.columns])
    for i in range(5):
        ws.append([f"L{i:02d}", 3.2 * i, 3.2, 200])
    ws = wb.create_sheet(layout.MEMBER_ACTIONS.name)
    ws.append([c.header for c in layout.MEMBER_ACTIONS.columns])
    for i in range(300):
        ws.append([f"L{i % 5:02d}", f"C{i // 5}", f"W{i % 3}", 1000.5 + i, i / 7, -i * 1e-5, None])
    ws.append(["L04", "C99", "W2", "=1+1", "text", 3, None])
    wb.save(path)
    return path


def test_the_input_hash_is_todays_value(tmp_path):
    raw = reader.read_workbook(_synthetic_book(tmp_path / "book.xlsx"))
    assert raw.input_hash == SYNTHETIC_HASH


def test_the_threaded_read_gives_what_openpyxl_reads(tmp_path):
    path = _synthetic_book(tmp_path / "book.xlsx")
    fast = reader.read_workbook(path)
    slow = reader._read_openpyxl(path, list(fast.sheets))
    slow[layout.MEMBER_ACTIONS.name].rows[-1][3] = 2.0  # the formula, as the evaluation fills it
    assert reader._hash(slow) == fast.input_hash
    for name, sheet in fast.sheets.items():
        assert reader._canonical(sheet.rows) == reader._canonical(slow[name].rows)


def test_a_package_the_compiled_reader_cannot_open_is_left_to_openpyxl(tmp_path):
    bad = tmp_path / "not.xlsx"
    bad.write_bytes(b"not a zip")
    with reader._Calamine(bad) as calamine:
        calamine.ask(layout.STOREYS.name)
        assert calamine.sheets() == {}


# ------------------------------------------------------------------ the extent question

WIDE = 26  # columns A..Z: the usual sheet, settled by one search


def _sheet(*refs: bytes) -> bytes:
    cells = b"".join(b'<row r="%d"><c r="%s"><v>1</v></c></row>' % (i + 1, r) for i, r in enumerate(refs))
    return b"<worksheet><sheetData>" + cells + b"</sheetData></worksheet>"


def _narrow_height(cells: int) -> int:
    return (reader.MAX_GRID + 8 * cells) // WIDE


EDGE = _narrow_height(3)
EXTENT_CASES = {
    "usual": [b"A1", b"B2", b"Z3"],
    "at the usual height": [b"A1", b"B2", b"Z%d" % EDGE],
    "past the usual height": [b"A1", b"B2", b"Z%d" % (EDGE + 1)],
    "past it, leading zeros": [b"A1", b"B2", b"Z000%d" % (EDGE + 1)],
    "below it, leading zeros": [b"A1", b"B2", b"Z000%d" % EDGE],
    "two letters, near": [b"A1", b"AA2", b"B3"],
    "two letters, far for A..Z only": [b"A1", b"AB2", b"B%d" % (EDGE + 1)],
    "two letters, far": [b"A1", b"AB2", b"B%d" % (EDGE * 2)],
    "three letters": [b"A1", b"XFD2", b"B3"],
    "four letters": [b"A1", b"ABCD2", b"B3"],
    "lower case": [b"a1", b"zz2", b"b3"],
}


@pytest.mark.parametrize("name", sorted(EXTENT_CASES))
def test_the_extent_in_one_search_answers_as_the_general_scan(name):
    xml = _sheet(*EXTENT_CASES[name])
    plain = reader._plain(xml)
    assert plain is not None and plain.cells == 3
    assert reader._compact_plain(plain) == reader._compact(xml)
    assert (plain.start, plain.end) == (xml.find(b"<sheetData>"), xml.rfind(b"</sheetData>"))


def test_the_extent_cases_reach_both_answers():
    answers = {reader._compact_plain(reader._plain(_sheet(*refs))) for refs in EXTENT_CASES.values()}
    assert answers == {True, False}


# ------------------------------------------------------------------ validate: columns


def _columns_by_zip(body: list, idx: list) -> list[list]:
    """The columns as `validate._table` made them before issue 15 (a transpose by zip)."""
    need = max((i for i in idx if i is not None), default=-1) + 1
    if body and min(map(len, body)) >= need:
        every = list(zip(*body, strict=False)) if need else []
        return [list(every[i]) if i is not None else [None] * len(body) for i in idx]
    return [
        [r[i] if i < len(r) else None for r in body] if i is not None else [None] * len(body)
        for i in idx
    ]


def _same_cells(a: list[list], b: list[list]) -> None:
    assert len(a) == len(b)
    for x, y in zip(a, b, strict=True):
        assert len(x) == len(y)
        assert all(u is v for u, v in zip(x, y, strict=True))  # the very cell objects


def _body(width: int, rows: int = 50) -> list[list]:
    cells = [1.5, "", "W1", None, True, 7, " x ", float("nan"), "#REF!", -0.0]
    return [[cells[(3 * r + c) % len(cells)] for c in range(width)] for r in range(rows)]


@pytest.mark.parametrize(
    "body, idx",
    [
        (_body(7), [0, 2, None, 6, 3]),
        (_body(7), [6, 5, 4, 3, 2, 1, 0]),
        (_body(3), [None, None]),
        ([r[: 2 + i % 3] for i, r in enumerate(_body(5))], [0, 1, 4]),  # ragged rows
        ([r[:5] if i % 2 else r for i, r in enumerate(_body(7))], [0, 3]),  # ragged, wide enough
        ([], [0, 1]),
    ],
)
def test_columns_are_the_cells_a_transpose_gives(body, idx):
    _same_cells(validate._columns(body, idx), _columns_by_zip(body, idx))


def test_the_grid_route_is_taken_for_rows_of_one_width():
    assert validate._grid(_body(7), 7) is not None
    assert validate._grid([[1.0, 2.0], [3.0]], 1) is None


# ------------------------------------------------------------------ validate: typing


def _plain_numbers_cellwise(column: list, c) -> np.ndarray:
    """`validate._plain_numbers` as it was before issue 15: cell by cell."""
    x = np.array([v if type(v) in (float, int) else np.nan for v in column], dtype=float)
    bad = ~np.isfinite(x) | validate._outside(x, c)
    if c.kind is Kind.INTEGER:
        bad |= x != np.round(x)
    x[bad] = np.nan
    return x


def _number_columns():
    t = layout.MEMBER_ACTIONS
    yield t.column("n"), [1.0, -2.5, 3e5, 0.0, -0.0, 1e300, 0.1, 1 / 3, 1234.5678, -99.99]
    yield t.column("n"), [1.0, 2, -3, 10**20, 4.25]
    yield t.column("n"), ["", "", " ", None]
    yield t.column("n"), []
    yield t.column("n"), [1.0, "", True, "2", float("inf"), None, 5]
    for c in layout.WALLS.columns:
        if c.kind is Kind.INTEGER:
            yield c, [1.0, 2.5, 3, -1.0, 1e9, float("nan")]
        elif c.kind is Kind.NUMBER and c.min is not None:
            yield c, [c.min, c.min - 1.0, c.min + 1.0, 1e12, -1e12]


@pytest.mark.parametrize("c, column", list(_number_columns()))
def test_number_columns_convert_as_cell_by_cell(c, column):
    got, want = validate._plain_numbers(column, c), _plain_numbers_cellwise(column, c)
    assert got.dtype == want.dtype and got.tobytes() == want.tobytes()


def _findings(f: Findings) -> list:
    return [(e.severity, e.sheet, e.cell, e.message) for e in f]


def _typed_cases():
    t = layout.MEMBER_ACTIONS
    mixed = [1.0, "", 2.0, "abc", None, " ", 3, "1,5", "", 4.0, True]
    for key in ("n", "m_out", "storey", "combination"):
        c = t.column(key)
        yield c, mixed
        yield c, ["", None, " "] * 4
        yield c, [5.0, "C1", "", "W1"] * 3
    for c in layout.WALLS.columns:
        yield c, mixed


@pytest.mark.parametrize("c, column", list(_typed_cases()))
def test_blank_cells_set_column_wise_as_cell_by_cell(c, column):
    rows = list(range(2, 2 + len(column)))
    f_fast, f_slow = Findings(), Findings()
    blanks = validate._blank_mask(column)
    fast = validate._typed_column(list(column), rows, c, 3, "S", f_fast, blanks)
    slow = validate._typed_column(list(column), rows, c, 3, "S", f_slow)
    assert _findings(f_fast) == _findings(f_slow)
    assert fast.dtype == slow.dtype
    for a, b in zip(fast.tolist(), slow.tolist(), strict=True):
        assert type(a) is type(b) and (a == b or (a != a and b != b)), (a, b)
    if not c.required and any(validate.blank(v) for v in column):
        numeric = c.kind in (Kind.NUMBER, Kind.INTEGER)
        assert all(
            (math.isnan(v) if numeric else v is None)
            for v, cell in zip(fast.tolist(), column, strict=True)
            if validate.blank(cell)
        )


# ------------------------------------------------------------------ validate: action rows


def _suspect_by_text(rows, index, members, walls_of) -> np.ndarray:
    """`validate._suspect_action_rows` as it was before issue 15: group-bys on the text."""
    known = rows.storey.isin(list(index)) | rows.storey.isna()
    pairs = pd.MultiIndex.from_tuples([(st, m) for st, ms in members.items() for m in ms])
    valid = pd.MultiIndex.from_arrays([rows.storey, rows.member]).isin(pairs)
    blank = rows[["storey", "combination", "member"]].isna().any(axis=1).to_numpy()
    repeated = rows.duplicated(["storey", "combination", "member"], keep=False).to_numpy()
    wall = rows.member.map(walls_of).fillna(rows.member)
    level = (wall == rows.member).to_numpy()
    mixed = (
        pd.DataFrame(dict(s=rows.storey, c=rows.combination, w=wall, lv=level))
        .groupby(["s", "c", "w"], dropna=False)
        .lv.transform("nunique")
        .gt(1)
        .to_numpy()
    )
    return ~known.to_numpy() | (~valid & ~blank) | repeated | mixed


@pytest.mark.parametrize("seed", range(40))
@pytest.mark.parametrize("text", [True, False])
def test_suspect_action_rows_are_those_the_text_group_bys_mark(seed, text):
    rng = random.Random(seed)
    n = rng.randint(1, 60)
    data = {
        "row": np.arange(n) + 2,
        "storey": [rng.choice(["L1", "L2", None, "X"]) for _ in range(n)],
        "combination": [rng.choice(["C1", "C2", None]) for _ in range(n)],
        "member": [rng.choice(["W1", "W1-1", "W1-2", "W2", None, "Q"]) for _ in range(n)],
    }
    rows = pd.DataFrame(data if text else {k: np.array(v, dtype=object) for k, v in data.items()})
    members = {"L1": {"W1", "W1-1", "W1-2", "W2"}, "L2": {"W1", "W2"}}
    walls_of = {"W1-1": "W1", "W1-2": "W1", "W1": "W1", "W2": "W2"}
    got = validate._suspect_action_rows(rows, {"L1", "L2"}, members, walls_of)
    want = _suspect_by_text(rows, {"L1", "L2"}, members, walls_of)
    assert got.dtype == want.dtype and got.tolist() == want.tolist()


def _plain_by_counting(xml: bytes) -> bool:
    """Whether `reader._plain` took a sheet before issue 15 (four counts of tag forms)."""
    start, end = xml.find(b"<sheetData>"), xml.rfind(b"</sheetData>")
    if start < 0 or end < start:
        return False
    if reader.PLAIN_OUTSIDE.search(xml, 0, start) or reader.PLAIN_OUTSIDE.search(xml, end):
        return False
    body = xml[start:end]
    if body.count(b"<c") != body.count(b'<c r="') or body.count(b"<row") != body.count(b'<row r="'):
        return False
    return not reader.PLAIN_PREFIXED.search(body)


ROW_FORMS = {
    "plain": b'<row r="1"><c r="A1"><v>1</v></c></row>',
    "cell without reference": b'<row r="1"><c><v>1</v></c></row>',
    "cell type first": b'<row r="1"><c t="n" r="A1"><v>1</v></c></row>',
    "cell reference in single quotes": b"<row r=\"1\"><c r='A1'><v>1</v></c></row>",
    "row spans first": b'<row spans="1:1" r="1"><c r="A1"><v>1</v></c></row>',
    "row without reference": b'<row><c r="A1"><v>1</v></c></row>',
    "prefixed value": b'<row r="1"><c r="A1"><x:v>1</x:v></c></row>',
    "spaced reference": b'<row r="1"><c  r="A1"><v>1</v></c></row>',
}


@pytest.mark.parametrize("name", sorted(ROW_FORMS))
def test_plain_sheets_are_those_the_counts_took(name):
    xml = b"<worksheet><sheetData>" + ROW_FORMS[name] + ROW_FORMS["plain"] + b"</sheetData></worksheet>"
    assert (reader._plain(xml) is not None) == _plain_by_counting(xml)
    assert (reader._plain(xml) is not None) == (name == "plain")


# ------------------------------------------------------------------ validate: core actions


def test_storeys_of_one_plan_share_the_stability_answer_and_others_do_not():
    """L1 and L3 have three walls that brace each other; L2 only the two parallel ones. The
    answer found for L1's plan serves L3, not L2."""
    walls = {  # wall: (ux, uy, wx, wy, length)
        "W1": (1.0, 0.0, 0.0, 0.0, 5.0),
        "W2": (0.0, 1.0, 0.0, 0.0, 5.0),
        "W3": (1.0, 0.0, 0.0, 5.0, 5.0),
    }
    plans = {"L1": ["W1", "W2", "W3"], "L2": ["W1", "W3"], "L3": ["W1", "W2", "W3"]}
    piers = pd.DataFrame(
        [
            dict(storey=s, wall_id=w, core="", ux=ux, uy=uy, wx=wx, wy=wy, wall_length=length)
            for s, ws in plans.items()
            for w in ws
            for ux, uy, wx, wy, length in [walls[w]]
        ]
    )
    df = pd.DataFrame(dict(row=[2, 3, 4], storey=["L1", "L2", "L3"], combination="C1", core=""))
    df.attrs["columns"] = {"storey": 0, "combination": 1, "core": 10}
    f = Findings()
    validate._stable_storeys(df, SimpleNamespace(piers=piers), f)
    assert [(e.cell, "storey L2" in e.message) for e in f.errors] == [("A3", True)]
