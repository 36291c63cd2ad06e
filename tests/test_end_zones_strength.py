"""Piers with end-zone bars (issue 14 §1): strength against outside references.

- The concreteproperties library (PyPI), a general-purpose reinforced-concrete section analysis
  with an AS 3600 design-code class: the same rectangle, the same bars at the same places
  (end-zone bars and the field between them), AS 3600 stress block (Cl 8.1.3) and phi
  (Table 2.2.2). Nominal and factored moments within 0.5 % at four axial loads: tension
  side, pure bending, the balance region and high compression, bent both ways (the zones
  differ at the two ends).
- The squash load Nuo = alpha1 f'c (Ag - As) + As fsy, AS 3600:2018 Cl 10.6.2.2, evaluated by
  hand with the bar count and positions worked out by hand.
- The closed-form field sums with discrete zone bars against the bar-by-bar sums.
"""

import math

import numpy as np
import pandas as pd
import pytest
from hypothesis import given
from hypothesis import strategies as st

from xlcore.checks.axial import interaction, pier_bars, rect_sections
from xlcore.codes import as3600 as a
from xlcore.mechanics import bars, nm

cp = pytest.importorskip("concreteproperties")
from concreteproperties.concrete_section import ConcreteSection  # noqa: E402
from concreteproperties.design_codes import AS3600  # noqa: E402
from concreteproperties.pre import add_bar  # noqa: E402
from sectionproperties.pre.library import rectangular_section  # noqa: E402


def pier(Lw, tw, fc, dia, spacing, cover, za=None, zb=None, layers=2):
    """One pier row as the geometry gives it; za / zb: (bars, dia, length, tie) or None."""
    row = dict(Lw=Lw, tw=tw, fc=fc, fsy=500.0, v_dia=dia, v_spacing=spacing, v_layers=layers, cover=cover)
    for side, z in (("a", za), ("b", zb)):
        n, d, length, tie = z or (0, 0.0, 0.0, 0.0)
        row |= {f"z{side}_n": n, f"z{side}_dia": d, f"z{side}_len": length, f"z{side}_tie": tie}
        row[f"z{side}_ties"] = 150.0 if tie else np.nan
    return pd.DataFrame([row])


def reference(df: pd.DataFrame):
    """The same pier in concreteproperties: depth from the pier's start measured down from the
    top (y = Lw - depth), every bar of every layer at its own place."""
    p = df.iloc[0]
    code = AS3600()
    concrete = code.create_concrete_material(compressive_strength=p.fc)
    steel = code.create_steel_material()
    geom = rectangular_section(d=p.Lw, b=p.tw, material=concrete)
    depths, areas = pier_bars(
        *(df[k].to_numpy(float) for k in ("Lw", "tw", "v_dia", "v_spacing", "v_layers", "cover")), zones=df
    )
    for y, area in zip(depths[0], areas[0], strict=True):
        if area <= 0:
            continue
        # the layers at the field bars' face distance (as xlcore places every layer)
        for x in (p.cover + p.v_dia / 2, p.tw - p.cover - p.v_dia / 2):
            geom = add_bar(geometry=geom, area=area / 2, material=steel, x=x, y=p.Lw - y, n=16)
    section = ConcreteSection(geom)
    code.assign_concrete_section(section)
    return code, section


# a 1500 mm pier with 8N28 at its start and 4N24 at its end (different ends), a 2400 mm pier
# with N32 at both ends and a field of N16, and a 900 mm pier with zones and no field between
CASES = [
    ((1500.0, 250.0, 40.0, 16.0, 200.0, 30.0), (8, 28.0, 450.0, 10.0), (4, 24.0, 250.0, 10.0)),
    ((2400.0, 200.0, 50.0, 12.0, 250.0, 30.0), (8, 32.0, 500.0, 10.0), (8, 32.0, 500.0, 0.0)),
    ((900.0, 250.0, 32.0, 12.0, 200.0, 40.0), (6, 28.0, 380.0, 10.0), (6, 20.0, 300.0, 0.0)),
]


def _ours(case, flip):
    df = pier(*case[0], za=case[1], zb=case[2])
    sec = rect_sections(df)
    return df, (sec.flipped() if flip else sec)


def _loads(sec):
    """Tension side, pure bending, the balance region (Nub) and high compression (0.55 Nuo)."""
    squash = a.squash_load(sec.fc, sec.D * sec.b - sec.As, sec.As, sec.fsy)[0]
    d0 = sec.d0
    nub, _ = nm.forces(sec, d0 * sec.eps_cu / (sec.eps_cu + sec.fsy / sec.Es))
    return {
        "tension": -0.3 * sec.As[0] * 500.0,
        "bending": 0.0,
        "balance": nub[0],
        "compression": 0.55 * squash,
    }


@pytest.mark.parametrize("case", CASES)
@pytest.mark.parametrize("flip", [False, True])
def test_nominal_moment_with_end_bars_within_half_a_percent(case, flip):
    df, sec = _ours(case, flip)
    code, section = reference(df)
    # theta = 0 puts the compressive face at +y, the pier's start (y = Lw - depth); pi at its end
    theta = math.pi if flip else 0.0
    for name, n in _loads(sec).items():
        ref = section.ultimate_bending_capacity(theta=theta, n=n)
        dn = nm.solve_dn(sec, n, 1e-6 * sec.D, sec.D)
        nn, m = nm.forces(sec, dn)
        assert nn[0] == pytest.approx(n, rel=1e-6, abs=1.0), name
        assert abs(m[0]) == pytest.approx(abs(ref.m_xy), rel=0.005), name
        assert dn[0] == pytest.approx(ref.d_n, rel=0.005), name


@pytest.mark.parametrize("case", CASES)
@pytest.mark.parametrize("flip", [False, True])
def test_factored_moment_with_end_bars_within_half_a_percent(case, flip):
    df, sec = _ours(case, flip)
    code, section = reference(df)
    theta = math.pi if flip else 0.0
    loads = _loads(sec)
    # design axial forces: on the tension side, at zero, near phi Nub and high on the factored curve
    for name, n_star in (
        ("tension", loads["tension"]),
        ("bending", 0.0),
        ("balance", 0.6 * loads["balance"]),
        ("compression", 0.6 * loads["compression"]),
    ):
        factored, _, phi = code.ultimate_bending_capacity(theta=theta, n_design=n_star)
        r = interaction(sec, np.array([n_star]))
        assert r["phi_mu"][0] == pytest.approx(abs(factored.m_xy), rel=0.005), name


def test_different_ends_give_different_strength_each_way():
    """8N28 at the start, 4N24 at the end: bending that puts the heavy zone in tension (start
    compressed is the other way round) is stronger at pure bending; the flipped section is the
    mirror image (concreteproperties agrees above)."""
    df, sec = _ours(CASES[0], False)
    m = []
    for s in (sec, sec.flipped()):
        dn = nm.solve_dn(s, 0.0, 1e-6 * s.D, s.D)
        m.append(abs(nm.forces(s, dn)[1][0]))
    assert m[0] < 0.9 * m[1]  # start compressed: the light 4N24 zone is in tension


def test_squash_load_with_end_bars_by_hand():
    """Cl 10.6.2.2: Nuo = alpha1 f'c (Ag - As) + As fsy, alpha1 = 1 - 0.003 f'c within
    0.72..0.85 (f'c 40: 0.88 -> 0.85). Pier 1500 x 250, cover 30, N10 ties, field N16 @ 200 in
    two layers, 8N28 in 450 mm at each end. By hand: zone bars 4 a face from 30 + 10 + 14 = 54 mm
    to 450 - 10 - 14 = 426 mm from each edge, pitch (426 - 54) / 3 = 124 mm; field between
    426 and 1500 - 426 = 1074 mm: 648 / 200 = 3.24 -> 4 gaps of 162 mm, 3 inner positions of 2N16.
    As = 16 x 615.75 + 6 x 201.06 = 9852.0 + 1206.4 = 11058.4 mm2;
    Nuo = 0.85 x 40 x (375 000 - 11 058.4) + 11 058.4 x 500 = 12 374 014 + 5 529 200 = 17 903 214 N."""
    df = pier(1500.0, 250.0, 40.0, 16.0, 200.0, 30.0, za=(8, 28.0, 450.0, 10.0), zb=(8, 28.0, 450.0, 10.0))
    d, A = pier_bars(
        *(df[k].to_numpy(float) for k in ("Lw", "tw", "v_dia", "v_spacing", "v_layers", "cover")), zones=df
    )
    live = A[0] > 0
    expected = [588.0, 750.0, 912.0, 54.0, 178.0, 302.0, 426.0, 1446.0, 1322.0, 1198.0, 1074.0]
    np.testing.assert_allclose(d[0][live], expected)
    sec = rect_sections(df)
    assert sec.As[0] == pytest.approx(11058.4, abs=0.1)
    r = interaction(sec, np.array([0.0]))
    assert r["nuo"][0] == pytest.approx(17_903_214.0, rel=1e-6)
    assert r["nuot"][0] == pytest.approx(-11058.4 * 500.0, rel=1e-5)  # all bars yield in tension


@given(
    Lw=st.floats(800, 6000),
    fc=st.sampled_from([25.0, 32.0, 40.0, 65.0, 100.0]),
    dia=st.sampled_from([12.0, 16.0, 20.0]),
    spacing=st.floats(100, 300),
    layers=st.sampled_from([1, 2]),
    na=st.sampled_from([0, 2, 4, 6, 8]),
    nb=st.sampled_from([0, 2, 4, 8]),
    zdia=st.sampled_from([20.0, 24.0, 28.0, 32.0]),
    frac_a=st.floats(0.1, 0.45),
    frac_b=st.floats(0.1, 0.45),
    frac=st.floats(1e-6, 1.4),
    flip=st.booleans(),
)
def test_closed_form_with_zone_bars_equals_bar_by_bar(
    Lw, fc, dia, spacing, layers, na, nb, zdia, frac_a, frac_b, frac, flip
):
    """Consistency inside the project: field sums in closed form plus zone bars one by one
    equal every bar one by one (the latter held to concreteproperties above)."""
    df = pier(
        Lw, 250.0, fc, dia, spacing, 30.0, (na, zdia, frac_a * Lw, 10.0), (nb, zdia, frac_b * Lw, 0.0), layers
    )
    even = rect_sections(df)
    if flip:
        even = even.flipped()
    one_by_one = even.bars()
    dn = np.array([frac * Lw])
    n1, m1 = nm.forces(even, dn)
    n2, m2 = nm.forces(one_by_one, dn)
    scale = fc * Lw * 250.0
    assert abs(n1[0] - n2[0]) <= 1e-9 * scale
    assert abs(m1[0] - m2[0]) <= 1e-9 * scale * Lw
    lay = bars.layout(df)
    assert even.As[0] == pytest.approx(lay.field_count[0] * lay.field_area[0] + lay.zone_A.sum(), rel=1e-12)
    # field spacing never above the given spacing (Cl 11.7 rule read on the field bars)
    if lay.field_count[0] > 0:
        assert lay.field_step[0] <= spacing + 1e-9


def _checked(m_values, n_values):
    """check_pier_axial on CASES[0] (8N28 at the start, 4N24 at the end) for the given
    (N* kN, M* kNm) rows."""
    from xlcore.checks.axial import check_pier_axial
    from xlcore.model import Settings

    p = pier(*CASES[0][0], za=CASES[0][1], zb=CASES[0][2]).assign(
        storey="GF", pier_id="P1", Hc=3000.0, rho_v=0.008, supported_edges=0, edge_a="start", edge_b="end"
    )
    acts = pd.DataFrame(
        dict(
            storey="GF",
            pier_id="P1",
            combination=[f"C{i}" for i in range(len(m_values))],
            n=n_values,
            v=0.0,
            m=m_values,
            m_out=np.nan,
        )
    )
    return check_pier_axial(p, acts, Settings())


def test_sense_of_the_moment_picks_the_section():
    """M* > 0 compresses the pier's end (actions sheets' convention): the heavy 8N28 zone at
    the start is then in tension, so the pier is stronger that way; each row's utilisation is
    M* / phi Mu of its own sense at N* = 0 (pure bending, radial ray along the M axis)."""
    out = _checked([500.0, -500.0], [0.0, 0.0])
    df, start_compressed = _ours(CASES[0], False)
    r_start = interaction(start_compressed, np.array([0.0]))
    r_end = interaction(start_compressed.flipped(), np.array([0.0]))
    assert list(out.compressed) == ["end", "start"]
    assert out.util.iloc[0] == pytest.approx(500e6 / r_end["phi_mu"][0], rel=1e-6)
    assert out.util.iloc[1] == pytest.approx(500e6 / r_start["phi_mu"][0], rel=1e-6)
    assert out.util.iloc[0] < out.util.iloc[1]
    assert "start: 8N28 in 450 mm" in out.bars.iloc[0] and "end: 4N24 in 250 mm" in out.bars.iloc[0]
    assert out.f_nm.iloc[0].startswith("M* compresses the pier's end (its end zones differ); ")


def test_minimum_eccentricity_checks_both_senses_and_keeps_the_worse():
    """M* = 0 under N*: the Cl 10.1.2 moment N* x 0.05 Lw has no sense of its own, so both
    are run and the larger utilisation is reported."""
    n = 3000.0
    out = _checked([0.0], [n])
    both = [_checked([s * n * 0.05 * 1.5], [n]).util.iloc[0] for s in (1.0, -1.0)]
    # 0.05 x 1500 mm = 75 mm: M* = 3000 kN x 0.075 m = 225 kNm either way (hand evaluation)
    assert out.m_design.iloc[0] == pytest.approx(225.0)
    assert both[0] != pytest.approx(both[1], rel=1e-3)  # the senses differ for this pier
    assert out.util.iloc[0] == pytest.approx(max(both), rel=1e-9)
