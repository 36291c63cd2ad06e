"""Broken and hostile workbooks, generated here: each is refused with a clear message (exit 1
for bad input, 2 for a file that cannot be used) or read with a warning, in bounded time and
memory, and the file is byte-identical afterwards. Dangerous files run in a subprocess with a
memory limit and a timeout, so a failure cannot take the test run down."""

from __future__ import annotations

import datetime as dt
import re
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
TIMEOUT = 60


@pytest.fixture(scope="module")
def tried(request):
    """Names of the hostile cases run in this module; their count is printed at the end."""
    names: list[str] = []
    yield names
    reporter = request.config.pluginmanager.getplugin("terminalreporter")
    if reporter is not None:
        reporter.write_line(
            f"hostile corpus: {len(names)} generated case(s) tried, each refused or read as expected"
        )


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
def test_unusable_files_are_refused_with_exit_2(demo_master, tmp_path, name, tried):
    make, code, gist = FILE_CASES[name]
    path = make(demo_master, tmp_path / "case.xlsx")
    before = path.read_bytes() if path.is_file() else None
    r = run_cli("check", str(path))
    assert r.returncode == code, r.stderr
    assert gist in r.stderr
    assert "Traceback" not in r.stderr
    if before is not None:
        assert path.read_bytes() == before
    tried.append(name)


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


def _check_refuses_or_reads(case, demo_master, tmp_path) -> None:
    """`check` on a made case: the expected exit code and words, no traceback, file unchanged."""
    make, code, gist = case
    path = make(demo_master, tmp_path / "case.xlsx")
    before = path.read_bytes()
    r = run_cli("check", str(path))
    assert r.returncode == code, r.stdout + r.stderr
    assert gist in r.stdout + r.stderr
    assert "Traceback" not in r.stderr
    assert path.read_bytes() == before


@pytest.mark.parametrize("name", list(STRUCTURE_CASES))
def test_sheet_structure_cases(demo_master, tmp_path, name, tried):
    _check_refuses_or_reads(STRUCTURE_CASES[name], demo_master, tmp_path)
    tried.append(name)


# --------------------------------------------------------------------------- cell values

VALUE_CASES = {
    "zero thickness": ((W.name, cell(W, "thickness", 2)), 0, "75 to 1500"),
    "negative f'c": ((W.name, cell(W, "fc", 2)), -40, "17 to 100"),
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
def test_bad_values_name_the_cell(demo_master, tmp_path, name, tried):
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
    tried.append(name)


def test_unicode_ids_are_fine(demo_master, tmp_path, tried):
    path = with_openpyxl(demo_master, tmp_path / "case.xlsx", setv(P.name, "B2", "Ωmega Tower – Zürich 北"))
    r = run_cli("compute", str(path))
    assert r.returncode == 0, r.stderr
    assert "Ωmega" in openpyxl.load_workbook(path, read_only=True)["Results summary"]["A3"].value
    tried.append("unicode project name")  # the "+ 1" of the first round's count


def test_corpus_size():
    assert len(FILE_CASES) + len(STRUCTURE_CASES) + len(VALUE_CASES) + 1 >= 36


# --------------------------------------------------------------------------- second round (issue 17)
# Packages damaged or built to hurt at the zip, XML or cell level. Every one ends in exit 1 or 2
# with a one-line reason (or is read as valid where it is a legal oddity), within TIMEOUT and
# MEMORY_LIMIT, and the file is byte-identical afterwards.


def _repack(demo: Path, dst: Path, change=None, extra=(), stored=()) -> Path:
    """Copy a package entry by entry: `change` maps a part name to new bytes (None drops it),
    `extra` appends (name, bytes) entries as given (duplicates and odd names included), parts
    in `stored` are written uncompressed (so a test can damage their bytes in place)."""
    import warnings

    change = change or {}
    with zipfile.ZipFile(demo) as z, zipfile.ZipFile(dst, "w", zipfile.ZIP_DEFLATED) as out:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # zipfile warns about duplicate names
            for item in z.infolist():
                data = z.read(item)
                if item.filename in change:
                    data = (
                        change[item.filename](data)
                        if callable(change[item.filename])
                        else change[item.filename]
                    )
                    if data is None:
                        continue
                info = zipfile.ZipInfo(item.filename, item.date_time)
                info.compress_type = zipfile.ZIP_STORED if item.filename in stored else zipfile.ZIP_DEFLATED
                out.writestr(info, data)
            for name, data in extra:
                out.writestr(zipfile.ZipInfo(name, (2026, 1, 1, 0, 0, 0)), data)
    return dst


def _part(demo: Path, sheet: str) -> str:
    from xlcore.workbook.package import sheet_parts

    with zipfile.ZipFile(demo) as z:
        return sheet_parts(z)[sheet]


def _bad_crc(demo: Path, dst: Path) -> Path:
    part = _part(demo, W.name)
    _repack(demo, dst, stored={part})
    data = bytearray(dst.read_bytes())
    at = data.index(b"<sheetData>") + len(b"<sheetData>") + 12
    data[at] ^= 0x01  # one flipped bit inside the stored sheet
    dst.write_bytes(bytes(data))
    return dst


def _encrypted_flag(demo: Path, dst: Path) -> Path:
    """Set bit 0 (encrypted) of the general-purpose flags of the Walls entry, in the local
    header and the central directory (ZIP APPNOTE 4.4.4)."""
    part = _part(demo, W.name).encode()
    _repack(demo, dst)
    data = bytearray(dst.read_bytes())
    for sig, flag_at, name_at in ((b"PK\x03\x04", 6, 30), (b"PK\x01\x02", 8, 46)):
        i = data.find(sig)
        while i != -1:
            if data[i + name_at : i + name_at + len(part)] == part:
                data[i + flag_at] |= 0x01
            i = data.find(sig, i + 4)
    dst.write_bytes(bytes(data))
    return dst


def _truncated(part: str):
    return lambda demo, dst: _repack(demo, dst, {part: lambda x: x[: len(x) // 2]})


def _nested(part: str, end: bytes):
    deep = b"<extLst>" + b"<a>" * 5000 + b"</a>" * 5000 + b"</extLst>"
    return lambda demo, dst: _repack(demo, dst, {part: lambda x: x.replace(end, deep + end)})


def _entities(part: str, end: bytes):
    use = b'<extLst><ext uri="x">&lol9;</ext></extLst>'
    return lambda demo, dst: _repack(demo, dst, {part: lambda x: LAUGHS + x.replace(end, use + end)})


def _sheet_truncated(demo, dst):
    return _repack(demo, dst, {_part(demo, W.name): lambda x: x[: len(x) // 2]})


def _shared_string_out_of_range(demo, dst):
    """A text cell pointing at shared string 99999 of a workbook that holds none."""
    import re

    def change(x: bytes) -> bytes:
        return re.sub(rb't="inlineStr"><is><t>GF</t></is>', b't="s"><v>99999</v>', x, count=1)

    return _repack(demo, dst, {_part(demo, S.name): change})


STRICT = {
    b"http://schemas.openxmlformats.org/spreadsheetml/2006/main": b"http://purl.oclc.org/ooxml/spreadsheetml/main",
    b"http://schemas.openxmlformats.org/officeDocument/2006/relationships": (
        b"http://purl.oclc.org/ooxml/officeDocument/relationships"
    ),
}


def _strict(demo, dst):
    def to_strict(x: bytes) -> bytes:
        for a, b in STRICT.items():
            x = x.replace(a, b)
        return x

    with zipfile.ZipFile(demo) as z:
        names = [n for n in z.namelist() if n.endswith((".xml", ".rels"))]
    return _repack(demo, dst, dict.fromkeys(names, to_strict))


def _listed_twice(demo, dst):
    part = _part(demo, W.name)
    with zipfile.ZipFile(demo) as z:
        data = z.read(part)
    return _repack(demo, dst, extra=[(part, data.replace(b"<sheetData>", b"<sheetData><!-- second -->"))])


def _climbs_out(demo, dst):
    return _repack(demo, dst, extra=[("../../outside.xml", b"<x/>")])


def _case_clash(demo, dst):
    part = _part(demo, W.name)
    return _repack(demo, dst, extra=[(part.upper(), b"<worksheet/>")])


def _fifo(demo, dst):
    import os

    os.mkfifo(dst)
    return dst


SECOND_FILE_CASES = {
    "bad CRC in a sheet": (_bad_crc, "damaged"),
    "entry flagged encrypted": (_encrypted_flag, "encrypted"),
    "truncated workbook.xml": (_truncated("xl/workbook.xml"), "xl/workbook.xml"),
    "deeply nested workbook.xml": (_nested("xl/workbook.xml", b"</workbook>"), "xl/workbook.xml"),
    "entity-laden workbook.xml": (_entities("xl/workbook.xml", b"</workbook>"), "xl/workbook.xml"),
    "truncated styles.xml": (_truncated("xl/styles.xml"), "xl/styles.xml"),
    "deeply nested styles.xml": (_nested("xl/styles.xml", b"</styleSheet>"), "xl/styles.xml"),
    "entity-laden styles.xml": (_entities("xl/styles.xml", b"</styleSheet>"), "xl/styles.xml"),
    "entity-laden workbook relationships": (
        _entities("xl/_rels/workbook.xml.rels", b"</Relationships>"),
        "xl/_rels/workbook.xml.rels",
    ),
    "missing workbook relationships": (
        lambda demo, dst: _repack(demo, dst, {"xl/_rels/workbook.xml.rels": None}),
        "xl/_rels/workbook.xml.rels",
    ),
    "truncated input sheet": (_sheet_truncated, "Walls"),
    "shared-string index out of range": (_shared_string_out_of_range, "shared string"),
    "Strict Open XML": (_strict, "Strict Open XML"),
    "part listed twice": (_listed_twice, "listed twice"),
    "part name climbing out of the package": (_climbs_out, "outside the package"),
    "part names clashing ignoring case": (_case_clash, "ignoring case"),
    "a named pipe (FIFO)": (_fifo, "not a regular file"),
}


def _one_line_refusal(r: subprocess.CompletedProcess, code: int, gist: str) -> None:
    assert r.returncode == code, r.stdout + r.stderr
    assert "Traceback" not in r.stderr, r.stderr
    errors = [line for line in r.stderr.splitlines() if line.startswith("error")]
    assert len(errors) == 1 and gist in errors[0], r.stderr


@pytest.mark.parametrize("name", list(SECOND_FILE_CASES))
def test_broken_packages_exit_2_with_one_line(demo_master, tmp_path, name, tried):
    make, gist = SECOND_FILE_CASES[name]
    path = make(demo_master, tmp_path / "case.xlsx")
    before = path.read_bytes() if path.is_file() else None
    _one_line_refusal(run_cli("check", str(path)), 2, gist)
    if before is not None:
        assert path.read_bytes() == before
    tried.append(name)


def test_a_device_is_refused_at_once(tried):
    _one_line_refusal(run_cli("check", "/dev/zero"), 2, "not a regular file")
    tried.append("/dev/zero")


COMPUTE_CASES = {
    "bad CRC in a sheet": _bad_crc,
    "entry flagged encrypted": _encrypted_flag,
    "truncated styles.xml": _truncated("xl/styles.xml"),
    "part listed twice": _listed_twice,
    "part name climbing out of the package": _climbs_out,
    "part names clashing ignoring case": _case_clash,
}


@pytest.mark.parametrize("name", list(COMPUTE_CASES))
def test_compute_never_copies_a_broken_package(demo_master, tmp_path, name, tried):
    path = COMPUTE_CASES[name](demo_master, tmp_path / "case.xlsx")
    before = path.read_bytes()
    out = tmp_path / "out.xlsx"
    r = run_cli("compute", str(path), "--output", str(out))
    assert r.returncode == 2, r.stdout + r.stderr
    assert "Traceback" not in r.stderr, r.stderr
    assert path.read_bytes() == before
    assert not out.exists()
    tried.append(f"compute: {name}")


def _add_rows(sheet: str, xml_rows: bytes, at_start: bool = False):
    def make(demo, dst):
        def change(x: bytes) -> bytes:
            if at_start:
                return x.replace(b"<sheetData>", b"<sheetData>" + xml_rows, 1)
            return x.replace(b"</sheetData>", xml_rows + b"</sheetData>", 1)

        return _repack(demo, dst, {_part(demo, sheet): change})

    return make


def _formula_then_blanks(demo, dst):
    """One formula (with its saved value) and then 100 000 rows of formatted blank cells, as a
    spreadsheet program writes a formatted table: every scan must stay linear."""
    blanks = b"".join(
        b'<row r="%d">' % r
        + b"".join(b'<c r="%s%d" s="5"/>' % (c.encode(), r) for c in "ABCDEFG")
        + b"</row>"
        for r in range(2000, 102000)
    )

    def change(x: bytes) -> bytes:
        x = x.replace(
            b'<c r="D2" s="10" t="n"><v>947.3</v></c>', b'<c r="D2" s="10"><f>900+47.3</f><v>947.3</v></c>'
        )
        return x.replace(b"</sheetData>", blanks + b"</sheetData>", 1)

    return _repack(demo, dst, {_part(demo, A.name): change})


def _error_attr_order(demo, dst):
    # whatever the demo holds at F4 (a number), the same cell as an error with its attributes
    # in another order and other quotes
    cell = re.compile(rb'<c r="F4"( s="\d+")?( t="n")?><v>[^<]*</v></c>')
    new = b"<c t='e' s=\"10\" r='F4'><v>#N/A</v></c>"

    def swap(x: bytes) -> bytes:
        out, n = cell.subn(new, x, count=1)
        assert n == 1, "the demo's Member actions!F4 is not a plain number cell"
        return out

    return _repack(demo, dst, {_part(demo, A.name): swap})


FAR = b'<c r="%s" t="inlineStr"><is><t>far</t></is></c>'
SECOND_STRUCTURE_CASES = {
    # a far cell the first guard missed: other quoting, other position, row tag not saying it
    "far cell in single quotes": (
        _add_rows(S.name, b"<row r='1048576'><c r='XFD1048576' t='inlineStr'><is><t>far</t></is></c></row>"),
        0,
        "valid",
    ),
    "far row at the start of the sheet": (
        # rows out of order (ECMA-376 Part 1, 18.3.1.73 asks for ascending rows): refused in one
        # line before any reader can misplace the header
        _add_rows(S.name, b'<row r="1048576">' + FAR % b"ZZ1048576" + b"</row>", at_start=True),
        2,
        "rows must ascend",
    ),
    "far cell under a near row tag": (
        _add_rows(S.name, b'<row r="17">' + FAR % b"ZZ1048576" + b"</row>"),
        0,
        "valid",
    ),
    "far cell with attributes reordered": (
        _add_rows(S.name, b'<row r="17"><c t="inlineStr" r="XFA17"><is><t>far</t></is></c></row>'),
        0,
        "valid",
    ),
    "formula then 100 000 formatted blank rows": (_formula_then_blanks, 0, "valid"),
    "#N/A with its attributes in another order": (_error_attr_order, 1, "error value #N/A"),
}


@pytest.mark.parametrize("name", list(SECOND_STRUCTURE_CASES))
def test_odd_sheet_xml_is_read_in_bounded_time(demo_master, tmp_path, name, tried):
    _check_refuses_or_reads(SECOND_STRUCTURE_CASES[name], demo_master, tmp_path)
    tried.append(name)


SECOND_VALUE_CASES = {
    "decimal comma": ((W.name, cell(W, "thickness", 2)), "250,5", "decimal comma"),
    "decimal comma below one": ((S.name, cell(S, "height", 2)), "0,25", "decimal comma"),
    "thousands separator": ((A.name, cell(A, "n", 2)), "1,000", "thousands separator"),
    "storey name in another case": ((A.name, cell(A, "storey", 2)), "gf", "only by case"),
    "storey name with an invisible character": ((A.name, cell(A, "storey", 2)), "GF\u200b", "invisible"),
    "core storey with a no-break space": (
        (layout.CORE_ACTIONS.name, cell(layout.CORE_ACTIONS, "storey", 2)),
        "G\u00a0F",
        "invisible",
    ),
    "member in another case": ((A.name, cell(A, "member", 2)), "lifte", "only by case"),
}


@pytest.mark.parametrize("name", list(SECOND_VALUE_CASES))
def test_near_miss_values_say_what_is_wrong(demo_master, tmp_path, name, tried):
    (sheet, ref), value, gist = SECOND_VALUE_CASES[name]
    path = with_openpyxl(demo_master, tmp_path / "case.xlsx", setv(sheet, ref, value))
    before = path.read_bytes()
    r = run_cli("check", str(path))
    assert r.returncode == 1, r.stdout + r.stderr
    shown = sheet if " " not in sheet else f"'{sheet}'"
    assert any(
        line.startswith(f"error   {shown}!{ref}:") and gist in line for line in r.stderr.splitlines()
    ), r.stderr
    assert path.read_bytes() == before
    tried.append(name)


def test_output_under_a_file_is_refused(demo_master, tmp_path, tried):
    import shutil

    path = tmp_path / "tower.xlsx"
    shutil.copy(demo_master, path)
    before = path.read_bytes()
    (tmp_path / "notes.txt").write_text("a file, not a folder")
    _one_line_refusal(
        run_cli("compute", str(path), "--output", str(tmp_path / "notes.txt" / "out.xlsx")), 2, "not a folder"
    )
    assert path.read_bytes() == before
    tried.append("--output under a file")


def test_template_into_a_missing_folder_is_refused(tmp_path, tried):
    _one_line_refusal(run_cli("template", str(tmp_path / "no" / "such" / "new.xlsx")), 2, "no such folder")
    assert not (tmp_path / "no").exists()
    tried.append("template into a missing folder")


SECOND_ROUND = (
    len(SECOND_FILE_CASES)
    + 1
    + len(COMPUTE_CASES)
    + len(SECOND_STRUCTURE_CASES)
    + len(SECOND_VALUE_CASES)
    + 2
)


def test_corpus_grows_to_70(tried, capsys):
    first_round = len(FILE_CASES) + len(STRUCTURE_CASES) + len(VALUE_CASES) + 1
    with capsys.disabled():  # last test of the module: every case before it has run
        print(f"\nhostile corpus: {len(tried)} of {first_round + SECOND_ROUND} generated cases tried")
    assert first_round + SECOND_ROUND >= 70
