"""Earthquake detailing of every pier at every storey, AS 3600:2018 Section 14 (walls of structures
designed as limited ductile, mu = 2, or moderately ductile, mu = 3, for AS 1170.4 earthquake
actions). Rules and values as transcribed in docs/engineering-basis.md ("Earthquake detailing"):
from memory and secondary sources, each a Project setting: verify.

Rules per storey x pier: reinforcement in both faces, least vertical and horizontal ratios,
Hwe/tw, and under the earthquake combinations the 0.15 f'c extreme-fibre trigger of the end zones
(N*/A + |M*|/Z of the pier) with, where it is exceeded, the tie spacing those zones need.

End-zone bars: from the End zones sheet (the pier table's zone columns, `geometry.ZONE_COLUMNS`).
Where both free edges of a pier carry a zone with ties (the actions reverse, so either end may be
the compressed one), the larger of their tie spacings is checked against the smaller of their bar
diameters; otherwise the requirement is stated with status "check".
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore.checks import (
    RULE_COLUMNS,
    empty_rules,
    finish_rules,
    group_max,
    pier_rows,
    plain,
    rule_rows,
    special_walls,
)
from xlcore.codes import as3600, compression_flag_ratio, get_standard
from xlcore.codes.base import Standard, words_once
from xlcore.model import Settings
from xlcore.results import CHECK, FAIL, NOT_APPLICABLE, NOT_REQUIRED, PASS, REQUIRED

RULES = (
    "both faces",
    "vertical ratio",
    "horizontal ratio",
    "Hwe/tw",
    "end-zone trigger",
    "end-zone ties",
)
# pier-table columns of the end-zone bars, when an input describes them: the vertical bar
# diameter in the end zone [mm] and the spacing of the ties that restrain those bars [mm]
CLAUSE = {
    "both faces": "Cl 14.6 (two layers)",
    "vertical ratio": "Cl 14.6 (least ratio)",
    "horizontal ratio": "Cl 14.6 (least ratio)",
    "Hwe/tw": "Section 14 (Hwe/tw)",
    "end-zone trigger": "Cl 14.6.2.1 (0.15 f'c)",
    "end-zone ties": "Cl 14.6.2 (end-zone ties)",
}
MEMORY = "from memory: verify"


def not_applicable_reason(settings: Settings) -> str | None:
    """Why no Section 14 rows (under ACI 318: no special-wall rows) are made for this building,
    or None where they are."""
    if special_walls.applies(settings):
        return special_walls.not_applicable_reason(settings)
    if not as3600.section14_applies(settings.mu):
        return (
            f"structural ductility factor {settings.ductility} (Project setting): Section 14's wall "
            "rules apply to limited-ductile (mu = 2) and moderately-ductile (mu = 3) structures only"
        )
    return None


def ductility_basis(settings: Settings) -> str:
    """The ductility part of every row's basis."""
    if settings.mu >= 3:
        return (
            f"{settings.ductility}: limited-ductile rules applied as a floor; further "
            "moderately-ductile provisions not checked"
        )
    return settings.ductility


def check_section14(
    piers: pd.DataFrame,
    actions: pd.DataFrame,
    settings: Settings,
    hwe: pd.Series | None = None,
    working: bool = True,
    *,
    std: Standard | None = None,
    pier_of: np.ndarray | None = None,
) -> pd.DataFrame:
    """One row per storey x pier x applicable rule (empty where Section 14 does not apply:
    `not_applicable_reason`). `hwe` [mm] per (storey, pier) from the Cl 11.4 effective height of
    the axial check; the storey clear height otherwise. Without `working`, only the pier and the
    utilisation of the rules that pass or fail (what the advice search needs).

    The earthquake wall rules of the Project's standard: under ACI 318-19 the special
    structural wall rules of Chapter 18 (`special_walls.check_special_walls`), so the pipeline
    and the advice search reach either through this one call. `pier_of`: each action row's row
    in `piers` as `checks.pier_rows` gives it, where the caller has it; None: matched here."""
    std = (std or get_standard(settings.standard)).configure(settings)
    if special_walls.applies(settings, std):
        return special_walls.check_special_walls(piers, actions, settings, hwe, working, std=std)
    if not_applicable_reason(settings) is not None or piers.empty:
        return empty_rules(COLUMNS, working)
    p = _with_hwe(piers, hwe)
    basis = ductility_basis(settings)
    parts: list[tuple] = []

    def rule(rows, name, value, limit, kind, unit, status, util, text, why):
        """One rule's rows over the piers `rows` (positions in p; None: every pier)."""
        parts.append((rows, name, value, limit, kind, unit, status, util, text, f"{basis}; {why}"))

    layers = as3600.eq_wall_layers(p.v_layers, p.h_layers)
    if settings.eq_two_layers == "yes":
        need = np.full(len(p), float(as3600.SECTION14_LAYERS))
        met = layers >= need
        # a yes/no rule: no ratio where it is met (a 1.00 on every pier would read as "close"),
        # layers needed / provided where it is not
        rule(
            None,
            "both faces",
            layers,
            need,
            "min",
            "layers",
            _pass_fail_where(met),
            np.where(met, np.nan, need / np.maximum(layers, 1.0)),
            lambda: words_once(
                lambda *cols: [
                    f"layers: vertical {v:.0f}, horizontal {h:.0f} -> {n:.0f} vs 2 (one near each face)"
                    for v, h, n in zip(*plain(*cols), strict=True)
                ],
                p.v_layers,
                p.h_layers,
                layers,
            ),
            f"both faces (Project setting), {MEMORY}",
        )
    rho_min = as3600.eq_wall_rho_min(settings.eq_rho_min)
    for name, rho, dia, s, n in (
        ("vertical ratio", p.rho_v, p.v_dia, p.v_spacing, p.v_layers),
        ("horizontal ratio", p.rho_h, p.h_dia, p.h_spacing, p.h_layers),
    ):
        rho = rho.to_numpy(float)
        u = _at_least(rho, rho_min)
        rule(
            None,
            name,
            rho,
            np.full(len(p), rho_min),
            "min",
            "",
            _pass_fail(u),
            u,
            lambda rho=rho, dia=dia, s=s, n=n: words_once(
                lambda *cols: [
                    f"rho = {k:.0f} x pi {d:g}^2/4 / ({sp:g} x {t:g}) = {r:.5f} vs {rho_min:g}"
                    for k, d, sp, t, r in zip(*plain(*cols), strict=True)
                ],
                n,
                dia,
                s,
                p.tw,
                rho,
            ),
            f"{rho_min:g} each way, no Cl 11.7 relaxation (Project setting), {MEMORY}",
        )
    slender = as3600.eq_wall_slenderness(p.hwe, p.tw)
    limit = settings.eq_slenderness
    u = slender / limit
    rule(
        None,
        "Hwe/tw",
        slender,
        np.full(len(p), limit),
        "max",
        "",
        _pass_fail(u),
        u,
        lambda: words_once(
            lambda *cols: [
                f"Hwe/tw = {h:.0f} / {t:.0f} = {r:.1f} vs {limit:g}"
                for h, t, r in zip(*plain(*cols), strict=True)
            ],
            p.hwe,
            p.tw,
            slender,
        ),
        f"Hwe by Cl 11.4 (clear height where no actions); {limit:g} (Project setting), {MEMORY}",
    )
    if working or not np.isnan(_end_bars(p)).all():
        # without working only pass / FAIL rows count: end zones give those only where their
        # bars are described (the trigger is never a failure)
        # the caller's match holds for p where p is the pier table's rows (one hwe each)
        _end_zones(p, actions, settings, rule, std, pier_of if len(p) == len(piers) else None)
    if not working:
        return _pass_fail_rows(p, parts)
    frames = [
        rule_rows(p if rows is None else p.iloc[rows].reset_index(drop=True), *rest, working)
        for rows, *rest in parts
    ]
    return finish_rules(pd.concat(frames, ignore_index=True), p, working, CLAUSE, RULES)


def _with_hwe(piers: pd.DataFrame, hwe: pd.Series | None) -> pd.DataFrame:
    """The pier table with `hwe` [mm], the effective height given per (storey, pier_id) or the
    storey clear height where none is: by position where each pier is one row of `hwe`
    (`pier_rows`), else by the join on the two keys."""
    if hwe is None:
        return piers.assign(hwe=piers.Hc.to_numpy(dtype=float))
    at = None
    if hwe.index.nlevels == 2:
        keys = (hwe.index.get_level_values(0), hwe.index.get_level_values(1))
        at = pier_rows(piers.storey, piers.pier_id, *keys)
    if at is None:
        p = piers.merge(hwe.rename("hwe"), left_on=["storey", "pier_id"], right_index=True, how="left")
        p["hwe"] = p.hwe.fillna(p.Hc)
        return p
    he = hwe.to_numpy(dtype=float)
    he = np.where(at >= 0, he[np.maximum(at, 0)] if len(he) else np.nan, np.nan)
    return piers.assign(hwe=np.where(np.isnan(he), piers.Hc.to_numpy(), he))


def _pass_fail_rows(p: pd.DataFrame, parts: list[tuple]) -> pd.DataFrame:
    """(pier_id, util) of the rules' pass / FAIL rows, as `finish_rules` without working gives
    them from the rule tables (`rule_rows`): one array each, no table per rule."""
    every = np.arange(len(p))
    rows = np.concatenate([every if r[0] is None else r[0] for r in parts])
    n = [len(p) if r[0] is None else len(r[0]) for r in parts]
    util = np.concatenate(
        [np.broadcast_to(np.asarray(r[7], dtype=float), (k,)) for r, k in zip(parts, n, strict=True)]
    )
    status = np.concatenate(
        [np.broadcast_to(np.asarray(r[6], dtype=object), (k,)) for r, k in zip(parts, n, strict=True)]
    )
    keep = (status == PASS) | (status == FAIL)
    out = pd.DataFrame({"pier_id": p.pier_id.to_numpy()[rows], "util": util})
    return out[keep][["pier_id", "util"]].reset_index(drop=True)


def _end_zones(
    p: pd.DataFrame, actions: pd.DataFrame, settings: Settings, rule, std: Standard, pier_of=None
) -> None:
    """The end-zone trigger under the earthquake combinations and, where exceeded, the ties."""
    quake = settings.earthquake
    ratio = compression_flag_ratio(settings.compression_limit, std)
    trigger = as3600.end_zone_trigger(p.fc.to_numpy(float), ratio)
    nan = np.full(len(p), np.nan)
    if not quake:
        rule(
            None,
            "end-zone trigger",
            nan,
            trigger,
            "max",
            "MPa",
            np.full(len(p), NOT_APPLICABLE, dtype=object),
            nan,
            lambda: ["no earthquake combinations named (Project setting 'Earthquake combinations')"] * len(p),
            "n/a: the 0.15 f'c trigger applies under earthquake combinations only and none is named",
        )
        return
    w = _worst_by_position(p, actions, quake, pier_of)
    if w is None:  # a key blank or not unique, or a pier's stresses all NaN: the joins decide
        w = _worst_by_merge(p, actions, quake)
    has = w.smax.notna().to_numpy()
    smax, smin = w.smax.to_numpy(float), w.smin.to_numpy(float)
    over = has & (smax > trigger)
    u = np.where(has, smax / trigger, np.nan)
    status = np.where(~has, NOT_APPLICABLE, np.where(over, REQUIRED, NOT_REQUIRED)).astype(object)
    zone = as3600.end_zone_length(smax, smin, trigger, p.Lw.to_numpy(float))
    names = ", ".join(sorted(quake))

    def trigger_text() -> list[str]:
        out = []
        for ok, c, n, m, L, t, s1, s2, lim, z in zip(
            has.tolist(),
            w.combination.tolist(),
            *plain(w.n, w.m, p.Lw, p.tw, smax, smin, trigger, zone),
            strict=True,
        ):
            if not ok:
                out.append(f"no actions at this storey under the earthquake combinations ({names})")
                continue
            text = (
                f"{c}: sigma = N*/A + |M*|/Z = {n:.1f} x 1e3 / ({L:.0f} x {t:.0f}) + |{m:.1f}| x 1e6 x 6 / "
                f"({t:.0f} x {L:.0f}^2) = {s1:.2f} MPa (other end {s2:.2f}) vs {ratio:g} f'c = {lim:.2f} MPa"
            )
            if s1 > lim:
                text += "; end zone required " + _zone_words(z, L)
            out.append(text)
        return out

    rule(
        None,
        "end-zone trigger",
        np.where(has, smax, np.nan),
        trigger,
        "max",
        "MPa",
        status,
        u,
        trigger_text,
        f"worst of {names}; gross section, linear elastic, |M*| (actions reverse); {ratio:g} f'c "
        "(Project setting); a trigger, not a failure; Low confidence",
    )
    if not over.any():
        return
    at_z = np.flatnonzero(over)
    z = p.iloc[at_z].reset_index(drop=True)
    zlen = zone[over]
    bars = _end_bars(z)  # end-zone bar diameter and tie spacing; NaN where not described
    described = ~np.isnan(bars).any(axis=1)
    db = np.where(described, bars[:, 0], z.v_dia.to_numpy(float))  # else the wall's vertical bar
    need = as3600.end_zone_tie_spacing(db, settings.eq_tie_diameters, settings.eq_tie_max)
    given = np.where(described, bars[:, 1], np.nan)
    u = np.where(described, given / need, np.nan)
    status = np.where(described, _pass_fail(u), CHECK).astype(object)
    k, cap = settings.eq_tie_diameters, settings.eq_tie_max

    def ties_text() -> list[str]:
        out = []
        for d, s, n, zl, L, ok in zip(*plain(db, given, need, zlen, z.Lw), described.tolist(), strict=True):
            req = f"ties at most min({k:g} x {d:g}, {cap:g}) = {n:.0f} mm {_zone_words(zl, L)}"
            if ok:
                out.append(f"s = {s:.0f} mm vs {req}")
            else:
                out.append(
                    f"end-zone bars not described: restrain every vertical bar of the end zone with {req} "
                    f"(db taken as the wall's vertical bar, {d:g} mm)"
                )
        return out

    rule(
        at_z,
        "end-zone ties",
        given,
        need,
        "max",
        "mm",
        status,
        u,
        ties_text,
        f"where the trigger is exceeded; min({k:g} db, {cap:g} mm) (Project settings), {MEMORY}; "
        "'check' until end-zone bars are described",
    )


def _worst_by_merge(p: pd.DataFrame, actions: pd.DataFrame, quake) -> pd.DataFrame:
    """Per pier of `p` (in its order) the action row under the earthquake combinations `quake`
    with the largest extreme-fibre compression (the first of equal ones), its combination, N*,
    M* and the two stresses; NaN where the pier has none: by joins on (storey, pier_id)."""
    acts = actions[actions.combination.astype(str).isin(quake)]
    geo = p[["storey", "pier_id", "Lw", "tw"]]
    a = acts[["storey", "pier_id", "combination", "n", "m"]].merge(geo, on=["storey", "pier_id"])
    smax, smin = as3600.pier_extreme_fibre_stress(a.n * 1e3, a.m * 1e6, a.Lw, a.tw)
    a = a.assign(smax=smax, smin=smin)
    worst = a.loc[a.groupby(["storey", "pier_id"], sort=False).smax.idxmax()] if len(a) else a
    return p[["storey", "pier_id"]].merge(
        worst[["storey", "pier_id", "combination", "n", "m", "smax", "smin"]],
        on=["storey", "pier_id"],
        how="left",
    )


def _worst_by_position(
    p: pd.DataFrame, actions: pd.DataFrame, quake, pier_of: np.ndarray | None = None
) -> pd.DataFrame | None:
    """`_worst_by_merge`'s rows (the columns the trigger reads: combination, n, m, smax, smin)
    with the action rows found by position (`pier_rows`) and each pier's first largest stress
    by group (`group_max`: what `idxmax` picks), no join of the action rows' text keys. None
    where a key is blank or a pier not unique, or where a pier's stresses are all NaN (idxmax
    refuses that group: the joins say so). `pier_of`: `pier_rows`' answer for these tables
    where the caller has it."""
    at = pier_of if pier_of is not None else pier_rows(actions.storey, actions.pier_id, p.storey, p.pier_id)
    if at is None:
        return None
    rows = np.flatnonzero(actions.combination.astype(str).isin(quake).to_numpy() & (at >= 0))
    pier = at[rows]
    n_star, m_star = actions.n.to_numpy()[rows] * 1e3, actions.m.to_numpy()[rows] * 1e6
    smax, smin = as3600.pier_extreme_fibre_stress(
        n_star, m_star, p.Lw.to_numpy()[pier], p.tw.to_numpy()[pier]
    )
    top = group_max(smax, pier, len(p))
    if (np.isnan(top) & (np.bincount(pier, minlength=len(p)) > 0)).any():
        return None
    hit = np.flatnonzero(smax == top[pier])
    first = np.full(len(p), len(rows), dtype=np.intp)
    np.minimum.at(first, pier[hit], hit)
    has = first < len(rows)
    pick = first[has]

    def per_pier(values: np.ndarray, blank) -> np.ndarray:
        out = np.full(len(p), blank, dtype=values.dtype if blank is not None else object)
        out[has] = values[pick]
        return out

    return pd.DataFrame(
        {
            "combination": per_pier(actions.combination.to_numpy(dtype=object)[rows], None),
            "n": per_pier(actions.n.to_numpy(dtype=float)[rows], np.nan),
            "m": per_pier(actions.m.to_numpy(dtype=float)[rows], np.nan),
            "smax": per_pier(np.asarray(smax, dtype=float), np.nan),
            "smin": per_pier(np.asarray(smin, dtype=float), np.nan),
        }
    )


def _end_bars(p: pd.DataFrame) -> np.ndarray:
    """End-zone bar diameter and tie spacing of each pier as rows x 2 floats: the smaller bar and
    the larger tie spacing of its two end zones (either end may be the compressed one); NaN where
    an end has no zone or its zone has no ties (then the requirement is stated, status "check").
    The one place that reads the end-zone columns of the pier table."""
    if "za_n" not in p:
        return np.full((len(p), 2), np.nan)
    both = (p.za_n.to_numpy(float) > 0) & (p.zb_n.to_numpy(float) > 0)
    dia = np.minimum(p.za_dia.to_numpy(float), p.zb_dia.to_numpy(float))
    ties = np.maximum(p.za_ties.to_numpy(float), p.zb_ties.to_numpy(float))  # NaN (no ties) stays NaN
    return np.column_stack([np.where(both, dia, np.nan), np.where(both, ties, np.nan)])


end_zone_bars = _end_bars  # read the same way by the ACI 318 special-wall rules (special_walls.py)


def _zone_words(zone: float, Lw: float) -> str:
    """Where the end zones lie: from each end (the actions reverse), or the whole pier where the
    two zones meet."""
    if 2.0 * zone >= Lw:
        return f"over the whole pier ({Lw:.0f} mm: the zones from each end, {zone:.0f} mm, meet)"
    return f"over {zone:.0f} mm from each end"


def _pass_fail(util) -> np.ndarray:
    return _pass_fail_where(np.asarray(util, dtype=float) <= 1.0 + 1e-9)


def _pass_fail_where(ok) -> np.ndarray:
    """PASS where `ok`, FAIL elsewhere, as an object array: taken from the two words (not a
    numpy string array converted to a Python string per row)."""
    return np.array([FAIL, PASS], dtype=object)[np.asarray(ok, dtype=bool).astype(np.intp)]


def _at_least(value, limit) -> np.ndarray:
    """limit / value of a minimum (inf where there is none of it)."""
    value = np.asarray(value, dtype=float)
    with np.errstate(divide="ignore"):
        return np.where(value > 0, limit / np.where(value > 0, value, 1.0), np.inf)


COLUMNS = RULE_COLUMNS
