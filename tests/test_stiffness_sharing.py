"""Pier lateral stiffness and the sharing of a wall's shear among its piers.

Reference: Taly, "Design of Reinforced Masonry Structures", Ch. 7, relative rigidity
R E t = 1 / ((h/d)^3 + 3 (h/d)) fixed-fixed and 1 / (4 (h/d)^3 + 3 (h/d)) cantilever, which is
k = 1 / (h^3/(c E I) + 1.2 h/(G A)) with G = 0.4 E (nu = 0.25). Tabulated 10R values as quoted
in docs/engineering-basis.md (Sharing actions).
"""

import numpy as np
import pandas as pd
import pytest

from xlcore.distribution import COMPOSITE, FROM_SHEAR, WALL_NM_METHODS, pier_actions, pier_stiffness


@pytest.mark.parametrize(
    "h_over_d, c, ten_r",
    [
        (1.25, 12.0, 1.753),  # Taly table, fixed-fixed
        (0.9, 12.0, 2.916),  # Taly table, fixed-fixed
        (0.25, 3.0, 12.308),  # Taly table, cantilever
    ],
)
def test_relative_rigidity_matches_taly_table(h_over_d, c, ten_r):
    k = pier_stiffness(Lw=1.0, tw=1.0, h=h_over_d, E=1.0, nu=0.25, c=c)
    assert 10 * k == pytest.approx(ten_r, abs=5e-4)


def test_closed_form_relative_rigidity():
    # Taly Ch. 7 closed form, fixed-fixed, h/d = 2: 1 / (8 + 6) = 0.0714286 (hand evaluation)
    assert pier_stiffness(1.0, 1.0, 2.0, 1.0, 0.25, 12.0) == pytest.approx(1 / 14)


def _piers(lengths, h=2400.0, gap=1.0):
    """Piers of wall W1 at storey L1, in mm, with `gap` m openings between them."""
    lengths = np.array(lengths, dtype=float)
    starts = np.concatenate([[0.0], np.cumsum(lengths[:-1] / 1000 + gap)])
    return pd.DataFrame(
        dict(
            storey="L1",
            wall_id="W1",
            pier_id=[f"W1-{i + 1}" for i in range(len(lengths))],
            position=np.arange(1, len(lengths) + 1),
            start=starts,
            end=starts + lengths / 1000,
            Lw=lengths,
            tw=200.0,
            h=h,
            k=pier_stiffness(lengths, 200.0, h, 32800.0, 0.2, 12.0),
        )
    )


def _wall_action(v, n=0.0, m=0.0):
    return pd.DataFrame(dict(row=[5], storey=["L1"], combination=["C1"], member=["W1"], n=[n], v=[v], m=[m]))


def test_equal_piers_share_equally():
    out = pier_actions(_piers([1500.0, 1500.0]), _wall_action(300.0))
    assert out.v.tolist() == pytest.approx([150.0, 150.0])
    assert out.share.sum() == pytest.approx(1.0)


def test_short_pier_takes_far_less_than_its_length_ratio():
    """0.6 m and 2.4 m piers, 2.4 m high, tw 200, E 32 800, G = E / 2.4 (hand evaluation):
    short: h^3/(12 E I) = 1.3824e10 / (12 x 32800 x 3.6e9) = 9.756e-6 mm/N,
           1.2 h/(G A) = 2880 / (13 667 x 120 000) = 1.756e-6 mm/N -> k = 86 864 N/mm;
    long:  1.524e-7 + 4.390e-7 mm/N -> k = 1 690 722 N/mm.
    Share of the short pier 86 864 / 1 777 586 = 4.89 %, against 20 % by length."""
    out = pier_actions(_piers([600.0, 2400.0]), _wall_action(1000.0))
    short = out.loc[out.pier_id == "W1-1", "share"].item()
    assert short < 0.2 / 2
    assert short == pytest.approx(0.04887, abs=1e-4)
    assert out.v.sum() == pytest.approx(1000.0)


def test_pier_actions_pass_through_unchanged():
    acts = pd.DataFrame(
        dict(row=[2], storey=["L1"], combination=["C1"], member=["W1-2"], n=[10.0], v=[55.0], m=[7.0])
    )
    out = pier_actions(_piers([600.0, 2400.0]), acts)
    assert len(out) == 1 and out.v.item() == 55.0 and out.share.item() == 1.0


@pytest.mark.parametrize("method", WALL_NM_METHODS)
def test_wall_actions_shared_to_piers_keep_equilibrium(method):
    """Pier forces sum back to the wall's N*, V* and M* about the piers' centroid (statics)."""
    piers = _piers([600.0, 2400.0, 1200.0])
    out = pier_actions(piers, _wall_action(v=400.0, n=3000.0, m=2500.0), method)
    s = out.merge(piers, on="pier_id").eval("(start + end) / 2")
    area = out.merge(piers, on="pier_id").eval("Lw * tw")
    s_bar = (area * s).sum() / area.sum()
    assert out.n.sum() == pytest.approx(3000.0)
    assert out.v.sum() == pytest.approx(400.0)
    assert (out.n * (s - s_bar)).sum() + out.m.sum() == pytest.approx(2500.0)


def test_composite_section_closed_form():
    """Two equal 1 m piers, 2 m apart centre to centre, t 0.2 m: A = 0.4 m^2, I = 2 x (0.2 x 1^3/12)
    + 2 x 0.2 x 1^2 = 0.4333 m^4. N 1000 kN, M 433.3 kNm: sigma = 2500 +- 1000 s; pier N =
    0.2 x (2500 +- 1000) = 700 / 300 kN; own M = 433.3 x 0.01667 / 0.4333 = 16.67 kNm (hand evaluation)."""
    out = pier_actions(
        _piers([1000.0, 1000.0]), _wall_action(v=0.0, n=1000.0, m=0.4333333333 * 1000), COMPOSITE
    )
    assert out.n.tolist() == pytest.approx([300.0, 700.0])
    assert out.m.tolist() == pytest.approx([16.6667, 16.6667], abs=1e-3)


def test_moments_from_shear_closed_form():
    """Same two piers, V 100 kN, h 2.4 m: own M = 50 x 2.4 / 2 = 60 kNm each; rest 433.33 - 120
    = 313.33 kNm as a couple over 2 m lever: N = 500 -+ 156.67 kN (hand evaluation)."""
    out = pier_actions(_piers([1000.0, 1000.0]), _wall_action(v=100.0, n=1000.0, m=433.3333333), FROM_SHEAR)
    assert out.m.tolist() == pytest.approx([60.0, 60.0])
    assert out.n.tolist() == pytest.approx([500 - 156.6667, 500 + 156.6667], abs=1e-3)
