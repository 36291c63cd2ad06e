"""The one-direction flow: read -> validate -> geometry -> actions -> checks -> results -> write."""

from __future__ import annotations

import datetime as dt
import time
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from xlcore import CAUTION, __version__, comparison, cores, distribution, geometry, results
from xlcore.checks import plain, special_walls
from xlcore.checks.advice import AXIAL_CHECK, advise, cheapest_fixes, search_lines
from xlcore.checks.axial import check_pier_axial
from xlcore.checks.core_nm import check_core_nm
from xlcore.checks.core_stress import check_core_stress
from xlcore.checks.detailing import check_detailing
from xlcore.checks.lintels import check_lintels
from xlcore.checks.lintels import preamble_aci as lintels_preamble_aci
from xlcore.checks.section14 import check_section14, not_applicable_reason
from xlcore.checks.shear import check_pier_shear
from xlcore.codes import get_standard
from xlcore.diagnostics import Findings  # noqa: F401  (re-exported)
from xlcore.mechanics import bars, stiffness
from xlcore.model import Building
from xlcore.progress import SILENT, Reporter
from xlcore.results import ResultSheet
from xlcore.validate import build  # noqa: F401  (re-exported for the CLI)
from xlcore.workbook.reader import read_workbook


@dataclass
class Outcome:
    building: Building
    findings: Findings
    geometry: geometry.Geometry
    shear: pd.DataFrame
    summary: pd.DataFrame
    sheets: list[ResultSheet] = field(default_factory=list)
    timings: dict[str, float] = field(default_factory=dict)
    piers: pd.DataFrame | None = None  # with stiffness: what the report draws and re-solves
    plans: dict = field(default_factory=dict)  # core -> storey -> distribution.StoreyPlan
    # tables whose rows the workbook holds only in part (`select_detail`), every row: for Parquet
    full_tables: list[ResultSheet] = field(default_factory=list)
    # per storey x pier x check the worst row (`pier_checks`): what two standards are compared on
    checks: pd.DataFrame | None = None
    comparison: comparison.Comparison | None = None  # `compute_compared` with a second standard

    @property
    def failing(self) -> int:
        return int((self.summary.status == results.FAIL).sum())


class Timings(dict):
    """Seconds spent per phase, for the benchmark; each phase is also told to the reporter."""

    def __init__(self, reporter: Reporter = SILENT) -> None:
        super().__init__()
        self.reporter = reporter

    @contextmanager
    def phase(self, name: str, label: str | None = None, total: int | None = None) -> Iterator[None]:
        start = time.perf_counter()
        self.reporter.begin(label or name, total)
        try:
            yield
        finally:
            self[name] = self.get(name, 0.0) + time.perf_counter() - start
            if total:
                self.reporter.advance(total)
            self.reporter.end()


def load(path: Path, reporter: Reporter = SILENT) -> tuple[Building, Findings]:
    """Read and validate; raises InputInvalid or FileProblem."""
    t = Timings(reporter)
    with t.phase("read", "reading the input sheets"):
        raw = read_workbook(path)
    with t.phase("validate", "checking the inputs"):
        return build(raw)


def compute(
    building: Building,
    findings: Findings,
    now: dt.datetime | None = None,
    reporter: Reporter = SILENT,
    detail: str = "all",
    limit: int | None = None,
    whole_cores: bool = True,
) -> Outcome:
    """Run every check on a validated building and lay out the result sheets.

    Without `whole_cores` the whole-core checks (core stress, core N-M) are left out, their
    tables empty: `compute_compared`'s second run, which compares piers only.

    `detail` (see `select_detail`, which must then be called before writing): with `governing`,
    or `auto` above `limit` rows, the tables whose rows will be cut are made without their
    working text (most of the checks' time at building scale), and the sheets carry a `rework`
    that makes it for the rows written."""
    s = building.settings
    std = get_standard(s.standard)  # the checks take it from the settings too (their `std`)
    sym = std.symbols
    t = Timings(reporter)
    limit = results.DETAIL_ROW_LIMIT if limit is None else limit

    def defer(rows: int) -> bool:
        return detail == "governing" or (detail == "auto" and rows > limit)

    with t.phase("geometry", "piers, lintels, stiffness and storey plans"):
        geom = geometry.derive(building.storeys, building.walls, building.openings, building.end_zones)
        piers = stiffness.with_stiffness(geom.piers, s.poisson, s.pier_fixity)
        walls = stiffness.wall_stiffness(piers, s.poisson, s.pier_fixity)
        walls = stiffness.sharing_stiffness(walls, s.poisson, s.wall_sharing)
        plans = cores.plans_by_core(piers, walls)
    with t.phase("sharing", "sharing actions to walls and piers"):
        acts, core, split = pier_actions(building, piers, walls, plans)
    named = building.cores != [""]  # walls carry core IDs: result tables get a core column
    rework: dict[str, object] = {}
    if core is not None and defer(len(core)):
        rework[results.CORE_SHEET] = core_working
    elif core is not None:
        core = core_working(core)
    with t.phase("checks", "shear, axial + bending, detailing, lintels", total=len(acts)):
        if defer(len(acts)):  # numbers now, working text for the rows written (select_detail)
            acts_i = acts.assign(_act=np.arange(len(acts)))
            shear = check_pier_shear(piers, acts_i, s, text=False)
            axial = check_pier_axial(piers, acts_i, s, text=False)
            rework[results.SHEAR_SHEET] = _rework_rows(lambda a: check_pier_shear(piers, a, s), acts_i)
            rework[results.AXIAL_SHEET] = _rework_rows(lambda a: check_pier_axial(piers, a, s), acts_i)
        else:
            shear = check_pier_shear(piers, acts, s)
            axial = check_pier_axial(piers, acts, s)
        hwe = axial.groupby(["storey", "pier_id"]).hwe.first() if len(axial) else None
        detailing = check_detailing(piers, acts, s, hwe, shear=shear)
        section14 = check_section14(piers, acts, s, hwe)
        summary = envelope(shear, piers, axial, detailing, section14)
        checks = pier_checks(shear, axial, detailing, section14, summary)
        lintels = check_lintels(geom.lintels, building.member_actions, s)
    failing = int((summary.status == results.FAIL).sum())
    with t.phase("advice", f"cheapest fixes for {failing:,} failing pier x storey cases"):
        advice = advise(piers, acts, summary, s)
        summary = with_cheapest_fix(summary, advice)
    stress = core_nm = None
    if core is not None and not whole_cores:
        stress = core_nm = pd.DataFrame()
    elif core is not None:
        with t.phase(
            "core checks", "core stresses and core axial + bending", total=len(building.core_actions)
        ):
            stress = per_core(check_core_stress, piers, plans, split.actions, s)
            core_nm = per_core(check_core_nm, piers, plans, split.actions, s)
    stamp = _stamp(building, now or dt.datetime.now(dt.UTC))
    lintel_line = _lintel_line(lintels)
    sections = pd.concat(
        [distribution.sections_table(p, building.storey_index()).assign(core=c) for c, p in plans.items()],
        ignore_index=True,
    )
    if named:
        sections = sections.sort_values("storey_index", ascending=False, kind="stable")
        sections = sections.reset_index(drop=True)
    sheets = [
        ResultSheet(
            results.SUMMARY_SHEET,
            f"{results.MARKER}: summary (failing and nearest-to-failing piers first; worst "
            "combination per pier per storey)",
            results.SUMMARY_COLUMNS,
            attention_first(summary),
            preamble=stamp
            + _counts(summary, shear, special_walls.applies(s))
            + worst_per_check(summary, lintels, stress, core_nm)
            + [section14_line(section14, s), lintel_line],
            scale_key="util",
        ),
        ResultSheet(
            results.SHEAR_SHEET,
            f"{results.MARKER}: in-plane shear of piers, {s.standard} {sym['sheet_shear']}",
            results.SHEAR_COLUMNS,
            shear,
            preamble=stamp
            + [
                ("Height for Hw/Lw", s.shear_height),
                (
                    "Wall actions to piers",
                    f"V* by pier stiffness ({s.pier_fixity}, nu = {s.poisson:g}); N* and M* by {s.wall_nm}",
                ),
            ],
            scale_key="util",
        ),
        ResultSheet(
            results.AXIAL_SHEET,
            f"{results.MARKER}: axial load and in-plane bending of piers ({s.standard} {sym['sheet_axial']}) "
            f"and the simplified method {sym['simplified']}",
            results.AXIAL_COLUMNS,
            axial,
            preamble=stamp
            + [
                (
                    "Utilisation",
                    "radial overload factor: (N*, M*) / U lies on the factored interaction curve "
                    f"along the ray from the origin (1.2 = 20 % over); {sym['least_moment_note']}; "
                    "the ratio at fixed N* is kept as a column",
                ),
                (
                    "Section",
                    "rectangle Lw x tw; end-zone bars (End zones sheet) at their places, evenly from "
                    "cover + tie + db/2 at the free edge to tie + db/2 inside the zone; the wall's "
                    "bars evenly between the zones at or closer than the given spacing (at a side "
                    "without a zone from cover + db/2); where the zones differ, M* > 0 compresses "
                    "the pier's end, M* < 0 its start, and a minimum-eccentricity M* is checked both "
                    f"ways; stress block {sym['block']}; bars displace concrete",
                ),
                (
                    sym["simplified"],
                    "N* per length at the pier's more compressed end, N*/Lw + 6 M*/Lw^2 (in-plane "
                    "moment considered; an end in tension: not applicable, designed as a column); "
                    f"{sym['simplified_note']}",
                ),
            ],
            scale_key="util",
        ),
        ResultSheet(
            results.DETAILING_SHEET,
            f"{results.MARKER}: detailing of piers to {s.standard} Cl 11.7 "
            "(limits as in docs/engineering-basis.md: verify)",
            results.DETAILING_COLUMNS,
            detailing,
            preamble=stamp
            + [
                ("Vertical minimum", "from the largest N*/(Lw tw) over the combinations at that storey"),
                ("Horizontal minimum", f"walls restrained against shrinkage: {s.shrinkage_restrained}"),
                ("Utilisation", "limit / value for minimums, value / limit for maximums"),
            ],
            scale_key="util",
        ),
        ResultSheet(
            results.SECTION14_SHEET,
            f"{results.MARKER}: earthquake detailing of piers, "
            + (
                f"{s.standard} Chapter 18 special structural walls"
                if special_walls.applies(s)
                else f"{s.standard} Section 14"
            )
            + " (rules and values from memory and secondary sources: verify; docs/engineering-basis.md)",
            results.SPECIAL_WALL_COLUMNS if special_walls.applies(s) else results.SECTION14_COLUMNS,
            section14,
            preamble=stamp + section14_preamble(s),
            scale_key="util",
        ),
        ResultSheet(
            results.LINTELS_SHEET,
            f"{results.MARKER}: lintels (coupling beams) over openings designed, {s.standard} "
            + (
                "Ch. 9 / 22 (beam), Ch. 23 (strut-and-tie) or 18.10.7 (coupling beams of special walls)"
                if special_walls.applies(s)
                else "Section 8 (beam) or Section 7 (strut-and-tie), or by their diagonal bars"
            ),
            results.LINTEL_RESULT_COLUMNS,
            lintels,
            preamble=stamp + lintels_preamble_aci(s)
            if special_walls.applies(s)
            else stamp
            + [
                (
                    "Geometry",
                    "span ln = opening width; D = head of opening to top of slab above; b = wall "
                    "thickness; lintel bars the same top and bottom, at cover + fitment + db/2",
                ),
                (
                    "Model",
                    f"diagonal bars where given; else beam where ln/D >= {s.lintel_deep_ratio:g}, "
                    f"strut-and-tie below (Cl 12.1.1 non-flexural limit for a member continuous at "
                    "both ends, from memory: verify)",
                ),
                (
                    "Beam",
                    "flexure Cl 8.1; shear simplified method Cl 8.2.4.3 (theta 36 deg, kv 0.15 with "
                    "minimum fitments), phi 0.75, Vu.max per Eq 8.2.3.3(1) less 10 % (Amendment 2): "
                    "from memory, verify",
                ),
                (
                    "Strut-and-tie",
                    "one strut between the pier faces, top and bottom ties anchored in the piers: "
                    f"C* = V*/sin theta, T* = V* ln/z; strut phi beta_s {s.strut_stress:g} f'c b w_s, beta_s "
                    + (
                        f"{s.lintel_beta_s:g} (setting)"
                        if s.lintel_beta_s is not None
                        else "1/(1 + 0.66 cot^2 theta) within 0.3..1.0"
                    )
                    + f"; C-C-T nodes beta_n {s.lintel_beta_n:g}; phi {s.phi_strut:g} struts and nodes, "
                    f"{s.phi_tie:g} ties (from memory, verify: Project settings)",
                ),
                (
                    "Diagonal bars",
                    f"phi Vu = {s.phi_tie:g} x min(2 A_sd fsy sin alpha, {s.coupling_cap:g} sqrt(f'c) b D) "
                    "(ACI 318-19 Eq (18.10.7.4) mechanics; alpha from the geometry, group centroid at "
                    "cover + fitment + 1.5 db)",
                ),
            ],
            scale_key="util",
        ),
        ResultSheet(
            results.ADVICE_SHEET,
            f"{results.MARKER}: cheapest changes that make each failing pier pass every check at its storey",
            results.ADVICE_COLUMNS,
            advice,
            preamble=stamp + search_lines(s),
        ),
        ResultSheet(
            results.MEMBERS_SHEET,
            f"{results.MARKER}: piers and lintels derived from walls "
            "and openings (IDs to map analysis output to)",
            results.MEMBER_COLUMNS,
            members_table(piers, geom.lintels),
            preamble=stamp,
        ),
        ResultSheet(
            results.SECTION_SHEET,
            f"{results.MARKER}: net core section and centre of rigidity per storey (walls as "
            "centreline rectangles, corner overlaps once, openings removed)",
            _cols(results.SECTION_COLUMNS, named),
            sections,
            preamble=stamp
            + [
                (
                    "Stiffness",
                    f"flexure + shear, {s.pier_fixity}, nu = {s.poisson:g}; "
                    "walls with openings: solid - strip + piers in parallel",
                )
            ],
        ),
    ]
    if core is not None:
        sheets.append(
            ResultSheet(
                results.CORE_STRESS_SHEET,
                f"{results.MARKER}: elastic stress of the whole core per storey and combination",
                _cols(results.CORE_STRESS_COLUMNS, named),
                stress,
                preamble=stamp
                + [
                    (
                        "Method",
                        "sigma = N/A +- bending over the net core section (compression positive); "
                        "tension resultant per wall against its vertical steel in the tension zone "
                        f"(phi {std.phi_tension:.2f}, {sym['phi_table']}); fibres of 0.1 m along each pier",
                    ),
                    ("Compression limit", f"{s.compression_limit:g} f'c (Project setting)"),
                ],
                scale_key="util",
            )
        )
        if len(core_nm):
            sheets.append(
                ResultSheet(
                    results.CORE_NM_SHEET,
                    f"{results.MARKER}: biaxial strength of the whole core per storey and combination",
                    _cols(results.CORE_NM_COLUMNS, named),
                    core_nm,
                    preamble=stamp
                    + [
                        (
                            "Method",
                            f"strain compatibility over every pier of the net section ({sym['block']} block, "
                            f"bars displace concrete), phi from {sym['phi_table']} per neutral-axis "
                            "angle; the "
                            "capacity contour at N* over 24 angles, read along the direction of (Mx*, My*)",
                        ),
                        (
                            "Utilisation",
                            f"the larger of |M*| / phiMu along M* and N* / {sym['top_text']} (tension: "
                            f"{std.phi_tension:.2f} {sym['tension']})",
                        ),
                        (
                            "Discretisation",
                            "fibres 100 mm along each wall, 4 across; within 1 % of exact "
                            "clipping in the tests",
                        ),
                    ],
                    scale_key="util",
                )
            )
        if stress is not None and len(stress):
            sheets[0].preamble.append(_end_zone_line(stress, s))
        sheets.append(
            ResultSheet(
                results.CORE_SHEET,
                f"{results.MARKER}: core actions shared to walls (rigid floor) and piers",
                _cols(results.CORE_COLUMNS, named),
                core,
                preamble=stamp
                + [
                    (
                        "Walls",
                        "direct shear by stiffness through the centre of rigidity; torsion "
                        "M about CR = T* + Vy* (x - xr) - Vx* (y - yr), shared by k r / sum k r^2",
                    ),
                    ("Wall stiffness for sharing", _wall_sharing_text(s)),
                    (
                        "Accidental eccentricity",
                        f"{s.accidental:g} x plan dimension, in the sense that increases each wall's force"
                        + (
                            "; for the building's rows shared among several cores it acts at the "
                            "building level instead (Results cores)"
                            if named
                            else ""
                        ),
                    ),
                    (
                        "Piers",
                        "V* = wall V* x k / sum k; N* = core stress N/A +- M y / I integrated "
                        "over the pier; M* = the pier's own share of the core's bending, M_core x "
                        "I_pier / I_core about its own centroid, resolved into the wall's plane"
                        + (
                            " + V* h / 2 (contraflexure) for piers beside openings"
                            if s.core_local_moment == distribution.LOCAL_BESIDE_OPENINGS
                            else " (no V* h / 2 added: Project setting)"
                        ),
                    ),
                    (
                        "Precedence",
                        "where member actions exist for a storey and combination they are "
                        "used and these shares are not (column 'Used')",
                    ),
                ],
            )
        )
    if split is not None and len(split.shares):
        sheets.append(
            ResultSheet(
                results.CORES_SHEET,
                f"{results.MARKER}: the building's storey resultants shared among its cores",
                results.CORES_COLUMNS,
                split.shares,
                preamble=stamp
                + [
                    (
                        "Shear and torsion",
                        "rigid floor over the cores, each core a pair of springs along the principal "
                        "directions of its flexural rigidity E [[Iyy, Ixy], [Ixy, Ixx]] at its own "
                        "centre of rigidity (cantilevers of one height under one load shape share in "
                        "proportion to EI: Smith & Coull, Tall Building Structures, 1991, uniform walls); "
                        "a core's own torsional stiffness is not counted, so it takes its share at its "
                        "CR with T = 0 there",
                    ),
                    ("Moments", "(My, Mx) by the same rigidity at one curvature, about each core's centroid"),
                    (
                        "Axial force",
                        "by area, N* A_core / A (stated assumption; give per-core rows where the "
                        "gravity load on each core is known)",
                    ),
                    (
                        "Accidental eccentricity",
                        f"{s.accidental:g} x plan dimension of all the cores, at the building level, in "
                        "the sense that increases each core's force (none added again within a core)",
                    ),
                    (
                        "Statics",
                        "shares add back to the building's resultants: forces; moments about the "
                        "centroid of all the cores (N couples cancel); torsion about the building CR "
                        "as the moment of the cores' shears at their CRs",
                    ),
                    ("Within each core", _wall_sharing_text(s)),
                    (
                        "Used for",
                        "core checks only: member actions are given for that storey and combination, "
                        "so the piers take those",
                    ),
                ],
            )
        )
    for sheet in sheets:
        sheet.rework = rework.get(sheet.name)
    return Outcome(
        building, findings, geom, shear, summary, sheets, timings=t, piers=piers, plans=plans, checks=checks
    )


def with_standard(building: Building, standard: str) -> Building:
    """The same building and actions with another design standard in its settings."""
    settings = building.settings.model_copy(update={"standard": standard})
    return building.model_copy(update={"settings": settings})


def compute_compared(
    building: Building,
    findings: Findings,
    second: str | None = None,
    now: dt.datetime | None = None,
    reporter: Reporter = SILENT,
    detail: str = "all",
    limit: int | None = None,
) -> Outcome:
    """`compute` to the building's standard and, where a `second` standard is named, once more
    to that one on the same building and actions, with the two joined on a sheet of their own
    (`comparison.compare`) after the summary. The other sheets are the first standard's; the
    second run is kept only for the comparison (its numbers without their working text)."""
    now = now or dt.datetime.now(dt.UTC)
    out = compute(building, findings, now=now, reporter=reporter, detail=detail, limit=limit)
    if not second:
        return out
    first = building.settings.standard
    reporter.begin(f"every check again to {second}")
    # numbers only (no working text), piers and lintels only: the whole-core checks take half
    # the time of a run and are not compared per pier
    other = compute(with_standard(building, second), findings, now=now, detail="governing", whole_cores=False)
    reporter.end()
    cmp = comparison.compare(out.checks, other.checks, (first, second))
    out.comparison = cmp
    stamp = _stamp(building, now)
    out.sheets.insert(
        1,
        ResultSheet(
            results.COMPARISON_SHEET,
            f"{results.MARKER}: the building checked to {first} and to {second}, per storey x pier "
            "x check (worst combination under each)",
            results.comparison_columns(first, second),
            cmp.table,
            preamble=[*stamp, *cmp.lines, *_other_worst(out, other, first, second)],
        ),
    )
    out.sheets[0].preamble.append((results.ALSO_CHECKED, f"{second} (see {results.COMPARISON_SHEET})"))
    return out


def _other_worst(first_run: Outcome, second_run: Outcome, a: str, b: str) -> list[tuple[str, str]]:
    """Lintels, which are not per pier: the building's worst under each; whole cores not compared."""
    lines = []
    for label, name in (("lintel", results.LINTELS_SHEET),):
        got = []
        for run, std in ((first_run, a), (second_run, b)):
            sheet = next((s for s in run.sheets if s.name == name), None)
            u = (
                pd.to_numeric(sheet.table.get("util"), errors="coerce").to_numpy(dtype=float)
                if sheet is not None and len(sheet.table) and "util" in sheet.table
                else np.array([])
            )
            u = u[np.isfinite(u)]
            got.append(f"{u.max():.3f} to {std}" if len(u) else f"not checked to {std}")
        lines.append((f"Worst {label}", "; ".join(got)))
    if any(s.name in (results.CORE_STRESS_SHEET, results.CORE_NM_SHEET) for s in first_run.sheets):
        lines.append(
            (
                "Whole cores",
                f"core stress and core axial + bending to {a} only (their sheets), not repeated to {b}",
            )
        )
    return lines


def pier_checks(
    shear: pd.DataFrame,
    axial: pd.DataFrame,
    detailing: pd.DataFrame,
    section14: pd.DataFrame | None,
    order: pd.DataFrame,
) -> pd.DataFrame:
    """Per storey x pier x check the worst row of each check the summary envelopes (shear,
    axial + bending, Cl 11.5, detailing, Section 14: its pass / FAIL rules), in the order of
    `order` (storey, pier_id) and of `UTIL_COLUMN`: storey, pier_id, check, key (the check's
    summary column, the same name whatever the standard calls the check), util, status,
    clause, combination, structural (False for the compliance checks)."""
    cand = _candidates(shear, axial, detailing, section14)
    cand = cand[np.isfinite(pd.to_numeric(cand.util, errors="coerce").to_numpy(dtype=float))]
    if len(cand):
        cand = cand.assign(util=cand.util.astype(float))
        cand = cand.loc[cand.groupby(["storey", "pier_id", "check"], sort=False).util.idxmax()]
    key = [UTIL_COLUMN.get(c, c) for c in cand.check]
    cand = cand.assign(key=key, structural=~cand.check.isin(COMPLIANCE))
    at = order[["storey", "pier_id"]].drop_duplicates().reset_index(drop=True)
    rank = {c: i for i, c in enumerate(UTIL_COLUMN)}
    out = at.assign(_pos=np.arange(len(at))).merge(cand, on=["storey", "pier_id"], how="inner")
    out = out.assign(_check=out.check.map(rank).fillna(len(rank)))
    out = out.sort_values(["_pos", "_check"], kind="stable").drop(columns=["_pos", "_check"])
    cols = ["storey", "pier_id", "check", "key", "util", "status", "clause", "combination", "structural"]
    return out[cols].reset_index(drop=True)


DETAIL_MODES = ("auto", "governing", "all")


def select_detail(
    outcome: Outcome,
    mode: str = "auto",
    tables_folder: str = "",
    limit: int | None = None,
) -> list[ResultSheet]:
    """Choose the rows each result sheet holds, in place on `outcome.sheets`.

    `all`: every row. `governing`: every table with a rule in `results.GOVERNING` holds its
    governing rows plus every failing row. `auto`: every row while a table has at most `limit`
    rows (a workbook of a few hundred thousand rows takes a spreadsheet program the better part
    of a minute to open or save); above it the governing rows plus every failing row while
    those stay within `limit`, else the governing rows alone (a harsh tower fails in tens of
    thousands of rows; its summary still names every failing pier). A table cut so says which
    rows it holds and where every row is (`tables_folder`, one Parquet file per table, written
    with the workbook); the summary says it once more. Returns the full tables, also kept as
    `outcome.full_tables`."""
    from xlcore.workbook.tables import file_name

    limit = results.DETAIL_ROW_LIMIT if limit is None else limit
    if mode not in DETAIL_MODES:
        raise ValueError(f"detail must be one of {', '.join(DETAIL_MODES)}; got {mode!r}")
    full: list[ResultSheet] = []
    notes: list[str] = []
    for k, sheet in enumerate(outcome.sheets):
        rule = results.GOVERNING.get(sheet.name)
        n = len(sheet.table)
        if mode == "all" or rule is None or (mode == "auto" and n <= limit):
            if sheet.rework is not None:  # every row written: every row's working text
                outcome.sheets[k] = _reworked(sheet, sheet.table, sheet.preamble)
            continue
        keep = results.governing_rows(sheet.table, rule)
        meaning = rule.meaning + ("; plus every failing row" if rule.failing else "")
        if mode == "auto" and keep.sum() > limit:
            fails = int(keep.sum())
            keep = results.governing_rows(sheet.table, rule, failing=False)
            meaning = (
                f"{rule.meaning}; the other failing rows are left out too ({fails:,} rows with "
                f"them, over {limit:,}): filter the Parquet file's Status for every one"
            )
        if keep.all():
            if sheet.rework is not None:
                outcome.sheets[k] = _reworked(sheet, sheet.table, sheet.preamble)
            continue
        kept = int(keep.sum())
        name = file_name(sheet.name)
        where = f"{tables_folder}/{name}" if tables_folder else name
        outcome.sheets[k] = _reworked(
            sheet,
            sheet.table[keep].reset_index(drop=True),
            [
                *sheet.preamble,
                (
                    "Rows shown",
                    f"governing rows only ({kept:,} of {n:,}): {meaning}. Every row, without "
                    f"the working text: {where} (Parquet, beside this workbook)",
                ),
            ],
        )
        full.append(sheet)
        notes.append(f"{sheet.name} {kept:,} of {n:,} rows ({name})")
    outcome.full_tables = full
    if full and outcome.sheets and outcome.sheets[0].name == results.SUMMARY_SHEET:
        why = (
            f"--detail auto: tables over {limit:,} rows"
            if mode == "auto"
            else "--detail governing: the per-combination tables"
        )
        outcome.sheets[0].preamble.append(
            (
                "Rows left out",
                f"{why} hold their governing rows only (per storey x member x check the worst "
                f"combination, plus the failing rows where they stay within {limit:,}; each sheet "
                f"says which): {'; '.join(notes)}. Every row is in the folder "
                f"{tables_folder or 'beside this workbook'}, one Parquet file per table (numbers "
                "without the working text); compute with --detail all to write every row here",
            )
            if mode == "auto"
            else (
                "Rows left out",
                f"{why} hold their governing rows only (per storey x member x check the worst "
                f"combination, plus every failing row): {'; '.join(notes)}. Every row is in the "
                f"folder {tables_folder or 'beside this workbook'}, one Parquet file per table "
                "(numbers without the working text); compute with --detail all to write every "
                "row here",
            )
        )
    return full


def _reworked(sheet: ResultSheet, rows: pd.DataFrame, preamble: list) -> ResultSheet:
    """The sheet holding `rows`, with their working text where it was left for now."""
    table = sheet.rework(rows) if sheet.rework is not None else rows
    return ResultSheet(sheet.name, sheet.title, sheet.columns, table, preamble, sheet.scale_key)


def pier_actions(
    building: Building, piers: pd.DataFrame, walls: pd.DataFrame, plans: dict
) -> tuple[pd.DataFrame, pd.DataFrame | None, cores.CoreSplit | None]:
    """Pier actions from the member-actions sheet and, for storey x combination pairs it does
    not cover, from the core-actions sheet (shared among the cores, then within each core).
    Returns them, the core-sharing table and each core's actions."""
    s = building.settings
    member = distribution.pier_actions(piers, building.member_actions, s.wall_nm)
    member["origin"] = 0
    if building.core_actions.empty:
        return member, None, None
    split = cores.share_among_cores(piers, plans, building.core_actions, s.accidental)
    # the piers' text only where used: on the pier actions below, on the core rows written
    core = cores.core_actions_to_piers(piers, walls, plans, split.actions, s.core_local_moment, text=False)
    # core-actions rows (one per storey x combination) whose pair the member actions cover
    ca = building.core_actions
    given = ca.row[_pairs_in(ca, building.member_actions)].to_numpy()
    core_piers = core.piers[~core.piers.row.isin(given)].assign(origin=1)
    core_piers["source"] = distribution.core_source_of(core_piers)
    table = core_table(core, given, text=False)  # the walls' working: compute, on the rows written
    core_piers = core_piers.drop(columns=["core", "wall_v"])
    if len(split.shares):
        split.shares["used"] = np.where(
            split.shares.row.isin(given),
            "core checks only",
            "core checks and piers",
        )
    return pd.concat([member, core_piers], ignore_index=True), table, split


def per_core(check, piers: pd.DataFrame, plans: dict, actions: pd.DataFrame, s) -> pd.DataFrame:
    """A whole-core check run on each core's own section and actions; one table with `core`."""
    parts = [
        check(piers[piers.core == c], plans[c], rows.drop(columns=["core", "acc"]), s).assign(core=c)
        for c, rows in actions.groupby("core", sort=False)
    ]
    parts = [p for p in parts if len(p)]
    if len(parts) > 1:  # several cores: each storey x combination's cores together
        return pd.concat(parts, ignore_index=True).sort_values("row", kind="stable", ignore_index=True)
    return parts[0] if parts else pd.DataFrame()


def _cols(columns: list[results.ResultColumn], named: bool) -> list[results.ResultColumn]:
    """A table's columns; the core column only where the walls carry core IDs."""
    return columns if named else [c for c in columns if c.key != "core"]


def _wall_sharing_text(s) -> str:
    if s.wall_sharing == stiffness.WHOLE_HEIGHT:
        return (
            "whole-height cantilever: each wall over its overall height, flexure + shear, "
            "k = 1 / (H^3 / (3 E I) + 1.2 H / (G A)), openings softening it as over one storey "
            "(Project setting)"
        )
    return f"one storey's stiffness: clear height, {s.pier_fixity}, flexure + shear (Project setting)"


def _pairs_in(df: pd.DataFrame, other: pd.DataFrame) -> np.ndarray:
    """Whether each row's storey x combination is among `other`'s (hashed pairs, no joined
    text per row: the L tower has 360 000 member-action rows)."""
    key = lambda d: pd.MultiIndex.from_arrays([d.storey.astype(str), d.combination.astype(str)])  # noqa: E731
    return key(df).isin(key(other).unique())


def core_table(core: distribution.CoreSharing, given: np.ndarray, text: bool = True) -> pd.DataFrame:
    """Walls and piers of the core sharing, one sheet's rows, with the working as text
    (without `text`, the walls' working is left blank for `core_working` to make on the rows
    written). `given`: core-actions rows whose storey x combination the member actions cover."""
    w = core.walls.assign(member=core.walls.wall_id, kind="wall", m=np.nan, working=None)
    p = core.piers.assign(
        member=core.piers.pier_id,
        kind="pier",
        k=core.piers.k * 1e-3,
        share_pct=core.piers.share * 100,
        working=core.piers.source,
    )
    out = pd.concat([w, p], ignore_index=True)
    out["used"] = np.where(out.row.isin(given), "no: member actions given", "yes")
    out["kind_order"] = (out.kind == "pier").astype(int)
    out["core_order"] = pd.factorize(out.core, use_na_sentinel=False)[0]  # order of first appearance
    out = out.sort_values(
        ["row", "core_order", "kind_order", "member"],
        kind="stable",
        key=lambda c: geometry.natural_rank(c) if c.name == "member" else c,
    )
    out = out.reset_index(drop=True)
    return core_working(out) if text else out


def core_working(rows: pd.DataFrame) -> pd.DataFrame:
    """The working text on rows of the core-shares table: walls', and piers' (their 'V* from'
    text, `distribution.core_source_of`) where blank."""
    out = rows.copy()
    p = out[(out.kind == "pier") & out.working.isna()]
    if len(p):
        out.loc[p.index, "working"] = distribution.core_source_of(p)
    w = out[out.kind == "wall"]
    out.loc[w.index, "working"] = [
        f"V* = direct {d:.1f} + torsion {t:.1f} = {v:.1f} kN; M about CR = {m:.1f} kNm "
        f"(+- {a:.1f} accidental); N* = sum of its piers' N*"
        for d, t, v, m, a in zip(*plain(w.direct, w.torsion, w.v, w.m_cr, w.m_acc), strict=True)
    ]
    return out


def _rework_rows(check, acts: pd.DataFrame):
    """The working text for the rows written: the check run again, with its text, on the action
    rows of those rows only (`_act`: each table row's action row). Every check used so is row by
    row (a row's numbers depend on its own action row and pier), so the numbers are the same;
    the rows come back in the order asked."""

    def rework(rows: pd.DataFrame) -> pd.DataFrame:
        ask = rows._act.to_numpy()
        out = check(acts.iloc[np.unique(ask)])
        return out.set_index("_act").loc[ask].reset_index()

    return rework


def _stamp(b: Building, now: dt.datetime) -> list[tuple[str, object]]:
    return [
        ("CAUTION", CAUTION),
        ("Project", b.settings.project_name),
        ("Standard", b.settings.standard),
        ("xlcore version", __version__),
        ("Computed (UTC)", now.strftime("%Y-%m-%d %H:%M:%S")),
        (results.STAMP_HASH_LABEL, b.input_hash),
    ]


def with_cheapest_fix(summary: pd.DataFrame, advice: pd.DataFrame) -> pd.DataFrame:
    """Name the cheapest passing change beside each failing pier in the summary (its own
    change or its pour's grade: `advice.cheapest_fixes`)."""
    out = summary.copy()
    out["fix"] = ""
    if len(advice):
        text = cheapest_fixes(advice)
        out["fix"] = [text.get((a, b), "") for a, b in zip(out.storey, out.pier_id, strict=True)]
        none = (out.status == results.FAIL) & (out.fix == "")
        out.loc[none, "fix"] = "no change or pair of changes in the search range passes"
    return out


def _end_zone_line(stress: pd.DataFrame, s) -> tuple[str, str]:
    """The Cl 14.6 end-zone flag in one summary line: a flag, never a failing utilisation."""
    quake = stress[stress.earthquake == "yes"]
    if quake.empty:
        return ("End-zone flag (Cl 14.6)", "no earthquake combinations named on the Project sheet")
    hit = quake[quake.u_compression > 1.0]
    if hit.empty:
        return ("End-zone flag (Cl 14.6)", f"none: peak compression within {s.compression_limit:g} f'c")
    w = hit.loc[hit.u_compression.idxmax()]
    return (
        "End-zone flag (Cl 14.6)",
        f"{len(hit)} wall cases over {s.compression_limit:g} f'c under earthquake combinations "
        f"(detailing required, not a failure); highest {w.wall_id} at {w.storey}, {w.combination}: "
        f"{w.sigma_max:.2f} MPa vs {w.limit:.2f} MPa",
    )


def _lintel_line(lintels: pd.DataFrame) -> tuple[str, str]:
    """Storey x lintel cases by outcome and by the model that designed them, one line."""
    per = lintels.groupby(["storey", "lintel_id"]).status.agg(
        lambda s: (
            s.iloc[0] if len(set(s)) == 1 else (results.FAIL if (s == results.FAIL).any() else results.PASS)
        )
    )
    models = lintels[lintels.model != ""].drop_duplicates(["storey", "lintel_id"]).model.value_counts()
    by_model = ", ".join(f"{n} {m}" for m, n in models.items())
    return (
        "Lintels",
        f"{len(per)} storey x lintel cases: {int((per == results.PASS).sum())} pass, "
        f"{int((per == results.FAIL).sum())} fail, {int((per == results.NOT_CHECKED).sum())} not "
        "checked (no actions)" + (f"; designed as {by_model}" if by_model else ""),
    )


def _counts(summary: pd.DataFrame, shear: pd.DataFrame, special: bool = False) -> list[tuple[str, object]]:
    checked = summary[summary.status != results.NOT_CHECKED]
    worst = checked.loc[checked.util.idxmax()] if len(checked) else None
    lines: list[tuple[str, object]] = [
        ("Pier x storey cases", len(summary)),
        ("Passing", int((summary.status == results.PASS).sum())),
        ("Failing", int((summary.status == results.FAIL).sum())),
        ("Not checked", int((summary.status == results.NOT_CHECKED).sum())),
        ("Rows checked (pier x storey x combination)", len(shear)),
    ]
    if worst is not None:
        lines.append(
            (
                "Building's worst pier",
                f"{worst.pier_id} at {worst.storey}, {worst.combination}: "
                f"utilisation {worst.util:.3f} ({worst.check}, {worst.clause})",
            )
        )
    lines.append(("Detailing Cl 11.7 failing", int((summary.detailing.str.startswith(results.FAIL)).sum())))
    lines.append(
        (
            "Earthquake ACI 318 Ch. 18 failing" if special else "Earthquake Section 14 failing",
            int((summary.section14.str.startswith(results.FAIL)).sum()),
        )
    )
    return lines


def _candidates(
    shear: pd.DataFrame, axial: pd.DataFrame, detailing: pd.DataFrame, section14: pd.DataFrame | None = None
) -> pd.DataFrame:
    """Every check's rows in one shape: storey, pier, check, combination, demand, capacity, U."""
    cols = [
        "storey",
        "pier_id",
        "check",
        "combination",
        "demand",
        "capacity",
        "unit",
        "util",
        "status",
        "clause",
        "note",
    ]
    parts = [
        shear.assign(
            check=CHECK_SHEAR, demand=shear.v.abs(), capacity=shear.phi_vu, unit="kN", note=shear.advice
        )[cols]
    ]
    if len(axial):
        parts.append(
            axial.assign(
                check=CHECK_NM,
                demand=axial.m_design,
                capacity=axial.m_ray,  # M where the ray from the origin meets the curve
                unit="kNm",
                note=axial.governs,
            )[cols]
        )
        s = axial[axial.status_s != results.NOT_APPLICABLE]
        parts.append(
            s.assign(
                check=CHECK_SIMPLIFIED,
                demand=s.n_end,  # N* at the pier's more compressed end, per length x Lw
                capacity=s.phi_nu_s,
                unit="kN",
                util=s.util_s,
                status=s.status_s,
                clause=s.clause_s if "clause_s" in s else "Cl 11.5.1",
                note="",
            )[cols]
        )
    if len(detailing):
        parts.append(
            detailing.assign(
                check=CHECK_DETAILING,
                combination="(all)",
                demand=detailing.value,
                capacity=detailing.limit,
                note=detailing.rule,
            )[cols]
        )
    if section14 is not None and len(section14):
        # compliance rows only: an end zone required is a trigger, "check" a requirement that
        # cannot be verified yet; neither is a pass or a failure
        e = section14[section14.status.isin((results.PASS, results.FAIL))]
        parts.append(
            e.assign(
                check=CHECK_SECTION14,
                combination="(all)",
                demand=e.value,
                capacity=e.limit,
                note=e.rule,
            )[cols]
        )
    return pd.concat(parts, ignore_index=True)


CHECK_SHEAR, CHECK_NM, CHECK_SIMPLIFIED = "in-plane shear", AXIAL_CHECK, "Cl 11.5 compression"
CHECK_DETAILING = "detailing Cl 11.7"
CHECK_SECTION14 = "earthquake Section 14"
COMPLIANCE = (CHECK_DETAILING, CHECK_SECTION14)  # reported beside the governing check, never it
UTIL_COLUMN = {
    CHECK_SHEAR: "u_shear",
    CHECK_NM: "u_nm",
    CHECK_SIMPLIFIED: "u_simplified",
    CHECK_DETAILING: "u_detailing",
    CHECK_SECTION14: "u_section14",
}


def envelope(
    shear: pd.DataFrame,
    piers: pd.DataFrame,
    axial: pd.DataFrame | None = None,
    detailing: pd.DataFrame | None = None,
    section14: pd.DataFrame | None = None,
) -> pd.DataFrame:
    """Governing structural check and worst combination per storey x pier, with each check's
    worst utilisation beside it; piers without actions are listed as not checked.

    Detailing (Cl 11.7) and earthquake detailing (Section 14) are compliance, not strength:
    each is reported beside the structural result as pass/FAIL with its ratio and makes the
    status FAIL, but never becomes the governing check, whose utilisation is the one the
    engineer needs to see. A Section 14 requirement xlcore cannot verify (end-zone bars not
    described) shows as 'check' beside it."""
    cols = [c.key for c in results.SUMMARY_COLUMNS]
    cand = _candidates(
        shear,
        axial if axial is not None else pd.DataFrame(),
        detailing if detailing is not None else pd.DataFrame(),
        section14,
    )
    keys = ["storey", "pier_id"]
    structural = cand[~cand.check.isin(COMPLIANCE)] if len(cand) else cand
    if len(structural):
        worst = structural.loc[structural.groupby(keys, sort=False).util.idxmax()]
        per_check = cand.pivot_table(index=keys, columns="check", values="util", aggfunc="max")
        per_check = per_check.rename(columns=UTIL_COLUMN).reset_index()
        worst = worst.merge(per_check, on=keys, how="left")
    else:
        worst = structural
    order = piers[["storey", "storey_index", "pier_id", "wall_id", "position"]]
    table = order.merge(worst, on=keys, how="left")
    for c in UTIL_COLUMN.values():
        if c not in table:
            table[c] = np.nan
    missing = table.u_shear.isna()  # no actions: strength not checked, whatever detailing says
    table.loc[missing, ["status", "check", "combination", "clause"]] = [results.NOT_CHECKED, "", "", ""]
    table.loc[missing, ["util", "demand", "capacity"]] = np.nan
    table.loc[missing, "note"] = "no actions for this pier or its wall at this storey (detailing only)"
    checked = ~missing.to_numpy()
    notes = [table.note.fillna("").astype(str).to_numpy()]
    to_check = _section14_checks(section14, table[keys])
    for check, text_col, util_col, label in (
        (CHECK_DETAILING, "detailing", "u_detailing", "detailing fails: "),
        (CHECK_SECTION14, "section14", "u_section14", "Section 14 fails: "),
    ):
        u, fails, rule = _compliance(cand, table[keys], check)
        table[util_col] = u
        text = np.array(
            [
                "" if not np.isfinite(x) else f"{results.FAIL if bad else results.PASS} {x:.2f}"
                for x, bad in zip(u, fails, strict=True)
            ],
            dtype=object,
        )
        if check == CHECK_SECTION14:
            text = np.array(
                [
                    ", ".join(x for x in (t, results.CHECK if c else "") if x)
                    for t, c in zip(text, to_check, strict=True)
                ],
                dtype=object,
            )
        table[text_col] = text
        table.loc[checked & fails, "status"] = results.FAIL
        notes.append(np.where(fails, label + rule, ""))
    notes.append(np.where(to_check, "Section 14: end-zone ties to check (bars not described)", ""))
    table["note"] = [
        "; ".join(x for x in parts if x) for parts in zip(*(n.tolist() for n in notes), strict=True)
    ]
    table = table.sort_values(
        ["storey_index", "wall_id", "position"],
        ascending=[False, True, True],
        key=lambda c: geometry.natural_rank(c) if c.name == "wall_id" else c,
    )
    table["util"] = table.util.astype(float)
    table["fix"] = ""  # filled by with_cheapest_fix once the advice search has run
    return table[cols].reset_index(drop=True)


def _compliance(
    cand: pd.DataFrame, at: pd.DataFrame, check: str
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per row of `at` (storey, pier): the worst utilisation of a compliance check's rules,
    whether any fails, and the worst rule's name (NaN, False, '' where it has no rows)."""
    keys = ["storey", "pier_id"]
    rows = cand[cand.check == check] if len(cand) else cand
    if not len(rows):
        n = len(at)
        return np.full(n, np.nan), np.zeros(n, dtype=bool), np.full(n, "", dtype=object)
    worst = rows.loc[rows.groupby(keys, sort=False).util.idxmax()][[*keys, "util", "note"]]
    fails = rows[rows.status == results.FAIL].groupby(keys, sort=False).size().rename("n_fail").reset_index()
    m = at.merge(worst, on=keys, how="left").merge(fails, on=keys, how="left")
    return (
        m.util.to_numpy(dtype=float),
        m.n_fail.fillna(0).to_numpy() > 0,
        m.note.fillna("").astype(str).to_numpy(),
    )


def _section14_checks(section14: pd.DataFrame | None, at: pd.DataFrame) -> np.ndarray:
    """Per row of `at`: whether a Section 14 requirement awaits checking (status 'check')."""
    if section14 is None or not len(section14):
        return np.zeros(len(at), dtype=bool)
    open_ = section14[section14.status == results.CHECK][["storey", "pier_id"]].drop_duplicates()
    m = at.merge(open_.assign(_c=True), on=["storey", "pier_id"], how="left")
    return m._c.eq(True).to_numpy()


def section14_preamble(s) -> list[tuple[str, str]]:
    """Lines above the Section 14 table: the ductility, the combinations, the settings."""
    if special_walls.applies(s):
        return special_walls.preamble(s)
    why = not_applicable_reason(s)
    lines = [("Structural ductility factor", s.ductility + " (Project setting, as AS 1170.4 assigns it)")]
    if why is not None:
        return lines + [("Not applicable", f"no rows: {why}")]
    lines += [
        (
            "Earthquake combinations",
            ", ".join(sorted(s.earthquake))
            or "none named (Project setting): the end-zone trigger is not evaluated",
        ),
        (
            "Rules",
            f"both faces: {s.eq_two_layers}; least ratio {s.eq_rho_min:g} each way; Hwe/tw at most "
            f"{s.eq_slenderness:g}; end zones where N*/A + |M*|/Z exceeds {s.compression_limit:g} f'c "
            f"under an earthquake combination, ties at most min({s.eq_tie_diameters:g} db, "
            f"{s.eq_tie_max:g} mm) (Project settings; from memory: verify)",
        ),
        (
            "Status",
            "pass / FAIL: a rule met or not; required / not required: the end-zone trigger (not a "
            "failure); check: a requirement xlcore cannot verify (end-zone bars not described yet)",
        ),
    ]
    if s.mu >= 3:
        lines.append(
            (
                "Moderately ductile",
                "the limited-ductile rules are applied as a floor; the further provisions for "
                "moderately-ductile walls are not checked by xlcore: verify them by hand",
            )
        )
    return lines


def section14_line(section14: pd.DataFrame, s) -> tuple[str, str]:
    """The building's Section 14 result in one summary line."""
    if special_walls.applies(s):
        return special_walls.summary_line(section14, s)
    label = "Earthquake detailing Section 14"
    why = not_applicable_reason(s)
    if why is not None:
        return (label, f"not applicable: {why}")
    if section14 is None or not len(section14):
        return (label, "not checked (no rows)")
    comp = section14[section14.status.isin((results.PASS, results.FAIL))]
    parts = []
    if len(comp):
        r = comp.loc[comp.util.astype(float).idxmax()]
        n_fail = int((comp.status == results.FAIL).sum())
        verdict = results.FAIL if r.util > 1.0 else results.PASS
        parts.append(
            f"worst {r.util:.3f} {verdict} at {r.pier_id}, {r.storey} ({r.rule}; "
            f"{n_fail} of {len(comp)} rule rows fail)"
        )
    zones = section14[section14.status == results.REQUIRED]
    checks = int((section14.status == results.CHECK).sum())
    if not s.earthquake:
        parts.append("end zones not evaluated: no earthquake combinations named")
    else:
        parts.append(
            f"end zones required at {len(zones)} storey x pier cases"
            + (f" ({checks} with end-zone bars not described: check)" if checks else "")
        )
    return (label, f"{s.ductility}: " + "; ".join(parts))


def attention_first(summary: pd.DataFrame) -> pd.DataFrame:
    """The summary as the checker reads it: failing piers first, then the rest from the
    nearest to failing down, piers without actions last (storey order within ties)."""
    rank = np.select(
        [summary.status == results.FAIL, summary.status == results.NOT_CHECKED], [0, 2], default=1
    )
    u = summary.util.to_numpy(dtype=float)
    key = pd.DataFrame({"rank": rank, "u": -np.nan_to_num(u, nan=-np.inf, posinf=np.inf), "i": range(len(u))})
    order = key.sort_values(["rank", "u", "i"], kind="stable").index
    return summary.iloc[order].reset_index(drop=True)


def worst_per_check(
    summary: pd.DataFrame,
    lintels: pd.DataFrame | None = None,
    stress: pd.DataFrame | None = None,
    core_nm: pd.DataFrame | None = None,
) -> list[tuple[str, str]]:
    """The building's worst case of every check, one line each, for the summary's top."""
    out: list[tuple[str, str]] = []

    def line(label: str, df: pd.DataFrame | None, col: str, what) -> None:
        if df is None or not len(df) or col not in df or not np.isfinite(df[col].to_numpy(float)).any():
            out.append((f"Worst {label}", "not checked (no rows)"))
            return
        u = df[col].to_numpy(dtype=float)
        u = np.where(np.isnan(u), -np.inf, u)
        r = df.iloc[int(np.argmax(u))]
        n_fail = int((u > 1.0).sum())
        verdict = results.FAIL if r[col] > 1.0 else results.PASS
        out.append(
            (f"Worst {label}", f"{r[col]:.3f} {verdict} at {what(r)} ({n_fail} of {len(df)} rows over 1.0)")
        )

    checked = summary[summary.status != results.NOT_CHECKED]
    for label, col in (
        ("in-plane shear", "u_shear"),
        ("axial + bending", "u_nm"),
        ("Cl 11.5 compression", "u_simplified"),
        ("detailing Cl 11.7", "u_detailing"),
    ):
        src = checked if col != "u_detailing" else summary
        line(label, src, col, lambda r: f"{r.pier_id}, {r.storey}")
    line("lintel", lintels, "util", lambda r: f"{r.lintel_id} ({r.model}), {r.storey}, {r.combination}")
    if stress is not None:
        line("core elastic stress", stress, "util", lambda r: f"{r.wall_id}, {r.storey}, {r.combination}")
    if core_nm is not None:
        line(
            "core axial + bending",
            core_nm,
            "util",
            lambda r: ", ".join(x for x in (str(r.get("core", "") or ""), r.storey, r.combination) if x),
        )
    return out


def members_table(piers: pd.DataFrame, lintels: pd.DataFrame) -> pd.DataFrame:
    p = piers.assign(
        member=piers.pier_id,
        kind="pier",
        height=piers.h,
        k=piers.k * 1e-3,
        note=np.where(piers.position > 0, "between openings / wall ends", "wall without openings"),
        bars=bars.describe(piers) if len(piers) else [],
    )
    lin = lintels.merge(
        piers.drop_duplicates(["storey", "wall_id"])[
            ["storey", "wall_id", "Hc", "fc", "rho_v", "rho_h", "storey_index"]
        ],
        on=["storey", "wall_id", "storey_index"],
    )
    lin = lin.assign(
        member=lin.lintel_id,
        kind="lintel",
        Lw=lin.span * 1000.0,
        height=lin.depth,
        start=np.nan,
        end=np.nan,
        k=np.nan,
        note="span = opening width; depth = head to top of slab above; see the lintels sheet",
    )
    out = pd.concat([p, lin], ignore_index=True)
    out = out.sort_values(["storey_index", "kind"], ascending=[False, False], kind="stable")
    return out.reset_index(drop=True)
