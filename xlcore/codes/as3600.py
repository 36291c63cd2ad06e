"""AS 3600:2018 Concrete structures: the rules xlcore uses, vectorised over rows.

Units inside: N, mm, MPa. Every function takes and returns numpy arrays (scalars broadcast).
Expressions are from public secondary sources and memory of the standard; each docstring cites
the clause, and docs/engineering-basis.md gives every provision's source, confidence and the
Project setting that changes it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

# the radial overload factor on the diagram's straight parts is standard-neutral geometry
from xlcore.mechanics.radial import ray_segment_utilisation, tension_side_utilisation  # noqa: F401

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
    return _vuc_of(
        wall_vuc_eq1(fc, Hw_Lw, Lw, tw), wall_vuc_eq2(fc, Hw_Lw, Lw, tw), wall_vuc_floor(fc, Lw, tw)
    )


def _vuc_of(eq1, eq2, floor):
    lesser = np.minimum(eq1, eq2)
    vuc = np.maximum(lesser, floor)
    gov = np.where(floor > lesser, GOV_FLOOR, np.where(eq2 < eq1, GOV_EQ2, GOV_EQ1))
    return vuc, gov


HEIGHT_OVERALL, HEIGHT_STOREY, HEIGHT_OPENING = "overall wall height", "storey clear height", "opening height"
"""Bases for the height Hw in the Cl 11.6.3 aspect ratio (Project setting). Amendment 2 (2021)
amended Cl 11.6 and 11.6.3; the reading that Hw is the overall height of the wall (base to top)
is the conservative one, since Eq (2) falls as Hw/Lw grows: it is the default."""


def wall_aspect_ratio(Hw_pier, Lw_pier, Hw_wall, Lw_wall, beside_opening):
    """Hw/Lw for Cl 11.6.3 Eq (1) and (2), and whether the whole wall's ratio governs.

    A pier beside an opening takes the larger of its own ratio Hw_pier / Lw_pier and the whole
    wall's Hw_wall / Lw_wall (common practice for wall segments; ACI 318-19 states the same rule
    for wall segments, see docs/engineering-basis.md); a wall without openings its own ratio.
    Lengths and heights in one unit (mm)."""
    own = np.asarray(Hw_pier, dtype=float) / np.asarray(Lw_pier, dtype=float)
    whole = np.asarray(Hw_wall, dtype=float) / np.asarray(Lw_wall, dtype=float)
    wall_governs = np.asarray(beside_opening, dtype=bool) & (whole > own)
    return np.where(wall_governs, whole, own), wall_governs


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
    eq1, eq2, floor = (
        wall_vuc_eq1(fc, ratio, Lw, tw),
        wall_vuc_eq2(fc, ratio, Lw, tw),
        wall_vuc_floor(fc, Lw, tw),
    )
    vuc, gov = _vuc_of(eq1, eq2, floor)
    rho_w = wall_rho_w(ratio, rho_h, rho_v)
    vus = wall_vus(rho_w, fsy, Lw, tw)
    vmax = wall_vu_max(fc, Lw, tw)
    vu = np.minimum(vuc + vus, vmax)
    gov = np.where(vuc + vus > vmax, GOV_VUMAX, gov)
    phi = np.broadcast_to(np.asarray(phi, dtype=float), Lw.shape).copy()
    return WallShear(
        area=wall_shear_area(Lw, tw),
        eq1=eq1,
        eq2=eq2,
        floor=floor,
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


# ---------------------------------------------------------------- axial load and bending

EPS_CU = 0.003
"""Cl 8.1.3: maximum concrete strain at the extreme compressive fibre."""

ES = 200_000.0
"""Cl 3.2.2: modulus of elasticity of reinforcement [MPa]."""

PHI_COMPRESSION = 0.6
"""Table 2.2.2: phi0 for members in dominant compression (2018 text as commonly quoted;
Amendment 2 gives 0.65 k_phi - verify; a Project setting)."""

PHI_TENSION = 0.85
"""Table 2.2.2: phi for members in axial tension, Class N reinforcement."""


def alpha2(fc):
    """alpha2 = 0.85 - 0.0015 f'c, not less than 0.67: stress block intensity, Cl 8.1.3."""
    return np.maximum(0.85 - 0.0015 * np.asarray(fc, dtype=float), 0.67)


def gamma(fc):
    """gamma = 0.97 - 0.0025 f'c, not less than 0.67: stress block depth ratio, Cl 8.1.3."""
    return np.maximum(0.97 - 0.0025 * np.asarray(fc, dtype=float), 0.67)


def alpha1(fc):
    """alpha1 = 1 - 0.003 f'c within 0.72..0.85: concrete stress in the squash load, Cl 10.6.2.2."""
    return np.clip(1.0 - 0.003 * np.asarray(fc, dtype=float), 0.72, 0.85)


def squash_load(fc, Ag, As, fsy):
    """Nuo = alpha1 f'c Ag + As fsy [N], Cl 10.6.2.2 (bar stress capped at the stress at strain
    0.0025, which is fsy for fsy <= 500 MPa). Ag is the concrete area net of the bars."""
    steel_stress = np.minimum(np.asarray(fsy, dtype=float), 0.0025 * ES)
    return alpha1(fc) * np.asarray(fc, dtype=float) * Ag + As * steel_stress


def phi_bending(kuo):
    """phi = 1.24 - 13 kuo / 12 within 0.65..0.85: bending without axial force, Class N bars,
    Table 2.2.2."""
    return np.clip(1.24 - 13.0 * np.asarray(kuo, dtype=float) / 12.0, 0.65, 0.85)


def phi_axial_bending(Nu, Nub, Nuot, kuo, phi0=PHI_COMPRESSION):
    """phi for bending with axial force, Table 2.2.2: in compression phi0 for Nu >= Nub, else
    phi0 + (phi_b - phi0)(1 - Nu/Nub); in tension phi_b + (0.85 - phi_b)(Nu/Nuot) (Nuot < 0)."""
    Nu = np.asarray(Nu, dtype=float)
    pb = phi_bending(kuo)
    comp = np.where(Nu >= Nub, phi0, phi0 + (pb - phi0) * (1.0 - Nu / np.where(Nub > 0, Nub, 1.0)))
    tens = pb + (PHI_TENSION - pb) * (Nu / np.where(Nuot < 0, Nuot, -1.0))
    return np.where(Nu > 0, comp, tens)


def phi_axial_bending_terms(Nub, Nuot, kuo, phi0=PHI_COMPRESSION) -> tuple:
    """The section's own terms of `phi_axial_bending` (phi_b, the divisors and the slopes'
    factors), for `phi_axial_bending_at`: a solver evaluates phi a dozen times per section,
    and half of the arithmetic is the section's. The same expressions, so the same bits."""
    Nub, Nuot = np.asarray(Nub, dtype=float), np.asarray(Nuot, dtype=float)
    pb = phi_bending(kuo)
    return (
        phi0,
        Nub,
        np.where(Nub > 0, Nub, 1.0),
        pb - phi0,
        pb,
        PHI_TENSION - pb,
        np.where(Nuot < 0, Nuot, -1.0),
    )


def phi_axial_bending_at(Nu: np.ndarray, terms: tuple) -> np.ndarray:
    """`phi_axial_bending(Nu, ...)` of a section's `phi_axial_bending_terms`, Nu an array of
    the terms' shape: phi0 + (phi_b - phi0)(1 - Nu/Nub) and phi_b + (0.85 - phi_b)(Nu/Nuot)
    worked in two arrays of their own, operand for operand as there (products and sums
    commute in IEEE arithmetic), and the same choices per row."""
    phi0, nub, nub_div, slope_c, pb, slope_t, nuot_div = terms
    comp = np.divide(Nu, nub_div)
    np.subtract(1.0, comp, out=comp)
    comp *= slope_c
    comp += phi0
    np.copyto(comp, phi0, where=Nu >= nub)
    tens = np.divide(Nu, nuot_div)
    tens *= slope_t
    tens += pb
    np.copyto(tens, comp, where=Nu > 0)
    return tens


MIN_ECCENTRICITY = 0.05
"""Cl 10.1.2: the least eccentricity of the axial force in a column, as a fraction of D."""


def min_eccentricity_moment(m_star, n_star, D):
    """|M*| not less than N* x 0.05 D for a member in compression designed as a column,
    Cl 10.1.2 (D the overall depth in the plane of bending; for a pier in its plane, Lw).
    N in N, D in mm, M in N mm; in tension (N* <= 0) |M*| unchanged."""
    m = np.abs(np.asarray(m_star, dtype=float))
    n = np.asarray(n_star, dtype=float)
    return np.where(n > 0, np.maximum(m, n * MIN_ECCENTRICITY * np.asarray(D, dtype=float)), m)


# ---------------------------------------------------------------- walls in compression


def effective_height_factor(Hw, L1, supported_edges, restrained=False):
    """k for the effective height Hwe = k Hw of a braced wall, Cl 11.4.

    Two edges supported top and bottom only: 0.75 where restrained against rotation at both
    ends, else 1.0. Three sides (one vertical edge supported, L1 from it to the free edge):
    k = 1 / (1 + (Hw / (3 L1))^2), not less than 0.3. Four sides (both vertical edges, L1
    apart): k = 1 / (1 + (Hw / L1)^2) for Hw <= L1, else L1 / (2 Hw). The lesser of the
    top-and-bottom value and the side-support value is used (side supports only help).
    """
    Hw, L1 = np.asarray(Hw, dtype=float), np.asarray(L1, dtype=float)
    edges = np.asarray(supported_edges)
    base = np.where(restrained, 0.75, 1.0) * np.ones_like(Hw)
    three = np.maximum(1.0 / (1.0 + (Hw / (3.0 * L1)) ** 2), 0.3)
    four = np.where(Hw <= L1, 1.0 / (1.0 + (Hw / L1) ** 2), L1 / (2.0 * Hw))
    side = np.where(edges >= 2, four, np.where(edges == 1, three, base))
    return np.minimum(base, side)


def simplified_eccentricity(e, tw):
    """e >= 0.05 tw: the least eccentricity of the vertical load, Cl 11.5.1."""
    return np.maximum(np.abs(np.asarray(e, dtype=float)), 0.05 * np.asarray(tw, dtype=float))


def additional_eccentricity(Hwe, tw):
    """ea = Hwe^2 / (2500 tw): slenderness eccentricity, Cl 11.5.1."""
    return np.asarray(Hwe, dtype=float) ** 2 / (2500.0 * np.asarray(tw, dtype=float))


def wall_end_axial_per_length(n_star, m_star, Lw):
    """Largest design axial force per unit length of a wall in compression with an in-plane
    moment, n = N*/Lw + 6 |M*| / Lw^2 (linear elastic distribution along the wall: the stress
    at the pier's more compressed end), with the least value at the other end, for the Cl 11.5.1
    simplified method, which takes the design axial force per unit length. N, N mm, mm."""
    n = np.asarray(n_star, dtype=float)
    lw = np.asarray(Lw, dtype=float)
    bend = 6.0 * np.abs(np.asarray(m_star, dtype=float)) / lw**2
    return n / lw + bend, n / lw - bend


PHI_SIMPLIFIED = 0.65
"""Table 2.2.2 as applied to Cl 11.5 walls (2018; 0.6 in 2009 - verify; a Project setting)."""


def simplified_capacity(fc, tw, e, ea, length, phi=PHI_SIMPLIFIED):
    """phi Nu = phi (tw - 1.2 e - 2 ea) 0.6 f'c per unit length, times the length [N], Cl 11.5.1."""
    per_mm = (np.asarray(tw, dtype=float) - 1.2 * e - 2.0 * ea) * 0.6 * np.asarray(fc, dtype=float)
    return np.asarray(phi, dtype=float) * np.maximum(per_mm, 0.0) * np.asarray(length, dtype=float)


# ---------------------------------------------------------------- wall detailing, Cl 11.7
# Limits as in docs/engineering-basis.md (Detailing, medium confidence: verify against the
# standard's text); clause cited as 11.7 with the rule's name.

RHO_V_MIN_LOW = 0.0015
RHO_V_MIN = 0.0025
RHO_H_MIN_RESTRAINED = 0.0025
RHO_H_MIN_FREE = 0.0015
STRESS_RATIO_LOW = 0.03  # design compressive stress / f'c below which the lower vertical minimum applies
FREE_SHORT_WALL = 2500.0  # mm: unrestrained walls this short need no horizontal minimum
MAX_SPACING = 350.0  # mm
MAX_SPACING_THICKNESS = 2.5
CLEAR_GAP_DIAMETERS = 3.0
SINGLE_LAYER_MAX_THICKNESS = 200.0  # mm, from memory: verify
SINGLE_LAYER_SLENDERNESS = 20.0  # Hwe/tw with one layer (docs/engineering-basis.md, Cl 11.5)


def wall_rho_v_min(sigma, fc):
    """Least vertical ratio, Cl 11.7: 0.0015 where the design compressive stress N*/(Lw tw) is at
    most 0.03 f'c, else 0.0025."""
    low = np.asarray(sigma, dtype=float) <= STRESS_RATIO_LOW * np.asarray(fc, dtype=float)
    return np.where(low, RHO_V_MIN_LOW, RHO_V_MIN)


def wall_rho_h_min(restrained, wall_length):
    """Least horizontal ratio, Cl 11.7: 0.0025 where restrained against shrinkage and thermal
    movement; otherwise 0.0015, or none for walls at most 2.5 m long."""
    free = np.where(np.asarray(wall_length, dtype=float) <= FREE_SHORT_WALL, 0.0, RHO_H_MIN_FREE)
    return np.where(restrained, RHO_H_MIN_RESTRAINED, free)


def wall_max_spacing(tw):
    """Largest bar spacing, Cl 11.7: the lesser of 2.5 tw and 350 mm."""
    return np.minimum(MAX_SPACING_THICKNESS * np.asarray(tw, dtype=float), MAX_SPACING)


def wall_min_clear_gap(db):
    """Least clear gap between parallel bars, Cl 11.7: 3 bar diameters."""
    return CLEAR_GAP_DIAMETERS * np.asarray(db, dtype=float)


# ---------------------------------------------------------------- earthquake detailing, Section 14
# Walls of structures designed as limited ductile (mu = 2) or moderately ductile (mu = 3) for the
# earthquake actions of AS 1170.4. The standard's text was not at hand: the rules and values below
# are from memory and secondary sources (docs/engineering-basis.md, "Earthquake detailing"),
# Low / Med confidence, each value a Project setting with these defaults: verify.

SECTION14_MIN_MU = 2  # mu from which Section 14's wall rules apply (limited ductile)
SECTION14_LAYERS = 2  # two layers, one near each face (Cl 14.6, from memory)
SECTION14_RHO_MIN = 0.0025  # each way (Cl 14.6, from memory; one secondary source: Cl 14.6.7)
SECTION14_SLENDERNESS = 20.0  # Hwe/tw (Section 14, from memory: verify)
END_ZONE_STRESS_RATIO = 0.15  # extreme-fibre compression / f'c (Cl 14.6.2.1, secondary sources)
END_ZONE_TIE_DIAMETERS = 6.0  # tie spacing / vertical bar diameter (Cl 14.6.2, from memory)
END_ZONE_TIE_MAX = 150.0  # mm (Cl 14.6.2, from memory)


def section14_applies(mu):
    """Section 14's wall rules apply to structures designed with mu of 2 (limited ductile) or
    more; an elastic design (mu = 1) takes the earthquake actions without relying on ductility
    and needs none of them (AS 3600:2018 Section 14 scope, from memory: verify)."""
    return np.asarray(mu) >= SECTION14_MIN_MU


def eq_wall_layers(v_layers, h_layers):
    """Layers of the lesser-layered direction: the quantity of the both-faces rule (Cl 14.6,
    from memory): vertical and horizontal bars in two layers, one near each face."""
    return np.minimum(np.asarray(v_layers, dtype=float), np.asarray(h_layers, dtype=float))


def eq_wall_rho_min(rho_min=SECTION14_RHO_MIN):
    """Least vertical and least horizontal ratio of a wall of a limited- or moderately-ductile
    structure, Cl 14.6 (0.0025 each way, from memory; one secondary source cites Cl 14.6.7),
    irrespective of the stress and restraint conditions that relax Cl 11.7."""
    return float(rho_min)


def eq_wall_slenderness(Hwe, tw):
    """Hwe / tw of Section 14's slenderness limit (20 from memory: verify), Hwe by Cl 11.4."""
    return np.asarray(Hwe, dtype=float) / np.asarray(tw, dtype=float)


def pier_extreme_fibre_stress(n_star, m_star, Lw, tw):
    """Elastic extreme-fibre stresses of a rectangular pier [MPa], compression positive, for the
    Cl 14.6.2.1 trigger: sigma = N*/A +- |M*|/Z with A = Lw tw, Z = tw Lw^2 / 6 (gross section,
    linear elastic). N* in N, M* in N mm, Lw, tw in mm. Returns (more compressed end, other end);
    |M*| because earthquake actions reverse, so either end may be the compressed one."""
    Lw = np.asarray(Lw, dtype=float)
    tw = np.asarray(tw, dtype=float)
    axial = np.asarray(n_star, dtype=float) / (Lw * tw)
    bending = np.abs(np.asarray(m_star, dtype=float)) * 6.0 / (tw * Lw**2)
    return axial + bending, axial - bending


def end_zone_trigger(fc, ratio=END_ZONE_STRESS_RATIO):
    """Extreme-fibre compression above which a wall end needs end-zone (boundary) detailing under
    earthquake actions: 0.15 f'c [MPa], Cl 14.6.2.1 (secondary sources; Low confidence). A
    trigger for detailing, not a capacity."""
    return ratio * np.asarray(fc, dtype=float)


def end_zone_length(sigma_max, sigma_min, trigger, Lw):
    """Length from the compressed end over which the linear elastic stress exceeds the trigger
    [mm], Cl 14.6.2.1 as practice reads it (the zone where the stress is above 0.15 f'c): 0 where
    the peak is within it, the whole Lw where even the other end exceeds it."""
    smax = np.asarray(sigma_max, dtype=float)
    smin = np.asarray(sigma_min, dtype=float)
    Lw = np.asarray(Lw, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        x = Lw * (smax - trigger) / (smax - smin)
    x = np.where(smax - smin > 0, x, np.where(smax > trigger, Lw, 0.0))
    return np.clip(np.where(smax > trigger, x, 0.0), 0.0, Lw)


def end_zone_tie_spacing(db, diameters=END_ZONE_TIE_DIAMETERS, cap=END_ZONE_TIE_MAX):
    """Largest spacing of the ties restraining the vertical bars of an end zone [mm], the lesser
    of `diameters` x db (db of the vertical bars) and `cap`: 6 db and 150 mm by default, Cl 14.6.2
    from memory (verify)."""
    return np.minimum(diameters * np.asarray(db, dtype=float), cap)


# ---------------------------------------------------------------- beams (lintels), Section 8
# Flexure by the rectangular stress block (Cl 8.1); shear by the simplified method of Cl 8.2
# as amended (Amendment 2): expressions from memory, checked only against secondary sources
# for theta_v = 36 degrees and kv = 0.15 (Cl 8.2.4.3): verify before relying on them.

PHI_SHEAR = 0.75
"""Table 2.2.2: phi for shear in beams (2018; from memory: verify)."""

THETA_V = np.radians(36.0)
"""Cl 8.2.4.3 simplified method: compression strut angle."""

SQRT_FC_MAX = 8.0
"""Cl 8.2: sqrt(f'c) not taken above 8 MPa in beam shear (from memory: verify)."""

VU_MAX_FACTOR = 0.55 * 0.9
"""Eq 8.2.3.3(1) coefficient 0.55, reduced by 10 % in Amendment 2 (secondary source)."""


def beam_flexure(b, d, As, fc, fsy):
    """Singly reinforced rectangular section, Cl 8.1: dn = As fsy / (alpha2 f'c b gamma),
    ku = dn / d, Muo = As fsy (d - gamma dn / 2) [N mm], phi from Table 2.2.2 with kuo = ku."""
    a2, g = alpha2(fc), gamma(fc)
    dn = As * fsy / (a2 * fc * b * g)
    ku = dn / d
    muo = As * fsy * (d - g * dn / 2)
    return muo, ku, phi_bending(ku)


def beam_dv(d, D):
    """Effective shear depth dv = max(0.72 D, 0.9 d), Cl 8.2.1."""
    return np.maximum(0.72 * np.asarray(D, dtype=float), 0.9 * np.asarray(d, dtype=float))


def beam_asv_min(fc, b, s, fsyf):
    """Asv.min = 0.08 sqrt(f'c) b s / fsy.f [mm^2], Cl 8.2.1.7 (from memory: verify)."""
    return 0.08 * np.sqrt(fc) * b * s / fsyf


def beam_vuc(fc, b, dv, asv, asv_min):
    """Vuc = kv b dv sqrt(f'c) [N], Cl 8.2.4.1 with the simplified kv of Cl 8.2.4.3: 0.15 where
    Asv >= Asv.min, else 200 / (1000 + 1.3 dv) but not more than 0.15 (Amendment 2)."""
    kv = np.where(asv >= asv_min, 0.15, np.minimum(200.0 / (1000.0 + 1.3 * dv), 0.15))
    return kv * b * dv * np.minimum(np.sqrt(fc), SQRT_FC_MAX), kv


def beam_vus(asv, fsyf, dv, s):
    """Vus = (Asv fsy.f dv / s) cot theta_v [N], Cl 8.2.5.2, vertical fitments."""
    return asv * fsyf * dv / s / np.tan(THETA_V)


def beam_vu_max(fc, b, dv):
    """Vu.max = 0.55 x 0.9 f'c b dv (cot theta_v) / (1 + cot^2 theta_v) [N], Eq 8.2.3.3(1),
    vertical fitments (cot alpha_v = 0)."""
    cot = 1.0 / np.tan(THETA_V)
    return VU_MAX_FACTOR * fc * b * dv * cot / (1 + cot**2)


# ---------------------------------------------------------------- deep lintels, Section 7 / 12
# AS 3600:2018 has no coupling-beam clause of its own. A lintel whose clear span / overall depth
# is below the non-flexural limit (Cl 12.1.1, from memory: 1.5 cantilevers, 3 simply supported,
# 4 continuous; a lintel built into piers at both ends is taken as continuous) is designed by a
# strut-and-tie model (Section 7). Every value below is from memory (docs/engineering-basis.md,
# "Lintels"): each is a Project setting, and the basis is written on every result row.

NON_FLEXURAL_RATIO = 4.0
"""Cl 12.1.1 (from memory): clear span / overall depth below which a member built in at both
ends is non-flexural (4 for continuous members; 3 simply supported, 1.5 cantilevers)."""

PHI_STRUT = 0.6
"""Table 2.2.2 (from memory): phi for struts and nodes in strut-and-tie models."""

PHI_TIE = 0.8
"""Table 2.2.2 (from memory): phi for ties in strut-and-tie models."""

STRUT_STRESS = 0.9
"""Cl 7.2.1 and Cl 7.4 (from memory): struts and nodes are taken to 0.9 f'c times their factor."""

BETA_S_COEFF = 0.66
BETA_S_MIN, BETA_S_MAX = 0.3, 1.0
"""Cl 7.2.2 (from memory): beta_s = 1 / (1 + 0.66 cot^2 theta) within 0.3..1.0 for a
bottle-shaped strut with transverse reinforcement."""

BETA_N_CCT = 0.8
"""Cl 7.4 (from memory): node efficiency beta_n, 1.0 C-C-C, 0.8 C-C-T, 0.6 C-T-T."""

COUPLING_CAP = 0.83
"""ACI 318-19 Eq (18.10.7.4), SI (10 sqrt(f'c) Acw in psi units): the concrete limit on the
nominal shear of a diagonally reinforced coupling beam, 0.83 sqrt(f'c) Acw [MPa, mm^2]."""


def strut_angle(z, span):
    """theta [rad] of the one diagonal strut between the pier faces: atan(z / ln), z the lever
    arm between the top and bottom ties, ln the clear span (Section 7 geometry)."""
    return np.arctan2(np.asarray(z, dtype=float), np.asarray(span, dtype=float))


def strut_efficiency(theta, fixed=None):
    """beta_s = 1 / (1 + 0.66 cot^2 theta) within 0.3..1.0, Cl 7.2.2 (from memory: verify); a
    fixed value where the Project sheet gives one. theta is the angle between the strut and the
    tie through its node."""
    cot = 1.0 / np.tan(np.asarray(theta, dtype=float))
    beta = np.clip(1.0 / (1.0 + BETA_S_COEFF * cot**2), BETA_S_MIN, BETA_S_MAX)
    return beta if fixed is None else np.full_like(beta, float(fixed))


def strut_width(w_tie, theta):
    """Width of the strut where it meets a hydrostatic C-C-T node [mm]: the node's face on the tie
    has the tie's height w_t, its bearing face w_t tan theta (equal stress on every face), so the
    strut face is w_t cos theta + w_t tan theta sin theta = w_t / cos theta (Section 7 geometry;
    the tie height is twice its cover to centroid, common practice)."""
    return np.asarray(w_tie, dtype=float) / np.cos(np.asarray(theta, dtype=float))


def strut_capacity(fc, b, w, beta_s, phi=PHI_STRUT, stress=STRUT_STRESS):
    """phi Fc.s = phi beta_s 0.9 f'c b w [N], Cl 7.2.1 (from memory: verify; 0.9 a setting)."""
    return phi * np.asarray(beta_s, dtype=float) * stress * np.asarray(fc, dtype=float) * b * w


def node_capacity(fc, b, w, beta_n=BETA_N_CCT, phi=PHI_STRUT, stress=STRUT_STRESS):
    """phi beta_n 0.9 f'c b w [N] on a node face of width w, Cl 7.4 (from memory: verify)."""
    return phi * np.asarray(beta_n, dtype=float) * stress * np.asarray(fc, dtype=float) * b * w


def tie_capacity(As, fsy, phi=PHI_TIE):
    """phi As fsy [N], Cl 7.3 with phi for ties (Table 2.2.2, from memory)."""
    return phi * np.asarray(As, dtype=float) * np.asarray(fsy, dtype=float)


def diagonal_angle(D, a_group, span):
    """alpha [rad] of two diagonal bar groups crossing at mid-span, from the geometry: the group
    centroids sit a_group from the top and bottom faces at the pier faces, so
    tan alpha = (D - 2 a_group) / ln (ACI 318-19 R18.10.7 figure; the angle is geometry)."""
    rise = np.asarray(D, dtype=float) - 2.0 * np.asarray(a_group, dtype=float)
    return np.arctan2(rise, np.asarray(span, dtype=float))


def diagonal_shear(A_group, fsy, alpha):
    """Vu = 2 A_sd fsy sin alpha [N]: the vertical components of the two diagonal groups, one in
    tension and one in compression, carry the shear (ACI 318-19 Eq (18.10.7.4), Vn = 2 Avd fy
    sin alpha; mechanics, no AS 3600 clause)."""
    return 2.0 * np.asarray(A_group, dtype=float) * np.asarray(fsy, dtype=float) * np.sin(alpha)


def diagonal_cap(fc, b, D, coeff=COUPLING_CAP):
    """coeff sqrt(f'c) b D [N]: the concrete limit on the shear a diagonally reinforced lintel may
    carry (ACI 318-19 Eq (18.10.7.4), 0.83 in SI: a Project setting)."""
    return coeff * np.sqrt(np.asarray(fc, dtype=float)) * np.asarray(b, dtype=float) * D


def beam_as_required(m_star, phi, b, d, fc, fsy):
    """Least As [mm^2] of a singly reinforced rectangle with phi Muo >= M*, Cl 8.1 rearranged:
    M*/phi = X d - X^2 / (2 alpha2 f'c b), X = As fsy. NaN where no tension steel suffices (the
    concrete crushes first; compression steel or a deeper lintel is needed). N mm."""
    k = alpha2(fc) * np.asarray(fc, dtype=float) * b
    disc = np.asarray(d, dtype=float) ** 2 - 2.0 * np.abs(m_star) / (phi * k)
    with np.errstate(invalid="ignore"):
        x = k * (d - np.sqrt(disc))
    return np.where(disc >= 0, x / fsy, np.nan)


def beam_asv_s_required(v_star, phi, vuc, fsyf, dv):
    """Least Asv/s [mm^2/mm] of vertical fitments with phi (Vuc + Vus) >= V*, Cl 8.2.5.2
    rearranged with theta_v of the simplified method."""
    need = np.maximum(np.abs(v_star) / phi - vuc, 0.0)
    return need * np.tan(THETA_V) / (np.asarray(fsyf, dtype=float) * dv)
