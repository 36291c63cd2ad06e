"""Actions given for a whole wall -> actions of the piers that openings cut it into.

Mechanics only (no standard, no workbook). V* is shared by lateral stiffness with flexural
and shear deformation; sharing N* and M* (and core actions) is a later step.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from xlcore.codes.as3600 import elastic_modulus

END_FACTOR = {"fixed-fixed": 12.0, "cantilever": 3.0}


def pier_stiffness(Lw, tw, h, E, nu=0.2, c=12.0):
    """Lateral stiffness k = 1 / (h^3 / (c E I) + 1.2 h / (G A)) [N/mm], all in N and mm.

    c = 12 fixed against rotation at both ends, 3 cantilever; G = E / (2 (1 + nu));
    1.2 is the shear shape factor of a rectangle. Flexure plus shear deflection of a pier.
    """
    Lw, tw, h = (np.asarray(a, dtype=float) for a in (Lw, tw, h))
    E = np.asarray(E, dtype=float)
    inertia = tw * Lw**3 / 12.0
    area = tw * Lw
    shear_modulus = E / (2.0 * (1.0 + nu))
    return 1.0 / (h**3 / (c * E * inertia) + 1.2 * h / (shear_modulus * area))


def with_stiffness(piers: pd.DataFrame, nu: float, fixity: str) -> pd.DataFrame:
    """Add each pier's free height `h` [mm], Ec [MPa] and stiffness `k` [N/mm]."""
    out = piers.copy()
    out["h"] = out.Ho.where(out.Ho.notna(), out.Hc)  # between slab/sill and lintel
    out["Ec"] = elastic_modulus(out.fc.to_numpy())
    out["k"] = pier_stiffness(out.Lw, out.tw, out.h, out.Ec, nu, END_FACTOR[fixity])
    return out


def pier_actions(piers: pd.DataFrame, actions: pd.DataFrame) -> pd.DataFrame:
    """One row per storey x pier x combination with V* and where it came from.

    `piers` needs storey, wall_id, pier_id, position, k. Actions naming a pier (or an uncut
    wall) pass through with share 1; actions naming a wall that openings cut at that storey
    are split among its piers in proportion to k. Shares at a storey sum to 1 per wall.
    """
    cols = ["storey", "wall_id", "pier_id", "position", "k"]
    base = actions[["row", "storey", "combination", "member", "n", "v", "m"]]
    direct = base.merge(piers[cols], left_on=["storey", "member"], right_on=["storey", "pier_id"])
    direct["share"] = 1.0
    direct["source"] = "given"
    cut = piers.loc[piers.position > 0, cols]
    shared = base.merge(cut, left_on=["storey", "member"], right_on=["storey", "wall_id"])
    total = shared.groupby(["storey", "combination", "wall_id"]).k.transform("sum")
    shared["share"] = shared.k / total
    shared["source"] = "wall"
    shared["v_wall"] = shared.v
    shared["v"] = shared.v * shared.share
    shared[["n", "m"]] = np.nan  # not shared yet: only V* is used by the shear check
    out = pd.concat([direct, shared], ignore_index=True)
    out["v_wall"] = out.get("v_wall", pd.Series(np.nan, index=out.index))
    return out.drop(columns=["member"])
