"""Properties that must hold for any valid building (hypothesis; CI-sized by default, run
`HYPOTHESIS_PROFILE=slow pytest -m slow` style profiles for 10 000 examples): compute never
raises, storey shears are fully shared, capacities never drop when strength or steel rises,
and every utilisation is demand over capacity."""

from __future__ import annotations

import builders
import numpy as np
import pandas as pd
from hypothesis import assume, given
from hypothesis import strategies as st

from xlcore import distribution, pipeline, results
from xlcore.checks.axial import interaction, rect_sections
from xlcore.codes import as3600
from xlcore.diagnostics import Findings
from xlcore.mechanics import stiffness
from xlcore.model import Building, Opening, Settings, Storey

grades = st.sampled_from(as3600.STANDARD_GRADES)


@st.composite
def buildings(draw):
    n_storeys = draw(st.integers(1, 2))
    storeys = [Storey(index=i, name=f"S{i}", level=3.2 * i, height=3.2, slab=200.0) for i in range(n_storeys)]
    bx, by = draw(st.floats(3.0, 12.0)), draw(st.floats(2.5, 9.0))
    t = draw(st.sampled_from([150.0, 200.0, 250.0, 300.0]))
    fc = draw(grades)
    bars = dict(
        v_dia=draw(st.sampled_from([12.0, 16.0])), h_spacing=draw(st.sampled_from([150.0, 200.0, 250.0]))
    )
    lines = [("A", 0, 0, bx, 0), ("B", bx, 0, bx, by), ("C", bx, by, 0, by), ("D", 0, by, 0, 0)]
    walls = [
        builders.wall(w, x1, y1, x2, y2, storeys=("S0", f"S{n_storeys - 1}"), thickness=t, fc=fc, **bars)
        for w, x1, y1, x2, y2 in lines
    ]
    width = draw(st.floats(0.8, min(2.0, bx - 1.0)))
    offset = draw(st.floats(0.3, bx - width - 0.3))
    openings = [
        Opening(
            wall_id="A",
            storey_from="S0",
            storey_to=f"S{n_storeys - 1}",
            offset=offset,
            width=width,
            sill=0.0,
            head=2.1,
        )
    ]
    combos = ["C1", "C2"]
    core = pd.DataFrame(
        [
            dict(
                row=2 + k,
                storey=s.name,
                combination=c,
                n=draw(st.floats(0, 20000)),
                vx=draw(st.floats(-3000, 3000)),
                vy=draw(st.floats(-3000, 3000)),
                mx=draw(st.floats(-20000, 20000)),
                my=draw(st.floats(-20000, 20000)),
                t=draw(st.floats(-2000, 2000)),
                x_v=np.nan,
                y_v=np.nan,
            )
            for k, (s, c) in enumerate((s, c) for s in storeys for c in combos)
        ]
    )
    members = ["A-1", "A-2", "B", "C", "D"] if offset > 0.3 else ["A-1", "B", "C", "D"]
    acts = pd.DataFrame(
        [
            dict(
                row=100 + k,
                storey=s.name,
                combination=c,
                member=m,
                n=draw(st.floats(-500, 5000)),
                v=draw(st.floats(-1500, 1500)),
                m=draw(st.floats(-3000, 3000)),
                m_out=np.nan,
            )
            for k, (s, c, m) in enumerate((s, c, m) for s in storeys for c in combos[:1] for m in members)
        ]
    )
    return Building(
        settings=Settings(),
        storeys=storeys,
        walls=walls,
        openings=openings,
        member_actions=acts,
        core_actions=core,
        input_hash="h",
    )


@given(buildings())
def test_compute_never_raises_and_every_utilisation_is_demand_over_capacity(b):
    o = pipeline.compute(b, Findings())
    assert len(o.summary) == len(o.geometry.piers)
    assert np.allclose(o.shear.util, o.shear.v.abs() / o.shear.phi_vu)
    assert set(o.summary.status) <= {results.PASS, results.FAIL, results.NOT_CHECKED}


@given(buildings())
def test_storey_shear_is_fully_shared_among_walls(b):
    s = b.settings
    geom = pipeline.geometry.derive(b.storeys, b.walls, b.openings)
    piers = stiffness.with_stiffness(geom.piers, s.poisson, s.pier_fixity)
    walls = stiffness.wall_stiffness(piers, s.poisson, s.pier_fixity)
    plans = distribution.storey_plans(piers, walls)
    shares = distribution.core_actions_to_piers(piers, walls, plans, b.core_actions, 0.0)
    w = shares.walls.merge(walls[["storey", "wall_id", "ux", "uy"]], on=["storey", "wall_id"])
    totals = w.assign(fx=w.v * w.ux, fy=w.v * w.uy).groupby(["storey", "combination"])[["fx", "fy"]].sum()
    core = b.core_actions.set_index(["storey", "combination"])
    assert np.allclose(totals.fx, core.loc[totals.index, "vx"], atol=1e-6)
    assert np.allclose(totals.fy, core.loc[totals.index, "vy"], atol=1e-6)


@given(
    Lw=st.floats(500, 8000),
    tw=st.floats(150, 400),
    Hw=st.floats(2000, 6000),
    fc1=grades,
    fc2=grades,
    rho1=st.floats(0.0, 0.02),
    rho2=st.floats(0.0, 0.02),
)
def test_shear_capacity_never_drops_when_fc_or_horizontal_steel_rises(Lw, tw, Hw, fc1, fc2, rho1, rho2):
    lo_fc, hi_fc = sorted((fc1, fc2))
    lo_r, hi_r = sorted((rho1, rho2))
    base = as3600.wall_shear(lo_fc, 500.0, Lw, tw, Hw, lo_r, 0.01)
    assert as3600.wall_shear(hi_fc, 500.0, Lw, tw, Hw, lo_r, 0.01).phi_vu >= base.phi_vu - 1e-6
    assert as3600.wall_shear(lo_fc, 500.0, Lw, tw, Hw, hi_r, 0.01).phi_vu >= base.phi_vu - 1e-6


@given(
    Lw=st.floats(600, 6000),
    tw=st.sampled_from([150.0, 200.0, 250.0, 300.0]),
    fc=grades,
    d1=st.sampled_from([10.0, 12.0, 16.0]),
    d2=st.sampled_from([16.0, 20.0, 24.0]),
    n_frac=st.floats(-0.5, 0.55),
)
def test_pier_moment_capacity_never_drops_when_vertical_steel_rises(Lw, tw, fc, d1, d2, n_frac):
    assume(d2 > d1)
    rows = pd.DataFrame(
        dict(
            Lw=[Lw, Lw],
            tw=[tw, tw],
            fc=[fc, fc],
            fsy=[500.0, 500.0],
            v_dia=[d1, d2],
            v_spacing=[200.0, 200.0],
            v_layers=[2, 2],
            cover=[30.0, 30.0],
        )
    )
    sec = rect_sections(rows)
    squash = as3600.squash_load(sec.fc[0], Lw * tw - sec.As[0], sec.As[0], 500.0)
    n = n_frac * (0.6 * squash if n_frac > 0 else 0.85 * sec.As[0] * 500.0)
    r = interaction(sec, np.array([n, n]))
    assert r["phi_mu"][1] >= r["phi_mu"][0] * (1 - 1e-9) - 1e-3
