"""The advice search's round-6 fast paths against what they replace, bit for bit (issue 15):
the screening rows' rankings (`_TopRows`) against pandas' rank of each group, on random groups
with ties and missing values and on the screen of a small tower; `_distinct_actions` keeping
every row as it is where no two rows hash alike; the search's ActionRows from the storey and pier
codes `_distinct_actions` made. Each test fails with its fast path broken (tried: ties taken by
the later row; the rows taken before not left out; the shortcut taken where rows repeat; the
shared codes handed on where rows were dropped).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from test_advice_speed import actions_for, failing_of, tower

from xlcore.checks import advice
from xlcore.model import Settings

STANDARDS = ["AS 3600:2018", "ACI 318-19"]


def search_inputs(standard, scale=2.0):
    s = Settings(standard=standard)
    piers = tower()
    var, meta = advice._candidates(piers, failing_of(piers), s)
    return s, var, meta, actions_for(piers, scale)


def ranked_by_pandas(values, groups, k):
    rank = pd.Series(values).groupby(groups).rank(method="first", ascending=False)
    return (rank <= k).to_numpy()


@pytest.mark.parametrize("k", [1, 2, 3])
def test_top_rows_equal_pandas_rank(k):
    rng = np.random.default_rng(11)
    n = 3000
    groups = rng.integers(0, 400, size=n)  # interleaved groups, some of one row
    values = rng.integers(-3, 4, size=n).astype(float)  # many ties
    values[rng.random(n) < 0.05] = -np.inf  # a missing value, as the screen sets it
    values[rng.random(n) < 0.02] = np.finfo(float).max
    got = advice._TopRows(groups).first(values, k)
    np.testing.assert_array_equal(got, ranked_by_pandas(values, groups, k))


def test_top_rows_ties_go_to_the_earlier_row():
    groups = np.array([1, 0, 1, 1, 0, 1])
    values = np.array([5.0, -np.inf, 5.0, 5.0, -np.inf, 7.0])
    got = advice._TopRows(groups).first(values, 2)
    np.testing.assert_array_equal(got, [True, True, False, False, True, True])
    np.testing.assert_array_equal(got, ranked_by_pandas(values, groups, 2))
    assert not advice._TopRows(np.zeros(0, dtype=np.int64)).first(np.zeros(0), 2).any()


@pytest.mark.parametrize("standard", STANDARDS)
def test_screening_rows_equal_pandas_rank(standard):
    """The screen's rows: every group's two largest of each measure, as pandas ranked them."""
    s, var, meta, acts = search_inputs(standard)
    failing = failing_of(tower())
    rows = advice.ActionRows(acts, cheap_first=True)
    got = advice._screening_actions(rows.frame, failing, rows)
    a = acts.merge(failing[["storey", "pier_id"]], on=["storey", "pier_id"])
    n, m = a.n.to_numpy(float), np.abs(a.m.to_numpy(float))
    measures = [np.abs(a.v.to_numpy(float)), n, -n, m, m / np.maximum(np.abs(n), 1e-9),
                np.abs(np.nan_to_num(a.m_out.to_numpy(float)))]  # fmt: skip
    groups = a.groupby(["storey", "pier_id"]).ngroup().to_numpy()
    pick = np.zeros(len(a), dtype=bool)
    for v in measures:
        pick |= ranked_by_pandas(np.nan_to_num(v, nan=-np.inf), groups, advice.SCREEN)
    assert 0 < pick.sum() < len(a)
    pd.testing.assert_frame_equal(got.reset_index(drop=True), a[pick].reset_index(drop=True))


def test_distinct_rows_all_kept_where_no_two_alike():
    """`_distinct_actions`: where no two rows hash alike in their numbers, the rows themselves
    (the varied tower); rows alike in every number but a text column are still both kept, and
    a true repeat is still dropped (the shortcut taken only where it holds)."""
    s = Settings()
    acts = actions_for(tower(), 2.0)
    assert advice._distinct_actions(acts, s) is acts
    twin = acts.iloc[[0]].assign(wall_id="other", row=-1)
    both = pd.concat([acts, twin], ignore_index=True)
    assert len(advice._distinct_actions(both, s)) == len(both)
    again = pd.concat([acts, acts.iloc[[0]].assign(row=-1)], ignore_index=True)
    assert len(advice._distinct_actions(again, s)) == len(acts)


@pytest.mark.parametrize("repeat", [False, True])
def test_action_rows_from_shared_codes_equal_their_own(repeat, monkeypatch):
    """The search's ActionRows from the codes `_distinct_actions` used (where it kept every
    row) equal ActionRows that factorise the rows themselves: same names, codes and order."""
    acts = actions_for(tower(), 2.0)
    if repeat:  # a row repeated (dropped by `_distinct_actions`): the rows' own codes
        acts = pd.concat([acts, acts.iloc[[3]].assign(row=-1)], ignore_index=True)
    made = []
    real = advice.ActionRows

    def spy(frame, cheap_first=False, codes=None):
        made.append((frame, codes))
        return real(frame, cheap_first, codes)

    monkeypatch.setattr(advice, "ActionRows", spy)
    piers = tower()
    summary = failing_of(piers).assign(check="in-plane shear", util_now=2.0)
    advice.advise(piers, acts, summary, Settings())
    frame, codes = made[0]
    assert (codes is None) == repeat and len(frame) == len(acts) - repeat
    shared, own = real(frame, True, codes), real(frame, True)
    for name in ("storey_codes", "codes", "order", "starts"):
        np.testing.assert_array_equal(getattr(shared, name), getattr(own, name))
    for name in ("storeys", "piers", "keys"):
        assert list(getattr(shared, name)) == list(getattr(own, name))
    assert shared.coded_keys == own.coded_keys
