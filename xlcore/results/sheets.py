"""The result sheets laid out from the checks' tables: titles, the lines above each table
(stamp, method, settings, the standard's clauses), the members table, and which rows each sheet
holds at building scale (`select_detail`). The pipeline runs the checks; this lays them out."""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
import pandas as pd

from xlcore import CAUTION, __version__, cores, distribution, geometry, results
from xlcore.checks import special_walls, worst_rule_text
from xlcore.checks.advice import search_lines
from xlcore.checks.lintels import preamble_aci as lintels_preamble_aci
from xlcore.checks.section14 import not_applicable_reason
from xlcore.codes import compression_flag_ratio, get_standard
from xlcore.mechanics import bars, stiffness
from xlcore.model import Building
from xlcore.results import ResultSheet
from xlcore.results.envelope import attention_first, count_lines, worst_per_check

if TYPE_CHECKING:  # the pipeline's product; imported for hints only (the pipeline imports us)
    from xlcore.pipeline import Outcome


def other_worst(first_run: Outcome, second_run: Outcome, a: str, b: str) -> list[tuple[str, str]]:
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
        governing = results.governing_rows(sheet.table, rule, failing=False)
        keep = governing | results.failing_rows(sheet.table, rule)  # = governing_rows(failing=True)
        meaning = rule.meaning + ("; plus every failing row" if rule.failing else "")
        if mode == "auto" and keep.sum() > limit:
            fails = int(keep.sum())
            keep = governing
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


def stamp_lines(b: Building, now: dt.datetime) -> list[tuple[str, object]]:
    return [
        ("CAUTION", CAUTION),
        ("Project", b.settings.project_name),
        ("Standard", b.settings.standard),
        ("xlcore version", __version__),
        ("Computed (UTC)", now.strftime("%Y-%m-%d %H:%M:%S")),
        (results.STAMP_HASH_LABEL, b.input_hash),
    ]


def _end_zone_line(stress: pd.DataFrame, s) -> tuple[str, str]:
    """The Cl 14.6 end-zone flag (ACI 318: the boundary-element flag) in one summary line: a flag,
    never a failing utilisation."""
    std = get_standard(s.standard)
    label, ratio = std.symbols["flag_line"], compression_flag_ratio(s.compression_limit, std)
    quake = stress[stress.earthquake == "yes"]
    if quake.empty:
        return (label, "no earthquake combinations named on the Project sheet")
    hit = quake[quake.u_compression > 1.0]
    if hit.empty:
        return (label, f"none: peak compression within {ratio:g} f'c")
    w = hit.loc[hit.u_compression.idxmax()]
    return (
        label,
        f"{len(hit)} wall cases over {ratio:g} f'c under earthquake combinations "
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
            f"{s.eq_slenderness:g}; end zones where N*/A + |M*|/Z exceeds "
            f"{compression_flag_ratio(s.compression_limit, get_standard(s.standard)):g} f'c "
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
    worst = worst_rule_text(section14)
    parts = [worst] if worst else []
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


def members_table(piers: pd.DataFrame, lintels: pd.DataFrame, bar_name=None) -> pd.DataFrame:
    """Piers and lintels, one row each; `bar_name` names the bars (`Standard.bar_name`)."""
    p = piers.assign(
        member=piers.pier_id,
        kind="pier",
        height=piers.h,
        k=piers.k * 1e-3,
        note=np.where(piers.position > 0, "between openings / wall ends", "wall without openings"),
        bars=(bars.describe(piers, bar_name) if bar_name else bars.describe(piers)) if len(piers) else [],
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


@dataclass
class Checked:
    """What the checks made of one building: the tables the result sheets are laid out from."""

    building: Building
    geom: geometry.Geometry
    piers: pd.DataFrame
    plans: dict  # core -> storey -> distribution.StoreyPlan
    shear: pd.DataFrame
    axial: pd.DataFrame
    detailing: pd.DataFrame
    section14: pd.DataFrame | None
    summary: pd.DataFrame
    lintels: pd.DataFrame
    advice: pd.DataFrame
    stress: pd.DataFrame | None  # whole-core checks: None without core actions
    core_nm: pd.DataFrame | None
    core: pd.DataFrame | None  # core actions shared to walls and piers
    split: cores.CoreSplit | None  # the building's rows shared among its cores
    named: bool  # walls carry core IDs: tables get a core column


def result_sheets(c: Checked, now: dt.datetime) -> list[ResultSheet]:
    """The result sheets of one run, in the workbook's order: each table with its title and the
    lines above it (stamp, method, settings, the standard's clauses), the summary first."""
    building = c.building
    geom = c.geom
    piers = c.piers
    plans = c.plans
    shear = c.shear
    axial = c.axial
    detailing = c.detailing
    section14 = c.section14
    summary = c.summary
    lintels = c.lintels
    advice = c.advice
    stress = c.stress
    core_nm = c.core_nm
    core = c.core
    split = c.split
    named = c.named
    s = building.settings
    std = get_standard(s.standard)
    sym = std.symbols
    stamp = stamp_lines(building, now)
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
            + count_lines(summary, shear, special_walls.applies(s), sym)
            + worst_per_check(summary, lintels, stress, core_nm, sym)
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
            f"{results.MARKER}: detailing of piers to {s.standard} {sym['detailing_rules']} "
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
            + (
                " (checked against ACI MNL-17(21) Shear Wall Example 2; the rest: verify, "
                "docs/engineering-basis.md)"
                if special_walls.applies(s)
                else " (rules and values from memory and secondary sources: verify; "
                "docs/engineering-basis.md)"
            ),
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
            members_table(piers, geom.lintels, std.bar_name),
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
                    (
                        "Compression limit",
                        f"{compression_flag_ratio(s.compression_limit, std):g} f'c "
                        + ("(Project setting)" if s.compression_limit is not None else
                           f"(blank setting: {std.clause('boundary_trigger')})"),
                    ),
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
                        )
                        + "; where walls overlap at a corner, each takes an equal share of the overlap",
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
    return sheets
