"""ACI 318-19 (SI) Building Code Requirements for Structural Concrete: the rules xlcore needs
for walls, their piers and the beams that couple them, vectorised over rows.

Units inside: N, mm, MPa (the SI edition's coefficients: 0.17, 0.25, 0.66, 0.83 on sqrt(f'c)
in MPa). Every function takes and returns numpy arrays (scalars broadcast); each docstring
cites the section and equation. The code's own text was not at hand: expressions were checked
against public secondary sources where the search found them, and the rest carry
"from memory, verify". docs/engineering-basis.md (section "ACI 318-19") lists each provision
with its source and confidence.

Selectable on the Project sheet: the checks reach these rules through the `ACI318` object at the
end (the `codes.base.Standard` interface) and, for the Chapter 18 wall rules, through
checks/special_walls.py. Published worked examples behind the Chapter 18 wall rules:
tests/test_aci_published.py.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

NAME = "ACI 318-19"

ES = 200_000.0
"""20.2.2.2: modulus of elasticity of nonprestressed reinforcement [MPa]."""

EPS_CU = 0.003
"""22.2.2.1: maximum usable strain at the extreme concrete compression fibre."""

PHI_SHEAR = 0.75
"""Table 21.2.1(b): phi for shear."""

PHI_SHEAR_SEISMIC = 0.60
"""21.2.4.1: phi for shear of a member resisting earthquake effects whose nominal shear
strength is less than the shear at its nominal flexural strength (ACI 318M Chapter 21 text, a
public OCR copy; a published code case says 0.75 may be kept where Ve of 18.10.3.1 is used;
ACI MNL-17(21) Shear Wall Example 2 takes 0.60). A setting, never silently applied."""

PHI_COMPRESSION_TIED = 0.65
"""Table 21.2.2: phi for compression-controlled sections with ties (other than spirals)."""

PHI_COMPRESSION_SPIRAL = 0.75
"""Table 21.2.2: phi for compression-controlled sections with spirals."""

PHI_TENSION_CONTROLLED = 0.90
"""Table 21.2.2: phi for tension-controlled sections."""

PHI_SIMPLIFIED = 0.65
"""21.2.2 / 11.5.3.1: the simplified wall method's Pn is compression-controlled (ACI MNL-17(21)
Shear Wall Example 1: phi Pn = 0.65 Pn by 21.2.2(b); 0.70 in editions before 2002)."""

PHI_DIAGONAL_COUPLING = 0.85
"""21.2.4.4: phi for shear of diagonally reinforced coupling beams in structures relying on special
structural walls (21.2.4(b)); ACI 318M Chapter 21 text, a public OCR copy."""

PN_MAX_TIED = 0.80
"""Table 22.4.2.1: Pn,max = 0.80 Po for tied members (0.85 with spirals)."""

PN_MAX_SPIRAL = 0.85

FY_MAX_LONGITUDINAL = 550.0
"""20.2.2.4: fy of longitudinal bars in flexure and axial strength at most 550 MPa (Grade 550;
from memory, verify)."""

FYT_MAX_SHEAR = 420.0
"""20.2.2.4: fyt in shear strength at most 420 MPa (the conservative reading; 318-19 allows
550 MPa in special structural walls, from memory: a setting)."""


def _a(x) -> np.ndarray:
    return np.asarray(x, dtype=float)


# ---------------------------------------------------------------- Chapter 11: walls

GOV_FORMULA, GOV_WALL_LIMIT, GOV_SEGMENT_LIMIT = 1, 2, 3
GOVERNING_TEXT = {
    GOV_FORMULA: "ACI 318-19 11.5.4.3 Eq. (11.5.4.3)",
    GOV_WALL_LIMIT: "ACI 318-19 11.5.4.2 Vn <= 0.66 sqrt(f'c) Acv",
    GOV_SEGMENT_LIMIT: "ACI 318-19 18.10.4.4 Vn <= 0.83 sqrt(f'c) Acw (one segment)",
}

ALPHA_C_SQUAT, ALPHA_C_SLENDER = 0.25, 0.17
RATIO_SQUAT, RATIO_SLENDER = 1.5, 2.0


def wall_shear_area(Lw, tw):
    """Acv = Lw tw [mm^2]: gross concrete area bounded by the web thickness and the length of
    the section in the direction of the shear (Ch. 2 notation; no 0.8 Lw as in AS 3600)."""
    return _a(Lw) * _a(tw)


def alpha_c(hw_lw):
    """alpha_c = 0.25 for hw/lw <= 1.5, 0.17 for hw/lw >= 2.0, linear between, 11.5.4.3
    (the same coefficients in 18.10.4.1; SI form of 3 and 2). Why: squat walls carry more shear
    on the concrete by arch action."""
    r = _a(hw_lw)
    return np.interp(r, [RATIO_SQUAT, RATIO_SLENDER], [ALPHA_C_SQUAT, ALPHA_C_SLENDER])


def alpha_c_tension(Nu, Ag):
    """alpha_c for a wall in net axial tension, 11.5.4.3 (Table): 0.17 (1 + Nu / (3.5 Ag)) >= 0,
    Nu negative in tension [N, mm^2] (SI of 2 (1 + Nu/(500 Ag)) psi; from memory, verify)."""
    return np.maximum(0.17 * (1.0 + _a(Nu) / (3.5 * _a(Ag))), 0.0)


def segment_aspect_ratio(hw_segment, lw_segment, hw_wall, lw_wall):
    """hw/lw of a wall segment: the greater of the segment's and the entire wall's, 18.10.4.2
    (stated for special walls; xlcore applies it to every pier beside an opening, as its AS 3600
    module does). Returns (ratio, whole wall governs)."""
    own = _a(hw_segment) / _a(lw_segment)
    whole = _a(hw_wall) / _a(lw_wall)
    return np.maximum(own, whole), whole > own


def wall_vn_formula(fc, fyt, rho_t, Acv, hw_lw, lam=1.0):
    """Vn = (alpha_c lambda sqrt(f'c) + rho_t fyt) Acv [N], 11.5.4.3 Eq. (11.5.4.3) and
    18.10.4.1 Eq. (18.10.4.1); fyt capped at FYT_MAX_SHEAR (20.2.2.4)."""
    fy = np.minimum(_a(fyt), FYT_MAX_SHEAR)
    return (alpha_c(hw_lw) * _a(lam) * np.sqrt(_a(fc)) + _a(rho_t) * fy) * _a(Acv)


def wall_vn_max(fc, Acv):
    """Vn <= 0.66 sqrt(f'c) Acv [N], 11.5.4.2 (all vertical segments sharing a lateral force in
    special walls: 18.10.4.4, same 0.66): web crushing no steel can raise."""
    return 0.66 * np.sqrt(_a(fc)) * _a(Acv)


def segment_vn_max(fc, Acw):
    """Vn of one vertical wall segment <= 0.83 sqrt(f'c) Acw [N], 18.10.4.4 (also horizontal
    segments and coupling beams, 18.10.4.5)."""
    return 0.83 * np.sqrt(_a(fc)) * _a(Acw)


@dataclass(frozen=True)
class WallShear:
    """11.5.4 quantities per row, N and mm. `vn` nominal, `phi_vn` design."""

    area: np.ndarray  # Acv
    alpha_c: np.ndarray
    vc: np.ndarray  # alpha_c lambda sqrt(f'c) Acv
    vs: np.ndarray  # rho_t fyt Acv
    vn_max: np.ndarray  # the governing upper limit
    vn: np.ndarray
    phi: np.ndarray
    phi_vn: np.ndarray
    governs: np.ndarray  # GOV_* codes


def wall_shear(fc, fyt, Lw, tw, hw_lw, rho_t, lam=1.0, phi=PHI_SHEAR, segment=False) -> WallShear:
    """phi Vn of a wall in its plane, 11.5.4.2-11.5.4.3 and 18.10.4:
    Vn = min((alpha_c lambda sqrt(f'c) + rho_t fyt) Acv, limit). The limit is 0.66 sqrt(f'c) Acv
    (11.5.4.2), or with `segment` (one vertical segment of a special wall, 18.10.4.4)
    0.83 sqrt(f'c) Acw with Acw = Lw tw of the segment; the 0.66 limit then applies to the sum
    over the segments sharing the lateral force (`wall_vn_max` on their total Acv, the caller's).
    `hw_lw` is the governing ratio (see `segment_aspect_ratio`)."""
    acv = wall_shear_area(Lw, tw)
    ac = alpha_c(hw_lw)
    vc = ac * _a(lam) * np.sqrt(_a(fc)) * acv
    vs = _a(rho_t) * np.minimum(_a(fyt), FYT_MAX_SHEAR) * acv
    seg = np.asarray(segment, dtype=bool)
    cap = np.where(seg, segment_vn_max(fc, acv), wall_vn_max(fc, acv))
    vn = np.minimum(vc + vs, cap)
    gov = np.where(vc + vs <= cap, GOV_FORMULA, np.where(seg, GOV_SEGMENT_LIMIT, GOV_WALL_LIMIT))
    p = np.broadcast_to(_a(phi), vn.shape).copy()
    return WallShear(acv, ac, vc, vs, cap, vn, p, p * vn, gov)


def wall_rho_t_required(v_u, phi, fc, fyt, Lw, tw, hw_lw, lam=1.0):
    """Least rho_t with phi (alpha_c lambda sqrt(f'c) + rho_t fyt) Acv >= Vu, 11.5.4.3 rearranged.
    Returns (rho_t, capped): `capped` where Vu/phi exceeds 0.66 sqrt(f'c) Acv (11.5.4.2)."""
    acv = wall_shear_area(Lw, tw)
    need = np.abs(_a(v_u)) / _a(phi)
    vc = alpha_c(hw_lw) * _a(lam) * np.sqrt(_a(fc)) * acv
    rho = np.maximum(need - vc, 0.0) / (np.minimum(_a(fyt), FYT_MAX_SHEAR) * acv)
    return rho, need > wall_vn_max(fc, acv)


# --- 11.5.3 simplified design method for axial load

K_BRACED_RESTRAINED, K_BRACED_FREE, K_UNBRACED = 0.8, 1.0, 2.0


def effective_length_factor(braced=True, restrained=False):
    """k of Table 11.5.3.2: braced and restrained against rotation at one or both ends 0.8;
    braced and unrestrained at both ends 1.0; not braced against lateral translation 2.0.
    (ACI has no three- or four-side factor like AS 3600 Cl 11.4: side supports are ignored.)
    Values from memory, verify."""
    b = np.asarray(braced, dtype=bool)
    r = np.asarray(restrained, dtype=bool)
    return np.where(b, np.where(r, K_BRACED_RESTRAINED, K_BRACED_FREE), K_UNBRACED)


def simplified_axial_strength(fc, Ag, k_lc, h):
    """Pn = 0.55 f'c Ag (1 - (k lc / (32 h))^2) [N], 11.5.3.1 Eq. (11.5.3.1); never below zero.
    Ag = h x length [mm^2], k lc the effective height [mm], h the thickness [mm]."""
    slender = (_a(k_lc) / (32.0 * _a(h))) ** 2
    return np.maximum(0.55 * _a(fc) * _a(Ag) * (1.0 - slender), 0.0)


def simplified_applies(e, h):
    """11.5.3.1: the method applies only where the resultant of all factored loads lies within
    the middle third of the thickness, e <= h / 6 (solid rectangular wall)."""
    return np.abs(_a(e)) <= _a(h) / 6.0


# --- 11.3 minimum thickness


def min_thickness_bearing(lu, length):
    """Bearing walls: h >= max(100 mm, 1/25 of the lesser of the unsupported length and the
    unsupported height), Table 11.3.1.1 (ACI MNL-17(21) Shear Wall Example 1: 18 ft x 12 / 25 =
    8.64 in.; 4 in. in the in-lb edition)."""
    return np.maximum(100.0, np.minimum(_a(lu), _a(length)) / 25.0)


# --- 11.6 minimum reinforcement, 11.7 spacing and layers

RHO_L_LOW, RHO_T_LOW = 0.0012, 0.0020
RHO_L_OTHER, RHO_T_OTHER = 0.0015, 0.0025
RHO_HIGH_SHEAR = 0.0025
SMALL_BAR = 16.0  # mm: No. 16 (No. 5) and smaller


def low_shear(v_u, fc, Lw, tw, hw_lw, lam=1.0, phi=PHI_SHEAR):
    """In-plane Vu <= 0.5 phi alpha_c lambda sqrt(f'c) Acv: the condition of 11.6.1 under which
    the Table 11.6.1 minima apply (0.5 phi Vc in the 2014 wording; 2019 form from the code's
    change of Vc to alpha_c lambda sqrt(f'c) Acv: verify)."""
    cap = 0.5 * _a(phi) * alpha_c(hw_lw) * _a(lam) * np.sqrt(_a(fc)) * wall_shear_area(Lw, tw)
    return np.abs(_a(v_u)) <= cap


def rho_min_low_shear(bar_dia, fy):
    """(rho_l, rho_t) minima of Table 11.6.1, cast-in-place walls with deformed bars: bars
    <= 16 mm with fy >= 420 MPa: 0.0012 and 0.0020; otherwise 0.0015 and 0.0025."""
    small = (_a(bar_dia) <= SMALL_BAR) & (_a(fy) >= 420.0)
    return np.where(small, RHO_L_LOW, RHO_L_OTHER), np.where(small, RHO_T_LOW, RHO_T_OTHER)


def rho_l_min_high_shear(hw_lw, rho_t):
    """rho_l >= greater of 0.0025 + 0.5 (2.5 - hw/lw)(rho_t - 0.0025) and 0.0025,
    11.6.2(a) Eq. (11.6.2), where in-plane Vu exceeds the 11.6.1 threshold (need not exceed the
    rho_t required for strength: the caller may cap it)."""
    eq = RHO_HIGH_SHEAR + 0.5 * (2.5 - _a(hw_lw)) * (_a(rho_t) - RHO_HIGH_SHEAR)
    return np.maximum(eq, RHO_HIGH_SHEAR)


def wall_min_ratios(v_u, fc, fy, Lw, tw, hw_lw, rho_t, bar_dia, lam=1.0, phi=PHI_SHEAR):
    """(rho_l_min, rho_t_min) of a cast-in-place wall, 11.6.1 / 11.6.2 (see the two above)."""
    low = low_shear(v_u, fc, Lw, tw, hw_lw, lam, phi)
    l_low, t_low = rho_min_low_shear(bar_dia, fy)
    return (
        np.where(low, l_low, rho_l_min_high_shear(hw_lw, rho_t)),
        np.where(low, t_low, RHO_HIGH_SHEAR),
    )


MAX_SPACING = 450.0  # mm
MAX_SPACING_THICKNESS = 3.0
TWO_LAYER_THICKNESS = 250.0  # mm
COMMON_GRADES = (21.0, 25.0, 28.0, 32.0, 35.0, 40.0, 45.0, 50.0, 55.0, 60.0, 65.0, 70.0, 80.0)
"""f'c [MPa] offered by the advice search under ACI 318 (common practice, no source)."""

ASTM_BARS = (
    ("No. 10", 9.5, 71.0),
    ("No. 13", 12.7, 129.0),
    ("No. 16", 15.9, 199.0),
    ("No. 19", 19.1, 284.0),
    ("No. 22", 22.2, 387.0),
    ("No. 25", 25.4, 510.0),
    ("No. 29", 28.7, 645.0),
    ("No. 32", 32.3, 819.0),
    ("No. 36", 35.8, 1006.0),
)
"""ASTM A615/A615M and A706/A706M deformed bars, SI designations (20.2.1.3 names these
specifications): (designation, nominal diameter [mm], nominal area [mm^2]) from A615/A615M
Table 1, the bracketed SI values (seen reproduced at https://nomeesteel.pk/astm-standards, and
in a copy of A615/A615M-04a; No. 43 and No. 57 left out: not wall bars). The areas are the
inch-pound ones converted (No. 13: 0.20 in^2 = 129 mm^2), within 2.5 % of pi d^2 / 4 (the
checks' area from the diameter the workbook gives)."""

ADVICE_BARS = {
    "horizontal": ("No. 10", "No. 13", "No. 16", "No. 19"),
    "vertical": ("No. 13", "No. 16", "No. 19", "No. 25", "No. 29"),
    "zone": ("No. 19", "No. 25", "No. 29", "No. 32", "No. 36"),
}
"""The bars the advice offers under ACI 318 (common practice, no source): the ASTM sizes nearest
the AS 3600 ranges (N10-N20, N12-N28, N20-N36), as many of each, so the search is as large."""


def wall_max_spacing(h, Lw, shear_steel_required=False):
    """Largest spacing of (longitudinal, transverse) bars, 11.7.2.1 and 11.7.3.1: the lesser of
    3h and 450 mm; where shear reinforcement is required for in-plane strength also lw/3
    (longitudinal) and lw/5 (transverse)."""
    base = np.minimum(MAX_SPACING_THICKNESS * _a(h), MAX_SPACING)
    need = np.asarray(shear_steel_required, dtype=bool)
    return (
        np.where(need, np.minimum(base, _a(Lw) / 3.0), base),
        np.where(need, np.minimum(base, _a(Lw) / 5.0), base),
    )


def two_layers_required(h):
    """Walls thicker than 250 mm (other than basement and cantilever retaining walls) have two
    layers of reinforcement, 11.7.2.3 (the 10 in. of the in-lb edition; ACI MNL-17(21) Shear Wall
    Example 1 cites 11.7.2.3 for its 12 in. wall)."""
    return _a(h) > TWO_LAYER_THICKNESS


def min_clear_spacing(db, aggregate=None):
    """Least clear spacing of parallel bars in a layer: max(25 mm, db, 4/3 d_agg), 25.2.1
    (aggregate size optional; from memory, verify)."""
    out = np.maximum(25.0, _a(db))
    return out if aggregate is None else np.maximum(out, 4.0 / 3.0 * _a(aggregate))


def boundary_clear_spacing(db, aggregate=None):
    """Least clear spacing of the longitudinal bars of columns, struts and boundary elements in
    walls: max(40 mm, 1.5 db, 4/3 d_agg), 25.2.3 (SI form of 1.5 in.; aggregate optional).
    Why apart from 25.2.1: an end zone's bars are a boundary element's, the web's are not."""
    out = np.maximum(40.0, 1.5 * _a(db))
    return out if aggregate is None else np.maximum(out, 4.0 / 3.0 * _a(aggregate))


# ---------------------------------------------------------------- axial load and bending


def beta1(fc):
    """beta1 = 0.85 for 17 <= f'c <= 28 MPa, 0.85 - 0.05 (f'c - 28) / 7 between, 0.65 for
    f'c >= 55 MPa, Table 22.2.2.4.3: depth of the stress block a = beta1 c."""
    f = _a(fc)
    return np.where(f >= 55.0, 0.65, np.clip(0.85 - 0.05 * (f - 28.0) / 7.0, 0.65, 0.85))


STRESS_INTENSITY = 0.85
"""22.2.2.4.1: the equivalent rectangular block carries 0.85 f'c."""


def stress_block(fc):
    """(intensity, depth ratio) of the rectangular block, 22.2.2.4.1 and Table 22.2.2.4.3:
    0.85 f'c over beta1 c. The pair is what xlcore.mechanics.nm (`Rect`, `EvenRect`: alpha2, gamma) and
    xlcore.mechanics.nm_core (`block`) take, with EPS_CU and ES."""
    b = beta1(fc)
    return np.full(b.shape, STRESS_INTENSITY), b


def nominal_axial_strength(fc, Ag, Ast, fy):
    """Po = 0.85 f'c (Ag - Ast) + fy Ast [N], 22.4.2.2 Eq. (22.4.2.2); Ag gross, fy capped at
    FY_MAX_LONGITUDINAL (20.2.2.4)."""
    return 0.85 * _a(fc) * (_a(Ag) - _a(Ast)) + np.minimum(_a(fy), FY_MAX_LONGITUDINAL) * _a(Ast)


def max_axial_strength(Po, spiral=False):
    """Pn,max = 0.80 Po (ties) or 0.85 Po (spirals), Table 22.4.2.1: accounts for accidental
    eccentricity, so no separate minimum moment applies to a nonslender member."""
    return np.where(spiral, PN_MAX_SPIRAL, PN_MAX_TIED) * _a(Po)


def max_tensile_strength(Ast, fy):
    """Pnt,max = fy Ast [N] (positive magnitude), 22.4.3.1."""
    return np.minimum(_a(fy), FY_MAX_LONGITUDINAL) * _a(Ast)


def yield_strain(fy, Es=ES):
    """epsilon_ty = fy / Es, 21.2.2.1 (deformed bars)."""
    return _a(fy) / Es


def net_tensile_strain(c, dt, eps_cu=EPS_CU):
    """epsilon_t = eps_cu (dt - c) / c: strain in the extreme tension bar at nominal strength
    (22.2.1.2 linear strains), dt its depth, c the neutral-axis depth [mm]; tension positive."""
    c = _a(c)
    # c = 0 (a section with no steel, no compression zone) gives +inf: tension-controlled, the
    # limit of the expression, which Table 21.2.2 takes without a warning
    with np.errstate(divide="ignore"):
        return eps_cu * (_a(dt) - c) / c


def phi_axial_flexure(eps_t, fy, Es=ES, spiral=False):
    """phi by net tensile strain, Table 21.2.2 (2019 edition): compression-controlled
    eps_t <= eps_ty: 0.65 (ties) / 0.75 (spirals); tension-controlled eps_t >= eps_ty + 0.003:
    0.90; linear between (21.2.2.1-21.2.2.2: the tension-controlled limit moved from 0.005 to
    eps_ty + 0.003 in 2019)."""
    ety = yield_strain(fy, Es)
    low = np.where(spiral, PHI_COMPRESSION_SPIRAL, PHI_COMPRESSION_TIED)
    frac = np.clip((_a(eps_t) - ety) / 0.003, 0.0, 1.0)
    return low + (PHI_TENSION_CONTROLLED - low) * frac


def design_axial_flexure(pn, mn, c, dt, fy, po, spiral=False, Es=ES, eps_cu=EPS_CU):
    """A point of the design interaction diagram from a nominal one: (phi, phi Pn, phi Mn) for
    (Pn, Mn) at neutral-axis depth c with the extreme tension bar at depth dt [N, N mm, mm].
    phi by the net tensile strain (Table 21.2.2); phi Pn not above phi Pn,max (Table 22.4.2.1):
    the design diagram is cut horizontally at phi 0.80 Po (0.85 with spirals), the moment kept.
    Compression positive; `po` from `nominal_axial_strength`. (Nominal points come from
    xlcore.mechanics.nm with `stress_block`.)"""
    phi = phi_axial_flexure(net_tensile_strain(c, dt, eps_cu), fy, Es, spiral)
    cap = phi * max_axial_strength(po, spiral)
    return phi, np.minimum(phi * _a(pn), cap), phi * _a(mn)


# ---------------------------------------------------------------- beams (lintels), Ch. 9 / 22


def beam_flexure(b, d, As, fc, fy):
    """Singly reinforced rectangular section with the block of 22.2.2: a = As fy / (0.85 f'c b),
    c = a / beta1, Mn = As fy (d - a/2) [N mm]; phi by eps_t (Table 21.2.2). Returns
    (Mn, c/d, phi)."""
    fy = np.minimum(_a(fy), FY_MAX_LONGITUDINAL)
    a = _a(As) * fy / (0.85 * _a(fc) * _a(b))
    c = a / beta1(fc)
    mn = _a(As) * fy * (_a(d) - a / 2)
    return mn, c / _a(d), phi_axial_flexure(net_tensile_strain(c, d), fy)


def beam_av_min(fc, b, s, fyt):
    """Av,min = max(0.062 sqrt(f'c), 0.35) b s / fyt [mm^2], 9.6.3.4 (Table 9.6.3.4; from memory,
    verify)."""
    return np.maximum(0.062 * np.sqrt(_a(fc)), 0.35) * _a(b) * _a(s) / np.minimum(_a(fyt), FYT_MAX_SHEAR)


SQRT_FC_MAX = 8.3  # MPa, 22.5.3.1 (beams without Av,min)


def beam_vc(fc, b, d, av, av_min, rho_w, lam=1.0):
    """Vc of a nonprestressed beam without axial force, Table 22.5.5.1 [N]: with Av >= Av,min the
    greater of 0.17 lambda sqrt(f'c) b d (a) and 0.66 lambda rho_w^(1/3) sqrt(f'c) b d (b);
    otherwise 0.66 lambda_s lambda rho_w^(1/3) sqrt(f'c) b d (c), lambda_s = sqrt(2/(1 + 0.004 d))
    <= 1 (22.5.5.1.3). sqrt(f'c) <= 8.3 MPa (22.5.3.1); Vc <= 0.42 lambda sqrt(f'c) b d.
    (a)-(c) and the 8.3 MPa limit from a public summary; lambda_s and the 0.42 cap from memory,
    verify."""
    root = np.minimum(np.sqrt(_a(fc)), SQRT_FC_MAX)
    bd = _a(b) * _a(d)
    lam_s = np.minimum(np.sqrt(2.0 / (1.0 + 0.004 * _a(d))), 1.0)
    cube = np.cbrt(_a(rho_w))
    with_min = np.maximum(0.17 * _a(lam) * root * bd, 0.66 * _a(lam) * cube * root * bd)
    without = 0.66 * lam_s * _a(lam) * cube * root * bd
    vc = np.where(_a(av) >= _a(av_min), with_min, without)
    return np.minimum(vc, 0.42 * _a(lam) * root * bd)


def beam_vs(av, fyt, d, s):
    """Vs = Av fyt d / s [N], 22.5.8.5.3 (vertical stirrups), fyt <= 420 MPa (20.2.2.4)."""
    return _a(av) * np.minimum(_a(fyt), FYT_MAX_SHEAR) * _a(d) / _a(s)


def beam_vn_max(fc, b, d, vc):
    """Section limit Vn <= Vc + 0.66 sqrt(f'c) b d [N], 22.5.1.2."""
    return _a(vc) + 0.66 * np.sqrt(_a(fc)) * _a(b) * _a(d)


# --- Chapter 23 strut-and-tie (deep lintels of walls that are not special structural walls)

STM_STRESS = 0.85
"""23.4.1 / 23.9.1: effective compressive strength fce = 0.85 beta_c beta_s f'c of a strut
(beta_n for a node face), beta_c = 1 (no confinement taken)."""

STM_BETA_S_REINFORCED, STM_BETA_S_PLAIN = 0.75, 0.4
"""Table 23.4.3: interior bottle-shaped strut with the distributed reinforcement of 23.5: 0.75;
without it: 0.4 (xlcore takes 0.75 where the lintel has fitments, without checking the ratio of
23.5: from memory, verify)."""

STM_BETA_N_CCT = 0.80
"""Table 23.9.2: nodes anchoring one tie (C-C-T): beta_n = 0.80 (from memory, verify)."""

PHI_STM = 0.75
"""Table 21.2.1(g): phi for struts, ties, nodal zones and bearing areas of strut-and-tie models."""


# ---------------------------------------------------------------- Chapter 18: special walls


def omega_v(hwcs_lw, mpr_mu=1.5):
    """Flexural overstrength factor Omega_v, Table 18.10.3.1.2: 1.0 for hwcs/lw <= 1.5; else the
    greater of Mpr/Mu and 1.5. Verified: a published ACI code case on 18.10.3.1, and ACI MNL-17(21)
    Vol. 1 Shear Wall Example 2 (Mpr/Mu = 1.4 < 1.5 -> Omega_v = 1.5; tests/test_aci_published.py).
    The table's clause allowing a lower value by detailed analysis is not transcribed (xlcore takes
    Mpr/Mu as a Project setting)."""
    return np.where(_a(hwcs_lw) <= 1.5, 1.0, np.maximum(_a(mpr_mu), 1.5))


NS_MIN_PER_INCH = 0.007
"""18.10.3.1.3: ns not taken less than 0.007 hwcs with hwcs in inches (the in-lb edition; the
commentary: for buildings with tall storeys). Applied here as 0.007 hwcs / 25.4 with hwcs in mm."""


def ns_min(hwcs):
    """Least number of storeys ns for omega_v, 18.10.3.1.3: 0.007 hwcs, hwcs in inches
    (= 0.007 hwcs[mm] / 25.4). ACI MNL-17(21) Vol. 1 Shear Wall Example 2: hwcs = 92 ft ->
    0.007 x 1104 = 7.7 (tests/test_aci_published.py)."""
    return NS_MIN_PER_INCH * _a(hwcs) / 25.4


def storeys_for_amplification(ns, hwcs):
    """ns used in omega_v: the storeys above the critical section, not less than `ns_min`
    (18.10.3.1.3); the larger ns gives the larger omega_v."""
    return np.maximum(_a(ns), ns_min(hwcs))


def omega_v_dynamic(hwcs_lw, ns):
    """Dynamic shear amplification omega_v, 18.10.3.1.3: 1.0 for hwcs/lw < 2.0; otherwise
    0.9 + ns/10 for ns <= 6 and 1.3 + ns/30 (<= 1.8) for ns > 6, ns the number of storeys above
    the critical section (the caller applies the least ns, `storeys_for_amplification`).
    Verified: ACI MNL-17(21) Vol. 1 Shear Wall Example 2 (ns = 8 -> 1.3 + 8/30 = 1.57)."""
    n = _a(ns)
    amp = np.where(n <= 6, 0.9 + n / 10.0, np.minimum(1.3 + n / 30.0, 1.8))
    return np.where(_a(hwcs_lw) < 2.0, 1.0, amp)


def design_shear_special(v_u, hwcs_lw, ns, mpr_mu=1.5):
    """Ve = Omega_v omega_v Vu <= 3 Vu, 18.10.3.1 Eq. (18.10.3.1) [N]."""
    vu = _a(v_u)
    return np.minimum(omega_v(hwcs_lw, mpr_mu) * omega_v_dynamic(hwcs_lw, ns) * vu, 3.0 * vu)


DRIFT_FLOOR = 0.005
"""18.10.6.2(a): delta_u/hwcs is not taken less than 0.005."""


def boundary_c_limit(lw, delta_u, hw):
    """lw / (600 (1.5 delta_u / hw)) [mm], with delta_u/hw not less than 0.005: special boundary
    elements are required where c >= this, 18.10.6.2(a) Eq. (18.10.6.2a) (walls effectively
    continuous from base to top with one critical section, hwcs/lw >= 2.0). Equivalent to the
    code's form 1.5 delta_u/hwcs >= lw/(600 c). ACI MNL-17(21) Vol. 1 Shear Wall Example 2 checks
    the same inequality (tests/test_aci_published.py)."""
    drift = np.maximum(_a(delta_u) / _a(hw), DRIFT_FLOOR)
    return _a(lw) / (600.0 * 1.5 * drift)


def boundary_required_displacement(c, lw, delta_u, hw):
    """True where c >= lw / (600 (1.5 delta_u/hw)), 18.10.6.2(a)."""
    return _a(c) >= boundary_c_limit(lw, delta_u, hw)


def boundary_vertical_extent(lw, m_u, v_u):
    """Boundary element extent above and below the critical section: at least the greater of lw
    and Mu / (4 Vu) [mm], 18.10.6.2(b)(i). M in N mm, V in N."""
    return np.maximum(_a(lw), np.abs(_a(m_u)) / (4.0 * np.abs(_a(v_u))))


DRIFT_CAPACITY_FLOOR = 0.015
"""18.10.6.2(b)(iii): delta_c/hwcs of Eq. (18.10.6.2b) need not be taken less than 0.015."""


def drift_capacity_eq(lw, b, c, v_e, fc, Acv):
    """delta_c / hwcs = (1/100) (4 - (1/50)(lw/b)(c/b) - Ve / (0.66 sqrt(f'c) Acv)),
    18.10.6.2(b)(iii) Eq. (18.10.6.2b) as printed (8 sqrt(f'c) Acv in psi units), without the
    0.015 floor. Verified: ACI MNL-17(21) Vol. 1 Shear Wall Example 2 (0.0035 at b = 12 in.,
    0.0173 at b = 16 in.; tests/test_aci_published.py)."""
    term = 4.0 - (_a(lw) / _a(b)) * (_a(c) / _a(b)) / 50.0 - _a(v_e) / (0.66 * np.sqrt(_a(fc)) * _a(Acv))
    return term / 100.0


def drift_capacity(lw, b, c, v_e, fc, Acv):
    """delta_c / hwcs of Eq. (18.10.6.2b), not taken less than 0.015 (18.10.6.2(b)(iii));
    1.5 delta_u / hwcs must not exceed it where the displacement method calls for boundary
    elements (the floor: public transcriptions of the clause agree; the code's text not at hand)."""
    return np.maximum(drift_capacity_eq(lw, b, c, v_e, fc, Acv), DRIFT_CAPACITY_FLOOR)


WIDTH_FOR_DRIFT = 0.025


def boundary_width_for_drift(c, lw):
    """b >= sqrt(0.025 c lw) [mm], 18.10.6.2(b)(ii): the alternative to the drift-capacity check
    (iii) (either satisfies 18.10.6.2(b)). ACI MNL-17(21) Vol. 1 Shear Wall Example 2:
    sqrt(0.025 x 67.9 x 336) = 23.9 in. The root of two lengths is a length in any one unit."""
    return np.sqrt(WIDTH_FOR_DRIFT * _a(c) * _a(lw))


STRESS_TRIGGER, STRESS_DISCONTINUE = 0.2, 0.15


def boundary_required_stress(sigma, fc):
    """True where the extreme-fibre compression under factored loads with E, linear elastic on
    the gross section, exceeds 0.2 f'c, 18.10.6.3."""
    return _a(sigma) > STRESS_TRIGGER * _a(fc)


def boundary_may_stop(sigma, fc):
    """A special boundary element may be discontinued where the stress falls below 0.15 f'c,
    18.10.6.3."""
    return _a(sigma) < STRESS_DISCONTINUE * _a(fc)


def boundary_length(c, lw):
    """Horizontal extent from the extreme compression fibre: at least the greater of c - 0.1 lw
    and c / 2 [mm], 18.10.6.4(a)."""
    return np.maximum(_a(c) - 0.1 * _a(lw), _a(c) / 2.0)


def boundary_min_width(hu, hwcs_lw, c, lw):
    """Width b of the flexural compression zone: at least hu / 16, 18.10.6.4(b); and 300 mm where
    hwcs/lw >= 2.0 and c/lw >= 3/8, 18.10.6.4(c). hu the laterally unsupported height [mm]."""
    base = _a(hu) / 16.0
    thick = (_a(hwcs_lw) >= 2.0) & (_a(c) / _a(lw) >= 3.0 / 8.0)
    return np.where(thick, np.maximum(base, 300.0), base)


def hoop_spacing_max(b_least, db_long, hx, fy_long=420.0):
    """Vertical spacing of boundary-element hoops, 18.10.6.4(e) with 18.7.5.3: the least of one
    third of the boundary element's least dimension, 6 db of the smallest longitudinal bar
    (5 db for Grade 550: xlcore takes 5 db above 420 MPa, the conservative reading between), and
    so = 100 + (350 - hx)/3 within 100..150 mm [mm] (the SI edition's form of 4 + (14 - hx)/3
    within 4..6 in.). ACI MNL-17(21) Vol. 1 Shear Wall Example 2 (Grade 60): min(16/3, 6 x 1.0,
    so 5.0) in.; the 5 db of Grade 80 agrees with a public column-design script, no published
    example found. 18.10.6.4(e) also caps s by Table 18.10.6.5(b) (min(6 db, 150 mm) for Grade
    420 near the critical section, looser above): inside this limit already, which xlcore applies
    at every height."""
    so = np.clip(100.0 + (350.0 - _a(hx)) / 3.0, 100.0, 150.0)
    mult = np.where(_a(fy_long) > 420.0, 5.0, 6.0)
    return np.minimum(np.minimum(_a(b_least) / 3.0, mult * _a(db_long)), so)


def hoop_hx_max(b):
    """Spacing hx of laterally supported bars around the boundary element: at most the lesser
    of 350 mm and two thirds of its thickness, 18.10.6.4(f)."""
    return np.minimum(350.0, 2.0 * _a(b) / 3.0)


def boundary_ash_ratio(fc, fyt, Ag, Ach):
    """Ash / (s bc) >= greater of 0.3 (Ag/Ach - 1) f'c/fyt and 0.09 f'c/fyt, Table 18.10.6.4(g)
    (rectilinear hoops). ACI MNL-17(21) Vol. 1 Shear Wall Example 2: Ag 544, Ach 403 in.^2,
    5 / 60 ksi -> 0.00875 (over 0.0075)."""
    r = _a(fc) / _a(fyt)
    return np.maximum(0.3 * (_a(Ag) / _a(Ach) - 1.0) * r, 0.09 * r)


def boundary_ash_required(s, bc, fc, fyt, Ag, Ach):
    """Least total area of hoop legs and crossties Ash [mm^2] across a core dimension bc [mm] at
    spacing s [mm]: Ash >= (Table 18.10.6.4(g) ratio) s bc."""
    return boundary_ash_ratio(fc, fyt, Ag, Ach) * _a(s) * _a(bc)


# --- 18.10.2 special-wall web reinforcement


def special_web_min_ratio(v_u, fc, Lw, tw, lam=1.0):
    """rho_l and rho_t at least 0.0025 in a special structural wall, 18.10.2.1; where Vu does not
    exceed 0.083 lambda sqrt(f'c) Acv (lambda sqrt(f'c) Acv in psi) rho_t may follow 11.6
    instead: returns (0.0025, True where the 11.6 minimum may be used for rho_t)."""
    low = np.abs(_a(v_u)) <= 0.083 * _a(lam) * np.sqrt(_a(fc)) * wall_shear_area(Lw, tw)
    return np.full(low.shape, RHO_HIGH_SHEAR), low


def special_rho_l_min(hw_lw, rho_t):
    """Where hw/lw does not exceed 2.0, rho_l at least rho_t, 18.10.4.3 (special walls; the
    vertical steel then shares the shear of a squat wall). Returns the minimum rho_l from this
    rule (0 where hw/lw > 2.0)."""
    return np.where(_a(hw_lw) <= 2.0, _a(rho_t), 0.0)


def special_two_curtains(v_u, fc, Lw, tw, hw_lw, lam=1.0):
    """Two curtains of reinforcement where Vu > 0.17 lambda sqrt(f'c) Acv or hw/lw >= 2.0,
    18.10.2.2."""
    high = np.abs(_a(v_u)) > 0.17 * _a(lam) * np.sqrt(_a(fc)) * wall_shear_area(Lw, tw)
    return high | (_a(hw_lw) >= 2.0)


# --- 18.10.7 coupling beams


def coupling_diagonal_required(ln, h, v_u, fc, Acw, lam=1.0):
    """Diagonal reinforcement required where ln/h < 2 and Vu >= 0.33 lambda sqrt(f'c) Acw,
    18.10.7.2 (at equality required: the conservative reading where sources differ on > or >=)."""
    return (_a(ln) / _a(h) < 2.0) & (np.abs(_a(v_u)) >= 0.33 * _a(lam) * np.sqrt(_a(fc)) * _a(Acw))


def coupling_vn_diagonal(Avd, fy, alpha, fc, Acw):
    """Vn = 2 Avd fy sin(alpha) <= 0.83 sqrt(f'c) Acw [N], 18.10.7.4 Eq. (18.10.7.4); Avd the
    area of each diagonal group, alpha its angle to the beam axis [rad]."""
    steel = 2.0 * _a(Avd) * np.minimum(_a(fy), FY_MAX_LONGITUDINAL) * np.sin(_a(alpha))
    return np.minimum(steel, 0.83 * np.sqrt(_a(fc)) * _a(Acw))


def coupling_is_beam(ln, h):
    """ln/h >= 4: the coupling beam is designed as a beam of a special moment frame (18.6),
    18.10.7.1."""
    return _a(ln) / _a(h) >= 4.0


# ---------------------------------------------------------------- the Standard interface

_CLAUSES = {
    "wall_shear": "ACI 318-19 11.5.4.3 Eq. (11.5.4.3)",
    "wall_shear_limit": "ACI 318-19 11.5.4.2 (0.66 sqrt(f'c) Acv)",
    "phi_wall_shear": "ACI 318-19 Table 21.2.1(b)",
    "aspect_ratio": "ACI 318-19 18.10.4.2 (segment: greater of its own and the wall's)",
    "stress_block": "ACI 318-19 22.2.2.4 (0.85 f'c, beta1 Table 22.2.2.4.3, eps_cu 22.2.2.1)",
    "squash": "ACI 318-19 22.4.2.2 Eq. (22.4.2.2)",
    "max_compression": "ACI 318-19 Table 22.4.2.1 (Pn,max = 0.80 Po), Table 21.2.2",
    "tension": "ACI 318-19 22.4.3.1 (Pnt,max = fy Ast)",
    "phi_axial_bending": "ACI 318-19 Table 21.2.2 (eps_ty, eps_ty + 0.003)",
    "design_moment": "ACI 318-19 Table 22.4.2.1 (0.80 Po covers accidental eccentricity)",
    "effective_height": "ACI 318-19 Table 11.5.3.2",
    "simplified": "ACI 318-19 11.5.3.1 Eq. (11.5.3.1)",
    "rho_v_min": "ACI 318-19 11.6.1 Table 11.6.1 / 11.6.2(a) Eq. (11.6.2)",
    "rho_h_min": "ACI 318-19 11.6.1 Table 11.6.1 / 11.6.2(b)",
    "spacing": "ACI 318-19 11.7.2.1 / 11.7.3.1",
    "clear_gap": "ACI 318-19 25.2.1",
    "zone_clear_gap": "ACI 318-19 25.2.3",
    "layers": "ACI 318-19 11.7.2.3 (two layers above 250 mm)",
    "beam_flexure": "ACI 318-19 22.2 / 22.3, Table 21.2.2",
    "beam_shear": "ACI 318-19 Table 22.5.5.1, 22.5.8.5.3, 22.5.1.2",
    "coupling_beam": "ACI 318-19 18.10.7.4 Eq. (18.10.7.4)",
    "boundary_trigger": "ACI 318-19 18.10.6.3 (0.2 f'c; may stop below 0.15 f'c)",
}


class ACI318:
    """ACI 318-19 (SI) as a `codes.base.Standard`. Walls are taken as braced by the floors."""

    name = NAME
    min_eccentricity = 0.0  # Table 22.4.2.1: the 0.80 Po cap stands for accidental eccentricity
    max_compression_ratio = PN_MAX_TIED  # phi Pn,max = phi 0.80 Po, Table 22.4.2.1 (ties)
    symbols = {
        "Nu": "Pn",
        "Mu": "Mn",
        "squash": "Po",
        "tension": "Pnt",
        "top": "phiPn,max",
        "top_working": "phiPn,max = {phi:.2f} x 0.80 x {squash:.1f} = {top:.1f} kN (Table 22.4.2.1)",
        "design_moment": "Table 22.4.2.1",
        "clause_tension": "ACI 318-19 Table 21.2.2 (tension-controlled), 22.4.3.1",
        "clause_squash": "ACI 318-19 22.4.2, Table 22.4.2.1 (0.80 Po), Table 21.2.2",
        "clause_curve": "ACI 318-19 22.2 / 22.4, Table 21.2.2 (phi by eps_t)",
        "clause_core": "ACI 318-19 22.2 / 22.4, Tables 21.2.2 and 22.4.2.1",
        "simplified": "11.5.3",
        "boundary_flag": "special boundary element (18.10.6.3)",
        "shear_design": "phiVn",
        "sheet_shear": "11.5.4 / 18.10.4",
        "sheet_axial": "22.2, 22.4, Tables 21.2.2 and 22.4.2.1",
        "least_moment_note": "no least moment: N* at most phi 0.80 Po (Table 22.4.2.1)",
        "block": "22.2.2.4",
        "phi_table": "Table 21.2.2",
        "top_text": "phi 0.80 Po",
        "simplified_clause": "11.5.3.1",
        "simplified_note": "e from out-of-plane M*, within the middle third (h/6)",
        "earthquake_rules": "Ch. 18",
        "detailing_rules": "11.6 / 11.7",
        "flag_line": "Boundary-element flag (18.10.6.3)",
    }
    Es = ES
    eps_cu = EPS_CU
    phi_wall_shear = PHI_SHEAR
    phi_compression = PHI_COMPRESSION_TIED
    phi_tension = PHI_TENSION_CONTROLLED
    phi_simplified = PHI_SIMPLIFIED

    lam = 1.0
    """lambda, 19.2.4: 1.0 normal-weight concrete (the Project setting "ACI 318: lambda ...")."""

    def clause(self, key: str) -> str:
        return _CLAUSES[key]

    def configure(self, settings):
        lam = float(getattr(settings, "aci_lambda", 1.0))
        if lam == self.lam:
            return self
        out = ACI318()
        out.lam = lam
        return out

    # ---- shear
    def wall_aspect_ratio(self, Hw_pier, Lw_pier, Hw_wall, Lw_wall, beside_opening):
        ratio, whole = segment_aspect_ratio(Hw_pier, Lw_pier, Hw_wall, Lw_wall)
        side = np.asarray(beside_opening, dtype=bool)
        return np.where(side, ratio, _a(Hw_pier) / _a(Lw_pier)), side & whole

    def wall_shear(self, fc, fy, Lw, tw, hw_lw, rho_h, rho_v, phi=None):
        from xlcore.codes.base import ShearCapacity

        r = wall_shear(fc, fy, Lw, tw, hw_lw, rho_h, lam=self.lam, phi=PHI_SHEAR if phi is None else phi)
        return ShearCapacity(
            area=r.area,
            concrete=r.vc,
            steel=r.vs,
            limit=r.vn_max,
            nominal=r.vn,
            phi=r.phi,
            design=r.phi_vn,
            governs=r.governs,
            governing_text=GOVERNING_TEXT,
            detail={"alpha_c": r.alpha_c},
        )

    def wall_steel_required(self, v_star, phi, fc, fy, Lw, tw, hw_lw):
        return wall_rho_t_required(v_star, phi, fc, fy, Lw, tw, hw_lw, lam=self.lam)

    def wall_shear_text(self, cap, fc, fy, Lw, tw, hw_lw):
        from xlcore.codes.base import num

        kn = 1e-3
        cols = [_a(c).tolist() for c in (
            fc, fy, Lw, tw, hw_lw, cap.detail["alpha_c"], cap.concrete * kn, cap.steel * kn,
            cap.limit * kn, cap.phi, cap.design * kn, cap.governs)]  # fmt: skip
        first, second = [], []
        weight = " normal weight" if self.lam == 1.0 else ", lightweight (19.2.4)"
        for f, y, lw, t, r, ac, vc, vs, vm, p, pv, g in zip(*cols, strict=True):
            if r <= RATIO_SQUAT:
                why = f"hw/lw {r:.3f} <= {RATIO_SQUAT}"
            elif r >= RATIO_SLENDER:
                why = f"hw/lw {r:.3f} >= {RATIO_SLENDER}"
            else:
                why = f"hw/lw {r:.3f}: linear between 0.25 at 1.5 and 0.17 at 2.0"
            first.append(
                f"alpha_c = {ac:.3f} ({why}); Vc = alpha_c lambda sqrt(f'c) Acv = {ac:.3f} x {self.lam:g} x "
                f"sqrt({f:g}) x {lw:.0f} x {t:.0f} = {num(vc)} kN (11.5.4.3, lambda {self.lam:g}{weight})"
            )
            rho = vs / (min(y, FYT_MAX_SHEAR) * lw * t * kn) if lw * t > 0 else 0.0
            seg = g == GOV_SEGMENT_LIMIT
            limit = "0.83 sqrt(f'c) Acw (18.10.4.4)" if seg else "0.66 sqrt(f'c) Acv (11.5.4.2)"
            coef = 0.83 if seg else 0.66
            fyt = min(y, FYT_MAX_SHEAR)
            second.append(
                f"Vs = rho_t fyt Acv = {rho:.5f} x {fyt:g} x {lw:.0f} x {t:.0f} = {num(vs)} kN "
                f"(fyt <= {FYT_MAX_SHEAR:g} MPa, 20.2.2.4); Vn <= {limit} = {coef} x sqrt({f:g}) x "
                f"{lw:.0f} x {t:.0f} = {num(vm)} kN; phiVn = {p:.2f} x min({num(vc)} + {num(vs)}, {num(vm)}) "
                f"= {num(pv)} kN"
            )
        return first, second

    def wall_shear_advice(self, util, rho_req, capped, hw_lw, cap):
        from xlcore.codes.base import words_once

        # the words read Vu / phi Vn only against 1: worded once per distinct (fails, capped,
        # rho needed), the same words as row by row
        fails = ~(_a(util) <= 1.0)
        return words_once(_shear_advice_words, fails, _a(capped).astype(bool), rho_req)

    # ---- axial load and bending
    def stress_block(self, fc):
        return stress_block(fc)

    def squash_load(self, fc, Ag_net, As, fy):
        return nominal_axial_strength(fc, _a(Ag_net) + _a(As), As, fy)

    def max_compression(self, fc, Ag_net, As, fy, phi=None):
        p = PHI_COMPRESSION_TIED if phi is None else phi
        return p * max_axial_strength(self.squash_load(fc, Ag_net, As, fy))

    def tension_capacity(self, As, fy):
        return -max_tensile_strength(As, fy)

    def phi_axial_bending(self, state, phi0=None):
        eps_t = net_tensile_strain(state.dn, state.d0, state.eps_cu)
        phi = phi_axial_flexure(eps_t, state.fy, state.Es)
        if phi0 is None:
            return phi
        # a compression-controlled phi other than 0.65 (a setting): same interpolation
        frac = (phi - PHI_COMPRESSION_TIED) / (PHI_TENSION_CONTROLLED - PHI_COMPRESSION_TIED)
        return phi0 + (PHI_TENSION_CONTROLLED - phi0) * frac

    def phi_axial_bending_text(self, state):
        eps_t = net_tensile_strain(state.dn, state.d0, state.eps_cu)
        ety = yield_strain(state.fy, state.Es)
        shape = np.shape(eps_t)
        return [
            f"eps_t {e:.5f}, eps_ty {y:.5f}: "
            + ("compression-controlled" if e <= y else "tension-controlled" if e >= y + 0.003
               else "transition")
            for e, y in zip(eps_t.tolist(), np.broadcast_to(ety, shape).tolist(), strict=True)
        ]

    def design_moment(self, m_star, n_star, D):
        return np.abs(_a(m_star))

    # ---- walls in compression
    def effective_height_factor(self, Hw, L1, supported_edges, restrained=False):
        return effective_length_factor(True, restrained) * np.ones_like(_a(Hw))

    def simplified_capacity(self, fc, tw, length, hwe, e, phi=None):
        p = PHI_SIMPLIFIED if phi is None else phi
        return p * simplified_axial_strength(fc, _a(tw) * _a(length), hwe, tw)

    def simplified_eccentricities(self, e, tw, hwe):
        e = np.abs(_a(e))
        return e, np.full(e.shape, np.nan)  # no added slenderness eccentricity: Eq. (11.5.3.1)

    def simplified_slenderness_limit(self, layers):
        return np.full(np.shape(layers), np.inf)  # 11.5.3 sets none (Eq. (11.5.3.1) falls to 0)

    def simplified_text(self, w, phi):
        cols = [_a(c).tolist() for c in (w.k, w.Hc, w.hwe, w.e, w.tw, w.fc, w.Lw, w.cap)]
        return [
            (
                f"k lc = {kk:.3f} x {h:.0f} = {he:.0f} mm (Table 11.5.3.2); e = {ee:.1f} mm <= h/6; "
                f"phiPn = {phi:.2f} x 0.55 x {fc:g} x {t:.0f} x {lw:.0f} "
                f"x (1 - ({he:.0f} / (32 x {t:.0f}))^2) "
                f"= {c:.1f} kN (11.5.3.1)"
            )
            if ok
            else f"not applicable: {why}"
            for (kk, h, he, ee, t, fc, lw, c), ok, why in zip(
                zip(*cols, strict=True), w.ok.tolist(), w.why.tolist(), strict=True
            )
        ]

    def simplified_exclusions(self, n_star, n_end_lo, tw, hwe, e, layers, stress):
        n = _a(n_star)
        return {
            "not in compression": n <= 0,
            "end in tension": (n > 0) & (_a(n_end_lo) < 0),
            "load outside the middle third": ~simplified_applies(e, tw),
        }

    # ---- detailing
    def min_ratios(self, *, fc, fy, tw, Lw, wall_length, sigma, v_star, hw_lw, rho_h, bar_dia, restrained):
        return wall_min_ratios(v_star, fc, fy, Lw, tw, hw_lw, rho_h, bar_dia)

    def max_spacing(self, tw, Lw, shear_steel_required=False):
        return wall_max_spacing(tw, Lw, shear_steel_required)

    def min_clear_gap(self, db):
        return min_clear_spacing(db)

    def zone_clear_gap(self, db):
        return boundary_clear_spacing(db)

    zone_clear_gap_rule = "max(40 mm, 1.5 db)"

    def single_layer_allowed(self, tw, hwe):
        return ~two_layers_required(tw)

    # ---- lintels and coupling beams
    def beam_flexure(self, b, d, As, fc, fy):
        return beam_flexure(b, d, As, fc, fy)

    def beam_shear(self, fc, b, d, D, asv, s, fyt, rho_w):
        from xlcore.codes.base import BeamShear

        vc = beam_vc(fc, b, d, asv, beam_av_min(fc, b, s, fyt), rho_w)
        vs = beam_vs(asv, fyt, d, s)
        cap = beam_vn_max(fc, b, d, vc)
        vn = np.minimum(vc + vs, cap)
        return BeamShear(vc, vs, cap, vn, np.full(np.shape(vn), PHI_SHEAR), {"dv": _a(d) * np.ones_like(vn)})

    def coupling_beam_shear(self, Avd, fy, alpha, fc, Acw):
        return coupling_vn_diagonal(Avd, fy, alpha, fc, Acw)

    # ---- earthquake
    def boundary_stress_limits(self, fc):
        f = _a(fc)
        return STRESS_TRIGGER * f, STRESS_DISCONTINUE * f

    # ---- detailing and lintels as the checks write them
    detailing_needs_shear = True
    phi_beam_shear = PHI_SHEAR

    def detailing_clause(self, rule):
        return _DETAILING_CLAUSES[rule]

    def limit_text(self, key, **values):
        return _limit_text(key, **values)

    def grades(self):
        """ACI 318-19 sets no list of grades (Table 19.2.1.1 gives only the least f'c); these are
        the SI strengths commonly specified (common practice, no source), from 21 MPa (3000 psi)
        up in the steps ready-mix suppliers quote."""
        return COMMON_GRADES

    def bar_catalogue(self):
        from xlcore.codes.base import Bar

        return tuple(Bar(*b) for b in ASTM_BARS)

    def advice_bars(self, use):
        return tuple(b for b in self.bar_catalogue() if b.name in ADVICE_BARS[use])

    def bar_name(self, dia, n=None):
        """"No. 16", "4 No. 19"; a diameter within 0.5 mm of an ASTM bar's is that bar (the
        designation is the nominal diameter rounded: a workbook may give 13 for No. 13), any
        other in mm."""
        from xlcore.codes.base import catalogue_name

        name = catalogue_name(self.bar_catalogue(), dia, tol=0.5)
        if name is None:
            name = f"{float(dia):g} mm"
            return name if n is None else f"{float(n):g} x {name}"
        return name if n is None else f"{float(n):g} {name}"

    def single_layer_limits(self):
        return TWO_LAYER_THICKNESS, float("inf")

    def low_shear(self, v_star, fc, Lw, tw, hw_lw):
        return low_shear(v_star, fc, Lw, tw, hw_lw)

    def beam_shear_depth(self, d, D):
        return _a(d) * np.ones_like(_a(D))

    def beam_as_required(self, m_star, phi, b, d, fc, fy):
        return beam_as_required(m_star, phi, b, d, fc, fy)

    def beam_shear_steel_required(self, v_star, fc, b, d, D, fyt, rho_w):
        return beam_av_s_required(v_star, fc, b, d, fyt, rho_w)

    def coupling_diagonal_required(self, ln, h, v_u, fc, Acw):
        return coupling_diagonal_required(ln, h, v_u, fc, Acw)

    def strut_and_tie_factors(self, theta, reinforced, beta_s, beta_n, phi_strut, phi_tie, stress):
        r = np.asarray(reinforced, dtype=bool) & np.ones(np.shape(theta), dtype=bool)
        return {
            "beta_s": np.where(r, STM_BETA_S_REINFORCED, STM_BETA_S_PLAIN),
            "beta_n": STM_BETA_N_CCT,
            "stress": STM_STRESS,
            "phi_strut": PHI_STM,
            "phi_tie": PHI_STM,
        }

    def coupling_phi(self, phi_setting):
        return PHI_DIAGONAL_COUPLING


_DETAILING_CLAUSES = {
    "vertical ratio": "ACI 11.6.1 / 11.6.2(a)",
    "horizontal ratio": "ACI 11.6.1 / 11.6.2(b)",
    "vertical spacing": "ACI 11.7.2.1",
    "horizontal spacing": "ACI 11.7.3.1",
    "vertical clear gap": "ACI 25.2.1",
    "horizontal clear gap": "ACI 25.2.1",
    "one layer: thickness": "ACI 11.7.2.3",
    "one layer: Hwe/tw": "ACI 11.7.2.3",
}


def _limit_text(key: str, **values) -> list[str]:
    """Working text of the detailing limits (see `base.Standard.limit_text`)."""
    if key == "layers":
        return [f"{TWO_LAYER_THICKNESS:.0f} mm: two layers above it, 11.7.2.3"] * len(
            np.atleast_1d(values["tw"])
        )
    if key in ("spacing_v", "spacing_h"):
        tw, Lw, need = np.broadcast_arrays(
            _a(values["tw"]), _a(values["Lw"]), np.asarray(values["shear_steel_required"], dtype=bool)
        )
        k = 3 if key == "spacing_v" else 5
        return [
            f"min(3 x {t:.0f}, 450" + (f", lw/{k} = {L:.0f}/{k} (shear steel required)" if n else "") + ")"
            for t, L, n in zip(tw, Lw, need, strict=True)
        ]
    if key == "clear_gap":
        return [f"max(25, db {d:.0f})" for d in np.atleast_1d(_a(values["db"]))]
    v_star, fc, fy, Lw, tw, hw_lw, rho_h, dia = np.broadcast_arrays(
        *(_a(values[k]) for k in ("v_star", "fc", "fy", "Lw", "tw", "hw_lw", "rho_h", "bar_dia"))
    )
    cap = 0.5 * PHI_SHEAR * alpha_c(hw_lw) * np.sqrt(fc) * wall_shear_area(Lw, tw)
    low = np.abs(v_star) <= cap
    small = (dia <= SMALL_BAR) & (fy >= 420.0)
    out = []
    for i in range(len(cap)):
        head = (
            f"|V*| = {abs(v_star[i]) * 1e-3:.1f} kN {'<=' if low[i] else '>'} 0.5 phi alpha_c sqrt(f'c) Acv "
            f"= 0.5 x {PHI_SHEAR:g} x {alpha_c(hw_lw[i]):.3f} x sqrt({fc[i]:g}) x {Lw[i]:.0f} x {tw[i]:.0f} "
            f"= {cap[i] * 1e-3:.1f} kN"
        )
        if low[i]:
            bars = "bars <= 16 mm, fy >= 420 MPa" if small[i] else "bars > 16 mm or fy < 420 MPa"
            out.append(f"{head}: Table 11.6.1, {bars}")
        elif key == "rho_v_min":
            out.append(
                f"{head}: Eq (11.6.2) 0.0025 + 0.5 (2.5 - {hw_lw[i]:.3f}) ({rho_h[i]:.5f} - 0.0025), "
                "at least 0.0025"
            )
        else:
            out.append(f"{head}: 11.6.2(b) 0.0025")
    return out


def beam_as_required(m_u, phi, b, d, fc, fy):
    """Least As [mm^2] of a singly reinforced rectangle with phi Mn >= Mu: Mu/phi = X d -
    X^2 / (2 x 0.85 f'c b), X = As fy (22.2.2.4 block rearranged); NaN where no tension steel
    suffices. fy capped at FY_MAX_LONGITUDINAL. N mm."""
    k = STRESS_INTENSITY * _a(fc) * _a(b)
    disc = _a(d) ** 2 - 2.0 * np.abs(_a(m_u)) / (_a(phi) * k)
    with np.errstate(invalid="ignore"):
        x = k * (_a(d) - np.sqrt(disc))
    return np.where(disc >= 0, x / np.minimum(_a(fy), FY_MAX_LONGITUDINAL), np.nan)


def beam_av_s_required(v_u, fc, b, d, fyt, rho_w, lam=1.0):
    """Least Av/s [mm^2/mm] of vertical stirrups with phi (Vc + Vs) >= Vu: (Vu/phi - Vc) /
    (fyt d) from 22.5.8.5.3, Vc of Table 22.5.5.1 with Av >= Av,min; at least Av,min / s of
    9.6.3.4 (taken everywhere: the conservative reading of 9.6.3.1)."""
    fyt = np.minimum(_a(fyt), FYT_MAX_SHEAR)
    vc = beam_vc(fc, b, d, np.inf, 0.0, rho_w, lam)
    need = np.maximum(np.abs(_a(v_u)) / PHI_SHEAR - vc, 0.0) / (fyt * _a(d))
    return np.maximum(need, beam_av_min(fc, b, 1.0, fyt))


STANDARD = ACI318()


def _shear_advice_words(fails, capped, rho_req) -> list[str]:
    """The advice of each row (`ACI318.wall_shear_advice`): '' where it passes."""
    out = []
    for fail, over, need in zip(*(_a(c).tolist() for c in (fails, capped, rho_req)), strict=True):
        if not fail:
            out.append("")
        elif over:
            out.append(
                "Vu/phi exceeds 0.66 sqrt(f'c) Acv (ACI 318-19 11.5.4.2): only a thicker wall or "
                "a higher f'c helps"
            )
        else:
            out.append(f"raise horizontal steel to rho_t >= {need:.5f} (11.5.4.3)")
    return out
