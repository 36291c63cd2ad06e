"""Elastic stress check of the whole core at each storey (the quick first method):
sigma = N/A +- bending over the net core section; tension zones; the tension resultant in each
wall against its vertical steel (phi 0.85, Table 2.2.2 axial tension, Class N); the peak
compression against a limit set in the Project sheet."""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore import section
from xlcore.codes import as3600
from xlcore.distribution import StoreyPlan
from xlcore.model import Settings
from xlcore.results import FAIL, PASS

FIBRE = 0.1  # m: fibre length along each pier


def _fibres(sp: pd.DataFrame) -> pd.DataFrame:
    """Fibres of FIBRE length along every pier at one storey: position, area and wall."""
    count = np.maximum(np.ceil((sp.end - sp.start) / FIBRE).astype(int), 1).to_numpy()
    idx = np.repeat(np.arange(len(sp)), count)
    j = np.concatenate([np.arange(c) for c in count])
    seg = ((sp.end - sp.start) / count).to_numpy()[idx]
    along = sp.start.to_numpy()[idx] + (j + 0.5) * seg
    return pd.DataFrame(
        dict(
            wall_id=sp.wall_id.to_numpy()[idx],
            x=sp.wx.to_numpy()[idx] + sp.ux.to_numpy()[idx] * along,
            y=sp.wy.to_numpy()[idx] + sp.uy.to_numpy()[idx] * along,
            area=seg * sp.tw.to_numpy()[idx] / 1000,
            rho_v=sp.rho_v.to_numpy()[idx],
            fsy=sp.fsy.to_numpy()[idx],
            fc=sp.fc.to_numpy()[idx],
        )
    )


def check_core_stress(
    piers: pd.DataFrame, plans: dict[str, StoreyPlan], core: pd.DataFrame, settings: Settings
) -> pd.DataFrame:
    """One row per storey x combination x wall. Stresses in MPa, forces in kN, steel in mm^2."""
    rows = []
    limit = settings.compression_limit
    for storey, cs in core.groupby("storey", sort=False):
        sp = piers[piers.storey == storey]
        sec = plans[storey].section
        fib = _fibres(sp)
        a, b, c = section.stress_plane(sec, cs.n.to_numpy(), cs.mx.to_numpy(), cs.my.to_numpy())
        sigma = (
            section.stress_at(
                sec, a[None, :], b[None, :], c[None, :], fib.x.to_numpy()[:, None], fib.y.to_numpy()[:, None]
            )
            / 1000.0
        )  # kPa -> MPa, fibres x combos
        walls = sp.drop_duplicates("wall_id")
        for w in walls.itertuples(index=False):
            mask = (fib.wall_id == w.wall_id).to_numpy()
            f = fib[mask]
            s = sigma[mask]
            tension_area = ((s < 0) * f.area.to_numpy()[:, None]).sum(axis=0)  # m^2
            tension = (np.maximum(-s, 0) * f.area.to_numpy()[:, None]).sum(axis=0) * 1000.0  # kN
            provided = (f.rho_v.to_numpy()[:, None] * f.area.to_numpy()[:, None] * (s < 0)).sum(axis=0) * 1e6
            ends = [(w.wx, w.wy), (w.wx + w.ux * w.wall_length, w.wy + w.uy * w.wall_length)]
            end_sigma = [section.stress_at(sec, a, b, c, x, y) / 1000.0 for x, y in ends]
            for j, rec in enumerate(cs.itertuples(index=False)):
                rows.append(
                    dict(
                        row=rec.row,
                        storey=storey,
                        combination=rec.combination,
                        wall_id=w.wall_id,
                        sigma_start=end_sigma[0][j],
                        sigma_end=end_sigma[1][j],
                        sigma_max=s[:, j].max(),
                        sigma_min=s[:, j].min(),
                        tension=tension[j],
                        tension_area=tension_area[j],
                        as_req=tension[j] * 1000.0 / (as3600.PHI_TENSION * w.fsy),
                        as_prov=provided[j],
                        fc=w.fc,
                        fsy=w.fsy,
                        limit=limit * w.fc,
                    )
                )
    df = pd.DataFrame(rows)
    if df.empty:
        return df
    with np.errstate(divide="ignore", invalid="ignore"):
        u_t = np.where(df.tension > 0, df.as_req / df.as_prov, 0.0)
    df["u_tension"] = np.where(np.isfinite(u_t), u_t, np.inf)
    df["u_compression"] = np.maximum(df.sigma_max, 0) / df.limit
    df["util"] = np.maximum(df.u_tension, df.u_compression)
    df["status"] = np.where(df.util <= 1.0, PASS, FAIL)
    df["governs"] = np.where(df.u_tension >= df.u_compression, "tension steel", "peak compression")
    df["working"] = [
        f"T = {t:.1f} kN over {ta:.3f} m2 -> As = {t:.1f} x 1000 / (0.85 x {fy:g}) = {ar:.0f} mm2 "
        f"vs {ap:.0f} mm2; sigma max {sm:.2f} MPa vs {lim:.2f} MPa"
        for t, ta, fy, ar, ap, sm, lim in zip(
            df.tension, df.tension_area, df.fsy, df.as_req, df.as_prov, df.sigma_max, df.limit, strict=True
        )
    ]
    return df
