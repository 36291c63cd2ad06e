"""The Python API (`import xlcore`) and the `--json` output of `check` and `compute` (issue 15 §3).

References outside the code under test: the workbook's own result cells as a spreadsheet
program stores them (read back with python-calamine), the findings the command line prints,
and json.loads for the output format."""

from __future__ import annotations

import json
import shutil

import pandas as pd
import pytest
from conftest import column_letter, edit
from typer.testing import CliRunner

import xlcore
from xlcore import layout
from xlcore.cli import app


@pytest.fixture(scope="module")
def computed(demo_master, tmp_path_factory):
    """The demo computed once through the API and written into a copy."""
    path = tmp_path_factory.mktemp("api") / "demo.xlsx"
    shutil.copy(demo_master, path)
    run = xlcore.compute(path)
    backup = run.write()
    return path, run, backup


def test_tables_equal_the_written_cells(computed):
    """Every table the API gives equals, cell for cell, what the workbook holds once written:
    same sheets, same headers (with units), same numbers (as stored) and texts."""
    path, run, backup = computed
    assert backup is not None and backup.exists()  # in place: the previous file is kept
    stored = xlcore.read_results(path)
    assert set(stored) == set(run.tables)
    for name, df in run.tables.items():
        pd.testing.assert_frame_equal(df, stored[name], check_dtype=False, obj=name)
    # the stamp lines above each table come back too
    lines = stored["summary"].attrs["lines"]
    assert lines["Input hash (SHA-256)"] == run.outcome.building.input_hash
    assert lines["CAUTION"] == xlcore.CAUTION


def test_worst_per_check_matches_the_summary_lines(computed):
    """The structured worst cases (for --json and the report) agree with the summary sheet's
    own 'Worst ...' lines, written by a different path (pipeline.worst_per_check)."""
    path, run, _ = computed
    lines = xlcore.read_results(path)["summary"].attrs["lines"]
    for w in run.worst():
        text = lines.get(f"Worst {w['check']}")
        if text is None:
            continue
        if w["util"] is None:
            assert text.startswith("not checked")
        else:
            assert text.startswith(f"{w['util']:.3f} {w['status']}")


def test_invalid_input_raises_one_exception_with_every_finding(demo_book):
    bad = edit(
        demo_book,
        {
            (layout.WALLS.name, f"{column_letter(layout.WALLS, 'thickness')}2"): 0.25,
            (layout.WALLS.name, f"{column_letter(layout.WALLS, 'fc')}3"): "forty",
        },
    )
    with pytest.raises(xlcore.InputInvalid) as info:
        xlcore.compute(bad)
    where = {f.where for f in info.value.findings.errors}
    t, fc = column_letter(layout.WALLS, "thickness"), column_letter(layout.WALLS, "fc")
    assert {f"Walls!{t}2", f"Walls!{fc}3"} <= where
    text = str(info.value)
    assert text.startswith(f"{len(info.value.findings.errors)} input error(s)")
    assert f"Walls!{t}2: found 0.25" in text and f"Walls!{fc}3: found 'forty'" in text
    # the command line reports the same findings
    res = CliRunner().invoke(app, ["check", str(bad)])
    assert res.exit_code == 1
    for f in info.value.findings.errors:
        assert str(f) in res.stderr


def test_check_json(computed):
    path, run, _ = computed
    res = CliRunner().invoke(app, ["check", str(path), "--json"])
    assert res.exit_code == 0, res.stderr
    out = json.loads(res.stdout)  # stdout is one JSON object and nothing else
    assert out["valid"] is True and out["results"] == "up to date" and out["exit_code"] == 0
    b = run.outcome.building
    assert out["counts"]["storeys"] == len(b.storeys)
    assert out["counts"]["pier_storey_cases"] == len(run.outcome.piers)


def test_compute_json_and_exit_codes(demo_book, tmp_path):
    copy = tmp_path / "out.xlsx"
    res = CliRunner().invoke(app, ["compute", str(demo_book), "--output", str(copy), "--json", "--strict"])
    out = json.loads(res.stdout)
    # --strict exits 3 when any pier fails, 0 otherwise, and says so in the object
    assert res.exit_code == out["exit_code"] == (3 if out["counts"]["fail"] else 0)
    assert out["files_written"][0] == str(copy)
    stored = xlcore.read_results(copy)["summary"]
    assert out["counts"]["pier_storey_cases"] == len(stored)
    worst_nm = next(w for w in out["worst"] if w["check"] == "axial + bending")
    ab = xlcore.read_results(copy)["axial-bending"]
    util = ab["Utilisation (radial)"].max()
    assert worst_nm["util"] == pytest.approx(util, abs=1e-6)
    row = ab.loc[ab["Utilisation (radial)"].idxmax()]
    assert (worst_nm["storey"], worst_nm["pier_id"]) == (row["Storey"], row["Pier"])
    # invalid input: exit 1, the findings with Sheet!Cell in the object, messages on stderr
    bad = edit(demo_book, {(layout.WALLS.name, f"{column_letter(layout.WALLS, 'thickness')}2"): 0.25})
    res = CliRunner().invoke(app, ["compute", str(bad), "--json"])
    out = json.loads(res.stdout)
    assert res.exit_code == 1 == out["exit_code"] and out["valid"] is False
    assert out["files_written"] == []
    assert any(f["where"] == f"Walls!{column_letter(layout.WALLS, 'thickness')}2" for f in out["findings"])
    assert "Walls!" in res.stderr
    # a file problem: exit 2, the reason in the object
    res = CliRunner().invoke(app, ["compute", str(tmp_path / "missing.xlsx"), "--json"])
    out = json.loads(res.stdout)
    assert res.exit_code == 2 == out["exit_code"] and "not found" in out["error"]


def test_read_results_before_any_compute_is_empty_and_check_says_so(demo_book):
    assert xlcore.read_results(demo_book) == {}
    inputs = xlcore.check(demo_book)
    assert inputs.results_state == "none" and inputs.stamp is None
    assert inputs.findings.errors == []


def test_worst_cases_count_only_pass_and_fail_rows():
    """A trigger's ratio (Section 14 end zone: 'required', never a failure) and a 'check' row are
    not utilisations: the worst case of a table is taken over its pass / FAIL rows only, so
    `--json` and the report never read a trigger as a failure."""
    import pandas as pd

    from xlcore import results, tables
    from xlcore.results import ResultSheet

    t = pd.DataFrame(
        dict(
            storey=["GF"] * 3,
            pier_id=["A", "B", "C"],
            util=[0.6, 2.2, 1.4],
            status=[results.PASS, "required", "check"],
        )
    )
    sheet = ResultSheet(results.RESULT_PREFIX + "earthquake detailing", "", [], t)
    (case,) = [c for c in tables.worst_cases({"earthquake detailing": sheet})]
    assert case["util"] == 0.6 and case["status"] == results.PASS and case["over"] == 0


def test_an_unknown_detail_is_the_callers_slip_not_a_defect(demo_book):
    """Errors of xlcore's own code while checking are raised as xlcore.Defect; a bad argument is
    refused before that, as a usage error (a ValueError), naming the modes it accepts."""
    from xlcore import api

    with pytest.raises(api.UsageError, match="detail must be one of auto, governing, all"):
        xlcore.compute(demo_book, detail="every")
