"""Broken and hostile workbooks, generated here: each is refused with a clear message (exit 1
for bad input, 2 for a file that cannot be used) or read with a warning, in bounded time and
memory, and the file is byte-identical afterwards. Dangerous files run in a subprocess with a
memory limit and a timeout, so a failure cannot take the test run down."""

from __future__ import annotations

import datetime as dt
import resource
import subprocess
import sys
import zipfile
from pathlib import Path

import openpyxl
import pytest
from conftest import column_letter as col

from xlcore import layout

W, S, A, P = layout.WALLS, layout.STOREYS, layout.MEMBER_ACTIONS, layout.PROJECT
MEMORY_LIMIT = 2 * 1024**3
TIMEOUT = 120


def run_cli(*args: str) -> subprocess.CompletedProcess:
    def limit():
        resource.setrlimit(resource.RLIMIT_AS, (MEMORY_LIMIT, MEMORY_LIMIT))

    return subprocess.run(
        [sys.executable, "-m", "xlcore", *args],
        capture_output=True,
        text=True,
        timeout=TIMEOUT,
        preexec_fn=limit,
    )


def rewrite_part(src: Path, dst: Path, part_of: str, change) -> Path:
    """Copy a workbook, passing the XML of one input sheet through `change`."""
    with zipfile.ZipFile(src) as z:
        from xlcore.workbook.package import sheet_parts

        target = sheet_parts(z)[part_of]
        with zipfile.ZipFile(dst, "w", zipfile.ZIP_DEFLATED) as out:
            for item in z.infolist():
                data = z.read(item)
                out.writestr(item, change(data) if item.filename == target else data)
    return dst


def with_openpyxl(src: Path, dst: Path, fn) -> Path:
    wb = openpyxl.load_workbook(src)
    fn(wb)
    wb.save(dst)
    return dst


def cell(t, key, row):
    return f"{col(t, key)}{row}"


def setv(sheet, ref, value):
    return lambda wb: wb[sheet].__setitem__(ref, value)


# --------------------------------------------------------------------------- byte-level files


def _bomb(demo: Path, dst: Path) -> Path:
    dst.write_bytes(demo.read_bytes())
    with zipfile.ZipFile(dst, "a", zipfile.ZIP_DEFLATED) as z:
        with z.open("xl/media/padding.bin", "w") as fh:  # 64 MB of zeros, about 64 kB packed
            chunk = b"\0" * (1 << 20)
            for _ in range(64):
                fh.write(chunk)
    return dst


def _zip_of(files: dict[str, bytes], dst: Path) -> Path:
    with zipfile.ZipFile(dst, "w") as z:
        for name, data in files.items():
            z.writestr(name, data)
    return dst


LAUGHS = (
    b'<?xml version="1.0"?><!DOCTYPE lolz [<!ENTITY lol "lol">'
    + b"".join(
        b'<!ENTITY lol%d "%s">' % (i, (b"&lol%d;" % (i - 1) if i > 1 else b"&lol;") * 10)
        for i in range(1, 10)
    )
    + b"]>"
)
EXTERNAL = b'<?xml version="1.0"?><!DOCTYPE x [<!ENTITY ext SYSTEM "file:///etc/passwd">]>'


def _entity(demo: Path, dst: Path, prolog: bytes, use: bytes) -> Path:
    def change(xml: bytes) -> bytes:
        body = xml.split(b"?>", 1)[1] if xml.startswith(b"<?xml") else xml
        body = body.replace(b"<sheetData>", b"<sheetData>" + b"", 1)
        return prolog + body.replace(
            b"</sheetData>",
            b'<row r="900"><c r="A900" t="inlineStr"><is><t>' + use + b"</t></is></c></row></sheetData>",
            1,
        )

    return rewrite_part(demo, dst, S.name, change)


FILE_CASES = {
    "empty file": (lambda demo, dst: (dst.write_bytes(b""), dst)[1], 2, "not an .xlsx"),
    "truncated zip": (
        lambda demo, dst: (dst.write_bytes(demo.read_bytes()[: len(demo.read_bytes()) // 2]), dst)[1],
        2,
        "not an .xlsx",
    ),
    "old .xls renamed": (
        lambda demo, dst: (dst.write_bytes(b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1" + b"\0" * 4000), dst)[1],
        2,
        "old .xls",
    ),
    "password-protected workbook": (
        lambda demo, dst: (
            dst.write_bytes(b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1" + b"EncryptedPackage" * 64),
            dst,
        )[1],
        2,
        "encrypted",
    ),
    "csv renamed": (lambda demo, dst: (dst.write_text("Storey,Level\nGF,0\n"), dst)[1], 2, "not an .xlsx"),
    "ods renamed": (
        lambda demo, dst: _zip_of(
            {
                "mimetype": b"application/vnd.oasis.opendocument.spreadsheet",
                "content.xml": b"<office:document-content/>",
            },
            dst,
        ),
        2,
        "not a spreadsheet workbook",
    ),
    "docx renamed": (
        lambda demo, dst: _zip_of({"[Content_Types].xml": b"<Types/>", "word/document.xml": b"<w/>"}, dst),
        2,
        "not a spreadsheet workbook",
    ),
    "zip bomb": (_bomb, 2, "refused as unsafe"),
    "billion laughs": (lambda demo, dst: _entity(demo, dst, LAUGHS, b"&lol9;"), 2, "cannot be read"),
    "external entity": (lambda demo, dst: _entity(demo, dst, EXTERNAL, b"&ext;"), 2, "cannot be read"),
    "folder instead of file": (lambda demo, dst: (dst.mkdir(), dst)[1], 2, "is a folder"),
}


@pytest.mark.parametrize("name", list(FILE_CASES))
def test_unusable_files_are_refused_with_exit_2(demo_master, tmp_path, name):
    make, code, gist = FILE_CASES[name]
    path = make(demo_master, tmp_path / "case.xlsx")
    before = path.read_bytes() if path.is_file() else None
    r = run_cli("check", str(path))
    assert r.returncode == code, r.stderr
    assert gist in r.stderr
    assert "Traceback" not in r.stderr
    if before is not None:
        assert path.read_bytes() == before


def test_defusedxml_is_active_for_openpyxl():
    import openpyxl.xml

    assert openpyxl.xml.DEFUSEDXML is True


# --------------------------------------------------------------------------- sheet structure


def _phantom(demo: Path, dst: Path) -> Path:
    import re

    return rewrite_part(
        demo, dst, W.name, lambda x: re.sub(rb'<dimension ref="[^"]*"', b'<dimension ref="A1:XFD1048576"', x)
    )


def _far_cell(demo: Path, dst: Path) -> Path:
    return with_openpyxl(demo, dst, setv(S.name, "XFD1048576", "far away"))


def _blank_rows(demo: Path, dst: Path) -> Path:
    rows = b"".join(b'<row r="%d" s="1" customFormat="1"/>' % r for r in range(5000, 1_005_000))
    return rewrite_part(demo, dst, A.name, lambda x: x.replace(b"</sheetData>", rows + b"</sheetData>", 1))


def _hidden(demo, dst):
    return with_openpyxl(demo, dst, lambda wb: setattr(wb[W.name].row_dimensions[3], "hidden", True))


def _filtered(demo, dst):
    def fn(wb):
        ws = wb[A.name]
        ws.auto_filter.ref = "A1:G100"
        for r in (5, 6, 7):
            ws.row_dimensions[r].hidden = True

    return with_openpyxl(demo, dst, fn)


def _merged(demo, dst):
    return with_openpyxl(
        demo, dst, lambda wb: wb[W.name].merge_cells(f"{cell(W, 'fc', 2)}:{cell(W, 'fc', 3)}")
    )


def _header_moved(demo, dst):
    return with_openpyxl(demo, dst, lambda wb: wb[S.name].insert_rows(1))


def _reordered(demo, dst):
    return with_openpyxl(demo, dst, lambda wb: wb.move_sheet(W.name, offset=3))


def _copy_sheet(demo, dst):
    return with_openpyxl(demo, dst, lambda wb: wb.copy_worksheet(wb[W.name]))


def _removed(demo, dst):
    return with_openpyxl(demo, dst, lambda wb: wb.remove(wb[A.name]))


STRUCTURE_CASES = {
    # name: (make, exit code, words in the output)
    "declared dimension is huge": (_phantom, 0, "valid"),
    "a cell at XFD1048576": (_far_cell, 0, "valid"),
    "a million formatted blank rows": (_blank_rows, 0, "valid"),
    "hidden rows": (_hidden, 0, "hidden or filtered-out row(s) (3)"),
    "filtered rows": (_filtered, 0, "3 hidden or filtered-out row(s)"),
    "merged cells over inputs": (_merged, 1, "merged cells"),
    "header row moved down": (_header_moved, 1, "not found in the header row"),
    "sheets reordered": (_reordered, 0, "valid"),
    "sheet duplicated under another name": (_copy_sheet, 0, "valid"),
    "sheet missing": (_removed, 1, "is missing"),
}


@pytest.mark.parametrize("name", list(STRUCTURE_CASES))
def test_sheet_structure_cases(demo_master, tmp_path, name):
    make, code, gist = STRUCTURE_CASES[name]
    path = make(demo_master, tmp_path / "case.xlsx")
    before = path.read_bytes()
    r = run_cli("check", str(path))
    assert r.returncode == code, r.stdout + r.stderr
    assert gist in r.stdout + r.stderr
    assert path.read_bytes() == before


# --------------------------------------------------------------------------- cell values

VALUE_CASES = {
    "zero thickness": ((W.name, cell(W, "thickness", 2)), 0, "75 to 1500"),
    "negative f'c": ((W.name, cell(W, "fc", 2)), -40, "20 to 100"),
    "nan as text": ((W.name, cell(W, "fc", 2)), "nan", "expected a number"),
    "infinity as text": ((W.name, cell(W, "fsy", 2)), "inf", "expected a number"),
    "huge number": ((A.name, cell(A, "v", 2)), 1e300, "-1e+07 to 1e+07"),
    "unit typed into a cell": ((S.name, cell(S, "height", 2)), "4.2 m", "number only"),
    "date in a number cell": ((A.name, cell(A, "n", 3)), dt.datetime(2026, 1, 2), "date"),
    "error value": ((A.name, cell(A, "m", 4)), "#REF!", "error value #REF!"),
    "text in a numeric cell": ((W.name, cell(W, "cover", 2)), "thirty", "expected a number"),
    "boolean in a number cell": ((W.name, cell(W, "cover", 2)), True, "expected a number"),
    "very long ID": ((W.name, cell(W, "wall_id", 2)), "W" * 300, "at most 255"),
    "unknown storey": ((A.name, cell(A, "storey", 2)), "Level 99", "storey name"),
    "formula text with unit": ((W.name, cell(W, "thickness", 2)), "250mm", "number only"),
    "setting out of range": ((P.name, "B6"), 7.5, "expected"),
}


@pytest.mark.parametrize("name", list(VALUE_CASES))
def test_bad_values_name_the_cell(demo_master, tmp_path, name):
    (sheet, ref), value, gist = VALUE_CASES[name]
    path = with_openpyxl(demo_master, tmp_path / "case.xlsx", setv(sheet, ref, value))
    before = path.read_bytes()
    r = run_cli("check", str(path))
    assert r.returncode == 1, r.stdout + r.stderr
    shown = sheet if " " not in sheet else f"'{sheet}'"
    assert any(
        line.startswith(f"error   {shown}!{ref}:") and gist in line for line in r.stderr.splitlines()
    ), r.stderr
    assert path.read_bytes() == before


def test_unicode_ids_are_fine(demo_master, tmp_path):
    path = with_openpyxl(demo_master, tmp_path / "case.xlsx", setv(P.name, "B2", "Ωmega Tower – Zürich 北"))
    r = run_cli("compute", str(path))
    assert r.returncode == 0, r.stderr
    assert "Ωmega" in openpyxl.load_workbook(path, read_only=True)["Results summary"]["A3"].value


def test_corpus_size():
    assert len(FILE_CASES) + len(STRUCTURE_CASES) + len(VALUE_CASES) + 1 >= 36
