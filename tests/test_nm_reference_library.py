"""Pier section strength against the concreteproperties library (PyPI), a general-purpose
reinforced-concrete section analysis with an AS 3600 design-code class. The same rectangular
pier, bars at the same places, AS 3600 stress block (Cl 8.1.3) and phi (Table 2.2.2)."""

import numpy as np
import pytest

from xlcore.checks.axial import interaction, pier_bars
from xlcore.codes import as3600 as a
from xlcore.mechanics import nm

cp = pytest.importorskip("concreteproperties")
from concreteproperties.concrete_section import ConcreteSection  # noqa: E402
from concreteproperties.design_codes import AS3600  # noqa: E402
from concreteproperties.pre import add_bar  # noqa: E402
from sectionproperties.pre.library import rectangular_section  # noqa: E402


def _bars(Lw, tw, dia, spacing, cover):
    """The pier's vertical bars as xlcore places them (two layers), for one pier."""
    return pier_bars(*(np.array([v], dtype=float) for v in (Lw, tw, dia, spacing, 2.0, cover)))


def reference(Lw, tw, fc, dia, spacing, cover):
    code = AS3600()
    concrete = code.create_concrete_material(compressive_strength=fc)
    steel = code.create_steel_material()
    geom = rectangular_section(d=Lw, b=tw, material=concrete)
    depths, _ = _bars(Lw, tw, dia, spacing, cover)
    area = np.pi * dia**2 / 4
    for y in depths[0][depths[0] > 0]:
        for x in (cover + dia / 2, tw - cover - dia / 2):
            geom = add_bar(geometry=geom, area=area, material=steel, x=x, y=Lw - y, n=16)
    section = ConcreteSection(geom)
    code.assign_concrete_section(section)
    return code, section


def ours(Lw, tw, fc, dia, spacing, cover):
    d, A = _bars(Lw, tw, dia, spacing, cover)
    f = np.array([float(fc)])
    return nm.Rect(
        D=np.array([Lw]),
        b=np.array([tw]),
        fc=f,
        fsy=np.array([500.0]),
        d=d,
        A=A,
        alpha2=a.alpha2(f),
        gamma=a.gamma(f),
    )


CASES = [(2000.0, 200.0, 40, 12, 200, 30), (1200.0, 250.0, 50, 16, 150, 40), (3000.0, 300.0, 65, 20, 250, 40)]


@pytest.mark.parametrize("case", CASES)
@pytest.mark.parametrize("n_frac", [0.0, 0.15, 0.35])
def test_nominal_moment_at_axial_force_within_half_a_percent(case, n_frac):
    code, section = reference(*case)
    sec = ours(*case)
    squash = a.squash_load(sec.fc, sec.D * sec.b - sec.As, sec.As, sec.fsy)[0]
    n = n_frac * squash
    ref = section.ultimate_bending_capacity(theta=0, n=n)
    dn = nm.solve_dn(sec, n, 1e-6 * sec.D, sec.D)
    _, m = nm.forces(sec, dn)
    assert abs(m[0]) == pytest.approx(abs(ref.m_xy), rel=0.005)
    assert dn[0] == pytest.approx(ref.d_n, rel=0.005)


@pytest.mark.parametrize("case", CASES)
@pytest.mark.parametrize("n_frac", [-0.3, 0.0, 0.2, 0.45])
def test_factored_moment_at_design_axial_force_within_half_a_percent(case, n_frac):
    code, section = reference(*case)
    sec = ours(*case)
    squash = a.squash_load(sec.fc, sec.D * sec.b - sec.As, sec.As, sec.fsy)[0]
    n_star = n_frac * squash * (0.6 if n_frac > 0 else 1.0) if n_frac >= 0 else n_frac * sec.As[0] * 500
    factored, _, phi = code.ultimate_bending_capacity(theta=0, n_design=n_star)
    r = interaction(sec, np.array([n_star]))
    assert r["phi_mu"][0] == pytest.approx(abs(factored.m_xy), rel=0.005)
