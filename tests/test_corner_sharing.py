"""Corner overlaps of centreline rectangles: what each member carries of an overlap.

Where two walls meet at a corner their centreline rectangles overlap in a square of side t/2.
The net section counts it once (common practice, no source; docs/engineering-basis.md). Each
member's share of the overlap is equal (half to each of two walls), so a pier's N* and M* from
the core's actions do not change when walls are renamed or listed in another order: before,
the overlap went to the first pier in ID order, and renaming the demo's walls moved a wall's
N* by 5 % and a pier's M* by 14 %. Hand values: areas and first moments of rectangles
(any statics text); inclusion-exclusion for the shares of a point covered k times.
"""

from __future__ import annotations

import itertools

import numpy as np
import pandas as pd
import pytest

from xlcore.mechanics import nm_core, section


def rects(*rows) -> pd.DataFrame:
    """Centreline rectangles: (x1, y1, x2, y2) in m, thickness in mm."""
    return pd.DataFrame(rows, columns=["px1", "py1", "px2", "py2", "tw"])


# an L corner: a 6 m wall along x and a 5 m wall up from its end, both 250 mm thick
L_CORNER = rects((0.0, 0.0, 6.0, 0.0, 250.0), (6.0, 0.0, 6.0, 5.0, 250.0))


def test_two_walls_at_a_corner_share_the_overlap_square_half_each():
    """Overlap = (t/2)^2 = 0.125^2 = 0.015625 m^2, centred at (5.9375, 0.0625). Each wall:
    its own rectangle less half of it (hand arithmetic)."""
    got = section.shared_moments(L_CORNER)
    t = 0.25
    half = (t / 2) ** 2 / 2  # 0.0078125 m^2
    xo, yo = 6.0 - t / 4, t / 4  # the overlap square's centroid
    a_wall, b_wall = 6.0 * t - half, 5.0 * t - half
    assert got[0, 0] == pytest.approx(a_wall, rel=1e-12)
    assert got[1, 0] == pytest.approx(b_wall, rel=1e-12)
    # first moments: Qx = int x dA. Wall A's rectangle has its centroid at (3, 0), B's at (6, 2.5)
    assert got[0, 1] == pytest.approx(6.0 * t * 3.0 - half * xo, rel=1e-12)
    assert got[0, 2] == pytest.approx(0.0 - half * yo, abs=1e-12)
    assert got[1, 1] == pytest.approx(5.0 * t * 6.0 - half * xo, rel=1e-12)
    assert got[1, 2] == pytest.approx(5.0 * t * 2.5 - half * yo, rel=1e-12)


def test_the_shares_add_up_to_the_net_section():
    """The members' rows sum to the union's moments (`disjoint_pieces`), second moments too."""
    for piers in (L_CORNER, rects(*BOX)):
        union = sum(section.moments(p) for p in section.disjoint_pieces(piers))
        assert section.shared_moments(piers).sum(axis=0) == pytest.approx(union, rel=1e-12, abs=1e-12)


# a box core 6 m x 5 m, 250 mm walls: four corners
BOX = [
    (0.0, 0.0, 6.0, 0.0, 250.0),
    (6.0, 0.0, 6.0, 5.0, 250.0),
    (6.0, 5.0, 0.0, 5.0, 250.0),
    (0.0, 5.0, 0.0, 0.0, 250.0),
]


def test_no_member_share_depends_on_the_order_the_members_are_listed():
    """Every order of the box's four walls gives each wall the same row."""
    want = section.shared_moments(rects(*BOX))
    for order in itertools.permutations(range(4)):
        got = section.shared_moments(rects(*(BOX[i] for i in order)))
        assert got == pytest.approx(want[list(order)], rel=1e-12, abs=1e-12)


def test_a_point_covered_three_times_counts_a_third_to_each():
    """Three 1 m x 1 m squares stacked on one another (centreline 1 m long, 1 000 mm thick):
    each gets a third of the square; a fourth square apart keeps its own."""
    same = (0.0, 0.5, 1.0, 0.5, 1000.0)
    got = section.shared_moments(rects(same, same, same, (5.0, 0.5, 6.0, 0.5, 1000.0)))
    assert got[:3, 0] == pytest.approx([1 / 3] * 3, rel=1e-12)
    assert got[:3, 1] == pytest.approx([0.5 / 3] * 3, rel=1e-12)  # Qx = A x 0.5 m
    assert got[3, 0] == pytest.approx(1.0, rel=1e-12)


def test_a_member_that_overlaps_none_keeps_its_own_rectangle():
    apart = rects((0.0, 0.0, 2.0, 0.0, 200.0), (0.0, 3.0, 2.0, 3.0, 300.0))
    got = section.shared_moments(apart)
    want = np.array([section.moments(section.rectangle(*r[:4], r[4] / 1000)) for r in apart.to_numpy()])
    assert np.array_equal(got, want)


def test_core_fibres_count_an_overlap_once_whatever_the_order_of_the_walls():
    """The core's fibre section (core N-M): total concrete area = the union's (within the
    fibres' discretisation), the same in every order of the walls, to rounding."""
    walls = [(x1 * 1000, y1 * 1000, x2 * 1000, y2 * 1000, t, 40.0, 500.0, []) for x1, y1, x2, y2, t in BOX]
    union = sum(section.moments(p)[0] for p in section.disjoint_pieces(rects(*BOX))) * 1e6  # mm^2
    areas = []
    for order in itertools.permutations(range(4)):
        one = nm_core._one([walls[i] for i in order], fibre=100.0, across=4)
        areas.append(one["fa"].sum())
    assert max(areas) - min(areas) <= 1e-9 * union
    # the box's net area by hand: 2 x (6 + 5) m x 0.25 m less four (t/2)^2 overlaps
    assert union == pytest.approx((2 * 11.0 * 0.25 - 4 * 0.125**2) * 1e6, rel=1e-12)
    assert areas[0] == pytest.approx(union, rel=0.01)  # fibre centres: within 1 % (as test_core_nm)


def test_renaming_the_demos_walls_leaves_every_pier_action_from_the_core_unchanged():
    """The demo's two cores shared to piers with its wall IDs, and again with every wall
    renamed so their ID order reverses (pier IDs follow): each pier's N*, V*, M* the same to
    rounding. Before the equal shares, the corner overlaps followed the ID order and the
    renamed demo moved a wall's N* by 5 % and a pier's M* by 14 %."""
    from demo_parts import demo_model

    from xlcore import cores, demo, geometry
    from xlcore.mechanics import stiffness

    def shared(rename):
        sts, walls, openings = demo_model(rename)
        geom = geometry.derive(sts, walls, openings)
        piers = stiffness.with_stiffness(geom.piers, 0.2, "fixed-fixed")
        wl = stiffness.wall_stiffness(piers, 0.2, "fixed-fixed")
        plans = cores.plans_by_core(piers, wl)
        acts = pd.DataFrame(demo.core_actions()).assign(row=lambda d: range(2, len(d) + 2))
        split = cores.share_among_cores(piers, plans, acts, 0.05)
        return cores.core_actions_to_piers(piers, wl, plans, split.actions).piers

    ids = sorted({w["wall_id"] for w in demo.walls()})
    new = {w: f"Z{len(ids) - i:02d}" for i, w in enumerate(ids)}  # Z01 for the last: order reversed
    old_of = {v: k for k, v in new.items()}
    a = shared(lambda w: w)
    b = shared(lambda w: new[w])
    b["pier_id"] = [old_of[p.split("-")[0]] + p[3:] for p in b.pier_id]
    keys = ["row", "core", "pier_id"]
    m = a.merge(b, on=keys, suffixes=("", "_renamed"))
    assert len(m) == len(a) == len(b) > 0
    for col in ("n", "v", "m", "m_curv", "m_oop"):
        scale = 1.0 + a[col].abs().max()
        assert np.abs(m[col] - m[f"{col}_renamed"]).max() <= 1e-9 * scale, col


def test_a_subnormal_coordinate_gives_the_overlap_of_zero():
    """A corner at y = 2.2e-309 m (found by the statics property test) is the corner at 0: the
    overlap (t/2)^2 = 0.09^2 = 0.0081 m^2, not the geometry library's 0.01215 on subnormals."""
    tiny = 2.225073858507203e-309
    a = section.rectangle(0.0, tiny, 3.0, tiny, 0.18)
    b = section.rectangle(3.0, tiny, 3.0, 3.0, 0.18)
    assert a.intersection(b).area == pytest.approx(0.09**2, rel=1e-9)
    piers = rects((3.0, tiny, 3.0, 3.0, 180.0), (0.0, tiny, 3.0, tiny, 180.0), (3.0, 3.0, 0.0, 3.0, 180.0))
    union = sum(section.moments(p) for p in section.disjoint_pieces(piers))
    assert section.shared_moments(piers).sum(axis=0) == pytest.approx(union, rel=1e-12, abs=1e-12)
