"""The PDF calculation report (`xlcore report`, issue 15 §2).

What it is compared against, outside the report's own code: the workbook's result cells as
written by `compute` (read back with python-calamine through `xlcore.read_results`), the stamp
the workbook carries, and the PDF's text as a PDF library (pypdf) extracts it."""

from __future__ import annotations

import os
import re
import shutil

import pytest
from builders import tower_workbook
from conftest import column_letter, edit
from pypdf import PdfReader
from typer.testing import CliRunner

import xlcore
from xlcore import layout, results, tables
from xlcore.cli import app
from xlcore.report import MAX_SUMMARY_ROWS, ReportRefused, fmt, make_report, report_path


def _pages(pdf) -> list[str]:
    return [p.extract_text() for p in PdfReader(str(pdf)).pages]


def _flat(text: str) -> str:
    """Text without whitespace: wrapping and PDF line breaks do not matter."""
    return re.sub(r"\s+", "", text)


@pytest.fixture(scope="module")
def demo(demo_master, tmp_path_factory):
    """The demo computed and written by the API, then reported."""
    path = tmp_path_factory.mktemp("report") / "demo.xlsx"
    shutil.copy(demo_master, path)
    run = xlcore.compute(path)
    run.write()
    rep = make_report(path)
    return path, run, rep, _pages(rep.path)


def test_beside_the_workbook_with_stamp_and_caution_on_every_page(demo):
    path, run, rep, pages = demo
    assert rep.path == report_path(path) == path.with_name("demo-report.pdf") and not rep.stale
    umask = os.umask(0)
    os.umask(umask)
    assert rep.path.stat().st_mode & 0o777 == 0o666 & ~umask  # readable like any file written
    assert len(pages) == rep.pages
    lines = xlcore.read_results(path)["summary"].attrs["lines"]  # the workbook's own stamp
    when, digest = lines["Computed (UTC)"], lines[results.STAMP_HASH_LABEL]
    project = run.outcome.building.settings.project_name
    for i, text in enumerate(pages, start=1):
        assert project in text
        assert f"computed {when} UTC" in text and digest[:12] in text  # the workbook's time
        assert f"Page {i} of {len(pages)}" in text
    cores = sorted(set(run.outcome.piers.core) - {""})
    assert cores == ["lift", "stair"]  # the demo: two cores joined only by the slabs (xlcore.demo)
    for core in cores:  # the demo names its cores: one set of utilisation charts each
        assert f"Utilisation up the height: core {core}" in "\n".join(pages)
    cover = _flat(pages[0])
    assert _flat(xlcore.CAUTION) in cover
    assert digest in cover and _flat(when) in cover


def _governing_row(stored, c: tables.Check, sheet: results.ResultSheet):
    """The workbook's row with the highest utilisation of the check (first of equals), among
    the rows whose status is pass or FAIL where the sheet has a status (a trigger's ratio,
    status 'required', is not a utilisation: `tables.rows_of`)."""
    title = next(col.title for col in sheet.columns if col.key == c.util)
    df = stored[c.table]
    key = "status_s" if c.util == "util_s" else "status"
    status = next((col.title for col in sheet.columns if col.key == key), None)
    if status is not None:
        df = df[df[status].isin([results.PASS, results.FAIL])]
    u = df[title].astype(float)
    return df.loc[u.idxmax()], title


def test_calculation_pages_hold_the_workbook_numbers(demo):
    """For every check: its calculation page names the workbook's governing case and holds its
    utilisation, clause, inputs and every expression of its working exactly as the workbook's
    cells show them (the report re-runs the checks; it must agree with the sheets)."""
    path, run, _, pages = demo
    stored = xlcore.read_results(path)
    text = "\n".join(pages)
    checked = 0
    for c in tables.checks_of(run.sheets):
        sheet = run.sheets[c.table]
        if tables.rows_of(c, run.sheets).empty:
            continue
        row, util_title = _governing_row(stored, c, sheet)
        start = text.index(f"Calculation: {c.label}\n")
        end = text.find("Calculation: ", start + 20)
        page = _flat(text[start : end if end > 0 else None])
        assert _flat(f"Utilisation {float(row[util_title]):.3f}") in page, c.label
        for key in c.ids:
            col = next((col for col in sheet.columns if col.key == key), None)
            if col is None:  # e.g. the core column, on the sheet only where walls name cores
                continue
            assert _flat(str(row[col.title])) in page, (c.label, key)
        if c.util == "util":
            clause = next((col.title for col in sheet.columns if col.key == "clause"), None)
            if clause:
                assert _flat(f"Clause {row[clause]}") in page, c.label
        else:  # the Cl 11.5 columns of the axial sheet
            assert "ClauseCl11.5.1" in page
        for key in c.inputs:
            col = next((col for col in sheet.columns if col.key == key), None)
            if col is None or fmt(row[col.title], col.fmt) == "":
                continue
            assert _flat(f"{col.title} {fmt(row[col.title], col.fmt)}") in page, (c.label, key)
        for key in c.working:
            col = next(col for col in sheet.columns if col.key == key)
            if not isinstance(row[col.title], str):  # blank in the workbook
                continue
            for part in row[col.title].split("; "):
                if part.strip():
                    assert _flat(part) in page, (c.label, key, part)
        checked += 1
    assert checked >= 6  # shear, axial, Cl 11.5, detailing, core stress, core N-M on the demo


def test_interaction_curve_is_the_checks_curve(demo):
    """The pier N-M curve drawn passes through the point where the governing ray meets the
    curve in the workbook (columns 'N on curve', 'M on curve'): the diagram shows the same
    curve the check used (that curve is compared with the concreteproperties library in
    tests/test_nm_reference_library.py)."""
    import numpy as np

    from xlcore.checks.axial import interaction, rect_sections
    from xlcore.codes import as3600

    path, run, _, _ = demo
    ab = xlcore.read_results(path)["axial-bending"]
    g = ab.loc[ab["Utilisation (radial)"].idxmax()]
    p = run.outcome.piers
    pier = p[(p.storey == g["Storey"]) & (p.pier_id == g["Pier"])]
    sec = rect_sections(pier.iloc[[0]])
    n = np.array([g["N on curve (N*/U) [kN]"] * 1e3])
    r = interaction(sec, n, as3600.PHI_COMPRESSION, of=np.zeros(1, dtype=int))
    assert r["phi_mu"][0] * 1e-6 == pytest.approx(g["M on curve (M*/U) [kNm]"], rel=2e-3, abs=0.2)


def test_refuses_without_results_and_when_stale(demo_book, tmp_path):
    with pytest.raises(ReportRefused, match="no result sheets"):
        make_report(demo_book)
    assert not report_path(demo_book).exists()
    xlcore.compute(demo_book).write()
    # an input changed after the compute: the stamp's hash no longer matches
    edit(demo_book, {(layout.WALLS.name, f"{column_letter(layout.WALLS, 'thickness')}2"): 260})
    res = CliRunner().invoke(app, ["report", str(demo_book)])
    assert res.exit_code == 2 and "stale" in res.stderr and "--stale-ok" in res.stderr
    assert not report_path(demo_book).exists()
    folder = tmp_path / "reports"
    folder.mkdir()
    res = CliRunner().invoke(app, ["report", str(demo_book), "--stale-ok", "--output", str(folder)])
    assert res.exit_code == 0 and (folder / report_path(demo_book).name).exists()  # a folder: name inside
    out = tmp_path / "stale.pdf"
    res = CliRunner().invoke(app, ["report", str(demo_book), "--stale-ok", "--output", str(out)])
    assert res.exit_code == 0, res.stderr
    pages = _pages(out)
    assert all("STALE" in t for t in pages)


def test_two_separate_cores_and_a_bounded_page_count(tmp_path):
    """A 30-storey tower of two separate box cores: the report builds, summarises (at most
    MAX_SUMMARY_ROWS cases listed, the rest counted) and stays short."""
    path = tmp_path / "tower.xlsx"
    cases = tower_workbook(path, storeys=30, boxes=2, combos=8)
    run = xlcore.compute(path)
    run.write()
    rep = make_report(path)
    pages = _pages(rep.path)
    assert rep.pages == len(pages) <= 16
    summary = "\n".join(pages[1:3])
    n_cases = len(run.outcome.summary)
    assert f"and {n_cases - MAX_SUMMARY_ROWS} more pier x storey cases" in summary
    assert cases == len(run.outcome.shear)
    text = "\n".join(pages)
    for box in ("B0", "B1"):  # both cores' piers on the plan
        assert f"{box}A-1" in text and f"{box}C" in text


@pytest.mark.slow
def test_big_tower_report_stays_short(tmp_path):
    path = tmp_path / "big.xlsx"
    tower_workbook(path, storeys=60, boxes=6, combos=40)
    xlcore.compute(path).write()
    rep = make_report(path)
    assert rep.pages <= 24


def test_cover_lists_the_settings_that_differ_from_the_defaults():
    """Against the layout's own defaults (layout.PROJECT): a changed phi and a named earthquake
    combination are listed with their defaults; unchanged settings are not."""
    from xlcore.model import Settings
    from xlcore.report import changed_settings

    rows = changed_settings(Settings(phi_shear=0.75, earthquake_combinations="E1"))
    label = {s.key: s.label for s in layout.PROJECT.settings}
    assert rows == [
        (label["phi_shear"], "0.75", "blank (the standard's value)"),
        (label["earthquake_combinations"], "E1", "blank (none)"),
    ]
    assert changed_settings(Settings()) == []


def test_summary_pages_list_the_workbook_summary_rows_in_its_order(demo):
    """The summary pages hold the workbook's 'Results summary' rows, attention first, in the
    sheet's own order (storey, pier, status, utilisation as the sheet shows them), and each
    check's worst utilisation as the summary sheet's 'Worst ...' line gives it."""
    path, _, _, pages = demo
    stored = xlcore.read_results(path)["summary"]
    text = _flat("\n".join(pages[1:3]))
    at = 0
    for _, r in stored.head(MAX_SUMMARY_ROWS).iterrows():
        row = _flat(f"{r['Storey']} {r['Pier']} {r['Status']} {r['Utilisation']:.3f}")
        found = text.find(row, at)
        assert found >= 0, row
        at = found + len(row)
    for label, line in stored.attrs["lines"].items():
        if label.startswith("Worst ") and not line.startswith("not checked"):
            assert _flat(f"{label[6:]} {line.split()[0]} {line.split()[1]}") in text, label


def test_numbers_as_their_sheet_column_shows_them():
    """Number formats as a spreadsheet program applies them (ECMA-376 Part 1, 18.8.31: '0' a
    digit always shown, '#' a digit shown only when significant), evaluated by hand."""
    assert fmt(1.23456, "0.000") == "1.235"
    assert fmt(12.0, "0") == "12"
    assert fmt(0.5, "0.0####") == "0.5"
    assert fmt(0.00314159, "0.0####") == "0.00314"
    assert fmt(2.0, "0.##") == "2"
    assert fmt(float("nan"), "0.0") == "" and fmt(None, None) == ""
