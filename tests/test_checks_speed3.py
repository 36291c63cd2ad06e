"""The closed-form pier checks' fast paths of issue 15's fifth round against the general ways
they replace, bit for bit, on the demo building under both standards. Each test fails with its
fast path broken (tried)."""

from __future__ import annotations

import builders
import numpy as np
import pandas as pd
import pytest
from demo_parts import demo_actions, same_frame, settings_for

from xlcore import geometry, pipeline, results
from xlcore.checks import detailing, lintels, per_pier, pier_rows, records, same_keys, section14, shear
from xlcore.codes import get_standard
from xlcore.distribution import rows_of
from xlcore.model import Opening
from xlcore.results import envelope

STANDARDS = ["AS 3600:2018", "ACI 318-19"]


@pytest.fixture(scope="module")
def demo(demo_master):
    """The demo building with its piers and pier actions."""
    return demo_actions(demo_master)


_settings = settings_for


# ---- shear: the capacity once per pier, gathered to the rows


@pytest.fixture(params=STANDARDS)
def shear_rows(request, demo):
    """The demo's pier actions with V* raised on every third row (some fail, some beyond
    Vu.max), shuffled, without the rows of every fifth pier (piers without rows), and with the
    piers' f'c and bars varied by storey so that piers' capacities differ."""
    b, piers, acts = demo
    piers = piers.assign(
        fc=np.where(piers.storey_index.to_numpy() % 2 == 0, 40.0, 50.0),
        rho_h=piers.rho_h.to_numpy() * np.where(np.arange(len(piers)) % 3 == 0, 0.5, 1.0),
    )
    acts = acts.assign(v=acts.v * np.where(np.arange(len(acts)) % 3 == 0, 40.0, 1.0) + 300.0)
    gone = set(piers.pier_id.unique()[::5])
    acts = acts[~acts.pier_id.isin(gone)]
    acts = acts.sample(frac=1.0, random_state=3).reset_index(drop=True)
    return b, piers, acts, request.param


@pytest.mark.parametrize("basis", ["overall wall height", "opening height", "storey clear height"])
@pytest.mark.parametrize("mode", [dict(), dict(text=False), dict(working=False)])
def test_shear_capacity_per_pier_equals_every_row(shear_rows, basis, mode, monkeypatch):
    """Hw, Hw/Lw, the capacity, its parts, clause, advice and working worked out once per pier
    and gathered to the rows: the same table as the general path, which works them out on
    every row (the merge on (storey, pier_id))."""
    b, piers, acts, standard = shear_rows
    s = _settings(b, standard, shear_height=basis)
    fast = shear.check_pier_shear(piers, acts, s, **mode)
    monkeypatch.setattr(shear, "pier_rows", lambda *a: None)  # the merge: every row its own
    slow = shear.check_pier_shear(piers, acts, s, **mode)
    assert (slow.status == "FAIL").any() and (slow.status == "pass").any()
    assert slow.hw_lw.nunique() > 3 and slow.phi_vu.nunique() > 3
    same_frame(fast, slow)


def test_rows_of_reads_the_per_pier_capacity_by_row(demo):
    """`_RowsOf.take(rows)` gives row i pier at[i]'s quantities."""
    b, piers, _ = demo
    from xlcore.codes import get_standard

    std = get_standard("AS 3600:2018")
    ratio = np.linspace(0.5, 3.0, len(piers))
    r = std.wall_shear(piers.fc, piers.fsy, piers.Lw, piers.tw, ratio, piers.rho_h, piers.rho_v, 0.75)
    at = np.array([3, 0, 3, 1, len(piers) - 1])
    got = shear._RowsOf(r, at).take(np.array([4, 0, 2]))
    want = r.take(np.array([len(piers) - 1, 3, 3]))
    for k in ("area", "concrete", "steel", "limit", "nominal", "phi", "design", "governs"):
        assert np.array_equal(getattr(got, k), getattr(want, k)), k
    for k in want.detail:
        assert np.array_equal(got.detail[k], want.detail[k]), k



# ---- detailing: the shear table's rows matched once with the actions' where they are the same


@pytest.mark.parametrize("standard", STANDARDS)
def test_detailing_shear_rows_taken_as_the_actions_equal_their_own_match(demo, standard, monkeypatch):
    """A shear table made from the actions shares their key columns (the same arrays): its rows'
    piers are the actions' (one match, not two); the same table as with its own match. A shear
    table in another order, or a copy, is matched on its own (and gives the same table too)."""
    b, piers, acts = demo
    s = _settings(b, standard)
    k = np.arange(len(acts))
    acts = acts.assign(v=acts.v * np.where(k % 4 == 0, 25.0, 1.0), n=acts.n * np.where(k % 3 == 0, 30.0, 1.0))
    table = shear.check_pier_shear(piers, acts, s, working=False)
    assert same_keys(table.storey, table.pier_id, acts.storey, acts.pier_id)
    shuffled = table.sample(frac=1.0, random_state=2).reset_index(drop=True)
    copied = table.copy(deep=True)
    copied["pier_id"] = np.array(copied.pier_id.tolist(), dtype=object)
    assert not same_keys(shuffled.storey, shuffled.pier_id, acts.storey, acts.pier_id)
    assert not same_keys(copied.storey, copied.pier_id, acts.storey, acts.pier_id)
    got = [detailing.check_detailing(piers, acts, s, shear=t) for t in (table, shuffled, copied)]
    monkeypatch.setattr(detailing, "same_keys", lambda *a: False)  # each table its own match
    want = detailing.check_detailing(piers, acts, s, shear=table)
    for g in got:
        same_frame(g, want)
    if standard == "ACI 318-19":  # the minima read V*: a wrong pier's V* changes the table
        wrong = table.assign(v=table.v.to_numpy()[::-1])
        assert not detailing.check_detailing(piers, acts, s, shear=wrong).equals(want)


def test_same_keys_reads_data_strides_and_length():
    """The same array, a view of it that starts elsewhere, steps otherwise or is shorter, and
    an equal copy: only the first is the same."""
    a = np.array(["L1", "L2", "L3", "L4"], dtype=object)
    p = np.array(["W1", "W1", "W2", "W2"], dtype=object)
    assert same_keys(a, p, a, p)
    assert same_keys(pd.Series(a), pd.Series(p), a, p) == same_keys(np.asarray(pd.Series(a)), p, a, p)
    assert not same_keys(a[1:], p[1:], a[:-1], p[:-1])
    assert not same_keys(a[::2], p[::2], a[:2], p[:2])
    assert not same_keys(a[:3], p[:3], a, p)
    assert not same_keys(a.copy(), p, a, p)
    assert not same_keys(a, p.copy(), a, p)


# ---- AS 3600 limit words: once per distinct value, numbers as Python floats


def as3600_limit_text_row_by_row(key, **values) -> list[str]:
    """AS3600.limit_text as it was: every row formatted from numpy scalars."""
    v = {k: np.atleast_1d(np.asarray(x)) for k, x in values.items()}
    if key == "rho_v_min":
        return [
            f"N*/(Lw tw) = {s:.2f} MPa {'<=' if s <= 0.03 * fc else '>'} 0.03 f'c"
            for s, fc in zip(*np.broadcast_arrays(v["sigma"], v["fc"]), strict=True)
        ]
    if key == "rho_h_min":
        r, L = np.broadcast_arrays(v["restrained"], v["wall_length"])
        return [f"{'restrained' if x else 'unrestrained'}, wall {n:.2f} m" for x, n in zip(r, L, strict=True)]
    if key in ("spacing_v", "spacing_h"):
        return [f"min(2.5 x {t:.0f}, 350)" for t in v["tw"]]
    if key == "clear_gap":
        return [f"3 x {d:.0f}" for d in v["db"]]
    return ["from memory: verify"] * len(v["tw"])


@pytest.mark.parametrize("restrained", [True, False, np.array([True, False, True, True, False, False, True])])
def test_as3600_limit_words_equal_the_words_row_by_row(restrained):
    """Every key, values repeated and apart, -0.0 and 0.0, NaN, a scalar broadcast: the same
    words row by row."""
    std = get_standard("AS 3600:2018")
    values = dict(
        sigma=np.array([0.0, -0.0, 1.2, 1.2, np.nan, 0.9, 1.21]),
        fc=40.0,
        wall_length=np.array([3.0, 3.0, 12.345, -0.0, 0.0, np.nan, 3.0]),
        restrained=restrained,
        tw=np.array([200.0, 200.0, 250.0, -0.0, 0.0, 199.5, np.nan]),
        db=np.array([12.0, 16.0, 16.0, 12.5, -0.0, np.nan, 12.0]),
    )
    for key in ("rho_v_min", "rho_h_min", "spacing_v", "spacing_h", "clear_gap", "layers"):
        assert std.limit_text(key, **values) == as3600_limit_text_row_by_row(key, **values), key
    assert std.limit_text("clear_gap", db=np.zeros(0)) == []
    assert std.limit_text("spacing_v", tw=250.0) == ["min(2.5 x 250, 350)"]


# ---- lintels: rows from each column's values at once


def test_records_equal_itertuples():
    """Text with a missing value, floats with NaN and -0.0, integers, booleans, objects and a
    column name that is no identifier: the same rows as `itertuples(index=False)`, value for
    value and type for type."""
    df = pd.DataFrame(
        {
            "model": pd.array(["beam", None, "", "strut-and-tie"], dtype="str"),
            "x": [1.5, np.nan, -0.0, 2.0],
            "n": np.array([1, 2, 3, 4], dtype=np.int64),
            "ok": [True, False, True, False],
            "o": np.array([None, 1.0, "a", 2], dtype=object),
            "2 bad": [0.1, 0.2, 0.3, 0.4],
        },
        index=[7, 3, 5, 1],
    )
    want, got = list(df.itertuples(index=False)), list(records(df))
    assert repr(got) == repr(want)
    assert [[type(v) for v in r] for r in got] == [[type(v) for v in r] for r in want]
    assert got[0]._fields == want[0]._fields
    assert list(records(df.iloc[:0])) == []


@pytest.mark.parametrize("standard", STANDARDS)
def test_lintels_with_records_and_isin_on_objects_equal_itertuples(demo, standard, monkeypatch):
    """The lintel table (needs and working per row) with `records` and the object isin equals the
    table made with `itertuples` and the text column's isin."""
    b, _, _ = demo
    s = _settings(b, standard)
    g = pipeline.geometry.derive(b.storeys, b.walls, b.openings, b.end_zones)
    fast = lintels.check_lintels(g.lintels, b.member_actions, s)
    assert (fast.model != "").sum() > 3
    monkeypatch.setattr(lintels, "records", lambda df: df.itertuples(index=False))
    of_lintels = lintels._of_lintels

    def isin_of_text(acts, table):
        named = acts.lintel_id.isin(pd.unique(table.lintel_id)).to_numpy()
        got = of_lintels(acts, table)
        assert got.equals(acts if named.all() else acts[named])
        return got

    monkeypatch.setattr(lintels, "_of_lintels", isin_of_text)
    same_frame(fast, lintels.check_lintels(g.lintels, b.member_actions, s))


# ---- envelope: the compliance words


@pytest.mark.parametrize("first", ["", "pass 0.50", "FAIL 1.20"])
@pytest.mark.parametrize("second", ["", "check"])
def test_joined_words_equal_the_join_of_those_not_empty(first, second):
    assert envelope._joined_words(first, second) == ", ".join(x for x in (first, second) if x)


# ---- pier_rows: coded storeys compared as integers


@pytest.mark.parametrize("spread", [1, 1000])
@pytest.mark.parametrize("storey_type", [np.int64, np.uint32])
def test_pier_rows_with_coded_storeys_equal_rows_of(spread, storey_type):
    """Pier numbers (dense and sparse) and storey codes as integers: rows at another storey,
    of a number not in the table, and the table in another order: `rows_of`'s answer."""
    rng = np.random.default_rng(6)
    t_pier = rng.permutation(300) * spread
    t_storey = rng.integers(0, 5, 300).astype(storey_type)
    pick = rng.integers(0, 300, 5000)
    a_pier = t_pier[pick].copy()
    a_storey = t_storey[pick].astype(np.int64)
    a_storey[::7] += 1  # not that pier's storey
    a_pier[::11] = 300 * spread + 5  # no such pier
    got = pier_rows(a_storey, a_pier, t_storey, t_pier)
    want = rows_of(pd.Series(a_storey), pd.Series(a_pier), pd.Series(t_storey), pd.Series(t_pier))
    assert np.array_equal(got, want)
    assert (got < 0).any() and (got >= 0).any()
    objects = pier_rows(a_storey.astype(object), a_pier, t_storey.astype(object), t_pier)
    assert np.array_equal(objects, want)  # the object path, the same answer


# ---- results: groups in order of first appearance, utilisation, the pier checks' keys


@pytest.mark.parametrize("case", ["numbered", "rows dropped", "shuffled", "one", "empty", "late low"])
def test_appearance_order_equals_pd_unique(case):
    """Codes numbered as they appear (a check table's), the same with rows dropped, in another
    order, one row, none, and a low code first seen after higher ones: `pd.unique`'s answer."""
    rng = np.random.default_rng(7)
    g = pd.factorize(rng.integers(0, 400, 3000))[0]
    g = {
        "numbered": g,
        "rows dropped": g[rng.random(len(g)) < 0.3],
        "shuffled": rng.permutation(g),
        "one": g[:1],
        "empty": g[:0],
        "late low": np.array([0, 2, 2, 1, 3, 1, 4]),
    }[case]
    got = results.appearance_order(g)
    assert np.array_equal(got, pd.unique(g)) and got.dtype == pd.unique(g).dtype
    u = rng.random(len(g))
    want = pd.Series(u).groupby(g, sort=False).idxmax().to_numpy() if len(g) else np.zeros(0, np.int64)
    assert np.array_equal(results.first_max(u, g), want)


def utilisation_formula(demand, capacity) -> np.ndarray:
    d = np.abs(np.asarray(demand, dtype=float))
    c = np.asarray(capacity, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(c > 0, d / np.where(c > 0, c, 1.0), np.where(d > 0, np.inf, 0.0))


def test_utilisation_equals_the_formula():
    """Rows with capacities positive, zero, -0.0, negative, NaN and infinite against demands
    positive, zero, negative, NaN and infinite; scalars and a broadcast: the formula's bits."""
    d = np.array([1.0, 0.0, -2.0, np.nan, np.inf, 3.0, -0.0])
    c = np.array([2.0, 0.0, -0.0, -1.0, np.nan, np.inf, 5.0])
    dd, cc = (a.ravel() for a in np.meshgrid(d, c))
    cases = ((dd, cc), (pd.Series(dd), pd.Series(cc)), (3.0, 0.0), (dd, 2.0), (1.5, cc), (dd[:0], cc[:0]))
    for args in cases:
        got, want = results.utilisation(*args), utilisation_formula(*args)
        assert got.shape == want.shape and np.array_equal(got.view(np.int64), want.view(np.int64))
    assert not np.shares_memory(results.utilisation(dd, cc), dd)


def test_pier_checks_keys_and_order_by_check_number():
    """Each row's key, kind and place among its pier's checks, read by the check's number: the
    key of its check, structural where it is no compliance check, the checks in UTIL_COLUMN's
    order within a pier."""
    rng = np.random.default_rng(8)
    piers = pd.DataFrame({"storey": ["L1"] * 4 + ["L2"] * 4, "pier_id": ["W1", "W2", "W3", "W4"] * 2})
    rows = piers.loc[piers.index.repeat(3)].reset_index(drop=True)
    m = len(rows)
    u = rng.random(m) * 1.4
    status = np.where(u > 1, "FAIL", "pass")
    shear_t = rows.assign(combination="C1", v=1.0, phi_vu=1.0, util=u, status=status, clause="c", advice="")
    axial = rows.assign(
        combination="C2", m_design=1.0, m_ray=1.0, util=u[::-1].copy(), status=status, clause="c",
        governs="g", status_s="pass", n_end=1.0, phi_nu_s=1.0, util_s=0.3, clause_s="c",
    )  # fmt: skip
    det = piers.assign(value=1.0, limit=1.0, unit="", util=0.7, clause="c", status="pass", rule="r")
    s14 = piers.iloc[::-1].assign(value=1.0, limit=1.0, unit="", util=1.2, clause="c", status="FAIL")
    s14 = s14.assign(rule="r")
    order = piers.iloc[[4, 5, 6, 7, 0, 1, 2, 3]]
    out = envelope.pier_checks(shear_t, axial, det, s14, order)
    assert out.key.tolist() == [envelope.UTIL_COLUMN[c] for c in out.check]
    assert out.key.dtype == "str"
    assert out.structural.tolist() == [c not in envelope.COMPLIANCE for c in out.check]
    rank = list(envelope.UTIL_COLUMN)
    want = [(s, p, rank.index(c)) for s, p, c in zip(out.storey, out.pier_id, out.check, strict=True)]
    pos = {k: i for i, k in enumerate(zip(order.storey, order.pier_id, strict=True))}
    assert want == sorted(want, key=lambda t: (pos[t[:2]], t[2]))
    assert len(set(out.check)) == 5


# ---- the action rows matched to their piers once, handed to shear, detailing and Section 14


def matched_case(demo, standard):
    """The demo's piers and actions shuffled, N* and V* raised on some rows, some rows of no
    pier, an effective height per pier (one missing), and every combination an earthquake one
    (Section 14's end-zone trigger reads the actions)."""
    b, piers, acts = demo
    s = _settings(b, standard, earthquake=set(acts.combination.unique()))
    k = np.arange(len(acts))
    acts = acts.assign(n=acts.n * np.where(k % 3 == 0, 30.0, 1.0), v=acts.v * np.where(k % 4 == 0, 25.0, 1.0))
    acts = acts.sample(frac=1.0, random_state=9).reset_index(drop=True)
    hwe = pd.Series(
        piers.Hc.to_numpy(float) * 0.85, index=pd.MultiIndex.from_arrays([piers.storey, piers.pier_id])
    ).iloc[1:]
    return s, piers, acts, hwe


@pytest.mark.parametrize("standard", STANDARDS)
@pytest.mark.parametrize("lost", [False, True])
def test_checks_with_the_callers_match_equal_their_own(demo, standard, lost):
    """Shear (with and without working), detailing and Section 14 handed `pier_rows`' answer
    give the tables they give matching the rows themselves; with rows of no pier too (shear
    then merges)."""
    s, piers, acts, hwe = matched_case(demo, standard)
    if lost:
        acts.loc[np.arange(len(acts)) % 23 == 5, "pier_id"] = "nowhere"
    pier_of = pier_rows(acts.storey, acts.pier_id, piers.storey, piers.pier_id)
    assert pier_of is not None and (pier_of < 0).any() == lost
    for mode in (dict(), dict(text=False), dict(working=False)):
        got = shear.check_pier_shear(piers, acts, s, pier_of=pier_of, **mode)
        same_frame(got, shear.check_pier_shear(piers, acts, s, **mode))
    table = shear.check_pier_shear(piers, acts, s, working=False)
    for working in (True, False):
        same_frame(
            detailing.check_detailing(piers, acts, s, hwe, working, shear=table, pier_of=pier_of),
            detailing.check_detailing(piers, acts, s, hwe, working, shear=table),
        )
        got = section14.check_section14(piers, acts, s, hwe, working, pier_of=pier_of)
        same_frame(got, section14.check_section14(piers, acts, s, hwe, working))
    if standard == "AS 3600:2018":
        assert (got.rule == "end-zone trigger").any() if working else len(got)


def test_section14_leaves_the_callers_match_where_its_piers_are_not_the_tables(demo, monkeypatch):
    """An effective height given twice for a pier makes Section 14's pier rows the joins' (more
    rows than the pier table; the numbers only: the rule table's order refuses them): the
    caller's match is not read there."""
    s, piers, acts, hwe = matched_case(demo, "AS 3600:2018")
    twice = pd.concat([hwe, hwe.iloc[:1] * 0.5])
    pier_of = pier_rows(acts.storey, acts.pier_id, piers.storey, piers.pier_id)
    seen = []
    worst = section14._worst_by_position

    def spy(p, actions, quake, pier_of=None):
        seen.append(pier_of is not None)
        return worst(p, actions, quake, pier_of)

    monkeypatch.setattr(section14, "_worst_by_position", spy)
    got = section14.check_section14(piers, acts, s, twice, False, pier_of=pier_of)
    same_frame(got, section14.check_section14(piers, acts, s, twice, False))
    section14.check_section14(piers, acts, s, hwe, False, pier_of=pier_of)
    assert seen == [False, False, True]


# ---- geometry: each walls-sheet row cut by its openings once per distinct set of them


def derive_rows_storey_by_storey(storeys, walls, openings):
    """`geometry.derive`'s pier and lintel rows as it made them before: every wall of every
    storey cut afresh."""
    runs, cuts = geometry.run_at(walls, storeys), geometry.openings_at(openings, storeys)
    pier_rows, lintel_rows = [], []
    for s in storeys:
        ids = sorted({w for i, w in runs if i == s.index}, key=geometry._natural)
        hc = s.clear_height * 1000.0
        for wall_id in ids:
            w = runs[(s.index, wall_id)]
            here = cuts.get((s.index, wall_id), [])
            length, head, tail = geometry._run_numbers(w)
            strip = max((o.head - o.sill for o in here), default=float("nan")) * 1000.0
            common = (*head, strip, *tail)
            if not here:
                pier_rows.append(
                    (s.name, s.index, wall_id, wall_id, 0, 0.0, length, length * 1000.0, w.thickness, hc,
                     float("nan"), *common, "start", "end")
                )  # fmt: skip
                continue
            for k, (a, b, h) in enumerate(geometry.segments(length, here), start=1):
                pier_rows.append(
                    (s.name, s.index, wall_id, f"{wall_id}-{k}", k, a, b, (b - a) * 1000.0, w.thickness, hc,
                     h * 1000.0, *common, *geometry._edges(length, here, a, b))
                )  # fmt: skip
            for k, o in enumerate(here, start=1):
                n = geometry._nan
                lintel_rows.append(
                    (s.name, s.index, wall_id, f"{wall_id}-L{k}", o.width, (s.height - o.head) * 1000.0,
                     w.thickness, o.head, o.label or "", w.cover, w.fc, w.fsy, n(o.lintel_bars),
                     n(o.lintel_dia), n(o.stirrup_dia), n(o.stirrup_legs), n(o.stirrup_spacing),
                     n(o.diag_bars), n(o.diag_dia), o.offset)
                )  # fmt: skip
    return pier_rows, lintel_rows


def test_derive_cut_once_per_row_and_openings_equals_storey_by_storey():
    """Openings that start and stop up the building (storeys alike in between), a wall whose row
    changes, one opening giving way to another up a wall, storeys of different heights, a wall
    without openings, lintel bars given on one:
    the same pier and lintel rows as every storey cut afresh, in the same order."""
    heights = [3.2 + 0.1 * (i % 2) for i in range(8)]
    storeys = [builders.storey(f"L{i}", index=i, level=3.2 * i, height=heights[i]) for i in range(1, 8)]
    walls = [
        builders.wall("W1", 0, 0, 8.0, 0, storeys=("L1", "L4")),
        builders.wall("W1", 0, 0, 8.0, 0, storeys=("L5", "L7"), thickness=250.0),
        builders.wall("W2", 0, -2.0, 0, 2.0, storeys=("L1", "L7")),
        builders.wall("W10", 8.0, -1.0, 8.0, 3.0, storeys=("L2", "L7")),
    ]
    openings = [
        Opening(wall_id="W1", storey_from="L2", storey_to="L6", offset=2.0, width=1.0, sill=0.0, head=2.1),
        Opening(wall_id="W1", storey_from="L4", storey_to="L7", offset=5.0, width=1.2, sill=0.9, head=2.4,
                lintel_bars=3, lintel_dia=16.0),
        Opening(wall_id="W10", storey_from="L3", storey_to="L3", offset=0.0, width=1.0, sill=0.0, head=2.1),
        Opening(wall_id="W2", storey_from="L1", storey_to="L3", offset=1.0, width=0.9, sill=0.0, head=2.1),
        Opening(wall_id="W2", storey_from="L4", storey_to="L7", offset=2.5, width=0.9, sill=0.0, head=2.1),
    ]  # fmt: skip
    g = geometry.derive(storeys, walls, openings)
    pier_rows, lintel_rows = derive_rows_storey_by_storey(storeys, walls, openings)
    want = pd.DataFrame(pier_rows, columns=geometry.PIER_COLUMNS)
    same_frame(g.piers[geometry.PIER_COLUMNS], want)
    same_frame(g.lintels, pd.DataFrame(lintel_rows, columns=geometry.LINTEL_COLUMNS))
    assert g.piers.pier_id.nunique() > 5 and len(g.lintels) > 8


# ---- rule tables: each row's pier found by codes


@pytest.mark.parametrize("two_layers", ["yes", "no"])
def test_rule_order_by_codes_equals_the_join(demo, two_layers, monkeypatch):
    """Section 14's rule table put in the pier table's order with each row's pier found by
    `pier_rows`: the same table as with the join on the text keys; the pier table in another
    order (storeys top down, walls reversed) so that the order is the pier table's own."""
    import xlcore.checks as checks

    b, piers, acts = demo
    s = _settings(b, "AS 3600:2018", eq_two_layers=two_layers, earthquake=set(acts.combination.unique()))
    piers = piers.iloc[::-1].reset_index(drop=True)
    fast = section14.check_section14(piers, acts, s)
    monkeypatch.setattr(checks, "pier_rows", lambda *a: None)
    slow = section14.check_section14(piers, acts, s)
    same_frame(fast, slow)
    assert fast.rule.nunique() >= 4


# ---- text columns: a take of the strings' array alone


@pytest.mark.parametrize(
    "texts, pick",
    [
        (["pass", "FAIL"], [0, 1, 1, 0, 1]),
        (["a", "b", "c"], [2, -1, 0, -3]),  # positions from the end, as numpy's take reads them
        (["only"], []),
        ([], []),
        (["x", np.nan, "y"], [1, 0, 2, 1]),  # a missing value among the words
        (np.array(["u", "v"]), np.array([1, 1, 0], dtype=np.int32)),
    ],
)
def test_text_column_equals_the_series_take(texts, pick):
    """The same array, type and values as the Series' take it replaces."""
    want = pd.Series(np.asarray(texts, dtype=object)).take(np.asarray(pick, dtype=np.intp)).array
    got = results.text_column(pick, texts)
    assert type(got) is type(want) and got.dtype == want.dtype
    assert pd.Series(got).equals(pd.Series(want)) and len(got) == len(pick)


# ---- per_pier: text keys factorised on their plain arrays


@pytest.mark.parametrize("kind", ["str", "object", "int", "category"])
def test_per_pier_on_plain_text_equals_on_the_columns(kind, monkeypatch):
    """Storeys and pier IDs as text columns (with a missing pier ID), objects, integers and
    categories: the same groups and first rows as factorising the columns themselves."""
    import xlcore.checks as checks

    rng = np.random.default_rng(10)
    storey = rng.choice(["L1", "L2", "L10"], 400)
    pier = rng.choice(["W1-1", "W1-2", "W2", "W10"], 400).astype(object)
    pier[[5, 77]] = None
    if kind == "int":
        storey, pier = rng.integers(0, 3, 400), rng.integers(0, 6, 400)
    df = pd.DataFrame({"storey": storey, "pier_id": pier})
    if kind in ("str", "category", "object"):
        df = df.astype({"storey": kind, "pier_id": kind})
    got = per_pier(df)
    monkeypatch.setattr(checks, "_plain_text", lambda column: column)  # the columns themselves
    want = per_pier(df)
    assert all(np.array_equal(g, w) for g, w in zip(got, want, strict=True))
    assert len(got[0]) > 3
