"""Biaxial strength of an assembly of wall rectangles (L, C, box, whole cores) by strain
compatibility at any neutral-axis angle. Section mechanics: the stress block and constants are
passed in. N and mm; compression positive; moments about a given point, with
Mx = sum F (y - yc) (compresses +y when positive) and My = sum F (x - xc).

Concrete is cut into fibres (short strips of each wall, a few across its thickness); a fibre
partly inside the stress block counts in proportion to the part of its extent (measured normal
to the neutral axis) that lies inside. A fibre inside k walls' rectangles (a corner overlap)
counts 1/k of its area, so the overlap counts once whichever wall is listed or named first,
with the mean of the walls' f'c. Bars sit at their positions and displace concrete in the block.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass
class Assembly:
    """Fibres, bars and outline of several sections, padded to common lengths (zero area)."""

    fx: np.ndarray  # sections x fibres
    fy: np.ndarray
    fa: np.ndarray
    fe_ux: np.ndarray  # half extent vectors of each fibre along and across its wall
    fe_uy: np.ndarray
    fe_vx: np.ndarray
    fe_vy: np.ndarray
    fc: np.ndarray
    alpha2: np.ndarray
    gamma: np.ndarray
    bx: np.ndarray  # sections x bars
    by: np.ndarray
    ba: np.ndarray
    fsy: np.ndarray
    vx: np.ndarray  # sections x outline vertices (NaN padded)
    vy: np.ndarray
    xc: np.ndarray  # moment reference point per section
    yc: np.ndarray
    eps_cu: float = 0.003
    Es: float = 200_000.0


def build(
    walls: list[list[tuple]],
    fibre: float = 50.0,
    across: int = 4,
    block=None,
    centroid: list[tuple[float, float]] | None = None,
) -> Assembly:
    """Assemble sections from wall lists. Each wall: (x1, y1, x2, y2, t, fc, fsy, bars) in mm,
    where bars is a list of (offset along the wall from its start, offset across from the
    centreline, area). `block(fc)` gives (alpha2, gamma). Moments are about `centroid` or the
    concrete centroid of each section."""
    secs = [_one(ws, fibre, across) for ws in walls]
    nf = max(len(s["fx"]) for s in secs)
    nb = max(max(len(s["bx"]) for s in secs), 1)
    nv = max(len(s["vx"]) for s in secs)

    def pad(key, n, fill=0.0):
        return np.array([np.pad(s[key], (0, n - len(s[key])), constant_values=fill) for s in secs])

    fa = pad("fa", nf)
    fx, fy = pad("fx", nf), pad("fy", nf)
    if centroid is None:
        xc = (fa * fx).sum(axis=1) / fa.sum(axis=1)
        yc = (fa * fy).sum(axis=1) / fa.sum(axis=1)
    else:
        xc, yc = (np.array(v, dtype=float) for v in zip(*centroid, strict=True))
    fc = pad("fc", nf, 40.0)
    a2, g = block(fc)
    return Assembly(
        fx,
        fy,
        fa,
        pad("eux", nf),
        pad("euy", nf),
        pad("evx", nf),
        pad("evy", nf),
        fc,
        a2,
        g,
        pad("bx", nb),
        pad("by", nb),
        pad("ba", nb),
        pad("fsy", nb, 500.0),
        pad("vx", nv, np.nan),
        pad("vy", nv, np.nan),
        xc,
        yc,
    )


def _one(walls: list[tuple], fibre: float, across: int) -> dict[str, np.ndarray]:
    keys = ("fx", "fy", "fa", "eux", "euy", "evx", "evy", "fc", "bx", "by", "ba", "fsy", "vx", "vy")
    out: dict[str, list[np.ndarray]] = {k: [] for k in keys}
    rects = []
    for x1, y1, x2, y2, t, *_ in walls:
        L = float(np.hypot(x2 - x1, y2 - y1))
        rects.append((x1, y1, (x2 - x1) / L, (y2 - y1) / L, L, t))
    for (x1, y1, ux, uy, L, t), (*_, fc, fsy, bars) in zip(rects, walls, strict=True):
        vx, vy = -uy, ux
        n_along = max(int(np.ceil(L / fibre)), 1)
        s = (np.arange(n_along) + 0.5) * L / n_along
        r = (np.arange(across) + 0.5) * t / across - t / 2
        S, R = np.meshgrid(s, r, indexing="ij")
        px, py = (x1 + ux * S + vx * R).ravel(), (y1 + uy * S + vy * R).ravel()
        covers = _covering(px, py, rects)  # 1 but in a corner overlap (its own wall among them)
        count = len(px)
        out["fx"].append(px)
        out["fy"].append(py)
        out["fa"].append(L / n_along * t / across / covers)
        for key, value in (
            ("eux", ux * L / n_along / 2),
            ("euy", uy * L / n_along / 2),
            ("evx", vx * t / across / 2),
            ("evy", vy * t / across / 2),
            ("fc", fc),
        ):
            out[key].append(np.full(count, value, dtype=float))
        if bars:
            along, off, area = (np.array(c, dtype=float) for c in zip(*bars, strict=True))
            out["bx"].append(x1 + ux * along + vx * off)
            out["by"].append(y1 + uy * along + vy * off)
            out["ba"].append(area)
            out["fsy"].append(np.full(len(bars), fsy, dtype=float))
        for sa, sb in ((0, -t / 2), (L, -t / 2), (L, t / 2), (0, t / 2)):
            out["vx"].append(np.array([x1 + ux * sa + vx * sb], dtype=float))
            out["vy"].append(np.array([y1 + uy * sa + vy * sb], dtype=float))
    return {k: np.concatenate(v) if v else np.zeros(0) for k, v in out.items()}


def _covering(px: np.ndarray, py: np.ndarray, rects: list[tuple]) -> np.ndarray:
    """How many of the rectangles (x1, y1, ux, uy, L, t) each point lies inside (a wall's
    centreline from (x1, y1) along (ux, uy), L long, t thick), at least 1: the fibres' own
    wall, should rounding put a centre on its edge outside it."""
    ax, ay, aux, auy, a_len, a_t = (np.array(c, dtype=float)[None, :] for c in zip(*rects, strict=True))
    dx, dy = px[:, None] - ax, py[:, None] - ay
    along = dx * aux + dy * auy
    off = -dx * auy + dy * aux
    inside = (along >= 0) & (along <= a_len) & (np.abs(off) <= a_t / 2)
    return np.maximum(inside.sum(axis=1), 1)


def _frame(a: Assembly, idx, theta):
    """Compression direction n and, per fibre, bar and vertex, the depth below the extreme
    compressive fibre along n."""
    nx, ny = -np.sin(theta)[:, None], np.cos(theta)[:, None]
    along = a.vx[idx] * nx + a.vy[idx] * ny  # once for both (the same numbers)
    top = np.nanmax(along, axis=1)[:, None]
    bottom = np.nanmin(along, axis=1)[:, None]
    return nx, ny, top, bottom


@dataclass
class Frame:
    """Everything about a set of cases (section, angle) that does not depend on dn."""

    depth: np.ndarray  # fibre depth below the extreme compressive fibre, cases x fibres
    ext: np.ndarray  # half extent of each fibre normal to the neutral axis
    gamma: np.ndarray
    full: np.ndarray  # alpha2 f'c A of each fibre
    fy: np.ndarray  # lever arms about the reference point
    fx: np.ndarray
    bdepth: np.ndarray  # cases x bars
    ba: np.ndarray
    fsy: np.ndarray
    bar_gamma: np.ndarray  # cases x 1
    bar_conc: np.ndarray
    by: np.ndarray
    bx: np.ndarray
    eps_cu: float
    Es: float

    def row(self, i: int) -> Frame:
        """The frame of case `i` alone (views of its rows): what `frame` makes for that case."""
        cut = slice(i, i + 1)
        arrays = {k: v[cut] for k, v in vars(self).items() if isinstance(v, np.ndarray)}
        return Frame(**arrays, eps_cu=self.eps_cu, Es=self.Es)


def frame(a: Assembly, idx, theta) -> Frame:
    idx = np.asarray(idx)
    theta = np.asarray(theta, dtype=float)
    nx, ny, top, _ = _frame(a, idx, theta)
    conc = a.alpha2[idx] * a.fc[idx]
    # each per-case array gathered once (cases x fibres; the core checks' frames are large)
    fa, gamma, fx, fy, bx, by = (g[idx] for g in (a.fa, a.gamma, a.fx, a.fy, a.bx, a.by))
    live = fa > 0
    xc, yc = a.xc[idx][:, None], a.yc[idx][:, None]
    return Frame(
        depth=top - (fx * nx + fy * ny),
        ext=np.abs(a.fe_ux[idx] * nx + a.fe_uy[idx] * ny) + np.abs(a.fe_vx[idx] * nx + a.fe_vy[idx] * ny),
        gamma=gamma,
        full=conc * fa,
        fy=fy - yc,
        fx=fx - xc,
        bdepth=top - (bx * nx + by * ny),
        ba=a.ba[idx],
        fsy=a.fsy[idx],
        bar_gamma=np.min(np.where(live, gamma, np.inf), axis=1, keepdims=True),
        bar_conc=np.min(np.where(live, conc, np.inf), axis=1, keepdims=True),
        by=by - yc,
        bx=bx - xc,
        eps_cu=a.eps_cu,
        Es=a.Es,
    )


def _element_forces(f: Frame, dn) -> tuple[np.ndarray, np.ndarray]:
    """Concrete and bar forces at depths `dn` (cases x fibres, cases x bars). Worked in place
    on one array each, in the order of the expression it replaces (the same numbers to the
    last bit: each step is the same operation on the same operands), so that a curve of a
    hundred depths over ten thousand fibres does not allocate six arrays of its size."""
    dn = np.asarray(dn, dtype=float)[:, None]
    # inside = clip((gamma dn - depth + ext) / max(2 ext, 1e-9), 0, 1); fcon = full x inside
    fcon = np.subtract(f.gamma * dn, f.depth)
    fcon += f.ext
    fcon /= np.maximum(2 * f.ext, 1e-9)
    np.clip(fcon, 0.0, 1.0, out=fcon)
    fcon *= f.full
    # strain = eps_cu (dn - bdepth) / dn; stress = clip(Es strain, -fsy, fsy)
    fbar = np.subtract(dn, f.bdepth)
    fbar *= f.eps_cu
    fbar /= dn
    fbar *= f.Es
    np.clip(fbar, -f.fsy, f.fsy, out=fbar)
    # less the concrete the bar displaces inside the block; times the bar's area
    fbar -= np.where(f.bdepth <= f.bar_gamma * dn, f.bar_conc, 0.0)
    fbar *= f.ba
    return fcon, fbar


def axial(f: Frame, dn) -> np.ndarray:
    fcon, fbar = _element_forces(f, dn)
    return fcon.sum(axis=1) + fbar.sum(axis=1)


def forces_in(f: Frame, dn) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    fcon, fbar = _element_forces(f, dn)
    n = fcon.sum(axis=1) + fbar.sum(axis=1)
    arm = np.multiply(fcon, f.fy)  # one array for both lever-arm products (the same sums)
    mx = arm.sum(axis=1) + (fbar * f.by).sum(axis=1)
    my = np.multiply(fcon, f.fx, out=arm).sum(axis=1) + (fbar * f.bx).sum(axis=1)
    return n, mx, my


def forces(a: Assembly, idx, theta, dn) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Nominal (N, Mx, My) for cases: section index, neutral-axis angle and depth per case."""
    return forces_in(frame(a, idx, theta), dn)


def full_depth(a: Assembly, idx, theta) -> np.ndarray:
    _, _, top, bottom = _frame(a, np.asarray(idx), np.asarray(theta, dtype=float))
    return (top - bottom)[:, 0]


def extreme_bar_depth(a: Assembly, idx, theta) -> np.ndarray:
    idx = np.asarray(idx)
    nx, ny, top, _ = _frame(a, idx, np.asarray(theta, dtype=float))
    d = top - (a.bx[idx] * nx + a.by[idx] * ny)
    return np.where(a.ba[idx] > 0, d, -np.inf).max(axis=1)


def solve_dn(
    a: Assembly, idx, theta, target, lo, hi, iterations: int = 50, scale=None, fr: Frame | None = None
) -> np.ndarray:
    """Neutral-axis depth with N(dn) (or N x scale(N)) equal to target, bisection on all cases."""
    fr = fr if fr is not None else frame(a, idx, theta)
    lo, hi = np.asarray(lo, dtype=float).copy(), np.asarray(hi, dtype=float).copy()
    for _ in range(iterations):
        mid = 0.5 * (lo + hi)
        n = axial(fr, mid)
        g = n * scale(n) if scale else n
        below = g < target
        lo, hi = np.where(below, mid, lo), np.where(below, hi, mid)
    return 0.5 * (lo + hi)
