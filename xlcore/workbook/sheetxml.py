"""A result sheet as worksheet XML, built as joined strings (fast, flat memory).

Strings are inline (`t="inlineStr"`), so the workbook's shared strings are never touched, and
always text: a value like "=HYPERLINK(...)" stays inert. NaN and infinity become blank cells.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np
from openpyxl.utils import get_column_letter

from xlcore.results import ResultSheet

NS = 'xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"'
NS_R = 'xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships"'
_ILLEGAL = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ud800-\udfff\ufffe\uffff]")
MAX_TEXT = 32767
# Our own colour scale for utilisation: sage below, sand near, brick at and above 1.0.
SCALE = (("0", "FFD8E8D0"), ("0.85", "FFF3DFA2"), ("1", "FFE3907F"))


@dataclass(frozen=True)
class Styles:
    """cellXfs indices to use (appended to the workbook's styles by the writer)."""

    title: int
    caution: int
    label: int
    header: int
    number: dict[str, int]  # number format code -> xf index


def text(s: object) -> str:
    t = _ILLEGAL.sub("", str(s))[:MAX_TEXT]
    return t.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


def _str_cell(ref: str, s: object, style: int = 0) -> str:
    st = f' s="{style}"' if style else ""
    return f'<c r="{ref}" t="inlineStr"{st}><is><t xml:space="preserve">{text(s)}</t></is></c>'


def _num_cell(ref: str, x: float, style: int = 0) -> str:
    st = f' s="{style}"' if style else ""
    return f'<c r="{ref}"{st}><v>{x!r}</v></c>'


def _cell(ref: str, v: object, style: int = 0) -> str:
    if v is None or v == "":
        return ""
    if isinstance(v, bool | np.bool_):
        return _str_cell(ref, "yes" if v else "no", style)
    if isinstance(v, int | float | np.integer | np.floating):
        x = float(v)
        return _num_cell(ref, x, style) if math.isfinite(x) else ""
    return _str_cell(ref, v, style)


def sheet_xml(sheet: ResultSheet, styles: Styles, tab_rgb: str = "FF2F4858") -> bytes:
    """The worksheet part for one result sheet."""
    cols = sheet.columns
    letters = [get_column_letter(j + 1) for j in range(len(cols))]
    rows: list[str] = []
    r = 1
    rows.append(f'<row r="1">{_str_cell("A1", sheet.title, styles.title)}</row>')
    for label, value in sheet.preamble:
        r += 1
        # one text cell per line, so it reads in full across the empty cells to its right
        style = styles.caution if label == "CAUTION" else styles.label
        rows.append(f'<row r="{r}">{_str_cell(f"A{r}", f"{label}: {value}", style)}</row>')
    r += 2
    header_row = r
    rows.append(
        f'<row r="{r}" ht="45" customHeight="1">'
        + "".join(_str_cell(f"{letters[j]}{r}", c.title, styles.header) for j, c in enumerate(cols))
        + "</row>"
    )
    n = len(sheet.table)
    first = header_row + 1
    columns_out: list[list[str]] = []
    for j, c in enumerate(cols):
        values = sheet.table[c.key].to_numpy() if c.key in sheet.table else np.full(n, None)
        style = styles.number.get(c.fmt, 0) if c.fmt else 0
        letter = letters[j]
        if c.fmt:
            arr = np.asarray(values, dtype=float)
            st = f' s="{style}"' if style else ""
            cells = [
                f'<c r="{letter}{first + i}"{st}><v>{x!r}</v></c>' if math.isfinite(x) else ""
                for i, x in enumerate(arr.tolist())
            ]
        else:
            cells = [_cell(f"{letter}{first + i}", v) for i, v in enumerate(values.tolist())]
        columns_out.append(cells)
    for i in range(n):
        rows.append(f'<row r="{first + i}">' + "".join(col[i] for col in columns_out) + "</row>")
    last_row = max(first + n - 1, header_row)
    last_col = letters[-1]
    widths = "".join(
        f'<col min="{j + 1}" max="{j + 1}" width="{c.width:g}" customWidth="1"/>' for j, c in enumerate(cols)
    )
    parts = [
        '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n',
        f"<worksheet {NS} {NS_R}>",
        f'<sheetPr><tabColor rgb="{tab_rgb}"/></sheetPr>',
        f'<dimension ref="A1:{last_col}{last_row}"/>',
        '<sheetViews><sheetView workbookViewId="0">',
        f'<pane ySplit="{header_row}" topLeftCell="A{first}" activePane="bottomLeft" state="frozen"/>',
        f'<selection pane="bottomLeft" activeCell="A{first}" sqref="A{first}"/>',
        "</sheetView></sheetViews>",
        '<sheetFormatPr defaultRowHeight="15"/>',
        f"<cols>{widths}</cols>",
        "<sheetData>",
        "".join(rows),
        "</sheetData>",
        f'<autoFilter ref="A{header_row}:{last_col}{last_row}"/>',
    ]
    if sheet.scale_key and sheet.scale_key in [c.key for c in cols] and n:
        letter = letters[[c.key for c in cols].index(sheet.scale_key)]
        cfvo = "".join(f'<cfvo type="num" val="{v}"/>' for v, _ in SCALE)
        colors = "".join(f'<color rgb="{rgb}"/>' for _, rgb in SCALE)
        parts.append(
            f'<conditionalFormatting sqref="{letter}{first}:{letter}{last_row}">'
            f'<cfRule type="colorScale" priority="1"><colorScale>{cfvo}{colors}'
            "</colorScale></cfRule></conditionalFormatting>"
        )
    parts.append('<pageMargins left="0.5" right="0.5" top="0.75" bottom="0.75" header="0.3" footer="0.3"/>')
    parts.append('<pageSetup orientation="landscape" paperSize="9"/>')
    parts.append("</worksheet>")
    return "".join(parts).encode("utf-8")
