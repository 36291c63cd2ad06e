"""Earthquake wall rules of ACI 318-19 Chapter 18 for special structural walls, per storey x pier
(x earthquake combination where the rule depends on the actions).

Why a module of its own (and not section14.py made standard-neutral): AS 3600 Section 14 and
ACI 318 Chapter 18 ask different questions. Section 14 sets least ratios, a slenderness limit
and an elastic-stress trigger for end zones; Chapter 18 amplifies the design shear (18.10.3.1),
finds boundary elements from the neutral-axis depth and the design displacement (18.10.6.2) or
the elastic stress (18.10.6.3), and sizes them from c (18.10.6.4). An interface member per rule
would be answered by one standard only, so the rules are called from codes/aci318.py here, as
section14.py calls codes/as3600.py; `section14.check_section14` is the one entry point (the
pipeline and the advice search call it) and hands ACI 318 projects to `check_special_walls`.

Rows (statuses as on the Section 14 sheet): pass / FAIL a rule met or not; required / not
required a boundary-element trigger (not a failure); check a requirement xlcore cannot verify
(boundary-element bars not described on the End zones sheet); n/a where a rule has no input.

Readings, each said on the rows (docs/engineering-basis.md, "ACI 318-19 special structural
walls"): the critical section at the base, hwcs = the wall's overall height; hwcs/lw and hw/lw
with the pier's own lw (the larger ratio: the conservative reading for a pier of a wall with
openings); Vn by 11.5.4 / 18.10.4.1 capped at 0.66 sqrt(f'c) Acv (not the 0.83 of one segment);
c from the pier's own section (the End zones bars at their places, the 22.2 block) at Pu of each
combination, the larger of the two directions (the actions reverse).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore.checks import empty_rules, finish_rules, plain, rule_columns, rule_rows, worst_rule_text
from xlcore.checks.axial import rect_sections
from xlcore.codes import aci318, get_standard
from xlcore.codes.base import Standard
from xlcore.mechanics import nm
from xlcore.model import Settings
from xlcore.results import CHECK, FAIL, NOT_APPLICABLE, NOT_REQUIRED, PASS, REQUIRED

ALL = "(all)"
RULES = (
    "web vertical ratio",
    "web horizontal ratio",
    "two curtains",
    "shear amplification",
    "boundary: stress",
    "boundary: displacement",
    "drift capacity",
    "boundary length",
    "boundary width",
    "boundary hoops",
    "boundary Ash",
)
CLAUSE = {
    "web vertical ratio": "ACI 18.10.2.1, 18.10.4.3",
    "web horizontal ratio": "ACI 18.10.2.1",
    "two curtains": "ACI 18.10.2.2",
    "shear amplification": "ACI 18.10.3.1, 18.10.4.1",
    "boundary: stress": "ACI 18.10.6.3",
    "boundary: displacement": "ACI 18.10.6.2(a)",
    "drift capacity": "ACI 18.10.6.2(b)(ii), (iii)",
    "boundary length": "ACI 18.10.6.4(a)",
    "boundary width": "ACI 18.10.6.4(b), (c)",
    "boundary hoops": "ACI 18.10.6.4(e), 18.7.5.3",
    "boundary Ash": "ACI Table 18.10.6.4(g)",
}
MEMORY = "from memory: verify"


def applies(settings: Settings, std: Standard | None = None) -> bool:
    """True where the Project's standard is ACI 318-19: its earthquake wall rules are these."""
    std = (std or get_standard(settings.standard)).configure(settings)
    return std.name == aci318.NAME


def not_applicable_reason(settings: Settings) -> str | None:
    """Why no special-wall rows are made, or None where they are."""
    if settings.aci_special_walls != "yes":
        return (
            "walls are not special structural walls (Project setting 'ACI 318: walls are special "
            "structural walls'): the Chapter 18 wall rules are not checked"
        )
    return None


def storeys_above(settings: Settings, n_storeys: int) -> float:
    """ns of 18.10.3.1.3: the setting, or every storey of the building (critical section at the
    base). The code's least ns (0.007 hwcs in inches) is applied per wall where omega_v is found
    (`aci318.storeys_for_amplification`)."""
    return float(settings.aci_storeys_above) if settings.aci_storeys_above is not None else float(n_storeys)


def check_special_walls(
    piers: pd.DataFrame,
    actions: pd.DataFrame,
    settings: Settings,
    hwe: pd.Series | None = None,
    working: bool = True,
    *,
    std: Standard | None = None,
    n_storeys: int | None = None,
) -> pd.DataFrame:
    """Rows per storey x pier x rule (x earthquake combination for the rules that depend on the
    actions; "(all)" otherwise). `hwe` is accepted for the Section 14 entry point's signature
    (Chapter 18 sets no slenderness limit of its own). `n_storeys` for ns where the setting is
    blank (default: the storeys the piers stand at). Without `working`, only the pier and the
    utilisation of pass / FAIL rows (what the advice search needs)."""
    std = (std or get_standard(settings.standard)).configure(settings)
    if not_applicable_reason(settings) is not None or piers.empty:
        return empty_rules(COLUMNS, working)
    p = piers.reset_index(drop=True).copy()
    if n_storeys is None:
        n_storeys = int(p.storey_index.max()) + 1
    ns = storeys_above(settings, n_storeys)
    parts: list[pd.DataFrame] = []

    def rule(rows, combo, name, value, limit, kind, unit, status, util, text, why):
        parts.append(rule_rows(rows, name, value, limit, kind, unit, status, util, text, why, working, combo))

    Lw, tw, fc, fy = (p[k].to_numpy(float) for k in ("Lw", "tw", "fc", "fsy"))
    hwcs_lw = p.H_wall.to_numpy(float) / Lw
    acts = actions[["storey", "pier_id", "combination", "n", "m", "v"]]
    v_all = (
        acts.assign(va=acts.v.abs() * 1e3)
        .groupby(["storey", "pier_id"])
        .va.max()
        .reindex(pd.MultiIndex.from_frame(p[["storey", "pier_id"]]))
        .fillna(0.0)
        .to_numpy(float)
    )
    _web(p, std, v_all, hwcs_lw, rule)
    quake = settings.earthquake
    if not quake:
        nan = np.full(len(p), np.nan)
        rule(
            p,
            np.full(len(p), ALL),
            "shear amplification",
            nan,
            nan,
            "max",
            "kN",
            np.full(len(p), NOT_APPLICABLE, dtype=object),
            nan,
            lambda: ["no earthquake combinations named (Project setting 'Earthquake combinations')"] * len(p),
            "n/a: shear amplification and boundary elements are found under earthquake combinations only",
        )
    else:
        a = acts[acts.combination.astype(str).isin(quake)]
        pos = pd.Series(np.arange(len(p)), index=pd.MultiIndex.from_frame(p[["storey", "pier_id"]]))
        at = pos.reindex(pd.MultiIndex.from_frame(a[["storey", "pier_id"]])).to_numpy()
        a, at = a[~np.isnan(at)], at[~np.isnan(at)]
        if len(a):
            _per_combination(p, at, a, settings, std, ns, rule)
    return finish_rules(pd.concat(parts, ignore_index=True), p, working, CLAUSE, RULES, every=ALL)


# ---------------------------------------------------------------- per pier


def _web(p: pd.DataFrame, std: Standard, v_all, hwcs_lw, rule) -> None:
    """18.10.2.1 least web ratios (the 11.6 minima where |Vu| <= 0.083 sqrt(f'c) Acv),
    18.10.4.3 rho_l >= rho_t where hw/lw <= 2.0, 18.10.2.2 two curtains."""
    Lw, tw, fc, fy = (p[k].to_numpy(float) for k in ("Lw", "tw", "fc", "fsy"))
    rho_v, rho_h = p.rho_v.to_numpy(float), p.rho_h.to_numpy(float)
    base, low = aci318.special_web_min_ratio(v_all, fc, Lw, tw)
    common = dict(
        fc=fc, fy=fy, tw=tw, Lw=Lw, wall_length=p.wall_length.to_numpy(float) * 1000.0,
        sigma=np.zeros(len(p)), v_star=v_all, hw_lw=hwcs_lw, rho_h=rho_h, restrained=True,
    )  # fmt: skip
    _, t_116 = std.min_ratios(bar_dia=p.h_dia.to_numpy(float), **common)
    squat = aci318.special_rho_l_min(hwcs_lw, rho_h)
    # the low-shear relaxation to the 11.6 minima is taken for rho_t only (the conservative
    # reading: aci318.special_web_min_ratio; whether 318-19 relaxes rho_l too: from memory)
    lim_v = np.maximum(base, squat)
    lim_h = np.where(low, t_116, base)
    all_ = np.full(len(p), ALL)
    thr = 0.083 * np.sqrt(fc) * Lw * tw

    def head(i: int, vertical: bool = False) -> str:
        return (
            f"|Vu| = {v_all[i] * 1e-3:.1f} kN {'<=' if low[i] else '>'} 0.083 sqrt({fc[i]:g}) x "
            f"{Lw[i]:.0f} x {tw[i]:.0f} = {thr[i] * 1e-3:.1f} kN: "
            + ("0.0025 (no relaxation of rho_l)" if vertical else "11.6 minimum" if low[i] else "0.0025")
        )

    u = _at_least(rho_v, lim_v)
    rule(
        p,
        all_,
        "web vertical ratio",
        rho_v,
        lim_v,
        "min",
        "",
        _pass_fail(u),
        u,
        lambda: [
            f"rho_l = {r:.5f} vs {m:.5f} ({head(i, vertical=True)}"
            + (f"; hw/lw = {h:.2f} <= 2.0: at least rho_t = {t:.5f}" if h <= 2.0 else "")
            + ")"
            for i, (r, m, h, t) in enumerate(zip(*plain(rho_v, lim_v, hwcs_lw, rho_h), strict=True))
        ],
        "largest |Vu| over all combinations; hw/lw with the overall height and the pier's own lw",
    )
    u = _at_least(rho_h, lim_h)
    rule(
        p,
        all_,
        "web horizontal ratio",
        rho_h,
        lim_h,
        "min",
        "",
        _pass_fail(u),
        u,
        lambda: [
            f"rho_t = {r:.5f} vs {m:.5f} ({head(i)})"
            for i, (r, m) in enumerate(zip(rho_h, lim_h, strict=True))
        ],
        "largest |Vu| over all combinations",
    )
    need = aci318.special_two_curtains(v_all, fc, Lw, tw, hwcs_lw)
    layers = np.minimum(p.v_layers.to_numpy(float), p.h_layers.to_numpy(float))
    met = layers >= 2
    thr2 = 0.17 * np.sqrt(fc) * Lw * tw
    rule(
        p,
        all_,
        "two curtains",
        layers,
        np.full(len(p), 2.0),
        "min",
        "layers",
        np.where(need, np.where(met, PASS, FAIL), NOT_REQUIRED).astype(object),
        np.where(need & ~met, 2.0 / np.maximum(layers, 1.0), np.nan),
        lambda: [
            f"layers {n:.0f}; required: |Vu| = {v * 1e-3:.1f} kN {'>' if v > t else '<='} 0.17 sqrt(f'c) "
            f"Acv = {t * 1e-3:.1f} kN, hw/lw = {h:.2f} {'>=' if h >= 2.0 else '<'} 2.0 -> "
            + ("two curtains" if q else "not required")
            for n, v, t, h, q in zip(*plain(layers, v_all, thr2, hwcs_lw), need.tolist(), strict=True)
        ],
        "largest |Vu| over all combinations",
    )


# ---------------------------------------------------------------- per earthquake combination


def _per_combination(p, at, a, settings: Settings, std: Standard, ns: float, rule) -> None:
    """Shear amplification and boundary elements, one row per pier x earthquake combination."""
    at = np.asarray(at, dtype=int)
    q = p.iloc[at].reset_index(drop=True)
    combo = a.combination.astype(str).to_numpy()
    Lw, tw, fc, fy = (q[k].to_numpy(float) for k in ("Lw", "tw", "fc", "fsy"))
    hw = q.H_wall.to_numpy(float)
    hwcs_lw = hw / Lw
    vu = np.abs(a.v.to_numpy(float)) * 1e3
    pu = a.n.to_numpy(float) * 1e3
    mu = np.abs(a.m.to_numpy(float)) * 1e6

    # ---- 18.10.3.1 shear amplification against phi Vn
    ns_used = aci318.storeys_for_amplification(ns, hw)  # not less than 0.007 hwcs (in.), 18.10.3.1.3
    Om = aci318.omega_v(hwcs_lw, settings.aci_mpr_mu)
    om = aci318.omega_v_dynamic(hwcs_lw, ns_used)
    ve = aci318.design_shear_special(vu, hwcs_lw, ns_used, settings.aci_mpr_mu)
    phi = settings.phi_shear if settings.phi_shear is not None else std.phi_wall_shear
    cap = std.wall_shear(fc, fy, Lw, tw, hwcs_lw, q.rho_h.to_numpy(float), q.rho_v.to_numpy(float), phi)
    u = np.where(cap.design > 0, ve / cap.design, np.inf)
    rule(
        q,
        combo,
        "shear amplification",
        ve * 1e-3,
        cap.design * 1e-3,
        "max",
        "kN",
        _pass_fail(u),
        u,
        lambda: [
            f"hwcs/lw = {h:.2f}: Omega_v = {o1:.2f}, omega_v = {o2:.2f} (ns = max({ns:g}, 0.007 x "
            f"{hh:.0f}/25.4 = {nmin:.1f}) = {nu:.1f}); Ve = min({o1:.2f} x "
            f"{o2:.2f} x {v * 1e-3:.1f}, 3 x {v * 1e-3:.1f}) = {e * 1e-3:.1f} kN vs phi Vn = {ph:.2f} x "
            f"min(({ac:.3f} sqrt({f:g}) + {r:.5f} x {min(y, aci318.FYT_MAX_SHEAR):g}) x {L:.0f} x {t:.0f}, "
            f"0.66 sqrt(f'c) Acv) = {c * 1e-3:.1f} kN"
            for h, hh, nmin, nu, o1, o2, v, e, ph, ac, f, r, y, L, t, c in zip(
                *plain(
                    hwcs_lw,
                    hw,
                    aci318.ns_min(hw),
                    ns_used,
                    Om,
                    om,
                    vu,
                    ve,
                    cap.phi,
                    cap.detail["alpha_c"],
                    fc,
                    q.rho_h,
                    fy,
                    Lw,
                    tw,
                    cap.design,
                ),
                strict=True,
            )
        ],
        f"Omega_v with Mpr/Mu {settings.aci_mpr_mu:g} (Project setting); omega_v with ns not less than "
        f"0.007 hwcs (in.) (ACI MNL-17(21) Ex. 2 agrees); phi {phi:g} ({_phi_source(settings)}); Vn "
        "capped at 0.66 sqrt(f'c) Acv (the 0.83 of one segment not used)",
    )

    # ---- 18.10.6.3 stress method
    sigma = pu / (Lw * tw) + 6.0 * mu / (tw * Lw**2)
    trig = aci318.STRESS_TRIGGER * fc
    stop = aci318.STRESS_DISCONTINUE * fc
    by_stress = aci318.boundary_required_stress(sigma, fc)
    rule(
        q,
        combo,
        "boundary: stress",
        sigma,
        trig,
        "max",
        "MPa",
        np.where(by_stress, REQUIRED, NOT_REQUIRED).astype(object),
        sigma / trig,
        lambda: [
            f"sigma = Pu/A + |Mu|/Z = {n * 1e-3:.1f} x 1e3 / ({L:.0f} x {t:.0f}) + {m * 1e-6:.1f} x 1e6 "
            f"x 6 / ({t:.0f} x {L:.0f}^2) = {s:.2f} MPa {'>' if s > g else '<='} 0.2 f'c = {g:.2f} MPa"
            + (
                f"; may stop where below 0.15 f'c = {e:.2f} MPa"
                if s > g
                else (f"; above 0.15 f'c = {e:.2f}: continue one that starts below" if s >= e else "")
            )
            for n, L, t, m, s, g, e in zip(*plain(pu, Lw, tw, mu, sigma, trig, stop), strict=True)
        ],
        "gross section, linear elastic, |Mu| (actions reverse); a trigger, not a failure",
    )

    # ---- 18.10.6.2 displacement method (needs c and delta_u)
    c = neutral_axis_depth(q, pu, std)
    du = settings.aci_delta_u
    applies_d = (hwcs_lw >= 2.0) if du is not None else np.zeros(len(q), dtype=bool)
    if du is not None:
        c_lim = aci318.boundary_c_limit(Lw, du, hw)
        by_disp = applies_d & aci318.boundary_required_displacement(c, Lw, du, hw)
    else:
        c_lim = np.full(len(q), np.nan)
        by_disp = np.zeros(len(q), dtype=bool)
    rule(
        q,
        combo,
        "boundary: displacement",
        np.where(applies_d, c, np.nan),
        c_lim,
        "max",
        "mm",
        np.where(applies_d, np.where(by_disp, REQUIRED, NOT_REQUIRED), NOT_APPLICABLE).astype(object),
        np.where(applies_d, c / c_lim, np.nan),
        lambda: [
            (
                f"c = {cc:.0f} mm (Pu = {n * 1e-3:.1f} kN, nominal strength) {'>=' if cc >= lim else '<'} "
                f"lw / (600 x 1.5 max(delta_u/hw, 0.005)) = {L:.0f} / (600 x 1.5 x max({du:g}/{h:.0f}, "
                f"0.005)) = {lim:.0f} mm"
            )
            if ok
            else (
                "n/a: no design displacement (Project setting 'ACI 318: design displacement delta_u "
                "at the top'): stress method only"
                if du is None
                else f"n/a: hwcs/lw = {h / L:.2f} < 2.0 (18.10.6.2 covers hwcs/lw >= 2.0): stress method"
            )
            for cc, n, L, h, lim, ok in zip(*plain(c, pu, Lw, hw, c_lim), applies_d.tolist(), strict=True)
        ],
        "hw = hwcs = the wall's overall height, critical section at the base, every storey checked "
        "(conservative); c at Pu of the combination, larger of the two directions; delta_u/hw not "
        "less than 0.005",
    )

    # ---- 18.10.6.2(b) drift capacity where the displacement method calls for boundary elements
    if by_disp.any():
        k = by_disp
        dq = q[k].reset_index(drop=True)
        demand = 1.5 * np.maximum(du / hw[k], aci318.DRIFT_FLOOR)
        capacity = aci318.drift_capacity(Lw[k], tw[k], c[k], ve[k], fc[k], Lw[k] * tw[k])
        b_need = aci318.boundary_width_for_drift(c[k], Lw[k])
        # 18.10.6.2(b): (ii) b >= sqrt(0.025 c lw) or (iii) the drift capacity; either suffices
        u = np.minimum(demand / capacity, b_need / tw[k])
        rule(
            dq,
            combo[k],
            "drift capacity",
            demand,
            capacity,
            "max",
            "",
            _pass_fail(u),
            u,
            lambda: [
                f"(iii) 1.5 delta_u/hw = 1.5 x max({du:g}/{h:.0f}, 0.005) = {d:.5f} vs delta_c/hw = (4 - "
                f"(lw/b)(c/b)/50 - Ve/(0.66 sqrt(f'c) Acv))/100 = (4 - ({L:.0f}/{t:.0f})({cc:.0f}/{t:.0f})"
                f"/50 - {e * 1e-3:.1f}/{0.66 * np.sqrt(f) * L * t * 1e-3:.1f})/100, at least 0.015 = "
                f"{cap:.5f} ({'met' if d <= cap + 1e-12 else 'not met'}); or (ii) b = {t:.0f} mm >= "
                f"sqrt(0.025 c lw) = sqrt(0.025 x {cc:.0f} x {L:.0f}) = {bn:.0f} mm "
                f"({'met' if t >= bn - 1e-9 else 'not met'})"
                for h, d, L, t, cc, e, f, cap, bn in zip(
                    *plain(hw[k], demand, Lw[k], tw[k], c[k], ve[k], fc[k], capacity, b_need), strict=True
                )
            ],
            "b = tw; Ve of the shear amplification row; utilisation the smaller of (iii) demand/capacity "
            "and (ii) sqrt(0.025 c lw)/b (either satisfies 18.10.6.2(b)); Eq. (18.10.6.2b) as in ACI "
            "MNL-17(21) Ex. 2",
        )

    # ---- 18.10.6.4 boundary elements where either method calls for them
    need = by_stress | by_disp
    if not need.any():
        return
    z = q[need].reset_index(drop=True)
    zc, zcombo = c[need], combo[need]
    zL, ztw = Lw[need], tw[need]
    length = aci318.boundary_length(zc, zL)
    given_len = _zone_length(z)
    has_len = np.isfinite(given_len)
    u = np.where(has_len, length / np.where(given_len > 0, given_len, np.nan), np.nan)
    rule(
        z,
        zcombo,
        "boundary length",
        given_len,
        length,
        "min",
        "mm",
        np.where(has_len, _pass_fail(u), CHECK).astype(object),
        u,
        lambda: [
            f"at least max(c - 0.1 lw, c/2) = max({cc:.0f} - 0.1 x {L:.0f}, {cc:.0f}/2) = {n:.0f} mm "
            "from each end (actions reverse)"
            + (f"; end zones {g:.0f} mm" if ok else "; end zones not described (End zones sheet): check")
            + (
                f"; by 18.10.6.2(b) over at least max(lw, Mu/(4 Vu)) = {x:.0f} mm above and below the "
                "critical section"
                if dd
                else ""
            )
            for cc, L, n, g, ok, x, dd in zip(
                *plain(zc, zL, length, given_len),
                has_len.tolist(),
                aci318.boundary_vertical_extent(zL, mu[need], np.maximum(vu[need], 1e-9)).tolist(),
                by_disp[need].tolist(),
                strict=True,
            )
        ],
        "c at Pu of the combination (22.2 block, the End zones bars); the shorter of the pier's two zones",
    )
    hu = z.Hc.to_numpy(float)
    width = aci318.boundary_min_width(hu, z.H_wall.to_numpy(float) / zL, zc, zL)
    u = width / ztw
    rule(
        z,
        zcombo,
        "boundary width",
        ztw,
        width,
        "min",
        "mm",
        _pass_fail(u),
        u,
        lambda: [
            f"b = {t:.0f} mm vs hu/16 = {h:.0f}/16 = {h / 16:.0f} mm"
            + (" and 300 mm (hwcs/lw >= 2.0, c/lw >= 3/8)" if w > h / 16 + 1e-9 else "")
            for t, h, w in zip(*plain(ztw, hu, width), strict=True)
        ],
        "hu = the storey's clear height",
    )
    bars_ = _zone_bars(z)
    described = np.isfinite(bars_).all(axis=1)
    db = np.where(described, bars_[:, 0], z.v_dia.to_numpy(float))
    hx = aci318.hoop_hx_max(ztw)
    smax = aci318.hoop_spacing_max(ztw, db, hx, z.fsy.to_numpy(float))
    given = np.where(described, bars_[:, 1], np.nan)
    u = np.where(described, given / smax, np.nan)
    rule(
        z,
        zcombo,
        "boundary hoops",
        given,
        smax,
        "max",
        "mm",
        np.where(described, _pass_fail(u), CHECK).astype(object),
        u,
        lambda: [
            f"s at most min(b/3, {'5' if y > 420 else '6'} db, so) = min({t:.0f}/3, "
            f"{'5' if y > 420 else '6'} x {d:g}, 100 + (350 - hx {x:.0f})/3 within 100..150) = {m:.0f} mm"
            + (f"; ties at {s:.0f} mm" if ok else "; end-zone ties not described (End zones sheet): check")
            for t, y, d, x, m, s, ok in zip(
                *plain(ztw, z.fsy, db, hx, smax, given), described.tolist(), strict=True
            )
        ],
        "b = tw; hx taken at its largest, min(350, 2b/3) (18.10.6.4(f)); 5 db (Grade 550) taken above "
        f"420 MPa, the conservative reading ({MEMORY}: no published example); "
        "db the end zones' bar, else the wall's vertical bar",
    )

    # ---- Table 18.10.6.4(g): Ash across the thickness where the end-zone ties are described
    tie, zlen = _zone_ties(z), _zone_length(z)
    cover = z.cover.to_numpy(float)
    has_ties = described & np.isfinite(tie) & (tie > 0) & np.isfinite(zlen)
    bc = ztw - 2.0 * cover  # core across the thickness, to the hoop's outside faces
    ag = ztw * zlen
    ach = bc * np.maximum(zlen - 2.0 * cover, 1.0)  # smaller Ach (cover at both ends): conservative
    fyt = np.minimum(z.fsy.to_numpy(float), aci318.FY_MAX_LONGITUDINAL)
    s_ties = np.where(has_ties, given, np.nan)
    need_ash = aci318.boundary_ash_required(s_ties, bc, z.fc.to_numpy(float), fyt, ag, ach)
    have_ash = 2.0 * np.pi / 4.0 * np.where(has_ties, tie, np.nan) ** 2  # the hoop's two legs
    u = np.where(has_ties, need_ash / have_ash, np.nan)
    rule(
        z,
        zcombo,
        "boundary Ash",
        have_ash,
        need_ash,
        "min",
        "mm2",
        np.where(has_ties, _pass_fail(u), CHECK).astype(object),
        u,
        lambda: [
            (
                f"Ash >= max(0.3 (Ag/Ach - 1), 0.09) f'c/fyt s bc = max(0.3 ({a:.0f}/{h:.0f} - 1), 0.09) x "
                f"{f:g}/{y:g} x {sp:.0f} x {b:.0f} = {nd:.0f} mm2 vs 2 legs of {d:g} mm = {hv:.0f} mm2"
            )
            if ok
            else "end-zone ties not described (End zones sheet): Ash of Table 18.10.6.4(g) not checked"
            for a, h, f, y, sp, b, nd, d, hv, ok in zip(
                *plain(ag, ach, z.fc, fyt, s_ties, bc, need_ash, tie, have_ash),
                has_ties.tolist(),
                strict=True,
            )
        ],
        "rectilinear hoops across the thickness: bc = tw - 2 cover, Ag = tw x zone length, Ach = bc x "
        "(zone length - 2 cover) (the smaller Ach: conservative); the hoop's two legs only (crossties "
        "are not described: conservative); fyt = the bars' fy; the direction along the wall not checked",
    )


def neutral_axis_depth(q: pd.DataFrame, pu, std: Standard) -> np.ndarray:
    """Neutral-axis depth c [mm] of each pier at nominal strength under Pu [N] (compression
    positive): N(c) = Pu on the pier's own section (field and end-zone bars at their places,
    the standard's stress block, eps_cu and Es), the larger of the two directions (18.10.6.2:
    c consistent with the design displacement; the actions reverse). c is at most 5 Lw here
    (the whole section compressed); in net tension the smallest."""
    sec = rect_sections(q, std)  # the pier's section as the N-M check builds it
    D = sec.D
    c1 = nm.solve_dn(sec, pu, 1e-6 * D, 5.0 * D)
    c2 = nm.solve_dn(sec.flipped(), pu, 1e-6 * D, 5.0 * D)
    return np.maximum(c1, c2)


def _zone_length(p: pd.DataFrame) -> np.ndarray:
    """The shorter end-zone length of a pier with zones at both ends [mm]; NaN otherwise."""
    if "za_n" not in p:
        return np.full(len(p), np.nan)
    both = (p.za_n.to_numpy(float) > 0) & (p.zb_n.to_numpy(float) > 0)
    return np.where(both, np.minimum(p.za_len.to_numpy(float), p.zb_len.to_numpy(float)), np.nan)


def _zone_bars(p: pd.DataFrame) -> np.ndarray:
    """End-zone bar diameter and tie spacing (smaller bar, larger spacing of the two ends); NaN
    where an end has no zone or no ties (the Section 14 check reads them the same way)."""
    from xlcore.checks.section14 import end_zone_bars

    return end_zone_bars(p)


def _zone_ties(p: pd.DataFrame) -> np.ndarray:
    """Tie diameter of a pier with zones at both ends: the smaller of the two [mm]; NaN otherwise
    (0 where an end has no ties)."""
    if "za_n" not in p:
        return np.full(len(p), np.nan)
    both = (p.za_n.to_numpy(float) > 0) & (p.zb_n.to_numpy(float) > 0)
    return np.where(both, np.minimum(p.za_tie.to_numpy(float), p.zb_tie.to_numpy(float)), np.nan)


def _pass_fail(util) -> np.ndarray:
    return np.where(np.asarray(util, dtype=float) <= 1.0 + 1e-9, PASS, FAIL).astype(object)


def _phi_source(settings: Settings) -> str:
    """Where the special-wall shear phi came from, and the 0.60 of 21.2.4.1 the engineer may need
    (a setting, never applied silently: aci318.PHI_SHEAR_SEISMIC)."""
    where = (
        "Project setting 'phi for wall shear'"
        if settings.phi_shear is not None
        else "Table 21.2.1, 'phi for wall shear' blank"
    )
    return (
        f"{where}; 21.2.4.1 asks {aci318.PHI_SHEAR_SEISMIC:.2f} where the wall's nominal shear "
        "strength is less than the shear at its nominal flexural strength: set it there"
    )


def _at_least(value, limit) -> np.ndarray:
    value = np.asarray(value, dtype=float)
    with np.errstate(divide="ignore"):
        return np.where(value > 0, np.asarray(limit, dtype=float) / np.where(value > 0, value, 1.0), np.inf)


COLUMNS = rule_columns(per_combination=True)


# ---------------------------------------------------------------- the sheet's preamble and summary line


def preamble(s: Settings) -> list[tuple[str, str]]:
    """Lines above the special-wall table: the setting, the combinations, the inputs."""
    lines = [
        (
            "Special structural walls",
            f"{s.aci_special_walls} (Project setting 'ACI 318: walls are special structural walls')",
        )
    ]
    why = not_applicable_reason(s)
    if why is not None:
        return lines + [("Not applicable", f"no rows: {why}")]
    ns = "the storeys up to the highest wall" if s.aci_storeys_above is None else f"{s.aci_storeys_above:g}"
    du = (
        "not given: boundary elements by the stress method (18.10.6.3) alone"
        if s.aci_delta_u is None
        else f"{s.aci_delta_u:g} mm: also the displacement method (18.10.6.2) where hwcs/lw >= 2.0"
    )
    return lines + [
        (
            "Earthquake combinations",
            ", ".join(sorted(s.earthquake))
            or "none named (Project setting): shear amplification and boundary elements not evaluated",
        ),
        (
            "Inputs",
            f"Mpr/Mu {s.aci_mpr_mu:g}; ns {ns} (not less than 0.007 hwcs in inches, 18.10.3.1.3); "
            f"delta_u {du} (Project settings 'ACI 318: ...')",
        ),
        (
            "Rules",
            "web ratios 18.10.2.1 / 18.10.4.3 and two curtains 18.10.2.2 per pier ('(all)'); per "
            "earthquake combination: Ve = Omega_v omega_v Vu <= 3 Vu against phi Vn (18.10.3.1); "
            "boundary elements where sigma > 0.2 f'c (18.10.6.3) or c >= lw/(600 x 1.5 delta_u/hw) "
            "(18.10.6.2), then b >= sqrt(0.025 c lw) or the drift capacity (18.10.6.2(b)); where "
            "required, their length, width, hoop spacing and Ash (18.10.6.4)",
        ),
        (
            "Status",
            "pass / FAIL: a rule met or not; required / not required: a boundary-element trigger (not "
            "a failure); check: a requirement xlcore cannot verify (end-zone bars or ties not described); "
            "n/a: no input for the rule",
        ),
    ]


def summary_line(table: pd.DataFrame | None, s: Settings) -> tuple[str, str]:
    """The building's special-wall result in one summary line (as the Section 14 line)."""
    label = "Earthquake detailing ACI 318 Ch. 18"
    why = not_applicable_reason(s)
    if why is not None:
        return (label, f"not applicable: {why}")
    if table is None or not len(table):
        return (label, "not checked (no rows)")
    worst = worst_rule_text(table, every=ALL)
    parts = [worst] if worst else []
    if not s.earthquake:
        parts.append("boundary elements not evaluated: no earthquake combinations named")
    else:
        req = table[table.status == REQUIRED][["storey", "pier_id"]].drop_duplicates()
        checks = int((table.status == CHECK).sum())
        parts.append(
            f"boundary elements required at {len(req)} storey x pier cases"
            + (f" ({checks} rows with end-zone bars not described: check)" if checks else "")
        )
    return (label, "special structural walls: " + "; ".join(parts))
