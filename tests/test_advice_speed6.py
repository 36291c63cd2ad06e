"""The advice search's round-5 fast paths against what they replace, bit for bit (issue 15).
Each test fails with its fast path broken (tried: Cl 11.5's rows left out of the maxima, the
variants over 1 in shear not left out, a column the checks read taken for an order-only one,
every confirmation skipped).

- `_worst` folding each check's rows into a maximum per variant by position (`_Worst`)
  against the checks' tables concatenated and grouped by variant ID;
- each pier's distinct action rows (`_distinct_actions`): the same worst value per variant as
  every row, and the same advice table;
- `_confirm` not running again a variant whose screen held every action row of its pier.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from test_advice_speed import actions_for, failing_of, tower

from xlcore.checks import advice, special_walls
from xlcore.checks.axial import check_pier_axial
from xlcore.checks.detailing import check_detailing
from xlcore.checks.section14 import check_section14
from xlcore.checks.shear import check_pier_shear
from xlcore.model import Settings

STANDARDS = ["AS 3600:2018", "ACI 318-19"]


def worst_by_tables(var, acts, s, only_axial=False, cheap_first=False):
    """`_worst` as it was: the checks' tables concatenated and grouped by variant ID, the rows
    of the variants over 1 left out by their IDs."""
    if cheap_first and not only_axial:
        shear = check_pier_shear(var, acts, s, working=False)
        cut = np.unique(shear.pier_id.to_numpy()[shear.util.to_numpy(float) > 1.0])
        live, live_acts = (var, acts)
        if len(cut):
            live = var[~np.isin(var.pier_id.to_numpy(), cut)]
            live_acts = acts[~np.isin(acts.pier_id.to_numpy(), cut)]
        hwe = advice._effective_heights(live, live_acts, s)
        quake = (var, acts) if special_walls.applies(s) else (live, live_acts)
        cheap = [
            shear[["pier_id", "util"]],
            check_detailing(live, live_acts, s, hwe, working=False, shear=shear)[["pier_id", "util"]],
            check_section14(*quake, s, hwe, working=False),
        ]
        worst = pd.concat(cheap).groupby("pier_id").util.max()
        over = worst.index[(worst > 1.0).to_numpy()]
        if len(over):
            rest = ~var.pier_id.isin(over).to_numpy()
            var, acts = var[rest], acts[~acts.pier_id.isin(over).to_numpy()]
        axial = check_pier_axial(var, acts, s, working=False, util_only=True)
        parts = cheap
        if len(axial):
            parts.append(axial[["pier_id", "util"]])
            simp = axial[axial.util_s.notna()]
            parts.append(simp[["pier_id", "util_s"]].rename(columns={"util_s": "util"}))
        return pd.concat(parts).groupby("pier_id").util.max()
    axial = check_pier_axial(var, acts, s, working=False, util_only=True)
    shear = None if only_axial else check_pier_shear(var, acts, s, working=False)
    parts = [] if shear is None else [shear[["pier_id", "util"]]]
    if len(axial):
        parts.append(axial[["pier_id", "util"]])
        simp = axial[axial.util_s.notna()]
        parts.append(simp[["pier_id", "util_s"]].rename(columns={"util_s": "util"}))
        hwe = axial.groupby(["storey", "pier_id"]).hwe.first()
    else:
        hwe = None
    if not only_axial:
        parts.append(check_detailing(var, acts, s, hwe, working=False, shear=shear)[["pier_id", "util"]])
        parts.append(check_section14(var, acts, s, hwe, working=False))
    return pd.concat(parts).groupby("pier_id").util.max()


def search_inputs(standard, scale=2.0):
    s = Settings(standard=standard)
    piers = tower()
    var, meta = advice._candidates(piers, failing_of(piers), s)
    return s, piers, var, meta, actions_for(piers, scale)


@pytest.mark.parametrize("standard", STANDARDS)
@pytest.mark.parametrize("mode", ["all", "cheap_first", "only_axial"])
def test_worst_by_position_equals_the_checks_tables_grouped(standard, mode):
    s, piers, var, meta, acts = search_inputs(standard)
    # the rows in another order than the variants' (positions, not order, pair them)
    rows = var.iloc[meta.variant.to_numpy()[::-1]]
    a = advice.ActionRows(acts).for_variants(meta)
    kw = dict(cheap_first=mode == "cheap_first", only_axial=mode == "only_axial")
    want = worst_by_tables(rows, a, s, **kw)
    got = advice._worst(rows, a, s, **kw)
    assert (want > 1.0).any() and (want <= 1.0).any()
    pd.testing.assert_series_equal(got, want, check_exact=True)


def with_repeats(acts: pd.DataFrame) -> pd.DataFrame:
    """Each combination's rows again under other names and row numbers (the same numbers), a
    copy with M* = -0.0 where it is 0.0 and one with another V*: what the search may drop and
    what it must keep."""
    again = acts.assign(combination=acts.combination + "x", row=acts.row + len(acts))
    zero = acts.assign(m=0.0).iloc[:5]
    signed = zero.assign(m=-0.0, combination="Z", row=-1)
    other = acts.iloc[:3].assign(v=acts.v.iloc[:3] * 1.5, combination="V", row=-2)
    return pd.concat([acts, again, zero, signed, other], ignore_index=True)


def test_distinct_rows_drop_only_rows_equal_to_an_earlier_one():
    acts = with_repeats(actions_for(tower(), 2.0))
    kept = advice._distinct_actions(acts, Settings())
    assert len(kept) < len(acts)
    # a row is dropped where an earlier row equals it in every column but the order-only ones
    # (floats by their bits), and only there
    key = acts.drop(columns=list(advice.ORDER_ONLY))
    key = key.assign(**{c: key[c].to_numpy().view(np.int64) for c in key if key[c].dtype.kind == "f"})
    first = ~key.duplicated().to_numpy()
    assert kept.index.equals(acts.index[first])
    # -0.0 kept apart from 0.0, an earthquake combination's rows kept apart by name
    assert (kept.combination == "Z").sum() == 5
    quake = advice._distinct_actions(acts, Settings(earthquake_combinations="C1x"))
    assert len(quake) == len(kept) + (acts.combination == "C1x").sum()


@pytest.mark.parametrize("standard", STANDARDS)
@pytest.mark.parametrize("cheap_first", [False, True])
def test_distinct_rows_give_every_variant_the_same_worst(standard, cheap_first):
    s, piers, var, meta, acts = search_inputs(standard)
    acts = with_repeats(acts)
    rows = var.iloc[meta.variant.to_numpy()]
    every = advice.ActionRows(acts, cheap_first=cheap_first)
    distinct = advice.ActionRows(advice._distinct_actions(acts, s), cheap_first=cheap_first)
    assert len(distinct) < len(every)
    want = advice._utilisation(rows, meta, every, s)
    got = advice._utilisation(rows, meta, distinct, s)
    assert (want > 1.0).any() and (want <= 1.0).any()
    pd.testing.assert_series_equal(got, want, check_exact=True)
    axial = advice._utilisation(rows, meta, every, s, only_axial=True)
    pd.testing.assert_series_equal(advice._utilisation(rows, meta, distinct, s, only_axial=True), axial)


def few_combinations(piers, scale):
    """Three combinations per pier, each given four times under other names (the L tower's
    kind: few distinct rows, all in the screen)."""
    acts = actions_for(piers, scale)
    acts = acts[acts.combination.isin(["C1", "C4", "C7"])]
    out = pd.concat(
        [acts.assign(combination=acts.combination + f"-{k}") for k in range(4)], ignore_index=True
    )
    return out.assign(row=np.arange(len(out)))


@pytest.mark.parametrize("standard", STANDARDS)
@pytest.mark.parametrize("scale", [1.2, 2.0])
def test_search_on_distinct_rows_equals_the_search_on_every_row(standard, scale, monkeypatch):
    """The advice table with each pier's distinct rows and the confirmations the screen makes
    needless, against the search on every row with every confirmation run."""
    s = Settings(standard=standard)
    piers = tower()
    acts = few_combinations(piers, scale)
    summary = failing_of(piers)
    runs = []
    real = advice._utilisation

    def counted(rows, meta, actions, settings, only_axial=False):
        runs.append(only_axial)
        return real(rows, meta, actions, settings, only_axial)

    monkeypatch.setattr(advice, "_utilisation", counted)
    got = advice.advise(piers, acts, summary, s)
    fast_confirms = sum(runs)
    runs.clear()
    monkeypatch.setattr(advice, "_distinct_actions", lambda rows, settings, *codes: rows)
    confirm = advice._confirm
    monkeypatch.setattr(advice, "_confirm", lambda *a: confirm(*a[:5]))  # no screen: every one run
    want = advice.advise(piers, acts, summary, s)
    assert sum(runs) > fast_confirms  # the fast search left confirmations out
    assert (want.util <= 1.0).any()
    pd.testing.assert_frame_equal(got, want, check_exact=True)


@pytest.mark.parametrize("standard", STANDARDS)
def test_confirm_without_rerun_equals_the_confirm_on_every_row(standard):
    """A variant whose screen holds all its pier's rows keeps the screen's value; one whose
    screen holds some is run on every row; the same values as running every one."""
    s, piers, var, meta, acts = search_inputs(standard, 2.0)
    every = advice.ActionRows(acts, cheap_first=True)
    # the whole table as the screen of the first storey's piers, a part of it for the second
    part = acts[(acts.storey == "L1") | acts.combination.isin(["C0", "C1"])]
    screen = advice.ActionRows(part, cheap_first=True)

    def rows_of(m):
        return var.iloc[m.variant.to_numpy()]

    screened = meta.variant.map(advice._utilisation(rows_of(meta), meta, screen, s)).to_numpy(float)
    hopeful = ~(screened > 1.0)
    first = meta[hopeful]
    assert (first.storey == "L1").any() and (first.storey == "L2").any()
    want = advice._confirm(rows_of, first, screened[hopeful], every, s)
    got = advice._confirm(rows_of, first, screened[hopeful], every, s, screen)
    assert (want > 1.0).any() and (want <= 1.0).any()
    pd.testing.assert_series_equal(got, want, check_exact=True)


@pytest.mark.parametrize("standard", STANDARDS)
def test_hold_ratio_once_per_distinct_row_equals_row_by_row(standard):
    """`_hold_ratio` works each distinct row out once and spreads it: the rows' own answers,
    bit for bit, on repeated rows, rows one value apart, and a ratio no arrangement holds."""
    s = Settings(standard=standard)
    std = advice._std(s)
    rng = np.random.default_rng(5)
    base = np.array(
        [
            [0.0025, 1.0, 200.0, 12.0, 3000.0],
            [0.0025, 2.0, 200.0, 12.0, 3000.0],
            [0.0040, 2.0, 250.0, 16.0, 1200.0],
            [0.0040, 2.0, 275.0, 16.0, 1200.0],
            [0.0040, 2.0, 275.0, 20.0, 1200.0],
            [0.0600, 2.0, 300.0, 16.0, 2500.0],  # more than the catalogue holds
        ]
    )
    rows = base[rng.integers(0, len(base), 200)]
    for label, way in (("vertical", 0), ("horizontal", 1)):
        dias = advice._dias(std, label)
        args = (rows[:, 0], rows[:, 1], rows[:, 2], dias, rows[:, 3], std, rows[:, 4], way)
        got = advice._hold_ratio(*args)
        want = advice._hold_ratio_rows(*args)
        assert want[3].any() and not want[3].all()
        for g, w in zip(got, want, strict=True):
            assert g.dtype == w.dtype and np.array_equal(g, w)


def group_order_by_columns(meta, group):
    """`_group_order` as it was: a lexsort of each key's codes in turn."""
    codes = [pd.factorize(meta[c], sort=True)[0] for c in group]
    order = np.lexsort((meta.added_cost.to_numpy(float), *reversed(codes)))
    new = np.zeros(len(order), dtype=bool)
    for c in codes:
        k = c[order]
        new[1:] |= k[1:] != k[:-1]
    new[0] = True
    return order, np.cumsum(new) - 1


def test_group_order_on_one_key_equals_the_sort_by_each_key():
    """The keys' codes as one mixed-radix number: the same stable order (tied costs, NaN
    costs last) and the same group numbers as sorting by each key in turn."""
    rng = np.random.default_rng(11)
    n = 3000
    meta = pd.DataFrame(
        dict(
            storey=rng.choice(["L1", "L10", "L2", "B1"], n),
            pier_id=rng.choice([f"W{i}" for i in range(13)], n),
            kind=rng.choice(list(advice.PIER_KINDS), n),
            added_cost=rng.choice([1.0, 2.0, 2.0, 3.5, np.nan, -0.0, 0.0], n),
        )
    )
    for group in (["storey", "pier_id", "kind"], ["storey", "pier_id"], ["kind"]):
        want = group_order_by_columns(meta, group)
        got = advice._group_order(meta, group)
        assert np.array_equal(got[0], want[0]) and np.array_equal(got[1], want[1])
        assert want[1].max() >= 3


def zone_options_on_every_row(var, sel, dia, n, std):
    """`_zone_options` as it was: the rules worked out on every variant row."""
    from xlcore.mechanics import bars

    keep = np.ones(len(var), dtype=bool)
    if not sel.any():
        return keep
    layers = var.v_layers.to_numpy(float)
    d, count = np.nan_to_num(dia), np.nan_to_num(n)
    need = bars.zone_min_length(count, layers, d, var.cover.to_numpy(float), 0.0, std.zone_clear_gap(d))
    length = np.ceil(need / advice.ZONE_ROUND) * advice.ZONE_ROUND
    area = count * bars.bar_area(d)
    more = np.ones(len(var), dtype=bool)
    for side in "ab":
        now = np.nan_to_num(var[f"z{side}_n"].to_numpy(float)) * bars.bar_area(
            np.nan_to_num(var[f"z{side}_dia"].to_numpy(float))
        )
        more &= area > now + 1e-9
    room = (var.Lw.to_numpy(float) - std.zone_clear_gap(d)) / 2
    fits = (count % np.maximum(layers, 1) == 0) & (length <= room) & more
    keep[sel] = fits[sel]
    for side in "ab":
        for k, v in (("n", count), ("dia", d), ("len", length), ("tie", 0.0), ("ties", np.nan)):
            col = f"z{side}_{k}"
            var[col] = np.where(sel, v, var[col].to_numpy(float))
    return keep


@pytest.mark.parametrize("standard", STANDARDS)
def test_zone_options_on_their_rows_equal_the_rules_on_every_row(standard, monkeypatch):
    s = Settings(standard=standard)
    piers = tower()
    # a short pier (zones that do not fit) and one with zones already (options with no more steel)
    piers.loc[0, "Lw"] = 700.0
    for side in "ab":
        piers[[f"z{side}_n", f"z{side}_dia", f"z{side}_len"]] = 0.0
        piers.loc[1, [f"z{side}_n", f"z{side}_dia", f"z{side}_len"]] = [6.0, 28.0, 400.0]
    var, meta = advice._candidates(piers, failing_of(piers), s)
    monkeypatch.setattr(advice, "_zone_options", zone_options_on_every_row)
    var_all, meta_all = advice._candidates(piers, failing_of(piers), s)
    zoned = meta.kind == advice.ZONE_KIND
    assert zoned.sum() > 10 and len(meta) > 500
    pd.testing.assert_frame_equal(var, var_all, check_exact=True)
    pd.testing.assert_frame_equal(meta, meta_all, check_exact=True)



def pour_rows_by_groups(
    piers,
    failing,
    summary,
    grades,
    settings,
    premiums=None,
):
    """`_pour_rows` as it was: a group frame per pour and label lookups."""
    f = failing.assign(**advice._pier_cols(piers, failing))
    f["pour"], _ = advice.pour_keys(f, piers, settings)
    f = f.merge(summary[["storey", "pier_id", "check", "util"]], on=["storey", "pier_id"])
    f["_order"] = f.storey_index.to_numpy(float)
    prem = advice.pour_premiums(piers, settings) if premiums is None else premiums
    count = f.groupby("pour").size().rename("n")
    g = grades.drop(columns="pour", errors="ignore").merge(
        f[["storey", "pier_id", "pour"]], on=["storey", "pier_id"]
    )
    ok = (
        g[g.util <= 1.0]
        .groupby(["pour", "fc"])
        .agg(n_ok=("util", "size"), util=("util", "max"))
        .reset_index()
    )
    ok = ok.merge(count.reset_index(), on="pour")
    ok = ok[ok.n_ok == ok.n].merge(prem, left_on=["pour", "fc"], right_on=["pour", "grade"])
    best = ok.sort_values(["premium", "fc"], kind="stable").groupby("pour").head(1).set_index("pour")
    rows = []
    for pour, members in f.sort_values(["_order", "pier_id"]).groupby("pour", sort=False):
        worst = members.loc[members.util.idxmax()]
        listed = ", ".join(
            members.pier_id.astype(str)
            if members.storey.nunique() == 1
            else (members.storey.astype(str) + " " + members.pier_id.astype(str))
        )
        storeys = pour.split(", ", 1)[1]
        row = dict(
            storey=storeys,
            pier_id="",
            pour=pour,
            check=worst.check,
            util_now=worst.util,
            rank=np.nan,
            kind=advice.GRADE_KIND,
            fixes=listed,
            _order=members._order.min(),
        )
        if pour in best.index:
            b = best.loc[pour]
            row |= dict(
                option=f"f'c {b.fc:g} MPa for every wall of the pour below it ({pour})",
                util=b.util,
                added_cost=b.premium,
            )
        else:
            row |= dict(
                option="none: no standard grade makes every failing pier of the pour pass",
                util=np.nan,
                added_cost=np.nan,
                fixes="",
            )
        rows.append(row)
    return pd.DataFrame(rows)



@pytest.mark.parametrize(
    "pour", ["the core at one storey", "each wall at one storey", "the core over 2 storeys"]
)
@pytest.mark.parametrize("scale", [1.2, 2.0])
def test_pour_rows_by_position_equal_the_rows_by_groups(pour, scale, monkeypatch):
    """The advice table with the pour rows made from arrays per pour, against the rows made
    from a group frame per pour (pours of one and of two storeys, with and without a grade
    that fixes them, a tie of the worst utilisation)."""
    s = Settings(grade_pour=pour)
    piers = tower()
    summary = failing_of(piers)
    summary.loc[1, "util"] = 3.0  # the worst of its pour, and a tie with the pour's others elsewhere
    acts = actions_for(piers, scale)
    got = advice.advise(piers, acts, summary, s)
    monkeypatch.setattr(advice, "_pour_rows", pour_rows_by_groups)
    want = advice.advise(piers, acts, summary, s)
    pours = want[want.scope == "pour"]
    assert len(pours) >= 1 and (pours.fixes.str.len().gt(0).any() or pours.util.isna().all())
    pd.testing.assert_frame_equal(got, want, check_exact=True)


@pytest.mark.parametrize(
    "pour", ["the core at one storey", "each wall at one storey", "the core over 2 storeys"]
)
@pytest.mark.parametrize("seed", [0, 1, 2])
def test_pour_rows_on_given_grades_equal_the_rows_by_groups(pour, seed):
    """`_pour_rows` against the rows by groups on grades given directly: pours that a grade
    fixes and pours none fixes, members over one and two storeys, tied worst utilisations."""
    s = Settings(grade_pour=pour)
    piers = tower()
    rng = np.random.default_rng(seed)
    summary = failing_of(piers).assign(util=rng.choice([1.5, 2.0, 2.0], len(piers)))
    summary["check"] = [f"check {i}" for i in range(len(summary))]
    grades = pd.DataFrame(
        [
            dict(storey=r.storey, pier_id=r.pier_id, fc=g, util=float(rng.choice([0.7, 0.9, 1.2])), variant=i)
            for i, (r, g) in enumerate(
                (r, g) for r in summary.itertuples() for g in advice._std(s).grades() if g > 25.0
            )
        ]
    )
    want = pour_rows_by_groups(piers, summary[["storey", "pier_id"]], summary, grades, s)
    got = advice._pour_rows(piers, summary[["storey", "pier_id"]], summary, grades, s)
    assert want.util.notna().any() or pour != "each wall at one storey"
    pd.testing.assert_frame_equal(got, want, check_exact=True)
