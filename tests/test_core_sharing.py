"""Core actions shared to cores, walls and piers on the demo building (two cores): statics must
hold exactly (forces sum back to the storey resultants) and member actions take precedence."""

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
    from xlcore import cores, geometry
    from xlcore.mechanics import stiffness

    s = b.settings
    geom = geometry.derive(b.storeys, b.walls, b.openings)
    piers = stiffness.with_stiffness(geom.piers, s.poisson, s.pier_fixity)
    walls = stiffness.wall_stiffness(piers, s.poisson, s.pier_fixity)
    return piers, walls, cores.plans_by_core(piers, walls)


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


def test_accidental_eccentricity_never_lowers_a_core_force(demo_book):
    """With two cores the accidental eccentricity acts at the building level: each core's force
    along the storey shear's direction only grows (and some grow)."""
    _, base = outcome(demo_book)
    edit(demo_book, {(P.name, f"B{2 + [s.key for s in P.settings].index('accidental')}"): 0.1})
    _, acc = outcome(demo_book)
    t0, t1 = (next(s for s in o.sheets if s.name == results.CORES_SHEET).table for o in (base, acc))
    along = lambda t: np.where(t.vx.abs() > t.vy.abs(), t.vx.abs(), t.vy.abs())  # noqa: E731
    lateral = (t0.vx.abs() + t0.vy.abs() > 1.0).to_numpy()
    assert (along(t1)[lateral] >= along(t0)[lateral] - 1e-9).all()
    assert (along(t1)[lateral] > along(t0)[lateral] + 1.0).any()
    assert (t1.m_acc > 0).any() and (t0.m_acc == 0).all()


def test_section_sheet_lists_every_storey_of_each_core(demo_book):
    _, o = outcome(demo_book)
    sheet = next(s for s in o.sheets if s.name == results.SECTION_SHEET)
    assert len(sheet.table) == 15 * 2  # two cores, each its own section
    assert "core" in [c.key for c in sheet.columns]
    # GF has no riser in StairE yet: the stair core's area exceeds L1's by 0.85 x 0.25 m^2
    # (hand evaluation: the riser's width x the wall's thickness)
    t = sheet.table[sheet.table.core == "stair"].set_index("storey")
    assert t.loc["GF", "area"] - t.loc["L1", "area"] == pytest.approx(0.85 * 0.25)


def test_cores_sheet_shows_the_shares_and_the_wall_sharing_basis(demo_book):
    _, o = outcome(demo_book)
    names = [s.name for s in o.sheets]
    cores_sheet = o.sheets[names.index(results.CORES_SHEET)]
    assert len(cores_sheet.table) == 15 * 8 * 2  # storey x combination x core
    gf = cores_sheet.table[(cores_sheet.table.storey == "GF") & (cores_sheet.table.combination == "1.35G")]
    assert gf.share_n.sum() == pytest.approx(100.0)
    shares = o.sheets[names.index(results.CORE_SHEET)]
    basis = dict(shares.preamble)["Wall stiffness for sharing"]
    assert basis.startswith("one storey's stiffness")


def test_whole_height_setting_changes_the_wall_shares_and_says_so(demo_book):
    without_member_actions_at(demo_book, "L14")
    _, base = outcome(demo_book)
    row = 2 + [s.key for s in P.settings].index("wall_sharing")
    edit(demo_book, {(P.name, f"B{row}"): "whole-height cantilever"})
    _, tall = outcome(demo_book)
    sheet = next(s for s in tall.sheets if s.name == results.CORE_SHEET)
    assert dict(sheet.preamble)["Wall stiffness for sharing"].startswith("whole-height cantilever")
    assert dict(sheet.preamble)["Wall stiffness for sharing"] != dict(
        next(s for s in base.sheets if s.name == results.CORE_SHEET).preamble
    )["Wall stiffness for sharing"]
    # the demo's parallel walls of one core are alike in length, so their shares do not move
    # (tests/test_cores.py checks shares that do); the wall shears still add back
    w1 = core_rows(tall, "wall")
    walls = w1.merge(
        tall.geometry.piers.drop_duplicates(["storey", "wall_id"])[["storey", "wall_id", "ux", "uy"]],
        on=["storey", "wall_id"],
    )
    b = tall.building
    for comb, g in walls.groupby("combination"):
        core = b.core_actions[(b.core_actions.storey == "L14") & (b.core_actions.combination == comb)].iloc[0]
        assert (g.v * g.ux).sum() == pytest.approx(core.vx, abs=1e-6)
        assert (g.v * g.uy).sum() == pytest.approx(core.vy, abs=1e-6)
