"""The advice search's fast paths against the general ones they replace, bit for bit on crafted
cases (issue 15 §1). These are consistency checks inside the project: what the search finds is
held to the exhaustive search in test_advice.py, and the checks it runs to outside references
in their own test modules.

- `ActionRows.for_variants` (action rows gathered by position) against the join on text keys
  `actions.merge(meta, on=[storey, pier_id])` it replaces: same rows, order, columns, dtypes.
- `_pair_arrays` (pairs as arrays) against `_pairs` (pairs as a joined table), and
  `_probed_pairs` (the probe on arrays, only hopeful groups made into a table) against
  `_probed` over `_pairs`: same rows, order, index, variant IDs and costs to the last bit.
"""

import advice_reference
import builders
import numpy as np
import pandas as pd
import pytest

from xlcore import geometry
from xlcore.checks import advice
from xlcore.checks.axial import check_pier_axial
from xlcore.mechanics import stiffness
from xlcore.model import Opening, Settings

STOREYS = [builders.storey("L1"), builders.storey("L2", index=1, level=3.2)]


def tower():
    """Two walls over two storeys, the second with a door (two piers), unequal bars."""
    walls = [
        builders.wall("W1", 0, 0, 3.0, 0, storeys=("L1", "L2"), fc=25.0, h_dia=10.0, h_spacing=300.0),
        builders.wall("W2", 0, 4, 6.0, 4, storeys=("L1", "L2"), fc=32.0, thickness=250.0, v_layers=2),
    ]
    door = Opening(wall_id="W2", storey_from="L1", storey_to="L2", offset=2.0, width=1.2, sill=0.0, head=2.4)
    openings = [door]
    geom = geometry.derive(STOREYS, walls, openings)
    return stiffness.with_stiffness(geom.piers, 0.2, "fixed-fixed")


def actions_for(piers, scale=1.0):
    """Eight combinations per pier and storey, from light to heavy, in an order that is not the
    piers' order (so that the joins' order matters)."""
    rows = []
    for c in range(8):
        for p in piers.itertuples():
            k = (1 + c) * scale * (2.0 if p.storey == "L1" else 1.0)
            rows.append(
                dict(
                    storey=p.storey,
                    combination=f"C{c}",
                    wall_id=p.wall_id,
                    pier_id=p.pier_id,
                    position=0,
                    k=1.0,
                    share=1.0,
                    n=300.0 * k - 900.0 * (c % 3 == 0),
                    v=60.0 * k,
                    m=120.0 * k * (1 + (c % 2)),
                    m_out=np.nan,
                    source="given",
                    origin=0,
                )
            )
    out = pd.DataFrame(rows).sample(frac=1.0, random_state=3).reset_index(drop=True)
    return out.assign(row=np.arange(len(out)))


def failing_of(piers):
    return piers[["storey", "pier_id"]].assign(status="FAIL", check="x", util=2.0).reset_index(drop=True)


def test_tower_has_piers_on_both_storeys():
    piers = tower()
    assert set(piers.storey) == {"L1", "L2"} and piers.pier_id.nunique() >= 3


def test_action_rows_by_position_equal_the_join_on_text_keys():
    piers = tower()
    acts = actions_for(piers)
    var, meta = advice._candidates(piers, failing_of(piers), Settings())
    rng = np.random.default_rng(7)
    # a shuffled batch with a pier twice over and a key the actions do not hold
    batch = meta.iloc[rng.permutation(len(meta))[:400]].reset_index(drop=True)
    stray = batch.iloc[:3].assign(pier_id="NOT-A-PIER", variant=[10**9, 10**9 + 1, 10**9 + 2])
    batch = pd.concat([batch, stray, batch.iloc[5:9]], ignore_index=True)
    join = acts.merge(batch[["storey", "pier_id", "variant"]], on=["storey", "pier_id"])
    join = join.drop(columns="pier_id").rename(columns={"variant": "pier_id"})
    got = advice.ActionRows(acts).for_variants(batch)
    assert len(got) > 1000  # 400 variants x 8 combinations, plus repeats
    pd.testing.assert_frame_equal(got, join, check_exact=True)
    # none at all
    empty = advice.ActionRows(acts).for_variants(batch.iloc[0:0])
    assert empty.empty and list(empty.columns) == list(join.columns)


@pytest.mark.parametrize("pour", ["the core at one storey", "each wall at one storey"])
def test_pairs_as_arrays_equal_the_pair_table(pour):
    piers = tower()
    s = Settings(grade_pour=pour)
    var, meta = advice._candidates(piers, failing_of(piers), s)
    meta["pour"], _ = advice.pour_keys(meta.assign(**advice._pier_cols(piers, meta)), piers, s)
    premiums = advice.pour_premiums(piers, s)
    table = advice._pairs(meta, premiums, len(var), s)
    arrays = advice_reference._pair_arrays(meta, premiums, s)
    n = len(arrays["a"])
    assert n == len(table) > 10_000  # every kind of pair, for every pier
    assert set(table.pair) == set(range(len(advice.PAIRS)))
    got = advice._pair_frame(meta, arrays, np.arange(n), len(var) + np.arange(n))
    pd.testing.assert_frame_equal(got, table, check_exact=True)


@pytest.mark.parametrize("scale", [1.0, 2.5])
def test_probe_on_arrays_equals_the_probe_on_the_pair_table(scale):
    """Same hopeful pairs, in the same order with the same index and variant IDs; the probe both
    passes and fails among the groups (else the comparison would prove little)."""
    piers = tower()
    s = Settings()
    acts = actions_for(piers, scale)
    failing = failing_of(piers)
    var, meta = advice._candidates(piers, failing, s)
    meta["pour"], _ = advice.pour_keys(meta.assign(**advice._pier_cols(piers, meta)), piers, s)
    premiums = advice.pour_premiums(piers, s)
    screen = advice.ActionRows(advice._screening_actions(acts, failing))
    rows = advice.ActionRows(acts)
    rows_of = advice._pair_rows(var)
    table = advice._pairs(meta, premiums, len(var), s)
    general = advice._probed(rows_of, table, ["bi", "pair"], rows, screen, s)
    fast = advice._probed_pairs(meta, premiums, len(var), s, rows_of, rows, screen)
    groups = table.groupby(["bi", "pair"]).ngroups
    kept = general.groupby(["bi", "pair"]).ngroups
    assert 0 < kept < groups
    pd.testing.assert_frame_equal(fast, general, check_exact=True)


def test_options_dropped_before_the_rows_are_made_are_those_the_rules_drop(monkeypatch):
    """`_built_options` drops grades and bars before the variant rows are made; without it
    (every row made, the rules alone dropping) the variants and their table are the same."""
    piers = tower()
    s = Settings()
    real, seen = advice._built_options, []
    monkeypatch.setattr(advice, "_built_options", lambda *a: seen.append(real(*a)) or seen[-1])
    var, meta = advice._candidates(piers, failing_of(piers), s)
    assert 0 < seen[0].sum() < len(seen[0])  # rows dropped before they are made
    monkeypatch.setattr(advice, "_built_options", lambda base, o, bi, *_: np.ones(len(bi), bool))
    var_all, meta_all = advice._candidates(piers, failing_of(piers), s)
    assert len(meta) > 500 and set(meta.kind) == {advice.GRADE_KIND, *advice.PIER_KINDS}
    pd.testing.assert_frame_equal(var, var_all, check_exact=True)
    pd.testing.assert_frame_equal(meta, meta_all, check_exact=True)


def test_checks_in_pieces_equal_the_checks_at_once(monkeypatch):
    """`_utilisation` runs the checks in pieces of CHUNK_ROWS action rows (whole variants each):
    the same utilisation, variant by variant, as in one batch."""
    piers = tower()
    s = Settings()
    acts = actions_for(piers, 2.0)
    var, meta = advice._candidates(piers, failing_of(piers), s)
    batch = meta.iloc[::7]
    rows = var.iloc[batch.variant.to_numpy()]
    whole = advice._utilisation(rows, batch, advice.ActionRows(acts), s)
    monkeypatch.setattr(advice, "CHUNK_ROWS", 97)
    pieces = advice._utilisation(rows, batch, advice.ActionRows(acts), s)
    assert len(whole) == len(batch) and (whole > 1.0).any() and (whole <= 1.0).any()
    pd.testing.assert_series_equal(pieces, whole, check_exact=True)


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
def test_closed_form_checks_first_settle_the_same_variants(standard):
    """With `cheap_first` a variant over 1 in shear, detailing or Section 14 skips the axial
    checks: every variant is on the same side of 1, and those at or under 1 (all checks run)
    have the same utilisation to the last bit. The effective height it hands detailing and
    Section 14 is the axial check's."""
    piers = tower()
    s = Settings(standard=standard)
    acts = actions_for(piers, 2.0)
    var, meta = advice._candidates(piers, failing_of(piers), s)
    rows = var.iloc[meta.variant.to_numpy()]
    a = advice.ActionRows(acts).for_variants(meta)
    full = advice._worst(rows, a, s)
    fast = advice._worst(rows, a, s, cheap_first=True)
    assert (full > 1.0).any() and (full <= 1.0).any()
    pd.testing.assert_index_equal(fast.index, full.index)
    assert ((fast > 1.0) == (full > 1.0)).all()
    ok = (full <= 1.0).to_numpy()
    assert np.array_equal(fast[ok].to_numpy(), full[ok].to_numpy())
    skipped = fast < full  # the axial checks governed and were not run: over 1 all the same
    assert skipped.any() and (fast[skipped] > 1.0).all()
    hwe = check_pier_axial(rows, a, s, working=False).groupby(["storey", "pier_id"]).hwe.first()
    got = advice._effective_heights(rows, a, s).sort_index()
    pd.testing.assert_series_equal(got, hwe.sort_index(), check_exact=True)
