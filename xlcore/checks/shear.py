"""In-plane shear of every pier, every storey, every combination (AS 3600:2018 Cl 11.6)."""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore.checks import per_pier, plain
from xlcore.codes import as3600
from xlcore.model import Settings
from xlcore.results import status, utilisation


def check_pier_shear(
    piers: pd.DataFrame,
    actions: pd.DataFrame,
    settings: Settings,
    working: bool = True,
    text: bool = True,
) -> pd.DataFrame:
    """Shear table: one row per storey x pier x combination, forces in kN.

    `piers` from geometry (with stiffness), `actions` from distribution.pier_actions. Without
    `working` the numbers only (the advice search runs thousands of variants). Without `text`
    every column but the working text (f_vuc, f_vu, f_util), which the same call on the rows
    written makes later (`compute --detail`: most rows of a tall tower are not written).
    """
    geo = [
        "storey",
        "pier_id",
        "Lw",
        "tw",
        "Hc",
        "Ho",
        "H_wall",
        "wall_length",
        "fc",
        "fsy",
        "rho_h",
        "rho_v",
    ]
    df = actions.merge(piers[geo], on=["storey", "pier_id"], how="left")
    place = piers.set_index(["storey", "pier_id"]).position  # > 0: a pier beside an opening
    basis = settings.shear_height
    if basis == as3600.HEIGHT_OVERALL:
        df["Hw"], h_whole = df.H_wall, df.H_wall
    else:
        use_opening = basis == as3600.HEIGHT_OPENING
        df["Hw"], h_whole = np.where(use_opening & df.Ho.notna(), df.Ho, df.Hc), df.Hc
    beside = place.reindex(pd.MultiIndex.from_frame(df[["storey", "pier_id"]])).to_numpy() > 0
    ratio, wall_governs = as3600.wall_aspect_ratio(df.Hw, df.Lw, h_whole, df.wall_length * 1000.0, beside)
    df["hw_lw"] = ratio
    if working:  # text on every row: not for the advice search's variants (10 % of its time)
        df["hw_basis"] = _basis_text(
            basis,
            df.Hw.to_numpy(float),
            df.Lw.to_numpy(float),
            np.asarray(h_whole, float),
            df.wall_length.to_numpy(float) * 1000.0,
            beside,
            wall_governs,
        )
    phi = settings.phi_shear if settings.phi_shear is not None else as3600.PHI_WALL_SHEAR
    # Hw passed so that Hw / Lw is the governing ratio (the whole wall's where it is larger)
    r = as3600.wall_shear(df.fc, df.fsy, df.Lw, df.tw, ratio * df.Lw, df.rho_h, df.rho_v, phi)
    kn = 1e-3
    for key in ("eq1", "eq2", "floor", "vuc", "vus", "vu_max", "phi_vu"):
        df[key] = getattr(r, key) * kn
    df.loc[~np.isfinite(df.eq2), "eq2"] = np.nan  # Eq (2) applies only where Hw/Lw > 1
    df["rho_w"], df["phi"] = r.rho_w, r.phi
    df["k"] = df.k * 1e-3  # N/mm -> kN/mm
    df["util"] = utilisation(df.v, df.phi_vu)
    df["status"] = status(df.util)
    df["clause"] = [as3600.GOVERNING_TEXT[g] for g in r.governs]
    if not working:
        return df
    rho_req, capped = as3600.wall_rho_required(df.v * 1e3, r.phi, r.vuc, r.vu_max, df.fsy, df.Lw, df.tw)
    df["rho_req"] = rho_req
    df["advice"] = _advice(df.util.to_numpy(), rho_req, capped, df.hw_lw.to_numpy(), r.rho_w)
    if text:
        # capacity working depends on the pier alone: written once per storey x pier, then spread
        first, of = per_pier(df)
        once = df.iloc[first]
        df["f_vuc"] = np.asarray(_vuc_text(once), dtype=object)[of]
        df["f_vu"] = np.asarray(_vu_text(once), dtype=object)[of]
        df["f_util"] = [
            f"|V*| / phiVu = {abs(v):.1f} / {pv:.1f} = {u:.3f}"
            for v, pv, u in zip(df.v.tolist(), df.phi_vu.tolist(), df.util.tolist(), strict=True)
        ]
    # the engineer's row order; piers shared from one wall row stay together, from the wall start
    order = ["origin", "row", "position"] if "origin" in df else ["row", "position"]
    return df.sort_values(order, kind="stable").reset_index(drop=True)


def _basis_text(basis, hw, lw, h_whole, l_whole, beside, wall_governs) -> list[str]:
    """The height used in Hw/Lw on every row, and which ratio governs (Cl 11.6.3)."""
    out = []
    for b, h, length, hh, ll, side, gov in zip(
        [basis] * len(hw), *plain(hw, lw, h_whole, l_whole, beside, wall_governs), strict=True
    ):
        own = f"{b}: {h:.0f} / {length:.0f} = {h / length:.3f}"
        if not side:
            out.append(own)
            continue
        whole = f"whole wall {hh:.0f} / {ll:.0f} = {hh / ll:.3f}"
        pick = "whole wall governs" if gov else "pier governs"
        out.append(f"larger of pier {own} and {whole} ({pick}; common practice)")
    return out


def _vu_text(df: pd.DataFrame) -> list[str]:
    return [
        f"Vus = {rw:.5f} x {fy:g} x 0.8 x {lw:.0f} x {t:.0f} = {vs:.1f} kN; "
        f"Vu.max = 0.2 x {fc:g} x 0.8 x {lw:.0f} x {t:.0f} = {vm:.1f} kN; "
        f"phiVu = {p:.2f} x min({vc:.1f} + {vs:.1f}, {vm:.1f}) = {pv:.1f} kN"
        for rw, fy, lw, t, vs, fc, vm, p, vc, pv in zip(
            df.rho_w, df.fsy, df.Lw, df.tw, df.vus, df.fc, df.vu_max, df.phi, df.vuc, df.phi_vu, strict=True
        )
    ]


def _vuc_text(df: pd.DataFrame) -> list[str]:
    out = []
    for fc, r, lw, t, e1, e2, fl, vc in zip(
        df.fc, df.hw_lw, df.Lw, df.tw, df.eq1, df.eq2, df.floor, df.vuc, strict=True
    ):
        a = f"0.8 x {lw:.0f} x {t:.0f}"
        s = f"Eq1 = (0.66 - 0.21 x {r:.3f}) x sqrt({fc:g}) x {a} = {e1:.1f} kN; "
        if np.isfinite(e2):
            s += f"Eq2 = (0.05 + 0.1 / ({r:.3f} - 1)) x sqrt({fc:g}) x {a} = {e2:.1f} kN; "
            pick = f"max(min({e1:.1f}, {e2:.1f}), {fl:.1f})"
        else:
            s += "Eq2 n/a (Hw/Lw <= 1); "
            pick = f"max({e1:.1f}, {fl:.1f})"
        s += f"min = 0.17 x sqrt({fc:g}) x {a} = {fl:.1f} kN; Vuc = {pick} = {vc:.1f} kN"
        out.append(s)
    return out


def _advice(util, rho_req, capped, ratio, rho_w) -> list[str]:
    out = []
    for u, need, cap, hl, have in zip(*plain(util, rho_req, capped, ratio, rho_w), strict=True):
        if u <= 1.0:
            out.append("")
        elif cap:
            out.append("V*/phi exceeds Vu.max (Cl 11.6.2): only a thicker wall or a higher f'c helps")
        elif hl > 1.0:
            out.append(f"raise horizontal steel to rho_h >= {need:.5f} (now {have:.5f})")
        else:
            out.append(f"raise the lesser of rho_h and rho_v to >= {need:.5f} (now {have:.5f})")
    return out
