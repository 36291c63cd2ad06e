"""Result sheets into the engineer's workbook, by editing the package surgically.

Only four kinds of part change: xlcore's own result sheets (replaced), the workbook part and
its relationships (which list sheets), the content-type index, and the style sheet (entries
appended, never renumbered). Every other part is copied unchanged, so nothing the engineer
made (charts, images, macros, comments, validations, formatting) is lost. The calculation
chain, a cache the spreadsheet program rebuilds, is dropped as the program would ask to
repair otherwise. The new file is written beside the old one and swapped in atomically.
"""

from __future__ import annotations

import functools
import os
import shutil
import tempfile
import zipfile
from collections.abc import Callable, Iterator
from pathlib import Path

from lxml import etree

from xlcore import results
from xlcore.diagnostics import FileProblem
from xlcore.layout import RESULT_PREFIX
from xlcore.progress import SILENT, Reporter
from xlcore.results import MARKER, ResultSheet
from xlcore.workbook.package import (
    NS_CT,
    NS_MAIN,
    NS_PKG_REL,
    NS_REL,
    PARSER,
    WORKSHEET_REL,
    open_package,
    part_path,
    read_xml,
)
from xlcore.workbook.sheetxml import Styles, print_titles, sheet_pieces, split

WORKSHEET_CT = "application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"
CALC_CHAIN_REL = NS_REL + "/calcChain"
M = f"{{{NS_MAIN}}}"


def lock_files(path: Path) -> list[Path]:
    """Lock files that Excel (~$name) and LibreOffice (.~lock.name#) leave beside an open file."""
    names = [f"~${path.name}", f".~lock.{path.name}#"]
    return [path.with_name(n) for n in names if path.with_name(n).exists()]


def backup_path(path: Path) -> Path:
    return path.with_name(f"{path.stem}.xlcore-backup{path.suffix}")


def write_results(
    src: Path, dst: Path, sheets: list[ResultSheet], force: bool = False, reporter: Reporter = SILENT
) -> None:
    """Replace xlcore's result sheets in `src` with `sheets`, saving to `dst` atomically.

    When dst is src, the previous file is kept as a backup beside it. The reporter hears the
    result rows as they are written.
    """
    src, dst = Path(src), Path(dst)
    locks = lock_files(dst)
    if locks and not force:
        raise FileProblem(
            f"{dst} looks open in a spreadsheet program (lock file {locks[0].name} beside it). "
            "Close it there and run again. If no program has it open, the lock file is stale "
            "(left by a crash): delete it, or run with --force."
        )
    with open_package(src) as zf:
        package = _build(zf, sheets, reporter.advance)
    folder = dst.parent
    for stale in folder.glob(f".{dst.name}.*.xlcore-tmp"):  # left by a run that was killed
        _remove(str(stale))
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{dst.name}.", suffix=".xlcore-tmp", dir=folder)
    except OSError as exc:
        raise FileProblem(
            f"{dst}: cannot write in {folder} ({exc.strerror or exc}); the workbook is unchanged"
        ) from exc
    try:
        reporter.begin(f"writing {len(sheets)} result sheets", sum(len(s.table) for s in sheets))
        with os.fdopen(fd, "wb") as fh:
            try:
                _write_package(fh, package, zip64=False)
            except _NeedsZip64:  # a part over 4 GiB (not expected below the row limit): again
                fh.seek(0)
                fh.truncate()
                _write_package(fh, package, zip64=True)
            fh.flush()
            os.fsync(fh.fileno())
        if dst.exists():
            shutil.copymode(dst, tmp)
        else:  # mkstemp makes the file private (0600); give it the mode a new file gets
            umask = os.umask(0)
            os.umask(umask)
            os.chmod(tmp, 0o666 & ~umask)
        if dst.resolve() == src.resolve():
            shutil.copy2(src, backup_path(dst))
        os.replace(tmp, dst)
        reporter.end()
    except OSError as exc:
        _remove(tmp)
        raise FileProblem(
            f"{dst}: could not save ({exc.strerror or exc}); the workbook is unchanged"
        ) from exc
    except BaseException:
        _remove(tmp)
        raise


class _NeedsZip64(Exception):
    pass


def _write_package(fh, package: list, zip64: bool) -> None:
    """The parts into a zip: old parts as bytes, result sheets streamed from their generators.
    Without need, no part carries the ZIP64 extension: Excel refuses or repairs packages whose
    small parts do (seen by other writers), so it is used only when a part outgrows 4 GiB."""
    with zipfile.ZipFile(fh, "w", zipfile.ZIP_DEFLATED) as out:
        for info, data in package:
            if isinstance(data, bytes):
                out.writestr(info, data, compresslevel=FAST if len(data) > BIG else 6)
                continue
            _set_level(info, FAST)
            try:
                with out.open(info, "w", force_zip64=zip64) as part:
                    for piece in data():
                        part.write(piece)
            except RuntimeError as exc:
                if "force_zip64" in str(exc):
                    raise _NeedsZip64 from exc
                raise


def _set_level(info: zipfile.ZipInfo, level: int) -> None:
    """Deflate level of a part written through ZipFile.open (no public way to pass it)."""
    name = "compress_level" if hasattr(info, "compress_level") else "_compresslevel"  # 3.13 / 3.11
    setattr(info, name, level)


def _remove(p: str) -> None:
    try:
        os.unlink(p)
    except FileNotFoundError:
        pass


FAST, BIG = 1, 1 << 20  # deflate level for parts over BIG bytes: 3-4x faster than 6, ~15 % larger


def _build(
    zf: zipfile.ZipFile, sheets: list[ResultSheet], on_rows: Callable[[int], None] | None = None
) -> list[tuple[zipfile.ZipInfo, bytes | Callable[[], Iterator[bytes]]]]:
    """The new package's parts: the old ones (less our previous results) as bytes, the result
    sheets as makers of XML pieces, written into the package as they are made."""
    sheets = [part for s in sheets for part in split(s)]
    wb_part = "xl/workbook.xml"
    rels_part = "xl/_rels/workbook.xml.rels"
    wb = read_xml(zf, wb_part)
    rels = read_xml(zf, rels_part)
    ct = read_xml(zf, "[Content_Types].xml")
    names = set(zf.namelist())
    rel_by_id = {r.get("Id"): r for r in rels.iter(f"{{{NS_PKG_REL}}}Relationship")}

    sheets_el = wb.find(f"{M}sheets")
    old = list(sheets_el)
    drop_parts: set[str] = set()
    keep_positions: dict[int, int] = {}
    for i, s in enumerate(old):
        name = s.get("name")
        rid = s.get(f"{{{NS_REL}}}id")
        rel = rel_by_id.get(rid)
        part = part_path(wb_part, rel.get("Target")) if rel is not None else ""
        if name.startswith(RESULT_PREFIX):
            if part not in names or MARKER.encode() not in zf.read(part)[:4000]:
                raise FileProblem(
                    f"sheet {name!r} has the name of an xlcore result sheet but was not written by "
                    f"xlcore; rename it (result sheets start with {RESULT_PREFIX!r}) and run again"
                )
            sheets_el.remove(s)
            rels.remove(rel)
            drop_parts.add(part)
            sheet_rels = posixpath_rels(part)
            if sheet_rels in names:
                drop_parts.add(sheet_rels)
        else:
            keep_positions[i] = len(keep_positions)
    _renumber_local_names(wb, keep_positions)

    for rel in list(rels):
        if rel.get("Type") == CALC_CHAIN_REL:
            drop_parts.add(part_path(wb_part, rel.get("Target")))
            rels.remove(rel)
    for o in list(ct):
        if o.get("PartName", "").lstrip("/") in drop_parts:
            ct.remove(o)

    styles_part = _styles_part(rels, wb_part)
    styles_xml, styles = _add_styles(
        read_xml(zf, styles_part) if styles_part in names else None,
        [c.fmt for s in sheets for c in s.columns if c.fmt],
    )
    new_parts: dict[str, Callable[[], Iterator[bytes]]] = {}
    used_ids = {r.get("Id") for r in rels}
    sheet_ids = [int(s.get("sheetId")) for s in sheets_el]
    next_sheet_id = max(sheet_ids, default=0) + 1
    n = 1
    for sheet in sheets:
        while (
            f"xl/worksheets/sheet{n}.xml" in names - drop_parts or f"xl/worksheets/sheet{n}.xml" in new_parts
        ):
            n += 1
        part = f"xl/worksheets/sheet{n}.xml"
        new_parts[part] = functools.partial(sheet_pieces, sheet, styles, on_rows=on_rows)
        rid = _fresh(used_ids, "rIdXlc")
        etree.SubElement(
            rels,
            f"{{{NS_PKG_REL}}}Relationship",
            Id=rid,
            Type=WORKSHEET_REL,
            Target=f"worksheets/sheet{n}.xml",
        )
        el = etree.SubElement(sheets_el, f"{M}sheet", name=sheet.name, sheetId=str(next_sheet_id))
        el.set(f"{{{NS_REL}}}id", rid)
        next_sheet_id += 1
        etree.SubElement(ct, f"{{{NS_CT}}}Override", PartName=f"/{part}", ContentType=WORKSHEET_CT)

    add_print_titles(wb, len(sheets_el) - len(sheets), sheets)
    changed = {
        wb_part: _xml(wb),
        rels_part: _xml(rels),
        "[Content_Types].xml": _xml(ct),
        styles_part: styles_xml,
    }
    out: list[tuple[zipfile.ZipInfo, bytes | Callable[[], Iterator[bytes]]]] = []
    for info in zf.infolist():
        if info.filename in drop_parts:
            continue
        data = changed.get(info.filename)
        out.append((info, data if data is not None else zf.read(info.filename)))
    if styles_part not in names:
        raise FileProblem("workbook has no style sheet part; open and save it in a spreadsheet program")
    for part, data in new_parts.items():
        out.append((zipfile.ZipInfo(part, date_time=(2026, 1, 1, 0, 0, 0)), data))
    for info, _ in out:
        info.compress_type = zipfile.ZIP_DEFLATED
    return out


def posixpath_rels(part: str) -> str:
    head, _, tail = part.rpartition("/")
    return f"{head}/_rels/{tail}.rels"


def _renumber_local_names(wb: etree._Element, keep: dict[int, int]) -> None:
    """Sheet-scoped defined names refer to sheets by position: follow the kept sheets, drop
    names scoped to removed result sheets, and keep the active tab on a sheet that exists."""
    names = wb.find(f"{M}definedNames")
    if names is not None:
        for dn in list(names):
            local = dn.get("localSheetId")
            if local is None:
                continue
            new = keep.get(int(local))
            if new is None:
                names.remove(dn)
            else:
                dn.set("localSheetId", str(new))
        if len(names) == 0:
            wb.remove(names)
    views = wb.find(f"{M}bookViews")
    if views is not None:
        for v in views:
            for attr in ("activeTab", "firstSheet"):
                if v.get(attr) is not None:
                    v.set(attr, str(keep.get(int(v.get(attr)), 0)))


PRINT_TITLES = "_xlnm.Print_Titles"
_AFTER_NAMES = (
    "calcPr",
    "oleSize",
    "customWorkbookViews",
    "pivotCaches",
    "smartTagPr",
    "smartTagTypes",
    "webPublishing",
    "fileRecoveryPr",
    "webPublishObjects",
    "extLst",
)


def add_print_titles(wb: etree._Element, first: int, sheets: list[ResultSheet]) -> None:
    """A sheet-scoped `_xlnm.Print_Titles` for each result sheet (header row and identifying
    columns repeated on every printed page). `first` is the position of the first result
    sheet in the sheet list; earlier names scoped to result sheets were dropped with them."""
    names = wb.find(f"{M}definedNames")
    if names is None:
        names = etree.Element(f"{M}definedNames")
        anchor = next((wb.find(f"{M}{t}") for t in _AFTER_NAMES if wb.find(f"{M}{t}") is not None), None)
        if anchor is not None:
            anchor.addprevious(names)
        else:
            wb.append(names)
    for i, sheet in enumerate(sheets):
        el = etree.SubElement(names, f"{M}definedName", name=PRINT_TITLES, localSheetId=str(first + i))
        el.text = print_titles(sheet)


def _styles_part(rels: etree._Element, wb_part: str) -> str:
    for r in rels:
        if r.get("Type", "").endswith("/styles"):
            return part_path(wb_part, r.get("Target"))
    return "xl/styles.xml"


def _fresh(used: set[str], prefix: str) -> str:
    i = 1
    while f"{prefix}{i}" in used:
        i += 1
    used.add(f"{prefix}{i}")
    return f"{prefix}{i}"


def _xml(el: etree._Element) -> bytes:
    return etree.tostring(el, xml_declaration=True, encoding="UTF-8", standalone=True)


# ------------------------------------------------------------------ styles


def _child(parent: etree._Element, tag: str, before: tuple[str, ...] = ()) -> etree._Element:
    el = parent.find(f"{M}{tag}")
    if el is None:
        el = etree.Element(f"{M}{tag}", count="0")
        anchor = next((parent.find(f"{M}{b}") for b in before if parent.find(f"{M}{b}") is not None), None)
        if anchor is not None:
            anchor.addprevious(el)
        else:
            parent.append(el)
    return el


def _intern(parent: etree._Element, xml: str) -> int:
    """Index of an entry equal to `xml` in a style list, appending it if absent.

    Reusing equal entries keeps repeated runs from growing the style sheet.
    """
    new = etree.fromstring(f'<w xmlns="{NS_MAIN}">{xml}</w>', PARSER)[0]
    want = _canon(new)
    for i, el in enumerate(parent):
        if _canon(el) == want:
            return i
    parent.append(new)
    parent.set("count", str(len(parent)))
    return len(parent) - 1


def _canon(el: etree._Element) -> bytes:
    return etree.tostring(el, method="c14n", exclusive=True, with_comments=False)


def _add_styles(root: etree._Element | None, formats: list[str]) -> tuple[bytes, Styles]:
    if root is None:
        raise FileProblem("workbook has no style sheet part; open and save it in a spreadsheet program")
    order = ("fonts", "fills", "borders", "cellStyleXfs", "cellXfs", "cellStyles", "dxfs")
    numfmts = _child(root, "numFmts", before=order)
    fonts = _child(root, "fonts", before=order[1:])
    fills = _child(root, "fills", before=order[2:])
    xfs = _child(root, "cellXfs", before=order[5:])
    if len(fills) == 0:  # the two reserved fills every style sheet starts with
        _intern(fills, '<fill><patternFill patternType="none"/></fill>')
        _intern(fills, '<fill><patternFill patternType="gray125"/></fill>')
    if len(fonts) == 0:
        _intern(fonts, '<font><sz val="11"/><name val="Calibri"/></font>')
    if len(xfs) == 0:
        _intern(xfs, '<xf numFmtId="0" fontId="0" fillId="0" borderId="0"/>')

    def fmt_id(code: str) -> int:
        builtin = {"0": 1, "0.00": 2}
        if code in builtin:
            return builtin[code]
        for el in numfmts:
            if el.get("formatCode") == code:
                return int(el.get("numFmtId"))
        new_id = max([163] + [int(e.get("numFmtId")) for e in numfmts]) + 1
        etree.SubElement(numfmts, f"{M}numFmt", numFmtId=str(new_id), formatCode=code)
        numfmts.set("count", str(len(numfmts)))
        return new_id

    def xf(num: int = 0, font: int = 0, fill: int = 0, wrap: bool = False, top: bool = False) -> int:
        attrs = f'numFmtId="{num}" fontId="{font}" fillId="{fill}" borderId="0" xfId="0"'
        attrs += (
            f' applyNumberFormat="{int(num > 0)}" applyFont="{int(font > 0)}" applyFill="{int(fill > 0)}"'
        )
        inner = '<alignment wrapText="1" vertical="top"/>' if wrap else ""
        inner = inner or ('<alignment vertical="top"/>' if top else "")
        attrs += ' applyAlignment="1"' if inner else ""
        return _intern(xfs, f"<xf {attrs}>{inner}</xf>" if inner else f"<xf {attrs}/>")

    dxfs = _child(root, "dxfs", before=("tableStyles", "colors", "extLst"))
    bands = tuple(
        _intern(
            dxfs,
            f'<dxf><font><color rgb="{font_rgb}"/></font><fill><patternFill patternType="solid">'
            f'<fgColor rgb="{fill_rgb}"/><bgColor rgb="{fill_rgb}"/></patternFill></fill></dxf>',
        )
        for _, _, font_rgb, fill_rgb in results.BANDS
    )

    bold = _intern(fonts, '<font><b/><sz val="11"/><name val="Calibri"/></font>')
    title = _intern(fonts, '<font><b/><sz val="14"/><name val="Calibri"/></font>')
    warn = _intern(fonts, '<font><b/><sz val="11"/><color rgb="FF9C2A00"/><name val="Calibri"/></font>')
    white = _intern(fonts, '<font><b/><sz val="11"/><color rgb="FFFFFFFF"/><name val="Calibri"/></font>')
    slate = _intern(
        fills,
        '<fill><patternFill patternType="solid"><fgColor rgb="FF2F4858"/>'
        '<bgColor indexed="64"/></patternFill></fill>',
    )
    styles = Styles(
        title=xf(font=title),
        caution=xf(font=warn, wrap=True),
        label=xf(font=bold, wrap=True),
        header=xf(font=white, fill=slate, wrap=True),
        number={code: xf(num=fmt_id(code), top=True) for code in dict.fromkeys(formats)},
        text=xf(top=True),
        wrap=xf(wrap=True),
        bands=bands,
    )
    if len(numfmts) == 0:
        root.remove(numfmts)
    return _xml(root), styles
