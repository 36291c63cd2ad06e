"""ACI 318-19 (SI) axial force and bending: the stress block (22.2.2), phi by net tensile strain
(Table 21.2.2, 2019 limits), Po and Pn,max (22.4.2), and the block used by xlcore.mechanics.nm.

References, named beside each check:
- Published worked example, a P-M point with P = 0 and the bars below yield (strain
  compatibility with the ACI block): "Example 6" (Engr Lua, USD, Scribd document 479447274,
  page 1): f'c 21, fy 420, As 2454.37 mm^2, b 250, d 400 -> c = 245.17 mm, fs = 378.91 MPa,
  Mn = 274.799 kNm (the example's Mn uses the 0.59 omega approximation; exact strain
  compatibility gives 275.09, 0.1 % apart). Its phi 0.90 predates Table 21.2.2 and is not used.
- Published worked example, beam flexure: "Reinforced Concrete Design Book NSCP 2015" excerpt
  (NSCP 2015 follows ACI 318-14): As 1473, fy 414, f'c 28, b 300, d 450 -> a = 85.3 mm,
  Mn ~ 248 kNm, phi Mn = 223 kNm.
- The concreteproperties library (PyPI): a general-purpose section analysis, here with its
  generic rectangular stress block set to 0.85 f'c and beta1 (it has no ACI design-code class:
  checked by import, its design_codes hold AS 3600 and NZS 3101 only).
- Everything else: hand evaluation (calculator) of the expressions, written out.
Hand section: b 300, h 600, f'c 35 (beta1 0.80), fy 420, 3 N25 (1472.62 mm^2) at 60 and at
540 mm from the compressive face, Es 200 000, eps_cu 0.003.
"""

import math

import numpy as np
import pytest

from xlcore.codes import aci318 as aci
from xlcore.codes.base import SectionState
from xlcore.mechanics import nm

B, H, FC, FY = 300.0, 600.0, 35.0, 420.0
A3 = 3 * math.pi * 25.0**2 / 4  # 1472.6216 mm^2


def hand_section(fc=FC):
    alpha, beta = aci.stress_block(np.array([fc]))
    return nm.Rect(
        D=np.array([H]),
        b=np.array([B]),
        fc=np.array([fc]),
        fsy=np.array([FY]),
        d=np.array([[60.0, 540.0]]),
        A=np.array([[A3, A3]]),
        alpha2=alpha,
        gamma=beta,
        eps_cu=aci.EPS_CU,
        Es=aci.ES,
    )


# ---------------------------------------------------------------- beta1, Table 22.2.2.4.3


@pytest.mark.parametrize(
    "fc, expected",
    [
        (17.0, 0.85),
        (28.0, 0.85),  # upper end of the 0.85 range
        (35.0, 0.80),  # 0.85 - 0.05 x 7/7
        (42.0, 0.75),
        (54.0, 0.85 - 0.05 * 26 / 7),  # 0.66429, still on the line
        (55.0, 0.65),  # f'c >= 55: 0.65 (the table steps from 0.657 to 0.65 here)
        (56.0, 0.65),
        (60.0, 0.65),
    ],
)
def test_beta1(fc, expected):
    assert aci.beta1(fc) == pytest.approx(expected, abs=1e-9)


def test_stress_block_is_0_85_fc_over_beta1_c():
    alpha, beta = aci.stress_block([28.0, 60.0])
    assert alpha.tolist() == [0.85, 0.85]
    assert beta.tolist() == pytest.approx([0.85, 0.65])


# ---------------------------------------------------------------- phi, Table 21.2.2


@pytest.mark.parametrize(
    "eps_t, fy, spiral, expected",
    [
        (0.0010, 420.0, False, 0.65),  # compression-controlled
        (0.0021, 420.0, False, 0.65),  # at eps_ty = 420 / 200 000
        (0.0036, 420.0, False, 0.775),  # halfway: 0.65 + 0.25 x 0.5
        (0.0051, 420.0, False, 0.90),  # at eps_ty + 0.003
        (0.0100, 420.0, False, 0.90),
        (0.0021, 420.0, True, 0.75),  # spirals
        (0.0036, 420.0, True, 0.825),  # 0.75 + 0.15 x 0.5
        # Grade 550: eps_ty 0.00275; at 0.005 (the 2014 limit) still transition:
        # 0.65 + 0.25 x 0.00225 / 0.003 = 0.8375
        (0.0050, 550.0, False, 0.8375),
        (0.00575, 550.0, False, 0.90),
    ],
)
def test_phi_by_net_tensile_strain(eps_t, fy, spiral, expected):
    assert aci.phi_axial_flexure(eps_t, fy, spiral=spiral) == pytest.approx(expected)


def test_net_tensile_strain():
    # 0.003 (540 - 200) / 200 = 0.0051 (hand)
    assert aci.net_tensile_strain(200.0, 540.0) == pytest.approx(0.0051)


# ---------------------------------------------------------------- Po, Pn,max, Pnt


def test_po_and_pn_max_by_hand():
    """Po = 0.85 x 35 x (180 000 - 2945.24) + 420 x 2945.24 = 5 266 380.3 + 1 237 001.1
    = 6 504 381.1 N; Pn,max = 0.80 Po = 5 203 504.9 N; phi 0.65 -> 3 382 278.2 N (hand)."""
    ast = 2 * A3
    po = aci.nominal_axial_strength(FC, B * H, ast, FY)
    assert po == pytest.approx(6_504_381.1, abs=0.5)
    assert aci.max_axial_strength(po) == pytest.approx(5_203_504.9, abs=0.5)
    assert aci.max_axial_strength(po, spiral=True) == pytest.approx(0.85 * 6_504_381.1, abs=0.5)
    std = aci.STANDARD
    assert std.squash_load(FC, B * H - ast, ast, FY) == pytest.approx(6_504_381.1, abs=0.5)
    assert std.max_compression(FC, B * H - ast, ast, FY) == pytest.approx(3_382_278.2, abs=0.5)
    assert std.tension_capacity(ast, FY) == pytest.approx(-420.0 * ast)
    # fy above 550 counts as 550 (20.2.2.4): Pnt = 550 x 1000
    assert aci.max_tensile_strength(1000.0, 600.0) == 550_000.0


# ---------------------------------------------------------------- the block in xlcore.mechanics.nm


def test_balanced_point_by_hand_through_nm():
    """Balanced: c = 0.003 / (0.003 + 0.0021) x 540 = 317.647 mm, a = 0.80 c = 254.118 mm;
    Cc = 0.85 x 35 x 254.118 x 300 = 2 268 000 N; top bars eps = 0.003 x 257.647 / 317.647
    = 0.002433 > 0.0021 -> 420, less the displaced concrete: Cs = 1472.62 x (420 - 29.75)
    = 574 690.6 N; T = 1472.62 x 420 = 618 501.1 N; Pb = 2 224 189.5 N;
    Mb = 2 268 000 x (300 - 127.059) + 574 690.6 x 240 + 618 501.1 x 240 = 678 596 576 N mm
    (hand evaluation). phi there: eps_t = eps_ty -> 0.65."""
    sec = hand_section()
    c = 0.003 / (0.003 + 0.0021) * 540.0
    n, m = nm.forces(sec, np.array([c]))
    assert n[0] == pytest.approx(2_224_189.5, abs=1.0)
    assert m[0] == pytest.approx(678_596_576.0, rel=1e-7)
    state = SectionState(
        nu=n,
        dn=np.array([c]),
        d0=sec.d0,
        fy=np.array([FY]),
        nub=n,
        nuot=-np.array([2 * A3 * FY]),
        kuo=np.zeros(1),
    )
    assert aci.STANDARD.phi_axial_bending(state) == pytest.approx(0.65)


def test_tension_controlled_point_by_hand_through_nm():
    """eps_t = eps_ty + 0.003 = 0.0051: c = 0.003 / 0.0081 x 540 = 200 mm, a = 160 mm;
    Cc = 0.85 x 35 x 160 x 300 = 1 428 000 N; top bars eps = 0.003 x 140/200 = 0.0021 -> 420:
    Cs = 574 690.6 N; Pn = 1 428 000 + 574 690.6 - 618 501.1 = 1 384 189.5 N;
    Mn = 1 428 000 x 220 + 574 690.6 x 240 + 618 501.1 x 240 = 600 525 988 N mm; phi 0.90."""
    sec = hand_section()
    n, m = nm.forces(sec, np.array([200.0]))
    assert n[0] == pytest.approx(1_384_189.5, abs=1.0)
    assert m[0] == pytest.approx(600_525_988.0, rel=1e-7)
    dn = nm.solve_dn(sec, 1_384_189.5, 1.0, H)
    assert dn[0] == pytest.approx(200.0, rel=1e-6)
    state = SectionState(
        nu=n, dn=dn, d0=sec.d0, fy=np.array([FY]), nub=n, nuot=-np.array([2 * A3 * FY]), kuo=np.zeros(1)
    )
    assert aci.STANDARD.phi_axial_bending(state) == pytest.approx(0.90)


def test_published_example_6_bars_below_yield():
    """Engr Lua Example 6: b 250, d 400, As 2454.37, f'c 21 (beta1 0.85), fy 420:
    c = 245.17 mm, fs = 378.91 MPa, Mn = 274.799 kNm (published)."""
    alpha, beta = aci.stress_block(np.array([21.0]))
    sec = nm.Rect(
        D=np.array([450.0]),
        b=np.array([250.0]),
        fc=np.array([21.0]),
        fsy=np.array([420.0]),
        d=np.array([[400.0]]),
        A=np.array([[2454.37]]),
        alpha2=alpha,
        gamma=beta,
        eps_cu=aci.EPS_CU,
        Es=aci.ES,
    )
    c = nm.solve_dn(sec, 0.0, 1.0, 450.0)
    assert c[0] == pytest.approx(245.17, abs=0.01)
    assert 600.0 * (400.0 - c[0]) / c[0] == pytest.approx(378.91, abs=0.01)
    _, m = nm.forces(sec, c)
    assert abs(m[0]) / 1e6 == pytest.approx(274.799, rel=0.002)
    # phi under Table 21.2.2: eps_t = 0.003 x (400 - 245.17) / 245.17 = 0.00189 < 0.0021 -> 0.65
    assert aci.phi_axial_flexure(aci.net_tensile_strain(c, 400.0), 420.0) == pytest.approx(0.65)


def test_published_beam_flexure_nscp():
    """NSCP 2015 book excerpt: a = 1473 x 414 / (0.85 x 28 x 300) = 85.3 mm; Mn = 248 kNm;
    phi Mn = 0.90 x 248 = 223 kNm (published, rounded). c = 100.5, eps_t = 0.0104 > 0.00507."""
    mn, c_d, phi = aci.beam_flexure(300.0, 450.0, 1473.0, 28.0, 414.0)
    assert mn / 1e6 == pytest.approx(248.0, abs=0.5)
    assert phi == pytest.approx(0.90)
    assert phi * mn / 1e6 == pytest.approx(223.0, abs=0.6)
    assert c_d * 450.0 * 0.85 == pytest.approx(85.3, abs=0.15)


# ---------------------------------------------------------------- against concreteproperties


def reference_section(fc, depths, area, b=B, h=H):
    pytest.importorskip("concreteproperties")
    from concreteproperties.concrete_section import ConcreteSection
    from concreteproperties.material import Concrete, SteelBar
    from concreteproperties.pre import add_bar
    from concreteproperties.stress_strain_profile import (
        ConcreteLinear,
        RectangularStressBlock,
        SteelElasticPlastic,
    )
    from sectionproperties.pre.library import rectangular_section

    concrete = Concrete(
        name="aci block",
        density=2.4e-6,
        stress_strain_profile=ConcreteLinear(elastic_modulus=30_000.0),
        ultimate_stress_strain_profile=RectangularStressBlock(
            compressive_strength=fc, alpha=0.85, gamma=float(aci.beta1(fc)), ultimate_strain=0.003
        ),
        flexural_tensile_strength=0.0,
        colour="lightgrey",
    )
    steel = SteelBar(
        name="420",
        density=7.85e-6,
        stress_strain_profile=SteelElasticPlastic(
            yield_strength=FY, elastic_modulus=200_000.0, fracture_strain=0.05
        ),
        colour="grey",
    )
    geom = rectangular_section(d=h, b=b, material=concrete)
    for y in depths:
        for x in (60.0, b / 2, b - 60.0):
            geom = add_bar(geometry=geom, area=area, material=steel, x=x, y=h - y, n=16)
    return ConcreteSection(geom)


@pytest.mark.parametrize("fc", [28.0, 35.0, 60.0])
@pytest.mark.parametrize("n_frac", [0.0, 0.2, 0.45])
def test_nominal_moment_matches_concreteproperties(fc, n_frac):
    """Same rectangle and bars, the ACI block (0.85 f'c, beta1, 0.003) in both; nominal Mn at
    N = n_frac x Po within 0.5 % (the library meshes the bars as 16-gon holes)."""
    area = A3 / 3
    ref_sec = reference_section(fc, (60.0, 540.0), area)
    sec = hand_section(fc)
    po = aci.nominal_axial_strength(fc, B * H, 2 * A3, FY)
    n = n_frac * po
    ref = ref_sec.ultimate_bending_capacity(theta=0, n=n)
    dn = nm.solve_dn(sec, n, 1e-6 * H, H)
    _, m = nm.forces(sec, dn)
    assert abs(m[0]) == pytest.approx(abs(ref.m_xy), rel=0.005)
    # the neutral axis within 0.5 %, and 1.5 % in pure bending, where the block's edge cuts
    # through the top bars (60 mm deep, 25 mm across): the library deducts the part of their
    # holes inside the block, xlcore.mechanics.nm the whole bar where its centre is inside, none otherwise
    assert dn[0] == pytest.approx(ref.d_n, rel=0.015 if n_frac == 0.0 else 0.005)


def test_block_in_nm_core_gives_the_hand_balanced_point():
    """xlcore.mechanics.nm_core takes the block as `block(fc) -> (intensity, depth ratio)`: with
    aci318.stress_block, the hand section as one wall (600 long, 300 thick, 3 bars at 60 and
    540 along it) bent in its plane at N = Pb = 2 224 189.5 N has c = 317.647 mm and
    M = 678 596 576 N mm (hand evaluation above) within the fibres' discretisation (0.1 %)."""
    from xlcore.mechanics import nm_core

    bars = [(d, o, A3 / 3) for d in (60.0, 540.0) for o in (-90.0, 0.0, 90.0)]
    asm = nm_core.build(
        [[(0.0, 0.0, 600.0, 0.0, 300.0, FC, FY, bars)]], fibre=10.0, across=8, block=aci.stress_block
    )
    theta = [np.pi / 2]  # neutral axis across the wall: in-plane bending
    depth = nm_core.full_depth(asm, [0], theta)
    dn = nm_core.solve_dn(asm, [0], theta, 2_224_189.5, [1e-3], 3 * depth)
    n, mx, my = nm_core.forces(asm, [0], theta, dn)
    assert dn[0] == pytest.approx(317.647, rel=1e-4)
    assert np.hypot(mx[0], my[0]) == pytest.approx(678_596_576.0, rel=0.001)


def test_design_points_phi_and_the_0_80_po_cut():
    """Hand section, design points (21.2.2, 22.4.2.1):
    - balanced (c 317.647): phi 0.65, phi Pn = 0.65 x 2 224 189.5 = 1 445 723.2 N;
    - tension-controlled (c 200): phi 0.90, phi Pn = 1 245 770.6, phi Mn = 540 473 389 N mm;
    - c = 800 > h: block over the whole depth, Cc = 0.85 x 35 x 600 x 300 = 5 355 000; top bars
      0.003 x 740/800 = 0.002775 -> 420 - 29.75 -> 574 690.6; bottom bars 0.003 x 260/800
      = 0.000975 -> 195 - 29.75 -> 243 350.7; Pn = 6 173 041.3, phi Pn = 4 012 476.8 > phi 0.80 Po
      = 3 382 278.2 -> cut to it (hand evaluation)."""
    sec = hand_section()
    po = aci.nominal_axial_strength(FC, B * H, 2 * A3, FY)
    c = np.array([0.003 / 0.0051 * 540.0, 200.0, 800.0])
    pn, mn = nm.forces(sec.take(np.zeros(3, dtype=int)), c)
    assert pn[2] == pytest.approx(6_173_041.3, abs=1.0)
    phi, phi_pn, phi_mn = aci.design_axial_flexure(pn, mn, c, 540.0, FY, po)
    assert phi.tolist() == pytest.approx([0.65, 0.90, 0.65])
    assert phi_pn.tolist() == pytest.approx([1_445_723.2, 1_245_770.6, 3_382_278.2], abs=1.0)
    assert phi_mn[1] == pytest.approx(540_473_389.0, rel=1e-7)
