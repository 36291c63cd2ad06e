"""The Python API, for notebooks and scripts (reachable as `import xlcore`).

    import xlcore
    run = xlcore.compute("tower.xlsx")          # read, validate, run every check (writes nothing)
    run.tables["summary"]                        # result tables as pandas DataFrames
    run.write()                                  # result sheets into the workbook (or a copy)
    xlcore.read_results("tower.xlsx")["shear"]   # what a computed workbook holds

Invalid input raises `xlcore.InputInvalid` carrying every finding (`exc.findings`, each with
its Sheet!Cell; `str(exc)` lists them), the same findings the command line prints; a file that
cannot be used raises `xlcore.FileProblem`. The command line calls these same functions.
"""

from __future__ import annotations

import datetime as dt
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path

import pandas as pd

from xlcore import CAUTION, geometry, layout, pipeline, results, tables
from xlcore.diagnostics import Defect, FileProblem, Finding, Findings, InputInvalid, own_defects  # noqa: F401  (API)
from xlcore.model import Building
from xlcore.progress import SILENT, Reporter
from xlcore.results.sheets import DETAIL_MODES
from xlcore.workbook.reader import read_workbook, stored_result_sheets, stored_stamp
from xlcore.workbook.tables import folder_for as tables_folder
from xlcore.workbook.writer import check_target, workbook_lock, write_results

NO_RESULTS, UP_TO_DATE, STALE = "none", "up to date", "stale"


@dataclass
class Inputs:
    """A workbook's validated inputs: the building, the warnings, and the state of its results."""

    path: Path
    building: Building
    findings: Findings  # warnings only: errors raise InputInvalid
    results_state: str  # NO_RESULTS, UP_TO_DATE or STALE (input hash against the stamp)
    stamp: dict[str, str] | None  # the lines the last compute wrote above the summary

    def counts(self) -> dict[str, int]:
        """What `check` prints: storeys, walls, piers, lintels, combinations, action rows."""
        b = self.building
        geom = geometry.derive(b.storeys, b.walls, b.openings, b.end_zones)
        acts, core = b.member_actions, b.core_actions
        per_storey = geom.piers.groupby("storey", sort=False).size()
        return {
            "storeys": len(b.storeys),
            "walls": len({w.wall_id for w in b.walls}),
            "wall_rows": len(b.walls),
            "opening_rows": len(b.openings),
            "pier_storey_cases": len(geom.piers),
            "piers_per_storey_min": int(per_storey.min()) if len(per_storey) else 0,
            "piers_per_storey_max": int(per_storey.max()) if len(per_storey) else 0,
            "lintels": len(geom.lintels),
            "combinations": len(set(acts.combination.dropna()) | set(core.combination.dropna())),
            "member_action_rows": len(acts),
            "core_action_rows": len(core),
        }


def check(path: str | Path, reporter: Reporter = SILENT) -> Inputs:
    """Read and validate a workbook; raises InputInvalid (every finding) or FileProblem."""
    path = Path(path)
    reporter.begin("reading the input sheets")
    raw = read_workbook(path)
    reporter.begin("checking the inputs")
    with own_defects("checking the inputs"):
        building, findings = pipeline.build(raw)
    reporter.end()
    stamp = stored_stamp(path)
    stored = None if stamp is None else stamp.get(results.STAMP_HASH_LABEL)
    state = NO_RESULTS if stored is None else UP_TO_DATE if stored == raw.input_hash else STALE
    return Inputs(path, building, findings, state, stamp)


@dataclass
class Run:
    """One computed run: every result table, by name, ready to write."""

    path: Path
    outcome: pipeline.Outcome
    written: list[Path] = field(default_factory=list)

    @property
    def sheets(self) -> dict[str, results.ResultSheet]:
        """Result sheets by table name ('summary', 'shear', ...), tables with column keys."""
        return tables.by_name(self.outcome.sheets)

    @property
    def tables(self) -> dict[str, pd.DataFrame]:
        """Every result table as its sheet shows it (headers with units), by table name."""
        return {name: tables.sheet_view(sh) for name, sh in self.sheets.items()}

    @property
    def findings(self) -> Findings:
        return self.outcome.findings

    @property
    def stamp(self) -> dict[str, str]:
        """Version, standard, time and input hash, as written above every result table."""
        keep = ("Project", "Standard", "xlcore version", "Computed (UTC)", results.STAMP_HASH_LABEL)
        lines = dict(self.outcome.sheets[0].preamble)
        return {k: str(lines[k]) for k in keep if k in lines}

    @property
    def failing(self) -> int:
        return self.outcome.failing

    @property
    def comparison(self) -> pd.DataFrame | None:
        """The standards compared (a second standard named by `compute(standards=...)` or the
        'Also check to' setting), as its sheet shows it: per storey x pier x check the
        utilisation, status, governing clause and worst combination under each standard and
        their ratio; None without a second standard. The lines above it (worst under each,
        where they differ most) are `comparison_facts`."""
        cmp = self.outcome.comparison
        if cmp is None:
            return None
        return self.tables[tables.short(results.COMPARISON_SHEET)]

    @property
    def comparison_facts(self) -> dict[str, object] | None:
        """The comparison's findings as plain data: per side ('first', 'second') the standard,
        its worst case and failing count; 'differ_most'; 'per_check' ratio ranges."""
        cmp = self.outcome.comparison
        return None if cmp is None else cmp.facts

    def worst(self) -> list[dict[str, object]]:
        """Each check's worst case: utilisation, status, where, how many rows over 1.0."""
        return tables.worst_cases(self.sheets)

    def counts(self) -> dict[str, int]:
        s = self.outcome.summary
        return {
            "pier_storey_cases": len(s),
            "pass": int((s.status == results.PASS).sum()),
            "fail": int((s.status == results.FAIL).sum()),
            "not_checked": int((s.status == results.NOT_CHECKED).sum()),
            "rows_checked": len(self.outcome.shear),
        }

    def write(
        self,
        output: str | Path | None = None,
        overwrite: bool = False,
        force: bool = False,
        reporter: Reporter = SILENT,
    ) -> Path | None:
        """Write the result sheets into the workbook (or into `output`), atomically, keeping the
        previous file as a backup beside it; returns that backup's path when one was kept.
        Refusals as on the command line (lock files, an existing copy, read-only), as
        FileProblem, before anything is written."""
        target = Path(output) if output is not None else self.path
        target.parent.mkdir(parents=True, exist_ok=True)
        backup = write_results(
            self.path, target, self.outcome.sheets, force=force, reporter=reporter, overwrite=overwrite
        )
        self.written = [target] + ([backup] if backup is not None else [])
        return backup


class UsageError(ValueError):
    """A request that cannot be met as asked (e.g. an unknown standard's name): exit code 2."""


def parse_standards(text: str | Sequence[str] | None) -> list[str] | None:
    """Standards named by the user ('AS3600,ACI318', or a list of names) as `layout.STANDARDS`
    names, short forms and any case accepted; None for None (the Project setting decides), []
    for '' or 'none' (no comparison). UsageError naming the valid values otherwise."""
    if text is None:
        return None
    items = text.split(",") if isinstance(text, str) else list(text)
    items = [str(x).strip() for x in items if str(x).strip()]
    if not items or (len(items) == 1 and items[0].lower() == "none"):
        return []
    out = []
    for x in items:
        name = layout.standard_named(x)
        if name is None:
            expected = layout.standard_forms()
            raise UsageError(f"unknown design standard {x!r}; expected one or two of {expected}")
        out.append(name)
    if len(out) > 2:
        raise UsageError(f"{len(out)} standards named ({', '.join(out)}); expected at most two")
    return out


def second_standard(building: Building, standards: Sequence[str] | None) -> str | None:
    """The standard to compare the Project's with: from `standards` where given (one name: the
    second; two: the Project's standard and the other, in either order; the same name twice
    compares a standard with itself), else the 'Also check to' setting; None for none."""
    own = building.settings.standard
    if standards is None:
        return building.settings.compare_standard or None
    names = [layout.standard_named(x) or x for x in standards]
    if not names:
        return None
    if len(names) == 1:
        return names[0]
    if own not in names:
        raise UsageError(
            f"the standards named ({', '.join(names)}) leave out the Project's design standard "
            f"{own}: its result sheets are the ones written; name it and one other, or one other alone"
        )
    rest = list(names)
    rest.remove(own)
    return rest[0]


def compute(
    path: str | Path,
    now: dt.datetime | None = None,
    reporter: Reporter = SILENT,
    detail: str = "all",
    standards: str | Sequence[str] | None = None,
    workers: int = 1,
) -> Run:
    """Read, validate and run every check; nothing is written until `Run.write`. `now` sets the
    time in the stamp (default: the present). A `detail` other than 'all' is for the command
    line's path (`compute_locked`), which cuts the tables (`pipeline.select_detail`) before
    writing; `Run.write` writes every row. `standards` ('AS3600,ACI318', a list, '' for none;
    default: the Project's 'Also check to' setting) adds a second standard: every check run to
    it too, and the two compared (`Run.comparison`); see `second_standard`. `workers`: the
    processes the advice search and the core checks may share (`pipeline.compute`; the tables
    do not depend on it); serial by default, as a library call inside another program should
    not fork unasked (the command line asks for the CPUs it may use)."""
    path = Path(path)
    if isinstance(workers, bool) or not isinstance(workers, int) or workers < 1:
        raise UsageError(f"workers must be a whole number, 1 or more; got {workers!r}")
    wanted = parse_standards(standards)
    if detail not in DETAIL_MODES:  # a caller's slip, refused before the checks (not a Defect)
        raise UsageError(f"detail must be one of {', '.join(DETAIL_MODES)}; got {detail!r}")
    building, findings = pipeline.load(path, reporter)
    second = second_standard(building, wanted)
    with own_defects("running the checks"):
        outcome = pipeline.compute_compared(
            building, findings, second, now=now, reporter=reporter, detail=detail, workers=workers
        )
    return Run(path, outcome)


def compute_locked(
    path: Path,
    target: Path,
    force: bool = False,
    overwrite: bool = False,
    reporter: Reporter = SILENT,
    detail: str = "auto",
    standards: str | Sequence[str] | None = None,
    workers: int = 1,
) -> tuple[Run, Path | None]:
    """Compute and write under the workbook's own lock, taken before reading, so a second
    compute of the same file refuses before it works (what the command line does). `detail`
    as `pipeline.select_detail`: rows left out of the workbook go to Parquet beside it."""
    from contextlib import nullcontext

    with workbook_lock(target) if target.parent.is_dir() else nullcontext():
        check_target(path, target, force=force, overwrite=overwrite)
        run = compute(path, reporter=reporter, detail=detail, standards=standards, workers=workers)
        with own_defects("choosing the rows to write"):
            pipeline.select_detail(run.outcome, detail, tables_folder(target).name)
        target.parent.mkdir(parents=True, exist_ok=True)
        backup = write_results(
            path,
            target,
            run.outcome.sheets,
            force=force,
            reporter=reporter,
            overwrite=overwrite,
            tables=run.outcome.full_tables,
        )
    run.written = [target] + ([backup] if backup is not None else []) + _parquet(run, target)
    return run, backup


def _parquet(run: Run, target: Path) -> list[Path]:
    """The full tables written beside the workbook as Parquet, if any."""
    from xlcore.workbook.tables import file_name

    folder = tables_folder(target)
    return [folder / file_name(t.name) for t in run.outcome.full_tables]


def read_results(path: str | Path) -> dict[str, pd.DataFrame]:
    """The result tables a computed workbook holds, by table name ('summary', 'shear', ...),
    as their sheets show them; each DataFrame's `attrs['lines']` holds the lines above its
    table (the stamp: version, time, input hash). Empty before the first compute."""
    out = {}
    for name, sh in stored_result_sheets(Path(path)).items():
        df = sh.table
        df.attrs["lines"] = sh.lines
        out[tables.short(name)] = df
    return out


def finding_record(f: Finding) -> dict[str, object]:
    """A finding as plain data: severity, Sheet!Cell, sheet, cell, message."""
    return {"severity": f.severity, "where": f.where, "sheet": f.sheet, "cell": f.cell, "message": f.message}


__all__ = [
    "CAUTION",
    "FileProblem",
    "InputInvalid",
    "Inputs",
    "Run",
    "UsageError",
    "check",
    "compute",
    "read_results",
]
