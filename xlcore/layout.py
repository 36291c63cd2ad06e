"""The workbook layout as data: every input sheet, column and setting, in one place.

The template writer, the reader, the README's layout section and the tests all read this
module; nothing else spells a sheet name or a column header.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from enum import StrEnum

from xlcore import costs


class Kind(StrEnum):
    """What a cell must hold."""

    TEXT = "text"
    NUMBER = "number"
    INTEGER = "integer"
    CHOICE = "choice"
    STOREY = "storey"  # text naming a row of the storeys sheet
    WALL = "wall"  # text naming a wall ID of the walls sheet


@dataclass(frozen=True)
class Column:
    key: str
    name: str
    unit: str | None
    kind: Kind
    help: str
    required: bool = True
    min: float | None = None
    max: float | None = None
    min_open: bool = False  # True: value must be strictly greater than min
    choices: tuple[str, ...] = ()
    width: float = 13.0
    number_format: str = "0.00"
    # a drop-down of this kind's names offered in the template without refusing other text
    # (members: wall IDs are listed, pier and lintel IDs derived from them are typed)
    suggest: Kind | None = None

    @property
    def header(self) -> str:
        return f"{self.name} [{self.unit}]" if self.unit else self.name

    def expectation(self) -> str:
        """Plain words for what the column accepts, used in error messages and help."""
        if self.kind in (Kind.CHOICE,):
            return "one of: " + ", ".join(self.choices)
        if self.kind is Kind.STOREY:
            return "a storey name from the storeys sheet"
        if self.kind is Kind.WALL:
            return "a wall ID from the walls sheet"
        if self.kind is Kind.TEXT:
            return "text"
        what = "a whole number" if self.kind is Kind.INTEGER else "a number"
        unit = f" in {self.unit}" if self.unit else ""
        if self.min is not None and self.max is not None:
            low = f"greater than {_fmt(self.min)}" if self.min_open else f"{_fmt(self.min)}"
            if self.min_open:
                return f"{what}{unit}, {low} and at most {_fmt(self.max)}"
            return f"{what}{unit} from {low} to {_fmt(self.max)}"
        if self.min is not None:
            rel = "greater than" if self.min_open else "at least"
            return f"{what}{unit}, {rel} {_fmt(self.min)}"
        return f"{what}{unit}"


def _fmt(x: float) -> str:
    return f"{x:g}"


@dataclass(frozen=True)
class TableSheet:
    """An input sheet holding a table: header in row 1, one record per row below."""

    key: str
    name: str
    purpose: str
    columns: tuple[Column, ...]
    max_rows: int = 2000  # rows covered by the template's validation and styling
    optional: bool = False  # a workbook without this sheet reads as one with no rows (older files)

    def column(self, key: str) -> Column:
        for c in self.columns:
            if c.key == key:
                return c
        raise KeyError(key)

    @property
    def keys(self) -> list[str]:
        return [c.key for c in self.columns]


@dataclass(frozen=True)
class Setting:
    key: str
    label: str
    unit: str | None
    kind: Kind
    default: object
    help: str
    choices: tuple[str, ...] = ()
    min: float | None = None
    max: float | None = None

    @property
    def column(self) -> Column:
        """The setting's value cell seen as a column, so one cell validator serves both."""
        return Column(
            key=self.key,
            name=self.label,
            unit=self.unit,
            kind=self.kind,
            help=self.help,
            required=False,
            min=self.min,
            max=self.max,
            choices=self.choices,
        )


@dataclass(frozen=True)
class SettingsSheet:
    """Key/value sheet: labels in column A, values in column B."""

    key: str
    name: str
    purpose: str
    headers: tuple[str, str, str, str]
    settings: tuple[Setting, ...]

    def setting(self, key: str) -> Setting:
        for s in self.settings:
            if s.key == key:
                return s
        raise KeyError(key)


YES_NO = ("yes", "no")
STANDARDS = ("AS 3600:2018", "ACI 318-19")
HEIGHT_BASES = ("overall wall height", "storey clear height", "opening height")
PIER_FIXITY = ("fixed-fixed", "cantilever")
CORE_LOCAL_MOMENT = ("add V* h/2 beside openings", "none")
WALL_SHARING = ("one storey's stiffness", "whole-height cantilever")
# Structural ductility factor mu as the earthquake standard (AS 1170.4) assigns it; AS 3600:2018
# Section 14 covers limited ductile (mu = 2) and moderately ductile (mu = 3) structures
DUCTILITY = ("elastic (mu = 1)", "limited ductile (mu = 2)", "moderately ductile (mu = 3)")
# Which walls share one concrete pour, for the advice's change of grade (checks/advice.py reads
# the storey count from the words "over N storeys" and "each wall" from the last choice)
GRADE_POURS = (
    "the core at one storey",
    "the core over 2 storeys",
    "the core over 3 storeys",
    "the core over 4 storeys",
    "each wall at one storey",
)

INSTRUCTIONS_SHEET = "Read me"

PROJECT = SettingsSheet(
    key="project",
    name="Project",
    purpose="Project-wide settings. Leave a value blank to use the default shown in the help.",
    headers=("Setting", "Value", "Unit", "Help"),
    settings=(
        Setting("project_name", "Project name", None, Kind.TEXT, "", "Free text, shown on results."),
        Setting(
            "standard",
            "Design standard",
            None,
            Kind.CHOICE,
            STANDARDS[0],
            "Standard every check follows: AS 3600:2018, or ACI 318-19 (SI: shear, axial load with "
            "bending, the core checks, detailing, lintels and the Chapter 18 special-wall rules; "
            "settings named for one standard apply to it alone; see docs/engineering-basis.md for "
            "what ACI 318-19 covers and what is from memory).",
            choices=STANDARDS,
        ),
        Setting(
            "compare_standard",
            "Also check to",
            None,
            Kind.CHOICE,
            "",
            "Blank: one standard. A second standard's name (or its short form, e.g. AS3600, ACI318): "
            "every check is also run to it and a comparison sheet sets the two side by "
            "side per storey, pier and check (utilisation under each, their ratio, the "
            "governing clause under each). The other result sheets stay those of the design standard "
            "above. `xlcore compute --standards` overrides this setting.",
            choices=STANDARDS,
        ),
        Setting(
            "phi_shear",
            "phi for wall shear",
            None,
            Kind.NUMBER,
            None,
            "Capacity reduction factor for in-plane shear of walls. Blank: the standard's, 0.7 "
            "(AS 3600:2018 Table 2.2.2 as applied to walls) or 0.75 (ACI 318-19 Table 21.2.1). ACI "
            "318-19 21.2.4.1 asks 0.60 for special structural walls whose nominal shear strength is "
            "less than the shear at their nominal flexural strength: enter 0.6 there.",
            min=0.5,
            max=1.0,
        ),
        Setting(
            "shear_height",
            "Height for pier aspect ratio",
            None,
            Kind.CHOICE,
            HEIGHT_BASES[0],
            "Hw used in Hw/Lw of Cl 11.6.3: the overall height of the wall, base to top "
            "(default: the conservative reading of Amendment 2, since Eq (2) falls as Hw/Lw "
            "grows), the storey clear height, or for piers beside an opening the opening's "
            "clear height. A pier beside an opening takes the larger of its own ratio and "
            "the whole wall's (common practice). See docs/engineering-basis.md.",
            choices=HEIGHT_BASES,
        ),
        Setting(
            "pier_fixity",
            "Pier end condition for stiffness",
            None,
            Kind.CHOICE,
            PIER_FIXITY[0],
            "End condition used for pier lateral stiffness when a wall's shear is shared "
            "among its piers: fixed-fixed (between slab and lintel) or cantilever.",
            choices=PIER_FIXITY,
        ),
        Setting(
            "wall_nm",
            "Wall N* and M* to its piers",
            None,
            Kind.CHOICE,
            "composite section",
            "Where actions are given for a whole wall that openings cut into piers: 'composite "
            "section' shares N* and M* by linear stress over the piers' combined section (full "
            "coupling through the lintels); 'pier moments from shear' gives each pier M* = V* h/2 "
            "and carries the rest of M* as an axial couple between the piers.",
            choices=("composite section", "pier moments from shear"),
        ),
        Setting(
            "core_local_moment",
            "Core actions: local pier moment",
            None,
            Kind.CHOICE,
            CORE_LOCAL_MOMENT[0],
            "Core actions only. Every pier and wall gets its own in-plane moment from the core's "
            "curvature (M_i = M_core x I_i / I_core about its own centroid) and N* from the linear "
            "stress. 'add V* h/2 beside openings' adds the contraflexure moment V* h/2 of a pier "
            "between openings (in the sense that increases |M*|); 'none' leaves it out.",
            choices=CORE_LOCAL_MOMENT,
        ),
        Setting(
            "wall_sharing",
            "Core shear among its walls by",
            None,
            Kind.CHOICE,
            WALL_SHARING[0],
            "Core actions only: the lateral stiffness that shares a core's storey shear among its "
            "walls (rigid floor). 'one storey's stiffness': each wall over the storey's clear "
            "height with the pier end condition (suits short piers between openings); 'whole-height "
            "cantilever': each wall as a cantilever over its overall height, flexure + shear, "
            "openings softening it by the same ratio as over one storey (tall cores act as "
            "cantilevers). Piers within a wall always share by their own stiffness.",
            choices=WALL_SHARING,
        ),
        Setting(
            "accidental",
            "Accidental eccentricity",
            "fraction",
            Kind.NUMBER,
            0.0,
            "Core actions only: extra eccentricity of the storey shear as a fraction of the "
            "plan dimension across it, added in the sense that increases each wall's share. "
            "Blank: 0. The loading standard sets it (commonly 0.05 to 0.10 for earthquake).",
            min=0.0,
            max=0.3,
        ),
        Setting(
            "phi_compression",
            "phi0 for compression with bending",
            None,
            Kind.NUMBER,
            None,
            "Capacity reduction factor where compression dominates. Blank: the standard's, 0.6 "
            "(AS 3600:2018 Table 2.2.2; Amendment 2 gives 0.65 k_phi: verify against your edition) "
            "or 0.65 (ACI 318-19 Table 21.2.2, compression-controlled with ties).",
            min=0.5,
            max=0.9,
        ),
        Setting(
            "phi_simplified",
            "phi for the Cl 11.5 simplified method",
            None,
            Kind.NUMBER,
            None,
            "Blank: 0.65 (AS 3600:2018; 0.6 in the 2009 edition: verify against your edition); under "
            "ACI 318-19 the 11.5.3 simplified method, blank 0.65 (Table 21.2.2).",
            min=0.5,
            max=0.9,
        ),
        Setting(
            "ends_restrained",
            "Walls restrained against rotation at floors",
            None,
            Kind.CHOICE,
            "no",
            "Cl 11.4 effective height factor for walls braced top and bottom: yes -> k = 0.75, "
            "no -> k = 1.0. Return walls at a wall's ends are found from the plan and lower k "
            "by the three- and four-side formulas.",
            choices=YES_NO,
        ),
        Setting(
            "shrinkage_restrained",
            "Walls restrained against shrinkage",
            None,
            Kind.CHOICE,
            "yes",
            "Cl 11.7 horizontal minimum: yes -> 0.0025; no -> 0.0015, or none for walls up to 2.5 m long.",
            choices=YES_NO,
        ),
        Setting(
            "lintel_deep_ratio",
            "Lintel span/depth limit for the beam method",
            None,
            Kind.NUMBER,
            4.0,
            "At or above this clear span / overall depth a lintel is designed as a beam (Section 8); "
            "below it as a deep member by a strut-and-tie model (Section 7), or by its diagonal bars "
            "where the openings sheet gives them. AS 3600:2018 Cl 12.1.1 (from memory: verify) makes "
            "a member non-flexural below 4 when continuous, 3 simply supported, 1.5 as a cantilever; "
            "a lintel built into piers at both ends is taken as continuous (4, the conservative "
            "reading; ACI 318-19 18.10.7.1 also uses 4).",
            min=1.0,
            max=10.0,
        ),
        Setting(
            "phi_strut",
            "phi for struts and nodes",
            None,
            Kind.NUMBER,
            0.6,
            "Strut-and-tie design of deep lintels: capacity reduction factor for the concrete strut "
            "and its nodes (AS 3600:2018 Table 2.2.2, 0.6 from memory: verify).",
            min=0.4,
            max=0.9,
        ),
        Setting(
            "phi_tie",
            "phi for ties and diagonal bars",
            None,
            Kind.NUMBER,
            0.8,
            "Strut-and-tie design of deep lintels: capacity reduction factor for the steel ties, and "
            "for the diagonal bars of a diagonally reinforced lintel (AS 3600:2018 Table 2.2.2, 0.8 "
            "for ties, from memory: verify).",
            min=0.5,
            max=0.9,
        ),
        Setting(
            "lintel_beta_s",
            "Strut efficiency factor beta_s",
            None,
            Kind.NUMBER,
            None,
            "Blank: beta_s = 1 / (1 + 0.66 cot^2 theta) within 0.3 to 1.0, theta the strut's angle "
            "to the ties (AS 3600:2018 Cl 7.2.2, bottle-shaped strut with transverse bars, from "
            "memory: verify). A number here is used for every deep lintel instead.",
            min=0.3,
            max=1.0,
        ),
        Setting(
            "lintel_beta_n",
            "Node efficiency factor beta_n",
            None,
            Kind.NUMBER,
            0.8,
            "Deep lintels: the strut's end nodes hold a tie (C-C-T); their faces are taken to "
            "beta_n x 0.9 f'c (AS 3600:2018 Cl 7.4, 0.8 for C-C-T nodes, from memory: verify).",
            min=0.4,
            max=1.0,
        ),
        Setting(
            "strut_stress",
            "Strut and node concrete stress",
            "x f'c",
            Kind.NUMBER,
            0.9,
            "Deep lintels: struts and node faces are taken to beta x this x f'c (AS 3600:2018 "
            "Cl 7.2.1 and 7.4, 0.9 from memory: verify).",
            min=0.5,
            max=1.0,
        ),
        Setting(
            "coupling_cap",
            "Diagonal lintel shear limit",
            "x sqrt(f'c) b D",
            Kind.NUMBER,
            0.83,
            "Diagonally reinforced lintels: the shear their bars may carry, Vu = 2 A_sd fsy sin "
            "alpha, is capped at this times sqrt(f'c) b D [MPa, mm] (ACI 318-19 Eq (18.10.7.4), "
            "0.83 in SI; AS 3600:2018 has no coupling-beam clause).",
            min=0.3,
            max=1.5,
        ),
        Setting(
            "compression_limit",
            "Elastic peak compression limit",
            "x f'c",
            Kind.NUMBER,
            None,
            "Earthquake combinations only: peak elastic compression above this fraction of f'c "
            "calls for end-zone detailing: a flag on the core stress check and the trigger of the "
            "Section 14 end-zone rule of every pier (N*/A + M*/Z). Never a failing utilisation. "
            "Blank: the standard's trigger, 0.15 (AS 3600:2018 Cl 14.6.2, from memory: verify) or "
            "0.2 (ACI 318-19 18.10.6.3, whose per-pier boundary-element rows always use 0.2).",
            min=0.05,
            max=1.0,
        ),
        Setting(
            "earthquake_combinations",
            "Earthquake combinations",
            None,
            Kind.TEXT,
            "",
            "Names of the load combinations that include earthquake actions, separated by "
            "commas (blank: none). Only these get the end-zone detailing flag of the core stress "
            "check (at the Elastic peak compression limit) and the earthquake rules of the piers "
            "(AS 3600:2018 Section 14 or ACI 318-19 Chapter 18); the flag is a trigger for "
            "detailing, not a capacity.",
        ),
        Setting(
            "ductility",
            "Structural ductility factor mu",
            None,
            Kind.CHOICE,
            DUCTILITY[1],
            "As the earthquake design (AS 1170.4) assigns it. 'limited ductile (mu = 2)' and "
            "'moderately ductile (mu = 3)' get the wall rules of AS 3600:2018 Section 14 on the "
            "earthquake detailing sheet (moderately ductile: the limited-ductile rules as a floor; "
            "its further provisions are not checked); 'elastic (mu = 1)' gets none. Default: the "
            "conservative one that applies the rules.",
            choices=DUCTILITY,
        ),
        Setting(
            "eq_two_layers",
            "Section 14: bars in both faces",
            None,
            Kind.CHOICE,
            "yes",
            "Walls of a limited- or moderately-ductile structure need vertical and horizontal "
            "bars in two layers, one near each face (AS 3600:2018 Cl 14.6, from memory: verify).",
            choices=YES_NO,
        ),
        Setting(
            "eq_rho_min",
            "Section 14: least ratio each way",
            None,
            Kind.NUMBER,
            0.0025,
            "Least vertical and least horizontal reinforcement ratio of walls of a limited- or "
            "moderately-ductile structure (0.0025, AS 3600:2018 Cl 14.6, from memory: verify).",
            min=0.001,
            max=0.02,
        ),
        Setting(
            "eq_slenderness",
            "Section 14: Hwe/tw limit",
            None,
            Kind.NUMBER,
            20.0,
            "Largest effective height / thickness (Cl 11.4 Hwe) of walls of a limited- or "
            "moderately-ductile structure (20, AS 3600:2018 Section 14, from memory: verify).",
            min=5.0,
            max=50.0,
        ),
        Setting(
            "eq_tie_diameters",
            "Section 14: tie spacing in db",
            "x db",
            Kind.NUMBER,
            6.0,
            "Where an end zone is required (compression above the peak compression limit under an "
            "earthquake combination), ties restraining its vertical bars at most this many "
            "vertical-bar diameters apart (6, AS 3600:2018 Cl 14.6.2, from memory: verify).",
            min=3.0,
            max=20.0,
        ),
        Setting(
            "eq_tie_max",
            "Section 14: tie spacing cap",
            "mm",
            Kind.NUMBER,
            150.0,
            "End-zone ties at most this far apart whatever the bar size (150 mm, AS 3600:2018 "
            "Cl 14.6.2, from memory: verify).",
            min=50.0,
            max=400.0,
        ),
        Setting(
            "aci_special_walls",
            "ACI 318: walls are special structural walls",
            None,
            Kind.CHOICE,
            "yes",
            "ACI 318-19 only (ignored under AS 3600). yes: every pier gets the special structural "
            "wall rules of Chapter 18 on the earthquake detailing sheet (web ratios and two "
            "curtains 18.10.2, shear amplification 18.10.3.1, boundary elements 18.10.6) and the "
            "lintels the coupling-beam rules of 18.10.7; no: none of them (walls of ordinary "
            "structural walls, Chapter 11 only). Default: the conservative one that applies them.",
            choices=YES_NO,
        ),
        Setting(
            "aci_mpr_mu",
            "ACI 318: Mpr/Mu for Omega_v",
            None,
            Kind.NUMBER,
            1.5,
            "ACI 318-19 special walls: the wall's probable flexural strength over its factored "
            "moment at the critical section, for the overstrength factor Omega_v of Table "
            "18.10.3.1.2 (the greater of this and 1.5 where hwcs/lw > 1.5; 1.0 below). Blank: 1.5.",
            min=1.0,
            max=5.0,
        ),
        Setting(
            "aci_storeys_above",
            "ACI 318: storeys above the critical section",
            None,
            Kind.NUMBER,
            None,
            "ACI 318-19 special walls: ns of the dynamic amplification omega_v (18.10.3.1.3). "
            "Blank: the number of storeys on the Storeys sheet (critical section at the base; "
            "the larger ns gives the larger omega_v). Either way not less than 0.007 hwcs with hwcs "
            "in inches (0.007 x the wall's height in mm / 25.4), as 18.10.3.1.3 requires.",
            min=1.0,
            max=200.0,
        ),
        Setting(
            "aci_delta_u",
            "ACI 318: design displacement delta_u at the top",
            "mm",
            Kind.NUMBER,
            None,
            "ACI 318-19 special walls: the design displacement at the top of the walls (from "
            "the analysis, as the earthquake standard amplifies it), one value for the building, "
            "the largest of its directions. Given: boundary elements are also found by the "
            "displacement method of 18.10.6.2 (walls with hwcs/lw >= 2.0, hw the wall's overall "
            "height). Blank: the stress method of 18.10.6.3 alone.",
            min=0.0,
            max=5000.0,
        ),
        Setting(
            "concrete_prices",
            "Concrete prices by grade",
            "per m3",
            Kind.TEXT,
            costs.DEFAULT_CONCRETE,
            "For ranking the fixes offered for failing piers: 'grade:price' pairs. The default "
            "prices are illustrative, not market data.",
        ),
        Setting(
            "steel_price",
            "Reinforcement price",
            "per t",
            Kind.NUMBER,
            costs.DEFAULT_STEEL,
            "For ranking fixes. The default is illustrative, not market data.",
            min=0.0,
            max=1e6,
        ),
        Setting(
            "grade_pour",
            "Concrete pour for a grade change",
            None,
            Kind.CHOICE,
            GRADE_POURS[0],
            "Advice for failing piers: a higher concrete grade is proposed for a whole pour, "
            "never one pier. 'The core': every wall with the same Core ID on the Walls sheet "
            "(blank: the one building core); 'over N storeys': storeys grouped N at a time from "
            "the lowest. The whole pour is priced at the new grade.",
            choices=GRADE_POURS,
        ),
        Setting(
            "poisson",
            "Poisson's ratio of concrete",
            None,
            Kind.NUMBER,
            0.2,
            "Gives the shear modulus G = E / (2 (1 + nu)) for pier shear deformation.",
            min=0.0,
            max=0.5,
        ),
        Setting(
            "aci_lambda",
            "ACI 318: lambda for lightweight concrete",
            None,
            Kind.NUMBER,
            1.0,
            "ACI 318-19 only (19.2.4): modification factor on sqrt(f'c) in wall shear, 1.0 for "
            "normal-weight concrete, 0.75 to 1.0 for lightweight. Ignored under AS 3600.",
            min=0.75,
            max=1.0,
        ),
    ),
)

_STOREY_LIST_HELP = "Pick from the list: names typed on the storeys sheet."

STOREYS = TableSheet(
    key="storeys",
    name="Storeys",
    purpose=(
        "One row per storey, lowest first. A storey runs from the top of its floor slab to "
        "the top of the next floor slab; its walls' clear height is that height less the "
        "slab above."
    ),
    columns=(
        Column("name", "Storey", None, Kind.TEXT, "Unique storey name, e.g. GF, L1, L2.", width=12),
        Column(
            "level",
            "Floor level",
            "m",
            Kind.NUMBER,
            "Level of the top of the slab the walls stand on.",
            min=-200,
            max=1000,
            number_format="0.000",
        ),
        Column(
            "height",
            "Height to next floor",
            "m",
            Kind.NUMBER,
            "Floor-to-floor height: from this floor level to the next storey's floor level.",
            min=1.0,
            max=30,
            number_format="0.000",
            width=16,
        ),
        Column(
            "slab",
            "Slab above",
            "mm",
            Kind.NUMBER,
            "Thickness of the slab at the top of this storey (0 where there is none).",
            min=0,
            max=2000,
            number_format="0",
        ),
    ),
    max_rows=300,
)

_BAR = dict(min=6, max=40, number_format="0", width=11)
_SPACING = dict(min=50, max=1000, number_format="0", width=11)
_LAYERS = dict(min=1, max=2, number_format="0", width=9)

WALLS = TableSheet(
    key="walls",
    name="Walls",
    purpose=(
        "One row per wall per storey range. A wall whose thickness, grade or bars change up "
        "the building gets one row per range, with the same wall ID; ranges must not overlap "
        "or leave gaps."
    ),
    columns=(
        Column("wall_id", "Wall ID", None, Kind.TEXT, "Wall name, e.g. W1. Piers get -1, -2...", width=10),
        Column("x1", "Start x", "m", Kind.NUMBER, "Plan x of the centreline start.", min=-1000, max=1000),
        Column("y1", "Start y", "m", Kind.NUMBER, "Plan y of the centreline start.", min=-1000, max=1000),
        Column("x2", "End x", "m", Kind.NUMBER, "Plan x of the centreline end.", min=-1000, max=1000),
        Column("y2", "End y", "m", Kind.NUMBER, "Plan y of the centreline end.", min=-1000, max=1000),
        Column(
            "thickness",
            "Thickness",
            "mm",
            Kind.NUMBER,
            "Wall thickness tw.",
            min=75,
            max=1500,
            number_format="0",
        ),
        Column(
            "storey_from", "From storey", None, Kind.STOREY, "Lowest storey of this row. " + _STOREY_LIST_HELP
        ),
        Column(
            "storey_to", "To storey", None, Kind.STOREY, "Highest storey of this row. " + _STOREY_LIST_HELP
        ),
        Column(
            "fc",
            "f'c",
            "MPa",
            Kind.NUMBER,
            "Characteristic compressive strength: AS 3600:2018 20 to 100 MPa; ACI 318-19 (f'c) "
            "at least 17 MPa.",
            min=17,
            max=100,
            number_format="0",
        ),
        Column(
            "fsy",
            "fsy",
            "MPa",
            Kind.NUMBER,
            "Yield strength of the bars.",
            min=250,
            max=600,
            number_format="0",
        ),
        Column("v_dia", "Vertical bar dia", "mm", Kind.NUMBER, "Vertical bar diameter.", **_BAR),
        Column(
            "v_spacing",
            "Vertical spacing",
            "mm",
            Kind.NUMBER,
            "Vertical bar spacing along the wall.",
            **_SPACING,
        ),
        Column("v_layers", "Vertical layers", None, Kind.INTEGER, "1 (central) or 2 (each face).", **_LAYERS),
        Column("h_dia", "Horizontal bar dia", "mm", Kind.NUMBER, "Horizontal bar diameter.", **_BAR),
        Column(
            "h_spacing",
            "Horizontal spacing",
            "mm",
            Kind.NUMBER,
            "Horizontal bar spacing up the wall.",
            **_SPACING,
        ),
        Column(
            "h_layers", "Horizontal layers", None, Kind.INTEGER, "1 (central) or 2 (each face).", **_LAYERS
        ),
        Column(
            "cover",
            "Cover",
            "mm",
            Kind.NUMBER,
            "Clear cover to the outer bars.",
            min=10,
            max=150,
            number_format="0",
        ),
        Column(
            "core",
            "Core",
            None,
            Kind.TEXT,
            "Core (group) the wall belongs to, e.g. lift, stair (optional). Walls tied into one "
            "cross-section share a core; cores apart, joined only by floor slabs, are separate "
            "sections. Blank on every row: all walls are one core. One core per wall ID.",
            required=False,
            width=10,
        ),
    ),
)

OPENINGS = TableSheet(
    key="openings",
    name="Openings",
    purpose=(
        "One row per opening (door, window, duct) per storey range. An opening splits its wall "
        "into piers over the opening's height; the wall above it is a lintel."
    ),
    columns=(
        Column(
            "wall_id", "Wall ID", None, Kind.WALL, "Wall the opening is in. Pick from the list.", width=10
        ),
        Column(
            "storey_from",
            "From storey",
            None,
            Kind.STOREY,
            "Lowest storey with this opening. " + _STOREY_LIST_HELP,
        ),
        Column(
            "storey_to",
            "To storey",
            None,
            Kind.STOREY,
            "Highest storey with this opening. " + _STOREY_LIST_HELP,
        ),
        Column(
            "offset",
            "Offset from wall start",
            "m",
            Kind.NUMBER,
            "Distance along the wall from its start point to the opening's near edge.",
            min=0,
            max=1000,
            number_format="0.000",
            width=16,
        ),
        Column(
            "width",
            "Width",
            "m",
            Kind.NUMBER,
            "Opening width along the wall.",
            min=0,
            max=100,
            min_open=True,
            number_format="0.000",
        ),
        Column(
            "sill",
            "Sill height",
            "m",
            Kind.NUMBER,
            "Height of the opening's bottom above floor level (0 for a door).",
            min=0,
            max=30,
            number_format="0.000",
        ),
        Column(
            "head",
            "Head height",
            "m",
            Kind.NUMBER,
            "Height of the opening's top above floor level.",
            min=0,
            max=30,
            min_open=True,
            number_format="0.000",
        ),
        Column("label", "Label", None, Kind.TEXT, "Optional note, e.g. lift door.", required=False, width=16),
        Column(
            "lintel_bars",
            "Lintel bottom bars",
            None,
            Kind.INTEGER,
            "Number of bars in the lintel's bottom layer over this opening, taken the same in its "
            "top layer (coupling actions reverse): the beam's tension bars, or each tie of the "
            "strut-and-tie model. Optional; blank with actions given: the lintel fails and the "
            "bars it needs are reported.",
            required=False,
            min=1,
            max=20,
            number_format="0",
            width=11,
        ),
        Column(
            "lintel_dia",
            "Lintel bar dia",
            "mm",
            Kind.NUMBER,
            "Diameter of those bars.",
            required=False,
            min=10,
            max=40,
            number_format="0",
            width=10,
        ),
        Column(
            "stirrup_dia",
            "Lintel fitment dia",
            "mm",
            Kind.NUMBER,
            "Diameter of the lintel's vertical fitments.",
            required=False,
            min=6,
            max=20,
            number_format="0",
            width=10,
        ),
        Column(
            "stirrup_legs",
            "Lintel fitment legs",
            None,
            Kind.INTEGER,
            "Vertical legs per fitment set.",
            required=False,
            min=1,
            max=8,
            number_format="0",
            width=10,
        ),
        Column(
            "stirrup_spacing",
            "Lintel fitment spacing",
            "mm",
            Kind.NUMBER,
            "Spacing of the fitments.",
            required=False,
            min=50,
            max=600,
            number_format="0",
            width=11,
        ),
        Column(
            "diag_bars",
            "Lintel diagonal bars per group",
            None,
            Kind.INTEGER,
            "Bars in each of the two diagonal groups crossing the lintel (optional). Given, the "
            "lintel is designed by its diagonal bars: Vu = 2 A_sd fsy sin alpha, alpha from the "
            "geometry, capped by the concrete (Project sheet). Each group in two layers, so half "
            "the bars side by side across the wall.",
            required=False,
            min=2,
            max=20,
            number_format="0",
            width=11,
        ),
        Column(
            "diag_dia",
            "Lintel diagonal bar dia",
            "mm",
            Kind.NUMBER,
            "Diameter of the diagonal bars.",
            required=False,
            min=10,
            max=40,
            number_format="0",
            width=10,
        ),
    ),
)

LOCATION_START, LOCATION_END = "start", "end"
LOCATION_NEAR, LOCATION_FAR = "near", "far"
LOCATION_FORMS = "'start', 'end', 'opening K near' or 'opening K far'"
_LOCATION = re.compile(r"^\s*(?:(?:wall\s+)?(start|end)|opening\s+(\d+)\s+(near|far)(?:\s+jamb)?)\s*$", re.I)


def parse_location(text: str) -> tuple[str, int] | None:
    """An end-zone location as (which, K): ('start', 0) or ('end', 0) for the wall's ends,
    ('near', K) or ('far', K) for the jambs of the wall's K-th opening counted from its start
    (the jamb nearer the wall start is 'near'); None when the text is none of those forms."""
    m = _LOCATION.match(str(text))
    if m is None:
        return None
    if m.group(1):
        return m.group(1).lower(), 0
    k = int(m.group(2))
    return (m.group(3).lower(), k) if k >= 1 else None


END_ZONES = TableSheet(
    key="end_zones",
    name="End zones",
    purpose=(
        "Bars concentrated at a pier's free edge: at a wall's start or end, or at a jamb of an "
        "opening. One row per wall, location and storey range (ranges of one wall and location "
        "must not overlap; storeys without a row have no end zone there). The wall's own "
        "vertical bars run between the zones at their given spacing or closer. Optional sheet."
    ),
    columns=(
        Column("wall_id", "Wall ID", None, Kind.WALL, "Wall the zone is in. Pick from the list.", width=10),
        Column(
            "storey_from", "From storey", None, Kind.STOREY, "Lowest storey of this row. " + _STOREY_LIST_HELP
        ),
        Column(
            "storey_to", "To storey", None, Kind.STOREY, "Highest storey of this row. " + _STOREY_LIST_HELP
        ),
        Column(
            "location",
            "Location",
            None,
            Kind.TEXT,
            "Which free edge: 'start' or 'end' of the wall, or a jamb: 'opening K near' / "
            "'opening K far', K = the opening's number along the wall from its start at those "
            "storeys (as in lintel W3-LK); the near jamb is the one nearer the wall start (the "
            "end of pier W3-K), the far jamb the start of pier W3-(K+1).",
            width=16,
        ),
        Column(
            "bars",
            "Bars",
            None,
            Kind.INTEGER,
            "Number of vertical bars in the zone over all faces (8 for 4 on each face of a "
            "two-layer wall); a multiple of the wall's vertical layers.",
            min=1,
            max=60,
            number_format="0",
            width=8,
        ),
        Column(
            "dia",
            "Bar dia",
            "mm",
            Kind.NUMBER,
            "Diameter of the zone's bars (same fsy as the wall's).",
            min=10,
            max=40,
            number_format="0",
            width=9,
        ),
        Column(
            "length",
            "Zone length",
            "mm",
            Kind.NUMBER,
            "Length of the zone along the wall from the free edge. Its bars on each face are "
            "evenly spaced from cover + tie + db/2 at the free edge to tie + db/2 inside the "
            "zone's inner boundary.",
            min=0,
            max=5000,
            min_open=True,
            number_format="0",
            width=10,
        ),
        Column(
            "tie_dia",
            "Tie dia",
            "mm",
            Kind.NUMBER,
            "Diameter of the ties around the zone's bars (optional; blank: no ties).",
            required=False,
            min=6,
            max=20,
            number_format="0",
            width=8,
        ),
        Column(
            "tie_spacing",
            "Tie spacing",
            "mm",
            Kind.NUMBER,
            "Spacing of those ties up the wall (given with the tie diameter).",
            required=False,
            min=50,
            max=600,
            number_format="0",
            width=9,
        ),
    ),
    max_rows=2000,
    optional=True,
)

_FORCE = dict(min=-1e7, max=1e7, number_format="0.0")

MEMBER_ACTIONS = TableSheet(
    key="member_actions",
    name="Member actions",
    purpose=(
        "Design actions per storey, load combination and member (a pier ID such as W3-1, or a "
        "wall ID; a wall's actions are shared among its piers where openings cut it). "
        "Axial force: compression positive. Actions at the base of the member in that storey."
    ),
    columns=(
        Column("storey", "Storey", None, Kind.STOREY, _STOREY_LIST_HELP, width=10),
        Column("combination", "Combination", None, Kind.TEXT, "Load combination name.", width=16),
        Column(
            "member",
            "Member",
            None,
            Kind.TEXT,
            "Pier ID (e.g. W3-1), lintel ID (e.g. W3-L1) or wall ID (e.g. W3); the drop-down lists "
            "the wall IDs, `xlcore check` lists the piers and lintels per storey.",
            width=10,
            suggest=Kind.WALL,
        ),
        Column("n", "N*", "kN", Kind.NUMBER, "Design axial force, compression positive.", **_FORCE),
        Column(
            "v",
            "V* in-plane",
            "kN",
            Kind.NUMBER,
            "Design in-plane shear, positive from wall start to end.",
            **_FORCE,
        ),
        Column(
            "m",
            "M* in-plane",
            "kNm",
            Kind.NUMBER,
            "Design in-plane moment; positive compresses the wall's end (End x, End y).",
            **_FORCE,
        ),
        Column(
            "m_out",
            "M* out-of-plane",
            "kNm",
            Kind.NUMBER,
            "Design out-of-plane moment (optional).",
            required=False,
            **_FORCE,
        ),
    ),
    max_rows=20000,
)

CORE_ACTIONS = TableSheet(
    key="core_actions",
    name="Core actions",
    purpose=(
        "Storey resultants of the whole core (or of the building, shared among its cores) per "
        "load combination, where only those are known. xlcore shares them to cores (flexural "
        "stiffness), walls (rigid floor, stiffness, torsion) and piers. Forces at the "
        "base of the storey; compression positive. Where the member-actions sheet has rows for "
        "the same storey and combination, those win."
    ),
    columns=(
        Column("storey", "Storey", None, Kind.STOREY, _STOREY_LIST_HELP, width=10),
        Column("combination", "Combination", None, Kind.TEXT, "Load combination name.", width=16),
        Column("n", "N*", "kN", Kind.NUMBER, "Total axial force, compression positive.", **_FORCE),
        Column("vx", "Vx*", "kN", Kind.NUMBER, "Storey shear in the x direction.", **_FORCE),
        Column("vy", "Vy*", "kN", Kind.NUMBER, "Storey shear in the y direction.", **_FORCE),
        Column(
            "mx",
            "Mx*",
            "kNm",
            Kind.NUMBER,
            "Moment about the x axis; positive compresses the +y side.",
            **_FORCE,
        ),
        Column(
            "my",
            "My*",
            "kNm",
            Kind.NUMBER,
            "Moment about the y axis; positive compresses the +x side.",
            **_FORCE,
        ),
        Column(
            "t",
            "T*",
            "kNm",
            Kind.NUMBER,
            "Torsion about the vertical axis, anticlockwise in plan positive.",
            **_FORCE,
        ),
        Column(
            "x_v",
            "Shear acts at x",
            "m",
            Kind.NUMBER,
            "Plan x of the point the storey shear acts at (optional; blank: the centre of rigidity).",
            required=False,
            min=-1000,
            max=1000,
        ),
        Column(
            "y_v",
            "Shear acts at y",
            "m",
            Kind.NUMBER,
            "Plan y of the point the storey shear acts at (optional; blank: the centre of rigidity).",
            required=False,
            min=-1000,
            max=1000,
        ),
        Column(
            "core",
            "Core",
            None,
            Kind.TEXT,
            "Core these actions belong to (a core named on the walls sheet; optional). Blank: "
            "the building's storey resultants, shared among the cores by flexural stiffness "
            "(EI) and a rigid floor, axial force by area. Moments about the core's centroid "
            "(blank: about the centroid of all cores).",
            required=False,
            width=10,
        ),
    ),
    max_rows=5000,
)

TABLES: tuple[TableSheet, ...] = (STOREYS, WALLS, OPENINGS, END_ZONES, MEMBER_ACTIONS, CORE_ACTIONS)
OPTIONAL_SHEETS: frozenset[str] = frozenset(t.name for t in TABLES if t.optional)
INPUT_SHEET_NAMES: tuple[str, ...] = (PROJECT.name,) + tuple(t.name for t in TABLES)
RESULT_PREFIX = "Results "  # every sheet xlcore writes starts with this; only those are rewritten


@dataclass(frozen=True)
class UnitSlip:
    """A value that looks like the wrong unit: `factor` times it would sit in range."""

    unit: str
    factor: float
    hint: str


UNIT_SLIPS: tuple[UnitSlip, ...] = (
    UnitSlip("mm", 1000.0, "did you enter metres? this column is in mm"),
    UnitSlip("m", 0.001, "did you enter millimetres? this column is in m"),
    UnitSlip("MPa", 1e-6, "did you enter Pa? this column is in MPa"),
)


def markdown() -> str:
    """The layout as the README's reference tables (a test keeps README in step)."""
    out = [f"**{PROJECT.name}** — {PROJECT.purpose}", "", "| Setting | Default | Help |", "|---|---|---|"]
    for s in PROJECT.settings:
        default = "" if s.default in (None, "") else str(s.default)
        out.append(f"| {s.label} | {default} | {s.help} |")
    for t in TABLES:
        out += [
            "",
            f"**{t.name}** — {t.purpose}",
            "",
            "| Column | Required | Accepts | Help |",
            "|---|---|---|---|",
        ]
        for c in t.columns:
            out.append(f"| {c.header} | {'yes' if c.required else 'no'} | {c.expectation()} | {c.help} |")
    return "\n".join(out)


def standard_named(text: object) -> str | None:
    """The `STANDARDS` name that `text` means, or None: a full name or its short form
    (the name before its edition, without spaces: 'AS3600', 'ACI318'), case and spacing
    ignored. The command line's `--standards` and the 'Also check to' setting read names so."""
    key = re.sub(r"\s+", "", str(text)).lower()
    for name in STANDARDS:
        if key in (re.sub(r"\s+", "", name).lower(), _short(name).lower()):
            return name
    return None


def _short(name: str) -> str:
    """'AS 3600:2018' -> 'AS3600', 'ACI 318-19' -> 'ACI318': the name before its edition."""
    return re.sub(r"\s+", "", re.split(r"[:-]", name)[0])


def standard_forms() -> str:
    """The accepted names in words, for error messages: full names and short forms."""
    return ", ".join(f"{n} ({_short(n)})" for n in STANDARDS)


def rewrite_readme(path: str) -> None:
    """Replace the text between the README's layout markers with `markdown()`."""
    import re
    from pathlib import Path

    text = Path(path).read_text(encoding="utf-8")
    new = re.sub(
        r"(<!-- layout:start[^\n]*\n).*?(<!-- layout:end -->)",
        lambda m: m.group(1) + markdown() + "\n" + m.group(2),
        text,
        flags=re.S,
    )
    Path(path).write_text(new, encoding="utf-8")


if __name__ == "__main__":
    import sys

    if len(sys.argv) > 1:
        rewrite_readme(sys.argv[1])
    else:
        print(markdown())
