"""End-zone bars in the checks beyond the pier N-M (issue 14 §1): the core tension check and the
core's biaxial strength count them (hand sums on a box core), detailing reads the field bars,
and the demo's tension piers, which fail without end bars, pass with the demo's zones."""

import builders
import numpy as np
import pandas as pd
import pytest

from xlcore import distribution, geometry, pipeline
from xlcore.checks.core_nm import check_core_nm
from xlcore.checks.core_stress import check_core_stress
from xlcore.checks.detailing import check_detailing
from xlcore.mechanics import stiffness
from xlcore.model import EndZone, Settings, Storey

ST = [Storey(index=0, name="GF", level=0.0, height=3.5, slab=200.0)]
LINES = [("A", 0, 0, 6, 0), ("B", 6, 0, 6, 4), ("C", 6, 4, 0, 4), ("D", 0, 4, 0, 0)]


def box(zones: bool):
    """A 6 x 4 m box of 250 mm walls, N16 @ 200 in two layers; with `zones`, 8N24 in 400 mm
    (no ties) at both ends of every wall."""
    walls = [
        builders.wall(w, x1, y1, x2, y2, storeys=("GF", "GF"), thickness=250.0, v_dia=16.0)
        for w, x1, y1, x2, y2 in LINES
    ]
    ez = [
        EndZone(
            wall_id=w, storey_from="GF", storey_to="GF", location=e, which=e, bars=8, dia=24.0, length=400.0
        )
        for w, *_ in LINES
        for e in ("start", "end")
    ]
    geom = geometry.derive(ST, walls, [], ez if zones else [])
    piers = stiffness.with_stiffness(geom.piers, 0.2, "fixed-fixed")
    plans = distribution.storey_plans(piers, stiffness.wall_stiffness(piers, 0.2, "fixed-fixed"))
    return piers, plans


def core(n):
    return pd.DataFrame(
        dict(
            row=[2], storey=["GF"], combination=["C"], n=[n], vx=[0.0], vy=[0.0], mx=[0.0], my=[0.0], t=[0.0]
        )
        | dict(x_v=[np.nan], y_v=[np.nan])
    )


def test_core_tension_steel_counts_end_zone_bars():
    """Uniform tension: every fibre and bar in tension. Wall A (6 m) by hand:
    rho_v = 2 x 201.06 / (200 x 250) = 0.0080425; field smeared over 6000 - 2 x 400 = 5200 mm:
    5200 x 250 x 0.0080425 = 10 455.2 mm2; zones 16 x 452.39 = 7 238.2 mm2; total 17 693.5 mm2
    (without zones 6000 x 250 x 0.0080425 = 12 063.7 mm2)."""
    with_z = check_core_stress(*box(True), core(-5000.0), Settings()).set_index("wall_id")
    without = check_core_stress(*box(False), core(-5000.0), Settings()).set_index("wall_id")
    assert with_z.loc["A", "as_prov"] == pytest.approx(17_693.5, rel=1e-4)
    assert without.loc["A", "as_prov"] == pytest.approx(12_063.7, rel=1e-4)
    assert with_z.loc["A", "util"] < without.loc["A", "util"]


def test_core_axial_strength_counts_end_zone_bars():
    """phi Nuot = 0.85 x As x fsy over the whole core. By hand: zone bars 4 a face from
    30 + 12 = 42 to 400 - 12 = 388 mm from each wall end; field between 388 and L - 388:
    6 m walls 5224 / 200 = 26.12 -> 27 gaps, 26 positions; 4 m walls 3224 / 200 = 16.12 -> 17
    gaps, 16 positions; As = 2 x (26 + 16) x 2 x 201.06 + 4 x 16 x 452.39
    = 33 778.4 + 28 952.9 = 62 731.3 mm2; phi Nuot = 0.85 x 62 731.3 x 500 = 26 660.8 kN."""
    piers, plans = box(True)
    out = check_core_nm(piers, plans, core(-1000.0), Settings())
    assert out.phi_nuot.iloc[0] == pytest.approx(-26_660.8, rel=1e-4)


def test_detailing_reads_the_field_bars_between_the_zones():
    piers, _ = box(True)
    acts = pd.DataFrame(dict(storey=["GF"], pier_id=["A"], combination=["C"], n=[100.0], v=[0.0], m=[0.0]))
    out = check_detailing(piers[piers.pier_id == "A"], acts, Settings()).set_index("rule")
    assert "field bars between the end zones" in out.loc["vertical ratio", "working"]
    # the field's own ratio (N16 @ 200, 2 layers, 250 mm), unchanged by the zones
    assert out.loc["vertical ratio", "value"] == pytest.approx(2 * 201.0619 / (200 * 250), rel=1e-6)


def test_demo_tension_piers_fail_without_end_bars_and_pass_with_them(demo_master):
    building, findings = pipeline.load(demo_master)
    assert building.end_zones
    bare = pipeline.compute(building.model_copy(update={"end_zones": []}), findings)
    zoned = pipeline.compute(building, findings)
    failing = bare.summary[bare.summary.status == "FAIL"]
    assert len(failing) >= 1  # the demo needs end bars
    assert set(failing.check) == {"axial + bending"}
    axial = [s for s in bare.sheets if s.name.endswith("axial-bending")][0].table
    worst = (
        axial.merge(failing[["storey", "pier_id"]]).sort_values("util").groupby(["storey", "pier_id"]).last()
    )
    assert (worst.n < 0).all()  # each fails in tension
    assert (zoned.summary.status != "FAIL").all()
    ax = [s for s in zoned.sheets if s.name.endswith("axial-bending")][0].table
    mine = ax.merge(failing[["storey", "pier_id"]])
    assert mine.util.max() < 1.0
    assert mine.bars.str.contains(r"\dN2[48] in \d+ mm").all()  # the demo's N28 (lowest third), N24 (next)
