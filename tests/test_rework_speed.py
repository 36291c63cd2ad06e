"""The geometry's fast paths agree bit for bit with the general code they replaced."""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore import demo, geometry
from xlcore.model import Opening, Storey, WallRun


def _supported_edges_reference(piers: pd.DataFrame) -> np.ndarray:
    """The former supported_edges: the whole piers table filtered per storey (slow, plain)."""
    out = np.zeros(len(piers), dtype=int)
    walls = piers.drop_duplicates(["storey", "wall_id"])
    for storey, sw in walls.groupby("storey", sort=False):
        wx, wy, ux, uy = (sw[k].to_numpy(float) for k in ("wx", "wy", "ux", "uy"))
        length, reach = sw.wall_length.to_numpy(float), sw.tw.to_numpy(float) / 2000 + 0.01
        ids = sw.wall_id.to_numpy()
        braced = {}
        for which, (ex, ey) in enumerate(((wx, wy), (wx + ux * length, wy + uy * length))):
            t = np.clip((ex[:, None] - wx) * ux + (ey[:, None] - wy) * uy, 0.0, length)
            dist = np.hypot(ex[:, None] - (wx + ux * t), ey[:, None] - (wy + uy * t))
            crossing = np.abs(ux[:, None] * uy - uy[:, None] * ux) > 0.5
            hit = (crossing & (dist <= reach)).any(axis=1)
            braced.update({(w, which): h for w, h in zip(ids, hit, strict=True)})
        here = (piers.storey == storey).to_numpy()
        sp = piers[here]
        at_start = (sp.start <= geometry.TOL).to_numpy() & np.array(
            [braced[(w, 0)] for w in sp.wall_id], dtype=bool
        )
        at_end = (sp.wall_length - sp.end <= geometry.TOL).to_numpy() & np.array(
            [braced[(w, 1)] for w in sp.wall_id], dtype=bool
        )
        out[here] = at_start.astype(int) + at_end.astype(int)
    return out


def _demo_geometry() -> geometry.Geometry:
    st = [Storey(index=i, **s) for i, s in enumerate(demo.storeys())]
    return geometry.derive(st, [WallRun(**w) for w in demo.walls()], [Opening(**o) for o in demo.openings()])


def test_supported_edges_fast_matches_reference() -> None:
    piers = _demo_geometry().piers
    ref = _supported_edges_reference(piers)
    assert set(ref.tolist()) >= {0, 1, 2}  # the case exercises free, one- and two-braced piers
    np.testing.assert_array_equal(geometry.supported_edges(piers), ref)
    assert geometry.supported_edges(piers).dtype == ref.dtype


def test_supported_edges_rows_shuffled() -> None:
    """Rows of a storey not together, walls interleaved: the group numbers still find them."""
    piers = _demo_geometry().piers
    shuffled = piers.sample(frac=1.0, random_state=7).reset_index(drop=True)
    np.testing.assert_array_equal(geometry.supported_edges(shuffled), _supported_edges_reference(shuffled))


def test_supported_edges_empty() -> None:
    piers = _demo_geometry().piers.iloc[:0]
    assert len(geometry.supported_edges(piers)) == 0
