"""The pier N-M check's round-5 fast paths against the code they replace, bit for bit: each
distinct pier section built once (`axial._oriented`: piers alike share one), each case whose
section, N* and M* repeat its storey x pier's first row's worked out once (`axial._cases_once`),
the result columns joined at once (`axial._with_columns`), and the solver working in blocks of
rows (`nm.BLOCK`) and packing its rows again only once enough have finished (`nm.REPACK`). Each test
fails with its fast path broken (tried: a section column left out of the key, M* left out of
the cases' comparison, a case given its own place instead of its first row's, the rows that
finished written again on a later step)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from test_axial_speed2 import _actions, _illinois_reference, _piers

from xlcore.checks import axial
from xlcore.checks.axial import check_pier_axial
from xlcore.mechanics import nm
from xlcore.model import Settings

KWS = [dict(), dict(text=False), dict(working=False, util_only=True)]


def _repeated(acts: pd.DataFrame) -> pd.DataFrame:
    """The actions with cases that repeat: every storey x pier's actions again under 20 more
    combinations, each the first row's actions (the same cases: more than half the rows), and
    in three of them the first row's N* with another M*, the sign of a zero or another
    out-of-plane moment (cases that differ only there)."""
    acts = acts.dropna(subset=["n", "m"])
    first = acts.groupby(["storey", "pier_id"], sort=False).head(1)
    more = []
    for c in range(20):
        rows = first.assign(combination=f"R{c}")
        if c == 3:
            rows = rows.assign(m=rows.m * 1.5 + 1.0)
        if c == 5:  # the out-of-plane moment alone changed: the simplified method's case differs
            rows = rows.assign(m_out=rows.m_out + 7.0)
        if c == 4:
            rows = rows.assign(m=np.where(rows.m == 0, -0.0, rows.m), n=np.where(rows.n == 0, -0.0, rows.n))
        more.append(rows)
    out = pd.concat([acts, *more], ignore_index=True)
    zero = out.index[::17]
    out.loc[zero, ["n", "m"]] = 0.0  # some storey x pier's first rows at (0, 0), the R4 copies at -0.0
    return out


def _same(fast: pd.DataFrame, general: pd.DataFrame) -> None:
    pd.testing.assert_frame_equal(fast, general, check_exact=True)
    for c in fast.columns:
        if fast[c].dtype.kind == "f":
            assert np.array_equal(fast[c].to_numpy().view(np.int64), general[c].to_numpy().view(np.int64)), c


def _every_case(ref: np.ndarray, *columns: np.ndarray, least: float = 0.0) -> tuple[np.ndarray, np.ndarray]:
    """`_cases_once` without sharing: every case worked out on its own."""
    return np.arange(ref.size), np.arange(ref.size)


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
@pytest.mark.parametrize("kw", KWS)
def test_cases_once_equal_every_case_on_its_own(monkeypatch, standard, kw):
    """The table (every number and text) with repeated cases worked out once (the N-M check's
    and the simplified method's) equals the table with every case worked out, where many cases
    repeat, some differ from their first row in M* alone or in the sign of a zero, and
    asymmetric piers run in both senses."""
    p, s = _piers(), Settings(standard=standard)
    acts = _repeated(_actions(p))
    seen = []

    def counted(ref, *columns, least=0.0):  # (`least`, round 6: here they repeat)
        keep, back = axial_cases_once(ref, *columns, least=least)
        seen.append((ref.size, keep.size))
        return keep, back

    axial_cases_once = axial._cases_once
    monkeypatch.setattr(axial, "_cases_once", counted)
    fast = check_pier_axial(p, acts, s, **kw)
    assert seen and seen[0][1] < 0.8 * seen[0][0]  # really fewer cases
    if "text" in kw or "util_only" in kw:  # the simplified method's too (not with its working)
        assert len(seen) == 2 and 2 * seen[1][1] <= seen[1][0]
    monkeypatch.setattr(axial, "_cases_once", _every_case)
    _same(fast, check_pier_axial(p, acts, s, **kw))


def test_cases_once_keeps_apart_what_differs():
    """Cases equal bit for bit to their first row's share its place; -0.0 and 0.0, NaN and
    another value, another section each keep a place of their own."""
    ref = np.array([0, 0, 0, 0, 0, 5, 5, 5])
    sec = np.array([1, 1, 2, 1, 1, 3, 3, 3])
    n = np.array([1.0, 1.0, 1.0, -0.0, 1.0, 0.0, -0.0, 0.0])
    m = np.array([2.0, 2.0, 2.0, 2.0, np.nan, np.nan, np.nan, np.nan])
    keep, back = axial._cases_once(ref, sec, n, m)
    assert keep.tolist() == [0, 2, 3, 4, 5, 6] and back.tolist() == [0, 0, 1, 2, 3, 4, 5, 4]
    for col in (sec, n, m):  # each row's case has the row's own values, bit for bit
        bits = col.view(np.int64) if col.dtype.kind == "f" else col
        assert np.array_equal(bits[keep][back], bits)


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
@pytest.mark.parametrize("kw", KWS)
def test_sections_once_equal_one_section_per_pier(monkeypatch, standard, kw):
    """The table with piers alike sharing one section equals the table with a section per
    pier (with and without end zones; some piers differ from another in f'c alone); and, the
    same keys (`row_keys`) being the simplified method's, its working text made once per
    distinct set of numbers equals the text of every row made on its own."""
    p, s = _piers(), Settings(standard=standard)
    p.loc[p.index[::3], "fc"] = 65.0
    acts = _actions(p)
    fast = check_pier_axial(p, acts, s, **kw)
    monkeypatch.setattr(axial, "row_keys", lambda *columns: np.arange(len(columns[0])))
    monkeypatch.setattr(axial, "first_rows", lambda codes: np.arange(len(codes)))
    _same(fast, check_pier_axial(p, acts, s, **kw))


def test_sections_once_are_fewer_and_differ_in_every_column():
    """Piers share a section only where every section column is the same: changing any one
    column of one pier gives it a section of its own."""
    p = _piers()
    df = p[["storey", "pier_id"]].assign(m=1.0)
    sec, asym, _, kind = axial._oriented(df, p, axial.get_standard("AS 3600:2018"))
    assert sec.D.size // 2 == len(np.unique(kind)) < len(p)
    cols = ["Lw", "tw", "fc", "fsy", "v_dia", "v_spacing", "v_layers", "cover"]
    cols += [f"z{side}_{k}" for side in "ab" for k in ("n", "dia", "len", "tie")]
    twin = int(np.flatnonzero(np.bincount(kind) > 1)[0])
    i = int(np.flatnonzero(kind == twin)[0])
    for c in cols:
        q = p.copy()
        q.loc[q.index[i], c] = np.nan_to_num(q[c].iloc[i]) + 1.0
        _, _, _, k2 = axial._oriented(df, q, axial.get_standard("AS 3600:2018"))
        assert len(np.unique(k2)) == len(np.unique(kind)) + 1, c


@pytest.mark.parametrize("block", [10**9, 64, 7])
@pytest.mark.parametrize("repack", [1, 2, 8, 1e9])
def test_solver_packing_again_late_equals_the_gather_every_step_solver(monkeypatch, repack, block):
    """The solver holding finished rows until more than 1 / REPACK of those held have
    finished (1: never packed again; 1e9: at every finish, as before), one block of rows or
    blocks of 64 or 7 rows, finds the roots of the round-3 solver on rows that finish at
    different steps and reach every branch."""
    monkeypatch.setattr(nm, "REPACK", repack)
    monkeypatch.setattr(nm, "BLOCK", block)
    rng = np.random.default_rng(3)
    k = 420
    root = rng.uniform(0.05, 0.95, k)
    kind = np.arange(k) % 7
    lo, hi = np.zeros(k), np.ones(k)
    lo[kind == 3] = 0.01
    lo[kind == 4] = root[kind == 4]
    hi[kind == 5] = 0.5 * root[kind == 5]

    def g_of(x, rows):
        r, kd = (root, kind) if rows is None else (root[rows], kind[rows])
        with np.errstate(over="ignore"):
            out = np.where(kd == 0, (x - r) ** 3, x - r)
            out = np.where(kd == 1, np.where(x > r, 1e300 * 1e10, -1e-300), out)
            out = np.where(kd == 2, np.sign(x - r) * (1 + x), out)
            out = np.where(kd == 3, np.where(x < r, -1e-300, 1e6 * (x - r)), out)
            out = np.where(kd == 6, np.where(x > r, 1e-300, 1e6 * (x - r)), out)
        return out

    for it in (3, 8, 60):
        want = _illinois_reference(g_of, lo.copy(), hi.copy(), np.zeros(k), np.ones(k), it)
        got = nm._illinois(g_of, lo.copy(), hi.copy(), np.zeros(k), np.ones(k), it)
        assert np.array_equal(got.view(np.int64), want.view(np.int64))


def _one_by_one(df: pd.DataFrame, new: dict) -> pd.DataFrame:
    """`_with_columns` as the check did it before: `df[key] = value` for each in order."""
    for key, value in new.items():
        df[key] = value
    return df


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
@pytest.mark.parametrize("kw", KWS)
def test_columns_joined_at_once_equal_set_one_by_one(monkeypatch, standard, kw):
    """The check's table with its result columns joined at once: the same table (order, values,
    column types) as with each set in turn, where the actions carry a column of a result's name
    (`k`, the sharing factor, which the simplified method's k replaces in its place)."""
    p, s = _piers(), Settings(standard=standard)
    acts = _actions(p).assign(k=0.5)
    fast = check_pier_axial(p, acts, s, **kw)
    assert list(fast.columns).count("k") == 1 and not (fast.k == 0.5).all()
    monkeypatch.setattr(axial, "_with_columns", _one_by_one)
    general = check_pier_axial(p, acts, s, **kw)
    _same(fast, general)
    assert fast.dtypes.equals(general.dtypes)


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
@pytest.mark.parametrize("kw", KWS)
def test_check_in_solver_blocks_equals_the_gather_every_step_solver(monkeypatch, standard, kw):
    """The whole check's table with the solver working in blocks of 50 rows (the check's
    1 640 cases: many blocks, the last one short) equals the table with the round-3 solver."""
    p, s = _piers(), Settings(standard=standard)
    acts = _actions(p)
    monkeypatch.setattr(nm, "BLOCK", 50)
    fast = check_pier_axial(p, acts, s, **kw)
    monkeypatch.setattr(nm, "_illinois", _illinois_reference)
    _same(fast, check_pier_axial(p, acts, s, **kw))


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
def test_bar_words_once_per_distinct_pier_equal_row_by_row(standard):
    """`bars.describe` wording each distinct set of the values it reads once: the words of every
    pier worded on its own, where piers repeat over storeys and some differ from another in an
    edge's name alone, in the zone's tie spacing alone, or have no edge name."""
    from xlcore.codes import get_standard
    from xlcore.mechanics import bars

    p = pd.concat([_piers()] * 3, ignore_index=True)
    p.loc[p.index[::5], "edge_a"] = "opening 9 far"
    p.loc[p.index[::7], "za_ties"] = 150.0
    p.loc[p.index[::11], "edge_b"] = np.nan
    name = get_standard(standard).bar_name
    fast = bars.describe(p, name)
    assert len(set(fast)) < len(p) // 3
    assert fast == bars._describe(p, name)
    assert bars.describe(p.iloc[:1], name) == bars._describe(p.iloc[:1], name)
    assert bars.describe(p.iloc[:0], name) == []


def test_cases_once_with_object_and_narrow_columns():
    """Object columns (pd.NA among them) compared by pandas' equality, float32 bit for bit."""
    ref = np.array([0, 0, 0, 0])
    obj = np.array([2, 2, pd.NA, 2], dtype=object)
    narrow = np.array([1.0, 1.0, 1.0, -0.0], dtype=np.float32)
    keep, back = axial._cases_once(ref, obj, narrow)
    assert keep.tolist() == [0, 2, 3] and back.tolist() == [0, 0, 1, 2]
