"""Separate cores are separate sections (issue 13 section 2; docs/engineering-basis.md, Sharing
actions). The building's storey resultants shared among cores must add back to them (statics, any
strength-of-materials text): sum of the cores' N, Vx, Vy; sum of (My_c + N_c (x_c - x_bar)) and
(Mx_c + N_c (y_c - y_bar)) = My*, Mx* about the centroid of all the cores; the moments of the
cores' shears at their centres of rigidity about the building's centre of rigidity = T* + the
storey shear's moment about it. Within a core, pier forces add back to the core's share. Outside
references: the EI shares by hand (Smith & Coull, Tall Building Structures, 1991, uniform walls:
shares in proportion to EI; the box's second moment evaluated by hand), sectionproperties (PyPI)
for each demo core's second moments."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from builders import storey, wall
from demo_parts import demo_model
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from test_core_statics import assert_statics

from xlcore import cores, demo, distribution, geometry
from xlcore.mechanics import section, stiffness
from xlcore.model import Opening, WallRun


def prepare(storeys, walls, openings, basis=stiffness.STOREY_STIFFNESS):
    geom = geometry.derive(storeys, walls, openings)
    piers = stiffness.with_stiffness(geom.piers, 0.2, "fixed-fixed")
    wl = stiffness.wall_stiffness(piers, 0.2, "fixed-fixed")
    wl = stiffness.sharing_stiffness(wl, 0.2, basis)
    return piers, wl, cores.plans_by_core(piers, wl)


def frame(rows) -> pd.DataFrame:
    return pd.DataFrame(rows).assign(row=range(2, len(rows) + 2))


def assert_cores_add_back(piers, plans, building: pd.DataFrame, split: cores.CoreSplit) -> int:
    """Every storey x combination of blank-core rows: the cores' shares rebuild the building's
    resultants (forces; moments about the centroid of all the cores; torsion about the
    building's centre of rigidity, from each core's shear at its own centre of rigidity)."""
    checked = 0
    t = split.shares
    for rec in building.itertuples(index=False):
        here = t[(t.storey == rec.storey) & (t.combination == rec.combination)]
        if here.empty:
            continue
        scale = 1.0 + abs(rec.n) + abs(rec.vx) + abs(rec.vy) + abs(rec.mx) + abs(rec.my) + abs(rec.t)
        area = here.area.to_numpy()
        x_bar, y_bar = (area * here.xc).sum() / area.sum(), (area * here.yc).sum() / area.sum()
        assert here.n.sum() == pytest.approx(rec.n, abs=1e-9 * scale)
        assert here.vx.sum() == pytest.approx(rec.vx, abs=1e-9 * scale)
        assert here.vy.sum() == pytest.approx(rec.vy, abs=1e-9 * scale)
        assert (here.my + here.n * (here.xc - x_bar)).sum() == pytest.approx(rec.my, abs=1e-8 * scale)
        assert (here.mx + here.n * (here.yc - y_bar)).sum() == pytest.approx(rec.mx, abs=1e-8 * scale)
        xr, yr = here.xr.iloc[0], here.yr.iloc[0]
        xv = xr if np.isnan(rec.x_v) else rec.x_v
        yv = yr if np.isnan(rec.y_v) else rec.y_v
        m_building = rec.t + rec.vy * (xv - xr) - rec.vx * (yv - yr)
        m_cores = ((here.xr_core - xr) * here.vy - (here.yr_core - yr) * here.vx).sum()
        assert m_cores == pytest.approx(m_building, abs=1e-8 * scale)
        assert here.m_tors.sum() == pytest.approx(m_building, abs=1e-8 * scale)  # direct parts: none
        checked += 1
    return checked


def assert_each_core_adds_back(piers, wl, plans, split) -> int:
    """Within every core: its piers rebuild its share (tests/test_core_statics.py's check)."""
    out = cores.core_actions_to_piers(piers, wl, plans, split.actions)
    checked = 0
    for core, rows in split.actions.groupby("core"):
        mine = distribution.CoreSharing(
            out.piers[out.piers.core == core].drop(columns="core"), out.walls[out.walls.core == core]
        )
        checked += assert_statics(
            piers[piers.core == core], plans[core], rows.reset_index(drop=True), mine, local_included=True
        )
    return checked


def test_demo_two_cores_add_back_at_every_storey_and_combination():
    sts, walls, openings = demo_model()
    piers, wl, plans = prepare(sts, walls, openings)
    assert sorted(plans) == ["lift", "stair"]
    building = frame(demo.core_actions())
    split = cores.share_among_cores(piers, plans, building, 0.0)
    assert assert_cores_add_back(piers, plans, building, split) == len(building) == 15 * 8
    assert len(split.actions) == 2 * len(building)
    assert assert_each_core_adds_back(piers, wl, plans, split) == 2 * 15 * 8


def test_demo_cores_are_separate_sections_checked_against_sectionproperties():
    """Each demo core's own Iyy, Ixx, Ixy against sectionproperties on the same net polygon
    (openings removed, corner overlaps once); and the two cores' Iyy far below the single
    section's (the issue: one plane section over both cores is a fiction)."""
    pytest.importorskip("sectionproperties")
    from sectionproperties.analysis import Section
    from sectionproperties.pre.geometry import CompoundGeometry, Geometry
    from shapely.geometry import MultiPolygon
    from shapely.ops import unary_union

    sts, walls, openings = demo_model()
    piers, wl, plans = prepare(sts, walls, openings)
    for storey_name in ("GF", "L1"):
        for core in ("lift", "stair"):
            sp = piers[(piers.storey == storey_name) & (piers.core == core)]
            shape = unary_union(section.disjoint_pieces(sp))
            parts = shape.geoms if isinstance(shape, MultiPolygon) else [shape]  # a riser cuts the C
            geom = CompoundGeometry([Geometry(geom=p) for p in parts])
            geom.create_mesh(mesh_sizes=[0.02])
            ref = Section(geom)
            ref.calculate_geometric_properties()
            ixx, iyy, ixy = ref.get_ic()
            mine = plans[core][storey_name].section
            assert mine.area == pytest.approx(ref.get_area(), rel=1e-9)
            assert mine.iyy == pytest.approx(iyy, rel=1e-6)
            assert mine.ixx == pytest.approx(ixx, rel=1e-6)
            assert mine.ixy == pytest.approx(ixy, abs=1e-6 * max(ixx, iyy))
    whole = distribution.storey_plans(piers, wl)["GF"].section  # every wall as one section
    both = plans["lift"]["GF"].section.iyy + plans["stair"]["GF"].section.iyy
    assert whole.iyy > 4 * both  # the combined section's push-pull between the cores


def box(name: str, x0: float, y0: float, b: float, d: float, t: float, level=("L0", "L0")) -> list[WallRun]:
    """Four walls of one core on a centreline rectangle b x d [m], t [m] thick."""
    corners = [(x0, y0), (x0 + b, y0), (x0 + b, y0 + d), (x0, y0 + d)]
    return [
        wall(f"{name}{i}", *corners[i], *corners[(i + 1) % 4], storeys=level, thickness=t * 1000, core=name)
        for i in range(4)
    ]


def box_iyy_by_hand(b: float, d: float, t: float) -> float:
    """Iyy of a centreline box b x d, walls t thick, corner overlaps once and the outer corner
    squares not added (section.py's idealisation), about its centre: outer rectangle less inner
    rectangle less four corner squares t/2 x t/2 (parallel-axis theorem; hand evaluation)."""
    outer = (d + t) * (b + t) ** 3 / 12
    inner = (d - t) * (b - t) ** 3 / 12
    square = (t / 2) ** 4 / 12 + (t / 2) ** 2 * (b / 2 + t / 4) ** 2
    return outer - inner - 4 * square


def test_shares_in_proportion_to_ei_by_hand():
    """Two boxes on one line (no torsion: the shear acts at their common y), one grade: each
    takes Vx* and My* in proportion to its Iyy, evaluated by hand (Smith & Coull's uniform
    cantilevers: shares in proportion to EI)."""
    walls = box("A", 0.0, 0.0, 6.0, 4.0, 0.25) + box("B", 10.0, 0.5, 3.0, 3.0, 0.2)
    piers, wl, plans = prepare([storey("L0", height=3.5)], walls, [])
    rows = frame([dict(storey="L0", combination="Ex", n=9000.0, vx=1000.0, vy=0.0, mx=0.0, my=5000.0, t=0.0,
                       x_v=np.nan, y_v=2.0)])
    split = cores.share_among_cores(piers, plans, rows, 0.0)
    t = split.shares.set_index("core")
    ia, ib = box_iyy_by_hand(6.0, 4.0, 0.25), box_iyy_by_hand(3.0, 3.0, 0.2)
    assert plans["A"]["L0"].section.iyy == pytest.approx(ia, rel=1e-12)
    assert plans["B"]["L0"].section.iyy == pytest.approx(ib, rel=1e-12)
    assert t.loc["A", "vx"] == pytest.approx(1000.0 * ia / (ia + ib), rel=1e-9)
    assert t.loc["B", "my"] == pytest.approx(5000.0 * ib / (ia + ib), rel=1e-9)
    assert t.loc["A", "share_vx"] == pytest.approx(100 * ia / (ia + ib), rel=1e-9)
    # N by area: A = outer - inner - corner squares (hand evaluation)
    aa = 6.25 * 4.25 - 5.75 * 3.75 - 4 * 0.125**2
    ab = 3.2 * 3.2 - 2.8 * 2.8 - 4 * 0.1**2
    assert t.loc["A", "n"] == pytest.approx(9000.0 * aa / (aa + ab), rel=1e-9)


def test_two_identical_cores_get_equal_shares():
    walls = box("P", 0.0, 0.0, 5.0, 4.0, 0.25) + box("Q", 9.0, 0.0, 5.0, 4.0, 0.25)
    piers, wl, plans = prepare([storey("L0", height=3.5)], walls, [])
    rows = frame(
        [
            dict(storey="L0", combination=c, n=8000.0, vx=vx, vy=vy, mx=mx, my=my, t=0.0, x_v=7.0, y_v=2.0)
            for c, vx, vy, mx, my in (("x", 900.0, 0.0, 0.0, 7000.0), ("y", 0.0, 700.0, 6000.0, 0.0))
        ]
    )
    t = cores.share_among_cores(piers, plans, rows, 0.0).shares
    for _, g in t.groupby("combination"):
        p, q = g.set_index("core").loc["P"], g.set_index("core").loc["Q"]
        for k in ("n", "vx", "vy", "mx", "my"):
            assert p[k] == pytest.approx(q[k], rel=1e-9, abs=1e-9)


def test_one_named_core_takes_the_building_row_as_if_unnamed():
    """A building whose walls all carry one core ID behaves as today's building without IDs."""
    sts, walls, openings = demo_model()
    lift = [w for w in walls if w.core == "lift"]
    blank = [w.model_copy(update={"core": ""}) for w in lift]
    rows = frame(demo.core_actions())
    out = []
    for ws in (lift, blank):
        piers, wl, plans = prepare(sts, ws, [o for o in openings if o.wall_id.startswith("Lift")])
        split = cores.share_among_cores(piers, plans, rows, 0.05)
        out.append(cores.core_actions_to_piers(piers, wl, plans, split.actions).piers)
    cols = ["storey", "combination", "pier_id", "n", "v", "m"]
    pd.testing.assert_frame_equal(out[0][cols], out[1][cols], check_exact=True)


def test_whole_height_cantilever_stiffness_by_hand():
    """A solid wall's whole-height stiffness: k = 1 / (H^3 / (3 E I) + 1.2 H / (G A)) over its
    overall height (Taly Ch. 7's cantilever expression; hand evaluation)."""
    sts = [storey("L0", index=0, level=0.0, height=3.5), storey("L1", index=1, level=3.5, height=3.0)]
    walls = box("K", 0.0, 0.0, 6.0, 4.0, 0.25, level=("L0", "L1"))
    piers, wl, _ = prepare(sts, walls, [], stiffness.WHOLE_HEIGHT)
    w = wl[(wl.storey == "L0") & (wl.wall_id == "K0")].iloc[0]
    e, h, length, t = w.Ec, 6500.0, 6000.0, 250.0
    k = 1.0 / (h**3 / (3 * e * t * length**3 / 12) + 1.2 * h / (e / 2.4 * t * length))
    assert w.k == pytest.approx(k, rel=1e-12)
    storey_only = stiffness.wall_stiffness(piers, 0.2, "fixed-fixed")
    assert storey_only.k.iloc[0] > 4 * w.k  # one 3.2 m storey fixed-fixed: far stiffer


@st.composite
def two_cores(draw):
    """Two boxes or C shapes apart, random sizes, thicknesses, openings and loads."""
    walls, openings = [], []
    x0 = 0.0
    for name in ("Kauri", "Totara"):
        bx, by = draw(st.floats(2.5, 8.0)), draw(st.floats(2.5, 8.0))
        y0 = draw(st.floats(-4.0, 4.0))
        t = draw(st.sampled_from([180.0, 200.0, 250.0, 300.0]))
        n = draw(st.sampled_from([3, 4]))
        corners = [(x0, y0), (x0 + bx, y0), (x0 + bx, y0 + by), (x0, y0 + by)]
        ids = [f"{name}{i}" for i in range(n)]
        walls += [
            wall(ids[i], *corners[i], *corners[(i + 1) % 4], storeys=("L0", "L1"), thickness=t, core=name)
            for i in range(n)
        ]
        for i in draw(st.lists(st.integers(0, n - 1), max_size=1)):
            length = bx if i % 2 == 0 else by
            width = draw(st.floats(0.6, min(1.4, length / 3)))
            offset = draw(st.floats(0.3, length - width - 0.3))
            openings.append(
                Opening(wall_id=ids[i], storey_from="L0", storey_to="L1", offset=offset, width=width,
                        sill=0.0, head=2.1)
            )
        x0 += bx + draw(st.floats(1.0, 8.0))
    loads = draw(st.lists(st.tuples(*(st.floats(-5e4, 5e4) for _ in range(6))), min_size=1, max_size=3))
    at = draw(st.one_of(st.none(), st.tuples(st.floats(-5.0, 30.0), st.floats(-8.0, 12.0))))
    rows = [
        dict(storey=s, combination=f"c{k}", n=n, vx=vx, vy=vy, mx=mx, my=my, t=tt,
             x_v=np.nan if at is None else at[0], y_v=np.nan if at is None else at[1])
        for s in ("L0", "L1")
        for k, (n, vx, vy, mx, my, tt) in enumerate(loads)
    ]
    return walls, openings, rows


@given(two_cores())
@settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.too_slow])
def test_random_two_core_buildings_add_back(case):
    walls, openings, rows = case
    sts = [storey("L0", index=0, level=0.0, height=3.6), storey("L1", index=1, level=3.6, height=3.2)]
    piers, wl, plans = prepare(sts, walls, openings)
    building = frame(rows)
    split = cores.share_among_cores(piers, plans, building, 0.0)
    assert assert_cores_add_back(piers, plans, building, split) == len(rows)
    assert assert_each_core_adds_back(piers, wl, plans, split) == 2 * len(rows)


def test_whole_height_sharing_among_unequal_walls_by_hand():
    """A C of two parallel walls 6 m and 3 m long and a 4 m back wall: Vx at the core's centre
    of rigidity splits between the two parallel walls in proportion to their whole-height
    cantilever stiffness, k = 1 / (H^3 / (3 E I) + 1.2 H / (G A)) (hand evaluation)."""
    sts = [storey(f"L{i}", index=i, level=3.2 * i, height=3.2) for i in range(6)]
    level = ("L0", "L5")
    walls = [
        wall("Ka", 0.0, 0.0, 6.0, 0.0, storeys=level, thickness=250.0, core="C"),
        wall("Kb", 0.0, 4.0, 0.0, 0.0, storeys=level, thickness=250.0, core="C"),
        wall("Kc", 0.0, 4.0, 3.0, 4.0, storeys=level, thickness=250.0, core="C"),
    ]
    piers, wl, plans = prepare(sts, walls, [], stiffness.WHOLE_HEIGHT)
    rows = frame([dict(storey="L0", combination="x", n=0.0, vx=600.0, vy=0.0, mx=0.0, my=0.0, t=0.0,
                       x_v=np.nan, y_v=np.nan)])
    split = cores.share_among_cores(piers, plans, rows, 0.0)
    out = cores.core_actions_to_piers(piers, wl, plans, split.actions).walls.set_index("wall_id")
    e = wl.Ec.iloc[0]
    h = 6 * 3200.0
    k = {n: 1.0 / (h**3 / (3 * e * 250.0 * length**3 / 12) + 1.2 * h / (e / 2.4 * 250.0 * length))
         for n, length in (("Ka", 6000.0), ("Kc", 3000.0))}
    assert out.loc["Ka", "v"] == pytest.approx(600.0 * k["Ka"] / (k["Ka"] + k["Kc"]), rel=1e-9)
    assert out.loc["Kc", "v"] == pytest.approx(600.0 * k["Kc"] / (k["Ka"] + k["Kc"]), rel=1e-9)


def test_a_building_without_core_ids_takes_the_single_section_path_unchanged():
    """No core IDs: the cores step hands every row to the one core and the pier actions equal,
    exactly, those of the single-section path used before core IDs existed."""
    sts, walls, openings = demo_model()
    blank = [w.model_copy(update={"core": ""}) for w in walls]
    piers, wl, plans = prepare(sts, blank, openings)
    rows = frame(demo.core_actions())
    split = cores.share_among_cores(piers, plans, rows, 0.05)
    assert split.shares.empty and (split.actions.core == "").all()
    new = cores.core_actions_to_piers(piers, wl, plans, split.actions).piers
    one = distribution.storey_plans(piers, wl)
    old = distribution.core_actions_to_piers(piers, wl, one, rows, 0.05).piers
    cols = distribution.ACTION_COLUMNS + distribution.CORE_PIER_EXTRA
    pd.testing.assert_frame_equal(new[cols], old[cols], check_exact=True)


def test_rows_that_all_name_their_core_are_each_cores_own():
    """Core actions given per core only (every row names its core, no building row) stopped the
    compute with KeyError 'storey': the blank rows' mask was an empty list, which pandas reads
    as a choice of no columns. Each row is its core's own, unshared (module docstring)."""
    walls = box("A", 0.0, 0.0, 6.0, 4.0, 0.25) + box("B", 10.0, 0.5, 3.0, 3.0, 0.2)
    piers, wl, plans = prepare([storey("L0", height=3.5)], walls, [])
    rows = frame([dict(storey="L0", combination="Ex", core=c, n=n, vx=v, vy=0.0, mx=0.0, my=5 * v, t=0.0,
                       x_v=np.nan, y_v=np.nan) for c, n, v in (("A", 9000.0, 1000.0), ("B", 4000.0, 300.0))])
    split = cores.share_among_cores(piers, plans, rows, 0.0)
    got = split.actions.set_index("core")
    assert got.loc["A", "n"] == 9000.0 and got.loc["B", "vx"] == 300.0  # as given, not shared
    assert split.shares.empty
