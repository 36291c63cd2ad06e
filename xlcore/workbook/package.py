"""The workbook as a zip package: opening it safely and finding its sheet parts."""

from __future__ import annotations

import posixpath
import zipfile
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


def open_package(path: Path) -> zipfile.ZipFile:
    """Open a workbook's zip, refusing what is not an .xlsx/.xlsm or would exhaust memory."""
    if not path.exists():
        raise FileProblem(f"{path}: file not found")
    if path.is_dir():
        raise FileProblem(f"{path}: is a folder, expected an .xlsx or .xlsm workbook")
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
    except (zipfile.BadZipFile, OSError) as exc:
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
    return zf


def read_xml(zf: zipfile.ZipFile, name: str) -> etree._Element:
    return etree.fromstring(zf.read(name), PARSER)


def sheet_parts(zf: zipfile.ZipFile) -> dict[str, str]:
    """Sheet name -> part path inside the package (e.g. 'xl/worksheets/sheet3.xml'), in order."""
    wb = read_xml(zf, "xl/workbook.xml")
    rels = read_xml(zf, "xl/_rels/workbook.xml.rels")
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
