"""Axial + bending utilisation as a radial overload factor, the Cl 10.1.2 minimum eccentricity,
the Cl 11.6.3 aspect ratio of a pier beside an opening and the Cl 11.5 end force per length.

Outside references: hand evaluation of each expression (named beside each value), and the
concreteproperties library's factored AS 3600 moment capacity at the axial force where the
scaled action pair lands (docs/engineering-basis.md, "Axial + bending utilisation")."""

import numpy as np
import pandas as pd
import pytest

from xlcore.checks.axial import interaction, rect_sections
from xlcore.codes import as3600 as a


def test_min_eccentricity_cl_10_1_2_hand_evaluation():
    # Cl 10.1.2: |M*| >= N* x 0.05 D. N* 2000 kN, D 1800 mm -> 0.05 x 1800 x 2000e3 = 180e6 N mm
    m = a.min_eccentricity_moment([100e6, 250e6, 100e6], [2000e3, 2000e3, -2000e3], 1800.0)
    assert m.tolist() == pytest.approx([180e6, 250e6, 100e6])  # tension: unchanged (hand evaluation)


def test_tension_side_line_hand_evaluation():
    # line from (0, phiMuo 400) to (phiNuot -1600, 0): (-800, 100) -> 800/1600 + 100/400 = 0.75
    assert a.tension_side_utilisation(-800.0, 100.0, -1600.0, 400.0) == pytest.approx(0.75)
    # pure tension at the capacity: 1.0; 20 % over: 1.2 (hand evaluation)
    assert a.tension_side_utilisation(-1920.0, 0.0, -1600.0, 400.0) == pytest.approx(1.2)


def test_ray_segment_hand_evaluation():
    # segment (3000, 600) -> (6000, 0); ray through (4000, 100): line N/6000 ... by hand: points on
    # the line satisfy M = 600 (6000 - N) / 3000 = 0.2 (6000 - N); (4000, 100)/lam on it:
    # 100/lam = 0.2 (6000 - 4000/lam) -> 100 = 1200 lam - 800 -> lam = 0.75 (hand evaluation)
    assert a.ray_segment_utilisation(4000.0, 100.0, 3000.0, 600.0, 6000.0, 0.0) == pytest.approx(0.75)


def test_aspect_ratio_larger_of_pier_and_whole_wall():
    # pier 900 mm beside an opening, Hw 3000 -> 3.333; whole wall 45 000 / 6000 = 7.5 governs
    r, gov = a.wall_aspect_ratio(
        [3000.0, 3000.0, 3000.0], [900.0, 900.0, 6000.0], 45000.0, 6000.0, [True, False, False]
    )
    assert r.tolist() == pytest.approx([7.5, 3000 / 900, 0.5])  # hand evaluation
    assert gov.tolist() == [True, False, False]


def test_wall_end_axial_per_length_cl_11_5():
    # N* 1800 kN over 1800 mm, M* 270 kNm: 1000 N/mm +- 6 x 270e6 / 1800^2 = 500 N/mm (hand evaluation)
    hi, lo = a.wall_end_axial_per_length(1800e3, 270e6, 1800.0)
    assert (hi, lo) == pytest.approx((1500.0, 500.0))


def _piers(k):
    return pd.DataFrame(
        dict(
            Lw=[1800.0] * k,
            tw=[250.0] * k,
            v_dia=[16.0] * k,
            v_spacing=[200.0] * k,
            v_layers=[2] * k,
            cover=[40.0] * k,
            fc=[40.0] * k,
            fsy=[500.0] * k,
        )
    )


# action pairs over the whole diagram: tension, pure bending, mid curve, near squash [N, N mm]
N = np.array([-3000e3, -500e3, 0.0, 2000e3, 6000e3, 8000e3, 12000e3])
M = np.array([200e6, 900e6, 1500e6, 2500e6, 1500e6, 500e6, 10e6])


def test_scaled_actions_land_on_the_factored_curve_within_half_a_percent():
    # the factored curve at fixed N is interaction()'s phiMu(N) (tested against concreteproperties
    # in test_nm_reference_library): (N*/U, M*/U) must lie on it
    sec = rect_sections(_piers(len(N)))
    r = interaction(sec, N, 0.6, m_star=M)
    lam = r["lam"]
    on = interaction(sec, N / lam, 0.6)
    assert on["phi_mu"] == pytest.approx(M / lam, rel=0.005)
    assert set(r["ray"].tolist()) == {1, 2, 3}  # all three parts of the diagram exercised


def test_utilisation_is_linear_in_the_load():
    # 1.2 means 20 % over: scaling the actions by s scales U by s, in tension and compression
    sec = rect_sections(_piers(len(N)))
    u1 = interaction(sec, N, 0.6, m_star=M)["lam"]
    u2 = interaction(sec, 1.2 * N, 0.6, m_star=1.2 * M)["lam"]
    assert u2 == pytest.approx(1.2 * u1, rel=1e-6)


cp = pytest.importorskip("concreteproperties")


def test_scaled_actions_on_concreteproperties_factored_diagram():
    from test_nm_reference_library import ours, reference

    case = (1800.0, 250.0, 40, 16, 200, 40)
    code, section = reference(*case)
    sec = ours(*case)
    for n, m in ((-500e3, 900e6), (2000e3, 2500e3 * 1e3), (0.0, 1500e6)):
        r = interaction(sec, np.array([n]), 0.6, m_star=np.array([m]))
        lam = r["lam"][0]
        factored, _, _ = code.ultimate_bending_capacity(theta=0, n_design=n / lam)
        assert abs(factored.m_xy) == pytest.approx(m / lam, rel=0.005)  # concreteproperties


def test_axial_working_text_substitutes_every_number_and_quotes_the_tension_capacity():
    from xlcore.checks.axial import check_pier_axial
    from xlcore.model import Settings

    k = 3
    piers = _piers(k).assign(
        storey="GF", pier_id=["P1", "P2", "P3"], Hc=3000.0, rho_v=0.008, supported_edges=0
    )
    acts = pd.DataFrame(
        dict(
            storey="GF",
            pier_id=["P1", "P2", "P3"],
            combination="C",
            n=[-500.0, 2000.0, 12000.0],
            m=[900.0, 100.0, 10.0],
            m_out=0.0,
        )
    )
    out = check_pier_axial(piers, acts, Settings())
    t = out.set_index("pier_id").f_nm
    # tension: the tension capacity 0.85 Nuot is quoted, not phi Nuo
    tens = out.set_index("pier_id").loc["P1"]
    assert f"{tens.phi_nuot:.1f}" in t["P1"] and f"{tens.nuot:.1f}" in t["P1"]
    assert f"{tens.util:.3f}" in t["P1"] and "phiNuo =" not in t["P1"]
    # Cl 10.1.2: 0.05 x 1800 x 2000 kN = 180 kNm > 100 kNm (hand evaluation)
    assert out.set_index("pier_id").loc["P2", "m_design"] == pytest.approx(180.0)
    assert "0.05 x 1800 mm x 2000.0 kN = 180.0" in t["P2"]
    assert "N*/phiNuo = 2000.0 / " in t["P2"]  # every ratio has its numbers
    # Cl 11.5 with the in-plane moment: P1 is in tension -> n/a; P2 end force hand evaluation
    p2 = out.set_index("pier_id").loc["P2"]
    # N*/Lw + 6 M*/Lw^2 = 1111.1 + 185.2 = 1296.3 N/mm, x 1800 mm = 2333.3 kN (hand evaluation)
    assert p2.n_end == pytest.approx((2000e3 / 1800 + 6 * 100e6 / 1800**2) * 1800 / 1e3)
    assert p2.n_end == pytest.approx(2333.3, abs=0.1)
    assert out.set_index("pier_id").loc["P1", "status_s"] == "n/a"
