"""Where a pier's vertical bars are: end-zone bars at its free edges and field bars between.

Engine code (no workbook). Positions are depths from the pier's start side [mm], vectorised
over piers. The layout (DEVELOPERS.md, "End zones"):

- an end zone of n bars over `layers` faces has n / layers bar positions, evenly spaced from
  cover + tie + db/2 at the free edge to tie + db/2 inside the zone's inner boundary (one
  position: at the free edge only); each position holds `layers` bars;
- the wall's own bars (the field) are evenly spaced at or closer than the given spacing from
  the innermost zone bar of one side to that of the other, those two excluded; at a side with
  no zone the field starts with a bar at cover + db/2 from the edge (so a pier without zones
  has the bars it always had).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import pandas as pd

from xlcore.codes.base import first_rows, row_keys
from xlcore.geometry import ZONE_COLUMNS


def bar_area(dia):
    return np.pi * np.asarray(dia, dtype=float) ** 2 / 4.0


def zone_positions(n, layers, dia, length, cover, tie) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per zone: positions per face (n / layers), the outer bar's distance from the free edge
    and the inner bar's (equal with one position) [mm]. Arrays; n = 0 means no zone."""
    n, layers, dia, length, cover, tie = (
        np.asarray(v, dtype=float) for v in (n, layers, dia, length, cover, tie)
    )
    per_face = np.where(n > 0, np.floor(n / np.maximum(layers, 1.0)), 0.0)
    outer = cover + tie + dia / 2
    inner = np.where(per_face > 1, length - tie - dia / 2, outer)
    return per_face, outer, inner


def zone_clear_gap(n, layers, dia, length, cover, tie) -> np.ndarray:
    """Clear gap between neighbouring bars of a zone along the wall [mm] (inf with one
    position per face)."""
    per_face, outer, inner = zone_positions(n, layers, dia, length, cover, tie)
    with np.errstate(divide="ignore", invalid="ignore"):
        pitch = (inner - outer) / (per_face - 1)
    return np.where(per_face > 1, pitch - np.asarray(dia, dtype=float), np.inf)


def zone_min_length(n, layers, dia, cover, tie, gap) -> np.ndarray:
    """Least zone length that holds n bars over `layers` faces with clear gap `gap` [mm]."""
    per_face = np.floor(np.asarray(n, dtype=float) / np.maximum(np.asarray(layers, dtype=float), 1.0))
    dia = np.asarray(dia, dtype=float)
    return cover + 2 * tie + per_face * dia + np.maximum(per_face - 1, 0) * gap


@dataclass(frozen=True)
class Layout:
    """Bars of rows of piers: the field (first depth, step, count, area per position) and the
    zone bars of both sides (rows x k depths and areas per position, zero area for padding)."""

    field_edge: np.ndarray
    field_step: np.ndarray
    field_count: np.ndarray
    field_area: np.ndarray
    zone_d: np.ndarray
    zone_A: np.ndarray

    def all_bars(self) -> tuple[np.ndarray, np.ndarray]:
        """Every bar position (rows x n, field first, padded with zero area) and its area."""
        width = int(self.field_count.max(initial=0))
        j = np.arange(width)[None, :]
        inside = j < self.field_count[:, None]
        d = np.where(inside, self.field_edge[:, None] + j * self.field_step[:, None], 0.0)
        A = np.where(inside, self.field_area[:, None], 0.0)
        return np.hstack([d, self.zone_d]), np.hstack([A, self.zone_A])


LAYOUT_COLUMNS = ("Lw", "v_dia", "v_spacing", "v_layers", "cover", *ZONE_COLUMNS)
"""The columns `layout` reads (the zone columns optional)."""


def _col(df: pd.DataFrame, key: str) -> np.ndarray:
    return df[key].to_numpy(dtype=float) if key in df else np.zeros(len(df))


def layout(df: pd.DataFrame) -> Layout:
    """The bars of the piers in `df` (columns Lw, v_dia, v_spacing, v_layers, cover and the
    geometry's zone columns; without zone columns: no zones)."""
    return layout_of({k: df[k].to_numpy(dtype=float) for k in LAYOUT_COLUMNS if k in df}, len(df))


def layout_of(cols: dict[str, np.ndarray], rows: int) -> Layout:
    """`layout` of the columns `cols` (float arrays by name, `rows` long; a zone column not
    given: zero), for a caller that holds them already as arrays (the axial check's sections)."""
    Lw, dia, spacing, layers, cover = (cols[k] for k in ("Lw", "v_dia", "v_spacing", "v_layers", "cover"))
    z = {c: np.nan_to_num(cols[c]) if c in cols else np.zeros(rows) for c in ZONE_COLUMNS}
    per_a, out_a, in_a = zone_positions(z["za_n"], layers, z["za_dia"], z["za_len"], cover, z["za_tie"])
    per_b, out_b, in_b = zone_positions(z["zb_n"], layers, z["zb_dia"], z["zb_len"], cover, z["zb_tie"])
    has_a, has_b = per_a > 0, per_b > 0
    edge = cover + dia / 2
    a0 = np.where(has_a, in_a, edge)
    b0 = Lw - np.where(has_b, in_b, edge)
    gaps = np.maximum(np.ceil((b0 - a0) / spacing), 1.0)
    step = (b0 - a0) / gaps
    count = gaps + 1 - has_a - has_b
    first = a0 + np.where(has_a, step, 0.0)
    k = int(max(per_a.max(initial=0), 0)), int(max(per_b.max(initial=0), 0))
    parts_d, parts_A = [], []
    for per, outer, inner, dz, from_end, kk in (
        (per_a, out_a, in_a, z["za_dia"], False, k[0]),
        (per_b, out_b, in_b, z["zb_dia"], True, k[1]),
    ):
        if kk == 0:
            continue
        j = np.arange(kk)[None, :]
        with np.errstate(divide="ignore", invalid="ignore"):
            pitch = np.where(per > 1, (inner - outer) / (per - 1), 0.0)
        pos = outer[:, None] + j * pitch[:, None]
        live = j < per[:, None]
        pos = np.where(from_end, Lw[:, None] - pos, pos)
        parts_d.append(np.where(live, pos, 0.0))
        parts_A.append(np.where(live, (layers * bar_area(dz))[:, None], 0.0))
    zone_d = np.hstack(parts_d) if parts_d else np.zeros((rows, 0))
    zone_A = np.hstack(parts_A) if parts_A else np.zeros((rows, 0))
    return Layout(first, step, count, layers * bar_area(dia), zone_d, zone_A)


def _n_bar(dia: float, n: float | None = None) -> str:
    """AS 3600's bar names ('N16', '8N28'): `describe`'s default."""
    return f"N{dia:g}" if n is None else f"{n:g}N{dia:g}"


def _once_each(name: Callable[..., str]) -> Callable[..., str]:
    """`name` called once per distinct (dia, n): a pier tower names the same few bars
    thousands of times (the standard's catalogue lookup per call was most of `describe`)."""
    seen: dict[tuple, str] = {}

    def named(*args) -> str:
        got = seen.get(args)
        if got is None:
            got = seen[args] = name(*args)
        return got

    return named


DESCRIBED = ("Lw", "v_dia", "v_spacing", "v_layers", "cover", *ZONE_COLUMNS, "edge_a", "edge_b")
"""The columns `describe` reads (`layout`'s and the edges' names)."""


def describe(df: pd.DataFrame, name: Callable[..., str] = _n_bar) -> list[str]:
    """The bars of each pier in words, e.g. 'start 8N28 in 600 mm; field 12 x 2N16 @ 191 mm;
    end none'; `name(dia, n=None)` names the bars (the standard's `Standard.bar_name`).

    Worded once per distinct set of the values read (`DESCRIBED`, floats bit for bit:
    `codes.base.row_keys`) and spread to the piers alike: a tower's storeys repeat a few
    (the L tower's 6 000 storey x pier rows, 8); each pier's words read its own row alone."""
    if len(df) < 2:
        return _describe(df, name)
    kinds = row_keys(*(df[c].to_numpy() for c in DESCRIBED if c in df))
    one = first_rows(kinds)
    if len(one) == len(df):
        return _describe(df, name)
    words = np.asarray(_describe(df.take(one), name), dtype=object)
    return words[kinds].tolist()


def _describe(df: pd.DataFrame, name: Callable[..., str]) -> list[str]:
    """`describe` of every row of `df`."""
    lay = layout(df)
    name = _once_each(name)
    out = []
    cols = [df[k].tolist() for k in ("v_layers", "v_dia")]
    zones = {c: _col(df, c).tolist() for c in ZONE_COLUMNS}
    edges = [df[k].tolist() if k in df else [""] * len(df) for k in ("edge_a", "edge_b")]
    for i in range(len(df)):
        layers, dia = int(cols[0][i]), cols[1][i]
        text = {}
        for side, edge in (("a", edges[0][i]), ("b", edges[1][i])):
            n = zones[f"z{side}_n"][i]
            if n > 0:
                tie = zones[f"z{side}_tie"][i]
                ties = f", ties {name(tie)} @ {zones[f'z{side}_ties'][i]:g}" if tie > 0 else ""
                size = f"{name(zones[f'z{side}_dia'][i], n)} in {zones[f'z{side}_len'][i]:g} mm"
                text[side] = f"{edge or side}: {size}{ties}"
        count = int(lay.field_count[i])
        step = lay.field_step[i]
        field = f"field {count} x {name(dia, layers)} @ {step:.0f} mm" if count else "no field bars"
        if not text:
            out.append(f"{field} (no end zones)")
            continue
        out.append("; ".join(t for t in (text.get("a"), field, text.get("b")) if t))
    return out
