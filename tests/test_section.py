"""Net core section properties against closed forms and the `sectionproperties` library
(general-purpose section analysis from the package registry, used here as an outside reference
on the same centreline-rectangle idealisation)."""

import numpy as np
import pytest
from shapely.ops import unary_union

from xlcore.mechanics import section

sp = pytest.importorskip("sectionproperties.pre.geometry")
from sectionproperties.analysis.section import Section  # noqa: E402


def reference(pieces):
    geom = sp.Geometry(unary_union(pieces))
    geom.create_mesh(mesh_sizes=[0.01])
    s = Section(geom)
    s.calculate_geometric_properties()
    return s


def check_against_library(pieces):
    ours = section.section_of(pieces)
    ref = reference(pieces)
    assert ours.area == pytest.approx(ref.get_area(), rel=1e-9)
    assert (ours.xc, ours.yc) == pytest.approx(ref.get_c(), rel=1e-9)
    assert (ours.ixx, ours.iyy, ours.ixy) == pytest.approx(ref.get_ic(), rel=1e-9, abs=1e-12)
    assert (ours.i1, ours.i2) == pytest.approx(ref.get_ip(), rel=1e-9)
    assert np.tan(np.radians(ours.angle)) == pytest.approx(
        np.tan(np.radians(ref.get_phi())), rel=1e-6, abs=1e-9
    )
    return ours


def pieces_of(rects):
    taken, out = None, []
    for r in rects:
        out.append(r if taken is None else r.difference(taken))
        taken = r if taken is None else taken.union(r)
    return out


def test_single_wall_closed_form():
    # 4 m x 0.25 m: A = 1.0 m^2; I about the strong axis = 0.25 x 4^3 / 12 = 1.3333 m^4 (hand evaluation)
    s = section.section_of([section.rectangle(0, 0, 4, 0, 0.25)])
    assert s.area == pytest.approx(1.0)
    assert s.iyy == pytest.approx(0.25 * 4**3 / 12)
    assert s.ixx == pytest.approx(4 * 0.25**3 / 12)
    assert s.xc == pytest.approx(2.0) and s.yc == pytest.approx(0.0)


def test_l_section():
    # closed form area: (3 + 2) x 0.2 - 0.2^2 / 4 = 0.99 m^2 (corner overlap counted once)
    s = check_against_library(
        pieces_of([section.rectangle(0, 0, 3, 0, 0.2), section.rectangle(0, 0, 0, 2, 0.2)])
    )
    assert s.area == pytest.approx(0.99)


def test_c_section():
    rects = [
        section.rectangle(0, 0, 3, 0, 0.25),
        section.rectangle(3, 0, 3, 6, 0.25),
        section.rectangle(3, 6, 0, 6, 0.25),
    ]
    s = check_against_library(pieces_of(rects))
    assert s.yc == pytest.approx(3.0)  # symmetric about y = 3 (hand evaluation)
    assert s.ixy == pytest.approx(0.0, abs=1e-12)


def test_box_core_with_a_door_opening():
    """Box 6 x 5 m on centrelines, t 0.25, a 1.2 m door in the bottom wall from x 0.75.
    Closed form area: 2 (6 + 5) 0.25 - 4 x 0.25^2/4 - 1.2 x 0.25 = 5.1875 m^2 (hand evaluation)."""
    rects = [
        section.rectangle(0, 0, 0.75, 0, 0.25),
        section.rectangle(1.95, 0, 6, 0, 0.25),
        section.rectangle(6, 0, 6, 5, 0.25),
        section.rectangle(6, 5, 0, 5, 0.25),
        section.rectangle(0, 5, 0, 0, 0.25),
    ]
    s = check_against_library(pieces_of(rects))
    assert s.area == pytest.approx(2 * 11 * 0.25 - 0.25**2 - 1.2 * 0.25)


def test_pieces_add_up_and_stress_integrates_back():
    rects = [
        section.rectangle(0, 0, 6, 0, 0.25),
        section.rectangle(6, 0, 6, 5, 0.25),
        section.rectangle(6, 5, 0, 5, 0.2),
        section.rectangle(0, 5, 0, 0, 0.2),
    ]
    pieces = pieces_of(rects)
    sec = section.section_of(pieces)
    pm = np.array([section.moments(p) for p in pieces])
    a, b, c = section.stress_plane(sec, np.array([5000.0]), np.array([1200.0]), np.array([-800.0]))
    n = section.piece_forces(sec, pm, a, b, c)[:, 0]
    assert n.sum() == pytest.approx(5000.0)
    # the plane reproduces both moments: int sigma (y - yc) dA = Mx, int sigma (x - xc) dA = My
    assert b[0] * sec.ixy + c[0] * sec.ixx == pytest.approx(1200.0)
    assert b[0] * sec.iyy + c[0] * sec.ixy == pytest.approx(-800.0)
    # and per piece, first moments of the stress about the centroid add up to them as well
    qx, qy, area = pm[:, 1], pm[:, 2], pm[:, 0]
    iyy0, ixy0 = pm[:, 4], pm[:, 5]
    xc, yc = sec.xc, sec.yc
    my_piece = (
        a[0] * (qx - xc * area)
        + b[0] * (iyy0 - 2 * xc * qx + xc**2 * area)
        + c[0] * (ixy0 - xc * qy - yc * qx + xc * yc * area)
    )
    assert my_piece.sum() == pytest.approx(-800.0)
