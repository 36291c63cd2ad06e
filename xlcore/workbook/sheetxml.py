"""A result sheet as worksheet XML, built as joined strings (fast, flat memory).

Strings are inline (`t="inlineStr"`), so the workbook's shared strings are never touched, and
always text: a value like "=HYPERLINK(...)" stays inert. NaN and infinity become blank cells.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Iterator
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


ROW_LIMIT = 1_048_576  # rows in a worksheet: Excel's limit, and LibreOffice Calc's
CHUNK = 4096  # table rows rendered per piece written into the package


def split(sheet: ResultSheet, row_limit: int | None = None) -> list[ResultSheet]:
    """A table too long for one worksheet, as consecutive sheets 'NAME (2)', 'NAME (3)', ... each
    with the full stamp and header and a line saying which rows it holds; others unchanged."""
    row_limit = row_limit or ROW_LIMIT
    room = row_limit - _header_row(sheet, extra=1)
    n = len(sheet.table)
    if n <= room:
        return [sheet]
    parts = -(-n // room)
    out = []
    for k in range(parts):
        lo, hi = k * room, min(n, (k + 1) * room)
        name = sheet.name if k == 0 else f"{sheet.name} ({k + 1})"
        line = (
            "Continued",
            f"part {k + 1} of {parts}: table rows {lo + 1} to {hi} of {n} (a worksheet holds "
            f"{row_limit:,} rows); the parts are '{sheet.name}'"
            + "".join(f", '{sheet.name} ({j + 1})'" for j in range(1, parts)),
        )
        out.append(
            ResultSheet(
                name,
                sheet.title,
                sheet.columns,
                sheet.table.iloc[lo:hi],
                [*sheet.preamble, line],
                sheet.scale_key,
            )
        )
    return out


def _header_row(sheet: ResultSheet, extra: int = 0) -> int:
    return 1 + len(sheet.preamble) + extra + 2


def sheet_pieces(
    sheet: ResultSheet,
    styles: Styles,
    tab_rgb: str = "FF2F4858",
    on_rows: Callable[[int], None] | None = None,
) -> Iterator[bytes]:
    """The worksheet part for one result sheet, in pieces of CHUNK rows, so a sheet of any
    length streams into the package in flat memory.

    Each table row is one `str.format` of a row template: a column of plain numbers (or of
    text with no blanks) goes in as its values; a column with blanks (NaN, None, '') goes in
    as ready-made cells, blank ones omitted. `on_rows` hears how many table rows each piece
    held, once it has been taken."""
    cols = sheet.columns
    letters = [get_column_letter(j + 1) for j in range(len(cols))]
    header_row = _header_row(sheet)
    n = len(sheet.table)
    first = header_row + 1
    last_row = max(first + n - 1, header_row)
    last_col = letters[-1]
    widths = "".join(
        f'<col min="{j + 1}" max="{j + 1}" width="{c.width:g}" customWidth="1"/>' for j, c in enumerate(cols)
    )
    head = [
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
        f'<row r="1">{_str_cell("A1", sheet.title, styles.title)}</row>',
    ]
    r = 1
    for label, value in sheet.preamble:
        r += 1
        # one text cell per line, so it reads in full across the empty cells to its right
        style = styles.caution if label == "CAUTION" else styles.label
        head.append(f'<row r="{r}">{_str_cell(f"A{r}", f"{label}: {value}", style)}</row>')
    head.append(
        f'<row r="{header_row}" ht="45" customHeight="1">'
        + "".join(_str_cell(f"{letters[j]}{header_row}", c.title, styles.header) for j, c in enumerate(cols))
        + "</row>"
    )
    yield "".join(head).encode("utf-8")
    columns = []
    for c in cols:
        if c.key in sheet.table:
            columns.append(sheet.table[c.key].to_numpy())
        else:
            columns.append(None)
    for lo in range(0, n, CHUNK):
        hi = min(n, lo + CHUNK)
        template, values = _row_template(cols, letters, styles, columns, lo, hi, first)
        yield "".join(map(template.format, range(first + lo, first + hi), *values)).encode("utf-8")
        if on_rows:
            on_rows(hi - lo)
    tail = ["</sheetData>", f'<autoFilter ref="A{header_row}:{last_col}{last_row}"/>']
    if sheet.scale_key and sheet.scale_key in [c.key for c in cols] and n:
        letter = letters[[c.key for c in cols].index(sheet.scale_key)]
        cfvo = "".join(f'<cfvo type="num" val="{v}"/>' for v, _ in SCALE)
        colors = "".join(f'<color rgb="{rgb}"/>' for _, rgb in SCALE)
        tail.append(
            f'<conditionalFormatting sqref="{letter}{first}:{letter}{last_row}">'
            f'<cfRule type="colorScale" priority="1"><colorScale>{cfvo}{colors}'
            "</colorScale></cfRule></conditionalFormatting>"
        )
    tail.append('<pageMargins left="0.5" right="0.5" top="0.75" bottom="0.75" header="0.3" footer="0.3"/>')
    tail.append('<pageSetup orientation="landscape" paperSize="9"/>')
    tail.append("</worksheet>")
    yield "".join(tail).encode("utf-8")


def _row_template(cols, letters, styles: Styles, columns, lo: int, hi: int, first: int):
    """`str.format` template of one table row ({0} is the row number) and its column values."""
    parts = ['<row r="{0}">']
    values: list[list] = []
    for j, c in enumerate(cols):
        arr = columns[j]
        k = len(values) + 1
        letter = letters[j]
        if arr is None:
            continue
        chunk = arr[lo:hi]
        if c.fmt:
            style = styles.number.get(c.fmt, 0)
            st = f' s="{style}"' if style else ""
            x = np.asarray(chunk, dtype=float)
            finite = np.isfinite(x)
            xs = x.tolist()
            if finite.all():
                parts.append(f'<c r="{letter}{{0}}"{st}><v>{{{k}!r}}</v></c>')
                values.append(xs)
            else:
                parts.append(f"{{{k}}}")
                values.append(
                    [
                        f'<c r="{letter}{first + lo + i}"{st}><v>{v!r}</v></c>' if ok else ""
                        for i, (v, ok) in enumerate(zip(xs, finite.tolist(), strict=True))
                    ]
                )
            continue
        vals = chunk.tolist()
        kinds = set(map(type, vals))
        if kinds == {str} and "" not in vals:
            cache: dict[str, str] = {}
            parts.append(
                f'<c r="{letter}{{0}}" t="inlineStr"><is><t xml:space="preserve">{{{k}}}</t></is></c>'
            )
            values.append([cache[v] if v in cache else cache.setdefault(v, text(v)) for v in vals])
        else:
            parts.append(f"{{{k}}}")
            values.append([_cell(f"{letter}{first + lo + i}", v) for i, v in enumerate(vals)])
    parts.append("</row>")
    return "".join(parts), values
