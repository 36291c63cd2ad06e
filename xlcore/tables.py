"""Result tables by name: the one place the Python API, the `--json` output and the PDF report
read a computed run's tables from, so a new result sheet adds in by one entry here.

A table's name is its sheet's name without the common prefix ('shear' for 'Results shear').
Two views of each: the check's own table (column keys as in `results.py`, every internal
column the report needs) and the sheet's view (the declared columns only, headed as printed,
values as the writer writes them), which equals what `workbook.reader.stored_result_sheets`
reads back from the saved workbook.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from xlcore import results
from xlcore.layout import RESULT_PREFIX
from xlcore.results import ResultSheet


def short(sheet_name: str) -> str:
    """'Results shear' -> 'shear' (the name tables go by)."""
    return sheet_name[len(RESULT_PREFIX) :] if sheet_name.startswith(RESULT_PREFIX) else sheet_name


def by_name(sheets: list[ResultSheet]) -> dict[str, ResultSheet]:
    """The result sheets of one run by table name."""
    return {short(s.name): s for s in sheets}


def sheet_view(sheet: ResultSheet) -> pd.DataFrame:
    """The table as its sheet shows it: the declared columns in order, headed `Header [unit]`;
    number columns as floats with NaN where the cell is blank (NaN and infinity are written as
    blanks), text columns as str ('' for blank, True/False as yes/no), as the writer writes."""
    data = {}
    n = len(sheet.table)
    for c in sheet.columns:
        if c.key not in sheet.table:
            data[c.title] = np.full(n, np.nan) if c.fmt else np.full(n, "", dtype=object)
            continue
        col = sheet.table[c.key]
        if c.fmt:
            x = pd.to_numeric(col, errors="coerce").to_numpy(dtype=float)
            data[c.title] = np.where(np.isfinite(x), x, np.nan)
        else:
            data[c.title] = [_text(v) for v in col.tolist()]
    out = pd.DataFrame(data)
    for title, col in out.items():  # no value at all: blank, as the sheet read back shows it
        if not pd.api.types.is_float_dtype(col) and not (col != "").any():
            out[title] = np.full(n, np.nan)
    return out


def _text(v: object) -> object:
    if v is None or (isinstance(v, float) and not np.isfinite(v)):
        return ""
    if isinstance(v, bool | np.bool_):
        return "yes" if v else "no"
    if isinstance(v, int | float | np.integer | np.floating):
        return float(v)
    return str(v)


@dataclass(frozen=True)
class Check:
    """One check as the summaries see it: which table, which utilisation column, and the
    columns that name a case (the member column drawn as one line per member up the height)."""

    label: str
    table: str  # table name (sheet name without the prefix)
    util: str  # utilisation column key
    member: str | None  # pier_id / lintel_id / wall_id; None: one line for the whole core
    ids: tuple[str, ...]  # columns that name the worst case
    working: tuple[str, ...] = ()  # columns holding the expressions with numbers substituted
    inputs: tuple[str, ...] = ()  # columns shown as the inputs of the calculation page
    each: tuple[str, ...] = ()  # demand and capacity columns shown for every combination


# The checks the summaries, `--json` and the report walk through. A table holding a 'util'
# column that is not listed here is added by `checks_of` with its sheet's name as the label.
CHECKS: tuple[Check, ...] = (
    Check(
        "in-plane shear",
        "shear",
        "util",
        "pier_id",
        ("storey", "pier_id", "combination"),
        ("f_vuc", "f_vu", "f_util", "hw_basis", "advice"),
        ("v", "source", "Lw", "tw", "Hw", "hw_lw", "fc", "fsy", "rho_h", "rho_v", "rho_w", "phi"),
        ("v", "phi_vu"),
    ),
    Check(
        "axial + bending",
        "axial-bending",
        "util",
        "pier_id",
        ("storey", "pier_id", "combination"),
        ("f_nm",),
        ("n", "m", "m_out", "m_design", "Lw", "tw", "fc", "as_total", "nuo", "nuot", "nub", "kuo"),
        ("n", "m_design", "n_ray", "m_ray"),
    ),
    Check(
        "Cl 11.5 compression",
        "axial-bending",
        "util_s",
        "pier_id",
        ("storey", "pier_id", "combination"),
        ("f_s",),
        ("n", "m", "m_out", "Lw", "tw", "fc", "k", "hwe", "slender", "e", "ea"),
        ("n", "n_end", "phi_nu_s"),
    ),
    Check(
        "detailing Cl 11.7",
        "detailing",
        "util",
        "pier_id",
        ("storey", "pier_id", "rule"),
        ("working",),
        ("rule", "value", "kind", "limit", "unit"),
    ),
    Check(
        "lintel",
        "lintels",
        "util",
        "lintel_id",
        ("storey", "lintel_id", "combination"),
        ("working",),
        ("span", "depth", "tw", "ratio", "d", "As", "m", "v"),
        ("m", "phi_mu", "v", "phi_vu"),
    ),
    Check(
        "core elastic stress",
        "core stress",
        "util",
        "wall_id",
        ("core", "storey", "wall_id", "combination"),
        ("working",),
        ("sigma_start", "sigma_end", "sigma_max", "sigma_min", "tension", "as_req", "as_prov"),
        ("sigma_max", "sigma_min", "tension", "as_req", "as_prov"),
    ),
    Check(
        "core axial + bending",
        "core N-M",
        "util",
        None,
        ("core", "storey", "combination"),
        ("working",),
        ("n", "mx", "my", "m_res", "phi_mu", "phi_nuo", "phi_nuot"),
        ("n", "mx", "my", "m_res", "phi_mu"),
    ),
)
SKIP = {"summary", "advice"}  # tables whose 'util' is not a check of its own


def checks_of(sheets: dict[str, ResultSheet]) -> list[Check]:
    """The checks present in a run: the listed ones whose table is there, then any other table
    with a utilisation column (a sheet added later shows up without a change here)."""
    out = [c for c in CHECKS if c.table in sheets]
    listed = {c.table for c in CHECKS}
    for name, sh in sheets.items():
        if name in listed or name in SKIP or "util" not in sh.table:
            continue
        keys = [c.key for c in sh.columns]
        ids = tuple(k for k in keys if k in results.ID_KEYS or k == "combination")
        member = next((k for k in ("pier_id", "lintel_id", "wall_id", "member") if k in keys), None)
        work = tuple(k for k in keys if k == "working" or k.startswith("f_"))
        out.append(Check(name, name, "util", member, ids, work))
    return out


def rows_of(check: Check, sheets: dict[str, ResultSheet]) -> pd.DataFrame:
    """The rows of a check's table that carry its utilisation (Cl 11.5 rows where it applies)
    and, where the table has a status, whose status is pass or FAIL: a trigger's ratio (the
    Section 14 end-zone trigger reads 'required', never FAIL) or a 'check' row is not a
    utilisation and must not read as a failure in the worst cases or the charts."""
    t = sheets[check.table].table
    if check.util not in t:
        return t.iloc[0:0]
    u = pd.to_numeric(t[check.util], errors="coerce")
    keep = np.isfinite(u.to_numpy(dtype=float))
    status = "status_s" if check.util == "util_s" else "status"
    if status in t:
        keep &= t[status].isin([results.PASS, results.FAIL]).to_numpy()
    return t[keep]


def worst(check: Check, sheets: dict[str, ResultSheet]) -> pd.Series | None:
    """The row with the highest utilisation of the check (the first of equals), or None."""
    t = rows_of(check, sheets)
    if t.empty:
        return None
    return t.loc[t[check.util].astype(float).idxmax()]


def worst_cases(sheets: dict[str, ResultSheet]) -> list[dict[str, object]]:
    """Every check's worst case as plain data (for `--json` and the report): label, table,
    utilisation, status, the case's IDs, the clause where the table has one, and how many rows
    exceed 1.0 out of how many."""
    out: list[dict[str, object]] = []
    for c in checks_of(sheets):
        rows = rows_of(c, sheets)
        w = worst(c, sheets)
        rec: dict[str, object] = {"check": c.label, "table": c.table}
        if w is None:
            out.append(rec | {"util": None, "status": results.NOT_CHECKED, "rows": 0, "over": 0})
            continue
        u = float(w[c.util])
        rec |= {
            "util": u if np.isfinite(u) else None,  # unrounded: a rounding here would round twice
            "status": results.PASS if u <= 1.0 else results.FAIL,
            "rows": int(len(rows)),
            "over": int((rows[c.util].astype(float) > 1.0).sum()),
        }
        rec |= {k: _plain(w[k]) for k in c.ids if k in w}
        if "clause" in w and c.util == "util":
            rec["clause"] = _plain(w["clause"])
        elif c.util == "util_s":
            rec["clause"] = "Cl 11.5.1"
        out.append(rec)
    return out


def _plain(v: object) -> object:
    if isinstance(v, np.generic):
        v = v.item()
    if isinstance(v, float) and not np.isfinite(v):
        return None
    return v
