"""Piers and lintels cut from walls by openings, and storey clear heights.

Expected values are plain arithmetic on the inputs (hand evaluation); pier numbering from the
wall start is xlcore's documented convention.
"""

import builders
import pytest

from xlcore.geometry import bar_ratio, derive
from xlcore.model import Opening, Storey


def storeys():
    return [
        Storey(index=0, name="GF", level=0.0, height=4.0, slab=250.0),
        Storey(index=1, name="L1", level=4.0, height=3.2, slab=200.0),
    ]


def wall(length=6.0, **kw):
    return builders.wall("W3", 0.0, 0.0, length, 0.0, storeys=("GF", "L1"), **kw)


def opening(offset, width, head=2.1, sill=0.0, lo="GF", hi="L1"):
    return Opening(
        wall_id="W3", storey_from=lo, storey_to=hi, offset=offset, width=width, sill=sill, head=head
    )


def piers_at(g, storey):
    p = g.piers[g.piers.storey == storey]
    return list(zip(p.pier_id, p.Lw.round(3), strict=True))


def test_clear_height_is_floor_to_floor_less_slab_above():
    # 4.0 m - 0.25 m = 3.75 m; 3.2 - 0.2 = 3.0 m (hand evaluation)
    s = storeys()
    assert [x.clear_height for x in s] == pytest.approx([3.75, 3.0])
    g = derive(s, [wall()], [])
    assert g.piers.Hc.tolist() == pytest.approx([3750.0, 3000.0])


def test_wall_without_opening_keeps_its_id():
    g = derive(storeys(), [wall()], [])
    assert piers_at(g, "GF") == [("W3", 6000.0)]
    assert g.lintels.empty


def test_one_opening_gives_two_piers_numbered_from_the_start():
    g = derive(storeys(), [wall()], [opening(2.0, 1.0)])
    assert piers_at(g, "GF") == [("W3-1", 2000.0), ("W3-2", 3000.0)]
    assert g.lintels.lintel_id.tolist() == ["W3-L1", "W3-L1"]


def test_two_openings_give_three_piers():
    g = derive(storeys(), [wall()], [opening(3.5, 1.2), opening(0.8, 1.0)])
    assert piers_at(g, "L1") == [("W3-1", 800.0), ("W3-2", 1700.0), ("W3-3", 1300.0)]


def test_opening_at_wall_end_leaves_one_pier():
    g = derive(storeys(), [wall()], [opening(0.0, 1.5)])
    assert piers_at(g, "GF") == [("W3-1", 4500.0)]
    g = derive(storeys(), [wall()], [opening(5.0, 1.0)])
    assert piers_at(g, "GF") == [("W3-1", 5000.0)]


def test_opening_on_some_storeys_only():
    g = derive(storeys(), [wall()], [opening(2.0, 1.0, lo="L1", hi="L1")])
    assert piers_at(g, "GF") == [("W3", 6000.0)]
    assert piers_at(g, "L1") == [("W3-1", 2000.0), ("W3-2", 3000.0)]


def test_pier_opening_height_is_taller_neighbour():
    # door 2.1 m high on the left, window 1.2 -> 2.4 m (1.2 m clear) on the right
    g = derive(storeys(), [wall()], [opening(1.0, 1.0, head=2.1), opening(4.0, 1.0, head=2.4, sill=1.2)])
    ho = g.piers[g.piers.storey == "GF"].Ho.tolist()
    assert ho == pytest.approx([2100.0, 2100.0, 1200.0])


def test_lintel_depth_is_head_to_top_of_slab_above():
    # storey GF: 4.0 m floor to floor, head 2.1 m -> lintel depth 1.9 m incl. the slab (hand evaluation)
    g = derive(storeys(), [wall()], [opening(2.0, 1.0, head=2.1)])
    lin = g.lintels[g.lintels.storey == "GF"].iloc[0]
    assert lin.depth == pytest.approx(1900.0)
    assert lin.span == pytest.approx(1.0)


def test_sloped_wall_length():
    # 3-4-5 triangle: centreline (0,0) -> (3,4) is 5 m long (hand evaluation)
    g = derive(storeys(), [builders.wall("W3", 0.0, 0.0, 3.0, 4.0, storeys=("GF", "L1"))], [])
    assert g.piers.Lw.iloc[0] == pytest.approx(5000.0)


def test_bar_ratio():
    # N12 @ 200, two layers, 200 thick: 2 x 113.097 / (200 x 200) = 0.0056549 (hand evaluation)
    assert bar_ratio(2, 12, 200, 200) == pytest.approx(0.0056549, rel=1e-4)
