"""Storey shear and torsion shared among walls by a rigid floor diaphragm.

Mechanics only. Each wall resists force along its own line (a wall at an angle contributes
its components). With wall stiffness k, direction (ux, uy) and a point (px, py) on its line,
the storey's stiffness about the plan origin is K = sum k g g^T, g = (ux, uy, px uy - py ux);
the displacements (dx, dy, rotation) under the storey loads give each wall's force k g.u.
For walls in two orthogonal directions this is the textbook centre-of-rigidity method
(direct shear by k / sum k, torsion by k r / sum k r^2; Taly Ch. 7).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class Storey:
    """Walls of one storey: arrays of equal length."""

    k: np.ndarray
    ux: np.ndarray
    uy: np.ndarray
    px: np.ndarray
    py: np.ndarray

    @property
    def g(self) -> np.ndarray:
        return np.vstack([self.ux, self.uy, self.px * self.uy - self.py * self.ux])  # 3 x walls

    @property
    def K(self) -> np.ndarray:
        g = self.g
        return (g * self.k) @ g.T


class Unstable(ValueError):
    """The walls cannot resist both shear directions and torsion (parallel or concurrent)."""


def centre_of_rigidity(st: Storey) -> tuple[float, float]:
    """The point through which a horizontal force causes no rotation of the floor."""
    K = st.K
    if np.linalg.cond(K) > 1e12:
        raise Unstable("walls cannot resist shear in both directions and torsion")
    f = np.linalg.inv(K)[2]
    return float(-f[1] / f[2]), float(f[0] / f[2])


@dataclass(frozen=True)
class Shares:
    """Wall forces [force units of the loads], walls x load cases."""

    direct: np.ndarray  # from Vx, Vy acting through the centre of rigidity
    torsion: np.ndarray  # from the moment about the centre of rigidity
    total: np.ndarray


def share(st: Storey, vx, vy, m_cr) -> Shares:
    """Forces in each wall for storey shears (vx, vy) and moment m_cr about the centre of
    rigidity (anticlockwise positive); vx, vy, m_cr are arrays over load cases."""
    xr, yr = centre_of_rigidity(st)
    vx, vy, m_cr = np.broadcast_arrays(*(np.atleast_1d(np.asarray(a, dtype=float)) for a in (vx, vy, m_cr)))
    Kinv = np.linalg.inv(st.K)
    gk = st.g.T * st.k[:, None]  # walls x 3
    through_cr = np.vstack([vx, vy, xr * vy - yr * vx])  # force at CR, moment about origin
    direct = gk @ (Kinv @ through_cr)
    torsion = gk @ (Kinv @ np.vstack([np.zeros_like(m_cr), np.zeros_like(m_cr), m_cr]))
    return Shares(direct, torsion, direct + torsion)


def share_with_accidental(st: Storey, vx, vy, m_cr, d_acc) -> Shares:
    """`share`, with an accidental torsion of magnitude d_acc (per load case) added to each
    wall in the sense that increases its force (so with it the forces no longer sum exactly to
    the storey shear). Used for walls within a core and for cores within the building."""
    return Sharing(st).with_accidental(vx, vy, m_cr, d_acc)


class Sharing:
    """`share_with_accidental` of one storey's walls for many calls: what depends on the walls
    alone (centre of rigidity, inverse stiffness, the unit torsion) worked out once (storeys
    alike in plan share their walls; the L tower's 100 storeys asked for it 400 times). The
    same operations as `share` on the same numbers."""

    def __init__(self, st: Storey) -> None:
        self.xr, self.yr = centre_of_rigidity(st)
        self.kinv = np.linalg.inv(st.K)
        self.gk = st.g.T * st.k[:, None]  # walls x 3
        self.unit = self.share(0.0, 0.0, 1.0).torsion[:, 0:1]  # per unit moment, walls x 1

    def share(self, vx, vy, m_cr) -> Shares:
        """`share` of these walls."""
        vx, vy, m_cr = np.broadcast_arrays(
            *(np.atleast_1d(np.asarray(a, dtype=float)) for a in (vx, vy, m_cr))
        )
        through_cr = np.vstack([vx, vy, self.xr * vy - self.yr * vx])  # force at CR, moment about origin
        direct = self.gk @ (self.kinv @ through_cr)
        torsion = self.gk @ (self.kinv @ np.vstack([np.zeros_like(m_cr), np.zeros_like(m_cr), m_cr]))
        return Shares(direct, torsion, direct + torsion)

    def with_accidental(self, vx, vy, m_cr, d_acc) -> Shares:
        """`share_with_accidental` of these walls."""
        base = self.share(vx, vy, m_cr)
        sense = np.where(base.total >= 0, 1.0, -1.0) * np.where(self.unit >= 0, 1.0, -1.0)
        torsion = base.torsion + sense * self.unit * d_acc
        return Shares(base.direct, torsion, base.direct + torsion)
