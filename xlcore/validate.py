"""Raw cell values -> a checked `Building`. One pass collects every finding with its Sheet!Cell."""

from __future__ import annotations

import datetime as dt
import difflib
import math
import re
from collections import defaultdict

import numpy as np
import pandas as pd

from xlcore import costs, geometry, layout
from xlcore.codes import get_standard
from xlcore.codes.as3600 import STANDARD_GRADES
from xlcore.codes.base import Standard
from xlcore.diagnostics import Findings, InputInvalid, cell_name, show
from xlcore.layout import Column, Kind, TableSheet
from xlcore.mechanics import bars, diaphragm
from xlcore.model import Building, EndZone, Opening, Settings, Storey, WallRun
from xlcore.workbook.reader import ERROR_VALUES, RawSheet, RawWorkbook

NUMBER_TEXT = re.compile(r"^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$")
NUMBER_WITH_UNIT = re.compile(r"^[+-]?(\d+\.?\d*|\.\d+)\s*[^\d\s.].*$")
THOUSANDS = re.compile(r"^[+-]?\d{1,3}(,\d{3})+(\.\d*)?$")
DECIMAL_COMMA = re.compile(r"^[+-]?\d*,\d+$")
INVISIBLE = re.compile("[\u00a0\u00ad\u200b-\u200f\u2060\ufeff\u202f]")
REQUIRED_OPENING = {c.key for c in layout.OPENINGS.columns if c.required}
REQUIRED_ZONE = {c.key for c in layout.END_ZONES.columns if c.required}
LEVEL_TOL = 0.005  # m: storey levels and heights must agree within 5 mm


def build(raw: RawWorkbook) -> tuple[Building, Findings]:
    """Check the inputs; return the building and any warnings, or raise InputInvalid."""
    f = raw.findings
    _sheet_names(raw, f)
    settings = _settings(raw.sheets.get(layout.PROJECT.name), f)
    tables = {t.key: _table(raw.sheets.get(t.name), t, f) for t in layout.TABLES}
    storeys, storeys_sound = _storeys(tables["storeys"], f)
    walls = _walls(tables["walls"], storeys, f)
    _grades_for_standard(tables["walls"], settings, f)
    unsound = _unsound_ids(tables["walls"], walls)
    openings = _openings(tables["openings"], storeys, walls, f, unsound)
    complete = storeys_sound and not f.errors  # every row so far parsed and agreed
    geom = _geometry(storeys, walls, openings, f, complete)
    if unsound is not None:
        unsound |= _refused_opening_walls(tables["openings"], openings)
    # zones of a wall whose rows or openings were refused are checked once those are fixed
    std = get_standard(settings.standard)
    end_zones = _end_zones(tables.get("end_zones"), storeys, walls, geom, f, unsound, std=std)
    actions = _member_actions(tables["member_actions"], storeys, geom, f, set() if complete else unsound)
    core = _core_actions(tables["core_actions"], storeys, geom if complete else None, f)
    _earthquake_names(raw.sheets.get(layout.PROJECT.name), settings, actions, core, f)
    _ductile_without_earthquake(raw.sheets.get(layout.PROJECT.name), settings, actions, core, f)
    _combination_warnings(actions, core, f)
    if f.errors:
        raise InputInvalid(f)
    building = Building(
        settings=settings,
        storeys=storeys,
        walls=walls,
        openings=openings,
        end_zones=end_zones,
        member_actions=actions,
        core_actions=core,
        input_hash=raw.input_hash,
    )
    return building, f


# ---------------------------------------------------------------- cells


def did_you_mean(found: object, known) -> str:
    """' (did you mean 'GF'?)' for the closest known names, or ''. Case is compared as typed
    and ignoring case, so `Gf` finds `GF` (difflib's ratio, cutoff 0.6)."""
    if found is None:
        return ""
    names = [str(k) for k in known]
    by_lower: dict[str, str] = {}
    for n in names:
        by_lower.setdefault(n.lower(), n)
    f = str(found)
    hits = [by_lower[m] for m in difflib.get_close_matches(f.lower(), list(by_lower), n=2, cutoff=0.6)]
    if not hits:
        return ""
    return " (did you mean " + " or ".join(repr(h) for h in hits) + "?)"


def suggest(found: object, known) -> str:
    """The most telling hint for an unknown name: a slip by case or an invisible character
    first (the name looks right on screen), else the closest known names."""
    return near_miss(found, known) or did_you_mean(found, known)


def blank(v: object) -> bool:
    return v is None or (isinstance(v, str) and v.strip() == "")


def _missing(*values: object) -> bool:
    """Any of `values` a blank cell as a typed table holds it: None, or NaN where pandas made
    the text column a string column (pandas 3 does so for text with None in it), so a test
    `is None` alone misses it."""
    return any(v is None or (isinstance(v, float) and v != v) for v in values)


def _number(v: object, col: Column) -> tuple[float | None, str | None]:
    """A cell as a number, or the reason it is not one."""
    if isinstance(v, bool):
        return None, f"found {show(v)}; expected {col.expectation()}"
    if isinstance(v, int | float):
        x = float(v)
    elif isinstance(v, str):
        s = v.strip()
        if s in ERROR_VALUES:
            return None, f"found the error value {s}; expected {col.expectation()} (fix the formula)"
        if NUMBER_TEXT.match(s):
            x = float(s)
        elif THOUSANDS.match(s):
            return None, (
                f"found {show(v)}; expected {col.expectation()}: a thousands separator (or a decimal "
                "comma) is not read; enter the digits only, with a full stop for decimals"
            )
        elif DECIMAL_COMMA.match(s):
            return None, (
                f"found {show(v)}; expected {col.expectation()}: a decimal comma is not read; write "
                f"{s.replace(',', '.')} with a full stop"
            )
        elif NUMBER_WITH_UNIT.match(s):
            return None, (
                f"found {show(v)}; expected {col.expectation()}: enter the number only, the unit "
                "is fixed by the column header"
            )
        else:
            return None, f"found {show(v)}; expected {col.expectation()}"
    elif isinstance(v, dt.datetime | dt.date | dt.time):
        return None, (
            f"found a date/time ({v}); expected {col.expectation()} "
            "(the cell is formatted as a date: set it to Number)"
        )
    else:
        return None, f"found {show(v)}; expected {col.expectation()}"
    if not math.isfinite(x):
        return None, f"found {show(v)}; expected a finite number"
    if col.kind is Kind.INTEGER and not x.is_integer():
        return None, f"found {show(v)}; expected {col.expectation()}"
    return x, _range_problem(x, col, v)


def near_miss(found: object, known) -> str:
    """' (differs from X only by case / by an invisible character)' when `found` is a known name
    but for that; else ''. Such slips look right on screen and so are hard to see."""
    if not isinstance(found, str):
        return ""
    names = list(known)
    plain = INVISIBLE.sub("", found).replace("\u00a0", " ")
    if plain != found and plain in names:
        return (
            f" (it differs from {plain!r} by an invisible character such as a no-break or zero-width space)"
        )
    low = {n.lower(): n for n in names if isinstance(n, str)}
    if plain.lower() in low:
        return f" (did you mean {low[plain.lower()]!r}? it differs only by case)"
    return ""


def _outside(x, col: Column):
    """Where x (a number or an array) lies outside the column's range."""
    x = np.asarray(x, dtype=float)
    bad = np.zeros(x.shape, dtype=bool)
    if col.min is not None:
        bad |= x <= col.min if col.min_open else x < col.min
    if col.max is not None:
        bad |= x > col.max
    return bad


def _range_problem(x: float, col: Column, v: object) -> str | None:
    if not _outside(x, col):
        return None
    msg = f"found {show(v)}; expected {col.expectation()}"
    for slip in layout.UNIT_SLIPS:
        if slip.unit == col.unit and x != 0 and not _outside(x * slip.factor, col):
            msg += f" ({slip.hint})"
    return msg


def _text(v: object, col: Column) -> tuple[str | None, str | None]:
    if isinstance(v, bool) or isinstance(v, dt.datetime | dt.date | dt.time):
        return None, f"found {show(v)}; expected {col.expectation()}"
    if isinstance(v, float):
        if not math.isfinite(v):
            return None, f"found {show(v)}; expected {col.expectation()}"
        s = str(int(v)) if v.is_integer() else repr(v)
    else:
        s = str(v).strip()
    if s in ERROR_VALUES:
        return None, f"found the error value {s}; expected {col.expectation()} (fix the formula)"
    if col.kind is Kind.CHOICE:
        for c in col.choices:
            if c.lower() == s.lower():
                return c, None
        return None, f"found {show(v)}; expected {col.expectation()}"
    if len(s) > 255:
        return None, f"found text of {len(s)} characters; expected at most 255"
    return s, None


def _cell(v: object, col: Column) -> tuple[object, str | None]:
    if col.kind in (Kind.NUMBER, Kind.INTEGER):
        return _number(v, col)
    return _text(v, col)


# ---------------------------------------------------------------- sheets


def _sheet_names(raw: RawWorkbook, f: Findings) -> None:
    lower = {n.strip().lower(): n for n in raw.sheet_names}
    for name in layout.INPUT_SHEET_NAMES:
        if name in raw.sheets or name in layout.OPTIONAL_SHEETS:
            continue
        near = lower.get(name.lower())
        hint = f" (found a sheet named {near!r}: sheet names must match exactly)" if near else ""
        f.error(
            name,
            None,
            f"sheet {name!r} is missing{hint}; expected the input sheets "
            f"{', '.join(layout.INPUT_SHEET_NAMES)} (`xlcore template` writes them)",
        )


def _norm(h: object) -> str:
    return re.sub(r"\s+", " ", str(h)).strip().lower() if h is not None else ""


def _unit_of(header: str) -> str | None:
    m = re.search(r"\[([^\]]*)\]\s*$", header)
    return m.group(1).strip() if m else None


def _name_of(header: str) -> str:
    return re.sub(r"\[[^\]]*\]\s*$", "", header).strip()


def _map_header(sheet: RawSheet, t: TableSheet, f: Findings) -> dict[str, int] | None:
    """Column key -> 0-based column. Columns may be in any order; headers stay in row 1."""
    header = sheet.rows[0] if sheet.rows else ()
    found: dict[str, int] = {}
    by_name = {_norm(c.name): c for c in t.columns}
    by_header = {_norm(c.header): c for c in t.columns}
    ok = True
    for i, h in enumerate(header):
        if blank(h):
            continue
        key = _norm(h)
        col = by_header.get(key)
        if col is None and _norm(_name_of(str(h))) in by_name:
            col = by_name[_norm(_name_of(str(h)))]
            if col.unit is not None or _unit_of(str(h)) is not None:
                f.error(
                    t.name,
                    cell_name(i, 1),
                    f"header {show(h)} has the unit [{_unit_of(str(h)) or ''}]; expected "
                    f"{col.header!r}: xlcore reads this column in {col.unit or 'no unit'}",
                )
                ok = False
                continue
        if col is None:
            f.warning(t.name, cell_name(i, 1), f"column {show(h)} is not an xlcore column; ignored")
            continue
        if col.key in found:
            f.error(
                t.name,
                cell_name(i, 1),
                f"column {col.header!r} appears twice (also in {cell_name(found[col.key], 1)})",
            )
            ok = False
            continue
        found[col.key] = i
    for c in t.columns:
        if c.key not in found and c.required:
            f.error(t.name, "1:1", f"column {c.header!r} not found in the header row (row 1)")
            ok = False
    return found if ok else None


def _table(sheet: RawSheet | None, t: TableSheet, f: Findings) -> pd.DataFrame | None:
    """Typed columns of one table sheet (NaN / None where a cell was bad) plus its row numbers."""
    if sheet is None:
        return None
    cols = _map_header(sheet, t, f)
    if cols is None:
        return None
    idx = [cols.get(c.key) for c in t.columns]
    body = sheet.rows[1:]
    columns = _columns(body, idx)
    blanks = [_blank_mask(col) for col in columns]
    filled = np.zeros(len(body), dtype=bool)  # rows with anything in xlcore's columns
    for b in blanks:
        filled |= ~b
    keep = np.flatnonzero(filled)
    rows = (keep + 2).tolist()
    data: dict[str, object] = {"row": np.array(rows, dtype=int)}
    all_rows = len(keep) == len(body)  # the usual case: no blank row to leave out
    for j, c in enumerate(t.columns):
        if not len(body):
            column, blank = [], np.zeros(0, dtype=bool)
        elif all_rows:  # the same cells; an object array and back cost two passes of 360 000 at L
            column, blank = columns[j], blanks[j]
        else:
            column, blank = np.array(columns[j], dtype=object)[keep].tolist(), blanks[j][keep]
        data[c.key] = _typed_column(column, rows, c, idx[j], t.name, f, blank)
    df = pd.DataFrame(data)
    df.attrs["columns"] = cols
    return df


def _columns(body: list, idx: list[int | None]) -> list[list]:
    """The cells of each read column (None where the column is absent), row 2 first. Rows of
    one width (as the compiled reader gives them) are laid out as one object array and sliced
    by column: the same cell objects as a transpose by `zip`, in a tenth of the time at L (the
    `zip` makes an iterator per row, 360 000 objects the cyclic collector walks)."""
    need = max((i for i in idx if i is not None), default=-1) + 1
    grid = _grid(body, need)
    if grid is not None:
        return [grid[:, i].tolist() if i is not None else [None] * len(body) for i in idx]
    if body and min(map(len, body)) >= need:  # rows as wide as the columns read: transpose in C
        every = list(zip(*body, strict=False)) if need else []
        return [list(every[i]) if i is not None else [None] * len(body) for i in idx]
    return [
        [r[i] if i < len(r) else None for r in body] if i is not None else [None] * len(body)
        for i in idx
    ]


def _grid(body: list, need: int) -> np.ndarray | None:
    """The rows as a 2-D object array when they all have one width of at least `need` cells,
    else None (ragged rows, as openpyxl's reader or a filled-in error cell may leave them)."""
    if not body or not need:
        return None
    widths = set(map(len, body))
    if len(widths) != 1 or min(widths) < need:
        return None
    try:
        grid = np.array(body, dtype=object)
    except ValueError:
        return None
    return grid if grid.shape == (len(body), widths.pop()) else None


def _blank_mask(col: list) -> np.ndarray:
    """`blank` of each cell, judged once per distinct value (a column of 360 000 action rows
    holds a few hundred names and numbers): one C-level pass to find them, one to look up."""
    try:
        blanks = {v for v in set(col) if blank(v)}
    except TypeError:  # an unhashable cell value: one by one
        return np.fromiter(map(blank, col), dtype=bool, count=len(col))
    if not blanks:
        return np.zeros(len(col), dtype=bool)
    return np.fromiter(map(blanks.__contains__, col), dtype=bool, count=len(col))


def _typed_column(
    column, rows, c: Column, ci: int | None, sheet: str, f: Findings, blanks: np.ndarray | None = None
):
    """A column's cells typed, with a finding for each bad one. Cells that are plainly right
    (a finite number in range; text within bounds) are taken column-wise; the rest go through
    the cell-by-cell rules, which word the findings. `blanks` (`_blank_mask` of the column, when
    known): blank cells of an optional column are set column-wise too, as they draw no finding
    (a column left blank at L is 360 000 cells)."""
    numeric = c.kind in (Kind.NUMBER, Kind.INTEGER)
    out = _plain_numbers(column, c) if numeric else _plain_texts(column, c)
    todo = pd.isna(out) if numeric else out == _UNSETTLED
    if blanks is not None and not c.required:
        empty = todo & blanks
        if empty.any():
            out[empty] = np.nan if numeric else None
            todo &= ~empty
    for i in np.flatnonzero(todo).tolist():
        v, r = column[i], rows[i]
        if blank(v):
            if c.required:
                f.error(sheet, cell_name(ci or 0, r), f"blank; expected {c.expectation()}")
            out[i] = np.nan if numeric else None
            continue
        value, problem = _cell(v, c)
        if problem:
            f.error(sheet, cell_name(ci or 0, r), problem)
            value = None
        out[i] = (np.nan if value is None else value) if numeric else value
    return out


_UNSETTLED = object()  # a text cell the column-wise pass leaves to the cell-by-cell rules


def _plain_numbers(column: list, c: Column) -> np.ndarray:
    """Floats where the cell is a finite number within the column's range (and whole, for
    integer columns); NaN where the cell needs a closer look."""
    types = set(map(type, column))
    if types <= {float, int}:  # every cell a number (the usual action column): one conversion
        x = np.array(column, dtype=float)
    elif not types & {float, int}:  # no number at all (an optional column left blank)
        x = np.full(len(column), np.nan)
    else:
        x = np.array([v if type(v) in (float, int) else np.nan for v in column], dtype=float)
    bad = ~np.isfinite(x) | _outside(x, c)
    if c.kind is Kind.INTEGER:
        bad |= x != np.round(x)
    x[bad] = np.nan
    return x


def _plain_texts(column: list, c: Column) -> np.ndarray:
    """Stripped text where the cell is a string within bounds (a listed choice, for choice
    columns); _UNSETTLED where it needs a closer look."""
    choices = {ch.lower(): ch for ch in c.choices} if c.kind is Kind.CHOICE else None

    def settle(v: object) -> object:
        if type(v) is not str:
            return _UNSETTLED
        t = v.strip()
        if not t or len(t) > 255 or t in ERROR_VALUES:
            return _UNSETTLED
        return t if choices is None else choices.get(t.lower(), _UNSETTLED)

    out = np.empty(len(column), dtype=object)
    try:  # once per distinct value (a non-text cell settles nothing, whichever value it is)
        known = {v: settle(v) for v in set(column)}
    except TypeError:  # an unhashable cell value: one by one
        out[:] = [settle(v) for v in column]
        return out
    out[:] = list(map(known.__getitem__, column))
    return out


def _settings(sheet: RawSheet | None, f: Findings) -> Settings:
    spec = layout.PROJECT
    values: dict[str, object] = {}
    if sheet is None:
        return Settings()
    labels = {_norm(s.label): s for s in spec.settings}
    seen: set[str] = set()
    for r in range(2, len(sheet.rows) + 1):
        label = sheet.value(r, 0)
        if blank(label):
            continue
        s = labels.get(_norm(label))
        if s is None:
            f.warning(spec.name, cell_name(0, r), f"setting {show(label)} is not an xlcore setting; ignored")
            continue
        seen.add(s.key)
        v = sheet.value(r, 1)
        if blank(v):
            continue
        value, problem = _cell(v, s.column)
        if s.key == "compare_standard" and isinstance(v, str):  # short forms too (AS3600, ACI318)
            named = layout.standard_named(v)
            if named:
                value, problem = named, None
            else:
                problem = f"found {show(v)}; expected blank or one of {layout.standard_forms()}"
        if problem is None and s.key == "concrete_prices":
            try:
                costs.parse_concrete_prices(value)
            except ValueError as exc:
                problem = f"found {show(v)}: {exc}; expected pairs like '32:260, 40:285'"
        if problem:
            f.error(spec.name, cell_name(1, r), problem)
            continue
        values[s.key] = value
    for s in spec.settings:
        if s.key not in seen:
            f.warning(spec.name, None, f"setting {s.label!r} not found in column A; default used")
    return Settings(**values)


def _earthquake_names(sheet: RawSheet | None, s: Settings, actions, core, f: Findings) -> None:
    """Every name in the earthquake-combinations setting must be a combination on an action
    sheet: a typing slip would silently drop the Cl 14.6 flag."""
    if sheet is None or not s.earthquake:
        return
    known = set()
    for df in (actions, core):
        if df is not None and "combination" in df:
            known |= set(df.combination.dropna().astype(str))
    unknown = sorted(s.earthquake - known)
    if not unknown or not known:
        return
    label = _norm(layout.PROJECT.setting("earthquake_combinations").label)
    row = next((r for r in range(2, len(sheet.rows) + 1) if _norm(sheet.value(r, 0)) == label), 2)
    f.error(
        layout.PROJECT.name,
        cell_name(1, row),
        f"found combination name(s) {', '.join(map(repr, unknown))} that no action sheet has; "
        f"expected names from the action sheets, separated by commas",
    )


def _ductile_without_earthquake(sheet: RawSheet | None, s: Settings, actions, core, f: Findings) -> None:
    """A structure designed as limited or moderately ductile has earthquake combinations; with
    none named, Section 14's end-zone trigger is not evaluated: say so once (a warning, as the
    result sheets would only show it as n/a)."""
    if sheet is None or s.earthquake or s.mu < 2:
        return
    if not any(df is not None and len(df) for df in (actions, core)):
        return
    label = _norm(layout.PROJECT.setting("earthquake_combinations").label)
    row = next((r for r in range(2, len(sheet.rows) + 1) if _norm(sheet.value(r, 0)) == label), None)
    f.warning(
        layout.PROJECT.name,
        cell_name(1, row) if row else None,
        f"ductility {s.ductility} but no earthquake combinations named: the Section 14 end-zone "
        "trigger (0.15 f'c) is not evaluated; name them here, separated by commas",
    )


# ---------------------------------------------------------------- cross-sheet checks


def _at(df: pd.DataFrame, key: str, row: int) -> str:
    """A1 name of the cell holding `key` in `row`, wherever that column sits on the sheet."""
    return cell_name(df.attrs["columns"].get(key, 0), row)


def _storeys(df: pd.DataFrame | None, f: Findings) -> tuple[list[Storey], bool]:
    """Every named storey row, and whether the sheet is sound (all rows parsed and agree).

    Rows with a bad number are kept (NaN there) so that the other sheets' storey names and
    ranges are still checked in the same pass; heights are used only when the sheet is sound."""
    t = layout.STOREYS
    if df is None:
        return [], False
    if df.empty:
        f.error(t.name, "A2", "no storeys; expected at least one row")
        return [], False
    out: list[Storey] = []
    seen: dict[str, int] = {}
    ok = True
    for rec in df.itertuples(index=False):
        if _missing(rec.name):  # its own finding: "blank; expected ..."
            ok = False
            continue
        if any(math.isnan(x) for x in (rec.level, rec.height, rec.slab)):
            ok = False  # the cell's own error is already reported
        if rec.name in seen:
            f.error(
                t.name,
                _at(df, "name", rec.row),
                f"storey name {rec.name!r} is used twice (also row {seen[rec.name]})",
            )
            ok = False
        seen.setdefault(rec.name, rec.row)
        if rec.slab / 1000.0 >= rec.height:
            f.error(
                t.name,
                _at(df, "slab", rec.row),
                f"found {show(rec.slab)} mm; the slab must be thinner than the storey height "
                f"({rec.height:g} m) to leave a clear height",
            )
            ok = False
        out.append(
            Storey(
                index=len(out), name=rec.name, level=rec.level, height=rec.height, slab=rec.slab, row=rec.row
            )
        )
    for a, b in zip(out, out[1:], strict=False):
        if b.level <= a.level:
            f.error(
                t.name,
                _at(df, "level", b.row),
                f"found {b.level:g} m; expected a level above {a.name} ({a.level:g} m): "
                "list storeys lowest first",
            )
            ok = False
        elif abs(a.level + a.height - b.level) > LEVEL_TOL:
            f.error(
                t.name,
                _at(df, "height", a.row),
                f"found {a.height:g} m, which puts the next floor at {a.level + a.height:g} m; "
                f"expected {b.level - a.level:g} m to reach {b.name} at {b.level:g} m",
            )
            ok = False
    return out, ok


def _storey_range(
    rec, df: pd.DataFrame, t: TableSheet, index: dict[str, int], f: Findings
) -> tuple[int, int] | None:
    lo = index.get(rec.storey_from) if not _missing(rec.storey_from) else None
    hi = index.get(rec.storey_to) if not _missing(rec.storey_to) else None
    for key, name, i in (("storey_from", rec.storey_from, lo), ("storey_to", rec.storey_to, hi)):
        if not _missing(name) and i is None and index:
            f.error(
                t.name,
                _at(df, key, rec.row),
                f"found {show(name)}; expected a storey name from the {layout.STOREYS.name} sheet"
                + did_you_mean(name, index),
            )
    if lo is None or hi is None:
        return None
    if lo > hi:
        f.error(
            t.name,
            _at(df, "storey_to", rec.row),
            f"found {rec.storey_to!r}, which is below the from storey {rec.storey_from!r}; "
            "expected the to storey at or above the from storey",
        )
        return None
    return lo, hi


GRADE_RANGE = {
    # standard: (least f'c, greatest f'c, basis), MPa
    "AS 3600:2018": (20.0, 100.0, "AS 3600:2018 Cl 1.1.2 scope, from memory: verify"),
    "ACI 318-19": (17.0, math.inf, "ACI 318-19 Table 19.2.1.1, from memory: verify"),
}
"""Concrete grades each design standard covers (the walls sheet admits 17 to 100 MPa, the union;
the checks' equations hold only within the chosen standard's range)."""

ACI_FY_MAX = 550.0  # MPa, ACI 318-19 20.2.2.4 (from memory, verify): fy above it is capped


def _grades_for_standard(df: pd.DataFrame | None, settings: Settings, f: Findings) -> None:
    """A concrete grade the chosen design standard does not cover is an error at its cell; an
    ACI bar grade above 550 MPa a warning (the checks cap it)."""
    if df is None or df.empty or "fc" not in df or settings.standard not in GRADE_RANGE:
        return
    lo, hi, basis = GRADE_RANGE[settings.standard]
    rows = df["row"].tolist() if "row" in df else list(range(2, len(df) + 2))
    for r, fc in zip(rows, pd.to_numeric(df["fc"], errors="coerce").tolist(), strict=True):
        if fc == fc and not lo <= fc <= hi:
            span = f"{lo:g} to {hi:g} MPa" if math.isfinite(hi) else f"at least {lo:g} MPa"
            f.error(
                layout.WALLS.name,
                _at(df, "fc", int(r)),
                f"f'c {fc:g} MPa is outside what {settings.standard} covers ({basis}); expected "
                f"{span}, or another design standard on the Project sheet",
            )
    if settings.standard == "ACI 318-19" and "fsy" in df:
        for r, fy in zip(rows, pd.to_numeric(df["fsy"], errors="coerce").tolist(), strict=True):
            if fy == fy and fy > ACI_FY_MAX:
                f.warning(
                    layout.WALLS.name,
                    _at(df, "fsy", int(r)),
                    f"fsy {fy:g} MPa is above the {ACI_FY_MAX:g} MPa ACI 318-19 20.2.2.4 allows in "
                    "strength (from memory: verify); the checks use 550 MPa (420 MPa in shear)",
                )


def _walls(df: pd.DataFrame | None, storeys: list[Storey], f: Findings) -> list[WallRun]:
    t = layout.WALLS
    if df is None:
        return []
    if df.empty:
        f.error(t.name, "A2", "no walls; expected at least one row")
        return []
    index = {s.name: s.index for s in storeys}
    out: list[WallRun] = []
    spans: dict[str, list[tuple[int, int, int]]] = defaultdict(list)
    cores: dict[str, tuple[str, int]] = {}  # wall ID -> (core, first row)
    for rec in df.itertuples(index=False):
        rng = _storey_range(rec, df, t, index, f)
        values = rec._asdict()
        core = values.get("core")
        values["core"] = "" if core is None or core != core else core  # blank (None/NaN): one core
        if any(v is None or (isinstance(v, float) and math.isnan(v)) for v in values.values()):
            continue
        wall = WallRun(**values)
        if wall.wall_id in cores and cores[wall.wall_id][0] != wall.core:
            first, first_row = cores[wall.wall_id]
            f.error(
                t.name,
                _at(df, "core", rec.row),
                f"found core {show(wall.core or None)} for wall {wall.wall_id!r}; expected "
                f"{show(first or None)} as in row {first_row}: a wall belongs to one core over its "
                "whole height",
            )
            continue
        cores.setdefault(wall.wall_id, (wall.core, rec.row))
        if wall.length < 0.05:
            f.error(
                t.name,
                _at(df, "x2", rec.row),
                f"wall {wall.wall_id!r} has a length of {wall.length * 1000:.0f} mm; expected the "
                "end point away from the start point",
            )
            continue
        if wall.fc not in STANDARD_GRADES:
            f.warning(
                t.name,
                _at(df, "fc", rec.row),
                f"f'c {wall.fc:g} MPa is not a standard grade "
                f"({', '.join(f'{g:g}' for g in STANDARD_GRADES)} MPa); Ec is interpolated",
            )
        fit = 2 * wall.cover + (wall.v_dia + wall.h_dia) * (2 if max(wall.v_layers, wall.h_layers) > 1 else 1)
        if fit >= wall.thickness:
            f.warning(
                t.name,
                _at(df, "cover", rec.row),
                f"cover and bars take {fit:.0f} mm of a {wall.thickness:.0f} mm wall",
            )
        if rng is not None:
            spans[wall.wall_id].append((rng[0], rng[1], rec.row))
            out.append(wall)
    named = sorted({c for c, _ in cores.values() if c})
    unnamed = sorted((r, w) for w, (c, r) in cores.items() if not c)
    if named and unnamed:
        r, w = unnamed[0]
        f.error(
            t.name,
            _at(df, "core", r),
            f"blank core for wall {w!r} ({len(unnamed)} wall(s) without one) while other walls name "
            f"cores ({', '.join(map(repr, named))}); expected a core ID on every wall, or on none",
        )
    for wall_id, lst in spans.items():
        lst.sort()
        for (_a0, a1, ra), (b0, _b1, rb) in zip(lst, lst[1:], strict=False):
            if b0 <= a1:
                f.error(
                    t.name,
                    _at(df, "storey_from", rb),
                    f"wall {wall_id!r} storeys overlap row {ra} ({storeys[b0].name} to "
                    f"{storeys[a1].name}); expected each storey in one row only",
                )
            elif b0 > a1 + 1:
                f.error(
                    t.name,
                    _at(df, "storey_from", rb),
                    f"wall {wall_id!r} has no row for {storeys[a1 + 1].name} to "
                    f"{storeys[b0 - 1].name} (gap after row {ra}); expected continuous storey ranges",
                )
    return out


def _unsound_ids(df: pd.DataFrame | None, walls: list[WallRun]) -> set[str] | None:
    """Wall IDs with a row that did not parse or was refused (None: the sheet did not parse)."""
    if df is None:
        return None
    optional = ["row"] + [c.key for c in layout.WALLS.columns if not c.required and c.key in df]
    bad = df.drop(columns=optional).isna().any(axis=1) & df.wall_id.notna()
    good = {w.wall_id for w in walls}
    return set(df.wall_id[bad]) | (set(df.wall_id.dropna()) - good)


def _unknown_wall(wall_id: object, wall_ids: set[str], sheet: str, cell: str, f: Findings) -> bool:
    """A wall ID naming no wall of the Walls sheet (openings, end zones): an error at its cell
    with the likeliest slip (case or invisible character, else close names); True if so."""
    if _missing(wall_id) or not wall_ids or wall_id in wall_ids:
        return False
    f.error(
        sheet,
        cell,
        f"found {show(wall_id)}; expected a wall ID from the {layout.WALLS.name} sheet"
        + suggest(wall_id, wall_ids),
    )
    return True


def _openings(
    df: pd.DataFrame | None,
    storeys: list[Storey],
    walls: list[WallRun],
    f: Findings,
    unsound: set[str] | None = frozenset(),
) -> list[Opening]:
    """Openings checked against every wall that parsed; only openings in a wall with a bad
    row (whose extent is unknown) are skipped, so a typing error in one wall does not hide an
    opening that overruns another."""
    t = layout.OPENINGS
    if df is None or df.empty or unsound is None or not walls:
        return []
    index = {s.name: s.index for s in storeys}
    if _ranges_unsound(f):
        return []  # storey ranges of walls unsound: where a wall stands is not known
    runs = geometry.run_at(walls, storeys) if storeys else {}
    wall_ids = {w.wall_id for w in walls}
    out: list[Opening] = []
    placed: dict[tuple[int, str], list[tuple[float, float, int]]] = defaultdict(list)
    for rec in df.itertuples(index=False):
        c = lambda key, r=rec.row: _at(df, key, r)  # noqa: E731
        if rec.wall_id in unsound:
            continue  # its wall has a bad cell: checked once that is fixed
        if _unknown_wall(rec.wall_id, wall_ids, t.name, c("wall_id"), f):
            continue
        rng = _storey_range(rec, df, t, index, f)
        values = rec._asdict()
        if rng is None or any(
            v is None or (isinstance(v, float) and math.isnan(v))
            for k, v in values.items()
            if k in REQUIRED_OPENING
        ):
            continue
        o = Opening(**{k: None if isinstance(v, float) and math.isnan(v) else v for k, v in values.items()})
        if o.sill >= o.head:
            f.error(
                t.name,
                c("sill"),
                f"found {o.sill:g} m; expected the sill below the head height ({o.head:g} m)",
            )
            continue
        bad = False
        for i in range(rng[0], rng[1] + 1):
            s = storeys[i]
            w = runs.get((i, o.wall_id))
            if w is None:
                f.error(
                    t.name,
                    c("storey_from"),
                    f"wall {o.wall_id!r} does not exist at storey "
                    f"{s.name}; expected the opening's storeys within the wall's",
                )
                bad = True
                break
            if o.offset + o.width > w.length + geometry.TOL:
                f.error(
                    t.name,
                    c("width"),
                    f"opening from {o.offset:g} m to "
                    f"{o.offset + o.width:g} m runs past the end of wall {o.wall_id!r} "
                    f"({w.length:.3f} m long at {s.name}); expected it within the wall",
                )
                bad = True
                break
            if o.offset <= geometry.TOL and o.offset + o.width >= w.length - geometry.TOL:
                f.error(
                    t.name,
                    c("width"),
                    f"opening spans the whole of wall {o.wall_id!r}; "
                    "expected solid wall on at least one side (or split the wall)",
                )
                bad = True
                break
            if o.head > s.clear_height + 1e-9:
                f.error(
                    t.name,
                    c("head"),
                    f"found {o.head:g} m; expected at most the clear "
                    f"height {s.clear_height:.3f} m of storey {s.name}",
                )
                bad = True
                break
            for a, b, r in placed[(i, o.wall_id)]:
                if o.offset < b - geometry.TOL and a < o.offset + o.width - geometry.TOL:
                    f.error(
                        t.name,
                        c("offset"),
                        f"opening overlaps the opening of row {r} in wall "
                        f"{o.wall_id!r} at storey {s.name}; expected separate openings",
                    )
                    bad = True
                    break
            if bad:
                break
        if bad:
            continue
        if _lintel_bar_problems(o, rng, storeys, runs, c, f):
            continue
        for i in range(rng[0], rng[1] + 1):
            placed[(i, o.wall_id)].append((o.offset, o.offset + o.width, o.row))
        out.append(o)
    return out


def _end_zones(
    df: pd.DataFrame | None,
    storeys: list[Storey],
    walls: list[WallRun],
    geom: geometry.Geometry | None,
    f: Findings,
    unsound: set[str] | None = frozenset(),
    *,
    std: Standard,
) -> list[EndZone]:
    """End-zone rows checked against the walls, the storeys and (when the geometry is known)
    the piers' free edges: the location exists at every storey of the range, the zone is no
    longer than its pier, its bars fit at the clear-gap rule, and ranges of one wall and
    location do not overlap; the two zones of a pier do not overlap each other."""
    t = layout.END_ZONES
    if df is None or df.empty or unsound is None or not walls:
        return []
    index = {s.name: s.index for s in storeys}
    runs = geometry.run_at(walls, storeys) if storeys else {}
    wall_ids = {w.wall_id for w in walls}
    edges: dict[tuple[int, str], dict[str, tuple[str, float]]] = defaultdict(dict)
    if geom is not None:
        p = geom.piers
        for si, wid, pid, lw, ea, eb in zip(
            p.storey_index, p.wall_id, p.pier_id, p.Lw, p.edge_a, p.edge_b, strict=True
        ):
            edges[(si, wid)][ea] = (pid, lw)
            edges[(si, wid)][eb] = (pid, lw)
    out: list[EndZone] = []
    spans: dict[tuple[str, str], list[tuple[int, int, int]]] = defaultdict(list)
    for rec in df.itertuples(index=False):
        c = lambda key, r=rec.row: _at(df, key, r)  # noqa: E731
        if rec.wall_id in unsound:
            continue  # its wall has a bad cell: checked once that is fixed
        if _unknown_wall(rec.wall_id, wall_ids, t.name, c("wall_id"), f):
            continue
        rng = _storey_range(rec, df, t, index, f)
        loc = layout.parse_location(rec.location) if not _missing(rec.location) else None
        if not _missing(rec.location) and loc is None:
            f.error(
                t.name,
                c("location"),
                f"found {show(rec.location)}; expected {layout.LOCATION_FORMS} (K = the opening's "
                "number along the wall from its start, 1 for the first)",
            )
        tie_d, tie_s = (None if _nan(v) else v for v in (rec.tie_dia, rec.tie_spacing))
        if (tie_d is None) != (tie_s is None):
            key = "tie_spacing" if tie_s is None else "tie_dia"
            f.error(
                t.name,
                c(key),
                f"blank; expected the tie {'spacing' if key == 'tie_spacing' else 'diameter'} as well, "
                "since the other tie cell of this row is filled (or leave both blank: no ties)",
            )
            continue
        values = rec._asdict()
        if rng is None or loc is None or any(_nan(v) for k, v in values.items() if k in REQUIRED_ZONE):
            continue
        label = geometry.edge_label(*loc)
        z = EndZone(
            wall_id=rec.wall_id,
            storey_from=rec.storey_from,
            storey_to=rec.storey_to,
            location=label,
            which=loc[0],
            opening=loc[1],
            bars=int(rec.bars),
            dia=rec.dia,
            length=rec.length,
            tie_dia=tie_d,
            tie_spacing=tie_s,
            row=rec.row,
        )
        if _zone_problem(z, rng, storeys, runs, edges if geom is not None else None, df, f, std):
            continue
        spans[(z.wall_id, label)].append((rng[0], rng[1], rec.row))
        out.append(z)
    for (wall_id, label), lst in spans.items():
        lst.sort()
        for (_a0, a1, ra), (b0, _b1, rb) in zip(lst, lst[1:], strict=False):
            if b0 <= a1:
                f.error(
                    t.name,
                    _at(df, "storey_from", rb),
                    f"wall {wall_id!r} {label}: storeys overlap row {ra} ({storeys[b0].name} to "
                    f"{storeys[min(a1, _b1)].name}); expected each storey in one row only",
                )
    if geom is not None and out and not any(e.sheet == t.name for e in f.errors):
        _zones_apart(geom, out, storeys, df, f, std)
    return out


def _nan(v: object) -> bool:
    return v is None or (isinstance(v, float) and math.isnan(v))


def _zone_problem(z: EndZone, rng, storeys, runs, edges, df, f: Findings, std: Standard) -> bool:
    """The first problem of one end-zone row at any storey of its range (reported), or False."""
    t = layout.END_ZONES
    for i in range(rng[0], rng[1] + 1):
        s = storeys[i]
        w = runs.get((i, z.wall_id))
        if w is None:
            f.error(
                t.name,
                _at(df, "storey_from", z.row),
                f"wall {z.wall_id!r} does not exist at storey {s.name}; expected the zone's storeys "
                "within the wall's",
            )
            return True
        if z.bars % w.v_layers:
            f.error(
                t.name,
                _at(df, "bars", z.row),
                f"found {z.bars} bars; expected a multiple of wall {z.wall_id!r}'s {w.v_layers} vertical "
                f"layers at {s.name} (the same number on each face)",
            )
            return True
        if edges is None:
            continue
        here = edges.get((i, z.wall_id), {})
        if z.location not in here:
            f.error(
                t.name,
                _at(df, "location", z.row),
                f"found {z.location!r}; wall {z.wall_id!r} has no such free edge at {s.name}; expected "
                f"one of: {', '.join(here)}",
            )
            return True
        pier, lw = here[z.location]
        if z.length > lw + 1e-9:
            f.error(
                t.name,
                _at(df, "length", z.row),
                f"found {z.length:g} mm; expected at most the length of pier {pier} "
                f"({lw:.0f} mm at {s.name})",
            )
            return True
        tie = z.tie_dia or 0.0
        gap = float(std.zone_clear_gap(z.dia))
        need = float(bars.zone_min_length(z.bars, w.v_layers, z.dia, w.cover, tie, gap))
        if z.length < need - 1e-9:
            per_face = z.bars // w.v_layers
            f.error(
                t.name,
                _at(df, "length", z.row),
                f"found {z.length:g} mm; expected at least {need:.0f} mm to hold "
                f"{per_face} {std.bar_name(z.dia)} a face at a clear gap of {std.zone_clear_gap_rule} = "
                f"{gap:.0f} mm ({std.clause('zone_clear_gap')}) with cover {w.cover:g} mm"
                + (f" and {std.bar_name(tie)} ties" if tie else "")
                + f" (wall {z.wall_id!r} at {s.name}); fewer bars or a longer zone",
            )
            return True
    return False


def _zones_apart(
    geom: geometry.Geometry, zones: list[EndZone], storeys, df, f: Findings, std: Standard
) -> None:
    """The two end zones of one pier must not overlap (their lengths add up to at most Lw)."""
    at = geometry.zones_at(zones, storeys)
    p = geom.piers
    seen = set()
    for si, storey, wid, pid, lw, ea, eb in zip(
        p.storey_index, p.storey, p.wall_id, p.pier_id, p.Lw, p.edge_a, p.edge_b, strict=True
    ):
        za, zb = at.get((si, wid, ea)), at.get((si, wid, eb))
        if za is None or zb is None or za.length + zb.length <= lw + 1e-9 or (za.row, zb.row) in seen:
            continue
        seen.add((za.row, zb.row))
        f.error(
            layout.END_ZONES.name,
            _at(df, "length", zb.row),
            f"found {zb.length:g} mm; the end zones of pier {pid} at {storey} (rows {za.row} and {zb.row}, "
            f"{za.length:g} + {zb.length:g} mm) overlap in its {lw:.0f} mm; expected them to add up to "
            "at most the pier's length",
        )
    if not seen:
        _zone_neighbours(geometry.with_zones(p, at), at, df, f, std)


def _zone_neighbours(piers: pd.DataFrame, at: dict, df, f: Findings, std: Standard) -> None:
    """Where no field bar is left between a zone and the other side of its pier (the field is
    one span: `bars.layout`), the zone's innermost bar and the bar facing it (the other zone's
    innermost bar, or the wall's edge bar) at least the standard's zone clear gap of the larger
    bar apart (AS 3600: 3 db, Cl 11.7 as transcribed; ACI 318-19: 25.2.3). Gaps to field bars
    follow the idealised even layout and are not judged here."""
    zoned = piers[(piers.za_n > 0) | (piers.zb_n > 0)]
    if zoned.empty:
        return
    lay = bars.layout(zoned)
    spans = lay.field_count + (zoned.za_n > 0).to_numpy() + (zoned.zb_n > 0).to_numpy() - 1
    zoned = zoned[spans <= 1]
    if zoned.empty:
        return
    lay = bars.layout(zoned)
    d, A = lay.all_bars()
    dia_of = np.hstack(
        [
            np.where(
                np.arange(d.shape[1] - lay.zone_d.shape[1])[None, :] < lay.field_count[:, None],
                zoned.v_dia.to_numpy(float)[:, None],
                0.0,
            ),
            np.where(
                lay.zone_A > 0, np.sqrt(4 * lay.zone_A / np.pi / zoned.v_layers.to_numpy(float)[:, None]), 0.0
            ),
        ]
    )
    in_zone = np.hstack([np.zeros(d.shape[1] - lay.zone_d.shape[1]), np.ones(lay.zone_d.shape[1])]) > 0
    seen = set()
    for i, rec in enumerate(zoned.itertuples(index=False)):
        live = A[i] > 0
        order = np.argsort(d[i][live])
        pos, dia, zone = d[i][live][order], dia_of[i][live][order], in_zone[live][order]
        clear = np.diff(pos) - (dia[1:] + dia[:-1]) / 2
        need = std.zone_clear_gap(np.maximum(dia[1:], dia[:-1]))
        bad = np.flatnonzero((clear < need - 1e-6) & (zone[1:] | zone[:-1]))
        if not bad.size:
            continue
        j = int(bad[0])
        side = "a" if pos[j] < rec.Lw / 2 else "b"
        z = at.get((rec.storey_index, rec.wall_id, rec.edge_a if side == "a" else rec.edge_b))
        if z is None or z.row in seen:
            continue
        seen.add(z.row)
        f.error(
            layout.END_ZONES.name,
            _at(df, "length", z.row),
            f"found {z.length:g} mm; in pier {rec.pier_id} at {rec.storey} the bar beside this zone's "
            f"innermost bar is {clear[j]:.0f} mm clear of it; expected at least "
            f"{std.zone_clear_gap_rule} = {need[j]:.0f} mm ({std.clause('zone_clear_gap')}): a shorter "
            "zone, or a longer one holding that bar",
        )


LINTEL_BAR_GROUPS = (
    ("lintel_bars", "lintel_dia"),
    ("stirrup_dia", "stirrup_legs", "stirrup_spacing"),
    ("diag_bars", "diag_dia"),
)
"""Openings-sheet cells that mean something only together: a lintel's bars, its fitments, its
diagonal groups. Half a group is refused rather than silently ignored."""


def _lintel_bar_problems(o: Opening, rng, storeys: list[Storey], runs, c, f: Findings) -> bool:
    """Lintel reinforcement that is incomplete, or diagonal groups too deep to cross in the
    lintel: an error at the cell (True: the opening is not used). Groups wider than the wall
    leaves inside its cover: a warning.

    Diagonal groups lie in two layers (common practice, no source; ACI 318-19 18.10.7.4 asks for
    at least four bars in two layers), so ceil(n/2) bars stand side by side across the wall with a
    clear gap of one bar diameter, and each group's centroid sits cover + fitment + 1.5 db from
    the lintel's top and bottom faces: the lintel must be deeper than twice that for the groups
    to cross (checks/lintels.py uses the same geometry)."""
    t = layout.OPENINGS
    bad = False
    for keys in LINTEL_BAR_GROUPS:
        given = [k for k in keys if getattr(o, k) is not None]
        if given and len(given) < len(keys):
            missing = next(k for k in keys if getattr(o, k) is None)
            names = ", ".join(repr(t.column(k).header) for k in given)
            f.error(
                t.name,
                c(missing),
                f"found blank; expected {t.column(missing).expectation()} since {names} "
                "is given on this row (or clear the row's other cells of this group)",
            )
            bad = True
    if bad or o.diag_bars is None or o.diag_dia is None:
        return bad
    n, db = int(o.diag_bars), float(o.diag_dia)
    across = math.ceil(n / 2)
    fit = o.stirrup_dia or 0.0
    crowded = False
    for i in range(rng[0], rng[1] + 1):
        w = runs[(i, o.wall_id)]
        room = w.thickness - 2.0 * w.cover
        need = (2 * across - 1) * db
        if need > room + 1e-9 and not crowded:
            # a warning, like a wall whose cover and bars overfill it: the design still runs
            f.warning(
                t.name,
                c("diag_bars"),
                f"found {n} bars of {db:g} mm per diagonal group: {across} side by side need "
                f"{need:g} mm but wall {o.wall_id!r} leaves {room:g} mm inside its cover at "
                f"{storeys[i].name}; check the bars fit",
            )
            crowded = True
        depth = (storeys[i].height - o.head) * 1000.0
        a_g = w.cover + fit + 1.5 * db
        if depth <= 2.0 * a_g:
            f.error(
                t.name,
                c("diag_dia"),
                f"found {db:g} mm diagonal bars: their groups need a lintel deeper than "
                f"2 x {a_g:g} mm, but the lintel at {storeys[i].name} is {depth:.0f} mm deep; "
                "expected smaller bars (or no diagonal bars)",
            )
            return True
    return False


def _geometry(
    storeys: list[Storey], walls: list[WallRun], openings: list[Opening], f: Findings, complete: bool
) -> geometry.Geometry | None:
    """Piers and lintels of the rows that parsed, so that member IDs on the action sheets are
    checked in the same pass as a typing error elsewhere (issue 12). None where where a wall
    stands is not known (no storeys or walls, or wall storey ranges that overlap or leave gaps)."""
    if not storeys or not walls or _ranges_unsound(f):
        return None
    if complete:
        geom = geometry.derive(storeys, walls, openings)
    else:
        try:  # partial input: a derivation that trips over it only costs the member-ID check
            geom = geometry.derive(storeys, walls, openings)
        except Exception:  # noqa: BLE001
            return None
    _pier_warnings(geom, f)
    return geom


def _ranges_unsound(f: Findings) -> bool:
    """Walls-sheet storey ranges that overlap or leave gaps: where a wall stands is not known."""
    return any(
        e.sheet == layout.WALLS.name and ("overlap" in e.message or "no row for" in e.message)
        for e in f.errors
    )


def _refused_opening_walls(df: pd.DataFrame | None, accepted: list[Opening]) -> set[str]:
    """Walls with an opening row that was refused or skipped: their piers are not known."""
    if df is None or df.empty:
        return set()
    rows = {o.row for o in accepted}
    return {w for w, r in zip(df.wall_id, df.row, strict=True) if r not in rows and w is not None}


def _pier_warnings(geom: geometry.Geometry, f: Findings) -> None:
    thin = geom.piers[(geom.piers.position > 0) & (geom.piers.Lw < geom.piers.tw)]
    for rec in thin.drop_duplicates("pier_id").itertuples(index=False):
        f.warning(
            layout.OPENINGS.name,
            None,
            f"pier {rec.pier_id} is {rec.Lw:.0f} mm long, shorter than the wall is thick "
            f"({rec.tw:.0f} mm) at {rec.storey}: check the opening positions",
        )


def _member_actions(
    df: pd.DataFrame | None, storeys: list[Storey], geom, f: Findings, unsound: set[str] | None = None
) -> pd.DataFrame:
    """Member-action rows checked against the storeys and the derived members. `unsound`: walls
    whose rows or openings were refused (their piers are not known: their members are not
    judged in this pass); None: the walls sheet did not parse (no member is judged)."""
    t = layout.MEMBER_ACTIONS
    empty = pd.DataFrame(columns=["row", *t.keys])
    if df is None:
        return empty
    index = {s.name for s in storeys}
    members = geom.members_at() if geom is not None else None
    walls_of = dict(zip(geom.piers.pier_id, geom.piers.wall_id, strict=True)) if geom is not None else {}
    seen: dict[tuple, int] = {}
    given: dict[tuple, int] = {}
    rows = df[["row", "storey", "combination", "member"]]
    if members is not None:
        rows = rows[_suspect_action_rows(rows, index, members, walls_of)]
    for rec in rows.itertuples(index=False):
        if not _missing(rec.storey) and index and rec.storey not in index:
            f.error(
                t.name,
                _at(df, "storey", rec.row),
                f"found {show(rec.storey)}; expected a storey name from the {layout.STOREYS.name} sheet"
                + suggest(rec.storey, index),
            )
            continue
        # a blank key cell reads as None or NaN; its own finding ("blank; expected ...") comes
        # with the cell's type, so it draws no second one here ("found nan; no such ...")
        if _missing(rec.storey, rec.member, rec.combination) or members is None:
            continue
        here = members.get(rec.storey, set())
        if rec.member not in here and not _of_unsound_wall(rec.member, unsound):
            listed = ", ".join(sorted(here, key=geometry._natural)[:12])
            f.error(
                t.name,
                _at(df, "member", rec.row),
                f"found {show(rec.member)}; no such wall, pier or lintel at storey {rec.storey}"
                + (suggest(rec.member, here) or f" (members there: {listed})"),
            )
            continue
        key = (rec.storey, rec.combination, rec.member)
        if key in seen:
            f.error(
                t.name,
                _at(df, "member", rec.row),
                f"{rec.member} at {rec.storey} for {rec.combination!r} is also given in row "
                f"{seen[key]}; expected one row per storey, combination and member",
            )
            continue
        seen[key] = rec.row
        wall = walls_of.get(rec.member, rec.member)
        level = "wall" if wall == rec.member else "pier"
        other = given.get((rec.storey, rec.combination, wall, "pier" if level == "wall" else "wall"))
        if other is not None:
            f.error(
                t.name,
                _at(df, "member", rec.row),
                f"wall {wall} at {rec.storey} for {rec.combination!r} has actions both for the "
                f"whole wall and for its piers (row {other}); expected one or the other",
            )
            continue
        given.setdefault((rec.storey, rec.combination, wall, level), rec.row)
    if geom is not None and not df.empty:
        members = set(df.member.unique())
        covered = members | {walls_of.get(m) for m in members}
        missing = sorted(set(geom.piers.wall_id) - covered, key=geometry._natural)
        if missing:
            f.warning(t.name, None, "no actions for wall(s) " + ", ".join(missing) + ": they are not checked")
    return df


def _of_unsound_wall(member: str, unsound: set[str] | None) -> bool:
    """A member named after a wall that is not fully known (`W3`, `W3-1`, `W3-L1` of `W3`)."""
    if unsound is None:
        return True
    return any(member == w or str(member).startswith(f"{w}-") for w in unsound)


def _suspect_action_rows(rows: pd.DataFrame, index: set, members: dict, walls_of: dict) -> np.ndarray:
    """Rows that may draw an error (unknown storey or member, a repeated storey x combination x
    member, a wall given both whole and by piers), found column-wise, so that the row-by-row
    messages run on those alone. Repeats and mixed walls are marked with every row of their
    group, so the messages (which name the earlier row) come out as for the whole table."""
    known = rows.storey.isin(list(index)) | rows.storey.isna()
    pairs = pd.MultiIndex.from_tuples([(st, m) for st, ms in members.items() for m in ms])
    valid = pd.MultiIndex.from_arrays([rows.storey, rows.member]).isin(pairs)
    blank = rows[["storey", "combination", "member"]].isna().any(axis=1).to_numpy()
    storey, combination = _codes(rows.storey), _codes(rows.combination)
    member, names = pd.factorize(rows.member, use_na_sentinel=True)
    group = _group_ids(storey, combination, (member.astype(np.int64) + 1, len(names) + 1))
    repeated = np.bincount(group)[group] > 1  # a storey x combination x member given twice
    # each member's wall (itself when it is a wall or unknown) and whether it is that wall,
    # found once per distinct name; a blank member: no wall, not a wall
    walls = [walls_of.get(n, n) for n in names]
    of_wall = np.flatnonzero([w == n for w, n in zip(walls, names, strict=True)])
    level = np.isin(member, of_wall)
    wall_codes, wall_names = pd.factorize(np.array(walls, dtype=object))
    wall = np.where(member >= 0, wall_codes[member] + 1, 0) if len(names) else np.zeros(len(member), np.int64)
    group = _group_ids(storey, combination, (wall.astype(np.int64), len(wall_names) + 1))
    size, whole = np.bincount(group), np.bincount(group, weights=level)
    mixed = ((whole > 0) & (whole < size))[group]  # a wall given both whole and by its piers
    return ~known.to_numpy() | (~valid & ~blank) | repeated | mixed


def _codes(col: pd.Series) -> tuple[np.ndarray, int]:
    """A column's values as integer codes 0..n-1 and n, missing values one code of their own (as
    `duplicated` and a group-by with dropna=False take them): groups are then found by
    `np.bincount` on numbers, not by hashing the text of 360 000 action rows three times over."""
    codes, uniques = pd.factorize(col, use_na_sentinel=True)
    return codes.astype(np.int64) + 1, len(uniques) + 1


def _group_ids(*columns: tuple[np.ndarray, int]) -> np.ndarray:
    """Codes 0..g-1 of the distinct combinations of the columns' codes, row by row."""
    key, _ = columns[0]
    for codes, n in columns[1:]:
        key = pd.factorize(key * n + codes)[0]  # below (rows + 1) ** 2: no overflow
    return key


def _unit_centre(w: pd.DataFrame) -> tuple[float, float] | None:
    """Centre of rigidity of walls with equal stiffness, or None when they cannot resist shear
    in both directions and torsion (all parallel or all meeting at one point)."""
    st = diaphragm.Storey(
        np.ones(len(w)),
        w.ux.to_numpy(),
        w.uy.to_numpy(),
        (w.wx + w.ux * w.wall_length / 2).to_numpy(),
        (w.wy + w.uy * w.wall_length / 2).to_numpy(),
    )
    try:
        return diaphragm.centre_of_rigidity(st)
    except diaphragm.Unstable:
        return None


def _plan_key(w: pd.DataFrame) -> bytes:
    """The numbers `_unit_centre` reads, as bytes: walls with the same bytes have the same
    centre (the same arithmetic on the same numbers), whichever storey they stand at."""
    columns = ("ux", "uy", "wx", "wy", "wall_length")
    return np.column_stack([w[c].to_numpy(dtype=float) for c in columns]).tobytes()


def _stable_storeys(df: pd.DataFrame, geom, f: Findings) -> None:
    """Core actions need, in every core they reach, walls that resist both shear directions and
    torsion on their own at that storey (a core gets its share of the storey shear at its own
    centre of rigidity and shares it among its walls by a rigid floor). A row naming a core
    reaches that core; a blank one reaches every core at the storey."""
    walls = geom.piers.drop_duplicates(["storey", "wall_id"])
    walls_at = dict(tuple(walls.groupby("storey", sort=False)))
    rows = df.dropna(subset=["storey"])
    rows = rows.assign(core=rows.core.fillna(""))
    centre: dict[tuple[str, str], tuple[float, float] | None] = {}
    by_plan: dict[bytes, tuple[float, float] | None] = {}
    reported: set[tuple[str, str]] = set()
    for rec in rows.drop_duplicates(["storey", "core"]).itertuples(index=False):
        here = walls_at.get(rec.storey)
        if here is None:
            continue
        cores = [rec.core] if rec.core else list(dict.fromkeys(here.core))
        for core in cores:
            w = here[here.core == core]
            key = (rec.storey, core)
            if w.empty or key in reported:
                continue
            if key not in centre:
                same = _plan_key(w)  # storeys of one plan (most of a tower) share the answer
                if same not in by_plan:
                    by_plan[same] = _unit_centre(w)
                centre[key] = by_plan[same]
            if centre[key] is not None:
                continue
            reported.add(key)
            if not core:  # a building without core IDs: today's words
                f.error(
                    layout.CORE_ACTIONS.name,
                    _at(df, "storey", rec.row),
                    f"the walls at storey {rec.storey} ({', '.join(w.wall_id)}) cannot resist shear in "
                    "both directions and torsion (all parallel or all meeting at one point); expected "
                    "member actions for this storey instead of core actions",
                )
            else:
                f.error(
                    layout.CORE_ACTIONS.name,
                    _at(df, "storey", rec.row),
                    f"the walls of core {core!r} at storey {rec.storey} ({', '.join(w.wall_id)}) "
                    "cannot resist shear in both directions and torsion on their own (all parallel "
                    "or all meeting at one point), and this row gives that core actions; expected "
                    "walls that brace each other in every core that gets actions (or those walls in "
                    "one core with others), or member actions for this storey",
                )
        if not rec.core and len(cores) > 1:
            points = [centre.get((rec.storey, c)) for c in cores]
            if all(p is not None for p in points) and np.ptp(np.array(points), axis=0).max() < 1e-3:
                f.error(
                    layout.CORE_ACTIONS.name,
                    _at(df, "storey", rec.row),
                    f"the cores at storey {rec.storey} ({', '.join(map(repr, cores))}) have their "
                    "centres of rigidity at one point, so the floor's rotation is not resisted when "
                    "the building's actions are shared among them; expected actions per core "
                    "(name the core in each row)",
                )


def _core_names(df: pd.DataFrame, geom, f: Findings) -> None:
    """A core named in a core-actions row must be a core of the walls sheet; a storey and
    combination takes either the building's resultants (blank core) or rows per core."""
    t = layout.CORE_ACTIONS
    core = df.core.fillna("")
    if not (core != "").any():
        return
    known = set(geom.piers.core) - {""} if geom is not None else None
    blank_pairs = {
        (s, c) for s, c, k in zip(df.storey, df.combination, core, strict=True) if k == "" and s is not None
    }
    for rec, name in zip(df[["row", "storey", "combination"]].itertuples(index=False), core, strict=True):
        if not name:
            continue
        if known is not None and name not in known:
            expected = (
                "a core named on the walls sheet (" + ", ".join(sorted(map(repr, known))) + ")"
                if known
                else "blank: the walls sheet names no cores (give walls a core ID first)"
            )
            f.error(
                t.name,
                _at(df, "core", rec.row),
                f"found {show(name)}; expected {expected}" + (suggest(name, known) if known else ""),
            )
        elif (rec.storey, rec.combination) in blank_pairs:
            f.error(
                t.name,
                _at(df, "core", rec.row),
                f"core {name!r} has its own row at {rec.storey} for {rec.combination!r}, and a row "
                "with a blank core gives the building's resultants there too; expected one or the other",
            )


def _core_actions(df: pd.DataFrame | None, storeys: list[Storey], geom, f: Findings) -> pd.DataFrame:
    t = layout.CORE_ACTIONS
    if df is None:
        return pd.DataFrame(columns=["row", *t.keys])
    if "core" not in df:
        df = df.assign(core=None)
    df["core"] = df.core.where(df.core.notna(), "").astype(object)  # blank: the building's row
    n_errors = len(f.errors)
    _core_names(df, geom, f)
    if geom is not None and len(f.errors) == n_errors:
        _stable_storeys(df, geom, f)
    index = {s.name for s in storeys}
    seen: dict[tuple, int] = {}
    for rec in df[["row", "storey", "combination", "core"]].itertuples(index=False):
        if not _missing(rec.storey) and index and rec.storey not in index:
            f.error(
                t.name,
                _at(df, "storey", rec.row),
                f"found {show(rec.storey)}; expected a storey name from the {layout.STOREYS.name} sheet"
                + suggest(rec.storey, index),
            )
            continue
        key = (rec.storey, rec.combination, rec.core or "")
        if not _missing(*key) and key in seen:
            of = f" for core {rec.core!r}" if rec.core else ""
            f.error(
                t.name,
                _at(df, "combination", rec.row),
                f"{rec.combination!r} at {rec.storey}{of} is also given in row {seen[key]}; "
                "expected one row per storey and combination" + (" and core" if rec.core else ""),
            )
        seen.setdefault(key, rec.row)
    return df


def _combination_warnings(member: pd.DataFrame, core: pd.DataFrame, f: Findings) -> None:
    """Combination names that differ only by case or spacing (likely one combination typed two
    ways), and combinations given at some storeys only (over both action sheets)."""
    frames = [d[["storey", "combination"]] for d in (member, core) if len(d)]
    if not frames:
        return
    both = pd.concat(frames, ignore_index=True).dropna().drop_duplicates()  # pairs are what count
    names = sorted(set(both.combination))
    groups: dict[str, list[str]] = defaultdict(list)
    for n in names:
        groups[re.sub(r"\s+", "", str(n)).lower()].append(n)
    for spelled in groups.values():
        if len(spelled) > 1:
            f.warning(
                layout.MEMBER_ACTIONS.name,
                None,
                "combinations " + ", ".join(repr(n) for n in spelled) + " differ only by case or "
                "spacing; xlcore treats them as different combinations (use one spelling if they are one)",
            )
    storeys = set(both.storey)
    at = both.groupby("combination").storey.agg(lambda s: set(s))
    for name, where in at.items():
        if where != storeys:
            missing = sorted(storeys - where)
            f.warning(
                layout.MEMBER_ACTIONS.name,
                None,
                f"combination {name!r} is given at {len(where)} of {len(storeys)} storeys (not at "
                f"{', '.join(missing[:6])}{' ...' if len(missing) > 6 else ''}): those storeys are "
                "not checked for it",
            )
