"""Biaxial strength of the whole core at each storey and combination, by strain compatibility
over every wall and pier of the net section, to the Project's design standard (AS 3600:2018
Cl 8.1.3, 10.6.2.2, Table 2.2.2; ACI 318-19 22.2, 22.4, Tables 21.2.2 and 22.4.2.1): the stress
block, squash and tension strength, phi at each nominal point and the upper limit on N* are the
standard's (`codes.base.Standard`)."""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore.checks import plain
from xlcore.checks.axial import pier_bars
from xlcore.codes import get_standard
from xlcore.codes.base import SectionState, Standard
from xlcore.geometry import ZONE_COLUMNS
from xlcore.mechanics import nm_core
from xlcore.model import Settings
from xlcore.results import FAIL, PASS

ANGLES = 24  # neutral-axis directions around the full circle (15 degrees apart)
FIBRE = 100.0  # mm along each wall
ACROSS = 4  # fibres across each wall's thickness (within 1 % of exact clipping: tests)
SAMPLES = 96  # points on each design curve between pure bending and decompression


def storey_assemblies(
    piers: pd.DataFrame, plans: dict, storeys: list[str], std: Standard | None = None
) -> nm_core.Assembly:
    """One section per storey from its piers (plan in mm), moments about the net centroid; the
    stress block of `std` (default AS 3600)."""
    std = std or get_standard("AS 3600:2018")
    walls_per_storey, centroids = [], []
    rows_at = piers.groupby("storey", sort=False).indices  # the storeys asked only, not every one
    for storey in storeys:
        sp = piers.iloc[rows_at[storey]]
        d, area = pier_bars(
            *(sp[k].to_numpy(dtype=float) for k in ("Lw", "tw", "v_dia", "v_spacing", "v_layers", "cover")),
            zones=sp,
        )
        walls = []
        for i, p in enumerate(sp.itertuples(index=False)):
            # every bar position (field and end zones) holds one bar per layer, the layers at
            # cover + db/2 of the wall's own bars from each face
            off = p.tw / 2 - p.cover - p.v_dia / 2
            offsets = (-off, off) if p.v_layers >= 2 else (0.0,)
            share = 1.0 / len(offsets)
            bars = [
                (dd, o, aa * share) for dd, aa in zip(d[i], area[i], strict=True) if aa > 0 for o in offsets
            ]
            walls.append((p.px1 * 1000, p.py1 * 1000, p.px2 * 1000, p.py2 * 1000, p.tw, p.fc, p.fsy, bars))
        walls_per_storey.append(walls)
        sec = plans[storey].section
        centroids.append((sec.xc * 1000, sec.yc * 1000))
    return nm_core.build(
        walls_per_storey,
        fibre=FIBRE,
        across=ACROSS,
        block=std.stress_block,
        centroid=centroids,
    )


def _key_columns(sp: pd.DataFrame) -> list[str]:
    """What a storey's section is made from (`storey_assemblies`), beside its centroid."""
    cols = ["px1", "py1", "px2", "py2", "tw", "fc", "fsy", "v_dia", "v_spacing", "v_layers", "cover"]
    return cols + [c for c in ZONE_COLUMNS if c in sp and not c.endswith("_ties")]


def _section_key(sp: pd.DataFrame, sec) -> tuple:
    return _key_of(sp[_key_columns(sp)].round(6).to_numpy(), sec)


def _key_of(values: np.ndarray, sec, seen: dict | None = None) -> tuple:
    """A storey's section key from its piers' rounded key columns (`_key_columns`). `seen`:
    the rows' tuples of earlier storeys by their bytes, so that storeys alike make them once
    (numbers without NaN only: equal bytes are then equal tuples, and a NaN, equal to no other,
    keeps its storey's key apart as before)."""
    if seen is None or values.dtype.kind != "f" or np.isnan(values).any():
        rows = tuple(map(tuple, values))
    else:
        raw = (values.shape, values.tobytes())
        rows = seen.get(raw)
        if rows is None:
            rows = seen[raw] = tuple(map(tuple, values))
    return (rows, round(sec.xc, 9), round(sec.yc, 9))


def check_core_nm(
    piers: pd.DataFrame,
    plans: dict,
    core: pd.DataFrame,
    settings: Settings,
    *,
    std: Standard | None = None,
) -> pd.DataFrame:
    """One row per storey x combination: design moment capacity in the direction of (Mx*, My*)
    at N*, interpolated between neutral-axis angles 15 degrees apart, and the utilisation."""
    std = std or get_standard(settings.standard)
    if core.empty:
        return pd.DataFrame()
    phi0 = settings.phi_compression if settings.phi_compression is not None else std.phi_compression
    # storeys with the same walls, grades and bars share one section: solve each section once
    by_key: dict[tuple, str] = {}
    section_of = {}
    # the key columns rounded once for every storey, each storey's rows sliced by position (a
    # sub-table per storey cost more than the sections' keys themselves); the same keys
    values = piers[_key_columns(piers)].round(6).to_numpy()
    rows_at = piers.groupby("storey", sort=False).indices
    storey_of, distinct = _storeys(core.storey.to_numpy())
    rows_of: dict = {}  # storeys alike: their rows' tuples made once
    for storey in distinct:
        key = _key_of(values[rows_at[storey]], plans[storey].section, rows_of)
        section_of[storey] = by_key.setdefault(key, storey)
    storeys = list(by_key.values())
    asm = storey_assemblies(piers, plans, storeys, std)
    s_index = {s: i for i, s in enumerate(storeys)}
    theta = np.linspace(-np.pi, np.pi, ANGLES, endpoint=False)
    # per section x angle: the key points of the interaction diagram
    si = np.repeat(np.arange(len(storeys)), ANGLES)
    th = np.tile(theta, len(storeys))
    full = nm_core.full_depth(asm, si, th)
    d0 = nm_core.extreme_bar_depth(asm, si, th)
    # one frame of every section x angle for the solve, the key points and the curves (each
    # row's numbers are its own: a frame of one row alone is the same)
    fr = nm_core.frame(asm, si, th)
    dn0 = nm_core.solve_dn(asm, si, th, 0.0, 1e-3 * full, full, fr=fr)
    _, mx0, my0 = nm_core.forces_in(fr, dn0)
    kuo = dn0 / d0
    dn_b = d0 * asm.eps_cu / (asm.eps_cu + asm.fsy.max(axis=1)[si] / asm.Es)
    nub, _, _ = nm_core.forces_in(fr, dn_b)
    nd, mxd, myd = nm_core.forces_in(fr, full)
    fa, fc, ba, fsy = asm.fa, asm.fc, asm.ba, asm.fsy
    # the standard's squash load fibre by fibre and bar by bar (AS alpha1 f'c, fsy <= 0.0025 Es;
    # ACI 0.85 f'c, fy <= 550 MPa), less the concrete the bars displace
    conc = std.squash_load(fc, fa, 0.0, 0.0)
    steel = std.squash_load(0.0, 0.0, ba, fsy)
    area_bars = ba.sum(axis=1)
    nuo = conc.sum(axis=1) + steel.sum(axis=1) - area_bars * std.squash_load(fc, 1.0, 0.0, 0.0).min(axis=1)
    mx_sq = (conc * (asm.fy - asm.yc[:, None])).sum(axis=1) + (steel * (asm.by - asm.yc[:, None])).sum(axis=1)
    my_sq = (conc * (asm.fx - asm.xc[:, None])).sum(axis=1) + (steel * (asm.bx - asm.xc[:, None])).sum(axis=1)
    bar_t = std.tension_capacity(ba, fsy)
    nuot = bar_t.sum(axis=1)
    mx_t = (bar_t * (asm.by - asm.yc[:, None])).sum(axis=1)
    my_t = (bar_t * (asm.bx - asm.xc[:, None])).sum(axis=1)
    fy_max = asm.fsy.max(axis=1)[si]

    def phi_at(n, dn, rows):  # the standard's phi at nominal points of section x angle `rows`
        state = SectionState(
            nu=n, dn=dn, d0=d0[rows], fy=fy_max[rows], nub=nub[rows], nuot=nuot[si[rows]], kuo=kuo[rows],
            eps_cu=asm.eps_cu, Es=asm.Es,
        )  # fmt: skip
        return std.phi_axial_bending(state, phi0)

    every = np.arange(len(si))
    phi_b = phi_at(np.zeros(len(si)), dn0, every)
    phi_d = phi_at(nd, full, every)

    # design curves between pure bending and decompression, sampled densely in dn (geometric
    # spacing), then read at each N* by interpolation on phi(Nu) Nu, which rises with dn
    u = np.linspace(0.0, 1.0, SAMPLES)
    dn_s = dn0[:, None] * (full / dn0)[:, None] ** u[None, :]  # rows x samples
    rows_s = np.repeat(np.arange(len(si)), SAMPLES)
    n_s, mx_s, my_s = _curve_points(asm, si, th, dn_s, fr)
    phi_s = phi_at(n_s, dn_s.ravel(), rows_s)
    dn_curve = (phi_s * n_s).reshape(-1, SAMPLES)
    dmx_curve = (phi_s * mx_s).reshape(-1, SAMPLES)
    dmy_curve = (phi_s * my_s).reshape(-1, SAMPLES)

    case_storey = np.array([s_index[section_of[x]] for x in distinct])[storey_of]
    n_star = core.n.to_numpy(dtype=float) * 1e3
    ci = np.repeat(np.arange(len(core)), ANGLES)  # case of each (case, angle) pair
    kk = case_storey[ci] * ANGLES + np.tile(np.arange(ANGLES), len(core))  # its section x angle row
    idx = si[kk]
    target = np.clip(n_star[ci], 0.0, phi_d[kk] * nd[kk])
    px, py = _on_curves(target, case_storey, dn_curve, dmx_curve, dmy_curve)
    # above decompression a straight line to phi0 x squash (AS: phi0 Nuo, its upper limit)
    line_end, bottom = phi0 * nuo[idx], std.phi_tension * nuot[idx]
    above = n_star[ci] > phi_d[kk] * nd[kk]
    up = np.clip((n_star[ci] - phi_d[kk] * nd[kk]) / np.maximum(line_end - phi_d[kk] * nd[kk], 1e-9), 0, 1)
    px = np.where(above, phi_d[kk] * mxd[kk] * (1 - up) + phi0 * mx_sq[idx] * up, px)
    py = np.where(above, phi_d[kk] * myd[kk] * (1 - up) + phi0 * my_sq[idx] * up, py)
    tension = n_star[ci] < 0
    down = np.clip(n_star[ci] / bottom, 0, 1)
    px = np.where(tension, phi_b[kk] * mx0[kk] * (1 - down) + std.phi_tension * mx_t[idx] * down, px)
    py = np.where(tension, phi_b[kk] * my0[kk] * (1 - down) + std.phi_tension * my_t[idx] * down, py)
    px, py = px.reshape(len(core), ANGLES), py.reshape(len(core), ANGLES)

    return _rows(core, std, phi0, nuo[case_storey], nuot[case_storey], px, py)


def _on_curves(target: np.ndarray, section: np.ndarray, dn_curve, dmx_curve, dmy_curve):
    """Each (case, angle) pair's point on its section x angle design curve at `target` (pairs
    case-major, `section` each case's section): per section its cases taken once, then each
    angle's column of them (not every pair compared with every curve's row: 144 000 pairs x 24
    curves at the L tower). Interpolation is point by point, so the same numbers."""
    t = target.reshape(len(section), ANGLES)
    px, py = np.empty(t.shape), np.empty(t.shape)
    for sec in np.unique(section):
        cases = np.flatnonzero(section == sec)
        for angle in range(ANGLES):
            row = sec * ANGLES + angle
            px[cases, angle] = np.interp(t[cases, angle], dn_curve[row], dmx_curve[row])
            py[cases, angle] = np.interp(t[cases, angle], dn_curve[row], dmy_curve[row])
    return px.ravel(), py.ravel()


def _storeys(storey: np.ndarray) -> tuple[np.ndarray, list]:
    """Each case's storey as a position in the distinct storeys (in order of first appearance,
    `dict.fromkeys`' order), found by hashing the column once: the cases' sections are looked
    up per storey, not per case (6 000 at the L tower). By the dictionary itself where a storey
    is not text (a dictionary and factorize could tell other values apart differently)."""
    codes, distinct = pd.factorize(storey)
    if (codes < 0).any() or not all(isinstance(s, str) for s in distinct):
        distinct = list(dict.fromkeys(storey))
        at = {s: i for i, s in enumerate(distinct)}
        return np.array([at[s] for s in storey], dtype=np.intp), distinct
    return codes, list(distinct)


def _curve_points(
    asm: nm_core.Assembly, si: np.ndarray, th: np.ndarray, dn_s: np.ndarray, fr: nm_core.Frame | None = None
):
    """Nominal (N, Mx, My) at every sampled depth (`dn_s`, section x angle rows x samples),
    flat in the rows' order. Each section x angle's row of the frame (`fr`, made where not
    given), its samples broadcast against it: the frame depends on the section and angle
    only, and building it for every sample was most of the core check's time (the same
    numbers: each fibre's arithmetic is unchanged)."""
    fr = fr if fr is not None else nm_core.frame(asm, si, th)
    n_s, mx_s, my_s = (np.empty(dn_s.shape) for _ in range(3))
    for row in range(len(dn_s)):
        n_s[row], mx_s[row], my_s[row] = nm_core.forces_in(fr.row(row), dn_s[row])
    return n_s.ravel(), mx_s.ravel(), my_s.ravel()


def _rows(
    core: pd.DataFrame,
    std: Standard,
    phi0: float,
    nuo: np.ndarray,
    nuot: np.ndarray,
    px: np.ndarray,
    py: np.ndarray,
) -> pd.DataFrame:
    """The result table, every case at once: `nuo`, `nuot` per case, `px`, `py` the capacity
    contour of each case (cases x angles). Vectorised over the cases (a loop of 6 000 rows
    at the L tower), the numbers as the scalar rules: `_along`, the standard's limits."""
    sym = std.symbols
    cut = f"; N* not above {sym['top']}" if std.max_compression_ratio < 1.0 else ""
    n_kn, mx, my = (core[k].to_numpy() for k in ("n", "mx", "my"))
    n_star = n_kn.astype(float) * 1e3
    # the standard's upper limit on N* (AS phi0 Nuo; ACI phi 0.80 Po, a flat cut)
    t_top, t_bottom = phi0 * nuo * std.max_compression_ratio, std.phi_tension * nuot
    dx, dy = mx.astype(float) * 1e6, my.astype(float) * 1e6
    cap = _along_rows(px, py, dx, dy)
    m_star = np.hypot(dx, dy)
    with np.errstate(divide="ignore", invalid="ignore"):
        m_ratio = np.where(cap > 0, m_star / cap, np.where(m_star > 0, np.inf, 0.0))
        m_ratio = np.where((n_star > t_top) | (n_star < t_bottom), 0.0, m_ratio)  # the axial ratio tells
        n_ratio = np.where(n_star >= 0, n_star / t_top, n_star / t_bottom)
    util = np.where(n_ratio > m_ratio, n_ratio, m_ratio)  # max(m_ratio, n_ratio), NaN as Python's max
    region_t = f"tension: linear from pure bending to {std.phi_tension:.2f} {sym['tension']}"
    region_c = f"strain compatibility at N* (above decompression: linear to phi {sym['squash']}{cut})"
    working = [
        f"{region_t if n < 0 else region_c}; contour at N* = {n:.0f} kN over {ANGLES} neutral-axis angles; "
        f"phiMu along M* = {c / 1e6:.0f} kNm; U = max(M*/phiMu = {m / 1e6:.0f} / "
        f"{c / 1e6:.0f}, {_axial_text(n, top, bottom, sym)}) = {u:.3f}"
        for n, c, m, top, bottom, u in zip(*plain(n_kn, cap, m_star, t_top, t_bottom, util), strict=True)
    ]
    return pd.DataFrame(
        dict(
            row=core.row.to_numpy(),
            storey=core.storey.to_numpy(),
            combination=core.combination.to_numpy(),
            n=n_kn,
            mx=mx,
            my=my,
            m_res=m_star / 1e6,
            phi_mu=cap / 1e6,
            phi_nuo=t_top / 1e3,
            phi_nuot=t_bottom / 1e3,
            util=util,
            status=np.where(util <= 1.0, PASS, FAIL),
            governs=np.where(n_ratio >= m_ratio, "axial", "moment at N*"),
            clause=sym["clause_core"],
            working=working,
        )
    )


def _axial_text(n: float, t_top: float, t_bottom: float, sym) -> str:
    """The axial ratio with its numbers: compression against the standard's upper limit (AS
    phi Nuo), tension against the factored tension capacity (both in N here, shown in kN)."""
    if n >= 0:
        return f"N*/{sym['top']} = {n:.0f} / {t_top / 1e3:.0f}"
    return f"N*/phi{sym['tension']} = {n:.0f} / {t_bottom / 1e3:.0f}"


def _along(px: np.ndarray, py: np.ndarray, demand: np.ndarray) -> float:
    """Distance from the origin to the capacity contour (closed polygon px, py) along `demand`.
    With no moment demand, the capacity in the weakest direction."""
    return float(_along_rows(px[None, :], py[None, :], demand[:1], demand[1:])[0])


def _along_rows(px: np.ndarray, py: np.ndarray, dx: np.ndarray, dy: np.ndarray) -> np.ndarray:
    """`_along` of every case at once: contours px, py (cases x vertices), demands dx, dy."""
    norm = np.hypot(dx, dy)
    zero = norm == 0
    with np.errstate(divide="ignore", invalid="ignore"):
        d0, d1 = (dx / norm)[:, None], (dy / norm)[:, None]
        ax, ay = px, py
        bx, by = np.roll(px, -1, axis=1), np.roll(py, -1, axis=1)
        ex, ey = bx - ax, by - ay
        denom = d0 * ey - d1 * ex
        t = (ax * ey - ay * ex) / denom  # distance along the ray
        s = (ax * d1 - ay * d0) / denom  # position along the segment
    ok = np.isfinite(t) & (t > 0) & (s >= -1e-9) & (s <= 1 + 1e-9)
    hit = np.where(ok, t, np.inf).min(axis=1)
    hit = np.where(ok.any(axis=1), hit, 0.0)
    return np.where(zero, np.hypot(px, py).min(axis=1), hit)
