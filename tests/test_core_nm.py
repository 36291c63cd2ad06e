"""Biaxial strength of wall assemblies (L and C sections, and the whole core) against the
concreteproperties library (PyPI): same outline, same bars, AS 3600 stress block (Cl 8.1.3),
moments about the same point, at several neutral-axis angles and axial forces."""

import numpy as np
import pytest

from xlcore.checks.core_nm import ACROSS, FIBRE, _along
from xlcore.codes import as3600 as a
from xlcore.mechanics import nm_core

cp = pytest.importorskip("concreteproperties")
from concreteproperties.concrete_section import ConcreteSection  # noqa: E402
from concreteproperties.design_codes import AS3600  # noqa: E402
from concreteproperties.pre import add_bar  # noqa: E402
from sectionproperties.pre.geometry import Geometry  # noqa: E402
from shapely import affinity  # noqa: E402
from shapely.ops import unary_union  # noqa: E402

from xlcore.mechanics.section import rectangle  # noqa: E402


def bars_for(L, t, dia=12, s=200, cover=30):
    e = cover + dia / 2
    n = int(np.ceil((L - 2 * e) / s)) + 1
    off = t / 2 - cover - dia / 2
    return [(p, o, np.pi * dia**2 / 4) for p in np.linspace(e, L - e, n) for o in (-off, off)]


L_SECTION = [
    (0, 0, 3000, 0, 200, 40, 500, bars_for(3000, 200)),
    (0, 0, 0, 2000, 200, 40, 500, bars_for(2000, 200)),
]
C_SECTION = [
    (0, 0, 2500, 0, 250, 50, 500, bars_for(2500, 250, 16)),
    (2500, 0, 2500, 4000, 250, 50, 500, bars_for(4000, 250, 16)),
    (2500, 4000, 0, 4000, 250, 50, 500, bars_for(2500, 250, 16)),
]


SECTIONS = {}


def both(walls, fibre, across):
    """Our assembly and the library's section, built once per outline and fibre size."""
    key = (id(walls), fibre, across)
    if key not in SECTIONS:
        SECTIONS[key] = _both(walls, fibre, across)
    return SECTIONS[key]


def _both(walls, fibre, across):
    asm = nm_core.build([walls], fibre=fibre, across=across, block=lambda fc: (a.alpha2(fc), a.gamma(fc)))
    code = AS3600()
    conc = code.create_concrete_material(walls[0][5])
    steel = code.create_steel_material()
    poly = unary_union(
        [rectangle(x1 / 1000, y1 / 1000, x2 / 1000, y2 / 1000, t / 1000) for x1, y1, x2, y2, t, *_ in walls]
    )
    geom = Geometry(affinity.scale(poly, 1000, 1000, origin=(0, 0)), material=conc)
    for k in np.nonzero(asm.ba[0] > 0)[0]:
        geom = add_bar(geom, area=asm.ba[0, k], material=steel, x=asm.bx[0, k], y=asm.by[0, k], n=12)
    return asm, ConcreteSection(geom, moment_centroid=(asm.xc[0], asm.yc[0]))


@pytest.mark.parametrize("walls", [L_SECTION, C_SECTION], ids=["L", "C"])
@pytest.mark.parametrize("theta", [0.0, 0.5, np.pi / 2, 2.5, -2.0])
@pytest.mark.parametrize("n", [0.0, 2e6])
def test_nominal_biaxial_moments_match_library(walls, theta, n):
    """Fine fibres (25 mm x 8 across): within 0.5 % of the library's exact clipping."""
    asm, ref_sec = both(walls, 25.0, 8)
    ref = ref_sec.ultimate_bending_capacity(theta=theta, n=n)
    depth = nm_core.full_depth(asm, [0], [theta])
    dn = nm_core.solve_dn(asm, [0], [theta], n, [1e-3], 3 * depth)
    nn, mx, my = nm_core.forces(asm, [0], [theta], dn)
    assert nn[0] == pytest.approx(n, abs=2e3)
    assert np.hypot(mx[0], my[0]) == pytest.approx(np.hypot(ref.m_x, ref.m_y), rel=0.005)
    assert (mx[0], my[0]) == pytest.approx((ref.m_x, ref.m_y), rel=0.01, abs=0.005 * abs(ref.m_xy))


@pytest.mark.parametrize("theta", [0.5, np.pi / 2, 2.5])
def test_production_fibres_within_one_percent(theta):
    asm, ref_sec = both(L_SECTION, FIBRE, ACROSS)
    ref = ref_sec.ultimate_bending_capacity(theta=theta, n=1e6)
    dn = nm_core.solve_dn(asm, [0], [theta], 1e6, [1e-3], 3 * nm_core.full_depth(asm, [0], [theta]))
    _, mx, my = nm_core.forces(asm, [0], [theta], dn)
    assert np.hypot(mx[0], my[0]) == pytest.approx(np.hypot(ref.m_x, ref.m_y), rel=0.01)


def test_capacity_along_a_direction_of_a_square_contour():
    # contour: square with corners (+-1, +-1); along (1, 0) the distance is 1, along (1, 1) sqrt 2
    px, py = np.array([1.0, -1.0, -1.0, 1.0]), np.array([1.0, 1.0, -1.0, -1.0])
    assert _along(px, py, np.array([5.0, 0.0])) == pytest.approx(1.0)
    assert _along(px, py, np.array([2.0, 2.0])) == pytest.approx(np.sqrt(2))
    assert _along(px, py, np.array([0.0, 0.0])) == pytest.approx(np.sqrt(2))  # weakest direction


def test_sampled_design_curves_converge(demo_master, monkeypatch):
    """The core check reads phiMu(N*) off design curves sampled in dn; sampling six times
    denser changes no utilisation by more than 0.1 %."""
    from xlcore import distribution, pipeline
    from xlcore.checks import core_nm
    from xlcore.mechanics import stiffness

    b, _ = pipeline.load(demo_master)
    s = b.settings
    g = pipeline.geometry.derive(b.storeys, b.walls, b.openings)
    piers = stiffness.with_stiffness(g.piers, s.poisson, s.pier_fixity)
    walls = stiffness.wall_stiffness(piers, s.poisson, s.pier_fixity)
    plans = distribution.storey_plans(piers, walls)
    core = b.core_actions[b.core_actions.storey.isin(["GF", "L5"])]
    base = core_nm.check_core_nm(piers, plans, core, s)
    monkeypatch.setattr(core_nm, "SAMPLES", 6 * core_nm.SAMPLES)
    dense = core_nm.check_core_nm(piers, plans, core, s)
    assert np.allclose(base.util, dense.util, rtol=1e-3)
