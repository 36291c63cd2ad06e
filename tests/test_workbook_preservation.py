"""Writing results never loses or changes the engineer's own work.

Protects the writing rules: every package part that is not an xlcore result sheet, the sheet
list, the content-type index or the (appended-to) style sheet comes back byte-identical.
"""

import io
import re
import zipfile
from pathlib import Path

import openpyxl
import pytest
from lxml import etree
from openpyxl.chart import BarChart, Reference
from openpyxl.comments import Comment
from openpyxl.drawing.image import Image
from openpyxl.formatting.rule import CellIsRule
from openpyxl.styles import Font, PatternFill
from openpyxl.workbook.defined_name import DefinedName
from openpyxl.worksheet.datavalidation import DataValidation

from xlcore import pipeline, results
from xlcore.diagnostics import FileProblem
from xlcore.workbook.writer import backup_path, write_results

# the demo has member and core actions (two cores): summary, shear, piers, core section, core
# shares, and the building's resultants shared among its cores
DEMO_RESULT_SHEETS = [
    results.SUMMARY_SHEET,
    results.SHEAR_SHEET,
    results.AXIAL_SHEET,
    results.DETAILING_SHEET,
    results.SECTION14_SHEET,
    results.LINTELS_SHEET,
    results.ADVICE_SHEET,
    results.MEMBERS_SHEET,
    results.SECTION_SHEET,
    results.CORE_STRESS_SHEET,
    results.CORE_NM_SHEET,
    results.CORE_SHEET,
    results.CORES_SHEET,
]
INDEX_PARTS = {"xl/workbook.xml", "xl/_rels/workbook.xml.rels", "[Content_Types].xml", "xl/styles.xml"}


def dress_up(path: Path) -> Path:
    """The engineer's own additions: a formatted sheet, comment, names, validation, conditional
    formatting, chart and image."""
    wb = openpyxl.load_workbook(path)
    ws = wb.create_sheet("My notes", 0)
    ws["A1"] = "Checked by"
    ws["A1"].font = Font(bold=True, color="FF0000")
    ws["B1"].fill = PatternFill("solid", fgColor="FFFF00")
    ws["A1"].comment = Comment("initial here", "checker")
    for i in range(2, 8):
        ws.cell(i, 1, i * 10)
    ws.conditional_formatting.add(
        "A2:A7",
        CellIsRule(operator="greaterThan", formula=["30"], fill=PatternFill("solid", fgColor="FFC7CE")),
    )
    dv = DataValidation(type="list", formula1='"yes,no"')
    dv.add("C1")
    ws.add_data_validation(dv)
    chart = BarChart()
    chart.add_data(Reference(ws, min_col=1, min_row=2, max_row=7))
    ws.add_chart(chart, "E2")
    buf = io.BytesIO()
    from PIL import Image as PILImage

    PILImage.new("RGB", (8, 8), (200, 30, 30)).save(buf, "PNG")
    buf.seek(0)
    ws.add_image(Image(buf), "E20")
    wb.defined_names["GlobalRate"] = DefinedName("GlobalRate", attr_text="'My notes'!$A$2")
    ws.defined_names["LocalRate"] = DefinedName("LocalRate", attr_text="'My notes'!$A$3")
    wb.save(path)
    return path


def parts(path: Path) -> dict[str, bytes]:
    with zipfile.ZipFile(path) as z:
        return {n: z.read(n) for n in z.namelist()}


def result_parts(path: Path) -> set[str]:
    with zipfile.ZipFile(path) as z:
        return {
            p
            for p in z.namelist()
            if p.startswith("xl/worksheets/sheet") and results.MARKER.encode() in z.read(p)[:4000]
        }


def run(path: Path, out: Path | None = None, **kw) -> None:
    b, f = pipeline.load(path)
    write_results(path, out or path, pipeline.compute(b, f).sheets, **kw)


def test_every_user_part_survives_byte_identical(demo_book):
    dress_up(demo_book)
    before = parts(demo_book)
    run(demo_book)
    after = parts(demo_book)
    ours = result_parts(demo_book)
    assert len(ours) == len(DEMO_RESULT_SHEETS)
    for name, data in before.items():
        if name in INDEX_PARTS:
            continue
        assert after.get(name) == data, f"{name} changed"
    assert set(after) - set(before) == ours


def test_styles_only_appended(demo_book):
    dress_up(demo_book)
    before = etree.fromstring(parts(demo_book)["xl/styles.xml"])
    run(demo_book)
    after = etree.fromstring(parts(demo_book)["xl/styles.xml"])
    for old_list in before:
        new_list = after.find(old_list.tag)
        assert new_list is not None
        for i, el in enumerate(old_list):
            assert etree.tostring(new_list[i], method="c14n", exclusive=True) == etree.tostring(
                el, method="c14n", exclusive=True
            )


def test_user_features_still_there_after_compute(demo_book):
    dress_up(demo_book)
    run(demo_book)
    wb = openpyxl.load_workbook(demo_book)
    ws = wb["My notes"]
    assert ws["A1"].comment.text == "initial here"
    assert ws["A1"].font.bold and ws["B1"].fill.fgColor.rgb.endswith("FFFF00")
    assert len(ws.conditional_formatting) == 1
    assert len(ws.data_validations.dataValidation) == 1
    assert len(ws._charts) == 1 and len(ws._images) == 1
    assert "GlobalRate" in wb.defined_names and "LocalRate" in ws.defined_names
    assert wb.sheetnames[-len(DEMO_RESULT_SHEETS) :] == DEMO_RESULT_SHEETS


def test_rerun_replaces_result_sheets_and_styles_do_not_grow(demo_book):
    run(demo_book)
    first = parts(demo_book)
    run(demo_book)
    second = parts(demo_book)
    wb = openpyxl.load_workbook(demo_book, read_only=True)
    assert sum(n.startswith("Results ") for n in wb.sheetnames) == len(DEMO_RESULT_SHEETS)
    assert second["xl/styles.xml"] == first["xl/styles.xml"]
    strip_time = re.compile(rb"\d{4}-\d\d-\d\d \d\d:\d\d:\d\d")
    for p in result_parts(demo_book):
        assert strip_time.sub(b"", second[p]) == strip_time.sub(b"", first[p])


def test_sheet_scoped_names_follow_their_sheet(demo_book):
    """A user sheet added after the result sheets keeps its sheet-scoped name on rerun."""
    run(demo_book)
    wb = openpyxl.load_workbook(demo_book)
    late = wb.create_sheet("Late sheet")
    late["A1"] = 5
    late.defined_names["Here"] = DefinedName("Here", attr_text="'Late sheet'!$A$1")
    wb.save(demo_book)
    run(demo_book)
    wb = openpyxl.load_workbook(demo_book)
    assert "Here" in wb["Late sheet"].defined_names
    assert wb.sheetnames.index("Late sheet") < wb.sheetnames.index(results.SUMMARY_SHEET)


def add_macro(path: Path, out: Path) -> Path:
    """Turn an .xlsx into an .xlsm carrying a (dummy) VBA project part."""
    with zipfile.ZipFile(path) as zin, zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as zout:
        for item in zin.infolist():
            data = zin.read(item)
            if item.filename == "[Content_Types].xml":
                data = data.replace(
                    b"application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml",
                    b"application/vnd.ms-excel.sheet.macroEnabled.main+xml",
                ).replace(
                    b"</Types>",
                    b'<Default Extension="bin" ContentType="application/vnd.ms-office.vbaProject"/></Types>',
                )
            if item.filename == "xl/_rels/workbook.xml.rels":
                data = data.replace(
                    b"</Relationships>",
                    b'<Relationship Id="rIdVba" Type="http://schemas.'
                    b'microsoft.com/office/2006/relationships/vbaProject" '
                    b'Target="vbaProject.bin"/></Relationships>',
                )
            zout.writestr(item, data)
        zout.writestr("xl/vbaProject.bin", bytes(range(256)) * 8)
    return out


def test_macro_workbook_keeps_its_macros(demo_book, tmp_path):
    xlsm = add_macro(demo_book, tmp_path / "tower.xlsm")
    run(xlsm)
    after = parts(xlsm)
    assert after["xl/vbaProject.bin"] == bytes(range(256)) * 8
    assert b"vbaProject" in after["xl/_rels/workbook.xml.rels"]
    assert b"macroEnabled" in after["[Content_Types].xml"]


def test_user_strings_are_written_as_text_never_formulas(demo_book):
    from conftest import column_letter

    from xlcore import layout

    a = layout.MEMBER_ACTIONS
    wb = openpyxl.load_workbook(demo_book)
    for r in range(2, 12):  # the ten members of storey GF, combination 1.35G
        cell = wb[a.name][f"{column_letter(a, 'combination')}{r}"]
        cell.value = '=HYPERLINK("x")'
        cell.data_type = "s"  # typed as text, as a spreadsheet does after a leading apostrophe
    wb.save(demo_book)
    run(demo_book)
    for p in result_parts(demo_book):
        data = parts(demo_book)[p]
        assert b"<f>" not in data and b"<f " not in data
    wb = openpyxl.load_workbook(demo_book)
    ws = wb[results.SHEAR_SHEET]
    texts = {c.value for row in ws.iter_rows() for c in row if isinstance(c.value, str)}
    assert '=HYPERLINK("x")' in texts
    assert all(c.data_type != "f" for row in ws.iter_rows() for c in row)


def test_lock_file_refused_unless_forced(demo_book):
    lock = demo_book.with_name(f".~lock.{demo_book.name}#")
    lock.write_text("someone,host,time")
    before = demo_book.read_bytes()
    with pytest.raises(FileProblem, match="stale"):
        run(demo_book)
    assert demo_book.read_bytes() == before
    run(demo_book, force=True)
    assert demo_book.read_bytes() != before


def test_backup_kept_and_output_copy_leaves_source_alone(demo_book, tmp_path):
    original = demo_book.read_bytes()
    copy = tmp_path / "copy.xlsx"
    run(demo_book, out=copy)
    assert demo_book.read_bytes() == original
    assert len(result_parts(copy)) == len(DEMO_RESULT_SHEETS)
    run(demo_book)
    assert backup_path(demo_book).read_bytes() == original
    assert not list(tmp_path.glob("*.xlcore-tmp"))


def test_foreign_sheet_with_result_name_is_refused(demo_book):
    wb = openpyxl.load_workbook(demo_book)
    wb.create_sheet(results.SHEAR_SHEET)["A1"] = "my own table"
    wb.save(demo_book)
    before = demo_book.read_bytes()
    with pytest.raises(FileProblem, match="not written by xlcore"):
        run(demo_book)
    assert demo_book.read_bytes() == before


def test_save_failure_leaves_original_and_no_temp(demo_book, monkeypatch):
    before = demo_book.read_bytes()

    def boom(*a, **k):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr("xlcore.workbook.writer.os.replace", boom)
    with pytest.raises(FileProblem, match="No space left"):
        run(demo_book)
    assert demo_book.read_bytes() == before
    assert not [p for p in demo_book.parent.iterdir() if p.name.endswith(".xlcore-tmp")]


def test_result_file_is_a_valid_workbook_for_openpyxl_and_pandas(demo_book):
    run(demo_book)
    import pandas as pd

    df = pd.read_excel(demo_book, sheet_name=results.SHEAR_SHEET, header=None, engine="openpyxl")
    header_row = df.index[df[0] == "Storey"][0]
    assert df.iloc[header_row].tolist()[:4] == ["Storey", "Pier", "Wall", "Combination"]
    assert len(df) - header_row - 1 == 1312  # one row per storey x pier x combination of the demo


def test_new_output_file_gets_ordinary_permissions(demo_book, tmp_path):
    import os
    import stat

    copy = tmp_path / "copy.xlsx"
    run(demo_book, out=copy)
    umask = os.umask(0)
    os.umask(umask)
    assert stat.S_IMODE(copy.stat().st_mode) == 0o666 & ~umask


@pytest.mark.parametrize(
    "text", ['=HYPERLINK("http://example.invalid","x")', "+cmd|' /C calc'!A0", "@SUM(1+1)", "-2+3", "=1+1"]
)
def test_formula_like_user_text_stays_inert(demo_book, text):
    """User strings reach the result sheets only as inline text: no formula, hyperlink, external
    link or macro part is ever added (nothing for a spreadsheet program to ask to enable)."""
    wb = openpyxl.load_workbook(demo_book)
    c = wb["Project"]["B2"]
    c.value = text
    c.data_type = "s"
    wb.save(demo_book)
    before = set(parts(demo_book))
    run(demo_book)
    after = parts(demo_book)
    added = set(after) - before
    assert added == result_parts(demo_book)  # only our worksheets
    for p in added:
        assert b"<f>" not in after[p] and b"<f " not in after[p]
        assert b"<hyperlink" not in after[p] and b"r:id" not in after[p]
    assert not any("externalLink" in p or "vbaProject" in p for p in after)
    summary = openpyxl.load_workbook(demo_book)[results.SUMMARY_SHEET]
    assert summary["A3"].value == f"Project: {text}" and summary["A3"].data_type == "s"
