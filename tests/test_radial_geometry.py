"""The radial overload factor on the straight parts of the diagram lives once, in
xlcore/mechanics/radial.py; the pier check and AS 3600's module use that one. Hand evaluations."""

import pytest

from xlcore.checks import axial
from xlcore.codes import as3600
from xlcore.mechanics import radial


def test_one_function_serves_the_check_and_the_standard():
    assert as3600.tension_side_utilisation is radial.tension_side_utilisation
    assert as3600.ray_segment_utilisation is radial.ray_segment_utilisation
    assert axial.tension_side_utilisation is radial.tension_side_utilisation
    assert axial.ray_segment_utilisation is radial.ray_segment_utilisation


def test_segment_through_the_squash_cap_hand_evaluation():
    # segment (n1, m1) = (8000, 500) to (10000, 0) (the line to phi0 Nuo); ray through (9000, 250):
    # points on the line: M = 500 (10000 - N) / 2000 = 0.25 (10000 - N); (9000, 250)/lam on it:
    # 250 = 0.25 (10000 lam - 9000) -> lam = 1.0 (hand evaluation); and (4500, 125) -> 0.5
    assert radial.ray_segment_utilisation(9000.0, 250.0, 8000.0, 500.0, 10000.0, 0.0) == pytest.approx(1.0)
    assert radial.ray_segment_utilisation(4500.0, -125.0, 8000.0, 500.0, 10000.0, 0.0) == pytest.approx(0.5)
    # a segment whose line runs through the origin: no ray crosses it (denominator 0 by hand:
    # 1000 x 100 - 100 x 1000), inf
    assert radial.ray_segment_utilisation(500.0, 60.0, 1000.0, 100.0, 2000.0, 200.0) == float("inf")


def test_tension_line_hand_evaluation():
    # (0, 300)-(-1200, 0); N* -600, |M*| 150: 600/1200 + 150/300 = 1.0 (hand evaluation)
    assert radial.tension_side_utilisation(-600.0, -150.0, -1200.0, 300.0) == pytest.approx(1.0)
