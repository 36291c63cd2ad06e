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
