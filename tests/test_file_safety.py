"""Issue 17 section 1 and issue 12 section 1 without a spreadsheet program: a workbook saved by
another program (openpyxl here: it moves our inline text to shared strings, as LibreOffice and
Excel do) still recomputes; nothing the engineer has is overwritten or lost."""

from __future__ import annotations

import os
import stat
import subprocess
import sys
import zipfile
from pathlib import Path

import openpyxl
import pytest
from openpyxl.comments import Comment
from openpyxl.workbook.defined_name import DefinedName
from test_save_faults import small_building

from xlcore import layout, pipeline, results
from xlcore.diagnostics import FileProblem
from xlcore.workbook.writer import backup_path, write_results


def run(path: Path, out: Path | None = None, **kw):
    b, f = pipeline.load(path)
    return write_results(path, out or path, pipeline.compute(b, f).sheets, **kw)


def cli(*args: object) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "xlcore", *map(str, args)], capture_output=True, text=True)


def resave(path: Path) -> None:
    """Load and save as a program does, with A1 of every sheet moved into the shared-strings
    table as LibreOffice and Excel move it (openpyxl itself keeps inline strings inline)."""
    import re

    wb = openpyxl.load_workbook(path)
    wb.save(path)
    with zipfile.ZipFile(path) as z:
        parts = {n: z.read(n) for n in z.namelist()}
    sst = parts.get("xl/sharedStrings.xml")
    if sst is None:  # a table of its own, as a program would add
        sst = b'<?xml version="1.0"?><sst xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"></sst>'
        parts["[Content_Types].xml"] = parts["[Content_Types].xml"].replace(
            b"</Types>",
            b'<Override PartName="/xl/sharedStrings.xml" ContentType="application/vnd.openxmlformats-'
            b'officedocument.spreadsheetml.sharedStrings+xml"/></Types>',
        )
        parts["xl/_rels/workbook.xml.rels"] = parts["xl/_rels/workbook.xml.rels"].replace(
            b"</Relationships>",
            b'<Relationship Id="rIdSst" Type="http://schemas.openxmlformats.org/officeDocument/2006/'
            b'relationships/sharedStrings" Target="sharedStrings.xml"/></Relationships>',
        )
    count = sst.count(b"<si>")
    cell = re.compile(rb'<c r="A1"((?: s="\d+")?) t="inlineStr"><is><t[^>]*>(.*?)</t></is></c>')
    for n in [n for n in parts if n.startswith("xl/worksheets/sheet")]:
        m = cell.search(parts[n])
        if m:
            parts[n] = (
                parts[n][: m.start()]
                + b'<c r="A1"%s t="s"><v>%d</v></c>' % (m.group(1), count)
                + parts[n][m.end() :]
            )
            sst = sst.replace(b"</sst>", b"<si><t>" + m.group(2) + b"</t></si></sst>")
            count += 1
    parts["xl/sharedStrings.xml"] = sst
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as z:
        for n, data in parts.items():
            z.writestr(n, data)


def test_recompute_after_another_program_saved(tmp_path):
    book = small_building(tmp_path / "book.xlsx")
    run(book)
    resave(book)
    with zipfile.ZipFile(book) as z:  # our stamp now lives only in the shared strings
        assert not any(results.MARKER.encode() in z.read(n) for n in z.namelist() if "worksheets/" in n)
    run(book)  # refused before: "was not written by xlcore"
    names = openpyxl.load_workbook(book, read_only=True).sheetnames
    assert names.count(results.SUMMARY_SHEET) == 1


def test_user_sheet_with_our_name_in_other_case_is_refused(tmp_path):
    book = small_building(tmp_path / "book.xlsx")
    wb = openpyxl.load_workbook(book)
    wb.create_sheet("RESULTS summary")["A1"] = "mine"
    wb.save(book)
    before = book.read_bytes()
    with pytest.raises(FileProblem, match="rename it") as exc:
        run(book)
    assert "RESULTS summary" in str(exc.value)
    assert book.read_bytes() == before


def test_copy_of_our_sheet_is_refused_not_replaced(tmp_path):
    book = small_building(tmp_path / "book.xlsx")
    run(book)
    resave(book)
    wb = openpyxl.load_workbook(book)
    wb.copy_worksheet(wb[results.SUMMARY_SHEET]).title = "Results summary kept"
    wb.save(book)
    with pytest.raises(FileProblem, match="Results summary kept"):
        run(book)


def _integrity(path: Path) -> None:
    """No orphaned override, relationship, part or defined name."""
    from lxml import etree

    from xlcore.workbook.package import part_path

    with zipfile.ZipFile(path) as z:
        names = set(z.namelist())
        ct = etree.fromstring(z.read("[Content_Types].xml"))
        for o in ct:
            if o.get("PartName"):
                assert o.get("PartName").lstrip("/") in names, o.get("PartName")
        reached = {"[Content_Types].xml", "_rels/.rels"}
        for rp in (n for n in names if n.endswith(".rels")):
            head = rp.replace("_rels/", "").removesuffix(".rels")
            for r in etree.fromstring(z.read(rp)):
                if r.get("TargetMode") == "External":
                    continue
                t = part_path(head, r.get("Target")) if head else r.get("Target").lstrip("/")
                assert t in names, f"{rp} -> {t}"
                reached.add(t)
                reached.add(rp)
        orphans = {n for n in names if n not in reached and not n.endswith(".rels")}
        assert not orphans, orphans
    wb = openpyxl.load_workbook(path)
    for dn in wb.defined_names.values():
        for title, _ in dn.destinations:
            assert title in wb.sheetnames, dn.attr_text


def test_replacing_resaved_result_sheets_leaves_nothing_orphaned(tmp_path):
    book = small_building(tmp_path / "book.xlsx")
    run(book)
    resave(book)
    wb = openpyxl.load_workbook(book)
    wb[results.SHEAR_SHEET]["B9"].comment = Comment("checked", "checker")
    wb[results.SUMMARY_SHEET].print_area = "A1:F20"
    wb.defined_names["MyWorst"] = DefinedName("MyWorst", attr_text=f"'{results.SUMMARY_SHEET}'!$B$9")
    wb.save(book)
    run(book)
    _integrity(book)
    assert "MyWorst" in openpyxl.load_workbook(book).defined_names  # the engineer's name stays


def test_output_onto_existing_file_needs_overwrite_and_keeps_a_backup(tmp_path):
    book = small_building(tmp_path / "book.xlsx")
    copy = tmp_path / "copy.xlsx"
    copy.write_bytes(b"the engineer's other file")
    r = cli("compute", book, "-o", copy, "-q")
    assert r.returncode == 2 and "--overwrite" in r.stderr and str(copy) in r.stderr
    assert copy.read_bytes() == b"the engineer's other file"
    r = cli("compute", book, "-o", copy, "--overwrite", "-q")
    assert r.returncode == 0, r.stderr
    assert backup_path(copy).read_bytes() == b"the engineer's other file"
    assert backup_path(copy).name in r.stdout


def test_symlinked_workbook_is_written_through(tmp_path):
    real = small_building(tmp_path / "real.xlsx")
    link = tmp_path / "link.xlsx"
    link.symlink_to(real)
    r = cli("compute", link, "-q")
    assert r.returncode == 0, r.stderr
    assert link.is_symlink()
    assert results.SUMMARY_SHEET in openpyxl.load_workbook(real, read_only=True).sheetnames


def test_read_only_workbook_refused_unless_overwrite(tmp_path):
    book = small_building(tmp_path / "book.xlsx")
    os.chmod(book, 0o444)
    before = book.read_bytes()
    r = cli("compute", book, "-q")
    assert r.returncode == 2 and "read-only" in r.stderr and str(book) in r.stderr
    assert book.read_bytes() == before
    r = cli("compute", book, "--overwrite", "-q")
    assert r.returncode == 0, r.stderr
    assert stat.S_IMODE(book.stat().st_mode) == 0o444


def test_disk_full_while_backing_up_keeps_the_previous_backup(tmp_path):
    """The source carries a large stored (uncompressed) part that the writer deflates, so the
    new workbook is small and the backup copy of the original is what hits the file-size limit
    (RLIMIT_FSIZE: writes past it fail with EFBIG, as a full disk fails them)."""
    book = small_building(tmp_path / "book.xlsx")
    with zipfile.ZipFile(book, "a", zipfile.ZIP_STORED) as z:
        z.writestr("customXml/big.xml", b"<a>" + b"x" * 3_000_000 + b"</a>")
    backup = backup_path(book)
    backup.write_bytes(b"previous backup " * 100)
    limit = book.stat().st_size - 500_000
    code = (
        f"import resource,sys;resource.setrlimit(resource.RLIMIT_FSIZE,({limit},{limit}));"
        f"from xlcore.cli import app;sys.argv=['xlcore','compute',{str(book)!r},'-q'];app()"
    )
    before = book.read_bytes()
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert r.returncode == 2, r.stderr
    assert str(backup) in r.stderr
    assert backup.read_bytes() == b"previous backup " * 100  # truncated before the fix
    assert book.read_bytes() == before
    assert not list(tmp_path.glob("*.xlcore-tmp"))


def test_second_compute_on_the_same_workbook_is_refused(tmp_path):
    book = small_building(tmp_path / "book.xlsx")
    holder = subprocess.Popen(
        [
            sys.executable,
            "-c",
            "import sys;from xlcore.workbook.writer import workbook_lock\n"
            f"with workbook_lock({str(book)!r}):\n print('held', flush=True); sys.stdin.readline()",
        ],
        stdin=subprocess.PIPE,
        stdout=subprocess.PIPE,
        text=True,
    )
    try:
        assert holder.stdout.readline().strip() == "held"
        before = book.read_bytes()
        r = cli("compute", book, "-q")
        assert r.returncode == 2, r.stderr
        assert "another xlcore run" in r.stderr and str(book) in r.stderr
        assert book.read_bytes() == before
    finally:
        holder.communicate("\n", timeout=30)
    r = cli("compute", book, "-q")
    assert r.returncode == 0, r.stderr


def test_two_computes_at_once_never_lose_the_original(tmp_path):
    book = small_building(tmp_path / "book.xlsx")
    procs = [
        subprocess.Popen([sys.executable, "-m", "xlcore", "compute", str(book), "-q"], stderr=subprocess.PIPE)
        for _ in range(2)
    ]
    codes = [p.wait(timeout=300) for p in procs]
    assert 0 in codes and set(codes) <= {0, 2}
    assert results.SUMMARY_SHEET in openpyxl.load_workbook(book, read_only=True).sheetnames
    with zipfile.ZipFile(backup_path(book)) as z:
        assert z.testzip() is None
    assert not [p for p in tmp_path.iterdir() if p.name.endswith((".xlcore-tmp", ".xlcore-lock"))]


def test_many_unreferenced_parts_are_kept_and_not_reused(tmp_path):
    """Issue 17 section 2: the writer's bookkeeping stays linear in the parts (figures in
    benchmarks/many_parts.py); here, that 5 000 stray parts come through and none is reused."""
    book = small_building(tmp_path / "book.xlsx")
    with zipfile.ZipFile(book, "a") as z:
        have = set(z.namelist())
        stray = [f"xl/worksheets/sheet{n}.xml" for n in range(1, 5001)]
        stray = [p for p in stray if p not in have]  # numbered on from the sheets there
        for p in stray:
            z.writestr(p, b"<stray/>")
    run(book)
    with zipfile.ZipFile(book) as z:
        assert all(z.read(p) == b"<stray/>" for p in stray)
        assert len(z.namelist()) == len(set(z.namelist()))
    assert layout.RESULT_PREFIX + "summary" in openpyxl.load_workbook(book, read_only=True).sheetnames


def test_read_only_backup_is_named_in_the_message(tmp_path):
    book = small_building(tmp_path / "book.xlsx")
    backup = backup_path(book)
    backup.write_bytes(b"kept")
    os.chmod(backup, 0o444)
    before = book.read_bytes()
    r = cli("compute", book, "-q")
    assert r.returncode == 2 and f"the backup {backup} is read-only" in r.stderr
    assert book.read_bytes() == before and backup.read_bytes() == b"kept"
