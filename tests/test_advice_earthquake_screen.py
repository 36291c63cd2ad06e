"""The advice search's screen holds every earthquake-combination row of a failing pier.

The earthquake rules (AS 3600 Section 14, ACI 318-19 18.10.6 special boundary elements) read
N* and M* together and only the earthquake rows, and the search does not confirm them on every
row: so the screen must hold all those rows. Before, it held the two rows of largest |V*|, N*,
-N*, |M*|, |M*|/N* and out-of-plane M* only, and on the demo under ACI 318 with a pier's rows
repeated under other combination names it offered horizontal bars for a pier that still failed
four boundary-element rules with them (found by review: the bars applied and checked again).
"""

from __future__ import annotations

import openpyxl
import pandas as pd

from xlcore import pipeline, results
from xlcore.checks import advice
from xlcore.validate import build
from xlcore.workbook.reader import read_workbook
from xlcore.workbook.template import write_template


def test_the_screen_takes_every_earthquake_row_of_a_failing_pier():
    """Ten combinations; the earthquake ones (E1, E2) are in the middle of every ranking
    (|V*|, N*, -N*, |M*|, |M*|/N*), so no ranking picks them; they are in the screen all the
    same, and only with the setting."""
    rows = pd.DataFrame(
        {
            "storey": "L1",
            "pier_id": "W1",
            "combination": [f"C{i}" for i in range(8)] + ["E1", "E2"],
            "n": [1000.0 + 10 * i for i in range(8)] + [1015.0, 1025.0],
            "v": [100.0 + i for i in range(8)] + [100.5, 101.5],
            "m": [500.0 + 7 * i for i in range(8)] + [510.0, 520.0],
            "m_out": 0.0,
        }
    )
    failing = pd.DataFrame({"storey": ["L1"], "pier_id": ["W1"]})
    plain = advice._screening_actions(rows, failing)
    assert not plain.combination.isin(["E1", "E2"]).any()
    quake = advice._screening_actions(rows, failing, earthquake={"E1", "E2"})
    assert set(quake.combination) == set(plain.combination) | {"E1", "E2"}


def _demo(tmp_path, copies: bool):
    """The demo, its member actions x 1.7, and with `copies` StairN's rows at L7 repeated under
    new combination names (not earthquake combinations by name) with N* x (1 - 1e-9): rows
    that change no check but are not exact repeats (which the search drops)."""
    path = tmp_path / f"demo-{copies}.xlsx"
    write_template(path, example=True)
    wb = openpyxl.load_workbook(path)
    ws = wb["Member actions"]
    rows = [[c.value for c in r] for r in ws.iter_rows(min_row=2) if r[0].value is not None]
    for r, cells in zip(rows, ws.iter_rows(min_row=2), strict=False):
        for k in (3, 4, 5):
            if isinstance(r[k], (int, float)):
                cells[k].value = r[k] * 1.7
    if copies:
        for r in rows:
            if r[0] == "L7" and r[2] == "StairN":
                n, v, m = (x * 1.7 if isinstance(x, (int, float)) else x for x in r[3:6])
                ws.append([r[0], f"{r[1]} copy", r[2], n * (1 - 1e-9), v, m, r[6]])
    wb.save(path)
    b, f = build(read_workbook(path))
    out = pipeline.compute(pipeline.with_standard(b, "ACI 318-19"), f, detail="all")
    table = next(s.table for s in out.sheets if s.name == results.ADVICE_SHEET)
    mine = table[(table.storey == "L7") & (table.pier_id == "StairN")]
    return mine[["kind", "option", "rank"]].reset_index(drop=True)


def test_repeated_rows_under_other_names_do_not_change_the_advice(tmp_path):
    """Rows that repeat a pier's numbers (to 1e-9) under other names change no check, so they
    must not change the advice: L7 StairN's options are the same with and without them (a thicker wall
    first; no change of bars alone passes the boundary-element rules)."""
    plain, repeated = _demo(tmp_path, False), _demo(tmp_path, True)
    assert len(plain) > 0
    pd.testing.assert_frame_equal(plain, repeated)
    assert plain.kind[plain["rank"] == 1].tolist() == ["thickness"]
