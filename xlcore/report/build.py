"""The report's pages in order: cover, summary, utilisation up the height per core, storey
plans, a calculation page per check's governing case, N-M diagrams. Tables are taken by name
through `xlcore.tables`, so a new result sheet with a utilisation shows up here by itself."""

from __future__ import annotations

import re

import numpy as np
import pandas as pd

from xlcore import CAUTION, __version__, geometry, results, tables
from xlcore.api import Run
from xlcore.checks.axial import interaction, rect_sections
from xlcore.checks.core_nm import check_core_nm
from xlcore.codes import get_standard
from xlcore.report import (
    MAX_NM_CORES,
    MAX_NM_PIERS,
    MAX_PLANS,
    MAX_SUMMARY_ROWS,
    PLOTS_PER_PAGE,
    PRINT_CAUTION,
    changed_settings,
    column,
    fmt,
)
from xlcore.report import figures as fg
from xlcore.report.pages import BOTTOM, LEFT, RIGHT, Flow, frame

PIER_FACTS = (  # the governing pier's own properties on its calculation page
    ("Lw", "Length Lw", "mm", "0"),
    ("tw", "Thickness tw", "mm", "0"),
    ("Hc", "Storey clear height", "mm", "0"),
    ("fc", "f'c", "MPa", "0"),
    ("fsy", "fsy", "MPa", "0"),
    ("cover", "Cover", "mm", "0"),
)


def build_pages(run: Run, stamp: dict[str, str], stale: bool, why: list[str], workbook: str) -> list:
    """Every page of the report as a matplotlib Figure, header and footer on each."""
    out = run.outcome
    b = out.building
    sheets = run.sheets
    checks = [c for c in tables.checks_of(sheets) if not tables.rows_of(c, sheets).empty]
    levels = {s.name: s.level for s in b.storeys}
    flow = Flow()
    contents_at = _cover(flow, run, stamp, stale, why, workbook)
    _summary(flow, run)
    if out.comparison is not None:
        _comparison(flow, run, levels)
    for name, members in _cores(out.piers).items():
        _utilisation_pages(flow, sheets, checks, levels, name, members)
    _plans(flow, run)
    for c in checks:
        _calculation(flow, run, c)
    _nm_pages(flow, run, checks)
    _contents(flow, contents_at)
    s = b.settings
    project = s.project_name or workbook
    if stale:
        right = f"STALE RESULTS: report of the inputs now (hash {b.input_hash[:12]}); xlcore {__version__}"
    else:
        right = (
            f"xlcore {stamp.get('xlcore version', '')}  computed {stamp.get('Computed (UTC)', '')} UTC  "
            f"inputs {stamp.get(results.STAMP_HASH_LABEL, '')[:12]}"
        )
    frame(flow.pages, f"{project}  |  {s.standard}", right, PRINT_CAUTION)
    return flow.pages


# ---------------------------------------------------------------- cover and summary


def _cover(flow: Flow, run: Run, stamp: dict[str, str], stale: bool, why: list[str], workbook: str):
    b = run.outcome.building
    s = b.settings
    fig = flow.new_page()
    fig.text(LEFT, 0.88, "Calculation report", fontsize=22, fontweight="bold", va="top")
    fig.text(LEFT, 0.845, "Reinforced-concrete core walls and piers", fontsize=13, va="top")
    flow.y = 0.80
    flow.lines(
        [
            ("Project", s.project_name or "(no project name on the Project sheet)"),
            ("Design standard", s.standard),
            ("Workbook", workbook),
            ("Results computed (UTC)", stamp.get("Computed (UTC)", "")),
            ("By", f"xlcore {stamp.get('xlcore version', '')}"),
            (results.STAMP_HASH_LABEL, stamp.get(results.STAMP_HASH_LABEL, "")),
            (
                "Numbers",
                "the checks run again on the workbook's inputs, whose hash equals the stamp above: "
                "every number here equals the workbook's result sheets",
            ),
        ],
        size=8.5,
    )
    if stale:
        flow.para(
            "STALE: " + "; ".join(why) + ". This report is of the inputs as they are now "
            f"(hash {b.input_hash}), not of the workbook's result sheets.",
            size=9,
            color=fg.OVER,
        )
    flow.heading("Caution")
    flow.para(CAUTION, size=9)
    flow.para(
        "The standard's expressions were transcribed from public secondary sources and memory; "
        "docs/engineering-basis.md lists each provision with its clause, source and confidence.",
        size=8,
    )
    flow.heading("Project settings that differ from the defaults")
    changed = changed_settings(s)
    if changed:
        flow.table(["Setting", "Value", "Default"], [list(r) for r in changed], [0.42, 0.34, 0.24], size=7.5)
    else:
        flow.para("None: every setting is at its default.", size=8)
    flow.heading("Contents")
    at = flow.y
    flow.y -= 0.2  # filled in once the page numbers are known
    return at


def _contents(flow: Flow, at: float) -> None:
    fig = flow.pages[0]
    y = at
    for title, page in flow.titles:
        fig.text(LEFT, y, title, fontsize=8.5, va="top")
        fig.text(RIGHT, y, str(page), fontsize=8.5, va="top", ha="right")
        y -= 0.0155


def _summary(flow: Flow, run: Run) -> None:
    flow.section("Summary")
    counts = run.counts()
    flow.lines(
        [
            ("Pier x storey cases", str(counts["pier_storey_cases"])),
            (
                "Outcome",
                f"{counts['pass']} pass, {counts['fail']} fail, {counts['not_checked']} not checked",
            ),
            ("Rows checked", f"{counts['rows_checked']} (pier x storey x combination)"),
        ]
    )
    flow.heading("Worst case of each check")
    rows, colours = [], []
    for w in run.worst():
        if w["util"] is None:
            rows.append([w["check"], "", results.NOT_CHECKED, "no rows", "", ""])
            colours.append("#555555")
            continue
        where = ", ".join(
            str(w[k])
            for k in ("pier_id", "lintel_id", "wall_id", "storey", "combination", "rule")
            if w.get(k)
        )
        rows.append(
            [
                w["check"],
                f"{w['util']:.3f}",
                w["status"],
                where,
                str(w.get("clause", "")),
                f"{w['over']} of {w['rows']}",
            ]
        )
        colours.append(_colour(w["util"]))
    flow.table(
        ["Check", "U", "Status", "Where", "Clause", "Rows over 1.0"],
        rows,
        [0.18, 0.07, 0.1, 0.29, 0.24, 0.12],
        colours=colours,
    )
    flow.heading("Pier x storey cases, failing and nearest to failing first")
    summ = run.sheets[tables.short(results.SUMMARY_SHEET)]
    t = summ.table
    shown = t.head(MAX_SUMMARY_ROWS)
    keys = ["storey", "pier_id", "status", "util", "check", "combination", "clause", "detailing", "fix"]
    heads = [
        "Storey",
        "Pier",
        "Status",
        "U",
        "Governing check",
        "Combination",
        "Clause",
        "Detailing",
        "Cheapest fix",
    ]
    cols = [column(summ, k) for k in keys]
    flow.table(
        heads,
        [[fmt(r[k], c.fmt) for k, c in zip(keys, cols, strict=True)] for _, r in shown.iterrows()],
        [0.06, 0.07, 0.06, 0.06, 0.16, 0.12, 0.22, 0.09, 0.16],
        size=6.5,
        colours=[_colour(u) for u in shown.util.to_numpy(dtype=float)],
    )
    rest = t.iloc[MAX_SUMMARY_ROWS:]
    if len(rest):
        u = rest.util.to_numpy(dtype=float)
        top = np.nanmax(u) if np.isfinite(u).any() else float("nan")
        failing = int((rest.status == results.FAIL).sum())
        flow.para(
            f"... and {len(rest)} more pier x storey cases"
            + (f" ({failing} of them failing)" if failing else "")
            + f", none above U = {top:.3f}: every one is on the workbook's sheet 'Results summary'.",
            size=7.5,
        )


MAX_COMPARED_ROWS = 30  # cases listed on the standards-compared page (where they differ most)


def _comparison(flow: Flow, run: Run, levels: dict[str, float]) -> None:
    """The two standards side by side: the findings, the ratio up the height per check, and
    the cases where they differ most (every case is on the workbook's comparison sheet)."""
    cmp = run.outcome.comparison
    a, b = cmp.first, cmp.second
    flow.section("Standards compared")
    flow.lines(cmp.lines, size=7.5)
    t = cmp.table[np.isfinite(cmp.table.ratio.to_numpy(dtype=float))]
    if len(t):
        ax = flow.axes(0.3)
        fg.ratio_up_height(ax, t, levels, f"U {b} / U {a} per storey x pier x check")
    with np.errstate(divide="ignore", invalid="ignore"):
        spread = np.abs(np.log(t.ratio.to_numpy(dtype=float)))
    if not (spread > 0).any():
        flow.para(
            f"The two agree on every storey x pier x check (ratio 1). Every case: the "
            f"workbook's sheet '{results.COMPARISON_SHEET}'.",
            size=7.5,
        )
        return
    flow.heading(f"Where the two differ most (largest |ln ratio|, up to {MAX_COMPARED_ROWS})")
    flow.para(f"(1) {a}, (2) {b}; ratio = U (2) / U (1)", size=7.5)
    shown = t.iloc[np.argsort(-spread, kind="stable")[:MAX_COMPARED_ROWS]]
    flow.table(
        ["Storey", "Pier", "Check", "U (1)", "Clause (1)", "U (2)", "Clause (2)", "Ratio"],
        [
            [
                r.storey,
                r.pier_id,
                r.check,
                f"{r.u_a:.3f}",
                r.clause_a,
                f"{r.u_b:.3f}",
                r.clause_b,
                f"{r.ratio:.3f}",
            ]
            for r in shown.itertuples(index=False)
        ],
        [0.06, 0.08, 0.16, 0.07, 0.23, 0.07, 0.23, 0.07],
        size=6.0,
        colours=[_colour(max(u, v)) for u, v in zip(shown.u_a, shown.u_b, strict=True)],
    )
    flow.para(
        f"Every case: the workbook's sheet '{results.COMPARISON_SHEET}'. The other pages are to {a}.",
        size=7.5,
    )


def _colour(u) -> str:
    band = results.band([u])[0]
    return {"over": fg.OVER, "close": fg.CLOSE_C}.get(band, "black")


# ---------------------------------------------------------------- utilisation up the height


def _cores(piers: pd.DataFrame) -> dict[str, dict[str, set]]:
    """Cores by name with their piers and walls. A 'core' column on the piers (walls grouped
    into separate cores) gives one entry per core; without it the whole building is one."""
    if piers is None or piers.empty:
        return {}
    if "core" in piers and piers.core.nunique() > 1:
        groups = dict(tuple(piers.groupby("core", sort=False)))
    else:
        groups = {"": piers}
    return {
        str(name): {"pier_id": set(g.pier_id), "wall_id": set(g.wall_id), "core": {name}}
        for name, g in groups.items()
    }


def _in_core(df: pd.DataFrame, members: dict[str, set], single: bool) -> pd.DataFrame:
    if single:
        return df
    if "core" in df:
        return df[df.core.isin(members["core"])]
    for key in ("pier_id", "wall_id"):
        if key in df:
            return df[df[key].isin(members[key])]
    return df  # a whole-building table: shown with every core


def _utilisation_pages(flow: Flow, sheets, checks, levels, name: str, members) -> None:
    single = name == ""
    flow.section("Utilisation up the height" + ("" if single else f": core {name}"))
    flow.para(
        "Worst utilisation over the combinations at each storey, one line per pier, wall or lintel "
        f"(the worst {fg.NAMED} named, the rest grey); dashed red: 1.0; dotted: {results.CLOSE:g}.",
        size=7.5,
    )
    top = flow.y
    for i, c in enumerate(checks):
        k = i % PLOTS_PER_PAGE
        if i and k == 0:
            flow.new_page()
            top = flow.y
        df = _in_core(tables.rows_of(c, sheets), members, single)
        df = df.assign(level=df.storey.map(levels))
        fig = flow.fig
        row, col = divmod(k, 2)
        h = (top - BOTTOM - 0.03) / (PLOTS_PER_PAGE // 2)
        ax = fig.add_axes((LEFT + 0.05 + col * 0.44, top - (row + 1) * h + 0.045, 0.27, h - 0.075))
        fg.utilisation_up_height(ax, df, c.member, c.util, c.label)
        flow.y = top - (row + 1) * h  # below the last row of charts


# ---------------------------------------------------------------- plans


def plans_by_core(out) -> dict[str, dict]:
    """Storey plans keyed by core, then storey (a building without core IDs: one core "")."""
    plans = out.plans or {}
    if plans and all(isinstance(v, dict) for v in plans.values()):
        return plans
    return {"": plans}


def _plans(flow: Flow, run: Run) -> None:
    out = run.outcome
    b = out.building
    piers = out.piers
    by_core = plans_by_core(out)
    cuts = geometry.openings_at(b.openings, b.storeys)
    groups: dict[tuple, list[str]] = {}
    for s in b.storeys:
        sp = piers[piers.storey == s.name]
        marks = tuple(
            (c, round(p.section.xc, 3), round(p.section.yc, 3), p.centre and tuple(np.round(p.centre, 3)))
            for c, p in _cores_at(by_core, s.name)
        )
        key = (
            tuple(
                sp[["pier_id", "px1", "py1", "px2", "py2", "tw"]].round(4).itertuples(index=False, name=None)
            ),
            tuple(
                (w, o.offset, o.width) for (i, w), lst in sorted(cuts.items()) if i == s.index for o in lst
            ),
            marks,
        )
        groups.setdefault(key, []).append(s.name)
    flow.room(0.5)  # the heading, the note and the first plan together
    flow.section("Storey plans", new_page=False)
    flow.para(
        f"{len(groups)} distinct plan(s) over {len(b.storeys)} storeys. Walls drawn as their piers "
        "(centreline rectangles), openings dashed with the lintel over each; + centroid of the net "
        "section, x centre of rigidity, of each core (as on the sheet 'Results core section').",
        size=7.5,
    )
    first = True
    for n, (_key, names) in enumerate(groups.items()):
        if n >= MAX_PLANS:
            flow.para(
                f"{len(groups) - MAX_PLANS} more distinct plans are not drawn: see 'Results piers'.", size=8
            )
            break
        if not first:
            flow.room(0.39)
        first = False
        storey = names[0]
        span = names[0] if len(names) == 1 else f"{names[0]} to {names[-1]} ({len(names)} storeys)"
        flow.heading(f"Plan at {span}")
        sp = piers[piers.storey == storey]
        idx = next(s.index for s in b.storeys if s.name == storey)
        openings = []
        for (i, wall_id), lst in cuts.items():
            if i != idx or not (sp.wall_id == wall_id).any():
                continue
            w = sp[sp.wall_id == wall_id].iloc[0]
            for k, o in enumerate(lst, start=1):
                x1, y1 = w.wx + w.ux * o.offset, w.wy + w.uy * o.offset
                x2, y2 = w.wx + w.ux * (o.offset + o.width), w.wy + w.uy * (o.offset + o.width)
                openings.append((f"{wall_id}-L{k}", wall_id, x1, y1, x2, y2, w.tw / 1000.0))
        here = _cores_at(by_core, storey)
        marks = [(c, (p.section.xc, p.section.yc), p.centre) for c, p in here]
        ax = flow.axes(0.24, (LEFT + 0.08, 0, RIGHT - LEFT - 0.16, 0), below=0.07)
        hidden = fg.storey_plan(ax, sp, openings, marks)
        if hidden:
            flow.para(
                f"{hidden} IDs too long for their member at this scale are left off: see 'Results piers'.",
                size=7.5,
            )
        for c, p in here:
            sec = p.section
            cr = f"({p.centre[0]:.3f}, {p.centre[1]:.3f})" if p.centre else "none (walls unstable in plan)"
            flow.para(
                (f"Core {c}: " if c else "Net section: ")
                + f"A = {sec.area:.3f} m2; centroid ({sec.xc:.3f}, {sec.yc:.3f}) m; centre of "
                f"rigidity {cr} m; Ixx {sec.ixx:.3f}, Iyy {sec.iyy:.3f} m4.",
                size=7.5,
            )


def _cores_at(by_core: dict[str, dict], storey: str) -> list[tuple[str, object]]:
    return [(c, plans[storey]) for c, plans in by_core.items() if storey in plans]


# ---------------------------------------------------------------- calculation pages


def _calculation(flow: Flow, run: Run, c: tables.Check) -> None:
    sheets = run.sheets
    sheet = sheets[c.table]
    w = tables.worst(c, sheets)
    flow.section(f"Calculation: {c.label}")
    flow.para(f"Governing case of the building: {_case(c, w)} (sheet '{sheet.name}').", size=8.5)
    u = float(w[c.util])
    status = results.PASS if u <= 1.0 else results.FAIL
    std = get_standard(run.outcome.building.settings.standard)
    simplified = std.symbols["simplified_clause"]  # AS 3600 Cl 11.5.1, ACI 318 11.5.3.1
    clause = simplified if c.util == "util_s" else str(w.get("clause", "") or w.get("governs", ""))
    flow.lines(
        [
            ("Utilisation", f"{fmt(u, '0.000')}  {status}"),
            ("Clause", clause),
        ],
        size=9,
    )
    flow.heading("Inputs")
    pairs = []
    if c.member == "pier_id" and run.outcome.piers is not None:
        p = run.outcome.piers
        row = p[(p.storey == w.storey) & (p.pier_id == w.pier_id)]
        if len(row):
            r = row.iloc[0]
            pairs += [(f"{label} [{unit}]", fmt(r[key], f)) for key, label, unit, f in PIER_FACTS]
            pairs.append(
                (
                    "Bars",
                    f"vertical {std.bar_name(r.v_dia)} at {r.v_spacing:g} mm, {int(r.v_layers)} layer(s); "
                    f"horizontal {std.bar_name(r.h_dia)} at {r.h_spacing:g} mm, {int(r.h_layers)} layer(s)",
                )
            )
    shown = {key for key, *_ in PIER_FACTS} if pairs else set()
    for key in c.inputs:
        col = column(sheet, key)
        if col is None or key in shown or key not in w or fmt(w[key], col.fmt) == "":
            continue
        pairs.append((col.title, fmt(w[key], col.fmt)))
    flow.lines(pairs, size=8)
    flow.heading("Working (numbers substituted)")
    for key in c.working:
        col = column(sheet, key)
        if col is None or key not in w or not str(w[key]).strip() or str(w[key]) == "nan":
            continue
        flow.para(col.title + ":", size=8, color="#333333")
        for part in str(w[key]).split("; "):
            flow.para(part, size=8, indent=0.02, mono=True)
    others = _same_member(run, c, w)
    if others is not None and len(others) > 1:
        flow.heading("Every combination of this case")
        cols = [column(sheet, k) for k in ("combination", *c.each, c.util)]
        cols = [col for col in cols if col is not None and col.key in others]
        u = others[c.util].to_numpy(dtype=float)
        flow.table(
            [re.sub(r" \(.*?\)", "", col.title) for col in cols] + ["Status"],  # short headers
            [
                [fmt(r[col.key], col.fmt) for col in cols] + [results.PASS if x <= 1.0 else results.FAIL]
                for (_, r), x in zip(others.iterrows(), u, strict=True)
            ],
            [0.16] + [0.76 / (len(cols) - 1)] * (len(cols) - 1) + [0.08],
            colours=[_colour(x) for x in u],
        )


def _case(c: tables.Check, w: pd.Series) -> str:
    """'pier SW2-2 at L5, combination G+0.3Q+Ey' (what names the governing row)."""
    kind = {"pier_id": "pier", "lintel_id": "lintel", "wall_id": "wall"}
    core = f"core {w.core}" if "core" in w and str(w.core) not in ("", "nan") else ""
    if c.member in kind:
        parts = [f"{kind[c.member]} {w[c.member]}" + (f" of {core}" if core else "")]
    else:
        parts = [core or "the core"]
    if "storey" in w:
        parts[0] += f" at {w.storey}"
    parts += [f"{k} {w[k]}" for k in ("combination", "rule") if k in c.ids and k in w]
    return ", ".join(parts)


def _same_member(run: Run, c: tables.Check, w: pd.Series) -> pd.DataFrame | None:
    """The governing case's rows over every combination: same storey, member and core."""
    if "combination" not in w or "storey" not in w:
        return None
    t = tables.rows_of(c, run.sheets)
    keep = t.storey == w.storey
    for key in (c.member, "core"):
        if key and key in t and key in w:
            keep &= t[key] == w[key]
    return t[keep].head(40)


# ---------------------------------------------------------------- N-M diagrams


def _nm_pages(flow: Flow, run: Run, checks: list[tables.Check]) -> None:
    sheets = run.sheets
    cases: list[tuple[str, str, str]] = []  # storey, pier, why
    for c in checks:
        if c.member != "pier_id" or c.table == "detailing":
            continue
        w = tables.worst(c, sheets)
        key = (w.storey, w.pier_id)
        if key not in [(a, b_) for a, b_, _ in cases]:
            cases.append((w.storey, w.pier_id, c.label))
    cases = cases[:MAX_NM_PIERS]
    core_rows = [c for c in checks if c.table == "core N-M"]
    if not cases and not core_rows:
        return
    flow.section("Interaction diagrams (factored)")
    flow.para(
        "Axial force against in-plane moment, capacity reduced by phi (Table 2.2.2): the curve "
        "the checks use (strain compatibility, Cl 8.1.3 stress block; linear to phi Nuo above "
        "decompression and to 0.85 Nuot in tension).",
        size=7.5,
    )
    if core_rows:
        _core_nm(flow, run, core_rows[0])
    for storey, pier, why in cases:
        _pier_nm(flow, run, storey, pier, why)


def _pier_nm(flow: Flow, run: Run, storey: str, pier: str, why: str) -> None:
    out = run.outcome
    s = out.building.settings
    std = get_standard(s.standard)
    phi0 = s.phi_compression if s.phi_compression is not None else std.phi_compression
    p = out.piers[(out.piers.storey == storey) & (out.piers.pier_id == pier)]
    ax_t = run.sheets["axial-bending"].table
    rows = ax_t[(ax_t.storey == storey) & (ax_t.pier_id == pier)]
    if p.empty or rows.empty:
        return
    sec = rect_sections(p.iloc[[0]], std)
    ends = interaction(sec, np.array([0.0]), phi0, of=np.zeros(1, dtype=int), std=std)
    top, bottom = float(ends["top"][0]), float(ends["bottom"][0])
    n = np.unique(
        np.concatenate([np.linspace(bottom, top, 161), [0.0, float(ends["phi_d"][0] * ends["nd"][0])]])
    )
    r = interaction(sec, n, phi0, of=np.zeros(len(n), dtype=int), std=std)
    g = rows.loc[rows.util.astype(float).idxmax()]
    pts = pd.DataFrame({"m": rows.m_design.astype(float), "n": rows.n.astype(float)})
    ax = flow.axes(0.28, (LEFT + 0.1, 0, RIGHT - LEFT - 0.2, 0))
    fg.interaction(
        ax,
        r["phi_mu"] * 1e-6,
        n * 1e-3,
        pts,
        (float(g.m_design), float(g.n)),
        (float(g.m_ray), float(g.n_ray)),
        f"Pier {pier} at {storey} (the pier governing {why}); red: its worst axial + bending case",
    )
    flow.para(
        f"Governing: {g.combination}: N* = {g.n:.1f} kN, M* = {g.m_design:.1f} kNm; the ray meets the "
        f"curve at N = {g.n_ray:.1f} kN, M = {g.m_ray:.1f} kNm; U = {float(g.util):.3f} ({g.clause}). "
        f"phi Nuo = {g.phi_nuo:.1f} kN, phi Nuot = {g.phi_nuot:.1f} kN.",
        size=7.5,
    )


def _core_nm(flow: Flow, run: Run, c: tables.Check) -> None:
    """The governing core N-M case of each core (all cores' rows in one table, with a core
    column when walls carry core IDs)."""
    out = run.outcome
    t = tables.rows_of(c, run.sheets)
    by_core = plans_by_core(out)
    groups = dict(tuple(t.groupby("core", sort=False))) if "core" in t else {"": t}
    worst = sorted(groups.items(), key=lambda kv: -float(kv[1][c.util].astype(float).max()))
    for name, rows in worst[:MAX_NM_CORES]:
        w = rows.loc[rows[c.util].astype(float).idxmax()]
        plans = by_core.get(name, by_core.get("", {}))
        piers = out.piers if "core" not in out.piers or not name else out.piers[out.piers.core == name]
        _one_core_nm(flow, out, w, rows[rows.storey == w.storey], piers, plans, name)


def _one_core_nm(flow: Flow, out, w: pd.Series, here: pd.DataFrame, piers, plans, name: str) -> None:
    theta = float(np.arctan2(w.my, w.mx)) if (w.mx or w.my) else 0.0
    n = np.linspace(float(w.phi_nuot) * 0.999, float(w.phi_nuo) * 0.999, 61)
    synth = pd.DataFrame(
        {
            "row": np.arange(len(n)),
            "storey": w.storey,
            "combination": "curve",
            "n": n,
            "mx": np.cos(theta),
            "my": np.sin(theta),
        }
    )
    curve = check_core_nm(piers, plans, synth, out.building.settings)
    m = np.concatenate([[0.0], curve.phi_mu.to_numpy(float), [0.0]])
    nn = np.concatenate([[float(w.phi_nuot)], n, [float(w.phi_nuo)]])
    ax = flow.axes(0.28, (LEFT + 0.1, 0, RIGHT - LEFT - 0.2, 0))
    pts = pd.DataFrame({"m": here.m_res.astype(float), "n": here.n.astype(float)})
    fg.interaction(
        ax,
        m,
        nn,
        pts,
        (float(w.m_res), float(w.n)),
        (float(w.phi_mu), float(w.n)),
        f"{'Core ' + name if name else 'Whole core'} at {w.storey} (its governing axial + bending case)",
        ray=False,
    )
    flow.para(
        f"Capacity along the governing combination's moment direction ({np.degrees(theta):.0f} deg from the "
        f"x axis; Mx* = {w.mx:.0f}, My* = {w.my:.0f} kNm); other combinations are drawn at their |M*|, "
        f"their own directions may differ. Governing: {w.combination}: N* = {w.n:.0f} kN, |M*| = "
        f"{w.m_res:.0f} kNm, phi Mu along M* = {w.phi_mu:.0f} kNm; U = {float(w.util):.3f}.",
        size=7.5,
    )
