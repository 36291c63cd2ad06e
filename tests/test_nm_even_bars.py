"""The closed-form steel sums for evenly spaced bars (`nm.EvenRect`) against the bar-by-bar
sums (`nm.Rect`), and the neutral-axis solver against the bisection it replaced.

These are consistency checks inside the project: the bar-by-bar solver is the one held to the
outside references (Warner, Foster & Kilpatrick Ex. 5.2; the concreteproperties library) in
test_as3600_axial.py and test_nm_reference_library.py, and those tests now run through the
closed forms wherever piers are checked.
"""

import dataclasses

import numpy as np
import pandas as pd
from hypothesis import given
from hypothesis import strategies as st

from xlcore.checks.axial import interaction, pier_bars, rect_sections
from xlcore.mechanics import nm


def piers(Lw, tw, fc, dia, spacing, layers):
    return pd.DataFrame(
        dict(
            Lw=[Lw],
            tw=[tw],
            fc=[fc],
            fsy=[500.0],
            v_dia=[dia],
            v_spacing=[spacing],
            v_layers=[layers],
            cover=[30.0],
        )
    )


@given(
    Lw=st.floats(300, 9000),
    tw=st.floats(150, 400),
    fc=st.sampled_from([25.0, 32.0, 40.0, 50.0, 65.0, 80.0, 100.0]),
    dia=st.sampled_from([12.0, 16.0, 20.0, 28.0]),
    spacing=st.floats(100, 300),
    layers=st.sampled_from([1, 2]),
    frac=st.floats(1e-6, 1.4),
)
def test_closed_form_forces_equal_bar_by_bar(Lw, tw, fc, dia, spacing, layers, frac):
    even = rect_sections(piers(Lw, tw, fc, dia, spacing, layers))
    bars = even.bars()
    d, a = pier_bars(*(np.array([v], dtype=float) for v in (Lw, tw, dia, spacing, layers, 30.0)))
    np.testing.assert_allclose(bars.d, d)  # the same bars as the general description
    np.testing.assert_allclose(bars.A, a)
    dn = np.array([frac * Lw])
    n1, m1 = nm.forces(even, dn)
    n2, m2 = nm.forces(bars, dn)
    scale = fc * Lw * tw
    assert abs(n1[0] - n2[0]) <= 1e-9 * scale
    assert abs(m1[0] - m2[0]) <= 1e-9 * scale * Lw


def _bisect(sec, target, lo, hi, steps=200):
    for _ in range(steps):
        mid = 0.5 * (lo + hi)
        n, _ = nm.forces(sec, mid)
        below = n < target
        lo, hi = np.where(below, mid, lo), np.where(below, hi, mid)
    return 0.5 * (lo + hi)


def test_solver_meets_the_target_and_agrees_with_bisection_where_the_root_is_unique():
    rng = np.random.default_rng(7)
    rows = 400
    df = pd.DataFrame(
        dict(
            Lw=rng.uniform(500, 7000, rows),
            tw=rng.uniform(150, 350, rows),
            fc=rng.choice([32.0, 40.0, 50.0], rows),
            fsy=500.0,
            v_dia=12.0,  # light bars: N(dn) rises strictly (a bar entering the block never outweighs it)
            v_spacing=300.0,
            v_layers=1,
            cover=30.0,
        )
    )
    sec = rect_sections(df)
    target = rng.uniform(0.0, 0.4, rows) * sec.fc * sec.D * sec.b
    got = nm.solve_dn(sec, target, 1e-6 * sec.D, sec.D)
    n, _ = nm.forces(sec, got)
    np.testing.assert_allclose(n, target, rtol=1e-9, atol=1e-3)
    np.testing.assert_allclose(got, _bisect(sec, target, 1e-6 * sec.D, sec.D.copy()), rtol=1e-8)


def test_sections_given_once_give_the_same_capacities_as_one_per_row():
    df = pd.concat([piers(2400, 200, 40, 16, 200, 2), piers(900, 250, 50, 20, 150, 2)], ignore_index=True)
    n_star = np.array([-400e3, 0.0, 1500e3, 6000e3, 9e6, 2500e3])
    of = np.array([0, 0, 0, 1, 1, 1])
    once = interaction(rect_sections(df), n_star, of=of)
    per_row = interaction(rect_sections(df.iloc[of]), n_star)
    for key in ("phi_mu", "phi", "nuo", "kuo", "region"):
        np.testing.assert_allclose(once[key], per_row[key], rtol=1e-12)


def test_rows_without_zone_bars_among_rows_with_them_give_the_same_forces_to_the_last_bit():
    """Zone bars are worked out only on the rows that carry any (speed: the advice search pads
    every variant to the most zone bars of any). Consistency inside the project: each row of a
    set mixing both kinds gives, bit for bit, what it gives alone (a row with bars: worked out
    as before; a row without: as a section with no zone bars at all), and the bar-by-bar sums
    (held to concreteproperties in test_end_zones_strength.py) to 1e-9."""
    rng = np.random.default_rng(11)
    rows = 300
    D = rng.uniform(600, 6000, rows)
    k = 6
    zd = np.sort(rng.uniform(40, 400, (rows, k)), axis=1)
    zA = np.where(rng.random((rows, k)) < 0.5, rng.choice([314.0, 491.0, 616.0], (rows, k)), 0.0)
    zA[rng.random(rows) < 0.6] = 0.0  # most rows carry no zone bar at all
    fc = rng.choice([32.0, 40.0, 50.0], rows)
    sec = nm.EvenRect(
        D=D,
        b=rng.uniform(150, 350, rows),
        fc=fc,
        fsy=np.full(rows, 500.0),
        edge=np.full(rows, 450.0),
        step=np.full(rows, 200.0),
        count=np.floor((D - 900.0) / 200.0).clip(0) + 1,
        bar_area=np.full(rows, 226.0),
        alpha2=np.full(rows, 0.79),
        gamma=np.full(rows, 0.77),
        zd=zd,
        zA=zA,
    )
    has = (zA > 0).any(axis=1)
    assert 0 < has.sum() < rows  # both kinds of row
    dn = D * rng.uniform(0.01, 1.3, rows)
    n, m = nm.forces(sec, dn)
    for i in range(rows):
        one = sec.take(np.array([i]))
        if not has[i]:
            one = dataclasses.replace(one, zd=None, zA=None)
        n1, m1 = nm.forces(one, dn[[i]])
        assert n1[0] == n[i] and m1[0] == m[i], i
    n2, m2 = nm.forces(sec.bars(), dn)
    scale = fc * D * sec.b
    assert (np.abs(n - n2) <= 1e-9 * scale).all()
    assert (np.abs(m - m2) <= 1e-9 * scale * D).all()
