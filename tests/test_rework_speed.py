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


# ---- shear: capacity working text once per distinct set of its numbers ----

import builders  # noqa: E402
import pytest  # noqa: E402

from xlcore.checks import per_pier, shear  # noqa: E402
from xlcore.mechanics import stiffness  # noqa: E402
from xlcore.model import Settings  # noqa: E402

_STOREYS = [builders.storey(f"L{i + 1}", index=i, level=3.2 * i) for i in range(4)]


def _shear_piers() -> pd.DataFrame:
    """Walls over four alike storeys (their piers share the capacity text), one wall with an
    opening, and one storey of one wall that differs in f'c alone (its text must differ)."""
    walls = [
        builders.wall("W1", 0, 0, 3.0, 0, storeys=("L1", "L4")),
        builders.wall("W2", 0, 4, 6.0, 4, storeys=("L1", "L4"), thickness=250.0),
    ]
    door = Opening(wall_id="W2", storey_from="L1", storey_to="L4", offset=2.0, width=1.2, sill=0.0, head=2.4)
    p = geometry.derive(_STOREYS, walls, [door]).piers
    p.loc[(p.storey == "L3") & (p.wall_id == "W1"), "fc"] = 50.0
    return stiffness.with_stiffness(p, 0.2, "fixed-fixed")


def _shear_actions(p: pd.DataFrame) -> pd.DataFrame:
    rows = [
        dict(storey=r.storey, combination=f"C{c}", wall_id=r.wall_id, pier_id=r.pier_id, position=0, k=1.0,
             share=1.0, n=100.0 * c, v=50.0 + 30.0 * c, m=80.0 * c, m_out=np.nan, source="given", origin=0)
        for c in range(3)
        for r in p.itertuples()
    ]  # fmt: skip
    return pd.DataFrame(rows).assign(row=lambda d: np.arange(len(d)))


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
def test_shear_text_by_numbers_equals_per_pier(monkeypatch, standard):
    """The capacity text made once per distinct set of numbers equals the text made once per
    storey x pier (the general path) byte for byte, and really is shared across storeys."""
    p = _shear_piers()
    s = Settings(standard=standard)
    acts = _shear_actions(p)
    fast = shear.check_pier_shear(p, acts, s)
    first, _ = shear._text_rows(fast, _capacity(fast, p, s))
    assert len(first) < len(per_pier(fast)[0])  # alike storeys share their text
    monkeypatch.setattr(shear, "_text_rows", lambda df, r: per_pier(df))
    general = shear.check_pier_shear(p, acts, s)
    pd.testing.assert_frame_equal(fast, general, check_exact=True)
    w1 = fast[fast.pier_id == "W1"].drop_duplicates("storey").set_index("storey").f_vuc
    assert w1["L3"] != w1["L2"] and w1["L1"] == w1["L2"] == w1["L4"]


def _capacity(df: pd.DataFrame, p: pd.DataFrame, s: Settings):
    """The standard's shear capacity on `df`'s rows (what check_pier_shear hands the text)."""
    from xlcore.codes import get_standard

    std = get_standard(s.standard).configure(s)
    phi = s.phi_shear if s.phi_shear is not None else std.phi_wall_shear
    return std.wall_shear(df.fc, df.fsy, df.Lw, df.tw, df.hw_lw, df.rho_h, df.rho_v, phi)


def test_bits_tell_negative_zero_apart() -> None:
    """-0.0 prints as '-0': rows with 0.0 and -0.0 must not share one text."""
    first, of = shear._distinct([shear._bits(np.array([0.0, -0.0, 0.0, np.nan, np.nan]))])
    assert of.tolist() == [0, 1, 0, 2, 2] and first.tolist() == [0, 1, 3]
