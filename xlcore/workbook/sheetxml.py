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

from xlcore import results
from xlcore.results import ResultSheet

NS = 'xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"'
NS_R = 'xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships"'
_ILLEGAL = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ud800-\udfff\ufffe\uffff]")
MAX_TEXT = 32767
LINE_HEIGHT = 15.0  # points per line of 11 pt text
PRINT_CAUTION = "An aid to a qualified engineer: check it; local codes and licensed practice govern."


@dataclass(frozen=True)
class Styles:
    """cellXfs indices to use (appended to the workbook's styles by the writer)."""

    title: int
    caution: int
    label: int
    header: int
    number: dict[str, int]  # number format code -> xf index
    text: int = 0  # short text in a table cell (top aligned, beside wrapped text)
    wrap: int = 0  # long text in a table cell, wrapped within its column
    bands: tuple[int, ...] = ()  # dxf index per results.BANDS entry (conditional formats)


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
    return 1 + len(lines(sheet)) + extra + 2


def lines(sheet: ResultSheet) -> list[tuple[str, object]]:
    """The lines above the table: the sheet's preamble, and the colour key where it has bands."""
    out = list(sheet.preamble)
    if any(c.banded for c in sheet.columns):
        out.append(("Colours", "; ".join(f"{name}: {meaning}" for name, meaning, _, _ in results.BANDS)))
    return out


def width(c: results.ResultColumn) -> float:
    """Column width: the declared one, widened so that no header word breaks mid-word."""
    longest = max((len(w) for w in c.title.split()), default=0)
    return max(c.width, round(longest * 1.2 + 1.5, 1))


def _wrapped_lines(text: str, w: float) -> int:
    """Lines a text takes when wrapped at word boundaries in a column `w` characters wide."""
    n, used = 1, 0
    room = max(1, int(w * 0.95))
    for word in text.split():
        need = len(word) + (1 if used else 0)
        if used + need > room and used:
            n += 1 + (len(word) - 1) // room
            used = len(word) % room or room
        else:
            used += need
    return n


def id_columns(sheet: ResultSheet) -> int:
    """How many leading columns identify a row (storey, pier, ...): repeated on every page."""
    n = 0
    for c in sheet.columns:
        if c.key not in results.ID_KEYS:
            break
        n += 1
    return max(n, 1)


def _quoted(name: str) -> str:
    return "'" + name.replace("'", "''") + "'"


def print_titles(sheet: ResultSheet) -> str:
    """The sheet-scoped `_xlnm.Print_Titles` value: identifying columns and the header row."""
    q = _quoted(sheet.name)
    last = get_column_letter(id_columns(sheet))
    r = _header_row(sheet)
    return f"{q}!$A:${last},{q}!${r}:${r}"


def _hf(text: object) -> str:
    """Text inside a header/footer: '&' starts a code there, so it is doubled."""
    return str(text).replace("&", "&&")


def header_footer(sheet: ResultSheet) -> str:
    """Printed header (project, sheet name, stamp) and footer (caution, page x of y)."""
    pre = dict(sheet.preamble)
    project = pre.get("Project") or "xlcore"
    stamp = " ".join(
        str(v)
        for v in (
            f"xlcore {pre['xlcore version']}" if "xlcore version" in pre else "",
            pre.get("Computed (UTC)", ""),
            f"hash {str(pre[results.STAMP_HASH_LABEL])[:12]}" if results.STAMP_HASH_LABEL in pre else "",
        )
        if v
    )
    head = f'&L&"-,Bold"{_hf(project)[:80]}&C{_hf(sheet.name)}&R{_hf(stamp)[:90]}'
    foot = f"&L{_hf(PRINT_CAUTION)}&RPage &P of &N"
    return (
        f'<headerFooter differentFirst="0"><oddHeader>{text(head)}</oddHeader>'
        f"<oddFooter>{text(foot)}</oddFooter></headerFooter>"
    )


def _bands(sheet: ResultSheet, styles: Styles, letters: list[str], first: int, last_row: int) -> str:
    """Conditional formats: discrete bands on every utilisation column, and the status cell
    beside one in the band of its utilisation (red wherever it says FAIL)."""
    if len(styles.bands) != len(results.BANDS):
        return ""
    keys = [c.key for c in sheet.columns]
    comfortable, close, over = styles.bands
    out, prio = [], 1
    lim = f"{results.CLOSE:g}"

    def rule(letter: str, dxf: int, formula: str) -> str:
        nonlocal prio
        prio += 1
        return (
            f'<cfRule type="expression" dxfId="{dxf}" priority="{prio - 1}" stopIfTrue="1">'
            f"<formula>{text(formula)}</formula></cfRule>"
        )

    for j, c in enumerate(sheet.columns):
        if not c.banded:
            continue
        ref = f"{letters[j]}{first}"
        out.append(
            f'<conditionalFormatting sqref="{letters[j]}{first}:{letters[j]}{last_row}">'
            + rule(letters[j], over, f"AND(ISNUMBER({ref}),{ref}>1)")
            + rule(letters[j], close, f"AND(ISNUMBER({ref}),{ref}>{lim})")
            + rule(letters[j], comfortable, f"ISNUMBER({ref})")
            + "</conditionalFormatting>"
        )
    for status_key, util_key in (("status", "util"), ("status_s", "util_s")):
        if status_key not in keys:
            continue
        s_letter = letters[keys.index(status_key)]
        s_ref = f"${s_letter}{first}"
        u_ref = f"${letters[keys.index(util_key)]}{first}" if util_key in keys else None
        rules = rule(s_letter, over, f'{s_ref}="{results.FAIL}"')
        if u_ref:
            rules += rule(s_letter, close, f'AND({s_ref}="{results.PASS}",ISNUMBER({u_ref}),{u_ref}>{lim})')
        rules += rule(s_letter, comfortable, f'{s_ref}="{results.PASS}"')
        sqref = f"{s_letter}{first}:{s_letter}{last_row}"
        out.append(f'<conditionalFormatting sqref="{sqref}">{rules}</conditionalFormatting>')
    return "".join(out)


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
    widths_of = [width(c) for c in cols]
    header_row = _header_row(sheet)
    n = len(sheet.table)
    first = header_row + 1
    last_row = max(first + n - 1, header_row)
    last_col = letters[-1]
    widths = "".join(
        f'<col min="{j + 1}" max="{j + 1}" width="{w:g}" customWidth="1"/>' for j, w in enumerate(widths_of)
    )
    head = [
        '<?xml version="1.0" encoding="UTF-8" standalone="yes"?>\n',
        f"<worksheet {NS} {NS_R}>",
        f'<sheetPr><tabColor rgb="{tab_rgb}"/><pageSetUpPr fitToPage="1"/></sheetPr>',
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
    total = sum(widths_of)
    merges = []
    for label, value in lines(sheet):
        r += 1
        # one text cell per line, merged across the table's width and wrapped there, so it
        # reads (and prints) in full within the page
        style = styles.caution if label == "CAUTION" else styles.label
        line = f"{label}: {value}"
        k = _wrapped_lines(line, total)
        ht = f' ht="{LINE_HEIGHT * k + 2:g}" customHeight="1"' if k > 1 else ""
        head.append(f'<row r="{r}"{ht}>{_str_cell(f"A{r}", line, style)}</row>')
        if len(cols) > 1:
            merges.append(f'<mergeCell ref="A{r}:{last_col}{r}"/>')
    k = max(_wrapped_lines(c.title, w) for c, w in zip(cols, widths_of, strict=True))
    head.append(
        f'<row r="{header_row}" ht="{LINE_HEIGHT * k + 4:g}" customHeight="1">'
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
        template, values = _row_template(cols, letters, styles, columns, lo, hi, first, widths_of)
        yield "".join(map(template.format, range(first + lo, first + hi), *values)).encode("utf-8")
        if on_rows:
            on_rows(hi - lo)
    tail = ["</sheetData>", f'<autoFilter ref="A{header_row}:{last_col}{last_row}"/>']
    if merges:
        tail.append(f'<mergeCells count="{len(merges)}">{"".join(merges)}</mergeCells>')
    if n:
        tail.append(_bands(sheet, styles, letters, first, last_row))
    # print: landscape A4, every column on one page width, as many pages down as it takes
    tail.append('<printOptions horizontalCentered="0"/>')
    tail.append('<pageMargins left="0.4" right="0.4" top="0.75" bottom="0.75" header="0.3" footer="0.3"/>')
    tail.append('<pageSetup paperSize="9" orientation="landscape" fitToWidth="1" fitToHeight="0"/>')
    tail.append(header_footer(sheet))
    tail.append("</worksheet>")
    yield "".join(tail).encode("utf-8")


def _row_template(cols, letters, styles: Styles, columns, lo: int, hi: int, first: int, widths_of=None):
    """`str.format` template of one table row ({0} is the row number) and its column values.
    Rows whose long text wraps get a height for the lines it takes ({1})."""
    widths_of = widths_of or [c.width for c in cols]
    parts = ['<row r="{0}"{1}>']
    heights = np.ones(hi - lo, dtype=int)
    for j, c in enumerate(cols):
        if c.wraps and columns[j] is not None:
            room = max(1.0, widths_of[j] * 0.95)
            lengths = np.array(_lengths(columns[j][lo:hi].tolist()), dtype=float)
            heights = np.maximum(heights, np.ceil(lengths / room).astype(int))
    ht = {
        k: f' ht="{LINE_HEIGHT * k + 2:g}" customHeight="1"' if k > 1 else ""
        for k in np.unique(heights).tolist()
    }
    values: list[list] = [[ht[k] for k in heights.tolist()]]
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
            xs = reprs(x)
            parts.append(f'<c r="{letter}{{0}}"{st}><v>{{{k}}}</v></c>' if finite.all() else f"{{{k}}}")
            if finite.all():
                values.append(xs)
            else:
                values.append(
                    [
                        f'<c r="{letter}{r}"{st}><v>{v}</v></c>' if ok else ""
                        for r, v, ok in zip(range(first + lo, first + hi), xs, finite.tolist(), strict=True)
                    ]
                )
            continue
        vals = chunk.tolist()
        kinds = set(map(type, vals))
        style = styles.wrap if c.wraps else styles.text
        st = f' s="{style}"' if style else ""
        if kinds == {str} and "" not in vals:
            parts.append(
                f'<c r="{letter}{{0}}" t="inlineStr"{st}><is><t xml:space="preserve">{{{k}}}</t></is></c>'
            )
            values.append(_texts(vals))
        elif kinds <= {str, type(None), float}:  # text with blanks (None, NaN, ''): as `_cell`
            parts.append(f"{{{k}}}")
            head, tail = f'<c r="{letter}', f'" t="inlineStr"{st}><is><t xml:space="preserve">'
            values.append(
                [
                    (f"{head}{r}{tail}{t}</t></is></c>" if v else "")  # v, not t: "\x01" is a cell
                    if type(v) is str
                    else _cell(f"{letter}{r}", v, style)
                    for r, v, t in zip(range(first + lo, first + hi), vals, _texts(vals), strict=True)
                ]
            )
        else:
            parts.append(f"{{{k}}}")
            values.append([_cell(f"{letter}{first + lo + i}", v, style) for i, v in enumerate(vals)])
    parts.append("</row>")
    return "".join(parts), values


def reprs(x: np.ndarray) -> list[str]:
    """`repr` of each float of `x`, each distinct value formatted once: a chunk of a result
    column repeats few values (storey levels, bar sizes, f'c, the same pier's length), and
    `repr` is the dearest part of a number's cell. Distinct by bit pattern, so -0.0 and 0.0
    stay apart and every value's text is exactly its own `repr`."""
    x = np.ascontiguousarray(x, dtype=np.float64)
    if len(x) < 64:
        return list(map(repr, x.tolist()))
    distinct, where = np.unique(x.view(np.int64), return_inverse=True)
    if 2 * len(distinct) > len(x):  # mostly distinct: a table of texts would not pay
        return list(map(repr, x.tolist()))
    texts = np.array(list(map(repr, distinct.view(np.float64).tolist())), dtype=object)
    return texts[where].tolist()


def _lengths(vals: list) -> list[int]:
    """Characters of each text, 0 for a value that is not text (a list, not a generator into
    numpy: half the time)."""
    return [len(v) if type(v) is str else 0 for v in vals]


def _texts(vals: list) -> list[str]:
    """Each text as it goes in a cell (`text`), each distinct one escaped once; '' for a value
    that is not text (the caller makes its cell)."""
    cache: dict[str, str] = {}
    return [
        (cache[v] if v in cache else cache.setdefault(v, text(v))) if type(v) is str else "" for v in vals
    ]
