"""A pier's N-M numbers read its own row alone (DEVELOPERS.md, Decisions).

End-zone bars are padded with zeros to the widest row of a call. numpy's `sum(axis=1)` adds a
row of 8 or more terms in eight running sums, so the padding moved a row's last bit, and
changing one wall's end zones moved other walls' utilisations (found in review, 2026-12-03).
The references here are plain: IEEE addition left to right as Python does it, and the same
building's other walls before and after an edit that does not concern them.
"""

import functools
import operator
import random

import numpy as np
import openpyxl
import pytest

from xlcore import api, results
from xlcore.mechanics.nm import row_sums


def test_row_sums_add_left_to_right_and_ignore_trailing_zeros():
    """Each row equals Python's left-to-right float sum of it, bit for bit, padded or not."""
    rng = random.Random(7)
    for width in (1, 3, 7, 8, 9, 16, 31):
        term = lambda: rng.uniform(-500.0, 500.0) * 10 ** rng.randint(-3, 3)  # noqa: E731
        rows = [[term() for _ in range(width)] for _ in range(50)]
        a = np.array(rows)
        padded = np.hstack([a, np.zeros((len(rows), 13))])
        by_hand = [functools.reduce(operator.add, r) for r in rows]  # IEEE addition in order
        assert row_sums(a).tolist() == by_hand
        assert row_sums(padded).tolist() == by_hand
    assert row_sums(np.zeros((3, 0))).tolist() == [0.0, 0.0, 0.0]


def _standard(wb, name: str) -> None:
    for row in wb["Project"].iter_rows(min_row=2):
        if row[0].value == "Design standard":
            row[1].value = name
            return
    raise KeyError("Design standard")


@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
def test_one_walls_end_zones_leave_other_walls_numbers_bit_for_bit(demo_book, tmp_path, standard):
    """StairN's GF start zone changed from 8 N28 to 10 N20 (rows then pad to another width):
    every number of every other wall's axial-bending rows stays the same, to the last bit.
    Before `row_sums`, 67 rows (AS 3600) and 13 (ACI 318) moved by up to 2e-15."""
    tables = []
    for k, (n, dia) in enumerate(((8, 28), (10, 20))):
        wb = openpyxl.load_workbook(demo_book)
        _standard(wb, standard)
        edited = 0
        for r in wb["End zones"].iter_rows(min_row=2):
            if (r[0].value, r[1].value, r[3].value) == ("StairN", "GF", "start"):
                r[4].value, r[5].value = n, dia
                edited += 1
        assert edited == 1
        path = tmp_path / f"case{k}.xlsx"
        wb.save(path)
        run = api.compute(path, standards="none")
        sheet = next(s for s in run.outcome.sheets if s.name == results.AXIAL_SHEET)
        tables.append(sheet.table)
    before, after = tables
    assert (before.wall_id == "StairN").any() and (before.wall_id != "StairN").sum() > 100
    others = (before.wall_id != "StairN").to_numpy()
    changed = {}
    for c in before.columns:
        if before[c].dtype.kind == "f":
            x, y = before[c].to_numpy()[others], after[c].to_numpy()[others]
            same = (x == y) | (np.isnan(x) & np.isnan(y))
            if not same.all():
                changed[c] = int((~same).sum())
    assert changed == {}
    stair = ~others
    assert not np.array_equal(before.util.to_numpy()[stair], after.util.to_numpy()[stair])  # the edit did act
