"""Building-scale timing: generate towers of three sizes in xlcore's workbook layout, time each
phase of `xlcore compute` and its peak memory, and the floor of merely reading the same input
cells (python-calamine, when installed) and writing the same result cells as plain sheet XML.
Prints a table. Not a test: figures vary between machines, so compare ratios from one run.

    python benchmarks/building_scale.py            # S and M
    python benchmarks/building_scale.py S M L      # choose sizes (L takes long today)
"""

from __future__ import annotations

import json
import resource
import subprocess
import sys
import tempfile
import time
import zipfile
from pathlib import Path

SIZES = {"S": (15, 2, 8), "M": (60, 6, 40), "L": (100, 12, 60)}  # storeys, box cores (5 piers each), combos


def generate(path: Path, storeys: int, boxes: int, combos: int) -> int:
    """A tower of `boxes` box cores in a row, one door per box, actions for every pier."""
    from openpyxl import Workbook

    from xlcore import layout

    wb = Workbook(write_only=True)
    sheets = {t.key: wb.create_sheet(t.name) for t in (layout.PROJECT, *layout.TABLES)}
    sheets["project"].append(list(layout.PROJECT.headers))
    for t in layout.TABLES:
        sheets[t.key].append([c.header for c in t.columns])
    names = [f"L{i:02d}" for i in range(storeys)]
    for i, n in enumerate(names):
        sheets["storeys"].append([n, 3.2 * i, 3.2, 200])
    members = []
    for b in range(boxes):
        x = 9.0 * b
        for wid, x1, y1, x2, y2 in (
            (f"B{b}A", x, 0, x + 6, 0),
            (f"B{b}B", x + 6, 0, x + 6, 5),
            (f"B{b}C", x + 6, 5, x, 5),
            (f"B{b}D", x, 5, x, 0),
        ):
            sheets["walls"].append(
                [wid, x1, y1, x2, y2, 250, names[0], names[-1], 50, 500, 16, 200, 2, 12, 200, 2, 30]
            )
        sheets["openings"].append([f"B{b}A", names[0], names[-1], 2.0, 1.2, 0.0, 2.4])
        members += [f"B{b}A-1", f"B{b}A-2", f"B{b}B", f"B{b}C", f"B{b}D"]
    rows = 0
    for i, n in enumerate(names):
        above = storeys - i
        for c in range(combos):
            for j, m in enumerate(members):
                sheets["member_actions"].append(
                    [n, f"C{c}", m, 300.0 * above, 20.0 * above * (1 + c % 3), 40.0 * above * (1 + j % 2)]
                )
                rows += 1
            sheets["core_actions"].append(
                [
                    n,
                    f"C{c}",
                    2000.0 * above * boxes,
                    50.0 * above * (c % 4),
                    40.0 * above * ((c + 1) % 4),
                    100.0 * above**1.5,
                    120.0 * above**1.5,
                    10.0 * above,
                    None,
                    None,
                ]
            )
    wb.save(path)
    return rows


def measure(path: str) -> dict:
    """Run in a fresh process: phases of compute and peak memory."""
    from xlcore import pipeline
    from xlcore.validate import build
    from xlcore.workbook.reader import read_workbook
    from xlcore.workbook.writer import write_results

    out: dict[str, float] = {}
    t = time.perf_counter()
    raw = read_workbook(Path(path))
    out["read"] = time.perf_counter() - t
    t = time.perf_counter()
    b, f = build(raw)
    out["validate"] = time.perf_counter() - t
    o = pipeline.compute(b, f)
    out |= o.timings
    t = time.perf_counter()
    write_results(Path(path), Path(path).with_name("out.xlsx"), o.sheets, force=True)
    out["write"] = time.perf_counter() - t
    out["cells_written"] = sum(len(s.table) * len(s.columns) for s in o.sheets)
    out["peak_mb"] = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    return out


def floor(path: str, cells: int) -> dict:
    """Reading the input cells with the fastest reader at hand, writing as many numeric cells
    as plain sheet XML into a zip: what moving the cells alone costs."""
    out = {}
    try:
        from python_calamine import CalamineWorkbook

        t = time.perf_counter()
        wb = CalamineWorkbook.from_path(path)
        for name in wb.sheet_names:
            wb.get_sheet_by_name(name).to_python()
        out["floor_read"] = time.perf_counter() - t
    except ImportError:
        out["floor_read"] = float("nan")
    t = time.perf_counter()
    width = 30
    with zipfile.ZipFile(Path(path).with_name("floor.xlsx"), "w", zipfile.ZIP_DEFLATED, compresslevel=1) as z:
        rows = (
            f'<row r="{r}">' + "".join(f'<c r="A{r}"><v>{r * 1.5}</v></c>' for _ in range(width)) + "</row>"
            for r in range(1, cells // width + 2)
        )
        z.writestr(
            "xl/worksheets/sheet1.xml", "<worksheet><sheetData>" + "".join(rows) + "</sheetData></worksheet>"
        )
    out["floor_write"] = time.perf_counter() - t
    return out


def main(sizes: list[str]) -> None:
    print(
        f"{'size':<5}{'rows':>9}{'read':>8}{'valid':>8}{'geom':>8}{'share':>8}{'checks':>8}{'core':>8}"
        f"{'advice':>8}{'write':>8}{'total':>9}{'floor':>8}{'ratio':>7}{'peak MB':>9}"
    )
    for size in sizes:
        storeys, boxes, combos = SIZES[size]
        with tempfile.TemporaryDirectory() as d:
            path = Path(d) / f"{size}.xlsx"
            rows = generate(path, storeys, boxes, combos)
            r = subprocess.run(
                [sys.executable, __file__, "--measure", str(path)], capture_output=True, text=True
            )
            if r.returncode:
                print(size, "failed:", r.stderr[-500:])
                continue
            m = json.loads(r.stdout)
            fl = floor(str(path), int(m["cells_written"]))
        total = sum(
            m.get(k, 0.0)
            for k in ("read", "validate", "geometry", "sharing", "checks", "core checks", "advice", "write")
        )
        fl_total = fl["floor_read"] + fl["floor_write"]
        print(
            f"{size:<5}{rows:>9,}{m['read']:>8.2f}{m['validate']:>8.2f}{m['geometry']:>8.2f}{m['sharing']:>8.2f}"
            f"{m['checks']:>8.2f}{m.get('core checks', 0):>8.2f}{m['advice']:>8.2f}{m['write']:>8.2f}"
            f"{total:>9.2f}{fl_total:>8.2f}{total / fl_total:>7.1f}{m['peak_mb']:>9.0f}"
        )


if __name__ == "__main__":
    if len(sys.argv) > 2 and sys.argv[1] == "--measure":
        print(json.dumps(measure(sys.argv[2])))
    else:
        main(sys.argv[1:] or ["S", "M"])
