"""Lintels (coupling beams) over openings, designed for the actions the member-actions sheet gives.

Three models, chosen per lintel (docs/engineering-basis.md, "Lintels"):

- **beam** (AS 3600:2018 Section 8) where clear span / overall depth is at or above the Project
  setting (default 4, the Cl 12.1.1 non-flexural limit for a member continuous at both ends,
  from memory): flexure by the stress block (Cl 8.1), shear by the simplified method (Cl 8.2);
- **strut-and-tie** (Section 7) below it: one diagonal strut between the pier faces, from the
  top of one face to the bottom of the other, held by a top and a bottom tie (the lintel bars,
  the same top and bottom) anchored in the piers. Equilibrium with the piers not restraining
  the lintel axially (conservative): strut C* = V*/sin theta, each tie T* = V* cot theta =
  V* ln / z; the strut's ends are C-C-T nodes sized by the tie (hydrostatic);
- **diagonal bars** wherever the openings sheet gives them: two groups crossing at mid-span,
  Vu = 2 A_sd fsy sin alpha, capped by the concrete at coeff sqrt(f'c) b D (ACI 318-19
  Eq (18.10.7.4) mechanics; AS 3600 has no coupling-beam clause); the groups carry the moment
  V* ln / 2 by the same truss, so there is no separate flexure check.

Convention: span ln = opening width; overall depth D = from the opening head to the top of the
slab above; b = wall thickness; bars at cover + fitment + db/2 from the top and bottom faces.
Values from memory are Project settings and are named on every row (column "Basis").
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore.codes import as3600
from xlcore.model import Settings
from xlcore.results import FAIL, NOT_CHECKED, PASS, utilisation

BEAM, STM, DIAGONAL = "beam", "strut-and-tie", "diagonal bars"
ASSUMED_BAR, ASSUMED_FITMENT, ASSUMED_DIAGONAL = 16.0, 10.0, 20.0
"""Bar sizes [mm] assumed for the geometry (d, z, alpha) where the openings sheet gives none, so
that a lintel with actions but no bars is still designed: its needed reinforcement is reported."""

BASIS = {
    BEAM: "Section 8; shear Cl 8.2.4.3 simplified (theta 36 deg, phi 0.75): from memory, verify",
    STM: "Section 7 strut-and-tie: beta_s Cl 7.2.2, beta_n Cl 7.4, 0.9 f'c Cl 7.2.1, phi Table "
    "2.2.2: from memory, verify (Project settings)",
    DIAGONAL: "ACI 318-19 Eq (18.10.7.4) mechanics (no AS 3600 clause); cap and phi from memory "
    "(Project settings)",
}


def check_lintels(lintels: pd.DataFrame, actions: pd.DataFrame, settings: Settings) -> pd.DataFrame:
    """One row per storey x lintel x combination with actions, designed by the model its geometry
    and bars call for; a lintel without actions gets one row saying so."""
    acts = actions.rename(columns={"member": "lintel_id"})[
        ["row", "storey", "combination", "lintel_id", "v", "m"]
    ]
    df = lintels.merge(acts, on=["storey", "lintel_id"], how="left")
    s = settings
    span = df.span.to_numpy(float) * 1000.0
    D, b = df.depth.to_numpy(float), df.tw.to_numpy(float)
    fc, fsy, cover = df.fc.to_numpy(float), df.fsy.to_numpy(float), df.cover.to_numpy(float)
    v_star = np.abs(df.v.to_numpy(float)) * 1e3  # N
    m_star = np.abs(df.m.to_numpy(float)) * 1e6  # N mm
    has_acts = df.combination.notna().to_numpy()
    has_bars = df[["lintel_bars", "lintel_dia"]].notna().all(axis=1).to_numpy()
    has_fit = df[["stirrup_dia", "stirrup_legs", "stirrup_spacing"]].notna().all(axis=1).to_numpy()
    has_diag = df[["diag_bars", "diag_dia"]].notna().all(axis=1).to_numpy()
    ratio = span / D
    model = np.where(has_diag, DIAGONAL, np.where(ratio >= s.lintel_deep_ratio, BEAM, STM))
    model = np.where(has_acts, model, "")

    db = df.lintel_dia.fillna(ASSUMED_BAR).to_numpy(float)
    fit = df.stirrup_dia.where(has_fit).fillna(0.0).to_numpy(float)
    fit_geom = df.stirrup_dia.fillna(ASSUMED_FITMENT).to_numpy(float)
    As = np.where(has_bars, df.lintel_bars.fillna(0) * np.pi * db**2 / 4, 0.0)
    a_t = cover + fit_geom + db / 2  # face to the bars' centroid
    d = D - a_t

    # ---- beam, Section 8
    muo, ku, phi_m = as3600.beam_flexure(b, d, As, fc, fsy)
    dv = as3600.beam_dv(d, D)
    sp = df.stirrup_spacing.where(has_fit).fillna(1.0).to_numpy(float)
    asv = np.where(has_fit, df.stirrup_legs.fillna(0) * np.pi * fit**2 / 4, 0.0)
    asv_min = as3600.beam_asv_min(fc, b, sp, fsy)
    vuc, kv = as3600.beam_vuc(fc, b, dv, asv, np.where(has_fit, asv_min, np.inf))
    vus = np.where(has_fit, as3600.beam_vus(asv, fsy, dv, sp), 0.0)
    vmax = as3600.beam_vu_max(fc, b, dv)
    phi_v = as3600.PHI_SHEAR
    beam_vu = phi_v * np.minimum(vuc + vus, vmax)
    beam_mu = phi_m * muo
    with np.errstate(divide="ignore", invalid="ignore"):
        u_m = utilisation(m_star, beam_mu)  # inf only where there is demand and no capacity
        u_vb = utilisation(v_star, beam_vu)
    as_beam = as3600.beam_as_required(m_star, np.where(As > 0, phi_m, 0.85), b, d, fc, fsy)
    vuc_min_fit, _ = as3600.beam_vuc(fc, b, dv, np.inf, 0.0)  # kv 0.15: with at least minimum fitments
    asv_s_req = np.maximum(
        as3600.beam_asv_s_required(v_star, phi_v, vuc_min_fit, fsy, dv), 0.08 * np.sqrt(fc) * b / fsy
    )
    beam_capped = v_star / phi_v > vmax

    # ---- strut-and-tie, Section 7
    z = D - 2.0 * a_t
    theta = as3600.strut_angle(z, span)
    beta_s = as3600.strut_efficiency(theta, s.lintel_beta_s)
    w_t = 2.0 * a_t
    w_s = as3600.strut_width(w_t, theta)
    c_star = v_star / np.sin(theta)
    t_star = v_star / np.tan(theta)
    strut_cap = as3600.strut_capacity(fc, b, w_s, beta_s, s.phi_strut, s.strut_stress)
    node_cap = as3600.node_capacity(fc, b, w_s, s.lintel_beta_n, s.phi_strut, s.strut_stress)
    tie_cap = as3600.tie_capacity(As, fsy, s.phi_tie)
    with np.errstate(divide="ignore", invalid="ignore"):
        u_strut = utilisation(c_star, strut_cap)
        u_node = utilisation(c_star, node_cap)
        u_tie = utilisation(t_star, tie_cap)
    stm_vu = np.minimum(np.minimum(strut_cap, node_cap) * np.sin(theta), tie_cap * np.tan(theta))
    as_tie = t_star / (s.phi_tie * fsy)

    # ---- diagonal bars (given, or the ones a failing strut would need)
    dd = df.diag_dia.fillna(ASSUMED_DIAGONAL).to_numpy(float)
    a_g = cover + fit_geom + 1.5 * dd  # two layers, clear gap one bar diameter
    alpha = as3600.diagonal_angle(D, a_g, span)
    A_sd = np.where(has_diag, df.diag_bars.fillna(0) * np.pi * dd**2 / 4, 0.0)
    vu_diag = as3600.diagonal_shear(A_sd, fsy, alpha)
    v_cap = as3600.diagonal_cap(fc, b, D, s.coupling_cap)
    diag_vu = s.phi_tie * np.minimum(vu_diag, v_cap)
    with np.errstate(divide="ignore", invalid="ignore"):
        u_vd = utilisation(v_star, diag_vu)
        asd_req = v_star / (2.0 * s.phi_tie * fsy * np.sin(alpha))
    diag_capped = v_star / s.phi_tie > v_cap

    # a lintel too shallow for its bars (D at most twice their cover to centroid; D can be as
    # little as the slab) carries nothing by any model: infinite utilisation, said in words
    u_m = np.where(d > 0, u_m, np.inf)
    u_vb = np.where(d > 0, u_vb, np.inf)
    u_strut, u_node, u_tie = (np.where(z > 0, u, np.inf) for u in (u_strut, u_node, u_tie))
    stm_vu = np.where(z > 0, stm_vu, 0.0)
    u_vd = np.where(alpha > 0, u_vd, np.inf)
    diag_vu = np.where(alpha > 0, diag_vu, 0.0)
    is_beam, is_stm, is_diag = model == BEAM, model == STM, model == DIAGONAL
    util = np.select(
        [is_beam, is_stm, is_diag],
        [np.fmax(u_m, u_vb), np.fmax(np.fmax(u_strut, u_node), u_tie), u_vd],
        np.nan,
    )
    strut_over = np.fmax(u_strut, u_node) > 1.0
    out = df.assign(
        model=model,
        ratio=ratio,
        d=np.where(is_beam, d, np.nan),
        As=np.where(has_bars, As, np.nan),
        ku=np.where(is_beam, ku, np.nan),
        phi_mu=np.where(is_beam, beam_mu * 1e-6, np.nan),
        dv=np.where(is_beam, dv, np.nan),
        kv=np.where(is_beam, kv, np.nan),
        vuc=np.where(is_beam, vuc * 1e-3, np.nan),
        vus=np.where(is_beam, vus * 1e-3, np.nan),
        vu_max=np.where(is_beam, vmax * 1e-3, np.nan),
        theta=np.where(is_stm, np.degrees(theta), np.nan),
        beta_s=np.where(is_stm, beta_s, np.nan),
        w_s=np.where(is_stm, w_s, np.nan),
        c_star=np.where(is_stm, c_star * 1e-3, np.nan),
        strut_cap=np.where(is_stm, strut_cap * 1e-3, np.nan),
        node_cap=np.where(is_stm, node_cap * 1e-3, np.nan),
        t_star=np.where(is_stm, t_star * 1e-3, np.nan),
        tie_cap=np.where(is_stm, tie_cap * 1e-3, np.nan),
        alpha=np.where(is_diag, np.degrees(alpha), np.nan),
        angle=np.select([is_stm, is_diag], [np.degrees(theta), np.degrees(alpha)], np.nan),
        A_sd=np.where(is_diag, A_sd, np.nan),
        vu_diag=np.where(is_diag, vu_diag * 1e-3, np.nan),
        v_cap=np.where(is_diag, v_cap * 1e-3, np.nan),
        phi_vu=np.select([is_beam, is_stm, is_diag], [beam_vu, stm_vu, diag_vu], np.nan) * 1e-3,
        u_m=np.where(is_beam, u_m, np.nan),
        u_v=np.select([is_beam, is_diag], [u_vb, u_vd], np.nan),
        u_strut=np.where(is_stm, u_strut, np.nan),
        u_node=np.where(is_stm, u_node, np.nan),
        u_tie=np.where(is_stm, u_tie, np.nan),
        util=util,
        status=np.where(has_acts, np.where(util <= 1.0, PASS, FAIL), NOT_CHECKED),
        as_req=np.select([is_beam, is_stm], [as_beam, as_tie], np.nan),
        asd_req=np.where(is_diag | (is_stm & strut_over), asd_req, np.nan),
    )
    out["clause"] = np.select(
        [is_beam & (u_m >= u_vb), is_beam, is_stm & (u_tie >= np.fmax(u_strut, u_node)), is_stm, is_diag],
        [
            "Cl 8.1 flexure",
            "Cl 8.2 shear (simplified)",
            "Section 7 tie",
            np.where(u_node > u_strut, "Section 7 node (Cl 7.4)", "Section 7 strut (Cl 7.2)"),
            "ACI 318-19 Eq (18.10.7.4)",
        ],
        "",
    )
    out["basis"] = [BASIS.get(mo, "") for mo in model]
    shallow = np.select([is_beam, is_stm, is_diag], [d <= 0, z <= 0, alpha <= 0], False)
    out["need"] = _needs(out, has_bars, has_fit, beam_capped, diag_capped, strut_over, asv_s_req, shallow)
    out["working"] = _working(out, s, D, b, fc, fsy, cover, fit_geom, db, dd, a_t, z, a_g, phi_m, muo)
    return out.sort_values(["storey_index", "lintel_id"], ascending=[False, True], kind="stable").reset_index(
        drop=True
    )


def _needs(df, has_bars, has_fit, beam_capped, diag_capped, strut_over, asv_s_req, shallow) -> list[str]:
    """The reinforcement that would make each row pass, in words (areas in the numeric columns)."""
    out = []
    for i, r in enumerate(df.itertuples(index=False)):
        if r.model == "":
            out.append("not checked: no lintel actions in the member-actions sheet")
            continue
        if shallow[i]:
            out.append("lintel too shallow for its bars to work (D at most twice their cover to centroid)")
            continue
        if r.model == BEAM:
            text = (
                f"bars As >= {r.as_req:,.0f} mm2 top and bottom"
                if np.isfinite(r.as_req)
                else "no tension steel suffices for M* (compression zone too deep): deeper lintel "
                "or diagonal bars"
            )
            text += (
                "; V*/phi above Vu.max: deeper or thicker lintel, stronger concrete or diagonal bars"
                if beam_capped[i]
                else f"; fitments Asv/s >= {asv_s_req[i]:.3f} mm2/mm"
            )
            if not has_bars[i] or not has_fit[i]:
                text += "; (bars or fitments not given: N16 bars, N10 fitments assumed for d)"
        elif r.model == STM:
            text = f"ties As >= {r.as_req:,.0f} mm2 top and bottom, anchored in the piers"
            if strut_over[i]:
                text += (
                    f"; the concrete strut is over: diagonal bars A_sd >= {r.asd_req:,.0f} mm2 per group "
                    f"(N{ASSUMED_DIAGONAL:.0f} assumed for the angle)"
                )
            if not has_bars[i]:
                text += "; (lintel bars not given: N16 assumed for the geometry)"
        else:
            text = (
                "V*/phi above the concrete limit: deeper or thicker lintel or stronger concrete"
                if diag_capped[i]
                else f"diagonal bars A_sd >= {r.asd_req:,.0f} mm2 per group"
            )
        out.append(text)
    return out


def _working(df, s, D, b, fc, fsy, cover, fit, db, dd, a_t, z, a_g, phi_m, muo) -> list[str]:
    """The working with every number substituted, per row, for the model the row uses."""
    out = []
    for i, r in enumerate(df.itertuples(index=False)):
        if r.model == "":
            out.append("not checked: no lintel actions in the member-actions sheet")
            continue
        v, m = abs(r.v), abs(r.m)
        head = f"ln/D = {r.span * 1000:.0f}/{D[i]:.0f} = {r.ratio:.2f}"
        if r.model == BEAM:
            out.append(
                f"beam ({head} >= {s.lintel_deep_ratio:g}): d = {D[i]:.0f} - {a_t[i]:.0f} = {r.d:.0f}; "
                f"As = {0 if np.isnan(r.As) else r.As:.0f}; dn = As fsy/(alpha2 f'c b gamma) -> "
                f"ku = {r.ku:.3f}; "
                f"phiMuo = {phi_m[i]:.3f} x {muo[i] * 1e-6:.1f} = {r.phi_mu:.1f} kNm; "
                f"dv = max(0.72 D, 0.9 d) = {r.dv:.0f}, kv = {r.kv:.3f}: Vuc = {r.vuc:.1f}, "
                f"Vus = {r.vus:.1f}, Vu.max = {r.vu_max:.1f} -> phiVu = 0.75 x min({r.vuc:.1f} + "
                f"{r.vus:.1f}, {r.vu_max:.1f}) = {r.phi_vu:.1f} kN; "
                f"U = max({m:.1f}/{r.phi_mu:.1f}, {v:.1f}/{r.phi_vu:.1f}) = {r.util:.3f}"
            )
        elif r.model == STM:
            th = np.radians(r.theta)
            beta = (
                f"beta_s = {r.beta_s:.3f} (Project setting)"
                if s.lintel_beta_s is not None
                else f"beta_s = 1/(1 + 0.66 cot^2 {r.theta:.1f}) = {r.beta_s:.3f}"
            )
            As = 0.0 if np.isnan(r.As) else r.As
            out.append(
                f"strut-and-tie ({head} < {s.lintel_deep_ratio:g}): a = {cover[i]:.0f} + {fit[i]:.0f} + "
                f"{db[i]:.0f}/2 = {a_t[i]:.0f}; z = {D[i]:.0f} - 2 x {a_t[i]:.0f} = {z[i]:.0f}; theta = "
                f"atan({z[i]:.0f}/{r.span * 1000:.0f}) = {r.theta:.1f} deg; {beta}; w_s = 2a/cos theta = "
                f"{r.w_s:.0f}; strut C* = V*/sin theta = {v:.1f}/{np.sin(th):.3f} = {r.c_star:.1f} kN vs "
                f"phi beta_s {s.strut_stress:g} f'c b w_s = {s.phi_strut:g} x {r.beta_s:.3f} x "
                f"{s.strut_stress:g} x {fc[i]:.0f} x "
                f"{b[i]:.0f} x {r.w_s:.0f} = {r.strut_cap:.1f} kN; node {s.phi_strut:g} x "
                f"{s.lintel_beta_n:g} x {s.strut_stress:g} x {fc[i]:.0f} x {b[i]:.0f} x {r.w_s:.0f} = "
                f"{r.node_cap:.1f} kN; "
                f"tie T* = V* ln/z = {v:.1f} x {r.span * 1000:.0f}/{z[i]:.0f} = {r.t_star:.1f} kN vs "
                f"phi As fsy = {s.phi_tie:g} x {As:.0f} x {fsy[i]:.0f} = {r.tie_cap:.1f} kN; "
                f"U = max({r.u_strut:.3f}, {r.u_node:.3f}, {r.u_tie:.3f}) = {r.util:.3f}"
            )
        else:
            al = np.radians(r.alpha)
            out.append(
                f"diagonal bars ({head}): a_g = {cover[i]:.0f} + {fit[i]:.0f} + 1.5 x {dd[i]:.0f} = "
                f"{a_g[i]:.0f}; alpha = atan(({D[i]:.0f} - 2 x {a_g[i]:.0f})/{r.span * 1000:.0f}) = "
                f"{r.alpha:.1f} deg; A_sd = {r.diag_bars:.0f} x {np.pi * dd[i] ** 2 / 4:.0f} = {r.A_sd:.0f}; "
                f"Vu = 2 A_sd fsy sin alpha = 2 x {r.A_sd:.0f} x {fsy[i]:.0f} x {np.sin(al):.3f} = "
                f"{r.vu_diag:.1f} kN, cap {s.coupling_cap:g} sqrt({fc[i]:.0f}) x {b[i]:.0f} x {D[i]:.0f} = "
                f"{r.v_cap:.1f} kN -> phiVu = {s.phi_tie:g} x min({r.vu_diag:.1f}, {r.v_cap:.1f}) = "
                f"{r.phi_vu:.1f} kN; U = {v:.1f}/{r.phi_vu:.1f} = {r.util:.3f}; M* = {m:.1f} kNm carried "
                "by the same diagonals"
            )
    return out
