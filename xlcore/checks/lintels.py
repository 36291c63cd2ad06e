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

from xlcore.checks import records
from xlcore.codes import get_standard
from xlcore.codes.base import Standard
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


CLAUSE_TEXT = {
    "flexure": "Cl 8.1 flexure",
    "shear": "Cl 8.2 shear (simplified)",
    "tie": "Section 7 tie",
    "node": "Section 7 node (Cl 7.4)",
    "strut": "Section 7 strut (Cl 7.2)",
    "diagonal": "ACI 318-19 Eq (18.10.7.4)",
}
CLAUSES_ACI_STANDARDS = ("ACI 318-19",)
CLAUSE_TEXT_ACI = {
    "flexure": "ACI 22.3 flexure",
    "shear": "ACI 22.5 shear",
    "tie": "ACI 23.7 tie",
    "node": "ACI 23.9 node",
    "strut": "ACI 23.4 strut",
    "diagonal": "ACI 18.10.7.4",
}
DIAGONAL_REQUIRED = "diagonal bars required: ln/h < 2 and |Vu| >= 0.33 sqrt(f'c) Acw (18.10.7.2)"
BASIS_ACI = {
    BEAM: "ACI 318-19 Ch. 9 / 22: flexure 22.2-22.3 (phi Table 21.2.2), shear Table 22.5.5.1, "
    "22.5.8.5.3, 22.5.1.2 (phi 0.75); some expressions from memory, verify",
    STM: "ACI 318-19 Ch. 23 strut-and-tie: fce = 0.85 beta_s f'c (Table 23.4.3), beta_n 0.80 C-C-T "
    "(Table 23.9.2), phi 0.75 (Table 21.2.1): from memory, verify",
    DIAGONAL: "ACI 318-19 18.10.7.4 Eq (18.10.7.4); phi 0.85 where the walls are special structural "
    "walls (21.2.4.4), else 0.75 (Table 21.2.1(b))",
}
COUPLING_BEAM = (
    "coupling beam of a special structural wall (18.10.7.3: designed by 18.6.3-18.6.5, strength "
    "by Ch. 22; special moment-frame detailing not checked)"
)


def check_lintels(
    lintels: pd.DataFrame, actions: pd.DataFrame, settings: Settings, *, std: Standard | None = None
) -> pd.DataFrame:
    """One row per storey x lintel x combination with actions, designed by the model its geometry
    and bars call for; a lintel without actions gets one row saying so.

    Under ACI 318-19 with special structural walls (Project setting) the lintels are coupling
    beams, 18.10.7: diagonal bars where given, and required (a row without them fails) where
    ln/h < 2 and |Vu| >= 0.33 sqrt(f'c) Acw (18.10.7.2); every other one is a beam (18.10.7.1,
    18.10.7.3), at any ln/h. Otherwise beam at or above the span/depth setting, strut-and-tie
    below, as under AS 3600."""
    std = (std or get_standard(settings.standard)).configure(settings)
    acts = actions.rename(columns={"member": "lintel_id"})[
        ["row", "storey", "combination", "lintel_id", "v", "m"]
    ]
    df = lintels.merge(_of_lintels(acts, lintels), on=["storey", "lintel_id"], how="left")
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
    special = std.detailing_needs_shear and s.aci_special_walls == "yes"  # ACI 318 special walls
    diag_needed = std.coupling_diagonal_required(span, D, v_star, fc, b * D) & special
    model = np.where(
        has_diag | diag_needed, DIAGONAL, np.where((ratio >= s.lintel_deep_ratio) | special, BEAM, STM)
    )
    model = np.where(has_acts, model, "")

    db = df.lintel_dia.fillna(ASSUMED_BAR).to_numpy(float)
    fit = df.stirrup_dia.where(has_fit).fillna(0.0).to_numpy(float)
    fit_geom = df.stirrup_dia.fillna(ASSUMED_FITMENT).to_numpy(float)
    As = np.where(has_bars, df.lintel_bars.fillna(0) * np.pi * db**2 / 4, 0.0)
    a_t = cover + fit_geom + db / 2  # face to the bars' centroid
    d = D - a_t

    # ---- beam (AS 3600 Section 8; ACI 318 Ch. 9 / 22), through the standard
    muo, ku, phi_m = std.beam_flexure(b, d, As, fc, fsy)
    sp = df.stirrup_spacing.where(has_fit).fillna(1.0).to_numpy(float)
    asv = np.where(has_fit, df.stirrup_legs.fillna(0) * np.pi * fit**2 / 4, 0.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        rho_w = np.where(d > 0, As / (b * d), 0.0)
    bs = std.beam_shear(fc, b, d, D, asv, sp, fsy, rho_w)
    dv = std.beam_shear_depth(d, D)
    kv = bs.detail.get("kv", np.full(len(df), np.nan))
    vuc, vus, vmax = bs.concrete, np.where(has_fit, bs.steel, 0.0), bs.limit
    phi_v = std.phi_beam_shear
    beam_vu = phi_v * np.minimum(vuc + vus, vmax)
    beam_mu = phi_m * muo
    with np.errstate(divide="ignore", invalid="ignore"):
        u_m = utilisation(m_star, beam_mu)  # inf only where there is demand and no capacity
        u_vb = utilisation(v_star, beam_vu)
    phi_bars = std.beam_flexure(b, d, 1e-9, fc, fsy)[2]  # phi of a lightly reinforced section
    as_beam = std.beam_as_required(m_star, np.where(As > 0, phi_m, phi_bars), b, d, fc, fsy)
    asv_s_req = std.beam_shear_steel_required(v_star, fc, b, d, D, fsy, rho_w)
    beam_capped = v_star / phi_v > vmax

    # ---- strut-and-tie (AS 3600 Section 7; ACI 318 Ch. 23): one strut, mechanics here
    z = D - 2.0 * a_t
    theta = np.arctan2(z, span)  # the strut's angle to the ties, atan(z / ln)
    k = std.strut_and_tie_factors(
        theta, has_fit, s.lintel_beta_s, s.lintel_beta_n, s.phi_strut, s.phi_tie, s.strut_stress
    )
    beta_s = k["beta_s"]
    w_t = 2.0 * a_t
    w_s = w_t / np.cos(theta)  # hydrostatic C-C-T node: strut face w_t / cos theta
    c_star = v_star / np.sin(theta)
    t_star = v_star / np.tan(theta)
    strut_cap = k["phi_strut"] * np.asarray(beta_s, dtype=float) * k["stress"] * fc * b * w_s
    node_cap = k["phi_strut"] * np.asarray(k["beta_n"], dtype=float) * k["stress"] * fc * b * w_s
    tie_cap = k["phi_tie"] * As * fsy
    with np.errstate(divide="ignore", invalid="ignore"):
        u_strut = utilisation(c_star, strut_cap)
        u_node = utilisation(c_star, node_cap)
        u_tie = utilisation(t_star, tie_cap)
    stm_vu = np.minimum(np.minimum(strut_cap, node_cap) * np.sin(theta), tie_cap * np.tan(theta))
    as_tie = t_star / (k["phi_tie"] * fsy)

    # ---- diagonal bars (given, or the ones a failing strut or 18.10.7.2 would need)
    dd = df.diag_dia.fillna(ASSUMED_DIAGONAL).to_numpy(float)
    a_g = cover + fit_geom + 1.5 * dd  # two layers, clear gap one bar diameter
    alpha = np.arctan2(D - 2.0 * a_g, span)  # groups crossing at mid-span: geometry
    A_sd = np.where(has_diag, df.diag_bars.fillna(0) * np.pi * dd**2 / 4, 0.0)
    # ACI 318-19 21.2.4.4: phi 0.85 for diagonally reinforced coupling beams of structures relying on
    # special structural walls (21.2.4(b)); other ACI lintels take the shear phi of Table 21.2.1(b)
    aci_ordinary = std.detailing_needs_shear and not special
    phi_d = std.phi_beam_shear if aci_ordinary else std.coupling_phi(s.phi_tie)
    if np.isnan(std.coupling_beam_shear(1.0, 1.0, 1.0, 1.0, 1.0)):  # no clause: mechanics + settings
        vu_diag = 2.0 * A_sd * fsy * np.sin(alpha)
        v_cap = s.coupling_cap * np.sqrt(fc) * b * D
        fy_d = fsy
    else:  # the standard's Eq: steel part (concrete unbounded) and the concrete cap (steel unbounded)
        vu_diag = std.coupling_beam_shear(A_sd, fsy, alpha, fc, np.inf)
        v_cap = std.coupling_beam_shear(np.inf, fsy, np.pi / 2, fc, b * D)
        fy_d = np.where(A_sd > 0, vu_diag / np.where(A_sd > 0, 2.0 * A_sd * np.sin(alpha), 1.0), fsy)
    diag_vu = phi_d * np.minimum(vu_diag, v_cap)
    with np.errstate(divide="ignore", invalid="ignore"):
        u_vd = utilisation(v_star, diag_vu)
        asd_req = v_star / (2.0 * phi_d * fy_d * np.sin(alpha))
    diag_capped = v_star / phi_d > v_cap

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
    aci = std.name in CLAUSES_ACI_STANDARDS  # texts of the standard's own clauses
    t = CLAUSE_TEXT_ACI if aci else CLAUSE_TEXT
    out["clause"] = np.select(
        [is_beam & (u_m >= u_vb), is_beam, is_stm & (u_tie >= np.fmax(u_strut, u_node)), is_stm, is_diag],
        [
            t["flexure"],
            t["shear"],
            t["tie"],
            np.where(u_node > u_strut, t["node"], t["strut"]),
            t["diagonal"],
        ],
        "",
    )
    basis = BASIS_ACI if aci else BASIS
    out["basis"] = [basis.get(mo, "") for mo in model]
    if aci and special:
        out["basis"] = [
            (f"{COUPLING_BEAM}; " if mo == BEAM else "")
            + (f"{DIAGONAL_REQUIRED}; " if req and mo == DIAGONAL else "")
            + b_
            for mo, req, b_ in zip(model, diag_needed, out.basis, strict=True)
        ]
    shallow = np.select([is_beam, is_stm, is_diag], [d <= 0, z <= 0, alpha <= 0], False)
    out["need"] = _needs(
        out, has_bars, has_fit, beam_capped, diag_capped, strut_over, asv_s_req, shallow, std.bar_name
    )
    if aci:
        out["working"] = _working_aci(
            out, D, b, fc, fsy, a_t, z, a_g, phi_m, muo, phi_d, special, diag_needed, s.lintel_deep_ratio
        )
    else:
        out["working"] = _working(out, s, D, b, fc, fsy, cover, fit_geom, db, dd, a_t, z, a_g, phi_m, muo)
    return out.sort_values(["storey_index", "lintel_id"], ascending=[False, True], kind="stable").reset_index(
        drop=True
    )


def _of_lintels(acts: pd.DataFrame, lintels: pd.DataFrame) -> pd.DataFrame:
    """The action rows that name a lintel ID, in their order: the rows a left join of the lintels
    on (storey, lintel_id) can match (the member actions of a tower are mostly piers': the join
    then factorises a few thousand keys, not 360 000)."""
    # on the column's object array: the text column's own isin takes twice the time
    ids = pd.Series(acts.lintel_id.to_numpy(dtype=object), dtype=object, copy=False)
    named = ids.isin(pd.unique(lintels.lintel_id)).to_numpy()
    return acts if named.all() else acts[named]


def _needs(
    df, has_bars, has_fit, beam_capped, diag_capped, strut_over, asv_s_req, shallow, name=None
) -> list[str]:
    """The reinforcement that would make each row pass, in words (areas in the numeric columns);
    `name` names the assumed bars (`Standard.bar_name`; AS 3600's N bars without)."""
    name = name or (lambda d: f"N{d:g}")
    out = []
    for i, r in enumerate(records(df)):
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
                text += (
                    f"; (bars or fitments not given: {name(ASSUMED_BAR)} bars, {name(ASSUMED_FITMENT)} "
                    "fitments assumed for d)"
                )
        elif r.model == STM:
            text = f"ties As >= {r.as_req:,.0f} mm2 top and bottom, anchored in the piers"
            if strut_over[i]:
                text += (
                    f"; the concrete strut is over: diagonal bars A_sd >= {r.asd_req:,.0f} mm2 per group "
                    f"({name(ASSUMED_DIAGONAL)} assumed for the angle)"
                )
            if not has_bars[i]:
                text += f"; (lintel bars not given: {name(ASSUMED_BAR)} assumed for the geometry)"
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
    for i, r in enumerate(records(df)):
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


def _working_aci(df, D, b, fc, fsy, a_t, z, a_g, phi_m, muo, phi_d, special, diag_needed, deep) -> list[str]:
    """The working of ACI 318-19 rows, every number substituted (see `_working` for AS 3600)."""
    out = []
    for i, r in enumerate(records(df)):
        if r.model == "":
            out.append("not checked: no lintel actions in the member-actions sheet")
            continue
        v, m = abs(r.v), abs(r.m)
        head = f"ln/h = {r.span * 1000:.0f}/{D[i]:.0f} = {r.ratio:.2f}"
        if r.model == BEAM:
            why = "coupling beam, 18.10.7.1 / 18.10.7.3" if special else f">= {deep:g}: Ch. 9"
            out.append(
                f"beam ({head}; {why}): d = {D[i]:.0f} - {a_t[i]:.0f} = {r.d:.0f}; "
                f"As = {0 if np.isnan(r.As) else r.As:.0f}; a = As fy/(0.85 f'c b), c/d = {r.ku:.3f}; "
                f"phi Mn = {phi_m[i]:.3f} x {muo[i] * 1e-6:.1f} = {r.phi_mu:.1f} kNm; "
                f"Vc = {r.vuc:.1f} (Table 22.5.5.1), Vs = Av fyt d/s = {r.vus:.1f}, "
                f"Vc + 0.66 sqrt(f'c) b d = {r.vu_max:.1f} -> phi Vn = 0.75 x min({r.vuc:.1f} + "
                f"{r.vus:.1f}, {r.vu_max:.1f}) = {r.phi_vu:.1f} kN; "
                f"U = max({m:.1f}/{r.phi_mu:.1f}, {v:.1f}/{r.phi_vu:.1f}) = {r.util:.3f}"
            )
        elif r.model == STM:
            th = np.radians(r.theta)
            As = 0.0 if np.isnan(r.As) else r.As
            out.append(
                f"strut-and-tie ({head} < {deep:g}, Ch. 23): z = {D[i]:.0f} - 2 x {a_t[i]:.0f} = {z[i]:.0f}; "
                f"theta = atan({z[i]:.0f}/{r.span * 1000:.0f}) = {r.theta:.1f} deg; beta_s = {r.beta_s:.2f}; "
                f"w_s = 2a/cos theta = {r.w_s:.0f}; strut C* = V*/sin theta = {v:.1f}/{np.sin(th):.3f} = "
                f"{r.c_star:.1f} kN vs 0.75 x 0.85 beta_s f'c b w_s = {r.strut_cap:.1f} kN; node (beta_n "
                f"0.80) {r.node_cap:.1f} kN; tie T* = V* ln/z = {r.t_star:.1f} kN vs 0.75 As fy = 0.75 x "
                f"{As:.0f} x {fsy[i]:.0f} = {r.tie_cap:.1f} kN; "
                f"U = max({r.u_strut:.3f}, {r.u_node:.3f}, {r.u_tie:.3f}) = {r.util:.3f}"
            )
        else:
            al = np.radians(r.alpha)
            req = (
                f"required, {head} < 2 and |Vu| = {v:.1f} >= 0.33 sqrt({fc[i]:g}) x {b[i]:.0f} x {D[i]:.0f} "
                f"= {0.33 * np.sqrt(fc[i]) * b[i] * D[i] * 1e-3:.1f} kN (18.10.7.2)"
                if diag_needed[i]
                else head
            )
            out.append(
                f"diagonal bars ({req}): alpha = atan(({D[i]:.0f} - 2 x {a_g[i]:.0f})/{r.span * 1000:.0f}) = "
                f"{r.alpha:.1f} deg; Avd = {r.A_sd:.0f}; Vn = 2 Avd fy sin alpha = 2 x {r.A_sd:.0f} x "
                f"{min(fsy[i], 550.0):.0f} x {np.sin(al):.3f} = {r.vu_diag:.1f} kN <= 0.83 sqrt({fc[i]:g}) x "
                f"{b[i]:.0f} x {D[i]:.0f} = {r.v_cap:.1f} kN -> phi Vn = {phi_d:g} x min({r.vu_diag:.1f}, "
                f"{r.v_cap:.1f}) = {r.phi_vu:.1f} kN (phi "
                + ("21.2.4.4" if special else "Table 21.2.1(b): 21.2.4.4 is for special walls")
                + f"); U = {v:.1f}/{r.phi_vu:.1f} = {r.util:.3f}"
            )
    return out


def preamble_aci(s: Settings) -> list[tuple[str, str]]:
    """Lines above the lintel table under ACI 318-19 (pipeline: AS 3600's are written there)."""
    special = s.aci_special_walls == "yes"
    model = (
        "coupling beams of special structural walls (Project setting), 18.10.7: diagonal bars where "
        "given, and required where ln/h < 2 and |Vu| >= 0.33 sqrt(f'c) Acw (18.10.7.2; a row without "
        "them fails); every other one a beam (18.10.7.1, 18.10.7.3) at any ln/h"
        if special
        else f"diagonal bars where given; else beam where ln/h >= {s.lintel_deep_ratio:g}, strut-and-tie "
        "(Ch. 23) below"
    )
    return [
        (
            "Geometry",
            "span ln = opening width; h = head of opening to top of slab above; b = wall thickness; "
            "lintel bars the same top and bottom, at cover + fitment + db/2",
        ),
        ("Model", model),
        ("Beam", BASIS_ACI[BEAM]),
        ("Strut-and-tie", BASIS_ACI[STM] + "; beta_s 0.75 with fitments, 0.4 without"),
        (
            "Diagonal bars",
            "phi Vn = 0.85 x min(2 Avd fy sin alpha, 0.83 sqrt(f'c) b h) (18.10.7.4; alpha from the "
            "geometry, group centroid at cover + fitment + 1.5 db)",
        ),
    ]
