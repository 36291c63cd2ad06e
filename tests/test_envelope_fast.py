"""The summary's envelope groups by integer codes (`envelope._codes`) instead of by the text
keys; it must give bit for bit the table the general path (text group-bys and a pivot table)
gives. Crafted cases: storeys and piers interleaved, ties, NaN utilisations (a whole check of a
pier's shear NaN), piers with no actions, compliance failures. The reference is the general path of the
same module (pandas' pivot_table / group-by semantics), not a number of the engineering."""

import numpy as np
import pandas as pd
import pytest

from xlcore import results
from xlcore.results import envelope as env


def _tables(seed: int):
    rng = np.random.default_rng(seed)
    storeys = [f"L{i}" for i in range(4)]
    piers = pd.DataFrame(
        [
            dict(storey=s, storey_index=i, pier_id=f"W{w}-{p}", wall_id=f"W{w}", position=p)
            for i, s in enumerate(storeys)
            for w in (1, 2, 10)
            for p in (1, 2)
        ]
    )
    acted = piers.iloc[rng.permutation(len(piers))[: len(piers) - 3]]  # 3 piers without actions
    n = 6
    rows = acted.loc[acted.index.repeat(n), ["storey", "pier_id"]].sample(frac=1.0, random_state=seed)
    rows = rows.reset_index(drop=True)
    m = len(rows)
    util = rng.choice([0.5, 0.9, 1.1, 0.9], size=m).astype(float)  # ties on purpose
    util[rng.random(m) < 0.1] = np.nan
    util[(rows.storey == "L1") & (rows.pier_id == rows.pier_id.iloc[0])] = np.nan  # a whole check NaN
    status = np.where(util > 1, results.FAIL, results.PASS)
    comb = [f"C{i}" for i in rng.integers(0, 5, m)]
    shear = rows.assign(
        combination=comb, v=rng.normal(size=m), phi_vu=1.0, util=util, status=status, clause="c", advice=""
    )
    u2 = rng.choice([0.3, 0.8, 1.2], size=m)  # finite: a pier with no finite ratio at all is an
    # error on both paths (pandas' idxmax)
    axial = rows.assign(
        combination=comb,
        m_design=1.0,
        m_ray=2.0,
        util=u2,
        status=np.where(u2 > 1, results.FAIL, results.PASS),
        clause="c",
        governs="g",
        status_s=rng.choice([results.PASS, results.NOT_APPLICABLE], size=m),
        n_end=1.0,
        phi_nu_s=1.0,
        util_s=rng.choice([0.2, 0.95], size=m),
        clause_s="c",
    )
    k = len(piers) * 2
    det = piers.loc[rng.integers(0, len(piers), k), ["storey", "pier_id"]].reset_index(drop=True)
    du = rng.choice([0.4, 1.3, 0.4], size=k)
    detailing = det.assign(
        value=1.0, limit=1.0, unit="", util=du, clause="c",
        status=np.where(du > 1, results.FAIL, results.PASS), rule=[f"rule {i}" for i in range(k)],
    )  # fmt: skip
    su = rng.choice([0.6, 1.05], size=k)
    s14 = det.assign(
        value=np.nan, limit=np.nan, unit="", util=su, clause="c", rule="r",
        status=rng.choice([results.PASS, results.FAIL, results.CHECK], size=k),
    )  # fmt: skip
    return shear, piers, axial, detailing, s14


@pytest.mark.parametrize("seed", range(6))
def test_fast_envelope_equals_general_path(seed, monkeypatch):
    shear, piers, axial, detailing, s14 = _tables(seed)
    fast = env.envelope(shear, piers, axial, detailing, s14)
    fast_pc = env.pier_checks(shear, axial, detailing, s14, fast)
    # the candidates made once for both, as the pipeline does
    cand = env.candidates(shear, axial, detailing, s14)
    shared = env.envelope(shear, piers, axial, detailing, s14, cand=cand)
    pd.testing.assert_frame_equal(shared, fast, check_exact=True)
    pd.testing.assert_frame_equal(
        env.pier_checks(shear, axial, detailing, s14, shared, cand=cand), fast_pc, check_exact=True
    )
    monkeypatch.setattr(env, "_codes", lambda cand: None)  # the general path (text keys, pivot)
    general = env.envelope(shear, piers, axial, detailing, s14)
    general_pc = env.pier_checks(shear, axial, detailing, s14, general)
    pd.testing.assert_frame_equal(fast, general, check_exact=True)
    pd.testing.assert_frame_equal(fast_pc, general_pc, check_exact=True)
    # the cases are not trivial: failures, not-checked piers and NaN-only checks all occur
    assert (fast.status == results.FAIL).any() and (fast.status == results.NOT_CHECKED).any()
    assert fast.u_shear.notna().any() and fast.detailing.str.startswith(results.FAIL).any()


def test_max_per_check_matches_pandas_max():
    """`_max_per_check` against pandas' group-by max (NaN skipped, NaN where none)."""
    g = np.array([0, 1, 0, 2, 1, 0, 2])
    c = np.array([0, 0, 1, 1, 0, 0, 1])
    u = np.array([0.5, np.nan, 0.7, np.nan, 0.2, 0.9, np.nan])
    got = env._max_per_check(u, g, c, 2)
    ref = pd.Series(u).groupby([g, c]).max().unstack().reindex(index=range(3), columns=range(2))
    np.testing.assert_array_equal(got, ref.to_numpy())


@pytest.mark.parametrize("general_path", [False, True])
def test_a_pier_with_no_finite_ratio_is_summarised_not_refused(general_path, monkeypatch):
    """pandas 3's group-by idxmax raises on a group with only NaN; a pier whose shear and
    axial ratios are all NaN (no number to judge) must still get its summary row, its worst
    utilisation NaN, and the other piers' rows must be those of the same tables without it."""
    if general_path:
        monkeypatch.setattr(env, "_codes", lambda cand: None)
    shear, piers, axial, detailing, s14 = _tables(3)
    storey, pier = shear.storey.iloc[0], shear.pier_id.iloc[0]
    mine = ((shear.storey == storey) & (shear.pier_id == pier)).to_numpy()
    shear.loc[mine, "util"] = np.nan
    axial = axial.assign(
        util=np.where(mine, np.nan, axial.util),
        status_s=np.where(mine, results.NOT_APPLICABLE, axial.status_s),
    )
    got = env.envelope(shear, piers, axial, detailing, s14)
    row = got[(got.storey == storey) & (got.pier_id == pier)]
    assert len(row) == 1 and np.isnan(row.u_shear.iloc[0])
    env.pier_checks(shear, axial, detailing, s14, got)  # no ValueError either
    # every other pier's row is unchanged by that pier's NaN: the same as with the pier's rows
    # left out of the tables
    keep = ~mine
    ref = env.envelope(shear[keep], piers, axial[keep], detailing, s14)
    others = ~((got.storey == storey) & (got.pier_id == pier))
    pd.testing.assert_frame_equal(
        got[others].reset_index(drop=True), ref[others.to_numpy()].reset_index(drop=True), check_exact=True
    )
