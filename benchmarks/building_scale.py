"""Building-scale timing: generate towers of three sizes in xlcore's workbook layout, time each
phase of `xlcore compute` with its peak memory, and, in the same process on the same data, the
floor of merely moving the cells: reading the input sheets with python-calamine (a compiled
reader) and writing the same result cells as plain sheet XML streamed into a zip (no styles,
no stamp, no other parts). Prints a table of medians over the runs. Not a test: figures vary
between machines, so compare ratios from one run.

    python benchmarks/building_scale.py                 # S and M, 3 runs each
    python benchmarks/building_scale.py S M L --runs 3  # choose sizes and runs
    python benchmarks/building_scale.py M --detail all --libreoffice  # every row; time LibreOffice
    python benchmarks/building_scale.py L --varied      # N* and M* differ in every combination
    python benchmarks/building_scale.py L --workers 2   # advice and core checks on 2 processes
"""

from __future__ import annotations

import argparse
import json
import math
import resource
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
import zipfile
from pathlib import Path
from xml.sax.saxutils import escape

# storeys, box cores (5 piers each), combinations
SIZES = {"S": (15, 2, 8), "M": (60, 6, 40), "L": (100, 12, 60)}
PHASES = (
    "read",
    "validate",
    "geometry",
    "sharing",
    "checks",
    "core checks",
    "advice",
    "advice and core checks",  # the two together on several processes (`--workers` > 1)
    "write",
)
KERNELS = ("geometry", "sharing", "checks", "core checks", "advice", "advice and core checks")
SHORT = {"advice and core checks": "adv+cor"}  # column heads


def generate(path: Path, storeys: int, boxes: int, combos: int, varied: bool = False) -> int:
    """A tower of `boxes` box cores in a row, one door per box, actions for every pier, filled
    into the project's own blank template (`xlcore template`). Returns the number of pier cases
    (storey x pier x combination). A pier's N* and M* are the same in every combination unless
    `varied`: then they differ by combination and pier, as an analysis reports them, so work a
    check shares between repeated cases gains nothing."""
    import openpyxl

    from xlcore import layout
    from xlcore.workbook.template import write_template

    write_template(path)
    wb = openpyxl.load_workbook(path)
    sheets = {t.key: wb[t.name] for t in layout.TABLES}
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
                n_star, m_star = 300.0 * above, 40.0 * above * (1 + j % 2)
                if varied:
                    n_star = round(n_star * (1 + 0.003 * (c % 11) + 0.001 * (j % 5)), 1)
                    m_star = round(m_star * (1 + 0.007 * (c % 13) - 0.002 * (j % 5)), 1)
                sheets["member_actions"].append([n, f"C{c}", m, n_star, 20.0 * above * (1 + c % 3), m_star])
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


def measure(path: str, detail: str = "auto", spawned: float | None = None, workers: int = 1) -> dict:
    """Run in a fresh process: phases of compute (the rows chosen by `--detail`, the workbook
    and the Parquet files of the full tables written as `xlcore compute` writes them), peak
    memory, then the floor on the same data: the input cells read, the cells actually written.
    `workers` > 1 is passed to compute where it takes it (a tree without it: serial). Peak
    memory of this process and of its largest worker process (`RUSAGE_CHILDREN`: the largest
    resident set of the reaped children, counting the pages they share with this process, so
    parent + child overstates the total by those shared pages; it never understates)."""
    import inspect

    from xlcore import pipeline
    from xlcore.validate import build
    from xlcore.workbook import tables, writer
    from xlcore.workbook.reader import read_workbook

    src = Path(path)
    dst = src.with_name("out.xlsx")
    out: dict[str, float] = {}
    # interpreter start and imports, from the parent's clock before it started this process
    out["startup"] = time.time() - spawned if spawned else 0.0
    t = time.perf_counter()
    raw = read_workbook(src)
    out["read"] = time.perf_counter() - t
    t = time.perf_counter()
    b, f = build(raw)
    del raw  # as `pipeline.load` (the CLI): the cells read are not held through compute
    out["validate"] = time.perf_counter() - t
    more = {"workers": workers} if "workers" in inspect.signature(pipeline.compute).parameters else {}
    o = pipeline.compute(b, f, detail=detail, **more)
    out |= o.timings
    out["ran"] = getattr(o, "ran", "") or "serial (a tree without workers)"
    out["peak_compute_mb"] = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    out["peak_child_mb"] = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024
    write_tables = tables.Staged.write

    def timed_write(self, *args, **kwargs):  # the Parquet files: a thread of their own, overlapping
        t0 = time.perf_counter()  # the workbook's writing (the write phase is not their sum)
        try:
            return write_tables(self, *args, **kwargs)
        finally:
            out["parquet"] = time.perf_counter() - t0

    tables.Staged.write = timed_write
    t = time.perf_counter()
    pipeline.select_detail(o, detail, tables.folder_for(dst).name)
    writer.write_results(src, dst, o.sheets, force=True, overwrite=True, tables=o.full_tables)
    out["write"] = time.perf_counter() - t
    out["peak_mb"] = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    out["cells"] = sum(len(s.table) * len(s.columns) for s in o.sheets)
    out["rows_written"] = sum(len(s.table) for s in o.sheets)
    out["rows_full"] = out["rows_written"] + sum(
        len(t.table) - len(s.table) for t in o.full_tables for s in o.sheets if s.name == t.name
    )
    out["book_mb"] = dst.stat().st_size / 1e6
    folder = tables.folder_for(dst)
    out["parquet_mb"] = sum(p.stat().st_size for p in folder.iterdir()) / 1e6 if folder.is_dir() else 0.0
    out["floor_read"] = floor_read(src)
    t = time.perf_counter()
    floor_write(src.with_name("floor.xlsx"), [(s.table, [c.key for c in s.columns]) for s in o.sheets])
    out["floor_write"] = time.perf_counter() - t
    return out


def floor_read(path: Path) -> float:
    """Every cell of every sheet as Python values, by the compiled reader."""
    from python_calamine import CalamineWorkbook

    t = time.perf_counter()
    wb = CalamineWorkbook.from_path(str(path))
    for name in wb.sheet_names:
        wb.get_sheet_by_name(name).to_python()
    return time.perf_counter() - t


def floor_write(path: Path, tables: list) -> None:
    """The same result cells as plain sheet XML (numbers as <v>, text inline), a column at a time
    and one format per row, streamed into a zip at deflate level 1: the least a writer does."""
    from openpyxl.utils import get_column_letter

    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED, compresslevel=1) as z:
        for k, (table, keys) in enumerate(tables):
            keys = [c for c in keys if c in table]
            letters = [get_column_letter(j + 1) for j in range(len(keys))]
            with z.open(f"xl/worksheets/sheet{k + 1}.xml", "w", force_zip64=True) as part:
                part.write(b"<worksheet><sheetData>")
                for lo in range(0, len(table), 4096):
                    chunk = table.iloc[lo : lo + 4096]
                    cols = []
                    for key, letter in zip(keys, letters, strict=True):
                        vals = chunk[key].tolist()
                        cells = []
                        for i, v in enumerate(vals, start=lo + 1):
                            if isinstance(v, float):
                                cells.append(
                                    f'<c r="{letter}{i}"><v>{v!r}</v></c>' if math.isfinite(v) else ""
                                )
                            elif isinstance(v, int):
                                cells.append(f'<c r="{letter}{i}"><v>{v}</v></c>')
                            elif v is None or v == "":
                                cells.append("")
                            else:
                                cells.append(
                                    f'<c r="{letter}{i}" t="inlineStr"><is><t>{escape(str(v))}</t></is></c>'
                                )
                        cols.append(cells)
                    rows = (
                        f'<row r="{lo + 1 + i}">' + "".join(r) + "</row>"
                        for i, r in enumerate(zip(*cols, strict=True))
                    )
                    part.write("".join(rows).encode())
                part.write(b"</sheetData></worksheet>")


def libreoffice_open(path: Path, profile: Path) -> float | None:
    """Seconds for LibreOffice, headless, to open the workbook and write its first sheet as CSV
    (`soffice --convert-to csv`): loading every sheet is most of it. None where it is not
    installed. A tiny file is converted first with the same profile, so the profile's creation
    on first start is not counted."""
    soffice = shutil.which("soffice")
    if soffice is None:
        return None
    env = f"-env:UserInstallation=file://{profile}"

    def convert(p: Path) -> float:
        t = time.perf_counter()
        subprocess.run(
            [
                soffice,
                env,
                "--headless",
                "--convert-to",
                "csv",
                "--outdir",
                str(profile.parent / "csv"),
                str(p),
            ],
            capture_output=True,
            timeout=900,
            check=True,
        )
        return time.perf_counter() - t

    warm = profile.parent / "warm.csv"
    warm.write_text("1,2\n")
    convert(warm)
    return convert(path)


def main(sizes: list[str], runs: int, detail: str, lo: bool, varied: bool = False, workers: int = 1) -> None:
    print(
        f"medians of {runs} runs, seconds; --detail {detail}"
        f"{'; --varied: N* and M* differ in every combination' if varied else ''}; --workers {workers}; "
        "kernels = geometry + sharing + checks + core checks + advice (adv+cor: the two together "
        "on several processes); write = workbook + Parquet files (parquet: their thread, overlapping); "
        "peakMB: this process, childMB: the largest worker process (shared pages counted in both)"
    )
    head = "".join(f"{SHORT.get(p, p[:7]):>8}" for p in PHASES)
    print(
        f"{'size':<5}{'cases':>9}{head}{'parquet':>8}{'total':>8}{'f.read':>8}{'f.write':>8}{'ratio':>7}"
        f"{'kernel%':>8}{'peakMB':>7}{'childMB':>8}"
    )
    totals = {}
    books = {}
    for size in sizes:
        storeys, boxes, combos = SIZES[size]
        with tempfile.TemporaryDirectory() as d:
            path = Path(d) / f"{size}.xlsx"
            cases = generate(path, storeys, boxes, combos, varied)
            results = []
            for _ in range(runs):
                r = subprocess.run(
                    [
                        sys.executable,
                        __file__,
                        "--measure",
                        str(path),
                        detail,
                        repr(time.time()),
                        str(workers),
                    ],
                    capture_output=True,
                    text=True,
                )
                if r.returncode:
                    print(size, "failed:", r.stderr[-800:])
                    break
                results.append(json.loads(r.stdout))
            lo_s = (
                libreoffice_open(path.with_name("out.xlsx"), Path(d) / "lo-profile")
                if lo and results
                else None
            )
        if not results:
            continue
        books[size] = (results[-1], lo_s)
        for m in results:
            m["total"] = sum(m.get(p, 0.0) for p in PHASES)
            m["floor"] = m["floor_read"] + m["floor_write"]
            m["ratio"] = m["total"] / m["floor"]
            m["kernel"] = 100 * sum(m.get(p, 0.0) for p in KERNELS) / m["total"]

        def med(key: str, results=results) -> float:
            return statistics.median(m.get(key, 0.0) for m in results)

        totals[size] = (cases, med("total"))
        cells = "".join(f"{med(p):>8.2f}" for p in PHASES)
        print(
            f"{size:<5}{cases:>9,}{cells}{med('parquet'):>8.2f}{med('total'):>8.2f}{med('floor_read'):>8.2f}"
            f"{med('floor_write'):>8.2f}{med('ratio'):>7.2f}{med('kernel'):>8.1f}{med('peak_mb'):>7.0f}"
            f"{med('peak_child_mb'):>8.0f}"
        )
        print(f"{'':<5}ran: {', '.join(sorted({m.get('ran', '') for m in results}))}")
    print()
    print("end to end = interpreter start and imports + the phases above (last run); rows and sizes of it")
    head = (
        "size",
        "start",
        "end to end",
        "rows computed",
        "rows written",
        "workbook MB",
        "Parquet MB",
        "peak@compute",
    )
    print(f"{head[0]:<5}" + "".join(f"{h:>14}" for h in head[1:]) + f"{'LibreOffice open s':>20}")
    for size, (m, lo_s) in books.items():
        shown = (
            "not installed"
            if lo_s is None and shutil.which("soffice") is None
            else ("not run" if lo_s is None else f"{lo_s:.1f}")
        )
        cells = (m["startup"], m["startup"] + m["total"], m["rows_full"], m["rows_written"])
        print(
            f"{size:<5}{cells[0]:>14.2f}{cells[1]:>14.2f}{cells[2]:>14,.0f}{cells[3]:>14,.0f}"
            f"{m['book_mb']:>14.1f}{m['parquet_mb']:>14.1f}{m['peak_compute_mb']:>14.0f}{shown:>20}"
        )
    if "M" in totals and "L" in totals:
        (cm, tm), (cl, tl) = totals["M"], totals["L"]
        print(
            f"growth M -> L: cases x{cl / cm:.2f}, time x{tl / tm:.2f} "
            f"(time ratio / case ratio = {(tl / tm) / (cl / cm):.2f}; linear or better is <= 1.2)"
        )


if __name__ == "__main__":
    if len(sys.argv) > 2 and sys.argv[1] == "--measure":
        workers = int(sys.argv[5]) if len(sys.argv) > 5 else 1
        print(json.dumps(measure(sys.argv[2], sys.argv[3], float(sys.argv[4]), workers)))
    else:
        ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
        ap.add_argument("sizes", nargs="*", default=["S", "M"], choices=sorted(SIZES))
        ap.add_argument("--runs", type=int, default=3)
        ap.add_argument("--detail", default="auto", choices=["auto", "governing", "all"])
        ap.add_argument(
            "--libreoffice", action="store_true", help="also time LibreOffice opening the computed workbook"
        )
        ap.add_argument(
            "--varied",
            action="store_true",
            help="N* and M* different in every combination (no repeated cases)",
        )
        ap.add_argument(
            "--workers",
            type=int,
            default=1,
            help="processes for the advice search and the core checks (compute's workers; default 1, "
            "serial, as earlier rounds measured)",
        )
        a = ap.parse_args()
        if a.workers < 1:
            ap.error("--workers must be 1 or more")
        main(a.sizes, a.runs, a.detail, a.libreoffice, a.varied, a.workers)
