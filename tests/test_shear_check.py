"""The pier shear check end to end on the demo building: sharing, settings, envelope.

Engineering values are hand evaluations of AS 3600:2018 Cl 11.6 and of the stiffness formula
k = 1 / (h^3/(12 E I) + 1.2 h/(G A)) (engineering notes, section 6)."""

import numpy as np
import pytest
from conftest import column_letter as col
from conftest import edit

from xlcore import layout, pipeline, results

A, P = layout.MEMBER_ACTIONS, layout.PROJECT


def setting_cell(key):
    return (P.name, f"B{2 + [s.key for s in P.settings].index(key)}")


def outcome(path):
    b, f = pipeline.load(path)
    return pipeline.compute(b, f)


def test_wall_shear_shared_to_piers_by_stiffness(demo_book):
    # rows 2-4: GF, 1.35G, LW1-1..3 -> one row for the whole wall LW1 with V* = 300 kN
    edit(
        demo_book,
        {(A.name, f"{col(A, 'member')}2"): "LW1", (A.name, f"{col(A, 'v')}2"): 300.0}
        | {(A.name, f"{col(A, k)}{r}"): None for r in (3, 4) for k in A.keys},
    )
    o = outcome(demo_book)
    rows = o.shear[(o.shear.storey == "GF") & (o.shear.combination == "1.35G") & (o.shear.wall_id == "LW1")]
    assert rows.pier_id.tolist() == ["LW1-1", "LW1-2", "LW1-3"]
    assert rows.v.sum() == pytest.approx(300.0)
    assert rows.share.sum() == pytest.approx(1.0)
    # piers 750, 1800, 1050 mm long, 250 thick, 2400 high (door), E 34 800 (f'c 50), G = E / 2.4:
    # k = 1 / (h^3 / (12 E t L^3 / 12) + 1.2 h / (G t L))   (hand evaluation below, N and mm)
    E, G, t, h = 34800.0, 34800.0 / 2.4, 250.0, 2400.0
    k = [1 / (h**3 / (E * t * L**3) + 1.2 * h / (G * t * L)) for L in (750.0, 1800.0, 1050.0)]
    assert rows.share.tolist() == pytest.approx([x / sum(k) for x in k], rel=1e-9)
    assert rows.share.iloc[0] < 750 / 3600  # the short pier takes less than its length ratio
    assert all(s.startswith("wall LW1: V* 300.0 kN x share") for s in rows.source)


def test_opening_height_setting_changes_hw(demo_book):
    edit(demo_book, {setting_cell("shear_height"): "opening height"})
    o = outcome(demo_book)
    lw1 = o.shear[(o.shear.storey == "GF") & (o.shear.pier_id == "LW1-2")]
    assert (lw1.Hw == 2400.0).all()  # door head 2.4 m, sill 0
    whole = o.shear[(o.shear.storey == "GF") & (o.shear.pier_id == "LW2")]
    assert (whole.Hw == 3950.0).all()  # no opening: storey clear height 4.2 - 0.25 m


def test_phi_setting_is_used_and_reported(demo_book):
    edit(demo_book, {setting_cell("phi_shear"): 0.75})
    o = outcome(demo_book)
    assert np.allclose(o.shear.phi, 0.75)
    assert np.allclose(o.shear.phi_vu, 0.75 * np.minimum(o.shear.vuc + o.shear.vus, o.shear.vu_max))


def test_failing_pier_gets_required_steel_and_advice(demo_book):
    edit(demo_book, {(A.name, f"{col(A, 'v')}3"): 900.0})  # GF, 1.35G, LW1-2
    o = outcome(demo_book)
    row = o.shear[
        (o.shear.storey == "GF") & (o.shear.combination == "1.35G") & (o.shear.pier_id == "LW1-2")
    ].iloc[0]
    # LW1-2: Lw 1800, tw 250, Hw/Lw = 3950/1800 = 2.194 > 1 -> floor 0.17 sqrt(50) 0.8 x 1800 x 250
    # = 432.7 kN; needed rho_h = (900/0.7 - 432.7) / (500 x 360 000 / 1000) = 0.004739 (hand evaluation)
    assert row.vuc == pytest.approx(432.75, abs=0.05)
    assert row.status == results.FAIL
    assert row.rho_req == pytest.approx((900 / 0.7 - 432.75) / (500 * 360.0), rel=1e-3)
    assert "raise horizontal steel" in row.advice
    s = o.summary[(o.summary.storey == "GF") & (o.summary.pier_id == "LW1-2")].iloc[0]
    assert s.status == results.FAIL and s.combination == "1.35G"


def test_vu_max_capped_pier_says_only_section_helps(demo_book):
    edit(demo_book, {(A.name, f"{col(A, 'v')}3"): 5000.0})
    o = outcome(demo_book)
    row = o.shear[
        (o.shear.storey == "GF") & (o.shear.combination == "1.35G") & (o.shear.pier_id == "LW1-2")
    ].iloc[0]
    # V*/phi = 7142.9 kN > Vu.max = 0.2 x 50 x 0.8 x 1800 x 250 = 3600 kN (hand evaluation)
    assert row.vu_max == pytest.approx(3600.0)
    assert "only a thicker wall or a higher f'c" in row.advice


def test_piers_without_actions_are_listed_not_checked(demo_book):
    b, _ = pipeline.load(demo_book)
    acts = b.member_actions
    keep = acts[acts.member != "SW3"]
    b2 = b.model_copy(update={"member_actions": keep})
    o = pipeline.compute(b2, pipeline.Findings())
    sw3 = o.summary[o.summary.pier_id == "SW3"]
    assert len(sw3) == 15 and (sw3.status == results.NOT_CHECKED).all()
    assert "no actions" in sw3.note.iloc[0]


def test_summary_is_worst_check_and_combination_per_pier_per_storey(demo_book):
    o = outcome(demo_book)
    s = o.summary.set_index(["storey", "pier_id"])
    shear_worst = o.shear.groupby(["storey", "pier_id"]).util.max()
    assert np.allclose(s.loc[shear_worst.index, "u_shear"].to_numpy(), shear_worst.to_numpy())
    # detailing is compliance, reported beside the structural result: it never governs
    governing = s[["u_shear", "u_nm", "u_simplified"]].max(axis=1)
    assert np.allclose(s.util.to_numpy(), governing.to_numpy())
    det_fail = s.detailing.str.startswith(results.FAIL)
    assert (s.status[det_fail] == results.FAIL).all()
    assert len(o.summary) == len(o.geometry.piers)
