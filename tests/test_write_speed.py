"""The write phase's fast paths against the general ones they replace (issue 15, speed): the same
bytes, and a failure in a thread fails the whole write cleanly. Workbook mechanics only.

- `sheetxml.reprs` (each distinct float formatted once) against `repr` of every value;
- the table rows `sheet_pieces` makes (numbers by table, text with blanks by table) against
  rows made cell by cell with `_cell`, the general path;
- `writer._stream` (deflate in a thread) against `ZipFile.writestr`, and its error raised;
- the full tables written in a thread: an error there leaves the workbook and the folder as
  they were, and the files are those `tables.stage` writes alone;
- `results.failing_rows` with the governing rows against `governing_rows(failing=True)`.
"""

from __future__ import annotations

import io
import zipfile

import numpy as np
import pandas as pd
import pyarrow.parquet as pq
import pytest

from xlcore import pipeline, results
from xlcore.results import ResultColumn, ResultSheet
from xlcore.workbook import sheetxml, tables, writer
from xlcore.workbook.sheetxml import Styles

STYLES = Styles(title=1, caution=2, label=3, header=4, number={"0.00": 5, "0.000": 6}, text=7, wrap=8)


def _floats(n: int, rng: np.random.Generator) -> np.ndarray:
    """Few distinct values, both zeros, NaN and infinities: what the table path must keep apart."""
    pool = np.array([0.0, -0.0, 1.5, 0.1 + 0.2, 1e-300, -2.25e17, np.nan, np.inf, -np.inf, 3.0])
    return pool[rng.integers(0, len(pool), n)]


@pytest.mark.parametrize("n", [10, 63, 64, 500, 5000])
def test_reprs_equal_repr_of_every_value(n):
    rng = np.random.default_rng(n)
    x = _floats(n, rng)
    assert sheetxml.reprs(x) == [repr(v) for v in x.tolist()]
    many = rng.standard_normal(n)  # mostly distinct: the plain path
    assert sheetxml.reprs(many) == [repr(v) for v in many.tolist()]
    assert sheetxml.reprs(x[::2]) == [repr(v) for v in x[::2].tolist()]  # not contiguous


def _sheet(n: int) -> ResultSheet:
    rng = np.random.default_rng(7)
    texts = np.array(["pass", "FAIL", "a & b <c>", "", None, "\x01", "  ", "x" * 70], dtype=object)
    table = pd.DataFrame(
        {
            "storey": [f"L{k % 13}" for k in range(n)],  # text, no blanks
            "finite": rng.choice([0.0, -0.0, 2.5, 1e-7, 4e20], n),  # numbers, all finite
            "gaps": _floats(n, rng),  # numbers with blanks (NaN, infinity)
            "note": texts[rng.integers(0, len(texts), n)],  # text with blanks (pandas: NaN)
            "long": pd.Series(texts[rng.integers(0, len(texts), n)], dtype=object),  # None kept
            "mixed": np.array([1, "t", None, 2.5, True, np.nan] * (n // 6 + 1), dtype=object)[:n],
        }
    )
    columns = [
        ResultColumn("storey", "Storey"),
        ResultColumn("finite", "Finite", "kN", "0.00"),
        ResultColumn("gaps", "Gaps", "kN", "0.000"),
        ResultColumn("note", "Note"),
        ResultColumn("long", "Long note", width=30.0),
        ResultColumn("mixed", "Mixed"),
        ResultColumn("absent", "Absent", "m", "0.00"),
    ]
    return ResultSheet("Results test", "A test", columns, table, [("CAUTION", "check it")])


def _rows_cell_by_cell(sheet: ResultSheet) -> str:
    """The table rows made the general way: `_cell` for every cell, heights from the text."""
    letters = [sheetxml.get_column_letter(j + 1) for j in range(len(sheet.columns))]
    first = sheetxml._header_row(sheet) + 1
    out = []
    for i in range(len(sheet.table)):
        r = first + i
        k = 1
        for c in sheet.columns:
            v = sheet.table[c.key].iloc[i] if c.key in sheet.table else None
            if c.wraps and type(v) is str:
                k = max(k, int(np.ceil(len(v) / max(1.0, sheetxml.width(c) * 0.95))))
        ht = f' ht="{sheetxml.LINE_HEIGHT * k + 2:g}" customHeight="1"' if k > 1 else ""
        cells = []
        for j, c in enumerate(sheet.columns):
            if c.key not in sheet.table:
                continue
            v = sheet.table[c.key].iloc[i]
            if c.fmt:
                x = float(v)
                cells.append(sheetxml._cell(f"{letters[j]}{r}", x, STYLES.number[c.fmt]))
            else:
                cells.append(sheetxml._cell(f"{letters[j]}{r}", v, STYLES.wrap if c.wraps else STYLES.text))
        out.append(f'<row r="{r}"{ht}>{"".join(cells)}</row>')
    return "".join(out)


@pytest.mark.parametrize("n", [5, 100, sheetxml.CHUNK + 7])
def test_table_rows_equal_rows_made_cell_by_cell(n):
    pieces = list(sheetxml.sheet_pieces(_sheet(n), STYLES))
    assert b"".join(pieces[1:-1]).decode("utf-8") == _rows_cell_by_cell(_sheet(n))


def test_stream_writes_the_part_a_plain_write_would():
    pieces = [f"<p>{k} &amp; {k * 0.1!r}</p>".encode() * 3000 for k in range(40)]
    threaded, plain = io.BytesIO(), io.BytesIO()
    with zipfile.ZipFile(threaded, "w", zipfile.ZIP_DEFLATED) as z:
        info = zipfile.ZipInfo("xl/worksheets/sheet1.xml", date_time=(2026, 1, 1, 0, 0, 0))
        with z.open(info, "w") as part:
            writer._stream(part, iter(pieces))
    with zipfile.ZipFile(plain, "w", zipfile.ZIP_DEFLATED) as z:
        z.writestr("xl/worksheets/sheet1.xml", b"".join(pieces))
    with zipfile.ZipFile(threaded) as a, zipfile.ZipFile(plain) as b:
        assert a.testzip() is None
        assert a.read("xl/worksheets/sheet1.xml") == b.read("xl/worksheets/sheet1.xml")
        assert a.getinfo("xl/worksheets/sheet1.xml").CRC == b.getinfo("xl/worksheets/sheet1.xml").CRC


def test_stream_raises_what_the_deflate_thread_raised_and_stops_taking_pieces():
    taken = []

    class Broken:
        def write(self, piece: bytes) -> None:
            raise OSError(28, "No space left on device")

    def pieces():
        for k in range(1000):
            taken.append(k)
            yield b"x" * 10

    with pytest.raises(OSError, match="No space left"):
        writer._stream(Broken(), pieces())
    assert len(taken) < 1000  # the maker stopped: no need to make the rest


@pytest.fixture(scope="module")
def computed(demo_master):
    b, f = pipeline.load(demo_master)
    return pipeline.compute(b, f)


def test_tables_written_in_a_thread_are_those_stage_writes(computed, demo_book, tmp_path):
    full = [s for s in computed.sheets if results.GOVERNING.get(s.name)]
    stamp = {str(k): str(v) for k, v in computed.sheets[0].preamble}
    alone = tables.stage(tmp_path / "alone.xlsx", full, stamp).commit()
    writer.write_results(demo_book, demo_book, computed.sheets, tables=full)
    folder = tables.folder_for(demo_book)
    assert sorted(p.name for p in folder.iterdir()) == sorted(p.name for p in alone)
    for p in alone:
        assert pq.read_table(folder / p.name).equals(pq.read_table(p))
        assert (folder / p.name).read_bytes() == p.read_bytes()  # same stamp, same bytes


def test_an_error_writing_the_tables_in_their_thread_leaves_everything_as_it_was(
    computed, demo_book, monkeypatch
):
    full = [s for s in computed.sheets if results.GOVERNING.get(s.name)]
    before = demo_book.read_bytes()
    listing = sorted(p.name for p in demo_book.parent.iterdir())

    def broken(*args, **kwargs):
        raise RuntimeError("arrow broke")

    monkeypatch.setattr(tables, "arrow_table", broken)
    with pytest.raises(RuntimeError, match="arrow broke"):
        writer.write_results(demo_book, demo_book, computed.sheets, tables=full)
    assert demo_book.read_bytes() == before
    assert sorted(p.name for p in demo_book.parent.iterdir()) == listing  # no folder, no temporary file


def test_failing_rows_with_the_governing_rows_are_governing_rows_with_the_failing():
    rng = np.random.default_rng(3)
    n = 2000
    df = pd.DataFrame(
        {
            "storey": rng.choice(["A", "B", "C"], n),
            "pier_id": rng.choice(["1", "2"], n),
            "util": rng.uniform(0, 1.3, n),
            "util_s": rng.uniform(0, 1.3, n),
            "status": rng.choice([results.PASS, results.FAIL], n),
            "status_s": rng.choice([results.PASS, results.FAIL, "n/a"], n),
        }
    )
    for rule in results.GOVERNING.values():
        want = results.governing_rows(df, rule)
        got = results.governing_rows(df, rule, failing=False) | results.failing_rows(df, rule)
        assert np.array_equal(got, want)
    assert results.failing_rows(df, results.GOVERNING[results.AXIAL_SHEET]).sum() > 0


def test_a_large_part_with_a_bad_crc_is_refused_and_the_workbook_stays(computed, demo_book):
    """Large untouched parts are copied as stored and checked in a thread (`_check_raw`): a bad
    CRC there must still stop the save, as `ZipFile.read` did, leaving the workbook as it was."""
    name = "customXml/big-note.xml"
    payload = b"<note>" + np.random.default_rng(1).bytes(3 << 19).hex().encode() + b"</note>"
    with zipfile.ZipFile(demo_book, "a", zipfile.ZIP_DEFLATED) as z:
        z.writestr(name, payload, compresslevel=9)
    data = bytearray(demo_book.read_bytes())
    at = data.find(b"PK\x01\x02")  # the central directory entry of the part: its CRC-32
    while data[at + 46 : at + 46 + len(name)] != name.encode():
        at = data.find(b"PK\x01\x02", at + 4)
    data[at + 16] ^= 0x01
    demo_book.write_bytes(bytes(data))
    listing = sorted(p.name for p in demo_book.parent.iterdir())
    with pytest.raises(zipfile.BadZipFile, match="Bad CRC-32"):
        writer.write_results(demo_book, demo_book, computed.sheets)
    assert demo_book.read_bytes() == bytes(data)
    assert sorted(p.name for p in demo_book.parent.iterdir()) == listing


@pytest.mark.parametrize("na", [np.nan, pd.NA])
def test_python_strings_to_arrow_equal_pandas_own_conversion(na):
    """`tables._array` takes a Python-storage text column's own array; pandas' `__arrow_array__`
    (the general path) must give the same Arrow array, nulls where a value is missing."""
    import pyarrow as pa

    values = ["a", None, "b & <c>", np.nan, pd.NA, "", "é", "x" * 500] * 50
    col = pd.Series(values, dtype=pd.StringDtype("python", na_value=na))
    want = pa.array(col, type=pa.string(), from_pandas=True)
    got = tables._array(col, numeric=False)
    assert got.equals(want)
    assert got.null_count == 3 * 50
