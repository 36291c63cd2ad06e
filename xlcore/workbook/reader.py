"""Workbook -> raw cell values of the input sheets, with formulas resolved.

Reads only; the file is opened read-only and never written. Values are returned as the
spreadsheet program saved them; typing and checking happen in `xlcore.validate`.
"""

from __future__ import annotations

import contextlib
import datetime as dt
import hashlib
import io
import re
import warnings
from dataclasses import dataclass, field
from pathlib import Path

import openpyxl

from xlcore import layout, results
from xlcore.diagnostics import FileProblem, Findings, cell_name
from xlcore.workbook.package import open_package, sheet_parts

ERROR_VALUES = ("#NULL!", "#DIV/0!", "#VALUE!", "#REF!", "#NAME?", "#NUM!", "#N/A", "#GETTING_DATA")


@dataclass
class RawSheet:
    """Cell values of one sheet, row 1 first; rows may be ragged."""

    name: str
    rows: list[tuple] = field(default_factory=list)

    def value(self, row: int, col: int) -> object:
        """Value at a 1-based row and 0-based column, None when absent."""
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


def read_workbook(path: Path) -> RawWorkbook:
    """Read every input sheet xlcore knows; report formulas that cannot be resolved."""
    path = Path(path)
    findings = Findings()
    with open_package(path) as zf:
        parts = sheet_parts(zf)
        with_formulas = set()
        for name in layout.INPUT_SHEET_NAMES:
            if name not in parts or parts[name] not in zf.namelist():
                continue
            xml = zf.read(parts[name])
            if _has_formula(xml):
                with_formulas.add(name)
            _layout_warnings(name, xml, findings)
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # openpyxl warns about extensions it does not read
            wb = openpyxl.load_workbook(path, read_only=True, data_only=True, keep_links=False)
    except Exception as exc:  # openpyxl raises many types for damaged packages
        raise FileProblem(f"{path}: cannot be read as a workbook ({type(exc).__name__}: {exc})") from exc
    try:
        names = list(wb.sheetnames)
        sheets = {n: _read_sheet(wb[n]) for n in layout.INPUT_SHEET_NAMES if n in names}
    finally:
        wb.close()
    if with_formulas:
        _resolve_formulas(path, sheets, with_formulas, findings)
    return RawWorkbook(path, names, sheets, findings, _hash(sheets))


def stored_input_hash(path: Path) -> str | None:
    """The input hash stamped on the summary sheet by the last compute, if any."""
    prefix = f"{results.STAMP_HASH_LABEL}: "
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        wb = openpyxl.load_workbook(path, read_only=True, data_only=True)
    try:
        if results.SUMMARY_SHEET not in wb.sheetnames:
            return None
        for (value,) in wb[results.SUMMARY_SHEET].iter_rows(max_row=40, max_col=1, values_only=True):
            if isinstance(value, str) and value.startswith(prefix):
                return value[len(prefix) :].strip()
    finally:
        wb.close()
    return None


ROW_TAG = re.compile(rb"<(?:\w+:)?row\b[^>]*>")
MERGE_TAG = re.compile(rb'<(?:\w+:)?mergeCell\b[^>]*ref="([A-Z]+[0-9]+:[A-Z]+[0-9]+)"')


def _layout_warnings(sheet: str, xml: bytes, findings: Findings) -> None:
    """Hidden (or filtered-out) rows are read like any other; merged cells keep a value only in
    their top-left cell. Both are legal but easy to miss, so say so."""
    hidden = []
    for tag in ROW_TAG.finditer(xml):
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
    merged = [m.decode() for m in MERGE_TAG.findall(xml)]
    if merged:
        shown = ", ".join(merged[:5]) + (" ..." if len(merged) > 5 else "")
        findings.warning(
            sheet,
            None,
            f"merged cells ({shown}): only the top-left cell of each holds a value; the others read as blank",
        )


def _has_formula(xml: bytes) -> bool:
    return b"<f>" in xml or b"<f " in xml or b":f>" in xml or b":f " in xml


def _read_sheet(ws) -> RawSheet:
    ws.reset_dimensions()  # a declared dimension may be a lie (phantom extents); read what is there
    return RawSheet(ws.title, [tuple(r) for r in ws.iter_rows(values_only=True)])


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
                    if isinstance(v, str) and v.startswith("=") and cached.value(r, c) is None:
                        pending[(name, r, c)] = v
    finally:
        wb.close()
    if not pending:
        return
    solved = _evaluate(path)
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
        row = list(sheets[name].rows[r - 1])
        row += [None] * (c + 1 - len(row))
        row[c] = value
        sheets[name].rows[r - 1] = tuple(row)


class _Unsolved:
    pass


def _evaluate(path: Path) -> dict[str, object]:
    """Evaluate the workbook's formulas with the `formulas` library: 'SHEET!A1' -> value."""
    try:
        import formulas  # imported here: slow to import and needed only for such files
    except ImportError:  # pragma: no cover - it is a declared dependency
        return {}
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


def _hash(sheets: dict[str, RawSheet]) -> str:
    """Digest of the input values (not the file bytes, which result sheets change)."""
    h = hashlib.sha256()
    for name in layout.INPUT_SHEET_NAMES:
        sheet = sheets.get(name)
        h.update(f"\x1e{name}\x1f".encode())
        if sheet is None:
            continue
        for row in sheet.rows:
            cells = list(row)
            while cells and cells[-1] in (None, ""):
                cells.pop()
            if not cells:
                continue
            h.update("\x1d".join(_canon(v) for v in cells).encode("utf-8", "surrogatepass"))
            h.update(b"\n")
    return h.hexdigest()


def _canon(v: object) -> str:
    if v is None:
        return ""
    if isinstance(v, float):
        return repr(v)
    if isinstance(v, dt.datetime | dt.date | dt.time):
        return v.isoformat()
    return str(v)
