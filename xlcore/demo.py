"""The demo building: an invented 15-storey office tower with a lift core and a stair core,
3.55 m apart and joined only by the floor slabs, so each is its own core (core IDs).

Every number here is made up to be physically plausible (shears and moments grow toward the
base, gravity accumulates down the building); it is example data, not a design.
"""

from __future__ import annotations

import numpy as np

from xlcore.layout import STANDARDS

GRAVITY_G = 2450.0  # kN per storey of dead load reaching the two cores (invented)
GRAVITY_Q = 700.0  # kN per storey of live load reaching the two cores (invented)
BASE_SHEAR = {"Wx": 1950.0, "Wy": 2600.0, "Ex": 3300.0, "Ey": 3300.0}  # kN (invented)
SHEAR_POINT = (6.9, 3.2)  # m: where the storey shear acts (invented centre of mass)
ACCIDENTAL = 0.05  # of the plan dimension, in the analysis the member actions stand for (invented)

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
EARTHQUAKE = ", ".join(name for name, _g, _q, case, _f in COMBINATIONS if case and case.startswith("E"))


def storeys() -> list[dict]:
    out = [dict(name="GF", level=0.0, height=4.35, slab=250.0)]
    for i in range(1, 15):
        out.append(
            dict(
                name=f"L{i}",
                level=round(4.35 + 3.2 * (i - 1), 3),
                height=3.2,
                slab=250.0 if i == 14 else 200.0,
            )
        )
    return out


# The demo is also checked to a second standard (the comparison sheet): the first one offered
# besides its own (ACI 318-19 once the workbook offers it; until then AS 3600 against itself)
_ALSO = next((s for s in STANDARDS if s != "AS 3600:2018"), "AS 3600:2018")

PROJECT = dict(
    project_name="Harbourview Lane offices (demo)",
    standard="AS 3600:2018",
    compare_standard=_ALSO,
    phi_shear=None,
    shear_height="overall wall height",
    pier_fixity="fixed-fixed",
    earthquake_combinations=EARTHQUAKE,
    poisson=0.2,
    ductility="limited ductile (mu = 2)",
)

# Two cores 3.55 m apart, joined only by the floor slabs: each its own section (core IDs).
_LIFT = [  # a two-car lift shaft: a box with a dividing wall, both doors in the south face
    ("LiftS", 0.0, 0.0, 6.35, 0.0),
    ("LiftE", 6.35, 0.0, 6.35, 5.15),
    ("LiftN", 6.35, 5.15, 0.0, 5.15),
    ("LiftW", 0.0, 5.15, 0.0, 0.0),
    ("LiftMid", 3.2, 0.0, 3.2, 5.15),
]
_STAIR = [  # a stair shaft open to the west, a services riser in its east wall
    ("StairS", 9.9, 0.0, 13.05, 0.0),
    ("StairE", 13.05, 0.0, 13.05, 6.7),
    ("StairN", 13.05, 6.7, 9.9, 6.7),
]
# storey range, thickness, f'c, vertical (dia, spacing), horizontal (dia, spacing)
_LIFT_RUNS = [
    ("GF", "L4", 250, 50, (20, 200), (12, 200)),
    ("L5", "L9", 250, 40, (12, 200), (12, 250)),
    ("L10", "L14", 200, 40, (12, 250), (10, 250)),
]
_STAIR_RUNS = [("GF", "L4", 250, 50, (16, 200), (12, 200)), ("L5", "L14", 200, 40, (12, 250), (10, 250))]


def walls() -> list[dict]:
    out = []
    for core, group, runs in (("lift", _LIFT, _LIFT_RUNS), ("stair", _STAIR, _STAIR_RUNS)):
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
                        core=core,
                    )
                )
    return out


DOOR_WIDTH = 1.15  # m, structural opening of each lift door (invented)


def openings() -> list[dict]:
    door = dict(
        storey_from="GF",
        storey_to="L14",
        width=DOOR_WIDTH,
        sill=0.0,
        head=2.35,
        lintel_bars=3,
        lintel_dia=16.0,
        stirrup_dia=10.0,
        stirrup_legs=2,
        stirrup_spacing=150.0,
        diag_bars=4,  # coupling beams over the lift doors: two groups of 4N24 (invented)
        diag_dia=24.0,
    )
    return [
        dict(wall_id="LiftS", offset=0.95, label="car 1 door", **door),
        dict(wall_id="LiftS", offset=4.25, label="car 2 door", **door),
        dict(
            wall_id="StairE",
            storey_from="L1",
            storey_to="L14",
            offset=2.35,
            width=0.85,
            sill=1.15,
            head=2.05,
            label="services riser",
            lintel_bars=4,  # a deep lintel without diagonals: strut-and-tie (invented)
            lintel_dia=20.0,
            stirrup_dia=10.0,
            stirrup_legs=2,
            stirrup_spacing=150.0,
        ),
    ]


ZONE_DIAS = (28.0, 24.0)  # end-zone bars of the lowest third of the storeys, then the next (invented)
ZONE_TIE = (10.0, 125.0)  # tie diameter and spacing around end-zone bars [mm] (invented; within
# the Section 14 limit min(6 db, 150 mm) = 144 mm for the N24 zones)
ZONE_MAX = 600.0  # mm: longest end zone the demo uses


def end_zones() -> list[dict]:
    """End-zone bars as a designer might give them: at every free edge of every wall (its
    ends and the jambs of its openings) in the lower two thirds of the storeys, N28 in the
    lowest third and N24 in the middle third. Each zone holds the most bars a face (4, 3 or
    2) that fit at the clear-gap rule within the lesser of 600 mm and half its pier less 2 db (so that two
    zones facing each other keep the clear gap between their innermost bars). Walls,
    storeys and edges come from `walls()`, `openings()` and `storeys()`, so the function
    follows any change to those."""
    from xlcore import geometry
    from xlcore.codes import as3600
    from xlcore.mechanics import bars
    from xlcore.model import Opening, Storey, WallRun

    st = [Storey(index=i, **s) for i, s in enumerate(storeys())]
    runs = [WallRun(**w) for w in walls()]
    at = geometry.run_at(runs, st)
    piers = geometry.derive(st, runs, [Opening(**o) for o in openings()]).piers
    piers = piers[piers.storey_index < len(st) * len(ZONE_DIAS) // 3]
    tie, tie_s = ZONE_TIE
    # (wall, edge) -> storey by storey: (storey index, bars, dia, length)
    found: dict[tuple[str, str], list[tuple[int, int, float, float]]] = {}
    for si, wall_id, lw, ea, eb in zip(
        piers.storey_index, piers.wall_id, piers.Lw, piers.edge_a, piers.edge_b, strict=True
    ):
        run = at[(si, wall_id)]
        dia = ZONE_DIAS[si * 3 // len(st)]
        gap = float(as3600.wall_min_clear_gap(dia))
        for per_face in (4, 3, 2):
            length = float(np.ceil(bars.zone_min_length(per_face, 1, dia, run.cover, tie, gap) / 50.0) * 50.0)
            if length <= min(ZONE_MAX, lw / 2 - 2 * dia):  # 3 db clear between facing zones
                for edge in (ea, eb):
                    found.setdefault((wall_id, edge), []).append((si, per_face * run.v_layers, dia, length))
                break
    rows: list[dict] = []
    for (wall_id, edge), lst in found.items():
        lst.sort()
        start = 0
        for j in range(1, len(lst) + 1):
            if j < len(lst) and lst[j][1:] == lst[start][1:] and lst[j][0] == lst[j - 1][0] + 1:
                continue
            _, n, dia, length = lst[start]
            rows.append(
                dict(
                    wall_id=wall_id,
                    storey_from=st[lst[start][0]].name,
                    storey_to=st[lst[j - 1][0]].name,
                    location=edge,
                    bars=n,
                    dia=dia,
                    length=length,
                    tie_dia=tie,
                    tie_spacing=tie_s,
                )
            )
            start = j
    # wall by wall, lowest storeys first, edges in order along the wall
    wall_rank = {w: i for i, w in enumerate(dict.fromkeys(w.wall_id for w in runs))}
    edge_rank = {k: i for i, k in enumerate(found)}
    storey_rank = {s.name: s.index for s in st}
    rows.sort(
        key=lambda r: (
            wall_rank[r["wall_id"]],
            storey_rank[r["storey_from"]],
            edge_rank[(r["wall_id"], r["location"])],
        )
    )
    return rows


def core_actions() -> list[dict]:
    """The building's storey resultants per combination (invented loads), for the two cores
    together: xlcore shares them among the cores (blank core)."""
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
                    mx=_r(m if along_y else 0.0),  # +Vy bends the core north: the north side compresses
                    my=_r(0.0 if along_y else m),  # +Vx bends it east: the east side compresses
                    t=0.0,
                    x_v=SHEAR_POINT[0],
                    y_v=SHEAR_POINT[1],
                )
            )
    return rows


def member_actions(core_rows: list[dict]) -> list[dict]:
    """Pier actions for every storey and combination: the building's resultants shared among
    the two cores and then to each core's walls and piers by xlcore's own method, with 5 %
    accidental eccentricity, as an analysis might report them."""
    import pandas as pd

    from xlcore import cores, geometry
    from xlcore.mechanics import stiffness
    from xlcore.model import Opening, Storey, WallRun

    st = [Storey(index=i, **s) for i, s in enumerate(storeys())]
    geom = geometry.derive(st, [WallRun(**w) for w in walls()], [Opening(**o) for o in openings()])
    piers = stiffness.with_stiffness(geom.piers, PROJECT["poisson"], PROJECT["pier_fixity"])
    wl = stiffness.wall_stiffness(piers, PROJECT["poisson"], PROJECT["pier_fixity"])
    plans = cores.plans_by_core(piers, wl)
    core = pd.DataFrame(core_rows).assign(row=range(2, len(core_rows) + 2))
    split = cores.share_among_cores(piers, plans, core, ACCIDENTAL)
    shares = cores.core_actions_to_piers(piers, wl, plans, split.actions)
    shares.piers["order"] = shares.piers.storey.map({s.name: s.index for s in st})
    ordered = shares.piers.sort_values(["order", "row"], kind="stable")
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
        for r in ordered.itertuples(index=False)
    ]
    return rows + _lintel_actions(shares.piers, geom)


COUPLING_DEGREE = 0.5
"""Share of a coupled wall's overturning moment carried as an axial couple between the piers
either side of an opening (invented example value; coupled walls commonly lie between about 0.3
and 0.7)."""

CONCRETE_WEIGHT = 25.0  # kN/m3, for the lintels' self-weight


def _lintel_actions(pier_actions, geom) -> list[dict]:
    """Lintel actions for every lintel the demo's openings make (example data, derived, not
    analysed). Coupling statics: the piers either side of an opening carry COUPLING_DEGREE of
    their wall's overturning moment M as an axial couple N L_c (L_c between the two piers'
    centroids); the lintels hand that N down storey by storey, so the lintel at a storey takes
    dN = kappa dM / L_c = kappa V_wall h / L_c (dM/dh = V, h the storey height, V_wall the sum
    of the wall's pier shears there). An opening with a sill shares that with the wall below the
    sill, in proportion to depth: the lintel takes D / (D + sill). Added: the lintel's own weight
    at each pier face, G factor x 25 kN/m3 x b D ln / 2. M* = V* ln / 2 (contraflexure at
    mid-span). An opening at a wall end (no pier on one side) gets the self-weight only."""
    heights = {s["name"]: s["height"] for s in storeys()}
    g_factor = {name: g for name, g, *_ in COMBINATIONS}
    v_wall = pier_actions.groupby(["storey", "combination", "wall_id"]).v.sum()
    rows = []
    piers = geom.piers
    for lin in geom.lintels.itertuples(index=False):
        here = piers[(piers.storey == lin.storey) & (piers.wall_id == lin.wall_id)]
        left = here[(here.end - lin.offset).abs() < 1e-6]
        right = here[(here.start - (lin.offset + lin.span)).abs() < 1e-6]
        lever = (
            float((right.start + right.end).iloc[0] - (left.start + left.end).iloc[0]) / 2
            if len(left) and len(right)
            else None
        )
        depth = lin.depth / 1000.0
        sill = _sill(lin)
        share = depth / (depth + sill)
        weight = CONCRETE_WEIGHT * lin.tw / 1000.0 * depth * lin.span / 2
        for comb in g_factor:
            vw = float(v_wall.get((lin.storey, comb, lin.wall_id), 0.0))
            couple = COUPLING_DEGREE * abs(vw) * heights[lin.storey] / lever * share if lever else 0.0
            v = couple + g_factor[comb] * weight
            rows.append(
                dict(
                    storey=lin.storey,
                    combination=comb,
                    member=lin.lintel_id,
                    n=0.0,
                    v=_r(v),
                    m=_r(v * lin.span / 2),
                    m_out=None,
                )
            )
    return rows


def _sill(lintel) -> float:
    """Sill height [m] of the opening under a lintel, from the demo's openings."""
    for o in openings():
        if o["wall_id"] == lintel.wall_id and abs(o["offset"] - lintel.offset) < 1e-9:
            return float(o["sill"])
    return 0.0


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
        end_zones=end_zones(),
        member_actions=member_rows,
        core_actions=core_rows,
    )
