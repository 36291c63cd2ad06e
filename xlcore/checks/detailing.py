"""Detailing of every pier at every storey against the Project's design standard (AS 3600:2018
Cl 11.7; ACI 318-19 11.6, 11.7, 25.2: limits as transcribed in docs/engineering-basis.md,
verify), from the bars given, the largest design compressive stress and, where the standard's
minima depend on it (ACI 11.6.1 / 11.6.2), the largest |V*| and the Hw/Lw of the shear check.

Every limit comes through the `codes.base.Standard` interface (`std`)."""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore.checks import group_first, group_max, pier_rows, plain, same_keys
from xlcore.codes import get_standard
from xlcore.codes.base import Standard, words_once
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
    pier_of: np.ndarray | None = None,
) -> pd.DataFrame:
    """One row per storey x pier x rule. `hwe` [mm] per (storey, pier) for the one-layer limit
    (from the Cl 11.4 effective height of the axial check); storey clear height otherwise.
    Without `working`, only each rule's pier and utilisation.

    `shear`: the shear table (storey, pier_id, v [kN], hw_lw) of these piers and actions, read
    where the standard's minima and spacing depend on V* (`std.detailing_needs_shear`): per
    pier the largest |V*| over the combinations and the shear check's Hw/Lw. Not given, the
    shear check is run here on `actions` (numbers only). `pier_of`: each action row's row in
    `piers` as `checks.pier_rows` gives it, where the caller has it; None: matched here."""
    std = (std or get_standard(settings.standard)).configure(settings)
    p = _inputs_by_position(piers, actions, settings, hwe, std, shear, pier_of)
    if p is None:  # a key blank or not unique: the joins decide
        p = _inputs_by_merge(piers, actions, settings, hwe, std, shear)
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

    # (rows of p, None for all; name; value; limit; kind; unit; working text when called)
    rules: list[tuple] = [
        (
            None,
            "vertical ratio",
            p.rho_v,
            rv_min,
            "min",
            "",
            lambda: words_once(
                lambda *cols: [
                    f"rho_v = {v:.5f} vs {m:.4f} ({w}){z}" for v, m, w, z in zip(*plain(*cols), strict=True)
                ],
                p.rho_v,
                rv_min,
                why("rho_v_min", bar_dia=p.v_dia.to_numpy(float)),
                field_note,
            ),
        ),
        (
            None,
            "horizontal ratio",
            p.rho_h,
            rh_min,
            "min",
            "",
            lambda: words_once(
                lambda *cols: [
                    f"rho_h = {v:.5f} vs {m:.4f} ({w})" for v, m, w in zip(*plain(*cols), strict=True)
                ],
                p.rho_h,
                rh_min,
                why("rho_h_min", bar_dia=p.h_dia.to_numpy(float)),
            ),
        ),
        (
            None,
            "vertical spacing",
            p.v_spacing,
            sv_max,
            "max",
            "mm",
            lambda: words_once(
                lambda *cols: [
                    f"s = {s:.0f} vs {w} = {m:.0f} mm{z}" for s, w, m, z in zip(*plain(*cols), strict=True)
                ],
                p.v_spacing,
                why("spacing_v"),
                sv_max,
                field_note,
            ),
        ),
        (
            None,
            "horizontal spacing",
            p.h_spacing,
            sh_max,
            "max",
            "mm",
            lambda: words_once(
                lambda *cols: [
                    f"s = {s:.0f} vs {w} = {m:.0f} mm" for s, w, m in zip(*plain(*cols), strict=True)
                ],
                p.h_spacing,
                why("spacing_h"),
                sh_max,
            ),
        ),
    ]
    for name, s, db in (
        ("vertical clear gap", p.v_spacing, p.v_dia),
        ("horizontal clear gap", p.h_spacing, p.h_dia),
    ):
        gap, need = s - db, std.min_clear_gap(db)
        rules.append(
            (
                None,
                name,
                gap,
                need,
                "min",
                "mm",
                lambda gap=gap, db=db, need=need: words_once(
                    lambda *cols: [
                        f"clear gap = {g:.0f} vs {w} = {n:.0f} mm"
                        for g, w, n in zip(*plain(*cols), strict=True)
                    ],
                    gap,
                    why("clear_gap", db=db.to_numpy(float)),
                    need,
                ),
            )
        )
    single = ((p.v_layers < 2) | (p.h_layers < 2)).to_numpy()
    at_one = np.flatnonzero(single)
    one_tw = tw[at_one]
    t_max, slender_max = std.single_layer_limits()
    if len(at_one):
        rules.append(
            (
                at_one,
                "one layer: thickness",
                one_tw,
                np.full(len(at_one), t_max),
                "max",
                "mm",
                lambda: [
                    f"tw = {t:.0f} vs {t_max:.0f} mm with one layer ({w})"
                    for t, w in zip(one_tw.tolist(), std.limit_text("layers", tw=one_tw), strict=True)
                ],
            )
        )
    if len(at_one) and np.isfinite(slender_max):
        one_hwe = p.hwe.to_numpy()[at_one]
        slender = one_hwe / one_tw
        rules.append(
            (
                at_one,
                "one layer: Hwe/tw",
                slender,
                np.full(len(at_one), slender_max),
                "max",
                "",
                lambda: [
                    f"Hwe/tw = {h:.0f} / {t:.0f} = {r:.1f} vs {slender_max:g}"
                    for h, t, r in zip(one_hwe.tolist(), one_tw.tolist(), slender.tolist(), strict=True)
                ],
            )
        )
    if not working:
        return _numbers(p, rules)
    out = pd.concat(
        [_rule(p if rows is None else p.iloc[rows], *rest) for rows, *rest in rules], ignore_index=True
    )
    out["status"] = np.where(out.util <= 1.0 + 1e-9, PASS, FAIL)
    out["clause"] = out.rule.map({r: std.detailing_clause(r) for r in RULES})
    return out


def _numbers(p: pd.DataFrame, rules: list[tuple]) -> pd.DataFrame:
    """The rules' (pier_id, util) rows without working, as `_rule(..., text=False)` one table
    per rule and their concatenation gave them: one take of the pier IDs, one array of the
    utilisations."""
    every = np.arange(len(p))
    rows = np.concatenate([every if r[0] is None else r[0] for r in rules])
    util = np.concatenate([_util(value, limit, kind) for _, _, value, limit, kind, _, _ in rules])
    return pd.DataFrame({"pier_id": p.pier_id.iloc[rows].reset_index(drop=True), "util": util})


def _inputs_by_position(
    piers: pd.DataFrame,
    actions: pd.DataFrame,
    settings: Settings,
    hwe: pd.Series | None,
    std: Standard,
    shear: pd.DataFrame | None,
    pier_of: np.ndarray | None = None,
) -> pd.DataFrame | None:
    """`_inputs_by_merge`'s table where each pier is one row of `piers` (and of `hwe`): the
    action and shear rows found by position (`pier_rows`), their per-pier maxima and firsts by
    group (`group_max`, `group_first`: the values the group-bys give), no join of the action
    rows' text keys. None where a key is blank or a pier not unique (the joins then decide)."""
    n = len(piers)
    at = pier_of
    if at is None:
        at = pier_rows(actions.storey, actions.pier_id, piers.storey, piers.pier_id)
    if at is None:
        return None
    if hwe is not None:
        if hwe.index.nlevels != 2:
            return None
        at_hwe = pier_rows(
            piers.storey, piers.pier_id, hwe.index.get_level_values(0), hwe.index.get_level_values(1)
        )
        if at_hwe is None:
            return None
        he = hwe.to_numpy(dtype=float)
        he = np.where(at_hwe >= 0, he[np.maximum(at_hwe, 0)] if len(he) else np.nan, np.nan)
    else:
        he = np.full(n, np.nan)
    found = at >= 0  # the inner join keeps the action rows of these piers only
    pier = at[found]
    s = (actions.n.to_numpy() * 1e3)[found] / (piers.Lw.to_numpy()[pier] * piers.tw.to_numpy()[pier])
    sigma = group_max(s, pier, n)
    sigma = np.where(np.isnan(sigma), 0.0, sigma)
    sigma = np.where(sigma >= 0.0, sigma, 0.0)  # fillna(0).clip(lower=0): -0.0 stays, as there
    Hc = piers.Hc.to_numpy()
    cols = dict(sigma=sigma, hwe=np.where(np.isnan(he), Hc, he))
    if not std.detailing_needs_shear:
        return piers.assign(**cols, v_star=np.nan, hw_lw=np.nan)
    if shear is None:  # the shear check run here (and joined)
        return _with_shear(piers.assign(**cols), actions, settings, std, shear)
    if not same_keys(shear.storey, shear.pier_id, actions.storey, actions.pier_id):
        at = pier_rows(shear.storey, shear.pier_id, piers.storey, piers.pier_id)
    if at is None:
        return None
    found = at >= 0
    v_star = group_max(np.abs(shear.v.to_numpy(dtype=float)[found]) * 1e3, at[found], n)
    hw_lw = group_first(shear.hw_lw.to_numpy(dtype=float)[found], at[found], n)
    # no actions: V* = 0 (the lesser minima); Hw/Lw from the storey's clear height
    cols["v_star"] = np.where(np.isnan(v_star), 0.0, v_star)
    cols["hw_lw"] = np.where(np.isnan(hw_lw), Hc / piers.Lw.to_numpy(), hw_lw)
    return piers.assign(**cols)


def _inputs_by_merge(
    piers: pd.DataFrame,
    actions: pd.DataFrame,
    settings: Settings,
    hwe: pd.Series | None,
    std: Standard,
    shear: pd.DataFrame | None,
) -> pd.DataFrame:
    """The pier table with what the rules read per pier: sigma (the largest design compressive
    stress N*/(Lw tw) over the combinations, 0 at least), hwe (the effective height, the storey
    clear height where none is given), v_star and hw_lw (`_with_shear`), by joins on (storey,
    pier_id)."""
    p = piers.copy()
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
    return _with_shear(p, actions, settings, std, shear)


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
    util = _util(value, limit, kind)
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


def _util(value, limit, kind: str) -> np.ndarray:
    """A rule's utilisation: limit / value of a minimum (0 where there is no minimum, inf where
    there is none of the value), value / limit of a maximum."""
    value = np.asarray(value, dtype=float)
    limit = np.asarray(limit, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        if kind == "min":  # value must reach the limit
            return np.where(limit <= 0, 0.0, np.where(value > 0, limit / value, np.inf))
        return value / limit
