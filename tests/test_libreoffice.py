"""A real spreadsheet program: LibreOffice Calc, driven over UNO (tests/lo/lo_driver.py, run
with Debian's python3 and its python3-uno). Skipped, with the reason shown, where LibreOffice
or python3-uno is absent; .ci/run installs both."""

from __future__ import annotations

import shutil
import subprocess
from pathlib import Path

import openpyxl
import pytest
from conftest import column_letter

from xlcore import layout, pipeline, results

DRIVER = Path(__file__).parent / "lo" / "lo_driver.py"
SYSTEM_PYTHON = "/usr/bin/python3"


def _available() -> str | None:
    if shutil.which("soffice") is None:
        return "LibreOffice (soffice) is not installed"
    ok = subprocess.run([SYSTEM_PYTHON, "-c", "import uno"], capture_output=True)
    if ok.returncode != 0:
        return "Debian's python3 has no uno module (install python3-uno)"
    return None


pytestmark = pytest.mark.skipif(_available() is not None, reason=_available() or "")


def lo(*args: str) -> str:
    r = subprocess.run(
        [SYSTEM_PYTHON, str(DRIVER), *map(str, args)], capture_output=True, text=True, timeout=180
    )
    assert r.returncode == 0, r.stderr
    return r.stdout


def test_template_opens_and_saves_back_in_libreoffice(blank_master, demo_master, tmp_path):
    lo("resave", blank_master, tmp_path / "blank.xlsx")
    wb = openpyxl.load_workbook(tmp_path / "blank.xlsx")
    assert wb.sheetnames == [layout.INSTRUCTIONS_SHEET, *layout.INPUT_SHEET_NAMES]
    assert [c.value for c in wb[layout.WALLS.name][1]][: len(layout.WALLS.columns)] == [
        c.header for c in layout.WALLS.columns
    ]
    lo("resave", demo_master, tmp_path / "demo.xlsx")
    b, findings = pipeline.load(tmp_path / "demo.xlsx")
    assert findings.errors == [] and len(b.member_actions) > 0


def test_values_typed_in_libreoffice_are_read(demo_master, tmp_path):
    w = layout.WALLS
    ref = f"{column_letter(w, 'thickness')}2"
    lo("type", demo_master, tmp_path / "typed.xlsx", w.name, ref, "300")
    b, _ = pipeline.load(tmp_path / "typed.xlsx")
    assert b.walls[0].thickness == 300.0
    a = layout.MEMBER_ACTIONS
    lo("type", demo_master, tmp_path / "typed2.xlsx", a.name, f"{column_letter(a, 'v')}2", "123.5")
    b, _ = pipeline.load(tmp_path / "typed2.xlsx")
    assert b.member_actions.v.iloc[0] == 123.5


def test_computed_workbook_exports_to_pdf_and_libreoffice_reads_the_same_results(demo_master, tmp_path):
    out = tmp_path / "computed.xlsx"
    b, f = pipeline.load(demo_master)
    from xlcore.workbook.writer import write_results

    write_results(demo_master, out, pipeline.compute(b, f).sheets)
    lo("pdf", out, tmp_path / "computed.pdf")
    assert (tmp_path / "computed.pdf").read_bytes().startswith(b"%PDF")
    ws = openpyxl.load_workbook(out, read_only=True)[results.SHEAR_SHEET]
    rows = list(ws.iter_rows(values_only=True))
    head = next(i for i, r in enumerate(rows) if r and r[0] == "Storey")
    keys = [c.key for c in results.SHEAR_COLUMNS]
    j = keys.index("phi_vu")
    letter = openpyxl.utils.get_column_letter(j + 1)
    picks = [head + 2, head + 10, head + 200]
    refs = [f"{letter}{r}" for r in picks]
    seen = lo("read", out, results.SHEAR_SHEET, *refs).split()
    for got, r in zip(seen, picks, strict=True):
        assert float(got) == pytest.approx(rows[r - 1][j], rel=1e-12)


def _xlcore(*args: object) -> subprocess.CompletedProcess:
    import sys

    return subprocess.run(
        [sys.executable, "-m", "xlcore", *map(str, args)], capture_output=True, text=True, timeout=600
    )


def _small_building_typed(blank: Path, out: Path) -> None:
    """The one-storey box of test_save_faults, typed cell by cell into the blank template in
    LibreOffice and saved there (no value written by openpyxl)."""
    from openpyxl.utils import get_column_letter

    rows = {
        layout.STOREYS.name: [["GF", "0", "3", "200"]],
        layout.WALLS.name: [
            [w, *xy, "200", "GF", "GF", "40", "500", "12", "200", "2", "12", "200", "2", "30"]
            for w, *xy in (("A", "0", "0", "4", "0"), ("B", "4", "0", "4", "3"), ("C", "4", "3", "0", "3"))
        ],
        layout.MEMBER_ACTIONS.name: [["GF", "C1", m, "500", "100", "50"] for m in ("A", "B", "C")],
    }
    triples: list[str] = []
    for sheet, body in rows.items():
        for i, row in enumerate(body, start=2):
            for j, text in enumerate(row, start=1):
                triples += [sheet, f"{get_column_letter(j)}{i}", text]
    lo("type", blank, out, *triples)


def _parts(path: Path) -> dict[str, bytes]:
    import zipfile

    with zipfile.ZipFile(path) as z:
        return {n: z.read(n) for n in z.namelist()}


def _sheet_parts(path: Path) -> dict[str, str]:
    import zipfile

    from xlcore.workbook.package import sheet_parts

    with zipfile.ZipFile(path) as z:
        return sheet_parts(z)


def test_edit_save_recompute_loop_in_libreoffice(blank_master, tmp_path):
    """Issue 12 section 1: template -> values typed in LibreOffice -> saved -> compute -> edited
    and saved in LibreOffice -> stale -> compute shows the edit -> saved unchanged -> compute."""
    book = tmp_path / "book.xlsx"
    _small_building_typed(blank_master, book)
    r = _xlcore("compute", book, "-q")
    assert r.returncode == 0, r.stderr
    w = layout.WALLS
    edited = tmp_path / "edited.xlsx"
    lo("type", book, edited, w.name, f"{column_letter(w, 'thickness')}2", "250")
    r = _xlcore("check", edited, "-q")
    assert r.returncode == 0, r.stderr
    assert "STALE" in r.stdout
    before = _parts(edited)
    user = {n: p for n, p in _sheet_parts(edited).items() if not n.startswith(layout.RESULT_PREFIX)}
    r = _xlcore("compute", edited, "-q")
    assert r.returncode == 0, r.stderr  # refused before the fix: "was not written by xlcore"
    after = _parts(edited)
    for name, part in user.items():  # the engineer's sheets, as LibreOffice saved them
        assert after[part] == before[part], name
    ws = openpyxl.load_workbook(edited, read_only=True)[results.SHEAR_SHEET]
    rows = list(ws.iter_rows(values_only=True))
    head = next(i for i, row in enumerate(rows) if row and row[0] == "Storey")
    tw = rows[head].index("tw [mm]")
    walls = rows[head].index("Wall")
    seen = {row[walls]: row[tw] for row in rows[head + 1 :] if row and row[walls]}
    assert seen["A"] == 250 and seen["B"] == 200
    assert "up to date" in _xlcore("check", edited, "-q").stdout
    again = tmp_path / "again.xlsx"
    lo("resave", edited, again)
    assert "up to date" in _xlcore("check", again, "-q").stdout
    r = _xlcore("compute", again, "-q")
    assert r.returncode == 0, r.stderr
    names = openpyxl.load_workbook(again, read_only=True).sheetnames
    assert len(names) == len(set(n.casefold() for n in names))
    assert names.count(results.SUMMARY_SHEET) == 1


def test_computed_workbook_with_a_sheet_added_in_libreoffice_recomputes(demo_master, tmp_path):
    book = tmp_path / "demo.xlsx"
    shutil.copy(demo_master, book)
    assert _xlcore("compute", book, "-q").returncode == 0
    added = tmp_path / "added.xlsx"
    lo("addsheet", book, added, "Checker notes", "checked to here")
    before = _parts(added)
    part = _sheet_parts(added)["Checker notes"]
    r = _xlcore("compute", added, "-q")
    assert r.returncode == 0, r.stderr
    after = _parts(added)
    assert after[part] == before[part]
    wb = openpyxl.load_workbook(added, read_only=True)
    assert "Checker notes" in wb.sheetnames
    assert sum(n.startswith(layout.RESULT_PREFIX) for n in wb.sheetnames) == sum(
        n.startswith(layout.RESULT_PREFIX) for n in openpyxl.load_workbook(book, read_only=True).sheetnames
    )
    lo("resave", added, tmp_path / "opens.xlsx")  # LibreOffice still opens what we wrote


def test_a_governing_rows_workbook_recomputes_after_libreoffice_saves_it(demo_master, tmp_path):
    """Issue 15 section 1: a workbook holding only governing rows (full tables in Parquet
    beside it) is opened and saved in LibreOffice, then computed again in the same mode."""
    import pyarrow.parquet as pq

    from xlcore.workbook import tables
    from xlcore.workbook.reader import stored_input_hash

    book = tmp_path / "demo.xlsx"
    shutil.copy(demo_master, book)
    r = _xlcore("compute", book, "--detail", "governing", "-q")
    assert r.returncode == 0, r.stderr
    again = tmp_path / "again.xlsx"
    lo("resave", book, again)
    assert "up to date" in _xlcore("check", again, "-q").stdout
    r = _xlcore("compute", again, "--detail", "governing", "-q")
    assert r.returncode == 0, r.stderr
    files = sorted(tables.folder_for(again).iterdir())
    assert [p.name for p in files] == sorted(p.name for p in tables.folder_for(book).iterdir()) != []
    stored = stored_input_hash(again)
    assert all(pq.read_schema(p).metadata[b"xlcore.input_hash"].decode() == stored for p in files)
    names = openpyxl.load_workbook(again, read_only=True).sheetnames
    assert names.count(results.SHEAR_SHEET) == 1
