"""The one-direction flow: read -> validate -> geometry -> actions -> checks -> results -> write."""

from __future__ import annotations

import datetime as dt
import functools
import time
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from xlcore import comparison, cores, distribution, geometry, parallel, results
from xlcore.checks import core_stress, pier_rows, plain
from xlcore.checks.advice import advise, failing_pours, join_advice, summary_part
from xlcore.checks.axial import check_pier_axial
from xlcore.checks.core_nm import check_core_nm
from xlcore.checks.core_stress import check_core_stress
from xlcore.checks.detailing import check_detailing
from xlcore.checks.lintels import check_lintels
from xlcore.checks.section14 import check_section14
from xlcore.checks.shear import check_pier_shear
from xlcore.codes import get_standard
from xlcore.diagnostics import Findings, own_defects  # noqa: F401  (Findings re-exported)
from xlcore.mechanics import stiffness
from xlcore.model import Building
from xlcore.progress import SILENT, Reporter
from xlcore.results import ResultSheet
from xlcore.results.envelope import (  # noqa: F401  (CHECK_SECTION14, worst_per_check re-exported)
    CHECK_SECTION14,
    candidates,
    envelope,
    pier_checks,
    with_cheapest_fix,
    worst_per_check,
)
from xlcore.results.sheets import (  # noqa: F401  (DETAIL_MODES, select_detail re-exported)
    DETAIL_MODES,
    Checked,
    other_worst,
    result_sheets,
    select_detail,
    stamp_lines,
)
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
    ran: str = ""  # how the advice search and the core checks ran (`parallel.Ran.how`)

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
    with t.phase("validate", "checking the inputs"), own_defects("checking the inputs"):
        return build(raw)


def compute(
    building: Building,
    findings: Findings,
    now: dt.datetime | None = None,
    reporter: Reporter = SILENT,
    detail: str = "all",
    limit: int | None = None,
    whole_cores: bool = True,
    workers: int = 1,
) -> Outcome:
    """Run every check on a validated building and lay out the result sheets.

    Without `whole_cores` the whole-core checks (core stress, core N-M) are left out, their
    tables empty: `compute_compared`'s second run, which compares piers only.

    `detail` (see `select_detail`, which must then be called before writing): with `governing`,
    or `auto` above `limit` rows, the tables whose rows will be cut are made without their
    working text (most of the checks' time at building scale), and the sheets carry a `rework`
    that makes it for the rows written.

    `workers` > 1: the advice search (in parts of whole pours) and the core checks (per core)
    on up to that many processes (`parallel.run`; Linux and no other thread alive, else
    serial), one phase "advice and core checks" in the timings; the tables are the same to the
    bit for any number. The default is serial: a library caller (a notebook, a test) may hold
    threads or not want processes forked; the command line asks for the CPUs it may use."""
    if workers < 1:
        raise ValueError(f"workers must be 1 or more; got {workers}")
    s = building.settings
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
        # each action row's pier, matched once for shear, detailing and Section 14
        pier_of = pier_rows(acts.storey, acts.pier_id, piers.storey, piers.pier_id)
        if defer(len(acts)):  # numbers now, working text for the rows written (select_detail)
            acts_i = acts.assign(_act=np.arange(len(acts)))
            shear = check_pier_shear(piers, acts_i, s, text=False, pier_of=pier_of)
            axial = check_pier_axial(piers, acts_i, s, text=False)
            rework[results.SHEAR_SHEET] = _rework_rows(lambda a: check_pier_shear(piers, a, s), acts_i)
            rework[results.AXIAL_SHEET] = _rework_rows(lambda a: check_pier_axial(piers, a, s), acts_i)
        else:
            shear = check_pier_shear(piers, acts, s, pier_of=pier_of)
            axial = check_pier_axial(piers, acts, s)
        hwe = _first_per_pier(axial, "hwe") if len(axial) else None
        detailing = check_detailing(piers, acts, s, hwe, shear=shear, pier_of=pier_of)
        section14 = check_section14(piers, acts, s, hwe, pier_of=pier_of)
        cand = candidates(shear, axial, detailing, section14)  # once for both tables below
        rules = get_standard(s.standard).symbols["earthquake_rules"]
        summary = envelope(shear, piers, axial, detailing, section14, rules, cand=cand)
        checks = pier_checks(shear, axial, detailing, section14, summary, cand=cand)
        del cand  # not held through the advice search (memory peaks there)
        lintels = check_lintels(geom.lintels, building.member_actions, s)
    failing = int((summary.status == results.FAIL).sum())
    stress = core_nm = None
    if core is not None and not whole_cores:
        stress = core_nm = pd.DataFrame()
    cores_too = core is not None and whole_cores

    def worded(stress: pd.DataFrame) -> pd.DataFrame:
        """The core-stress rows' working text, or its making deferred to the rows written."""
        if defer(len(stress)):
            rework[results.CORE_STRESS_SHEET] = functools.partial(core_stress.with_working, settings=s)
        elif len(stress):
            return core_stress.with_working(stress, s)
        return stress

    core_rows = len(building.core_actions) if cores_too else 0
    ran = parallel.Ran(1, "serial (one process asked for)")
    if workers > 1 and failing * ADVICE_COST + core_rows * CORE_COST < SERIAL_BELOW:
        ran = parallel.Ran(1, "serial (too little work to share)")
        workers = 1
    if workers > 1:
        label = (
            f"cheapest fixes for {failing:,} failing pier x storey cases"
            + (", core stresses and core axial + bending" if cores_too else "")
            + f" (on up to {workers} processes)"
        )
        with t.phase("advice and core checks", label, total=core_rows or None):
            advice, parts, ran = _advice_and_cores(
                piers, acts, summary, s, plans, split.actions if cores_too else None, workers, reporter
            )
            summary = with_cheapest_fix(summary, advice)
            if cores_too:
                stress = _joined([p for p, _ in parts])
                core_nm = _joined([p for _, p in parts])
                stress = worded(stress)
    else:
        with t.phase("advice", f"cheapest fixes for {failing:,} failing pier x storey cases"):
            advice = advise(piers, acts, summary, s)
            summary = with_cheapest_fix(summary, advice)
        if cores_too:
            with t.phase("core checks", "core stresses and core axial + bending", total=core_rows):
                # the working text on the rows written where the table will be cut (select_detail)
                numbers = functools.partial(check_core_stress, text=False)
                stress = per_core(numbers, piers, plans, split.actions, s)
                stress = worded(stress)
                core_nm = per_core(check_core_nm, piers, plans, split.actions, s)
    sheets = result_sheets(
        Checked(
            building=building,
            geom=geom,
            piers=piers,
            plans=plans,
            shear=shear,
            axial=axial,
            detailing=detailing,
            section14=section14,
            summary=summary,
            lintels=lintels,
            advice=advice,
            stress=stress,
            core_nm=core_nm,
            core=core,
            split=split,
            named=named,
        ),
        now or dt.datetime.now(dt.UTC),
    )
    for sheet in sheets:
        sheet.rework = rework.get(sheet.name)
    return Outcome(
        building,
        findings,
        geom,
        shear,
        summary,
        sheets,
        timings=t,
        piers=piers,
        plans=plans,
        checks=checks,
        ran=ran.how,
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
    workers: int = 1,
) -> Outcome:
    """`compute` to the building's standard and, where a `second` standard is named, once more
    to that one on the same building and actions, with the two joined on a sheet of their own
    (`comparison.compare`) after the summary. The other sheets are the first standard's; the
    second run is kept only for the comparison (its numbers without their working text)."""
    now = now or dt.datetime.now(dt.UTC)
    out = compute(building, findings, now=now, reporter=reporter, detail=detail, limit=limit, workers=workers)
    if not second:
        return out
    first = building.settings.standard
    reporter.begin(f"every check again to {second}")
    # numbers only (no working text), piers and lintels only: the whole-core checks take half
    # the time of a run and are not compared per pier
    other = compute(
        with_standard(building, second),
        findings,
        now=now,
        detail="governing",
        whole_cores=False,
        workers=workers,
    )
    reporter.end()
    cmp = comparison.compare(out.checks, other.checks, (first, second))
    out.comparison = cmp
    stamp = stamp_lines(building, now)
    out.sheets.insert(
        1,
        ResultSheet(
            results.COMPARISON_SHEET,
            f"{results.MARKER}: the building checked to {first} and to {second}, per storey x pier "
            "x check (worst combination under each)",
            results.comparison_columns(first, second),
            cmp.table,
            preamble=[*stamp, *cmp.lines, *other_worst(out, other, first, second)],
        ),
    )
    out.sheets[0].preamble.append((results.ALSO_CHECKED, f"{second} (see {results.COMPARISON_SHEET})"))
    return out


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
    core_piers = core.piers_apart_from(given).assign(origin=1)  # (no table of every core row)
    core_piers["source"] = distribution.core_source_of(core_piers)
    table = core_table(core, given, text=False)  # the walls' working: compute, on the rows written
    core_piers = core_piers.drop(columns=["core", "wall_v"])
    if len(split.shares):
        split.shares["used"] = np.where(
            split.shares.row.isin(given),
            "core checks only",
            "core checks and piers",
        )
    return distribution.concat_rows(member, core_piers), table, split  # L: no core row left


def per_core(check, piers: pd.DataFrame, plans: dict, actions: pd.DataFrame, s) -> pd.DataFrame:
    """A whole-core check run on each core's own section and actions; one table with `core`."""
    by_core = actions.groupby("core", sort=False)
    return _joined([_one_core(check, piers, plans, c, rows, s) for c, rows in by_core])


def _one_core(check, piers: pd.DataFrame, plans: dict, c, rows: pd.DataFrame, s) -> pd.DataFrame:
    return check(piers[piers.core == c], plans[c], rows.drop(columns=["core", "acc"]), s).assign(core=c)


def _joined(parts: list[pd.DataFrame]) -> pd.DataFrame:
    """The cores' tables (in the order of their first action rows) as one: `per_core`'s."""
    parts = [p for p in parts if len(p)]
    if len(parts) > 1:  # several cores: each storey x combination's cores together
        return pd.concat(parts, ignore_index=True).sort_values("row", kind="stable", ignore_index=True)
    return parts[0] if parts else pd.DataFrame()


# the expected seconds of the work `compute` shares among processes, per failing storey x pier
# (the advice search: 2.1 s for the varied L tower's 4,020) and per core-actions row (the core
# checks: 0.6 s for its 6,000), one process's; and the least expected work worth the forks
# (below it, serial: the ACI 318 demo's 0.46 s took as long on two processes as on one)
ADVICE_COST = 2.1 / 4_020
CORE_COST = 0.6 / 6_000
SERIAL_BELOW = 0.5


def _advice_and_cores(
    piers: pd.DataFrame,
    acts: pd.DataFrame,
    summary: pd.DataFrame,
    s,
    plans: dict,
    core_actions: pd.DataFrame | None,
    workers: int,
    reporter: Reporter,
) -> tuple[pd.DataFrame, list[tuple[pd.DataFrame, pd.DataFrame]], parallel.Ran]:
    """The advice table and each core's (stress numbers, N-M) tables, made on up to `workers`
    processes: the pours (the search's independent parts) and the cores split into shares of
    about equal expected work, one task per share. The joins give what the serial code gives."""
    failing = failing_pours(piers, summary, s)
    units: list[tuple[str, object, float]] = []  # kind, key, expected seconds
    for pour, n in failing.groupby("pour", sort=False).size().items():
        units.append(("pour", pour, n * ADVICE_COST))
    cores_rows = list(core_actions.groupby("core", sort=False)) if core_actions is not None else []
    for i, (_, rows) in enumerate(cores_rows):
        units.append(("core", i, len(rows) * CORE_COST))
    shares = parallel.plan([u[2] for u in units], workers)

    def task(share: list[int]):
        def work():
            pours = [units[i][1] for i in share if units[i][0] == "pour"]
            mine = failing[failing.pour.isin(pours)]
            advice = advise(piers, acts, summary_part(summary, mine), s) if len(mine) else None
            own = {}
            for i in share:
                if units[i][0] == "core":
                    c, rows = cores_rows[units[i][1]]
                    numbers = functools.partial(check_core_stress, text=False)
                    own[units[i][1]] = (
                        _one_core(numbers, piers, plans, c, rows, s),
                        _one_core(check_core_nm, piers, plans, c, rows, s),
                    )
            return advice, own

        return work

    names = [
        ", ".join(
            f"{units[i][0]} {units[i][1] if units[i][0] == 'pour' else cores_rows[units[i][1]][0]}"
            for i in share[:3]
        )
        + (" ..." if len(share) > 3 else "")
        for share in shares
    ]
    costs = [sum(units[i][2] for i in sh) for sh in shares]
    out, ran = parallel.run(
        [task(sh) for sh in shares], workers, costs=costs, names=names, forking=reporter.without_threads
    )
    advice = join_advice([a for a, _ in out if a is not None], failing)
    by_core = {k: v for _, own in out for k, v in own.items()}
    return advice, [by_core[i] for i in range(len(cores_rows))], ran


def _first_per_pier(table: pd.DataFrame, col: str) -> pd.Series:
    """`table.groupby(["storey", "pier_id"])[col].first()` (each storey x pier's first value
    that is not NaN, NaN where none; keys sorted): by integer codes of the keys, the index made
    from each group's first row (the group-by factorised the text keys of 360 000 rows at L).
    The group-by itself where a key is blank or the column is not of floats."""
    keys = ["storey", "pier_id"]
    v = table[col].to_numpy()
    s, s_values = distribution.factorize_runs(table.storey.to_numpy())  # (rows storey by storey)
    p, p_values = distribution.factorize_runs(table.pier_id.to_numpy())
    if v.dtype.kind != "f" or (s < 0).any() or (p < 0).any():
        return table.groupby(keys)[col].first()
    g = s.astype(np.int64) * max(len(p_values), 1) + p
    n, size = len(g), len(s_values) * max(len(p_values), 1)
    first, first_valid = np.full(size, n), np.full(size, n)
    np.minimum.at(first, g, np.arange(n))
    valid = np.flatnonzero(~np.isnan(v))
    np.minimum.at(first_valid, g[valid], valid)
    present = np.flatnonzero(first < n)
    at = first_valid[present]
    values = np.where(at < n, v[np.minimum(at, n - 1)], np.nan)
    index = pd.MultiIndex.from_frame(table[keys].iloc[first[present]])
    return pd.Series(values, index=index, name=col).sort_index()


def _pairs_in(df: pd.DataFrame, other: pd.DataFrame) -> np.ndarray:
    """Whether each row's storey x combination is among `other`'s (hashed pairs, no joined
    text per row: the L tower has 360 000 member-action rows). `other`'s distinct pairs are
    found on integer codes first, so only those few are made text."""
    key = lambda d: pd.MultiIndex.from_arrays([d.storey.astype(str), d.combination.astype(str)])  # noqa: E731
    return key(df).isin(key(_distinct_pairs(other)).unique())


def _distinct_pairs(df: pd.DataFrame) -> pd.DataFrame:
    """The first row of each distinct (storey, combination) of `df`, a few rows of the same
    columns: found on integer codes of each column, no text per row (`df` itself where a key
    is blank: None and NaN share a code but not a text)."""
    s, s_values = distribution.factorize_runs(df.storey.to_numpy())  # (rows storey by storey)
    c, c_values = distribution.factorize_runs(df.combination.to_numpy())
    if (s < 0).any() or (c < 0).any():
        return df
    pair = s.astype(np.int64) * max(len(c_values), 1) + c
    return df.iloc[np.flatnonzero(~pd.Index(pair).duplicated())]


def core_table(core: distribution.CoreSharing, given: np.ndarray, text: bool = True) -> pd.DataFrame:
    """Walls and piers of the core sharing, one sheet's rows, with the working as text
    (without `text`, the walls' working is left blank for `core_working` to make on the rows
    written). `given`: core-actions rows whose storey x combination the member actions cover."""
    out = _from_blocks(core, given)
    if out is not None:
        return core_working(out) if text else out
    w, p = _sides(core.walls, core.piers)
    by_layout = _layout_order(core)
    out = _in_order(w, p, *by_layout, given) if by_layout is not None else None
    if out is not None:
        return core_working(out) if text else out
    out = pd.concat([w, p], ignore_index=True)
    out["used"] = results.text_column(out.row.isin(given), USED)
    out["kind_order"] = np.repeat([0, 1], [len(w), len(p)])  # walls first, then piers
    if by_layout is None:
        out["core_order"] = _first_seen_codes(out.core.to_numpy())  # order of first appearance
        order = _sorted_order(out)
    else:
        out["core_order"], order = by_layout
    out = out.take(order).reset_index(drop=True)
    return core_working(out) if text else out


USED = ["yes", "no: member actions given"]  # the core-sharing table's "Used" words


def _sides(walls: pd.DataFrame, piers: pd.DataFrame) -> tuple[pd.DataFrame, pd.DataFrame]:
    """The walls' and the piers' rows of the core-sharing table, each with its own columns."""
    w = walls.assign(member=walls.wall_id, kind="wall", m=np.nan, working=None)
    p = piers.assign(
        member=piers.pier_id, kind="pier", k=piers.k * 1e-3, share_pct=piers.share * 100, working=piers.source
    )
    return w, p


def _side_columns(kind: str, core: str, block: distribution.Block) -> dict[str, tuple[str, object]]:
    """A block's columns as `_sides` gives its side's rows them (core, member, kind, k in
    kN/mm, share in %, working), per case, member, case x member or once (`Block`)."""
    fixed, cols = distribution.Block.FIXED, dict(block.columns)
    cols["core"] = (fixed, core)
    if kind == "wall":
        return cols | dict(
            member=cols["wall_id"], kind=(fixed, "wall"), m=(fixed, np.nan), working=(fixed, None)
        )
    (k_how, k), (share_how, share) = cols["k"], cols["share"]
    return cols | dict(
        member=cols["pier_id"],
        kind=(fixed, "pier"),
        k=(k_how, k * 1e-3),
        share_pct=(share_how, share * 100),
        working=cols["source"],
    )


def _from_blocks(core: distribution.CoreSharing, given: np.ndarray) -> pd.DataFrame | None:
    """The core-sharing table (`core_table`'s, without the walls' working) written straight
    from the sharing's blocks (`distribution.Block`): each value once, to its row's place in
    the table's order (by row, core, walls before piers, members in natural order), not rows
    made, stacked, concatenated and taken again (648 000 rows x 30 columns at the L tower,
    each copied four times). Columns and types those of the concatenation of the two sides
    (`_sides`, found on one case of each side). None where the tables were made (a caller
    may have changed them), a text is not a str, a side has no row, a core has no name or the
    order is not decided (two cases of one row, core and side): the tables then decide."""
    parts = core.parts
    if not parts or any(not isinstance(c, str) or not b.all_text for c, b in parts):
        return None
    blocks = [  # (side, core, texts, block), walls then piers, as the tables' rows
        (kind, c, b.texts, blk)
        for kind, side in (("wall", "walls"), ("pier", "piers"))
        for c, b in parts
        for blk in getattr(b, side)
        if blk.members
    ]
    if not {"wall", "pier"} <= {k for k, *_ in blocks}:
        return None
    writers = _places(blocks)
    if writers is None:
        return None
    template = _template(parts)
    n = int(sum(b.cases * b.members for *_, b in blocks))
    pad = max(w.pad for w in writers)  # past the last row: a strided view's last row may reach it
    coded = {"core", "member", "kind", *(k for _, b in parts for k in b.texts)}  # text as codes
    kinds = {c: _kind_of(template[c].dtype, c in coded) for c in template.columns}
    if any(
        k == "text" and not isinstance(template[c].array, pd.arrays.StringArray) for c, k in kinds.items()
    ):
        return None  # (its strings are written to an array of objects below)
    floats = [c for c, k in kinds.items() if k == "float"]
    ints = [c for c, k in kinds.items() if k == "int" and template[c].dtype == np.int64]
    ints += ["kind_order", "core_order"]
    objects = [c for c, k in kinds.items() if k in ("text", "free", "object")] + ["used"]
    # the columns of each type as rows of one array (the floats: the table's block, not copied)
    arrays, buffers = {}, {}
    for names, dtype in ((floats, np.float64), (ints, np.int64), (objects, object)):
        buffers[dtype] = np.empty(len(names) * n + pad, dtype=dtype)
        arrays |= {c: (buffers[dtype], i * n) for i, c in enumerate(names)}
    for c in kinds:
        if c not in arrays:  # an int column of another width
            arrays[c] = (np.empty(n + pad, dtype=template[c].dtype), 0)
    core_code = {c: i for i, c in enumerate(dict.fromkeys(c for _, c, _, _ in blocks))}
    strings, used = {}, np.asarray(USED, dtype=object)
    for (kind, c, texts, blk), put in zip(blocks, writers, strict=True):
        cols = _side_columns(kind, c, blk)
        for col, k in kinds.items():
            how, v = cols.get(col, (distribution.Block.FIXED, None))
            if col not in cols:  # the other side's column: blank
                if k == "int":
                    return None  # (the concatenation makes it float)
                v = np.nan
            elif k == "text" and not isinstance(v, str):  # codes: their strings
                key = (id(texts), col, kind)
                if key not in strings:
                    strings[key] = np.asarray(texts[_TEXT_OF.get(col, {}).get(kind, col)], dtype=object)
                v = strings[key][v]
            put(*arrays[col], how, v)
        put(
            *arrays["used"],
            distribution.Block.CASE,
            used[np.isin(blk.columns["row"][1], given).astype(np.intp)],
        )
        put(*arrays["kind_order"], distribution.Block.FIXED, 0 if kind == "wall" else 1)
        put(*arrays["core_order"], distribution.Block.FIXED, core_code[c])
    out = pd.DataFrame(
        buffers[np.float64][: len(floats) * n].reshape(len(floats), n).T, columns=floats, copy=False
    )
    # each column inserted as a Series of the table's index: not copied (nor its objects read)
    column = lambda a: pd.Series(a, index=out.index, copy=False, dtype=a.dtype)  # noqa: E731
    used_text = pd.Series(used).array
    for i, c in enumerate([*kinds, "used", "kind_order", "core_order"]):
        k = kinds.get(c, "text" if c == "used" else "int")
        if k == "float":
            continue
        base, at = arrays[c]
        a = base[at : at + n]
        if k == "text":  # the strings as they are (all str), a missing one NaN: the take's
            a = (template[c].array if c != "used" else used_text)._from_backing_data(a)
        elif k == "free":  # text made by the sharing (its 'V* from'), a missing one blank
            a = pd.Series(a, dtype=template[c].dtype).array
        if c in template and a.dtype != template[c].dtype:
            return None
        out.insert(i, c, column(a))
    return out


_TEXT_OF = dict(member={"wall": "wall_id", "pier": "pier_id"})  # where a text column's codes point


def _kind_of(dtype, coded: bool) -> str:
    """How `_from_blocks` makes a column of this type: float, int, object, text (the blocks
    give its codes) or free text (the blocks give the strings)."""
    if isinstance(dtype, np.dtype) and dtype.kind == "f":
        return "float"
    if isinstance(dtype, np.dtype) and dtype.kind in "iu":
        return "int"
    if isinstance(dtype, np.dtype) and dtype.kind == "O":
        return "object"
    return "text" if coded else "free"


def _template(parts: list) -> pd.DataFrame:
    """One row of each side of the core-sharing table (`_sides`), from one case of the first
    core's first blocks: the columns and their types (every text a str: any rows' types)."""
    c, b = next((c, b) for c, b in parts if b.walls and b.piers)
    first = lambda blk: blk.taken(np.arange(blk.cases) == 0)  # noqa: E731
    one = distribution.CoreBlocks([first(b.walls[0])], [first(b.piers[0])], b.texts, True)
    tiny = distribution.CoreSharing(parts=[(c, one)])
    w, p = _sides(tiny.walls, tiny.piers)
    return pd.concat([w.iloc[:1], p.iloc[:1]], ignore_index=True)


def _places(blocks: list) -> list | None:
    """For each block a writer of its values to their rows' places in the core-sharing
    table's order: the cases (a block's core-actions rows) sorted by row, core (in order of
    first appearance) and side, each case's members in the natural order of their IDs (ties:
    first seen first). A block whose cases stand at equal steps is written through a strided
    view of the column (rows x members), others by index. None where two cases share a row,
    core and side (the sort then interleaves their members) or an ID is not a str."""
    core_code = {c: i for i, c in enumerate(dict.fromkeys(c for _, c, _, _ in blocks))}
    rows = [b.columns["row"][1] for *_, b in blocks]
    if not all(np.asarray(r).dtype.kind in "iu" for r in rows):
        return None
    row = np.concatenate(rows).astype(np.int64)
    which = np.repeat(np.arange(len(blocks)), [b.cases for *_, b in blocks])
    code = np.array([core_code[c] for _, c, _, _ in blocks], dtype=np.int64)[which]
    kind = np.array([k == "pier" for k, *_ in blocks], dtype=np.int64)[which]
    size = np.array([b.members for *_, b in blocks], dtype=np.int64)[which]
    cases = np.lexsort((kind, code, row))
    r, c, k = row[cases], code[cases], kind[cases]
    if ((r[1:] == r[:-1]) & (c[1:] == c[:-1]) & (k[1:] == k[:-1])).any():
        return None
    start = np.empty(len(row), dtype=np.int64)
    start[cases] = np.cumsum(size[cases]) - size[cases]
    ids = []
    for kind_, _, names, b in blocks:
        col = "wall_id" if kind_ == "wall" else "pier_id"
        ids.append([names[col][i] for i in b.columns[col][1].tolist()])
    first = dict.fromkeys(m for members in ids for m in members)
    if not all(isinstance(m, str) for m in first):
        return None
    rank = {m: r for r, m in enumerate(sorted(first, key=geometry._natural))}  # stable: ties by first seen
    at = np.cumsum([b.cases for *_, b in blocks]) - [b.cases for *_, b in blocks]
    perms = [np.argsort(np.array([rank[m] for m in members]), kind="stable") for members in ids]
    return [
        _Writer(start[a : a + b.cases], perm, b.members)
        for a, perm, (*_, b) in zip(at.tolist(), perms, blocks, strict=True)
    ]


class _Writer:
    """Writes a block's values (given per case, member, case x member or once:
    `distribution.Block`) to a column at its cases' places (`start`), its members in the order
    `perm` (their places within a case). Cases at equal steps (a storey's rows one after
    another in the table) through a view of the column as cases x step; others by index."""

    def __init__(self, start: np.ndarray, perm: np.ndarray, members: int) -> None:
        self.start, self.members = start, members
        self.perm = None if np.array_equal(perm, np.arange(members)) else perm
        self.step = int(start[1] - start[0]) if len(start) > 1 else members
        self.strided = self.step >= members and bool((np.diff(start) == self.step).all())
        self.pad = self.step - members if self.strided else 0  # what the view's last row reaches past
        self.place = None if self.strided else start[:, None] + np.arange(members)[None, :]

    def __call__(self, dest: np.ndarray, base: int, how: str, v) -> None:
        """Write `v` to `dest` (a flat array; the column from `base`)."""
        B, perm = distribution.Block, self.perm
        if how == B.CASE:
            v = np.asarray(v)[:, None]
        elif how == B.MEMBER:
            v = np.asarray(v)[None, :] if perm is None else np.asarray(v)[perm][None, :]
        elif how == B.GRID and v is not None:
            v = np.asarray(v) if perm is None else np.asarray(v)[:, perm]
        if self.strided:
            at, cases = base + int(self.start[0]), len(self.start)
            dest[at : at + cases * self.step].reshape(cases, self.step)[:, : self.members] = v
        else:
            dest[base + self.place] = v


def _in_order(
    w: pd.DataFrame, p: pd.DataFrame, core_order: np.ndarray, order: np.ndarray, given: np.ndarray
) -> pd.DataFrame | None:
    """`pd.concat([w, p])` with `used`, `kind_order` and `core_order` added, taken in `order`:
    each column made once, in its final order (numbers written to their rows' final places,
    text taken once), not a concatenated table taken again (648 000 rows x 30 columns made
    twice at the L tower). The column types are those of the concatenation
    (found on one row of each side). None where a side is empty or a column's type differs
    between the sides (the concatenation then decides)."""
    if not len(w) or not len(p):
        return None
    n_w, n = len(w), len(w) + len(p)
    at = np.empty(n, dtype=np.intp)
    at[order] = np.arange(n)  # each row's final place
    sides = ((w, at[:n_w]), (p, at[n_w:]))
    template = pd.concat([w.iloc[:1], p.iloc[:1]], ignore_index=True)
    floats = [c for c in template.columns if template[c].dtype == np.float64]
    # the float columns as rows of one array (one allocation, as the block a concatenation
    # makes: many column-sized arrays left holes in the heap that later phases refilled slowly)
    block = dict(zip(floats, np.empty((len(floats), n)), strict=True))
    cols: dict[str, object] = {}
    for c in template.columns:
        dtype = template[c].dtype
        if isinstance(dtype, np.dtype) and dtype.kind in "fiu":
            if dtype.kind != "f" and not all(c in t for t, _ in sides):
                return None  # (a missing side's NaN would make it float)
            values = block[c] if c in block else np.empty(n, dtype=dtype)
            for t, there in sides:
                values[there] = t[c].to_numpy() if c in t else np.nan
            cols[c] = values
            continue
        if any(t[c].dtype != dtype for t, _ in sides if c in t):
            return None
        arrays = [t[c].array for t, _ in sides if c in t]
        if len(arrays) == 2:
            cols[c] = type(arrays[0])._concat_same_type(arrays).take(order)
        else:  # one side's column, blank (its type's NA) on the other side's rows
            t, there = next((t, there) for t, there in sides if c in t)
            pick = np.full(n, -1, dtype=np.intp)
            pick[there] = np.arange(len(t))
            cols[c] = t[c].array.take(pick, allow_fill=True)
    cols["used"] = results.text_column(np.isin(cols["row"], given), USED)
    cols["kind_order"] = np.repeat([0, 1], [n_w, n - n_w])[order]
    cols["core_order"] = core_order[order]
    return pd.DataFrame(cols, copy=False)


def _sorted_order(out: pd.DataFrame) -> np.ndarray:
    """The core-sharing rows' order by row, core, walls before piers, member in natural order:
    a stable sort on integer keys (what sort_values on these columns does, without its
    per-column factorising)."""
    keys = (_natural_rank(out.member.to_numpy()), out.kind_order.to_numpy(), out.core_order.to_numpy())
    return np.lexsort([*keys, out.row.to_numpy()])


def _layout_order(core: distribution.CoreSharing) -> tuple[np.ndarray, np.ndarray] | None:
    """`_sorted_order` of the walls-then-piers rows and their `core_order` column, by position
    from the layout `distribution.core_actions_to_piers` made them in (`CoreSharing.layout`):
    the rows of one core-actions row (a case) stand together, every case of a storey with the
    same members in the same order. So the order is: the cases sorted by row, core and kind
    (12 000 at the L tower, not 648 000 rows), each case's members in the natural order of
    their IDs, found once per storey. Rows, IDs and cores are read from the tables (at each
    case's or storey's first row), the rows checked against the layout. None where the layout
    is unknown or does not fit the tables' rows, does not decide the order (two cases of one
    row, core and kind: the sort interleaves their members) or an ID or core is not text."""
    if core.layout is None:
        return None
    sides = [
        _cases(core.walls, core.layout.walls, "wall_id", 0),
        _cases(core.piers, core.layout.piers, "pier_id", len(core.walls)),
    ]
    if sides[0] is None or sides[1] is None:
        return None
    row, label, start, size, block = (np.concatenate([getattr(c, k) for c in sides]) for k in _Cases.KEYS)
    kind = np.repeat([0, 1], [len(sides[0].row), len(sides[1].row)])
    block = block + np.repeat([0, len(sides[0].ids)], [len(sides[0].row), len(sides[1].row)])
    ids = sides[0].ids + sides[1].ids  # each block's member IDs
    first = dict.fromkeys(m for members in ids for m in members)  # in order of first appearance
    if not all(isinstance(c, str) for c in label) or not all(isinstance(m, str) for m in first):
        return None  # (a dictionary and factorize could tell other values apart differently)
    rank = {m: r for r, m in enumerate(sorted(first, key=geometry._natural))}  # stable: ties by first seen
    perms = [
        np.argsort(np.array([rank[m] for m in members], dtype=np.int64), kind="stable") for members in ids
    ]
    code = _first_seen_codes(label)  # the cores in order of first appearance over the rows
    cases = np.lexsort((kind, code, row))
    r, c, k = row[cases], code[cases], kind[cases]
    if ((r[1:] == r[:-1]) & (c[1:] == c[:-1]) & (k[1:] == k[:-1])).any():
        return None
    within = [perms[b] for b in block[cases]]
    order = np.repeat(start[cases], size[cases]) + (
        np.concatenate(within) if within else np.zeros(0, np.int64)
    )
    return np.repeat(code, size), order


@dataclass
class _Cases:
    """The cases of one side (walls or piers) of the core-sharing rows, for `_layout_order`:
    each case's row, core, first position in the walls-then-piers table, size and block (a
    storey), and each block's member IDs."""

    KEYS = ("row", "label", "start", "size", "block")
    row: np.ndarray
    label: np.ndarray
    start: np.ndarray
    size: np.ndarray
    block: np.ndarray
    ids: list


def _cases(table: pd.DataFrame, blocks: list[tuple[int, int]], member: str, offset: int) -> _Cases | None:
    """One side's cases (`_Cases`) from its table and its layout's blocks (cases, members),
    blocks without rows left out; None where the layout does not fit the table's rows."""
    counts, members = (np.array([b[i] for b in blocks], dtype=np.int64).reshape(-1) for i in (0, 1))
    if int((counts * members).sum()) != len(table):
        return None
    live = (counts > 0) & (members > 0)
    counts, members = counts[live], members[live]
    size = np.repeat(members, counts)
    start = np.cumsum(size) - size  # each case's first row in the table
    rows = table.row.to_numpy()
    if rows.dtype.kind not in "iu" or not np.array_equal(np.repeat(rows[start], size), rows):
        return None
    # each storey's IDs at its first case, all in one take (not a copy of the whole column)
    first = np.repeat(start[np.cumsum(counts) - counts], members)
    ids = table[member].array.take(
        first + np.arange(len(first)) - np.repeat(np.cumsum(members) - members, members)
    )
    ids = ids.tolist()
    at = np.cumsum(members) - members
    return _Cases(
        row=rows[start],
        label=np.asarray(table.core.array.take(start), dtype=object),
        start=start + offset,
        size=size,
        block=np.repeat(np.arange(len(counts)), counts),
        ids=[ids[a : a + m] for a, m in zip(at.tolist(), members.tolist(), strict=True)],
    )


def _first_seen(values: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """`pd.factorize(values, use_na_sentinel=False)`: codes numbered in order of first
    appearance, NaN a value of its own. Without a NaN, the sentinel factorize, which gives the
    same and takes a third of the time; where every value equals the first, no hashing."""
    if len(values) and (values == values[0]).all():  # one value (one core): nothing to hash
        return np.zeros(len(values), dtype=np.intp), values[:1]
    codes, distinct = pd.factorize(values)
    if (codes < 0).any():
        codes, distinct = pd.factorize(values, use_na_sentinel=False)
    return codes, distinct


def _first_seen_codes(values: np.ndarray) -> np.ndarray:
    return _first_seen(values)[0]


def _natural_rank(ids: np.ndarray) -> np.ndarray:
    """`geometry.natural_rank` of many rows of few IDs: the IDs numbered in order of first
    appearance (the order `pd.unique` gives), those few put in natural order (the same stable
    sort on the same sequence), each row's rank taken by its number."""
    codes, distinct = _first_seen(ids)
    order = sorted(range(len(distinct)), key=lambda i: geometry._natural(str(distinct[i])))
    rank = np.empty(len(distinct), dtype=np.int64)
    rank[order] = np.arange(len(distinct))
    return rank[codes]


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
