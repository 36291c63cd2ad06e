"""Plan section of the core at a storey: walls as centreline rectangles, openings removed.

Plan units are m (areas m^2, second moments m^4). Each wall or pier is a rectangle of its
centreline length and thickness; where rectangles overlap at a corner the overlap is counted
once in the section, and the outer corner square is not added (centreline idealisation,
common practice, no source). What each member carries of an overlap (`shared_moments`) is an
equal share: half to each of two walls meeting at a corner, whatever their IDs or order.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pandas as pd
from shapely.geometry import MultiPolygon, Polygon
from shapely.geometry.polygon import orient


def rectangle(x1: float, y1: float, x2: float, y2: float, thickness_m: float) -> Polygon:
    """The plan rectangle of a wall or pier centreline with its thickness. A coordinate within
    a nanometre of zero is zero: the geometry library's overlaps go wrong on subnormal numbers
    (a corner at y = 2.2e-308 m gave a 50 % larger overlap, and pieces that no longer added up
    to the section)."""
    x1, y1, x2, y2 = (0.0 if abs(v) < 1e-9 else v for v in (x1, y1, x2, y2))
    dx, dy = x2 - x1, y2 - y1
    length = math.hypot(dx, dy)
    nx, ny = -dy / length * thickness_m / 2, dx / length * thickness_m / 2
    return Polygon([(x1 + nx, y1 + ny), (x2 + nx, y2 + ny), (x2 - nx, y2 - ny), (x1 - nx, y1 - ny)])


def disjoint_pieces(piers: pd.DataFrame) -> list[Polygon | MultiPolygon]:
    """Each pier's plan area less what the piers before it cover, so the pieces add up to the
    net section exactly (corner overlaps counted once)."""
    taken = None
    out = []
    for r in piers.itertuples(index=False):
        rect = rectangle(r.px1, r.py1, r.px2, r.py2, r.tw / 1000.0)
        out.append(rect if taken is None else rect.difference(taken))
        taken = rect if taken is None else taken.union(rect)
    return out


def shared_moments(piers: pd.DataFrame) -> np.ndarray:
    """Each pier's [A, Qx, Qy, Ixx0, Iyy0, Ixy0] (`moments`) with every overlap shared equally
    among the piers that cover it, rows in `piers`' order: a point covered by k rectangles
    counts 1/k to each. The rows add up to the net section (the union) as `disjoint_pieces` do,
    but no member's share depends on which is listed or named first (giving a corner to the
    first pier in ID order moved 5 % of a wall's N* and 14 % of a pier's M* when walls were
    renamed). By inclusion-exclusion over the piers' common parts: pier i gets
    sum over sets S holding i of (-1)^(|S|-1) / |S| x moments(intersection of S), which is
    1/k at a point covered k times, since sum over m of C(k-1, m-1) (-1)^(m-1) / m = 1/k.
    A pier that overlaps none keeps the moments of its own rectangle."""
    rects = [rectangle(r.px1, r.py1, r.px2, r.py2, r.tw / 1000.0) for r in piers.itertuples(index=False)]
    out = np.array([moments(r) for r in rects]) if rects else np.zeros((0, 6))
    touching = [
        [j for j in range(len(rects)) if j != i and rects[i].intersection(rects[j]).area > 0]
        for i in range(len(rects))
    ]

    def common(i: int, members: tuple[int, ...], shape, depth: int) -> None:
        # every set {i, members...} with members in increasing order, each set once per pier
        for j in touching[i]:
            if members and j <= members[-1]:
                continue
            part = shape.intersection(rects[j])
            if part.area <= 0:
                continue
            out[i] += (-1) ** depth / (depth + 1) * moments(part)
            common(i, (*members, j), part, depth + 1)

    for i in range(len(rects)):
        common(i, (), rects[i], 1)
    return out


def moments(shape: Polygon | MultiPolygon) -> np.ndarray:
    """[A, Qx, Qy, Ixx0, Iyy0, Ixy0] about the origin by the polygon (Green's theorem) formulas:
    Qx = int x dA, Qy = int y dA, Ixx0 = int y^2 dA, Iyy0 = int x^2 dA, Ixy0 = int x y dA."""
    total = np.zeros(6)
    polys = shape.geoms if isinstance(shape, MultiPolygon) else [shape]
    for poly in polys:
        if poly.is_empty:
            continue
        poly = orient(poly, 1.0)  # exterior anticlockwise, holes clockwise: signed sums subtract holes
        for ring in (poly.exterior, *poly.interiors):
            xy = np.asarray(ring.coords)
            x0, y0 = xy[:-1, 0], xy[:-1, 1]
            x1, y1 = xy[1:, 0], xy[1:, 1]
            c = x0 * y1 - x1 * y0
            total += [
                c.sum() / 2,
                ((x0 + x1) * c).sum() / 6,
                ((y0 + y1) * c).sum() / 6,
                ((y0**2 + y0 * y1 + y1**2) * c).sum() / 12,
                ((x0**2 + x0 * x1 + x1**2) * c).sum() / 12,
                ((x0 * y1 + 2 * x0 * y0 + 2 * x1 * y1 + x1 * y0) * c).sum() / 24,
            ]
    return total


@dataclass(frozen=True)
class CoreSection:
    """Net section properties about its centroid (m, m^2, m^4); angle of axis 1 from x [deg]."""

    area: float
    xc: float
    yc: float
    ixx: float  # int (y - yc)^2 dA
    iyy: float  # int (x - xc)^2 dA
    ixy: float  # int (x - xc)(y - yc) dA
    i1: float
    i2: float
    angle: float
    xmin: float
    xmax: float
    ymin: float
    ymax: float


def section_of(pieces: list[Polygon | MultiPolygon]) -> CoreSection:
    m = np.sum([moments(p) for p in pieces], axis=0)
    area, qx, qy, ixx0, iyy0, ixy0 = m
    xc, yc = qx / area, qy / area
    ixx, iyy, ixy = ixx0 - area * yc**2, iyy0 - area * xc**2, ixy0 - area * xc * yc
    mean, radius = (ixx + iyy) / 2, math.hypot((ixx - iyy) / 2, ixy)
    angle = 0.5 * math.degrees(math.atan2(-2 * ixy, ixx - iyy))
    bounds = np.array([p.bounds for p in pieces if not p.is_empty])
    values = (
        area,
        xc,
        yc,
        ixx,
        iyy,
        ixy,
        mean + radius,
        mean - radius,
        angle,
        bounds[:, 0].min(),
        bounds[:, 2].max(),
        bounds[:, 1].min(),
        bounds[:, 3].max(),
    )
    return CoreSection(*(float(v) for v in values))


def stress_plane(sec: CoreSection, n, mx, my):
    """Coefficients (a, b, c) of sigma = a + b (x - xc) + c (y - yc), compression positive,
    from N and moments with int sigma (y - yc) dA = Mx and int sigma (x - xc) dA = My
    (Mx compresses the +y side, My the +x side). Works for unsymmetric sections directly,
    equivalent to bending about the principal axes."""
    det = sec.iyy * sec.ixx - sec.ixy**2
    a = np.asarray(n, dtype=float) / sec.area
    b = (sec.ixx * np.asarray(my, dtype=float) - sec.ixy * np.asarray(mx, dtype=float)) / det
    c = (sec.iyy * np.asarray(mx, dtype=float) - sec.ixy * np.asarray(my, dtype=float)) / det
    return a, b, c


def stress_at(sec: CoreSection, a, b, c, x, y):
    """sigma = a + b (x - xc) + c (y - yc) at plan points, for the coefficients of `stress_plane`."""
    return a + b * (x - sec.xc) + c * (y - sec.yc)


def piece_forces(sec: CoreSection, piece_moments: np.ndarray, a, b, c) -> np.ndarray:
    """Axial force on each piece, int sigma dA, for stress planes (one per column of a, b, c).

    piece_moments: rows of [A, Qx, Qy, ...] per piece. Returns pieces x planes."""
    area, qx, qy = piece_moments[:, 0:1], piece_moments[:, 1:2], piece_moments[:, 2:3]
    return area * a + (qx - sec.xc * area) * b + (qy - sec.yc * area) * c
