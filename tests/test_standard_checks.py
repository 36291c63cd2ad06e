"""The checks take the design standard through `codes.base.Standard`: the demo computes end to
end under ACI 318-19 and under AS 3600:2018, and the worst rows are recomputed here by hand from
each standard's equations. Protects: choosing a standard on the Project sheet changes the
engineering (and only the engineering that standard changes); AS 3600 results stay those of
codes/as3600.py called directly.

Sources: ACI 318-19 (SI) 11.5.4.2, 11.5.4.3 Eq. (11.5.4.3), 20.2.2.4, Table 21.2.2, 22.4.2.2
Eq. (22.4.2.2), Table 22.4.2.1; AS 3600:2018 Cl 11.6.2-11.6.4 (Amendment 2 wording as in
docs/engineering-basis.md). Equations evaluated by hand in the comments."""

from __future__ import annotations

import math

import numpy as np
import pytest

from xlcore import pipeline
from xlcore.codes import aci318, as3600, get_standard
from xlcore.results import NOT_APPLICABLE

DEMO = "sample_workbooks/harbourview-lane-demo.xlsx"


def _run(standard: str) -> pipeline.Outcome:
    b, f = pipeline.load(DEMO)
    b = b.model_copy(update={"settings": b.settings.model_copy(update={"standard": standard})})
    return pipeline.compute(b, f, detail="all")


@pytest.fixture(scope="module")
def runs() -> dict[str, pipeline.Outcome]:
    return {s: _run(s) for s in ("AS 3600:2018", "ACI 318-19")}


def _sheet(out, word):
    return next(s for s in out.sheets if word in s.name)


def test_demo_computes_under_aci_318_19_end_to_end(runs):
    out = runs["ACI 318-19"]
    assert dict(out.sheets[0].preamble)["Standard"] == "ACI 318-19"  # the stamp names it
    shear = _sheet(out, "shear")
    assert "ACI 318-19" in shear.title and "Cl 11.6" not in shear.title
    t = shear.table
    assert t.clause.str.startswith("ACI 318-19").all()
    assert (t.phi == 0.75).all()  # Table 21.2.1(b)
    assert t.eq1.isna().all() and t.alpha_c.between(0.17, 0.25).all()
    assert not t.f_vuc.str.contains("Eq1|0.8 x").any() and t.f_vuc.str.contains("11.5.4.3").all()
    axial = _sheet(out, "axial").table
    assert axial.clause.str.startswith("ACI 318-19").all()
    assert axial.phi.between(0.65, 0.90).all()  # Table 21.2.2 bounds
    core = _sheet(out, "core N-M").table
    assert core.clause.str.startswith("ACI 318-19").all()
    stress = _sheet(out, "core stress").table
    assert stress.working.str.contains(r"/ \(0\.90 x").all()  # Table 21.2.2 tension-controlled
    # no AS 3600 symbol in a result column header while ACI numbers are in it
    for sheet in (shear, _sheet(out, "axial"), _sheet(out, "core N-M"), _sheet(out, "core stress")):
        for c in sheet.columns:
            spelled = ("Vuc", "Vus", "Vu.max", "Nuo", "Nuot", "Cl 11", "Cl 14")
            assert not any(s in c.header for s in spelled), c


def test_worst_pier_shear_by_hand_aci(runs):
    t = runs["ACI 318-19"].shear
    w = t.loc[t.util.idxmax()]
    # L5 pier StairE-2, G+0.3Q+Ey: V* 767.2 kN, Lw 3500, tw 200, f'c 40, fy 500, horizontal
    # N10 @ 250 in two layers: rho_t = 2 x 78.54 / (250 x 200) = 0.0031416; hw/lw = 49150 / 3500
    assert (w.storey, w.pier_id, w.combination) == ("L5", "StairE-2", "G+0.3Q+Ey")
    assert w.hw_lw == pytest.approx(49150 / 3500, rel=1e-9)
    # 11.5.4.3: alpha_c = 0.17 for hw/lw >= 2.0; Acv = 3500 x 200 = 700 000 mm^2
    # Vc = 0.17 x sqrt(40) x 700 000 = 752 622 N
    assert w.alpha_c == 0.17
    assert w.vuc * 1e3 == pytest.approx(0.17 * math.sqrt(40) * 700_000, rel=1e-12)
    assert w.vuc == pytest.approx(752.622, abs=1e-3)
    # Vs = rho_t fyt Acv, fyt capped at 420 MPa (20.2.2.4): 0.0031416 x 420 x 700 000 = 923 628 N
    assert w.vus == pytest.approx(2 * math.pi / 4 * 10**2 / (250 * 200) * 420 * 700_000 / 1e3, rel=1e-9)
    assert w.vus == pytest.approx(923.628, abs=1e-3)
    # 11.5.4.2: Vn <= 0.66 sqrt(40) x 700 000 = 2 921 945 N (does not govern)
    assert w.vu_max == pytest.approx(2921.945, abs=1e-3)
    # phi Vn = 0.75 x (752.622 + 923.628) = 1257.188 kN; U = 767.2 / 1257.188 = 0.6103
    assert w.phi_vu == pytest.approx(1257.188, abs=1e-3)
    assert w.util == pytest.approx(767.2 / 1257.188, rel=1e-6)
    assert w.clause == "ACI 318-19 11.5.4.3 Eq. (11.5.4.3)"
    assert "= 752.6 kN (11.5.4.3" in w.f_vuc
    assert "phiVn = 0.75 x min(752.6 + 923.6, 2921.9) = 1257.2 kN" in w.f_vu


def test_worst_pier_shear_by_hand_as3600(runs):
    t = runs["AS 3600:2018"].shear
    w = t.loc[t.util.idxmax()]
    assert (w.storey, w.pier_id, w.combination) == ("L5", "StairE-2", "G+0.3Q+Ey")
    a = 0.8 * 3500 * 200  # Cl 11.6.2: 0.8 Lw tw = 560 000 mm^2
    r = 49150 / 3500  # Hw/Lw = 14.043 (overall wall height, the Project's basis)
    # Eq (1) (0.66 - 0.21 x 14.043) sqrt(40) x 560 000 = -8 107 068 N: negative beyond 3.14
    assert w.eq1 * 1e3 == pytest.approx((0.66 - 0.21 * r) * math.sqrt(40) * a, rel=1e-9)
    # Eq (2) (0.05 + 0.1 / 13.043) sqrt(40) x 560 000 = 204 242 N; floor 0.17 sqrt(40) x 560 000
    assert w.eq2 * 1e3 == pytest.approx((0.05 + 0.1 / (r - 1)) * math.sqrt(40) * a, rel=1e-9)
    assert w.vuc * 1e3 == pytest.approx(0.17 * math.sqrt(40) * a, rel=1e-9)  # = 602 098 N governs
    # Vus = rho_w fsy 0.8 Lw tw (Cl 11.6.4, rho_w = rho_h for Hw/Lw > 1) = 879 646 N;
    # Vu.max = 0.2 f'c 0.8 Lw tw = 4 480 000 N; phi Vu = 0.7 x (602 098 + 879 646) = 1 037 221 N
    assert w.vus == pytest.approx(2 * math.pi / 4 * 100 / 50_000 * 500 * a / 1e3, rel=1e-9)
    assert w.vu_max == pytest.approx(4480.0, rel=1e-12)
    assert w.phi_vu == pytest.approx(0.7 * (602.0977 + 879.6459), abs=1e-3)
    assert w.util == pytest.approx(767.2 / 1037.2205, rel=1e-6)
    # the working text says why the negative Eq (1) does not govern, and never shows "-0.0"
    assert "= -8107.1 kN (negative: Hw/Lw > 3.14)" in w.f_vuc
    assert "Vuc = max(min(-8107.1, 204.2), 602.1) = 602.1 kN" in w.f_vuc
    assert not t.f_vuc.str.contains(r"(?<![\d.])-0\.0(?![\d.]*[1-9])").any()


def test_as3600_shear_through_the_interface_equals_the_module_called_directly(runs):
    t = runs["AS 3600:2018"].shear
    direct = as3600.wall_shear(t.fc, t.fsy, t.Lw, t.tw, t.hw_lw * t.Lw, t.rho_h, t.rho_v, 0.7)
    np.testing.assert_array_equal(t.phi_vu.to_numpy(), direct.phi_vu * 1e-3)
    np.testing.assert_array_equal(t.vuc.to_numpy(), direct.vuc * 1e-3)
    assert t.clause.tolist() == [as3600.GOVERNING_TEXT[g] for g in direct.governs]


def test_as3600_axial_phi_is_table_2_2_2_of_the_module(runs):
    t = _sheet(runs["AS 3600:2018"], "axial").table
    curve = t[t.dn.notna()]
    # at N* on the curve phi(Nu) Nu = N*, so Nu = N*/phi; Table 2.2.2 phi at that Nu
    nu = curve.n / curve.phi * 1e3
    phi = as3600.phi_axial_bending(nu, curve.nub * 1e3, curve.nuot * 1e3, curve.kuo, 0.6)
    np.testing.assert_allclose(curve.phi, phi, rtol=1e-9)
    np.testing.assert_allclose(t.phi_nuo, 0.6 * t.nuo, rtol=1e-12)  # phi0 Nuo, Cl 10.6.2.2
    assert t.clause.str.contains("Table 2.2.2|Cl 10.6.2.2").all()


def test_pier_nm_design_point_by_hand_aci(runs):
    t = _sheet(runs["ACI 318-19"], "axial").table
    r = t[(t.storey == "GF") & (t.pier_id == "LiftS-1") & (t.combination == "1.35G")].iloc[0]
    # pier 950 x 250, f'c 50, fy 500, end zones 6N28 with N10 ties at both ends, cover 30:
    # extreme tension bar at dt = 950 - 30 - 10 - 28/2 = 896 mm from the compressed face
    dt = 950 - 30 - 10 - 28 / 2
    # net tensile strain at the neutral-axis depth c = dn (22.2.1.2 linear strains):
    # eps_t = 0.003 (896 - c) / c; eps_ty = 500 / 200 000 = 0.0025
    c = r.dn
    eps_t = 0.003 * (dt - c) / c
    assert c == pytest.approx(342.32, abs=0.01)
    assert eps_t == pytest.approx(0.0048522, abs=1e-7)  # between eps_ty and eps_ty + 0.003
    # Table 21.2.2 (2019): transition, phi = 0.65 + 0.25 (eps_t - eps_ty) / 0.003 = 0.8460
    phi = 0.65 + 0.25 * (eps_t - 0.0025) / 0.003
    assert r.phi == pytest.approx(phi, rel=1e-9)
    assert r.phi == pytest.approx(0.8460, abs=1e-4)
    assert r.phi_mu == pytest.approx(phi * r.mu, rel=1e-9)
    # the same point through aci318.design_axial_flexure (nominal -> design)
    p, phi_pn, phi_mn = aci318.design_axial_flexure(r.n / r.phi * 1e3, r.mu * 1e6, c, dt, 500.0, r.nuo * 1e3)
    assert float(p) == pytest.approx(r.phi, rel=1e-9)
    assert float(phi_mn) == pytest.approx(r.phi_mu * 1e6, rel=1e-9)
    assert float(phi_pn) == pytest.approx(r.n * 1e3, rel=1e-9)  # phi Pn = N*: the point is at N*
    # Eq. (22.4.2.2): Po = 0.85 f'c (Ag - Ast) + fy Ast with Ast = 8017.3 mm^2 (the table's)
    po = 0.85 * 50 * (950 * 250 - r.as_total) + 500 * r.as_total
    assert r.nuo * 1e3 == pytest.approx(po, rel=1e-12)  # 13 761 685 N
    # Table 22.4.2.1: phi Pn,max = 0.65 x 0.80 Po = 7156.1 kN, the design limit on N*
    assert r.phi_nuo == pytest.approx(0.65 * 0.80 * po / 1e3, rel=1e-12)
    assert r.phi_nuot == pytest.approx(-0.90 * 500 * r.as_total / 1e3, rel=1e-12)  # 22.4.3.1
    # M* = 0: the flat cut governs, U = N* / phi Pn,max = 1192.5 / 7156.1 = 0.1666
    assert r.util == pytest.approx(1192.5 / (0.65 * 0.80 * po / 1e3), rel=1e-9)
    assert r.governs == "axial upper limit"


def test_aci_has_no_least_eccentricity_and_its_own_simplified_method(runs):
    t = _sheet(runs["ACI 318-19"], "axial").table
    np.testing.assert_allclose(t.m_design, t.m.abs(), rtol=1e-12)  # the 0.80 Po cap stands for it
    ok = t[t.status_s != NOT_APPLICABLE].iloc[0]
    # 11.5.3.1: phi Pn = 0.65 x 0.55 f'c Ag (1 - (k lc / 32 h)^2), k = 1.0 (braced, Table 11.5.3.2)
    cap = 0.65 * 0.55 * ok.fc * ok.tw * ok.Lw * (1 - (ok.hwe / (32 * ok.tw)) ** 2) / 1e3
    assert ok.phi_nu_s == pytest.approx(cap, rel=1e-12)
    assert "11.5.3.1" in ok.f_s


def test_checks_take_the_standard_as_an_argument(runs):
    # std= overrides the Project's standard (the comparison sheet relies on it); the numbers
    # equal those of the whole run under that standard
    from xlcore import cores, geometry
    from xlcore.checks.shear import check_pier_shear
    from xlcore.mechanics import stiffness

    b, _ = pipeline.load(DEMO)  # its Project standard: AS 3600:2018
    s = b.settings
    geom = geometry.derive(b.storeys, b.walls, b.openings, b.end_zones)
    piers = stiffness.with_stiffness(geom.piers, s.poisson, s.pier_fixity)
    walls = stiffness.wall_stiffness(piers, s.poisson, s.pier_fixity)
    walls = stiffness.sharing_stiffness(walls, s.poisson, s.wall_sharing)
    acts, _, _ = pipeline.pier_actions(b, piers, walls, cores.plans_by_core(piers, walls))
    out = check_pier_shear(piers, acts, s, std=get_standard("ACI 318-19"))
    assert out.clause.str.startswith("ACI 318-19").all()
    np.testing.assert_array_equal(out.util.to_numpy(), runs["ACI 318-19"].shear.util.to_numpy())


def test_project_sheet_chooses_aci_and_grades_are_checked_against_it(demo_book):
    # the Project sheet's "Design standard" cell reaches every wired check and the stamp
    from conftest import column_letter, edit

    from xlcore import api, layout
    from xlcore.diagnostics import InputInvalid

    row = 2 + [s.key for s in layout.PROJECT.settings].index("standard")
    fsy = f"{column_letter(layout.WALLS, 'fsy')}2"
    edit(demo_book, {(layout.PROJECT.name, f"B{row}"): "ACI 318-19", (layout.WALLS.name, fsy): 600})
    run = api.compute(demo_book)
    assert run.stamp["Standard"] == "ACI 318-19"
    assert run.sheets["shear"].table.clause.str.startswith("ACI 318-19").all()
    # fy 600 MPa is above the 550 MPa of 20.2.2.4 (from memory): a warning at its cell, capped
    assert any(str(f).startswith(f"Walls!{fsy}: ") and "550" in str(f) for f in run.findings.warnings)
    # f'c 18 MPa: within ACI's range (>= 17, Table 19.2.1.1), outside AS 3600's (20 to 100)
    fc = f"{column_letter(layout.WALLS, 'fc')}2"
    edit(demo_book, {(layout.WALLS.name, fc): 18})
    api.check(demo_book)
    edit(demo_book, {(layout.PROJECT.name, f"B{row}"): "AS 3600:2018"})
    with pytest.raises(InputInvalid) as info:
        api.check(demo_book)
    errors = [str(f) for f in info.value.findings.errors]
    assert any(f.startswith(f"Walls!{fc}: ") and "20 to 100" in f for f in errors), errors


def test_aci_lambda_setting_scales_the_concrete_part_only(runs):
    # 11.5.4.3: Vc = alpha_c lambda sqrt(f'c) Acv; lambda 0.85 (sand-lightweight, 19.2.4) on the
    # worst row: Vc = 0.85 x 752.622 = 639.729 kN; Vs unchanged 923.628 kN
    out = runs["ACI 318-19"]
    b = out.building
    s = b.settings.model_copy(update={"aci_lambda": 0.85})
    base = out.shear
    w = base.loc[base.util.idxmax()]
    std = get_standard("ACI 318-19").configure(s)
    assert std.lam == 0.85 and get_standard("ACI 318-19").lam == 1.0  # the registry's is untouched
    r = std.wall_shear(w.fc, w.fsy, w.Lw, w.tw, w.hw_lw, w.rho_h, w.rho_v)
    assert float(r.concrete) == pytest.approx(0.85 * 0.17 * math.sqrt(40) * 700_000, rel=1e-12)
    assert float(r.steel) == pytest.approx(w.vus * 1e3, rel=1e-12)
    assert get_standard("AS 3600:2018").configure(s) is get_standard("AS 3600:2018")  # AS ignores it
