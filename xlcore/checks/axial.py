"""Axial load with bending of every pier (strain compatibility, AS 3600:2018 Cl 8.1.3, 10.6,
Table 2.2.2) and the simplified method for walls in compression (Cl 11.4, 11.5)."""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore.checks import once_per, per_pier, plain
from xlcore.codes import as3600
from xlcore.geometry import ZONE_COLUMNS, ZONE_FIELDS
from xlcore.mechanics import bars, nm
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
    "edge_a",
    "edge_b",
    *ZONE_COLUMNS,
]


def pier_bars(Lw, tw, v_dia, v_spacing, v_layers, cover, zones: pd.DataFrame | None = None):
    """Vertical bars of each pier seen in its plane: depths from the pier's start side
    (rows x n) and areas (all layers at a position).

    The field bars at the given spacing or closer, evenly between the end bars, whose centres
    sit at cover + bar radius from each end of the pier; where `zones` (the geometry's zone
    columns, one row per pier) gives end-zone bars, those at their positions and the field
    between the zones (`bars.layout`)."""
    df = pd.DataFrame(dict(Lw=Lw, v_dia=v_dia, v_spacing=v_spacing, v_layers=v_layers, cover=cover))
    if zones is not None:
        df = pd.concat([df, zones.reset_index(drop=True)[_zone_cols(zones)]], axis=1)
    return bars.layout(df).all_bars()


def _zone_cols(df: pd.DataFrame) -> list[str]:
    return [c for c in ZONE_COLUMNS if c in df]


def rect_sections(df: pd.DataFrame) -> nm.EvenRect:
    """The piers of `df` as sections, depths from each pier's start side (the face M* < 0
    compresses): the field bars in closed form, the end-zone bars one by one (`bars.layout`)."""
    lay = bars.layout(df)
    fc = df.fc.to_numpy(dtype=float)
    return nm.EvenRect(
        D=df.Lw.to_numpy(dtype=float),
        b=df.tw.to_numpy(dtype=float),
        fc=fc,
        fsy=df.fsy.to_numpy(dtype=float),
        edge=lay.field_edge,
        step=lay.field_step,
        count=lay.field_count,
        bar_area=lay.field_area,
        alpha2=as3600.alpha2(fc),
        gamma=as3600.gamma(fc),
        eps_cu=as3600.EPS_CU,
        Es=as3600.ES,
        zd=lay.zone_d if lay.zone_d.shape[1] else None,
        zA=lay.zone_A if lay.zone_d.shape[1] else None,
    )


def asymmetric(df: pd.DataFrame) -> np.ndarray:
    """Piers whose end zones differ between their two sides (their strength depends on which
    end M* compresses)."""
    out = np.zeros(len(df), dtype=bool)
    for k in ZONE_FIELDS[:4]:
        a, b = (
            np.nan_to_num(df[f"z{s}_{k}"].to_numpy(dtype=float)) if f"z{s}_{k}" in df else 0.0 for s in "ab"
        )
        out |= np.asarray(a != b)
    return out


def interaction(
    sec, n_star, phi0=as3600.PHI_COMPRESSION, of: np.ndarray | None = None, m_star=None
) -> dict[str, np.ndarray]:
    """Design moment capacity phi Mu at the design axial force N* [N], and the key points.

    Between pure bending and decompression (dn = D) the neutral axis is found so that
    phi(Nu) Nu = N* (Table 2.2.2 phi varies with Nu); above decompression phi Mu falls linearly
    to zero at phi Nuo (squash, Cl 10.6.2.2), and in tension linearly from pure bending to
    0.85 Nuot, as AS 3600 practice interpolates (and the concreteproperties library does).

    `sec` may hold each distinct section once and `of` give the section of each N*: the
    section's own points (squash, balance, pure bending) are then found once per section.

    With `m_star` [N mm] also the radial overload factor `lam` (see `radial`)."""
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
    out = dict(
        nuo=nuo,
        nuot=nuot,
        nub=nub,
        kuo=kuo,
        m0=m0,
        nd=nd,
        md=md,
        phi_d=phi_d,
        dn=dn,
        dn0=dn0,
        nu=nu,
        mu=mu,
        phi=np.where(above, phi0, np.where(tension, phi_b, phi)),
        phi_mu=phi_mu,
        top=top,
        bottom=bottom,
        region=region,
    )
    if m_star is not None:
        out |= radial(sec, n_star, m_star, out, phi_of)
    return out


def _oriented(df: pd.DataFrame, first: np.ndarray) -> tuple[nm.EvenRect, np.ndarray, np.ndarray]:
    """Each distinct pier's section twice: compressed at its start (rows 0..k-1) and at its end
    (rows k..2k-1); which piers are asymmetric; and for each row whether M* compresses the end
    (M* >= 0, the sign convention of the actions sheets)."""
    base = rect_sections(df.iloc[first])
    sec = nm.concat(base, base.flipped())
    return sec, asymmetric(df.iloc[first]), df.m.to_numpy(float) >= 0


RAY_TENSION, RAY_CURVE, RAY_SQUASH, RAY_NONE = 1, 2, 3, 0
RAY_TEXT = {
    RAY_TENSION: "tension side",
    RAY_CURVE: "strain compatibility",
    RAY_SQUASH: "near squash",
    RAY_NONE: "no actions",
}


def radial(sec, n_star, m_star, r: dict[str, np.ndarray], phi_of) -> dict[str, np.ndarray]:
    """Radial overload factor lambda: (N*, |M*|) / lambda lies on the factored interaction
    diagram along the ray from the origin, so lambda = 1.2 means 20 % over in tension and in
    compression alike (docs/engineering-basis.md, "Axial + bending utilisation").

    The factored diagram is the one `interaction` uses: on the tension side the straight line
    from (0, phi Muo) to (phi Nuot, 0); between pure bending and decompression the
    strain-compatibility points (phi Nu, phi Mu)(dn); from decompression the straight line to
    (phi0 Nuo, 0). `r` is `interaction`'s per-row dict, `sec` one section per row; N, N mm."""
    n = np.asarray(n_star, dtype=float)
    m = np.abs(np.asarray(m_star, dtype=float))
    phi_b = as3600.phi_bending(r["kuo"])
    phi_mo = phi_b * np.abs(r["m0"])
    n1, m1 = r["phi_d"] * r["nd"], r["phi_d"] * np.abs(r["md"])
    tension = n < 0
    squash = (n >= 0) & (m * n1 < n * m1)  # ray below the decompression point's
    curve = ~tension & ~squash
    lam = np.zeros(n.shape)
    where = RAY_CURVE * np.ones(n.shape, dtype=int)
    lam = np.where(tension, as3600.tension_side_utilisation(n, m, r["bottom"], phi_mo), lam)
    lam = np.where(squash, as3600.ray_segment_utilisation(n, m, n1, m1, r["top"], 0.0), lam)
    where = np.where(tension, RAY_TENSION, np.where(squash, RAY_SQUASH, where))
    dn_ray = np.full(n.shape, np.nan)
    nu_ray = np.full(n.shape, np.nan)
    mu_ray = np.full(n.shape, np.nan)
    phi_ray = np.full(n.shape, np.nan)
    rows = np.flatnonzero(curve & ((n > 0) | (m > 0)))
    if rows.size:
        part = sec.take(rows)
        dn = nm.solve_ray(
            part, n[rows], m[rows], r["dn0"][rows], part.D, lambda v, k: phi_of(v, _sub(rows, k))
        )
        nu, mu = nm.forces(part, dn)
        phi = phi_of(nu, rows)
        dn_ray[rows], nu_ray[rows], mu_ray[rows], phi_ray[rows] = dn, nu, np.abs(mu), phi
        lam[rows] = (n[rows] + m[rows]) / (phi * (nu + np.abs(mu)))
    where = np.where((n == 0) & (m == 0), RAY_NONE, where)
    return dict(
        lam=lam, ray=where, dn_ray=dn_ray, nu_ray=nu_ray, mu_ray=mu_ray, phi_ray=phi_ray, phi_mo=phi_mo
    )


def _sub(rows: np.ndarray, k: np.ndarray | None) -> np.ndarray:
    """Rows of the whole table for the solver's subset `k` of `rows` (None: all of them)."""
    return rows if k is None else rows[k]


REGION_TEXT = {
    1: "tension: linear from pure bending to phi Nuot",
    2: "strain compatibility at N*",
    3: "above decompression: linear to phi Nuo",
    4: "N* exceeds phi Nuo (squash)",
    5: "N* exceeds the tension capacity",
}


def check_pier_axial(
    piers: pd.DataFrame,
    actions: pd.DataFrame,
    settings: Settings,
    working: bool = True,
    text: bool = True,
) -> pd.DataFrame:
    """In-plane axial force and bending of every pier row, kN and kNm (without `working`, the
    numbers only; without `text`, every column but the working text f_nm and f_s, which the
    same call on the rows written makes later: `compute --detail`)."""
    df = actions.merge(piers[[c for c in GEOMETRY if c in piers]], on=["storey", "pier_id"], how="left")
    df = df[df.n.notna() & df.m.notna()].reset_index(drop=True)
    phi0 = settings.phi_compression if settings.phi_compression is not None else as3600.PHI_COMPRESSION
    if df.empty:
        return df
    first, of = per_pier(df)
    sec, asym, end_compressed = _oriented(df, first)
    n_star = df.n.to_numpy(float) * 1e3
    m_raw = df.m.to_numpy(float) * 1e6
    m_design = as3600.min_eccentricity_moment(m_raw, n_star, df.Lw.to_numpy(float))
    # M* > 0 compresses the pier's end (the flipped section, rows len(first) on); where the
    # minimum eccentricity sets |M*| the sense is open: both are run and the worse kept
    both = asym[of] & (m_design > np.abs(m_raw))
    rows = np.concatenate([np.arange(len(df)), np.flatnonzero(both)])
    sense = np.concatenate([end_compressed, ~end_compressed[both]])
    r = interaction(sec, n_star[rows], phi0, of=of[rows] + len(first) * sense, m_star=m_design[rows])
    pick = np.arange(len(df))
    other = len(df) + np.arange(int(both.sum()))
    worse = r["lam"][other] > r["lam"][np.flatnonzero(both)]
    pick[np.flatnonzero(both)[worse]] = other[worse]
    r = {k: v[pick] for k, v in r.items()}
    df["compressed"] = np.where(asym[of], np.where(sense[pick], "end", "start"), "either")
    section_of = (of[rows] + len(first) * sense)[pick]
    kn, knm = 1e-3, 1e-6
    df["m_design"] = m_design * knm
    df["m_min"] = np.maximum(n_star, 0.0) * as3600.MIN_ECCENTRICITY * df.Lw.to_numpy(float) * knm
    df["nuo"], df["nuot"], df["nub"] = r["nuo"] * kn, r["nuot"] * kn, r["nub"] * kn
    df["phi_nuo"], df["kuo"], df["dn"] = r["top"] * kn, r["kuo"], np.where(r["region"] == 2, r["dn"], np.nan)
    df["phi_nuot"] = r["bottom"] * kn
    df["mu"] = np.where(r["region"] == 2, np.abs(r["mu"]) * knm, np.nan)
    df["phi"], df["phi_mu"] = r["phi"], r["phi_mu"] * knm
    df["as_total"] = sec.As[section_of]
    # the ratio at fixed N* (kept as a column: what earlier versions called the utilisation)
    beyond = np.isin(r["region"], (4, 5))  # axial capacity exceeded: the axial ratio tells
    with np.errstate(divide="ignore", invalid="ignore"):
        m_ratio = df.m_design.to_numpy() / df.phi_mu.to_numpy()
    m_ratio = np.where(beyond | (df.m_design.to_numpy() == 0), 0.0, m_ratio)
    n_ratio = np.where(df.n >= 0, df.n / df.phi_nuo, df.n / df.phi_nuot)
    df["u_fixed_n"] = np.maximum(m_ratio, n_ratio)
    lam = r["lam"]
    df["util"] = lam
    with np.errstate(divide="ignore", invalid="ignore"):
        df["n_ray"] = np.where(lam > 0, df.n / lam, 0.0)
        df["m_ray"] = np.where(lam > 0, df.m_design / lam, 0.0)
    df["status"] = np.where(df.util <= 1.0, PASS, FAIL)
    ray = r["ray"]
    df["governs"] = [RAY_TEXT[int(k)] for k in ray.tolist()]
    df["clause"] = np.select(
        [ray == RAY_TENSION, ray == RAY_SQUASH],
        ["Table 2.2.2 tension", "Cl 10.6.2.2 squash, phi0, Cl 10.1.2"],
        "Cl 8.1.3 / Table 2.2.2, Cl 10.1.2",
    )
    if not working:
        return _simplified(df, settings, of, working)
    df["bars"] = np.asarray(bars.describe(df.iloc[first]), dtype=object)[of]
    if not text:  # every column but the working text (made later for the rows written)
        return _simplified(df, settings, of, working=False)
    phi_b = as3600.phi_bending(r["kuo"])
    cols = plain(
        ray,
        df.n,
        df.m,
        df.Lw,
        df.m_min,
        df.m_design,
        r["dn_ray"],
        r["nu_ray"] * kn,
        r["mu_ray"] * knm,
        r["phi_ray"],
        df.kuo,
        df.nub,
        phi_b,
        np.abs(r["m0"]) * knm,
        df.nuot,
        df.phi_nuot,
        r["phi_d"],
        r["nd"] * kn,
        np.abs(r["md"]) * knm,
        df.nuo,
        df.phi_nuo,
        df.util,
        df.phi_mu,
        df.u_fixed_n,
    )
    df["f_nm"] = [
        ("" if c == "either" else f"M* compresses the pier's {c} (its end zones differ); ")
        + _nm_text(*v, phi0)
        for c, *v in zip(df.compressed.tolist(), *cols, strict=True)
    ]
    return _simplified(df, settings, of, working)


def _nm_text(
    ray,
    n,
    m,
    lw,
    m_min,
    md_,
    dn,
    nu,
    mu,
    phi,
    kuo,
    nub,
    phi_b,
    m0,
    nuot,
    phi_nuot,
    phi_d,
    nd,
    mdc,
    nuo,
    phi_nuo,
    util,
    phi_mu,
    u_old,
    phi0,
) -> str:
    """Working of the radial utilisation with every number substituted (kN, kNm)."""
    if n > 0:
        head = (
            f"M* = max(|{m:.1f}|, 0.05 x {lw:.0f} mm x {n:.1f} kN = {m_min:.1f}) = {md_:.1f} kNm "
            "(Cl 10.1.2); "
        )
    else:
        head = f"M* = |{m:.1f}| = {md_:.1f} kNm; "
    if ray == RAY_TENSION:
        mo = phi_b * m0
        body = (
            f"tension side: line from (0, phiMuo = {phi_b:.3f} x {m0:.1f} = {mo:.1f} kNm) to "
            f"(phiNuot = 0.85 x {nuot:.1f} = {phi_nuot:.1f} kN, 0); "
            f"U = N*/phiNuot + M*/phiMuo = {n:.1f} / {phi_nuot:.1f} + {md_:.1f} / {mo:.1f} = {util:.3f}"
        )
    elif ray == RAY_SQUASH:
        n1, m1 = phi_d * nd, phi_d * mdc
        dN, dM = phi_nuo - n1, -m1
        body = (
            f"ray below decompression (phiNu, phiMu) = ({phi_d:.3f} x {nd:.1f}, {phi_d:.3f} x {mdc:.1f}) = "
            f"({n1:.1f}, {m1:.1f}); line to (phiNuo = {phi0:.2f} x {nuo:.1f} = {phi_nuo:.1f} kN, 0); "
            f"U = (N* dM - M* dN) / (N1 dM - M1 dN) = ({n:.1f} x {dM:.1f} - {md_:.1f} x {dN:.1f}) / "
            f"({n1:.1f} x {dM:.1f} - {m1:.1f} x {dN:.1f}) = {util:.3f}"
        )
    elif ray == RAY_CURVE:
        pn, pm = phi * nu, phi * mu
        body = (
            f"ray meets the curve at dn = {dn:.0f} mm: Nu = {nu:.1f} kN, Mu = {mu:.1f} kNm, "
            f"phi = {phi:.3f} (kuo {kuo:.3f}, Nub {nub:.0f} kN) -> ({pn:.1f}, {pm:.1f}); "
            f"U = (N* + M*) / (phiNu + phiMu) = ({n:.1f} + {md_:.1f}) / ({pn:.1f} + {pm:.1f}) = {util:.3f}"
        )
    else:
        body = "no actions: U = 0"
    cap, name = (phi_nuo, "phiNuo") if n >= 0 else (phi_nuot, "phiNuot")
    return (
        f"{head}{body}; at fixed N*: max(M*/phiMu = {md_:.1f} / {phi_mu:.1f}, "
        f"N*/{name} = {n:.1f} / {cap:.1f}) = {u_old:.3f}"
    )


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
    # in-plane moment considered: the design axial force per unit length at the pier's more
    # compressed end, N*/Lw + 6 M*/Lw^2 (M* with the Cl 10.1.2 minimum is for the column check)
    hi, lo = as3600.wall_end_axial_per_length(n * 1e3, df.m.to_numpy(float) * 1e6, Lw)
    stress = hi / tw
    limit = np.where(df.v_layers.to_numpy() >= 2, 30.0, 20.0)
    slender = hwe / tw
    one_layer = df.v_layers.to_numpy() < 2
    fails = {  # each condition of Cl 11.5.1 that rules the method out, as a row mask
        "not in compression": n <= 0,
        "end in tension": (n > 0) & (lo < 0),
        "slender": slender > limit,
        "stress": (stress > 3.0) & one_layer,
        "load outside the middle third": e > tw / 6,
    }
    applies = ~np.logical_or.reduce(list(fails.values()))
    df["k"], df["hwe"], df["e"], df["ea"] = k, hwe, e, ea
    df["slender"] = hwe / tw
    df["phi_s"] = phi
    df["phi_nu_s"] = np.where(applies, cap, np.nan)
    df["n_end"] = hi * Lw * 1e-3  # end force per length over the whole length [kN]
    df["n_end_lo"] = lo * Lw * 1e-3
    df["util_s"] = np.where(applies, df.n_end / np.where(cap > 0, cap, np.nan), np.nan)
    df["status_s"] = np.where(applies, np.where(df.util_s <= 1.0, PASS, FAIL), NOT_APPLICABLE)
    if not working:
        return df
    reasons = [""] * len(df)
    for i in np.flatnonzero(~applies).tolist():
        why = []
        if fails["not in compression"][i]:
            why.append("not in compression")
        if fails["end in tension"][i]:
            why.append(f"one end in tension under in-plane M* ({lo[i]:.0f} N/mm): designed as a column")
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
    text = once_per(work, [of, "e", "ok", "why"], lambda w: _simplified_text(w, phi))
    df["f_s"] = [
        f"{t}; end: {nn:.1f} kN / {lw:.0f} + 6 x |{mm:.1f}| kNm / {lw:.0f}^2 = {h:.1f} N/mm -> "
        f"{h:.1f} x {lw:.0f} = {ne:.1f} kN; U = {ne:.1f} / {c:.1f} = {u:.3f}"
        if ok
        else t
        for t, nn, mm, lw, h, ne, c, u, ok in zip(
            text.tolist(), *plain(n, df.m, Lw, hi, df.n_end, cap, df.util_s, applies), strict=True
        )
    ]
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
