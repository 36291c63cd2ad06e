"""Formulas in the engineer's inputs: saved values are used; missing ones are evaluated;
ones that cannot be evaluated are named by Sheet!Cell. Expected numbers are hand evaluations."""

import re
import zipfile

import pytest
from conftest import column_letter as col
from conftest import edit

from xlcore import layout
from xlcore.diagnostics import InputInvalid
from xlcore.pipeline import load

W, S, A = layout.WALLS, layout.STOREYS, layout.MEMBER_ACTIONS


def test_formulas_without_saved_values_are_evaluated(demo_book):
    # openpyxl writes formulas with no cached value, like any script would
    edit(
        demo_book,
        {
            (S.name, f"{col(S, 'level')}3"): f"={col(S, 'level')}2+{col(S, 'height')}2",  # 0 + 4.35
            (W.name, f"{col(W, 'thickness')}2"): "=200+50",
            (A.name, f"{col(A, 'v')}2"): "=SQRT(16)*10",  # 40 kN
            (A.name, f"{col(A, 'n')}2"): f"=Storeys!{col(S, 'height')}2*100",  # cross-sheet: 435
        },
    )
    b, findings = load(demo_book)
    assert findings.errors == []
    assert b.storeys[1].level == pytest.approx(4.35)
    assert b.walls[0].thickness == pytest.approx(250.0)
    assert b.member_actions.v.iloc[0] == pytest.approx(40.0)
    assert b.member_actions.n.iloc[0] == pytest.approx(435.0)


def test_saved_values_win_over_re_evaluation(demo_book):
    """A file saved by a spreadsheet program carries cached values: those are what was seen."""
    edit(demo_book, {(W.name, f"{col(W, 'thickness')}2"): "=999"})
    src = demo_book.read_bytes()
    patched = demo_book.with_name("cached.xlsx")
    with zipfile.ZipFile(demo_book) as zin, zipfile.ZipFile(patched, "w", zipfile.ZIP_DEFLATED) as zout:
        for item in zin.infolist():
            data = zin.read(item)
            if item.filename == "xl/worksheets/sheet4.xml":  # Walls is the fourth sheet
                data, n = re.subn(rb"<f>999</f><v\s*/?>(</v>)?", b"<f>999</f><v>250</v>", data)
                assert n == 1
            zout.writestr(item, data)
    assert demo_book.read_bytes() == src
    b, _ = load(patched)
    assert b.walls[0].thickness == 250.0


@pytest.mark.parametrize(
    "formula,gist",
    [
        ("=1/0", "evaluates to #DIV/0!"),
        ("=NOSUCHFUNCTION(1)", "has no saved value"),
    ],
)
def test_unresolvable_formulas_are_named(demo_book, formula, gist):
    cell = f"{col(W, 'thickness')}2"
    edit(demo_book, {(W.name, cell): formula})
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    msgs = [str(f) for f in info.value.findings.errors]
    assert any(m.startswith(f"Walls!{cell}:") and gist in m for m in msgs), msgs
    assert any("open the workbook in your spreadsheet program" in m for m in msgs)


def test_evaluation_reads_the_inputs_not_the_result_sheets(demo_book, monkeypatch):
    """A formula without a saved value in a computed workbook: only the input sheets (and what
    they reference) are evaluated, never the result sheets (issue 17: 62 s and 950 MB)."""
    from xlcore import results
    from xlcore.pipeline import compute
    from xlcore.workbook import reader
    from xlcore.workbook.writer import write_results

    b, f = load(demo_book)
    write_results(demo_book, demo_book, compute(b, f).sheets, force=True)
    edit(demo_book, {(W.name, f"{col(W, 'thickness')}2"): "=200+50"})
    seen: dict[str, object] = {}
    solve = reader._solve

    def spy(formulas, path):
        seen.update(solve(formulas, path))
        return seen

    monkeypatch.setattr(reader, "_solve", spy)
    b, _ = load(demo_book)
    assert b.walls[0].thickness == pytest.approx(250.0)  # hand evaluation: 200 + 50
    assert not [k for k in seen if k.startswith(results.SUMMARY_SHEET.upper()) and seen[k] is not None]
