"""The command line: exit codes, output, and compute on the bundled sample read back."""

from pathlib import Path

import openpyxl
import pytest
from conftest import column_letter as col
from conftest import edit
from typer.testing import CliRunner

from xlcore import layout, pipeline, results
from xlcore.cli import app

runner = CliRunner()
SAMPLE = Path(__file__).resolve().parents[1] / "sample_workbooks" / "harbourview-lane-demo.xlsx"


def test_version():
    r = runner.invoke(app, ["--version"])
    assert r.exit_code == 0 and r.output.startswith("xlcore ")


def test_template_writes_and_refuses_overwrite(tmp_path):
    p = tmp_path / "new.xlsx"
    assert runner.invoke(app, ["template", str(p)]).exit_code == 0
    assert p.exists()
    r = runner.invoke(app, ["template", str(p)])
    assert r.exit_code == 2 and "exists" in r.output
    assert runner.invoke(app, ["template", str(p), "--overwrite", "--example"]).exit_code == 0


def test_check_summary_of_sample():
    r = runner.invoke(app, ["check", str(SAMPLE)])
    assert r.exit_code == 0, r.output
    assert "storeys       15 (GF to L14)" in r.output
    assert "combinations  8" in r.output
    assert "cores         2, each its own section (lift: 5 walls, stair: 3 walls)" in r.output


@pytest.mark.parametrize(
    "content,name,gist",
    [
        (None, "missing.xlsx", "not found"),
        (b"", "empty.xlsx", "not an .xlsx"),
        (b"name,value\n1,2\n", "table.xlsx", "not an .xlsx"),
        (b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1" + b"\0" * 504, "old.xls", "encrypted"),
    ],
)
def test_file_problems_exit_2(tmp_path, content, name, gist):
    p = tmp_path / name
    if content is not None:
        p.write_bytes(content)
    for cmd in ("check", "compute"):
        r = runner.invoke(app, [cmd, str(p)])
        assert r.exit_code == 2, r.output
        assert gist in r.output


def test_usage_error_exits_2():
    assert runner.invoke(app, ["compute"]).exit_code == 2
    assert runner.invoke(app, ["frobnicate"]).exit_code == 2


def test_compute_sample_and_read_results_back(tmp_path):
    out = tmp_path / "out.xlsx"
    r = runner.invoke(app, ["compute", str(SAMPLE), "--output", str(out)])
    assert r.exit_code == 0, r.output
    wb = openpyxl.load_workbook(out, read_only=True)
    summary = [row for row in wb[results.SUMMARY_SHEET].iter_rows(values_only=True)]
    at = [c.key for c in results.SUMMARY_COLUMNS].index("status")
    statuses = [row[at] for row in summary[summary.index(next(r for r in summary if r[0] == "Storey")) + 1 :]]
    assert len(statuses) == 164  # 15 storeys: GF has 10 piers, L1-L14 have 11 each
    passing, failing = statuses.count(results.PASS), statuses.count(results.FAIL)
    assert f"{passing} pass, {failing} fail, 0 not checked" in r.output
    assert {results.SUMMARY_SHEET, results.SHEAR_SHEET, results.MEMBERS_SHEET} <= set(wb.sheetnames)
    rows = list(wb[results.SHEAR_SHEET].iter_rows(values_only=True))
    head = next(i for i, row in enumerate(rows) if row[0] == "Storey")
    header = rows[head]
    table = [dict(zip(header, row, strict=False)) for row in rows[head + 1 :]]
    assert len(table) == 1312
    first = next(row for row in table if (row["Storey"], row["Pier"]) == ("GF", "LiftS-1"))
    # Demo storey GF, pier LiftS-1 (beside the car 1 door): Lw 950, tw 250, f'c 50, fsy 500,
    # N12 @ 200 x 2 horizontal -> rho_h = 2 x 113.097 / (200 x 250) = 0.0045239 (hand evaluation).
    # Hw = overall wall height 4.35 + 14 x 3.2 = 49.15 m, Hw/Lw = 51.7 > 1: Eq (2) gives
    # (0.05 + 0.1 / 50.7) sqrt(f'c) = 0.052 sqrt(f'c), below the floor -> Vuc = 0.17 x sqrt(50)
    # x 0.8 x 950 x 250 = 228.4 kN; Vus = 0.0045239 x 500 x 190 000 = 429.8 kN;
    # phi Vu = 0.7 x 658.2 = 460.7 kN (Cl 11.6).
    assert (first["Storey"], first["Pier"]) == ("GF", "LiftS-1")
    assert first["Concrete part [kN]"] == pytest.approx(228.40, abs=0.01)
    assert first["Steel part [kN]"] == pytest.approx(429.77, abs=0.01)
    assert first["Design capacity [kN]"] == pytest.approx(460.72, abs=0.01)
    assert first["Governing clause"] == "Cl 11.6.3 min 0.17 sqrt(f'c)"
    assert "= 460.7 kN" in first["Design capacity working"]
    for row in table:
        capacity = row["Design capacity [kN]"]
        assert row["Utilisation"] == pytest.approx(abs(row["V* [kN]"]) / capacity, abs=1e-9)
    # and check now says the results are current; an input edit makes them stale
    assert "up to date" in runner.invoke(app, ["check", str(out)]).output
    edit(out, {(layout.WALLS.name, f"{col(layout.WALLS, 'fc')}2"): 40})
    assert "STALE" in runner.invoke(app, ["check", str(out)]).output


def test_strict_exit_3_when_a_pier_fails(demo_book):
    a = layout.MEMBER_ACTIONS
    b, _ = pipeline.load(demo_book)
    row = b.member_actions[(b.member_actions.member == "LiftS-1") & (b.member_actions.combination == "1.35G")]
    row = int(row[row.storey == "GF"].row.iloc[0])
    edit(demo_book, {(a.name, f"{col(a, 'v')}{row}"): 5000.0})  # GF LiftS-1 far beyond 460.7 kN
    r = runner.invoke(app, ["compute", str(demo_book), "--strict"])
    assert r.exit_code == 3, r.output
    assert "worst: LiftS-1 at GF, 1.35G" in r.output
    r = runner.invoke(app, ["compute", str(demo_book)])
    assert r.exit_code == 0  # failing members are results, not errors


def test_lock_file_exit_2_with_advice(demo_book):
    demo_book.with_name(f"~${demo_book.name}").write_bytes(b"x")
    r = runner.invoke(app, ["compute", str(demo_book)])
    assert r.exit_code == 2 and "--force" in r.output
    assert runner.invoke(app, ["compute", str(demo_book), "--force"]).exit_code == 0


class Recorder:
    """A reporter that keeps what it hears."""

    def __init__(self):
        self.phases: list[tuple[str, int | None]] = []
        self.done: dict[str, int] = {}

    def begin(self, phase, total=None):
        self.phases.append((phase, total))
        self.done[phase] = 0

    def advance(self, done):
        self.done[self.phases[-1][0]] += done

    def end(self):
        pass


def test_progress_hears_every_phase_and_every_result_row(demo_book):
    from xlcore import pipeline
    from xlcore.workbook.writer import write_results

    rec = Recorder()
    b, f = pipeline.load(demo_book, rec)
    outcome = pipeline.compute(b, f, reporter=rec)
    write_results(demo_book, demo_book, outcome.sheets, reporter=rec)
    names = [p for p, _ in rec.phases]
    assert names[:2] == ["reading the input sheets", "checking the inputs"]
    assert any(p.startswith("cheapest fixes") for p in names)
    checks = next(p for p in rec.phases if p[0].startswith("shear, axial"))
    assert checks[1] == len(outcome.shear) == rec.done[checks[0]]  # pier cases
    writing, rows = rec.phases[-1]
    assert writing.startswith("writing") and rows == sum(len(s.table) for s in outcome.sheets)
    assert rec.done[writing] == rows


def test_progress_display_on_a_terminal_only(demo_book):
    import io

    from rich.console import Console

    from xlcore import cli, pipeline

    screen = io.StringIO()
    with cli._progress(False, Console(file=screen, force_terminal=True, width=100)) as reporter:
        assert isinstance(reporter, cli._Display)
        pipeline.compute(*pipeline.load(demo_book, reporter), reporter=reporter)
    assert "sharing actions to walls and piers" in screen.getvalue()
    with cli._progress(True, Console(file=io.StringIO(), force_terminal=True)) as reporter:
        assert reporter is cli.SILENT  # --quiet
    with cli._progress(False, Console(file=io.StringIO(), force_terminal=False)) as reporter:
        assert reporter is cli.SILENT  # output not to a terminal (a pipe, a log, CI)
    r = runner.invoke(app, ["compute", str(demo_book), "--quiet"])
    assert r.exit_code == 0 and "sharing actions" not in r.output


def test_check_counts_combinations_over_both_sheets_and_lists_members_per_storey():
    out = runner.invoke(app, ["check", str(SAMPLE)]).output
    assert "over both action sheets" in out
    assert "on Member actions" in out and "on Core actions" in out
    # the demo's GF has the lift-door lintels; pier IDs are those the piers sheet uses
    gf = next(line for line in out.splitlines() if line.strip().startswith("GF:"))
    assert "LiftS-1" in gf and "lintels LiftS-L1" in gf


@pytest.mark.parametrize("where", ["checks", "validation"])
def test_a_defect_in_xlcore_is_not_called_a_damaged_workbook(demo_book, monkeypatch, where):
    """An error raised by xlcore's own code (here a ValueError planted in the shear check or in
    validation) was reported as 'the workbook package is damaged', sending the engineer to a
    sound file. It is named a defect of xlcore, exit code 4, and nothing is written."""
    import json

    def broken(*args, **kwargs):
        raise ValueError("planted fault")

    if where == "checks":
        monkeypatch.setattr(pipeline, "check_pier_shear", broken)
    else:
        monkeypatch.setattr(pipeline, "build", broken)
    before = demo_book.read_bytes()
    r = runner.invoke(app, ["compute", str(demo_book), "--json"])
    assert r.exit_code == 4, r.output
    assert "defect of its own" in r.stderr and "planted fault" in r.stderr, r.stderr
    assert "damaged" not in r.stderr
    assert json.loads(r.stdout)["exit_code"] == 4
    assert demo_book.read_bytes() == before
