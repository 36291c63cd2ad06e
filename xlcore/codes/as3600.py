"""AS 3600:2018 Concrete structures: the rules xlcore uses, vectorised over rows.

Units inside: N, mm, MPa. Every function takes and returns numpy arrays (scalars broadcast).
Expressions are from public secondary sources and memory of the standard (see
ENGINEERING notes in the project's design documents); each docstring cites the clause.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

NAME = "AS 3600:2018"

PHI_WALL_SHEAR = 0.7
"""Table 2.2.2: capacity reduction factor for shear, as commonly applied to walls (setting)."""

# Table 3.1.2: mean modulus of elasticity Ecj [MPa] for standard grades f'c [MPa].
EC_TABLE_FC = np.array([20.0, 25.0, 32.0, 40.0, 50.0, 65.0, 80.0, 100.0])
EC_TABLE_E = np.array([24000.0, 26700.0, 30100.0, 32800.0, 34800.0, 37400.0, 39600.0, 42200.0])

STANDARD_GRADES = tuple(float(g) for g in EC_TABLE_FC)
"""Standard strength grades f'c [MPa] (Table 3.1.2 rows)."""

# Which expression set the shear capacity (codes stored in results; text for people).
GOV_EQ1, GOV_EQ2, GOV_FLOOR, GOV_VUMAX = 1, 2, 3, 4
GOVERNING_TEXT = {
    GOV_EQ1: "Cl 11.6.3 Eq (1)",
    GOV_EQ2: "Cl 11.6.3 Eq (2)",
    GOV_FLOOR: "Cl 11.6.3 min 0.17 sqrt(f'c)",
    GOV_VUMAX: "Cl 11.6.2 Vu.max",
}


def elastic_modulus(fc):
    """Ec [MPa] by linear interpolation in Table 3.1.2 (clamped to the table's grades)."""
    return np.interp(np.asarray(fc, dtype=float), EC_TABLE_FC, EC_TABLE_E)


def wall_shear_area(Lw, tw):
    """0.8 Lw tw [mm^2]: the effective shear area of a wall, Cl 11.6.2-11.6.4 (d = 0.8 Lw)."""
    return 0.8 * np.asarray(Lw, dtype=float) * np.asarray(tw, dtype=float)


def wall_vu_max(fc, Lw, tw):
    """Vu.max = 0.2 f'c (0.8 Lw tw) [N], Cl 11.6.2: crushing limit no steel can raise."""
    return 0.2 * np.asarray(fc, dtype=float) * wall_shear_area(Lw, tw)


def wall_vuc_eq1(fc, Hw_Lw, Lw, tw):
    """Vuc = (0.66 sqrt(f'c) - 0.21 (Hw/Lw) sqrt(f'c)) 0.8 Lw tw [N], Cl 11.6.3 Eq (1)."""
    r = np.sqrt(np.asarray(fc, dtype=float))
    return (0.66 * r - 0.21 * np.asarray(Hw_Lw, dtype=float) * r) * wall_shear_area(Lw, tw)


def wall_vuc_eq2(fc, Hw_Lw, Lw, tw):
    """Vuc = (0.05 sqrt(f'c) + 0.1 sqrt(f'c) / (Hw/Lw - 1)) 0.8 Lw tw [N], Cl 11.6.3 Eq (2).

    Applies only where Hw/Lw > 1; +inf elsewhere so that a lesser-of never picks it.
    """
    ratio = np.asarray(Hw_Lw, dtype=float)
    r = np.sqrt(np.asarray(fc, dtype=float))
    slender = ratio > 1.0
    excess = np.where(slender, ratio - 1.0, 1.0)
    value = (0.05 * r + 0.1 * r / excess) * wall_shear_area(Lw, tw)
    return np.where(slender, value, np.inf)


def wall_vuc_floor(fc, Lw, tw):
    """Vuc >= 0.17 sqrt(f'c) 0.8 Lw tw [N], Cl 11.6.3 (lower limit on the concrete share)."""
    return 0.17 * np.sqrt(np.asarray(fc, dtype=float)) * wall_shear_area(Lw, tw)


def wall_vuc(fc, Hw_Lw, Lw, tw):
    """Vuc [N] and the governing expression, Cl 11.6.3.

    Hw/Lw <= 1: Eq (1); Hw/Lw > 1: lesser of Eq (1) and Eq (2); never below the floor.
    """
    eq1 = wall_vuc_eq1(fc, Hw_Lw, Lw, tw)
    eq2 = wall_vuc_eq2(fc, Hw_Lw, Lw, tw)
    floor = wall_vuc_floor(fc, Lw, tw)
    lesser = np.minimum(eq1, eq2)
    vuc = np.maximum(lesser, floor)
    gov = np.where(floor > lesser, GOV_FLOOR, np.where(eq2 < eq1, GOV_EQ2, GOV_EQ1))
    return vuc, gov


def wall_rho_w(Hw_Lw, rho_h, rho_v):
    """rho_w, Cl 11.6.4: lesser of the two ratios where Hw/Lw <= 1, else the horizontal ratio."""
    return np.where(np.asarray(Hw_Lw) <= 1.0, np.minimum(rho_h, rho_v), np.asarray(rho_h, dtype=float))


def wall_vus(rho_w, fsy, Lw, tw):
    """Vus = rho_w fsy (0.8 Lw tw) [N], Cl 11.6.4."""
    return np.asarray(rho_w, dtype=float) * np.asarray(fsy, dtype=float) * wall_shear_area(Lw, tw)


@dataclass(frozen=True)
class WallShear:
    """Cl 11.6 quantities per row, N and mm. `vu` is the unfactored capacity, `phi_vu` factored."""

    area: np.ndarray
    eq1: np.ndarray
    eq2: np.ndarray  # +inf where not applicable (Hw/Lw <= 1)
    floor: np.ndarray
    vuc: np.ndarray
    rho_w: np.ndarray
    vus: np.ndarray
    vu_max: np.ndarray
    vu: np.ndarray
    phi: np.ndarray
    phi_vu: np.ndarray
    governs: np.ndarray  # GOV_* codes


def wall_shear(fc, fsy, Lw, tw, Hw, rho_h, rho_v, phi=PHI_WALL_SHEAR) -> WallShear:
    """phi Vu of a wall or pier in its plane, Cl 11.6.1-11.6.4: Vu = min(Vuc + Vus, Vu.max)."""
    Lw = np.asarray(Lw, dtype=float)
    ratio = np.asarray(Hw, dtype=float) / Lw
    vuc, gov = wall_vuc(fc, ratio, Lw, tw)
    rho_w = wall_rho_w(ratio, rho_h, rho_v)
    vus = wall_vus(rho_w, fsy, Lw, tw)
    vmax = wall_vu_max(fc, Lw, tw)
    vu = np.minimum(vuc + vus, vmax)
    gov = np.where(vuc + vus > vmax, GOV_VUMAX, gov)
    phi = np.broadcast_to(np.asarray(phi, dtype=float), Lw.shape).copy()
    return WallShear(
        area=wall_shear_area(Lw, tw),
        eq1=wall_vuc_eq1(fc, ratio, Lw, tw),
        eq2=wall_vuc_eq2(fc, ratio, Lw, tw),
        floor=wall_vuc_floor(fc, Lw, tw),
        vuc=vuc,
        rho_w=rho_w,
        vus=vus,
        vu_max=vmax,
        vu=vu,
        phi=phi,
        phi_vu=phi * vu,
        governs=gov,
    )


def wall_rho_required(v_star, phi, vuc, vu_max, fsy, Lw, tw):
    """Least rho_w with phi (Vuc + rho_w fsy 0.8 Lw tw) >= V*, Cl 11.6.4 rearranged.

    Returns (rho_required, capped): `capped` where V*/phi exceeds Vu.max (Cl 11.6.2), when no
    amount of steel suffices and only a thicker wall or a stronger concrete helps.
    """
    need = np.abs(np.asarray(v_star, dtype=float)) / np.asarray(phi, dtype=float)
    rho = np.maximum(need - vuc, 0.0) / (np.asarray(fsy, dtype=float) * wall_shear_area(Lw, tw))
    return rho, need > vu_max
