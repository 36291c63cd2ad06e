"""Axial load with bending of every pier by strain compatibility, and the simplified method for
walls in compression, to the Project's design standard (`codes.base.Standard`): AS 3600:2018
Cl 8.1.3, 10.6, Table 2.2.2, Cl 11.4, 11.5; ACI 318-19 22.2, 22.4, Tables 21.2.2 and 22.4.2.1,
11.5.3. The standard gives the stress block, squash and tension strength, phi for each nominal
point (AS: by Nu; ACI: by the net tensile strain), the design upper limit on N*, the least
design moment and the simplified method; the diagram's shape is the check's (below)."""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore.checks import per_pier, plain
from xlcore.codes import get_standard
from xlcore.codes.base import SectionState, Standard, first_rows, num, row_keys
from xlcore.geometry import ZONE_COLUMNS, ZONE_FIELDS
from xlcore.mechanics import bars, nm
from xlcore.mechanics.radial import ray_segment_utilisation, tension_side_utilisation
from xlcore.model import Settings
from xlcore.results import FAIL, NOT_APPLICABLE, PASS, status_column, text_column

DEFAULT_STANDARD = "AS 3600:2018"
"""The standard of callers that pass none and have no Project settings (the report's figures)."""

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


KEYS = ["storey", "pier_id"]


def _joined(
    actions: pd.DataFrame, piers: pd.DataFrame, columns: list[str]
) -> tuple[pd.DataFrame, np.ndarray, np.ndarray, pd.DataFrame]:
    """`_join` without its last value."""
    return _join(actions, piers, columns)[:4]


def _join(
    actions: pd.DataFrame, piers: pd.DataFrame, columns: list[str]
) -> tuple[pd.DataFrame, np.ndarray, np.ndarray, pd.DataFrame, bool]:
    """The action rows with N* and M*, each with its pier's geometry `columns` of `piers` (a
    left join on storey and pier), `per_pier`'s groups of them (first row of each, each row's
    group), and the geometry of each group (one row per group, what the sections are built from).

    The pier of each group is looked up once (a few thousand keys, `_geometry_rows`) and its
    geometry spread to the rows by position: the same table as merging every row (0.03 s at
    the L tower's 360 000 rows; tests/test_axial_speed2.py). Where a pier is missing or listed
    twice in `piers`, a column name is on both sides, or no row is left: the merge itself.

    The last value tells whether every row's geometry is its group's (`per`'s row), as it is
    where the pier was looked up once; the merge's rows of a pier listed twice differ."""
    keep = pd.notna(actions["n"].to_numpy()) & pd.notna(actions["m"].to_numpy())
    acts = (actions if keep.all() else actions[keep]).reset_index(drop=True)
    extra = [c for c in columns if c not in KEYS]
    if not acts.empty and not any(c in acts for c in extra):
        first, of = per_pier(acts)
        at = _geometry_rows([acts[k].to_numpy()[first] for k in KEYS], [piers[k].to_numpy() for k in KEYS])
        if at is not None:
            per = piers[extra].take(at).reset_index(drop=True)
            spread = per.take(of)
            spread.index = acts.index
            return pd.concat([acts, spread], axis=1), first, of, per, True
    df = actions.merge(piers[columns], on=KEYS, how="left")
    df = df[df.n.notna() & df.m.notna()].reset_index(drop=True)
    if df.empty:
        none = np.zeros(0, dtype=np.intp)
        return df, none, none, df, False
    first, of = per_pier(df)
    return df, first, of, df.iloc[first][[c for c in extra if c in df]].reset_index(drop=True), False


def _geometry_rows(want: list[np.ndarray], have: list[np.ndarray]) -> np.ndarray | None:
    """For each key (storey, pier_id) in `want` (two arrays), the position of the one key of
    `have` equal to it; None where a key of `want` is missing from `have` or `have` lists a key
    twice (the caller's merge then says what happens). Keys as integer codes of both columns
    factorised together: pandas' equality of values, as a merge on the columns."""
    codes = [pd.factorize(np.concatenate([h, w]))[0] for h, w in zip(have, want, strict=True)]
    if (codes[0] < 0).any() or (codes[1] < 0).any():  # a missing key (NaN): the merge's rules
        return None
    key = codes[0].astype(np.int64) * (int(codes[1].max(initial=0)) + 1) + codes[1]
    n = len(have[0])
    index = pd.Index(key[:n])
    if not index.is_unique:
        return None
    at = index.get_indexer(key[n:])
    return None if (at < 0).any() else at


def _geometry_columns(piers: pd.DataFrame, util_only: bool) -> list[str]:
    """The GEOMETRY columns of `piers` the check joins to its action rows. A pier table may
    lack the optional ones (the end zones and edge names: no zones); with `util_only` (the
    advice search's variant rows) a missing required one is an error, not a silently different
    section, and the edge names (read by the bars' words alone) are not joined."""
    if util_only:
        missing = [c for c in GEOMETRY if c not in piers and c not in OPTIONAL_GEOMETRY]
        if missing:
            raise KeyError(f"pier rows lack the axial check's columns {missing}")
        return [c for c in GEOMETRY if c in piers and c not in EDGE_NAMES]
    return [c for c in GEOMETRY if c in piers]


EDGE_NAMES = ("edge_a", "edge_b")
OPTIONAL_GEOMETRY = (*EDGE_NAMES, *ZONE_COLUMNS)


def _zone_cols(df: pd.DataFrame) -> list[str]:
    return [c for c in ZONE_COLUMNS if c in df]


def rect_sections(df: pd.DataFrame, std: Standard | None = None) -> nm.EvenRect:
    """The piers of `df` as sections, depths from each pier's start side (the face M* < 0
    compresses): the field bars in closed form, the end-zone bars one by one (`bars.layout`);
    the stress block, eps_cu and Es of the standard."""
    cols = {k: df[k].to_numpy(dtype=float) for k in (*bars.LAYOUT_COLUMNS, "tw", "fc", "fsy") if k in df}
    return _sections_of(cols, len(df), std)


def _sections_of(cols: dict[str, np.ndarray], rows: int, std: Standard | None = None) -> nm.EvenRect:
    """`rect_sections` of the columns `cols` (float arrays by name, `rows` long)."""
    std = std or get_standard(DEFAULT_STANDARD)
    lay = bars.layout_of(cols, rows)
    fc = cols["fc"]
    alpha2, gamma = std.stress_block(fc)
    return nm.EvenRect(
        D=cols["Lw"],
        b=cols["tw"],
        fc=fc,
        fsy=cols["fsy"],
        edge=lay.field_edge,
        step=lay.field_step,
        count=lay.field_count,
        bar_area=lay.field_area,
        alpha2=alpha2,
        gamma=gamma,
        eps_cu=std.eps_cu,
        Es=std.Es,
        zd=lay.zone_d if lay.zone_d.shape[1] else None,
        zA=lay.zone_A if lay.zone_d.shape[1] else None,
    )


def asymmetric(df: pd.DataFrame) -> np.ndarray:
    """Piers whose end zones differ between their two sides (their strength depends on which
    end M* compresses)."""
    return _asymmetric_of({c: df[c].to_numpy(dtype=float) for c in ZONE_COLUMNS if c in df}, len(df))


def _asymmetric_of(cols: dict[str, np.ndarray], rows: int) -> np.ndarray:
    """`asymmetric` of the zone columns `cols` (float arrays by name, `rows` long)."""
    out = np.zeros(rows, dtype=bool)
    for k in ZONE_FIELDS[:4]:
        a, b = (np.nan_to_num(cols[f"z{s}_{k}"]) if f"z{s}_{k}" in cols else 0.0 for s in "ab")
        out |= np.asarray(a != b)
    return out


def interaction(
    sec,
    n_star,
    phi0=None,
    of: np.ndarray | None = None,
    m_star=None,
    *,
    std: Standard | None = None,
    at_n: bool = True,
    lam_only: bool = False,
    lazy: bool = False,
) -> dict[str, np.ndarray]:
    """Design moment capacity phi Mu at the design axial force N* [N], and the key points.

    Between pure bending and decompression (dn = D) the neutral axis is found so that
    phi N = N*, phi from the standard at each nominal point (AS 3600 Table 2.2.2 by Nu;
    ACI 318 Table 21.2.2 by the net tensile strain); above decompression phi Mu falls linearly
    to zero at phi0 times the squash load (AS Cl 10.6.2.2 Nuo, ACI 22.4.2.2 Po), and in tension
    linearly from pure bending to phi_t times the tension capacity, as AS 3600 practice
    interpolates (and the concreteproperties library does; for ACI a conservative chord). The
    design upper limit on N* (`top`) is the standard's: AS phi0 Nuo, the end of that line;
    ACI phi 0.80 Po (Table 22.4.2.1), which cuts the diagram flat below it.

    `sec` may hold each distinct section once and `of` give the section of each N*: the
    section's own points (squash, balance, pure bending) are then found once per section.

    With `m_star` [N mm] also the radial overload factor `lam` (see `radial`). Without `at_n`
    (the advice search, which reads `lam` alone) the neutral axis at phi N = N* is not solved:
    `dn`, `nu`, `mu`, `phi` and `phi_mu` are NaN, every other value the same (`radial` reads the
    section's own points only).

    With `lam_only` (the advice search's `check_pier_axial(util_only=True)`), `m_star` and `of`
    given: `radial`'s values alone (`lam` and the ray's), from the sections' own points taken
    by `of` (`radial(per_section=True)`), without the per-row copies of every section value and
    the fixed-N* diagram's columns nothing then reads; the same numbers as without it.

    With `lazy` (`check_pier_axial`), `of` given and `at_n`: the same values, those that are a
    section's own (the squash load, the balance and decompression points, ...) gathered to the
    rows when first read (`_Gathered`: the check's table reads a few of a dozen), the rows'
    own worked from the sections' values and products taken by `of` (`_at_n_by_position`)."""
    std = std or get_standard(DEFAULT_STANDARD)
    phi0 = std.phi_compression if phi0 is None else phi0
    n_star = np.asarray(n_star, dtype=float)
    if of is not None:  # the sections no N* reads are not worked out (the search reads half)
        used, of = _used(np.asarray(of))
        if len(used) < sec.D.size:
            sec = sec.take(used)
    D = sec.D
    As = sec.As
    nuo = std.squash_load(sec.fc, D * sec.b - As, As, sec.fsy)
    top = std.max_compression(sec.fc, D * sec.b - As, As, sec.fsy, phi0)
    nuot = std.tension_capacity(As, sec.fsy)
    d0 = sec.d0
    dn_b = d0 * sec.eps_cu / (sec.eps_cu + sec.fsy / sec.Es)
    nub, _ = nm.forces(sec, dn_b)
    dn0 = nm.solve_dn(sec, 0.0, 1e-6 * D, D)
    n_lo, m0 = nm.forces(sec, dn0)
    kuo = dn0 / d0
    nd, md = nm.forces(sec, D)
    # phi at the section's own points, once per section (phi is the standard's per-row formula
    # of the point, so the same numbers as worked out on every row); n_lo, phi_lo: the point at
    # dn0, where both solves below start (their first evaluation, per section)
    phi_sec = _phi_from(std, phi0, sec, d0, sec.fsy, nub, nuot, kuo)
    phi_d = phi_sec(nd, D)
    phi_b = phi_sec(np.zeros(D.shape), dn0)  # pure bending
    phi_lo = phi_sec(n_lo, dn0)
    fsy = sec.fsy
    if lam_only and of is not None and m_star is not None:
        own = dict(
            phi_b=phi_b, m0=m0, phi_d=phi_d, nd=nd, md=md, dn0=dn0, top=top,
            bottom=std.phi_tension * nuot, line_end=phi0 * nuo,
        )  # fmt: skip
        return radial(sec, n_star, m_star, own, phi_sec, (n_lo, phi_lo), of=of, per_section=True)
    if lazy and of is not None and at_n:
        own = dict(
            nuo=nuo, nuot=nuot, nub=nub, kuo=kuo, m0=m0, nd=nd, md=md, phi_d=phi_d, phi_b=phi_b, d0=d0,
            fsy=fsy, dn0=dn0, top=top, bottom=std.phi_tension * nuot, line_end=phi0 * nuo,
        )  # fmt: skip
        out = _at_n_by_position(sec, of, n_star, own, phi_sec, n_lo, phi_lo, D, phi0)
        if m_star is not None:
            out |= radial(sec, n_star, m_star, own, phi_sec, (n_lo, phi_lo), of=of, per_section=True)
        return out
    if of is not None:  # from here on, one row per N* (the solves take each row's section by `of`)
        D, nuo, top, nuot, nub, dn0, m0, kuo, nd, md, d0, phi_d, phi_b, n_lo, phi_lo, fsy = (
            v[of] for v in (D, nuo, top, nuot, nub, dn0, m0, kuo, nd, md, d0, phi_d, phi_b, n_lo, phi_lo, fsy)
        )
    phi_at = _phi_from(std, phi0, sec, d0, fsy, nub, nuot, kuo)  # (n, dn, rows): phi at nominal points
    # regular region: phi N = N*, N between 0 and decompression
    if at_n:
        target = np.clip(n_star, 0.0, phi_d * nd)
        ends = (n_lo * phi_lo - target, nd * phi_d - target)  # g at dn0 and at D, as the solver's
        dn = nm.solve_dn(sec, target, dn0, D, scale=phi_at, ends=ends, of=of)
        nu, mu = nm.forces_of(sec, of, dn)
        phi = phi_at(nu, dn)
    else:  # the one per-row solve `lam` does not read (half the search's N-M work)
        dn = nu = mu = phi = np.full(D.shape, np.nan)
    phi_mu = phi * np.abs(mu)
    line_end = phi0 * nuo  # the straight line above decompression ends here (AS: = top)
    above = n_star > phi_d * nd
    frac_up = np.clip((line_end - n_star) / np.maximum(line_end - phi_d * nd, 1e-9), 0.0, 1.0)
    phi_mu = np.where(above, phi_d * np.abs(md) * frac_up, phi_mu)
    tension = n_star < 0
    bottom = std.phi_tension * nuot
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
        phi_b=phi_b,
        d0=d0,
        fsy=np.broadcast_to(fsy, D.shape),
        dn=dn,
        dn0=dn0,
        nu=nu,
        mu=mu,
        phi=np.where(above, phi0, np.where(tension, phi_b, phi)),
        phi_mu=phi_mu,
        top=top,
        line_end=line_end,
        bottom=bottom,
        region=region,
    )
    if m_star is not None:
        out |= radial(sec, n_star, m_star, out, phi_at, (n_lo, phi_lo), of=of)
    return out


class _Gathered(dict):
    """`interaction`'s values per row (`lazy`): the rows' own given, each section's own
    (`sections`, by name) gathered to the rows by `of` the first time it is read."""

    def __init__(self, rows: dict[str, np.ndarray], sections: dict[str, np.ndarray], of: np.ndarray) -> None:
        super().__init__(rows)
        self._sections, self._of = sections, of

    def __missing__(self, key: str) -> np.ndarray:
        value = self[key] = self._sections[key][self._of]
        return value


def _at_n_by_position(sec, of, n_star, own: dict, phi_sec, n_lo, phi_lo, D, phi0) -> _Gathered:
    """`interaction`'s values at N* (`at_n`) for rows taking their sections by `of`, from the
    sections' own values `own` (and n_lo, phi_lo, D, per section): a product of two section
    values (phi Nd, phi |Md|, phi |Mo|, Nu phi at dn0) made once per section and gathered, the
    standard's phi (`phi_sec`, per section) read at each row's section, and the section values
    no expression here reads gathered only when the caller reads them (`_Gathered`). Each
    row's expressions are those of `interaction`, on the same numbers (a product of gathered
    values is the gathered product; IEEE products commute), so the same bits."""
    memo = nm.RowsMemo()

    def phi_at(n, dn, rows=None):  # the solver's rows (None: all) as their sections
        return phi_sec(n, dn, of if rows is None else memo("of", rows, lambda: of[rows]))

    top, bottom, line_end, phi_b, dn0 = (own[k][of] for k in ("top", "bottom", "line_end", "phi_b", "dn0"))
    phi_d, nd, md, m0 = own["phi_d"], own["nd"], own["md"], own["m0"]
    n1 = (phi_d * nd)[of]  # phi Nd: the decompression point's factored N
    target = np.clip(n_star, 0.0, n1)
    ends = ((n_lo * phi_lo)[of] - target, n1 - target)  # g at dn0 and at D, as the solver's
    dn = nm.solve_dn(sec, target, dn0, D[of], scale=phi_at, ends=ends, of=of)
    nu, mu = nm.forces_of(sec, of, dn)
    phi = phi_at(nu, dn)
    phi_mu = phi * np.abs(mu)
    above = n_star > n1
    frac_up = np.clip((line_end - n_star) / np.maximum(line_end - n1, 1e-9), 0.0, 1.0)
    phi_mu = np.where(above, (phi_d * np.abs(md))[of] * frac_up, phi_mu)
    tension = n_star < 0
    frac_down = np.clip(1.0 - n_star / np.where(bottom < 0, bottom, -1.0), 0.0, 1.0)
    phi_mu = np.where(tension, (own["phi_b"] * np.abs(m0))[of] * frac_down, phi_mu)
    region = np.where(
        n_star > top, 4, np.where(above, 3, np.where(tension, np.where(n_star < bottom, 5, 1), 2))
    )
    rows = dict(
        phi_b=phi_b, dn=dn, dn0=dn0, nu=nu, mu=mu, phi=np.where(above, phi0, np.where(tension, phi_b, phi)),
        phi_mu=phi_mu, top=top, line_end=line_end, bottom=bottom, region=region,
    )  # fmt: skip
    return _Gathered(rows, own, of)


def _phi_from(std: Standard, phi0, sec, d0, fsy, nub, nuot, kuo):
    """phi_at(n, dn, rows=None): the standard's phi at nominal points (n, dn) of the rows
    `rows` (None: all) of the arrays given (eps_cu and Es from `sec`); what it reads gathered
    once per `rows` array (the solvers pass one array until their active rows shrink).

    Where the standard gives phi as a function of Nu alone with the section's own terms
    worked out once (`phi_axial_bending_prepared`: AS 3600, half of whose arithmetic per
    point is the section's), that, on the rows' own Nu; the same numbers."""
    memo = nm.RowsMemo()
    own = (d0, fsy, nub, nuot, kuo)
    prepared = getattr(std, "phi_axial_bending_prepared", None)
    if prepared is not None and np.ndim(nub) == 1:
        state = SectionState(None, None, d0, fsy, nub, nuot, kuo, eps_cu=sec.eps_cu, Es=sec.Es)
        at = prepared(state, phi0)

        def phi_of_nu(n, dn, rows=None):
            n = np.asarray(n, dtype=float)
            if n.shape != (nub.shape if rows is None else rows.shape):  # not one per row: in general
                return phi_at(n, dn, rows)
            return at(n, rows)

    def phi_at(n, dn, rows=None):
        picked = own if rows is None else memo("own", rows, lambda: [v[rows] for v in own])
        d0_, fy, nub_, nuot_, kuo_ = picked
        state = SectionState(
            nu=n, dn=dn, d0=d0_, fy=fy, nub=nub_, nuot=nuot_, kuo=kuo_, eps_cu=sec.eps_cu, Es=sec.Es
        )
        return std.phi_axial_bending(state, phi0)

    return phi_of_nu if prepared is not None and np.ndim(nub) == 1 else phi_at


def _used(of: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """`np.unique(of, return_inverse=True)` (flattened): the sections read, ascending, and each
    row's place among them; by counting where `of` holds non-negative integers (a sort of
    every row before: 10 ms at the L tower's 360 000)."""
    if of.dtype.kind in "iu" and of.size and of.min() >= 0:
        seen = np.bincount(of.ravel())
        used = np.flatnonzero(seen)
        place = np.zeros(seen.size, dtype=np.intp)
        place[used] = np.arange(used.size)
        return used, place[of.ravel()]
    used, inverse = np.unique(of, return_inverse=True)
    return used, inverse.ravel()


SECTION_COLUMNS = ("Lw", "tw", "fc", "fsy", "v_dia", "v_spacing", "v_layers", "cover", *ZONE_COLUMNS)
"""The geometry columns a pier's section is built from (`rect_sections`, `asymmetric`)."""


def _oriented(
    df: pd.DataFrame, per: pd.DataFrame, std: Standard
) -> tuple[nm.EvenRect, np.ndarray, np.ndarray, np.ndarray]:
    """Each distinct section of the piers `per` (one geometry row each) twice: compressed at
    its start (rows 0..k-1) and at its end (rows k..2k-1); which piers are asymmetric; for each
    row of `df` whether M* compresses the end (M* >= 0, the sign convention of the actions
    sheets); and each pier's section among the k.

    Piers alike in every number their section is built from (`SECTION_COLUMNS`, as the floats
    the section reads, bit for bit) share one section: a tower repeats a few sections over
    its storeys (the L tower's 6 000 storey x pier rows hold 4), and the section's own points
    (squash, balance, pure bending: a solve each) are then found once per section. Each
    section's arithmetic reads its own row alone, so the same numbers as one per pier."""
    names = [c for c in SECTION_COLUMNS if c in per]
    # every column the sections read as floats in one array (one conversion of the table, not
    # one look-up per column: the advice search's variant tables are small and many)
    values = np.ascontiguousarray(per[names].to_numpy(dtype=float).T)
    kind = _kinds_of(values)
    one = first_rows(kind)
    cols = dict(zip(names, values[:, one] if len(one) < len(per) else values, strict=True))
    base = _sections_of(cols, len(one), std)
    sec = nm.concat(base, base.flipped())
    return sec, _asymmetric_of(cols, len(one))[kind], df.m.to_numpy(float) >= 0, kind


def _cases_once(
    ref: np.ndarray, *columns: np.ndarray, least: float = 0.0
) -> tuple[np.ndarray, np.ndarray] | None:
    """The cases worked out (positions, ascending) and each case's place among them, where a
    case whose `columns` (its section, N*, M*) equal bit for bit those of its storey x pier's
    first row (`ref`: that row's position, among the first rows) takes that row's answer:
    the check's numbers read the case's own section, N* and M* alone, so a case equal to
    another has its answers to the last bit. Only the first row is compared, not every
    case with every other (hashing 360 000 cases costs more than it saves where they all
    differ): the combinations of a storey x pier that repeat its first row's actions (the L
    tower's 60, each alike) cost one case.

    None where fewer than the fraction `least` of the cases equal their first row's, found as
    soon as one column shows it (the caller then works every case: the same answers, where
    the comparisons and the gathers to and from the cases would cost more than they save, as
    on a tower whose every combination has its own N* and M*); a column most cases differ in
    first finds it soonest."""
    same = np.ones(ref.shape, dtype=bool)
    need = least * ref.size
    for c in columns:
        c = np.asarray(c)
        if c.dtype.kind == "f":  # floats bit for bit: -0.0 and 0.0 apart, NaN equal to itself
            bits = np.ascontiguousarray(c).view(f"i{c.itemsize}")
        elif c.dtype.kind in "iub":
            bits = c
        else:  # objects (pd.NA has no == answer): pandas' equality, NA equal to NA
            bits = pd.factorize(c, use_na_sentinel=False)[0]
        same &= bits == bits[ref]
        if need and np.count_nonzero(same) < need:
            return None
    keep = ~same
    keep[ref] = True
    place = np.cumsum(keep) - 1
    return np.flatnonzero(keep), np.where(same, place[ref], place)


CASES_ONCE_LEAST = 1 / 8
"""`check_pier_axial` works out each case on its own where fewer than this fraction of them
repeat their storey x pier's first row (`_cases_once`)."""


class _Spread(dict):
    """`interaction`'s answers for each row, `at` giving each row's case: a value gathered the
    first time it is read (the working reads a dozen more than the numbers)."""

    def __init__(self, by_case: dict[str, np.ndarray], at: np.ndarray | None) -> None:
        super().__init__()
        self._by_case, self._at = by_case, at

    def __missing__(self, key: str) -> np.ndarray:  # `at` None: each row its own case
        value = self[key] = self._by_case[key] if self._at is None else self._by_case[key][self._at]
        return value


def _kinds_of(values: np.ndarray) -> np.ndarray:
    """Each pier's section as an integer, equal where every `SECTION_COLUMNS` value is the
    same bit for bit (`row_keys`), numbered in the order the piers first show them, from
    those columns' floats (columns x piers, C order); a column whose every value is the
    first's is not factorised (most are, in a tower: bars, cover, zones)."""
    varying = []
    for column in values:
        bits = column.view(np.int64)
        if len(bits) and (bits != bits[0]).any():
            varying.append(bits)
    return row_keys(*varying) if varying else np.zeros(values.shape[1], dtype=np.intp)


RAY_TENSION, RAY_CURVE, RAY_SQUASH, RAY_NONE, RAY_CAP = 1, 2, 3, 0, 4
RAY_TEXT = {
    RAY_TENSION: "tension side",
    RAY_CURVE: "strain compatibility",
    RAY_SQUASH: "near squash",
    RAY_NONE: "no actions",
    RAY_CAP: "axial upper limit",
}


def radial(
    sec,
    n_star,
    m_star,
    r: dict[str, np.ndarray],
    phi_at,
    at_dn0=None,
    of: np.ndarray | None = None,
    *,
    per_section: bool = False,
) -> dict[str, np.ndarray]:
    """Radial overload factor lambda: (N*, |M*|) / lambda lies on the factored interaction
    diagram along the ray from the origin, so lambda = 1.2 means 20 % over in tension and in
    compression alike (docs/engineering-basis.md, "Axial + bending utilisation").

    The factored diagram is the one `interaction` uses: on the tension side the straight line
    from (0, phi Muo) to (phi Nuot, 0); between pure bending and decompression the
    strain-compatibility points (phi Nu, phi Mu)(dn); from decompression the straight line to
    (phi0 Nuo, 0); cut flat at the standard's upper limit on N* where that lies below the
    line's end (ACI 318 phi 0.80 Po: lambda is then at least N*/top, the diagram being the
    uncut one intersected with N <= top). `r` is `interaction`'s per-row dict, `sec` one section
    per row, `phi_at(N, dn, rows)` the standard's phi, `at_dn0` (where given) Nu and phi at
    each row's dn0 (where the solve starts: its first evaluation without forces); with `of`,
    `sec` holds each section once and `of` gives each row's (no per-row copy); N, N mm.

    With `per_section` (and `of`), `r`, `at_dn0` and `phi_at` are `interaction`'s values per
    section, not per row (`interaction(lam_only=True)`, the advice search): each row reads its
    section's by `of`, and the products of a section's own values (phi Muo, the decompression
    point) are made once per section and then gathered; each is the same product of the same
    two numbers, so the same bits as the product of the gathered values."""
    n = np.asarray(n_star, dtype=float)
    m = np.abs(np.asarray(m_star, dtype=float))
    by_section = per_section and of is not None

    def each(v: np.ndarray) -> np.ndarray:  # a value of every row
        return v[of] if by_section else v

    phi_mo = each(r["phi_b"] * np.abs(r["m0"]))
    n1, m1 = each(r["phi_d"] * r["nd"]), each(r["phi_d"] * np.abs(r["md"]))
    bottom, line_end = each(r["bottom"]), each(r["line_end"])
    tension = n < 0
    squash = (n >= 0) & (m * n1 < n * m1)  # ray below the decompression point's
    curve = ~tension & ~squash
    lam = np.zeros(n.shape)
    where = RAY_CURVE * np.ones(n.shape, dtype=int)
    lam = np.where(tension, tension_side_utilisation(n, m, bottom, phi_mo), lam)
    lam = np.where(squash, ray_segment_utilisation(n, m, n1, m1, line_end, 0.0), lam)
    where = np.where(tension, RAY_TENSION, np.where(squash, RAY_SQUASH, where))
    dn_ray = np.full(n.shape, np.nan)
    nu_ray = np.full(n.shape, np.nan)
    mu_ray = np.full(n.shape, np.nan)
    phi_ray = np.full(n.shape, np.nan)
    rows = np.flatnonzero(curve & ((n > 0) | (m > 0)))
    if rows.size:
        part = sec.take(rows if of is None else of[rows])
        at = of[rows] if by_section else rows  # where the rows' values are in `r` and `phi_at`
        sub = nm.RowsMemo()  # one array of whole-table rows per array of the solver's rows

        def phi_of(v, x, k):
            return phi_at(v, x, at if k is None else sub("rows", k, lambda: at[k]))

        ends = None
        if at_dn0 is not None:  # g at dn0 and at D from the points the caller has
            n_lo, phi_lo = at_dn0
            a, b = m[rows], n[rows]
            ends = (
                nm.ray_g(phi_lo[at], n_lo[at], r["m0"][at], a, b),
                nm.ray_g(r["phi_d"][at], r["nd"][at], r["md"][at], a, b),
            )
        dn = nm.solve_ray(part, n[rows], m[rows], r["dn0"][at], part.D, phi_of, ends=ends)
        nu, mu = nm.forces(part, dn)
        phi = phi_at(nu, dn, at)
        dn_ray[rows], nu_ray[rows], mu_ray[rows], phi_ray[rows] = dn, nu, np.abs(mu), phi
        lam[rows] = (n[rows] + m[rows]) / (phi * (nu + np.abs(mu)))
    where = np.where((n == 0) & (m == 0), RAY_NONE, where)
    lam_diagram, ray_diagram = lam, where
    cut = r["line_end"] > r["top"]  # never for AS 3600 (its line ends at its upper limit)
    if cut.any():
        cut, top = each(cut), each(r["top"])
        with np.errstate(divide="ignore", invalid="ignore"):
            flat = np.where(cut & (n > 0), n / top, 0.0)
        where = np.where(flat > lam, RAY_CAP, where)
        lam = np.maximum(lam, flat)
    return dict(
        lam=lam,
        lam_diagram=lam_diagram,
        ray=where,
        ray_diagram=ray_diagram,
        dn_ray=dn_ray,
        nu_ray=nu_ray,
        mu_ray=mu_ray,
        phi_ray=phi_ray,
        phi_mo=phi_mo,
    )


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
    *,
    std: Standard | None = None,
    util_only: bool = False,
) -> pd.DataFrame:
    """In-plane axial force and bending of every pier row, kN and kNm (without `working`, the
    numbers only; without `text`, every column but the working text f_nm and f_s, which the
    same call on the rows written makes later: `compute --detail`). Column keys keep their
    first (AS 3600) names (`nuo` the squash load, AS Nuo or ACI Po); headers are neutral.

    `util_only` (the advice search, which reads util, util_s and hwe alone): those columns and
    the simplified method's, the same numbers, without the fixed-N* ratio and its solve
    (`interaction(at_n=False)`), nor the other columns of the N-M check."""
    std = std or get_standard(settings.standard)
    df, first, of, per, by_pier = _join(actions, piers, _geometry_columns(piers, util_only))
    groups = first if by_pier else None  # each row's geometry its group's first row's
    phi0 = settings.phi_compression if settings.phi_compression is not None else std.phi_compression
    if df.empty:
        return df
    sec, asym, end_compressed, kind = _oriented(df, per, std)
    n_star = df.n.to_numpy(float) * 1e3
    m_raw = df.m.to_numpy(float) * 1e6
    m_design = std.design_moment(m_raw, n_star, df.Lw.to_numpy(float))
    # M* > 0 compresses the pier's end (the flipped section, rows len(first) on); where the
    # minimum eccentricity sets |M*| the sense is open: both are run and the worse kept
    both = asym[of] & (m_design > np.abs(m_raw))
    rows = np.concatenate([np.arange(len(df)), np.flatnonzero(both)])
    sense = np.concatenate([end_compressed, ~end_compressed[both]])
    case_sec = kind[of[rows]] + sec.D.size // 2 * sense
    n_case, m_case = n_star[rows], m_design[rows]
    # each distinct case (section, N*, M*) worked out once (`_cases_once`) and spread to its rows
    # (N* first: where it differs in most cases, nothing else is compared)
    found = _cases_once(first[of[rows]], n_case, m_case, case_sec, least=CASES_ONCE_LEAST)
    keep, back = (None, None) if found is None else found

    def cases(v: np.ndarray) -> np.ndarray:
        return v if keep is None else v[keep]

    r = interaction(
        sec,
        cases(n_case),
        phi0,
        of=cases(case_sec),
        m_star=cases(m_case),
        std=std,
        at_n=not util_only,
        lam_only=util_only,
        lazy=True,
    )
    pick = np.arange(len(df))
    other = len(df) + np.arange(int(both.sum()))
    lam = r["lam"] if back is None else r["lam"][back]
    worse = lam[other] > lam[np.flatnonzero(both)]
    pick[np.flatnonzero(both)[worse]] = other[worse]
    # the result columns gathered in `new` and joined to the rows once (`_with_columns`)
    new: dict[str, object] = {}
    if util_only:
        new["util"] = lam[pick]
        return _simplified(
            df, settings, of, new, working=False, std=std, util_only=True, first=first, groups=groups
        )
    # each row's values, gathered when first read (none to gather where each row is its case)
    r = _Spread(r, (None if not both.any() else pick) if back is None else back[pick])
    # text columns taken from their few strings by code (`text_column`), not a string per row
    new["compressed"] = text_column(
        np.where(asym[of], np.where(sense[pick], 0, 1), 2), ["end", "start", "either"]
    )
    section_of = case_sec[pick]
    kn, knm = 1e-3, 1e-6
    n_kn = df.n.to_numpy(float)
    new["m_design"] = m_kn = m_design * knm
    new["m_min"] = np.maximum(n_star, 0.0) * std.min_eccentricity * df.Lw.to_numpy(float) * knm
    new["nuo"], new["nuot"], new["nub"] = r["nuo"] * kn, r["nuot"] * kn, r["nub"] * kn
    new["phi_nuo"], new["kuo"] = r["top"] * kn, r["kuo"]
    new["dn"] = np.where(r["region"] == 2, r["dn"], np.nan)
    new["phi_nuot"] = r["bottom"] * kn
    new["mu"] = np.where(r["region"] == 2, np.abs(r["mu"]) * knm, np.nan)
    new["phi"], new["phi_mu"] = r["phi"], r["phi_mu"] * knm
    new["as_total"] = sec.As[section_of]
    # the ratio at fixed N* (kept as a column: what earlier versions called the utilisation)
    beyond = np.isin(r["region"], (4, 5))  # axial capacity exceeded: the axial ratio tells
    with np.errstate(divide="ignore", invalid="ignore"):
        m_ratio = m_kn / new["phi_mu"]
        n_ratio = np.where(n_kn >= 0, n_kn / new["phi_nuo"], n_kn / new["phi_nuot"])
    m_ratio = np.where(beyond | (m_kn == 0), 0.0, m_ratio)
    new["u_fixed_n"] = np.maximum(m_ratio, n_ratio)
    lam = r["lam"]
    new["util"] = lam
    with np.errstate(divide="ignore", invalid="ignore"):
        new["n_ray"] = np.where(lam > 0, n_kn / lam, 0.0)
        new["m_ray"] = np.where(lam > 0, m_kn / lam, 0.0)
    new["status"] = status_column(lam)
    ray = r["ray"]
    # the same words looked up by code for the whole column (a Python step per row before)
    new["governs"] = text_column(ray, [RAY_TEXT.get(k, "") for k in range(max(RAY_TEXT) + 1)])
    sym = std.symbols
    new["clause"] = text_column(
        np.where(ray == RAY_TENSION, 0, np.where((ray == RAY_SQUASH) | (ray == RAY_CAP), 1, 2)),
        [sym["clause_tension"], sym["clause_squash"], sym["clause_curve"]],
    )
    if not working:
        return _simplified(df, settings, of, new, working, std, first=first, groups=groups)
    new["bars"] = text_column(of, bars.describe(per, std.bar_name))
    if not text:  # every column but the working text (made later for the rows written)
        return _simplified(df, settings, of, new, working=False, std=std, first=first, groups=groups)
    ray_state = SectionState(
        nu=r["nu_ray"], dn=r["dn_ray"], d0=r["d0"], fy=r["fsy"], nub=r["nub"], nuot=r["nuot"],
        kuo=r["kuo"], eps_cu=sec.eps_cu, Es=sec.Es,
    )  # fmt: skip
    phi_note = np.full(len(df), "", dtype=object)
    on_curve = np.flatnonzero(r["ray_diagram"] == RAY_CURVE)
    if on_curve.size:
        part = SectionState(
            *(np.asarray(getattr(ray_state, k))[on_curve]
              for k in ("nu", "dn", "d0", "fy", "nub", "nuot", "kuo")),
            eps_cu=ray_state.eps_cu, Es=ray_state.Es,
        )  # fmt: skip
        phi_note[on_curve] = std.phi_axial_bending_text(part)
    cols = plain(
        r["ray_diagram"],
        n_kn,
        df.m,
        df.Lw,
        new["m_min"],
        m_kn,
        r["dn_ray"],
        r["nu_ray"] * kn,
        r["mu_ray"] * knm,
        r["phi_ray"],
        phi_note,
        r["phi_b"],
        np.abs(r["m0"]) * knm,
        new["nuot"],
        new["phi_nuot"],
        r["phi_d"],
        r["nd"] * kn,
        np.abs(r["md"]) * knm,
        new["nuo"],
        r["line_end"] * kn,
        new["phi_nuo"],
        r["lam_diagram"],
        lam,
        new["phi_mu"],
        new["u_fixed_n"],
    )
    new["f_nm"] = [
        ("" if c == "either" else f"M* compresses the pier's {c} (its end zones differ); ")
        + _nm_text(*v, phi0, std)
        for c, *v in zip(pd.Series(new["compressed"]).tolist(), *cols, strict=True)
    ]
    return _simplified(df, settings, of, new, working, std, groups=groups)


def _with_columns(df: pd.DataFrame, new: dict) -> pd.DataFrame:
    """`df` with the columns of `new` set in their order, the table `df[key] = value` one by one
    gives (a column of that name already there takes the value in its place; the rest follow
    in order), joined at once: each insert copied its array (2 ms a column at the L tower's
    360 000 rows, 40 columns), and so does a table made of them unless told not to (the arrays
    are the check's own, made for these columns)."""
    for key in [k for k in new if k in df.columns]:
        df[key] = new.pop(key)
    if not new:
        return df
    return pd.concat([df, pd.DataFrame(new, index=df.index, copy=False)], axis=1)


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
    phi_note,
    phi_b,
    m0,
    nuot,
    phi_nuot,
    phi_d,
    nd,
    mdc,
    nuo,
    line_end,
    top,
    u_diagram,
    util,
    phi_mu,
    u_old,
    phi0,
    std,
) -> str:
    """Working of the radial utilisation with every number substituted (kN, kNm), in the
    standard's symbols (`Standard.symbols`)."""
    sym = std.symbols
    Nu, Mu, sq, ten = sym["Nu"], sym["Mu"], sym["squash"], sym["tension"]
    e_min = std.min_eccentricity
    if n > 0 and e_min > 0:
        head = (
            f"M* = max(|{num(m)}|, {e_min:g} x {lw:.0f} mm x {n:.1f} kN = {m_min:.1f}) = {md_:.1f} kNm "
            f"({sym['design_moment']}); "
        )
    else:
        head = f"M* = |{num(m)}| = {md_:.1f} kNm; "
    u_body = u_diagram if top < line_end else util
    if ray == RAY_TENSION:
        mo = phi_b * m0
        body = (
            f"tension side: line from (0, phi{Mu}o = {phi_b:.3f} x {m0:.1f} = {mo:.1f} kNm) to "
            f"(phi{ten} = {std.phi_tension:.2f} x {nuot:.1f} = {phi_nuot:.1f} kN, 0); "
            f"U = N*/phi{ten} + M*/phi{Mu}o = {n:.1f} / {phi_nuot:.1f} + {md_:.1f} / {mo:.1f} = {u_body:.3f}"
        )
    elif ray == RAY_SQUASH:
        n1, m1 = phi_d * nd, phi_d * mdc
        dN, dM = line_end - n1, -m1
        body = (
            f"ray below decompression (phi{Nu}, phi{Mu}) = "
            f"({phi_d:.3f} x {nd:.1f}, {phi_d:.3f} x {mdc:.1f}) = "
            f"({n1:.1f}, {m1:.1f}); line to (phi{sq} = {phi0:.2f} x {nuo:.1f} = {line_end:.1f} kN, 0); "
            f"U = (N* dM - M* dN) / (N1 dM - M1 dN) = ({n:.1f} x {dM:.1f} - {md_:.1f} x {dN:.1f}) / "
            f"({n1:.1f} x {dM:.1f} - {m1:.1f} x {dN:.1f}) = {u_body:.3f}"
        )
    elif ray == RAY_CURVE:
        pn, pm = phi * nu, phi * mu
        body = (
            f"ray meets the curve at dn = {dn:.0f} mm: {Nu} = {nu:.1f} kN, {Mu} = {mu:.1f} kNm, "
            f"phi = {phi:.3f} ({phi_note}) -> ({pn:.1f}, {pm:.1f}); "
            f"U = (N* + M*) / (phi{Nu} + phi{Mu}) = ({n:.1f} + {md_:.1f}) / ({pn:.1f} + {pm:.1f}) "
            f"= {u_body:.3f}"
        )
    else:
        body = "no actions: U = 0"
    if top < line_end and n > 0:  # the standard's upper limit on N* cuts the diagram flat
        body += (
            f"; {sym['top_working'].format(phi=phi0, squash=nuo, top=top)}: "
            f"U = max({u_body:.3f}, N*/{sym['top']} = {n:.1f} / {top:.1f} = {n / top:.3f}) = {util:.3f}"
        )
    cap, name = (top, sym["top"]) if n >= 0 else (phi_nuot, f"phi{ten}")
    return (
        f"{head}{body}; at fixed N*: max(M*/phi{Mu} = {md_:.1f} / {phi_mu:.1f}, "
        f"N*/{name} = {n:.1f} / {cap:.1f}) = {u_old:.3f}"
    )


def end_axial_per_length(n_star, m_star, Lw):
    """Largest and least design axial force per unit length of a wall with an in-plane moment,
    N*/Lw +- 6 |M*| / Lw^2 (linear elastic distribution along the wall: statics, the same for
    every standard), for the simplified method, which takes the force per unit length at the
    more compressed end. N, N mm, mm."""
    n = np.asarray(n_star, dtype=float)
    lw = np.asarray(Lw, dtype=float)
    bend = 6.0 * np.abs(np.asarray(m_star, dtype=float)) / lw**2
    return n / lw + bend, n / lw - bend


def _simplified_numbers(
    x: dict[str, np.ndarray], s: Settings, std: Standard, phi, k_hwe: tuple | None = None
) -> dict:
    """`_simplified`'s numbers of the rows `x` (its arrays by name): k, hwe, the given
    eccentricity, the capacity [kN], the end forces per length, the end stress, the reasons
    the method does not apply (row masks by name) and where it applies. `k_hwe`: k and hwe of
    the rows where the caller has them (worked out per pier: `_effective_height`)."""
    tw, Lw, Hc, n = x["tw"], x["Lw"], x["Hc"], x["n"]
    k, hwe = _effective_height(Hc, Lw, x["edges"], s, std) if k_hwe is None else k_hwe
    m_out = x["m_out"]
    e_given = np.where(n > 0, np.abs(np.nan_to_num(m_out)) / np.where(n > 0, n, 1.0) * 1e3, 0.0)
    cap = std.simplified_capacity(x["fc"], tw, Lw, hwe, e_given, phi) * 1e-3
    # in-plane moment considered: the design axial force per unit length at the pier's more
    # compressed end, N*/Lw + 6 M*/Lw^2 (M* with any least eccentricity is for the column check)
    hi, lo = end_axial_per_length(n * 1e3, x["m"] * 1e6, Lw)
    stress = hi / tw
    # each condition that rules the method out, as a row mask, by name
    fails = std.simplified_exclusions(n * 1e3, lo, tw, hwe, e_given, x["layers"], stress)
    applies = ~np.logical_or.reduce(list(fails.values()))
    return dict(
        k=k, hwe=hwe, e_given=e_given, cap=cap, hi=hi, lo=lo, stress=stress, fails=fails, applies=applies
    )


def _effective_height(Hc, Lw, edges, s: Settings, std: Standard) -> tuple[np.ndarray, np.ndarray]:
    """k and Hwe = k Hc of Cl 11.4 (ACI 318 Table 11.5.3.2): the pier's alone."""
    k = std.effective_height_factor(Hc, Lw, edges, s.ends_restrained == "yes")
    return k, k * Hc


def _simplified(
    df: pd.DataFrame,
    s: Settings,
    of: np.ndarray,
    new: dict,
    working: bool = True,
    std: Standard | None = None,
    util_only: bool = False,
    first: np.ndarray | None = None,
    groups: np.ndarray | None = None,
) -> pd.DataFrame:
    """The standard's simplified method for walls in compression per row (AS 3600 Cl 11.5,
    ACI 318 11.5.3), with its applicability evaluated row by row; `of` gives each row's
    storey x pier group (`per_pier`), `first` each group's first row; its columns follow those
    of `new` (`check_pier_axial`'s own, `_with_columns`). With `util_only` (`check_pier_axial`'s)
    the columns k, hwe and util_s alone (the same numbers; no text columns, which cost more
    than the sums on the advice search's rows).

    Without the working text, and given `first`, a row whose every value read equals its
    group's first row's bit for bit takes that row's numbers (`_cases_once`; each row's
    numbers read its own values alone), where at least half the rows do (the L tower's 60
    combinations of a pier: one); else every row is worked out.

    `groups` (each group's first row), where every row's geometry is its group's first row's
    (`_join`'s last value): k and Hwe, the pier's alone, are worked out once per group and
    gathered (each row's are the same operations on the same numbers), and only N*, M* and
    the out-of-plane M* are compared for `_cases_once` (the geometry equals by construction)."""
    std = std or get_standard(s.standard)
    phi = s.phi_simplified if s.phi_simplified is not None else std.phi_simplified
    x = dict(
        tw=df.tw.to_numpy(float),
        Lw=df.Lw.to_numpy(float),
        Hc=df.Hc.to_numpy(float),
        edges=df.supported_edges.to_numpy(),
        fc=df.fc.to_numpy(float),
        n=df.n.to_numpy(float),
        m=df.m.to_numpy(float),
        m_out=df.m_out.to_numpy(float) if "m_out" in df else np.zeros(len(df)),
        layers=df.v_layers.to_numpy(),
    )
    back = None
    group = None if groups is None else of  # each row's group, whose k and Hwe it takes
    if not working and first is not None:
        order = ("n", "m", *(key for key in x if key not in ("n", "m")))  # N*, M* first: most differ
        if groups is not None:  # the geometry is each group's: equal to its first row's
            order = ("n", "m", "m_out")
        found = _cases_once(first[of], *(x[key] for key in order), least=0.5)
        if found is not None and found[0].size * 2 <= len(df):  # else few repeat: every row on its own
            keep, back = found
            x = {key: v[keep] for key, v in x.items()}
            group = None if group is None else group[keep]
    k_hwe = None
    if groups is not None:
        hc, lw = (df[c].to_numpy(float)[groups] for c in ("Hc", "Lw"))
        k_g, hwe_g = _effective_height(hc, lw, df.supported_edges.to_numpy()[groups], s, std)
        k_hwe = (k_g[group], hwe_g[group])
    y = _simplified_numbers(x, s, std, phi, k_hwe)
    k, hwe, cap, hi, lo, applies = (y[key] for key in ("k", "hwe", "cap", "hi", "lo", "applies"))
    tw, Lw = x["tw"], x["Lw"]

    def rows(v: np.ndarray) -> np.ndarray:  # a number of each case as a number of each row
        return v if back is None else v[back]

    if util_only:
        new["k"], new["hwe"] = rows(k), rows(hwe)
        with np.errstate(divide="ignore", invalid="ignore"):
            new["util_s"] = rows(np.where(applies, hi * Lw * 1e-3 / np.where(cap > 0, cap, np.nan), np.nan))
        return _with_columns(df, new)
    e, ea = std.simplified_eccentricities(y["e_given"], tw, hwe)
    new["k"], new["hwe"], new["e"], new["ea"] = rows(k), rows(hwe), rows(e), rows(ea)
    new["slender"] = rows(hwe / tw)
    new["phi_s"] = phi
    new["phi_nu_s"] = rows(np.where(applies, cap, np.nan))
    n_end = hi * Lw * 1e-3  # end force per length over the whole length [kN]
    new["n_end"] = rows(n_end)
    new["n_end_lo"] = rows(lo * Lw * 1e-3)
    with np.errstate(divide="ignore", invalid="ignore"):
        util_s = np.where(applies, n_end / np.where(cap > 0, cap, np.nan), np.nan)
    new["util_s"] = rows(util_s)
    new["status_s"] = text_column(
        rows(np.where(applies, np.where(util_s <= 1.0, 0, 1), 2)), [PASS, FAIL, NOT_APPLICABLE]
    )
    new["clause_s"] = std.symbols["simplified_clause"]
    if not working:
        return _with_columns(df, new)
    Hc, n, layers, stress, fails = x["Hc"], x["n"], x["layers"], y["stress"], y["fails"]
    slender = hwe / tw
    reasons = [""] * len(df)
    for i in np.flatnonzero(~applies).tolist():
        why = []
        for name, mask in fails.items():
            if not mask[i]:
                continue
            if name == "end in tension":
                why.append(f"one end in tension under in-plane M* ({lo[i]:.0f} N/mm): designed as a column")
            elif name == "slender":
                why.append(f"Hwe/tw {slender[i]:.1f} > {std.simplified_slenderness_limit(layers[i]):.0f}")
            elif name == "stress":
                why.append(f"axial stress {stress[i]:.1f} MPa > 3 MPa with one layer")
            else:
                why.append(name)
        reasons[i] = "; ".join(why)
    new["why_s"] = reasons
    # the same for every combination of a pier unless e or the reason differs: made once each
    work = pd.DataFrame(dict(k=k, Hc=Hc, hwe=hwe, e=e, tw=tw, ea=ea, fc=df.fc, Lw=Lw, cap=cap, ok=applies))
    work["why"] = reasons
    # by `row_keys` (integer codes column by column; `once_per` factorised a MultiIndex with
    # the reasons' text in it: 30 ms at L's 6 000 rows written), floats bit for bit: every
    # row's text made from a row of the same numbers
    kinds = row_keys(of, e, applies, np.asarray(reasons, dtype=object))
    one = first_rows(kinds)
    text = np.asarray(std.simplified_text(work.take(one), phi), dtype=object)[kinds]
    new["f_s"] = [
        f"{t}; end: {nn:.1f} kN / {lw:.0f} + 6 x |{num(mm)}| kNm / {lw:.0f}^2 = {h:.1f} N/mm -> "
        f"{h:.1f} x {lw:.0f} = {ne:.1f} kN; U = {ne:.1f} / {c:.1f} = {u:.3f}"
        if ok
        else t
        for t, nn, mm, lw, h, ne, c, u, ok in zip(
            text.tolist(), *plain(n, df.m, Lw, hi, n_end, cap, util_s, applies), strict=True
        )
    ]
    return _with_columns(df, new)
