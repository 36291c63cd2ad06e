"""Result tables as data: sheet names, columns, units, formats. The writer and tests read it."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field, replace

import numpy as np
import pandas as pd

from xlcore.layout import RESULT_PREFIX

MARKER = "xlcore results"  # first words of A1 on every result sheet: how xlcore knows its own
PASS, FAIL, NOT_CHECKED, NOT_APPLICABLE = "pass", "FAIL", "not checked", "n/a"
# Section 14 statuses that are neither pass nor FAIL: an end zone required (a trigger for
# detailing, not a failure) or not, and a requirement xlcore cannot verify (bars not described)
REQUIRED, NOT_REQUIRED, CHECK = "required", "not required", "check"
STAMP_HASH_LABEL = "Input hash (SHA-256)"  # stamp line `check` reads to tell stale results
ALSO_CHECKED = "Also checked to"  # summary line naming the second standard; the report reads it


@dataclass(frozen=True)
class ResultColumn:
    key: str
    header: str
    unit: str | None = None
    fmt: str | None = None  # number format; None = text
    width: float = 11.0

    @property
    def title(self) -> str:
        return f"{self.header} [{self.unit}]" if self.unit else self.header

    @property
    def wraps(self) -> bool:
        """Long text (working, advice, notes) wraps within its column, so it prints complete
        instead of being cut at the cell edge."""
        return self.fmt is None and self.width >= 30

    @property
    def is_working(self) -> bool:
        """Working text (formulas with numbers substituted): `working` or `f_...`. Left out of
        the full tables in Parquet, whose numbers it only repeats."""
        return self.fmt is None and (self.key == "working" or self.key.startswith("f_"))

    @property
    def banded(self) -> bool:
        """A utilisation column: coloured by the bands below."""
        return self.fmt is not None and (
            self.key in ("util", "util_s", "util_now") or self.key.startswith("u_")
        )


@dataclass
class ResultSheet:
    """One sheet of results: a few lines of stamp above a table."""

    name: str
    title: str
    columns: list[ResultColumn]
    table: pd.DataFrame
    preamble: list[tuple[str, object]] = field(default_factory=list)
    scale_key: str | None = None  # column that gets the utilisation colour scale
    # rows of `table` -> the same rows with their working text: set where the text was left out
    # to be made for the rows written only (`pipeline.select_detail` calls it)
    rework: Callable[[pd.DataFrame], pd.DataFrame] | None = None


def _c(key, header, unit=None, fmt=None, width=11.0) -> ResultColumn:
    return ResultColumn(key, header, unit, fmt, width)


SHEAR_SHEET = RESULT_PREFIX + "shear"
SECTION_SHEET = RESULT_PREFIX + "core section"
AXIAL_SHEET = RESULT_PREFIX + "axial-bending"
DETAILING_SHEET = RESULT_PREFIX + "detailing"
SECTION14_SHEET = RESULT_PREFIX + "earthquake detailing"
LINTELS_SHEET = RESULT_PREFIX + "lintels"
ADVICE_SHEET = RESULT_PREFIX + "advice"
CORE_STRESS_SHEET = RESULT_PREFIX + "core stress"
CORE_NM_SHEET = RESULT_PREFIX + "core N-M"
CORE_SHEET = RESULT_PREFIX + "core shares"
CORES_SHEET = RESULT_PREFIX + "cores"
SUMMARY_SHEET = RESULT_PREFIX + "summary"
MEMBERS_SHEET = RESULT_PREFIX + "piers"
COMPARISON_SHEET = RESULT_PREFIX + "standards compared"

SHEAR_COLUMNS = [
    _c("storey", "Storey", width=8),
    _c("pier_id", "Pier", width=9),
    _c("wall_id", "Wall", width=7),
    _c("combination", "Combination", width=15),
    _c("v", "V*", "kN", "0.0"),
    _c("source", "V* from", width=22),
    _c("share", "Share", None, "0.000", 8),
    _c("k", "k", "kN/mm", "0", 9),
    _c("Lw", "Lw", "mm", "0", 8),
    _c("tw", "tw", "mm", "0", 7),
    _c("Hw", "Hw", "mm", "0", 8),
    _c("hw_lw", "Hw/Lw", None, "0.000", 8),
    _c("hw_basis", "Hw/Lw basis", width=40),
    _c("fc", "f'c", "MPa", "0", 7),
    _c("fsy", "fsy", "MPa", "0", 7),
    _c("rho_h", "rho_h", None, "0.00000", 9),
    _c("rho_v", "rho_v", None, "0.00000", 9),
    _c("rho_w", "rho_w", None, "0.00000", 9),
    _c("eq1", "AS Eq (1)", "kN", "0.0"),
    _c("eq2", "AS Eq (2)", "kN", "0.0"),
    _c("floor", "AS floor", "kN", "0.0"),
    _c("alpha_c", "ACI alpha_c", None, "0.000", 8),
    _c("vuc", "Concrete part", "kN", "0.0"),
    _c("vus", "Steel part", "kN", "0.0"),
    _c("vu_max", "Upper limit", "kN", "0.0"),
    _c("phi", "phi", None, "0.00", 6),
    _c("phi_vu", "Design capacity", "kN", "0.0"),
    _c("util", "Utilisation", None, "0.000", 10),
    _c("status", "Status", width=8),
    _c("clause", "Governing clause", width=24),
    _c("rho_req", "Shear steel ratio needed", None, "0.00000", 10),
    _c("advice", "What would make it pass", width=40),
    _c("f_vuc", "Concrete part working", width=60),
    _c("f_vu", "Design capacity working", width=60),
    _c("f_util", "Utilisation working", width=34),
]

SUMMARY_COLUMNS = [
    _c("storey", "Storey", width=8),
    _c("pier_id", "Pier", width=9),
    _c("status", "Status", width=8),
    _c("util", "Utilisation", None, "0.000", 11),
    _c("check", "Governing check", width=15),
    _c("combination", "Worst combination", width=13),
    _c("demand", "Demand", None, "0.0", 9),
    _c("capacity", "Capacity", None, "0.0", 9),
    _c("unit", "Unit", width=6),
    _c("clause", "Governing clause", width=21),
    _c("u_shear", "U shear", None, "0.000", 8),
    _c("u_nm", "U axial + bending", None, "0.000", 9),
    _c("u_simplified", "U simplified method", None, "0.000", 8),
    _c("detailing", "Detailing rules", width=10),
    _c("u_detailing", "U detailing", None, "0.000", 9),
    _c("section14", "Earthquake wall rules", width=12),
    _c("u_section14", "U earthquake rules", None, "0.000", 9),
    _c("fix", "Cheapest fix (see the advice sheet)", width=30),
    _c("note", "Note", width=30),
]


def comparison_columns(first: str, second: str) -> list[ResultColumn]:
    """Columns of the standards-compared sheet (`comparison.compare`): each side's headers
    name its standard, so neither reads as the other's. Keys end _a (first) and _b (second)."""
    if first == second:  # a standard against itself: headers stay unique
        first, second = f"{first} (first)", f"{second} (second)"
    side = []
    for s, name in (("a", first), ("b", second)):
        side += [
            _c(f"u_{s}", f"U {name}", None, "0.000", 10),
            _c(f"status_{s}", f"Status {name}", width=9),
            _c(f"clause_{s}", f"Governing clause {name}", width=26),
            _c(f"combination_{s}", f"Worst combination {name}", width=13),
        ]
    return [
        _c("storey", "Storey", width=8),
        _c("pier_id", "Pier", width=9),
        _c("check", "Check", width=19),
        *side,
        _c("ratio", f"Ratio U {second} / U {first}", None, "0.000", 12),
        _c("note", "Note", width=30),
    ]


MEMBER_COLUMNS = [
    _c("storey", "Storey", width=8),
    _c("member", "Member", width=9),
    _c("kind", "Kind", width=7),
    _c("wall_id", "Wall", width=7),
    _c("start", "From wall start", "m", "0.000", 12),
    _c("end", "To", "m", "0.000", 9),
    _c("edge_a", "Start-side edge (End zones location)", width=16),
    _c("edge_b", "End-side edge", width=16),
    _c("bars", "Vertical bars (end zones, field)", width=30),
    _c("Lw", "Length", "mm", "0", 9),
    _c("tw", "tw", "mm", "0", 7),
    _c("height", "Height", "mm", "0", 9),
    _c("Hc", "Storey clear height", "mm", "0", 12),
    _c("fc", "f'c", "MPa", "0", 7),
    _c("rho_v", "rho_v", None, "0.00000", 9),
    _c("rho_h", "rho_h", None, "0.00000", 9),
    _c("k", "k", "kN/mm", "0", 9),
    _c("note", "Note", width=40),
]


AXIAL_COLUMNS = [
    _c("storey", "Storey", width=8),
    _c("pier_id", "Pier", width=9),
    _c("combination", "Combination", width=15),
    _c("n", "N*", "kN", "0.0"),
    _c("m", "M* in-plane", "kNm", "0.0"),
    _c("m_out", "M* out-of-plane", "kNm", "0.0"),
    _c("m_design", "M* used (with any least eccentricity)", "kNm", "0.0", 12),
    _c("Lw", "Lw", "mm", "0", 8),
    _c("tw", "tw", "mm", "0", 7),
    _c("fc", "f'c", "MPa", "0", 7),
    _c("as_total", "As", "mm2", "0", 8),
    _c("bars", "Vertical bars (end zones, field)", width=30),
    _c("compressed", "Compressed end (M* sense)", width=11),
    _c("nuo", "Squash load", "kN", "0.0"),
    _c("phi_nuo", "Design limit on N*", "kN", "0.0"),
    _c("nuot", "Tension capacity", "kN", "0.0"),
    _c("phi_nuot", "Design tension capacity", "kN", "0.0"),
    _c("nub", "Balanced N", "kN", "0.0"),
    _c("kuo", "ku pure bending", None, "0.000", 7),
    _c("dn", "dn at N*", "mm", "0", 8),
    _c("mu", "Nominal M at N*", "kNm", "0.0"),
    _c("phi", "phi", None, "0.000", 7),
    _c("phi_mu", "Design M at N*", "kNm", "0.0"),
    _c("u_fixed_n", "U at fixed N*", None, "0.000", 10),
    _c("n_ray", "N on curve (N*/U)", "kN", "0.0"),
    _c("m_ray", "M on curve (M*/U)", "kNm", "0.0"),
    _c("util", "Utilisation (radial)", None, "0.000", 10),
    _c("status", "Status", width=8),
    _c("governs", "Ray meets", width=15),
    _c("clause", "Clause", width=22),
    _c("f_nm", "Working", width=70),
    _c("k", "Effective height factor", None, "0.000", 8),
    _c("hwe", "Hwe", "mm", "0", 8),
    _c("slender", "Hwe/tw", None, "0.0", 7),
    _c("e", "e", "mm", "0.0", 7),
    _c("ea", "AS ea", "mm", "0.0", 7),
    _c("n_end", "N* at end x Lw (simplified)", "kN", "0.0"),
    _c("phi_nu_s", "Simplified capacity", "kN", "0.0"),
    _c("util_s", "U simplified", None, "0.000", 9),
    _c("status_s", "Status simplified", width=9),
    _c("f_s", "Simplified method working", width=70),
]

CORE_STRESS_COLUMNS = [
    _c("storey", "Storey", width=8),
    _c("combination", "Combination", width=15),
    _c("core", "Core", width=9),
    _c("wall_id", "Wall", width=7),
    _c("sigma_start", "sigma at start", "MPa", "0.00"),
    _c("sigma_end", "sigma at end", "MPa", "0.00"),
    _c("sigma_max", "Peak compression", "MPa", "0.00"),
    _c("limit", "Limit", "MPa", "0.00", 8),
    _c("sigma_min", "Peak tension (-)", "MPa", "0.00"),
    _c("tension", "Tension T", "kN", "0.0"),
    _c("as_req", "As needed", "mm2", "0", 9),
    _c("as_prov", "As in tension zone", "mm2", "0", 11),
    _c("u_tension", "U tension", None, "0.000", 9),
    _c("u_compression", "Peak / limit", None, "0.000", 11),
    _c("earthquake", "Earthquake", width=8),
    _c("flag", "Flag (earthquake detailing)", width=26),
    _c("util", "Utilisation (tension steel)", None, "0.000", 10),
    _c("status", "Status", width=8),
    _c("governs", "Governs", width=15),
    _c("working", "Working", width=80),
]

CORE_NM_COLUMNS = [
    _c("storey", "Storey", width=8),
    _c("combination", "Combination", width=15),
    _c("core", "Core", width=9),
    _c("n", "N*", "kN", "0"),
    _c("mx", "Mx*", "kNm", "0"),
    _c("my", "My*", "kNm", "0"),
    _c("m_res", "|M*|", "kNm", "0"),
    _c("phi_mu", "phi Mu along M*", "kNm", "0", 12),
    _c("phi_nuo", "Design limit on N*", "kN", "0"),
    _c("phi_nuot", "Design tension capacity", "kN", "0"),
    _c("util", "Utilisation", None, "0.000", 10),
    _c("status", "Status", width=8),
    _c("governs", "Governs", width=13),
    _c("clause", "Clause", width=28),
    _c("working", "Working", width=80),
]

DETAILING_COLUMNS = [
    _c("storey", "Storey", width=8),
    _c("pier_id", "Pier", width=9),
    _c("rule", "Rule", width=20),
    _c("value", "Provided", None, "0.00000", 10),
    _c("kind", "Must be", width=9),
    _c("limit", "Limit", None, "0.00000", 10),
    _c("unit", "Unit", width=6),
    _c("util", "Utilisation", None, "0.000", 10),
    _c("status", "Status", width=8),
    _c("clause", "Clause", width=26),
    _c("working", "Working", width=70),
]

SECTION14_COLUMNS = [
    _c("storey", "Storey", width=8),
    _c("pier_id", "Pier", width=9),
    _c("rule", "Rule", width=16),
    _c("value", "Value", None, "0.0####", 10),
    _c("kind", "Must be", width=9),
    _c("limit", "Limit", None, "0.0####", 10),
    _c("unit", "Unit", width=6),
    _c("util", "Ratio", None, "0.000", 8),
    _c("status", "Status", width=11),
    _c("clause", "Clause", width=20),
    _c("basis", "Basis", width=40),
    _c("working", "Working", width=60),
]

# the earthquake detailing sheet under ACI 318-19: Chapter 18 special structural walls, per
# storey x pier x earthquake combination ("(all)" for the rules that do not depend on actions)
SPECIAL_WALL_COLUMNS = [
    *SECTION14_COLUMNS[:2],
    _c("combination", "Combination", width=13),
    replace(SECTION14_COLUMNS[2], width=22),  # the rule, its names longer than Section 14's
    *SECTION14_COLUMNS[3:],
]

LINTEL_RESULT_COLUMNS = [
    _c("storey", "Storey", width=8),
    _c("lintel_id", "Lintel", width=9),
    _c("combination", "Combination", width=15),
    _c("model", "Model", width=12),
    _c("span", "Span ln", "m", "0.000", 8),
    _c("depth", "D", "mm", "0", 7),
    _c("tw", "b", "mm", "0", 7),
    _c("ratio", "ln/D", None, "0.00", 7),
    _c("v", "V*", "kN", "0.0", 9),
    _c("m", "M*", "kNm", "0.0", 9),
    _c("As", "Bars As each face", "mm2", "0", 9),
    _c("phi_mu", "Design moment capacity (beam)", "kNm", "0.0", 9),
    _c("angle", "Strut / diagonal angle", "deg", "0.0", 9),
    _c("beta_s", "beta_s", None, "0.000", 7),
    _c("c_star", "Strut C*", "kN", "0.0", 9),
    _c("strut_cap", "phi strut", "kN", "0.0", 9),
    _c("t_star", "Tie T*", "kN", "0.0", 9),
    _c("tie_cap", "phi tie", "kN", "0.0", 9),
    _c("A_sd", "A_sd per group", "mm2", "0", 9),
    _c("phi_vu", "Design shear capacity", "kN", "0.0", 9),
    _c("u_m", "U flexure", None, "0.000", 8),
    _c("u_v", "U shear", None, "0.000", 8),
    _c("u_strut", "U strut", None, "0.000", 8),
    _c("u_node", "U node", None, "0.000", 8),
    _c("u_tie", "U tie", None, "0.000", 8),
    _c("util", "Utilisation", None, "0.000", 10),
    _c("status", "Status", width=9),
    _c("clause", "Governs", width=24),
    _c("as_req", "Bars As needed", "mm2", "0", 9),
    _c("asd_req", "A_sd needed per group", "mm2", "0", 10),
    _c("need", "What would make it pass", width=30),
    _c("basis", "Basis", width=30),
    _c("working", "Working", width=70),
]

ADVICE_COLUMNS = [
    _c("storey", "Storey", width=10),
    _c("pier_id", "Pier", width=9),
    _c("pour", "Concrete pour", width=16),
    _c("check", "Failing check now", width=18),
    _c("util_now", "Utilisation now", None, "0.000", 11),
    _c("rank", "Rank", None, "0", 6),
    _c("kind", "Change", width=30),
    _c("option", "Cheapest passing option", width=44),
    _c("fixes", "Failing piers it fixes", width=30),
    _c("util", "Worst utilisation after", None, "0.000", 12),
    _c("added_cost", "Added cost", None, "#,##0", 11),
    _c("plan", "Its part in the pour's plan", width=30),
]

SECTION_COLUMNS = [
    _c("storey", "Storey", width=8),
    _c("core", "Core", width=9),
    _c("area", "A", "m2", "0.000", 9),
    _c("xc", "Centroid x", "m", "0.000"),
    _c("yc", "Centroid y", "m", "0.000"),
    _c("ixx", "Ixx", "m4", "0.000"),
    _c("iyy", "Iyy", "m4", "0.000"),
    _c("ixy", "Ixy", "m4", "0.000"),
    _c("i1", "I1", "m4", "0.000"),
    _c("i2", "I2", "m4", "0.000"),
    _c("angle", "Axis 1 from x", "deg", "0.0"),
    _c("xr", "Centre of rigidity x", "m", "0.000", 13),
    _c("yr", "Centre of rigidity y", "m", "0.000", 13),
    _c("bx", "Plan width x", "m", "0.000"),
    _c("by", "Plan width y", "m", "0.000"),
]

CORE_COLUMNS = [
    _c("storey", "Storey", width=8),
    _c("combination", "Combination", width=15),
    _c("core", "Core", width=9),
    _c("member", "Member", width=9),
    _c("kind", "Kind", width=6),
    _c("k", "k", "kN/mm", "0", 9),
    _c("share_pct", "Share", "%", "0.0", 8),
    _c("direct", "Direct V*", "kN", "0.0"),
    _c("torsion", "Torsion V*", "kN", "0.0"),
    _c("v", "V*", "kN", "0.0"),
    _c("n", "N*", "kN", "0.0"),
    _c("m", "M*", "kNm", "0.0"),
    _c("xr", "CR x", "m", "0.000", 8),
    _c("yr", "CR y", "m", "0.000", 8),
    _c("m_cr", "M about CR", "kNm", "0.0"),
    _c("m_acc", "Accidental M", "kNm", "0.0"),
    _c("used", "Used", width=22),
    _c("working", "Working", width=70),
]

CORES_COLUMNS = [
    _c("storey", "Storey", width=8),
    _c("combination", "Combination", width=15),
    _c("core", "Core", width=9),
    _c("ei_yy", "EI about y", "GNm2", "0", 10),
    _c("ei_xx", "EI about x", "GNm2", "0", 10),
    _c("ei_xy", "EI product", "GNm2", "0", 10),
    _c("area", "Area", "m2", "0.000", 8),
    _c("share_vx", "Share of Vx*", "%", "0.0", 8),
    _c("share_vy", "Share of Vy*", "%", "0.0", 8),
    _c("share_t", "Share of torsion", "%", "0.0", 9),
    _c("share_n", "Share of N*", "%", "0.0", 8),
    _c("share_mx", "Share of Mx*", "%", "0.0", 8),
    _c("share_my", "Share of My*", "%", "0.0", 8),
    _c("n", "N", "kN", "0.0"),
    _c("vx", "Vx", "kN", "0.0"),
    _c("vy", "Vy", "kN", "0.0"),
    _c("mx", "Mx", "kNm", "0.0"),
    _c("my", "My", "kNm", "0.0"),
    _c("m_tors", "Moment of its torsional shear about building CR", "kNm", "0.0", 14),
    _c("m_cr", "Storey moment about building CR", "kNm", "0.0", 13),
    _c("m_acc", "Accidental moment", "kNm", "0.0", 10),
    _c("xc", "Core centroid x", "m", "0.000", 9),
    _c("yc", "Core centroid y", "m", "0.000", 9),
    _c("xr_core", "Core CR x", "m", "0.000", 9),
    _c("yr_core", "Core CR y", "m", "0.000", 9),
    _c("xr", "Building CR x", "m", "0.000", 9),
    _c("yr", "Building CR y", "m", "0.000", 9),
    _c("used", "Used for", width=18),
    _c("working", "Working", width=90),
]


# What "governing" keeps of each table that has a combination dimension, when the workbook
# holds only the governing rows (`compute --detail governing`, or `auto` above
# DETAIL_ROW_LIMIT rows). One rule per table, declared here beside its columns so that a new
# result table gets its rule in the same place. Tables without a rule (summary, advice, piers,
# core section, detailing, earthquake detailing: already one row per storey x member, or x
# rule) are always written in full. See DEVELOPERS.md "Decisions" and `governing_rows`.
DETAIL_ROW_LIMIT = 50_000  # rows per table above which `auto` writes the governing rows only


@dataclass(frozen=True)
class Governing:
    """Rows kept of one result table: per group (e.g. storey x pier), the row with the largest
    value of each `worst` column (compared by magnitude where also in `magnitude`; ties: the
    first row; a group with no value at all keeps its first row, e.g. a lintel not checked),
    plus every row where a `failing` column says FAIL (the sheet says so after `meaning`). The
    table's order is kept."""

    group: tuple[str, ...]
    worst: tuple[str, ...]
    failing: tuple[str, ...] = ("status",)
    magnitude: tuple[str, ...] = ()
    meaning: str = ""  # in words, for the sheet's preamble


GOVERNING: dict[str, Governing] = {
    SHEAR_SHEET: Governing(
        ("storey", "pier_id"),
        ("util",),
        meaning="per storey x pier the combination with the largest utilisation",
    ),
    AXIAL_SHEET: Governing(
        ("storey", "pier_id"),
        ("util", "util_s"),
        failing=("status", "status_s"),
        meaning="per storey x pier the combination with the largest radial utilisation and the one "
        "with the largest Cl 11.5 utilisation (often the same row)",
    ),
    LINTELS_SHEET: Governing(
        ("storey", "lintel_id"),
        ("util",),
        meaning="per storey x lintel the combination with the largest utilisation (a lintel not "
        "checked: its first row, which says why)",
    ),
    CORE_STRESS_SHEET: Governing(
        ("storey", "wall_id"),
        ("util", "u_compression"),
        meaning="per storey x wall the combination with the largest tension-steel utilisation and "
        "the one with the largest peak compression / limit",
    ),
    COMPARISON_SHEET: Governing(
        ("storey", "pier_id"),
        ("u_a", "u_b", "ratio"),
        failing=("status_a", "status_b"),
        meaning="per storey x pier the check with the largest utilisation under each standard and "
        "the one with the largest ratio",
    ),
    CORE_NM_SHEET: Governing(
        ("storey", "core"),
        ("util",),
        meaning="per storey (and core) the combination with the largest utilisation",
    ),
    CORES_SHEET: Governing(
        ("storey", "core"),
        ("vx", "vy", "n", "mx", "my"),
        failing=(),
        magnitude=("vx", "vy", "mx", "my"),
        meaning="per storey x core the combinations with the largest |Vx|, |Vy|, N, |Mx| and |My| "
        "(a sharing table: nothing fails here)",
    ),
    CORE_SHEET: Governing(
        ("storey", "member"),
        ("v", "n", "m"),
        failing=(),
        magnitude=("v", "m"),
        meaning="per storey x wall or pier the combinations with the largest |V*|, the largest N* "
        "and the largest |M*| (a sharing table: nothing fails here)",
    ),
}


def governing_rows(table: pd.DataFrame, rule: Governing, failing: bool = True) -> np.ndarray:
    """Boolean mask of the rows `rule` keeps (see `Governing`), vectorised: per `worst` column
    each group's first row of the largest value (`first_max`, what a stable sort by group,
    largest first, then table order, puts first); without `failing`, the failing rows that do
    not govern are left out too."""
    n = len(table)
    keep = np.zeros(n, dtype=bool)
    if n == 0:
        return keep
    group = [g for g in rule.group if g in table]  # e.g. `core` only where the table has it
    gid = group_codes(table, group)
    for col in rule.worst:
        if col not in table:
            continue
        v = pd.to_numeric(table[col], errors="coerce").to_numpy(dtype=float)
        if col in rule.magnitude:
            v = np.abs(v)
        keep[first_max(np.where(np.isnan(v), -np.inf, v), gid)] = True
    if failing:
        keep |= failing_rows(table, rule)
    return keep


def group_codes(table: pd.DataFrame, columns: list[str]) -> np.ndarray:
    """Integer codes of the rows' groups by `columns` (NaN a group of its own, as
    `groupby(dropna=False)`): the same partition as `groupby(...).ngroup()`, the numbers not
    (only which rows share a group is read), non-negative and below a few times the rows.
    Each column factorised on its plain array (half the time of pandas' text columns) where
    no key is missing; else the group-by."""
    n = len(table)
    if not columns:
        return np.zeros(n, dtype=np.int64)
    gid, size = np.zeros(n, dtype=np.int64), 1  # codes below `size`
    for c in columns:
        codes, uniques = pd.factorize(table[c].to_numpy())
        if (codes < 0).any():  # a missing key: the group-by's own NaN handling
            return table.groupby(columns, sort=False, dropna=False).ngroup().to_numpy()
        gid, size = gid * max(len(uniques), 1) + codes, size * max(len(uniques), 1)
        if size > 4 * n + 1024:  # numbered afresh where the product of the keys' sizes is large
            gid, _ = pd.factorize(gid)
            size = int(gid.max()) + 1
    return gid


def first_max(u: np.ndarray, g: np.ndarray) -> np.ndarray:
    """Position of each group's largest `u` (the first of equal ones), groups (non-negative
    integer codes `g`) in order of first appearance: what `groupby(g, sort=False).idxmax()`
    gives on positions and what a stable sort by (g, -u) puts first, `u` without NaN. Two
    passes over the rows (each group's maximum, then its first row equal to it) in place of
    the sort (0.26 s -> 0.01 s on a million rows of random ratios)."""
    if not len(u):
        return np.zeros(0, dtype=np.int64)
    size = int(g.max()) + 1
    top = np.full(size, -np.inf)
    np.maximum.at(top, g, u)
    hit = np.flatnonzero(u == top[g])  # every row equal to its group's largest
    first = np.full(size, len(u), dtype=np.int64)
    np.minimum.at(first, g[hit], hit)
    return first[appearance_order(g)]


def appearance_order(g: np.ndarray) -> np.ndarray:
    """The distinct codes of `g` (non-negative integers) in order of first appearance:
    `pd.unique(g)`. Where each new code is larger than every code before it (a code table's
    own numbering, `pd.factorize`'s: the checks' tables) they are the rows where the running
    largest code rises, found without hashing; otherwise `pd.unique`."""
    if not len(g):
        return pd.unique(g)
    top = np.maximum.accumulate(g)
    rises = np.flatnonzero(top[1:] > top[:-1]) + 1
    present = np.zeros(int(top[-1]) + 1, dtype=bool)
    present[g] = True
    if len(rises) + 1 == np.count_nonzero(present):
        return np.concatenate((g[:1], g[rises]))
    return pd.unique(g)


def failing_rows(table: pd.DataFrame, rule: Governing) -> np.ndarray:
    """The rows `rule.failing` names FAIL: what `governing_rows(failing=True)` adds to the
    governing rows. Apart so that `select_detail` sorts a table once for both of its choices
    (with and without the failing rows), not twice (0.3 s at 360 000 rows)."""
    keep = np.zeros(len(table), dtype=bool)
    for col in rule.failing:
        if col in table:
            keep |= table[col].to_numpy() == FAIL  # on the plain array: the same test, less time
    return keep


# Discrete bands of our own on utilisation (not a continuous scale, where a comfortable 0.57
# would already read as a warning colour): comfortable up to CLOSE, close up to 1.0, over above.
# The status cell beside a utilisation takes the same band. Common practice, no source: a
# margin of 10 % is where checkers usually start to look twice.
CLOSE = 0.9
BANDS = (
    ("comfortable", f"utilisation up to {CLOSE:g}", "FF1E5631", "FFD9EAD3"),
    ("close", f"utilisation above {CLOSE:g} up to 1.0", "FF6B4E00", "FFFCE8B2"),
    ("over", "utilisation above 1.0 (or FAIL)", "FF7A0C00", "FFF4C7C3"),
)  # name, meaning, font colour, fill colour
ID_KEYS = ("storey", "pier_id", "lintel_id", "member", "wall_id")  # repeated when printing


def band(util) -> np.ndarray:
    """Band name per utilisation: comfortable, close, over ('' where there is none)."""
    u = np.asarray(util, dtype=float)
    out = np.full(u.shape, "", dtype=object)
    out[u <= CLOSE] = BANDS[0][0]
    out[(u > CLOSE) & (u <= 1.0)] = BANDS[1][0]
    out[u > 1.0] = BANDS[2][0]
    return out


def utilisation(demand, capacity) -> np.ndarray:
    """|demand| / capacity; inf where capacity is zero and there is demand."""
    d = np.abs(np.asarray(demand, dtype=float))
    c = np.asarray(capacity, dtype=float)
    if d.ndim != 1 or c.shape != d.shape:  # scalars and broadcasts: the formula as it stands
        with np.errstate(divide="ignore", invalid="ignore"):
            return np.where(c > 0, d / np.where(c > 0, c, 1.0), np.where(d > 0, np.inf, 0.0))
    # rows: d / c where the capacity is positive (most rows), the rest set apart (the same
    # numbers as the formula, without its four temporary arrays of every row)
    with np.errstate(divide="ignore", invalid="ignore"):
        u = d / c
    off = ~(c > 0)
    if off.any():
        u[off] = np.where(d[off] > 0, np.inf, 0.0)
    return u


def status(util) -> np.ndarray:
    return np.where(np.asarray(util) <= 1.0, PASS, FAIL)


def text_column(pick, texts) -> pd.api.extensions.ExtensionArray:
    """`texts[pick]` as a text column, of the type pandas gives a column of those strings: a
    take from the few distinct strings. A numpy string array (what `np.where` on strings gives)
    becomes a column by one Python string per row: 0.1 s per 360 000 rows."""
    # the column type pandas gives those strings (a Series of them), then a take of its array
    # alone: the Series' own take made an index of every row as well (half the time)
    choices = pd.Series(np.asarray(texts, dtype=object)).array
    return choices.take(np.asarray(pick, dtype=np.intp))


def status_column(util) -> pd.api.extensions.ExtensionArray:
    """`status(util)` as a text column (`text_column`): pass where util <= 1, FAIL otherwise
    (NaN included)."""
    return text_column(~(np.asarray(util) <= 1.0), [PASS, FAIL])
