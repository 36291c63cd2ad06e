"""Command line: thin. Parses arguments, calls the library, prints, sets the exit code.

Exit codes: 0 done, 1 invalid input (nothing written), 2 file or usage problem,
3 with --strict when any member fails.
"""

from __future__ import annotations

import json
from collections.abc import Iterator
from contextlib import contextmanager
from enum import StrEnum
from pathlib import Path
from typing import Annotated

import typer
from lxml import etree

from xlcore import CAUTION, __version__, api, layout, parallel, pipeline, results
from xlcore.diagnostics import Defect, FileProblem, Findings, InputInvalid
from xlcore.progress import SILENT, Reporter
from xlcore.workbook.package import DAMAGE
from xlcore.workbook.tables import file_name
from xlcore.workbook.template import write_template

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    help="Reinforced-concrete core walls and piers, checked in your own workbook.",
)

EXIT_INVALID, EXIT_FILE, EXIT_FAILING, EXIT_DEFECT = 1, 2, 3, 4


class Detail(StrEnum):
    """`compute --detail`: which rows of the per-combination tables the workbook holds."""

    auto = "auto"
    governing = "governing"
    all = "all"


Workbook = Annotated[Path, typer.Argument(help="The .xlsx or .xlsm workbook.", show_default=False)]


def _err(msg: str) -> None:
    typer.echo(msg, err=True)


def _report(findings: Findings, limit: int = 200) -> None:
    for f in findings.errors[:limit]:
        _err(f"error   {f}")
    if len(findings.errors) > limit:
        _err(f"... and {len(findings.errors) - limit} more errors")
    for f in findings.warnings[:limit]:
        _err(f"warning {f}")


@contextmanager
def _exits(after_errors: str) -> Iterator[None]:
    """Map the library's refusals to exit codes: 1 invalid input, 2 file problem, 4 a defect of
    xlcore's own (an error in its checks is never reported as a damaged workbook)."""
    try:
        yield
    except FileProblem as exc:
        _err(f"error   {exc}")
        raise typer.Exit(EXIT_FILE) from None
    except Defect as exc:  # its cause may be a ValueError: not the file's fault, so not DAMAGE's message
        _err(f"error   {exc}; nothing was written")
        raise typer.Exit(EXIT_DEFECT) from None
    except DAMAGE + (etree.XMLSyntaxError,) as exc:  # a part found broken only when copied
        _err(f"error   the workbook package is damaged ({type(exc).__name__}: {exc}); nothing was written")
        raise typer.Exit(EXIT_FILE) from None
    except InputInvalid as exc:
        _report(exc.findings)
        _err(f"{len(exc.findings.errors)} error(s); {after_errors}")
        raise typer.Exit(EXIT_INVALID) from None


Quiet = Annotated[
    bool, typer.Option("--quiet", "-q", help="No progress display (it is shown only on a terminal).")
]


class _Display(Reporter):
    """Phases and counts on stderr, by rich; gone once the run ends."""

    def __init__(self, console) -> None:
        from rich.progress import (
            BarColumn,
            MofNCompleteColumn,
            Progress,
            SpinnerColumn,
            TextColumn,
            TimeElapsedColumn,
        )

        self.bar = Progress(
            SpinnerColumn(),
            TextColumn("{task.description}"),
            BarColumn(),
            MofNCompleteColumn(),
            TimeElapsedColumn(),
            console=console,
            transient=True,
        )
        self.task = None

    def begin(self, phase: str, total: int | None = None) -> None:
        self.end()
        self.task = self.bar.add_task(phase, total=total)

    def advance(self, done: int) -> None:
        if self.task is not None:
            self.bar.advance(self.task, done)

    def end(self) -> None:
        if self.task is not None:
            self.bar.remove_task(self.task)
            self.task = None

    @contextmanager
    def without_threads(self) -> Iterator[None]:
        """The display's refresh thread stopped while the worker processes are forked, started
        again after (the display stands still for those milliseconds). Where rich's live display
        is not as expected, nothing is stopped: the run is then serial (`parallel.can_fork`)."""
        live = getattr(self.bar, "live", None)
        thread = getattr(live, "_refresh_thread", None)
        if thread is None or not hasattr(thread, "stop"):
            yield
            return
        thread.stop()
        thread.join()
        live._refresh_thread = None
        try:
            yield
        finally:
            try:
                again = type(thread)(live, live.refresh_per_second)
                live._refresh_thread = again
                again.start()
            except Exception:  # noqa: BLE001 (a rich of another shape: the display stands still,
                live._refresh_thread = None  # the run goes on; it still ends and clears as before)


@contextmanager
def _progress(quiet: bool, console=None) -> Iterator[Reporter]:
    """A progress display on stderr when it is a terminal and not --quiet; else silence."""
    from rich.console import Console

    console = console or Console(stderr=True)
    if quiet or not console.is_terminal:
        yield SILENT
        return
    display = _Display(console)
    with display.bar:
        yield display


def _version(value: bool) -> None:
    if value:
        typer.echo(f"xlcore {__version__}")
        raise typer.Exit()


@app.callback()
def main(
    version: Annotated[
        bool | None,
        typer.Option("--version", callback=_version, is_eager=True, help="Print the version and exit."),
    ] = None,
) -> None:
    """xlcore: template -> fill in -> check -> compute, all in one workbook."""


@app.command()
def template(
    path: Annotated[Path, typer.Argument(help="Where to write the new workbook (.xlsx).")],
    example: Annotated[bool, typer.Option("--example", help="Fill it with the demo building.")] = False,
    overwrite: Annotated[bool, typer.Option("--overwrite", help="Replace an existing file.")] = False,
) -> None:
    """Write a blank input workbook (or the demo building)."""
    if path.exists() and not overwrite:
        _err(f"{path} exists; choose another name or pass --overwrite")
        raise typer.Exit(EXIT_FILE)
    if path.suffix.lower() != ".xlsx":
        _err(f"{path}: expected a file name ending in .xlsx")
        raise typer.Exit(EXIT_FILE)
    _folder_must_exist(path)
    write_template(path, example=example)
    typer.echo(f"wrote {path}" + (" (demo building)" if example else ""))


def _folder_must_exist(path: Path, create: bool = False) -> None:
    """A file where a folder should be cannot hold the new file; a missing folder is refused
    unless it will be created (for --output): for `template` it is more often a typing slip."""
    for up in path.parents:
        if up.exists() or up == up.parent:
            if not up.is_dir():
                _err(f"error   {path}: {up} is a file, not a folder; choose another place")
                raise typer.Exit(EXIT_FILE)
            break
    if not create and not path.parent.is_dir():
        _err(f"error   {path}: no such folder {path.parent}; create it first or choose another place")
        raise typer.Exit(EXIT_FILE)


Json = Annotated[
    bool,
    typer.Option(
        "--json",
        help="Print one JSON object on stdout (for scripts and CI); messages stay on stderr.",
    ),
]


def _emit(obj: dict) -> None:
    """The one JSON object of --json, on stdout."""
    typer.echo(json.dumps(obj, indent=2, default=str))


@contextmanager
def _json_exits(as_json: bool, base: dict) -> Iterator[None]:
    """With --json, a refusal still prints one object (the findings or the file problem, and
    the exit code) before the exit code is set; messages go to stderr as without it."""
    if not as_json:
        yield
        return
    try:
        yield
    except InputInvalid as exc:
        _emit(base | {"valid": False, "exit_code": EXIT_INVALID, "findings": _records(exc.findings)})
        raise
    except Defect as exc:  # exit 4 by _exits
        _emit(base | {"exit_code": EXIT_DEFECT, "error": str(exc)})
        raise
    except (FileProblem, etree.XMLSyntaxError, *DAMAGE) as exc:  # exit 2 by _exits
        _emit(base | {"exit_code": EXIT_FILE, "error": str(exc)})
        raise


def _records(findings: Findings) -> list[dict]:
    return [api.finding_record(f) for f in findings]


@app.command()
def check(path: Workbook, quiet: Quiet = False, as_json: Json = False) -> None:
    """Validate the inputs and print a summary; tell whether results are stale."""
    base = {"file": str(path)}
    with (
        _exits("fix them and run again"),
        _json_exits(as_json, base),
        _progress(quiet or as_json) as reporter,
    ):
        inputs = api.check(path, reporter)
    findings = inputs.findings
    if as_json:
        _report(findings)
        _emit(
            base
            | {
                "valid": True,
                "exit_code": 0,
                "counts": inputs.counts(),
                "results": inputs.results_state,
                "findings": _records(findings),
            }
        )
        return
    building = inputs.building
    geom = pipeline.geometry.derive(building.storeys, building.walls, building.openings, building.end_zones)
    acts = building.member_actions
    per_storey = geom.piers.groupby("storey", sort=False).size()
    typer.echo(f"{path.name}: valid")
    s = building.settings
    also = f" (also checked to {s.compare_standard}: compute runs twice)" if s.compare_standard else ""
    typer.echo(f"  standard      {s.standard}{also}")
    typer.echo(
        f"  storeys       {len(building.storeys)} ({building.storeys[0].name} to {building.storeys[-1].name})"
    )
    typer.echo(
        f"  walls         {len({w.wall_id for w in building.walls})} "
        f"({len(building.walls)} rows), openings {len(building.openings)} rows, "
        f"end zones {len(building.end_zones)} rows"
    )
    if building.cores != [""]:
        walls_of = {c: len({w.wall_id for w in building.walls if w.core == c}) for c in building.cores}
        typer.echo(
            f"  cores         {len(walls_of)}, each its own section ("
            + ", ".join(f"{c}: {n} walls" for c, n in walls_of.items())
            + ")"
        )
    typer.echo(
        f"  piers/storey  {per_storey.min()} to {per_storey.max()} "
        f"({len(geom.piers)} storey x pier cases), lintels {len(geom.lintels)}"
    )
    core = building.core_actions
    combos = set(acts.combination.dropna()) | set(core.combination.dropna())
    typer.echo(
        f"  combinations  {len(combos)} over both action sheets "
        f"({acts.combination.nunique()} on {layout.MEMBER_ACTIONS.name}, "
        f"{core.combination.nunique()} on {layout.CORE_ACTIONS.name})"
    )
    typer.echo(
        f"  action rows   {len(acts)} on {layout.MEMBER_ACTIONS.name}, "
        f"{len(core)} on {layout.CORE_ACTIONS.name}"
    )
    typer.echo("  members derived per storey (IDs to map analysis output to):")
    lintels_at = geom.lintels.groupby("storey", sort=False).lintel_id.apply(list).to_dict()
    for storey, ids in geom.piers.groupby("storey", sort=False).pier_id.apply(list).items():
        lin = lintels_at.get(storey, [])
        typer.echo(f"    {storey}: piers {', '.join(ids)}" + (f"; lintels {', '.join(lin)}" if lin else ""))
    _report(findings)
    typer.echo(f"  warnings      {len(findings.warnings)}")
    typer.echo("  results       " + _STATE_TEXT[inputs.results_state])


_STATE_TEXT = {
    api.NO_RESULTS: "none yet (run xlcore compute)",
    api.UP_TO_DATE: "up to date",
    api.STALE: "STALE: inputs changed since the last compute",
}


@app.command()
def compute(
    path: Workbook,
    output: Annotated[
        Path | None, typer.Option("--output", "-o", help="Write into this copy instead of in place.")
    ] = None,
    force: Annotated[
        bool, typer.Option("--force", help="Write even if a lock file says the workbook is open.")
    ] = False,
    overwrite: Annotated[
        bool,
        typer.Option(
            "--overwrite",
            help="Replace an existing --output file, or a read-only workbook (a backup is kept).",
        ),
    ] = False,
    strict: Annotated[bool, typer.Option("--strict", help="Exit with 3 when any member fails.")] = False,
    detail: Annotated[
        Detail,
        typer.Option(
            "--detail",
            help="Rows per combination table: 'all' every row; 'governing' per storey x member x "
            "check the worst combination plus every failing row; 'auto' every row up to "
            f"{results.DETAIL_ROW_LIMIT:,} rows per table, governing above. Rows left out of the "
            "workbook are in NAME.xlcore-tables/ beside it (Parquet).",
        ),
    ] = Detail.auto,
    standards: Annotated[
        str | None,
        typer.Option(
            "--standards",
            help="Check to two standards and compare them, e.g. AS3600,ACI318 (names or short "
            "forms, any case: " + ", ".join(layout.STANDARDS) + "): the result sheets are the "
            f"Project's design standard's, plus '{results.COMPARISON_SHEET}'. One name: compare "
            "the Project's standard with it. 'none': no comparison. Default: the Project's "
            "'Also check to' setting.",
            show_default=False,
        ),
    ] = None,
    workers: Annotated[
        int | None,
        typer.Option(
            "--workers",
            help="Processes for the advice search and the core checks (the result tables do not "
            "depend on it): 1 runs them in this process alone. Default: the CPUs this process "
            f"may use, at most {parallel.MAX_WORKERS}. Linux only (elsewhere one process).",
            show_default=False,
        ),
    ] = None,
    quiet: Quiet = False,
    as_json: Json = False,
) -> None:
    """Validate, run every check, and write the result sheets into the workbook."""
    target = output or path
    base = {"file": str(path), "output": str(target), "files_written": []}
    if workers is not None and workers < 1:
        _usage(f"--workers must be 1 or more; got {workers}", as_json, base)
    try:
        wanted = api.parse_standards(standards)
    except api.UsageError as exc:
        _usage(str(exc), as_json, base)
    if target.suffix.lower() != path.suffix.lower():
        _err(f"{target}: expected the same file type as {path.name} ({path.suffix})")
        if as_json:
            _emit(base | {"exit_code": EXIT_FILE, "error": "output of another file type"})
        raise typer.Exit(EXIT_FILE)
    try:
        _folder_must_exist(target, create=True)
    except typer.Exit:
        if as_json:
            _emit(base | {"exit_code": EXIT_FILE, "error": f"{target}: no folder to write into"})
        raise
    try:
        with (
            _exits("nothing was written"),
            _json_exits(as_json, base),
            _progress(quiet or as_json) as reporter,
        ):
            run, backup = api.compute_locked(
                path,
                target,
                force=force,
                overwrite=overwrite,
                reporter=reporter,
                detail=detail.value,
                standards=wanted,
                workers=parallel.auto_workers() if workers is None else workers,
            )
    except api.UsageError as exc:
        _usage(str(exc) + "; nothing was written", as_json, base)
    findings = run.findings
    _report(findings)
    outcome = run.outcome
    if outcome.full_tables:
        why = (
            f"over {results.DETAIL_ROW_LIMIT:,} rows (--detail auto: a bigger workbook is slow to open)"
            if detail is Detail.auto
            else "(--detail governing)"
        )
        _err(
            f"note    {len(outcome.full_tables)} tables {why}: the workbook holds their governing "
            f"rows only; every row is in {api.tables_folder(target)}/ (Parquet: "
            + ", ".join(file_name(t.name) for t in outcome.full_tables)
            + "); --detail all writes every row into the workbook"
        )
    code = EXIT_FAILING if strict and run.failing else 0
    if as_json:
        _emit(
            base
            | {
                "valid": True,
                "exit_code": code,
                "counts": run.counts(),
                "worst": run.worst(),
                "findings": _records(findings),
                "files_written": [str(p) for p in run.written],
                "sheets": [sh.name for sh in run.outcome.sheets],
                "stamp": run.stamp,
            }
            | _comparison_json(run)
        )
        if code:
            raise typer.Exit(code)
        return
    s = outcome.summary
    typer.echo(
        f"{target.name}: {len(outcome.shear)} shear rows; pier x storey cases: "
        f"{(s.status == results.PASS).sum()} pass, {(s.status == results.FAIL).sum()} fail, "
        f"{(s.status == results.NOT_CHECKED).sum()} not checked"
    )
    checked = s[s.status != results.NOT_CHECKED]
    if len(checked):
        w = checked.loc[checked.util.idxmax()]
        typer.echo(
            f"worst: {w.pier_id} at {w.storey}, {w.combination}, utilisation {w.util:.3f} ({w.clause})"
        )
    cmp = outcome.comparison
    if cmp is not None:
        for label, text in cmp.lines:  # worst under each standard, where they differ most
            if label.startswith("Worst to ") or label == "Differ most":
                typer.echo(f"{label}: {text}")
    typer.echo(f"results written to sheets: {', '.join(sh.name for sh in outcome.sheets)}")
    if backup is not None:
        typer.echo(f"previous version of {target.name} kept as {backup}")
    typer.echo(f"note: {CAUTION}")
    if code:
        raise typer.Exit(code)


def _usage(message: str, as_json: bool, base: dict) -> None:
    """A usage problem (exit 2): the message on stderr, and with --json one object on stdout."""
    _err(f"error   {message}")
    if as_json:
        _emit(base | {"exit_code": EXIT_FILE, "error": message})
    raise typer.Exit(EXIT_FILE)


def _comparison_json(run: api.Run) -> dict:
    """`--json` with a second standard: the comparison's findings and every row, as plain data."""
    facts = run.comparison_facts
    if facts is None:
        return {"comparison": None}
    table = run.outcome.comparison.table
    cols = ["storey", "pier_id", "check", "u_a", "status_a", "clause_a", "combination_a"]
    cols += ["u_b", "status_b", "clause_b", "combination_b", "ratio", "note"]
    rows = [
        {k: (None if isinstance(v, float) and v != v else v) for k, v in zip(cols, r, strict=True)}
        for r in table[cols].itertuples(index=False)
    ]
    return {"comparison": facts | {"columns": cols, "rows": rows}}


@app.command()
def report(
    path: Workbook,
    output: Annotated[
        Path | None,
        typer.Option(
            "--output", "-o", help="Write the PDF here instead of NAME-report.pdf beside the workbook."
        ),
    ] = None,
    stale_ok: Annotated[
        bool,
        typer.Option(
            "--stale-ok",
            help="Report even when the result sheets are stale (of the inputs as they are now).",
        ),
    ] = False,
    quiet: Quiet = False,
) -> None:
    """Write the calculation report (PDF) of a computed workbook, beside it."""
    from xlcore.report import make_report

    with _exits("no report was written"), _progress(quiet) as reporter:
        rep = make_report(path, output, stale_ok=stale_ok, reporter=reporter)
    typer.echo(f"wrote {rep.path} ({rep.pages} pages)" + (" from STALE results" if rep.stale else ""))
    typer.echo(f"note: {CAUTION}")
