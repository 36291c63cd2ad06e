"""AS 3600:2018 Cl 11.6, in-plane shear of walls, against hand evaluation of the clause.

Reference: AS 3600:2018 Cl 11.6.2 (Vu.max), 11.6.3 Eq (1), Eq (2) and the 0.17 sqrt(f'c)
floor, 11.6.4 (Vus, rho_w), as listed in docs/engineering-basis.md. Every expected
value below was evaluated by hand (calculator) from those expressions, not by xlcore.
Common case: Lw 3000 mm, tw 200 mm, f'c 40 MPa, fsy 500 MPa, so 0.8 Lw tw = 480 000 mm^2 and
sqrt(40) = 6.324555.
"""

import numpy as np
import pytest

from xlcore.codes import as3600 as a

LW, TW, FC, FSY = 3000.0, 200.0, 40.0, 500.0
RHO = 0.00565


def kn(x):
    return np.asarray(x) / 1e3


def test_shear_area_is_point_eight_lw_tw():
    # Cl 11.6.2: d = 0.8 Lw -> 0.8 x 3000 x 200 = 480 000 mm^2 (hand evaluation)
    assert a.wall_shear_area(LW, TW) == pytest.approx(480_000.0)


def test_vu_max():
    # Cl 11.6.2: 0.2 x 40 x 480 000 = 3 840 000 N = 3840 kN (hand evaluation)
    assert kn(a.wall_vu_max(FC, LW, TW)) == pytest.approx(3840.0)


def test_squat_wall_uses_eq1():
    """Hw/Lw = 0.5: Eq (1) = (0.66 - 0.105) x 6.324555 x 480 000 = 1684.9 kN (hand evaluation)."""
    vuc, gov = a.wall_vuc(FC, 0.5, LW, TW)
    assert kn(vuc) == pytest.approx(1684.86, abs=0.05)
    assert gov == a.GOV_EQ1
    assert np.isinf(a.wall_vuc_eq2(FC, 0.5, LW, TW))  # Eq (2) not applicable at Hw/Lw <= 1


def test_slender_wall_takes_lesser_eq2():
    """Hw/Lw = 1.5: Eq (1) = 0.345 x 6.324555 x 480 000 = 1047.3 kN;
    Eq (2) = (0.05 + 0.1/0.5) x 6.324555 x 480 000 = 758.9 kN -> Vuc = 758.9 kN (hand evaluation)."""
    assert kn(a.wall_vuc_eq1(FC, 1.5, LW, TW)) == pytest.approx(1047.35, abs=0.05)
    vuc, gov = a.wall_vuc(FC, 1.5, LW, TW)
    assert kn(vuc) == pytest.approx(758.95, abs=0.05)
    assert gov == a.GOV_EQ2


def test_floor_governs_when_eq2_drops_below_it():
    """Hw/Lw = 2.0: Eq (2) = 0.15 x 6.324555 x 480 000 = 455.4 kN < floor
    0.17 x 6.324555 x 480 000 = 516.1 kN -> Vuc = 516.1 kN (hand evaluation)."""
    assert kn(a.wall_vuc_eq2(FC, 2.0, LW, TW)) == pytest.approx(455.37, abs=0.05)
    vuc, gov = a.wall_vuc(FC, 2.0, LW, TW)
    assert kn(vuc) == pytest.approx(516.08, abs=0.05)
    assert gov == a.GOV_FLOOR


def test_either_side_of_hw_lw_one():
    """At Hw/Lw = 1 Eq (1) applies alone: (0.66 - 0.21) x 6.324555 x 480 000 = 1366.1 kN.
    Just above 1, Eq (2) is huge (1/(Hw/Lw - 1)) so Eq (1) still governs: no jump in Vuc."""
    at, g_at = a.wall_vuc(FC, 1.0, LW, TW)
    above, g_above = a.wall_vuc(FC, 1.001, LW, TW)
    assert kn(at) == pytest.approx(1366.10, abs=0.05)
    assert g_at == a.GOV_EQ1 and g_above == a.GOV_EQ1
    assert kn(above) == pytest.approx(1366.10 - 0.21 * 0.001 * 6.324555 * 480, abs=0.05)


def test_eq1_equals_eq2_crossover():
    """Eq (1) = Eq (2) where 0.61 - 0.21 r = 0.1 / (r - 1), i.e. 0.21 r^2 - 0.82 r + 0.71 = 0:
    r = (0.82 - sqrt(0.076)) / 0.42 = 1.2960 (hand solved); both give
    (0.66 - 0.21 x 1.2960) x 6.324555 x 480 000 = 1177.4 kN."""
    r = (0.82 - np.sqrt(0.82**2 - 4 * 0.21 * 0.71)) / 0.42
    assert r == pytest.approx(1.2960, abs=1e-4)
    e1, e2 = a.wall_vuc_eq1(FC, r, LW, TW), a.wall_vuc_eq2(FC, r, LW, TW)
    assert kn(e1) == pytest.approx(kn(e2), rel=1e-9)
    assert kn(e1) == pytest.approx(1177.4, abs=0.1)
    # just below the crossover Eq (1) governs, just above Eq (2) does
    assert a.wall_vuc(FC, r - 0.01, LW, TW)[1] == a.GOV_EQ1
    assert a.wall_vuc(FC, r + 0.01, LW, TW)[1] == a.GOV_EQ2


def test_rho_w_rule():
    # Cl 11.6.4: Hw/Lw <= 1 -> lesser of rho_h, rho_v; Hw/Lw > 1 -> rho_h only
    out = a.wall_rho_w(np.array([0.8, 1.0, 1.2]), 0.004, np.array([0.003, 0.006, 0.002]))
    assert out.tolist() == pytest.approx([0.003, 0.004, 0.004])


def test_vus():
    # Cl 11.6.4: 0.00565 x 500 x 480 000 = 1 356 000 N = 1356.0 kN (hand evaluation)
    assert kn(a.wall_vus(RHO, FSY, LW, TW)) == pytest.approx(1356.0)


def test_phi_vu_slender_wall():
    """Hw = 4500 (Hw/Lw 1.5): phi Vu = 0.7 x min(758.95 + 1356.0, 3840) = 1480.5 kN (hand evaluation)."""
    r = a.wall_shear(FC, FSY, LW, TW, 4500.0, RHO, RHO)
    assert kn(r.phi_vu) == pytest.approx(0.7 * (758.95 + 1356.0), abs=0.05)
    assert r.governs == a.GOV_EQ2


def test_vu_max_caps_heavy_steel():
    """rho_h = rho_v = 0.02, Hw/Lw 0.5: Vuc + Vus = 1684.9 + 0.02 x 500 x 480 = 6484.9 kN
    > Vu.max 3840 kN -> Vu = 3840 kN, governed by Cl 11.6.2 (hand evaluation)."""
    r = a.wall_shear(FC, FSY, LW, TW, 1500.0, 0.02, 0.02)
    assert kn(r.vu) == pytest.approx(3840.0)
    assert r.governs == a.GOV_VUMAX


def test_rho_required_round_trip():
    """The ratio reported as needed gives phi Vu = V* exactly (Cl 11.6.4 rearranged)."""
    v_star = 1200e3
    r = a.wall_shear(FC, FSY, LW, TW, 4500.0, RHO, RHO)
    need, capped = a.wall_rho_required(v_star, 0.7, r.vuc, r.vu_max, FSY, LW, TW)
    again = a.wall_shear(FC, FSY, LW, TW, 4500.0, need, need)
    assert again.phi_vu == pytest.approx(v_star)
    assert not capped
    # V*/phi = 3000 kN / 0.7 = 4285.7 kN > Vu.max 3840 kN -> capped (hand evaluation)
    _, capped = a.wall_rho_required(3000e3, 0.7, r.vuc, r.vu_max, FSY, LW, TW)
    assert capped


def test_negative_eq1_for_very_slender_piers_is_floored():
    """Hw/Lw = 4: Eq (1) = (0.66 - 0.84) sqrt(f'c) ... < 0; Vuc is the 0.17 floor, 516.1 kN."""
    vuc, gov = a.wall_vuc(FC, 4.0, LW, TW)
    assert a.wall_vuc_eq1(FC, 4.0, LW, TW) < 0
    assert kn(vuc) == pytest.approx(516.08, abs=0.05) and gov == a.GOV_FLOOR


def test_vectorised_rows_match_scalar_calls():
    ratios = np.array([0.5, 1.5, 2.0])
    rows = a.wall_shear(FC, FSY, LW, TW, ratios * LW, RHO, RHO)
    for i, rr in enumerate(ratios):
        one = a.wall_shear(FC, FSY, LW, TW, rr * LW, RHO, RHO)
        assert rows.phi_vu[i] == pytest.approx(float(one.phi_vu))


def test_elastic_modulus_table_3_1_2():
    # AS 3600:2018 Table 3.1.2 values (docs/engineering-basis.md): 25 -> 26 700, 40 -> 32 800,
    # 100 -> 42 200 MPa; 45 MPa interpolates to (32 800 + 34 800) / 2 = 33 800 (hand evaluation)
    assert a.elastic_modulus([25, 40, 45, 100]).tolist() == [26700.0, 32800.0, 33800.0, 42200.0]
