"""Lateral stiffness of piers and walls in their own plane, flexure plus shear deformation.

Mechanics only. N and mm inside; stiffness in N/mm.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore.codes.as3600 import elastic_modulus

END_FACTOR = {"fixed-fixed": 12.0, "cantilever": 3.0}


def flexibility(L, t, h, E, nu=0.2, c=12.0):
    """Deflection per unit force h^3 / (c E I) + 1.2 h / (G A) [mm/N] of a rectangular member.

    c = 12 fixed against rotation at both ends, 3 cantilever; G = E / (2 (1 + nu)); 1.2 is the
    shear shape factor of a rectangle (docs/engineering-basis.md, Sharing actions; Taly Ch. 7)."""
    L, t, h, E = (np.asarray(a, dtype=float) for a in (L, t, h, E))
    return h**3 / (c * E * t * L**3 / 12.0) + 1.2 * h / (E / (2.0 * (1.0 + nu)) * t * L)


def pier_stiffness(Lw, tw, h, E, nu=0.2, c=12.0):
    """Lateral stiffness k = 1 / (h^3 / (c E I) + 1.2 h / (G A)) [N/mm]."""
    return 1.0 / flexibility(Lw, tw, h, E, nu, c)


def with_stiffness(piers: pd.DataFrame, nu: float, fixity: str) -> pd.DataFrame:
    """Add each pier's free height `h` [mm], Ec [MPa] and stiffness `k` [N/mm]."""
    out = piers.copy()
    out["h"] = out.Ho.where(out.Ho.notna(), out.Hc)  # between slab/sill and lintel
    out["Ec"] = elastic_modulus(out.fc.to_numpy())
    out["k"] = pier_stiffness(out.Lw, out.tw, out.h, out.Ec, nu, END_FACTOR[fixity])
    return out


def wall_stiffness(piers: pd.DataFrame, nu: float, fixity: str) -> pd.DataFrame:
    """Stiffness of every wall at every storey [N/mm], from `with_stiffness` piers.

    A wall without openings is one member of the storey clear height. A wall with openings:
    the solid wall's flexibility, less that of a solid strip the height of the openings, plus
    the flexibility of its piers acting in parallel (Taly Ch. 7 method); all members with the
    same end condition.
    """
    c = END_FACTOR[fixity]
    g = piers.groupby(["storey", "wall_id"], sort=False)
    walls = g.agg(
        storey_index=("storey_index", "first"),
        L=("wall_length", "first"),
        tw=("tw", "first"),
        Hc=("Hc", "first"),
        strip=("strip", "first"),
        Ec=("Ec", "first"),
        k_piers=("k", "sum"),
        wx=("wx", "first"),
        wy=("wy", "first"),
        ux=("ux", "first"),
        uy=("uy", "first"),
        n_piers=("pier_id", "size"),
        core=("core", "first"),
        H_wall=("H_wall", "first"),
    ).reset_index()
    L = walls.L * 1000.0
    solid = flexibility(L, walls.tw, walls.Hc, walls.Ec, nu, c)
    cut = walls.strip.notna()
    strip = flexibility(L, walls.tw, walls.strip.fillna(0.0), walls.Ec, nu, c)
    walls["k"] = np.where(cut, 1.0 / (solid - strip + 1.0 / walls.k_piers), 1.0 / solid)
    walls["k_storey"] = walls.k
    walls["k_solid"] = 1.0 / solid
    walls["mx"] = walls.wx + walls.ux * walls.L / 2  # a point on the wall's line of action [m]
    walls["my"] = walls.wy + walls.uy * walls.L / 2
    return walls


STOREY_STIFFNESS, WHOLE_HEIGHT = "one storey's stiffness", "whole-height cantilever"  # layout.WALL_SHARING


def sharing_stiffness(walls: pd.DataFrame, nu: float, basis: str) -> pd.DataFrame:
    """The stiffness `k` [N/mm] that shares a core's storey shear among its walls.

    One storey's stiffness (`wall_stiffness`, the pier end condition) as it is, or each wall as
    a cantilever over its overall height H (base of its lowest storey to the top of its highest),
    flexure + shear, k = 1 / (H^3 / (3 E I) + 1.2 H / (G A)) with the storey's thickness and Ec,
    softened by openings in the same ratio as over one storey (k_storey / k of the solid wall
    over the storey). Tall walls of one core deflect together as cantilevers, so this shares by
    flexural rigidity (docs/engineering-basis.md, Sharing actions: Smith & Coull's uniform-wall
    case within a core); the opening ratio is common practice, no source."""
    if basis != WHOLE_HEIGHT:
        return walls
    out = walls.copy()
    cant = 1.0 / flexibility(out.L * 1000.0, out.tw, out.H_wall, out.Ec, nu, END_FACTOR["cantilever"])
    out["k"] = cant * out.k_storey / out.k_solid
    return out
