"""Fast paths of the fifth speed round (issue 15: sharing actions to piers, core checks) against
the general ways they replace, bit for bit, on cases made to reach every branch."""

import numpy as np
import pandas as pd
import pytest
from demo_parts import demo_parts


@pytest.fixture(scope="module")
def demo(demo_master):
    """The demo building (two cores) with its piers, walls and plans."""
    return demo_parts(demo_master)


def _sharing(demo, rows: pd.DataFrame):
    from xlcore import cores

    b, piers, walls, plans = demo
    s = b.settings
    split = cores.share_among_cores(piers, plans, rows, s.accidental)
    return cores.core_actions_to_piers(piers, walls, plans, split.actions, s.core_local_moment, text=False)


def _renamed(core, names: dict):
    """The sharing with wall and pier IDs renamed in its tables (the layout reads them there)."""
    from xlcore import distribution

    rename = lambda col: col.map(lambda v: names.get(v, v)).astype(col.dtype)  # noqa: E731
    walls = core.walls.assign(wall_id=rename(core.walls.wall_id))
    piers = core.piers.assign(wall_id=rename(core.piers.wall_id), pier_id=rename(core.piers.pier_id))
    return distribution.CoreSharing(piers, walls, core.layout)


def _both_ways(core, given, monkeypatch):
    """`core_table` by the layout and by the sort (no layout), with the sort and the
    concatenation of the tables refused while the layout is used, so that a test of the layout
    path cannot pass on the general one."""
    from xlcore import distribution, pipeline

    sort, concat = pipeline._sorted_order, pd.concat

    def small_only(objs, **kw):  # the columns' types on one row a side, not the whole tables
        assert all(len(o) <= 1 for o in objs), "the tables were concatenated"
        return concat(objs, **kw)

    with monkeypatch.context() as m:
        m.setattr(pipeline, "_sorted_order", lambda out: pytest.fail("the sort was used"))
        m.setattr(pipeline.pd, "concat", small_only)
        fast = pipeline.core_table(core, given)
    general = distribution.CoreSharing(core.piers, core.walls)  # no layout: the sort
    assert pipeline._sorted_order is sort
    return fast, pipeline.core_table(general, given)


@pytest.mark.parametrize("shuffle", [False, True])
def test_core_table_by_layout_equals_the_sort(demo, shuffle, monkeypatch):
    """The core-sharing table ordered by its layout (cases sorted, members once per storey)
    equals the stable sort of every row: two cores sharing the building's rows, rows out of
    order, rows naming a core, IDs whose natural order is not their order in the plan (W2
    before W10) and distinct IDs of equal natural key (W01, W1: first seen first)."""
    b = demo[0]
    rows = b.core_actions.copy()
    if shuffle:
        rows["core"] = ""
        rows.loc[rows.index[::5], "core"] = list(demo[3])[1]
        rows = rows.sample(frac=1.0, random_state=3).reset_index(drop=True)
    core = _sharing(demo, rows)
    assert core.layout is not None and core.walls.core.nunique() == 2
    ids = list(dict.fromkeys([*core.walls.wall_id, *core.piers.pier_id]))
    names = {v: f"W{len(ids) - i}" for i, v in enumerate(ids)}  # reversed natural order
    names[ids[0]], names[ids[1]] = "W01", "W1"  # equal natural keys
    core = _renamed(core, names)
    given = rows.row.to_numpy()[::4]
    fast, general = _both_ways(core, given, monkeypatch)
    pd.testing.assert_frame_equal(fast, general, check_exact=True)
    assert fast.core.nunique() == 2 and (fast.used != "yes").any()


def test_core_table_falls_back_to_the_sort_where_the_layout_does_not_decide(demo):
    """Two core-actions rows of one row number (cases of one row, core and kind: the sort
    interleaves their members), an ID that is not text and a layout that does not fit the
    tables: the layout gives no order."""
    from xlcore import distribution, pipeline

    rows = demo[0].core_actions.copy()
    rows.loc[rows.index[:3], "row"] = rows.row.iloc[3]
    core = _sharing(demo, rows)
    assert pipeline._layout_order(core) is None
    core = _sharing(demo, demo[0].core_actions)
    assert pipeline._layout_order(core) is not None
    ids = core.piers.pier_id.astype(object)
    ids.iloc[0] = 7  # an ID that is not text (read at its storey's first case)
    assert (
        pipeline._layout_order(
            distribution.CoreSharing(core.piers.assign(pier_id=ids), core.walls, core.layout)
        )
        is None
    )
    # a layout that does not fit the rows
    wrong = distribution.Layout(core.layout.walls, [(1, 1), *core.layout.piers[1:]])
    assert pipeline._layout_order(distribution.CoreSharing(core.piers, core.walls, wrong)) is None


def test_layout_order_is_a_permutation_that_sorts(demo):
    """The order is a permutation of the rows that sorts them by row, core and kind."""
    from xlcore import pipeline

    core = _sharing(demo, demo[0].core_actions)
    core_order, order = pipeline._layout_order(core)
    n = len(core.walls) + len(core.piers)
    assert np.array_equal(np.sort(order), np.arange(n))
    rows = np.concatenate([core.walls.row.to_numpy(), core.piers.row.to_numpy()])[order]
    assert (np.diff(rows) >= 0).all()
    assert len(core_order) == n


# ------------------------------------------------------------------ per-storey look-ups


def _share_with_accidental_ref(st, vx, vy, m_cr, d_acc):
    """`diaphragm.share_with_accidental` as it was: `share` twice, every time from the walls."""
    from xlcore.mechanics import diaphragm

    base = diaphragm.share(st, vx, vy, m_cr)
    unit = diaphragm.share(st, 0.0, 0.0, 1.0).torsion[:, 0:1]
    sense = np.where(base.total >= 0, 1.0, -1.0) * np.where(unit >= 0, 1.0, -1.0)
    torsion = base.torsion + sense * unit * d_acc
    return diaphragm.Shares(base.direct, torsion, base.direct + torsion)


@pytest.mark.parametrize("seed", range(3))
def test_sharing_of_one_storey_reused_equals_share_with_accidental(seed):
    """One `Sharing` per storey plan, asked again and again, gives the forces of
    `share_with_accidental` as it was bit for bit (zero forces and signs both ways on purpose)."""
    from xlcore.mechanics import diaphragm

    rng = np.random.default_rng(seed)
    n = 7
    angle = rng.choice([0.0, np.pi / 2, 0.3], n)
    st = diaphragm.Storey(
        rng.uniform(1e3, 5e5, n), np.cos(angle), np.sin(angle), rng.uniform(-9, 9, n), rng.uniform(-9, 9, n)
    )
    sharing = diaphragm.Sharing(st)
    for _ in range(3):
        m = 40
        vx, vy, m_cr = (rng.choice([0.0, -1.0, 1.0], m) * rng.uniform(0, 900, m) for _ in range(3))
        d_acc = rng.uniform(0, 50, m)
        got = sharing.with_accidental(vx, vy, m_cr, d_acc)
        want = _share_with_accidental_ref(st, vx, vy, m_cr, d_acc)
        for k in ("direct", "torsion", "total"):
            np.testing.assert_array_equal(getattr(got, k), getattr(want, k))
    got = diaphragm.share_with_accidental(st, 5.0, -3.0, 2.0, 0.5)  # scalars, as the cores' sharing
    np.testing.assert_array_equal(got.total, _share_with_accidental_ref(st, 5.0, -3.0, 2.0, 0.5).total)


def test_positions_by_codes_equal_the_index(monkeypatch):
    """`distribution.positions` equals `pd.Index(keys).get_indexer(values)`: values missing
    from the keys (-1), keys in any order; a repeated key raises as the Index does; a name that
    is not text takes the Index (1 and 1.0 are one value to it, two to the codes)."""
    from xlcore import distribution

    names = distribution.TextCodes()
    keys = np.array(["W3", "W1", "W10"], dtype=object)
    values = np.array(["W1", "W10", "W2", "W3", "W1"], dtype=object)
    kc, vc = names.codes(keys), names.codes(values)
    with monkeypatch.context() as m:  # the codes, not the Index
        m.setattr(pd.Index, "get_indexer", lambda *a, **k: pytest.fail("the Index was used"))
        got = distribution.positions(kc, vc, keys, values, names)
    np.testing.assert_array_equal(got, pd.Index(keys).get_indexer(values))
    assert got.tolist() == [1, 2, -1, 0, 1]
    twice = np.array(["W3", "W1", "W3"], dtype=object)
    with pytest.raises(pd.errors.InvalidIndexError):
        distribution.positions(names.codes(twice), vc, twice, values, names)
    mixed = distribution.TextCodes()
    keys, values = np.array([1, "W1"], dtype=object), np.array([1.0, "W1"], dtype=object)
    got = distribution.positions(mixed.codes(keys), mixed.codes(values), keys, values, mixed)
    assert got.tolist() == pd.Index(keys).get_indexer(values).tolist() == [0, 1]


# ------------------------------------------------------------------ pier actions


def _core_piers(demo, keep: slice):
    """Core pier rows as `pipeline.pier_actions` joins them to the member rows."""
    from xlcore import distribution

    core = _sharing(demo, demo[0].core_actions)
    rows = core.piers.iloc[keep].assign(origin=1)
    rows["source"] = distribution.core_source_of(rows)
    return rows.drop(columns=["core", "wall_v"])


@pytest.mark.parametrize("keep", [slice(0, 0), slice(0, 40)])
def test_joined_pier_actions_equal_the_concatenation(demo, keep, monkeypatch):
    """Member rows joined with no core row left (the member actions give every storey x
    combination) equal the concatenation: the core rows' own columns blank, the 'V* from' text
    in the type the empty core rows make it (object); with core rows, the concatenation."""
    from xlcore import distribution

    b, piers = demo[0], demo[1]
    member = distribution.pier_actions(piers, b.member_actions, b.settings.wall_nm)
    member["origin"] = 0
    member = member.set_axis(pd.RangeIndex(3, 3 + len(member)))  # any index
    core_piers = _core_piers(demo, keep)
    want = pd.concat([member, core_piers], ignore_index=True)
    concat = pd.concat

    def one_row_only(objs, **kw):  # the template of one row, not the member rows
        assert len(objs[0]) <= 1, "the member rows were concatenated"
        return concat(objs, **kw)

    with monkeypatch.context() as m:
        if not len(core_piers):
            m.setattr(distribution.pd, "concat", one_row_only)
        got = distribution.concat_rows(member, core_piers)
    pd.testing.assert_frame_equal(got, want, check_exact=True)
    assert got.m_curv.isna().sum() == len(member)
    if not len(core_piers):
        assert got.source.dtype == object


def _pier_actions_concatenated(piers, actions):
    """`distribution.pier_actions` as the merges and the concatenation made it (no wall row)."""
    from xlcore import distribution

    cols = ["storey", "wall_id", "pier_id", "position", "k", "start", "end", "Lw", "tw", "h"]
    base = actions[["row", "storey", "combination", "member", "n", "v", "m", "m_out"]]
    direct = base.merge(piers[cols], left_on=["storey", "member"], right_on=["storey", "pier_id"])
    direct["share"] = 1.0
    direct["source"] = "given for the pier"
    cut = piers.loc[piers.position > 0, cols]
    shared = base.merge(cut, left_on=["storey", "member"], right_on=["storey", "wall_id"])
    assert not len(shared)
    return pd.concat([direct, shared], ignore_index=True)[distribution.ACTION_COLUMNS]


def test_pier_actions_of_pier_rows_alone_equal_the_concatenation(demo, monkeypatch):
    """Every action row names a pier (the L tower's member actions): the rows and columns as
    they are (no filter, no concatenation of the rows), the same table as the merges and the
    concatenation; `columns_of` shares the columns' memory."""
    from xlcore import distribution

    b, piers = demo[0], demo[1]
    acts = b.member_actions.assign(m_out=1.5)
    named = distribution.rows_of(acts.storey, acts.member, piers.storey, piers.pier_id) >= 0
    acts = acts[named].sample(frac=1.0, random_state=5).set_axis(pd.RangeIndex(7, 7 + named.sum()))
    want = _pier_actions_concatenated(piers, acts)
    concat = pd.concat

    def one_row_only(objs, **kw):
        assert len(objs[0]) <= 1, "the rows were concatenated"
        return concat(objs, **kw)

    with monkeypatch.context() as m:
        m.setattr(distribution.pd, "concat", one_row_only)
        got = distribution.pier_actions(piers, acts)
    pd.testing.assert_frame_equal(got, want, check_exact=True)
    picked = distribution.columns_of(acts, ["n", "member"])
    pd.testing.assert_frame_equal(picked, acts[["n", "member"]], check_exact=True)
    assert np.shares_memory(picked.n.to_numpy(), acts.n.to_numpy())


# ------------------------------------------------------------------ core checks


@pytest.mark.parametrize("blank", [False, True])
def test_core_nm_storeys_by_codes_equal_the_dictionary(blank, monkeypatch):
    """Each case's storey among the distinct storeys (first appearance) by one factorisation
    equals the dictionary of every case's storey; with a blank storey, the dictionary itself."""
    from xlcore.checks import core_nm

    storey = np.array(["L2", "L10", "L2", "GF", "L10", "L2"], dtype=object)
    if blank:
        storey[3] = np.nan
    distinct = list(dict.fromkeys(storey))
    with monkeypatch.context() as m:
        if not blank:  # the factorisation, not the dictionary
            m.setattr(core_nm, "dict", None, raising=False)
        codes, got = core_nm._storeys(storey)
    assert len(got) == len(distinct) and all(a is b or a == b for a, b in zip(got, distinct, strict=True))
    assert [got[c] for c in codes] == list(storey) or blank
    assert codes.tolist() == [distinct.index(s) if s == s else 2 for s in storey]


def test_fibre_stress_in_place_equals_the_expressions():
    """Core stress at the fibres worked in place equals `stress_at / 1000` and the products
    the sums take (tension area, tension, bars in tension) bit for bit."""
    from xlcore.checks import core_stress
    from xlcore.mechanics import section

    rng = np.random.default_rng(2)
    sec = section.section_of(
        [section.rectangle(0.0, 0.0, 4.0, 0.0, 0.25), section.rectangle(0, 0, 0, 3.0, 0.2)]
    )
    f, m = 300, 17
    x, y, area, rho = (
        rng.uniform(-1, 5, f),
        rng.uniform(-1, 4, f),
        rng.uniform(0, 0.03, f),
        rng.uniform(0, 0.01, f),
    )
    a, b, c = (rng.normal(0, 900, m) for _ in range(3))
    sigma, work = core_stress._fibre_stress(sec, a, b, c, x, y)
    want = section.stress_at(sec, a[None, :], b[None, :], c[None, :], x[:, None], y[:, None]) / 1000.0
    np.testing.assert_array_equal(sigma, want)
    tens = sigma < 0
    assert tens.any() and not tens.all()
    np.testing.assert_array_equal(np.multiply(tens, area[:, None], out=work), tens * area[:, None])
    np.negative(sigma, out=work)
    np.maximum(work, 0, out=work)
    work *= area[:, None]
    np.testing.assert_array_equal(work, np.maximum(-sigma, 0) * area[:, None])
    np.testing.assert_array_equal(
        np.multiply(tens, (rho * area)[:, None], out=work), tens * (rho * area)[:, None]
    )


@pytest.mark.parametrize(
    "values", [["EQx", "G+Q", "EQy", "1", "unused"], ["EQx", np.nan, "G"], [1, "EQx", 2.5]]
)
def test_earthquake_rows_by_codes_equal_the_text_column(values):
    """Earthquake rows of the core stress found per distinct combination equal
    `column.astype(str).isin(names)` of the text column `stack` makes (a blank, numbers among
    the names, a value no row takes)."""
    from xlcore import distribution
    from xlcore.checks import core_stress

    rng = np.random.default_rng(len(values))
    codes = rng.integers(0, len(values) - 1, 500)  # the last value unused
    names = {"EQx", "1", "2.5", "nan"}
    column = pd.Series(distribution.text_of_codes(codes, values))
    want = column.astype(str).isin(names).to_numpy()
    got = core_stress.in_names(codes, values, names)
    np.testing.assert_array_equal(got, want)
    assert want.any()


def test_section_keys_of_storeys_alike_made_once_equal_each_storeys_own():
    """Section keys with the rows' tuples shared by storeys of equal bytes equal each storey's
    own key (and group the same): equal rows, rows differing in -0.0 against 0.0 (equal keys
    either way), and rows with a NaN (a key of its own, as before)."""
    from types import SimpleNamespace

    from xlcore.checks import core_nm

    sec = SimpleNamespace(xc=1.0, yc=2.0)
    base = np.array([[1.0, 2.0, 0.0], [3.0, 4.0, 5.0]])
    negzero = base.copy()
    negzero[0, 2] = -0.0
    nan = base.copy()
    nan[1, 1] = np.nan
    storeys = [base, base.copy(), negzero, nan, nan.copy(), base[:1]]
    seen: dict = {}
    got = [core_nm._key_of(v, sec, seen) for v in storeys]
    want = [core_nm._key_of(v, sec) for v in storeys]
    assert [repr(k) for k in got] == [repr(k) for k in want]  # (a NaN equals nothing: compared as text)
    groups = lambda keys: [next(i for i, k in enumerate(keys) if k == key) for key in keys]  # noqa: E731
    assert groups(got) == groups(want) == [0, 0, 0, 3, 4, 5]
    assert got[1][0] is got[0][0] and len(seen) == 3  # equal bytes: one tuple (no NaN ones kept)
