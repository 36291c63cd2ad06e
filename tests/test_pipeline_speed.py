"""The fast paths of sharing, the pier checks and the core checks (issue 15) against the general
ways they replace, bit for bit, on the demo building and on cases made to reach every branch."""

import dataclasses

import numpy as np
import pandas as pd
import pytest
from demo_parts import demo_parts

from xlcore import distribution, pipeline
from xlcore.checks import core_nm, core_stress, shear
from xlcore.codes import get_standard
from xlcore.mechanics import nm_core
from xlcore.results import envelope

STANDARDS = ["AS 3600:2018", "ACI 318-19"]


@pytest.fixture(scope="module")
def demo(demo_master):
    """The demo building with its piers, walls, plans, pier actions and core sharing."""
    b, piers, walls, plans = demo_parts(demo_master)
    acts, _, split = pipeline.pier_actions(b, piers, walls, plans)
    return b, piers, walls, plans, acts, split


@pytest.fixture(scope="module")
def one_core(demo):
    """The demo's first core alone: its piers, walls, storey plans and core actions."""
    b, piers, walls, plans, _, split = demo
    c = split.actions.core.iloc[0]
    acts = split.actions[split.actions.core == c].drop(columns=["core"])
    return b, piers[piers.core == c], walls[walls.core == c], plans[c], acts


def _settings(b, standard):
    return b.settings.model_copy(update={"standard": standard})


# ------------------------------------------------------------------ core N-M


def _along_reference(px, py, demand):
    """The scalar rule `_along_rows` replaced (one case at a time)."""
    norm = np.hypot(*demand)
    if norm == 0:
        return float(np.hypot(px, py).min())
    d = demand / norm
    ax, ay = px, py
    bx, by = np.roll(px, -1), np.roll(py, -1)
    ex, ey = bx - ax, by - ay
    denom = d[0] * ey - d[1] * ex
    with np.errstate(divide="ignore", invalid="ignore"):
        t = (ax * ey - ay * ex) / denom
        s = (ax * d[1] - ay * d[0]) / denom
    ok = np.isfinite(t) & (t > 0) & (s >= -1e-9) & (s <= 1 + 1e-9)
    return float(t[ok].min()) if ok.any() else 0.0


def _contours(n, seed=1):
    """Closed contours of `n` cases over the core check's angles, off-centre and uneven."""
    rng = np.random.default_rng(seed)
    theta = np.linspace(-np.pi, np.pi, core_nm.ANGLES, endpoint=False)
    r = rng.uniform(0.5e9, 3e9, (n, core_nm.ANGLES))
    px, py = r * np.cos(theta) + rng.normal(0, 2e8, (n, 1)), r * np.sin(theta) + rng.normal(0, 2e8, (n, 1))
    px[0] = py[0] = 0.0  # a contour of nothing: no hit along any ray
    return px, py


def test_capacity_along_the_demand_of_every_case_equals_the_scalar_rule():
    px, py = _contours(400)
    rng = np.random.default_rng(2)
    dx, dy = rng.normal(0, 2e9, 400), rng.normal(0, 2e9, 400)
    dx[1:5], dy[1:5] = 0.0, 0.0  # no moment: the weakest direction
    dx[5], dy[5] = 3e9, 0.0  # along an axis
    got = core_nm._along_rows(px, py, dx, dy)
    want = [_along_reference(px[i], py[i], np.array([dx[i], dy[i]])) for i in range(400)]
    assert got.tolist() == want


def _rows_reference(core, std, phi0, nuo, nuot, px, py):
    """The per-case loop `_rows` replaced."""
    sym = std.symbols
    cut = f"; N* not above {sym['top']}" if std.max_compression_ratio < 1.0 else ""
    n_star = core.n.to_numpy(dtype=float) * 1e3
    rows = []
    for j, rec in enumerate(core.itertuples(index=False)):
        t_top, t_bottom = phi0 * nuo[j] * std.max_compression_ratio, std.phi_tension * nuot[j]
        demand = np.array([rec.mx, rec.my]) * 1e6
        cap = _along_reference(px[j], py[j], demand)
        m_star = float(np.hypot(*demand))
        m_ratio = m_star / cap if cap > 0 else (np.inf if m_star > 0 else 0.0)
        if n_star[j] > t_top or n_star[j] < t_bottom:
            m_ratio = 0.0
        n_ratio = n_star[j] / t_top if n_star[j] >= 0 else n_star[j] / t_bottom
        util = max(m_ratio, n_ratio)
        region = (
            f"tension: linear from pure bending to {std.phi_tension:.2f} {sym['tension']}"
            if n_star[j] < 0
            else f"strain compatibility at N* (above decompression: linear to phi {sym['squash']}{cut})"
        )
        rows.append(
            dict(
                row=rec.row,
                storey=rec.storey,
                combination=rec.combination,
                n=rec.n,
                mx=rec.mx,
                my=rec.my,
                m_res=m_star / 1e6,
                phi_mu=cap / 1e6,
                phi_nuo=t_top / 1e3,
                phi_nuot=t_bottom / 1e3,
                util=util,
                status="pass" if util <= 1.0 else "FAIL",
                governs="axial" if n_ratio >= m_ratio else "moment at N*",
                clause=sym["clause_core"],
                working=(
                    f"{region}; contour at N* = {rec.n:.0f} kN over {core_nm.ANGLES} neutral-axis angles; "
                    f"phiMu along M* = {cap / 1e6:.0f} kNm; U = max(M*/phiMu = {m_star / 1e6:.0f} / "
                    f"{cap / 1e6:.0f}, {core_nm._axial_text(rec.n, t_top, t_bottom, sym)}) = {util:.3f}"
                ),
            )
        )
    return pd.DataFrame(rows)


@pytest.mark.parametrize("standard", STANDARDS)
def test_core_rows_of_every_case_at_once_equal_the_loop(standard):
    """Compression, tension, beyond both axial limits, no moment, a contour of nothing."""
    n = 400
    px, py = _contours(n)
    rng = np.random.default_rng(3)
    nuo, nuot = rng.uniform(5e7, 1e8, n), -rng.uniform(1e7, 3e7, n)
    core = pd.DataFrame(
        dict(
            row=np.arange(n) + 2,
            storey=[f"L{i % 7}" for i in range(n)],
            combination=[f"C{i % 5}" for i in range(n)],
            n=rng.uniform(-4e4, 1e5, n),  # kN: some beyond phi Nuo and below phi Nuot
            mx=rng.normal(0, 2e3, n),
            my=rng.normal(0, 2e3, n),
        )
    )
    core.loc[1:4, ["mx", "my"]] = 0.0
    std = get_standard(standard)
    phi0 = std.phi_compression
    got = core_nm._rows(core, std, phi0, nuo, nuot, px, py)
    want = _rows_reference(core, std, phi0, nuo, nuot, px, py)
    assert set(want.governs) == {"axial", "moment at N*"} and set(want.status) == {"pass", "FAIL"}
    pd.testing.assert_frame_equal(got, want, check_exact=True)


def test_curve_points_of_one_frame_per_angle_equal_a_frame_per_point(one_core):
    """One frame per section x angle with its samples broadcast against it gives the numbers a
    frame built for every sample gave (in blocks of 256 points), to the last bit."""
    b, piers, _, plans, acts = one_core
    storeys = list(dict.fromkeys(acts.storey))[:2]
    asm = core_nm.storey_assemblies(piers, plans, storeys)
    theta = np.linspace(-np.pi, np.pi, core_nm.ANGLES, endpoint=False)
    si = np.repeat(np.arange(len(storeys)), core_nm.ANGLES)
    th = np.tile(theta, len(storeys))
    full = nm_core.full_depth(asm, si, th)
    dn0 = 0.05 * full
    u = np.linspace(0.0, 1.0, core_nm.SAMPLES)
    dn_s = dn0[:, None] * (full / dn0)[:, None] ** u[None, :]
    got = core_nm._curve_points(asm, si, th, dn_s)
    rows_s = np.repeat(np.arange(len(si)), core_nm.SAMPLES)
    want = [np.empty(len(rows_s)) for _ in range(3)]
    for part in np.array_split(np.arange(len(rows_s)), max(len(rows_s) // 256, 1)):
        fr = nm_core.frame(asm, si[rows_s[part]], th[rows_s[part]])
        for w, v in zip(want, nm_core.forces_in(fr, dn_s.ravel()[part]), strict=True):
            w[part] = v
    for g, w in zip(got, want, strict=True):
        assert np.array_equal(g, w)


# ------------------------------------------------------------------ core sharing and stress


def _interleaved(df: pd.DataFrame) -> pd.DataFrame:
    """The rows with the storeys interleaved (each storey's rows in their own order)."""
    place = df.groupby("storey", sort=False).cumcount().to_numpy()
    return df.iloc[np.argsort(place, kind="stable")]


def test_arrays_by_storey_are_the_storeys_rows_in_order(demo):
    _, piers, *_ = demo
    mixed = _interleaved(piers)
    got = distribution.arrays_by_storey(mixed, ["pier_id", "k"])
    want = distribution.by_storey(mixed)
    assert list(got) == list(want)
    for storey, sp in want.items():
        assert got[storey]["pier_id"].tolist() == sp.pier_id.tolist()
        assert np.array_equal(got[storey]["k"], sp.k.to_numpy())


def test_core_sharing_of_interleaved_actions_equals_the_storeys_alone(one_core):
    """All storeys at once (the actions' rows interleaved, some with their own point of action)
    against each storey shared alone."""
    b, piers, walls, plans, acts = one_core
    acts = acts.copy()
    acts.loc[acts.index[::3], "x_v"] = 4.0
    acts = _interleaved(acts)
    together = distribution.core_actions_to_piers(piers, walls, plans, acts, 0.05, text=True)
    # the torsion about the centre of rigidity from each row's own point of action, blank: the CR
    first = together.walls.drop_duplicates("row").set_index("row").loc[acts.row]
    xv, yv = acts.x_v.fillna(first.xr.set_axis(acts.index)), acts.y_v.fillna(first.yr.set_axis(acts.index))
    want = acts.t + acts.vy * (xv - first.xr.to_numpy()) - acts.vx * (yv - first.yr.to_numpy())
    assert np.array_equal(first.m_cr.to_numpy(), want.to_numpy())
    for storey in dict.fromkeys(acts.storey):
        alone = distribution.core_actions_to_piers(
            piers, walls, plans, acts[acts.storey == storey], 0.05, text=True
        )
        for part in ("piers", "walls"):
            t = getattr(together, part)
            pd.testing.assert_frame_equal(
                t[t.storey == storey].reset_index(drop=True), getattr(alone, part), check_exact=True
            )


@pytest.mark.parametrize("standard", STANDARDS)
def test_core_stress_of_every_storey_at_once_equals_each_storey_alone(one_core, standard):
    """Fibres, end-zone bars and walls made for the whole table and sliced per storey (piers
    interleaved across storeys) against the check run on one storey's piers at a time; the
    demo's end zones and tension cases reach the zone-bar branch."""
    b, piers, _, plans, acts = one_core
    s = _settings(b, standard)
    acts = acts.drop(columns=["acc"])
    acts[["n", "mx"]] = acts[["n", "mx"]] * [-1.0, 3.0]  # tension: zone bars count
    mixed = _interleaved(piers)
    together = core_stress.check_core_stress(mixed, plans, acts, s)
    assert (together.as_prov > 0).any() and (together.status == "FAIL").any()
    parts = [
        core_stress.check_core_stress(piers[piers.storey == st], plans, acts[acts.storey == st], s)
        for st in dict.fromkeys(acts.storey)
    ]
    pd.testing.assert_frame_equal(together, pd.concat(parts, ignore_index=True), check_exact=True)


def test_core_table_order_equals_sort_values(demo):
    b, piers, walls, plans, _, split = demo
    core = pipeline.cores.core_actions_to_piers(
        piers, walls, plans, split.actions, b.settings.core_local_moment
    )
    # member names whose natural order is not their text order (X2 before X10)
    ids = pd.unique(pd.concat([core.walls.wall_id, core.piers.pier_id]))
    name = {m: f"X{(7 * i) % 23 + 1}" for i, m in enumerate(ids)}
    core.walls["wall_id"] = core.walls.wall_id.map(name)
    core.piers["pier_id"] = core.piers.pier_id.map(name)
    given = split.actions.row.to_numpy()[::2]
    got = pipeline.core_table(core, given)
    w = core.walls.assign(member=core.walls.wall_id, kind="wall", m=np.nan, working=None)
    p = core.piers.assign(
        member=core.piers.pier_id, kind="pier", k=core.piers.k * 1e-3, share_pct=core.piers.share * 100,
        working=core.piers.source,
    )  # fmt: skip
    out = pd.concat([w, p], ignore_index=True)
    out["used"] = np.where(out.row.isin(given), "no: member actions given", "yes")
    out["kind_order"] = (out.kind == "pier").astype(int)
    out["core_order"] = pd.factorize(out.core, use_na_sentinel=False)[0]
    want = out.sort_values(
        ["row", "core_order", "kind_order", "member"],
        kind="stable",
        key=lambda c: pipeline.geometry.natural_rank(c) if c.name == "member" else c,
    ).reset_index(drop=True)
    pd.testing.assert_frame_equal(got, pipeline.core_working(want), check_exact=True)


# ------------------------------------------------------------------ pier shear


def test_pier_columns_by_position_equal_the_merge(demo):
    _, piers, _, _, acts, _ = demo
    geo = ["storey", "pier_id", "Lw", "tw", "Hc", "Ho", "fc"]
    mixed = acts.sample(frac=1.0, random_state=4)  # any order, any index
    got, at = shear._with_piers(mixed, piers, geo)
    assert at is not None
    want = mixed.merge(piers[geo], on=["storey", "pier_id"], how="left")
    pd.testing.assert_frame_equal(got, want, check_exact=True)
    # a row naming no pier: the merge itself
    lost = mixed.head(3).assign(pier_id=["nowhere", *mixed.pier_id.iloc[1:3]])
    got, at = shear._with_piers(lost, piers, geo)
    assert at is None
    pd.testing.assert_frame_equal(got, lost.merge(piers[geo], on=["storey", "pier_id"], how="left"))


@pytest.mark.parametrize("standard", STANDARDS)
def test_shear_advice_and_clauses_on_failing_rows_equal_every_row(demo, standard):
    b, piers, _, _, acts, _ = demo
    s = _settings(b, standard)
    acts = acts.assign(v=acts.v * 4.0)  # many rows fail, a few beyond the upper limit
    out = shear.check_pier_shear(piers, acts, s)
    std = get_standard(standard).configure(s)
    assert (out.status == "FAIL").any() and (out.status == "pass").any()
    # the capacity again, row for row, through the standard's own per-row rules
    phi = s.phi_shear if s.phi_shear is not None else std.phi_wall_shear
    r = std.wall_shear(out.fc, out.fsy, out.Lw, out.tw, out.hw_lw, out.rho_h, out.rho_v, phi)
    rho_req, capped = std.wall_steel_required(out.v * 1e3, r.phi, out.fc, out.fsy, out.Lw, out.tw, out.hw_lw)
    every = std.wall_shear_advice(out.util.to_numpy(), rho_req, capped, out.hw_lw.to_numpy(), r)
    assert out.advice.tolist() == every
    assert out.clause.tolist() == r.clauses()
    assert np.asarray(capped).any() or standard == "ACI 318-19"


@pytest.mark.parametrize("standard", STANDARDS)
def test_clauses_once_per_code_equal_every_row(demo, standard):
    b, piers, _, _, acts, _ = demo
    std = get_standard(standard)
    out = shear.check_pier_shear(piers, acts, _settings(b, standard), working=False)
    r = std.wall_shear(out.fc, out.fsy, out.Lw, out.tw, out.hw_lw, out.rho_h, out.rho_v, 0.75)
    codes = list(r.governing_text)
    mixed = dataclasses.replace(r, governs=np.resize(codes[::-1], len(out)))
    assert shear._clauses(mixed).tolist() == mixed.clauses()


# ------------------------------------------------------------------ envelope


def test_first_largest_per_group_equals_group_by_idxmax():
    """Ties (the first wins), infinities, groups in order of first appearance, codes in any
    numbering."""
    rng = np.random.default_rng(5)
    u = rng.choice([0.5, 1.0, 1.0, 2.0, np.inf, -np.inf, -0.0, 0.0], 3000)
    g = rng.choice([7, 3, 11, 0, 5], 3000)
    g[:5] = [11, 11, 5, 0, 3]
    got = envelope._first_max(u, g)
    want = pd.Series(u).groupby(g, sort=False).idxmax().to_numpy()
    assert got.tolist() == want.tolist()
    assert envelope._first_max(np.zeros(0), np.zeros(0, dtype=np.int64)).tolist() == []


def test_text_columns_taken_from_their_strings_equal_numpy_strings():
    """The same values and the same column type as a numpy string array made into a column."""
    from xlcore import results

    u = np.array([0.5, 1.0, 1.0000001, np.nan, np.inf, -1.0])
    want = pd.DataFrame({"s": results.status(u)})
    got = pd.DataFrame({"s": results.status_column(u)})
    pd.testing.assert_frame_equal(got, want, check_exact=True)
    pick = np.array([2, 0, 1, 1, 2])
    texts = ["n/a", "none", "end-zone detailing (Cl 14.6)"]
    want = pd.DataFrame({"s": np.where(pick == 0, texts[0], np.where(pick == 1, texts[1], texts[2]))})
    pd.testing.assert_frame_equal(
        pd.DataFrame({"s": results.text_column(pick, texts)}), want, check_exact=True
    )


def test_actions_given_for_piers_by_position_equal_the_inner_merge(demo):
    b, piers, *_ = demo
    cols = ["storey", "wall_id", "pier_id", "position", "k", "start", "end", "Lw", "tw", "h"]
    base = b.member_actions.assign(m_out=np.nan)[
        ["row", "storey", "combination", "member", "n", "v", "m", "m_out"]
    ]
    base = base.sample(frac=1.0, random_state=6)
    base.loc[base.index[:3], "member"] = "nowhere"  # names no pier: left out, as the merge does
    want = base.merge(piers[cols], left_on=["storey", "member"], right_on=["storey", "pier_id"])
    assert 0 < len(want) < len(base)
    pd.testing.assert_frame_equal(distribution._given_for_piers(base, piers[cols]), want, check_exact=True)
    # pairs not unique in the table: no positions (the merge decides)
    twice = pd.concat([piers, piers.head(1)])
    assert distribution.rows_of(base.storey, base.member, twice.storey, twice.pier_id) is None
