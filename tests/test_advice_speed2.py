"""The advice search's second round of fast paths (issue 15) against the general ones, bit for
bit on crafted cases; each test fails if its fast path is broken.

- `check_pier_axial(util_only=True)` (no fixed-N* solve, `interaction(at_n=False)`) against the
  full check: util, util_s and hwe, with asymmetric end zones where the least eccentricity sets
  M* (both senses run) so that the choice between them is exercised.
- `_pair_groups` / `_sorted_members` (the pair probe in one pass, only passing groups sorted)
  against the stable lexsort of every pair they replace, with cost ties and NaN costs.
- the option words made once per distinct arrangement (`_words`) against words made row by row.
"""

import advice_reference
import numpy as np
import pandas as pd
import pytest
from test_advice_speed import actions_for, failing_of, tower

from xlcore.checks import advice
from xlcore.checks.axial import check_pier_axial, interaction, rect_sections
from xlcore.model import Settings


def zoned_rows(s: Settings) -> pd.DataFrame:
    """Variant rows of the test tower with end zones, every other one with its b zone removed
    (asymmetric: its strength depends on the sense of M*)."""
    piers = tower()
    var, meta = advice._candidates(piers, failing_of(piers), s)
    rows = var[(meta.kind == advice.ZONE_KIND).to_numpy()].reset_index(drop=True)
    half = np.arange(len(rows)) % 2 == 0
    for k in ("zb_n", "zb_dia", "zb_len"):
        rows[k] = np.where(half, 0.0, rows[k].to_numpy(float))
    return rows


def actions_with_small_moments(rows: pd.DataFrame) -> pd.DataFrame:
    """The test actions for these variants, a third of the moments made tiny (the standard's
    least eccentricity then sets M*) and some axial forces tensile."""
    acts = actions_for(tower(), 2.0)
    out = []
    for i, r in enumerate(rows.itertuples(index=False)):
        a = acts[acts.storey == r.storey].drop_duplicates("combination").copy()
        a["pier_id"] = r.pier_id
        small = (np.arange(len(a)) + i) % 3 == 0
        a["m"] = np.where(small, 0.5 * np.sign(np.arange(len(a)) - 3.5), a.m.to_numpy(float))
        out.append(a)
    return pd.concat(out, ignore_index=True)


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
def test_util_only_equals_the_full_axial_check(standard):
    s = Settings(standard=standard)
    rows = zoned_rows(s)
    rows["pier_id"] = np.arange(len(rows), dtype=np.int64)
    acts = actions_with_small_moments(rows)
    full = check_pier_axial(rows, acts, s, working=False)
    fast = check_pier_axial(rows, acts, s, working=False, util_only=True)
    assert len(full) == len(fast) > 100
    assert (full.compressed != "either").any()  # asymmetric sections, sense chosen by lam
    if standard.startswith("AS"):  # its least eccentricity sets M*: both senses run, worse kept
        both = full.m_design.to_numpy() > np.abs(full.m.to_numpy())
        assert both.any() and (full.compressed[both] != "either").any()
    assert (full.util > 1.0).any() and (full.util <= 1.0).any()
    assert full.util_s.notna().any() and full.util_s.isna().any()  # the simplified method both ways
    for col in ("storey", "pier_id", "util", "util_s", "hwe"):
        pd.testing.assert_series_equal(fast[col], full[col], check_exact=True)


def test_interaction_without_the_solve_at_n_keeps_every_other_value():
    rows = zoned_rows(Settings())
    sec = rect_sections(rows)
    n = np.linspace(-2e6, 2e7, len(rows))
    m = np.linspace(1e6, 4e9, len(rows))
    full = interaction(sec, n, m_star=m)
    fast = interaction(sec, n, m_star=m, at_n=False)
    assert set(fast) == set(full)
    for k in full:
        if k in ("dn", "nu", "mu", "phi_mu", "phi"):
            continue
        np.testing.assert_array_equal(fast[k], full[k], err_msg=k)
    assert np.isnan(fast["dn"]).all()


def test_a_missing_geometry_column_fails_loudly_in_the_search():
    s = Settings()
    rows = zoned_rows(s)
    rows["pier_id"] = np.arange(len(rows), dtype=np.int64)
    acts = actions_with_small_moments(rows)
    with pytest.raises(KeyError, match="fsy"):
        check_pier_axial(rows.drop(columns="fsy"), acts, s, working=False, util_only=True)
    # the optional ones (no zones, no edge names) are still optional
    optional = [c for c in rows if c.startswith(("za_", "zb_", "edge_"))]
    check_pier_axial(rows.drop(columns=optional), acts, s, working=False, util_only=True)


def reference_probe(bi, pair, cost):
    """The code `_pair_groups` replaced: a stable lexsort of every pair, NaN last."""
    order = np.lexsort((cost, pair, bi))
    sb, sp = bi[order], pair[order]
    new = np.ones(len(order), dtype=bool)
    new[1:] = (sb[1:] != sb[:-1]) | (sp[1:] != sp[:-1])
    group = np.cumsum(new) - 1
    last = np.flatnonzero(np.append(new[1:], True))
    return order, group, last


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_pair_probe_in_one_pass_equals_the_full_sort(seed):
    rng = np.random.default_rng(seed)
    n = 20_000
    # pairs listed kind by kind, each kind by pier (as `_pair_arrays` lists them)
    pair = np.sort(rng.integers(0, len(advice.PAIRS), n)).astype(np.int8)
    bi = np.concatenate([np.sort(rng.integers(0, 300, (pair == k).sum())) for k in range(len(advice.PAIRS))])
    cost = rng.choice(np.array([1.0, 2.0, 3.0, 3.0, 5.5, 7.0]), n) + rng.integers(0, 2, n)  # ties
    cost[rng.random(n) < 0.002] = np.nan
    order, group_sorted, last = reference_probe(bi, pair, cost)
    group, count, probe = advice_reference._pair_groups(bi, pair, cost)
    np.testing.assert_array_equal(probe, order[last])
    np.testing.assert_array_equal(group[order], group_sorted)
    assert np.isnan(cost[probe]).any() and (~np.isnan(cost[probe])).any()
    chosen = np.flatnonzero(rng.random(len(count)) < 0.3)
    rows, at = advice_reference._sorted_members(group, cost, chosen, count)
    keep = np.flatnonzero(np.isin(group_sorted, chosen))
    np.testing.assert_array_equal(rows, order[keep])
    np.testing.assert_array_equal(at, keep)


def test_option_words_made_once_per_arrangement_equal_words_row_by_row(monkeypatch):
    piers = tower()
    s = Settings()
    var, meta = advice._candidates(piers, failing_of(piers), s)
    assert {advice.THICK_KIND, advice.ZONE_KIND} <= set(meta.kind)
    def row_by_row(f, *cols):
        return [f(*row) for row in zip(*(np.asarray(c, dtype=float).tolist() for c in cols), strict=True)]

    monkeypatch.setattr(advice, "_words", row_by_row)
    var_rows, meta_rows = advice._candidates(piers, failing_of(piers), s)
    pd.testing.assert_frame_equal(meta, meta_rows, check_exact=True)
    pd.testing.assert_frame_equal(var, var_rows, check_exact=True)
    # the thickness words read as before: both directions, each with its ratio's change
    base = piers.set_index(["storey", "pier_id"])
    thick = meta[meta.kind == advice.THICK_KIND]
    std = advice._std(s)
    for r, v in zip(thick.itertuples(), var.iloc[thick.variant.to_numpy()].itertuples(), strict=True):
        b = base.loc[(r.storey, r.pier_id)]
        want = (
            f"tw {v.tw:g} mm, bars for the same ratio: vertical "
            f"{advice._bars_text(v.v_dia, v.v_spacing, v.v_layers, std)} "
            f"(rho {b.rho_v:.5f} -> {v.rho_v:.5f}); "
            f"horizontal {advice._bars_text(v.h_dia, v.h_spacing, v.h_layers, std)} "
            f"(rho {b.rho_h:.5f} -> {v.rho_h:.5f})"
        )
        assert r.option == want


def test_words_once_per_distinct_row_equal_words_row_by_row():
    calls = []

    def words(d, sp, n):
        calls.append((d, sp, n))
        return f"{d:g}/{sp:g}/{n:.1f}"

    d = np.array([12.0, 12.0, 12.0, 16.0, 12.0, 0.0, -0.0, np.nan, 12.0])
    sp = np.array([200.0, 200.0, 150.0, 200.0, 200.0, 0.0, 0.0, 1.0, 200.0])
    n = np.array([1.0, 2.0, 2.0, 2.0, 1.0, 0.0, 0.0, 1.0, 1.0])
    got = advice._words(words, d, sp, n)
    assert got == [words(*r) for r in zip(d.tolist(), sp.tolist(), n.tolist(), strict=True)]
    assert len(calls) == 7 + 9  # the repeats of the first row answered once
    assert got[5] == "0/0/0.0" and got[6] == "-0/0/0.0"
    assert advice._words(words) == [] and advice._words(words, d[:0]) == []


def test_interaction_works_out_only_the_sections_its_rows_read():
    """With `of`, the sections no row reads are skipped: every value equals the one worked out
    on all sections (here: on each row's own section, `of` None)."""
    rows = zoned_rows(Settings())
    sec = rect_sections(rows)
    rng = np.random.default_rng(5)
    of = rng.choice(np.arange(0, len(rows), 3), 400)  # a third of the sections, shuffled
    n = rng.uniform(-2e6, 2e7, len(of))
    m = rng.uniform(0.0, 4e9, len(of))
    part = interaction(sec, n, of=of, m_star=m)
    whole = interaction(sec.take(of), n, m_star=m)
    for k in whole:
        np.testing.assert_array_equal(part[k], whole[k], err_msg=k)


def reference_probed(rows_of, meta, group, actions, screen, settings, keep_all=False):
    """`_probed` as it was: pandas' stable sort on the keys, group-by tail, merge."""
    if meta.empty:
        return meta.assign(_hope=True) if keep_all else meta
    meta = meta.sort_values([*group, "added_cost"], kind="stable")
    probe = meta.groupby(group, sort=False).tail(1)
    ok = probe.variant.map(advice._every(rows_of, probe, actions, screen, settings)).le(1.0).to_numpy()
    marked = meta.merge(probe[ok][group].assign(_hope=True), on=group, how="left")
    marked["_hope"] = marked._hope.eq(True)
    return marked if keep_all else marked[marked._hope].drop(columns="_hope")


@pytest.mark.parametrize("keep_all", [True, False])
@pytest.mark.parametrize("scale", [1.0, 2.5])
def test_probe_by_integer_codes_equals_the_sort_on_text_keys(keep_all, scale):
    """Same rows, order, index, columns and marks; groups by text keys (singles, shuffled, some
    costs NaN or tied) and by integer keys (pairs)."""
    piers = tower()
    s = Settings()
    acts = actions_for(piers, scale)
    failing = failing_of(piers)
    var, meta = advice._candidates(piers, failing, s)
    screen = advice.ActionRows(advice._screening_actions(acts, failing))
    rows = advice.ActionRows(acts)
    rng = np.random.default_rng(11)
    alone = meta[meta.kind.isin(advice.PIER_KINDS).to_numpy()].sample(frac=1.0, random_state=4)
    cost = alone.added_cost.to_numpy(float).copy()
    cost[rng.random(len(cost)) < 0.02] = np.nan
    cost[rng.random(len(cost)) < 0.05] = 1000.0
    alone = alone.assign(added_cost=cost)
    group = ["storey", "pier_id", "kind"]

    def single_rows(m):
        return var.iloc[m.variant.to_numpy()]

    want = reference_probed(single_rows, alone, group, rows, screen, s, keep_all)
    got = advice._probed(single_rows, alone, group, rows, screen, s, keep_all)
    assert 0 < int(want._hope.sum() if keep_all else len(want)) < len(alone)
    pd.testing.assert_frame_equal(got, want, check_exact=True)
    meta["pour"], _ = advice.pour_keys(meta.assign(**advice._pier_cols(piers, meta)), piers, s)
    pairs = advice._pairs(meta, advice.pour_premiums(piers, s), len(var), s).sample(frac=0.3, random_state=2)
    rows_of = advice._pair_rows(var)
    want = reference_probed(rows_of, pairs, ["bi", "pair"], rows, screen, s, keep_all)
    got = advice._probed(rows_of, pairs, ["bi", "pair"], rows, screen, s, keep_all)
    pd.testing.assert_frame_equal(got, want, check_exact=True)
