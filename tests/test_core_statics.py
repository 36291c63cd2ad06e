"""Core actions -> piers by statics (issue 13 section 1; engineering basis DEVELOPERS.md, core
actions to piers): at every storey and combination the pier forces add back to the core's
actions. Sum N_i = N*; sum N_i d_i + sum of own moments = Mx*, My* about the section centroid;
sum of pier V* per wall = the wall's V*. Equilibrium of a plane section is the outside reference
(any strength-of-materials text); the second moment of a rectangle is checked against
sectionproperties (PyPI)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from builders import storey, wall
from demo_parts import demo_model
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from xlcore import demo, distribution, geometry
from xlcore.mechanics import section, stiffness
from xlcore.model import Opening


def share(storeys, walls, openings, core_rows, local=distribution.LOCAL_BESIDE_OPENINGS, accidental=0.0):
    geom = geometry.derive(storeys, walls, openings)
    piers = stiffness.with_stiffness(geom.piers, 0.2, "fixed-fixed")
    wl = stiffness.wall_stiffness(piers, 0.2, "fixed-fixed")
    plans = distribution.storey_plans(piers, wl)
    core = pd.DataFrame(core_rows).assign(row=range(2, len(core_rows) + 2))
    return piers, plans, core, distribution.core_actions_to_piers(piers, wl, plans, core, accidental, local)


def assert_statics(piers, plans, core, out, local_included: bool) -> int:
    """Every storey x combination: N, Mx, My rebuilt from the pier forces; V per wall."""
    p = out.piers.merge(
        piers[["storey", "pier_id", "px1", "py1", "px2", "py2", "ux", "uy"]], on=["storey", "pier_id"]
    )
    checked = 0
    for (storey_name, comb), g in p.groupby(["storey", "combination"]):
        c = core[(core.storey == storey_name) & (core.combination == comb)].iloc[0]
        sec = plans[storey_name].section
        pm = plans[storey_name].piece_moments
        order = piers[piers.storey == storey_name].pier_id.tolist()
        g = g.set_index("pier_id").loc[order]
        area = pm[:, 0]
        xi = np.where(area > 0, pm[:, 1] / np.where(area > 0, area, 1), 0.0)
        yi = np.where(area > 0, pm[:, 2] / np.where(area > 0, area, 1), 0.0)
        m_own = g.m - g.m_local if local_included else g.m
        # own moment vector back from its in-plane and across-the-wall parts
        my_own = m_own * g.ux - g.m_oop * g.uy
        mx_own = m_own * g.uy + g.m_oop * g.ux
        scale = 1.0 + abs(c.n) + abs(c.mx) + abs(c.my)
        assert g.n.sum() == pytest.approx(c.n, abs=1e-9 * scale)
        assert (g.n.to_numpy() * (yi - sec.yc)).sum() + mx_own.sum() == pytest.approx(c.mx, abs=1e-8 * scale)
        assert (g.n.to_numpy() * (xi - sec.xc)).sum() + my_own.sum() == pytest.approx(c.my, abs=1e-8 * scale)
        w = out.walls[(out.walls.storey == storey_name) & (out.walls.combination == comb)].set_index(
            "wall_id"
        )
        per_wall = g.groupby("wall_id").v.sum()
        for wid, v in per_wall.items():
            assert v == pytest.approx(w.loc[wid, "v"], abs=1e-9 * (1 + abs(w.loc[wid, "v"])))
        checked += 1
    return checked


@pytest.mark.parametrize("local", [distribution.LOCAL_BESIDE_OPENINGS, "none"])
def test_demo_core_actions_add_back_at_every_storey_and_combination(local):
    """The demo's two cores, each on its own section with its share of the building's
    resultants (5 % accidental eccentricity at the building level): every core's piers add back
    to its actions."""
    from xlcore import cores

    sts, walls, openings = demo_model()
    geom = geometry.derive(sts, walls, openings)
    piers = stiffness.with_stiffness(geom.piers, 0.2, "fixed-fixed")
    wl = stiffness.wall_stiffness(piers, 0.2, "fixed-fixed")
    plans = cores.plans_by_core(piers, wl)
    building = pd.DataFrame(demo.core_actions()).assign(row=lambda d: range(2, len(d) + 2))
    split = cores.share_among_cores(piers, plans, building, 0.05)
    both = cores.core_actions_to_piers(piers, wl, plans, split.actions, local)
    checked = 0
    for name, rows in split.actions.groupby("core"):
        mine = distribution.CoreSharing(
            both.piers[both.piers.core == name].drop(columns="core"), both.walls[both.walls.core == name]
        )
        checked += assert_statics(
            piers[piers.core == name], plans[name], rows.reset_index(drop=True), mine, local_included=True
        )
    out = both
    assert checked == 2 * len(building) == 2 * 15 * 8
    if local == "none":
        assert (out.piers.m_local == 0).all()
    else:  # the V* h/2 moment only where openings cut the wall
        assert (out.piers.m_local[out.piers.position == 0] == 0).all()
        assert (out.piers.m_local[out.piers.position > 0] != 0).any()


def test_own_moment_is_the_core_moment_times_i_ratio_for_a_lone_rectangle():
    """One straight wall alone is the whole section: its own moment is all of M* (I_i = I_core),
    and its second moment equals sectionproperties' t L^3 / 12 about the centroid."""
    sectionproperties = pytest.importorskip("sectionproperties")
    from sectionproperties.analysis import Section
    from sectionproperties.pre.library import rectangular_section

    geom = rectangular_section(d=0.25, b=4.0)  # b along x = wall length, d = thickness
    geom.create_mesh(mesh_sizes=[0.05])
    sec = Section(geom)
    sec.calculate_geometric_properties()
    iyy_ref = sec.get_ic()[1]  # (ixx_c, iyy_c, ixy_c): iyy_c about the centroidal y axis
    assert sectionproperties is not None
    rect = section.rectangle(0.0, 0.0, 4.0, 0.0, 0.25)
    sec_own = section.section_of([rect])
    assert sec_own.iyy == pytest.approx(iyy_ref, rel=1e-9)
    a, b, c = section.stress_plane(sec_own, 1000.0, 0.0, 800.0)
    m_in, m_oop = distribution.own_moments(np.array([section.moments(rect)]), b, c, [1.0], [0.0])
    assert m_in[0, 0] == pytest.approx(800.0, rel=1e-12)  # I_i = I_core: all of My* is its own
    assert m_oop[0, 0] == pytest.approx(0.0, abs=1e-9)


@st.composite
def random_core(draw):
    """A box or C of 3-4 walls, random sizes and thicknesses, with up to two openings."""
    bx = draw(st.floats(2.5, 9.0))
    by = draw(st.floats(2.5, 9.0))
    x0 = draw(st.floats(-5.0, 5.0))
    y0 = draw(st.floats(-5.0, 5.0))
    t = draw(st.sampled_from([180.0, 200.0, 250.0, 300.0]))
    corners = [(x0, y0), (x0 + bx, y0), (x0 + bx, y0 + by), (x0, y0 + by)]
    n_walls = draw(st.sampled_from([3, 4]))
    ids = ["Rata", "Miro", "Tawa", "Hinau"]
    walls = [
        wall(ids[i], *corners[i], *corners[(i + 1) % 4], storeys=("L0", "L1"), thickness=t)
        for i in range(n_walls)
    ]
    openings = []
    for i in draw(st.lists(st.integers(0, n_walls - 1), max_size=2, unique=True)):
        length = bx if i % 2 == 0 else by
        width = draw(st.floats(0.6, min(1.4, length / 3)))
        offset = draw(st.floats(0.3, length - width - 0.3))
        openings.append(
            Opening(
                wall_id=ids[i],
                storey_from="L0",
                storey_to="L1",
                offset=offset,
                width=width,
                sill=0.0,
                head=2.1,
            )
        )
    loads = draw(
        st.lists(
            st.tuples(*(st.floats(-5e4, 5e4) for _ in range(6))),
            min_size=1,
            max_size=4,
        )
    )
    rows = [
        dict(storey=s, combination=f"c{k}", n=n, vx=vx, vy=vy, mx=mx, my=my, t=tt, x_v=np.nan, y_v=np.nan)
        for s in ("L0", "L1")
        for k, (n, vx, vy, mx, my, tt) in enumerate(loads)
    ]
    return walls, openings, rows


@given(random_core(), st.sampled_from([distribution.LOCAL_BESIDE_OPENINGS, "none"]))
@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
def test_random_cores_add_back(case, local):
    walls, openings, rows = case
    sts = [storey("L0", index=0, level=0.0, height=3.6), storey("L1", index=1, level=3.6, height=3.2)]
    piers, plans, core, out = share(sts, walls, openings, rows, local)
    assert assert_statics(piers, plans, core, out, local_included=True) == len(rows)
