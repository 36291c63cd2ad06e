"""The summary's envelope: per storey x pier the governing check and combination, with the
compliance checks beside it; the worst per check and the counts above the summary. Result
tables made from the checks' tables (no check runs here)."""

from __future__ import annotations

import functools
import math
from collections.abc import Callable, Mapping
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
    if cand.codes is not None:  # each group's worst row by position, per check: only those shaped
        picks = []
        for part, g in zip(cand.parts, cand.codes, strict=True):
            u = part.util()
            rows = np.flatnonzero(np.isfinite(u))
            picks.append(rows[_first_max(u[rows], g[rows])])
        cand = cand.gather(picks)
        cand = cand.assign(util=cand.util.astype(float))
    else:
        u = pd.to_numeric(cand.rows.util, errors="coerce").to_numpy(dtype=float)
        if len(cand := cand.rows[np.isfinite(u)]):
            cand = cand.assign(util=cand.util.astype(float))
            cand = cand.loc[cand.groupby(["storey", "pier_id", "check"], sort=False).util.idxmax()]
    # the key, the kind and the rank of each row's check read by its number (`check_no`, the
    # check's place in CHECKS): a look-up among five, not a text test of every row
    no = cand.check_no.to_numpy(dtype=np.intp)
    # (no rows: an empty list, the column type the list of keys always gave an empty table)
    key = results.text_column(no, [UTIL_COLUMN.get(c, c) for c in CHECKS]) if len(no) else []
    cand = cand.assign(key=key, structural=~np.isin(no, [CHECKS.index(c) for c in COMPLIANCE]))
    at = order[["storey", "pier_id"]].drop_duplicates().reset_index(drop=True)
    rank = np.array([list(UTIL_COLUMN).index(c) if c in UTIL_COLUMN else len(UTIL_COLUMN) for c in CHECKS])
    out = at.assign(_pos=np.arange(len(at))).merge(cand, on=["storey", "pier_id"], how="inner")
    out = out.assign(_check=rank[out.check_no.to_numpy(dtype=np.intp)])
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
        keys = zip(out.storey.to_numpy().tolist(), out.pier_id.to_numpy().tolist(), strict=True)
        out["fix"] = [text.get(k, "") for k in keys]  # the plain values: not item by item
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


CANDIDATE_COLUMNS = [
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


@dataclass(frozen=True)
class _Part:
    """One check's rows among the candidates, not yet copied: the check's table, the rows of
    it taken (positions; None = all), and how rows take the candidates' shape (`shape`, row by
    row, so shaping a few rows gives those rows of the shaped whole)."""

    check: str
    source: pd.DataFrame
    pos: np.ndarray | None
    shape: Callable[[pd.DataFrame], pd.DataFrame]
    needs: tuple[str, ...] = ()  # the columns of `source` that `shape` reads (all where empty)
    util_col: str = "util"
    status_col: str = "status"

    def __len__(self) -> int:
        return len(self.source) if self.pos is None else len(self.pos)

    def column(self, col: str) -> np.ndarray:
        """A column of the rows taken, as an array."""
        a = self.source[col].to_numpy()
        return a if self.pos is None else a[self.pos]

    def util(self) -> np.ndarray:
        """The candidates' `util` of the rows taken, as floats (non-numbers NaN)."""
        u = pd.to_numeric(self.source[self.util_col], errors="coerce").to_numpy(dtype=float)
        return u if self.pos is None else u[self.pos]

    def take(self, rows: np.ndarray) -> pd.DataFrame:
        """Rows (positions among those taken) in the candidates' shape."""
        at = rows if self.pos is None else self.pos[rows]
        source = self.source[[c for c in self.needs if c in self.source]] if self.needs else self.source
        return self.shape(source.iloc[at])  # the columns it reads, then the rows

    def whole(self) -> pd.DataFrame:
        return self.shape(self.source if self.pos is None else self.source.iloc[self.pos])


class Candidates:
    """Every check's rows in one shape (`_candidates`), made once for both `envelope` and
    `pier_checks`. The fast path never makes the table (the L tower: 1.1 M rows of text):
    it finds each group's rows by integer codes per check (`_codes`) and shapes those only;
    `rows`, the whole table, is made on first use (the general path, NaN keys)."""

    def __init__(self, parts: list[_Part], codes: list[np.ndarray] | None) -> None:
        self.parts = parts
        self.codes = codes  # storey x pier code of every part's rows (one numbering), or None

    @functools.cached_property
    def rows(self) -> pd.DataFrame:
        return pd.concat([p.whole() for p in self.parts], ignore_index=True)

    def gather(self, picks: list[np.ndarray]) -> pd.DataFrame:
        """Rows of each part (positions, `picks[i]` of part i) in the candidates' shape, one
        table; every part takes part (an empty one too), so the columns' types are those of
        `rows`."""
        return pd.concat([p.take(k) for p, k in zip(self.parts, picks, strict=True)], ignore_index=True)


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
    parts = _parts(
        shear,
        axial if axial is not None else pd.DataFrame(),
        detailing if detailing is not None else pd.DataFrame(),
        section14,
    )
    return Candidates(parts, _codes(parts) if sum(map(len, parts)) else None)


def _candidates(
    shear: pd.DataFrame, axial: pd.DataFrame, detailing: pd.DataFrame, section14: pd.DataFrame | None = None
) -> pd.DataFrame:
    """Every check's rows in one shape: storey, pier, check, combination, demand, capacity, U."""
    return pd.concat([p.whole() for p in _parts(shear, axial, detailing, section14)], ignore_index=True)


def _parts(
    shear: pd.DataFrame, axial: pd.DataFrame, detailing: pd.DataFrame, section14: pd.DataFrame | None = None
) -> list[_Part]:
    """Each check's rows among the candidates (`_Part`), in the candidates' order."""
    cols = CANDIDATE_COLUMNS

    def shear_rows(t: pd.DataFrame) -> pd.DataFrame:
        return t.assign(
            check=CHECK_SHEAR,
            check_no=CHECKS.index(CHECK_SHEAR),
            demand=t.v.abs(),
            capacity=t.phi_vu,
            unit="kN",
            note=t.advice,
        )[cols]

    def nm_rows(t: pd.DataFrame) -> pd.DataFrame:
        return t.assign(
            check=CHECK_NM,
            check_no=CHECKS.index(CHECK_NM),
            demand=t.m_design,
            capacity=t.m_ray,  # M where the ray from the origin meets the curve
            unit="kNm",
            note=t.governs,
        )[cols]

    def simplified_rows(s: pd.DataFrame) -> pd.DataFrame:
        return s.assign(
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

    def rule_rows(check: str):
        """The shaping of a table of rules (detailing, Section 14): one row per rule."""

        def shape(t: pd.DataFrame) -> pd.DataFrame:
            return t.assign(
                check=check,
                check_no=CHECKS.index(check),
                combination="(all)",
                demand=t.value,
                capacity=t.limit,
                note=t.rule,
            )[cols]

        return shape

    detailing_rows, section14_rows = rule_rows(CHECK_DETAILING), rule_rows(CHECK_SECTION14)

    own = ("storey", "pier_id", "combination", "util", "status", "clause")  # the columns kept as they are
    parts = [_Part(CHECK_SHEAR, shear, None, shear_rows, (*own, "v", "phi_vu", "advice"))]
    if len(axial):
        parts.append(_Part(CHECK_NM, axial, None, nm_rows, (*own, "m_design", "m_ray", "governs")))
        # on the plain array: the same test as the column's, a fifth of the time
        applies = np.flatnonzero(axial.status_s.to_numpy() != results.NOT_APPLICABLE)
        simplified = (
            "storey",
            "pier_id",
            "combination",
            "n_end",
            "phi_nu_s",
            "util_s",
            "status_s",
            "clause_s",
        )
        parts.append(
            _Part(CHECK_SIMPLIFIED, axial, applies, simplified_rows, simplified, "util_s", "status_s")
        )
    if len(detailing):
        parts.append(
            _Part(CHECK_DETAILING, detailing, None, detailing_rows, (*own, "value", "limit", "unit", "rule"))
        )
    if section14 is not None and len(section14):
        # compliance rows only: an end zone required is a trigger, "check" a requirement that
        # cannot be verified yet; neither is a pass or a failure
        judged = np.flatnonzero(section14.status.isin((results.PASS, results.FAIL)).to_numpy())
        parts.append(
            _Part(
                CHECK_SECTION14, section14, judged, section14_rows, (*own, "value", "limit", "unit", "rule")
            )
        )
    return parts


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
    keys = ["storey", "pier_id"]
    codes = cand.codes
    if codes is not None:
        # the fast path (integer codes for storey x pier per check, a numpy table of maxima, each
        # pier's worst row by position, only those rows shaped); the same table as the pivot
        # below, which factorised the text keys over and over
        worst, per_check, g_worst = _worst_rows(cand)
        if len(worst):
            worst = worst.assign(
                **{UTIL_COLUMN.get(n, n): per_check[g_worst, j] for j, n in enumerate(CHECKS)}
            )
    else:
        every = cand.rows
        worst = every[~every.check.isin(COMPLIANCE)] if len(every) else every
        if len(worst):
            worst = worst.loc[_worst_at(worst.util, [worst[k] for k in keys])]
            per_check = every.pivot_table(index=keys, columns="check", values="util", aggfunc="max")
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
        at = table[keys]
        fast = codes is not None
        u, fails, rule = _compliance_of(cand, at, check) if fast else _compliance(cand.rows, at, check)
        table[util_col] = u
        # Python floats tested by `math.isfinite` (numpy's on a scalar is a tenth of the speed)
        text = [
            "" if not math.isfinite(x) else f"{results.FAIL if bad else results.PASS} {x:.2f}"
            for x, bad in zip(u.tolist(), fails.tolist(), strict=True)
        ]
        if check == CHECK_SECTION14:  # ", ".join of the words that are not empty
            text = [
                _joined_words(t, results.CHECK if c else "")
                for t, c in zip(text, to_check.tolist(), strict=True)
            ]
        text = np.array(text, dtype=object)
        table[text_col] = text
        table.loc[checked & fails, "status"] = results.FAIL
        notes.append(np.where(fails, label + rule, ""))
    notes.append(np.where(to_check, f"{earthquake}: end-zone ties to check (bars not described)", ""))
    table["note"] = [
        "; ".join(filter(None, parts)) for parts in zip(*(n.tolist() for n in notes), strict=True)
    ]
    table = table.sort_values(
        ["storey_index", "wall_id", "position"],
        ascending=[False, True, True],
        key=lambda c: geometry.natural_rank(c) if c.name == "wall_id" else c,
    )
    table["util"] = table.util.astype(float)
    table["fix"] = ""  # filled by with_cheapest_fix once the advice search has run
    return table[cols].reset_index(drop=True)


def _joined_words(first: str, second: str) -> str:
    """`", ".join` of the two words that are not empty."""
    if first and second:
        return f"{first}, {second}"
    return first or second


def _first_max(u: np.ndarray, g: np.ndarray) -> np.ndarray:
    """Position of each group's largest `u` (the first of equal ones), groups in order of first
    appearance: what `groupby(g, sort=False).idxmax()` gives on positions, `u` without NaN
    (`results.first_max`: two passes, no sort)."""
    return results.first_max(u, g)


def _codes(parts: list[_Part]) -> list[np.ndarray] | None:
    """Integer codes of every part's rows' storey x pier, one numbering over the parts (each
    check table factorised once, the Cl 11.5 rows taking the axial table's codes): grouping
    by them groups as by the text columns, without factorising the text again for every
    group-by. Only which rows share a code is read (each group's rows are found by it, the
    tables are ordered by other keys). None where a key is missing (NaN), which a group-by by
    the text would drop (the caller then takes the general path)."""
    start: dict[int, int] = {}  # each check table once, by identity
    tables = []
    for p in parts:
        if len(p) and id(p.source) not in start:
            if tables and _same_keys(p.source, tables[0]):  # the axial table's rows are the shear's
                start[id(p.source)] = 0
                continue
            start[id(p.source)] = sum(map(len, tables))
            tables.append(p.source)
    if not tables:
        return [np.zeros(0, dtype=np.int64) for _ in parts]
    # on the columns' object arrays: half the time of factorising the text columns themselves
    s, _ = pd.factorize(np.concatenate([t.storey.to_numpy() for t in tables]))
    p_, pier = pd.factorize(np.concatenate([t.pier_id.to_numpy() for t in tables]))
    if (s < 0).any() or (p_ < 0).any():
        return None
    g, _ = pd.factorize(s.astype(np.int64) * max(len(pier), 1) + p_)
    out = []
    for p in parts:
        if not len(p):
            out.append(np.zeros(0, dtype=np.int64))
            continue
        mine = g[start[id(p.source)] : start[id(p.source)] + len(p.source)]
        out.append(mine if p.pos is None else mine[p.pos])
    return out


def _same_keys(a: pd.DataFrame, b: pd.DataFrame) -> bool:
    """Whether two tables' rows have the same storey and pier, row by row (a missing key is
    never the same): then they share their codes."""
    return len(a) == len(b) and all(
        bool((a[k].to_numpy() == b[k].to_numpy()).all()) for k in ("storey", "pier_id")
    )


def _worst_rows(cand: Candidates) -> tuple[pd.DataFrame, np.ndarray, np.ndarray]:
    """Per storey x pier (code) the row with the largest utilisation of the structural checks
    (NaN as -inf; the first of equal ones in the candidates' order: the earlier check, then
    the earlier row), shaped; the largest utilisation per code and check (`_max_per_check`:
    NaN skipped, NaN where none), codes x `CHECKS`; and each worst row's code."""
    size = max((int(g.max()) + 1 for g in cand.codes if len(g)), default=0)
    per_check = np.full((size, len(CHECKS)), np.nan)
    best = np.full(size, -np.inf)
    part_of = np.full(size, -1)  # the check part of each code's worst row (-1: none yet)
    row_of = np.zeros(size, dtype=np.int64)
    for i, (part, g) in enumerate(zip(cand.parts, cand.codes, strict=True)):
        if not len(g):
            continue
        u = part.util()
        per_check[:, CHECKS.index(part.check)] = _max_per_group(u, g, size)
        if part.check in COMPLIANCE:
            continue
        v = np.where(np.isnan(u), -np.inf, u)
        win = _first_max(v, g)  # as `_worst_at`, within the part
        gw = g[win]
        better = (part_of[gw] < 0) | (v[win] > best[gw])  # ties: the earlier part's row stays
        best[gw[better]], part_of[gw[better]], row_of[gw[better]] = v[win][better], i, win[better]
    have = np.flatnonzero(part_of >= 0)
    picks = [row_of[have[part_of[have] == i]] for i in range(len(cand.parts))]
    g_worst = np.concatenate([have[part_of[have] == i] for i in range(len(cand.parts))])
    return cand.gather(picks), per_check, g_worst


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


def _max_per_group(u: np.ndarray, g: np.ndarray, size: int) -> np.ndarray:
    """`_max_per_check` of one check: per code (0 to size - 1) the largest `u`, NaN ignored,
    NaN where a code has none (one-dimensional: numpy's fast `maximum.at`)."""
    out = np.full(size, -np.inf)
    ok = ~np.isnan(u)
    np.maximum.at(out, g[ok], u[ok])
    seen = np.zeros(size, dtype=bool)
    seen[g[ok]] = True
    out[~seen] = np.nan
    return out


def _compliance(
    cand: pd.DataFrame, at: pd.DataFrame, check: str
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per row of `at` (storey, pier): the worst utilisation of a compliance check's rules,
    whether any fails, and the worst rule's name (NaN, False, '' where it has no rows). The
    general path (text keys); `_compliance_of` the fast one."""
    keys = ["storey", "pier_id"]
    rows = cand[cand.check == check] if len(cand) else cand
    if not len(rows):
        return _no_compliance(len(at))
    worst = rows.loc[_worst_at(rows.util, [rows[k] for k in keys])][[*keys, "util", "note"]]
    failing = (rows.status == results.FAIL).to_numpy()
    fails = rows[failing].groupby(keys, sort=False).size().rename("n_fail").reset_index()
    return _compliance_at(at, worst, fails)


def _compliance_of(
    cand: Candidates, at: pd.DataFrame, check: str
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """`_compliance` by the check's integer codes (`cand.codes`): each code's worst row found by
    position and shaped alone, one row of keys per failing code with its count (the same
    tables as the text group-bys)."""
    keys = ["storey", "pier_id"]
    mine = [i for i, p in enumerate(cand.parts) if p.check == check and len(p)]
    if not mine:
        return _no_compliance(len(at))
    part, g = cand.parts[mine[0]], cand.codes[mine[0]]
    u = part.util()
    worst = part.take(_first_max(np.where(np.isnan(u), -np.inf, u), g))[[*keys, "util", "note"]]
    failing = np.flatnonzero(part.column(part.status_col) == results.FAIL)
    _, first, n = np.unique(g[failing], return_index=True, return_counts=True)
    fails = part.take(failing[first])[keys].assign(n_fail=n)
    return _compliance_at(at, worst, fails)


def _no_compliance(n: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    return np.full(n, np.nan), np.zeros(n, dtype=bool), np.full(n, "", dtype=object)


def _compliance_at(
    at: pd.DataFrame, worst: pd.DataFrame, fails: pd.DataFrame
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Each group's worst row and failing count joined onto `at`'s rows."""
    keys = ["storey", "pier_id"]
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
