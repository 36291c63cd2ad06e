"""Detailing of every pier at every storey against AS 3600:2018 Cl 11.7 (limits as transcribed
in docs/engineering-basis.md: verify), from the bars given and the largest design compressive stress."""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore.codes import as3600
from xlcore.model import Settings
from xlcore.results import FAIL, PASS

RULES = (
    "vertical ratio",
    "horizontal ratio",
    "vertical spacing",
    "horizontal spacing",
    "vertical clear gap",
    "horizontal clear gap",
    "one layer: thickness",
    "one layer: Hwe/tw",
)


def check_detailing(
    piers: pd.DataFrame,
    actions: pd.DataFrame,
    settings: Settings,
    hwe: pd.Series | None = None,
    working: bool = True,
) -> pd.DataFrame:
    """One row per storey x pier x rule. `hwe` [mm] per (storey, pier) for the one-layer limit
    (from the Cl 11.4 effective height of the axial check); storey clear height otherwise.
    Without `working`, only each rule's pier and utilisation."""
    p = piers.copy()

    def rule(*args):
        return _rule(*args, text=working)

    sigma = actions.assign(s=actions.n * 1e3).merge(
        p[["storey", "pier_id", "Lw", "tw"]], on=["storey", "pier_id"]
    )
    sigma["s"] = sigma.s / (sigma.Lw * sigma.tw)
    worst = sigma.groupby(["storey", "pier_id"]).s.max().rename("sigma")
    p = p.merge(worst, left_on=["storey", "pier_id"], right_index=True, how="left")
    p["sigma"] = p.sigma.fillna(0.0).clip(lower=0.0)
    if hwe is not None:
        p = p.merge(hwe.rename("hwe"), left_on=["storey", "pier_id"], right_index=True, how="left")
    else:
        p["hwe"] = np.nan
    p["hwe"] = p.hwe.fillna(p.Hc)
    restrained = settings.shrinkage_restrained == "yes"
    # the vertical rules apply to the wall's own (field) bars, which run between the end zones;
    # the zones' bars add to the pier's steel but are not counted towards the field's ratio
    zoned = np.zeros(len(p), dtype=bool)
    for side in "ab":
        if f"z{side}_n" in p:
            zoned |= p[f"z{side}_n"].fillna(0).to_numpy(float) > 0
    field_note = np.where(zoned, "; field bars between the end zones", "")
    if working:
        field_note = field_note.tolist()
    tw = p.tw.to_numpy(float)
    rv_min = as3600.wall_rho_v_min(p.sigma, p.fc)
    rh_min = as3600.wall_rho_h_min(restrained, p.wall_length * 1000.0)
    smax = as3600.wall_max_spacing(tw)
    parts = [
        rule(
            p,
            "vertical ratio",
            p.rho_v,
            rv_min,
            "min",
            "",
            lambda: [
                f"rho_v = {v:.5f} vs {m:.4f} (N*/(Lw tw) = {s:.2f} MPa "
                f"{'<=' if s <= 0.03 * fc else '>'} 0.03 f'c){z}"
                for v, m, s, fc, z in zip(p.rho_v, rv_min, p.sigma, p.fc, field_note, strict=True)
            ],
        ),
        rule(
            p,
            "horizontal ratio",
            p.rho_h,
            rh_min,
            "min",
            "",
            lambda: [
                f"rho_h = {v:.5f} vs {m:.4f} ({'restrained' if restrained else 'unrestrained'}, wall "
                f"{L:.2f} m)"
                for v, m, L in zip(p.rho_h, rh_min, p.wall_length, strict=True)
            ],
        ),
        rule(
            p,
            "vertical spacing",
            p.v_spacing,
            smax,
            "max",
            "mm",
            lambda: [
                f"s = {s:.0f} vs min(2.5 x {t:.0f}, 350) = {m:.0f} mm{z}"
                for s, t, m, z in zip(p.v_spacing, tw, smax, field_note, strict=True)
            ],
        ),
        rule(
            p,
            "horizontal spacing",
            p.h_spacing,
            smax,
            "max",
            "mm",
            lambda: [
                f"s = {s:.0f} vs min(2.5 x {t:.0f}, 350) = {m:.0f} mm"
                for s, t, m in zip(p.h_spacing, tw, smax, strict=True)
            ],
        ),
    ]
    for name, s, db in (
        ("vertical clear gap", p.v_spacing, p.v_dia),
        ("horizontal clear gap", p.h_spacing, p.h_dia),
    ):
        gap, need = s - db, as3600.wall_min_clear_gap(db)
        parts.append(
            rule(
                p,
                name,
                gap,
                need,
                "min",
                "mm",
                lambda gap=gap, db=db, need=need: [
                    f"clear gap = {g:.0f} vs 3 x {d:.0f} = {n:.0f} mm"
                    for g, d, n in zip(gap, db, need, strict=True)
                ],
            )
        )
    single = (p.v_layers < 2) | (p.h_layers < 2)
    one = p[single]
    if len(one):
        parts.append(
            rule(
                one,
                "one layer: thickness",
                one.tw,
                np.full(len(one), as3600.SINGLE_LAYER_MAX_THICKNESS),
                "max",
                "mm",
                lambda: [f"tw = {t:.0f} vs 200 mm with one layer (from memory: verify)" for t in one.tw],
            )
        )
        slender = one.hwe / one.tw
        parts.append(
            rule(
                one,
                "one layer: Hwe/tw",
                slender,
                np.full(len(one), as3600.SINGLE_LAYER_SLENDERNESS),
                "max",
                "",
                lambda: [
                    f"Hwe/tw = {h:.0f} / {t:.0f} = {r:.1f} vs 20"
                    for h, t, r in zip(one.hwe, one.tw, slender, strict=True)
                ],
            )
        )
    out = pd.concat(parts, ignore_index=True)
    if not working:
        return out
    out["status"] = np.where(out.util <= 1.0 + 1e-9, PASS, FAIL)
    out["clause"] = "Cl 11.7 " + out.rule
    return out


def _rule(
    p: pd.DataFrame, name: str, value, limit, kind: str, unit: str, working, text: bool = True
) -> pd.DataFrame:
    """One rule's rows; `working` makes the working text when called. Without `text`, the
    pier and utilisation alone (what the advice search needs)."""
    value = np.asarray(value, dtype=float)
    limit = np.asarray(limit, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        if kind == "min":  # value must reach the limit
            util = np.where(limit <= 0, 0.0, np.where(value > 0, limit / value, np.inf))
        else:
            util = value / limit
    if not text:
        return pd.DataFrame({"pier_id": p.pier_id.reset_index(drop=True), "util": util})
    return pd.DataFrame(
        dict(
            storey=p.storey.to_numpy(),
            storey_index=p.storey_index.to_numpy(),
            pier_id=p.pier_id.to_numpy(),
            wall_id=p.wall_id.to_numpy(),
            rule=name,
            value=value,
            limit=limit,
            kind="at least" if kind == "min" else "at most",
            unit=unit,
            util=util,
            working=working() if text else "",
        )
    )
