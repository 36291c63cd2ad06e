"""AS 3600:2018 behind the `codes.base.Standard` interface: a thin adapter over codes/as3600.py.

Every method calls the as3600 functions the checks call today, with the same arguments, so the
numbers are the same (tests/test_standard_interface.py holds them equal); nothing in as3600.py
changes. Clause texts are those the checks write on result rows.
"""

from __future__ import annotations

import numpy as np

from xlcore.codes import as3600
from xlcore.codes.base import Bar, BeamShear, SectionState, ShearCapacity, catalogue_name, num, words_once

EQ1_ZERO = 0.66 / 0.21
"""Hw/Lw beyond which Cl 11.6.3 Eq (1) is negative (the floor then governs)."""

BARS = tuple(
    Bar(f"N{d}", float(d), round(float(np.pi * d * d / 4.0), 1)) for d in (10, 12, 16, 20, 24, 28, 32, 36, 40)
)
"""AS/NZS 4671 grade D500N deformed bars (the bars AS 3600 designs with): designation N and the
nominal diameter in mm; nominal area pi d^2 / 4 (AS/NZS 4671 sizes the bar by the nominal
diameter; from memory, the common tables round the same areas, N12 113 mm^2, N20 314 mm^2)."""

ADVICE_BARS = {
    "horizontal": ("N10", "N12", "N16", "N20"),
    "vertical": ("N12", "N16", "N20", "N24", "N28"),
    "zone": ("N20", "N24", "N28", "N32", "N36"),
}
"""The bars the advice offers (common practice, no source): the sizes walls are usually built
with."""

_CLAUSES = {
    "wall_shear": "AS 3600:2018 Cl 11.6.3 / 11.6.4",
    "wall_shear_limit": "AS 3600:2018 Cl 11.6.2 Vu.max",
    "phi_wall_shear": "AS 3600:2018 Table 2.2.2",
    "aspect_ratio": "AS 3600:2018 Cl 11.6.3 (pier: larger of its own and the wall's, common practice)",
    "stress_block": "AS 3600:2018 Cl 8.1.3",
    "squash": "AS 3600:2018 Cl 10.6.2.2",
    "max_compression": "AS 3600:2018 Cl 10.6.2.2 squash, phi0 (Table 2.2.2)",
    "tension": "AS 3600:2018 Table 2.2.2 tension",
    "phi_axial_bending": "AS 3600:2018 Table 2.2.2",
    "design_moment": "AS 3600:2018 Cl 10.1.2",
    "effective_height": "AS 3600:2018 Cl 11.4",
    "simplified": "AS 3600:2018 Cl 11.5.1",
    "rho_v_min": "AS 3600:2018 Cl 11.7 vertical ratio",
    "rho_h_min": "AS 3600:2018 Cl 11.7 horizontal ratio",
    "spacing": "AS 3600:2018 Cl 11.7 spacing",
    "clear_gap": "AS 3600:2018 Cl 11.7 clear gap",
    "zone_clear_gap": "AS 3600:2018 Cl 11.7 clear gap",
    "layers": "AS 3600:2018 Cl 11.7 one layer (from memory)",
    "beam_flexure": "AS 3600:2018 Cl 8.1 flexure",
    "beam_shear": "AS 3600:2018 Cl 8.2 shear (simplified)",
    "coupling_beam": "AS 3600:2018: no coupling-beam clause (strut-and-tie, Section 7)",
    "boundary_trigger": "AS 3600:2018 Cl 14.6 (0.15 f'c, from memory)",
}


class AS3600:
    """AS 3600:2018 as a `Standard`."""

    name = as3600.NAME
    min_eccentricity = as3600.MIN_ECCENTRICITY
    max_compression_ratio = 1.0  # phi0 Nuo (Cl 10.6.2.2): the squash load itself
    symbols = {
        "Nu": "Nu",
        "Mu": "Mu",
        "squash": "Nuo",
        "tension": "Nuot",
        "top": "phiNuo",
        "top_working": "phiNuo = {phi:.2f} x {squash:.1f} = {top:.1f} kN",
        "design_moment": "Cl 10.1.2",
        "clause_tension": "Table 2.2.2 tension",
        "clause_squash": "Cl 10.6.2.2 squash, phi0, Cl 10.1.2",
        "clause_curve": "Cl 8.1.3 / Table 2.2.2, Cl 10.1.2",
        "clause_core": "Cl 8.1.3 / 10.6.2.2 / Table 2.2.2",
        "simplified": "Cl 11.5",
        "boundary_flag": "end-zone detailing (Cl 14.6)",
        "shear_design": "phiVu",
        "sheet_shear": "Cl 11.6",
        "sheet_axial": "Cl 8.1.3, 10.6, Table 2.2.2",
        "least_moment_note": "M* at least N* x 0.05 Lw (Cl 10.1.2)",
        "block": "Cl 8.1.3",
        "phi_table": "Table 2.2.2",
        "top_text": "phi Nuo",
        "simplified_clause": "Cl 11.5.1",
        "simplified_note": "e from out-of-plane M*, at least 0.05 tw",
        "earthquake_rules": "Section 14",
        "detailing_rules": "Cl 11.7",
        "flag_line": "End-zone flag (Cl 14.6)",
    }
    Es = as3600.ES
    eps_cu = as3600.EPS_CU
    phi_wall_shear = as3600.PHI_WALL_SHEAR
    phi_compression = as3600.PHI_COMPRESSION
    phi_tension = as3600.PHI_TENSION
    phi_simplified = as3600.PHI_SIMPLIFIED

    def clause(self, key: str) -> str:
        return _CLAUSES[key]

    def configure(self, settings):
        return self  # no AS-only setting is read through the interface yet

    # ---- shear
    def wall_aspect_ratio(self, Hw_pier, Lw_pier, Hw_wall, Lw_wall, beside_opening):
        return as3600.wall_aspect_ratio(Hw_pier, Lw_pier, Hw_wall, Lw_wall, beside_opening)

    def wall_shear(self, fc, fy, Lw, tw, hw_lw, rho_h, rho_v, phi=None) -> ShearCapacity:
        # checks/shear.py passes Hw = ratio x Lw so that Hw / Lw is the governing ratio
        Lw = np.asarray(Lw, dtype=float)
        r = as3600.wall_shear(
            fc, fy, Lw, tw, np.asarray(hw_lw, dtype=float) * Lw, rho_h, rho_v,
            self.phi_wall_shear if phi is None else phi,
        )  # fmt: skip
        return ShearCapacity(
            area=r.area,
            concrete=r.vuc,
            steel=r.vus,
            limit=r.vu_max,
            nominal=r.vu,
            phi=r.phi,
            design=r.phi_vu,
            governs=r.governs,
            governing_text=as3600.GOVERNING_TEXT,
            detail={"eq1": r.eq1, "eq2": r.eq2, "floor": r.floor, "rho_w": r.rho_w},
        )

    def wall_steel_required(self, v_star, phi, fc, fy, Lw, tw, hw_lw):
        Lw = np.asarray(Lw, dtype=float)
        # the ratio as wall_shear forms it from Hw = ratio x Lw (same rounding, same numbers)
        vuc, _ = as3600.wall_vuc(fc, np.asarray(hw_lw, dtype=float) * Lw / Lw, Lw, tw)
        return as3600.wall_rho_required(v_star, phi, vuc, as3600.wall_vu_max(fc, Lw, tw), fy, Lw, tw)

    def wall_shear_text(self, cap, fc, fy, Lw, tw, hw_lw):
        kn = 1e-3
        d = cap.detail
        eq2 = np.where(np.isfinite(d["eq2"]), d["eq2"] * kn, np.nan)  # Eq (2) only where Hw/Lw > 1
        cols = [np.asarray(c, dtype=float).tolist() for c in (
            fc, fy, Lw, tw, hw_lw, d["eq1"] * kn, eq2, d["floor"] * kn, cap.concrete * kn,
            d["rho_w"], cap.steel * kn, cap.limit * kn, cap.phi, cap.design * kn)]  # fmt: skip
        first, second = [], []
        for f, y, lw, t, r, e1, e2, fl, vc, rw, vs, vm, p, pv in zip(*cols, strict=True):
            a = f"0.8 x {lw:.0f} x {t:.0f}"
            s = f"Eq1 = (0.66 - 0.21 x {r:.3f}) x sqrt({f:g}) x {a} = {num(e1)} kN"
            if e1 < 0:  # Hw/Lw > 0.66 / 0.21: Eq (1) is negative and the floor must govern
                s += f" (negative: Hw/Lw > {EQ1_ZERO:.2f})"
            s += "; "
            if np.isfinite(e2):
                s += f"Eq2 = (0.05 + 0.1 / ({r:.3f} - 1)) x sqrt({f:g}) x {a} = {num(e2)} kN; "
                pick = f"max(min({num(e1)}, {num(e2)}), {num(fl)})"
            else:
                s += "Eq2 n/a (Hw/Lw <= 1); "
                pick = f"max({num(e1)}, {num(fl)})"
            s += f"min = 0.17 x sqrt({f:g}) x {a} = {num(fl)} kN; Vuc = {pick} = {num(vc)} kN"
            first.append(s)
            second.append(
                f"Vus = {rw:.5f} x {y:g} x 0.8 x {lw:.0f} x {t:.0f} = {num(vs)} kN; "
                f"Vu.max = 0.2 x {f:g} x 0.8 x {lw:.0f} x {t:.0f} = {num(vm)} kN; "
                f"phiVu = {p:.2f} x min({num(vc)} + {num(vs)}, {num(vm)}) = {num(pv)} kN"
            )
        return first, second

    def wall_shear_advice(self, util, rho_req, capped, hw_lw, cap):
        # the words read V*/phiVu and Hw/Lw only against 1: worded once per distinct (fails,
        # capped, Hw/Lw > 1, rho needed, rho given), the same words as row by row
        fails = ~(np.asarray(util, dtype=float) <= 1.0)
        steep = np.asarray(hw_lw, dtype=float) > 1.0
        over = np.asarray(capped).astype(bool)
        return words_once(_shear_advice_words, fails, over, steep, rho_req, cap.detail["rho_w"])

    # ---- axial load and bending
    def stress_block(self, fc):
        return as3600.alpha2(fc), as3600.gamma(fc)

    def squash_load(self, fc, Ag_net, As, fy):
        return as3600.squash_load(fc, Ag_net, As, fy)

    def max_compression(self, fc, Ag_net, As, fy, phi=None):
        phi0 = self.phi_compression if phi is None else phi
        return phi0 * as3600.squash_load(fc, Ag_net, As, fy)

    def tension_capacity(self, As, fy):
        return -np.asarray(As, dtype=float) * np.asarray(fy, dtype=float)

    def phi_axial_bending(self, state: SectionState, phi0=None):
        p0 = self.phi_compression if phi0 is None else phi0
        return as3600.phi_axial_bending(state.nu, state.nub, state.nuot, state.kuo, p0)

    def phi_axial_bending_prepared(self, state: SectionState, phi0=None):
        """phi of `phi_axial_bending` as a function of Nu alone (`at(nu, rows)`: the rows
        `rows` of the section arrays of `state`, None for all), the section's own terms worked
        out once (`as3600.phi_axial_bending_terms`) and gathered once per `rows` array (the
        solvers pass one array until their active rows shrink). The same numbers."""
        p0 = self.phi_compression if phi0 is None else phi0
        terms = as3600.phi_axial_bending_terms(state.nub, state.nuot, state.kuo, p0)
        got: dict = {}

        def at(nu, rows=None):
            if rows is None:
                return as3600.phi_axial_bending_at(nu, terms)
            if got.get("rows") is not rows:
                got["rows"] = rows
                got["terms"] = tuple(v[rows] if isinstance(v, np.ndarray) and v.ndim else v for v in terms)
            return as3600.phi_axial_bending_at(nu, got["terms"])

        return at

    def phi_axial_bending_text(self, state: SectionState):
        return [f"kuo {k:.3f}, Nub {n * 1e-3:.0f} kN" for k, n in zip(*(np.asarray(v).tolist() for v in (
            np.broadcast_to(state.kuo, np.shape(state.nu)), np.broadcast_to(state.nub, np.shape(state.nu)))),
            strict=True)]  # fmt: skip

    def design_moment(self, m_star, n_star, D):
        return as3600.min_eccentricity_moment(m_star, n_star, D)

    # ---- walls in compression
    def effective_height_factor(self, Hw, L1, supported_edges, restrained=False):
        return as3600.effective_height_factor(Hw, L1, supported_edges, restrained)

    def simplified_capacity(self, fc, tw, length, hwe, e, phi=None):
        tw = np.asarray(tw, dtype=float)
        ecc = as3600.simplified_eccentricity(e, tw)
        ea = as3600.additional_eccentricity(hwe, tw)
        return as3600.simplified_capacity(
            fc, tw, ecc, ea, length, self.phi_simplified if phi is None else phi
        )

    def simplified_eccentricities(self, e, tw, hwe):
        tw = np.asarray(tw, dtype=float)
        return as3600.simplified_eccentricity(e, tw), as3600.additional_eccentricity(hwe, tw)

    def simplified_slenderness_limit(self, layers):
        return np.where(np.asarray(layers) >= 2, 30.0, 20.0)

    def simplified_text(self, w, phi):
        cols = [np.asarray(c).tolist() for c in (w.k, w.Hc, w.hwe, w.e, w.tw, w.ea, w.fc, w.Lw, w.cap, w.ok)]
        return [
            (
                f"Hwe = {kk:.3f} x {h:.0f} = {he:.0f} mm; e = {ee:.1f} mm; "
                f"ea = {he:.0f}^2 / (2500 x {t:.0f}) = {a:.1f} mm; "
                f"phiNu = {phi:.2f} x ({t:.0f} - 1.2 x {ee:.1f} - 2 x {a:.1f}) x 0.6 x {fc:g} x {lw:.0f} "
                f"= {c:.1f} kN"
            )
            if ok
            else f"not applicable: {why}"
            for kk, h, he, ee, t, a, fc, lw, c, ok, why in zip(*cols, w.why.tolist(), strict=True)
        ]

    def simplified_exclusions(self, n_star, n_end_lo, tw, hwe, e, layers, stress):
        # the conditions of checks/axial.py _simplified, in the same order and with the same limits
        n = np.asarray(n_star, dtype=float)
        tw = np.asarray(tw, dtype=float)
        layers = np.asarray(layers)
        limit = self.simplified_slenderness_limit(layers)
        ecc = as3600.simplified_eccentricity(e, tw)
        return {
            "not in compression": n <= 0,
            "end in tension": (n > 0) & (np.asarray(n_end_lo, dtype=float) < 0),
            "slender": np.asarray(hwe, dtype=float) / tw > limit,
            "stress": (np.asarray(stress, dtype=float) > 3.0) & (layers < 2),
            "load outside the middle third": ecc > tw / 6,
        }

    # ---- detailing
    def min_ratios(self, *, fc, fy, tw, Lw, wall_length, sigma, v_star, hw_lw, rho_h, bar_dia, restrained):
        return as3600.wall_rho_v_min(sigma, fc), as3600.wall_rho_h_min(restrained, wall_length)

    def max_spacing(self, tw, Lw, shear_steel_required=False):
        s = as3600.wall_max_spacing(tw)
        return s, s

    def min_clear_gap(self, db):
        return as3600.wall_min_clear_gap(db)

    def zone_clear_gap(self, db):
        """End-zone bars keep the wall's clear gap (Cl 11.7 as transcribed)."""
        return as3600.wall_min_clear_gap(db)

    zone_clear_gap_rule = "3 db"

    def single_layer_allowed(self, tw, hwe):
        tw = np.asarray(tw, dtype=float)
        thin = tw <= as3600.SINGLE_LAYER_MAX_THICKNESS
        return thin & (np.asarray(hwe, dtype=float) / tw <= as3600.SINGLE_LAYER_SLENDERNESS)

    # ---- lintels
    def beam_flexure(self, b, d, As, fc, fy):
        return as3600.beam_flexure(b, d, As, fc, fy)

    def beam_shear(self, fc, b, d, D, asv, s, fyt, rho_w) -> BeamShear:
        dv = as3600.beam_dv(d, D)
        vuc, kv = as3600.beam_vuc(fc, b, dv, asv, as3600.beam_asv_min(fc, b, s, fyt))
        vus = as3600.beam_vus(asv, fyt, dv, s)
        vmax = as3600.beam_vu_max(fc, b, dv)
        vu = np.minimum(vuc + vus, vmax)
        return BeamShear(vuc, vus, vmax, vu, np.full(np.shape(vu), as3600.PHI_SHEAR), {"dv": dv, "kv": kv})

    def coupling_beam_shear(self, Avd, fy, alpha, fc, Acw):
        return np.full(np.broadcast(np.asarray(Avd), np.asarray(Acw)).shape, np.nan)

    # ---- earthquake
    def boundary_stress_limits(self, fc):
        f = np.asarray(fc, dtype=float)
        return 0.15 * f, 0.15 * f

    # ---- detailing and lintels as the checks write them
    detailing_needs_shear = False
    phi_beam_shear = as3600.PHI_SHEAR

    def detailing_clause(self, rule):
        return "Cl 11.7 " + rule

    def limit_text(self, key, **values):
        # numbers as Python floats (formatting numpy scalars is twice the time); the words that
        # read few distinct values (wall length, thickness, bar) made once per distinct value
        v = {k: np.atleast_1d(np.asarray(x)) for k, x in values.items()}
        if key == "rho_v_min":
            return [
                f"N*/(Lw tw) = {s:.2f} MPa {'<=' if s <= 0.03 * fc else '>'} 0.03 f'c"
                for s, fc in zip(*(a.tolist() for a in np.broadcast_arrays(v["sigma"], v["fc"])), strict=True)
            ]
        if key == "rho_h_min":
            return words_once(_shrinkage_words, *np.broadcast_arrays(v["restrained"], v["wall_length"]))
        if key in ("spacing_v", "spacing_h"):
            return words_once(lambda tw: [f"min(2.5 x {t:.0f}, 350)" for t in tw.tolist()], v["tw"])
        if key == "clear_gap":
            return words_once(lambda db: [f"3 x {d:.0f}" for d in db.tolist()], v["db"])
        if key == "layers":
            return ["from memory: verify"] * len(v["tw"])
        raise KeyError(key)

    def grades(self):
        """The standard grades of Table 3.1.2 (AS 3600:2018)."""
        return tuple(as3600.STANDARD_GRADES)

    def bar_catalogue(self):
        return BARS

    def advice_bars(self, use):
        return tuple(b for b in BARS if b.name in ADVICE_BARS[use])

    def bar_name(self, dia, n=None):
        """"N16", "4N20": the designation is N and the diameter in mm, so a diameter outside the
        catalogue is named the same way (the text AS 3600 results have always shown)."""
        name = catalogue_name(BARS, dia) or f"N{float(dia):g}"
        return name if n is None else f"{float(n):g}{name}"

    def single_layer_limits(self):
        return float(as3600.SINGLE_LAYER_MAX_THICKNESS), float(as3600.SINGLE_LAYER_SLENDERNESS)

    def low_shear(self, v_star, fc, Lw, tw, hw_lw):
        return np.ones(np.broadcast(*(np.asarray(x) for x in (v_star, fc, Lw, tw, hw_lw))).shape, dtype=bool)

    def beam_shear_depth(self, d, D):
        return as3600.beam_dv(d, D)

    def beam_as_required(self, m_star, phi, b, d, fc, fy):
        return as3600.beam_as_required(m_star, phi, b, d, fc, fy)

    def beam_shear_steel_required(self, v_star, fc, b, d, D, fyt, rho_w):
        # kv 0.15 with at least minimum fitments (Cl 8.2.4.3), and at least Asv.min / s
        dv = as3600.beam_dv(d, D)
        vuc, _ = as3600.beam_vuc(fc, b, dv, np.inf, 0.0)
        return np.maximum(
            as3600.beam_asv_s_required(v_star, as3600.PHI_SHEAR, vuc, fyt, dv),
            0.08 * np.sqrt(fc) * b / fyt,
        )

    def coupling_diagonal_required(self, ln, h, v_u, fc, Acw):
        return np.zeros(np.broadcast(*(np.asarray(x) for x in (ln, h, v_u, fc, Acw))).shape, dtype=bool)

    def strut_and_tie_factors(self, theta, reinforced, beta_s, beta_n, phi_strut, phi_tie, stress):
        bs = as3600.strut_efficiency(theta, beta_s)
        return {"beta_s": bs, "beta_n": beta_n, "stress": stress, "phi_strut": phi_strut, "phi_tie": phi_tie}

    def coupling_phi(self, phi_setting):
        return float(phi_setting)


STANDARD = AS3600()


def _shrinkage_words(restrained, wall_length) -> list[str]:
    """The horizontal minimum's basis in words, per row: restraint and wall length [m]."""
    return [
        f"{'restrained' if x else 'unrestrained'}, wall {n:.2f} m"
        for x, n in zip(restrained.tolist(), wall_length.tolist(), strict=True)
    ]


def _shear_advice_words(fails, capped, steep_ratio, rho_req, rho_w) -> list[str]:
    """The advice of each row (`AS3600.wall_shear_advice`): '' where it passes."""
    out = []
    cols = [np.asarray(c).tolist() for c in (fails, rho_req, capped, steep_ratio, rho_w)]
    for fail, need, over, steep, have in zip(*cols, strict=True):
        if not fail:
            out.append("")
        elif over:
            out.append("V*/phi exceeds Vu.max (Cl 11.6.2): only a thicker wall or a higher f'c helps")
        elif steep:
            out.append(f"raise horizontal steel to rho_h >= {need:.5f} (now {have:.5f})")
        else:
            out.append(f"raise the lesser of rho_h and rho_v to >= {need:.5f} (now {have:.5f})")
    return out
