"""The closed-form pier checks' fast paths (issue 15, fourth round) against the general ways they
replace, bit for bit, on the demo building under both standards and on cases made to reach every
branch. Each test fails with its fast path broken (tried)."""

from __future__ import annotations

import builders
import numpy as np
import pandas as pd
import pytest
from demo_parts import demo_actions, same_frame, settings_for

from xlcore import costs, geometry, pipeline
from xlcore.checks import (
    detailing,
    finish_rules,
    group_first,
    group_max,
    lintels,
    per_pier,
    pier_rows,
    rule_rows,
    section14,
    shear,
)
from xlcore.codes import get_standard
from xlcore.codes.base import first_rows, row_keys, words_once
from xlcore.distribution import rows_of
from xlcore.model import Opening

STANDARDS = ["AS 3600:2018", "ACI 318-19"]


@pytest.fixture(scope="module")
def demo(demo_master):
    """The demo building with its piers and pier actions."""
    return demo_actions(demo_master)


_settings = settings_for


# ---- shear: advice words once per distinct set of numbers


def as3600_advice_row_by_row(util, rho_req, capped, hw_lw, cap) -> list[str]:
    """AS3600.wall_shear_advice as it was: a Python step per row."""
    out = []
    cols = [np.asarray(c).tolist() for c in (util, rho_req, capped, hw_lw, cap.detail["rho_w"])]
    for u, need, over, hl, have in zip(*cols, strict=True):
        if u <= 1.0:
            out.append("")
        elif over:
            out.append("V*/phi exceeds Vu.max (Cl 11.6.2): only a thicker wall or a higher f'c helps")
        elif hl > 1.0:
            out.append(f"raise horizontal steel to rho_h >= {need:.5f} (now {have:.5f})")
        else:
            out.append(f"raise the lesser of rho_h and rho_v to >= {need:.5f} (now {have:.5f})")
    return out


def aci318_advice_row_by_row(util, rho_req, capped, hw_lw, cap) -> list[str]:
    """ACI318.wall_shear_advice as it was: a Python step per row."""
    out = []
    for u, need, over in zip(
        *(np.asarray(c, dtype=float).tolist() for c in (util, rho_req, capped)), strict=True
    ):
        if u <= 1.0:
            out.append("")
        elif over:
            out.append(
                "Vu/phi exceeds 0.66 sqrt(f'c) Acv (ACI 318-19 11.5.4.2): only a thicker wall or "
                "a higher f'c helps"
            )
        else:
            out.append(f"raise horizontal steel to rho_t >= {need:.5f} (11.5.4.3)")
    return out


@pytest.mark.parametrize("standard", STANDARDS)
def test_shear_advice_equals_the_words_row_by_row(standard):
    """Passing, capped, steep and squat rows, NaN utilisations, -0.0 and 0.0 needs, repeated
    and distinct numbers: the same list as the step per row."""
    std = get_standard(standard)
    rng = np.random.default_rng(11)
    n = 4000
    fc = rng.choice([32.0, 40.0, 50.0], n)
    Lw, tw = rng.choice([900.0, 2400.0, 6000.0], n), rng.choice([200.0, 250.0], n)
    hw_lw = rng.choice([0.6, 1.0, 1.0000001, 2.5], n)
    cap = std.wall_shear(fc, 500.0, Lw, tw, hw_lw, rng.choice([0.0025, 0.004], n), 0.0025)
    util = rng.choice([0.5, 1.0, 1.0 + 1e-12, 1.7, 3.0, np.nan], n)
    rho_req = rng.random(n) * 0.02
    rho_req = np.where(rng.random(n) < 0.7, np.round(rho_req, 3), rho_req)  # many repeated
    rho_req[rng.random(n) < 0.05] = -0.0
    rho_req[rng.random(n) < 0.05] = 0.0
    capped = rng.random(n) < 0.2
    want = {"AS 3600:2018": as3600_advice_row_by_row, "ACI 318-19": aci318_advice_row_by_row}[standard]
    expected = want(util, rho_req, capped, hw_lw, cap)
    assert len(set(expected)) > 50 and "" in expected
    assert any("-0.00000" in w for w in expected)
    assert std.wall_shear_advice(util, rho_req, capped, hw_lw, cap) == expected
    assert std.wall_shear_advice(util[:0], rho_req[:0], capped[:0], hw_lw[:0], cap.take(np.arange(0))) == []


def test_row_keys_tell_apart_what_prints_apart():
    """-0.0 and 0.0 apart, NaN with NaN, numbered in the order rows first show them; the first
    row of each code; words made once per code."""
    a = np.array([0.0, -0.0, np.nan, 0.0, np.nan, 1.5, -0.0])
    b = np.array([1, 1, 1, 1, 2, 1, 1])
    codes = row_keys(a, b)
    assert codes.tolist() == [0, 1, 2, 0, 3, 4, 1]
    assert first_rows(codes).tolist() == [0, 1, 2, 4, 5]
    calls = []

    def make(x, y):
        calls.append(len(x))
        return [f"{u:.1f}/{v}" for u, v in zip(x.tolist(), y.tolist(), strict=True)]

    got = words_once(make, a, b)
    assert calls == [5]
    assert got == make(a, b)


# ---- shear: the check by position against the merge on text keys


@pytest.fixture(params=STANDARDS)
def shear_case(request, demo):
    b, piers, acts = demo
    # V* raised on every third row so that some fail (and some by more than Vu.max allows)
    acts = acts.assign(v=acts.v * np.where(np.arange(len(acts)) % 3 == 0, 40.0, 1.0) + 300.0)
    shuffled = acts.sample(frac=1.0, random_state=5).reset_index(drop=True)
    return b, piers, acts, shuffled, request.param


@pytest.mark.parametrize("basis", ["overall wall height", "opening height", "storey clear height"])
@pytest.mark.parametrize("mode", [dict(), dict(text=False), dict(working=False)])
def test_shear_by_position_equals_the_merge(shear_case, basis, mode, monkeypatch):
    """Pier columns gathered by position, Hw/Lw basis words once per pier, new columns joined in
    one step and the sort skipped where the rows stand in order: the same table as the merge on
    (storey, pier_id), the basis words per distinct row, the sort always."""
    b, piers, acts, shuffled, standard = shear_case
    s = _settings(b, standard, shear_height=basis)
    fast = [shear.check_pier_shear(piers, a, s, **mode) for a in (acts, shuffled)]
    in_order = shear._in_order
    monkeypatch.setattr(shear, "pier_rows", lambda *a: None)  # the merge
    monkeypatch.setattr(shear, "_in_order", lambda df, keys: False)  # the sort, always
    slow = [shear.check_pier_shear(piers, a, s, **mode) for a in (acts, shuffled)]
    for got, want in zip(fast, slow, strict=True):
        assert len(want) == len(acts) and (want.status == "FAIL").any() and (want.status == "pass").any()
        same_frame(got, want)
    if mode.get("working", True):
        for got in fast:  # the engineer's row order, whichever order the actions came in
            keys = ["origin", "row", "position"]
            same_frame(got, got.sort_values(keys, kind="stable").reset_index(drop=True))
        # the demo's pier actions come in order (the shortcut taken); shuffled they do not
        assert in_order(acts, ["origin", "row", "position"])
        assert not in_order(shuffled, ["origin", "row", "position"])


def test_in_order_reads_every_key():
    """Ties on the first keys are decided by the later ones; an earlier key decides alone."""
    df = pd.DataFrame({"a": [0, 0, 1, 1], "b": [2, 3, 0, 0], "c": [5, 1, 0, 1]})
    assert shear._in_order(df, ["a", "b", "c"])
    assert not shear._in_order(df.iloc[[0, 1, 3, 2]], ["a", "b", "c"])
    assert not shear._in_order(df.iloc[[1, 0, 2, 3]], ["a", "b", "c"])
    assert not shear._in_order(df.assign(c=[5.0, 1.0, 0.0, 1.0]), ["a", "b", "c"])  # floats: sort


def test_joined_equals_the_column_inserts():
    """New columns in one step: the same frame as one insert each, an existing name replaced in
    its place, a read-only view and an array given twice copied."""
    df = pd.DataFrame({"x": [1.0, 2.0, 3.0], "s": ["a", "b", "c"]})
    view = df.x.to_numpy()
    twice = np.array([7.0, 8.0, 9.0])
    new = {"v": view, "w": twice, "u": twice, "t": ["p", "q", "r"], "z": np.nan}
    want = df.copy()
    for k, v in new.items():
        want[k] = v
    got = shear._joined(df, new)
    same_frame(got, want)
    got.loc[0, "w"] = -1.0
    assert got.u.iloc[0] == 7.0 and df.x.iloc[0] == 1.0
    replaced = shear._joined(df, {"x": np.array([4.0, 5.0, 6.0]), "y": 1})
    assert list(replaced.columns) == ["x", "s", "y"] and replaced.x.tolist() == [4.0, 5.0, 6.0]


# ---- detailing: per-pier inputs by position against the joins


def test_group_max_and_first_equal_the_group_bys():
    """NaN skipped, groups without a value NaN, -0.0 and 0.0 as the first row gives them."""
    rng = np.random.default_rng(3)
    n, groups = 3000, 400
    g = rng.integers(0, groups, n)
    v = rng.choice([-0.0, 0.0, -1.0, 2.5, np.nan, 7.0], n) * rng.choice([1.0, 1.0, 3.0], n)
    v[g % 7 == 0] = np.nan  # groups with no value
    v[g % 11 == 0] = rng.choice([-0.0, 0.0], int((g % 11 == 0).sum()))  # zero the largest
    frame = pd.DataFrame({"g": g, "v": v})
    want_max = frame.groupby("g").v.max().reindex(range(groups)).to_numpy()
    want_first = frame.groupby("g").v.first().reindex(range(groups)).to_numpy()
    assert np.signbit(want_max[np.nan_to_num(want_max, nan=1.0) == 0.0]).any()
    assert np.array_equal(group_max(v, g, groups).view(np.int64), want_max.view(np.int64))
    assert np.array_equal(group_first(v, g, groups).view(np.int64), want_first.view(np.int64))


@pytest.mark.parametrize("spread", [1, 1000])
def test_pier_rows_by_number_equal_rows_of(spread):
    """Integer pier IDs (dense: a table by number; spread: a hash index), a storey that does not
    match, a number not in the table, a number on two storeys, a pair twice, a blank storey:
    rows_of's answer."""
    t_storey = np.array(["L1", "L2", "L1", "L3", "L2"], dtype=object)
    t_pier = np.array([4, 0, 2, 9, 7]) * spread
    a_storey = pd.Series(["L1", "L2", "L2", "L3", "L1", "L1", "L2"])
    a_pier = pd.Series(np.array([4, 0, 2, 9, 5, 2, 7]) * spread)
    want = rows_of(a_storey, a_pier, t_storey, t_pier)
    assert want.tolist() == [0, 1, -1, 3, -1, 2, 4]
    assert pier_rows(a_storey, a_pier, t_storey, t_pier).tolist() == want.tolist()
    twice = t_pier.copy()
    twice[4] = twice[0]  # number 4 on two storeys: by the pairs (rows_of itself)
    assert rows_of(a_storey, a_pier, t_storey, twice).tolist() == [0, 1, -1, 3, -1, 2, -1]
    assert pier_rows(a_storey, a_pier, t_storey, twice).tolist() == [0, 1, -1, 3, -1, 2, -1]
    same_pair = t_storey.copy()
    same_pair[4] = "L1"  # the pair (L1, 4) twice
    assert rows_of(a_storey, a_pier, same_pair, twice) is None
    assert pier_rows(a_storey, a_pier, same_pair, twice) is None
    blank = t_storey.copy()
    blank[1] = None
    assert rows_of(a_storey, a_pier, blank, t_pier) is None
    assert pier_rows(a_storey, a_pier, blank, t_pier) is None


def detailing_case(demo, standard, numbered: int):
    """The demo's piers (some with one layer of bars, so the one-layer rules have rows) and
    actions (N* of some rows -0.0, 0.0 or NaN; some rows of no pier), an effective height per
    pier in another order with one missing and one NaN, the shear table; with `numbered` the
    pier IDs as integers (the advice search's variants), `numbered` apart."""
    b, piers, acts = demo
    s = _settings(b, standard)
    piers = piers.copy()
    one = np.arange(len(piers)) % 9 == 4
    piers.loc[one, "v_layers"] = 1
    piers.loc[np.arange(len(piers)) % 5 == 1, "h_spacing"] = 450.0  # over the spacing limit
    k = np.arange(len(acts))
    acts = acts.assign(n=acts.n * np.where(k % 3 == 0, 30.0, 1.0), v=acts.v * np.where(k % 4 == 0, 25.0, 1.0))
    acts.loc[k % 13 == 1, "n"] = -0.0
    acts.loc[k % 17 == 2, "n"] = 0.0
    acts.loc[k % 19 == 3, "n"] = np.nan
    acts.loc[k % 23 == 5, "pier_id"] = "nowhere"
    if numbered:
        ids = {p: i * numbered for i, p in enumerate(piers.pier_id.unique())}
        piers["pier_id"] = piers.pier_id.map(ids).astype(np.int64)
        acts["pier_id"] = acts.pier_id.map(ids).fillna(-5).astype(np.int64)
    hwe = pd.Series(
        piers.Hc.to_numpy(float) * 0.85,
        index=pd.MultiIndex.from_arrays([piers.storey, piers.pier_id]),
        name="hwe",
    ).iloc[::-1]
    hwe = hwe.iloc[1:]
    hwe.iloc[3] = np.nan
    return s, piers, acts, hwe


@pytest.mark.parametrize("standard", STANDARDS)
@pytest.mark.parametrize("numbered", [0, 1, 1000])
@pytest.mark.parametrize("with_hwe", [True, False])
def test_detailing_by_position_equals_the_joins(demo, standard, numbered, with_hwe, monkeypatch):
    """sigma, hwe, V* and Hw/Lw per pier by position: the same tables (with and without working,
    with the shear table given and run inside) as by the joins on (storey, pier_id); the
    numbers-only table the (pier_id, util) of the full one."""
    s, piers, acts, hwe = detailing_case(demo, standard, numbered)
    hwe = hwe if with_hwe else None
    shear_table = shear.check_pier_shear(piers, acts, s, working=False)
    # Hw/Lw that differs between a pier's rows, NaN on some: the first valid row's is read
    k = np.arange(len(shear_table))
    hw_lw = shear_table.hw_lw.to_numpy() * (1.0 + 0.1 * (k % 3))
    shear_table = shear_table.assign(hw_lw=np.where(k % 7 == 0, np.nan, hw_lw))
    runs = [
        dict(working=True, shear=shear_table),
        dict(working=False, shear=shear_table),
        dict(working=False, shear=None),
    ]
    fast = [detailing.check_detailing(piers, acts, s, hwe, **r) for r in runs]
    assert detailing._inputs_by_position(piers, acts, s, hwe, get_standard(standard), shear_table) is not None
    monkeypatch.setattr(detailing, "_inputs_by_position", lambda *a: None)  # the joins
    slow = [detailing.check_detailing(piers, acts, s, hwe, **r) for r in runs]
    for got, want in zip(fast, slow, strict=True):
        same_frame(got, want)
    full, numbers = fast[0], fast[1]
    assert (full.rule == "one layer: thickness").any() and (full.status == "FAIL").any()
    same_frame(numbers, full[["pier_id", "util"]].astype({"pier_id": numbers.pier_id.dtype}))


# ---- Section 14: hwe and each pier's worst earthquake row by position against the joins


def pass_fail_by_tables(p, parts):
    """The (pier_id, util) rows as they were made: a rule table per rule (`rule_rows`), joined
    and filtered by `finish_rules` without working."""
    frames = [
        rule_rows(p if rows is None else p.iloc[rows].reset_index(drop=True), *rest, False)
        for rows, *rest in parts
    ]
    return finish_rules(pd.concat(frames, ignore_index=True), p, False, section14.CLAUSE, section14.RULES)


@pytest.mark.parametrize("numbered", [0, 1000])
@pytest.mark.parametrize("with_hwe", [True, False])
@pytest.mark.parametrize("two_layers", ["yes", "no"])
def test_section14_by_position_equals_the_joins(demo, numbered, with_hwe, two_layers, monkeypatch):
    """The same rule tables (with and without working) by position as by the joins on (storey,
    pier_id), and the pass / FAIL rows without a table per rule: piers over the end-zone trigger
    (ties given and not), some without earthquake rows, N* NaN on some rows, ties between a
    pier's largest stresses."""
    s, piers, acts, hwe = detailing_case(demo, "AS 3600:2018", numbered)
    s = s.model_copy(update={"eq_two_layers": two_layers})
    assert section14.not_applicable_reason(s) is None and s.earthquake
    k = np.arange(len(acts))
    quake = acts.combination.astype(str).isin(s.earthquake).to_numpy()
    # some piers' earthquake rows all dropped; a repeated worst row (same N*, M*) on others
    acts = acts[~(quake & (acts.storey == "L3").to_numpy())].reset_index(drop=True)
    again = acts.iloc[k[: len(acts)][quake[: len(acts)]][:40]]
    other = {
        c: sorted(s.earthquake)[(sorted(s.earthquake).index(c) + 1) % len(s.earthquake)] for c in s.earthquake
    }
    assert len(s.earthquake) > 1
    again = again.assign(combination=again.combination.map(other).astype(acts.combination.dtype))
    acts = pd.concat([acts, again], ignore_index=True)  # the same stresses under another name
    # N* NaN on the first earthquake row of some piers that have others (all NaN: next test)
    acts = acts.assign(n=acts.n.fillna(100.0))
    quake = acts.combination.astype(str).isin(s.earthquake).to_numpy()
    g = acts[quake].groupby(["storey", "pier_id"])
    first = g.cumcount().to_numpy() == 0
    several = g.pier_id.transform("size").to_numpy() > 1
    lucky = (np.arange(int(quake.sum())) % 3 == 0) & first & several
    acts.loc[np.flatnonzero(quake)[lucky], "n"] = np.nan
    hwe = hwe if with_hwe else None
    modes = [True, False]
    fast = [section14.check_section14(piers, acts, s, hwe, working=w) for w in modes]
    assert section14._worst_by_position(piers, acts, s.earthquake) is not None
    monkeypatch.setattr(section14, "pier_rows", lambda *a: None)  # the joins
    slow = [section14.check_section14(piers, acts, s, hwe, working=w) for w in modes]
    monkeypatch.setattr(section14, "_pass_fail_rows", pass_fail_by_tables)
    tables = section14.check_section14(piers, acts, s, hwe, working=False)
    for got, want in zip(fast, slow, strict=True):
        same_frame(got, want)
    same_frame(fast[1], tables)
    full = fast[0]
    trig = full[full.rule == "end-zone trigger"]
    assert (trig.status == "required").any() and (trig.status == "n/a").any()
    ties = full[full.rule == "end-zone ties"]
    assert (ties.status == "check").any() and ties.status.isin(["pass", "FAIL"]).any()


def test_section14_worst_row_all_nan_left_to_the_joins(demo):
    """A pier whose earthquake rows' stresses are all NaN: the joins decide (idxmax refuses)."""
    s, piers, acts, _ = detailing_case(demo, "AS 3600:2018", 0)
    quake = acts.combination.astype(str).isin(s.earthquake).to_numpy()
    acts = acts.assign(n=np.where(quake & (acts.pier_id == piers.pier_id.iloc[0]).to_numpy(), np.nan, acts.n))
    assert section14._worst_by_position(piers, acts, s.earthquake) is None


# ---- geometry: a walls-sheet row's numbers once, one braced-ends answer per plan


def supported_edges_storey_by_storey(piers: pd.DataFrame) -> np.ndarray:
    """geometry.supported_edges as it was: `_braced_ends` worked out for every storey."""
    wall_of = piers.groupby(["storey", "wall_id"], sort=False).ngroup().to_numpy()
    first = np.unique(wall_of, return_index=True)[1]
    storey_of = pd.factorize(piers.storey.to_numpy()[first])[0]
    col = {k: piers[k].to_numpy(float) for k in ("wx", "wy", "ux", "uy", "wall_length", "tw")}
    braced = np.zeros((2, len(first)), dtype=bool)
    for c in range(storey_of.max() + 1):
        walls = np.flatnonzero(storey_of == c)
        braced[:, walls] = geometry._braced_ends(*(col[k][first[walls]] for k in col))
    start, end = piers.start.to_numpy(float), piers.end.to_numpy(float)
    at_start = (start <= geometry.TOL) & braced[0, wall_of]
    at_end = (col["wall_length"] - end <= geometry.TOL) & braced[1, wall_of]
    return at_start.astype(int) + at_end.astype(int)


def test_derive_once_per_run_and_plan_equals_storey_by_storey():
    """Two plans (a return wall at the lower storeys only, a wall that starts halfway up), a
    wall whose row changes up the building, a door: every pier's run numbers as its own run
    gives them, the braced edges as every storey's own answer, walls in natural order."""
    storeys = [builders.storey(f"L{i}", index=i, level=3.2 * i) for i in range(1, 7)]
    walls = [
        builders.wall("W1", 0, 0, 6.0, 0, storeys=("L1", "L3"), fc=32.0, h_dia=10.0),
        builders.wall("W1", 0, 0, 6.0, 0, storeys=("L4", "L6"), fc=40.0, thickness=250.0, v_spacing=150.0),
        builders.wall("W2", 0, -2.0, 0, 2.0, storeys=("L1", "L4")),
        builders.wall("W10", 6.0, -1.0, 6.0, 3.0, storeys=("L3", "L6"), v_layers=1, h_layers=1),
    ]
    door = Opening(wall_id="W1", storey_from="L2", storey_to="L5", offset=2.0, width=1.0, sill=0.0, head=2.1)
    piers = geometry.derive(storeys, walls, [door]).piers
    runs = geometry.run_at(walls, storeys)
    for r in piers.itertuples():
        w = runs[(r.storey_index, r.wall_id)]
        assert r.rho_v == geometry.bar_ratio(w.v_layers, w.v_dia, w.v_spacing, w.thickness)
        assert r.rho_h == geometry.bar_ratio(w.h_layers, w.h_dia, w.h_spacing, w.thickness)
        assert (r.ux, r.uy, r.wall_length, r.fc) == (
            (w.x2 - w.x1) / w.length,
            (w.y2 - w.y1) / w.length,
            w.length,
            w.fc,
        )
    assert np.array_equal(piers.supported_edges.to_numpy(), supported_edges_storey_by_storey(piers))
    # W2 braces W1's start up to L4, W10 its end from L3
    assert piers.supported_edges.tolist() == [1, 0, 1, 0, 0, 1, 1, 0, 0, 1, 1, 0, 0, 0, 1, 0, 1, 0]
    at = piers[piers.storey == "L4"]
    assert list(dict.fromkeys(at.wall_id)) == ["W1", "W2", "W10"]


# ---- per_pier: groups numbered by counting


def per_pier_by_sorting(df: pd.DataFrame) -> tuple[np.ndarray, np.ndarray]:
    """checks.per_pier as it was: np.unique over the integer keys."""
    storey, _ = pd.factorize(df.storey)
    pier, piers = pd.factorize(df.pier_id)
    key = storey.astype(np.int64) * len(piers) + pier
    _, first, of = np.unique(key, return_index=True, return_inverse=True)
    return first, of


@pytest.mark.parametrize("rows", [0, 1, 7, 500])
def test_per_pier_by_counting_equals_np_unique(rows):
    """The same first rows and group numbers, text and integer pier IDs, a blank storey."""
    rng = np.random.default_rng(rows)
    storey = rng.choice(["L1", "L2", "L10"], rows).astype(object)
    for pier_id in (rng.choice(["W1-1", "W1-2", "W2"], rows), rng.integers(0, 40, rows)):
        df = pd.DataFrame({"storey": storey, "pier_id": pier_id})
        for want, got in zip(per_pier_by_sorting(df), per_pier(df), strict=True):
            assert got.dtype == want.dtype and got.tolist() == want.tolist()
    if rows > 2:
        storey[1] = None
        df = pd.DataFrame({"storey": storey, "pier_id": rng.integers(0, 40, rows)})
        for want, got in zip(per_pier_by_sorting(df), per_pier(df), strict=True):
            assert got.tolist() == want.tolist()


def test_per_pier_keeps_a_blank_pier_id_out_of_other_piers_groups():
    """A row whose pier ID is blank is a group of its own at its storey: before, its code (-1)
    made its key that of the storey below's last pier, and it took that pier's numbers."""
    df = pd.DataFrame({"storey": ["L1", "L1", "L2", "L2", "L2"], "pier_id": ["W1", "W2", "W1", None, None]})
    first, of = per_pier(df)
    # groups: (L1, W1), (L1, W2), (L2, W1), (L2, blank) -- the two blank rows together
    assert of.tolist() == [0, 1, 2, 3, 3]
    assert first.tolist() == [0, 1, 2, 3]


# ---- costs: the cost per metre height


def test_per_metre_height_is_the_formula():
    """Float arrays (with a price per row or one price), numbers and integer arrays: concrete
    area x price plus (rho_v + rho_h) x area x 7.85 t/m^3 x steel price, to the bit (hand
    evaluation of the formula; steel density 7 850 kg/m^3, from memory)."""
    rng = np.random.default_rng(9)
    n = 5000
    Lw, tw = rng.uniform(300.0, 9000.0, n), rng.choice([200.0, 250.0, 300.0], n)
    rho_v, rho_h = rng.uniform(0.0015, 0.03, n), rng.uniform(0.0015, 0.03, n)
    before = [a.copy() for a in (Lw, tw, rho_v, rho_h)]
    for price in (rng.uniform(230.0, 520.0, n), 285.0):
        area = Lw * tw / 1e6
        want = area * price + (rho_v + rho_h) * area * costs.STEEL_DENSITY / 1000.0 * 2400.0
        got = costs.per_metre_height(Lw, tw, rho_v, rho_h, price, 2400.0)
        assert np.array_equal(got.view(np.int64), want.view(np.int64))
    assert all(np.array_equal(a, b) for a, b in zip((Lw, tw, rho_v, rho_h), before, strict=True))  # untouched
    assert costs.per_metre_height(1000.0, 200.0, 0.0025, 0.0025, 260.0, 2400.0) == pytest.approx(
        0.2 * 260.0 + 0.005 * 0.2 * 7.85 * 2400.0
    )
    ints = costs.per_metre_height(np.array([1000, 2000]), np.array([200, 250]), 0.0025, 0.0025, 260.0, 2400.0)
    assert ints.tolist() == [
        0.2 * 260.0 + 0.005 * 0.2 * 7850.0 / 1000.0 * 2400.0,
        0.5 * 260.0 + 0.005 * 0.5 * 7850.0 / 1000.0 * 2400.0,
    ]


def test_words_taken_from_few_equal_the_words_per_row(demo):
    """The Hw/Lw basis column from its few words: the words `_basis_text` writes row by row, in
    the column type a list of them gives; the clause column likewise; pass / FAIL of Section 14
    as np.where's words (NaN fails)."""
    b, piers, acts = demo
    s = _settings(b, "AS 3600:2018", shear_height="opening height")
    out = shear.check_pier_shear(piers, acts, s)
    args = (
        out.Hw.to_numpy(float),
        out.Lw.to_numpy(float),
        out.Hc.to_numpy(float),
        out.wall_length.to_numpy(float) * 1000.0,
        out.position.to_numpy() > 0,
        out.hw_lw.to_numpy() > out.Hw.to_numpy() / out.Lw.to_numpy(),
    )
    per_row = pd.Series(shear._basis_text("opening height", *args))
    assert out.hw_basis.dtype == per_row.dtype and out.hw_basis.tolist() == per_row.tolist()
    assert out.clause.dtype == pd.Series(out.clause.tolist()).dtype
    u = np.array([0.5, 1.0 + 1e-10, 1.1, np.nan, np.inf])
    want = np.where(u <= 1.0 + 1e-9, "pass", "FAIL").astype(object)
    assert section14._pass_fail(u).tolist() == want.tolist() and section14._pass_fail(u).dtype == object


@pytest.mark.parametrize("with_hwe", [True, False])
def test_section14_words_once_equal_the_words_per_row(demo, with_hwe, monkeypatch):
    """Section 14's working written once per distinct set of its numbers: the same table as
    written row by row."""
    s, piers, acts, hwe = detailing_case(demo, "AS 3600:2018", 0)
    acts = acts.assign(n=acts.n.fillna(100.0))
    hwe = hwe if with_hwe else None
    fast = section14.check_section14(piers, acts, s, hwe)
    monkeypatch.setattr(section14, "words_once", lambda make, *cols: make(*cols))
    slow = section14.check_section14(piers, acts, s, hwe)
    same_frame(fast, slow)
    assert fast.working.nunique() > 20


@pytest.mark.parametrize("standard", STANDARDS)
def test_detailing_words_once_equal_the_words_per_row(demo, standard, monkeypatch):
    """Detailing's working written once per distinct set of its numbers and limit words: the
    same table as written row by row."""
    s, piers, acts, hwe = detailing_case(demo, standard, 0)
    shear_table = shear.check_pier_shear(piers, acts, s, working=False)
    fast = detailing.check_detailing(piers, acts, s, hwe, shear=shear_table)
    monkeypatch.setattr(detailing, "words_once", lambda make, *cols: make(*cols))
    slow = detailing.check_detailing(piers, acts, s, hwe, shear=shear_table)
    same_frame(fast, slow)
    assert fast.working.nunique() > 20


# ---- lintels: the join over the action rows that name a lintel


@pytest.mark.parametrize("standard", STANDARDS)
def test_lintels_join_of_their_own_rows_equals_the_join_of_every_row(demo, standard, monkeypatch):
    """The member actions filtered to the lintels' IDs before the left join: the same table as
    the join of every action row (lintels with and without actions)."""
    b, _, _ = demo
    s = _settings(b, standard)
    g = pipeline.geometry.derive(b.storeys, b.walls, b.openings, b.end_zones)
    acts = b.member_actions
    named = acts.member.isin(g.lintels.lintel_id)
    assert named.any() and not named.all()
    some = acts[~(named & (acts.storey == acts.storey.iloc[0])).to_numpy()]  # a storey's lintels without
    for a in (acts, some):
        fast = lintels.check_lintels(g.lintels, a, s)
        with monkeypatch.context() as m:
            m.setattr(lintels, "_of_lintels", lambda acts, lin: acts)
            slow = lintels.check_lintels(g.lintels, a, s)
        same_frame(fast, slow)
        assert (fast.model == "").any() == (a is some)


def test_bar_ratio_in_place_equals_the_formula():
    """Arrays (the advice's rows x arrangements, and shapes where the spacing widens the result):
    the formula's numbers to the bit; numbers as before; the inputs untouched."""
    rng = np.random.default_rng(4)
    layers = rng.choice([1.0, 2.0], (300, 1))
    dia = rng.choice([10.0, 12.0, 16.0, 20.0], (1, 40))
    sp, tw = rng.choice([100.0, 150.0, 225.0], (1, 40)), rng.choice([200.0, 250.0], (300, 1))
    before = [a.copy() for a in (layers, dia, sp, tw)]
    for args in (
        (layers, dia, sp, tw),
        (layers, 16.0, sp, tw),
        (layers[:, 0], dia[0, 0], sp[0, 0], tw[:, 0]),
    ):
        want = args[0] * np.pi * np.asarray(args[1]) ** 2 / 4.0 / (args[2] * args[3])
        got = geometry.bar_ratio(*args)
        assert got.shape == want.shape and np.array_equal(got.view(np.int64), want.view(np.int64))
    assert all(np.array_equal(a, b) for a, b in zip((layers, dia, sp, tw), before, strict=True))
    assert geometry.bar_ratio(2, 12.0, 200.0, 200.0) == 2 * np.pi * 144.0 / 4.0 / 40000.0


def test_pier_rows_with_a_missing_storey_as_pd_na_answers_as_rows_of():
    """A nullable column's pd.NA has no == answer: the look-up by number must not compare it
    (it raised TypeError) but give rows_of's answer, -1 for that row (found in review)."""
    from xlcore.checks import pier_rows

    a_storey = pd.Series(["1", pd.NA, "2"], dtype=object)
    a_pier, t_storey, t_pier = np.array([1, 2, 3]), ["1", "1", "2"], np.array([1, 2, 3])
    assert pier_rows(a_storey, a_pier, t_storey, t_pier).tolist() == [0, -1, 2]
    assert rows_of(a_storey, a_pier, t_storey, t_pier).tolist() == [0, -1, 2]
