"""Pier lateral stiffness and the sharing of a wall's shear among its piers.

Reference: Taly, "Design of Reinforced Masonry Structures", Ch. 7, relative rigidity
R E t = 1 / ((h/d)^3 + 3 (h/d)) fixed-fixed and 1 / (4 (h/d)^3 + 3 (h/d)) cantilever, which is
k = 1 / (h^3/(c E I) + 1.2 h/(G A)) with G = 0.4 E (nu = 0.25). Tabulated 10R values as quoted
in the project's engineering notes (section 6).
"""

import numpy as np
import pandas as pd
import pytest

from xlcore.distribution import pier_actions, pier_stiffness


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


def _piers(lengths, h=2400.0):
    n = len(lengths)
    k = pier_stiffness(np.array(lengths), 200.0, h, 32800.0, 0.2, 12.0)
    return pd.DataFrame(
        dict(
            storey="L1",
            wall_id="W1",
            pier_id=[f"W1-{i + 1}" for i in range(n)],
            position=np.arange(1, n + 1),
            k=k,
        )
    )


def _wall_action(v):
    return pd.DataFrame(
        dict(row=[5], storey=["L1"], combination=["C1"], member=["W1"], n=[0.0], v=[v], m=[0.0])
    )


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
