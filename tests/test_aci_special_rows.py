"""ACI 318-19 special-wall rows (checks/special_walls.py) for the rules the published example
(tests/test_aci_published.py: ACI MNL-17(21) Vol. 1 Shear Wall Example 2) brought in: the least
ns of 18.10.3.1.3, the width alternative 18.10.6.2(b)(ii) beside the drift capacity (iii), and
the Ash of Table 18.10.6.4(g) where the end-zone ties are described. Each value is the cited
expression evaluated by hand."""

import math

import numpy as np
import pytest
from test_aci318_special_walls import SW, _acts, _rows, _tower

from xlcore.checks import special_walls
from xlcore.checks.section14 import check_section14
from xlcore.model import Settings


def test_least_storeys_raise_omega_v():
    piers = _tower()  # hwcs = 32 000 mm, lw 3000
    acts = _acts(piers, n=2000.0, m=3000.0, v=500.0, combo="E1")
    out = check_section14(piers, acts, Settings(**SW, aci_storeys_above=2))
    r = _rows(out, "L1", "shear amplification", "E1")
    # 18.10.3.1.3: ns >= 0.007 hwcs (in.) = 0.007 x 32000 / 25.4 = 8.82 > 2 (the setting);
    # omega_v = 1.3 + 8.82/30 = 1.594; Ve = 1.5 x 1.594 x 500 kN
    ns = 0.007 * 32000 / 25.4
    assert r.value == pytest.approx(1.5 * (1.3 + ns / 30) * 500.0)
    assert "0.007 x 32000/25.4 = 8.8" in r.working
    # ten storeys above the base (the default) exceed the least ns: unchanged
    ten = check_section14(piers, acts, Settings(**SW))
    assert _rows(ten, "L1", "shear amplification", "E1").value == pytest.approx(1.5 * (1.3 + 10 / 30) * 500.0)


def _fixed_c(monkeypatch, c):
    monkeypatch.setattr(special_walls, "neutral_axis_depth", lambda q, pu, std: np.full(len(q), c))


def test_width_alternative_passes_where_the_drift_capacity_does_not(monkeypatch):
    piers = _tower()
    acts = _acts(piers, n=2000.0, m=3000.0, v=500.0, combo="E1")
    _fixed_c(monkeypatch, 500.0)
    out = check_section14(piers, acts, Settings(**(SW | dict(aci_delta_u=1500.0))))
    dc = _rows(out, "L1", "drift capacity", "E1")
    # (iii): 1.5 x 1500/32000 = 0.0703 > delta_c/hw = (4 - 15 x 2.5/50 - 1225/(0.66 sqrt(40) 600))
    # /100 = 0.0276: not met; (ii): b = 200 >= sqrt(0.025 x 500 x 3000) = 193.6 mm: met -> pass
    ve = 1.5 * (1.3 + 10 / 30) * 500e3
    cap = (4 - 15 * 2.5 / 50 - ve / (0.66 * math.sqrt(40) * 600_000)) / 100
    assert dc.value == pytest.approx(1.5 * 1500 / 32000) and dc.limit == pytest.approx(cap)
    assert dc.status == "pass"
    assert dc.util == pytest.approx(math.sqrt(0.025 * 500 * 3000) / 200)
    assert "(not met)" in dc.working and "(met)" in dc.working
    # c = 600: sqrt(0.025 x 600 x 3000) = 212.1 > 200 and (iii) not met: FAIL
    _fixed_c(monkeypatch, 600.0)
    bad = _rows(
        check_section14(piers, acts, Settings(**(SW | dict(aci_delta_u=1500.0)))),
        "L1",
        "drift capacity",
        "E1",
    )
    assert bad.status == "FAIL"
    ve_cap = (4 - 15 * 3 / 50 - ve / (0.66 * math.sqrt(40) * 600_000)) / 100
    assert bad.util == pytest.approx(min(1.5 * 1500 / 32000 / ve_cap, math.sqrt(45_000) / 200))


def _zones(piers, tie=12.0, ties=60.0, length=600.0):
    p = piers.copy()
    for side in "ab":
        p[f"z{side}_n"] = 6.0
        p[f"z{side}_dia"] = 20.0
        p[f"z{side}_len"] = length
        p[f"z{side}_tie"] = tie
        p[f"z{side}_ties"] = ties
    return p


def test_ash_row_where_the_ties_are_described(monkeypatch):
    piers = _zones(_tower())
    acts = _acts(piers, n=2000.0, m=3000.0, v=500.0, combo="E1")
    _fixed_c(monkeypatch, 600.0)
    out = check_section14(piers, acts, Settings(**SW))
    r = _rows(out, "L1", "boundary Ash", "E1")
    cover = float(piers.cover.iloc[0])
    fc, fy = float(piers.fc.iloc[0]), float(piers.fsy.iloc[0])
    # Table 18.10.6.4(g): bc = 200 - 2 cover; Ag = 200 x 600; Ach = bc (600 - 2 cover);
    # Ash >= max(0.3 (Ag/Ach - 1), 0.09) f'c/fyt s bc; provided 2 legs of N12 = 226.2 mm2
    bc = 200 - 2 * cover
    ag, ach = 200 * 600, bc * (600 - 2 * cover)
    need = max(0.3 * (ag / ach - 1), 0.09) * fc / min(fy, 550) * 60 * bc
    assert r.limit == pytest.approx(need)
    assert r.value == pytest.approx(2 * math.pi / 4 * 12**2)
    assert r.util == pytest.approx(need / (2 * math.pi / 4 * 12**2))
    # cover 30, f'c 40, fy 500: bc 140, Ag/Ach = 120000/75600 = 1.587 -> 0.176 x 40/500 x 60 x 140
    assert need == pytest.approx(118.4, abs=0.05) and r.status == "pass"  # 118.4 <= 226.2 mm2
    assert r.clause == "ACI Table 18.10.6.4(g)"
    # thin ties at a wide spacing fail: N6 at 150 mm
    thin = _rows(
        check_section14(_zones(_tower(), tie=6.0, ties=150.0), acts, Settings(**SW)),
        "L1",
        "boundary Ash",
        "E1",
    )
    need_thin = max(0.3 * (ag / ach - 1), 0.09) * fc / min(fy, 550) * 150 * bc
    assert thin.limit == pytest.approx(need_thin) and need_thin > 2 * math.pi / 4 * 36
    assert thin.status == "FAIL"


def test_ash_row_is_check_without_end_zones(monkeypatch):
    piers = _tower()
    _fixed_c(monkeypatch, 600.0)
    out = check_section14(piers, _acts(piers, n=2000.0, m=3000.0, v=500.0, combo="E1"), Settings(**SW))
    r = _rows(out, "L1", "boundary Ash", "E1")
    assert r.status == "check" and "not described" in r.working


def test_diagonal_lintel_phi_085_only_in_special_walls():
    # ACI 318M-19 21.2.4 / 21.2.4.4 (public OCR copy of Chapter 21): "For beam-column joints of
    # special moment frames and diagonally reinforced coupling beams, phi for shear shall be 0.85"
    # applies to structures relying on special structural walls (21.2.4(b)); elsewhere phi for
    # shear is 0.75 (Table 21.2.1(b)). Same lintel, ln/h = 1500/1200, 4 N20 per diagonal group.
    from test_aci318_special_walls import ACI, DIAG, _lacts, _lintels

    from xlcore.checks.lintels import check_lintels

    alpha = math.atan(1060 / 1500)  # group centroid at 30 + 10 + 1.5 x 20 = 70 from each face
    vn = min(2 * 4 * math.pi * 100.0 * 500.0 * math.sin(alpha), 0.83 * math.sqrt(40.0) * 200 * 1200)
    special = check_lintels(_lintels(**DIAG), _lacts(v=600.0, m=450.0), Settings(standard=ACI)).iloc[0]
    ordinary = check_lintels(
        _lintels(**DIAG), _lacts(v=600.0, m=450.0), Settings(standard=ACI, aci_special_walls="no")
    ).iloc[0]
    assert special.model == ordinary.model == "diagonal bars"
    assert special.phi_vu == pytest.approx(0.85 * vn * 1e-3)
    assert ordinary.phi_vu == pytest.approx(0.75 * vn * 1e-3)
    assert "Table 21.2.1(b)" in ordinary.working and "(phi 21.2.4.4)" in special.working
