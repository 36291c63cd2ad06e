"""The pier N-M check's round-4 fast paths against the code they replace, bit for bit:
`nm._forces_even` (each series bound's terms once, the section's own terms once) against the
range-by-range `_even_sums` form, and `nm._illinois` (active rows held packed, the callbacks'
gathers kept per rows array, the first evaluations handed in by the caller) against the solver
that gathered and scattered every array on every step. Each test fails with its fast path
broken (tried: a term's order changed in `_forces_even`, a packed array not packed with the
rest, the `ends` at dn0 taken from the wrong point, N alone summed in another order)."""

from __future__ import annotations

import dataclasses

import numpy as np
import pandas as pd
import pytest

from xlcore import demo, geometry
from xlcore.checks import axial, per_pier
from xlcore.checks.axial import check_pier_axial, rect_sections
from xlcore.codes import get_standard
from xlcore.mechanics import bars, nm
from xlcore.model import Opening, Settings, Storey, WallRun


def _forces_even_reference(
    sec: nm.EvenRect, dn: np.ndarray, moment: bool = True
) -> tuple[np.ndarray, np.ndarray]:
    """`nm._forces_even` as it was (round 3): `_even_sums` over each range; N and M always."""
    depth = np.minimum(sec.gamma * dn, sec.D)
    conc_stress = sec.alpha2 * sec.fc
    cc = conc_stress * depth * sec.b
    ey = sec.fsy / sec.Es
    n = sec.count

    def upto(x, inclusive=True):
        q = (x - sec.edge) / sec.step
        j = np.floor(q) + 1 if inclusive else np.ceil(q)
        return np.clip(j, 0, n)

    ja = upto(dn * (1 - ey / sec.eps_cu))
    jb = upto(dn * (1 + ey / sec.eps_cu))
    zero = np.zeros_like(ja)
    c0, c1, _ = nm._even_sums(sec, zero, ja)
    e0, e1, e2 = nm._even_sums(sec, ja, jb)
    t0, t1, _ = nm._even_sums(sec, jb, n)
    h = sec.D / 2
    k = sec.Es * sec.eps_cu / dn
    fy, area = sec.fsy, sec.bar_area
    ns = area * (fy * (c0 - t0) + k * (dn * e0 - e1))
    ms = area * (fy * (h * c0 - c1) - fy * (h * t0 - t1) + k * (dn * h * e0 - (dn + h) * e1 + e2))
    if sec.deduct:
        b0, b1, _ = nm._even_sums(sec, zero, upto(depth, inclusive=False))
        ns = ns - conc_stress * area * b0
        ms = ms - conc_stress * area * (h * b0 - b1)
    if sec.zd is not None and sec.zd.shape[1]:
        ns, ms = nm._add_zone_forces(sec, dn, depth, conc_stress, ns, ms)
    return cc + ns, cc * (h - depth / 2) + ms


def _illinois_reference(g, lo, hi, scale_g, D, iterations, ends=None) -> np.ndarray:
    """`nm._illinois` as it was (round 3): every array gathered from and scattered back to full
    length on every step, g evaluated at both ends itself (`ends` ignored)."""
    glo, ghi = g(lo, None), g(hi, None)
    tol_g = 1e-12 * (np.abs(glo) + np.abs(ghi) + scale_g)
    tol_x = 1e-12 * D
    out = 0.5 * (lo + hi)
    out = np.where(glo >= 0, lo, np.where(ghi <= 0, hi, out))
    active = np.flatnonzero((glo < 0) & (ghi > 0) & (hi - lo > tol_x))
    last = np.zeros(D.shape, dtype=np.int8)
    for it in range(iterations):
        if active.size == 0:
            break
        a, b, ga, gb = lo[active], hi[active], glo[active], ghi[active]
        mid = 0.5 * (a + b)
        with np.errstate(divide="ignore", invalid="ignore"):
            x = (a * gb - b * ga) / (gb - ga)
        bad = ~np.isfinite(x) | (x <= a) | (x >= b)
        x = mid if it % 3 == 2 else np.where(bad, mid, x)
        gx = g(x, None if active.size == D.size else active)
        below = gx < 0
        prev = last[active]
        lo[active] = np.where(below, x, a)
        hi[active] = np.where(below, b, x)
        glo[active] = np.where(below, gx, np.where(prev == -1, 0.5 * ga, ga))
        ghi[active] = np.where(below, np.where(prev == 1, 0.5 * gb, gb), gx)
        last[active] = np.where(below, 1, -1)
        out[active] = x
        done = (np.abs(gx) <= tol_g[active]) | (hi[active] - lo[active] <= tol_x[active])
        active = active[~done]
    if active.size:
        out[active] = 0.5 * (lo[active] + hi[active])
    return out


def _piers() -> pd.DataFrame:
    """The demo's piers with end zones of their own: some at both edges alike, some at one
    edge only or different at the two (asymmetric: both senses of M* run), some none."""
    st = [Storey(index=i, **s) for i, s in enumerate(demo.storeys())]
    runs = [WallRun(**w) for w in demo.walls()]
    p = geometry.derive(st, runs, [Opening(**o) for o in demo.openings()]).piers.copy()
    rng = np.random.default_rng(7)
    kind = rng.integers(0, 4, len(p))  # 0 none, 1 alike, 2 start only, 3 different
    layers = p.v_layers.to_numpy(float)
    for side, on in (("a", kind > 0), ("b", (kind == 1) | (kind == 3))):
        per_face = np.where(kind == 3, 2 + (side == "a"), 3)
        p[f"z{side}_n"] = np.where(on, per_face * layers, 0.0)
        p[f"z{side}_dia"] = np.where(on, np.where(side == "a", 28.0, 24.0), 0.0)
        p[f"z{side}_len"] = np.where(on, np.minimum(450.0, p.Lw.to_numpy(float) / 3), 0.0)
        p[f"z{side}_tie"] = np.where(on, 10.0, 0.0)
        p[f"z{side}_ties"] = np.where(on, 125.0, np.nan)
    return p


def _actions(p: pd.DataFrame) -> pd.DataFrame:
    """Per pier: tension beyond the tension capacity and within it, pure bending, the strain-
    compatibility range, above decompression and beyond squash, M* of both signs and zero,
    no actions at all, and a row without N* (dropped by the check)."""
    rng = np.random.default_rng(11)
    area = (p.Lw * p.tw).to_numpy(float)
    fc = p.fc.to_numpy(float)
    rows = []
    for c, (nf, mf) in enumerate(
        [(-0.2, 0.1), (-0.02, 0.3), (0.0, 0.5), (0.05, -0.2), (0.15, 0.05), (0.3, -0.01), (0.6, 0.02),
         (1.2, 0.0), (0.0, 0.0), (0.1, 0.25)]
    ):  # fmt: skip
        jitter = 1 + 0.1 * rng.standard_normal(len(p))
        n = nf * area * fc * 1e-3 * jitter  # kN
        m = mf * area * fc * p.Lw.to_numpy(float) * 1e-6 * jitter / 6  # kNm
        rows.append(
            pd.DataFrame(
                dict(
                    storey=p.storey,
                    pier_id=p.pier_id,
                    combination=f"C{c}",
                    n=n,
                    m=m,
                    m_out=0.5 * np.abs(m) * (c % 2),
                )
            )
        )
    acts = pd.concat(rows, ignore_index=True)
    acts.loc[acts.index[::97], "n"] = np.nan
    return acts.sample(frac=1.0, random_state=3).reset_index(drop=True)


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
def test_forces_equal_the_range_by_range_sums(standard):
    """Every nominal (N, M) the same to the bit, sign of zero included, from a sliver of the
    section in compression to beyond its depth; with and without bars displacing concrete."""
    sec = rect_sections(_piers(), get_standard(standard))
    sec = nm.concat(sec, sec.flipped())
    rng = np.random.default_rng(5)
    for frac in (1e-6, 0.01, 0.1, 0.3, 0.5, 0.8, 1.0, 1.4):
        dn = sec.D * frac * (1 + 0.05 * rng.random(sec.D.size))
        for deduct in (True, False):
            s = dataclasses.replace(sec, deduct=deduct)  # a fresh object: nothing cached on it
            got, want = nm.forces(s, dn), _forces_even_reference(s, dn)
            for a, b in zip(got, want, strict=True):
                assert np.array_equal(a.view(np.int64), b.view(np.int64))
            alone = nm.axial_force(dataclasses.replace(s), dn)  # N without the moment's sums
            assert np.array_equal(alone.view(np.int64), want[0].view(np.int64))


def _check(p, acts, s, **kw) -> pd.DataFrame:
    return check_pier_axial(p, acts, s, **kw)


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
@pytest.mark.parametrize("kw", [dict(), dict(working=False, util_only=True), dict(text=False)])
def test_check_equals_the_gather_every_step_solver(monkeypatch, standard, kw):
    """The whole check's table (every number and text) is the same with the packed solver and
    the first evaluations handed in as with the round-3 solver and forces; the case has rows
    in every region and ray, and asymmetric piers run in both senses."""
    p, s = _piers(), Settings(standard=standard)
    acts = _actions(p)
    fast = _check(p, acts, s, **kw)
    if "util_only" not in kw:
        assert set(fast.governs) >= {"tension side", "strain compatibility", "near squash", "no actions"}
    assert (fast.util > 1.0).any() and (fast.util <= 1.0).any()
    if not kw:
        assert set(fast.compressed) == {"start", "end", "either"}
    monkeypatch.setattr(nm, "_illinois", _illinois_reference)
    monkeypatch.setattr(nm, "_forces_even", _forces_even_reference)
    general = _check(p, acts, s, **kw)
    pd.testing.assert_frame_equal(fast, general, check_exact=True)
    for c in fast.columns:
        if fast[c].dtype.kind == "f":
            assert np.array_equal(fast[c].to_numpy().view(np.int64), general[c].to_numpy().view(np.int64)), c


def test_interaction_without_sections_gathered_equals_reference(monkeypatch):
    """`interaction` called as the report calls it (one section, `of` all zeros) and with no
    `of` at all: the same points as with the round-3 solver."""
    p = _piers()
    sec = rect_sections(p.iloc[[3]])
    n = np.linspace(-2e6, 2e7, 41)
    fast = [axial.interaction(sec, n, of=np.zeros(len(n), dtype=int), m_star=0.1 * n + 1e8)]
    many = rect_sections(p.iloc[:20])
    fast.append(axial.interaction(many, np.linspace(-1e6, 1e7, 20), m_star=np.full(20, 3e8)))
    monkeypatch.setattr(nm, "_illinois", _illinois_reference)
    monkeypatch.setattr(nm, "_forces_even", _forces_even_reference)
    general = [axial.interaction(sec, n, of=np.zeros(len(n), dtype=int), m_star=0.1 * n + 1e8)]
    general.append(axial.interaction(many, np.linspace(-1e6, 1e7, 20), m_star=np.full(20, 3e8)))
    for f, g in zip(fast, general, strict=True):
        assert f.keys() == g.keys()
        for k in f:
            assert np.array_equal(np.asarray(f[k]), np.asarray(g[k]), equal_nan=True), k


def test_rows_memo_keeps_one_gather_per_rows_array():
    """The memo makes a gather once per rows array and again for a new array (even an equal one)."""
    memo, made = nm.RowsMemo(), []
    rows = np.array([0, 2])

    def make():
        made.append(1)
        return np.array([1.0, 3.0])[[0, 1]]

    assert memo("x", rows, make) is memo("x", rows, make)
    assert len(made) == 1
    memo("x", rows.copy(), make)
    assert len(made) == 2


def _joined_reference(actions: pd.DataFrame, geometry: pd.DataFrame) -> pd.DataFrame:
    """The join as it was: every action row merged, then the rows without N* or M* dropped."""
    df = actions.merge(geometry, on=["storey", "pier_id"], how="left")
    return df[df.n.notna() & df.m.notna()].reset_index(drop=True)


def test_join_by_first_rows_equals_the_merge():
    """The geometry looked up per storey x pier and spread by position: the same table (values,
    dtypes, index) as the merge of every row, `per_pier`'s groups, and each group's geometry
    as its first row's; also where a pier has no geometry row (NaN), a pier is listed twice in
    the geometry, a column is on both sides, or no row is left."""
    p = _piers()
    cols = axial._geometry_columns(p, False)
    acts = _actions(p)
    cases = [(acts, p)]
    cases.append((acts.assign(pier_id=acts.pier_id.where(acts.index % 13 != 0, "nowhere")), p))
    cases.append((acts, pd.concat([p, p.iloc[[5]]], ignore_index=True)))
    cases.append((acts.assign(Lw=1.0), p))
    cases.append((acts.assign(n=np.nan), p))
    cases.append((acts.dropna(subset=["n", "m"]).iloc[::-1], p))  # every row kept, index not 0..n-1
    extra = [c for c in cols if c not in ("storey", "pier_id")]
    for a, g in cases:
        df, first, of, per = axial._joined(a, g, cols)
        want = _joined_reference(a, g[cols])
        pd.testing.assert_frame_equal(df, want, check_exact=True)
        if len(want):
            f2, o2 = per_pier(want)
            assert np.array_equal(first, f2) and np.array_equal(of, o2)
            own = want.iloc[first][[c for c in extra if c in want]].reset_index(drop=True)
            pd.testing.assert_frame_equal(per, own, check_exact=True)


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
def test_text_columns_equal_the_strings_per_row(standard):
    """The status, sense, governing and clause columns taken from their few strings by code:
    the strings (and column type) the per-row expressions gave."""
    p, s = _piers(), Settings(standard=standard)
    df = check_pier_axial(p, _actions(p), s, text=False)
    std = get_standard(standard)
    sym = std.symbols
    util, util_s = df.util.to_numpy(), df.util_s.to_numpy()
    want = {
        "status": np.where(util <= 1.0, "pass", "FAIL"),
        "status_s": np.where(df.phi_nu_s.notna(), np.where(util_s <= 1.0, "pass", "FAIL"), "n/a"),
        "clause": np.select(
            [df.governs == "tension side", df.governs.isin(["near squash", "axial upper limit"])],
            [sym["clause_tension"], sym["clause_squash"]],
            sym["clause_curve"],
        ),
    }
    for col, w in want.items():
        pd.testing.assert_series_equal(df[col], pd.Series(w, name=col), check_exact=True)
    asym = axial.asymmetric(df)
    assert set(df.compressed[~asym]) == {"either"} and set(df.compressed[asym]) == {"start", "end"}
    assert set(df.governs) <= set(axial.RAY_TEXT.values()) and df.governs.dtype == df.status.dtype
    keys = pd.MultiIndex.from_frame(df[["storey", "pier_id"]])
    texts = bars.describe(p.set_index(["storey", "pier_id"]).loc[keys].reset_index(), std.bar_name)
    assert df.bars.tolist() == texts


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
def test_bar_words_with_names_once_each_equal_a_name_per_call(monkeypatch, standard):
    """`bars.describe` naming each distinct bar once: the same words as naming on every call,
    for piers with and without end zones (ties named too), and really fewer calls."""
    p, std = _piers(), get_standard(standard)
    calls = []

    def counted(*args):
        calls.append(args)
        return std.bar_name(*args)

    fast = bars.describe(p, counted)
    assert 0 < len(calls) < len(p)
    monkeypatch.setattr(bars, "_once_each", lambda name: name)
    assert fast == bars.describe(p, std.bar_name)
    assert any("ties" in t for t in fast) and any("no end zones" in t for t in fast)


def test_solver_on_edge_cases_equals_the_gather_every_step_solver():
    """The packed solver against the round-3 one on rows made to reach every branch: a false
    position that lands on the bracket's end (g tiny at lo), one that is NaN (g infinite at
    hi), a step function (the Illinois halving), roots at an end, outside the bracket, and
    rows stopping at different steps."""
    rng = np.random.default_rng(3)
    k = 420
    root = rng.uniform(0.05, 0.95, k)
    kind = np.arange(k) % 7
    lo, hi = np.zeros(k), np.ones(k)
    lo[kind == 3] = 0.01  # g tiny at lo: the false position is lo itself
    lo[kind == 4] = root[kind == 4]  # the root at the lower end
    hi[kind == 5] = 0.5 * root[kind == 5]  # the root beyond the bracket

    def g_of(x, rows):
        r, kd = (root, kind) if rows is None else (root[rows], kind[rows])
        with np.errstate(over="ignore"):
            out = np.where(kd == 0, (x - r) ** 3, x - r)
            out = np.where(kd == 1, np.where(x > r, 1e300 * 1e10, -1e-300), out)  # inf above, tiny below
            out = np.where(kd == 2, np.sign(x - r) * (1 + x), out)  # a step: regula falsi stalls
            out = np.where(kd == 3, np.where(x < r, -1e-300, 1e6 * (x - r)), out)
            out = np.where(kd == 6, np.where(x > r, 1e-300, 1e6 * (x - r)), out)  # at hi: hi itself
        return out

    for it in (3, 8, 60):
        want = _illinois_reference(g_of, lo.copy(), hi.copy(), np.zeros(k), np.ones(k), it)
        got = nm._illinois(g_of, lo.copy(), hi.copy(), np.zeros(k), np.ones(k), it)
        assert np.array_equal(got.view(np.int64), want.view(np.int64))


def test_used_sections_by_counting_equal_unique():
    """The sections read and each row's place among them, by counting: `np.unique`'s answer
    (values and places) for non-negative integers, with gaps and repeats; its own for others."""
    rng = np.random.default_rng(9)
    for of in (
        rng.integers(0, 50, 300) * 3,
        np.array([4]),
        np.array([0, 0]),
        np.array([2, -1, 2]),
        np.array([1.0, 0.0]),
    ):
        used, place = axial._used(of)
        want, inverse = np.unique(of, return_inverse=True)
        assert np.array_equal(used, want) and np.array_equal(place, inverse.ravel())


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
def test_util_only_equals_the_full_check(standard):
    """The advice search's call (`util_only`: no solve at N*, the ray's rows taking their
    sections from one per pier) gives the full check's util, util_s and hwe to the bit."""
    p, s = _piers(), Settings(standard=standard)
    acts = _actions(p)
    full = check_pier_axial(p, acts, s, text=False)
    quick = check_pier_axial(p, acts, s, working=False, util_only=True)
    for c in ("util", "util_s", "hwe"):
        assert np.array_equal(quick[c].to_numpy().view(np.int64), full[c].to_numpy().view(np.int64)), c
