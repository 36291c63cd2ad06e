"""Independent tasks on several processes made by `os.fork`, results as if run one by one.

Why fork: the tasks (the advice search per group of pours, the whole-core checks per core)
read the building, its actions and the checks' tables, hundreds of megabytes at building
scale. A forked child inherits them as they are (pages shared until written), so nothing is
pickled on the way in; only each task's result comes back, pickled through a pipe. The parent
runs a share of the tasks itself while the children run theirs.

Rules that protect the engineer's run (each one a test in tests/test_parallel.py):
- Linux only (macOS forks badly with system frameworks loaded, Windows cannot fork), and only
  when no other Python thread is alive in the process (a fork copies one thread: a lock another
  thread held stays locked forever in the child, e.g. inside a notebook kernel). Otherwise
  serial, said in `Ran.how`. `threading` sees Python's threads only: the native threads numpy's
  BLAS and pandas' allocator (jemalloc) start on import are not seen; those libraries make
  themselves safe across a fork (their own fork handlers), and every run of the tests and
  review forked beside them.
- stdout and stderr are flushed before forking (else buffered text is written twice); a child
  never prints (its warnings go back with its results and the parent shows them), never
  writes a file, never runs atexit handlers (`os._exit`), ignores Ctrl-C
  (the parent decides), and is killed by the kernel when the parent ends (an orphan would hold
  the workbook's lock). A lock the parent holds (the compute's flock on the workbook) stays
  held by the parent: a child only closes its inherited copy of the descriptor on exit, which
  releases nothing while the parent's stays open.
- A task's exception is raised again in the parent (its own type where it pickles, the child's
  traceback text added to its message); a child that dies without a result raises
  `WorkerDied` naming its tasks; on every path each child is reaped, and on an error or
  KeyboardInterrupt in the parent the children still running are killed first.
"""

from __future__ import annotations

import ctypes
import os
import pickle
import signal
import sys
import threading
import traceback
import warnings
from collections.abc import Callable, Sequence
from contextlib import AbstractContextManager, nullcontext
from dataclasses import dataclass
from typing import Any

MAX_WORKERS = 8  # the auto default's cap: the kernels split into a few dozen tasks at most


class WorkerDied(RuntimeError):
    """A worker process ended without sending its tasks' results (killed, out of memory,
    crashed in native code)."""


class TaskFailed(RuntimeError):
    """A task raised in a worker an exception that could not be sent back as itself."""


@dataclass
class Ran:
    """How `run` ran the tasks: the number of processes used (1: serial) and why, in words."""

    processes: int
    how: str


def auto_workers() -> int:
    """The CPUs this process may use (its affinity, not the machine's count), capped at
    MAX_WORKERS: beyond that the tasks are too few and the copied pages cost memory."""
    try:
        n = len(os.sched_getaffinity(0))
    except AttributeError:  # (not on macOS or Windows)
        n = os.cpu_count() or 1
    return max(1, min(n, MAX_WORKERS))


def can_fork() -> str | None:
    """Why the tasks must run serially here, or None where forking is safe."""
    if sys.platform != "linux":
        return f"serial (no worker processes on {sys.platform})"
    if threading.active_count() != 1:
        return "serial (other threads alive in this process: forking could deadlock)"
    return None


def plan(costs: Sequence[float], workers: int) -> list[list[int]]:
    """The tasks' indices split into `workers` shares, longest expected first, each to the
    share with the least expected work so far (ties: the lower share); each share in task
    order. Share 0 is the parent's."""
    shares: list[list[int]] = [[] for _ in range(max(1, workers))]
    load = [0.0] * len(shares)
    for i in sorted(range(len(costs)), key=lambda i: (-costs[i], i)):
        k = min(range(len(shares)), key=lambda k: (load[k], k))
        shares[k].append(i)
        load[k] += costs[i]
    return [sorted(s) for s in shares if s]


def run(
    tasks: Sequence[Callable[[], Any]],
    workers: int = 1,
    costs: Sequence[float] | None = None,
    names: Sequence[str] | None = None,
    forking: Callable[[], AbstractContextManager] = nullcontext,
) -> tuple[list[Any], Ran]:
    """Each task's result, in task order: the same list `[t() for t in tasks]` gives, on up to
    `workers` processes (this one included). `costs`: each task's expected work (longest
    first); `names`: each task's name for the errors; `forking`: a context in which the caller
    runs no thread of its own (`Reporter.without_threads`), the children forked inside it."""
    names = list(names) if names is not None else [f"task {i + 1}" for i in range(len(tasks))]
    workers = min(workers, len(tasks))
    why = None if workers > 1 else "serial (one process asked for or one task)"
    shares = plan(list(costs) if costs is not None else [1.0] * len(tasks), workers)
    pending: list[tuple[int, int, list[int]]] = []  # children not yet reaped: pid, read end, tasks
    results: list[Any] = [None] * len(tasks)
    registry: dict = {}  # the children's warnings already shown (`_receive`)
    try:
        if why is None:
            with forking():  # (the caller's own threads stopped, e.g. a progress display's)
                why = can_fork()
                if why is None:
                    sys.stdout.flush()
                    sys.stderr.flush()
                    for share in shares[1:]:
                        pending.append(_fork(tasks, share))
        if why is not None:
            return [t() for t in tasks], Ran(1, why)
        for i in shares[0]:
            results[i] = tasks[i]()
        while pending:
            pid, fd, share = pending[0]
            sent = _read_all(fd)  # to the end: the child has sent all or died
            os.close(fd)
            pending[0] = (pid, -1, share)
            _, status = os.waitpid(pid, 0)
            pending.pop(0)
            _receive(sent, status, share, names, results, registry)
    except BaseException:
        _kill(pending)
        raise
    return results, Ran(len(shares), f"{len(shares)} processes")


def _fork(tasks: Sequence[Callable[[], Any]], share: list[int]) -> tuple[int, int, list[int]]:
    r, w = os.pipe()
    parent = os.getpid()
    pid = os.fork()
    if pid == 0:  # the child: never returns
        code = 0
        try:
            os.close(r)
            signal.signal(signal.SIGINT, signal.SIG_IGN)  # the parent handles Ctrl-C
            _die_with(parent)
            devnull = open(os.devnull, "w")  # noqa: SIM115 (closed by os._exit)
            sys.stdout = sys.stderr = devnull  # never print: Python's streams and the
            os.dup2(devnull.fileno(), 1)  # descriptors under them (native code, os.write),
            os.dup2(devnull.fileno(), 2)  # else text lands in the middle of --json's object
            out: list[tuple[str, Any]] = []
            with warnings.catch_warnings(record=True) as caught:  # sent to the parent, shown there
                for i in share:
                    try:
                        out.append(("ok", tasks[i]()))
                    except BaseException as e:  # noqa: BLE001 (sent to the parent as it is)
                        out.append(("error", _packed(e, i)))
                        break
            said = [_warning(w) for w in caught]
            try:
                data = pickle.dumps((out, said), protocol=pickle.HIGHEST_PROTOCOL)
            except Exception as e:  # noqa: BLE001 (a result that does not pickle)
                data = pickle.dumps(([("error", _packed(e, share[len(out) - 1]))], said))
            with os.fdopen(w, "wb") as f:
                f.write(data)
        except BaseException:  # noqa: BLE001
            code = 70
        finally:
            os._exit(code)
    os.close(w)
    return pid, r, share


def _die_with(parent: int) -> None:
    """Have the kernel kill this child when its parent ends (Linux's PR_SET_PDEATHSIG). Else a
    parent ended by a signal it cannot catch (SIGTERM from a scheduler, SIGKILL) leaves its
    children running their tasks as orphans, and they hold the workbook's lock (the flock'd
    descriptor they inherited) until they end: another compute of the workbook is refused,
    naming the dead parent. A parent already gone before the call: end now."""
    try:
        libc = ctypes.CDLL(None, use_errno=True)
        libc.prctl(1, signal.SIGKILL, 0, 0, 0)  # PR_SET_PDEATHSIG = 1
    except (OSError, AttributeError):  # (no prctl: the orphan case stays as it was)
        return
    if os.getppid() != parent:
        os._exit(70)


def _warning(w: warnings.WarningMessage) -> tuple[str, type[Warning], str, int]:
    """A warning a task raised in a child, for the pipe: its text, category (UserWarning where
    the category does not pickle), file and line."""
    category = w.category
    try:
        pickle.loads(pickle.dumps(category))
    except Exception:  # noqa: BLE001
        category = UserWarning
    return str(w.message), category, w.filename, w.lineno


def _packed(e: BaseException, i: int) -> tuple[int, bytes | None, str, str]:
    """A task's exception for the pipe: the task, the exception pickled (None where it does not
    pickle), its type's name and the child's traceback text."""
    text = "".join(traceback.format_exception(e))
    try:
        blob: bytes | None = pickle.dumps(e)
        pickle.loads(blob)
    except Exception:  # noqa: BLE001
        blob = None
    return i, blob, f"{type(e).__module__}.{type(e).__qualname__}: {e}", text


def _read_all(fd: int) -> bytes:
    parts = []
    while chunk := os.read(fd, 1 << 20):
        parts.append(chunk)
    return b"".join(parts)


def _receive(
    sent: bytes, status: int, share: list[int], names: Sequence[str], results: list[Any], registry: dict
) -> None:
    """The child's results into `results` and its tasks' warnings shown here (`registry`: the
    run's, so a warning several children raise at one line is shown once, as one process
    shows it); its task's exception raised again, or `WorkerDied` where it sent nothing whole."""
    try:
        out, said = pickle.loads(sent) if sent else (None, [])
    except Exception:  # noqa: BLE001 (cut short: the child died while writing)
        out, said = None, []
    for text, category, filename, lineno in said:  # shown as one process shows them
        warnings.warn_explicit(text, category, filename, lineno, registry=registry)
    if out is None:
        if os.WIFSIGNALED(status):
            end = f"was killed by signal {os.WTERMSIG(status)} ({signal.Signals(os.WTERMSIG(status)).name})"
        else:
            end = f"exited with code {os.WEXITSTATUS(status)}"
        listed = ", ".join(names[i] for i in share)
        raise WorkerDied(f"a worker process running {listed} {end} before sending its results")
    for i, (kind, value) in zip(share, out, strict=False):
        if kind == "ok":
            results[i] = value
            continue
        at, blob, said, text = value
        note = f"(in {names[at]}, in a worker process; its traceback:\n{text})"
        e = None
        if blob is not None:
            try:
                e = pickle.loads(blob)
            except Exception:  # noqa: BLE001
                e = None
        if isinstance(e, BaseException):
            if e.args and isinstance(e.args[0], str):
                e.args = (f"{e.args[0]}\n{note}", *e.args[1:])
            else:
                e.args = (*e.args, note)
            raise e
        raise TaskFailed(f"{said}\n{note}")


def _kill(children: list[tuple[int, int, list[int]]]) -> None:
    """Kill and reap every child still listed, closing the read ends left open."""
    for pid, fd, _ in children:
        try:
            os.kill(pid, signal.SIGKILL)
        except ProcessLookupError:
            pass
        if fd >= 0:
            try:
                os.close(fd)
            except OSError:
                pass
    for pid, _, _ in children:
        try:
            os.waitpid(pid, 0)
        except ChildProcessError:
            pass
