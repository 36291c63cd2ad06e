"""Elastic stress check of the whole core at each storey (the quick first method):
sigma = N/A +- bending over the net core section; tension zones; the tension resultant in each
wall against its vertical steel (phi for axial tension of the design standard: AS 3600:2018
Table 2.2.2 0.85, Class N; ACI 318-19 Table 21.2.2 0.90); the peak compression against a limit
set in the Project sheet (the trigger of end-zone / boundary-element detailing)."""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore.checks import plain
from xlcore.codes import compression_flag_ratio, get_standard
from xlcore.codes.base import Standard
from xlcore.distribution import (
    Block,
    StoreyPlan,
    TextCodes,
    arrays_by_storey,
    positions,
    stack,
    stack_blocks,
    text_of_codes,
)
from xlcore.mechanics import bars, section
from xlcore.model import Settings
from xlcore.results import status_column, text_column

FIBRE = 0.1  # m: fibre length along each pier
FLAG_END_ZONE = "end-zone detailing (Cl 14.6)"  # AS 3600's flag (Standard.symbols["boundary_flag"])


def _fibres(sp: pd.DataFrame) -> dict[str, np.ndarray]:
    """Fibres of FIBRE length along every pier of `sp` (any storeys): the pier's row in `sp`,
    position, area; the wall's vertical ratio smeared over the fibres between its end zones
    (none inside a zone, whose bars are counted one by one: `_zone_bars`). Each pier's fibres
    are one run, piers in `sp`'s order."""
    count = np.maximum(np.ceil((sp.end - sp.start) / FIBRE).astype(int), 1).to_numpy()
    idx = np.repeat(np.arange(len(sp)), count)
    j = np.arange(len(idx)) - np.repeat(np.cumsum(count) - count, count)  # place along its pier
    seg = ((sp.end - sp.start) / count).to_numpy()[idx]
    along = sp.start.to_numpy()[idx] + (j + 0.5) * seg
    rel = (along - sp.start.to_numpy()[idx]) * 1000.0  # mm from the pier's start side
    za, zb = (
        np.nan_to_num(sp[f"z{s}_len"].to_numpy(float)) if f"z{s}_len" in sp else np.zeros(len(sp))
        for s in "ab"
    )
    in_zone = (rel < za[idx]) | (rel > sp.Lw.to_numpy(float)[idx] - zb[idx])
    return dict(
        pier=idx,
        x=sp.wx.to_numpy()[idx] + sp.ux.to_numpy()[idx] * along,
        y=sp.wy.to_numpy()[idx] + sp.uy.to_numpy()[idx] * along,
        area=seg * sp.tw.to_numpy()[idx] / 1000,
        rho_v=np.where(in_zone, 0.0, sp.rho_v.to_numpy()[idx]),
    )


def _zone_bars(sp: pd.DataFrame) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """End-zone bar positions of every pier at one storey: plan x, y [m], area [mm^2] (all
    layers at a position) and the pier's row in `sp`."""
    lay = bars.layout(sp)
    live = lay.zone_A > 0
    pier = np.nonzero(live)[0]
    along = sp.start.to_numpy(float)[pier] + lay.zone_d[live] / 1000.0
    x = sp.wx.to_numpy(float)[pier] + sp.ux.to_numpy(float)[pier] * along
    y = sp.wy.to_numpy(float)[pier] + sp.uy.to_numpy(float)[pier] * along
    return x, y, lay.zone_A[live], pier


def in_names(codes: np.ndarray, values, names) -> np.ndarray:
    """`column.astype(str).isin(names)` of the text column `values[codes]` as `stack` makes
    it, worked on each distinct value once (a column of those values of the same type): not
    288 000 rows made text and hashed at the L tower."""
    values = np.asarray(values, dtype=object)
    used = np.flatnonzero(np.bincount(codes, minlength=len(values)) > 0)
    few = pd.Series(text_of_codes(np.arange(len(used)), values[used]))
    hit = np.zeros(len(values), dtype=bool)
    hit[used] = few.astype(str).isin(names).to_numpy()
    return hit[codes]


def _fibre_stress(sec, a, b, c, x, y) -> tuple[np.ndarray, np.ndarray]:
    """`section.stress_at(sec, a, b, c, x, y) / 1000` at fibres x, y (rows) for stress planes
    a, b, c (columns), worked in one array in the expression's order (the same numbers), and a
    second array of its shape for the caller's products."""
    sigma = np.multiply(b[None, :], (x - sec.xc)[:, None])
    np.add(a[None, :], sigma, out=sigma)
    work = np.multiply(c[None, :], (y - sec.yc)[:, None])
    sigma += work
    sigma /= 1000.0
    return sigma, work


def check_core_stress(
    piers: pd.DataFrame,
    plans: dict[str, StoreyPlan],
    core: pd.DataFrame,
    settings: Settings,
    *,
    std: Standard | None = None,
    text: bool = True,
) -> pd.DataFrame:
    """One row per storey x combination x wall. Stresses in MPa, forces in kN, steel in mm^2.
    Without `text` the working column is left blank for `with_working` to fill on the rows
    written (`compute --detail`: the L tower has 288 000 rows, a few thousand written)."""
    std = std or get_standard(settings.standard)
    phi_t = std.phi_tension
    parts = []
    limit = compression_flag_ratio(settings.compression_limit, std)
    # fibres, end-zone bars and walls of every storey at once; each storey takes its own below
    piers = piers.reset_index(drop=True)
    piers_at = piers.groupby("storey", sort=False).indices  # positions, in the table's order
    fib = _fibres(piers)
    fib_start = np.searchsorted(fib["pier"], np.arange(len(piers) + 1))  # each pier's run of fibres
    zx_all, zy_all, za_all, zp_all = _zone_bars(piers)
    zones_at = pd.Series(piers.storey.to_numpy()[zp_all]).groupby(piers.storey.to_numpy()[zp_all]).indices
    first = ~piers.duplicated(["storey", "wall_id"]).to_numpy()  # each wall's first pier at a storey
    cols = {k: piers[k].to_numpy() for k in ("wall_id", "wx", "wy", "ux", "uy", "wall_length", "fsy", "fc")}
    # text columns as integer codes while the storeys' pieces are made, columns once at the end
    # (`stack`: no object array per storey, no text inferred row by row; 288 000 rows at L)
    names = TextCodes()
    cols["_wall"] = names.codes(cols["wall_id"])  # the IDs coded once, not per storey
    combos_of, combo_names = pd.factorize(core.combination.to_numpy(), use_na_sentinel=False)
    core = core.assign(_combo=combos_of)
    for storey, cs in arrays_by_storey(core, ["row", "_combo", "n", "mx", "my"]).items():
        here = piers_at[storey]
        sec = plans[storey].section
        a, b, c = section.stress_plane(sec, cs["n"], cs["mx"], cs["my"])
        walls = {k: v[here[first[here]]] for k, v in cols.items()}  # as drop_duplicates("wall_id")
        wall_of_pier = positions(
            walls["_wall"], cols["_wall"][here], walls["wall_id"], cols["wall_id"][here], names
        )
        runs = fib_start[here + 1] - fib_start[here]
        fibres = np.repeat(fib_start[here] - np.cumsum(runs) + runs, runs) + np.arange(runs.sum())
        # fibres in wall order, so each wall's fibres are one run for the reductions below
        wall_of = wall_of_pier[np.repeat(np.arange(len(here)), runs)]
        order = np.argsort(wall_of, kind="stable")
        fx, fy_, area, rho = (fib[k][fibres][order] for k in ("x", "y", "area", "rho_v"))
        starts = np.searchsorted(wall_of[order], np.arange(len(walls["wall_id"])))
        sigma, work = _fibre_stress(sec, a, b, c, fx, fy_)  # fibres x combos, MPa (kPa / 1000)
        tens = sigma < 0
        # each product in one work array, the operations of `tens * area`, `maximum(-sigma, 0) *
        # area` and `tens * (rho area)` in their order (the same numbers, no array per product)
        tension_area = np.add.reduceat(np.multiply(tens, area[:, None], out=work), starts, axis=0)  # m^2
        np.negative(sigma, out=work)
        np.maximum(work, 0, out=work)
        work *= area[:, None]
        tension = np.add.reduceat(work, starts, axis=0) * 1000.0  # kN
        provided = np.add.reduceat(np.multiply(tens, (rho * area)[:, None], out=work), starts, axis=0) * 1e6
        z = zones_at.get(storey)
        if z is not None and len(z):  # end-zone bars in tension add their own area to their wall's
            zx, zy, za = zx_all[z], zy_all[z], za_all[z]
            z_sigma = section.stress_at(sec, a[None, :], b[None, :], c[None, :], zx[:, None], zy[:, None])
            z_wall = positions(
                walls["_wall"], cols["_wall"][zp_all[z]], walls["wall_id"], cols["wall_id"][zp_all[z]], names
            )
            np.add.at(provided, z_wall, (z_sigma < 0) * za[:, None])
        wx, wy, ux, uy, length = (walls[k] for k in ("wx", "wy", "ux", "uy", "wall_length"))
        end_sigma = [
            section.stress_at(sec, a[None, :], b[None, :], c[None, :], x[:, None], y[:, None]) / 1000.0
            for x, y in ((wx, wy), (wx + ux * length, wy + uy * length))
        ]
        case, member, grid = Block.CASE, Block.MEMBER, Block.GRID
        fsy, fc = walls["fsy"], walls["fc"]
        parts.append(  # (cases x walls: the combinations' rows one after another)
            Block(
                len(cs["row"]),
                len(walls["wall_id"]),
                dict(
                    row=(case, cs["row"]),
                    storey=(Block.FIXED, names.codes([storey])[0]),
                    combination=(case, cs["_combo"]),
                    wall_id=(member, walls["_wall"]),
                    sigma_start=(grid, end_sigma[0].T),
                    sigma_end=(grid, end_sigma[1].T),
                    sigma_max=(grid, np.maximum.reduceat(sigma, starts, axis=0).T),
                    sigma_min=(grid, np.minimum.reduceat(sigma, starts, axis=0).T),
                    tension=(grid, tension.T),
                    tension_area=(grid, tension_area.T),
                    as_req=(grid, (tension * 1000.0 / (phi_t * fsy[:, None])).T),
                    as_prov=(grid, provided.T),
                    fc=(member, fc),
                    fsy=(member, fsy),
                    limit=(member, limit * fc),
                ),
            )
        )
    texts = dict(storey=names.values, wall_id=names.values, combination=combo_names)
    df = stack_blocks(parts, texts) if parts else stack(parts, texts=texts)
    if df.empty:
        return df
    with np.errstate(divide="ignore", invalid="ignore"):
        u_t = np.where(df.tension > 0, df.as_req / df.as_prov, 0.0)
    df["u_tension"] = np.where(np.isfinite(u_t), u_t, np.inf)
    df["u_compression"] = np.maximum(df.sigma_max, 0) / df.limit
    # AS 3600 Cl 14.6 (0.15 f'c) / ACI 318-19 18.10.6.3 (0.2 f'c): extreme-fibre compression is a
    # trigger for end-zone detailing under earthquake actions, not a capacity: a flag on
    # earthquake combinations only
    combo_rows = np.concatenate([np.repeat(p.columns["combination"][1], p.members) for p in parts])
    quake = in_names(combo_rows, combo_names, settings.earthquake)
    # text columns taken from their few strings (`text_column`: 288 000 rows at the L tower)
    df["earthquake"] = text_column(quake, ["no", "yes"])
    flag = np.where(quake, np.where(df.u_compression > 1.0, 2, 1), 0)
    not_quake = "n/a (not an earthquake combination)"
    df["flag"] = text_column(flag, [not_quake, "none", std.symbols["boundary_flag"]])
    df["util"] = df.u_tension
    df["status"] = status_column(df.util)
    df["governs"] = "tension steel"
    df["working"] = None
    return with_working(df, settings, std=std) if text else df


def with_working(rows: pd.DataFrame, settings: Settings, *, std: Standard | None = None) -> pd.DataFrame:
    """The working text of core-stress rows, from the row's own numbers (so the same text on
    the rows written as on every row)."""
    phi_t = (std or get_standard(settings.standard)).phi_tension
    rows = rows.copy()
    rows["working"] = [
        f"T = {t:.1f} kN over {ta:.3f} m2 -> As = {t:.1f} x 1000 / ({phi_t:.2f} x {fy:g}) = {ar:.0f} mm2 "
        f"vs {ap:.0f} mm2 in tension (field bars smeared, end-zone bars one by one); "
        f"sigma max {sm:.2f} MPa vs {lim:.2f} MPa (flag, earthquake combinations)"
        for t, ta, fy, ar, ap, sm, lim in zip(
            *plain(
                rows.tension,
                rows.tension_area,
                rows.fsy,
                rows.as_req,
                rows.as_prov,
                rows.sigma_max,
                rows.limit,
            ),
            strict=True,
        )
    ]
    return rows
