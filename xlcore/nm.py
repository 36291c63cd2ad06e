"""Axial force and bending of reinforced-concrete sections by strain compatibility.

Section mechanics only: the stress block and material constants are passed in, so a standard
(or a test reproducing another edition) supplies them. Vectorised over rows: every argument is
an array with one entry (or one row of bars) per case. N and mm; compression positive.

A rectangular section of depth D (in the bending plane) and width b, bars at depths d from the
compressive face with areas A (rows x bars, zero area for padding). Concrete: a rectangular
block of intensity alpha2 f'c over gamma dn (at most D). Steel: elastic-plastic. Bars inside the
block displace concrete when `deduct` is true. Moments are about mid-depth.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class Rect:
    """Rows of rectangular sections with bars; all arrays, bars shaped rows x n."""

    D: np.ndarray
    b: np.ndarray
    fc: np.ndarray
    fsy: np.ndarray
    d: np.ndarray  # bar depths from the compressive face
    A: np.ndarray  # bar areas
    alpha2: np.ndarray
    gamma: np.ndarray
    eps_cu: float = 0.003
    Es: float = 200_000.0
    deduct: bool = True

    def flipped(self) -> Rect:
        """The same sections bent the other way (compressive face swapped)."""
        return Rect(
            self.D,
            self.b,
            self.fc,
            self.fsy,
            self.D[:, None] - self.d,
            self.A,
            self.alpha2,
            self.gamma,
            self.eps_cu,
            self.Es,
            self.deduct,
        )

    @property
    def As(self) -> np.ndarray:
        return self.A.sum(axis=1)

    @property
    def d0(self) -> np.ndarray:
        """Depth of the extreme tension bar."""
        return np.where(self.A > 0, self.d, -np.inf).max(axis=1)


def forces(sec: Rect, dn) -> tuple[np.ndarray, np.ndarray]:
    """Nominal (N, M) for neutral-axis depths dn (one per row)."""
    dn = np.asarray(dn, dtype=float)
    depth = np.minimum(sec.gamma * dn, sec.D)
    conc_stress = sec.alpha2 * sec.fc
    cc = conc_stress * depth * sec.b
    strain = sec.eps_cu * (dn[:, None] - sec.d) / dn[:, None]
    stress = np.clip(sec.Es * strain, -sec.fsy[:, None], sec.fsy[:, None])
    if sec.deduct:
        stress = stress - np.where(sec.d < depth[:, None], conc_stress[:, None], 0.0)
    fs = stress * sec.A
    n = cc + fs.sum(axis=1)
    m = cc * (sec.D / 2 - depth / 2) + (fs * (sec.D[:, None] / 2 - sec.d)).sum(axis=1)
    return n, m


def solve_dn(sec: Rect, target, lo, hi, iterations: int = 60, scale=None) -> np.ndarray:
    """Neutral-axis depth where g(dn) = target, for g increasing in dn, by bisection on all rows
    at once. g is N(dn), or N(dn) x scale(N) when `scale` (e.g. phi) is given."""
    lo = np.asarray(lo, dtype=float).copy()
    hi = np.asarray(hi, dtype=float).copy()
    target = np.asarray(target, dtype=float)
    for _ in range(iterations):
        mid = 0.5 * (lo + hi)
        n, _ = forces(sec, mid)
        g = n * scale(n) if scale else n
        below = g < target
        lo = np.where(below, mid, lo)
        hi = np.where(below, hi, mid)
    return 0.5 * (lo + hi)


def tension_capacity(sec: Rect) -> np.ndarray:
    """All bars yielding in tension, concrete cracked: -As fsy (negative)."""
    return -(sec.A * sec.fsy[:, None]).sum(axis=1)
