"""Workbook -> raw cell values of the input sheets, with formulas resolved.

Reads only; the file is opened read-only and never written. Values are returned as the
spreadsheet program saved them; typing and checking happen in `xlcore.validate`.
"""

from __future__ import annotations

import contextlib
import gc
import hashlib
import io
import re
import threading
import warnings
from concurrent.futures import Future, ThreadPoolExecutor
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import openpyxl
import pandas as pd
from openpyxl.utils import column_index_from_string
from python_calamine import CalamineWorkbook

from xlcore import layout, results
from xlcore.diagnostics import FileProblem, Findings, cell_name
from xlcore.workbook.package import open_package, read_part, sheet_parts

ERROR_VALUES = ("#NULL!", "#DIV/0!", "#VALUE!", "#REF!", "#NAME?", "#NUM!", "#N/A", "#GETTING_DATA")


@dataclass
class RawSheet:
    """Cell values of one sheet, row 1 first; rows may be ragged."""

    name: str
    rows: list[list] = field(default_factory=list)

    def value(self, row: int, col: int) -> object:
        """Value at a 1-based row and 0-based column, None when absent ('' when blank)."""
        if row - 1 >= len(self.rows):
            return None
        r = self.rows[row - 1]
        return r[col] if col < len(r) else None


@dataclass
class RawWorkbook:
    path: Path
    sheet_names: list[str]
    sheets: dict[str, RawSheet]
    findings: Findings
    input_hash: str


@contextlib.contextmanager
def gc_paused():
    """The cyclic garbage collector off for a block that makes millions of small acyclic objects
    (cell rows, their trimmed copies): each full collection walks every object alive, so it
    costs time in proportion to the rows already read (0.7 s of the L tower's 4.5 s read).
    Reference counting still frees what is dropped; the collector runs again after."""
    was = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was:
            gc.enable()


def read_workbook(path: Path) -> RawWorkbook:
    """Read every input sheet xlcore knows; report formulas that cannot be resolved (see
    `_read_workbook`), with the cyclic collector paused (`gc_paused`)."""
    with gc_paused():
        return _read_workbook(path)


def _read_workbook(path: Path) -> RawWorkbook:
    """Read every input sheet xlcore knows; report formulas that cannot be resolved.

    Cell values come from python-calamine (a compiled reader, about 15x openpyxl's speed on
    large sheets) after a scan of each sheet's XML for what it does not give: error values,
    formulas saved without a value, hidden rows and merged cells. A sheet whose cells lie far
    beyond its rows (a stray cell at XFD1048576, say) is read with openpyxl's streaming reader,
    which does not lay out the empty grid in memory. The compiled reader reads a sheet in a
    worker thread as soon as its extent is known to be compact, while the rest of the scans
    run here (`_Calamine`)."""
    path = Path(path)
    findings = Findings()
    scans: dict[str, _Scan] = {}
    with _Calamine(path) as calamine:
        with open_package(path) as zf:
            parts = sheet_parts(zf)
            names = list(parts)
            strings = _shared_string_count(zf, path)
            for name in layout.INPUT_SHEET_NAMES:
                if name not in parts or parts[name] not in zf.namelist():
                    continue
                xml = read_part(zf, parts[name], path)
                plain = _plain(xml)
                compact = _compact_plain(plain) if plain is not None else _compact(xml)
                if compact:
                    calamine.ask(name)
                scans[name] = _scan(xml, plain, compact)
                _check_sheet(path, name, xml, strings, plain)
                _layout_warnings(name, xml, findings)
        sheets = calamine.sheets()
    slow = [n for n in scans if n not in sheets]
    if slow:
        sheets |= _read_openpyxl(path, slow)
    for name, sc in scans.items():
        for (r, c), text in sc.errors.items():
            _put(sheets[name], r, c, text)
    uncached = {n for n, sc in scans.items() if sc.uncached}
    if uncached:
        _resolve_formulas(path, sheets, uncached, findings)
    sheets = {n: sheets[n] for n in layout.INPUT_SHEET_NAMES if n in sheets}
    return RawWorkbook(path, names, sheets, findings, _hash(sheets))


class _Calamine:
    """python-calamine's reading of the sheets asked for, one after another in a worker thread.
    The compiled reader releases the interpreter lock while it parses a sheet (1.2 s of the
    L tower's 3 s read), so the XML scans of this and the next sheets run meanwhile. Blank
    cells are '' (validation treats '' and None alike); a sheet it cannot read (or a package
    it cannot open) is left out, to be read, or reported in its words, by openpyxl."""

    def __init__(self, path: Path) -> None:
        self.path = path
        self.pool = ThreadPoolExecutor(max_workers=1, thread_name_prefix="xlcore-read")
        self.asked: dict[str, Future] = {}
        self.book: CalamineWorkbook | None | object = _UNSET

    def __enter__(self) -> _Calamine:
        return self

    def __exit__(self, *exc) -> None:
        self.pool.shutdown(wait=True, cancel_futures=True)

    def ask(self, name: str) -> None:
        """Read the sheet in the worker. When the worker is idle, wait until it is inside the
        compiled reader: else it waits for the interpreter lock while this thread runs long
        C-level scans (0.35 s at L on a loaded machine) before its read can start."""
        idle = all(f.done() for f in self.asked.values())
        started = threading.Event()
        self.asked[name] = self.pool.submit(self._read, name, started)
        if idle:
            started.wait(timeout=1.0)

    def _read(self, name: str, started: threading.Event) -> list | None:
        started.set()
        if self.book is _UNSET:
            try:
                self.book = CalamineWorkbook.from_path(str(self.path))
            except Exception:  # damaged package: let the openpyxl reader report it in its words
                self.book = None
        if self.book is None:
            return None
        try:
            return self.book.get_sheet_by_name(name).to_python(skip_empty_area=False)
        except Exception:
            return None

    def sheets(self) -> dict[str, RawSheet]:
        """The sheets read, in the order asked."""
        out = {}
        for name, future in self.asked.items():
            rows = future.result()
            if rows is not None:
                out[name] = RawSheet(name, rows)
        return out


@dataclass
class _Scan:
    errors: dict[tuple[int, int], str]  # (row, 0-based column) -> error text such as #REF!
    uncached: bool  # some formula carries no saved value
    compact: bool  # the cells' extent is near the rows present (safe to read as a dense grid)


CELL_REF = re.compile(rb"([A-Za-z]{1,3})([0-9]+)")
_Q = rb"""\s*=\s*["']"""
# An error cell, whatever the order and quoting of its attributes: the lookahead stays inside the
# start tag and each piece after it stops at the next '<', so the scan is linear.
ERROR_CELL = re.compile(
    rb"<(?:\w+:)?c\b(?=[^>]*\bt" + _Q + rb"e[\"'])([^>]*)>\s*"
    rb"(?:<(?:\w+:)?f\b[^>]*?(?:/>|>[^<]*</(?:\w+:)?f>)\s*)?<(?:\w+:)?v>([^<]*)</"
)
CELL_R = re.compile(rb"\br" + _Q + rb"([A-Za-z]{1,3})([0-9]+)")
# a formula and the value saved after it (group 1 empty: none saved); linear as above
FORMULA_VALUE = re.compile(
    rb"<(?:\w+:)?f\b[^>]*?(?:/>|>[^<]*</(?:\w+:)?f>)\s*(?:<(?:\w+:)?v>\s*([^<\s][^<]*)?</(?:\w+:)?v>)?"
)
FORMULA_TAG = re.compile(rb"<(?:\w+:)?f[\s>/]")
VALUE = re.compile(rb"<(?:\w+:)?v>([^<]*)</")
# the reference of a cell (in any quoting) whose column has two or more letters, or whose row
# number has at least {n} digits: the only cells that can make the extent large
LONG_COLUMN = re.compile(rb"<(?:\w+:)?c\b[^>]*?\br" + _Q + rb"([A-Za-z]{2,})[0-9]")
CELL_WITHOUT_R = re.compile(rb"<(?:\w+:)?c(?:\s(?![^>]*\br\s*=)[^>]*)?>")
MAX_GRID = 4_000_000  # cells the compiled reader may lay out beyond 8 per cell present


@dataclass
class _Plain:
    """The cell data of a sheet written the way spreadsheet programs and openpyxl write it: every
    cell tag `<c r="...` and every row tag `<row r="...` (reference first, double quotes), no
    namespace prefix on cell, row, formula or value tags, and no cell or row outside
    `<sheetData>`. Then each question of `_scan` and `_check_sheet` is one search for a literal
    start (fast in `re`) instead of a pattern that tries every '<' (issue 15 §1: the general
    scans took 6 s of the L tower's read, more than the compiled reader itself)."""

    xml: bytes
    start: int  # where <sheetData> starts
    end: int  # where </sheetData> starts
    cells: int  # (the questions search `xml` between `start` and `end`: no copy of 100 MB at L)


PLAIN_OUTSIDE = re.compile(rb"<(?:\w+:)?(?:c|row)[\s>/]")  # a cell or row tag, any form
PLAIN_PREFIXED = re.compile(rb":(?:c|row|f|v)[\s>/]")  # such a tag with a namespace prefix
# a '<c' or '<row' not followed by its reference the plain way: one search each where counting
# both forms of each would take four passes
PLAIN_OTHER_TAG = re.compile(rb'<c(?! r=")|<row(?! r=")')
PLAIN_LONG_COLUMN = re.compile(rb'<c r="([A-Za-z]{2,})')
PLAIN_ROW = re.compile(rb'<row r="([0-9]+)"')


def _plain(xml: bytes) -> _Plain | None:
    """The sheet's cell data when it is plain (see `_Plain`), else None (the general scans run)."""
    start, end = xml.find(b"<sheetData>"), xml.rfind(b"</sheetData>")
    if start < 0 or end < start:
        return None
    if PLAIN_OUTSIDE.search(xml, 0, start) or PLAIN_OUTSIDE.search(xml, end):
        return None
    if PLAIN_OTHER_TAG.search(xml, start, end) or PLAIN_PREFIXED.search(xml, start, end):
        return None
    return _Plain(xml, start, end, xml.count(b'<c r="', start, end))


def _at_least(n: int) -> bytes:
    """A pattern for the decimal numbers >= n (n >= 0) written without leading zeros; put `0*`
    before it to allow them. Lets one `re.search` ask 'is any row or index this large?'."""
    if n <= 0:
        return rb"[0-9]+"
    s = str(n)
    longer = rb"[1-9][0-9]{%d,}" % len(s)
    same = [s.encode()]
    for i, ch in enumerate(s):
        if ch != "9":
            same.append(s[:i].encode() + b"[%d-9]" % (int(ch) + 1) + rb"[0-9]{%d}" % (len(s) - i - 1))
    return rb"(?:" + longer + rb"|" + rb"|".join(same) + rb")"


def _scan_plain(xml: bytes, plain: _Plain, compact: bool | None = None) -> _Scan:
    """`_scan` on a plain sheet: the same answers from literal-led searches."""
    start, end = plain.start, plain.end
    errors: dict[tuple[int, int], str] = {}
    if _has(xml, b'"e"', start, end) or _has(xml, b"'e'", start, end):  # t="e" in some quoting
        errors = _scan_errors(xml)
    uncached = _has(xml, b"<f", start, end) and any(
        m.group(1) is None for m in FORMULA_VALUE.finditer(xml, start, end)
    )
    return _Scan(errors, uncached, _compact_plain(plain) if compact is None else compact)


def _compact_plain(plain: _Plain) -> bool:
    """`_compact` on a plain sheet, by literal-led searches. The usual sheet (columns A to Z)
    is settled by one search for a two-letter column or a far row at that width."""
    xml, start, end = plain.xml, plain.start, plain.end
    narrow = (MAX_GRID + 8 * plain.cells) // 26
    usual = re.compile(rb'<c r="(?:[A-Za-z]{2}|[A-Za-z]0*' + _at_least(narrow + 1) + rb'")')
    if usual.search(xml, start, end) is None:
        return True
    letters = set(PLAIN_LONG_COLUMN.findall(xml, start, end))
    if any(len(c) > 3 for c in letters):
        return False
    width = max([26, *(column_index_from_string(c.decode().upper()) for c in letters)])
    height = (MAX_GRID + 8 * plain.cells) // width
    far = re.compile(rb'<c r="[A-Za-z]{1,3}0*' + _at_least(height + 1) + rb'"')
    return far.search(xml, start, end) is None


def _scan_errors(xml: bytes) -> dict[tuple[int, int], str]:
    errors: dict[tuple[int, int], str] = {}
    for attrs, value in ERROR_CELL.findall(xml):
        ref = CELL_R.search(attrs)
        if ref:
            col, row = ref.groups()
            errors[(int(row), column_index_from_string(col.decode().upper()) - 1)] = value.decode().strip()
    return errors


_UNSET = object()


def _scan(xml: bytes, plain: _Plain | None | object = _UNSET, compact: bool | None = None) -> _Scan:
    """What the compiled reader does not give, in passes linear in the sheet's size: by literal-led
    searches where the sheet is plain (`_plain`; pass it when already found), else in general.
    `compact`: the sheet's `_compact` answer when already found."""
    plain = _plain(xml) if plain is _UNSET else plain
    return _scan_plain(xml, plain, compact) if isinstance(plain, _Plain) else _scan_general(xml, compact)


def _scan_general(xml: bytes, compact: bool | None = None) -> _Scan:
    """`_scan` for a sheet in any form (attributes in any order and quoting, prefixed tags)."""
    errors: dict[tuple[int, int], str] = {}
    if re.search(rb"\bt" + _Q + rb"e[\"']", xml):
        errors = _scan_errors(xml)
    uncached = _has_formula(xml) and any(m.group(1) is None for m in FORMULA_VALUE.finditer(xml))
    return _Scan(errors, uncached, _compact(xml) if compact is None else compact)


def _compact(xml: bytes) -> bool:
    """Whether the grid from A1 to the farthest cell, wherever it stands in the XML and however
    its reference is quoted, is small enough to lay out densely (the compiled reader does). Only
    references with a long column or a long row number are collected, so memory stays flat."""
    cells = xml.count(b"<c ") + xml.count(b":c ") + xml.count(b"<c>")
    budget = MAX_GRID + 8 * cells
    letters = set(LONG_COLUMN.findall(xml))
    if any(len(c) > 3 for c in letters):
        return False
    width = max([26, *(column_index_from_string(c.decode().upper()) for c in letters)])
    height = budget // width
    digits = len(str(height))
    far = re.compile(rb"<(?:\w+:)?c\b[^>]*?\br" + _Q + rb"[A-Za-z]{1,3}([0-9]{%d,})" % digits)
    rows = [int(r) for r in far.findall(xml)]
    if CELL_WITHOUT_R.search(xml):  # such a cell stands in the row its row tag names
        row_tag = re.compile(rb"<(?:\w+:)?row\b[^>]*?\br" + _Q + rb"([0-9]{%d,})" % digits)
        rows += [int(r) for r in row_tag.findall(xml)]
    return max(rows, default=0) <= height


def _read_openpyxl(path: Path, names: list[str]) -> dict[str, RawSheet]:
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # openpyxl warns about extensions it does not read
            wb = openpyxl.load_workbook(path, read_only=True, data_only=True, keep_links=False)
    except Exception as exc:  # openpyxl raises many types for damaged packages
        raise FileProblem(f"{path}: cannot be read as a workbook ({type(exc).__name__}: {exc})") from exc
    try:
        return {n: _read_sheet(wb[n]) for n in names if n in wb.sheetnames}
    finally:
        wb.close()


def _put(sheet: RawSheet, r: int, c: int, value: object) -> None:
    while len(sheet.rows) < r:
        sheet.rows.append([])
    row = list(sheet.rows[r - 1])  # a list, as both readers give
    row += [""] * (c + 1 - len(row))
    row[c] = value
    sheet.rows[r - 1] = row


def stored_input_hash(path: Path) -> str | None:
    """The input hash stamped on the summary sheet by the last compute, if any."""
    stamp = stored_stamp(path)
    return None if stamp is None else stamp.get(results.STAMP_HASH_LABEL)


def stored_stamp(path: Path) -> dict[str, str] | None:
    """The lines above the summary table ('Label: value', up to the first blank row) as
    written by the last compute: version, time, input hash, project; None before any."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        wb = openpyxl.load_workbook(path, read_only=True, data_only=True)
    try:
        if results.SUMMARY_SHEET not in wb.sheetnames:
            return None
        out: dict[str, str] = {}
        for (value,) in wb[results.SUMMARY_SHEET].iter_rows(
            min_row=2, max_row=60, max_col=1, values_only=True
        ):
            if not isinstance(value, str) or ": " not in value:
                break
            label, _, text = value.partition(": ")
            out.setdefault(label, text.strip())
        return out
    finally:
        wb.close()


@dataclass
class StoredSheet:
    """A result sheet as the last compute left it: the lines above the table and the table
    (columns by their printed header; numbers as floats, blanks as NaN in number columns)."""

    name: str
    title: str
    lines: dict[str, str]
    table: pd.DataFrame


def stored_result_sheets(path: Path) -> dict[str, StoredSheet]:
    """Every result sheet of a computed workbook (names starting with the result prefix,
    compared ignoring case), tables longer than a worksheet joined from their parts 'NAME (2)',
    ... Read with python-calamine: these sheets are xlcore's own, of known extent."""
    prefix = layout.RESULT_PREFIX.lower()
    with open_package(path):  # refuses what is not a safe package, as for the input sheets
        pass
    wb = CalamineWorkbook.from_path(str(path))
    out: dict[str, StoredSheet] = {}
    part = re.compile(r"^(.*) \((\d+)\)$")
    for name in wb.sheet_names:
        if not name.lower().startswith(prefix):
            continue
        rows = wb.get_sheet_by_name(name).to_python(skip_empty_area=False)
        if not rows:
            continue
        title = str(rows[0][0]) if rows[0] else ""
        lines: dict[str, str] = {}
        r = 1
        while r < len(rows) and any(_filled(v) for v in rows[r]):
            label, _, text = str(rows[r][0]).partition(": ")
            lines.setdefault(label, text)
            r += 1
        header = _trim(rows[r + 1]) if r + 1 < len(rows) else []
        body = [list(row[: len(header)]) + [""] * (len(header) - len(row)) for row in rows[r + 2 :]]
        table = pd.DataFrame(body, columns=header)
        for c in header:
            col = table[c]
            filled = col[col != ""]
            if not len(filled):  # no value at all: blank, whichever kind the column is
                table[c] = np.full(len(table), np.nan)
            elif all(isinstance(v, int | float) and not isinstance(v, bool) for v in filled):
                table[c] = pd.to_numeric(col.replace("", np.nan), errors="coerce").astype(float)
        m = part.match(name)
        base = m.group(1) if m and m.group(1) in out else name
        if base in out:
            out[base].table = pd.concat([out[base].table, table], ignore_index=True)
        else:
            out[name] = StoredSheet(name, title, lines, table)
    return out


ROW_TAG = re.compile(rb"<(?:\w+:)?row\b[^>]*>")
MERGE_TAG = re.compile(rb'<(?:\w+:)?mergeCell\b[^>]*ref="([A-Z]+[0-9]+:[A-Z]+[0-9]+)"')


def _layout_warnings(sheet: str, xml: bytes, findings: Findings) -> None:
    """Hidden (or filtered-out) rows are read like any other; merged cells keep a value only in
    their top-left cell. Both are legal but easy to miss, so say so."""
    hidden = []
    tags = ROW_TAG.finditer(xml) if b'hidden="1"' in xml or b'hidden="true"' in xml else ()
    for tag in tags:
        text = tag.group(0)
        if b'hidden="1"' in text or b'hidden="true"' in text:
            m = re.search(rb'\br="(\d+)"', text)
            if m:
                hidden.append(int(m.group(1)))
    if hidden:
        shown = ", ".join(str(r) for r in hidden[:10]) + (" ..." if len(hidden) > 10 else "")
        findings.warning(
            sheet, None, f"{len(hidden)} hidden or filtered-out row(s) ({shown}) are read like any other row"
        )
    merged = [m.decode() for m in MERGE_TAG.findall(xml)] if b"mergeCell" in xml else []
    if merged:
        shown = ", ".join(merged[:5]) + (" ..." if len(merged) > 5 else "")
        findings.warning(
            sheet,
            None,
            f"merged cells ({shown}): only the top-left cell of each holds a value; the others read as blank",
        )


def _has_formula(xml: bytes) -> bool:
    return (b"<f" in xml or b":f" in xml) and FORMULA_TAG.search(xml) is not None


SST_INDEX = re.compile(rb"<(?:\w+:)?c\b(?=[^>]*\bt" + _Q + rb"s[\"'])[^>]*>\s*<(?:\w+:)?v>\s*([0-9]+)")


def _shared_string_count(zf, path: Path) -> int:
    if "xl/sharedStrings.xml" not in zf.namelist():
        return 0
    data = read_part(zf, "xl/sharedStrings.xml", path)
    return data.count(b"<si>") + data.count(b"<si ") + data.count(b":si>") + data.count(b":si ")


ROW_NUMBER = re.compile(rb"<(?:\w+:)?row\b[^>]*?\br" + _Q + rb"([0-9]+)")


def _check_sheet(path: Path, sheet: str, xml: bytes, strings: int, plain: _Plain | None = None) -> None:
    """Refuse an input sheet cut short, pointing past the shared strings, or with its rows out of
    order (ECMA-376 Part 1, 18.3.1.73: rows stand in ascending order): the readers would fail
    in their own words, read the rest as blank, or misplace the header row. `plain` (from
    `_plain`) takes literal-led searches for the same answers."""
    if not re.search(rb"</(?:\w+:)?worksheet>\s*$", xml[-256:]):
        raise FileProblem(f"{path}: damaged workbook package: sheet {sheet!r} is cut short (no end of sheet)")
    found = PLAIN_ROW.findall(xml, plain.start, plain.end) if plain is not None else ROW_NUMBER.findall(xml)
    rows = np.array(found, dtype=np.int64)
    back = np.flatnonzero(rows[1:] <= rows[:-1])
    if back.size:
        i = int(back[0])
        raise FileProblem(
            f"{path}: damaged workbook package: sheet {sheet!r} lists row {rows[i + 1]} after row "
            f"{rows[i]} (rows must ascend); open the file in a spreadsheet program and save it again"
        )
    if plain is not None and _plain_shared_ok(xml, strings, plain.start, plain.end):
        return
    if b"<v>" in xml:
        top = max((int(i) for i in SST_INDEX.findall(xml)), default=-1)
        if top >= strings:
            raise FileProblem(
                f"{path}: damaged workbook package: sheet {sheet!r} uses shared string {top}, but the "
                f"workbook holds {strings}"
            )


def _plain_shared_ok(xml: bytes, strings: int, start: int = 0, end: int | None = None) -> bool:
    """Whether no shared-string cell of a plain sheet (its cell data from `start` to `end`)
    points past the shared strings, asked by one search; False also where a cell's type is
    quoted or spaced unusually (then the general scan decides)."""
    end = len(xml) if end is None else end
    if not _has(xml, b'"s"', start, end) and not _has(xml, b"'s'", start, end):
        return True  # no cell typed s, in any quoting
    if _has(xml, b"'s'", start, end) or xml.count(b'"s"', start, end) != xml.count(b't="s"', start, end):
        return False
    if not _has(xml, b't="s"', start, end):
        return True
    past = re.compile(rb't="s"[^>]*>\s*<v>\s*0*' + _at_least(strings) + rb"\s*<")
    return past.search(xml, start, end) is None


def _has(xml: bytes, text: bytes, start: int, end: int) -> bool:
    """`text in xml[start:end]` without copying the slice."""
    return xml.find(text, start, end) >= 0


def _read_sheet(ws) -> RawSheet:
    ws.reset_dimensions()  # a declared dimension may be a lie (phantom extents); read what is there
    # numbers as floats and blanks as '', as the compiled reader gives them
    return RawSheet(
        ws.title,
        [
            ["" if v is None else float(v) if type(v) is int else v for v in r]
            for r in ws.iter_rows(values_only=True)
        ],
    )


def _resolve_formulas(path: Path, sheets: dict[str, RawSheet], names: set[str], findings: Findings) -> None:
    """Fill formula cells that carry no saved value by evaluating them; name those that fail."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        wb = openpyxl.load_workbook(path, read_only=True, data_only=False, keep_links=False)
    pending: dict[tuple[str, int, int], str] = {}
    try:
        for name in names:
            ws = wb[name]
            ws.reset_dimensions()
            cached = sheets[name]
            for r, row in enumerate(ws.iter_rows(values_only=True), start=1):
                for c, v in enumerate(row):
                    if isinstance(v, str) and v.startswith("=") and cached.value(r, c) in (None, ""):
                        pending[(name, r, c)] = v
    finally:
        wb.close()
    if not pending:
        return
    solved = _evaluate(path, set(layout.INPUT_SHEET_NAMES))
    for (name, r, c), formula in pending.items():
        key = f"{name.upper()}!{cell_name(c, r)}"
        value = solved.get(key, _Unsolved)
        if value is _Unsolved or (isinstance(value, str) and value in ERROR_VALUES):
            why = "could not be evaluated" if value is _Unsolved else f"evaluates to {value}"
            findings.error(
                name,
                cell_name(c, r),
                f"formula {formula} has no saved value and {why}; open the workbook in your "
                "spreadsheet program, let it calculate, save, and run again",
            )
            continue
        _put(sheets[name], r, c, value)


class _Unsolved:
    pass


EMPTY_SHEET = (
    b'<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><sheetData/></worksheet>'
)


def _slim_copy(path: Path, inputs: set[str], dst: Path) -> Path:
    """A copy of the package in which only the input sheets, and the sheets their formulas name
    (followed to closure), keep their cells; every other sheet (result sheets above all) is
    empty, so evaluating the formulas costs what the inputs cost, not the whole workbook."""
    import zipfile

    with open_package(path) as zf:
        parts = sheet_parts(zf)
        keep = {n for n in inputs if n in parts}
        todo = list(keep)
        while todo:
            part = parts[todo.pop()]
            xml = read_part(zf, part, path) if part in zf.namelist() else b""
            for name in parts:
                if name in keep:
                    continue
                quoted = "'" + name.replace("'", "''") + "'"
                if any(f"{form}!".encode() in xml for form in (name, quoted, quoted.replace("'", "&apos;"))):
                    keep.add(name)
                    todo.append(name)
        drop = {part for name, part in parts.items() if name not in keep}
        with zipfile.ZipFile(dst, "w", zipfile.ZIP_DEFLATED) as out:
            for info in zf.infolist():
                out.writestr(
                    info.filename,
                    EMPTY_SHEET if info.filename in drop else read_part(zf, info.filename, path),
                )
    return dst


def _evaluate(path: Path, inputs: set[str]) -> dict[str, object]:
    """Evaluate the formulas of the input sheets (and of what they reference) with the
    `formulas` library: 'SHEET!A1' -> value."""
    import tempfile

    try:
        import formulas  # imported here: slow to import and needed only for such files
    except ImportError:  # pragma: no cover - it is a declared dependency
        return {}
    with tempfile.TemporaryDirectory(prefix="xlcore-eval-") as tmp:
        return _solve(formulas, _slim_copy(path, inputs, Path(tmp) / "inputs.xlsx"))


def _solve(formulas, path: Path) -> dict[str, object]:
    try:
        with contextlib.redirect_stderr(io.StringIO()), warnings.catch_warnings():
            warnings.simplefilter("ignore")
            model = formulas.ExcelModel().loads(str(path)).finish()
            solution = model.calculate()
    except Exception:  # the library fails in many ways on functions it lacks
        return {}
    out: dict[str, object] = {}
    for key, ranges in solution.items():
        ref = str(key)
        if "]" not in ref or "!" not in ref or ":" in ref.split("!")[1]:
            continue
        sheet, cell = ref.split("]", 1)[1].rsplit("!", 1)
        sheet = sheet.rstrip("'")
        try:
            value = ranges.value[0, 0]
        except Exception:
            continue
        if hasattr(value, "item"):
            value = value.item()
        if type(value).__name__ == "XlError" or str(value).startswith("#"):
            value = str(value)
        if value == "" or value is None:
            value = None
        out[f"{sheet}!{cell}"] = value
    return out


def _filled(v: object) -> bool:
    return v is not None and not (v.__class__ is str and v == "")


def _canonical(rows: list) -> list:
    """Each row up to its last filled cell (a blank row as []), without trailing blank rows:
    the same from either reader, whatever width of blank cells it pads rows with."""
    out = [r if r and _filled(r[-1]) else _trim(r) for r in rows] if len(rows) < 64 else _canonical_rows(rows)
    end = len(out)
    while end and not out[end - 1]:
        end -= 1
    return out[:end]


def _canonical_rows(rows: list) -> list:
    """Each row up to its last filled cell, as `_trim` gives it, with C-level slices for the
    commonest shape: rows as wide as the last row whose last k cells are '' (optional columns
    left blank), so a table of many rows is not trimmed one Python loop per row."""
    last = rows[-1]
    width, cut = len(last), len(_trim(last))
    if cut == 0 or cut == width:
        return [r if r and _filled(r[-1]) else _trim(r) for r in rows]
    pad = [""] * (width - cut)
    return [
        r[:cut]
        if len(r) == width and r[cut:] == pad and _filled(r[cut - 1])
        else (r if r and _filled(r[-1]) else _trim(r))
        for r in rows
    ]


def _trim(row) -> list:
    end = len(row)
    while end and not _filled(row[end - 1]):
        end -= 1
    return list(row[:end])


def _hash(sheets: dict[str, RawSheet]) -> str:
    """Digest of the input values (not the file bytes, which result sheets change), numbers as
    floats and blanks as '' whichever reader read them."""
    h = hashlib.sha256()
    for name in layout.INPUT_SHEET_NAMES:
        sheet = sheets.get(name)
        if sheet is None and name in layout.OPTIONAL_SHEETS:
            continue  # a workbook from before an optional sheet existed keeps its hash
        h.update(f"\x1e{name}\x1f".encode())
        if sheet is None:
            continue
        h.update(repr(_canonical(sheet.rows)).encode("utf-8", "surrogatepass"))
    return h.hexdigest()
