"""Elastic core stress check on a box core, against sigma = N/A + M x / I evaluated by hand
from the section's own properties (which test_section.py checks against sectionproperties)."""

import builders
import numpy as np
import pandas as pd
import pytest

from xlcore import distribution, geometry
from xlcore.checks.core_stress import check_core_stress
from xlcore.mechanics import stiffness
from xlcore.model import Settings, Storey


def box():
    st = [Storey(index=0, name="GF", level=0.0, height=3.5, slab=200.0)]
    lines = [("A", 0, 0, 6, 0), ("B", 6, 0, 6, 4), ("C", 6, 4, 0, 4), ("D", 0, 4, 0, 0)]
    walls = [
        builders.wall(w, x1, y1, x2, y2, storeys=("GF", "GF"), thickness=250.0, v_dia=16.0)
        for w, x1, y1, x2, y2 in lines
    ]
    geom = geometry.derive(st, walls, [])
    piers = stiffness.with_stiffness(geom.piers, 0.2, "fixed-fixed")
    plans = distribution.storey_plans(piers, stiffness.wall_stiffness(piers, 0.2, "fixed-fixed"))
    return piers, plans


def core(n, my):
    return pd.DataFrame(
        dict(
            row=[2],
            storey=["GF"],
            combination=["C"],
            n=[n],
            vx=[0.0],
            vy=[0.0],
            mx=[0.0],
            my=[my],
            t=[0.0],
            x_v=[np.nan],
            y_v=[np.nan],
        )
    )


def test_axial_only_gives_uniform_stress_and_no_tension():
    piers, plans = box()
    sec = plans["GF"].section
    out = check_core_stress(piers, plans, core(10_000.0, 0.0), Settings())
    # sigma = N / A = 10 000 kN / A m^2 / 1000 -> MPa (hand evaluation)
    assert out.sigma_max.to_numpy() == pytest.approx(10.0 / sec.area)
    assert (out.tension == 0).all()


def test_bending_tension_in_the_far_wall():
    piers, plans = box()
    sec = plans["GF"].section
    out = check_core_stress(piers, plans, core(0.0, -5000.0), Settings()).set_index("wall_id")
    # wall D lies on x = 0: sigma = My (0 - xc) / Iyy = -5000 x (-3) / Iyy kPa, compression;
    # wall B on x = 6: sigma = -5000 x 3 / Iyy kPa, tension (hand evaluation, symmetric box xc = 3)
    assert sec.xc == pytest.approx(3.0)
    expected_b = -5000.0 * 3.0 / sec.iyy / 1000.0
    assert out.loc["B", "sigma_start"] == pytest.approx(expected_b)
    assert out.loc["D", "sigma_start"] == pytest.approx(-expected_b)
    # tension resultant in B: its whole length in uniform tension, area 4 m x 0.25 m
    assert out.loc["B", "tension"] == pytest.approx(-expected_b * 1000.0 * 4 * 0.25, rel=1e-9)
    # As needed = T / (0.85 fsy); provided = rho_v x area = 2 x 201.06 / (200 x 250) x 1e6 mm^2/m^2
    assert out.loc["B", "as_req"] == pytest.approx(out.loc["B", "tension"] * 1000 / (0.85 * 500))
    rho = 2 * np.pi * 8**2 / (200 * 250)
    assert out.loc["B", "as_prov"] == pytest.approx(rho * 4 * 0.25 * 1e6, rel=1e-9)
    assert out.loc["D", "tension"] == 0.0


def test_compression_limit_setting_is_used():
    piers, plans = box()
    out = check_core_stress(piers, plans, core(20_000.0, 0.0), Settings(compression_limit=0.2))
    assert out.limit.to_numpy() == pytest.approx(0.2 * 40.0)
    assert out.u_compression.to_numpy() == pytest.approx(out.sigma_max.to_numpy() / 8.0)


@pytest.mark.parametrize(
    "standard, setting, ratio",
    [
        # blank setting: the standard's trigger, AS 3600:2018 Cl 14.6.2 0.15 f'c (from memory,
        # docs/engineering-basis.md) and ACI 318-19 18.10.6.3 0.2 f'c
        ("AS 3600:2018", None, 0.15),
        ("ACI 318-19", None, 0.20),
        # a value the engineer gives wins under either standard
        ("ACI 318-19", 0.15, 0.15),
        ("AS 3600:2018", 0.2, 0.20),
    ],
)
def test_compression_limit_blank_takes_the_standards_trigger(standard, setting, ratio):
    piers, plans = box()
    s = Settings(standard=standard, compression_limit=setting)
    out = check_core_stress(piers, plans, core(20_000.0, 0.0), s)
    # f'c 40 MPa in the builder's walls: limit = ratio x 40 (hand evaluation)
    assert out.limit.to_numpy() == pytest.approx(ratio * 40.0)


def test_end_zone_flag_on_earthquake_combinations_only_never_a_failure():
    # 60 000 kN on the box: sigma = N/A = 60e6 / ((2 x 6000 + 2 x 4000 - corner overlaps) x 250),
    # above 0.15 x 40 = 6 MPa (hand evaluation: A < 5.0e6 mm2 -> sigma > 12 MPa)
    piers, plans = box()
    actions = core(60_000.0, 0.0)
    plain = check_core_stress(piers, plans, actions, Settings())
    assert (plain.sigma_max > 6.0).all()
    assert (plain.flag == "n/a (not an earthquake combination)").all()
    assert (plain.status == "pass").all()  # compression over 0.15 f'c is not a failure (Cl 14.6)
    quake = check_core_stress(piers, plans, actions, Settings(earthquake_combinations="C"))
    assert (quake.flag == "end-zone detailing (Cl 14.6)").all()
    assert (quake.status == "pass").all() and (quake.util == quake.u_tension).all()
