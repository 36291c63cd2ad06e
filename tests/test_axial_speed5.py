"""The pier N-M check's round-7 fast paths against the code they replace, bit for bit: the
advice search's radial utilisation from each section's own values taken by position
(`interaction(lam_only=True)`, `radial(per_section=True)`) instead of per-row copies of every
section value, the checks' values at N* likewise with the section values gathered when read
(`interaction(lazy=True)`), and Cl 11.4's k and Hwe once per pier in the simplified method
(`_simplified(groups=...)`, whose repeated-case search then compares N*, M* and the
out-of-plane M* alone). Each test fails with its fast path broken (tried: the ray solve's
rows looked up among the rows instead of their sections, a section value not gathered to
the rows, k taken from the wrong pier's row, the group of each kept case left out, the
out-of-plane M* left out of the cases' comparison, the solver's rows given to phi as
sections, a product of the wrong section values, a section value read without its gather)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from demo_parts import same_frame
from test_axial_speed2 import _actions, _piers
from test_axial_speed3 import _repeated

from xlcore.checks import axial
from xlcore.checks.axial import check_pier_axial, interaction, rect_sections
from xlcore.codes import get_standard
from xlcore.model import Settings

STANDARDS = ["AS 3600:2018", "ACI 318-19"]
KWS = [dict(), dict(text=False), dict(working=False), dict(working=False, util_only=True)]
RADIAL = ("lam", "lam_diagram", "ray", "ray_diagram", "dn_ray", "nu_ray", "mu_ray", "phi_ray", "phi_mo")


def _bits(a) -> np.ndarray:
    a = np.asarray(a)
    return np.ascontiguousarray(a).view(np.int64) if a.dtype.kind == "f" else a


def _rays(standard: str, rows: int = 3000):
    """Sections of the demo's piers (end zones, asymmetric ones flipped too), each read by
    many rows in shuffled order, and N*, M* over every part of the diagram: tension beyond
    and within the tension capacity, pure bending, the curve, near squash, beyond the upper
    limit (ACI's cut), M* = 0 and the origin."""
    std = get_standard(standard)
    p = _piers()
    base = rect_sections(p, std)
    sec = axial.nm.concat(base, base.flipped())
    rng = np.random.default_rng(3)
    of = rng.integers(0, sec.D.size, rows)
    squash = std.squash_load(sec.fc, sec.D * sec.b - sec.As, sec.As, sec.fsy)[of]
    n = squash * rng.uniform(-0.3, 1.1, rows)
    m = squash * sec.D[of] * rng.uniform(0.0, 0.3, rows)
    n[::50], m[::50] = 0.0, 0.0
    m[1::50] = 0.0
    n[2::50] = 0.0
    return sec, of, n, m, std


@pytest.mark.parametrize("standard", STANDARDS)
def test_radial_from_section_values_equals_the_per_row_copies(standard):
    """`interaction(lam_only=True)` (sections' values by `of`) gives every value of `radial`
    the full interaction gives (values per row), bit for bit, in every ray region."""
    sec, of, n, m, std = _rays(standard)
    full = interaction(sec, n, of=of, m_star=m, std=std, at_n=False)
    fast = interaction(sec, n, of=of, m_star=m, std=std, at_n=False, lam_only=True)
    assert set(fast) == set(RADIAL)  # the fast path: the fixed-N* columns not made
    rays = set(full["ray"].tolist())
    assert {axial.RAY_TENSION, axial.RAY_CURVE, axial.RAY_SQUASH, axial.RAY_NONE} <= rays
    if standard.startswith("ACI"):
        assert axial.RAY_CAP in rays  # the upper limit's cut taken per section, then per row
    for k in RADIAL:
        assert np.array_equal(_bits(fast[k]), _bits(full[k])), k


@pytest.mark.parametrize("standard", STANDARDS)
def test_lam_only_without_of_is_the_full_interaction(standard):
    """Without `of` (a section per row) `lam_only` has nothing to take by position: the
    full interaction's values."""
    sec, of, n, m, std = _rays(standard, 400)
    part = sec.take(of)
    full = interaction(part, n, m_star=m, std=std, at_n=False)
    got = interaction(part, n, m_star=m, std=std, at_n=False, lam_only=True)
    assert set(got) == set(full)
    for k in full:
        assert np.array_equal(_bits(got[k]), _bits(full[k])), k


@pytest.mark.parametrize("standard", STANDARDS)
@pytest.mark.parametrize("moment", [True, False])
def test_values_at_n_by_position_equal_the_per_row_copies(standard, moment):
    """`interaction(lazy=True)` (the check's): every value of the interaction with per-row
    copies of the section values, bit for bit, the section's own ones gathered when read."""
    sec, of, n, m, std = _rays(standard)
    m_star = m if moment else None
    full = interaction(sec, n, of=of, m_star=m_star, std=std)
    lazy = interaction(sec, n, of=of, m_star=m_star, std=std, lazy=True)
    assert isinstance(lazy, axial._Gathered) and "nuo" not in dict.keys(lazy)  # not gathered yet
    for k in full:
        assert np.array_equal(_bits(lazy[k]), _bits(full[k])), k
    assert set(lazy) == set(full)  # once every value has been read


def _without_lam_only(monkeypatch) -> None:
    real = axial.interaction

    def general(*args, lam_only=False, lazy=False, **kw):
        return real(*args, **kw)

    monkeypatch.setattr(axial, "interaction", general)


def _without_groups(monkeypatch) -> None:
    real = axial._simplified

    def general(*args, groups=None, **kw):
        return real(*args, **kw)

    monkeypatch.setattr(axial, "_simplified", general)


@pytest.mark.parametrize("standard", STANDARDS)
@pytest.mark.parametrize("repeat", [False, True])
@pytest.mark.parametrize("kw", KWS)
def test_check_equals_it_without_the_fast_paths(monkeypatch, standard, repeat, kw):
    """The whole check, each mode, equals it with the ray from per-row copies and k, Hwe per
    row (and every value compared for repeated cases), bit for bit; with repeated cases
    (`_repeated`: more than half the rows, some differing in the out-of-plane M* alone) the
    simplified method's cases-once path runs."""
    p, s = _piers(), Settings(standard=standard)
    acts = _actions(p)
    if repeat:
        acts = _repeated(acts)
    fast = check_pier_axial(p, acts, s, **kw)
    assert fast.util_s.notna().any() and fast.util_s.isna().any()
    _without_lam_only(monkeypatch)
    _without_groups(monkeypatch)
    general = check_pier_axial(p, acts, s, **kw)
    same_frame(fast, general)


@pytest.mark.parametrize("standard", STANDARDS)
def test_k_and_hwe_per_pier_equal_them_per_row(standard):
    """`_simplified` with `groups` equals it without, every column, in each mode; with the
    out-of-plane M* alone differing in some repeated cases, their rows keep their own."""
    p, s = _piers(), Settings(standard=standard, ends_restrained="yes")
    acts = _repeated(_actions(p))
    df, first, of, per, by_pier = axial._join(acts, p, axial._geometry_columns(p, False))
    assert by_pier
    n = len(df)
    for kw in (dict(working=True), dict(working=False), dict(working=False, util_only=True)):
        got = axial._simplified(df, s, of, {"util": np.zeros(n)}, first=first, groups=first, **kw)
        want = axial._simplified(df, s, of, {"util": np.zeros(n)}, first=first, **kw)
        same_frame(got, want)


def test_join_tells_where_geometry_is_per_pier():
    """A pier looked up once: every row's geometry its group's; a pier listed twice (the
    merge: its rows' geometry differs within a group): not, and the check then reads each
    row's own, as before."""
    p = _piers()
    cols = axial._geometry_columns(p, False)
    acts = _actions(p)
    assert axial._join(acts, p, cols)[4]
    twice = pd.concat([p, p.iloc[[5]].assign(Hc=p.Hc.iloc[5] * 2)], ignore_index=True)
    df, first, of, per, by_pier = axial._join(acts, twice, cols)
    assert not by_pier
    hc = df.Hc.to_numpy()
    assert (hc != hc[first][of]).any()  # per-pier k would be wrong here
