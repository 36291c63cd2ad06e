"""Core actions shared to walls and piers on the demo building: statics must hold exactly
(forces sum back to the storey resultants) and member actions take precedence."""

import numpy as np
import pytest
from conftest import column_letter as col
from conftest import edit

from xlcore import layout, pipeline, results

A, P = layout.MEMBER_ACTIONS, layout.PROJECT


def without_member_actions_at(path, storey):
    """Blank the member-action rows of one storey so that its core actions are used."""
    b, _ = pipeline.load(path)
    rows = b.member_actions.loc[b.member_actions.storey == storey, "row"]
    edit(path, {(A.name, f"{col(A, k)}{r}"): None for r in rows for k in A.keys})


def outcome(path):
    b, f = pipeline.load(path)
    return b, pipeline.compute(b, f)


@pytest.fixture
def top_from_core(demo_book):
    without_member_actions_at(demo_book, "L14")
    return outcome(demo_book)


def test_core_derived_actions_drive_the_pier_checks(top_from_core):
    b, o = top_from_core
    top = o.shear[o.shear.storey == "L14"]
    assert len(top) == 11 * 8  # 11 piers x 8 combinations
    assert top.source.str.startswith("core:").all()
    rest = o.shear[o.shear.storey != "L14"]
    assert not rest.source.str.startswith("core:").any()  # member actions win elsewhere


def core_rows(o, kind):
    sheet = next(s for s in o.sheets if s.name == results.CORE_SHEET)
    t = sheet.table
    return t[(t.kind == kind) & (t.storey == "L14")]


def test_wall_shears_sum_to_the_storey_shear(top_from_core):
    b, o = top_from_core
    walls = core_rows(o, "wall")
    geo = o.geometry.piers.drop_duplicates(["storey", "wall_id"]).set_index(["storey", "wall_id"])
    for comb, g in walls.groupby("combination"):
        ux = geo.loc[[("L14", w) for w in g.wall_id], "ux"].to_numpy()
        uy = geo.loc[[("L14", w) for w in g.wall_id], "uy"].to_numpy()
        core = b.core_actions[(b.core_actions.storey == "L14") & (b.core_actions.combination == comb)].iloc[0]
        assert (g.v.to_numpy() * ux).sum() == pytest.approx(core.vx, abs=1e-6)
        assert (g.v.to_numpy() * uy).sum() == pytest.approx(core.vy, abs=1e-6)


def test_pier_axial_forces_sum_to_core_axial_force(top_from_core):
    b, _ = top_from_core
    acts = pipeline.pier_actions(b, *_prep(b))[0]
    acts = acts[acts.storey == "L14"]
    for comb, g in acts.groupby("combination"):
        core = b.core_actions[(b.core_actions.storey == "L14") & (b.core_actions.combination == comb)].iloc[0]
        assert g.n.sum() == pytest.approx(core.n, rel=1e-9)


def _prep(b):
    from xlcore import distribution, geometry, stiffness

    s = b.settings
    geom = geometry.derive(b.storeys, b.walls, b.openings)
    piers = stiffness.with_stiffness(geom.piers, s.poisson, s.pier_fixity)
    walls = stiffness.wall_stiffness(piers, s.poisson, s.pier_fixity)
    return piers, walls, distribution.storey_plans(piers, walls)


def test_pier_shears_sum_to_their_wall(top_from_core):
    _, o = top_from_core
    walls = core_rows(o, "wall").set_index(["combination", "member"]).v
    piers = core_rows(o, "pier")
    geo = o.geometry.piers[o.geometry.piers.storey == "L14"].set_index("pier_id").wall_id
    per_wall = piers.assign(wall=piers.member.map(geo)).groupby(["combination", "wall"]).v.sum()
    assert np.allclose(per_wall.to_numpy(), walls.loc[per_wall.index].to_numpy())


def test_member_actions_take_precedence_and_say_so(demo_book):
    _, o = outcome(demo_book)
    sheet = next(s for s in o.sheets if s.name == results.CORE_SHEET)
    assert (sheet.table.used == "no: member actions given").all()
    assert not o.shear.source.str.startswith("core:").any()


def test_accidental_eccentricity_never_lowers_a_wall_force(demo_book):
    without_member_actions_at(demo_book, "L14")
    _, base = outcome(demo_book)
    edit(demo_book, {(P.name, f"B{2 + [s.key for s in P.settings].index('accidental')}"): 0.1})
    _, acc = outcome(demo_book)
    w0, w1 = core_rows(base, "wall"), core_rows(acc, "wall")
    assert (w1.v.abs().to_numpy() >= w0.v.abs().to_numpy() - 1e-9).all()
    assert (w1.v.abs().to_numpy() > w0.v.abs().to_numpy() + 1e-6).any()


def test_section_sheet_lists_every_storey(demo_book):
    _, o = outcome(demo_book)
    sheet = next(s for s in o.sheets if s.name == results.SECTION_SHEET)
    assert len(sheet.table) == 15
    # GF has no riser in SW2 yet: its area exceeds L1's by 0.9 x 0.25 = 0.225 m^2 (hand evaluation)
    t = sheet.table.set_index("storey")
    assert t.loc["GF", "area"] - t.loc["L1", "area"] == pytest.approx(0.9 * 0.25)
