"""Result sheets a checker can print: page setup and print titles on every result sheet, the
demo's summary one page wide in LibreOffice's PDF, discrete utilisation bands.

The page-setup elements and the `_xlnm.Print_Titles` name are those of the Office Open XML
spreadsheet schema (ECMA-376 Part 1, 18.3.1.63 pageSetup, 18.2.6 definedName)."""

from __future__ import annotations

import re
import shutil
import subprocess
import zipfile
from pathlib import Path

import pytest
from lxml import etree

from xlcore import pipeline, results
from xlcore.workbook.package import NS_MAIN, NS_PKG_REL, NS_REL
from xlcore.workbook.writer import write_results

SAMPLE = Path(__file__).parent.parent / "sample_workbooks" / "harbourview-lane-demo.xlsx"
M = f"{{{NS_MAIN}}}"


@pytest.fixture(scope="module")
def computed(tmp_path_factory) -> Path:
    book = tmp_path_factory.mktemp("print") / "demo.xlsx"
    shutil.copy(SAMPLE, book)
    building, findings = pipeline.load(book)
    outcome = pipeline.compute(building, findings)
    write_results(book, book, outcome.sheets)
    return book


def _result_parts(book: Path) -> dict[str, tuple[int, bytes]]:
    """Result sheet name -> (position in the sheet list, its worksheet XML)."""
    with zipfile.ZipFile(book) as zf:
        wb = etree.fromstring(zf.read("xl/workbook.xml"))
        rels = etree.fromstring(zf.read("xl/_rels/workbook.xml.rels"))
        target = {r.get("Id"): r.get("Target") for r in rels.iter(f"{{{NS_PKG_REL}}}Relationship")}
        out = {}
        for i, s in enumerate(wb.find(f"{M}sheets")):
            if s.get("name").startswith("Results "):
                out[s.get("name")] = (i, zf.read("xl/" + target[s.get(f"{{{NS_REL}}}id")]))
        return out


def test_every_result_sheet_prints_landscape_one_page_wide_with_header_and_footer(computed):
    parts = _result_parts(computed)
    assert results.SUMMARY_SHEET in parts and len(parts) >= 8
    for name, (_, xml) in parts.items():
        root = etree.fromstring(xml)
        setup = root.find(f"{M}pageSetup")
        assert setup.get("orientation") == "landscape", name
        assert setup.get("fitToWidth") == "1" and setup.get("fitToHeight") == "0", name
        assert root.find(f"{M}sheetPr/{M}pageSetUpPr").get("fitToPage") == "1", name
        header = root.find(f"{M}headerFooter/{M}oddHeader").text
        footer = root.find(f"{M}headerFooter/{M}oddFooter").text
        assert "Harbourview" in header and name in header and "hash " in header, name
        assert "&P" in footer and "&N" in footer, name


def test_every_result_sheet_has_its_print_titles(computed):
    parts = _result_parts(computed)
    with zipfile.ZipFile(computed) as zf:
        wb = etree.fromstring(zf.read("xl/workbook.xml"))
    titles = {
        int(d.get("localSheetId")): d.text
        for d in wb.iter(f"{M}definedName")
        if d.get("name") == "_xlnm.Print_Titles"
    }
    for name, (pos, xml) in parts.items():
        assert pos in titles, name
        quoted = "'" + name + "'"
        m = re.fullmatch(
            rf"{re.escape(quoted)}!\$A:\$([A-Z]+),{re.escape(quoted)}!\$(\d+):\$(\d+)", titles[pos]
        )
        assert m, titles[pos]
        header_row = int(m.group(2))
        # the repeated row is the table's header row: the frozen pane ends there
        pane = etree.fromstring(xml).find(f"{M}sheetViews/{M}sheetView/{M}pane")
        assert float(pane.get("ySplit")) == header_row, name


def test_a_second_compute_leaves_one_print_title_per_sheet(computed, tmp_path):
    again = tmp_path / "again.xlsx"
    shutil.copy(computed, again)
    building, findings = pipeline.load(again)
    write_results(again, again, pipeline.compute(building, findings).sheets)
    with zipfile.ZipFile(again) as zf:
        wb = etree.fromstring(zf.read("xl/workbook.xml"))
    scopes = [
        d.get("localSheetId") for d in wb.iter(f"{M}definedName") if d.get("name") == "_xlnm.Print_Titles"
    ]
    assert len(scopes) == len(set(scopes)) == len(_result_parts(again))


def test_utilisation_bands_are_discrete_rules_not_a_colour_scale(computed):
    xml = _result_parts(computed)[results.SUMMARY_SHEET][1]
    assert b"colorScale" not in xml
    root = etree.fromstring(xml)
    rules = [r for cf in root.iter(f"{M}conditionalFormatting") for r in cf]
    formulas = " ".join(r.find(f"{M}formula").text for r in rules)
    assert f">{results.CLOSE:g}" in formulas and ">1" in formulas and '="FAIL"' in formulas
    # band() is what the rules express: a comfortable 0.57 is not amber (issue 12's complaint)
    assert list(results.band([0.57, 0.95, 1.2])) == ["comfortable", "close", "over"]


def test_summary_puts_failing_piers_first(computed):
    building, findings = pipeline.load(computed)
    # the demo without its end-zone bars: its base piers fail in tension (tests/test_end_zones_checks.py)
    out = pipeline.compute(building.model_copy(update={"end_zones": []}), findings)
    table = out.sheets[0].table
    status = table.status.tolist()
    n_fail = status.count(results.FAIL)
    assert n_fail > 0 and set(status[:n_fail]) == {results.FAIL}
    passing = table[table.status == results.PASS].util.to_numpy()
    assert (passing[:-1] >= passing[1:]).all()  # nearest to failing first
    assert results.SUMMARY_SHEET == out.sheets[0].name
    labels = [k for k, _ in out.sheets[0].preamble]
    for check in ("in-plane shear", "axial + bending", "Cl 11.5", "detailing", "lintel", "core"):
        assert any(k.startswith("Worst ") and check in k for k in labels), check
    # detailing is reported beside the structural result, never as the governing check
    assert not table.check.str.contains("detailing").any()
    assert table.detailing.str.match(r"^(pass|FAIL) \d").any()


@pytest.mark.skipif(
    shutil.which("soffice") is None or shutil.which("pdftotext") is None,
    reason="LibreOffice (soffice) or poppler-utils (pdftotext) not installed",
)
def test_demo_summary_in_libreoffice_pdf_fits_one_page_width(computed, tmp_path):
    """Export by LibreOffice; the summary's pages are those whose header names the sheet.
    Each of them holds the first column's header (print titles) and the last column's
    header (every column on the page width)."""
    profile = tmp_path / "profile"
    subprocess.run(
        [
            "soffice",
            f"-env:UserInstallation=file://{profile}",
            "--headless",
            "--convert-to",
            "pdf",
            "--outdir",
            str(tmp_path),
            str(computed),
        ],
        check=True,
        capture_output=True,
        timeout=300,
    )
    pdf = tmp_path / "demo.pdf"
    info = subprocess.run(["pdfinfo", str(pdf)], capture_output=True, text=True, check=True).stdout
    pages = int(re.search(r"Pages:\s+(\d+)", info).group(1))
    summary_pages = []
    for p in range(1, pages + 1):
        text = subprocess.run(
            ["pdftotext", "-f", str(p), "-l", str(p), "-layout", str(pdf), "-"],
            capture_output=True,
            text=True,
            check=True,
        ).stdout
        if results.SUMMARY_SHEET in text.splitlines()[0] if text.strip() else False:
            summary_pages.append(text)
    rows = len(pipeline.compute(*pipeline.load(computed)).summary)
    assert 1 <= len(summary_pages) <= rows // 40 + 2  # one page wide: pages go down only
    for text in summary_pages:
        assert "Storey" in text and "Note" in text  # first and last column's headers
        assert re.search(r"Page \d+ of \d+", text)
