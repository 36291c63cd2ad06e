"""Lintels as beams: hand calculation of the cited AS 3600:2018 Section 8 expressions (Cl 8.1
stress block; Cl 8.2 simplified shear, theta 36 deg, kv, Vu.max of Eq 8.2.3.3(1) less 10 %; the
shear expressions are from memory and secondary sources, as the module says: verify).

Lintel: opening 4.0 m wide, head 2.4 m, storey 3.6 m -> D = 1200 mm, b = 200 mm, cover 30,
3N20 bottom, N10 fitments 2 legs @ 150, f'c 40, fsy 500:
d = 1200 - 30 - 10 - 10 = 1150 mm; As = 942.48 mm^2; alpha2 0.79, gamma 0.87;
dn = 942.48 x 500 / (0.79 x 40 x 200 x 0.87) = 85.70 mm; ku = 0.0745 -> phi 0.85;
Muo = 471 239 x (1150 - 0.87 x 85.70 / 2) = 524.4 kNm -> phi Muo = 445.7 kNm.
dv = max(0.72 x 1200, 0.9 x 1150) = 1035; Asv = 157.08 >= Asv.min = 0.08 sqrt(40) 200 x 150 / 500
= 30.4 -> kv = 0.15; Vuc = 0.15 x 200 x 1035 x 6.3246 = 196.4 kN; Vus = 157.08 x 500 x 1035 /
150 x cot 36 = 745.9 kN; Vu.max = 0.495 x 40 x 200 x 1035 x 0.47553 = 1949.0 kN;
phi Vu = 0.75 x 942.3 = 706.7 kN.
"""

import builders
import pandas as pd
import pytest

from xlcore import geometry
from xlcore.checks.lintels import check_lintels
from xlcore.model import Opening, Settings, Storey

STOREY = [Storey(index=0, name="L1", level=0.0, height=3.6, slab=200.0)]
WALL = builders.wall("W1", 0.0, 0.0, 8.0, 0.0)


def lintels(**kw):
    o = dict(
        wall_id="W1",
        storey_from="L1",
        storey_to="L1",
        offset=2.0,
        width=4.0,
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


def test_flexure_and_shear_by_hand():
    out = check_lintels(lintels(), actions(), Settings()).iloc[0]
    assert out.depth == pytest.approx(1200.0) and out.d == pytest.approx(1150.0)
    assert out.ku == pytest.approx(0.0745, abs=1e-4)
    assert out.phi_mu == pytest.approx(445.7, abs=0.1)
    assert out.dv == pytest.approx(1035.0) and out.kv == pytest.approx(0.15)
    assert out.vuc == pytest.approx(196.4, abs=0.1)
    assert out.vus == pytest.approx(745.9, abs=0.1)
    assert out.vu_max == pytest.approx(1949.0, abs=0.5)
    assert out.phi_vu == pytest.approx(706.7, abs=0.1)
    assert out.util == pytest.approx(max(300 / 445.7, 500 / 706.7), abs=1e-3)
    assert out.status == "pass"


def test_light_fitments_use_the_size_dependent_kv():
    # N6 single leg @ 600: Asv = 28.3 < Asv.min = 0.08 x 6.3246 x 200 x 600 / 500 = 121.4;
    # d = 1200 - 30 - 6 - 10 = 1154, dv = 0.9 x 1154 = 1038.6
    # -> kv = 200 / (1000 + 1.3 x 1038.6) = 0.0851 (hand evaluation)
    out = check_lintels(
        lintels(stirrup_dia=6.0, stirrup_legs=1, stirrup_spacing=600.0), actions(), Settings()
    ).iloc[0]
    assert out.kv == pytest.approx(200 / (1000 + 1.3 * 1038.6), rel=1e-6)


def test_deep_lintel_is_reported_not_checked():
    out = check_lintels(lintels(width=1.2), actions(), Settings()).iloc[0]  # span/D = 1.0 < 3
    assert out.status == "not checked" and "strut-and-tie" in out.working


def test_missing_actions_or_reinforcement_are_named():
    no_acts = check_lintels(lintels(), actions().iloc[0:0], Settings()).iloc[0]
    assert no_acts.status == "not checked" and "no lintel actions" in no_acts.working
    no_bars = check_lintels(lintels(lintel_bars=None), actions(), Settings()).iloc[0]
    assert "no (or incomplete) lintel reinforcement" in no_bars.working


def test_lintel_ids_are_accepted_as_members(demo_book):
    from conftest import column_letter, edit

    from xlcore import layout, pipeline
    from xlcore.diagnostics import InputInvalid

    b, _ = pipeline.load(demo_book)  # the demo gives lift-door lintel actions
    assert {"LiftS-L1", "LiftS-L2"} <= set(b.member_actions.member)
    a = layout.MEMBER_ACTIONS
    # StairE's riser starts at L1, so there is no StairE-L1 lintel at GF (row 2 is at GF)
    edit(demo_book, {(a.name, f"{column_letter(a, 'member')}2"): "StairE-L1"})
    with pytest.raises(InputInvalid, match="1 input error"):
        pipeline.load(demo_book)
