"""The advice search's round-3 fast paths against what they replace, bit for bit (issue 15).
Each test fails with its fast path broken (tried: a column the checks read dropped, a storey
coded wrongly, a test of the options grid changed, the pair runs' probe taking the first
instead of the latest tie, a pier's rows spread to another).

- variant rows without the UNREAD pier columns: the checks give the same utilisations;
- the checks on storeys as integer codes (`_utilisation`) against the checks on text storeys;
- `_built_options` on the piers x options grid against the tests on gathered rows;
- the pairs kept in runs (`_run_groups`, `_run_members`, `_run_take`) against the arrays of
  every pair (`_pair_groups`, `_sorted_members`), and `_probed_pairs` in short runs against
  the probe over the pair table;
- pours, flags and the piers left worked out on one row per pier against the joins of every
  option row.
"""

from __future__ import annotations

import advice_reference
import numpy as np
import pandas as pd
import pytest
from test_advice_speed import actions_for, failing_of, tower

from xlcore import geometry
from xlcore.checks import advice
from xlcore.model import Settings

STANDARDS = ["AS 3600:2018", "ACI 318-19"]


def candidates(s: Settings, unread=None, monkeypatch=None):
    piers = tower()
    if unread is not None:
        monkeypatch.setattr(advice, "UNREAD", unread)
    var, meta = advice._candidates(piers, failing_of(piers), s)
    return piers, var, meta


@pytest.mark.parametrize("standard", STANDARDS)
@pytest.mark.parametrize("cheap_first", [False, True])
def test_variant_rows_without_the_unread_columns_check_the_same(standard, cheap_first, monkeypatch):
    """Every kind of option (end zones too, whose columns the checks read only where present):
    the same utilisation of every variant with every pier column and without UNREAD's."""
    s = Settings(standard=standard)
    piers, full, meta = candidates(s, (), monkeypatch)
    monkeypatch.undo()
    _, narrow, meta2 = candidates(s)
    pd.testing.assert_frame_equal(meta, meta2, check_exact=True)
    dropped = set(full.columns) - set(narrow.columns)
    assert dropped == set(advice.UNREAD) & set(piers.columns) and "core" in dropped
    assert set(meta.kind) == {advice.GRADE_KIND, *advice.PIER_KINDS}
    acts = advice.ActionRows(actions_for(piers, 2.0), cheap_first=cheap_first)
    want = advice._utilisation(full.iloc[meta.variant.to_numpy()], meta, acts, s)
    got = advice._utilisation(narrow.iloc[meta.variant.to_numpy()], meta, acts, s)
    assert (want > 1.0).any() and (want <= 1.0).any()
    pd.testing.assert_series_equal(got, want, check_exact=True)


@pytest.mark.parametrize("standard", STANDARDS)
def test_checks_on_coded_storeys_equal_the_checks_on_text_storeys(standard):
    """`_utilisation` hands the checks integer storey codes; `_worst` on the rows with their
    storey names gives the same numbers (the screening set too: fewer storeys, other codes)."""
    s = Settings(standard=standard)
    piers, var, meta = candidates(s)
    acts = actions_for(piers, 2.0)
    rows = var.iloc[meta.variant.to_numpy()]
    for table in (acts, advice._screening_actions(acts, failing_of(piers)).iloc[::2]):
        for cheap in (False, True):
            a = advice.ActionRows(table, cheap_first=cheap)
            coded = a.for_variants(meta, coded=True)
            assert coded.storey.dtype.kind == "i" and set(coded.storey) <= set(range(len(a.storeys)))
            want = advice._worst(rows, a.for_variants(meta), s, cheap_first=cheap)
            got = advice._utilisation(rows, meta, a, s)
            assert (want > 1.0).any() and (want <= 1.0).any()
            pd.testing.assert_series_equal(got, want, check_exact=True)
            axial = advice._worst(rows, a.for_variants(meta), s, only_axial=True)
            pd.testing.assert_series_equal(advice._utilisation(rows, meta, a, s, only_axial=True), axial)


def built_by_rows(base, o, bi, oi, std, settings):
    """The code `_built_grid` replaced: every test on the fields gathered to the rows."""
    kind = o.kind.to_numpy()[oi]
    pre = (kind == advice.ZONE_KIND) | (kind == advice.THICK_KIND)
    grade = kind == advice.GRADE_KIND
    pre[grade] = o.grade.to_numpy()[oi][grade] > base.fc.to_numpy(float)[bi][grade]
    tw0, Lw = base.tw.to_numpy(float)[bi], base.Lw.to_numpy(float)[bi]
    need = advice._layers_needed(tw0, settings)
    d, sp, n = (o[k].to_numpy()[oi] for k in ("dia", "spacing", "layers"))
    rho = geometry.bar_ratio(n, d, sp, tw0)
    for prefix, name in (("h", advice.H_KIND), ("v", advice.V_KIND)):
        sel = kind == name
        way = 0 if prefix == "v" else 1
        built = (sp <= std.max_spacing(tw0, Lw)[way]) & (sp - d >= std.min_clear_gap(d))
        now = base[f"rho_{prefix}"].to_numpy(float)[bi]
        pre[sel] = ((rho > now + 1e-12) & (n >= need) & built)[sel]
    return pre


@pytest.mark.parametrize(
    "settings",
    [
        Settings(),
        Settings(standard="ACI 318-19"),
        Settings(eq_two_layers="no"),
        Settings(ductility="elastic (mu = 1)"),
    ],
    ids=["as", "aci", "one-layer", "no-eq"],
)
def test_options_grid_equals_the_tests_on_gathered_rows(settings):
    piers = tower()
    base = piers.merge(failing_of(piers)[["storey", "pier_id"]], on=["storey", "pier_id"])
    base = base.assign(rho_v=base.rho_v * np.linspace(0.5, 2.0, len(base)))  # some bars dropped, some not
    std = advice._std(settings)
    o = advice._option_table(std)
    bi = np.repeat(np.arange(len(base)), len(o))
    oi = np.tile(np.arange(len(o)), len(base))
    want = built_by_rows(base, o, bi, oi, std, settings)
    got = advice._built_options(base, o, bi.astype(np.int32), oi.astype(np.int32), std, settings)
    assert 0 < want.sum() < len(want)
    np.testing.assert_array_equal(got, want)
    shuffled = np.random.default_rng(1).permutation(len(bi))  # any rows, not only the product
    got = advice._built_options(base, o, bi[shuffled], oi[shuffled], std, settings)
    np.testing.assert_array_equal(got, want[shuffled])


def fake_runs(seed: int, nan: bool):
    """Runs of pairs over 40 piers and the 8 kinds, in the order `_pair_runs` makes them (kind
    by kind, each kind's a options in order), with tied and NaN costs, in short runs."""
    rng = np.random.default_rng(seed)
    bi = np.sort(rng.integers(0, 40, 900))  # meta rows, by pier
    runs = []
    for k in range(len(advice.PAIRS)):
        a = np.sort(rng.choice(len(bi), rng.integers(50, 400), replace=True)).astype(np.int32)
        b = rng.integers(0, len(bi), len(a)).astype(np.int32)
        cost = np.round(rng.random(len(a)) * 5.0, 0)  # few values: many exact ties
        cost[rng.random(len(a)) < 0.05] = -0.0
        if nan:
            cost[rng.random(len(a)) < 0.03] = np.nan
        for cut in np.split(np.arange(len(a)), np.sort(rng.choice(np.arange(1, len(a)), 3, replace=False))):
            runs.append((k, a[cut], b[cut], cost[cut]))
    return bi, runs


@pytest.mark.parametrize("seed", [0, 1, 2])
@pytest.mark.parametrize("nan", [False, True])
def test_pair_runs_find_the_groups_probes_and_members_of_every_pair(seed, nan):
    bi, runs = fake_runs(seed, nan)
    a = np.concatenate([r[1] for r in runs])
    pair = np.concatenate([np.full(len(r[1]), r[0], dtype=np.int8) for r in runs])
    b = np.concatenate([r[2] for r in runs])
    cost = np.concatenate([r[3] for r in runs])
    group, count, last = advice_reference._pair_groups(bi[a], pair, cost)
    group_of, count2, last2, starts = advice._run_groups(runs, bi)
    np.testing.assert_array_equal(count2, count)
    np.testing.assert_array_equal(last2, last)
    np.testing.assert_array_equal(group_of[bi[a].astype(np.int64) * len(advice.PAIRS) + pair], group)
    took = advice._run_take(runs, starts, last[::-1])
    for key, col in (("pair", pair), ("a", a), ("b", b), ("added_cost", cost)):
        np.testing.assert_array_equal(took[key], col[last[::-1]])
        assert took[key].dtype == col.dtype
    for chosen in (np.arange(0, len(count), 3), np.zeros(0, dtype=np.int64)):
        rows, at = advice_reference._sorted_members(group, cost, chosen, count)
        rows2, at2, arrays = advice._run_members(runs, starts, bi, group_of, chosen, count)
        np.testing.assert_array_equal(rows2, rows)
        np.testing.assert_array_equal(at2, at)
        assert rows2.dtype == rows.dtype and at2.dtype == at.dtype
        for key, col in (("pair", pair), ("a", a), ("b", b), ("added_cost", cost)):
            np.testing.assert_array_equal(arrays[key], col[rows])


@pytest.mark.parametrize("chunk", [97, 1 << 16])
def test_probe_of_pairs_in_short_runs_equals_the_probe_over_the_pair_table(chunk, monkeypatch):
    monkeypatch.setattr(advice, "PAIR_CHUNK", chunk)
    piers = tower()
    s = Settings()
    acts = actions_for(piers, 2.5)
    failing = failing_of(piers)
    var, meta = advice._candidates(piers, failing, s)
    meta["pour"], _ = advice.pour_keys(meta.assign(**advice._pier_cols(piers, meta)), piers, s)
    premiums = advice.pour_premiums(piers, s)
    screen = advice.ActionRows(advice._screening_actions(acts, failing), cheap_first=True)
    rows = advice.ActionRows(acts, cheap_first=True)
    rows_of = advice._pair_rows(var)
    table = advice._pairs(meta, premiums, len(var), s)
    assert len(advice._pair_runs(meta, premiums, s)) > (len(table) // chunk)
    general = advice._probed(rows_of, table, ["bi", "pair"], rows, screen, s)
    fast = advice._probed_pairs(meta, premiums, len(var), s, rows_of, rows, screen)
    assert 0 < general.groupby(["bi", "pair"]).ngroups < table.groupby(["bi", "pair"]).ngroups
    pd.testing.assert_frame_equal(fast, general, check_exact=True)
    arrays = advice_reference._pair_arrays(meta, premiums, s)
    got = advice._pair_frame(meta, arrays, np.arange(len(table)), len(var) + np.arange(len(table)))
    pd.testing.assert_frame_equal(got, table, check_exact=True)


def test_per_pier_pours_flags_and_rows_equal_the_joins_of_every_option_row():
    piers = tower()
    s = Settings(grade_pour="each wall at one storey")
    var, meta = advice._candidates(piers, failing_of(piers), s)
    meta = meta.iloc[np.random.default_rng(4).permutation(len(meta))]  # any order of rows
    one, of = advice._one_row_per_pier(meta)
    assert len(one) == meta.bi.nunique() and (one.bi.to_numpy()[of] == meta.bi.to_numpy()).all()
    want = advice.pour_keys(meta.assign(**advice._pier_cols(piers, meta)), piers, s)[0]
    per_pier = advice.pour_keys(one.assign(**advice._pier_cols(piers, one)), piers, s)[0]
    got = per_pier.take(of).set_axis(meta.index)
    pd.testing.assert_series_equal(got, want, check_exact=True)
    left = failing_of(piers).iloc[[0, 2]][["storey", "pier_id"]]
    wanted = one.merge(left.assign(_l=True), on=["storey", "pier_id"], how="left")._l.eq(True).to_numpy()
    pd.testing.assert_frame_equal(
        meta[wanted[of]].reset_index(drop=True), meta.merge(left, on=["storey", "pier_id"]), check_exact=True
    )


def test_screening_rows_by_the_action_codes_equal_the_join_on_text_keys():
    """The failing piers' rows found by ActionRows' codes: the join's rows, order and index, and
    the same screening set; a key the actions lack, and duplicated keys (the join's repeats)."""
    piers = tower()
    acts = actions_for(piers, 2.0)
    rows = advice.ActionRows(acts)
    failing = failing_of(piers).iloc[[3, 0, 2]]
    stray = pd.DataFrame({"storey": ["L9"], "pier_id": ["W1-1"]})
    for keys in (failing, pd.concat([failing, stray]), pd.concat([failing, failing.iloc[:1]])):
        want = advice._screening_actions(acts, keys)
        got = advice._screening_actions(rows.frame, keys, rows)
        assert 0 < len(got) < len(acts)
        pd.testing.assert_frame_equal(got, want, check_exact=True)
    joined, _ = advice._failing_rows(rows, failing)
    pd.testing.assert_frame_equal(joined, acts.merge(failing[["storey", "pier_id"]]), check_exact=True)


def test_ranked_keys_sort_and_group_as_the_text_keys():
    """`_ranked`'s storey and pier ranks give `_group_order` the order and groups of the text
    keys (rows shuffled, a subset of the piers); a missing storey keeps the text keys."""
    piers = tower()
    var, meta = advice._candidates(piers, failing_of(piers), Settings())
    one, of = advice._one_row_per_pier(meta)
    rows = meta[meta.kind.isin(advice.PIER_KINDS).to_numpy()]
    rows = rows.iloc[np.random.default_rng(6).permutation(len(rows))]
    rows = rows[rows.pier_id.to_numpy() != rows.pier_id.iloc[0]]
    group = ["storey", "pier_id", "kind"]
    by = advice._ranked(rows, one, of[rows.index.to_numpy()], group)
    assert by == ["_storey", "_pier", "_kind"]
    want, want_of = advice._group_order(rows, group)
    got, got_of = advice._group_order(rows, by)
    assert want_of.max() > 10
    np.testing.assert_array_equal(got, want)
    np.testing.assert_array_equal(got_of, want_of)
    # the same rows de-duplicated and grouped by the ranks as by the text keys
    pd.testing.assert_frame_equal(rows.drop_duplicates(by)[group], rows[group].drop_duplicates())
    heads = rows.groupby(group, sort=False).head(1)
    pd.testing.assert_frame_equal(rows.groupby(by, sort=False).head(1), heads)
    gap = one.assign(storey=one.storey.where(np.arange(len(one)) > 0))
    assert advice._ranked(rows.copy(), gap, of[rows.index.to_numpy()], group) == group
    no_kind = rows.assign(kind=rows.kind.where(np.arange(len(rows)) > 0))
    assert advice._ranked(no_kind, one, of[rows.index.to_numpy()], group) == ["_storey", "_pier", "kind"]
