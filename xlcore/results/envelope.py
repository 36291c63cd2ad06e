"""The summary's envelope: per storey x pier the governing check and combination, with the
compliance checks beside it; the worst per check and the counts above the summary. Result
tables made from the checks' tables (no check runs here)."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np
import pandas as pd

from xlcore import geometry, results
from xlcore.checks.advice import AXIAL_CHECK, cheapest_fixes


def pier_checks(
    shear: pd.DataFrame,
    axial: pd.DataFrame,
    detailing: pd.DataFrame,
    section14: pd.DataFrame | None,
    order: pd.DataFrame,
    cand: Candidates | None = None,
) -> pd.DataFrame:
    """Per storey x pier x check the worst row of each check the summary envelopes (shear,
    axial + bending, Cl 11.5, detailing, Section 14: its pass / FAIL rules), in the order of
    `order` (storey, pier_id) and of `UTIL_COLUMN`: storey, pier_id, check, key (the check's
    summary column, the same name whatever the standard calls the check), util, status,
    clause, combination, structural (False for the compliance checks). `cand`: `candidates` of
    the same tables, where the caller made them for `envelope` too."""
    cand = cand if cand is not None else candidates(shear, axial, detailing, section14)
    u = pd.to_numeric(cand.rows.util, errors="coerce").to_numpy(dtype=float)
    finite = np.isfinite(u)
    if cand.codes is not None:  # each group's worst row by position: no copy of every row
        g, c, names = cand.codes
        rows = np.flatnonzero(finite)
        win = rows[_first_max(u[rows], (g * len(names) + c)[rows])]
        cand = cand.rows.iloc[win]
        cand = cand.assign(util=cand.util.astype(float))
    elif len(cand := cand.rows[finite]):
        cand = cand.assign(util=cand.util.astype(float))
        cand = cand.loc[cand.groupby(["storey", "pier_id", "check"], sort=False).util.idxmax()]
    key = [UTIL_COLUMN.get(c, c) for c in cand.check]
    cand = cand.assign(key=key, structural=~cand.check.isin(COMPLIANCE))
    at = order[["storey", "pier_id"]].drop_duplicates().reset_index(drop=True)
    rank = {c: i for i, c in enumerate(UTIL_COLUMN)}
    out = at.assign(_pos=np.arange(len(at))).merge(cand, on=["storey", "pier_id"], how="inner")
    out = out.assign(_check=out.check.map(rank).fillna(len(rank)))
    out = out.sort_values(["_pos", "_check"], kind="stable").drop(columns=["_pos", "_check"])
    cols = ["storey", "pier_id", "check", "key", "util", "status", "clause", "combination", "structural"]
    return out[cols].reset_index(drop=True)


def with_cheapest_fix(summary: pd.DataFrame, advice: pd.DataFrame) -> pd.DataFrame:
    """Name the cheapest passing change beside each failing pier in the summary (its own
    change or its pour's grade: `advice.cheapest_fixes`)."""
    out = summary.copy()
    out["fix"] = ""
    if len(advice):
        text = cheapest_fixes(advice)
        out["fix"] = [text.get((a, b), "") for a, b in zip(out.storey, out.pier_id, strict=True)]
        none = (out.status == results.FAIL) & (out.fix == "")
        out.loc[none, "fix"] = "no change or pair of changes in the search range passes"
    return out


def count_lines(
    summary: pd.DataFrame, shear: pd.DataFrame, special: bool = False, sym: Mapping[str, str] | None = None
) -> list[tuple[str, object]]:
    """The summary's counts; `sym` the standard's `Standard.symbols` (AS 3600's words without)."""
    detailing = (sym or {}).get("detailing_rules", "Cl 11.7")
    checked = summary[summary.status != results.NOT_CHECKED]
    worst = checked.loc[checked.util.idxmax()] if len(checked) else None
    lines: list[tuple[str, object]] = [
        ("Pier x storey cases", len(summary)),
        ("Passing", int((summary.status == results.PASS).sum())),
        ("Failing", int((summary.status == results.FAIL).sum())),
        ("Not checked", int((summary.status == results.NOT_CHECKED).sum())),
        ("Rows checked (pier x storey x combination)", len(shear)),
    ]
    if worst is not None:
        lines.append(
            (
                "Building's worst pier",
                f"{worst.pier_id} at {worst.storey}, {worst.combination}: "
                f"utilisation {worst.util:.3f} ({worst.check}, {worst.clause})",
            )
        )
    failing = int((summary.detailing.str.startswith(results.FAIL)).sum())
    lines.append((f"Detailing {detailing} failing", failing))
    lines.append(
        (
            "Earthquake ACI 318 Ch. 18 failing" if special else "Earthquake Section 14 failing",
            int((summary.section14.str.startswith(results.FAIL)).sum()),
        )
    )
    return lines


@dataclass(frozen=True)
class Candidates:
    """Every check's rows in one shape (`_candidates`) with their integer codes (`_codes`),
    made once for both `envelope` and `pier_checks` (the L tower: 720 000 rows)."""

    rows: pd.DataFrame
    codes: tuple[np.ndarray, np.ndarray, np.ndarray] | None


def _worst_at(util: pd.Series, by) -> pd.Series:
    """Index label of each group's largest utilisation, groups in order of first appearance.
    NaN never wins; a group with no number at all gives its first row (its utilisation stays
    NaN in the table) where pandas 3's idxmax refuses an all-NaN group with a ValueError."""
    return util.astype(float).fillna(-np.inf).groupby(by, sort=False).idxmax()


def candidates(
    shear: pd.DataFrame,
    axial: pd.DataFrame | None,
    detailing: pd.DataFrame | None,
    section14: pd.DataFrame | None = None,
) -> Candidates:
    """The summary's candidates of the checks' tables, for `envelope` and `pier_checks`."""
    rows = _candidates(
        shear,
        axial if axial is not None else pd.DataFrame(),
        detailing if detailing is not None else pd.DataFrame(),
        section14,
    )
    return Candidates(rows, _codes(rows) if len(rows) else None)


def _candidates(
    shear: pd.DataFrame, axial: pd.DataFrame, detailing: pd.DataFrame, section14: pd.DataFrame | None = None
) -> pd.DataFrame:
    """Every check's rows in one shape: storey, pier, check, combination, demand, capacity, U."""
    cols = [
        "storey",
        "pier_id",
        "check",
        "combination",
        "demand",
        "capacity",
        "unit",
        "util",
        "status",
        "clause",
        "note",
        "check_no",
    ]
    parts = [
        shear.assign(
            check=CHECK_SHEAR,
            check_no=CHECKS.index(CHECK_SHEAR),
            demand=shear.v.abs(),
            capacity=shear.phi_vu,
            unit="kN",
            note=shear.advice,
        )[cols]
    ]
    if len(axial):
        parts.append(
            axial.assign(
                check=CHECK_NM,
                check_no=CHECKS.index(CHECK_NM),
                demand=axial.m_design,
                capacity=axial.m_ray,  # M where the ray from the origin meets the curve
                unit="kNm",
                note=axial.governs,
            )[cols]
        )
        s = axial[axial.status_s != results.NOT_APPLICABLE]
        parts.append(
            s.assign(
                check=CHECK_SIMPLIFIED,
                check_no=CHECKS.index(CHECK_SIMPLIFIED),
                demand=s.n_end,  # N* at the pier's more compressed end, per length x Lw
                capacity=s.phi_nu_s,
                unit="kN",
                util=s.util_s,
                status=s.status_s,
                clause=s.clause_s if "clause_s" in s else "Cl 11.5.1",
                note="",
            )[cols]
        )
    if len(detailing):
        parts.append(
            detailing.assign(
                check=CHECK_DETAILING,
                check_no=CHECKS.index(CHECK_DETAILING),
                combination="(all)",
                demand=detailing.value,
                capacity=detailing.limit,
                note=detailing.rule,
            )[cols]
        )
    if section14 is not None and len(section14):
        # compliance rows only: an end zone required is a trigger, "check" a requirement that
        # cannot be verified yet; neither is a pass or a failure
        e = section14[section14.status.isin((results.PASS, results.FAIL))]
        parts.append(
            e.assign(
                check=CHECK_SECTION14,
                check_no=CHECKS.index(CHECK_SECTION14),
                combination="(all)",
                demand=e.value,
                capacity=e.limit,
                note=e.rule,
            )[cols]
        )
    return pd.concat(parts, ignore_index=True)


CHECK_SHEAR, CHECK_NM, CHECK_SIMPLIFIED = "in-plane shear", AXIAL_CHECK, "Cl 11.5 compression"


CHECK_DETAILING = "detailing Cl 11.7"


CHECK_SECTION14 = "earthquake Section 14"


CHECKS = (CHECK_SHEAR, CHECK_NM, CHECK_SIMPLIFIED, CHECK_DETAILING, CHECK_SECTION14)  # `check_no` of each


COMPLIANCE = (CHECK_DETAILING, CHECK_SECTION14)  # reported beside the governing check, never it


UTIL_COLUMN = {
    CHECK_SHEAR: "u_shear",
    CHECK_NM: "u_nm",
    CHECK_SIMPLIFIED: "u_simplified",
    CHECK_DETAILING: "u_detailing",
    CHECK_SECTION14: "u_section14",
}


def envelope(
    shear: pd.DataFrame,
    piers: pd.DataFrame,
    axial: pd.DataFrame | None = None,
    detailing: pd.DataFrame | None = None,
    section14: pd.DataFrame | None = None,
    earthquake: str = "Section 14",
    cand: Candidates | None = None,
) -> pd.DataFrame:
    """Governing structural check and worst combination per storey x pier, with each check's
    worst utilisation beside it; piers without actions are listed as not checked.

    Detailing (Cl 11.7) and earthquake detailing (Section 14) are compliance, not strength:
    each is reported beside the structural result as pass/FAIL with its ratio and makes the
    status FAIL, but never becomes the governing check, whose utilisation is the one the
    engineer needs to see. A Section 14 requirement xlcore cannot verify (end-zone bars not
    described) shows as 'check' beside it. `earthquake` names the earthquake rules in the notes
    (the standard's `symbols["earthquake_rules"]`). `cand`: `candidates` of the same tables,
    where the caller makes them once for `pier_checks` too."""
    cols = [c.key for c in results.SUMMARY_COLUMNS]
    cand = cand if cand is not None else candidates(shear, axial, detailing, section14)
    cand, codes = cand.rows, cand.codes
    keys = ["storey", "pier_id"]
    if codes is not None:
        # the fast path (integer codes for storey x pier x check, a numpy table of maxima, each
        # pier's worst row by position); the same table as the pivot below, which factorised
        # the text keys over and over
        g, c, names = codes
        rows = np.flatnonzero(~np.isin(names, COMPLIANCE)[c])
        worst = cand.iloc[:0]
        if len(rows):
            u = cand.util.astype(float).to_numpy()[rows]
            win = rows[_first_max(np.where(np.isnan(u), -np.inf, u), g[rows])]  # as `_worst_at`
            per_check = _max_per_check(cand.util.to_numpy(dtype=float), g, c, len(names))
            worst = cand.iloc[win].reset_index(drop=True).assign(
                **{UTIL_COLUMN.get(n, n): per_check[g[win], j] for j, n in enumerate(names)}
            )
    else:
        worst = cand[~cand.check.isin(COMPLIANCE)] if len(cand) else cand
        if len(worst):
            worst = worst.loc[_worst_at(worst.util, [worst[k] for k in keys])]
            per_check = cand.pivot_table(index=keys, columns="check", values="util", aggfunc="max")
            per_check = per_check.rename(columns=UTIL_COLUMN).reset_index()
            worst = worst.merge(per_check, on=keys, how="left")
    order = piers[["storey", "storey_index", "pier_id", "wall_id", "position"]]
    table = order.merge(worst, on=keys, how="left")
    for c in UTIL_COLUMN.values():
        if c not in table:
            table[c] = np.nan
    missing = table.u_shear.isna()  # no actions: strength not checked, whatever detailing says
    table.loc[missing, ["status", "check", "combination", "clause"]] = [results.NOT_CHECKED, "", "", ""]
    table.loc[missing, ["util", "demand", "capacity"]] = np.nan
    table.loc[missing, "note"] = "no actions for this pier or its wall at this storey (detailing only)"
    checked = ~missing.to_numpy()
    notes = [table.note.fillna("").astype(str).to_numpy()]
    to_check = _section14_checks(section14, table[keys])
    for check, text_col, util_col, label in (
        (CHECK_DETAILING, "detailing", "u_detailing", "detailing fails: "),
        (CHECK_SECTION14, "section14", "u_section14", f"{earthquake} fails: "),
    ):
        u, fails, rule = _compliance(cand, table[keys], check, codes)
        table[util_col] = u
        text = np.array(
            [
                "" if not np.isfinite(x) else f"{results.FAIL if bad else results.PASS} {x:.2f}"
                for x, bad in zip(u, fails, strict=True)
            ],
            dtype=object,
        )
        if check == CHECK_SECTION14:
            text = np.array(
                [
                    ", ".join(x for x in (t, results.CHECK if c else "") if x)
                    for t, c in zip(text, to_check, strict=True)
                ],
                dtype=object,
            )
        table[text_col] = text
        table.loc[checked & fails, "status"] = results.FAIL
        notes.append(np.where(fails, label + rule, ""))
    notes.append(np.where(to_check, f"{earthquake}: end-zone ties to check (bars not described)", ""))
    table["note"] = [
        "; ".join(x for x in parts if x) for parts in zip(*(n.tolist() for n in notes), strict=True)
    ]
    table = table.sort_values(
        ["storey_index", "wall_id", "position"],
        ascending=[False, True, True],
        key=lambda c: geometry.natural_rank(c) if c.name == "wall_id" else c,
    )
    table["util"] = table.util.astype(float)
    table["fix"] = ""  # filled by with_cheapest_fix once the advice search has run
    return table[cols].reset_index(drop=True)


def _first_max(u: np.ndarray, g: np.ndarray) -> np.ndarray:
    """Position of each group's largest `u` (the first of equal ones), groups in order of first
    appearance: what `groupby(g, sort=False).idxmax()` gives on positions, `u` without NaN
    (`results.first_max`: two passes, no sort)."""
    return results.first_max(u, g)


def _codes(cand: pd.DataFrame) -> tuple[np.ndarray, np.ndarray, np.ndarray] | None:
    """Integer codes of the candidates' storey x pier (numbered in order of first appearance,
    as `groupby(sort=False)` numbers them) and of their check (`check_no`), with the check
    names (`CHECKS`): grouping by them groups as by the text columns, without factorising the
    text again for every group-by. None where a key is missing (NaN), which a group-by by the
    text would drop (the caller then takes the general path)."""
    # on the columns' object arrays: half the time of factorising the text columns themselves
    s, _ = pd.factorize(cand.storey.to_numpy())
    p, pier = pd.factorize(cand.pier_id.to_numpy())
    c = cand.check_no.to_numpy(dtype=np.int64)  # set with the check's name in `_candidates`
    if (s < 0).any() or (p < 0).any():
        return None
    g, _ = pd.factorize(s.astype(np.int64) * max(len(pier), 1) + p)
    return g, c, np.asarray(CHECKS, dtype=object)


def _max_per_check(u: np.ndarray, g: np.ndarray, c: np.ndarray, n_checks: int) -> np.ndarray:
    """Per storey x pier code (row) and check code (column) the largest utilisation, NaN
    ignored and NaN where a pair has no finite value (as the pivot's 'max' and group-by max)."""
    out = np.full((int(g.max()) + 1 if len(g) else 0, n_checks), -np.inf)
    ok = ~np.isnan(u)
    np.maximum.at(out, (g[ok], c[ok]), u[ok])
    seen = np.zeros(out.shape, dtype=bool)
    seen[g[ok], c[ok]] = True
    out[~seen] = np.nan
    return out


def _compliance(
    cand: pd.DataFrame, at: pd.DataFrame, check: str, codes: tuple | None = None
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per row of `at` (storey, pier): the worst utilisation of a compliance check's rules,
    whether any fails, and the worst rule's name (NaN, False, '' where it has no rows).
    `codes` (`_codes(cand)`) group by integers instead of the text keys (the same groups)."""
    keys = ["storey", "pier_id"]
    if codes is not None:
        mine = codes[1] == CHECKS.index(check)
        rows, g = cand[mine], codes[0][mine]
    else:
        rows, g = (cand[cand.check == check] if len(cand) else cand), None
    if not len(rows):
        n = len(at)
        return np.full(n, np.nan), np.zeros(n, dtype=bool), np.full(n, "", dtype=object)
    at_worst = _worst_at(rows.util, [rows[k] for k in keys] if g is None else g)
    worst = rows.loc[at_worst][[*keys, "util", "note"]]
    failing = (rows.status == results.FAIL).to_numpy()
    if g is None:
        fails = rows[failing].groupby(keys, sort=False).size().rename("n_fail").reset_index()
    else:  # one row of keys per failing storey x pier, with its count (the same table)
        _, first, n = np.unique(g[failing], return_index=True, return_counts=True)
        fails = rows[failing][keys].iloc[first].assign(n_fail=n)
    m = at.merge(worst, on=keys, how="left").merge(fails, on=keys, how="left")
    return (
        m.util.to_numpy(dtype=float),
        m.n_fail.fillna(0).to_numpy() > 0,
        m.note.fillna("").astype(str).to_numpy(),
    )


def _section14_checks(section14: pd.DataFrame | None, at: pd.DataFrame) -> np.ndarray:
    """Per row of `at`: whether a Section 14 requirement awaits checking (status 'check')."""
    if section14 is None or not len(section14):
        return np.zeros(len(at), dtype=bool)
    open_ = section14[section14.status == results.CHECK][["storey", "pier_id"]].drop_duplicates()
    m = at.merge(open_.assign(_c=True), on=["storey", "pier_id"], how="left")
    return m._c.eq(True).to_numpy()


def attention_first(summary: pd.DataFrame) -> pd.DataFrame:
    """The summary as the checker reads it: failing piers first, then the rest from the
    nearest to failing down, piers without actions last (storey order within ties)."""
    rank = np.select(
        [summary.status == results.FAIL, summary.status == results.NOT_CHECKED], [0, 2], default=1
    )
    u = summary.util.to_numpy(dtype=float)
    key = pd.DataFrame({"rank": rank, "u": -np.nan_to_num(u, nan=-np.inf, posinf=np.inf), "i": range(len(u))})
    order = key.sort_values(["rank", "u", "i"], kind="stable").index
    return summary.iloc[order].reset_index(drop=True)


def worst_per_check(
    summary: pd.DataFrame,
    lintels: pd.DataFrame | None = None,
    stress: pd.DataFrame | None = None,
    core_nm: pd.DataFrame | None = None,
    sym: Mapping[str, str] | None = None,
) -> list[tuple[str, str]]:
    """The building's worst case of every check, one line each, for the summary's top; `sym` the
    standard's `Standard.symbols` (AS 3600's words without)."""
    sym = sym or {}
    out: list[tuple[str, str]] = []

    def line(label: str, df: pd.DataFrame | None, col: str, what) -> None:
        if df is None or not len(df) or col not in df or not np.isfinite(df[col].to_numpy(float)).any():
            out.append((f"Worst {label}", "not checked (no rows)"))
            return
        u = df[col].to_numpy(dtype=float)
        u = np.where(np.isnan(u), -np.inf, u)
        r = df.iloc[int(np.argmax(u))]
        n_fail = int((u > 1.0).sum())
        verdict = results.FAIL if r[col] > 1.0 else results.PASS
        out.append(
            (f"Worst {label}", f"{r[col]:.3f} {verdict} at {what(r)} ({n_fail} of {len(df)} rows over 1.0)")
        )

    checked = summary[summary.status != results.NOT_CHECKED]
    for label, col in (
        ("in-plane shear", "u_shear"),
        ("axial + bending", "u_nm"),
        (f"{sym.get('simplified', 'Cl 11.5')} compression", "u_simplified"),
        (f"detailing {sym.get('detailing_rules', 'Cl 11.7')}", "u_detailing"),
    ):
        src = checked if col != "u_detailing" else summary
        line(label, src, col, lambda r: f"{r.pier_id}, {r.storey}")
    line("lintel", lintels, "util", lambda r: f"{r.lintel_id} ({r.model}), {r.storey}, {r.combination}")
    if stress is not None:
        line("core elastic stress", stress, "util", lambda r: f"{r.wall_id}, {r.storey}, {r.combination}")
    if core_nm is not None:
        line(
            "core axial + bending",
            core_nm,
            "util",
            lambda r: ", ".join(x for x in (str(r.get("core", "") or ""), r.storey, r.combination) if x),
        )
    return out
