"""Fast paths of the fourth speed round (issue 15: sharing, core checks, envelope, governing
rows) against the general ways they replace, bit for bit, on cases made to reach every branch:
ties, NaN, infinities, missing keys, groups interleaved."""

import numpy as np
import pandas as pd
import pytest
from demo_parts import demo_parts

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


# ------------------------------------------------------------------ the envelope, no candidates' table


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


# ------------------------------------------------------------------ sharing


@pytest.fixture(scope="module")
def demo(demo_master):
    """The demo building with its piers, walls and plans."""
    return demo_parts(demo_master)


def _pier_actions_merged(piers, actions, method):
    """`distribution.pier_actions` as it was: the wall rows found by a merge of every row."""
    from xlcore import distribution

    cols = ["storey", "wall_id", "pier_id", "position", "k", "start", "end", "Lw", "tw", "h"]
    base = actions[["row", "storey", "combination", "member", "n", "v", "m", "m_out"]]
    direct = base.merge(piers[cols], left_on=["storey", "member"], right_on=["storey", "pier_id"])
    direct["share"] = 1.0
    direct["source"] = "given for the pier"
    cut = piers.loc[piers.position > 0, cols]
    shared = base.merge(cut, left_on=["storey", "member"], right_on=["storey", "wall_id"])
    if len(shared):
        shared = distribution._share_wall(shared, method)
    return pd.concat([direct, shared], ignore_index=True)[distribution.ACTION_COLUMNS]


@pytest.mark.parametrize("method", ["composite section", "pier moments from shear"])
@pytest.mark.parametrize("walls_named", [True, False])
def test_pier_actions_of_coded_keys_equal_the_merges(demo, method, walls_named):
    """Action rows naming piers, walls cut by openings (shared among their piers), uncut walls,
    nothing known and a blank, shuffled: the same table as the merges of every row; with no
    row naming a cut wall, the same (empty) sharing too."""
    from xlcore import distribution

    b, piers, *_ = demo
    acts = b.member_actions.assign(m_out=1.5).sample(frac=1.0, random_state=3).reset_index(drop=True)
    cut = piers[piers.position > 0].drop_duplicates(["storey", "wall_id"])
    if walls_named:
        assert len(cut)
        named = acts.iloc[: len(cut)].assign(storey=cut.storey.to_numpy(), member=cut.wall_id.to_numpy())
        acts = pd.concat([acts, named], ignore_index=True).sample(frac=1.0, random_state=4)
    acts = acts.reset_index(drop=True)
    acts.loc[acts.index[:2], "member"] = "nowhere"
    acts.loc[acts.index[2], "member"] = np.nan
    acts.loc[acts.index[3], "storey"] = np.nan
    got = distribution.pier_actions(piers, acts, method)
    want = _pier_actions_merged(piers, acts, method)
    pd.testing.assert_frame_equal(got, want, check_exact=True)
    assert (got.source.str.startswith("wall ").any()) == walls_named


def test_text_columns_from_codes_equal_the_object_arrays():
    """`distribution.stack` with text columns given as codes gives the table the object
    arrays give (the type pandas infers, NaN kept), and `TextCodes` keeps 1 and 1.0 apart."""
    from xlcore import distribution

    names = distribution.TextCodes()
    names.codes([7])  # a value no row names, of another type: the columns are of their own values
    parts, raw = [], []
    for storey, walls in (("L1", ["W1", "W10", "W2"]), ("L2", ["W2", "W1"]), ("L1", ["W1"])):
        combos = np.array([0, 2, 1])
        parts.append(
            dict(
                row=np.arange(len(walls) * 3),
                storey=np.full(len(walls) * 3, names.codes([storey])[0]),
                combination=np.repeat(combos, len(walls)),
                wall_id=np.tile(names.codes(walls), 3),
                source=None,
            )
        )
        raw.append(
            dict(
                row=np.arange(len(walls) * 3),
                storey=np.full(len(walls) * 3, storey, dtype=object),
                combination=np.repeat(np.array(["C1", np.nan, "C2"], dtype=object)[combos], len(walls)),
                wall_id=np.tile(np.array(walls, dtype=object), 3),
                source=np.full(len(walls) * 3, None, dtype=object),
            )
        )
    texts = dict(storey=names.values, wall_id=names.values, combination=["C1", np.nan, "C2"])
    got = distribution.stack(parts, texts=texts)
    want = pd.DataFrame({k: np.concatenate([p[k] for p in raw]) for k in raw[0]})
    pd.testing.assert_frame_equal(got, want, check_exact=True)
    assert got.storey.dtype == want.storey.dtype and got.source.dtype == object
    # equal values of other types (1 == 1.0) are other texts ('1' and '1.0'): kept apart
    one, real_one, text_one = names.codes([1, 1.0, "1"])
    assert len({one, real_one, text_one}) == 3 and names.codes([1.0, 1]).tolist() == [real_one, one]


def test_core_sharing_text_columns_are_the_storeys_members(demo):
    """The core sharing's text columns (made from codes) name each row's storey, combination,
    wall and pier as the storey's own arrays do, row for row."""
    from xlcore import cores

    b, piers, walls, plans = demo
    s = b.settings
    split = cores.share_among_cores(piers, plans, b.core_actions, s.accidental)
    out = cores.core_actions_to_piers(piers, walls, plans, split.actions, s.core_local_moment)
    p = out.piers
    ref = piers.set_index(["storey", "pier_id"])
    assert (
        ref.loc[list(zip(p.storey, p.pier_id, strict=True)), "wall_id"].to_numpy() == p.wall_id.to_numpy()
    ).all()
    acts = split.actions.set_index(["row", "core"])  # the demo's two cores share each row
    for t in (p, out.walls):
        at = list(zip(t.row, t.core, strict=True))
        assert (acts.loc[at, "combination"].to_numpy() == t.combination.to_numpy()).all()
        assert (acts.loc[at, "storey"].to_numpy() == t.storey.to_numpy()).all()
    w = out.walls
    assert set(zip(w.storey, w.wall_id, strict=True)) <= set(zip(walls.storey, walls.wall_id, strict=True))
    assert str(p.storey.dtype) == "str" and str(w.wall_id.dtype) == "str"


@pytest.mark.parametrize("blank", [False, True])
def test_natural_rank_and_first_seen_codes_equal_pandas(blank):
    """The core table's sort keys: natural rank by the distinct IDs (ties of equal natural keys,
    W01 and W1, in order of first appearance) and codes in order of first appearance."""
    from xlcore import geometry, pipeline

    rng = np.random.default_rng(5)
    ids = rng.choice(np.array(["W10", "W2", "W1", "W01", "B3-1", "B3-10", "B3-2", "w1"], dtype=object), 400)
    if blank:
        ids[[7, 50]] = np.nan
    np.testing.assert_array_equal(
        pipeline._natural_rank(ids), geometry.natural_rank(pd.Series(ids, dtype="str")).to_numpy()
    )
    np.testing.assert_array_equal(
        pipeline._first_seen_codes(ids), pd.factorize(ids, use_na_sentinel=False)[0]
    )
    for same in (np.full(9, "", dtype=object), np.array(["C", "C", np.nan], dtype=object), ids[:0]):
        got, want = pipeline._first_seen(same), pd.factorize(same, use_na_sentinel=False)
        np.testing.assert_array_equal(got[0], want[0])
        assert len(got[1]) == len(want[1]) and all(
            a == b or (pd.isna(a) and pd.isna(b)) for a, b in zip(got[1], want[1], strict=True)
        )


@pytest.mark.parametrize("blank", [False, True])
def test_pairs_in_from_the_distinct_pairs_equal_every_row(blank):
    """Core-action rows whose storey x combination the member actions cover: the member
    actions' distinct pairs found by codes, then compared as text, as every row was."""
    from xlcore import pipeline

    rng = np.random.default_rng(6)
    n = 2000
    member = pd.DataFrame(
        dict(
            storey=pd.array(rng.choice(["L1", "L2", "L10"], n), dtype="str"),
            combination=pd.array(rng.choice(["C1", "C2"], n), dtype="str"),
        )
    )
    if blank:
        member.loc[[3, 9], "combination"] = np.nan
    core = pd.DataFrame(
        dict(
            storey=pd.array(["L1", "L2", "L10", "L3", "L1", "L2"], dtype="str"),
            combination=pd.array(["C1", "C2", "C3", "C1", np.nan, np.nan], dtype="str"),
        )
    )
    key = lambda d: pd.MultiIndex.from_arrays([d.storey.astype(str), d.combination.astype(str)])  # noqa: E731
    want = key(core).isin(key(member).unique())
    np.testing.assert_array_equal(pipeline._pairs_in(core, member), want)
    assert want.any() and not want.all()
    assert len(pipeline._distinct_pairs(member)) == (len(member) if blank else 6)


# ------------------------------------------------------------------ core checks


def test_section_keys_from_rows_sliced_equal_each_storeys_table(demo):
    """The core N-M check's section keys from the key columns rounded once and sliced per storey
    equal those of each storey's own table (so the storeys share sections as before), and
    storeys that differ get different keys."""
    from xlcore.checks import core_nm

    _, piers, _, plans = demo
    for core, p in piers.groupby("core", sort=False):
        values = p[core_nm._key_columns(p)].round(6).to_numpy()
        at = p.groupby("storey", sort=False).indices
        keys = {}
        for storey, sp in p.groupby("storey", sort=False):
            sec = plans[core][storey].section
            keys[storey] = core_nm._key_of(values[at[storey]], sec)
            assert keys[storey] == core_nm._section_key(sp, sec)
        assert 1 < len(set(keys.values())) < len(keys)  # some storeys share a section, not all


def test_core_stress_text_columns_are_the_storeys_walls(demo):
    """The core stress table's storey, combination and wall (made from codes) are each row's
    own, as the storey's arrays give them, and of the type a column of those strings takes."""
    from xlcore import cores, pipeline
    from xlcore.checks.core_stress import check_core_stress

    b, piers, walls, plans = demo
    split = cores.share_among_cores(piers, plans, b.core_actions, b.settings.accidental)
    t = pipeline.per_core(check_core_stress, piers, plans, split.actions, b.settings)
    acts = split.actions.set_index(["row", "core"])
    at = list(zip(t.row, t.core, strict=True))
    assert (acts.loc[at, "combination"].to_numpy() == t.combination.to_numpy()).all()
    assert (acts.loc[at, "storey"].to_numpy() == t.storey.to_numpy()).all()
    assert set(zip(t.storey, t.wall_id, strict=True)) <= set(zip(walls.storey, walls.wall_id, strict=True))
    assert str(t.storey.dtype) == str(t.wall_id.dtype) == str(t.combination.dtype) == "str"


def _storey_plans_by_table(piers, walls):
    """`distribution.storey_plans` as it was: a sub-table per storey."""
    from xlcore import distribution
    from xlcore.mechanics import diaphragm, section

    out, seen = {}, {}
    walls_at = distribution.by_storey(walls)
    for storey, sp in piers.groupby("storey", sort=False):
        sw = walls_at[storey]
        key = distribution._plan_key(sp, sw)
        if key in seen:
            out[storey] = seen[key]
            continue
        pieces = section.disjoint_pieces(sp)
        st = diaphragm.Storey(
            sw.k.to_numpy(), sw.ux.to_numpy(), sw.uy.to_numpy(), sw.mx.to_numpy(), sw.my.to_numpy()
        )
        try:
            centre = diaphragm.centre_of_rigidity(st)
        except diaphragm.Unstable:
            centre = None
        out[storey] = seen[key] = distribution.StoreyPlan(
            section.section_of(pieces), section.shared_moments(sp), st, centre  # overlaps shared
        )
    return out


def test_storey_plans_from_arrays_equal_the_sub_tables(demo):
    """Storey plans keyed and built from the whole tables' arrays: the same plans (every number
    bit for bit), shared by the same storeys, in the same order; a storey whose walls differ in
    stiffness gets a plan of its own."""
    import dataclasses

    from xlcore import distribution

    _, piers, walls, _ = demo
    walls = walls.copy()
    last = walls.storey.iloc[-1]
    walls.loc[walls.storey == last, "k"] *= 1.5  # a storey unlike the others
    for core in dict.fromkeys(piers.core):
        p, w = piers[piers.core == core], walls[walls.core == core]
        got, want = distribution.storey_plans(p, w), _storey_plans_by_table(p, w)
        assert list(got) == list(want)
        for storey in got:
            a, b = got[storey], want[storey]
            assert a.centre == b.centre and a.section == b.section
            np.testing.assert_array_equal(a.piece_moments, b.piece_moments)
            for f in dataclasses.fields(a.walls):
                np.testing.assert_array_equal(getattr(a.walls, f.name), getattr(b.walls, f.name))
        shared = [[got[s] is got[t] for t in got] for s in got]
        assert shared == [[want[s] is want[t] for t in want] for s in want]
        assert len({id(v) for v in got.values()}) > 1


def _element_forces_ref(f, dn):
    """`nm_core._element_forces` as it was: one new array per operation."""
    dn = np.asarray(dn, dtype=float)[:, None]
    inside = np.clip((f.gamma * dn - f.depth + f.ext) / np.maximum(2 * f.ext, 1e-9), 0.0, 1.0)
    strain = f.eps_cu * (dn - f.bdepth) / dn
    stress = np.clip(f.Es * strain, -f.fsy, f.fsy)
    fbar = (stress - np.where(f.bdepth <= f.bar_gamma * dn, f.bar_conc, 0.0)) * f.ba
    return f.full * inside, fbar


def test_element_forces_in_place_equal_the_expressions(demo):
    """The in-place element forces of the core N-M equal the expressions they replace, bit for
    bit, over every angle and depths from a sliver to beyond the section (one case many
    depths, as the curve; many cases one depth each, as the solve); and the forces' sums."""
    from xlcore.checks import core_nm
    from xlcore.mechanics import nm_core

    _, piers, _, plans = demo
    core = piers.core.iloc[0]
    p = piers[piers.core == core]
    storeys = list(dict.fromkeys(p.storey))[:3]
    asm = core_nm.storey_assemblies(p, plans[core], storeys)
    theta = np.linspace(-np.pi, np.pi, core_nm.ANGLES, endpoint=False)
    si, th = np.repeat(np.arange(len(storeys)), len(theta)), np.tile(theta, len(storeys))
    full = nm_core.full_depth(asm, si, th)
    rng = np.random.default_rng(7)
    for row in range(0, len(si), 5):
        fr = nm_core.frame(asm, si[row : row + 1], th[row : row + 1])
        dn = full[row] * np.geomspace(1e-3, 1.5, 40)
        for got, want in zip(nm_core._element_forces(fr, dn), _element_forces_ref(fr, dn), strict=True):
            np.testing.assert_array_equal(got, want)
    fr = nm_core.frame(asm, si, th)
    dn = full * rng.uniform(0.01, 1.2, len(si))
    for got, want in zip(nm_core._element_forces(fr, dn), _element_forces_ref(fr, dn), strict=True):
        np.testing.assert_array_equal(got, want)
    fcon, fbar = _element_forces_ref(fr, dn)
    n, mx, my = nm_core.forces_in(fr, dn)
    np.testing.assert_array_equal(n, fcon.sum(axis=1) + fbar.sum(axis=1))
    np.testing.assert_array_equal(mx, (fcon * fr.fy).sum(axis=1) + (fbar * fr.by).sum(axis=1))
    np.testing.assert_array_equal(my, (fcon * fr.fx).sum(axis=1) + (fbar * fr.bx).sum(axis=1))


def _one_by_lists(walls, fibre, across):
    """`nm_core._one` one wall at a time, in lists: every fibre tested against each wall in turn
    (its own among them), its area divided by the walls it lies in (corner overlaps shared)."""
    out = {
        k: []
        for k in ("fx", "fy", "fa", "eux", "euy", "evx", "evy", "fc", "bx", "by", "ba", "fsy", "vx", "vy")
    }
    rects = []
    for x1, y1, x2, y2, t, *_ in walls:
        L = float(np.hypot(x2 - x1, y2 - y1))
        rects.append((x1, y1, (x2 - x1) / L, (y2 - y1) / L, L, t))
    for x1, y1, x2, y2, t, fc, fsy, bars in walls:
        L = float(np.hypot(x2 - x1, y2 - y1))
        ux, uy = (x2 - x1) / L, (y2 - y1) / L
        vx, vy = -uy, ux
        n_along = max(int(np.ceil(L / fibre)), 1)
        s = (np.arange(n_along) + 0.5) * L / n_along
        r = (np.arange(across) + 0.5) * t / across - t / 2
        S, R = np.meshgrid(s, r, indexing="ij")
        px, py = x1 + ux * S + vx * R, y1 + uy * S + vy * R
        covers = np.zeros(S.shape, dtype=int)
        for ax, ay, aux, auy, aL, at in rects:
            along = (px - ax) * aux + (py - ay) * auy
            off = -(px - ax) * auy + (py - ay) * aux
            covers += (along >= 0) & (along <= aL) & (np.abs(off) <= at / 2)
        k = np.ones(S.size, dtype=bool)
        out["fx"] += list(px.ravel()[k])
        out["fy"] += list(py.ravel()[k])
        out["fa"] += list(L / n_along * t / across / np.maximum(covers.ravel(), 1))
        out["eux"] += [ux * L / n_along / 2] * int(k.sum())
        out["euy"] += [uy * L / n_along / 2] * int(k.sum())
        out["evx"] += [vx * t / across / 2] * int(k.sum())
        out["evy"] += [vy * t / across / 2] * int(k.sum())
        out["fc"] += [fc] * int(k.sum())
        for along, off, area in bars:
            out["bx"].append(x1 + ux * along + vx * off)
            out["by"].append(y1 + uy * along + vy * off)
            out["ba"].append(area)
            out["fsy"].append(fsy)
        for sa, sb in ((0, -t / 2), (L, -t / 2), (L, t / 2), (0, t / 2)):
            out["vx"].append(x1 + ux * sa + vx * sb)
            out["vy"].append(y1 + uy * sa + vy * sb)
    return {k: np.asarray(v, dtype=float) for k, v in out.items()}


def test_fibres_of_every_earlier_wall_at_once_equal_one_at_a_time():
    """The core section's fibres and bars: corner overlaps counted against every wall at once
    give the arrays the wall-by-wall test gives, bit for bit (a box with crossing and
    slanted walls, a wall without bars, a single wall)."""
    from xlcore.mechanics import nm_core

    bars = [(100.0, -60.0, 200.0), (900.0, 60.0, 200.0)]
    walls = [
        (0.0, 0.0, 6000.0, 0.0, 250, 40, 500, bars),
        (6000.0, 0.0, 6000.0, 5000.0, 250, 40.0, 500.0, bars),
        (6000.0, 5000.0, 0.0, 5000.0, 200, 50, 500, []),
        (0.0, 5000.0, 0.0, 0.0, 300, 40, 450, bars[:1]),
        (3000.0, -500.0, 3000.0, 5500.0, 250, 40, 500, bars),  # crosses two walls
        (500.0, 500.0, 2500.0, 2200.0, 180, 32, 500, bars),  # slanted, inside the box
    ]
    # fibres exactly on an earlier wall's end (one fibre across: on the centreline)
    tee = [(0.0, 0.0, 1000.0, 0.0, 200, 40, 500, bars), (1000.0, -500.0, 1000.0, 500.0, 200, 40, 500, bars)]
    for ws, across in ((walls, 4), (walls[:1], 4), (walls[2:3], 4), (tee, 1), (walls, 1)):
        got, want = nm_core._one(ws, 100.0, across), _one_by_lists(ws, 100.0, across)
        assert got.keys() == want.keys()
        for k in got:
            np.testing.assert_array_equal(got[k], want[k], err_msg=k)
            assert got[k].dtype == want[k].dtype
    shared = _one_by_lists(walls, 100.0, 4)["fa"].sum() < sum(
        _one_by_lists([w], 100.0, 4)["fa"].sum() for w in walls
    )
    assert shared  # the overlaps are there to share


def _share_among_cores_by_storey(piers, plans, core_rows, accidental=0.0):
    """`cores.share_among_cores` as it was: one part per storey, a sub-table per storey x core."""
    from xlcore import cores

    rows = core_rows.copy()
    if "core" not in rows:
        rows["core"] = ""
    rows["core"] = rows.core.fillna("").astype(object)
    own = rows[rows.core != ""].assign(acc=accidental)
    parts, shares = [own], []
    piers_at = {(s, c): g for (s, c), g in piers.groupby(["storey", "core"], sort=False)}
    for storey, cs in rows[rows.core == ""].groupby("storey", sort=False):
        here = [c for c in plans if storey in plans[c]]
        if not here:
            continue
        if len(here) == 1:
            parts.append(cs.assign(core=here[0], acc=accidental))
            continue
        a, b = cores._share_storey(storey, here, piers_at, plans, cs, accidental)
        parts.append(a)
        shares.append(b)
    actions = pd.concat(parts, ignore_index=True)
    actions = actions.sort_values("row", kind="stable").reset_index(drop=True)
    table = pd.concat(shares, ignore_index=True) if shares else pd.DataFrame()
    return cores.CoreSplit(actions[[k for k in cores.ACTION_KEYS if k in actions]], table)


@pytest.mark.parametrize("repeated_rows", [False, True])
def test_cores_sharing_in_one_part_per_core_equals_one_per_storey(demo, repeated_rows):
    """The building's rows at storeys of one core taken in one part per core: the same actions
    and shares as one part per storey, with storeys of two cores, of one (either), of none,
    rows naming a core, rows out of order and (the general path) row numbers repeated."""
    from xlcore import cores

    b, piers, _, plans = demo
    names = list(plans)
    assert len(names) == 2
    storeys = list(plans[names[0]])
    plans = {names[0]: dict(plans[names[0]]), names[1]: dict(plans[names[1]])}
    for s in storeys[:2]:
        plans[names[1]].pop(s, None)  # the first core alone
    plans[names[0]].pop(storeys[2], None)  # the second alone
    for c in names:
        plans[c].pop(storeys[3], None)  # no walls: its rows are dropped
    rows = b.core_actions.copy()
    rows["core"] = ""
    rows.loc[rows.index[::7], "core"] = names[0]  # the core's own rows
    rows = rows.sample(frac=1.0, random_state=8).reset_index(drop=True)
    if repeated_rows:
        rows.loc[rows.index[:5], "row"] = rows.row.iloc[5]
    got = cores.share_among_cores(piers, plans, rows, 0.05)
    want = _share_among_cores_by_storey(piers, plans, rows, 0.05)
    pd.testing.assert_frame_equal(got.actions, want.actions, check_exact=True)
    pd.testing.assert_frame_equal(got.shares, want.shares, check_exact=True)
    assert set(got.actions.core) == set(names) and len(got.shares)


@pytest.mark.parametrize("blank", [False, True])
def test_first_per_pier_equals_the_group_by(blank):
    """Each storey x pier's first value that is not NaN (NaN where none), keys sorted: by codes,
    the same Series as the group-by's `first` (values, index, its levels and names)."""
    from xlcore import pipeline

    rng = np.random.default_rng(9)
    n = 3000
    t = pd.DataFrame(
        dict(
            storey=pd.array(rng.choice(["L2", "L10", "L1"], n), dtype="str"),
            pier_id=pd.array(rng.choice(["W1-1", "W10", "W2", "B"], n), dtype="str"),
            hwe=rng.choice([2400.0, 3100.0, np.nan], n),
        )
    )
    t.loc[(t.storey == "L2") & (t.pier_id == "B"), "hwe"] = np.nan  # a pier with no value at all
    if blank:
        t.loc[5, "pier_id"] = np.nan  # the group-by leaves it out
    got = pipeline._first_per_pier(t, "hwe")
    want = t.groupby(["storey", "pier_id"]).hwe.first()
    pd.testing.assert_series_equal(got, want, check_exact=True)
    assert got.index.equals(want.index) and got.isna().any()


def test_rows_of_an_empty_table_finds_no_row():
    """An empty table of pairs (the advice search hands detailing no variant when shear rules
    them all out): every pair has no row, as the inner merge on an empty table keeps none."""
    from xlcore.distribution import rows_of

    empty = pd.Series([], dtype=object)
    at = rows_of(pd.Series(["L1", "L2"]), pd.Series(["P1", "P2"]), empty, empty)
    assert at.tolist() == [-1, -1]
    merged = pd.DataFrame({"s": ["L1", "L2"], "p": ["P1", "P2"]}).merge(
        pd.DataFrame({"s": empty, "p": empty}), on=["s", "p"]
    )
    assert merged.empty


def test_storey_plans_skip_a_pier_row_with_a_blank_storey(demo):
    """A blank storey makes no plan, as the group-by the plans were made with dropped it (the
    loop over the storeys found it and raised KeyError; found in review): the demo's plans with
    one pier row's storey blanked are the demo's plans."""
    from xlcore import distribution

    _, piers, walls, _ = demo
    plans = distribution.storey_plans(piers, walls)
    blank = piers.assign(storey=piers.storey.astype(object).where(np.arange(len(piers)) != 0, np.nan))
    assert sorted(distribution.storey_plans(blank, walls)) == sorted(plans)
