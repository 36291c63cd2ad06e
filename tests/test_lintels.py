"""Lintels designed: each model evaluated by hand through the cited expressions.

Sources (docs/engineering-basis.md, "Lintels"): beam - AS 3600:2018 Cl 8.1 stress block and the
Cl 8.2 simplified shear method (theta 36 deg, kv, Vu.max of Eq 8.2.3.3(1) less 10 %), from memory
and secondary sources; deep - AS 3600:2018 Section 7 (beta_s = 1/(1 + 0.66 cot^2 theta) within
0.3..1.0, Cl 7.2.2; struts and nodes at 0.9 f'c, Cl 7.2.1 / 7.4; phi 0.6 struts and nodes, 0.8
ties, Table 2.2.2): all from memory, verify; diagonal bars - ACI 318-19 Eq (18.10.7.4),
Vn = 2 Avd fy sin(alpha) <= 0.83 sqrt(f'c) Acw (SI) / 10 sqrt(f'c) Acw (psi), the form checked
with the search tool against several public sources quoting the standard.

Common lintel: storey 3.6 m, head 2.4 m -> D = 1200 mm, b = 200 mm, cover 30, 3N20 bars top and
bottom, N10 fitments 2 legs @ 150, f'c 40, fsy 500.
"""

import math

import builders
import numpy as np
import pandas as pd
import pytest

from xlcore import geometry
from xlcore.checks.lintels import check_lintels
from xlcore.codes import as3600
from xlcore.model import Opening, Settings, Storey

STOREY = [Storey(index=0, name="L1", level=0.0, height=3.6, slab=200.0)]
WALL = builders.wall("W1", 0.0, 0.0, 8.0, 0.0)


def lintels(**kw):
    o = dict(
        wall_id="W1",
        storey_from="L1",
        storey_to="L1",
        offset=2.0,
        width=5.0,
        sill=0.0,
        head=2.4,
        lintel_bars=3,
        lintel_dia=20.0,
        stirrup_dia=10.0,
        stirrup_legs=2,
        stirrup_spacing=150.0,
    )
    o.update(kw)
    return geometry.derive(STOREY, [WALL], [Opening(**o)]).lintels


def actions(v=500.0, m=300.0):
    return pd.DataFrame(
        dict(row=[2], storey=["L1"], combination=["C1"], member=["W1-L1"], n=[0.0], v=[v], m=[m])
    )


def test_beam_by_hand():
    # ln/D = 5000/1200 = 4.17 >= 4 (Cl 12.1.1 limit for a member continuous at both ends, from
    # memory) -> beam, Section 8. Hand evaluation:
    # d = 1200 - 30 - 10 - 10 = 1150 mm; As = 3 x 314.16 = 942.48 mm^2; alpha2 0.79, gamma 0.87;
    # dn = 942.48 x 500 / (0.79 x 40 x 200 x 0.87) = 85.70 mm; ku = 0.0745 -> phi 0.85;
    # Muo = 471 239 x (1150 - 0.87 x 85.70 / 2) = 524.4 kNm -> phi Muo = 445.7 kNm.
    # dv = max(0.72 x 1200, 0.9 x 1150) = 1035; Asv = 157.08 >= Asv.min = 0.08 sqrt(40) 200 x 150
    # / 500 = 30.4 -> kv = 0.15; Vuc = 0.15 x 200 x 1035 x 6.3246 = 196.4 kN; Vus = 157.08 x 500 x
    # 1035 / 150 x cot 36 = 745.9 kN; Vu.max = 0.495 x 40 x 200 x 1035 x 0.47553 = 1949.0 kN;
    # phi Vu = 0.75 x 942.3 = 706.7 kN. U = max(300/445.7, 500/706.7) = 0.7075.
    out = check_lintels(lintels(), actions(), Settings()).iloc[0]
    assert out.model == "beam"
    assert out.depth == pytest.approx(1200.0) and out.d == pytest.approx(1150.0)
    assert out.ku == pytest.approx(0.0745, abs=1e-4)
    assert out.phi_mu == pytest.approx(445.7, abs=0.1)
    assert out.dv == pytest.approx(1035.0) and out.kv == pytest.approx(0.15)
    assert out.vuc == pytest.approx(196.4, abs=0.1)
    assert out.vus == pytest.approx(745.9, abs=0.1)
    assert out.vu_max == pytest.approx(1949.0, abs=0.5)
    assert out.phi_vu == pytest.approx(706.7, abs=0.1)
    assert out.util == pytest.approx(max(300 / 445.7, 500 / 706.7), abs=1e-3)
    assert out.status == "pass" and out.clause == "Cl 8.2 shear (simplified)"
    # bars needed for M* = 300 kNm, Cl 8.1 rearranged with phi 0.85: k = 0.79 x 40 x 200 = 6320;
    # X = 6320 (1150 - sqrt(1 322 500 - 2 x 300e6 / (0.85 x 6320))) = 6320 (1150 - 1100.37)
    # = 313 663 N -> As = 627.3 mm^2 (check: dn = 313 663 / 5498.4 = 57.05, 0.85 x 313 663 x
    # (1150 - 0.87 x 57.05 / 2) = 300.0 kNm); fitments: (666 667 - 196 383) x tan 36 / (500 x 1035)
    # = 470 284 x 0.726 54 / 517 500 = 0.6603 mm^2/mm.
    assert out.as_req == pytest.approx(627.3, abs=0.1)
    assert "0.660 mm2/mm" in out.need
    assert "phiVu = 0.75 x min(196.4 + 745.9, 1949.0) = 706.7 kN" in out.working


def test_light_fitments_use_the_size_dependent_kv():
    # N6 single leg @ 600: Asv = 28.3 < Asv.min = 0.08 x 6.3246 x 200 x 600 / 500 = 121.4;
    # d = 1200 - 30 - 6 - 10 = 1154, dv = 0.9 x 1154 = 1038.6
    # -> kv = 200 / (1000 + 1.3 x 1038.6) = 0.0851 (hand evaluation)
    out = check_lintels(
        lintels(stirrup_dia=6.0, stirrup_legs=1, stirrup_spacing=600.0), actions(), Settings()
    ).iloc[0]
    assert out.kv == pytest.approx(200 / (1000 + 1.3 * 1038.6), rel=1e-6)


# Deep case: opening 1.5 m wide -> ln/D = 1500/1200 = 1.25 < 4: strut-and-tie (Section 7).
# Hand evaluation: a = 30 + 10 + 20/2 = 50; z = 1200 - 2 x 50 = 1100; theta = atan(1100/1500)
# = 36.254 deg (sin 0.591 362, cos 0.806 405, cot^2 1.859 50); beta_s = 1/(1 + 0.66 x 1.859 50)
# = 0.448 98; w_s = 2 x 50 / 0.806 405 = 124.007 mm;
# strut: 0.6 x 0.448 98 x 0.9 x 40 x 200 x 124.007 = 240.52 kN; node (C-C-T, beta_n 0.8):
# 0.6 x 0.8 x 0.9 x 40 x 200 x 124.007 = 428.57 kN; tie: 0.8 x 942.48 x 500 = 376.99 kN.
# V* = 100 kN: C* = 100/0.591 362 = 169.10 kN -> U strut 0.7031, node 0.3946;
# T* = 100 x 1500/1100 = 136.36 kN -> U tie 0.3617; U = 0.7031 (strut);
# phi Vu = min(240.52 x 0.591 362, 428.57 x 0.591 362, 376.99 x 1100/1500) = 142.24 kN;
# tie area needed T*/(0.8 x 500) = 340.9 mm^2.
DEEP = dict(width=1.5)


def test_deep_lintel_strut_and_tie_by_hand():
    out = check_lintels(lintels(**DEEP), actions(v=100.0, m=75.0), Settings()).iloc[0]
    assert out.model == "strut-and-tie"
    assert out.theta == pytest.approx(math.degrees(math.atan(1100 / 1500)), abs=1e-9)
    assert out.beta_s == pytest.approx(0.44898, abs=1e-5)
    assert out.w_s == pytest.approx(124.007, abs=1e-3)
    assert out.strut_cap == pytest.approx(240.52, abs=0.01)
    assert out.node_cap == pytest.approx(428.57, abs=0.01)
    assert out.tie_cap == pytest.approx(376.99, abs=0.01)
    assert out.c_star == pytest.approx(169.10, abs=0.01)
    assert out.t_star == pytest.approx(136.36, abs=0.01)
    assert (out.u_strut, out.u_node, out.u_tie) == pytest.approx((0.7031, 0.3946, 0.3617), abs=1e-4)
    assert out.util == pytest.approx(0.7031, abs=1e-4) and out.status == "pass"
    assert out.clause == "Section 7 strut (Cl 7.2)"
    assert out.phi_vu == pytest.approx(142.24, abs=0.01)
    assert out.as_req == pytest.approx(340.9, abs=0.1)
    assert np.isnan(out.asd_req)  # the strut holds: no diagonal bars needed
    assert "theta = atan(1100/1500) = 36.3 deg" in out.working


def test_deep_lintel_over_its_strut_asks_for_diagonal_bars():
    # V* = 200 kN: C* = 338.2 kN > 240.5 -> FAIL (U 1.406). Diagonal bars for it, N20 assumed:
    # a_g = 30 + 10 + 1.5 x 20 = 70; alpha = atan((1200 - 140)/1500) = 35.25 deg, sin 0.577 109;
    # A_sd = 200e3 / (2 x 0.8 x 500 x 0.577 109) = 433.2 mm^2 per group.
    out = check_lintels(lintels(**DEEP), actions(v=200.0, m=150.0), Settings()).iloc[0]
    assert out.status == "FAIL" and out.util == pytest.approx(1.4062, abs=1e-4)
    assert out.asd_req == pytest.approx(433.2, abs=0.1)
    assert "diagonal bars A_sd >= 433 mm2 per group" in out.need


def test_beta_s_limits_and_setting():
    # Cl 7.2.2 (from memory): a flat strut hits the 0.3 floor, a steep one approaches 1.0.
    flat, steep = math.radians(15.0), math.radians(80.0)
    assert as3600.strut_efficiency(flat) == pytest.approx(0.3)  # 1/(1 + 0.66 x 13.93) = 0.098 -> 0.3
    assert as3600.strut_efficiency(steep) == pytest.approx(1 / (1 + 0.66 / math.tan(steep) ** 2))
    out = check_lintels(lintels(**DEEP), actions(v=100.0), Settings(lintel_beta_s=0.5)).iloc[0]
    assert out.beta_s == 0.5 and out.strut_cap == pytest.approx(240.52 * 0.5 / 0.44898, abs=0.01)
    # the 0.9 f'c of Cl 7.2.1 (from memory) is a setting too: strut and node scale with it
    low = check_lintels(lintels(**DEEP), actions(v=100.0), Settings(strut_stress=0.85)).iloc[0]
    assert low.strut_cap == pytest.approx(240.52 * 0.85 / 0.9, abs=0.01)
    assert low.node_cap == pytest.approx(428.57 * 0.85 / 0.9, abs=0.01)


# Diagonal bars given (4N20 per group) on the deep lintel. Hand evaluation:
# a_g = 30 + 10 + 1.5 x 20 = 70; alpha = atan(1060/1500) = 35.25 deg (sin = 1060/1836.74
# = 0.577 109);
# A_sd = 4 x 314.159 = 1256.64 mm^2; Vu = 2 x 1256.64 x 500 x 0.577 109 = 725.22 kN;
# cap 0.83 sqrt(40) x 200 x 1200 = 1259.85 kN; phi Vu = 0.8 x 725.22 = 580.17 kN;
# V* = 500 kN -> U = 0.8618; A_sd needed = 500e3 / (2 x 0.8 x 500 x 0.577 109) = 1082.9 mm^2.
DIAG = dict(width=1.5, diag_bars=4, diag_dia=20.0)


def test_diagonal_bars_by_hand():
    out = check_lintels(lintels(**DIAG), actions(v=500.0, m=375.0), Settings()).iloc[0]
    assert out.model == "diagonal bars"
    assert out.alpha == pytest.approx(math.degrees(math.atan(1060 / 1500)), abs=1e-9)
    assert out.A_sd == pytest.approx(1256.64, abs=0.01)
    assert out.vu_diag == pytest.approx(725.22, abs=0.01)
    assert out.v_cap == pytest.approx(1259.85, abs=0.01)
    assert out.phi_vu == pytest.approx(580.17, abs=0.01)
    assert out.util == pytest.approx(0.8618, abs=1e-4) and out.status == "pass"
    assert out.asd_req == pytest.approx(1082.9, abs=0.1)
    # the concrete cap governs when its coefficient is low: 0.3 sqrt(40) x 200 x 1200 = 455.37 kN
    capped = check_lintels(lintels(**DIAG), actions(v=500.0), Settings(coupling_cap=0.3)).iloc[0]
    assert capped.phi_vu == pytest.approx(0.8 * 455.37, abs=0.01) and capped.status == "FAIL"
    assert "concrete limit" in capped.need


def test_diagonal_mechanics_against_aci_318_19_eq_18_10_7_4():
    # ACI 318-19 Eq (18.10.7.4), Vn = 2 Avd fy sin(alpha) <= 10 sqrt(f'c) Acw in psi units, the
    # published form (verified with the search tool against public copies quoting the clause).
    # No complete published worked example of a diagonally reinforced coupling beam could be
    # retrieved with the search tool; the mechanics are tested against the ACI expression
    # evaluated by hand in its own US customary units, then converted (1 kip = 4.448 222 kN,
    # 1 in = 25.4 mm, 1 ksi = 6.894 757 MPa):
    # b = 16 in, h = 72 in, f'c = 4000 psi, fy = 60 ksi, 4 #9 bars per group (Avd = 4.00 in^2),
    # alpha = 36 deg: Vn = 2 x 4.00 x 60 x sin 36 = 282.13 kips; 10 sqrt(4000) x 16 x 72 / 1000
    # = 728.57 kips (so the bars govern). The threshold for mandatory diagonals, 4 sqrt(f'c) Acw
    # = 291.4 kips, is the figure an engineer's public ACI 318-14 design sheet prints for this beam
    # (Scribd document 644232321, "CouplingBeam.xlsx": a sheet, not a book; its other figures
    # depend on an angle it does not show, so only this one is used).
    kip, inch, ksi = 4.448222e3, 25.4, 6.894757
    alpha = math.radians(36.0)
    vn = as3600.diagonal_shear(4.00 * inch**2, 60 * ksi, alpha)
    assert vn / kip == pytest.approx(282.13, abs=0.01)
    fc = 4.0 * ksi  # MPa
    cap = as3600.diagonal_cap(fc, 16 * inch, 72 * inch)  # 0.83 sqrt(f'c) Acw, SI
    # 0.83 in SI is the psi coefficient 10 converted: 10 sqrt(145.038 f'c) psi x 0.006 894 757
    # MPa/psi = 0.8303 sqrt(f'c) MPa, so the SI cap sits within 0.04 % of the psi one
    assert cap / kip == pytest.approx(728.57, rel=0.001)
    assert 4 / 10 * cap / kip == pytest.approx(291.4, rel=0.001)
    # the angle from the geometry, ACI R18.10.7 figure: tan alpha = (h - 2 y) / ln
    assert as3600.diagonal_angle(800.0, 52.5, 1200.0) == pytest.approx(math.atan(695 / 1200))


def test_lintel_without_bars_is_designed_and_fails_with_the_bars_it_needs():
    # deep lintel, no bars: ties carry nothing -> FAIL; tie area needed as above (N16 assumed):
    # a = 30 + 10 + 8 = 48, z = 1104, T* = 100 x 1500/1104 = 135.87 kN -> 339.7 mm^2
    bare = lintels(**DEEP, lintel_bars=None, lintel_dia=None)
    out = check_lintels(bare, actions(v=100.0), Settings()).iloc[0]
    assert out.status == "FAIL" and out.model == "strut-and-tie"
    assert out.as_req == pytest.approx(100e3 * 1500 / 1104 / 400, abs=0.1)
    assert "not given" in out.need


def test_threshold_is_a_setting():
    # ln/D = 1.25: a beam once the limit is lowered below it
    out = check_lintels(lintels(**DEEP), actions(v=100.0, m=75.0), Settings(lintel_deep_ratio=1.2)).iloc[0]
    assert out.model == "beam"


def test_missing_actions_are_named():
    no_acts = check_lintels(lintels(), actions().iloc[0:0], Settings()).iloc[0]
    assert no_acts.status == "not checked" and "no lintel actions" in no_acts.working


def test_lintel_ids_are_accepted_as_members(demo_book):
    from conftest import column_letter, edit

    from xlcore import layout, pipeline
    from xlcore.diagnostics import InputInvalid

    b, _ = pipeline.load(demo_book)
    lintel_ids = set(geometry.derive(b.storeys, b.walls, b.openings).lintels.lintel_id)
    assert lintel_ids and lintel_ids <= set(b.member_actions.member)  # the demo gives every lintel actions
    a = layout.MEMBER_ACTIONS
    edit(demo_book, {(a.name, f"{column_letter(a, 'member')}2"): "NOWALL-L1"})
    with pytest.raises(InputInvalid, match="1 input error"):
        pipeline.load(demo_book)


def test_lintel_as_shallow_as_its_bars_fails_in_words():
    # no slab and a door to the ceiling: D = 3.0 - 2.95 = 50 mm < 2 x (30 + 10 + 10) = 100 mm:
    # ln/D = 30 (beam) but d = 0: nothing carries V* (a degenerate input the sheet allows)
    storey = [Storey(index=0, name="L1", level=0.0, height=3.0, slab=0.0)]
    opening = Opening(
        wall_id="W1", storey_from="L1", storey_to="L1", offset=2.0, width=1.5, sill=0.0, head=2.95,
        lintel_bars=3, lintel_dia=20.0, stirrup_dia=10.0, stirrup_legs=2, stirrup_spacing=150.0,
    )
    lin = geometry.derive(storey, [WALL], [opening]).lintels
    out = check_lintels(lin, actions(v=10.0, m=5.0), Settings()).iloc[0]
    assert out.status == "FAIL" and np.isinf(out.util) and "too shallow" in out.need


def test_demo_designs_every_lintel_and_the_summary_says_so(demo_master):
    # issue 14 §2: no demo lintel reads "not checked"; the summary's worst-lintel line names the
    # model and the lintel line counts the cases by model (generic: no wall IDs, no counts fixed)
    from xlcore import pipeline, results

    out = pipeline.compute(*pipeline.load(demo_master))
    lintels = next(s.table for s in out.sheets if s.name == results.LINTELS_SHEET)
    summary = dict(next(s.preamble for s in out.sheets if s.name == results.SUMMARY_SHEET))
    assert len(lintels) and set(lintels.status) <= {results.PASS, results.FAIL}
    assert {"diagonal bars", "strut-and-tie"} <= set(lintels.model)
    worst = lintels.loc[lintels.util.idxmax()]
    assert f"{worst.util:.3f}" in summary["Worst lintel"] and f"({worst.model})" in summary["Worst lintel"]
    cases = lintels.drop_duplicates(["storey", "lintel_id"])
    assert summary["Lintels"].startswith(f"{len(cases)} storey x lintel cases")
    for model, n in cases.model.value_counts().items():
        assert f"{n} {model}" in summary["Lintels"]


def test_no_demand_on_a_lintel_without_bars_is_not_a_failure():
    # V* = M* = 0: nothing to carry, so no bars are needed (0/0 is read as 0, not infinity)
    bare = lintels(**DEEP, lintel_bars=None, lintel_dia=None)
    out = check_lintels(bare, actions(v=0.0, m=0.0), Settings()).iloc[0]
    assert out.util == 0.0 and out.status == "pass" and out.as_req == 0.0


def test_diagonal_mechanics_against_a_published_si_worksheet():
    # Published worked example (SI): Mathcad worksheet "ACI318 coupling beam of earthquake
    # resistance structure for rectangular hoop reinforcement", Scribd document 450228572, page 1
    # (ACI 318-08 numbering 21.9.7, same SI coefficients; numbers read with the search tool):
    # ln 1800, h 1900, bw 800 mm, Avd = 12 x pi 32^2/4, fy 460 MPa, f'c 60 MPa ->
    # "Vn1 := 2 Avd fy = 8878.895 kN" (the worksheet leaves out sin alpha, i.e. alpha = 90 deg)
    # and "Vn2 := 0.83 sqrt(fc) h bw = 9772.312 kN" (the concrete cap).
    avd = 12 * math.pi * 32.0**2 / 4
    assert as3600.diagonal_shear(avd, 460.0, math.pi / 2) / 1e3 == pytest.approx(8878.895, abs=1e-3)
    assert as3600.diagonal_cap(60.0, 800.0, 1900.0) / 1e3 == pytest.approx(9772.312, abs=1e-3)
