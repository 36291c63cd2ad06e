"""The closed-form pier checks' fast paths of issue 15's fifth round against the general ways
they replace, bit for bit, on the demo building under both standards. Each test fails with its
fast path broken (tried)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from xlcore import pipeline
from xlcore.checks import shear
from xlcore.mechanics import stiffness

STANDARDS = ["AS 3600:2018", "ACI 318-19"]


@pytest.fixture(scope="module")
def demo(demo_master):
    """The demo building with its piers and pier actions."""
    b, _ = pipeline.load(demo_master)
    s = b.settings
    g = pipeline.geometry.derive(b.storeys, b.walls, b.openings, b.end_zones)
    piers = stiffness.with_stiffness(g.piers, s.poisson, s.pier_fixity)
    walls = stiffness.sharing_stiffness(
        stiffness.wall_stiffness(piers, s.poisson, s.pier_fixity), s.poisson, s.wall_sharing
    )
    plans = pipeline.cores.plans_by_core(piers, walls)
    acts, _, _ = pipeline.pier_actions(b, piers, walls, plans)
    return b, piers, acts


def _settings(b, standard, **more):
    return b.settings.model_copy(update={"standard": standard, **more})


def same_frame(got: pd.DataFrame, want: pd.DataFrame) -> None:
    """Equal columns, dtypes, index and values, floats bit for bit (-0.0 is not 0.0)."""
    assert list(got.columns) == list(want.columns)
    assert got.index.equals(want.index)
    for c in want.columns:
        assert got[c].dtype == want[c].dtype, c
        a, b = got[c].to_numpy(), want[c].to_numpy()
        if a.dtype.kind == "f":
            assert np.array_equal(a.view(np.int64), b.view(np.int64)), c
        else:
            assert a.tolist() == b.tolist() or pd.Series(a).equals(pd.Series(b)), c


# ---- shear: the capacity once per pier, gathered to the rows


@pytest.fixture(params=STANDARDS)
def shear_rows(request, demo):
    """The demo's pier actions with V* raised on every third row (some fail, some beyond
    Vu.max), shuffled, without the rows of every fifth pier (piers without rows), and with the
    piers' f'c and bars varied by storey so that piers' capacities differ."""
    b, piers, acts = demo
    piers = piers.assign(
        fc=np.where(piers.storey_index.to_numpy() % 2 == 0, 40.0, 50.0),
        rho_h=piers.rho_h.to_numpy() * np.where(np.arange(len(piers)) % 3 == 0, 0.5, 1.0),
    )
    acts = acts.assign(v=acts.v * np.where(np.arange(len(acts)) % 3 == 0, 40.0, 1.0) + 300.0)
    gone = set(piers.pier_id.unique()[::5])
    acts = acts[~acts.pier_id.isin(gone)]
    acts = acts.sample(frac=1.0, random_state=3).reset_index(drop=True)
    return b, piers, acts, request.param


@pytest.mark.parametrize("basis", ["overall wall height", "opening height", "storey clear height"])
@pytest.mark.parametrize("mode", [dict(), dict(text=False), dict(working=False)])
def test_shear_capacity_per_pier_equals_every_row(shear_rows, basis, mode, monkeypatch):
    """Hw, Hw/Lw, the capacity, its parts, clause, advice and working worked out once per pier
    and gathered to the rows: the same table as the general path, which works them out on
    every row (the merge on (storey, pier_id))."""
    b, piers, acts, standard = shear_rows
    s = _settings(b, standard, shear_height=basis)
    fast = shear.check_pier_shear(piers, acts, s, **mode)
    monkeypatch.setattr(shear, "pier_rows", lambda *a: None)  # the merge: every row its own
    slow = shear.check_pier_shear(piers, acts, s, **mode)
    assert (slow.status == "FAIL").any() and (slow.status == "pass").any()
    assert slow.hw_lw.nunique() > 3 and slow.phi_vu.nunique() > 3
    same_frame(fast, slow)


def test_rows_of_reads_the_per_pier_capacity_by_row(demo):
    """`_RowsOf.take(rows)` gives row i pier at[i]'s quantities."""
    b, piers, _ = demo
    from xlcore.codes import get_standard

    std = get_standard("AS 3600:2018")
    ratio = np.linspace(0.5, 3.0, len(piers))
    r = std.wall_shear(piers.fc, piers.fsy, piers.Lw, piers.tw, ratio, piers.rho_h, piers.rho_v, 0.75)
    at = np.array([3, 0, 3, 1, len(piers) - 1])
    got = shear._RowsOf(r, at).take(np.array([4, 0, 2]))
    want = r.take(np.array([len(piers) - 1, 3, 3]))
    for k in ("area", "concrete", "steel", "limit", "nominal", "phi", "design", "governs"):
        assert np.array_equal(getattr(got, k), getattr(want, k)), k
    for k in want.detail:
        assert np.array_equal(got.detail[k], want.detail[k]), k
