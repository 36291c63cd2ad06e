"""The cheapest changes that make each failing pier pass every check at its storey.

A search over discrete options, each evaluated with the same vectorised checks as the design
(shear, axial + bending, Cl 11.5, detailing Cl 11.7 and Section 14): a higher standard grade;
the lightest horizontal or vertical bar arrangement within the detailing limits; end-zone bars
at both free edges of the pier (offered first where axial + bending fails); a thicker wall in
25 mm steps. The actions are held as analysed (a stiffer pier would attract more; re-run the
analysis after a change). Options are ranked by the added cost per metre height of pier.
"""

from __future__ import annotations

import itertools

import numpy as np
import pandas as pd

from xlcore import costs, geometry
from xlcore.checks.axial import check_pier_axial
from xlcore.checks.detailing import check_detailing
from xlcore.checks.section14 import check_section14
from xlcore.checks.shear import check_pier_shear
from xlcore.codes import as3600
from xlcore.mechanics import bars
from xlcore.model import Settings

H_DIAS = (10.0, 12.0, 16.0, 20.0)
V_DIAS = (12.0, 16.0, 20.0, 24.0, 28.0)
SPACINGS = tuple(float(s) for s in range(100, 301, 25))
LAYERS = (1, 2)
THICKNESS_STEP, THICKNESS_STEPS = 25.0, 12
ZONE_DIAS = (20.0, 24.0, 28.0, 32.0, 36.0)
ZONE_BARS = (4, 6, 8, 10, 12)  # bars in each zone over all faces
ZONE_ROUND = 25.0  # mm: zone lengths rounded up to this
ZONE_KIND = "end-zone bars"
AXIAL_CHECK = "axial + bending"  # the summary's name of the pier N-M check


def _option_table() -> pd.DataFrame:
    """Every option of the search, in the order ties on cost are broken: grades up, then
    horizontal and vertical bars (diameter, spacing, layers), then thickness steps."""
    rows = [dict(kind="grade", option=f"f'c {g:g} MPa", grade=g) for g in as3600.STANDARD_GRADES]
    for kind, dias, prefix in (("horizontal bars", H_DIAS, "h"), ("vertical bars", V_DIAS, "v")):
        for d, sp, n in itertools.product(dias, SPACINGS, LAYERS):
            rows.append(
                dict(
                    kind=kind,
                    option=f"N{d:g} @ {sp:g} x {n} layer{'s' if n > 1 else ''}",
                    prefix=prefix,
                    dia=d,
                    spacing=sp,
                    layers=float(n),
                )
            )
    rows += [
        dict(kind=ZONE_KIND, option="", zone_dia=d, zone_bars=float(n))
        for d, n in itertools.product(ZONE_DIAS, ZONE_BARS)
    ]
    rows += [
        dict(kind="thickness", option="", step=k * THICKNESS_STEP) for k in range(1, THICKNESS_STEPS + 1)
    ]
    return pd.DataFrame(rows)


OPTIONS = _option_table()


def _candidates(
    piers: pd.DataFrame, targets: pd.DataFrame, settings: Settings
) -> tuple[pd.DataFrame, pd.DataFrame]:
    """Every option for every target as a variant pier row, with its added cost per metre:
    the targets crossed with the option table, less options that do not add to what is there
    (a lower grade, less steel), all column by column."""
    prices = costs.parse_concrete_prices(settings.concrete_prices)
    base = piers.merge(targets[["storey", "pier_id"]], on=["storey", "pier_id"]).reset_index(drop=True)
    for c in geometry.ZONE_COLUMNS:
        if c not in base:
            base[c] = np.nan if c.endswith("_ties") else 0.0
    o = OPTIONS
    bi = np.repeat(np.arange(len(base)), len(o))
    oi = np.tile(np.arange(len(o)), len(base))
    var = base.iloc[bi].reset_index(drop=True)
    kind = o.kind.to_numpy()[oi]
    tw0 = var.tw.to_numpy(float)
    keep = np.ones(len(var), dtype=bool)
    grade = kind == "grade"
    keep[grade] = o.grade.to_numpy()[oi][grade] > var.fc.to_numpy(float)[grade]
    var["fc"] = np.where(grade, o.grade.to_numpy()[oi], var.fc.to_numpy(float))
    for prefix, name in (("h", "horizontal bars"), ("v", "vertical bars")):
        sel = kind == name
        d, sp, n = (o[k].to_numpy()[oi] for k in ("dia", "spacing", "layers"))
        rho = geometry.bar_ratio(n, d, sp, tw0)
        keep[sel] = rho[sel] > var[f"rho_{prefix}"].to_numpy(float)[sel] + 1e-12  # only more steel
        for field, new in ((f"{prefix}_dia", d), (f"{prefix}_spacing", sp), (f"rho_{prefix}", rho)):
            var[field] = np.where(sel, new, var[field].to_numpy(float))
        var[f"{prefix}_layers"] = np.where(sel, n, var[f"{prefix}_layers"].to_numpy(float)).astype(int)
    thick = kind == "thickness"
    tw = np.where(thick, tw0 + np.nan_to_num(o.step.to_numpy()[oi]), tw0)
    for prefix in ("v", "h"):
        same = geometry.bar_ratio(
            *(var[f"{prefix}_{k}"].to_numpy(float) for k in ("layers", "dia", "spacing")), tw
        )
        var[f"rho_{prefix}"] = np.where(thick, same, var[f"rho_{prefix}"].to_numpy(float))
    var["tw"] = tw
    keep &= _zone_options(var, kind == ZONE_KIND, o.zone_dia.to_numpy()[oi], o.zone_bars.to_numpy()[oi])
    var, kind, oi = var[keep].reset_index(drop=True), kind[keep], oi[keep]
    bi = bi[keep]
    option = o.option.to_numpy()[oi].copy()
    thick = kind == "thickness"
    option[thick] = [f"tw {t:g} mm (same bars)" for t in var.tw.to_numpy()[thick].tolist()]
    zoned = kind == ZONE_KIND
    option[zoned] = [
        f"{n:g}N{d:g} in {length:g} mm at each end (ties not priced)"
        for n, d, length in zip(
            *(var[k].to_numpy()[zoned].tolist() for k in ("za_n", "za_dia", "za_len")), strict=True
        )
    ]
    # each variant's own pier ID, unique over storeys too: an integer, so that the checks' joins
    # on (storey, pier) and the maps by variant hash numbers, not text (a text ID per variant cost
    # a Python format per row and string factorising in every join)
    variant = np.arange(len(var), dtype=np.int64)
    meta = pd.DataFrame(
        dict(
            storey=var.storey.to_numpy(),
            pier_id=var.pier_id.to_numpy(),
            variant=variant,
            kind=kind,
            option=option,
        )
    )
    var["pier_id"] = variant

    def cost(df: pd.DataFrame) -> np.ndarray:
        concrete = costs.concrete_price(prices, df.fc.to_numpy(float))
        zone_area = sum(
            np.nan_to_num(df[f"z{side}_n"].to_numpy(float)) * bars.bar_area(np.nan_to_num(df[f"z{side}_dia"]))
            for side in "ab"
        )
        return np.asarray(
            costs.per_metre_height(df.Lw, df.tw, df.rho_v, df.rho_h, concrete, settings.steel_price)
        ) + costs.bars_per_metre_height(zone_area, settings.steel_price)

    meta["added_cost"] = cost(var) - cost(base)[bi]
    for key in ("fc", "tw", "rho_v", "rho_h"):
        meta[key] = var[key].to_numpy()
    return var, meta


def _zone_options(var: pd.DataFrame, sel: np.ndarray, dia: np.ndarray, n: np.ndarray) -> np.ndarray:
    """Put the end-zone options `sel` (n bars of `dia` at both free edges of the pier) into the
    variant rows; which of them to keep: a whole number of bars a face, a zone (the least
    length holding the bars at the clear-gap rule, rounded up to ZONE_ROUND) short enough that
    the two zones' innermost bars keep that gap, and more zone steel at each side than the pier
    has."""
    keep = np.ones(len(var), dtype=bool)
    if not sel.any():
        return keep
    layers = var.v_layers.to_numpy(float)
    d, count = np.nan_to_num(dia), np.nan_to_num(n)
    need = bars.zone_min_length(
        count, layers, d, var.cover.to_numpy(float), 0.0, as3600.wall_min_clear_gap(d)
    )
    length = np.ceil(need / ZONE_ROUND) * ZONE_ROUND
    area = count * bars.bar_area(d)
    more = np.ones(len(var), dtype=bool)
    for side in "ab":
        now = np.nan_to_num(var[f"z{side}_n"].to_numpy(float)) * bars.bar_area(
            np.nan_to_num(var[f"z{side}_dia"].to_numpy(float))
        )
        more &= area > now + 1e-9
    # the two zones' innermost bars (no ties) stay 3 db clear of each other: 2 L <= Lw - 3 db
    room = (var.Lw.to_numpy(float) - as3600.wall_min_clear_gap(d)) / 2
    fits = (count % np.maximum(layers, 1) == 0) & (length <= room) & more
    keep[sel] = fits[sel]
    for side in "ab":
        for k, v in (("n", count), ("dia", d), ("len", length), ("tie", 0.0), ("ties", np.nan)):
            col = f"z{side}_{k}"
            var[col] = np.where(sel, v, var[col].to_numpy(float))
    return keep


def _utilisation(
    var: pd.DataFrame, meta: pd.DataFrame, actions: pd.DataFrame, settings: Settings, only_axial: bool = False
) -> pd.Series:
    """Worst utilisation of the variants in `meta`, by variant ID (of the axial checks alone
    with `only_axial`)."""
    acts = actions.merge(meta[["storey", "pier_id", "variant"]], on=["storey", "pier_id"])
    acts = acts.drop(columns="pier_id").rename(columns={"variant": "pier_id"})
    return _worst(var[var.pier_id.isin(meta.variant)], acts, settings, only_axial)


def evaluate_options(
    piers: pd.DataFrame, actions: pd.DataFrame, targets: pd.DataFrame, settings: Settings
) -> pd.DataFrame:
    """Every option for every target (storey, pier_id): worst utilisation and added cost per
    metre height (all options run through the checks; `advise` stops early)."""
    var, meta = _candidates(piers, targets, settings)
    meta["util"] = meta.variant.map(_utilisation(var, meta, actions, settings)).astype(float)
    return meta


ROUND = 6  # options per (pier, kind) tried in the first round, cheapest first; doubling after


def advise(
    piers: pd.DataFrame, actions: pd.DataFrame, summary: pd.DataFrame, settings: Settings
) -> pd.DataFrame:
    """One row per failing storey x pier x kind of change: the cheapest passing option of that
    kind (or 'none in the search range'), its worst utilisation and added cost per metre.

    Options are tried in rounds, cheapest first, and a (pier, kind) stops at the first round
    that holds a passing option: every cheaper option was tried in an earlier round and failed,
    so the answer is the one an exhaustive search gives, at a fraction of its work."""
    failing = summary[summary.status == "FAIL"][["storey", "pier_id"]]
    if failing.empty:
        return pd.DataFrame(
            columns=["storey", "pier_id", "kind", "option", "util", "added_cost", "rank", "check", "util_now"]
        )
    var, meta = _candidates(piers, failing, settings)
    group = ["storey", "pier_id", "kind"]
    # horizontal bars change neither axial + bending nor Cl 11.5: where either fails they cannot
    # help, so those options are not run (exactly what running them would show)
    cols = [c for c in ("u_nm", "u_simplified") if c in summary]
    hopeless = (
        summary[(summary[cols] > 1.0).any(axis=1)][["storey", "pier_id"]] if cols else summary.iloc[0:0]
    )
    flagged = (
        meta.merge(hopeless.assign(_h=True), on=["storey", "pier_id"], how="left")._h.eq(True).to_numpy()
    )
    skip = flagged & (meta.kind == "horizontal bars").to_numpy()
    skipped = meta[skip][group].drop_duplicates()
    meta = meta[~skip]
    meta = meta.sort_values([*group, "added_cost"], kind="stable")
    meta["order"] = meta.groupby(group, sort=False).cumcount()
    meta["util"] = np.nan
    open_groups = meta[group].drop_duplicates()
    screen = _screening_actions(actions, failing)
    start, size, last = 0, ROUND, int(meta.order.max())
    while start <= last:
        batch = meta[(meta.order >= start) & (meta.order < start + size)].merge(open_groups, on=group)
        start, size = start + size, 2 * size  # later rounds larger: the piers still open need more
        if batch.empty:
            break
        # the few combinations that govern now first: an option failing those fails (the worst
        # over some combinations is at most the worst over all). Of those passing, the cheapest
        # per (pier, kind) is confirmed on every combination; if it fails there, the next.
        screened = _utilisation(var, batch, screen, settings)
        util = batch.variant.map(screened)
        util = util.where(util > 1.0)  # a screen pass proves nothing yet
        hopeful = batch[util.isna().to_numpy()]
        while len(hopeful):
            first = hopeful.groupby(group, sort=False).head(1)
            # shear governs at the largest |V*| and detailing at the largest N*, both in the
            # screen; axial + bending and Cl 11.5 need every combination
            on_screen = first.variant.map(screened).to_numpy()
            axial = first.variant.map(_utilisation(var, first, actions, settings, only_axial=True))
            full = pd.Series(np.fmax(on_screen, axial.to_numpy()), index=first.variant.to_numpy())
            unseen = first[np.isnan(on_screen)]  # no screen rows (not expected): every check
            if len(unseen):
                full.update(_utilisation(var, unseen, actions, settings))
            util = util.where(~batch.variant.isin(full.index), batch.variant.map(full))
            settled = first[first.variant.map(full).le(1.0).to_numpy()][group]
            hopeful = hopeful[~hopeful.variant.isin(first.variant)]
            hopeful = hopeful.merge(settled, on=group, how="left", indicator=True)
            hopeful = hopeful[hopeful._merge == "left_only"].drop(columns="_merge")
        worst = pd.Series(util.to_numpy(), index=batch.variant.to_numpy())
        meta.loc[meta.variant.isin(batch.variant), "util"] = meta.variant.map(worst)  # blank: not needed
        done = batch.assign(util=util.to_numpy())
        done = done[done.util <= 1.0][group].drop_duplicates()
        open_groups = open_groups.merge(done, on=group, how="left", indicator=True)
        open_groups = open_groups[open_groups._merge == "left_only"].drop(columns="_merge")
        if open_groups.empty:
            break
    passing = meta[meta.util <= 1.0].sort_values("added_cost", kind="stable")
    best = passing.groupby(group, sort=False).head(1)
    kinds = pd.concat([meta[group].drop_duplicates(), skipped], ignore_index=True)
    out = kinds.merge(best, on=group, how="left")
    out["option"] = out.option.fillna("none in the search range passes every check")
    out.loc[out.merge(skipped.assign(_s=True), on=group, how="left")._s.eq(True).to_numpy(), "option"] = (
        "none: horizontal bars do not change axial + bending or Cl 11.5, which fail"
    )
    out = out.merge(
        summary[["storey", "pier_id", "check", "util"]].rename(columns={"util": "util_now"}),
        on=["storey", "pier_id"],
    )
    # where axial + bending fails (tension or flexure: the failures end bars are for), a passing
    # end-zone option is offered first; otherwise the cheapest change ranks first
    first = ((out.kind == ZONE_KIND) & (out.check == AXIAL_CHECK)).to_numpy()
    key = out.added_cost.to_numpy(float) - np.where(first, 1e15, 0.0)
    out["rank"] = pd.Series(key, index=out.index).groupby([out.storey, out.pier_id]).rank(method="first")
    return out.sort_values(["storey", "pier_id", "rank"], na_position="last").reset_index(drop=True)


SCREEN = 2  # combinations per pier and measure of demand in the screening set


def _screening_actions(actions: pd.DataFrame, failing: pd.DataFrame) -> pd.DataFrame:
    """Per failing pier, the action rows of the combinations with the largest |V*|, N*, -N*,
    |M*|, |M*|/N* and out-of-plane M*: those that govern shear, squash, tension, bending and
    Cl 11.5 for any change of section in the search (a screen only: results are confirmed)."""
    acts = actions.merge(failing, on=["storey", "pier_id"])
    if acts.empty:
        return acts
    n = acts.n.to_numpy(float)
    m = np.abs(acts.m.to_numpy(float))
    measures = {
        "v": np.abs(acts.v.to_numpy(float)),
        "n": n,
        "t": -n,
        "m": m,
        "e": m / np.maximum(np.abs(n), 1e-9),
        "o": np.abs(np.nan_to_num(acts.m_out.to_numpy(float))) if "m_out" in acts else np.zeros(len(acts)),
    }
    groups = [acts.storey.to_numpy(), acts.pier_id.to_numpy()]
    pick = np.zeros(len(acts), dtype=bool)
    for values in measures.values():
        rank = (
            pd.Series(np.nan_to_num(values, nan=-np.inf))
            .groupby(groups)
            .rank(method="first", ascending=False)
        )
        pick |= (rank <= SCREEN).to_numpy()
    return acts[pick]


def _worst(var: pd.DataFrame, acts: pd.DataFrame, s: Settings, only_axial: bool = False) -> pd.Series:
    """Worst utilisation of every variant over every check and combination (over axial +
    bending and Cl 11.5 alone with `only_axial`)."""
    axial = check_pier_axial(var, acts, s, working=False)
    parts = [] if only_axial else [check_pier_shear(var, acts, s, working=False)[["pier_id", "util"]]]
    if len(axial):
        parts.append(axial[["pier_id", "util"]])
        simp = axial[axial.util_s.notna()]
        parts.append(simp[["pier_id", "util_s"]].rename(columns={"util_s": "util"}))
        hwe = axial.groupby(["storey", "pier_id"]).hwe.first()
    else:
        hwe = None
    if not only_axial:
        parts.append(check_detailing(var, acts, s, hwe, working=False)[["pier_id", "util"]])
        parts.append(check_section14(var, acts, s, hwe, working=False))
    if not parts:
        return pd.Series(dtype=float)
    return pd.concat(parts).groupby("pier_id").util.max()
