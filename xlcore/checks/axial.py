"""Axial load with bending of every pier (strain compatibility, AS 3600:2018 Cl 8.1.3, 10.6,
Table 2.2.2) and the simplified method for walls in compression (Cl 11.4, 11.5)."""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore import nm
from xlcore.checks import once_per, per_pier, plain
from xlcore.codes import as3600
from xlcore.model import Settings
from xlcore.results import FAIL, NOT_APPLICABLE, PASS

GEOMETRY = [
    "storey",
    "pier_id",
    "Lw",
    "tw",
    "Hc",
    "fc",
    "fsy",
    "v_dia",
    "v_spacing",
    "v_layers",
    "cover",
    "rho_v",
    "supported_edges",
]


def pier_bars(Lw, tw, v_dia, v_spacing, v_layers, cover) -> tuple[np.ndarray, np.ndarray]:
    """Vertical bars of each pier seen in its plane: depths (rows x n) and areas.

    Bars at the given spacing or closer, evenly between the end bars, whose centres sit at
    cover + bar radius from each end of the pier (no end-zone bars: an idealisation - add
    boundary bars as a separate input when that lands)."""
    edge = cover + v_dia / 2
    count = np.maximum(np.ceil((Lw - 2 * edge) / v_spacing).astype(int) + 1, 2)
    width = count.max()
    j = np.arange(width)[None, :]
    step = (Lw - 2 * edge) / (count - 1)
    depth = edge[:, None] + j * step[:, None]
    area = np.where(j < count[:, None], (v_layers * np.pi * v_dia**2 / 4)[:, None], 0.0)
    return np.where(j < count[:, None], depth, 0.0), area


def rect_sections(df: pd.DataFrame) -> nm.EvenRect:
    """The piers of `df` as sections with the bars of `pier_bars` (evenly spaced, one area)."""
    Lw, tw, dia, spacing, layers, cover = (
        df[k].to_numpy(dtype=float) for k in ("Lw", "tw", "v_dia", "v_spacing", "v_layers", "cover")
    )
    edge = cover + dia / 2
    count = np.maximum(np.ceil((Lw - 2 * edge) / spacing).astype(int) + 1, 2)
    fc = df.fc.to_numpy(dtype=float)
    return nm.EvenRect(
        D=Lw,
        b=tw,
        fc=fc,
        fsy=df.fsy.to_numpy(dtype=float),
        edge=edge,
        step=(Lw - 2 * edge) / (count - 1),
        count=count.astype(float),
        bar_area=layers * np.pi * dia**2 / 4,
        alpha2=as3600.alpha2(fc),
        gamma=as3600.gamma(fc),
        eps_cu=as3600.EPS_CU,
        Es=as3600.ES,
    )


def interaction(
    sec, n_star, phi0=as3600.PHI_COMPRESSION, of: np.ndarray | None = None
) -> dict[str, np.ndarray]:
    """Design moment capacity phi Mu at the design axial force N* [N], and the key points.

    Between pure bending and decompression (dn = D) the neutral axis is found so that
    phi(Nu) Nu = N* (Table 2.2.2 phi varies with Nu); above decompression phi Mu falls linearly
    to zero at phi Nuo (squash, Cl 10.6.2.2), and in tension linearly from pure bending to
    0.85 Nuot, as AS 3600 practice interpolates (and the concreteproperties library does).

    `sec` may hold each distinct section once and `of` give the section of each N*: the
    section's own points (squash, balance, pure bending) are then found once per section."""
    n_star = np.asarray(n_star, dtype=float)
    D = sec.D
    As = sec.As
    nuo = as3600.squash_load(sec.fc, D * sec.b - As, As, sec.fsy)
    nuot = nm.tension_capacity(sec)
    d0 = sec.d0
    dn_b = d0 * sec.eps_cu / (sec.eps_cu + sec.fsy / sec.Es)
    nub, _ = nm.forces(sec, dn_b)
    dn0 = nm.solve_dn(sec, 0.0, 1e-6 * D, D)
    _, m0 = nm.forces(sec, dn0)
    kuo = dn0 / d0
    nd, md = nm.forces(sec, D)
    if of is not None:  # from here on, one row per N*
        sec = sec.take(of)
        D, nuo, nuot, nub, dn0, m0, kuo, nd, md = (v[of] for v in (D, nuo, nuot, nub, dn0, m0, kuo, nd, md))

    def phi_of(n, rows=None):  # Table 2.2.2 phi at Nu = n, for all rows or those given
        pick = (lambda v: v) if rows is None else (lambda v: v[rows])
        return as3600.phi_axial_bending(n, pick(nub), pick(nuot), pick(kuo), phi0)

    phi_d = phi_of(nd)
    phi_b = as3600.phi_bending(kuo)
    # regular region: phi(N) N = N*, N between 0 and decompression
    target = np.clip(n_star, 0.0, phi_d * nd)
    dn = nm.solve_dn(sec, target, dn0, D, scale=phi_of)
    nu, mu = nm.forces(sec, dn)
    phi = phi_of(nu)
    phi_mu = phi * np.abs(mu)
    top = phi0 * nuo
    above = n_star > phi_d * nd
    frac_up = np.clip((top - n_star) / np.maximum(top - phi_d * nd, 1e-9), 0.0, 1.0)
    phi_mu = np.where(above, phi_d * np.abs(md) * frac_up, phi_mu)
    tension = n_star < 0
    bottom = as3600.PHI_TENSION * nuot
    frac_down = np.clip(1.0 - n_star / np.where(bottom < 0, bottom, -1.0), 0.0, 1.0)
    phi_mu = np.where(tension, phi_b * np.abs(m0) * frac_down, phi_mu)
    region = np.where(
        n_star > top, 4, np.where(above, 3, np.where(tension, np.where(n_star < bottom, 5, 1), 2))
    )
    return dict(
        nuo=nuo,
        nuot=nuot,
        nub=nub,
        kuo=kuo,
        m0=m0,
        nd=nd,
        md=md,
        phi_d=phi_d,
        dn=dn,
        nu=nu,
        mu=mu,
        phi=np.where(above, phi0, np.where(tension, phi_b, phi)),
        phi_mu=phi_mu,
        top=top,
        bottom=bottom,
        region=region,
    )


REGION_TEXT = {
    1: "tension: linear from pure bending to phi Nuot",
    2: "strain compatibility at N*",
    3: "above decompression: linear to phi Nuo",
    4: "N* exceeds phi Nuo (squash)",
    5: "N* exceeds the tension capacity",
}


def check_pier_axial(
    piers: pd.DataFrame, actions: pd.DataFrame, settings: Settings, working: bool = True
) -> pd.DataFrame:
    """In-plane axial force and bending of every pier row, kN and kNm (without `working`, the
    numbers only)."""
    df = actions.merge(piers[GEOMETRY], on=["storey", "pier_id"], how="left")
    df = df[df.n.notna() & df.m.notna()].reset_index(drop=True)
    phi0 = settings.phi_compression if settings.phi_compression is not None else as3600.PHI_COMPRESSION
    if df.empty:
        return df
    first, of = per_pier(df)
    sec = rect_sections(df.iloc[first])
    r = interaction(sec, df.n.to_numpy() * 1e3, phi0, of=of)
    kn, knm = 1e-3, 1e-6
    df["nuo"], df["nuot"], df["nub"] = r["nuo"] * kn, r["nuot"] * kn, r["nub"] * kn
    df["phi_nuo"], df["kuo"], df["dn"] = r["top"] * kn, r["kuo"], np.where(r["region"] == 2, r["dn"], np.nan)
    df["mu"] = np.where(r["region"] == 2, np.abs(r["mu"]) * knm, np.nan)
    df["phi"], df["phi_mu"] = r["phi"], r["phi_mu"] * knm
    df["as_total"] = sec.As[of]
    beyond = np.isin(r["region"], (4, 5))  # axial capacity exceeded: the axial ratio tells
    with np.errstate(divide="ignore", invalid="ignore"):
        m_ratio = np.abs(df.m.to_numpy()) / df.phi_mu.to_numpy()
    m_ratio = np.where(beyond | (df.m.abs().to_numpy() == 0), 0.0, m_ratio)
    n_ratio = np.where(df.n >= 0, df.n / df.phi_nuo, df.n / (r["bottom"] * kn))
    df["util"] = np.maximum(m_ratio, n_ratio)
    df["status"] = np.where(df.util <= 1.0, PASS, FAIL)
    df["governs"] = np.where(n_ratio >= m_ratio, "axial", "moment at N*")
    df["clause"] = np.where(
        n_ratio >= m_ratio,
        np.where(df.n >= 0, "Cl 10.6.2.2 squash, phi0", "Table 2.2.2 tension"),
        "Cl 8.1.3 / Table 2.2.2",
    )
    if not working:
        return _simplified(df, settings, of, working)
    df["f_nm"] = [
        _nm_text(*vals)
        for vals in zip(
            *plain(
                r["region"],
                df.n,
                df.m,
                df.dn,
                r["nu"] * kn,
                df.mu,
                df.phi,
                df.phi_mu,
                df.kuo,
                df.nub,
                df.phi_nuo,
                df.util,
            ),
            strict=True,
        )
    ]
    return _simplified(df, settings, of, working)


def _nm_text(region, n, m, dn, nu, mu, phi, phi_mu, kuo, nub, phi_nuo, util) -> str:
    if region == 2:
        core = (
            f"dn = {dn:.0f} mm: Nu = {nu:.1f} kN, Mu = {mu:.1f} kNm; phi = {phi:.3f} "
            f"(kuo {kuo:.3f}, Nub {nub:.0f} kN); phiMu = {phi_mu:.1f} kNm"
        )
    else:
        core = f"{REGION_TEXT[int(region)]}; phiMu = {phi_mu:.1f} kNm; phiNuo = {phi_nuo:.1f} kN"
    return f"{core}; U = max(|{m:.1f}| / {phi_mu:.1f}, N*/phiN) = {util:.3f}"


def _simplified(df: pd.DataFrame, s: Settings, of: np.ndarray, working: bool = True) -> pd.DataFrame:
    """Cl 11.5 simplified method per row, with its applicability evaluated row by row; `of`
    gives each row's storey x pier group (`per_pier`)."""
    phi = s.phi_simplified if s.phi_simplified is not None else as3600.PHI_SIMPLIFIED
    tw, Lw, Hc = df.tw.to_numpy(float), df.Lw.to_numpy(float), df.Hc.to_numpy(float)
    k = as3600.effective_height_factor(Hc, Lw, df.supported_edges.to_numpy(), s.ends_restrained == "yes")
    hwe = k * Hc
    n = df.n.to_numpy(float)
    m_out = df.m_out.to_numpy(float) if "m_out" in df else np.zeros(len(df))
    e_given = np.where(n > 0, np.abs(np.nan_to_num(m_out)) / np.where(n > 0, n, 1.0) * 1e3, 0.0)
    e = as3600.simplified_eccentricity(e_given, tw)
    ea = as3600.additional_eccentricity(hwe, tw)
    cap = as3600.simplified_capacity(df.fc.to_numpy(float), tw, e, ea, Lw, phi) * 1e-3
    stress = n * 1e3 / (Lw * tw)
    limit = np.where(df.v_layers.to_numpy() >= 2, 30.0, 20.0)
    slender = hwe / tw
    one_layer = df.v_layers.to_numpy() < 2
    fails = {  # each condition of Cl 11.5.1 that rules the method out, as a row mask
        "not in compression": n <= 0,
        "slender": slender > limit,
        "stress": (stress > 3.0) & one_layer,
        "load outside the middle third": e > tw / 6,
    }
    applies = ~np.logical_or.reduce(list(fails.values()))
    df["k"], df["hwe"], df["e"], df["ea"] = k, hwe, e, ea
    df["slender"] = hwe / tw
    df["phi_s"] = phi
    df["phi_nu_s"] = np.where(applies, cap, np.nan)
    df["util_s"] = np.where(applies, n / np.where(cap > 0, cap, np.nan), np.nan)
    df["status_s"] = np.where(applies, np.where(df.util_s <= 1.0, PASS, FAIL), NOT_APPLICABLE)
    if not working:
        return df
    reasons = [""] * len(df)
    for i in np.flatnonzero(~applies).tolist():
        why = []
        if fails["not in compression"][i]:
            why.append("not in compression")
        if fails["slender"][i]:
            why.append(f"Hwe/tw {slender[i]:.1f} > {limit[i]:.0f}")
        if fails["stress"][i]:
            why.append(f"axial stress {stress[i]:.1f} MPa > 3 MPa with one layer")
        if fails["load outside the middle third"][i]:
            why.append("load outside the middle third")
        reasons[i] = "; ".join(why)
    df["why_s"] = reasons
    # the same for every combination of a pier unless e or the reason differs: made once each
    work = pd.DataFrame(dict(k=k, Hc=Hc, hwe=hwe, e=e, tw=tw, ea=ea, fc=df.fc, Lw=Lw, cap=cap, ok=applies))
    work["why"] = reasons
    df["f_s"] = once_per(work, [of, "e", "ok", "why"], lambda w: _simplified_text(w, phi))
    return df


def _simplified_text(w: pd.DataFrame, phi: float) -> list[str]:
    return [
        (
            f"Hwe = {kk:.3f} x {h:.0f} = {he:.0f} mm; e = {ee:.1f} mm; "
            f"ea = {he:.0f}^2 / (2500 x {t:.0f}) = {a:.1f} mm; "
            f"phiNu = {phi:.2f} x ({t:.0f} - 1.2 x {ee:.1f} - 2 x {a:.1f}) x 0.6 x {fc:g} x {lw:.0f} "
            f"= {c:.1f} kN"
        )
        if ok
        else f"not applicable: {why}"
        for kk, h, he, ee, t, a, fc, lw, c, ok, why in zip(
            *plain(w.k, w.Hc, w.hwe, w.e, w.tw, w.ea, w.fc, w.Lw, w.cap, w.ok), w.why.tolist(), strict=True
        )
    ]
