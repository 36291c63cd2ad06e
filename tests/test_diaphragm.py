"""Storey shear and torsion shared among walls by a rigid diaphragm.

Reference: Taly, "Design of Reinforced Masonry Structures", Ch. 7, Example 7.12 (values as
quoted in docs/engineering-basis.md, Sharing actions): walls A (R 4.5, x 0 ft) and B (R 5.5,
x 90 ft) parallel to V = 100 kips, walls C and D (R 4 each) 60 ft apart in the other direction,
centre of mass at x 45 ft. Printed: centre of rigidity x 49.5 ft, J = 27 248, direct shears
45 / 55 kips, accidental eccentricity 4.5 ft, torsional shear 7.36 kips per wall.
"""

import numpy as np
import pytest

from xlcore.mechanics.diaphragm import Storey, Unstable, centre_of_rigidity, share


def taly():
    return Storey(
        k=np.array([4.5, 5.5, 4.0, 4.0]),
        ux=np.array([0, 0, 1, 1.0]),
        uy=np.array([1, 1, 0, 0.0]),
        px=np.array([0, 90, 45, 45.0]),
        py=np.array([30, 30, 0, 60.0]),
    )


def test_taly_centre_of_rigidity():
    xr, yr = centre_of_rigidity(taly())
    assert xr == pytest.approx(49.5)  # Taly Ex. 7.12: 49.5 ft
    assert yr == pytest.approx(30.0)  # symmetric C and D (hand evaluation)


def test_taly_polar_moment_and_direct_shears():
    st = taly()
    xr, yr = centre_of_rigidity(st)
    r = np.array([0 - xr, 90 - xr, 0 - yr, 60 - yr])
    assert (st.k * r**2).sum() == pytest.approx(27248, abs=1)  # Taly Ex. 7.12: J = 27 248
    s = share(st, 0.0, 100.0, 0.0)
    assert s.direct[:, 0] == pytest.approx([45.0, 55.0, 0.0, 0.0], abs=1e-9)  # Taly: 45 / 55 kips


def test_taly_torsional_shear_with_accidental_eccentricity():
    """e = (49.5 - 45) + 4.5 = 9 ft; T = 100 x 9 = 900 kip-ft; A and B: 7.36 kips (Taly)."""
    st = taly()
    s = share(st, 0.0, 100.0, -100.0 * 9.0)  # force at x = 40.5 ft, left of CR: clockwise
    assert abs(s.torsion[0, 0]) == pytest.approx(7.36, abs=0.005)
    assert abs(s.torsion[1, 0]) == pytest.approx(7.36, abs=0.005)
    # C and D: 900 x 4 x 30 / 27 248 = 3.96 kips (hand evaluation of k r T / J)
    assert abs(s.torsion[2, 0]) == pytest.approx(3.963, abs=0.001)


def test_torsional_shears_balance_the_moment():
    st = taly()
    s = share(st, 0.0, 0.0, 500.0)
    xr, yr = centre_of_rigidity(st)
    g = st.g
    moment = (s.torsion[:, 0] * (g[2] - (xr * st.uy - yr * st.ux))).sum()
    assert moment == pytest.approx(500.0)
    assert (s.torsion[:, 0] * st.ux).sum() == pytest.approx(0.0, abs=1e-9)
    assert (s.torsion[:, 0] * st.uy).sum() == pytest.approx(0.0, abs=1e-9)


def test_two_equal_parallel_walls_share_equally_and_sum_to_storey_shear():
    st = Storey(
        k=np.array([2.0, 2.0, 1.0, 1.0]),
        ux=np.array([1, 1, 0, 0.0]),
        uy=np.array([0, 0, 1, 1.0]),
        px=np.array([0, 0, -3, 3.0]),
        py=np.array([-5, 5, 0, 0.0]),
    )
    s = share(st, np.array([100.0, -40.0]), 0.0, 0.0)
    assert s.total[:, 0] == pytest.approx([50.0, 50.0, 0.0, 0.0], abs=1e-9)
    assert (s.total * st.ux[:, None]).sum(axis=0) == pytest.approx([100.0, -40.0])


def test_symmetric_core_under_centred_shear_has_no_torsional_share():
    st = Storey(
        k=np.array([3.0, 3.0, 5.0, 5.0]),
        ux=np.array([1, 1, 0, 0.0]),
        uy=np.array([0, 0, 1, 1.0]),
        px=np.array([2, 2, 0, 4.0]),
        py=np.array([0, 6, 3, 3.0]),
    )
    assert centre_of_rigidity(st) == pytest.approx((2.0, 3.0))
    s = share(st, 80.0, 120.0, 0.0)
    assert np.allclose(s.torsion, 0.0)


def test_one_wall_alone_in_a_direction_takes_all_of_it():
    st = Storey(
        k=np.array([7.0, 1.0, 1.0]),
        ux=np.array([1, 0, 0.0]),
        uy=np.array([0, 1, 1.0]),
        px=np.array([0, -2, 2.0]),
        py=np.array([0, 0, 0.0]),
    )
    s = share(st, 250.0, 0.0, 0.0)
    assert s.total[0, 0] == pytest.approx(250.0)


def test_angled_wall_contributes_components():
    """A wall at 45 degrees beside an x wall and two y walls: forces still balance both shears."""
    c = np.sqrt(0.5)
    st = Storey(
        k=np.array([2.0, 1.0, 1.0, 1.0]),
        ux=np.array([c, 1, 0, 0.0]),
        uy=np.array([c, 0, 1, 1.0]),
        px=np.array([0, 0, -4, 4.0]),
        py=np.array([0, 5, 0, 0.0]),
    )
    s = share(st, 60.0, 30.0, 10.0)
    assert (s.total[:, 0] * st.ux).sum() == pytest.approx(60.0)
    assert (s.total[:, 0] * st.uy).sum() == pytest.approx(30.0)


def test_parallel_walls_only_are_unstable():
    st = Storey(
        k=np.array([1.0, 1.0]),
        ux=np.array([1, 1.0]),
        uy=np.array([0, 0.0]),
        px=np.array([0, 0.0]),
        py=np.array([0, 3.0]),
    )
    with pytest.raises(Unstable):
        centre_of_rigidity(st)
