"""The demo building: an invented 15-storey office tower with a lift core and a stair core.

Every number here is made up to be physically plausible (shears and moments grow toward the
base, gravity accumulates down the building); it is example data, not a design.
"""

from __future__ import annotations

import numpy as np

GRAVITY_G = 2300.0  # kN per storey of dead load reaching the core (invented)
GRAVITY_Q = 650.0  # kN per storey of live load reaching the core (invented)
BASE_SHEAR = {"Wx": 1900.0, "Wy": 2600.0, "Ex": 3800.0, "Ey": 3800.0}  # kN (invented)
SHEAR_POINT = (7.2, 3.0)  # m: where the storey shear acts (invented centre of mass)

COMBINATIONS: list[tuple[str, float, float, str | None, float]] = [
    # name, G factor, Q factor, lateral case, lateral factor
    ("1.35G", 1.35, 0.0, None, 0.0),
    ("1.2G+1.5Q", 1.2, 1.5, None, 0.0),
    ("1.2G+0.6Q+Wx", 1.2, 0.6, "Wx", 1.0),
    ("1.2G+0.6Q+Wy", 1.2, 0.6, "Wy", 1.0),
    ("0.9G-Wx", 0.9, 0.0, "Wx", -1.0),
    ("0.9G-Wy", 0.9, 0.0, "Wy", -1.0),
    ("G+0.3Q+Ex", 1.0, 0.3, "Ex", 1.0),
    ("G+0.3Q+Ey", 1.0, 0.3, "Ey", 1.0),
]


def storeys() -> list[dict]:
    out = [dict(name="GF", level=0.0, height=4.2, slab=250.0)]
    for i in range(1, 15):
        out.append(
            dict(
                name=f"L{i}",
                level=round(4.2 + 3.15 * (i - 1), 3),
                height=3.15,
                slab=250.0 if i == 14 else 200.0,
            )
        )
    return out


PROJECT = dict(
    project_name="Harbourview Lane offices (demo)",
    standard="AS 3600:2018",
    phi_shear=None,
    shear_height="overall wall height",
    pier_fixity="fixed-fixed",
    poisson=0.2,
    earthquake_combinations="G+0.3Q+Ex, G+0.3Q+Ey",
    ductility="limited ductile (mu = 2)",
)

_LIFT = [
    ("LW1", 0.0, 0.0, 6.0, 0.0),
    ("LW2", 6.0, 0.0, 6.0, 5.0),
    ("LW3", 6.0, 5.0, 0.0, 5.0),
    ("LW4", 0.0, 5.0, 0.0, 0.0),
    ("LW5", 3.0, 0.0, 3.0, 5.0),
]
_STAIR = [("SW1", 10.0, 0.0, 13.2, 0.0), ("SW2", 13.2, 0.0, 13.2, 6.5), ("SW3", 13.2, 6.5, 10.0, 6.5)]
# storey range, thickness, f'c, vertical (dia, spacing), horizontal (dia, spacing)
_LIFT_RUNS = [
    ("GF", "L4", 250, 50, (16, 200), (12, 200)),
    ("L5", "L9", 250, 40, (12, 200), (12, 250)),
    ("L10", "L14", 200, 40, (12, 250), (10, 250)),
]
_STAIR_RUNS = [("GF", "L4", 250, 50, (16, 200), (12, 200)), ("L5", "L14", 200, 40, (12, 250), (10, 250))]


def walls() -> list[dict]:
    out = []
    for group, runs in ((_LIFT, _LIFT_RUNS), (_STAIR, _STAIR_RUNS)):
        for wid, x1, y1, x2, y2 in group:
            for lo, hi, t, fc, (vd, vs), (hd, hs) in runs:
                out.append(
                    dict(
                        wall_id=wid,
                        x1=x1,
                        y1=y1,
                        x2=x2,
                        y2=y2,
                        thickness=float(t),
                        storey_from=lo,
                        storey_to=hi,
                        fc=float(fc),
                        fsy=500.0,
                        v_dia=float(vd),
                        v_spacing=float(vs),
                        v_layers=2,
                        h_dia=float(hd),
                        h_spacing=float(hs),
                        h_layers=2,
                        cover=30.0,
                    )
                )
    return out


def openings() -> list[dict]:
    door = dict(
        storey_from="GF",
        storey_to="L14",
        width=1.2,
        sill=0.0,
        head=2.4,
        lintel_bars=3,
        lintel_dia=16.0,
        stirrup_dia=10.0,
        stirrup_legs=2,
        stirrup_spacing=150.0,
    )
    return [
        dict(wall_id="LW1", offset=0.75, label="lift A door", **door),
        dict(wall_id="LW1", offset=3.75, label="lift B door", **door),
        dict(
            wall_id="SW2",
            storey_from="L1",
            storey_to="L14",
            offset=2.0,
            width=0.9,
            sill=1.2,
            head=2.1,
            label="services riser",
        ),
    ]


def core_actions() -> list[dict]:
    """Storey resultants of the whole core per combination (invented loads)."""
    st = storeys()
    tops = np.array([s["level"] + s["height"] for s in st])
    weights = tops / tops.sum()  # inverted-triangle floor forces (common practice, no source)
    rows = []
    for i, s in enumerate(st):
        above = len(st) - i
        for name, g, q, case, lf in COMBINATIONS:
            v = m = 0.0
            if case:
                forces = BASE_SHEAR[case] * weights
                v = lf * forces[i:].sum()
                m = lf * (forces[i:] * (tops[i:] - s["level"])).sum()
            along_y = bool(case) and case.endswith("y")
            rows.append(
                dict(
                    storey=s["name"],
                    combination=name,
                    n=_r((g * GRAVITY_G + q * GRAVITY_Q) * above),
                    vx=_r(0.0 if along_y else v),
                    vy=_r(v if along_y else 0.0),
                    mx=_r(m if along_y else 0.0),
                    my=_r(0.0 if along_y else m),
                    t=0.0,
                    x_v=SHEAR_POINT[0],
                    y_v=SHEAR_POINT[1],
                )
            )
    return rows


def member_actions(core_rows: list[dict]) -> list[dict]:
    """Pier actions for every storey and combination: the core actions shared out by xlcore's
    own stiffness method with 5 % accidental eccentricity, as an analysis might report them."""
    import pandas as pd

    from xlcore import distribution, geometry, stiffness
    from xlcore.model import Opening, Storey, WallRun

    st = [Storey(index=i, **s) for i, s in enumerate(storeys())]
    geom = geometry.derive(st, [WallRun(**w) for w in walls()], [Opening(**o) for o in openings()])
    piers = stiffness.with_stiffness(geom.piers, PROJECT["poisson"], PROJECT["pier_fixity"])
    wl = stiffness.wall_stiffness(piers, PROJECT["poisson"], PROJECT["pier_fixity"])
    core = pd.DataFrame(core_rows).assign(row=range(2, len(core_rows) + 2))
    shares = distribution.core_actions_to_piers(piers, wl, distribution.storey_plans(piers, wl), core, 0.05)
    rows = [
        dict(
            storey=r.storey,
            combination=r.combination,
            member=r.pier_id,
            n=_r(r.n),
            v=_r(r.v),
            m=_r(r.m),
            m_out=None,
        )
        for r in shares.piers.itertuples(index=False)
    ]
    return rows + _lintel_actions(shares.piers, [s["name"] for s in storeys()])


def _lintel_actions(piers, names: list[str]) -> list[dict]:
    """Lift-door lintels: coupling shear = the change in the outer pier's axial force from the
    storey above (the lintel hands it down), M* = V* x span / 2 (contraflexure at mid-span)."""
    rows = []
    for lintel, pier in (("LW1-L1", "LW1-1"), ("LW1-L2", "LW1-3")):
        n = piers[piers.pier_id == pier].set_index(["storey", "combination"]).n
        for (storey, comb), value in n.items():
            i = names.index(storey)
            above = n.get((names[i + 1], comb), 0.0) if i + 1 < len(names) else 0.0
            v = abs(value - above)
            rows.append(
                dict(
                    storey=storey,
                    combination=comb,
                    member=lintel,
                    n=0.0,
                    v=_r(v),
                    m=_r(v * 1.2 / 2),
                    m_out=None,
                )
            )
    return rows


def _r(x: float) -> float:
    """One decimal, and never a negative zero in the sheet."""
    return round(float(x), 1) + 0.0


def sheets() -> dict[str, list[dict] | dict]:
    """Demo data keyed by layout sheet key; records keyed by layout column key."""
    core_rows = core_actions()
    member_rows = member_actions(core_rows)
    return dict(
        project=PROJECT,
        storeys=storeys(),
        walls=walls(),
        openings=openings(),
        member_actions=member_rows,
        core_actions=core_rows,
    )
