"""Detailing of every pier at every storey against the Project's design standard (AS 3600:2018
Cl 11.7; ACI 318-19 11.6, 11.7, 25.2: limits as transcribed in docs/engineering-basis.md,
verify), from the bars given, the largest design compressive stress and, where the standard's
minima depend on it (ACI 11.6.1 / 11.6.2), the largest |V*| and the Hw/Lw of the shear check.

Every limit comes through the `codes.base.Standard` interface (`std`)."""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore.codes import get_standard
from xlcore.codes.base import Standard
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
    *,
    std: Standard | None = None,
    shear: pd.DataFrame | None = None,
) -> pd.DataFrame:
    """One row per storey x pier x rule. `hwe` [mm] per (storey, pier) for the one-layer limit
    (from the Cl 11.4 effective height of the axial check); storey clear height otherwise.
    Without `working`, only each rule's pier and utilisation.

    `shear`: the shear table (storey, pier_id, v [kN], hw_lw) of these piers and actions, read
    where the standard's minima and spacing depend on V* (`std.detailing_needs_shear`): per
    pier the largest |V*| over the combinations and the shear check's Hw/Lw. Not given, the
    shear check is run here on `actions` (numbers only)."""
    std = (std or get_standard(settings.standard)).configure(settings)
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
    p = _with_shear(p, actions, settings, std, shear)
    v_star, hw_lw = p.v_star.to_numpy(float), p.hw_lw.to_numpy(float)
    fc, fy, Lw = p.fc.to_numpy(float), p.fsy.to_numpy(float), p.Lw.to_numpy(float)
    q = dict(
        sigma=p.sigma.to_numpy(float),
        fc=fc,
        fy=fy,
        tw=tw,
        Lw=Lw,
        wall_length=p.wall_length.to_numpy(float),
        restrained=restrained,
        v_star=v_star,
        hw_lw=hw_lw,
        rho_h=p.rho_h.to_numpy(float),
    )
    common = dict(
        fc=fc, fy=fy, tw=tw, Lw=Lw, wall_length=p.wall_length * 1000.0, sigma=p.sigma,
        v_star=v_star, hw_lw=hw_lw, rho_h=q["rho_h"], restrained=restrained,
    )  # fmt: skip
    rv_min, _ = std.min_ratios(bar_dia=p.v_dia.to_numpy(float), **common)
    _, rh_min = std.min_ratios(bar_dia=p.h_dia.to_numpy(float), **common)
    if std.detailing_needs_shear:
        rho_req, _ = std.wall_steel_required(v_star, std.phi_wall_shear, fc, fy, Lw, tw, hw_lw)
        steel_needed = rho_req > 0
    else:
        steel_needed = np.zeros(len(p), dtype=bool)
    sv_max, sh_max = std.max_spacing(tw, Lw, steel_needed)
    q["shear_steel_required"] = steel_needed

    def why(key: str, **extra) -> list[str]:
        return std.limit_text(key, **{**q, **extra})

    parts = [
        rule(
            p,
            "vertical ratio",
            p.rho_v,
            rv_min,
            "min",
            "",
            lambda: [
                f"rho_v = {v:.5f} vs {m:.4f} ({w}){z}"
                for v, m, w, z in zip(
                    p.rho_v,
                    rv_min,
                    why("rho_v_min", bar_dia=p.v_dia.to_numpy(float)),
                    field_note,
                    strict=True,
                )
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
                f"rho_h = {v:.5f} vs {m:.4f} ({w})"
                for v, m, w in zip(
                    p.rho_h, rh_min, why("rho_h_min", bar_dia=p.h_dia.to_numpy(float)), strict=True
                )
            ],
        ),
        rule(
            p,
            "vertical spacing",
            p.v_spacing,
            sv_max,
            "max",
            "mm",
            lambda: [
                f"s = {s:.0f} vs {w} = {m:.0f} mm{z}"
                for s, w, m, z in zip(p.v_spacing, why("spacing_v"), sv_max, field_note, strict=True)
            ],
        ),
        rule(
            p,
            "horizontal spacing",
            p.h_spacing,
            sh_max,
            "max",
            "mm",
            lambda: [
                f"s = {s:.0f} vs {w} = {m:.0f} mm"
                for s, w, m in zip(p.h_spacing, why("spacing_h"), sh_max, strict=True)
            ],
        ),
    ]
    for name, s, db in (
        ("vertical clear gap", p.v_spacing, p.v_dia),
        ("horizontal clear gap", p.h_spacing, p.h_dia),
    ):
        gap, need = s - db, std.min_clear_gap(db)
        parts.append(
            rule(
                p,
                name,
                gap,
                need,
                "min",
                "mm",
                lambda gap=gap, db=db, need=need: [
                    f"clear gap = {g:.0f} vs {w} = {n:.0f} mm"
                    for g, w, n in zip(gap, why("clear_gap", db=db.to_numpy(float)), need, strict=True)
                ],
            )
        )
    single = (p.v_layers < 2) | (p.h_layers < 2)
    one = p[single]
    t_max, slender_max = std.single_layer_limits()
    if len(one):
        parts.append(
            rule(
                one,
                "one layer: thickness",
                one.tw,
                np.full(len(one), t_max),
                "max",
                "mm",
                lambda: [
                    f"tw = {t:.0f} vs {t_max:.0f} mm with one layer ({w})"
                    for t, w in zip(one.tw, std.limit_text("layers", tw=one.tw.to_numpy(float)), strict=True)
                ],
            )
        )
    if len(one) and np.isfinite(slender_max):
        slender = one.hwe / one.tw
        parts.append(
            rule(
                one,
                "one layer: Hwe/tw",
                slender,
                np.full(len(one), slender_max),
                "max",
                "",
                lambda: [
                    f"Hwe/tw = {h:.0f} / {t:.0f} = {r:.1f} vs {slender_max:g}"
                    for h, t, r in zip(one.hwe, one.tw, slender, strict=True)
                ],
            )
        )
    out = pd.concat(parts, ignore_index=True)
    if not working:
        return out
    out["status"] = np.where(out.util <= 1.0 + 1e-9, PASS, FAIL)
    out["clause"] = out.rule.map({r: std.detailing_clause(r) for r in RULES})
    return out


def _with_shear(
    p: pd.DataFrame, actions: pd.DataFrame, settings: Settings, std: Standard, shear: pd.DataFrame | None
) -> pd.DataFrame:
    """`p` with v_star [N] (largest |V*| over the combinations at the storey; 0 without
    actions) and hw_lw (the shear check's ratio) per pier, where the standard reads them; NaN
    otherwise (the standard ignores them)."""
    if not std.detailing_needs_shear:
        return p.assign(v_star=np.nan, hw_lw=np.nan)
    if shear is None:
        from xlcore.checks.shear import check_pier_shear  # the shear check's own Hw/Lw

        shear = check_pier_shear(p.drop(columns=["sigma", "hwe"]), actions, settings, working=False)
    per = shear.assign(v_abs=shear.v.abs() * 1e3).groupby(["storey", "pier_id"])
    got = pd.DataFrame({"v_star": per.v_abs.max(), "hw_lw": per.hw_lw.first()})
    out = p.merge(got, left_on=["storey", "pier_id"], right_index=True, how="left")
    # no actions: V* = 0 (the lesser minima); Hw/Lw from the storey's clear height
    return out.assign(v_star=out.v_star.fillna(0.0), hw_lw=out.hw_lw.fillna(out.Hc / out.Lw))


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
