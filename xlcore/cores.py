"""Separate cores are separate sections: the building's storey resultants shared among its cores,
and each core's actions shared to its own walls and piers. Mechanics only: no standard, no
workbook.

A core is the group of walls with one core ID (walls sheet); a building without core IDs is one
core named "". Each core is its own plane section (section properties, stress, strength, pier
N*/M*). Building-level storey resultants (core-actions rows with a blank core) are shared among
the cores present at that storey (docs/engineering-basis.md, Sharing actions):

- shear and torsion by a rigid floor over the cores, each core a pair of springs along the
  principal directions of its flexural rigidity E [[Iyy, Ixy], [Ixy, Ixx]] at its own centre of
  rigidity (the 3-degree-of-freedom solve of `diaphragm`): cores of the same height under the
  same load shape deflect together as cantilevers, so they share in proportion to EI about each
  direction (Smith & Coull, Tall Building Structures, 1991, the uniform-wall case). A core's own
  torsional stiffness is not counted: the floor's rotation is resisted by the couple of the
  cores' shears, so each core takes its share at its centre of rigidity with T = 0 there;
- the overturning moments (My*, Mx*) by the same rigidity, at one curvature:
  (My_c, Mx_c) = EI_c (sum EI)^-1 (My*, Mx*);
- the axial force by area, N_c = N* A_c / A (a stated assumption: gravity load reaches the
  cores by tributary area in reality, so this is an estimate to be replaced by per-core rows
  where known). With the building's moments about the centroid of all the cores' areas, the
  couples N_c d_c cancel, so sum N_c = N*, sum (My_c + N_c (x_c - x_bar)) = My*, likewise Mx*.

Shear statics: sum Vx_c = Vx*, sum Vy_c = Vy*, and about the building's centre of rigidity
(xr, yr): sum ((x_c - xr) Vy_c - (y_c - yr) Vx_c) = T* + Vy* (xv - xr) - Vx* (yv - yr), with
(x_c, y_c) each core's centre of rigidity and (xv, yv) where the storey shear acts (accidental
eccentricity apart, which increases each core's force by design).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from xlcore import distribution
from xlcore.checks import plain
from xlcore.mechanics import diaphragm

ACTION_KEYS = ["row", "storey", "combination", "core", "n", "vx", "vy", "mx", "my", "t", "x_v", "y_v", "acc"]


def plans_by_core(piers: pd.DataFrame, walls: pd.DataFrame) -> dict[str, dict[str, distribution.StoreyPlan]]:
    """Each core's storey plans (net section, centre of rigidity), keyed by core then storey."""
    return {
        core: distribution.storey_plans(piers[piers.core == core], walls[walls.core == core])
        for core in dict.fromkeys(piers.core)
    }


def rigidity(piers: pd.DataFrame, plan: distribution.StoreyPlan) -> np.ndarray:
    """Flexural rigidity of one core at one storey, E [[Iyy, Ixy], [Ixy, Ixx]] [MN m^2], about
    its own centroid; E the area-weighted mean Ec of its piers (walls of one grade: that Ec)."""
    area = (piers.Lw * piers.tw).to_numpy(dtype=float)
    e = float((piers.Ec.to_numpy(dtype=float) * area).sum() / area.sum())
    sec = plan.section
    return e * np.array([[sec.iyy, sec.ixy], [sec.ixy, sec.ixx]])


@dataclass
class CoreSplit:
    """Each core's actions and, where building resultants were shared, the shares."""

    actions: pd.DataFrame  # ACTION_KEYS: one row per storey x combination x core
    shares: pd.DataFrame  # one row per storey x combination x core shared from a blank-core row


def share_among_cores(
    piers: pd.DataFrame,
    plans: dict[str, dict[str, distribution.StoreyPlan]],
    core_rows: pd.DataFrame,
    accidental: float = 0.0,
) -> CoreSplit:
    """Each core's actions from the core-actions rows: a row naming a core is that core's own
    (accidental eccentricity within the core); a blank-core row is the building's and is shared
    among the cores at its storey (module docstring). With one core at the storey, that core
    takes the row unchanged (today's single-core behaviour, accidental within the core). With
    several, the accidental eccentricity (fraction x the plan dimension of all the cores) acts
    at the building level, in the sense that increases each core's force, and the cores take
    their shares at their centres of rigidity without a further accidental part."""
    rows = core_rows.copy()
    if "core" not in rows:
        rows["core"] = ""
    rows["core"] = rows.core.fillna("").astype(object)
    own = rows[rows.core != ""].assign(acc=accidental)
    parts, shares = [own], []
    piers_at = _Groups(piers, ["storey", "core"])  # each storey x core's piers, made where asked
    blank = rows[rows.core == ""]
    if pd.Index(rows.row).is_unique:
        # the rows are sorted by `row` below, so the parts' order is free: the storeys of one
        # core take their rows in one part per core, not one per storey (the L tower: 100)
        one_of = {s: _alone([c for c in plans if s in plans[c]]) for s in pd.unique(blank.storey)}
        alone = [one_of.get(storey) for storey in blank.storey.to_numpy()]
        for core in dict.fromkeys(c for c in alone if c is not None):
            mine = np.array([c == core for c in alone], dtype=bool)
            parts.append(blank[mine].assign(core=core, acc=accidental))
        # several cores, or none: the storeys below. A mask as an array: an empty list (no blank
        # row) would be read as a list of columns and leave a table without any
        blank = blank[np.array([c is None for c in alone], dtype=bool)]
    for storey, cs in blank.groupby("storey", sort=False):
        here = [c for c in plans if storey in plans[c]]
        if not here:  # no walls at this storey: nothing to share to
            continue
        if len(here) == 1:
            parts.append(cs.assign(core=here[0], acc=accidental))
            continue
        a, b = _share_storey(storey, here, piers_at, plans, cs, accidental)
        parts.append(a)
        shares.append(b)
    actions = pd.concat(parts, ignore_index=True) if parts else pd.DataFrame(columns=ACTION_KEYS)
    actions = actions.sort_values("row", kind="stable").reset_index(drop=True)
    table = pd.concat(shares, ignore_index=True) if shares else pd.DataFrame()
    return CoreSplit(actions[[k for k in ACTION_KEYS if k in actions]], table)


def _alone(cores: list[str]) -> str | None:
    """The one core at a storey, None where there are several or none."""
    return cores[0] if len(cores) == 1 else None


class _Groups:
    """A table's groups by `keys` as sub-tables, each made when first asked for (a sub-table
    per storey x core cost more than the sharing where only some storeys have several cores)."""

    def __init__(self, table: pd.DataFrame, keys: list[str]) -> None:
        self.table = table
        self.at = table.groupby(keys, sort=False).indices

    def __getitem__(self, key) -> pd.DataFrame:
        return self.table.iloc[self.at[key]]


def _share_storey(storey: str, cores: list[str], piers_at, plans, cs: pd.DataFrame, accidental: float):
    """One storey's building rows shared among its cores: per-core action rows and the shares."""
    secs = [plans[c][storey].section for c in cores]
    centres = np.array([plans[c][storey].centre for c in cores], dtype=float)  # validated stable
    ei = np.array([rigidity(piers_at[(storey, c)], plans[c][storey]) for c in cores])  # cores x 2 x 2
    # principal springs of each core: E I1, E I2 along their axes, at the core's centre of rigidity
    lam, vec = np.linalg.eigh(ei)  # ascending; columns are the directions
    k = np.clip(lam, 0.0, None).ravel()
    ux, uy = vec[:, 0, :].ravel(), vec[:, 1, :].ravel()
    px, py = np.repeat(centres[:, 0], 2), np.repeat(centres[:, 1], 2)
    st = diaphragm.Storey(k, ux, uy, px, py)
    xr, yr = diaphragm.centre_of_rigidity(st)
    vx, vy, t = (cs[c].to_numpy(dtype=float) for c in ("vx", "vy", "t"))
    xv = cs.x_v.astype(float).fillna(xr).to_numpy()
    yv = cs.y_v.astype(float).fillna(yr).to_numpy()
    m_cr = t + vy * (xv - xr) - vx * (yv - yr)
    bx = max(s.xmax for s in secs) - min(s.xmin for s in secs)
    by = max(s.ymax for s in secs) - min(s.ymin for s in secs)
    d_acc = accidental * (np.abs(vy) * bx + np.abs(vx) * by)
    sh = diaphragm.share_with_accidental(st, vx, vy, m_cr, d_acc)  # springs x combos
    n_c = len(cores)
    pick = np.repeat(np.eye(n_c), 2, axis=1)  # cores x springs
    fx, fy = pick @ (sh.total * ux[:, None]), pick @ (sh.total * uy[:, None])  # cores x combos
    dx, dy = pick @ (sh.direct * ux[:, None]), pick @ (sh.direct * uy[:, None])
    area = np.array([s.area for s in secs])
    n = cs.n.to_numpy(dtype=float)
    n_core = (area / area.sum())[:, None] * n[None, :]
    curvature = np.linalg.solve(ei.sum(axis=0), np.vstack([cs.my.to_numpy(float), cs.mx.to_numpy(float)]))
    my_core = np.einsum("cj,jk->ck", ei[:, 0, :], curvature)  # cores x combos
    mx_core = np.einsum("cj,jk->ck", ei[:, 1, :], curvature)
    arm = (centres[:, 0:1] - xr) * fy - (centres[:, 1:2] - yr) * fx  # moment about the building CR
    arm_t = (centres[:, 0:1] - xr) * (fy - dy) - (centres[:, 1:2] - yr) * (fx - dx)  # its torsional part

    rows, combos = cs.row.to_numpy(), cs.combination.to_numpy()
    tile = lambda a: np.tile(np.asarray(a), len(cs))  # noqa: E731  (per core -> combo-major rows)
    flat = lambda a: a.T.ravel()  # noqa: E731  (cores x combos -> combo-major rows)
    actions = pd.DataFrame(
        dict(
            row=np.repeat(rows, n_c),
            storey=storey,
            combination=np.repeat(combos, n_c),
            core=tile(np.array(cores, dtype=object)),
            n=flat(n_core),
            vx=flat(fx),
            vy=flat(fy),
            mx=flat(mx_core),
            my=flat(my_core),
            t=0.0,
            x_v=tile(centres[:, 0]),
            y_v=tile(centres[:, 1]),
            acc=0.0,  # the building's accidental torsion is already in the core's shear
        )
    )

    def pct(part, whole):
        whole = np.broadcast_to(whole, part.shape)
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):  # blank where not finite
            return np.where(np.abs(whole) > 1e-9, 100.0 * part / np.where(whole == 0, 1.0, whole), np.nan)

    table = actions.drop(columns=["acc", "t", "x_v", "y_v"]).assign(
        ei_yy=tile(ei[:, 0, 0] * 1e-3),
        ei_xx=tile(ei[:, 1, 1] * 1e-3),
        ei_xy=tile(ei[:, 0, 1] * 1e-3),
        area=tile(area),
        xc=tile([s.xc for s in secs]),
        yc=tile([s.yc for s in secs]),
        xr_core=tile(centres[:, 0]),
        yr_core=tile(centres[:, 1]),
        xr=xr,
        yr=yr,
        direct_x=flat(dx),
        direct_y=flat(dy),
        m_res=flat(arm),
        m_tors=flat(arm_t),
        m_cr=np.repeat(m_cr, n_c),
        m_acc=np.repeat(d_acc, n_c),
        share_n=flat(pct(n_core, n[None, :])),
        share_vx=flat(pct(fx, vx[None, :])),
        share_vy=flat(pct(fy, vy[None, :])),
        share_t=flat(pct(arm_t, m_cr[None, :])),
        share_mx=flat(pct(mx_core, cs.mx.to_numpy(float)[None, :])),
        share_my=flat(pct(my_core, cs.my.to_numpy(float)[None, :])),
    )
    table["working"] = _working(table, area.sum())
    return actions, table


def _working(t: pd.DataFrame, area_total: float) -> list[str]:
    """The sharing of one row in words and numbers."""
    cols = (t.ei_yy, t.ei_xx, t.area, t.vx, t.direct_x, t.vy, t.direct_y, t.n, t.my, t.mx)
    cols += (t.xr_core, t.yr_core)
    return [
        f"EI about y {eyy:.4g}, about x {exx:.4g} GNm2 (principal springs at the core's CR); "
        f"Vx = direct {dx:.1f} + torsion {vx - dx:.1f} = {vx:.1f} kN; Vy = direct {dy:.1f} + torsion "
        f"{vy - dy:.1f} = {vy:.1f} kN; N = N* x {a:.3f} / {area_total:.3f} m2 = {n:.1f} kN; "
        f"(My, Mx) = EI_core (sum EI)^-1 (My*, Mx*) = ({my:.1f}, {mx:.1f}) kNm about the core's "
        f"centroid; shear acts at the core's CR ({xr:.3f}, {yr:.3f}) m, T = 0 there"
        for eyy, exx, a, vx, dx, vy, dy, n, my, mx, xr, yr in zip(*plain(*cols), strict=True)
    ]


def core_actions_to_piers(
    piers: pd.DataFrame,
    walls: pd.DataFrame,
    plans: dict[str, dict[str, distribution.StoreyPlan]],
    actions: pd.DataFrame,
    local_moment: str = distribution.LOCAL_BESIDE_OPENINGS,
    text: bool = True,
) -> distribution.CoreSharing:
    """Every core's actions (`share_among_cores(...).actions`) shared to its own walls and piers
    (`distribution.core_actions_to_piers` over that core's section alone); tables with a `core`
    column. Without `text` the piers' `source` is blank (`distribution.core_source_of`)."""
    parts: list[tuple[str, distribution.CoreBlocks]] = []
    layout: distribution.Layout | None = distribution.Layout()
    for core, rows in actions.groupby("core", sort=False):
        out = distribution.core_actions_to_piers(
            piers[piers.core == core], walls[walls.core == core], plans[core], rows, 0.0, local_moment, text
        )
        parts += [(core, blocks) for _, blocks in out.parts]  # (tables made when asked for)
        if layout is not None and out.layout is not None:  # the cores' blocks one after another
            layout.walls += out.layout.walls
            layout.piers += out.layout.piers
        else:
            layout = None
    cols = distribution.ACTION_COLUMNS + distribution.CORE_PIER_EXTRA + ["core"]
    if not parts:
        return distribution.CoreSharing(pd.DataFrame(columns=cols), pd.DataFrame())
    return distribution.CoreSharing(layout=layout, parts=parts)
