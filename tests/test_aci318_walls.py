"""ACI 318-19 (SI) Chapter 11 walls: in-plane shear, the simplified axial method, minimum
reinforcement, spacing and layers (xlcore/codes/aci318.py).

References, named beside each check:
- Published worked example, wall shear: reuven.tools "Shear Wall Design Calculator", section
  "Worked Example" (ACI 318 in SI form): lw 3000, t 250, f'c 28, fy 420, rho_t 0.0025, Vu 900 kN.
- Published worked example, Eq. (11.6.2): PCA "Simplified Design of Reinforced Concrete
  Buildings", Chapter 6 shear-wall example as excerpted on what-when-how.com ("Simplified Design
  of Reinforced Concrete Buildings 216"): hw/lw = 2, rho_t = 0.0055 -> rho_l = 0.0033 (page
  number not shown in the excerpt).
- Published worked example, ratios and spacing: Wight, Reinforced Concrete Mechanics and Design,
  7th ed. (2016), Example 18-2, as reproduced (to ACI 318-14) in a published shear-wall design
  example, section 1 "Minimum Reinforcement Requirements": 10 in wall, 18 ft long, #4 @ 16 in
  and #5 @ 18 in each face.
- Everything else: the section's expression evaluated by hand (calculator), at and either side of
  every limit; the values are written out, not computed by xlcore.
Common case: Lw 3000 mm, tw 200 mm, f'c 40 MPa, fyt 420 MPa: Acv = 600 000 mm^2,
sqrt(40) = 6.324555.
"""

import numpy as np
import pytest

from xlcore.codes import aci318 as aci

LW, TW, FC, FY = 3000.0, 200.0, 40.0, 420.0
IN, FT = 25.4, 304.8  # mm


# ---------------------------------------------------------------- alpha_c, 11.5.4.3


@pytest.mark.parametrize(
    "ratio, expected",
    [
        (0.5, 0.25),  # squat: 0.25
        (1.5, 0.25),  # at the upper end of the squat range
        (1.75, 0.21),  # halfway: 0.25 - 0.5 x 0.08 = 0.21 (linear between)
        (2.0, 0.17),  # at the slender limit
        (3.0, 0.17),  # slender
    ],
)
def test_alpha_c_at_and_between_the_limits(ratio, expected):
    # 11.5.4.3: 0.25 for hw/lw <= 1.5, 0.17 for hw/lw >= 2.0, linear between (hand evaluation)
    assert aci.alpha_c(ratio) == pytest.approx(expected)


@pytest.mark.parametrize(
    "ratio, vn",
    [
        (1.5, 1_578_683.3),  # 0.25 x 6.324555 x 600 000 = 948 683.3 + 0.0025 x 420 x 600 000 = 630 000
        (1.75, 1_426_894.0),  # 0.21 x 6.324555 x 600 000 = 796 894.0 + 630 000
        (2.0, 1_275_104.6),  # 0.17 x 6.324555 x 600 000 = 645 104.6 + 630 000
    ],
)
def test_vn_formula_by_hand(ratio, vn):
    r = aci.wall_shear(FC, FY, LW, TW, ratio, 0.0025)
    assert r.vn == pytest.approx(vn, abs=0.5)
    assert r.governs == aci.GOV_FORMULA
    assert r.phi_vn == pytest.approx(0.75 * vn, abs=0.5)  # Table 21.2.1(b): phi 0.75


def test_upper_limit_0_66_caps_the_wall():
    """11.5.4.2: 0.66 x 6.324555 x 600 000 = 2 504 523.9 N. With rho_t 0.01:
    948 683.3 + 0.01 x 420 x 600 000 = 3 468 683.3 > limit (hand evaluation)."""
    r = aci.wall_shear(FC, FY, LW, TW, 1.0, 0.01)
    assert r.vn == pytest.approx(2_504_523.9, abs=0.5)
    assert r.governs == aci.GOV_WALL_LIMIT
    assert aci.GOVERNING_TEXT[int(r.governs)].startswith("ACI 318-19 11.5.4.2")
    # just below the limit the formula governs: rho_t 0.0062 -> 948 683.3 + 1 562 400 = 2 511 083 > limit,
    # rho_t 0.0061 -> 948 683.3 + 1 537 200 = 2 485 883.3 < limit
    assert aci.wall_shear(FC, FY, LW, TW, 1.0, 0.0061).vn == pytest.approx(2_485_883.3, abs=0.5)
    assert aci.wall_shear(FC, FY, LW, TW, 1.0, 0.0062).governs == aci.GOV_WALL_LIMIT


def test_segment_limit_0_83_for_one_segment_of_a_special_wall():
    """18.10.4.4: one vertical segment Vn <= 0.83 sqrt(f'c) Acw = 0.83 x 6.324555 x 600 000
    = 3 149 628.5 N (hand evaluation); rho_t 0.01 gives 3 468 683.3 -> capped."""
    r = aci.wall_shear(FC, FY, LW, TW, 1.0, 0.01, segment=True)
    assert r.vn == pytest.approx(3_149_628.5, abs=0.5)
    assert r.governs == aci.GOV_SEGMENT_LIMIT
    assert aci.segment_vn_max(FC, 600_000.0) == pytest.approx(3_149_628.5, abs=0.5)


def test_fyt_capped_at_420_for_shear():
    # 20.2.2.4 (conservative setting): fyt 500 counts as 420 -> Vs 0.0025 x 420 x 600 000 = 630 000
    assert aci.wall_shear(FC, 500.0, LW, TW, 2.0, 0.0025).vs == pytest.approx(630_000.0)


def test_published_worked_example_reuven_tools():
    """reuven.tools Shear Wall Design Calculator, Worked Example: Acv = 750 000 mm^2,
    Vc = 0.17 x 5.2915 x 750 000 = 674 667 N, Vs = 787 500 N, cap 2 619 294 N,
    Vn = 1 462 167 N, phi Vn = 1 096 625 N, utilisation 900 000 / 1 096 625 = 0.82.
    (The example takes alpha_c = 0.17, i.e. hw/lw >= 2.)"""
    r = aci.wall_shear(28.0, 420.0, 3000.0, 250.0, 2.0, 0.0025)
    assert r.area == pytest.approx(750_000.0)
    assert r.vc == pytest.approx(674_667.0, abs=1.0)
    assert r.vs == pytest.approx(787_500.0)
    assert r.vn_max == pytest.approx(2_619_294.0, abs=1.0)
    assert r.vn == pytest.approx(1_462_167.0, abs=1.0)
    assert r.phi_vn == pytest.approx(1_096_625.0, abs=1.0)
    assert 900_000.0 / r.phi_vn == pytest.approx(0.82, abs=0.005)


def test_alpha_c_in_net_tension():
    """alpha_c = 0.17 (1 + Nu / (3.5 Ag)) >= 0 (from memory, verify): Nu = -1 000 000 N,
    Ag 600 000: 0.17 x (1 - 0.476190) = 0.089048; Nu = -3 000 000 N: negative -> 0 (hand)."""
    assert aci.alpha_c_tension(-1e6, 600_000.0) == pytest.approx(0.089048, abs=1e-6)
    assert aci.alpha_c_tension(-3e6, 600_000.0) == 0.0
    assert aci.alpha_c_tension(0.0, 600_000.0) == pytest.approx(0.17)


def test_segment_aspect_ratio_is_the_greater_of_segment_and_wall():
    # 18.10.4.2: pier 3000/1000 = 3, wall 30 000/6000 = 5 -> 5 (wall governs); pier 6 vs wall 5 -> 6
    ratio, whole = aci.segment_aspect_ratio([3000.0, 6000.0], [1000.0, 1000.0], 30_000.0, 6000.0)
    assert ratio.tolist() == [5.0, 6.0]
    assert whole.tolist() == [True, False]
    # through the interface: a pier not beside an opening keeps its own ratio
    own, gov = aci.STANDARD.wall_aspect_ratio(3000.0, 1000.0, 30_000.0, 6000.0, False)
    assert own == 3.0 and not gov


def test_rho_t_required_and_the_cap():
    """Vu = 1 200 000 N, phi 0.75 -> Vu/phi = 1 600 000; hw/lw 2: Vc = 645 104.6;
    rho_t = (1 600 000 - 645 104.6) / (420 x 600 000) = 0.0037893 (hand). Vu = 2 000 000:
    Vu/phi = 2 666 667 > 0.66 limit 2 504 524 -> capped."""
    rho, capped = aci.wall_rho_t_required([1.2e6, 2.0e6], 0.75, FC, FY, LW, TW, 2.0)
    assert rho[0] == pytest.approx(0.0037893, abs=1e-7)
    assert capped.tolist() == [False, True]
    # the steel found makes phi Vn equal Vu
    assert aci.wall_shear(FC, FY, LW, TW, 2.0, rho[0]).phi_vn == pytest.approx(1.2e6)


# ---------------------------------------------------------------- 11.5.3 simplified method


def test_simplified_axial_strength_by_hand():
    """Pn = 0.55 f'c Ag (1 - (k lc / 32 h)^2): f'c 32, h 200, length 1000 (Ag 200 000),
    k 0.8, lc 3000: k lc / 32 h = 2400 / 6400 = 0.375, squared 0.140625;
    Pn = 0.55 x 32 x 200 000 x 0.859375 = 3 025 000 N; phi 0.65 -> 1 966 250 N (hand)."""
    assert aci.simplified_axial_strength(32.0, 200_000.0, 2400.0, 200.0) == pytest.approx(3_025_000.0)
    assert aci.STANDARD.simplified_capacity(32.0, 200.0, 1000.0, 2400.0, 10.0) == pytest.approx(1_966_250.0)
    # never negative: k lc = 40 h -> (1.25)^2 > 1
    assert aci.simplified_axial_strength(32.0, 200_000.0, 8000.0, 200.0) == 0.0


def test_effective_length_factor_table_11_5_3_2():
    # braced + restrained 0.8; braced + unrestrained 1.0; unbraced 2.0 (Table 11.5.3.2)
    assert aci.effective_length_factor(True, True) == 0.8
    assert aci.effective_length_factor(True, False) == 1.0
    assert aci.effective_length_factor(False, True) == 2.0
    assert aci.STANDARD.effective_height_factor(3000.0, 1000.0, 2, True) == 0.8  # side supports ignored


def test_simplified_method_middle_third():
    # 11.5.3.1: resultant within the middle third: e <= h/6 = 33.33 mm for h 200
    assert aci.simplified_applies([33.3, 33.34], 200.0).tolist() == [True, False]
    ex = aci.STANDARD.simplified_exclusions(1e6, 1.0, 200.0, 2400.0, [30.0, 40.0], 2, 1.0)
    assert ex["load outside the middle third"].tolist() == [False, True]


def test_min_thickness_bearing_wall():
    # Table 11.3.1.1 (from memory): max(100, min(3000, 6000)/25 = 120) = 120; short wall 100
    assert aci.min_thickness_bearing(3000.0, 6000.0) == 120.0
    assert aci.min_thickness_bearing(2000.0, 1500.0) == 100.0


# ---------------------------------------------------------------- 11.6 minimum reinforcement


def test_table_11_6_1_minima():
    # bars <= 16 mm with fy >= 420: 0.0012 / 0.0020; larger bars or lower fy: 0.0015 / 0.0025
    rl, rt = aci.rho_min_low_shear([12.0, 16.0, 20.0, 16.0], [500.0, 420.0, 500.0, 400.0])
    assert rl.tolist() == [0.0012, 0.0012, 0.0015, 0.0015]
    assert rt.tolist() == [0.0020, 0.0020, 0.0025, 0.0025]


def test_low_shear_threshold():
    """11.6.1: Vu <= 0.5 phi alpha_c lambda sqrt(f'c) Acv = 0.5 x 0.75 x 0.17 x 6.324555 x 600 000
    = 241 914.2 N at hw/lw 3 (hand)."""
    assert aci.low_shear([241_914.0, 241_915.0], FC, LW, TW, 3.0).tolist() == [True, False]
    rl, rt = aci.wall_min_ratios([200e3, 300e3], FC, FY, LW, TW, 3.0, 0.003, 12.0)
    assert rl.tolist() == [0.0012, 0.0025]  # above the threshold Eq. (11.6.2): max(0.00175, 0.0025)
    assert rt.tolist() == [0.0020, 0.0025]  # 11.6.2(b)


def test_eq_11_6_2_published_pca_example():
    # PCA Simplified Design, Ch. 6 wall example: rho_t = 0.31 / (8 x 7) = 0.0055 (No. 5 @ 7 in,
    # 8 in wall); 0.0025 + 0.5 (2.5 - 2)(0.0055 - 0.0025) = 0.0033 as printed (0.00326 unrounded)
    assert round(float(aci.rho_l_min_high_shear(2.0, 0.31 / (8 * 7))), 4) == 0.0033
    # hand: hw/lw 0.5 -> 0.0025 + 0.5 x 2 x 0.003 = 0.0055 (= rho_t); hw/lw 2.5 -> 0.0025;
    # hw/lw 3 -> 0.00175 -> floor 0.0025
    assert aci.rho_l_min_high_shear([0.5, 2.5, 3.0], 0.0055).tolist() == pytest.approx(
        [0.0055, 0.0025, 0.0025]
    )


def test_published_wight_example_18_2_ratios_and_spacing():
    """Wight 7th ed. Example 18-2: rho_t = 2 x 0.20 / (10 x 16) = 0.0025 >= 0.0025;
    rho_l,min = greater of 0.0025 + 0.5 (2.5 - hw/lw)(0.0025 - 0.0025) and 0.0025 = 0.0025; both
    spacings limited to 18 in (3h = 30 in, lw/5 = 43.2 in, lw/3 = 72 in); the SI edition's
    450 mm stands for 18 in (457 mm)."""
    rho_t = 2 * 0.20 / (10 * 16)
    assert rho_t == pytest.approx(0.0025)
    assert aci.rho_l_min_high_shear(1.2, rho_t) == pytest.approx(0.0025)
    sl, st = aci.wall_max_spacing(10 * IN, 18 * FT, True)
    assert (sl, st) == (450.0, 450.0)
    assert 18 * IN == pytest.approx(450.0, rel=0.02)


def test_spacing_limits_by_hand():
    # 11.7.2.1 / 11.7.3.1: min(3h, 450); with shear steel required also lw/3 and lw/5
    assert aci.wall_max_spacing(120.0, 3000.0) == (360.0, 360.0)  # 3h governs
    sl, st = aci.wall_max_spacing(200.0, 1500.0, True)
    assert (sl, st) == (450.0, 300.0)  # lw/3 = 500 > 450; lw/5 = 300
    sl, st = aci.wall_max_spacing(200.0, 1200.0, True)
    assert (sl, st) == (400.0, 240.0)


def test_layers_and_clear_spacing():
    # 11.7.2.3 (from memory): two layers above 250 mm; 25.2.1: clear spacing max(25, db, 4/3 dagg)
    assert aci.two_layers_required([250.0, 251.0]).tolist() == [False, True]
    assert aci.STANDARD.single_layer_allowed(np.array([200.0, 300.0]), 3000.0).tolist() == [True, False]
    assert aci.min_clear_spacing([20.0, 32.0]).tolist() == [25.0, 32.0]
    assert aci.min_clear_spacing(20.0, aggregate=20.0) == pytest.approx(26.667, abs=0.001)


def test_special_wall_web_minimum_and_curtains():
    """18.10.2.1: 0.0025, rho_t per 11.6 where Vu <= 0.083 sqrt(f'c) Acv = 0.083 x 6.324555 x
    600 000 = 314 962.8 N; 18.10.2.2: two curtains where Vu > 0.17 sqrt(f'c) Acv = 645 104.6 N or
    hw/lw >= 2 (hand)."""
    rho, low = aci.special_web_min_ratio([314_962.0, 314_964.0], FC, LW, TW)
    assert rho.tolist() == [0.0025, 0.0025]
    assert low.tolist() == [True, False]
    two = aci.special_two_curtains([645_104.0, 645_105.0, 1.0], FC, LW, TW, [1.0, 1.0, 2.0])
    assert two.tolist() == [False, True, True]


def test_vn_formula_function_equals_the_wall_shear_record():
    # Eq. (11.5.4.3) on its own: 0.21 x 6.324555 x 600 000 + 0.003 x 420 x 600 000 = 1 552 894.0 (hand)
    assert aci.wall_vn_formula(FC, FY, 0.003, LW * TW, 1.75) == pytest.approx(1_552_894.0, abs=0.5)
    assert aci.wall_shear(FC, FY, LW, TW, 1.75, 0.003).vn == pytest.approx(1_552_894.0, abs=0.5)


def test_special_wall_rho_l_at_least_rho_t_up_to_hw_lw_2():
    # 18.10.4.3 (up.codes 18.10.4 text): hw/lw <= 2.0 -> rho_l >= rho_t; above: no such rule
    assert aci.special_rho_l_min([1.0, 2.0, 2.01], 0.004).tolist() == [0.004, 0.004, 0.0]
