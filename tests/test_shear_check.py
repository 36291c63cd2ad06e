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
    assert s.status == results.FAIL and s.u_shear == pytest.approx(row.util)


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


def test_overall_wall_height_is_the_default_and_written_on_every_row(demo_book):
    o = outcome(demo_book)
    st = o.building.storeys
    walls = o.geometry.piers[o.geometry.piers.wall_id == "LW1"]
    here = [s for s in st if s.name in set(walls.storey)]
    # base of the lowest storey LW1 stands at to the top of its highest (hand evaluation)
    H = (max(s.level + s.height for s in here) - min(s.level for s in here)) * 1000.0
    lw1 = o.shear[(o.shear.storey == "GF") & (o.shear.pier_id == "LW1-2")]
    # Cl 11.6.3 as amended, conservative reading: Hw = overall height; the pier beside the door
    # takes the larger of H / 1800 and the whole wall's H / 6000 (common practice)
    assert lw1.hw_lw.to_numpy() == pytest.approx(H / 1800.0)
    assert lw1.hw_basis.str.startswith("larger of pier overall wall height").all()
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
