"""The workbook as a zip package: opening it safely and finding its sheet parts."""

from __future__ import annotations

import posixpath
import stat
import zipfile
import zlib
from pathlib import Path

from lxml import etree

from xlcore.diagnostics import FileProblem

NS_MAIN = "http://schemas.openxmlformats.org/spreadsheetml/2006/main"
NS_REL = "http://schemas.openxmlformats.org/officeDocument/2006/relationships"
NS_PKG_REL = "http://schemas.openxmlformats.org/package/2006/relationships"
NS_CT = "http://schemas.openxmlformats.org/package/2006/content-types"
WORKSHEET_REL = NS_REL + "/worksheet"

MAX_UNPACKED = 1 << 30  # 1 GiB of XML is far beyond any core model; larger is refused
MAX_RATIO = 200  # deflate of sheet XML rarely beats 100:1; bombs reach thousands
OLE_MAGIC = b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1"
PARSER = etree.XMLParser(resolve_entities=False, no_network=True, huge_tree=False)


STRICT_NS = "http://purl.oclc.org/ooxml/"
DAMAGE = (zipfile.BadZipFile, zlib.error, EOFError, OSError, NotImplementedError, RuntimeError, ValueError)


def open_package(path: Path) -> zipfile.ZipFile:
    """Open a workbook's zip, refusing what is not an .xlsx/.xlsm or would exhaust memory, and a
    package no spreadsheet program writes (see `check_package`)."""
    try:
        mode = path.stat().st_mode
    except FileNotFoundError:
        raise FileProblem(f"{path}: file not found") from None
    except OSError as exc:
        raise FileProblem(f"{path}: cannot be read ({exc.strerror})") from None
    if stat.S_ISDIR(mode):
        raise FileProblem(f"{path}: is a folder, expected an .xlsx or .xlsm workbook")
    if not stat.S_ISREG(mode):  # a device or a pipe would block or never end
        raise FileProblem(
            f"{path}: not a regular file (a device or a pipe); expected an .xlsx or .xlsm workbook"
        )
    with path.open("rb") as fh:
        head = fh.read(8)
    if head == OLE_MAGIC:
        raise FileProblem(
            f"{path}: this is an encrypted (password-protected) workbook or an old .xls file; "
            "remove the password or save it as .xlsx, then try again"
        )
    if not zipfile.is_zipfile(path):
        raise FileProblem(f"{path}: not an .xlsx/.xlsm workbook (not a zip package)")
    try:
        zf = zipfile.ZipFile(path)
        names = set(zf.namelist())
    except DAMAGE as exc:
        raise FileProblem(f"{path}: damaged workbook package ({exc})") from exc
    if "xl/workbook.xml" not in names or "[Content_Types].xml" not in names:
        zf.close()
        raise FileProblem(
            f"{path}: a zip file but not a spreadsheet workbook (no xl/workbook.xml); expected .xlsx or .xlsm"
        )
    total = sum(i.file_size for i in zf.infolist())
    packed = sum(i.compress_size for i in zf.infolist()) or 1
    if total > MAX_UNPACKED or (total > 50_000_000 and total / packed > MAX_RATIO):
        zf.close()
        raise FileProblem(
            f"{path}: the package declares {total / 1e6:.0f} MB of content "
            f"({total / packed:.0f}:1 compression); refused as unsafe to open"
        )
    try:
        check_package(path, zf)
    except BaseException:
        zf.close()
        raise
    return zf


def check_package(path: Path, zf: zipfile.ZipFile) -> None:
    """Refuse a package that is legal zip but no workbook: parts listed twice, names that climb
    out of the package or clash ignoring case (ECMA-376 Part 2 makes part names unique ignoring
    case), encrypted entries, and workbook, relationship and style parts that do not parse (cut
    short, nested beyond 256 levels, or carrying a DTD, which Part 2 forbids in package XML;
    from memory). Such a package is never read further nor copied into an output."""
    infos = zf.infolist()
    seen: dict[str, str] = {}
    for info in infos:
        name = info.filename
        parts = name.replace("\\", "/").split("/")
        if name.startswith("/") or ".." in parts or ":" in parts[0]:
            raise FileProblem(
                f"{path}: damaged workbook package: part {name!r} lies outside the package; refused"
            )
        key = name.lower()
        if key in seen:
            how = "is listed twice" if seen[key] == name else f"clashes with {seen[key]!r} ignoring case"
            raise FileProblem(f"{path}: damaged workbook package: part {name!r} {how}; refused")
        seen[key] = name
        if info.flag_bits & 0x1:
            raise FileProblem(
                f"{path}: part {name!r} is encrypted inside the package; remove the password in your "
                "spreadsheet program and save again"
            )
    rels = "xl/_rels/workbook.xml.rels"
    if rels not in seen:
        raise FileProblem(
            f"{path}: damaged workbook package: {rels} (the list of the workbook's sheets) is missing"
        )
    for part in ("xl/workbook.xml", rels, "xl/styles.xml", "xl/sharedStrings.xml"):
        if part in seen:
            read_xml(zf, part, path)
    if STRICT_NS.encode() in zf.read("xl/workbook.xml")[:4096]:
        raise FileProblem(
            f"{path}: saved as Strict Open XML Spreadsheet, which xlcore does not read; save it as "
            "Excel Workbook (.xlsx) and try again"
        )


def read_part(zf: zipfile.ZipFile, name: str, path: Path | str = "workbook") -> bytes:
    """A part's bytes; a bad checksum or a broken deflate stream is a file problem."""
    try:
        return zf.read(name)
    except KeyError:
        raise FileProblem(f"{path}: damaged workbook package: part {name} is missing") from None
    except DAMAGE as exc:
        raise FileProblem(f"{path}: damaged workbook package: part {name} cannot be read ({exc})") from None


def read_xml(zf: zipfile.ZipFile, name: str, path: Path | str = "workbook") -> etree._Element:
    """A part parsed safely: no DTD, no entities, no network, lxml's depth and size limits."""
    data = read_part(zf, name, path)
    if b"<!DOCTYPE" in data[:4096] or b"<!ENTITY" in data[:4096]:
        raise FileProblem(f"{path}: {name} declares a DTD (entities), which a workbook never does; refused")
    try:
        return etree.fromstring(data, PARSER)
    except etree.XMLSyntaxError as exc:
        raise FileProblem(
            f"{path}: damaged workbook package: {name} is not well-formed XML ({exc})"
        ) from None


def sheet_parts(zf: zipfile.ZipFile) -> dict[str, str]:
    """Sheet name -> part path inside the package (e.g. 'xl/worksheets/sheet3.xml'), in order."""
    wb = read_xml(zf, "xl/workbook.xml", zf.filename or "workbook")
    rels = read_xml(zf, "xl/_rels/workbook.xml.rels", zf.filename or "workbook")
    targets = {r.get("Id"): r.get("Target") for r in rels.iter(f"{{{NS_PKG_REL}}}Relationship")}
    out: dict[str, str] = {}
    for sheet in wb.iter(f"{{{NS_MAIN}}}sheet"):
        target = targets.get(sheet.get(f"{{{NS_REL}}}id"), "")
        out[sheet.get("name")] = part_path("xl/workbook.xml", target)
    return out


def part_path(source_part: str, target: str) -> str:
    """Resolve a relationship target relative to the part that holds the relationship."""
    if target.startswith("/"):
        return target.lstrip("/")
    return posixpath.normpath(posixpath.join(posixpath.dirname(source_part), target))
