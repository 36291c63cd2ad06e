"""One building checked to two design standards, side by side (issue 16 §3).

`pipeline.compute` runs once per standard on the same building and the same actions (only
`settings.standard` differs); each run gives, per storey x pier x check, its worst row
(`pipeline.pier_checks`: the worst combination, or for detailing the worst rule). This module
joins the two on storey, pier and check and says where the standards part: the utilisation
under each, their ratio (second / first), the clause that governs under each, and in a few
lines the building's worst under each standard and where the two differ most.

No workbook code here: the lines are plain (label, text) pairs that `pipeline` puts above the
table, as it does for every result sheet.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd

PASS, FAIL = "pass", "FAIL"  # the statuses of results.py, repeated as data (no import cycle)
KEYS = ["storey", "pier_id", "key"]  # key: the check's role (results column u_shear, u_nm, ...)
SIDE = ["check", "util", "status", "clause", "combination", "structural"]
# the checks' names in words of neither standard (a run labels them with its own clauses);
# a check not listed keeps the name its run gave it
NEUTRAL = {
    "u_shear": "in-plane shear",
    "u_nm": "axial + bending",
    "u_simplified": "simplified compression method",
    "u_detailing": "detailing",
    "u_section14": "earthquake detailing",
}


@dataclass
class Comparison:
    """The two standards' results joined: `table` one row per storey x pier x check, in the
    first run's order (checks made under the second standard only at the end); `lines` the
    building-level findings, for the lines above the table, `--json` and the API."""

    first: str
    second: str
    table: pd.DataFrame
    lines: list[tuple[str, str]] = field(default_factory=list)
    facts: dict[str, object] = field(default_factory=dict)  # the lines' numbers, for --json


def ratio(u_first, u_second) -> np.ndarray:
    """U second / U first; NaN where either is missing or the first is not positive (a pier
    with no demand under the first standard has no ratio worth showing)."""
    a = np.asarray(u_first, dtype=float)
    b = np.asarray(u_second, dtype=float)
    ok = np.isfinite(a) & np.isfinite(b) & (a > 0)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(ok, b / np.where(ok, a, 1.0), np.nan)


def compare(first: pd.DataFrame, second: pd.DataFrame, names: tuple[str, str]) -> Comparison:
    """Join two `pipeline.pier_checks` tables (first standard, second standard).

    Columns of the result: storey, pier_id, check, key, then per side (suffix _a first, _b
    second) u, status, clause, combination; ratio = u_b / u_a; structural (False for the
    compliance checks); note where the verdicts
    differ or a check ran under one standard only."""
    a_name, b_name = names
    a = first[[*KEYS, *SIDE]]
    b = second[[*KEYS, *SIDE]]
    t = a.merge(b, on=KEYS, how="outer", suffixes=("_a", "_b"), sort=False, indicator=True)
    # the first run's order; rows under the second standard only after it, in its order
    order_a = {k: i for i, k in enumerate(zip(*(first[c] for c in KEYS), strict=True))}
    order_b = {k: i for i, k in enumerate(zip(*(second[c] for c in KEYS), strict=True))}
    keys = list(zip(*(t[c] for c in KEYS), strict=True))
    rank = [(0, order_a[k]) if k in order_a else (1, order_b[k]) for k in keys]
    t = t.iloc[sorted(range(len(t)), key=rank.__getitem__)].reset_index(drop=True)
    t["check"] = [
        NEUTRAL.get(k, c) for k, c in zip(t.key, t.check_a.where(t.check_a.notna(), t.check_b), strict=True)
    ]
    t["structural"] = t.structural_a.where(t.structural_a.notna(), t.structural_b).astype(bool)
    t = t.rename(columns={"util_a": "u_a", "util_b": "u_b"})
    t["ratio"] = ratio(t.u_a, t.u_b)
    for c in ("status", "clause", "combination"):
        for s in ("_a", "_b"):
            t[c + s] = t[c + s].fillna("").astype(str)
    note = np.full(len(t), "", dtype=object)
    only_a, only_b = (t._merge == "left_only").to_numpy(), (t._merge == "right_only").to_numpy()
    note[only_a] = f"checked to {a_name} only"
    note[only_b] = f"checked to {b_name} only"
    fail_a, fail_b = (t.status_a == FAIL).to_numpy(), (t.status_b == FAIL).to_numpy()
    both = ~only_a & ~only_b
    note[both & fail_a & ~fail_b] = f"FAIL to {a_name}, passes {b_name}"
    note[both & fail_b & ~fail_a] = f"FAIL to {b_name}, passes {a_name}"
    t["note"] = note
    t = t.drop(columns=["_merge", "check_a", "check_b", "structural_a", "structural_b"])
    facts = _facts(t, names)
    return Comparison(a_name, b_name, t, _lines(t, names, facts), facts)


def _case(r: pd.Series) -> str:
    return f"{r.pier_id}, {r.storey}"


def _worst(t: pd.DataFrame, side: str) -> pd.Series | None:
    """The row with the largest strength utilisation under one side (detailing and Section 14
    are compliance, never the governing case: as the summary's)."""
    u = t["u" + side].to_numpy(dtype=float)
    u = np.where(np.isfinite(u) & t.structural.to_numpy(), u, -np.inf)
    if not len(u) or not np.isfinite(u.max()):
        return None
    return t.iloc[int(np.argmax(u))]


def _facts(t: pd.DataFrame, names: tuple[str, str]) -> dict[str, object]:
    """The numbers behind the lines: per side ('first', 'second') the standard, its worst
    strength case and how many storey x pier cases fail; the case where the two differ most
    (largest |ln ratio|, so 0.5 and 2.0 are as far apart); per check the range of the ratio."""
    out: dict[str, object] = {}
    for side, which, name in (("_a", "first", names[0]), ("_b", "second", names[1])):
        w = _worst(t, side)
        failing = t[t["status" + side] == FAIL][["storey", "pier_id"]].drop_duplicates()
        out[which] = {
            "standard": name,
            "failing": int(len(failing)),
            "worst": None
            if w is None
            else {
                "storey": w.storey,
                "pier_id": w.pier_id,
                "check": w.check,
                "util": float(w["u" + side]),
                "status": w["status" + side],
                "clause": w["clause" + side],
                "combination": w["combination" + side],
            },
        }
    r = t.ratio.to_numpy(dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        spread = np.abs(np.log(np.where(r > 0, r, np.nan)))
    out["differ_most"] = None
    if np.isfinite(spread).any():
        d = t.iloc[int(np.nanargmax(spread))]
        out["differ_most"] = {
            "storey": d.storey,
            "pier_id": d.pier_id,
            "check": d.check,
            "ratio": float(d.ratio),
            "util_first": float(d.u_a),
            "util_second": float(d.u_b),
            "clause_first": d.clause_a,
            "clause_second": d.clause_b,
        }
    per = []
    for check, g in t.groupby("check", sort=False):
        x = g.ratio.to_numpy(dtype=float)
        x = x[np.isfinite(x)]
        judged = g.status_a.isin((PASS, FAIL)) & g.status_b.isin((PASS, FAIL))
        per.append(
            {
                "check": check,
                "cases": int(len(g)),
                "with_ratio": int(len(x)),
                "ratio_min": float(x.min()) if len(x) else None,
                "ratio_median": float(np.median(x)) if len(x) else None,
                "ratio_max": float(x.max()) if len(x) else None,
                "verdicts_differ": int((judged & (g.status_a != g.status_b)).sum()),
            }
        )
    out["per_check"] = per
    return out


def _lines(t: pd.DataFrame, names: tuple[str, str], f: dict[str, object]) -> list[tuple[str, str]]:
    """The findings in words, one (label, text) per line above the table."""
    a, b = names
    lines = [
        (
            "Standards compared",
            f"first {a} (the design standard: the other result sheets are its), second {b}; "
            f"ratio = U {b} / U {a}: above 1 the second standard asks more of the pier",
        ),
        (
            "Method",
            "every check run once to each standard on the same building and the same actions "
            "(only the standard differs); per storey x pier x check the worst combination under "
            "each (detailing and earthquake wall rules: the worst rule), so the two may govern under "
            "different combinations or clauses; settings named for one standard apply to it only",
        ),
        (
            "Actions",
            "the same factored combinations for both (the workbook's, made to one loading "
            "standard); each design standard's phi is calibrated with its own loading standard's "
            "load factors, so a ratio compares the two standards' member rules under one set of "
            "actions, not two complete designs (docs/engineering-basis.md)",
        ),
    ]
    for which in ("first", "second"):
        side = f[which]
        w = side["worst"]
        text = (
            "no strength check made"
            if w is None
            else f"{w['util']:.3f} {w['status']} at {w['pier_id']}, {w['storey']} ({w['check']}, "
            f"{w['clause']}, {w['combination']})"
        )
        lines.append((f"Worst to {side['standard']}", text + f"; {side['failing']} storey x pier cases fail"))
    d = f["differ_most"]
    if d is None:
        lines.append(("Differ most", "no case with a utilisation under both"))
    elif d["ratio"] == 1.0:
        lines.append(("Differ most", "nowhere: every case with a utilisation under both has ratio 1"))
    else:
        lines.append(
            (
                "Differ most",
                f"ratio {d['ratio']:.3f} at {d['pier_id']}, {d['storey']}, {d['check']}: "
                f"{d['util_first']:.3f} to {a} ({d['clause_first']}) against {d['util_second']:.3f} "
                f"to {b} ({d['clause_second']})",
            )
        )
    for p in f["per_check"]:
        if p["with_ratio"]:
            text = (
                f"{p['ratio_min']:.3f} to {p['ratio_max']:.3f}, median {p['ratio_median']:.3f} "
                f"over {p['with_ratio']} storey x pier cases"
            )
        else:
            text = f"none ({p['cases']} cases, none with a utilisation under both)"
        if p["verdicts_differ"]:
            text += f"; pass / FAIL differ in {p['verdicts_differ']}"
        lines.append((f"Ratio, {p['check']}", text))
    return lines
