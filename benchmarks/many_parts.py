"""The writer's bookkeeping on a package with many parts nobody refers to (issue 17): times
write_results on a one-storey building padded with N stray `xl/worksheets/sheetN.xml` parts and
prints the time per N and the growth exponent between the sizes (1 = linear, 2 = quadratic).
Not a test: figures vary with the machine.

    python benchmarks/many_parts.py [N ...]
"""

from __future__ import annotations

import math
import shutil
import sys
import tempfile
import time
import zipfile
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))

from test_save_faults import small_building  # noqa: E402

from xlcore import pipeline  # noqa: E402
from xlcore.workbook.writer import _build  # noqa: E402


def main(sizes: list[int]) -> None:
    folder = Path(tempfile.mkdtemp(prefix="xlcore-parts-"))
    try:
        base = small_building(folder / "base.xlsx")
        b, f = pipeline.load(base)
        sheets = pipeline.compute(b, f).sheets
        last = None
        print(f"{'stray parts':>12} {'bookkeeping [s]':>16} {'growth':>7}")
        for n in sizes:
            book = folder / f"b{n}.xlsx"
            shutil.copy(base, book)
            with zipfile.ZipFile(book, "a") as z:
                have = set(z.namelist())  # numbered on from the sheets there: every new one must step past
                for k in range(1, n + 1):
                    if f"xl/worksheets/sheet{k}.xml" not in have:
                        z.writestr(f"xl/worksheets/sheet{k}.xml", b"<stray/>")
            with zipfile.ZipFile(book) as z:
                start = time.perf_counter()
                _build(z, sheets)
                took = time.perf_counter() - start
            growth = "" if last is None else f"{math.log(took / last[1]) / math.log(n / last[0]):.2f}"
            print(f"{n:>12} {took:>16.3f} {growth:>7}")
            last = (n, took)
    finally:
        shutil.rmtree(folder)


if __name__ == "__main__":
    main([int(a) for a in sys.argv[1:]] or [5_000, 10_000, 20_000, 40_000])
