"""What goes into the workbook at building scale (issue 15 section 1): `compute --detail`.

The governing selection is checked against an independent pandas groupby written here by hand
(the worst row per group by `idxmax`, plus the failing rows); the Parquet files against the
cells of a `--detail all` workbook read back by openpyxl. The demo building is made to fail in
shear and in axial + bending at a few rows by raising V* and M* on the member-actions sheet, so
that every kind of kept row occurs: governing rows, failing rows that are not governing, and
groups without any."""

from __future__ import annotations

import dataclasses
import math
import os
import shutil
from pathlib import Path

import numpy as np
import openpyxl
import pandas as pd
import pyarrow as pa
import pyarrow.parquet as pq
import pytest
from conftest import column_letter, edit
from typer.testing import CliRunner

from xlcore import layout, pipeline, results
from xlcore.cli import app
from xlcore.diagnostics import FileProblem
from xlcore.workbook import tables, writer
from xlcore.workbook.reader import stored_input_hash

runner = CliRunner()
CUT = [  # the demo's per-combination tables
    results.SHEAR_SHEET,
    results.AXIAL_SHEET,
    results.LINTELS_SHEET,
    results.CORE_STRESS_SHEET,
    results.CORE_NM_SHEET,
    results.CORE_SHEET,
    results.CORES_SHEET,  # where the demo has several cores
]


@pytest.fixture(scope="module")
def failing_master(demo_master, tmp_path_factory) -> Path:
    """The demo with V* raised to 9000 kN on three member-action rows (those rows fail in
    shear) and M* to 90 000 kNm on three others (those fail in axial + bending)."""
    a = layout.MEMBER_ACTIONS
    path = tmp_path_factory.mktemp("detail") / "failing.xlsx"
    cells = {(a.name, f"{column_letter(a, 'v')}{r}"): 9000.0 for r in (2, 3, 4)}
    cells |= {(a.name, f"{column_letter(a, 'm')}{r}"): 90000.0 for r in (6, 7, 8)}
    edit(demo_master, cells, out=path)
    return path


@pytest.fixture(scope="module")
def full(failing_master) -> dict[str, pd.DataFrame]:
    """Every result table in full, as computed (no selection)."""
    b, f = pipeline.load(failing_master)
    return {s.name: s.table for s in pipeline.compute(b, f).sheets}


@pytest.fixture(scope="module")
def computed(failing_master) -> pipeline.Outcome:
    """Computed for governing rows: the cut tables without their working text until written."""
    b, f = pipeline.load(failing_master)
    o = pipeline.compute(b, f, detail="governing")
    assert {s.name for s in o.sheets if s.rework} == {
        results.SHEAR_SHEET,
        results.AXIAL_SHEET,
        results.CORE_SHEET,
        results.CORE_STRESS_SHEET,
    }
    return o


def run(computed: pipeline.Outcome, book: Path, mode: str, limit: int | None = None, out: Path | None = None):
    """What `compute --detail MODE` does after computing, on a copy of the module's outcome
    (the command line itself is run by the first two tests)."""
    o = dataclasses.replace(
        computed, sheets=[dataclasses.replace(s, preamble=list(s.preamble)) for s in computed.sheets]
    )
    target = out or book
    pipeline.select_detail(o, mode, tables.folder_for(target).name, limit)
    writer.write_results(book, target, o.sheets, tables=o.full_tables, overwrite=True)
    return o


@pytest.fixture
def book(failing_master, tmp_path) -> Path:
    dst = tmp_path / "tower.xlsx"
    shutil.copy(failing_master, dst)
    return dst


def sheet_frame(path: Path, name: str) -> pd.DataFrame:
    """A result sheet's table as written, headers as in the workbook (openpyxl, read back)."""
    ws = openpyxl.load_workbook(path, read_only=True)[name]
    rows = list(ws.iter_rows(values_only=True))
    head = next(i for i, r in enumerate(rows) if r and r[0] == "Storey")
    header = [h for h in rows[head] if h is not None]
    body = [r[: len(header)] for r in rows[head + 1 :] if any(v is not None for v in r)]
    return pd.DataFrame(body, columns=header)


def sheet_line(path: Path, sheet: str, label: str) -> str | None:
    """The line above a sheet's table that starts with `label:` (None if there is none)."""
    ws = openpyxl.load_workbook(path, read_only=True)[sheet]
    for row in ws.iter_rows(values_only=True, max_col=1):
        if isinstance(row[0], str) and row[0].startswith(label + ":"):
            return row[0]
    return None


def summary_line(path: Path, label: str) -> str | None:
    return sheet_line(path, results.SUMMARY_SHEET, label)


def blank(x):
    """None for what a sheet shows as a blank cell, else the value."""
    if x is None or x == "" or (isinstance(x, float) and not math.isfinite(x)):
        return None
    return x


def by_hand(df: pd.DataFrame, rule: results.Governing) -> set[int]:
    """Row positions governing keeps, by plain pandas: per group idxmax of each worst column
    (magnitude where the rule says), a group with no value keeps its first row; plus FAIL rows."""
    df = df.reset_index(drop=True)
    keep: set[int] = set()
    group = [g for g in rule.group if g in df]
    for col in rule.worst:
        v = pd.to_numeric(df[col], errors="coerce")
        v = v.abs() if col in rule.magnitude else v
        g = pd.DataFrame({"v": v}).join(df[group])
        for _, grp in g.groupby(group, sort=False, dropna=False):
            keep.add(int(grp.v.idxmax()) if grp.v.notna().any() else int(grp.index[0]))
    for col in rule.failing:
        keep |= set(np.flatnonzero((df[col] == results.FAIL).to_numpy()).tolist())
    return keep


def row_keys(df: pd.DataFrame, cols: list[str]) -> list[str]:
    """Each row's identifying cells as one text ('' for a blank)."""
    rows = zip(*(df[c] for c in cols), strict=True)
    return ["|".join("" if v is None or v != v else str(v) for v in row) for row in rows]


def key_columns(name: str) -> list[str]:
    """Columns that identify a row of a table (storey, member, combination), as keys."""
    cols = [c.key for c in next(_columns(name))]
    ids = ("storey", "pier_id", "lintel_id", "wall_id", "member", "combination", "kind", "core")
    return [k for k in ids if k in cols]


def _columns(name: str):
    yield {
        results.SHEAR_SHEET: results.SHEAR_COLUMNS,
        results.AXIAL_SHEET: results.AXIAL_COLUMNS,
        results.LINTELS_SHEET: results.LINTEL_RESULT_COLUMNS,
        results.CORE_STRESS_SHEET: results.CORE_STRESS_COLUMNS,
        results.CORE_NM_SHEET: results.CORE_NM_COLUMNS,
        results.CORE_SHEET: results.CORE_COLUMNS,
        results.CORES_SHEET: results.CORES_COLUMNS,
    }[name]


def titles(name: str) -> dict[str, str]:
    return {c.key: c.title for c in next(_columns(name))}


def test_the_demo_has_what_the_selection_must_handle(full):
    shear = full[results.SHEAR_SHEET]
    assert (shear.status == results.FAIL).sum() == 3  # the three rows raised above
    assert (full[results.AXIAL_SHEET].status == results.FAIL).sum() >= 3


def test_governing_keeps_the_worst_row_per_group_and_every_failing_row(book, full):
    r = runner.invoke(app, ["compute", str(book), "--detail", "governing", "-q"])
    assert r.exit_code == 0, r.output
    for name in [n for n in CUT if n in full]:
        rule = results.GOVERNING[name]
        table = full[name].reset_index(drop=True)
        want = table.iloc[sorted(by_hand(table, rule))]
        got = sheet_frame(book, name)
        keys = key_columns(name)
        t = titles(name)
        want_keys = row_keys(want, keys)
        got_keys = row_keys(got, [t[k] for k in keys])
        if len(want) == len(table):  # nothing left out (the demo's lintels): written in full
            assert got_keys == want_keys, name
            continue
        assert got_keys == want_keys, name  # the same rows, in the table's order
        assert len(got) < len(table), name
        # the working text, made for the rows written only, is the text of those rows in full
        for c in next(_columns(name)):
            if c.is_working:
                assert [blank(x) for x in got[c.title]] == [blank(x) for x in want[c.key]], (name, c.key)
    shear = sheet_frame(book, results.SHEAR_SHEET)
    t = titles(results.SHEAR_SHEET)
    assert (shear[t["status"]] == results.FAIL).sum() == 3  # every failing row is there
    per_pier = full[results.SHEAR_SHEET].groupby(["storey", "pier_id"]).util.max()
    seen = shear.groupby([t["storey"], t["pier_id"]])[t["util"]].max()
    assert np.allclose(seen.sort_index().to_numpy(), per_pier.sort_index().to_numpy(), rtol=1e-12)


def test_auto_switches_at_the_limit(book, full, monkeypatch):
    n_shear = len(full[results.SHEAR_SHEET])
    monkeypatch.setattr(results, "DETAIL_ROW_LIMIT", n_shear - 1)  # shear and axial just over it
    r = runner.invoke(app, ["compute", str(book), "-q"])
    assert r.exit_code == 0, r.output
    over = {n for n in CUT if n in full and len(full[n]) > n_shear - 1}
    assert results.SHEAR_SHEET in over and results.CORE_NM_SHEET not in over
    folder = tables.folder_for(book)
    assert sorted(p.name for p in folder.iterdir()) == sorted(tables.file_name(n) for n in over)
    for name in [n for n in CUT if n in full]:
        rows = len(sheet_frame(book, name))
        if name in over:
            assert rows < len(full[name]), name
        else:
            assert rows == len(full[name]), name
    assert "governing rows only" in r.stderr and "--detail auto" in r.stderr
    line = summary_line(book, "Rows left out")
    assert line is not None and tables.file_name(results.SHEAR_SHEET) in line and folder.name in line
    assert tables.file_name(results.CORE_NM_SHEET) not in line
    shear_line = sheet_line(book, results.SHEAR_SHEET, "Rows shown")
    assert shear_line is not None and "governing rows only" in shear_line
    # at the limit exactly: every row, no folder (the previous run's files removed)
    monkeypatch.setattr(results, "DETAIL_ROW_LIMIT", max(len(t) for t in full.values()))
    r = runner.invoke(app, ["compute", str(book), "-q"])
    assert r.exit_code == 0, r.output
    assert not folder.exists()
    assert len(sheet_frame(book, results.SHEAR_SHEET)) == n_shear
    assert summary_line(book, "Rows left out") is None
    assert sheet_line(book, results.SHEAR_SHEET, "Rows shown") is None


def test_parquet_holds_every_row_with_the_values_of_a_detail_all_workbook(computed, full, book, tmp_path):
    every = tmp_path / "every.xlsx"
    r = runner.invoke(app, ["compute", str(book), "-o", str(every), "--detail", "all", "-q"])
    assert r.exit_code == 0, r.output
    assert not tables.folder_for(every).exists()
    run(computed, book, "governing")
    folder = tables.folder_for(book)
    stored = stored_input_hash(book)
    assert stored is not None and stored == stored_input_hash(every)
    for name in [n for n in CUT if n in full]:
        path = folder / tables.file_name(name)
        if name == results.LINTELS_SHEET and not path.exists():
            continue  # the demo's lintels: one row per lintel and storey, nothing left out
        t = pq.read_table(path)
        meta = t.schema.metadata
        assert meta[b"xlcore.input_hash"].decode() == stored
        assert meta[b"xlcore.file"].decode() == path.name and meta[b"xlcore.sheet"].decode() == name
        got = t.to_pandas()
        want = sheet_frame(every, name)
        assert len(got) == len(want) == int(meta[b"xlcore.rows"]), name
        cols = [c for c in next(_columns(name)) if not c.is_working]
        assert list(got.columns) == [c.title for c in cols]
        for c in cols:
            g, w = got[c.title].tolist(), want[c.title].tolist()
            # text as text; numbers exactly (the sheet holds repr(float)); a blank cell is an
            # empty text, null, NaN or inf in Parquet
            assert [blank(x) for x in g] == [blank(x) for x in w], (name, c.title)


def test_stale_files_of_an_earlier_run_go_and_the_users_files_stay(computed, book):
    folder = tables.folder_for(book)
    run(computed, book, "governing")
    ours = sorted(p.name for p in folder.iterdir())
    assert tables.file_name(results.SHEAR_SHEET) in ours and len(ours) >= 4
    # the user's files: a Parquet file without our mark, a renamed copy of ours (its mark names
    # the original file), another kind of file, a file of ours in a subfolder
    pq.write_table(pa.table({"x": [1.0]}), folder / "notes.parquet")
    shutil.copy(folder / "shear.parquet", folder / "shear-copy.parquet")
    (folder / "readme.txt").write_text("my notes")
    (folder / "old").mkdir()
    shutil.copy(folder / "shear.parquet", folder / "old" / "shear.parquet")
    # an earlier run's leftovers: a file of ours this run does not write, a killed run's temp
    shutil.copy(folder / "shear.parquet", folder / "retired.parquet")
    _remark(folder / "retired.parquet")
    (folder / ".shear.parquet.abc123.xlcore-tmp").write_bytes(b"half")
    assert tables.is_ours(folder / "retired.parquet")
    assert not tables.is_ours(folder / "shear-copy.parquet") and not tables.is_ours(folder / "notes.parquet")
    run(computed, book, "all")
    left = sorted(p.name for p in folder.iterdir())
    assert left == ["notes.parquet", "old", "readme.txt", "shear-copy.parquet"]
    assert (folder / "old" / "shear.parquet").exists()


def _remark(path: Path) -> None:
    """Give a copied file of ours the mark of its new name (as a run writing it would)."""
    t = pq.read_table(path)
    meta = dict(t.schema.metadata)
    meta[b"xlcore.file"] = path.name.encode()
    pq.write_table(t.replace_schema_metadata(meta), path)


def test_fewer_tables_on_the_next_run_leave_only_that_runs_files(computed, book, full):
    folder = tables.folder_for(book)
    run(computed, book, "governing")
    first = {p.name for p in folder.iterdir()}
    run(computed, book, "auto", limit=len(full[results.CORE_SHEET]) - 1)
    assert {p.name for p in folder.iterdir()} == {tables.file_name(results.CORE_SHEET)} < first


def test_a_users_file_of_the_same_name_stops_the_run_before_anything_is_written(book):
    """Through the command line: exit 2 and the message."""
    folder = tables.folder_for(book)
    folder.mkdir()
    mine = folder / tables.file_name(results.SHEAR_SHEET)
    pq.write_table(pa.table({"mine": [1.0, 2.0]}), mine)
    before = book.read_bytes(), mine.read_bytes()
    r = runner.invoke(app, ["compute", str(book), "--detail", "governing", "-q"])
    assert r.exit_code == 2 and "not written by xlcore" in r.output
    assert (book.read_bytes(), mine.read_bytes()) == before
    assert sorted(os.listdir(folder)) == [mine.name]


def test_a_file_where_the_folder_goes_stops_the_run(computed, book):
    folder = tables.folder_for(book)
    folder.write_text("in the way")
    before = book.read_bytes()
    with pytest.raises(FileProblem, match="in the way"):
        run(computed, book, "governing")
    assert book.read_bytes() == before and folder.read_text() == "in the way"
    run(computed, book, "all")  # no tables needed: the file is no obstacle, and stays
    assert folder.read_text() == "in the way"


def test_a_save_that_fails_leaves_the_earlier_tables_as_they_were(computed, book, monkeypatch):
    folder = tables.folder_for(book)
    run(computed, book, "governing")
    before = {p.name: p.read_bytes() for p in folder.iterdir()}
    workbook = book.read_bytes()

    def broken(*args, **kwargs):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(writer, "_write_package", broken)
    with pytest.raises(FileProblem, match="No space left"):
        run(computed, book, "governing")
    assert {p.name: p.read_bytes() for p in folder.iterdir()} == before  # no temporary file either
    assert book.read_bytes() == workbook


def test_governing_rows_rule_by_rule_on_a_small_table():
    """The selection on a table small enough to read: groups, ties, magnitude, no values."""
    df = pd.DataFrame(
        {
            "storey": ["A", "A", "A", "B", "B", "C", "C"],
            "member": ["1", "1", "1", "1", "1", "1", "1"],
            "v": [-5.0, 3.0, 4.0, 2.0, 2.0, np.nan, np.nan],
            "n": [1.0, 9.0, 2.0, 0.0, 1.0, np.nan, np.nan],
            "status": ["pass", "pass", "FAIL", "pass", "pass", "n/a", "n/a"],
        }
    )
    rule = results.Governing(("storey", "member"), ("v", "n"), magnitude=("v",))
    keep = results.governing_rows(df, rule)
    # A: |v| largest row 0, n largest row 1, FAIL row 2; B: v tie -> first (3), n -> 4; C: first
    assert np.flatnonzero(keep).tolist() == [0, 1, 2, 3, 4, 5]
    assert sorted(by_hand(df, rule)) == [0, 1, 2, 3, 4, 5]


def test_auto_leaves_the_failing_rows_out_too_when_they_alone_pass_the_limit():
    """Three piers x four combinations; pier P1 fails in every combination: governing rows 3,
    with the failing ones 6. Limit 12: every row; 6: governing + failing; 5: governing only."""
    keys = ("storey", "pier_id", "combination", "util", "status")
    cols = [c for c in results.SHEAR_COLUMNS if c.key in keys]
    util = [1.5, 1.2, 1.1, 1.3, 0.2, 0.5, 0.4, 0.3, 0.9, 0.1, 0.95, 0.6]
    table = pd.DataFrame(
        {
            "storey": ["L1"] * 12,
            "pier_id": [f"P{i // 4 + 1}" for i in range(12)],
            "combination": [f"C{i % 4}" for i in range(12)],
            "util": util,
            "status": [results.FAIL if u > 1 else results.PASS for u in util],
        }
    )

    def rows(limit: int) -> list[str]:
        sheet = results.ResultSheet(results.SHEAR_SHEET, "t", cols, table)
        o = pipeline.Outcome(None, None, None, table, table, [sheet])
        pipeline.select_detail(o, "auto", "x.xlcore-tables", limit)
        t = o.sheets[0].table
        return [f"{p}{c}" for p, c in zip(t.pier_id, t.combination, strict=True)]

    assert len(rows(12)) == 12
    assert rows(6) == ["P1C0", "P1C1", "P1C2", "P1C3", "P2C1", "P3C2"]
    assert rows(5) == ["P1C0", "P2C1", "P3C2"]


def test_every_row_written_from_an_outcome_made_for_governing_rows_has_its_working_text(computed, full):
    """`all` after a compute that left the working text for later: every row gets the text the
    direct path gives, in the same order, with the same numbers."""
    o = run_in_memory(computed, "all")
    for sheet in o.sheets:
        want = full[sheet.name].reset_index(drop=True)
        got = sheet.table.reset_index(drop=True)
        assert len(got) == len(want), sheet.name
        for c in sheet.columns:
            if c.key in want:
                assert [blank(x) for x in got[c.key]] == [blank(x) for x in want[c.key]], (sheet.name, c.key)


def run_in_memory(computed: pipeline.Outcome, mode: str) -> pipeline.Outcome:
    o = dataclasses.replace(
        computed, sheets=[dataclasses.replace(s, preamble=list(s.preamble)) for s in computed.sheets]
    )
    pipeline.select_detail(o, mode, "x")
    return o


def test_a_sheet_written_without_select_detail_still_gets_every_rows_working_text(computed, full, book):
    """The writer makes the text left for later when nobody chose the rows (every row written)."""
    shear = next(s for s in computed.sheets if s.name == results.SHEAR_SHEET)
    assert shear.rework is not None and "f_vu" not in shear.table
    writer.write_results(book, book, [shear])
    got = sheet_frame(book, results.SHEAR_SHEET)
    t = titles(results.SHEAR_SHEET)
    want = full[results.SHEAR_SHEET]
    assert got[t["f_vu"]].tolist() == want.f_vu.tolist() and len(got) == len(want)
