"""What the speed tests build from the demo and compare with, in one place: the demo's piers,
walls and storey plans as the pipeline makes them, and a bit-for-bit frame comparison."""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore import cores, demo, geometry, pipeline
from xlcore.mechanics import stiffness
from xlcore.model import Opening, Storey, WallRun


def demo_model(rename=None):
    """The demo's storeys, wall runs and openings as model objects, from `xlcore.demo` (no
    workbook); `rename` maps each wall ID to another (openings follow their wall)."""
    rename = rename or (lambda w: w)
    sts = [Storey(index=i, **s) for i, s in enumerate(demo.storeys())]
    walls = [WallRun(**{**w, "wall_id": rename(w["wall_id"])}) for w in demo.walls()]
    openings = [Opening(**{**o, "wall_id": rename(o["wall_id"])}) for o in demo.openings()]
    return sts, walls, openings


def demo_parts(demo_master):
    """The demo building, its piers (with stiffness), walls (with sharing stiffness) and each
    core's storey plans."""
    b, _ = pipeline.load(demo_master)
    s = b.settings
    g = geometry.derive(b.storeys, b.walls, b.openings, b.end_zones)
    piers = stiffness.with_stiffness(g.piers, s.poisson, s.pier_fixity)
    walls = stiffness.sharing_stiffness(
        stiffness.wall_stiffness(piers, s.poisson, s.pier_fixity), s.poisson, s.wall_sharing
    )
    return b, piers, walls, cores.plans_by_core(piers, walls)


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


def demo_actions(demo_master):
    """The demo building, its piers and its pier actions (member and core rows)."""
    b, piers, walls, plans = demo_parts(demo_master)
    acts, _, _ = pipeline.pier_actions(b, piers, walls, plans)
    return b, piers, acts


def settings_for(b, standard: str, **more):
    """The building's settings with another standard (and any other settings given)."""
    return b.settings.model_copy(update={"standard": standard, **more})
