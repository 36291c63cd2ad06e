"""The checks: each takes piers (or lintels, or the core) and actions, returns a result table."""

from __future__ import annotations

import collections

import numpy as np
import pandas as pd


def per_pier(df: pd.DataFrame) -> tuple[np.ndarray, np.ndarray]:
    """Rows of `df` grouped by storey x pier: the first row of each group and each row's group,
    so what depends on the pier alone is worked out once per pier and spread to its rows."""
    # integer codes of the two columns, not joined text (a Python string per row: 0.14 s of
    # the L tower's 360 000 rows, against 0.03 s); each row's first row of its pier is the same
    storey, storeys = pd.factorize(_plain_text(df.storey))
    pier, piers = pd.factorize(_plain_text(df.pier_id))
    n_piers = len(piers)
    if (pier < 0).any():  # a blank pier ID: a code of its own, not the storey below's last pier
        pier = np.where(pier < 0, n_piers, pier)
        n_piers += 1
    key = storey.astype(np.int64) * n_piers + pier
    size = len(storeys) * n_piers
    if not len(key) or size > 8 * len(key) or (key < 0).any():
        _, first, of = np.unique(key, return_index=True, return_inverse=True)
        return first, of
    # the keys are small integers: groups numbered in key order by counting (np.unique's
    # numbering, without sorting every row), each group's first row by a minimum
    present = np.zeros(size, dtype=bool)
    present[key] = True
    number = np.cumsum(present) - 1
    of = number[key]
    first = np.full(int(number[-1]) + 1, len(key), dtype=np.intp)
    np.minimum.at(first, of, np.arange(len(key)))
    return first, of


def _plain_text(column: pd.Series):
    """A text column as its plain array of Python strings (factorised in two thirds of the time
    of the text column itself: the same codes); any other column as it is."""
    if column.dtype == object or isinstance(column.dtype, pd.StringDtype):
        return column.to_numpy(dtype=object)
    return column


def pier_rows(a_storey, a_pier, t_storey, t_pier) -> np.ndarray | None:
    """Each pair (storey, pier)'s row in a table of pairs, -1 where it has none; None where the
    table's pairs are not unique or one is blank: `distribution.rows_of`, the same answer. Where
    the table's pier IDs are integers, each once (the advice search's variant numbers), a pier
    is looked up by its number alone and the storey compared (a third of the time: no text
    keys factorised; storeys coded as integers, the search's, compared as integers), else
    `rows_of`."""
    from xlcore.distribution import rows_of

    tp, ap = np.asarray(t_pier), np.asarray(a_pier)
    if tp.dtype.kind in "iu" and ap.dtype.kind in "iu" and len(tp) and len(ap):
        at = _by_number(ap, tp)
        ts, as_ = np.asarray(t_storey), np.asarray(a_storey)
        if at is not None and ts.dtype.kind in "iu" and as_.dtype.kind in "iu":  # coded storeys
            return np.where((at >= 0) & (ts[np.maximum(at, 0)] == as_), at, -1)
        ts, as_ = ts.astype(object), as_.astype(object)
        if at is not None and not pd.isna(ts).any() and not pd.isna(as_).any():  # pd.NA: no == answer
            same = ts[np.maximum(at, 0)] == as_
            return np.where((at >= 0) & same, at, -1)
    return rows_of(a_storey, a_pier, t_storey, t_pier)


def same_keys(a_storey, a_pier, b_storey, b_pier) -> bool:
    """Whether two tables' (storey, pier) columns are the same arrays in memory (the same data,
    strides and length: equal now, row for row), so that their rows' piers are one answer of
    `pier_rows` (the shear table of the actions it was made from: one match of 360 000 text
    keys, not two). False where that is not so plainly so (then each table is matched)."""

    def same(x, y) -> bool:
        u, v = np.asarray(x), np.asarray(y)
        return (
            u.dtype == v.dtype
            and u.shape == v.shape
            and u.strides == v.strides
            and u.__array_interface__["data"][0] == v.__array_interface__["data"][0]
        )

    return same(a_storey, b_storey) and same(a_pier, b_pier)


def _by_number(numbers: np.ndarray, table: np.ndarray) -> np.ndarray | None:
    """Each integer's row in `table` (integers), -1 where it is not there; None where a number
    is in the table twice. A table by number where the numbers are dense, else a hash index."""
    lo, hi = int(table.min()), int(table.max())
    if hi - lo < 4 * len(table) + 1024:
        pos = np.full(hi - lo + 1, -1, dtype=np.intp)
        pos[table - lo] = np.arange(len(table))
        if np.count_nonzero(pos >= 0) != len(table):
            return None
        inside = (numbers >= lo) & (numbers <= hi)
        return np.where(inside, pos[np.clip(numbers - lo, 0, hi - lo)], -1)
    index = pd.Index(table)
    return index.get_indexer(numbers) if index.is_unique else None


def group_max(values, group: np.ndarray, n: int) -> np.ndarray:
    """Per group 0..n-1 the largest of `values` (NaN skipped; NaN where a group has none): what
    pandas' `groupby(...).max()` gives, to the bit, except the sign of a largest zero: this keeps
    the first row's (-0.0 or 0.0, whichever comes first), while pandas 3.1's choice between equal
    zeros depends on the group's length (review: 8 rows gave 0.0, 16 the same values -0.0); only
    a printed "-0.00" can differ, never a utilisation."""
    v = np.asarray(values, dtype=float)
    out = np.full(n, np.nan)
    np.fmax.at(out, group, v)
    zero = out == 0.0
    if zero.any():
        rows = np.flatnonzero((v == 0.0) & zero[group])
        g = group[rows]
        _, first = np.unique(g, return_index=True)
        out[g[first]] = v[rows[first]]
    return out


def group_first(values, group: np.ndarray, n: int) -> np.ndarray:
    """Per group 0..n-1 the first value in row order that is not NaN (NaN where none): what
    pandas' `groupby(...).first()` gives."""
    v = np.asarray(values, dtype=float)
    ok = np.flatnonzero(~np.isnan(v))
    first = np.full(n, len(v), dtype=np.intp)
    np.minimum.at(first, group[ok], ok)
    out = np.full(n, np.nan)
    has = first < len(v)
    out[has] = v[first[has]]
    return out


def plain(*columns) -> list[list]:
    """Columns as lists of Python numbers: formatting those into working text is several times
    faster than formatting numpy scalars (what iterating an array or a Series yields)."""
    return [np.asarray(c).tolist() for c in columns]


def records(df: pd.DataFrame):
    """`df.itertuples(index=False)`'s rows (named tuples of the columns' Python values), made
    from each column's values taken at once: iterating a text column item by item through
    pandas cost most of the lintels' working text."""
    row = collections.namedtuple("Pandas", [str(c) for c in df.columns], rename=True)
    columns = [df.iloc[:, k].to_numpy().tolist() for k in range(df.shape[1])]
    return map(row._make, zip(*columns, strict=True))


def once_per(df: pd.DataFrame, keys: list, make) -> np.ndarray:
    """Working text made by `make` (rows -> list of str) once per distinct combination of the
    `keys` columns (or arrays), and spread to every row that has it."""
    codes = pd.MultiIndex.from_arrays([df[k] if isinstance(k, str) else k for k in keys]).factorize(
        use_na_sentinel=False
    )[0]
    _, first = np.unique(codes, return_index=True)
    return np.asarray(make(df.iloc[first]), dtype=object)[codes]


RULE_COLUMNS = (
    "storey",
    "storey_index",
    "pier_id",
    "wall_id",
    "rule",
    "basis",
    "value",
    "kind",
    "limit",
    "unit",
    "util",
    "status",
    "working",
)
"""Columns of a rule table (checks/section14.py, checks/special_walls.py: one row per storey x
pier x rule; the special-wall rules add "combination" after "wall_id")."""


def rule_columns(per_combination: bool = False) -> tuple[str, ...]:
    """RULE_COLUMNS, with "combination" after "wall_id" for rules judged per combination."""
    if not per_combination:
        return RULE_COLUMNS
    at = RULE_COLUMNS.index("wall_id") + 1
    return (*RULE_COLUMNS[:at], "combination", *RULE_COLUMNS[at:])


def empty_rules(columns: tuple[str, ...], working: bool) -> pd.DataFrame:
    """A rule table without rows: (pier_id, util) for the advice search (`working` False), else
    every column and the clause, so the sheets and the summary read it as they read a full one."""
    if not working:
        return pd.DataFrame({"pier_id": pd.Series(dtype=object), "util": pd.Series(dtype=float)})
    return pd.DataFrame({c: pd.Series(dtype=object) for c in (*columns, "clause")})


def rule_rows(
    p, name, value, limit, kind, unit, status, util, text, basis, working, combo=None
) -> pd.DataFrame:
    """One rule's rows over the piers `p` (with `combo`, the combination of each row); `text`
    makes the working when called (only with `working`); `kind` "min" reads "at least", any
    other "at most"."""
    n = len(p)
    cols = dict(
        storey=p.storey.to_numpy(),
        storey_index=p.storey_index.to_numpy(),
        pier_id=p.pier_id.to_numpy(),
        wall_id=p.wall_id.to_numpy(),
    )
    if combo is not None:
        cols["combination"] = np.asarray(combo, dtype=object)
    return pd.DataFrame(
        dict(
            cols,
            rule=name,
            basis=basis,
            value=np.broadcast_to(np.asarray(value, dtype=float), (n,)),
            kind="at least" if kind == "min" else "at most",
            unit=unit,
            limit=np.broadcast_to(np.asarray(limit, dtype=float), (n,)),
            util=np.broadcast_to(np.asarray(util, dtype=float), (n,)),
            status=np.asarray(status, dtype=object),
            working=text() if working else "",
        )
    )


def worst_rule_text(table: pd.DataFrame, every: str | None = None) -> str | None:
    """The worst pass / FAIL row of a rule table in words, for a summary line: 'worst 1.250
    FAIL at W1, L3 (rule[, combination]; n of N rule rows fail)'; the combination is named where
    the table has one and it is not `every` (the label of rows judged over all combinations).
    None where no row is pass / FAIL."""
    from xlcore.results import FAIL, PASS

    comp = table[table.status.isin((PASS, FAIL))]
    if not len(comp):
        return None
    r = comp.loc[comp.util.astype(float).idxmax()]
    n_fail = int((comp.status == FAIL).sum())
    verdict = FAIL if r.util > 1.0 else PASS
    combo = r.combination if "combination" in comp and r.combination != every else None
    return (
        f"worst {r.util:.3f} {verdict} at {r.pier_id}, {r.storey} ({r.rule}"
        + (f", {combo}" if combo is not None else "")
        + f"; {n_fail} of {len(comp)} rule rows fail)"
    )


def finish_rules(
    out: pd.DataFrame, p: pd.DataFrame, working: bool, clauses: dict, rules: tuple, every: str | None = None
) -> pd.DataFrame:
    """A rule table as the checks hand it on: without `working`, the pass / FAIL rows' (pier_id,
    util) only (what the advice search needs); else with each rule's clause, the piers in the
    pier table `p`'s order (storeys top down, walls and piers in natural order) and each pier's
    rules in the order of `rules`; with `every` (rules judged per combination), a pier's rows of
    every combination (`every`) first, then by combination."""
    from xlcore.results import FAIL, PASS

    if not working:
        return out[out.status.isin((PASS, FAIL))][["pier_id", "util"]].reset_index(drop=True)
    out["clause"] = out.rule.map(clauses)
    # each row's pier's place in p by integer codes of the keys (`pier_rows`); the join on the
    # two text keys where that does not answer for every row
    at = pier_rows(out.storey, out.pier_id, p.storey, p.pier_id)
    if at is None or (at < 0).any():
        pier_pos = pd.Series(np.arange(len(p)), index=pd.MultiIndex.from_frame(p[["storey", "pier_id"]]))
        at = pier_pos.reindex(pd.MultiIndex.from_frame(out[["storey", "pier_id"]])).to_numpy()
    out["_pier"] = at
    out["_rule"] = out.rule.map(pd.Series(range(len(rules)), index=rules))
    keys = ["storey_index", "_pier", "_rule"]
    if every is not None:
        out["_all"] = out.combination != every
        keys = ["storey_index", "_pier", "_all", "combination", "_rule"]
    out = out.sort_values(keys, ascending=[False] + [True] * (len(keys) - 1), kind="stable")
    return out.drop(columns=[k for k in keys if k.startswith("_")]).reset_index(drop=True)
