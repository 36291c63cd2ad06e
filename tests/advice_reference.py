"""Reference versions of the advice search's pair probe, on arrays of every pair: the search
itself works run by run (xlcore/checks/advice.py `_pair_runs`, `_run_groups`, `_run_members`);
the speed tests (test_advice_speed*.py) compare it with these. Kept here, not in the package,
since nothing in the program calls them."""

import numpy as np
import pandas as pd

from xlcore.checks import advice
from xlcore.model import Settings


def _pair_arrays(meta: pd.DataFrame, premiums: pd.DataFrame, settings: Settings) -> dict[str, np.ndarray]:
    """The pairs `_pairs` lists, as arrays in its order: `pair` (index in PAIRS), `a`, `b`
    (positions in `meta` of the two single options) and `added_cost`, worked out with the same
    operations on the same numbers, so the costs are equal to the last bit. Without a table per
    pair: the L tower's 4 430 580 pairs as a table of text keys took 2 s and 1.5 GB, and the
    probe then keeps about one pair in a hundred (`_probed_pairs`). The search keeps the pairs
    in their runs (`_pair_runs`); these arrays, the runs joined, are the tests' reference."""
    runs = advice._pair_runs(meta, premiums, settings)
    if not runs:
        return {k: np.zeros(0, dtype=float if k == "added_cost" else np.int32) for k in advice.PAIR_ARRAYS}
    return {
        "pair": np.concatenate([np.full(len(a), k, dtype=np.int8) for k, a, _, _ in runs]),
        "a": np.concatenate([a for _, a, _, _ in runs]),
        "b": np.concatenate([b for _, _, b, _ in runs]),
        "added_cost": np.concatenate([c for _, _, _, c in runs]),
    }


def _pair_groups(
    bi: np.ndarray, pair: np.ndarray, cost: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The groups (pier `bi` x `pair`) of the pairs, numbered in (bi, pair) order; each group's
    size; and each group's probe: the last pair of the group in the stable sort by cost (NaN
    last, as pandas sorts), i.e. of its largest cost (a NaN where any) the latest pair. One
    O(n) pass in place of sorting the L tower's 4.4 M costs: the probe is all the search needs
    of most groups (`_sorted_members` orders the few that pass). The search does the same run
    by run (`_run_groups`); this, on arrays of every pair, is the tests' reference."""
    key = bi.astype(np.int64, copy=False) * len(advice.PAIRS) + pair  # no copy of 4.4 M positions first
    size = np.bincount(key)  # keys are small (piers x 8): grouped without sorting
    present = size > 0
    group = (np.cumsum(present) - 1).astype(np.int32)[key]
    nan = np.isnan(cost)
    any_nan = np.bincount(key[nan], minlength=len(size)) > 0
    top = np.full(len(size), -np.inf)
    np.fmax.at(top, key, cost)  # each group's largest cost (NaN left out: any_nan says)
    hit = np.where(any_nan[key], nan, cost == top[key])
    last = np.full(len(size), -1, dtype=np.int64)
    np.maximum.at(last, key[hit], np.flatnonzero(hit))  # the latest of them, as a stable sort
    return group, size[present], last[present]


def _sorted_members(
    group: np.ndarray, cost: np.ndarray, chosen: np.ndarray, count: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """The pairs of the groups `chosen`, in the stable sort by (group, cost) with NaN last, and
    each one's position in that sort of every pair (the index `_probed` gives them). The
    tests' reference for `_run_members`."""
    take = np.zeros(len(count), dtype=bool)
    take[chosen] = True
    rows = np.flatnonzero(take[group])
    rows = rows[np.lexsort((cost[rows], group[rows]))]
    g = group[rows]
    first = np.concatenate([[0], np.flatnonzero(g[1:] != g[:-1]) + 1]) if len(g) else np.zeros(0, dtype=int)
    rank = np.arange(len(rows)) - np.repeat(first, np.diff(np.append(first, len(rows))))
    offset = np.concatenate([[0], np.cumsum(count)[:-1]])
    return rows.astype(np.int32), offset[g] + rank
