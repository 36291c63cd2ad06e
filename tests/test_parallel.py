"""Worker processes (xlcore/parallel.py) and `compute(workers=N)`: the same tables as one process.

Read as a checker's calculation: each result table of a run on two or three processes is
compared with the serial run's, column by column, floats bit for bit (`same_frame`); then the
rules that protect the engineer's run: a worker's error raised in the parent, a killed worker
named and reaped, serial where a thread is alive, the workbook lock held by the parent, and
`--workers 0` refused."""

from __future__ import annotations

import fcntl
import os
import signal
import sys
import threading
import time
from pathlib import Path

import pandas as pd
import pytest
from typer.testing import CliRunner

from tests.demo_parts import same_frame
from xlcore import parallel, pipeline
from xlcore.checks import advice
from xlcore.cli import app
from xlcore.workbook import writer

linux = pytest.mark.skipif(sys.platform != "linux", reason="worker processes on Linux only")


def no_children_left() -> bool:
    """Every child of this process reaped (none running, none a zombie)."""
    try:
        os.waitpid(-1, os.WNOHANG)
    except ChildProcessError:
        return True
    return False


def tables(o: pipeline.Outcome) -> dict[str, pd.DataFrame]:
    return {s.name: s.table for s in o.sheets}


def same_outcome(got: pipeline.Outcome, want: pipeline.Outcome) -> None:
    a, b = tables(got), tables(want)
    assert list(a) == list(b)
    for name in b:
        same_frame(a[name], b[name])


@pytest.fixture(autouse=True)
def one_thread():
    """Only the main thread alive, as in the command line's process: a thread an earlier test
    left (tqdm's monitor, a daemon some library starts with its first progress bar and keeps
    for the life of the process) would make every run serial (`parallel.can_fork`), rightly."""
    tqdm = sys.modules.get("tqdm")
    monitor = getattr(getattr(tqdm, "tqdm", None), "monitor", None)
    if monitor is not None:
        monitor.exit()
        tqdm.tqdm.monitor = None
    for t in threading.enumerate():  # (a progress display's refresh thread is told to stop,
        if t is not threading.main_thread():  # not joined: it ends within a refresh)
            t.join(timeout=2.0)
    others = [t.name for t in threading.enumerate() if t is not threading.main_thread()]
    assert not others, f"threads left alive by an earlier test: {others}"


@pytest.fixture
def always_share(monkeypatch):
    """No job too small to share: the demo is far below `SERIAL_BELOW`."""
    monkeypatch.setattr(pipeline, "SERIAL_BELOW", 0.0)


# ---------------------------------------------------------------------------------------------
# the tables


@linux
@pytest.mark.parametrize("standard", ["AS 3600:2018", "ACI 318-19"])
def test_demo_tables_the_same_on_two_and_three_processes(demo_master, always_share, standard):
    b, f = pipeline.load(demo_master)
    b = pipeline.with_standard(b, standard)
    serial = pipeline.compute(b, f, workers=1)
    assert len(serial.sheets) > 5 and len(serial.building.cores) == 2  # two cores' tables
    assert serial.failing > 0 or standard.startswith("AS")  # (the AS 3600 demo fails nowhere)
    for workers in (2, 3):
        got = pipeline.compute(b, f, workers=workers)
        assert got.ran in ("2 processes", "3 processes"), got.ran
        assert "advice and core checks" in got.timings and "advice" not in got.timings
        same_outcome(got, serial)
    assert no_children_left()


@pytest.fixture(scope="module")
def tower(tmp_path_factory) -> Path:
    """Four box cores' walls (one core: no core IDs) over 30 storeys, 45 failing storey x pier
    cases over many storeys: many pours to share out."""
    from tests.builders import tower_workbook

    path = tmp_path_factory.mktemp("tower") / "tower.xlsx"
    tower_workbook(path, 30, 2, 6)
    return path


POURS = ["the core at one storey", "the core over 2 storeys", "each wall at one storey"]


def with_settings(b, **fields):
    return b.model_copy(update={"settings": b.settings.model_copy(update=fields)})


@linux
@pytest.mark.parametrize("pour", POURS)
def test_tower_pours_over_storeys_the_same_on_two_processes(tower, always_share, pour):
    b, f = pipeline.load(tower)
    b = with_settings(b, grade_pour=pour)
    serial = pipeline.compute(b, f, workers=1)
    got = pipeline.compute(b, f, workers=2)
    assert got.ran == "2 processes" and serial.failing > 10
    same_outcome(got, serial)


@linux
@pytest.mark.parametrize("pour", POURS)
def test_demo_two_cores_and_pours_over_storeys_the_same_on_two_processes(demo_master, always_share, pour):
    b, f = pipeline.load(demo_master)
    b = with_settings(b, grade_pour=pour, standard="ACI 318-19")
    serial = pipeline.compute(b, f, workers=1)
    got = pipeline.compute(b, f, workers=2)
    assert got.ran == "2 processes" and serial.failing > 0
    same_outcome(got, serial)


@linux
def test_demo_parts_with_and_without_pair_rows_the_same_on_two_processes(demo_master, always_share):
    """ACI 318 demo, pours over 4 storeys, every action 1.3 times: a failing pier needs a pair
    of changes in one part of the pours and in none of the other. `advise` gives that other
    part's storey, pier_id, util and added_cost as object columns (its empty pair rows), the
    whole search typed ones: the joined table must have the whole's dtypes (review of issue 15)."""
    b, f = pipeline.load(demo_master)
    b = with_settings(b, grade_pour="the core over 4 storeys", standard="ACI 318-19")
    more = {
        "member_actions": b.member_actions.assign(**{c: b.member_actions[c] * 1.3 for c in ("n", "v", "m")}),
        "core_actions": b.core_actions.assign(
            **{c: b.core_actions[c] * 1.3 for c in ("n", "vx", "vy", "mx", "my", "t")}
        ),
    }
    b = b.model_copy(update=more)
    serial = pipeline.compute(b, f, workers=1)
    got = pipeline.compute(b, f, workers=2)
    assert got.ran == "2 processes" and serial.failing > 0
    whole = tables(serial)["Results advice"]
    assert whole.util.dtype == float  # (pair rows in the whole search)
    same_outcome(got, serial)


def test_advice_in_parts_of_pours_equals_the_whole(tower):
    """The search in two parts (every second pour) joined equals the whole search. What each
    part must still read whole is the pier table: ACI 318 ns (the storeys above the critical
    section, `advice.building_ns`) counts the building's storeys: from a part's own piers alone
    it would be smaller wherever the part's piers stop below the roof (the special-wall shear
    amplification then unconservative, as DEVELOPERS.md tells of the search's batches)."""
    b, f = pipeline.load(tower)
    s = b.settings.model_copy(update={"grade_pour": "the core over 2 storeys", "standard": "ACI 318-19"})
    b = b.model_copy(update={"settings": s})
    piers = pipeline.compute(b, f, workers=1).piers
    acts, _, _ = pipeline.pier_actions(b, piers, *_walls_plans(b, piers))
    summary = _summary_before_fix(b, f)
    whole = advice.advise(piers, acts, summary, s)
    failing = advice.failing_pours(piers, summary, s)
    pours = list(dict.fromkeys(failing.pour))
    assert len(pours) >= 3
    parts = [failing[failing.pour.isin(pours[k::2])] for k in (0, 1)]
    got = advice.join_advice(
        [advice.advise(piers, acts, advice.summary_part(summary, p), s) for p in parts], failing
    )
    same_frame(got, whole)
    # what a part reads whole: the pier table (its own pours' piers alone would give another ns)
    own = parts[0][["storey", "pier_id"]].merge(piers, on=["storey", "pier_id"])[piers.columns]
    assert own.storey_index.max() < piers.storey_index.max()
    ns = advice.building_ns(s, piers).aci_storeys_above
    assert advice.building_ns(s, own).aci_storeys_above < ns == piers.storey_index.max() + 1


def _walls_plans(b, piers):
    from xlcore import cores
    from xlcore.mechanics import stiffness

    s = b.settings
    walls = stiffness.sharing_stiffness(
        stiffness.wall_stiffness(piers, s.poisson, s.pier_fixity), s.poisson, s.wall_sharing
    )
    return walls, cores.plans_by_core(piers, walls)


def _summary_before_fix(b, f) -> pd.DataFrame:
    """The summary the advice search is given (before `with_cheapest_fix`), caught on its way."""
    seen = {}
    real = pipeline.advise

    def spy(piers, acts, summary, s):
        seen["summary"] = summary
        return real(piers, acts, summary, s)

    pipeline.advise = spy
    try:
        pipeline.compute(b, f, workers=1)
    finally:
        pipeline.advise = real
    return seen["summary"]


# ---------------------------------------------------------------------------------------------
# parallel.run


@linux
def test_results_in_task_order_longest_first():
    tasks = [lambda i=i: (i, os.getpid()) for i in range(7)]
    costs = [1, 5, 2, 9, 1, 3, 4]
    out, ran = parallel.run(tasks, 3, costs=costs)
    assert [i for i, _ in out] == list(range(7)) and ran.processes == 3
    pids = {i: p for i, p in out}
    assert pids[3] == os.getpid()  # the longest to the parent's share (share 0), then by least load
    assert len(set(pids.values())) == 3
    # by expected work 9, 5, 4, 3, 2, 1, 1: each to the least loaded share (ties: the lower)
    assert parallel.plan(costs, 3) == [[3], [0, 1, 2], [4, 5, 6]]
    assert no_children_left()


@linux
def test_a_child_writes_nothing_to_the_parents_output_descriptors(capfd):
    """A worker's text, even written under Python's streams (native code, `os.write`), never
    reaches the parent's stdout or stderr: `--json` prints one object and nothing else."""

    def noisy():
        os.write(1, b"CHILD-OUT")
        os.write(2, b"CHILD-ERR")
        print("CHILD-PRINT")
        return os.getpid()

    out, ran = parallel.run([lambda: os.getpid(), noisy], 2, costs=[2, 1])
    assert ran.processes == 2 and out[1] != os.getpid()  # the noisy task ran in the child
    seen = capfd.readouterr()
    assert "CHILD" not in seen.out and "CHILD" not in seen.err
    assert no_children_left()


@linux
def test_a_warning_in_a_child_is_shown_by_the_parent():
    """A warning a task raises in a worker reaches the engineer as it would from one process
    (the worker's own stderr goes nowhere): its text, category and line."""
    import warnings

    def warns():
        warnings.warn("pier W3: a value out of the usual range", RuntimeWarning, stacklevel=1)
        return os.getpid()

    with pytest.warns(RuntimeWarning, match="pier W3: a value out of the usual range") as seen:
        out, ran = parallel.run([lambda: os.getpid(), warns], 2, costs=[2, 1])
    assert ran.processes == 2 and out[1] != os.getpid()  # it was raised in the child
    assert seen[0].filename == __file__
    assert no_children_left()


class Odd(ValueError):
    pass


def _fails():
    raise Odd("pier W3 has no thickness")


@linux
def test_a_childs_exception_is_raised_in_the_parent_with_its_traceback():
    tasks = [lambda: 1, _fails, lambda: 3]
    with pytest.raises(Odd) as e:
        parallel.run(tasks, 3, costs=[1, 1, 1], names=["a", "b", "c"])
    text = str(e.value)
    assert "pier W3 has no thickness" in text and "in b, in a worker process" in text
    assert "_fails" in text  # the child's traceback
    assert no_children_left()


@linux
def test_a_killed_child_is_named_and_reaped():
    def dies():
        os.kill(os.getpid(), signal.SIGKILL)

    with pytest.raises(parallel.WorkerDied, match=r"running core C2 was killed by signal 9"):
        parallel.run([lambda: 1, dies], 2, costs=[2, 1], names=["pour A", "core C2"])
    assert no_children_left()


@linux
def test_interrupt_in_the_parent_kills_and_reaps_the_children():
    def slow():
        time.sleep(60)
        return 1

    def interrupted():
        time.sleep(0.2)
        raise KeyboardInterrupt

    t = time.perf_counter()
    with pytest.raises(KeyboardInterrupt):
        parallel.run([interrupted, slow], 2, costs=[2, 1])  # the parent takes `interrupted`
    assert time.perf_counter() - t < 10
    assert no_children_left()


def test_serial_while_another_thread_is_alive():
    stop = threading.Event()
    th = threading.Thread(target=stop.wait)
    th.start()
    try:
        out, ran = parallel.run([os.getpid, os.getpid], 2)
    finally:
        stop.set()
        th.join()
    assert out == [os.getpid(), os.getpid()]
    assert ran.processes == 1 and "threads" in ran.how


@linux
def test_a_progress_display_thread_is_stopped_while_forking():
    """The command line's progress display runs a refresh thread: forked beside it would be
    refused (serial); `without_threads` stops it for the forks and starts it again."""
    from rich.console import Console

    from xlcore.cli import _Display

    d = _Display(Console(force_terminal=True, file=open(os.devnull, "w")))  # noqa: SIM115
    with d.bar:
        d.begin("work", 2)
        assert threading.active_count() > 1
        out, ran = parallel.run([os.getpid, os.getpid], 2, forking=d.without_threads)
        assert ran.processes == 2 and out[0] != out[1]
        assert threading.active_count() > 1  # refreshing again
        d.end()


@linux
def test_the_workbook_lock_stays_held_by_the_parent(tmp_path):
    """Children inherit the lock's descriptor; they end by `os._exit`, so neither the lock's
    release (the parent's `with` block) nor any atexit handler runs in them."""
    book = tmp_path / "b.xlsx"
    book.write_bytes(b"")

    def held() -> bool:
        fd = os.open(writer.lock_path(book), os.O_RDWR)
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            return True
        finally:
            os.close(fd)
        return False

    with writer.workbook_lock(book):
        out, ran = parallel.run([held, held, held], 3)
        assert ran.processes == 3 and out == [True, True, True]  # held while they ran
        assert writer.lock_path(book).exists() and held()  # and after they ended
    assert not writer.lock_path(book).exists()  # released as before
    assert no_children_left()


def test_workers_zero_is_a_usage_error(demo_book):
    r = CliRunner().invoke(app, ["compute", str(demo_book), "--workers", "0", "--quiet"])
    assert r.exit_code == 2, r.output
    assert "--workers" in r.output


def test_workers_two_on_the_command_line(demo_book, always_share):
    r = CliRunner().invoke(app, ["compute", str(demo_book), "--workers", "2", "--quiet"])
    assert r.exit_code in (0, 3), r.output
    assert no_children_left()


ORPHANS = """
import os, sys, time
from xlcore import parallel
from xlcore.workbook import writer
book, pids = sys.argv[1], sys.argv[2]
def task():
    with open(pids, "a") as f:
        f.write(f"{os.getpid()}\\n")
    time.sleep(60)
    return 0
with writer.workbook_lock(book):
    parallel.run([task, task, task], 3)
"""


@linux
def test_a_parent_ended_by_sigterm_leaves_no_worker_holding_the_lock(tmp_path):
    """A parent killed by a signal it does not catch (SIGTERM from a scheduler, SIGKILL) runs no
    `finally`: its workers, orphaned, would run their tasks on and keep the workbook's flock
    (their inherited descriptor) until they end, and a second compute of the workbook be refused
    naming the dead parent. They die with the parent (review of issue 15)."""
    import subprocess

    book, pids = tmp_path / "b.xlsx", tmp_path / "pids"
    book.write_bytes(b"")
    root = Path(__file__).resolve().parent.parent
    p = subprocess.Popen(
        [sys.executable, "-c", ORPHANS, str(book), str(pids)], env={**os.environ, "PYTHONPATH": str(root)}
    )
    try:
        for _ in range(300):  # the three tasks started (the parent's share and two workers)
            time.sleep(0.05)
            if pids.exists() and len(pids.read_text().split()) == 3:
                break
        workers = [int(x) for x in pids.read_text().split() if int(x) != p.pid]
        assert len(workers) == 2
        p.send_signal(signal.SIGTERM)
        p.wait(timeout=10)
        deadline = time.time() + 5
        while time.time() < deadline and any(os.path.exists(f"/proc/{w}") for w in workers):
            time.sleep(0.05)
        left = [w for w in workers if os.path.exists(f"/proc/{w}")]
        assert not left, f"workers left running after their parent ended: {left}"
        fd = os.open(writer.lock_path(book), os.O_RDWR)
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)  # free: no orphan holds it
        finally:
            os.close(fd)
    finally:
        for w in [int(x) for x in pids.read_text().split()] if pids.exists() else []:
            if w != p.pid:
                try:
                    os.kill(w, signal.SIGKILL)
                except ProcessLookupError:
                    pass
        if p.poll() is None:
            p.kill()
