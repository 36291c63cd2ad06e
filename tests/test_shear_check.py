"""The pier shear check end to end on the demo building: sharing, settings, envelope.

Engineering values are hand evaluations of AS 3600:2018 Cl 11.6 and of the stiffness formula
k = 1 / (h^3/(12 E I) + 1.2 h/(G A)) (docs/engineering-basis.md, Sharing actions)."""

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


def action_row(path, member, storey="GF", combination="1.35G") -> int:
    """Sheet row of the demo's member action for one member, storey and combination."""
    a = pipeline.load(path)[0].member_actions
    return int(a[(a.member == member) & (a.storey == storey) & (a.combination == combination)].row.iloc[0])


def test_wall_shear_shared_to_piers_by_stiffness(demo_book):
    # GF, 1.35G, LiftS-1..3 -> one row for the whole wall LiftS with V* = 300 kN
    r1, r2, r3 = (action_row(demo_book, f"LiftS-{i}") for i in (1, 2, 3))
    edit(
        demo_book,
        {(A.name, f"{col(A, 'member')}{r1}"): "LiftS", (A.name, f"{col(A, 'v')}{r1}"): 300.0}
        | {(A.name, f"{col(A, k)}{r}"): None for r in (r2, r3) for k in A.keys},
    )
    o = outcome(demo_book)
    rows = o.shear[(o.shear.storey == "GF") & (o.shear.combination == "1.35G") & (o.shear.wall_id == "LiftS")]
    assert rows.pier_id.tolist() == ["LiftS-1", "LiftS-2", "LiftS-3"]
    assert rows.v.sum() == pytest.approx(300.0)
    assert rows.share.sum() == pytest.approx(1.0)
    # piers 950, 2150, 950 mm long, 250 thick, 2350 high (door), E 34 800 (f'c 50), G = E / 2.4:
    # k = 1 / (h^3 / (12 E t L^3 / 12) + 1.2 h / (G t L))   (hand evaluation below, N and mm)
    E, G, t, h = 34800.0, 34800.0 / 2.4, 250.0, 2350.0
    k = [1 / (h**3 / (E * t * L**3) + 1.2 * h / (G * t * L)) for L in (950.0, 2150.0, 950.0)]
    assert rows.share.tolist() == pytest.approx([x / sum(k) for x in k], rel=1e-9)
    assert rows.share.iloc[0] < 950 / 4050  # the short pier takes less than its length ratio
    assert all(s.startswith("wall LiftS: V* 300.0 kN x share") for s in rows.source)


def test_opening_height_setting_changes_hw(demo_book):
    edit(demo_book, {setting_cell("shear_height"): "opening height"})
    o = outcome(demo_book)
    beside = o.shear[(o.shear.storey == "GF") & (o.shear.pier_id == "LiftS-2")]
    assert (beside.Hw == 2350.0).all()  # door head 2.35 m, sill 0
    whole = o.shear[(o.shear.storey == "GF") & (o.shear.pier_id == "LiftE")]
    assert (whole.Hw == 4100.0).all()  # no opening: storey clear height 4.35 - 0.25 m


def test_phi_setting_is_used_and_reported(demo_book):
    edit(demo_book, {setting_cell("phi_shear"): 0.75})
    o = outcome(demo_book)
    assert np.allclose(o.shear.phi, 0.75)
    assert np.allclose(o.shear.phi_vu, 0.75 * np.minimum(o.shear.vuc + o.shear.vus, o.shear.vu_max))


def test_failing_pier_gets_required_steel_and_advice(demo_book):
    edit(demo_book, {(A.name, f"{col(A, 'v')}{action_row(demo_book, 'LiftS-2')}"): 1300.0})
    o = outcome(demo_book)
    row = o.shear[
        (o.shear.storey == "GF") & (o.shear.combination == "1.35G") & (o.shear.pier_id == "LiftS-2")
    ].iloc[0]
    # LiftS-2: Lw 2150, tw 250, Hw/Lw = 49 150/2150 = 22.9 > 1 -> floor 0.17 sqrt(50) 0.8 x 2150 x 250
    # = 516.9 kN; Vus = 0.0045239 x 500 x 430 000 = 972.6 kN, phi Vu = 0.7 x 1489.5 = 1042.7 kN
    # < 1300 kN; needed rho_h = (1300/0.7 - 516.9) / (500 x 430 000 / 1000) = 0.006234 (hand evaluation)
    assert row.vuc == pytest.approx(516.89, abs=0.05)
    assert row.phi_vu == pytest.approx(1042.7, abs=0.1)
    assert row.status == results.FAIL
    assert row.rho_req == pytest.approx((1300 / 0.7 - 516.89) / (500 * 430.0), rel=1e-3)
    assert "raise horizontal steel" in row.advice
    s = o.summary[(o.summary.storey == "GF") & (o.summary.pier_id == "LiftS-2")].iloc[0]
    assert s.status == results.FAIL and s.u_shear == pytest.approx(row.util)


def test_vu_max_capped_pier_says_only_section_helps(demo_book):
    edit(demo_book, {(A.name, f"{col(A, 'v')}{action_row(demo_book, 'LiftS-2')}"): 5000.0})
    o = outcome(demo_book)
    row = o.shear[
        (o.shear.storey == "GF") & (o.shear.combination == "1.35G") & (o.shear.pier_id == "LiftS-2")
    ].iloc[0]
    # V*/phi = 7142.9 kN > Vu.max = 0.2 x 50 x 0.8 x 2150 x 250 = 4300 kN (hand evaluation)
    assert row.vu_max == pytest.approx(4300.0)
    assert "only a thicker wall or a higher f'c" in row.advice


def test_piers_without_actions_are_listed_not_checked(demo_book):
    b, _ = pipeline.load(demo_book)
    acts = b.member_actions
    keep = acts[acts.member != "StairN"]
    b2 = b.model_copy(update={"member_actions": keep})
    o = pipeline.compute(b2, pipeline.Findings())
    gone = o.summary[o.summary.pier_id == "StairN"]
    assert len(gone) == 15 and (gone.status == results.NOT_CHECKED).all()
    assert "no actions" in gone.note.iloc[0]


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


def test_overall_wall_height_is_the_default_and_written_on_every_row(demo_book):
    o = outcome(demo_book)
    st = o.building.storeys
    walls = o.geometry.piers[o.geometry.piers.wall_id == "LiftS"]
    here = [s for s in st if s.name in set(walls.storey)]
    # base of the lowest storey LiftS stands at to the top of its highest (hand evaluation)
    H = (max(s.level + s.height for s in here) - min(s.level for s in here)) * 1000.0
    assert H == pytest.approx(49150.0)
    beside = o.shear[(o.shear.storey == "GF") & (o.shear.pier_id == "LiftS-2")]
    # Cl 11.6.3 as amended, conservative reading: Hw = overall height; the pier beside the door
    # takes the larger of H / 2150 and the whole wall's H / 6350 (common practice)
    assert beside.hw_lw.to_numpy() == pytest.approx(H / 2150.0)
    assert beside.hw_basis.str.startswith("larger of pier overall wall height").all()
    assert o.shear.hw_basis.str.len().gt(0).all()


def test_unknown_earthquake_combination_is_an_error_at_its_cell(demo_book):
    from xlcore.diagnostics import InputInvalid

    sheet, cell = setting_cell("earthquake_combinations")
    edit(demo_book, {(sheet, cell): "1.35G, Ex-typo"})
    with pytest.raises(InputInvalid) as err:
        pipeline.load(demo_book)
    found = [e for e in err.value.findings.errors if e.cell == cell]
    assert found and "Ex-typo" in found[0].message and "1.35G" not in found[0].message


def test_end_zone_flag_has_its_own_summary_line(demo_book):
    b, _ = pipeline.load(demo_book)
    combos = sorted(set(b.core_actions.combination))
    quake = [c for c in combos if "E" in c]
    edit(demo_book, {setting_cell("earthquake_combinations"): ", ".join(quake)})
    o = outcome(demo_book)
    lines = dict(o.sheets[0].preamble)
    assert "End-zone flag (Cl 14.6)" in lines
    stress = next(s for s in o.sheets if s.name == results.CORE_STRESS_SHEET).table
    assert set(stress[stress.earthquake == "yes"].combination) == set(quake)
    assert (stress[stress.earthquake == "no"].flag.str.startswith("n/a")).all()
    assert (stress.util == stress.u_tension).all()  # the flag never enters the utilisation
