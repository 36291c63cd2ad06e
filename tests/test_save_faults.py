"""Faults while saving: a compute killed at any moment leaves either the original workbook or
the complete new one, never a half-written file; a failing disk leaves the original intact."""

from __future__ import annotations

import os
import random
import signal
import subprocess
import sys
import time
import zipfile
from pathlib import Path

import openpyxl
import pytest

from xlcore import layout, results
from xlcore.diagnostics import FileProblem
from xlcore.workbook.template import write_template

TRIALS = int(os.environ.get("XLCORE_KILL_TRIALS", "12"))


def small_building(path: Path) -> Path:
    """One storey, a 4 x 3 m box with a door: computes in a fraction of a second."""
    write_template(path)
    wb = openpyxl.load_workbook(path)
    wb[layout.STOREYS.name].append(["GF", 0.0, 3.0, 200])
    for wid, x1, y1, x2, y2 in (("A", 0, 0, 4, 0), ("B", 4, 0, 4, 3), ("C", 4, 3, 0, 3), ("D", 0, 3, 0, 0)):
        wb[layout.WALLS.name].append(
            [wid, x1, y1, x2, y2, 200, "GF", "GF", 40, 500, 12, 200, 2, 12, 200, 2, 30]
        )
    wb[layout.OPENINGS.name].append(["A", "GF", "GF", 1.0, 1.0, 0.0, 2.1])
    for member in ("A-1", "A-2", "B", "C", "D"):
        wb[layout.MEMBER_ACTIONS.name].append(["GF", "C1", member, 500.0, 100.0, 50.0])
    wb.save(path)
    return path


def state(path: Path, original: bytes) -> str:
    data = path.read_bytes()
    if data == original:
        return "original"
    with zipfile.ZipFile(path) as z:  # raises if half-written
        assert z.testzip() is None
    wb = openpyxl.load_workbook(path, read_only=True)
    assert results.SUMMARY_SHEET in wb.sheetnames
    return "new"


def _kill_trials(tmp_path: Path, trials: int) -> dict[str, int]:
    book = small_building(tmp_path / "book.xlsx")
    original = book.read_bytes()
    start = time.perf_counter()
    subprocess.run(
        [sys.executable, "-m", "xlcore", "compute", str(book), "-o", str(tmp_path / "probe.xlsx")],
        check=True,
        capture_output=True,
    )
    full = time.perf_counter() - start
    rng = random.Random(20261202)
    seen = {"original": 0, "new": 0}
    for _ in range(trials):
        book.write_bytes(original)
        proc = subprocess.Popen(
            [sys.executable, "-m", "xlcore", "compute", str(book), "--force"],
            stdout=subprocess.DEVNULL,
            stderr=subprocess.DEVNULL,
        )
        time.sleep(rng.uniform(0.5, 1.05) * full)  # mostly late in the run, where the write is
        proc.send_signal(signal.SIGKILL)
        proc.wait()
        seen[state(book, original)] += 1
    return seen


def test_killed_compute_leaves_original_or_complete_file(tmp_path):
    seen = _kill_trials(tmp_path, TRIALS)
    assert sum(seen.values()) == TRIALS


@pytest.mark.slow
def test_killed_compute_one_hundred_trials(tmp_path):
    seen = _kill_trials(tmp_path, max(TRIALS, 100))
    assert sum(seen.values()) >= 100


def test_stale_temporary_files_are_cleared_on_the_next_run(tmp_path):
    book = small_building(tmp_path / "book.xlsx")
    stale = tmp_path / ".book.xlsx.abc123.xlcore-tmp"
    stale.write_bytes(b"half")
    r = subprocess.run([sys.executable, "-m", "xlcore", "compute", str(book)], capture_output=True, text=True)
    assert r.returncode == 0, r.stderr
    assert not stale.exists()


def test_folder_not_writable_leaves_original(tmp_path, monkeypatch):
    from xlcore import pipeline
    from xlcore.workbook import writer

    book = small_building(tmp_path / "book.xlsx")
    before = book.read_bytes()

    def refuse(*a, **k):
        raise PermissionError(13, "Permission denied")

    monkeypatch.setattr(writer.tempfile, "mkstemp", refuse)
    b, f = pipeline.load(book)
    with pytest.raises(FileProblem, match="Permission denied"):
        writer.write_results(book, book, pipeline.compute(b, f).sheets)
    assert book.read_bytes() == before
    assert not list(tmp_path.glob("*.xlcore-tmp"))
