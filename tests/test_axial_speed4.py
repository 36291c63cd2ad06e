"""The pier N-M check's round-6 fast paths against the code they replace, bit for bit: the
forces of evenly spaced bars and the Illinois steps worked in place (`nm._forces_even`,
`nm._solve_block`), AS 3600's phi of Nu with the section's terms once
(`as3600.phi_axial_bending_at`), the sections built from one array of the section columns
(`axial._oriented`), and every case worked on its own where few repeat (`axial._cases_once`'s
`least`). Each test fails with its fast path broken (tried: a product's operands reordered
into another association, the Illinois halving applied on the wrong side, phi's comparison
gathered for an earlier rows array, a zone column left out of the sections' array, a case given the wrong
row's answer)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from demo_parts import same_frame
from test_axial_speed2 import _actions, _piers

from xlcore.checks import axial
from xlcore.checks.axial import check_pier_axial
from xlcore.codes import as3600, get_standard
from xlcore.mechanics import nm
from xlcore.model import Settings

KWS = [dict(), dict(text=False), dict(working=False, util_only=True)]


def _bits(a) -> np.ndarray:
    return np.ascontiguousarray(np.asarray(a, dtype=float)).view(np.int64)


def _forces_even_round5(sec: nm.EvenRect, dn: np.ndarray, moment: bool = True):
    """`nm._forces_even` as it was (round 5): a new array for every operation."""
    c = nm._even_consts(sec)
    depth = np.minimum(sec.gamma * dn, sec.D)
    conc_stress = c["conc_stress"]
    cc = conc_stress * depth * sec.b
    n = sec.count
    e, s = sec.edge, sec.step

    def upto(x, inclusive=True):
        q = (x - e) / s
        j = np.floor(q) + 1 if inclusive else np.ceil(q)
        return np.clip(j, 0, n)

    ja = upto(dn * c["ya"])
    jb = upto(dn * c["yb"])
    p1a, p1b = ja * (ja - 1), jb * (jb - 1)
    c0 = ja
    e0 = jb - ja
    sj = (p1b - p1a) / 2
    e0e = e0 * e
    e1 = e0e + s * sj
    t0 = n - jb
    k = sec.Es * sec.eps_cu / dn
    fy, area = sec.fsy, sec.bar_area
    ns = area * (fy * (c0 - t0) + k * (dn * e0 - e1))
    ms = None
    if moment:
        c1 = c0 * e + s * ((p1a - nm._P1_0) / 2)
        sjj = ((jb - 1) * jb * (2 * jb - 1) - (ja - 1) * ja * (2 * ja - 1)) / 6
        e2 = e0e * e + c["e2s"] * sj + c["ss"] * sjj
        t1 = t0 * e + s * ((c["p1n"] - p1b) / 2)
        h = c["h"]
        ms = area * (fy * (h * c0 - c1) - fy * (h * t0 - t1) + k * (dn * h * e0 - (dn + h) * e1 + e2))
    if sec.deduct:
        b0 = upto(depth, inclusive=False)
        ns = ns - conc_stress * area * b0
        if moment:
            b1 = b0 * e + s * ((b0 * (b0 - 1) - nm._P1_0) / 2)
            ms = ms - conc_stress * area * (h * b0 - b1)
    if sec.zd is not None and sec.zd.shape[1]:
        ns, ms = nm._add_zone_forces(sec, dn, depth, conc_stress, ns, ms)
    return cc + ns, (cc * (h - depth / 2) + ms if moment else None)


def _solve_block_round5(g, rows, a, b, ga, gb, tg, tx, out, iterations) -> None:
    """`nm._solve_block` as it was (round 5): `np.where` making every array anew."""
    held = np.arange(a.size) if rows is None else rows
    below = None
    live = None
    left = a.size
    for it in range(iterations):
        if left == 0:
            break
        mid = 0.5 * (a + b)
        if it % 3 == 2:
            x = mid
        else:
            with np.errstate(divide="ignore", invalid="ignore"):
                x = (a * gb - b * ga) / (gb - ga)
            x = np.where((x > a) & (x < b), x, mid)
        gx = g(x, rows)
        prev, below = below, gx < 0
        if prev is None:
            ga_next, gb_next = np.where(below, gx, ga), np.where(below, gb, gx)
        else:
            ga_next = np.where(below, gx, np.where(prev, ga, 0.5 * ga))
            gb_next = np.where(below, np.where(prev, 0.5 * gb, gb), gx)
        a, b = np.where(below, x, a), np.where(below, b, x)
        ga, gb = ga_next, gb_next
        done = (np.abs(gx) <= tg) | (b - a <= tx)
        if live is not None:
            done &= live
        if not done.any():
            continue
        out[held[done]] = x[done]
        live = ~done if live is None else live & ~done
        left = int(np.count_nonzero(live))
        if (a.size - left) * nm.REPACK <= a.size:
            continue
        rows = held = held[live]
        a, b, ga, gb, tg, tx, below = (v[live] for v in (a, b, ga, gb, tg, tx, below))
        live = None
    if left:
        mid = 0.5 * (a + b)
        out[held if live is None else held[live]] = mid if live is None else mid[live]


def _sections(p: pd.DataFrame, standard: str) -> nm.EvenRect:
    return axial.rect_sections(p, get_standard(standard))


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
@pytest.mark.parametrize("deduct", [True, False])
def test_forces_in_place_equal_the_expressions(standard, deduct):
    """N and M at depths across each section (inside, at and beyond the ends, bars on the
    limits of the strain zones), with end zones and without, bit for bit."""
    p = _piers()
    sec = _sections(p, standard)
    if not deduct:
        sec = nm.replace(sec, deduct=False)
    rng = np.random.default_rng(3)
    for dn in (
        rng.uniform(1e-6, 1.3, sec.D.size) * sec.D,
        sec.D.copy(),
        np.full(sec.D.size, 1e-6) * sec.D,
        sec.edge + 2 * sec.step,  # a bar position exactly
    ):
        for part in (sec, sec.flipped()):
            for moment in (True, False):
                got = nm._forces_even(nm.replace(part), dn, moment=moment)
                want = _forces_even_round5(nm.replace(part), dn, moment=moment)
                assert np.array_equal(_bits(got[0]), _bits(want[0]))
                if moment:
                    assert np.array_equal(_bits(got[1]), _bits(want[1]))
                else:
                    assert got[1] is None


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
@pytest.mark.parametrize("kw", KWS)
def test_check_equals_the_round5_solver_and_forces(monkeypatch, standard, kw):
    """The whole check (both solves, phi of either standard) with the in-place forces, steps
    and phi equals it with the round-5 ones, in blocks of 50 rows (packing again inside)."""
    p, s = _piers(), Settings(standard=standard)
    acts = _actions(p)
    monkeypatch.setattr(nm, "BLOCK", 50)
    fast = check_pier_axial(p, acts, s, **kw)
    monkeypatch.setattr(nm, "_solve_block", _solve_block_round5)
    monkeypatch.setattr(nm, "_forces_even", _forces_even_round5)
    monkeypatch.setattr(type(get_standard("AS 3600:2018")), "phi_axial_bending_prepared", None, raising=False)
    general = check_pier_axial(p, acts, s, **kw)
    same_frame(fast, general)


def test_solver_leaves_the_callers_arrays_alone():
    """Every row in one block (rows None): the brackets and g values given are not written."""
    sec = _sections(_piers(), "AS 3600:2018")
    lo, hi = 1e-6 * sec.D, sec.D.copy()
    glo, ghi = nm.axial_force(sec, lo) - 1e5, nm.axial_force(sec, hi) - 1e5
    keep = [v.copy() for v in (lo, hi, glo, ghi)]
    out = nm._illinois(lambda x, rows: nm.axial_force(sec if rows is None else sec.take(rows), x) - 1e5,
                       lo, hi, np.full(lo.shape, 1e5), sec.D, 60, ends=(glo, ghi))  # fmt: skip
    for v, k in zip((lo, hi, glo, ghi), keep, strict=True):
        assert np.array_equal(_bits(v), _bits(k))
    assert np.isfinite(out).all()


def test_phi_of_nu_equals_the_formula():
    """AS 3600 phi from the section's terms equals Table 2.2.2's function: compression above
    and below Nub (and at it), tension, zero, NaN, sections with Nub <= 0 and Nuot >= 0."""
    rng = np.random.default_rng(9)
    k = 400
    nub = rng.choice([-1e5, 0.0, 3e6, 7e6], k)
    nuot = rng.choice([-2e6, 0.0, 1e5], k)
    kuo = rng.uniform(0.0, 0.8, k)
    nu = np.concatenate([rng.uniform(-3e6, 1e7, k - 4), [0.0, -0.0, np.nan, 3e6]])
    nu[:20] = nub[:20]  # on Nub exactly
    for phi0 in (0.6, 0.65):
        want = as3600.phi_axial_bending(nu, nub, nuot, kuo, phi0)
        got = as3600.phi_axial_bending_at(nu, as3600.phi_axial_bending_terms(nub, nuot, kuo, phi0))
        assert np.array_equal(_bits(got), _bits(want))
        std = get_standard("AS 3600:2018")
        state = axial.SectionState(None, None, None, None, nub, nuot, kuo)
        at = std.phi_axial_bending_prepared(state, phi0)
        for rows in (np.flatnonzero(rng.random(k) < 0.5), np.flatnonzero(rng.random(k) < 0.3)):
            assert np.array_equal(_bits(at(nu[rows], rows)), _bits(want[rows]))  # each rows array its own
        assert np.array_equal(_bits(at(nu)), _bits(want))


def _oriented_round5(df, per, std):
    """`axial._oriented` as it was (round 5): each column looked up, sections from a table."""
    varying = []
    for c in axial.SECTION_COLUMNS:
        if c in per:
            bits = per[c].to_numpy(dtype=float).view(np.int64)
            if len(bits) and (bits != bits[0]).any():
                varying.append(bits)
    kind = axial.row_keys(*varying) if varying else np.zeros(len(per), dtype=np.intp)
    one = axial.first_rows(kind)
    distinct = per if len(one) == len(per) else per.take(one)
    base = axial.rect_sections(distinct, std)
    sec = nm.concat(base, base.flipped())
    return sec, axial.asymmetric(distinct)[kind], df.m.to_numpy(float) >= 0, kind


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
def test_sections_from_one_array_equal_the_table_lookups(standard):
    """Piers with integer columns, zones or none, NaN in the zone columns, a zero of either
    sign: the same sections (every field bit for bit), asymmetry and kinds."""
    std = get_standard(standard)
    p = _piers()
    p["v_layers"] = p.v_layers.astype(np.int64)
    p.loc[p.index[::5], "za_ties"] = np.nan
    p.loc[p.index[1::7], "cover"] = -0.0 + p.loc[p.index[1::7], "cover"]
    acts = _actions(p).dropna(subset=["n", "m"])
    for per in (p, p.drop(columns=[c for c in p if c.startswith(("za_", "zb_"))]), pd.concat([p, p])):
        got, want = axial._oriented(acts, per, std), _oriented_round5(acts, per, std)
        for f in ("D", "b", "fc", "fsy", "edge", "step", "count", "bar_area", "alpha2", "gamma", "zd", "zA"):
            a, b = getattr(got[0], f), getattr(want[0], f)
            assert (a is None) == (b is None), f
            if a is not None:
                assert np.array_equal(_bits(a), _bits(b)), f
        for a, b in zip(got[1:], want[1:], strict=True):
            assert np.array_equal(a, b)


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
@pytest.mark.parametrize("kw", KWS)
@pytest.mark.parametrize("least", [0.0, 1.0])
def test_every_case_on_its_own_equals_cases_once(monkeypatch, standard, kw, least):
    """With N* and M* different in every case (the check then works each case on its own) and
    with every case repeated (worked out once): the table of the check with `_cases_once`
    always sharing (least 0) equals it never sharing (least past 1)."""
    p, s = _piers(), Settings(standard=standard)
    acts = _actions(p).dropna(subset=["n", "m"])
    rng = np.random.default_rng(17)
    scale = rng.uniform(0.5, 1.5, (2, len(acts)))
    varied = acts.assign(n=acts.n * scale[0], m=acts.m * scale[1])
    repeated = pd.concat([acts.assign(combination=f"R{c}") for c in range(4)], ignore_index=True)
    for rows in (varied, repeated):
        monkeypatch.setattr(axial, "CASES_ONCE_LEAST", least)
        fast = check_pier_axial(p, rows, s, **kw)
        monkeypatch.setattr(axial, "CASES_ONCE_LEAST", 1.5)
        general = check_pier_axial(p, rows, s, **kw)
        same_frame(fast, general)


def test_cases_once_gives_up_where_few_repeat():
    """None as soon as fewer than `least` of the cases equal their first row; the sharing
    where enough do."""
    ref = np.repeat(np.arange(4), 5) * 5
    n = np.arange(20, dtype=float)
    assert axial._cases_once(ref, n, least=0.5) is None
    same = np.repeat(np.array([1.0, 2.0, 3.0, 4.0]), 5)
    keep, back = axial._cases_once(ref, same, n * 0.0, least=0.5)
    assert keep.tolist() == [0, 5, 10, 15] and back.tolist() == np.repeat(np.arange(4), 5).tolist()


@pytest.mark.parametrize("block", [7, 64, 10**6])
def test_solves_taking_sections_by_row_equal_sections_per_row(monkeypatch, block):
    """`interaction` with each distinct section once and `of` (the solves and the forces at the
    root take each block's sections by `of`: `nm.solve_dn(of=)`, `nm.forces_of`) equals it with
    a section per row, every value bit for bit, in blocks of 7, 64 and one block."""
    p = _piers()
    sec = _sections(p, "AS 3600:2018")
    rng = np.random.default_rng(23)
    of = rng.choice(np.arange(0, sec.D.size, 2), 300)
    n = rng.uniform(-2e6, 2e7, of.size)
    m = rng.uniform(0.0, 4e9, of.size)
    monkeypatch.setattr(nm, "BLOCK", block)
    part = axial.interaction(sec, n, of=of, m_star=m)
    whole = axial.interaction(sec.take(of), n, m_star=m)
    assert part.keys() == whole.keys()
    for k in whole:
        assert np.array_equal(_bits(part[k]), _bits(whole[k])), k
