"""The interface a design standard implements, and the registry that names the standards.

Why: the checks (checks/shear.py, axial.py, detailing.py, lintels.py, core_nm.py) today import
codes/as3600.py by name. Read together they ask a standard for a short list of quantities;
`Standard` is that list, written so that AS 3600:2018 and ACI 318-19 can both answer it:

- shear: Hw/Lw of a pier beside an opening; in-plane shear capacity with its parts, upper
  limit, phi and the governing expression; the steel ratio needed to pass.
- axial: stress block and strain limit, Es; squash (Nuo / Po), the design upper limit on N*,
  tension capacity; phi for bending with axial force; the least design moment (minimum
  eccentricity); effective height factor; the simplified compression method and what rules
  it out.
- detailing: minimum vertical and horizontal ratios; largest spacing; least clear gap; when
  one layer of bars is allowed.
- lintels: beam flexure (Mn, neutral-axis ratio, phi); beam shear (Vc, Vs, upper limit, phi);
  coupling beams with diagonal bars.
- core_stress / earthquake: the extreme-fibre stress that triggers (and ends) boundary-element
  detailing.
- advice: the grades a site can order; the bar catalogue, the bars offered for each use and
  their names in the standard's terms (also on the result sheets that describe bars).
- every result row: `clause(key)`, the clause text of that quantity.

Units: N, mm, MPa inside; arrays over rows, scalars broadcast. Nothing here knows a workbook.

Every check takes its standard through this interface (`std`, the Project's by default) and
imports none by name. `AS3600` (codes/as3600_standard.py, a thin adapter that leaves
codes/as3600.py unchanged) and `ACI318` (codes/aci318.py) implement it, and a test holds both
to it (DEVELOPERS.md, "Adding a standard").
"""

from __future__ import annotations

import importlib
from collections.abc import Mapping
from dataclasses import dataclass, field
from typing import Protocol, runtime_checkable

import numpy as np

CLAUSE_KEYS = (
    "wall_shear",
    "wall_shear_limit",
    "phi_wall_shear",
    "aspect_ratio",
    "stress_block",
    "squash",
    "max_compression",
    "tension",
    "phi_axial_bending",
    "design_moment",
    "effective_height",
    "simplified",
    "rho_v_min",
    "rho_h_min",
    "spacing",
    "clear_gap",
    "zone_clear_gap",
    "layers",
    "beam_flexure",
    "beam_shear",
    "coupling_beam",
    "boundary_trigger",
)
"""Every quantity a standard must name the clause of (`Standard.clause`)."""

SYMBOL_KEYS = (
    "Nu",  # nominal axial strength on the curve
    "Mu",  # nominal moment on the curve
    "squash",  # nominal strength in compression without bending
    "tension",  # nominal tension capacity
    "top",  # the design upper limit on N* (AS phi Nuo; ACI phi Pn,max)
    "top_working",  # how `top` is worked out, with {phi}, {squash}, {top} to fill
    "design_moment",  # short clause of the least design moment
    "clause_tension",  # clause column of a row whose ray meets the tension side
    "clause_squash",  # ... the line above decompression
    "clause_curve",  # ... the strain-compatibility curve
    "clause_core",  # clause column of the core N-M check
    "simplified",  # short clause of the simplified method
    "boundary_flag",  # core stress flag where the peak compression calls for boundary detailing
    "shear_design",  # the design shear capacity's symbol in working text
    "sheet_shear",  # clauses in the shear sheet's title
    "sheet_axial",  # clauses in the axial sheet's title
    "least_moment_note",  # the least design moment, in words (axial sheet preamble)
    "block",  # short clause of the stress block
    "phi_table",  # short clause of phi for axial force and bending
    "top_text",  # the design upper limit on N*, in words
    "simplified_clause",  # clause of the simplified method's capacity (summary rows)
    "simplified_note",  # how e is taken in the simplified method (axial sheet preamble)
    "earthquake_rules",  # the earthquake wall rules in short (summary notes, advice lines)
    "detailing_rules",  # the detailing rules in short (summary lines)
    "flag_line",  # the summary line of the core stress check's boundary / end-zone flag
)
"""Names every standard gives in `Standard.symbols`."""


def num(x: float, fmt: str = ".1f") -> str:
    """`x` formatted, without the sign of a value that rounds to zero ("-0.0" reads as a
    defect in working text)."""
    out = format(x, fmt)
    if out.startswith("-") and float(out) == 0.0:
        return out[1:]
    return out


@dataclass(frozen=True)
class ShearCapacity:
    """In-plane shear of a wall or pier per row [N, mm^2]: the concrete and steel parts, the
    upper limit no steel can raise, nominal and design capacity, phi and the governing
    expression (codes, read through `governing_text`). `detail` holds the standard's own
    intermediate quantities (AS 3600 Eq (1), Eq (2) and the floor; ACI alpha_c)."""

    area: np.ndarray
    concrete: np.ndarray
    steel: np.ndarray
    limit: np.ndarray
    nominal: np.ndarray
    phi: np.ndarray
    design: np.ndarray
    governs: np.ndarray
    governing_text: Mapping[int, str]
    detail: Mapping[str, np.ndarray]

    def clauses(self) -> list[str]:
        """The governing clause of every row, as text."""
        return [self.governing_text[int(g)] for g in np.ravel(self.governs)]

    def take(self, rows) -> ShearCapacity:
        """The same quantities on `rows` only (the working text is made once per pier)."""
        pick = lambda v: np.asarray(v)[rows]  # noqa: E731
        return ShearCapacity(
            *(pick(getattr(self, k)) for k in ("area", "concrete", "steel", "limit", "nominal", "phi",
                                                "design", "governs")),
            governing_text=self.governing_text,
            detail={k: pick(v) for k, v in self.detail.items()},
        )


@dataclass(frozen=True)
class SectionState:
    """What phi for axial force with bending may depend on, per row; each standard reads what it
    needs (AS 3600: Nu, Nub, Nuot, kuo; ACI 318: the net tensile strain from dn, d0, eps_cu)."""

    nu: np.ndarray  # nominal axial force [N], compression positive
    dn: np.ndarray  # neutral-axis depth [mm]
    d0: np.ndarray  # depth of the extreme tension bar [mm]
    fy: np.ndarray  # yield strength of the longitudinal bars [MPa]
    nub: np.ndarray  # axial force at the balanced point [N]
    nuot: np.ndarray  # nominal tension capacity [N], negative
    kuo: np.ndarray  # neutral-axis parameter in pure bending
    eps_cu: float = 0.003
    Es: float = 200_000.0


@dataclass(frozen=True)
class BeamShear:
    """Shear of a lintel as a beam per row [N]."""

    concrete: np.ndarray
    steel: np.ndarray
    limit: np.ndarray
    nominal: np.ndarray
    phi: np.ndarray
    # the standard's own intermediate quantities (AS 3600: dv, kv), for the working text
    detail: Mapping[str, np.ndarray] = field(default_factory=dict)


@dataclass(frozen=True)
class Bar:
    """One reinforcing bar of a standard's catalogue: its designation as drawings name it
    ("N16", "No. 16"), nominal diameter [mm] and nominal area [mm^2]. The checks take a bar's
    area as pi d^2 / 4 from the diameter the workbook gives (ASTM's areas, converted from inch
    sizes, differ from it by up to 2.5 %, either way); the catalogue names bars and gives the
    sizes the advice offers."""

    name: str
    dia: float
    area: float


BAR_USES = ("horizontal", "vertical", "zone")
"""What the advice offers bars for (`Standard.advice_bars`): a wall's horizontal and vertical
bars, and end-zone bars."""


def catalogue_name(catalogue: tuple[Bar, ...], dia: float, tol: float = 0.0) -> str | None:
    """The designation of the catalogue bar whose nominal diameter is within `tol` mm of `dia`
    (a workbook may give 12.7 or 13 for an ASTM No. 13), None where none is."""
    for bar in catalogue:
        if abs(bar.dia - float(dia)) <= tol:
            return bar.name
    return None


def row_keys(*columns) -> np.ndarray:
    """One integer per row, equal exactly where every column's value is the same (floats bit
    for bit, so -0.0 and 0.0, which print differently, are apart; NaN equals NaN), numbered in
    the order the rows first show them: integer codes column by column, no tuple per row."""
    import pandas as pd  # the factorising only; the interface itself reads no tables

    codes, size = np.zeros(len(columns[0]), dtype=np.int64), 1
    for c in columns:
        a = np.asarray(c)
        if a.dtype.kind == "f":
            a = np.ascontiguousarray(a, dtype=np.float64).view(np.int64)
        own, values = pd.factorize(a, use_na_sentinel=False)
        if size * len(values) >= 2**62:  # renumber before the product could overflow
            codes, uniques = pd.factorize(codes)
            size = len(uniques)
        codes, size = codes * len(values) + own, size * max(len(values), 1)
    return pd.factorize(codes)[0]


def first_rows(codes: np.ndarray) -> np.ndarray:
    """The first row of each code, for codes numbered in the order rows first show them
    (`row_keys`, `pandas.factorize`): where a code above every earlier one appears."""
    if not len(codes):
        return np.zeros(0, dtype=np.intp)
    top = np.maximum.accumulate(codes)
    return np.flatnonzero(np.concatenate(([True], top[1:] > top[:-1])))


def words_once(make, *columns) -> list:
    """`make(*columns)`, a list with one item per row that reads its own row's values alone,
    called on the first row of each distinct set of values (`row_keys`) and spread to every
    row: the same list, one Python format per distinct row instead of one per row (the shear
    advice of the L tower: 160 800 failing rows, 394 distinct)."""
    if not len(columns[0]):
        return []
    codes = row_keys(*columns)
    first = first_rows(codes)
    words = np.asarray(make(*(np.asarray(c)[first] for c in columns)), dtype=object)
    return words[codes].tolist()


@runtime_checkable
class Standard(Protocol):
    """A design standard as the checks see it. N, mm, MPa; arrays over rows."""

    name: str
    Es: float
    eps_cu: float
    phi_wall_shear: float
    phi_compression: float
    phi_tension: float
    phi_simplified: float

    def clause(self, key: str) -> str:
        """The clause (and equation) of a quantity named in CLAUSE_KEYS, for result rows."""
        ...

    def configure(self, settings) -> Standard:
        """The standard with the Project settings that belong to it alone (ACI 318: lambda);
        itself where it has none. A check calls it on the standard it was given."""
        ...

    # ---- shear
    def wall_aspect_ratio(
        self, Hw_pier, Lw_pier, Hw_wall, Lw_wall, beside_opening
    ) -> tuple[np.ndarray, np.ndarray]:
        """Hw/Lw used for shear, and where the whole wall's ratio governs a pier's."""
        ...

    def wall_shear(self, fc, fy, Lw, tw, hw_lw, rho_h, rho_v, phi=None) -> ShearCapacity:
        """In-plane shear capacity of a wall or pier; phi None: the standard's."""
        ...

    def wall_steel_required(self, v_star, phi, fc, fy, Lw, tw, hw_lw) -> tuple[np.ndarray, np.ndarray]:
        """Least shear-steel ratio to carry V*, and where no steel suffices (the upper limit)."""
        ...

    def wall_shear_text(self, cap: ShearCapacity, fc, fy, Lw, tw, hw_lw) -> tuple[list[str], list[str]]:
        """Working text of each row (kN): how the concrete part was found, and how the steel
        part, the upper limit and the design capacity were; each standard its own symbols."""
        ...

    def wall_shear_advice(self, util, rho_req, capped, hw_lw, cap: ShearCapacity) -> list[str]:
        """What would make each failing row pass ('' where it passes), in the standard's terms."""
        ...

    # ---- axial load and bending
    def stress_block(self, fc) -> tuple[np.ndarray, np.ndarray]:
        """(intensity, depth ratio) of the rectangular block: nm.Rect's alpha2 and gamma."""
        ...

    def squash_load(self, fc, Ag_net, As, fy) -> np.ndarray:
        """Nominal axial strength without bending; Ag_net = concrete area net of the bars."""
        ...

    def max_compression(self, fc, Ag_net, As, fy, phi=None) -> np.ndarray:
        """Design upper limit on N* in compression (AS: phi0 Nuo; ACI: phi 0.80 Po)."""
        ...

    def tension_capacity(self, As, fy) -> np.ndarray:
        """Nominal axial tension capacity, negative."""
        ...

    def phi_axial_bending(self, state: SectionState, phi0=None) -> np.ndarray:
        """phi for a section at nominal strength described by `state`."""
        ...

    def phi_axial_bending_text(self, state: SectionState) -> list[str]:
        """What phi of each row was read from (AS 3600: kuo and Nub; ACI 318: eps_t), for the
        working text."""
        ...

    symbols: Mapping[str, str]
    """The standard's names in working text and clause columns: keys in `SYMBOL_KEYS`."""

    min_eccentricity: float
    """Least eccentricity of N* in compression as a fraction of the depth (0: none)."""

    max_compression_ratio: float
    """The design upper limit on N* over phi0 x squash load (AS 3600 1.0: phi0 Nuo; ACI 318
    0.80, Table 22.4.2.1): `max_compression` for sections the checks assemble themselves."""

    def design_moment(self, m_star, n_star, D) -> np.ndarray:
        """|M*| raised to any minimum (eccentricity) the standard sets; N, N mm, mm."""
        ...

    # ---- walls in compression
    def effective_height_factor(self, Hw, L1, supported_edges, restrained=False) -> np.ndarray:
        """k in the effective height k Hw."""
        ...

    def simplified_capacity(self, fc, tw, length, hwe, e, phi=None) -> np.ndarray:
        """Design axial capacity of a wall by the standard's simplified method [N]."""
        ...

    def simplified_eccentricities(self, e, tw, hwe) -> tuple[np.ndarray, np.ndarray]:
        """(eccentricity used, added slenderness eccentricity) of the simplified method [mm]
        from the eccentricity of the load `e`; NaN where the standard adds none."""
        ...

    def simplified_slenderness_limit(self, layers) -> np.ndarray:
        """Largest effective height / thickness the simplified method admits (inf: none)."""
        ...

    def simplified_text(self, w, phi) -> list[str]:
        """Working text of the simplified capacity per row of `w` (columns k, Hc, hwe, e, ea, tw,
        fc, Lw, cap [kN], ok, why), with phi; 'not applicable: why' where ok is False."""
        ...

    def simplified_exclusions(self, n_star, n_end_lo, tw, hwe, e, layers, stress) -> dict[str, np.ndarray]:
        """Each condition that rules the simplified method out, as a row mask, by name."""
        ...

    # ---- detailing
    def min_ratios(
        self, *, fc, fy, tw, Lw, wall_length, sigma, v_star, hw_lw, rho_h, bar_dia, restrained
    ) -> tuple[np.ndarray, np.ndarray]:
        """Least (vertical, horizontal) reinforcement ratios."""
        ...

    def max_spacing(self, tw, Lw, shear_steel_required=False) -> tuple[np.ndarray, np.ndarray]:
        """Largest (vertical, horizontal) bar spacing [mm]."""
        ...

    def min_clear_gap(self, db) -> np.ndarray:
        """Least clear gap between parallel bars [mm]."""
        ...

    def zone_clear_gap(self, db) -> np.ndarray:
        """Least clear gap between the vertical bars of an end zone / boundary element [mm]
        (ACI 318 sets a larger one there than between a wall's web bars)."""
        ...

    zone_clear_gap_rule: str
    """The zone gap rule in words for messages ("3 db", "max(40 mm, 1.5 db)")."""

    def single_layer_allowed(self, tw, hwe) -> np.ndarray:
        """Where one layer of bars is permitted."""
        ...

    # ---- lintels and coupling beams
    def beam_flexure(self, b, d, As, fc, fy) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(nominal moment [N mm], neutral-axis depth / d, phi) of a singly reinforced beam."""
        ...

    def beam_shear(self, fc, b, d, D, asv, s, fyt, rho_w) -> BeamShear:
        """Shear of a beam with vertical stirrups."""
        ...

    def coupling_beam_shear(self, Avd, fy, alpha, fc, Acw) -> np.ndarray:
        """Nominal shear of a diagonally reinforced coupling beam [N]; NaN where the standard
        has no such rule."""
        ...

    # ---- earthquake
    def boundary_stress_limits(self, fc) -> tuple[np.ndarray, np.ndarray]:
        """Elastic extreme-fibre compression [MPa] that triggers boundary-element (end-zone)
        detailing, and below which it may stop."""
        ...

    # ---- detailing and lintels as checks/detailing.py and checks/lintels.py write them
    # (block added with the detailing / lintel wiring; kept together to ease merges)
    detailing_needs_shear: bool
    """True where min_ratios / max_spacing depend on V* and Hw/Lw (ACI 11.6, 11.7): the
    detailing check then takes them from the shear table."""

    phi_beam_shear: float

    def detailing_clause(self, rule: str) -> str:
        """Clause text of a detailing row; `rule` one of checks/detailing.py RULES."""
        ...

    def limit_text(self, key: str, **values) -> list[str]:
        """How each row's limit follows, with its numbers, for the working text of a detailing
        rule. Every key takes the same values (arrays over rows, scalars broadcast), each
        standard reads those it needs: sigma, fc, fy, v_star, hw_lw, rho_h, bar_dia, tw, Lw,
        wall_length, restrained, shear_steel_required, db. Keys: "rho_v_min", "rho_h_min",
        "spacing_v", "spacing_h", "clear_gap" and "layers" (the basis of the one-layer rows,
        one text per row)."""
        ...

    def single_layer_limits(self) -> tuple[float, float]:
        """(largest thickness [mm], largest Hwe/tw) of a wall with one layer of bars; inf where
        the standard sets no such limit."""
        ...

    def low_shear(self, v_star, fc, Lw, tw, hw_lw) -> np.ndarray:
        """Where V* is low enough for the lesser minimum ratios (ACI 11.6.1); all True where the
        standard's minima do not depend on V*."""
        ...

    def beam_shear_depth(self, d, D) -> np.ndarray:
        """Depth used in beam shear [mm] (AS: dv = max(0.72 D, 0.9 d); ACI: d)."""
        ...

    def beam_as_required(self, m_star, phi, b, d, fc, fy) -> np.ndarray:
        """Least tension steel [mm^2] of a singly reinforced beam for M* [N mm]; NaN where none
        suffices."""
        ...

    def beam_shear_steel_required(self, v_star, fc, b, d, D, fyt, rho_w) -> np.ndarray:
        """Least area of vertical stirrups per length [mm^2/mm] for V* [N], at least the
        standard's minimum."""
        ...

    def coupling_diagonal_required(self, ln, h, v_u, fc, Acw) -> np.ndarray:
        """Where a coupling beam must be reinforced with diagonal bars (ACI 18.10.7.2); all False
        where the standard has no such rule."""
        ...

    def strut_and_tie_factors(
        self, theta, reinforced, beta_s, beta_n, phi_strut, phi_tie, stress
    ) -> dict[str, np.ndarray]:
        """Factors of a one-strut model of a deep lintel, per row: "beta_s" (strut efficiency,
        theta the strut's angle to the ties [rad], `reinforced` where fitments cross it),
        "beta_n" (C-C-T node), "stress" (x f'c), "phi_strut", "phi_tie". The other arguments are
        the Project settings; a standard with its own values (ACI 318 Ch. 23) ignores them."""
        ...

    def coupling_phi(self, phi_setting) -> float:
        """phi of a diagonally reinforced coupling beam: the standard's, or the Project setting
        `phi_setting` where the standard has none (AS 3600)."""
        ...

    # ---- advice (checks/advice.py)
    def grades(self) -> tuple[float, ...]:
        """Concrete strengths f'c [MPa] a site can order under this standard, lowest first: the
        grades the advice search offers."""
        ...

    def bar_catalogue(self) -> tuple[Bar, ...]:
        """The reinforcing bars of the standard's bar specification, smallest first."""
        ...

    def advice_bars(self, use: str) -> tuple[Bar, ...]:
        """The catalogue bars the advice search offers for `use` (one of BAR_USES), smallest
        first."""
        ...

    def bar_name(self, dia, n=None) -> str:
        """A bar of nominal diameter `dia` [mm] as drawings under this standard name it, `n` of
        them where n is given ("N16", "4N20"; "No. 16", "4 No. 19"); a diameter outside the
        catalogue as the standard's drawings would give it (AS 3600 "N14"; ACI 318 "14 mm")."""
        ...


# ---------------------------------------------------------------- registry

_REGISTRY: dict[str, str | Standard] = {
    "AS 3600:2018": "xlcore.codes.as3600_standard:STANDARD",
    "ACI 318-19": "xlcore.codes.aci318:STANDARD",
}


def register_standard(name: str, target: str | Standard) -> None:
    """Register a standard under `name`: an object, or "module:attribute" imported on first use."""
    _REGISTRY[name] = target


def standard_names() -> tuple[str, ...]:
    """Names of the registered standards (not all are selectable in the workbook yet: that is
    layout.STANDARDS)."""
    return tuple(_REGISTRY)


def get_standard(name: str) -> Standard:
    """The standard registered under `name` (KeyError naming the known ones otherwise)."""
    try:
        target = _REGISTRY[name]
    except KeyError:
        raise KeyError(f"unknown design standard {name!r}; known: {', '.join(_REGISTRY)}") from None
    if isinstance(target, str):
        module, _, attr = target.partition(":")
        target = getattr(importlib.import_module(module), attr)
        _REGISTRY[name] = target
    return target


def compression_flag_ratio(setting: float | None, std: Standard) -> float:
    """The fraction of f'c above which elastic peak compression under an earthquake combination
    flags end-zone / boundary-element detailing: the Project setting where the engineer gave
    one, otherwise the standard's own trigger (`boundary_stress_limits`: AS 3600 Cl 14.6 0.15,
    ACI 318-19 18.10.6.3 0.2). Why: a blank setting must not leave an ACI project flagged at the
    AS fraction."""
    if setting is not None:
        return float(setting)
    return float(np.asarray(std.boundary_stress_limits(1.0)[0]))
