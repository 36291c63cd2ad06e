"""Axial load and bending: AS 3600:2018 Cl 8.1.3 stress block, Cl 10.6.2.2 squash load,
Table 2.2.2 phi, Cl 11.4 effective height and Cl 11.5 simplified method.

References: Warner, Foster & Kilpatrick, "Reinforced Concrete Basics" (2007), Example 5.2
(Warner, Foster & Kilpatrick values; that example uses the 2001
stress block alpha2 0.85, gamma 0.77 and does not deduct concrete displaced by bars, so those
are injected); the concreteproperties library (PyPI) for rectangular piers; everything else
hand evaluation of the clause expressions as listed in docs/engineering-basis.md.
"""

import numpy as np
import pytest

from xlcore.checks.axial import interaction, pier_bars
from xlcore.codes import as3600 as a
from xlcore.mechanics import nm

ONE = np.array([1.0])


def warner(deduct=False):
    return nm.Rect(
        D=600 * ONE,
        b=400 * ONE,
        fc=40 * ONE,
        fsy=500 * ONE,
        d=np.array([[74.0, 526.0]]),
        A=np.array([[1200.0, 1200.0]]),
        alpha2=0.85 * ONE,
        gamma=0.77 * ONE,
        deduct=deduct,
    )


def test_warner_example_5_2_point_dn_526():
    n, m = nm.forces(warner(), np.array([526.0]))
    assert n[0] / 1e3 == pytest.approx(6108, abs=1)  # Warner et al. Ex. 5.2: 6108 kN
    assert m[0] / 1e6 == pytest.approx(672, abs=1)  # 672 kNm


def test_warner_example_5_2_balanced_point():
    sec = warner()
    dn_b = 526 * 0.003 / (0.003 + 500 / 200_000)  # eps_cu / (eps_cu + eps_sy) x d0
    assert dn_b == pytest.approx(287, abs=0.5)  # Warner et al.: dn = 287 mm
    n, m = nm.forces(sec, np.array([dn_b]))
    assert n[0] / 1e3 == pytest.approx(2939, rel=0.002)  # 2939 kN
    assert m[0] / 1e6 == pytest.approx(826, rel=0.002)  # 826 kNm


def test_warner_example_5_2_pure_bending():
    sec = warner()
    dn0 = nm.solve_dn(sec, 0.0, 1e-6 * sec.D, sec.D)
    _, m = nm.forces(sec, dn0)
    assert m[0] / 1e6 == pytest.approx(306, rel=0.005)  # Warner et al.: 306 kNm (0.4 % off: rounding)


def test_squash_and_tension_closed_forms():
    # Cl 10.6.2.2: alpha1(40) = 1 - 0.12 = 0.88 -> 0.85; Nuo = 0.85 x 40 x (240 000 - 2400)
    # + 2400 x 500 = 8078.4 + 1200 = 9278.4 kN (hand evaluation)
    assert a.squash_load(40.0, 240_000 - 2400, 2400.0, 500.0) / 1e3 == pytest.approx(9278.4)
    assert nm.tension_capacity(warner())[0] / 1e3 == pytest.approx(-1200.0)  # -As fsy


@pytest.mark.parametrize(
    "fc, alpha2, gamma",
    [
        (40, 0.79, 0.87),  # 0.85 - 0.06; 0.97 - 0.10
        (100, 0.70, 0.72),  # 0.85 - 0.15; 0.97 - 0.25
        (120, 0.67, 0.67),  # both reach their floor 0.67 exactly
        (150, 0.67, 0.67),  # floors govern
    ],
)
def test_stress_block_cl_8_1_3(fc, alpha2, gamma):
    assert a.alpha2(fc) == pytest.approx(alpha2)
    assert a.gamma(fc) == pytest.approx(gamma)


@pytest.mark.parametrize("fc, alpha1", [(40, 0.85), (50, 0.85), (80, 0.76), (100, 0.72)])
def test_alpha1_cl_10_6_2_2(fc, alpha1):
    # 1 - 0.003 f'c within 0.72..0.85 (hand evaluation): 0.88 -> 0.85; 0.85; 0.76; 0.70 -> 0.72
    assert a.alpha1(fc) == pytest.approx(alpha1)


@pytest.mark.parametrize("kuo, phi", [(0.1, 0.85), (0.36, 0.85), (0.45, 0.7525), (0.545, 0.65), (0.7, 0.65)])
def test_phi_bending_table_2_2_2(kuo, phi):
    # 1.24 - 13 kuo / 12 within 0.65..0.85 (hand evaluation)
    assert a.phi_bending(kuo) == pytest.approx(phi, abs=1e-4)


def test_phi_with_axial_force_table_2_2_2():
    kuo, nub, nuot = 0.45, 4000.0, -2000.0  # phi_b = 0.7525
    assert a.phi_axial_bending(4000.0, nub, nuot, kuo) == pytest.approx(0.6)  # Nu >= Nub: phi0
    assert a.phi_axial_bending(2000.0, nub, nuot, kuo) == pytest.approx(0.6 + 0.1525 / 2)
    assert a.phi_axial_bending(0.0, nub, nuot, kuo) == pytest.approx(0.7525)
    assert a.phi_axial_bending(-2000.0, nub, nuot, kuo) == pytest.approx(0.85)  # pure tension
    assert a.phi_axial_bending(-1000.0, nub, nuot, kuo) == pytest.approx(0.7525 + 0.0975 / 2)


def test_effective_height_cl_11_4():
    # braced top and bottom: 1.0, or 0.75 restrained against rotation
    assert a.effective_height_factor(3000.0, 2000.0, 0) == pytest.approx(1.0)
    assert a.effective_height_factor(3000.0, 2000.0, 0, restrained=True) == pytest.approx(0.75)
    # three sides: 1 / (1 + (3000 / 3000)^2) = 0.5; floor 0.3 where (3000/900)^2 makes it 0.083
    assert a.effective_height_factor(3000.0, 1000.0, 1) == pytest.approx(0.5)
    assert a.effective_height_factor(3000.0, 300.0, 1) == pytest.approx(0.3)
    # four sides: Hw > L1: L1 / (2 Hw) = 2000 / 6000; Hw <= L1: 1 / (1 + 0.75^2) = 0.64
    assert a.effective_height_factor(3000.0, 2000.0, 2) == pytest.approx(1 / 3)
    assert a.effective_height_factor(1500.0, 2000.0, 2) == pytest.approx(0.64)
    # a long wall supported on one side gains nothing over the top-and-bottom value
    assert a.effective_height_factor(3000.0, 20_000.0, 1, restrained=True) == pytest.approx(0.75)


def test_simplified_method_cl_11_5():
    """tw 200, Hwe 3000, f'c 40, 1 m: ea = 3000^2 / (2500 x 200) = 18 mm; e = 0.05 x 200 = 10 mm;
    phi Nu = 0.65 x (200 - 12 - 36) x 0.6 x 40 x 1000 = 2371.2 kN (hand evaluation)."""
    ea = a.additional_eccentricity(3000.0, 200.0)
    e = a.simplified_eccentricity(0.0, 200.0)
    assert (ea, e) == pytest.approx((18.0, 10.0))
    assert a.simplified_eccentricity(25.0, 200.0) == pytest.approx(25.0)
    assert a.simplified_capacity(40.0, 200.0, e, ea, 1000.0) / 1e3 == pytest.approx(2371.2)


def test_pier_bars_evenly_spaced_at_or_below_spacing():
    d, area = pier_bars(
        np.array([3000.0]),
        np.array([200.0]),
        np.array([12.0]),
        np.array([200.0]),
        np.array([2.0]),
        np.array([30.0]),
    )
    live = area[0] > 0
    depths = d[0][live]
    assert depths[0] == pytest.approx(36.0) and depths[-1] == pytest.approx(2964.0)  # cover + db/2
    assert np.diff(depths).max() <= 200.0 + 1e-9
    assert live.sum() == 16  # ceil(2928 / 200) + 1 (hand evaluation)
    assert area[0][live][0] == pytest.approx(2 * np.pi * 36)  # two N12 per position


def test_interaction_closed_form_points():
    """At N* = phi0 Nuo the moment capacity is zero; at N* = 0, phi Mu = phi_b Mu0."""
    sec = warner(deduct=True)
    sec = nm.Rect(sec.D, sec.b, sec.fc, sec.fsy, sec.d, sec.A, a.alpha2(sec.fc), a.gamma(sec.fc))
    r0 = interaction(sec, np.array([0.0]))
    assert r0["phi_mu"][0] == pytest.approx(a.phi_bending(r0["kuo"])[0] * abs(r0["m0"][0]), rel=1e-6)
    top = r0["top"][0]
    assert interaction(sec, np.array([top]))["phi_mu"][0] == pytest.approx(0.0, abs=1.0)
    # monotonic: more compression above decompression only lowers the capacity
    n = np.linspace(r0["phi_d"][0] * r0["nd"][0], top, 5)
    caps = interaction(
        nm.Rect(
            *(
                np.repeat(x, 5, axis=0)
                for x in (sec.D, sec.b, sec.fc, sec.fsy, sec.d, sec.A, sec.alpha2, sec.gamma)
            )
        ),
        n,
    )["phi_mu"]
    assert np.all(np.diff(caps) <= 1e-6)
