"""Write xlcore's input workbook: blank, or filled with the demo building.

A new file, so openpyxl builds it whole. Everything it writes comes from `xlcore.layout`.
"""

from __future__ import annotations

import datetime as dt
import math
from pathlib import Path

from openpyxl import Workbook
from openpyxl.comments import Comment
from openpyxl.styles import Alignment, Border, Font, PatternFill, Side
from openpyxl.utils import get_column_letter
from openpyxl.worksheet.datavalidation import DataValidation

from xlcore import CAUTION, __version__, demo, layout
from xlcore.diagnostics import sheet_ref
from xlcore.layout import Column, Kind, TableSheet

# Our own palette: slate header, pale sand input cells.
HEADER_FILL = PatternFill("solid", fgColor="2F4858")
HEADER_FONT = Font(bold=True, color="FFFFFF")
INPUT_FILL = PatternFill("solid", fgColor="FBF3E4")
NOTE_FONT = Font(italic=True, color="555555")
TITLE_FONT = Font(bold=True, size=14)
THIN = Side(style="thin", color="C9BFAE")
INPUT_BORDER = Border(left=THIN, right=THIN, top=THIN, bottom=THIN)
FIXED_TIME = dt.datetime(2026, 1, 1)  # stable document properties, so the template is reproducible
# Input cells show what was typed: a fixed format such as "0" would show 0.25 typed in a mm
# column as 0 and hide the slip (xlcore's own checks still catch it, with a unit hint).
INPUT_FORMAT = "General"
LAST_ROW = 1_048_576  # validation covers every row an engineer may fill (one range, small file)


def write_template(path: Path, example: bool = False) -> None:
    """Write the input workbook to `path` (blank, or with the demo building)."""
    data = demo.sheets() if example else {}
    wb = Workbook()
    wb.properties.creator = f"xlcore {__version__}"
    wb.properties.created = FIXED_TIME
    wb.properties.modified = FIXED_TIME
    _instructions(wb.active)
    _settings(wb.create_sheet(layout.PROJECT.name), data.get("project"))
    for t in layout.TABLES:
        _table(wb.create_sheet(t.name), t, data.get(t.key, []))
    wb.save(path)


def _instructions(ws) -> None:
    ws.title = layout.INSTRUCTIONS_SHEET
    ws["A1"] = "xlcore input workbook"
    ws["A1"].font = TITLE_FONT
    lines = [
        ("CAUTION", CAUTION),
        ("", ""),
        ("How to use", "Fill the input sheets (pale cells). Units are in every header, in brackets."),
        ("", "Run `xlcore check <file>` to validate, `xlcore compute <file>` to write results."),
        ("", f"Result sheets are named '{layout.RESULT_PREFIX}...' and are rebuilt on every run;"),
        ("", "xlcore never changes any other sheet. Axial force: compression positive."),
        ("", ""),
        ("Sheet", "Column / what it holds"),
    ]
    for t in (layout.PROJECT, *layout.TABLES):
        lines.append((t.name, t.purpose))
        if isinstance(t, TableSheet):
            for c in t.columns:
                req = "required" if c.required else "optional"
                lines.append(("", f"{c.header}: {c.help} ({req}; {c.expectation()})"))
        else:
            for s in t.settings:
                lines.append(("", f"{s.label}: {s.help}"))
    for i, (a, b) in enumerate(lines, start=3):
        ws.cell(i, 1, a).font = Font(bold=True)
        ws.cell(i, 2, b)
    ws["B3"].font = Font(bold=True, color="9C2A00")
    ws.column_dimensions["A"].width = 16
    ws.column_dimensions["B"].width = 120


def _header(ws, col: int, text: str, help_text: str | None, width: float) -> None:
    cell = ws.cell(1, col, text)
    cell.fill, cell.font = HEADER_FILL, HEADER_FONT
    cell.alignment = Alignment(wrap_text=True, vertical="center")
    if help_text:
        cell.comment = Comment(help_text, "xlcore", width=260, height=110)
    ws.column_dimensions[get_column_letter(col)].width = width


def _settings(ws, values: dict | None) -> None:
    spec = layout.PROJECT
    for j, h in enumerate(spec.headers, start=1):
        _header(ws, j, h, None, (34, 24, 8, 90)[j - 1])
    for i, s in enumerate(spec.settings, start=2):
        ws.cell(i, 1, s.label).font = Font(bold=True)
        v = (values or {}).get(s.key, s.default if s.kind is Kind.CHOICE else None)
        cell = ws.cell(i, 2, v)
        cell.fill, cell.border = INPUT_FILL, INPUT_BORDER
        ws.cell(i, 3, s.unit or "")
        default = "" if s.default in (None, "") else f" Default: {s.default}."
        ws.cell(i, 4, s.help + default).font = NOTE_FONT
        dv = _validation(s.column, spec.name)
        if dv is not None:
            dv.add(f"B{i}")
            ws.add_data_validation(dv)
    ws.freeze_panes = "A2"


def _table(ws, t: TableSheet, rows: list[dict]) -> None:
    for j, c in enumerate(t.columns, start=1):
        _header(ws, j, c.header, f"{c.help} ({'required' if c.required else 'optional'})", c.width)
    # tall enough for the longest header as it wraps in its column (bold headers fit about 0.85
    # characters per unit of column width; 15 pt a line; at least the two lines it always had)
    lines = max(math.ceil(len(c.header) / (0.85 * c.width)) for c in t.columns)
    ws.row_dimensions[1].height = max(32, 15 * lines)
    for i, rec in enumerate(rows, start=2):
        for j, c in enumerate(t.columns, start=1):
            v = rec.get(c.key)
            if v is not None:
                ws.cell(i, j, v)
    last = LAST_ROW
    for j, c in enumerate(t.columns, start=1):
        letter = get_column_letter(j)
        dim = ws.column_dimensions[letter]
        dim.fill, dim.border = INPUT_FILL, INPUT_BORDER  # whole column styled: small file
        if c.kind in (Kind.NUMBER, Kind.INTEGER):
            dim.number_format = INPUT_FORMAT
        for i in range(2, len(rows) + 2):
            cell = ws.cell(i, j)
            cell.fill, cell.border = INPUT_FILL, INPUT_BORDER
            if c.kind in (Kind.NUMBER, Kind.INTEGER):
                cell.number_format = INPUT_FORMAT
        dv = _validation(c, t.name)
        if dv is not None:
            dv.add(f"{letter}2:{letter}{last}")
            ws.add_data_validation(dv)
    ws.freeze_panes = "A2"


def _list_source(kind: Kind) -> str | None:
    if kind is Kind.STOREY:
        t, key = layout.STOREYS, "name"
    elif kind is Kind.WALL:
        t, key = layout.WALLS, "wall_id"
    else:
        return None
    letter = get_column_letter(t.keys.index(key) + 1)
    return f"{sheet_ref(t.name)}!${letter}$2:${letter}${LAST_ROW}"


def _validation(c: Column, sheet: str) -> DataValidation | None:
    """Spreadsheet-side validation mirroring the reader's checks (the reader stays the judge)."""
    common = dict(
        allow_blank=True,
        showErrorMessage=True,
        showInputMessage=True,
        promptTitle=c.name[:32],
        prompt=c.help[:255],
        errorTitle="xlcore input",
        error=f"Expected {c.expectation()}."[:255],
    )
    source = _list_source(c.kind)
    if source:
        return DataValidation(type="list", formula1=source, **common)
    if c.suggest is not None:  # offered, never refused: the reader judges the value
        offered = common | {"showErrorMessage": False}
        return DataValidation(type="list", formula1=_list_source(c.suggest), **offered)
    if c.kind is Kind.CHOICE:
        return DataValidation(type="list", formula1='"' + ",".join(c.choices) + '"', **common)
    if c.kind in (Kind.NUMBER, Kind.INTEGER):
        vtype = "whole" if c.kind is Kind.INTEGER else "decimal"
        if c.min is not None and c.max is not None and not c.min_open:
            return DataValidation(
                type=vtype, operator="between", formula1=f"{c.min:g}", formula2=f"{c.max:g}", **common
            )
        if c.min is not None:
            op = "greaterThan" if c.min_open else "greaterThanOrEqual"
            return DataValidation(type=vtype, operator=op, formula1=f"{c.min:g}", **common)
        return DataValidation(type=vtype, operator="between", formula1="-1E+307", formula2="1E+307", **common)
    return None
