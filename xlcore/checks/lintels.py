"""Lintels (coupling beams) over openings, checked as beams to AS 3600:2018 Section 8 where the
beam method applies: flexure by the rectangular stress block (Cl 8.1) and shear by the
simplified method (Cl 8.2). Deep lintels are reported for strut-and-tie design instead.

Convention: span = opening width; overall depth D = from the opening head to the top of the
slab above (floor-to-floor height less head height); width = wall thickness; effective depth
d = D - cover - fitment - bar/2 to the bottom bars.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore.codes import as3600
from xlcore.model import Settings
from xlcore.results import FAIL, NOT_CHECKED, PASS

REINFORCEMENT = ["lintel_bars", "lintel_dia", "stirrup_dia", "stirrup_legs", "stirrup_spacing"]


def check_lintels(lintels: pd.DataFrame, actions: pd.DataFrame, settings: Settings) -> pd.DataFrame:
    """One row per storey x lintel x combination with actions; lintels without actions, without
    reinforcement or too deep for the beam method get one row saying why they are not checked."""
    acts = actions.rename(columns={"member": "lintel_id"})[
        ["row", "storey", "combination", "lintel_id", "v", "m"]
    ]
    df = lintels.merge(acts, on=["storey", "lintel_id"], how="left")
    span = df.span.to_numpy(float) * 1000.0
    D = df.depth.to_numpy(float)
    b = df.tw.to_numpy(float)
    df["ratio"] = span / D
    has_bars = df[REINFORCEMENT].notna().all(axis=1).to_numpy()
    has_acts = df.combination.notna().to_numpy()
    deep = df.ratio.to_numpy() < settings.lintel_deep_ratio
    reason = np.where(
        ~has_acts,
        "no lintel actions in the member-actions sheet",
        np.where(
            ~has_bars,
            "no (or incomplete) lintel reinforcement in the openings sheet",
            np.where(
                deep,
                "deep member: span/D below the beam-method limit; design by "
                "strut-and-tie (Section 7) or as a coupling beam",
                "",
            ),
        ),
    )
    d = D - df.cover - df.stirrup_dia.fillna(0) - df.lintel_dia.fillna(0) / 2
    As = df.lintel_bars.fillna(0) * np.pi * df.lintel_dia.fillna(0) ** 2 / 4
    fc, fsy = df.fc.to_numpy(float), df.fsy.to_numpy(float)
    muo, ku, phi_m = as3600.beam_flexure(b, d.to_numpy(float), As.to_numpy(float), fc, fsy)
    dv = as3600.beam_dv(d, D)
    s = df.stirrup_spacing.to_numpy(float)
    asv = (df.stirrup_legs * np.pi * df.stirrup_dia**2 / 4).to_numpy(float)
    asv_min = as3600.beam_asv_min(fc, b, s, fsy)
    vuc, kv = as3600.beam_vuc(fc, b, dv, asv, asv_min)
    vus = as3600.beam_vus(asv, fsy, dv, s)
    vmax = as3600.beam_vu_max(fc, b, dv)
    vu = np.minimum(vuc + vus, vmax)
    phi_v = as3600.PHI_SHEAR
    checked = reason == ""
    df["d"], df["As"], df["ku"], df["phi_m"] = d, As, ku, phi_m
    df["phi_mu"] = np.where(checked, phi_m * muo * 1e-6, np.nan)
    df["dv"], df["kv"] = dv, kv
    df["vuc"], df["vus"], df["vu_max"] = vuc * 1e-3, vus * 1e-3, vmax * 1e-3
    df["phi_vu"] = np.where(checked, phi_v * vu * 1e-3, np.nan)
    with np.errstate(divide="ignore", invalid="ignore"):
        u_m = np.abs(df.m.to_numpy(float)) / df.phi_mu.to_numpy()
        u_v = np.abs(df.v.to_numpy(float)) / df.phi_vu.to_numpy()
    df["u_m"], df["u_v"] = np.where(checked, u_m, np.nan), np.where(checked, u_v, np.nan)
    df["util"] = np.fmax(df.u_m, df.u_v)
    df["status"] = np.where(checked, np.where(df.util <= 1.0, PASS, FAIL), NOT_CHECKED)
    df["reason"] = reason
    df["clause"] = np.where(
        checked,
        np.where(df.u_m >= df.u_v, "Cl 8.1 flexure", "Cl 8.2 shear (simplified)"),
        np.where(deep & has_acts & has_bars, "Section 12 / Section 7", ""),
    )
    df["working"] = [
        (
            f"d = {dd:.0f}; dn = As fsy/(alpha2 f'c b gamma) -> ku = {k:.3f}; phiMuo = {pm:.3f} x "
            f"{mu * 1e-6:.1f} = {pmu:.1f} kNm; dv = {v_d:.0f}, kv = {kk:.3f}: Vuc = {c:.1f}, Vus = {us:.1f}, "
            f"Vu.max = {vm:.1f} -> phiVu = 0.75 x min({c:.1f} + {us:.1f}, {vm:.1f}) = {pv:.1f} kN"
        )
        if ok
        else f"not checked: {why}"
        for dd, k, pm, mu, pmu, v_d, kk, c, us, vm, pv, ok, why in zip(
            d,
            ku,
            phi_m,
            muo,
            df.phi_mu,
            dv,
            kv,
            df.vuc,
            df.vus,
            df.vu_max,
            df.phi_vu,
            checked,
            reason,
            strict=True,
        )
    ]
    return df.sort_values(["storey_index", "lintel_id"], ascending=[False, True], kind="stable").reset_index(
        drop=True
    )
