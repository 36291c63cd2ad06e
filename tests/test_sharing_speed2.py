"""Fast paths of the fourth speed round (issue 15: sharing, core checks, envelope, governing
rows) against the general ways they replace, bit for bit, on cases made to reach every branch:
ties, NaN, infinities, missing keys, groups interleaved."""

import numpy as np
import pandas as pd
import pytest

from xlcore import results

# ------------------------------------------------------------------ first largest per group


def _first_max_sorted(u: np.ndarray, g: np.ndarray) -> np.ndarray:
    """The sort `results.first_max` replaced: stable by (g, -u), each group's first row,
    groups in order of first appearance."""
    if not len(u):
        return np.zeros(0, dtype=np.int64)
    order = np.lexsort((-u, g))
    head = np.ones(len(order), dtype=bool)
    head[1:] = g[order][1:] != g[order][:-1]
    win = order[head]
    _, first = np.unique(g, return_index=True)
    return win[np.argsort(first, kind="stable")]


@pytest.mark.parametrize("seed", range(5))
def test_first_max_equals_the_stable_sort(seed):
    rng = np.random.default_rng(seed)
    n = 5000
    g = rng.integers(0, 300, n) * 7  # codes with gaps, groups interleaved
    u = rng.choice([0.5, 0.9, 1.1, 0.9, -np.inf, np.inf, 0.0, -0.0], size=n)  # ties on purpose
    u[g == g[0]] = -np.inf  # a group with nothing but -inf keeps its first row
    got = results.first_max(u, g)
    np.testing.assert_array_equal(got, _first_max_sorted(u, g))
    # the first of equal values wins, not any of them
    assert results.first_max(np.array([1.0, 2.0, 2.0, 2.0]), np.array([3, 3, 3, 3])).tolist() == [1]
    assert results.first_max(np.zeros(0), np.zeros(0, dtype=np.int64)).tolist() == []


def _governing_rows_sorted(table: pd.DataFrame, rule: results.Governing, failing: bool = True) -> np.ndarray:
    """`governing_rows` as it was: group-by numbers and one stable sort per worst column."""
    n = len(table)
    keep = np.zeros(n, dtype=bool)
    if n == 0:
        return keep
    group = [g for g in rule.group if g in table]
    gid = table.groupby(group, sort=False, dropna=False).ngroup().to_numpy() if group else np.zeros(n, int)
    pos = np.arange(n)
    for col in rule.worst:
        if col not in table:
            continue
        v = pd.to_numeric(table[col], errors="coerce").to_numpy(dtype=float)
        if col in rule.magnitude:
            v = np.abs(v)
        v = np.where(np.isnan(v), -np.inf, v)
        order = np.lexsort((pos, -v, gid))
        first = np.ones(n, dtype=bool)
        first[1:] = gid[order][1:] != gid[order][:-1]
        keep[order[first]] = True
    if failing:
        for col in rule.failing:
            if col in table:
                keep |= (table[col] == results.FAIL).to_numpy()
    return keep


def _result_table(seed: int, missing: bool) -> pd.DataFrame:
    rng = np.random.default_rng(seed)
    n = 3000
    storey = pd.array(rng.choice([f"L{i}" for i in range(7)], n), dtype="str")
    member = pd.array(rng.choice(["W1", "W2", "W10", "W1-1", "W1-2"], n), dtype="str")
    if missing:
        member[rng.random(n) < 0.05] = np.nan  # a group of its own (dropna=False)
    v = rng.choice([-2.0, 1.0, 2.0, np.nan, np.inf, 0.5], n)
    util = rng.choice([0.4, 1.2, np.nan, 0.4], n)
    status = pd.array(np.where(util > 1, results.FAIL, results.PASS), dtype="str")
    status[rng.random(n) < 0.03] = np.nan
    return pd.DataFrame(
        dict(storey=storey, member=member, pier_id=member, v=v, n=-v, m=v * 3, util=util, status=status)
    )


@pytest.mark.parametrize("missing", [False, True])
@pytest.mark.parametrize("seed", range(3))
def test_governing_rows_equal_the_sorted_selection(seed, missing):
    table = _result_table(seed, missing)
    for name in (results.CORE_SHEET, results.SHEAR_SHEET):
        rule = results.GOVERNING[name]
        for failing in (False, True):
            got = results.governing_rows(table, rule, failing=failing)
            np.testing.assert_array_equal(got, _governing_rows_sorted(table, rule, failing=failing))
        assert results.failing_rows(table, rule).any() or name == results.CORE_SHEET


@pytest.mark.parametrize("missing", [False, True])
def test_group_codes_partition_as_the_group_by(missing):
    table = _result_table(4, missing)
    got = results.group_codes(table, ["storey", "member"])
    ref = table.groupby(["storey", "member"], sort=False, dropna=False).ngroup().to_numpy()
    # the same partition: one code of one for the other, both ways
    pairs = pd.DataFrame(dict(a=got, b=ref)).drop_duplicates()
    assert pairs.a.is_unique and pairs.b.is_unique


# ------------------------------------------------------------------ the envelope without the candidates' table


def _envelope_both_ways(shear, piers, axial, detailing, s14, monkeypatch):
    from xlcore.results import envelope as env

    fast = env.envelope(shear, piers, axial, detailing, s14)
    fast_pc = env.pier_checks(shear, axial, detailing, s14, fast)
    with monkeypatch.context() as m:
        m.setattr(env, "_codes", lambda parts: None)  # the general path: the whole table, text keys
        general = env.envelope(shear, piers, axial, detailing, s14)
        general_pc = env.pier_checks(shear, axial, detailing, s14, general)
    pd.testing.assert_frame_equal(fast, general, check_exact=True)
    pd.testing.assert_frame_equal(fast_pc, general_pc, check_exact=True)
    return fast


@pytest.mark.parametrize("seed", range(4))
def test_envelope_with_ties_across_checks_equals_the_general_path(seed, monkeypatch):
    """Each pier's worst row over shear, axial + bending and Cl 11.5 found per check and then
    across them: where two checks tie, the earlier check's row governs (as in the one table),
    and its combination is the one reported."""
    from test_envelope_fast import _tables

    shear, piers, axial, detailing, s14 = _tables(seed)
    rng = np.random.default_rng(seed)
    u = rng.choice([0.5, 0.9, 1.1], size=len(axial))  # the shear's values: ties across checks
    axial = axial.assign(
        util=u,
        status=np.where(u > 1, results.FAIL, results.PASS),
        util_s=rng.choice([0.9, 1.1], size=len(axial)),
        combination=[f"A{i}" for i in rng.integers(0, 5, len(axial))],  # tells which row governs
    )
    fast = _envelope_both_ways(shear, piers, axial, detailing, s14, monkeypatch)
    assert (fast.check == "in-plane shear").any() and (fast.check != "in-plane shear").any()


@pytest.mark.parametrize("seed", range(3))
def test_envelope_of_checks_in_different_row_orders_equals_the_general_path(seed, monkeypatch):
    """The axial table's rows in another order than the shear's (they do not share codes), a
    whole check of a pier NaN, and empty compliance tables."""
    from test_envelope_fast import _tables

    shear, piers, axial, detailing, s14 = _tables(seed)
    axial = axial.sample(frac=1.0, random_state=seed).reset_index(drop=True)
    _envelope_both_ways(shear, piers, axial, detailing, s14, monkeypatch)
    _envelope_both_ways(shear, piers, axial, detailing.iloc[:0], s14.iloc[:0], monkeypatch)
    _envelope_both_ways(shear, piers, axial.iloc[:0], detailing, None, monkeypatch)
