"""Storeys, walls and openings -> piers and lintels per storey. Engine code: no workbook here.

Units: plan and heights in m on input; pier dimensions in mm on output (the standard's units).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np
import pandas as pd

from xlcore.model import EndZone, Opening, Storey, WallRun

TOL = 0.0005  # m: edges closer than half a millimetre are the same edge

PIER_COLUMNS = [
    "storey",
    "storey_index",
    "wall_id",
    "pier_id",
    "position",
    "start",
    "end",
    "Lw",
    "tw",
    "Hc",
    "Ho",
    "fc",
    "fsy",
    "rho_v",
    "rho_h",
    "v_layers",
    "h_layers",
    "cover",
    "wx",  # wall start, plan [m]
    "wy",
    "ux",  # unit vector along the wall, start -> end
    "uy",
    "wall_length",  # whole wall [m]
    "strip",  # height of the band holding the wall's openings at this storey [mm], NaN if none
    "v_dia",
    "v_spacing",
    "h_dia",
    "h_spacing",
    "core",  # core (group) ID of the wall; "" in a building without core IDs
    "edge_a",  # the pier's free edge at its start side: 'start' or 'opening K far'
    "edge_b",  # at its end side: 'end' or 'opening K near'
]
# End-zone bars at each side of a pier (a: its start side, b: its end side): bars over all
# faces (0: no zone), bar diameter, zone length [mm], tie diameter (0: none), tie spacing
ZONE_FIELDS = ("n", "dia", "len", "tie", "ties")
ZONE_COLUMNS = [f"z{side}_{k}" for side in "ab" for k in ZONE_FIELDS]
LINTEL_COLUMNS = [
    "storey",
    "storey_index",
    "wall_id",
    "lintel_id",
    "span",
    "depth",
    "tw",
    "head",
    "label",
    "cover",
    "fc",
    "fsy",
    "lintel_bars",
    "lintel_dia",
    "stirrup_dia",
    "stirrup_legs",
    "stirrup_spacing",
    "diag_bars",
    "diag_dia",
    "offset",  # opening's near edge from the wall start [m]
]


@dataclass(frozen=True)
class Geometry:
    """Piers (one row per storey x pier) and lintels (one row per storey x opening)."""

    piers: pd.DataFrame
    lintels: pd.DataFrame

    def members_at(self) -> dict[str, set[str]]:
        """Storey name -> every member ID an action may name there (piers, walls, lintels)."""
        out: dict[str, set[str]] = {}
        for storey, wall, pier in self.piers[["storey", "wall_id", "pier_id"]].itertuples(index=False):
            out.setdefault(storey, set()).update((wall, pier))
        for storey, lintel in self.lintels[["storey", "lintel_id"]].itertuples(index=False):
            out.setdefault(storey, set()).add(lintel)
        return out


def bar_ratio(layers, dia, spacing, thickness):
    """rho = n_layers * A_bar / (s * tw): steel area per unit of concrete section (numbers or
    arrays)."""
    out = layers * math.pi * dia**2
    if (
        isinstance(out, np.ndarray)
        and out.dtype == np.float64
        and out.ndim
        and out.base is None
        and np.broadcast_shapes(out.shape, np.shape(spacing), np.shape(thickness)) == out.shape
    ):
        # arrays (the advice search's rows x arrangements): the same operations in the same
        # order, divided into the product's own array instead of two more of its size
        out /= 4.0
        out /= spacing * thickness
        return out
    return out / 4.0 / (spacing * thickness)


def run_at(walls: list[WallRun], storeys: list[Storey]) -> dict[tuple[int, str], WallRun]:
    """(storey index, wall ID) -> the walls-sheet row that applies there."""
    index = {s.name: s.index for s in storeys}
    out: dict[tuple[int, str], WallRun] = {}
    for w in walls:
        for i in range(index[w.storey_from], index[w.storey_to] + 1):
            out[(i, w.wall_id)] = w
    return out


def openings_at(openings: list[Opening], storeys: list[Storey]) -> dict[tuple[int, str], list[Opening]]:
    """(storey index, wall ID) -> openings there, sorted along the wall."""
    index = {s.name: s.index for s in storeys}
    out: dict[tuple[int, str], list[Opening]] = {}
    for o in openings:
        for i in range(index[o.storey_from], index[o.storey_to] + 1):
            out.setdefault((i, o.wall_id), []).append(o)
    for lst in out.values():
        lst.sort(key=lambda o: o.offset)
    return out


def segments(length: float, cuts: list[Opening]) -> list[tuple[float, float, float]]:
    """Solid stretches (start, end, height of the taller neighbouring opening) along a wall [m].

    An opening at a wall end leaves no pier on that side. The neighbour height is the opening's
    clear height (head - sill): the free height of a pier between slab, sill and lintel.
    """
    out: list[tuple[float, float, float]] = []
    edge, left_h = 0.0, 0.0
    for o in cuts:
        h = o.head - o.sill
        if o.offset - edge > TOL:
            out.append((edge, o.offset, max(left_h, h)))
        edge, left_h = max(edge, o.offset + o.width), h
    if length - edge > TOL:
        out.append((edge, length, left_h))
    return out


def edge_label(which: str, k: int = 0) -> str:
    """The name of a pier's free edge as the end-zones sheet says it: 'start', 'end', or
    'opening K near' / 'opening K far'."""
    return which if which in ("start", "end") else f"opening {k} {which}"


def _edges(length: float, here: list[Opening], a: float, b: float) -> tuple[str, str]:
    """Labels of the free edges of the pier from a to b [m] along a wall with openings `here`
    (sorted along the wall, numbered from 1)."""
    ea = "start" if a <= TOL else ""
    eb = "end" if length - b <= TOL else ""
    for k, o in enumerate(here, start=1):
        if not ea and abs(o.offset + o.width - a) <= TOL:
            ea = edge_label("far", k)
        if not eb and abs(o.offset - b) <= TOL:
            eb = edge_label("near", k)
    return ea, eb


def zones_at(end_zones: list[EndZone], storeys: list[Storey]) -> dict[tuple[int, str, str], EndZone]:
    """(storey index, wall ID, edge label) -> the end-zones row that applies there."""
    index = {s.name: s.index for s in storeys}
    out: dict[tuple[int, str, str], EndZone] = {}
    for z in end_zones:
        for i in range(index[z.storey_from], index[z.storey_to] + 1):
            out[(i, z.wall_id, edge_label(z.which, z.opening))] = z
    return out


def derive(
    storeys: list[Storey],
    walls: list[WallRun],
    openings: list[Opening],
    end_zones: list[EndZone] | tuple = (),
) -> Geometry:
    """Cut every wall at every storey into piers; put a lintel over every opening; give each
    pier the end-zone bars at its two free edges."""
    runs = run_at(walls, storeys)
    cuts = openings_at(openings, storeys)
    pier_rows: list[tuple] = []
    lintel_rows: list[tuple] = []
    standing: dict[int, set[str]] = {}  # storey index -> wall IDs there (one pass over `runs`)
    for i, w in runs:
        standing.setdefault(i, set()).add(w)
    natural: dict[str, tuple] = {}  # each wall ID's sort key, made once (not per storey)
    per_run: dict[int, tuple] = {}  # each walls-sheet row's own numbers, worked out once
    # each walls-sheet row with the same openings (storeys alike) cuts into the same piers and
    # lintels: their columns but the storey's worked out once per distinct pair, by identity
    cut: dict[tuple, tuple] = {}
    for s in storeys:
        here_ids = standing.get(s.index, ())
        for wall_id in here_ids:
            if wall_id not in natural:
                natural[wall_id] = _natural(wall_id)
        wall_ids = sorted(here_ids, key=natural.__getitem__)
        hc = s.clear_height * 1000.0
        for wall_id in wall_ids:
            w = runs[(s.index, wall_id)]
            here = cuts.get((s.index, wall_id), [])
            key = (id(w), *map(id, here))
            parts = cut.get(key)
            if parts is None:
                own = per_run.get(id(w))
                if own is None:
                    own = per_run[id(w)] = _run_numbers(w)
                parts = cut[key] = _cut(wall_id, w, here, own)
            piers_here, lintels_here = parts
            for k, pier_id, a, b, lw, h_open, common, ea, eb in piers_here:
                pier_rows.append(
                    (s.name, s.index, wall_id, pier_id, k, a, b, lw, w.thickness, hc, h_open, *common, ea, eb)
                )
            for lintel_id, o, rest in lintels_here:
                depth = (s.height - o.head) * 1000.0  # head of opening to top of the slab above
                lintel_rows.append((s.name, s.index, wall_id, lintel_id, o.width, depth, *rest))
    piers = pd.DataFrame(pier_rows, columns=PIER_COLUMNS)
    piers = with_zones(piers, zones_at(list(end_zones), storeys))
    # plan end points and mid-point of each pier's centreline [m]
    for end, along in (("1", piers.start), ("2", piers.end)):
        piers["px" + end] = piers.wx + piers.ux * along
        piers["py" + end] = piers.wy + piers.uy * along
    piers["mx"], piers["my"] = (piers.px1 + piers.px2) / 2, (piers.py1 + piers.py2) / 2
    piers["supported_edges"] = supported_edges(piers)
    piers["H_wall"] = overall_height(piers, storeys)
    return Geometry(
        piers=piers,
        lintels=pd.DataFrame(lintel_rows, columns=LINTEL_COLUMNS),
    )


def _cut(wall_id: str, w: WallRun, here: list[Opening], own: tuple) -> tuple[list, list]:
    """A walls-sheet row `w` cut by its openings `here` (sorted along the wall): per pier its
    number, ID, ends [m], length [mm], neighbouring opening height [mm], the columns every pier
    of the row shares (`_run_numbers`) with the opening strip, and its free edges; per lintel its
    ID, opening and the columns after the depth. The same at every storey with these openings."""
    length, head, tail = own
    strip = max((o.head - o.sill for o in here), default=float("nan")) * 1000.0
    common = (*head, strip, *tail)
    if not here:
        return [(0, wall_id, 0.0, length, length * 1000.0, float("nan"), common, "start", "end")], []
    piers = [
        (k, f"{wall_id}-{k}", a, b, (b - a) * 1000.0, h_open * 1000.0, common, *_edges(length, here, a, b))
        for k, (a, b, h_open) in enumerate(segments(length, here), start=1)
    ]
    lintels = [
        (
            f"{wall_id}-L{k}",
            o,
            (
                w.thickness,
                o.head,
                o.label or "",
                w.cover,
                w.fc,
                w.fsy,
                _nan(o.lintel_bars),
                _nan(o.lintel_dia),
                _nan(o.stirrup_dia),
                _nan(o.stirrup_legs),
                _nan(o.stirrup_spacing),
                _nan(o.diag_bars),
                _nan(o.diag_dia),
                o.offset,
            ),
        )
        for k, o in enumerate(here, start=1)
    ]
    return piers, lintels


def _run_numbers(w: WallRun) -> tuple[float, tuple, tuple]:
    """A walls-sheet row's centreline length [m] and the pier columns it gives every pier of
    every storey it spans, before and after the opening strip (`derive`'s `common`): worked out
    once per row, not once per storey (the length is a square root per call)."""
    length = w.length
    rho_v = bar_ratio(w.v_layers, w.v_dia, w.v_spacing, w.thickness)
    rho_h = bar_ratio(w.h_layers, w.h_dia, w.h_spacing, w.thickness)
    ux, uy = (w.x2 - w.x1) / length, (w.y2 - w.y1) / length
    head = (w.fc, w.fsy, rho_v, rho_h, w.v_layers, w.h_layers, w.cover, w.x1, w.y1, ux, uy, length)
    return length, head, (w.v_dia, w.v_spacing, w.h_dia, w.h_spacing, w.core)


def with_zones(piers: pd.DataFrame, zones: dict[tuple[int, str, str], EndZone]) -> pd.DataFrame:
    """The piers with the ZONE_COLUMNS filled from `zones` (0, tie spacing NaN, where an edge
    has no zone)."""
    out = {c: np.full(len(piers), np.nan if c.endswith("_ties") else 0.0) for c in ZONE_COLUMNS}
    if zones:
        si, wid = piers.storey_index.tolist(), piers.wall_id.tolist()
        for side in "ab":
            for i, edge in enumerate(piers[f"edge_{side}"].tolist()):
                z = zones.get((si[i], wid[i], edge))
                if z is None:
                    continue
                values = (z.bars, z.dia, z.length, z.tie_dia or 0.0, z.tie_spacing)
                for k, v in zip(ZONE_FIELDS, values, strict=True):
                    out[f"z{side}_{k}"][i] = np.nan if v is None else v
    return piers.assign(**out)


def overall_height(piers: pd.DataFrame, storeys: list[Storey]) -> np.ndarray:
    """Overall height of each pier's wall [mm]: from the floor of the lowest storey the wall ID
    stands at to the top of the slab above its highest (the height in the Cl 11.6.3 aspect
    ratio by default; docs/engineering-basis.md, Geometry)."""
    if piers.empty:
        return np.zeros(0)
    base = {s.name: s.level for s in storeys}
    top = {s.name: s.level + s.height for s in storeys}
    lo = piers.storey.map(base).groupby(piers.wall_id).transform("min")
    hi = piers.storey.map(top).groupby(piers.wall_id).transform("max")
    return ((hi - lo) * 1000.0).to_numpy(dtype=float)


def supported_edges(piers: pd.DataFrame) -> np.ndarray:
    """How many of each pier's vertical edges are braced by a return wall (0, 1 or 2).

    An edge is braced where it is an end of its wall and another, non-parallel wall at the same
    storey passes within half its thickness (plus 10 mm) of that end point. Edges at openings
    are free.

    Worked on numpy arrays, storey by storey (each wall once: its first pier row); a pier takes
    its wall's result through the wall's group number, not a filter of the whole table per
    storey (that filter was most of the geometry's time at building scale).
    """
    if piers.empty:
        return np.zeros(0, dtype=int)
    wall_of = piers.groupby(["storey", "wall_id"], sort=False).ngroup().to_numpy()
    first = np.unique(wall_of, return_index=True)[1]  # each wall's first row, walls in order
    storey_of = pd.factorize(piers.storey.to_numpy()[first])[0]
    col = {k: piers[k].to_numpy(float) for k in ("wx", "wy", "ux", "uy", "wall_length", "tw")}
    braced = np.zeros((2, len(first)), dtype=bool)  # [start/end, wall]
    # storeys of one plan (the same walls in the same order) share the answer: it is a function
    # of these numbers alone, so it is worked out once per distinct set of them
    seen: dict[bytes, np.ndarray] = {}
    for c in range(storey_of.max() + 1):
        walls = np.flatnonzero(storey_of == c)
        plan = [col[k][first[walls]] for k in col]
        key = b"".join(a.tobytes() for a in plan)
        if key not in seen:
            seen[key] = _braced_ends(*plan)
        braced[:, walls] = seen[key]
    start, end = piers.start.to_numpy(float), piers.end.to_numpy(float)
    at_start = (start <= TOL) & braced[0, wall_of]
    at_end = (col["wall_length"] - end <= TOL) & braced[1, wall_of]
    return at_start.astype(int) + at_end.astype(int)


def _braced_ends(
    wx: np.ndarray, wy: np.ndarray, ux: np.ndarray, uy: np.ndarray, length: np.ndarray, tw: np.ndarray
) -> np.ndarray:
    """Whether each wall of one storey is braced at its start (row 0) and its end (row 1): a
    non-parallel wall's centreline passes within half its thickness plus 10 mm of that end."""
    reach = tw / 2000 + 0.01
    out = np.zeros((2, len(wx)), dtype=bool)
    for which, (ex, ey) in enumerate(((wx, wy), (wx + ux * length, wy + uy * length))):
        # distance from every wall end (rows) to every other wall's centreline (columns)
        t = np.clip((ex[:, None] - wx) * ux + (ey[:, None] - wy) * uy, 0.0, length)
        dist = np.hypot(ex[:, None] - (wx + ux * t), ey[:, None] - (wy + uy * t))
        crossing = np.abs(ux[:, None] * uy - uy[:, None] * ux) > 0.5  # not parallel (and not itself)
        out[which] = (crossing & (dist <= reach)).any(axis=1)
    return out


def _nan(x: float | None) -> float:
    return float("nan") if x is None or (isinstance(x, float) and math.isnan(x)) else float(x)


def _natural(text: str) -> tuple:
    """Sort key that puts W2 before W10."""
    return tuple(int(t) if t.isdigit() else t for t in re.split(r"(\d+)", text))


def natural_rank(ids: pd.Series) -> pd.Series:
    """Each ID's place in natural order (W2 before W10), worked out once per distinct ID: a
    sort key for tables of many rows."""
    distinct = sorted(pd.unique(ids), key=lambda t: _natural(str(t)))
    # hashed look-up of each row's rank (Series.map with a dict walks the rows in Python)
    return pd.Series(pd.Index(distinct).get_indexer(ids), index=ids.index, name=ids.name)
