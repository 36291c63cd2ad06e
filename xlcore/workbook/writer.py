"""Result sheets into the engineer's workbook, by editing the package surgically.

Only four kinds of part change: xlcore's own result sheets (replaced), the workbook part and
its relationships (which list sheets and defined names), the content-type index, and the style
sheet (entries appended, never renumbered). Every other part is copied unchanged, so nothing
the engineer made (charts, images, macros, comments, validations, formatting) is lost. The
calculation chain, a cache the spreadsheet program rebuilds, is dropped as the program would
ask to repair otherwise. The new file is written beside the old one and swapped in atomically.

How xlcore knows its own sheets: a spreadsheet program that saves the workbook rewrites every
sheet (our inline text moves to the shared-strings table, styles are renumbered), so no raw
bytes survive. Two marks do: a hidden workbook-level defined name per result sheet
(`xlcore_sheet_1` = `'Results summary'!$A$1`, ...), which the program keeps and follows through
a rename, and the stamp text in A1 (read through the shared strings). A sheet is replaced only
when its name starts with `Results ` (any case), its A1 starts with the stamp, and a mark names
it (or A1 is still our inline text, i.e. no program has saved the sheet since we wrote it).
"""

from __future__ import annotations

import contextlib
import copy
import dataclasses
import functools
import os
import queue
import re
import shutil
import stat
import struct
import tempfile
import threading
import zipfile
import zlib
from collections.abc import Callable, Iterator, Sequence
from pathlib import Path

from lxml import etree

from xlcore import results
from xlcore.diagnostics import FileProblem
from xlcore.layout import RESULT_PREFIX
from xlcore.progress import SILENT, Reporter
from xlcore.results import MARKER, ResultSheet
from xlcore.workbook import tables as full_tables
from xlcore.workbook.package import (
    NS_CT,
    NS_MAIN,
    NS_PKG_REL,
    NS_REL,
    PARSER,
    WORKSHEET_REL,
    open_package,
    part_path,
    read_xml,
)
from xlcore.workbook.sheetxml import Styles, print_titles, sheet_pieces, split

WORKSHEET_CT = "application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"
CALC_CHAIN_REL = NS_REL + "/calcChain"
M = f"{{{NS_MAIN}}}"
MARK_NAME = "xlcore_sheet_"  # + 1, 2, ...: hidden workbook-level names, one per result sheet
LOCK_SUFFIX = ".xlcore-lock"


def lock_files(path: Path) -> list[Path]:
    """Lock files that Excel (~$name) and LibreOffice (.~lock.name#) leave beside an open file
    (beside the link and beside its target, where the workbook is a symbolic link)."""
    path = Path(path)
    found = []
    for p in dict.fromkeys([path, _real(path)]):
        for n in (f"~${p.name}", f".~lock.{p.name}#"):
            if p.with_name(n).exists():
                found.append(p.with_name(n))
    return found


def backup_path(path: Path) -> Path:
    """Where the previous version of `path` is kept: beside the real file (a link's target)."""
    real = _real(Path(path))
    return real.with_name(f"{real.stem}.xlcore-backup{real.suffix}")


def _real(path: Path) -> Path:
    """The file a path names, through symbolic links (written through, never replaced)."""
    return Path(os.path.realpath(path)) if os.path.islink(path) else path


def _read_only(path: Path) -> bool:
    """No write permission bit set, or no write access for this user (root has it always, so
    the bits are asked too)."""
    try:
        mode = path.stat().st_mode
    except FileNotFoundError:
        return False
    return not (mode & (stat.S_IWUSR | stat.S_IWGRP | stat.S_IWOTH)) or not os.access(path, os.W_OK)


_HELD: dict[str, int] = {}  # lock files this process holds -> depth (the lock is re-entrant)


def lock_path(path: Path) -> Path:
    real = _real(Path(path))
    return real.with_name(f".{real.name}{LOCK_SUFFIX}")


@contextlib.contextmanager
def workbook_lock(path: Path) -> Iterator[Path]:
    """An exclusive lock of xlcore's own on the workbook at `path` for as long as the block
    runs, so a second compute writing the same file refuses at once instead of deleting the
    first one's temporary file or backing up its half-done output.

    The lock is an OS lock (flock; on Windows msvcrt.locking) on `.NAME.xlcore-lock` beside
    the file: the OS releases it when the process ends, however it ends, so it never goes
    stale. The file is removed on release; a lock taken on a file that another run removed in
    the meantime is taken again on the new one."""
    lock = lock_path(path)
    key = str(lock)
    if key in _HELD:
        _HELD[key] += 1
        try:
            yield lock
        finally:
            _HELD[key] -= 1
        return
    fd = _take(lock, Path(path))
    _HELD[key] = 1
    try:
        yield lock
    finally:
        del _HELD[key]
        with contextlib.suppress(OSError):
            os.unlink(lock)
        os.close(fd)


def _take(lock: Path, path: Path) -> int:
    for _ in range(100):
        try:
            fd = os.open(lock, os.O_RDWR | os.O_CREAT, 0o666)
        except OSError as exc:
            raise FileProblem(
                f"{path}: cannot create the lock file {lock.name} in {lock.parent} "
                f"({exc.strerror or exc}); the workbook is unchanged"
            ) from exc
        if not _lock_fd(fd):
            try:
                holder = os.read(fd, 64).decode("ascii", "replace").strip()
            except OSError:
                holder = ""
            os.close(fd)
            who = f" (process {holder})" if holder.isdigit() else ""
            raise FileProblem(
                f"{path}: another xlcore run{who} is writing this workbook now; wait for it to "
                f"finish and run again (its lock is {lock.name}, released when that run ends)"
            )
        try:
            same = os.fstat(fd).st_ino == os.stat(lock).st_ino
        except FileNotFoundError:
            same = False
        if same:
            os.ftruncate(fd, 0)
            os.write(fd, f"{os.getpid()}\n".encode())
            return fd
        os.close(fd)  # the previous holder removed the file between our open and our lock
    raise FileProblem(f"{path}: could not take the lock {lock.name}; run again")


def _lock_fd(fd: int) -> bool:
    try:
        import fcntl
    except ImportError:  # Windows
        import msvcrt

        try:
            msvcrt.locking(fd, msvcrt.LK_NBLCK, 1)
        except OSError:
            return False
        return True
    try:
        fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
    except BlockingIOError:
        return False
    return True


def write_results(
    src: Path,
    dst: Path,
    sheets: list[ResultSheet],
    force: bool = False,
    reporter: Reporter = SILENT,
    overwrite: bool = False,
    tables: Sequence[ResultSheet] = (),
) -> Path | None:
    """Replace xlcore's result sheets in `src` with `sheets`, saving to `dst` atomically.

    `tables`: full tables whose rows `sheets` hold only in part, written as Parquet files in
    the folder beside `dst` (`tables.folder_for`): staged before the workbook is saved, renamed
    into place after it, files of earlier runs removed (`xlcore.workbook.tables`); a failure
    before the save leaves the folder as it was.

    Whenever `dst` exists, its previous version is kept as a backup beside it (written like the
    workbook: temporary file, then rename). A `dst` other than `src` that exists, and a
    read-only `dst`, are replaced only with `overwrite`; a lock file of a spreadsheet program
    only with `force`. A symbolic link is written through to its target. The reporter hears
    the result rows as they are written. Returns the backup written, if any.
    """
    src, dst = Path(src), Path(dst)
    real, shown, backup = check_target(src, dst, force=force, overwrite=overwrite)
    # a sheet whose working text was left for the rows written (compute(detail=...)) but that
    # did not pass through pipeline.select_detail: every row written, so every row's text
    sheets = [
        s if s.rework is None else dataclasses.replace(s, table=s.rework(s.table), rework=None)
        for s in sheets
    ]
    with workbook_lock(dst):
        existed = real.exists()
        stamp = {str(k): str(v) for k, v in (sheets[0].preamble if sheets else [])}
        if tables:
            reporter.begin(f"writing {len(tables)} full tables (Parquet)")
        staged = full_tables.prepare(dst, tables)  # refusals first, before any work
        tables_job = _Job(staged.write, tables, stamp)  # in a thread: pyarrow and zstd free the GIL
        crc_job = None
        try:
            with open_package(src) as zf:
                package = _build(zf, sheets, reporter.advance)
            # the large parts copied as stored, inflated and checked meanwhile (zlib frees the GIL)
            raws = [(info, data.data) for info, data in package if isinstance(data, _Raw)]
            crc_job = _Job(_check_raw, raws)
            _save(
                package,
                real,
                shown,
                backup,
                len(sheets),
                sum(len(s.table) for s in sheets),
                reporter,
                ready=lambda: (crc_job.result(), tables_job.result()),
            )
        except BaseException:
            if crc_job is not None:
                crc_job.wait()
            tables_job.wait()
            staged.discard()
            raise
        try:
            staged.commit()
        except OSError as exc:
            raise FileProblem(
                f"{shown} was saved, but the full tables in {staged.folder} could not be put in "
                f"place ({exc.strerror or exc}); run compute again"
            ) from exc
    return backup if existed else None


def check_target(
    src: Path, dst: Path, force: bool = False, overwrite: bool = False
) -> tuple[Path, str, Path]:
    """Refuse, before any work, to write where the engineer would lose something: a workbook
    open in a spreadsheet program (unless `force`), an existing other file or a read-only one
    (unless `overwrite`), a read-only backup. Returns the real file (a link's target), how to
    name it in messages, and its backup."""
    src, dst = Path(src), Path(dst)
    real = _real(dst)
    shown = f"{dst} (a link to {real})" if real != dst else str(dst)
    locks = lock_files(dst)
    if locks and not force:
        raise FileProblem(
            f"{shown} looks open in a spreadsheet program (lock file {locks[0].name} beside it). "
            "Close it there and run again. If no program has it open, the lock file is stale "
            "(left by a crash): delete it, or run with --force."
        )
    in_place = real.exists() and src.exists() and os.path.samefile(src, real)
    if real.exists() and not in_place and not overwrite:
        raise FileProblem(
            f"{shown} exists; choose another name or pass --overwrite to replace it "
            f"(its previous version is then kept as {backup_path(dst).name})"
        )
    if real.exists() and _read_only(real) and not overwrite:
        raise FileProblem(
            f"{shown} is read-only; make it writable, or pass --overwrite to replace it anyway; "
            "the workbook is unchanged"
        )
    backup = backup_path(dst)
    if real.exists() and backup.exists() and _read_only(backup):
        raise FileProblem(
            f"the backup {backup} is read-only (kept on purpose?); move it away or make it "
            f"writable and run again; {shown} is unchanged"
        )
    return real, shown, backup


class _Job:
    """A function run in a thread of its own from now on; `result` waits for it and raises what
    it raised, `wait` only waits. Its errors surface where the caller asks, never lost."""

    def __init__(self, fn: Callable[..., object], *args: object) -> None:
        self._error: BaseException | None = None
        self._thread = threading.Thread(target=self._run, args=(fn, args), name="xlcore-write", daemon=False)
        self._thread.start()

    def _run(self, fn: Callable[..., object], args: tuple) -> None:
        try:
            fn(*args)
        except BaseException as exc:  # handed to the caller by result()
            self._error = exc

    def wait(self) -> None:
        self._thread.join()

    def result(self) -> None:
        self._thread.join()
        if self._error is not None:
            error, self._error = self._error, None
            raise error


def _save(
    package: list,
    real: Path,
    shown: str,
    backup: Path,
    n_sheets: int,
    n_rows: int,
    reporter,
    ready: Callable[[], None] | None = None,
) -> None:
    """The package into a temporary file beside `real`, the previous `real` into the backup
    (temporary file, then rename), then the new file over `real`. Called holding the lock.
    `ready` (the full tables being written meanwhile) is waited for once the new file is
    written, before anything is replaced: its error leaves the workbook as it was."""
    folder = real.parent
    for pattern in (f".{real.name}.*.xlcore-tmp", f".{backup.name}.*.xlcore-tmp"):
        for stale in folder.glob(pattern):  # left by a run that was killed (none runs now: locked)
            _remove(str(stale))
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{real.name}.", suffix=".xlcore-tmp", dir=folder)
    except OSError as exc:
        raise FileProblem(
            f"{shown}: cannot write in {folder} ({exc.strerror or exc}); the workbook is unchanged"
        ) from exc
    try:
        reporter.begin(f"writing {n_sheets} result sheets", n_rows)
        with os.fdopen(fd, "wb") as fh:
            try:
                _write_package(fh, package, zip64=False)
            except _NeedsZip64:  # a part over 4 GiB (not expected below the row limit): again
                fh.seek(0)
                fh.truncate()
                _write_package(fh, package, zip64=True)
            fh.flush()
            os.fsync(fh.fileno())
        if real.exists():
            shutil.copymode(real, tmp)
        else:  # mkstemp makes the file private (0600); give it the mode a new file gets
            umask = os.umask(0)
            os.umask(umask)
            os.chmod(tmp, 0o666 & ~umask)
    except OSError as exc:
        _remove(tmp)
        raise FileProblem(
            f"{shown}: could not write the new version in {folder} ({exc.strerror or exc}); "
            "the workbook is unchanged"
        ) from exc
    except BaseException:
        _remove(tmp)
        raise
    try:
        if ready is not None:
            ready()
    except BaseException:
        _remove(tmp)
        raise
    try:
        if real.exists():
            _copy_atomic(real, backup)
    except OSError as exc:
        _remove(tmp)
        raise FileProblem(
            f"could not write the backup {backup} ({exc.strerror or exc}); {shown} is unchanged "
            "and the previous backup is as it was"
        ) from exc
    except BaseException:
        _remove(tmp)
        raise
    try:
        os.replace(tmp, real)
        reporter.end()
    except OSError as exc:
        _remove(tmp)
        raise FileProblem(
            f"{shown}: could not save ({exc.strerror or exc}); the workbook is unchanged"
        ) from exc
    except BaseException:
        _remove(tmp)
        raise


def _copy_atomic(src: Path, dst: Path) -> None:
    """Copy src to dst the way the workbook is written: a temporary file beside dst, synced,
    then renamed over it, so a full disk or a kill leaves the previous dst whole."""
    fd, tmp = tempfile.mkstemp(prefix=f".{dst.name}.", suffix=".xlcore-tmp", dir=dst.parent)
    try:
        with os.fdopen(fd, "wb") as out, open(src, "rb") as inp:
            shutil.copyfileobj(inp, out, 1 << 20)
            out.flush()
            os.fsync(out.fileno())
        shutil.copystat(src, tmp)
        os.chmod(tmp, stat.S_IMODE(os.stat(tmp).st_mode) | stat.S_IWUSR)  # ours to replace next run
        os.replace(tmp, dst)
    except BaseException:
        _remove(tmp)
        raise


class _NeedsZip64(Exception):
    pass


def _write_package(fh, package: list, zip64: bool) -> None:
    """The parts into a zip: old parts as bytes, result sheets streamed from their generators.
    Without need, no part carries the ZIP64 extension: Excel refuses or repairs packages whose
    small parts do (seen by other writers), so it is used only when a part outgrows 4 GiB."""
    with zipfile.ZipFile(fh, "w", zipfile.ZIP_DEFLATED) as out:
        for info, data in package:
            if isinstance(data, _Raw):
                big = max(info.file_size, len(data.data)) > zipfile.ZIP64_LIMIT
                if big and not zip64:
                    raise _NeedsZip64  # not expected: a part of over 4 GiB in the source
                _write_raw(out, info, data.data, zip64)
                continue
            if isinstance(data, bytes):
                out.writestr(info, data, compresslevel=FAST if len(data) > BIG else 6)
                continue
            _set_level(info, FAST)
            try:
                with out.open(info, "w", force_zip64=zip64) as part:
                    _stream(part, data())
            except RuntimeError as exc:
                if "force_zip64" in str(exc):
                    raise _NeedsZip64 from exc
                raise


def _stream(part, pieces: Iterator[bytes]) -> None:
    """The pieces into an open zip part in order, deflated (and their CRC taken) in a thread of
    its own while the next piece is made: zlib frees the GIL, so on two cores making the sheet
    XML and deflating it overlap. A short queue keeps memory flat; the thread takes every
    piece until the end mark, so neither side waits forever, and its error is raised here."""
    todo: queue.Queue[bytes | None] = queue.Queue(maxsize=4)
    failed: list[BaseException] = []

    def drain() -> None:
        while (piece := todo.get()) is not None:
            if not failed:
                try:
                    part.write(piece)
                except BaseException as exc:  # raised by the caller below
                    failed.append(exc)

    worker = threading.Thread(target=drain, name="xlcore-deflate", daemon=True)
    worker.start()
    try:
        for piece in pieces:
            if failed:
                break
            todo.put(piece)
    finally:
        todo.put(None)
        worker.join()
    if failed:
        raise failed[0]


@dataclasses.dataclass(frozen=True)
class _Raw:
    """A large part of the source package kept as the deflated bytes it was stored with: written
    back as they are, not inflated and deflated again (the L tower's 100 MB member-actions sheet
    cost a second of deflate on every compute)."""

    data: bytes


def _deflated_bytes(zf: zipfile.ZipFile, info: zipfile.ZipInfo) -> bytes:
    """The stored (deflated) bytes of a part, from its local header (APPNOTE 4.3.7: 30 bytes,
    then the name and the extra field)."""
    zf.fp.seek(info.header_offset)
    head = zf.fp.read(30)
    if len(head) != 30 or head[:4] != b"PK\x03\x04":
        raise zipfile.BadZipFile(f"bad local header for {info.filename}")
    name_len, extra_len = struct.unpack("<HH", head[26:30])
    zf.fp.seek(info.header_offset + 30 + name_len + extra_len)
    data = zf.fp.read(info.compress_size)
    if len(data) != info.compress_size:
        raise zipfile.BadZipFile(f"{info.filename} is cut short")
    return data


def _check_raw(parts: list[tuple[zipfile.ZipInfo, bytes]]) -> None:
    """Each part kept as its stored deflated bytes, inflated and checked as `ZipFile.read` would
    (size and CRC-32), so a damaged part of the source is never copied into the new workbook:
    run in a thread while the sheets are written, waited for before the workbook is replaced."""
    step = 1 << 18  # inflated a slice at a time: memory stays flat beside the sheets' writing
    for info, raw in parts:
        inflate, view = zlib.decompressobj(-zlib.MAX_WBITS), memoryview(raw)
        crc = size = 0
        for at in range(0, len(raw), step):
            data = inflate.decompress(view[at : at + step])
            crc, size = zlib.crc32(data, crc), size + len(data)
        data = inflate.flush()
        crc, size = zlib.crc32(data, crc), size + len(data)
        if size != info.file_size or crc != info.CRC:
            raise zipfile.BadZipFile(f"Bad CRC-32 for file {info.filename!r}")


def _write_raw(out: zipfile.ZipFile, info: zipfile.ZipInfo, raw: bytes, zip64: bool = False) -> None:
    """A part whose deflated bytes, CRC and sizes are known, as `ZipFile.writestr` would write it
    (local header with the sizes, the data, the entry for the central directory), without
    deflating it again."""
    z = copy.copy(info)
    z.compress_type = zipfile.ZIP_DEFLATED
    z.compress_size = len(raw)
    z.flag_bits = 0
    if not z.external_attr:
        z.external_attr = 0o600 << 16
    out.fp.seek(out.start_dir)
    z.header_offset = out.fp.tell()
    out._writecheck(z)
    out._didModify = True
    out.fp.write(z.FileHeader(zip64))
    out.fp.write(raw)
    out.start_dir = out.fp.tell()
    out.filelist.append(z)
    out.NameToInfo[z.filename] = z


def _set_level(info: zipfile.ZipInfo, level: int) -> None:
    """Deflate level of a part written through ZipFile.open (no public way to pass it)."""
    name = "compress_level" if hasattr(info, "compress_level") else "_compresslevel"  # 3.13 / 3.11
    setattr(info, name, level)


def _remove(p: str) -> None:
    try:
        os.unlink(p)
    except FileNotFoundError:
        pass


# Deflate level for result sheets and parts over BIG bytes. Level 3 against 1 on the varied L
# tower's result sheets (benchmarks/README.md, sixth round): 7 % smaller workbook (22.0 -> 20.4 MB
# with its 9 MB input), about the same CPU (zlib's levels 1-3 share the fast matcher); level 6
# is 8 % smaller again but adds about 0.6 s of CPU on two cores already busy with the write.
FAST, BIG = 3, 1 << 20


def _build(
    zf: zipfile.ZipFile, sheets: list[ResultSheet], on_rows: Callable[[int], None] | None = None
) -> list[tuple[zipfile.ZipInfo, bytes | Callable[[], Iterator[bytes]]]]:
    """The new package's parts: the old ones (less our previous results and what only they
    used) as bytes, the result sheets as makers of XML pieces, written as they are made."""
    sheets = [part for s in sheets for part in split(s)]
    wb_part = "xl/workbook.xml"
    rels_part = "xl/_rels/workbook.xml.rels"
    wb = read_xml(zf, wb_part)
    rels = read_xml(zf, rels_part)
    ct = read_xml(zf, "[Content_Types].xml")
    names = set(zf.namelist())
    rel_by_id = {r.get("Id"): r for r in rels.iter(f"{{{NS_PKG_REL}}}Relationship")}

    sheets_el = wb.find(f"{M}sheets")
    old = list(sheets_el)
    marked = _marked_sheets(wb)
    candidates: dict[int, str] = {}
    for i, s in enumerate(old):
        if s.get("name", "").casefold().startswith(RESULT_PREFIX.casefold()):
            rel = rel_by_id.get(s.get(f"{{{NS_REL}}}id"))
            candidates[i] = part_path(wb_part, rel.get("Target")) if rel is not None else ""
    stamps = _a1_texts(zf, rels, wb_part, {i: p for i, p in candidates.items() if p in names})
    drop_parts: set[str] = set()
    keep_positions: dict[int, int] = {}
    removed: set[str] = set()  # casefolded names of the sheets removed
    for i, s in enumerate(old):
        name = s.get("name")
        if i not in candidates:
            keep_positions[i] = len(keep_positions)
            continue
        text, inline = stamps.get(i, (None, False))
        # inline A1 without any mark: written by an xlcore before the marks, never saved since
        if not (text or "").startswith(MARKER) or not (name.casefold() in marked or (inline and not marked)):
            raise FileProblem(_foreign(name, text))
        rel = rel_by_id[s.get(f"{{{NS_REL}}}id")]
        sheets_el.remove(s)
        rels.remove(rel)
        drop_parts.add(candidates[i])
        removed.add(name.casefold())
    kept_names = {s.get("name", "").casefold() for s in sheets_el}
    for sheet in sheets:
        if sheet.name.casefold() in kept_names:  # cannot happen past the check above; never two
            raise FileProblem(
                f"sheet {sheet.name!r} clashes with a sheet of the workbook (names ignore case)"
            )

    for rel in list(rels):
        if rel.get("Type") == CALC_CHAIN_REL:
            drop_parts.add(part_path(wb_part, rel.get("Target")))
            rels.remove(rel)
    drop_parts |= _only_used_by(zf, names, drop_parts, rels, wb_part)
    for o in list(ct):
        if o.get("PartName", "").lstrip("/") in drop_parts:
            ct.remove(o)

    styles_part = _styles_part(rels, wb_part)
    styles_xml, styles = _add_styles(
        read_xml(zf, styles_part) if styles_part in names else None,
        [c.fmt for s in sheets for c in s.columns if c.fmt],
    )
    new_parts: dict[str, Callable[[], Iterator[bytes]]] = {}
    used_ids = {r.get("Id") for r in rels}
    sheet_ids = [int(s.get("sheetId")) for s in sheets_el]
    next_sheet_id = max(sheet_ids, default=0) + 1
    taken = {p.casefold() for p in names - drop_parts}  # part names ignore case (OPC)
    n = 1
    for sheet in sheets:
        while f"xl/worksheets/sheet{n}.xml" in taken:
            n += 1
        part = f"xl/worksheets/sheet{n}.xml"
        taken.add(part)
        new_parts[part] = functools.partial(sheet_pieces, sheet, styles, on_rows=on_rows)
        rid = _fresh(used_ids, "rIdXlc")
        etree.SubElement(
            rels,
            f"{{{NS_PKG_REL}}}Relationship",
            Id=rid,
            Type=WORKSHEET_REL,
            Target=f"worksheets/sheet{n}.xml",
        )
        el = etree.SubElement(sheets_el, f"{M}sheet", name=sheet.name, sheetId=str(next_sheet_id))
        el.set(f"{{{NS_REL}}}id", rid)
        next_sheet_id += 1
        etree.SubElement(ct, f"{{{NS_CT}}}Override", PartName=f"/{part}", ContentType=WORKSHEET_CT)
    gone = removed - {s.name.casefold() for s in sheets}
    _update_names(wb, keep_positions, gone, [s.name for s in sheets])

    add_print_titles(wb, len(sheets_el) - len(sheets), sheets)
    changed = {
        wb_part: _xml(wb),
        rels_part: _xml(rels),
        "[Content_Types].xml": _xml(ct),
        styles_part: styles_xml,
    }
    out: list[tuple[zipfile.ZipInfo, bytes | Callable[[], Iterator[bytes]]]] = []
    for info in zf.infolist():
        if info.filename in drop_parts:
            continue
        data = changed.get(info.filename)
        if data is None and info.compress_type == zipfile.ZIP_DEFLATED and info.file_size > BIG:
            data = _Raw(_deflated_bytes(zf, info))  # its CRC checked before the save (_check_raw)
        elif data is None:
            data = zf.read(info.filename)  # inflated, so its CRC is checked as before
        out.append((info, data))
    if styles_part not in names:
        raise FileProblem("workbook has no style sheet part; open and save it in a spreadsheet program")
    for part, data in new_parts.items():
        out.append((zipfile.ZipInfo(part, date_time=(2026, 1, 1, 0, 0, 0)), data))
    for info, _ in out:
        info.compress_type = zipfile.ZIP_DEFLATED
    return out


def _foreign(name: str, a1: str | None) -> str:
    prefix = RESULT_PREFIX.strip()
    why = (
        "it carries xlcore's stamp but xlcore did not make this sheet (a copy of a result sheet?)"
        if (a1 or "").startswith(MARKER)
        else "it was not written by xlcore"
    )
    return (
        f"sheet {name!r} has the name of an xlcore result sheet ({why}). xlcore replaces only "
        f"its own sheets, and every sheet whose name starts with {RESULT_PREFIX!r} (in any case) "
        f"is reserved for them: rename it so that it does not start with {prefix!r} (for example "
        f"'My {name}'), or delete it, and run again; the workbook is unchanged"
    )


def _marked_sheets(wb: etree._Element) -> set[str]:
    """Casefolded names of the sheets our hidden defined names point at."""
    out: set[str] = set()
    names = wb.find(f"{M}definedNames")
    for dn in names if names is not None else ():
        if dn.get("localSheetId") is None and dn.get("name", "").casefold().startswith(MARK_NAME):
            out.update(n.casefold() for n in _sheet_refs(dn.text or ""))
    return out


SHEET_REF = re.compile(r"'((?:[^']|'')+)'!|(?<![\w.'\"])([A-Za-z_\\][\w.]*)!")


def _sheet_refs(formula: str) -> list[str]:
    """Sheet names a defined name's formula refers to ('Name'!A1 or Name!A1)."""
    return [q.replace("''", "'") if q else u for q, u in SHEET_REF.findall(formula)]


def _update_names(wb: etree._Element, keep: dict[int, int], gone: set[str], ours: list[str]) -> None:
    """Defined names after the result sheets are replaced: names scoped to a removed sheet
    (print areas, print titles, filters) go; sheet-scoped names follow their sheet's new
    position; a reference to a result sheet that no longer exists becomes #REF! (as a
    spreadsheet program does when a sheet is deleted); our marks are written afresh; the active
    tab stays on a sheet that exists."""
    names = wb.find(f"{M}definedNames")
    if names is None:
        names = etree.Element(f"{M}definedNames")
        anchor = wb.find(f"{M}externalReferences")
        anchor = anchor if anchor is not None else wb.find(f"{M}functionGroups")
        (anchor if anchor is not None else wb.find(f"{M}sheets")).addnext(names)
    for dn in list(names):
        local = dn.get("localSheetId")
        if local is None and dn.get("name", "").casefold().startswith(MARK_NAME):
            names.remove(dn)
            continue
        if local is not None:
            new = keep.get(int(local))
            if new is None:
                names.remove(dn)
                continue
            dn.set("localSheetId", str(new))
        if gone and dn.text and any(r.casefold() in gone for r in _sheet_refs(dn.text)):
            dn.text = SHEET_REF.sub(
                lambda m: (
                    "#REF!"
                    if (m.group(1) or m.group(2)).replace("''", "'").casefold() in gone
                    else m.group(0)
                ),
                dn.text,
            )
    for k, name in enumerate(ours, start=1):
        quoted = name.replace("'", "''")
        el = etree.SubElement(names, f"{M}definedName", name=f"{MARK_NAME}{k}", hidden="1")
        el.text = f"'{quoted}'!$A$1"
    if len(names) == 0:
        wb.remove(names)
    views = wb.find(f"{M}bookViews")
    if views is not None:
        for v in views:
            for attr in ("activeTab", "firstSheet"):
                if v.get(attr) is not None:
                    v.set(attr, str(keep.get(int(v.get(attr)), 0)))


PRINT_TITLES = "_xlnm.Print_Titles"
_AFTER_NAMES = (
    "calcPr",
    "oleSize",
    "customWorkbookViews",
    "pivotCaches",
    "smartTagPr",
    "smartTagTypes",
    "webPublishing",
    "fileRecoveryPr",
    "webPublishObjects",
    "extLst",
)


def add_print_titles(wb: etree._Element, first: int, sheets: list[ResultSheet]) -> None:
    """A sheet-scoped `_xlnm.Print_Titles` for each result sheet (header row and identifying
    columns repeated on every printed page). `first` is the position of the first result
    sheet in the sheet list; earlier names scoped to result sheets were dropped with them."""
    names = wb.find(f"{M}definedNames")
    if names is None:
        names = etree.Element(f"{M}definedNames")
        anchor = next((wb.find(f"{M}{t}") for t in _AFTER_NAMES if wb.find(f"{M}{t}") is not None), None)
        if anchor is not None:
            anchor.addprevious(names)
        else:
            wb.append(names)
    for i, sheet in enumerate(sheets):
        el = etree.SubElement(names, f"{M}definedName", name=PRINT_TITLES, localSheetId=str(first + i))
        el.text = print_titles(sheet)


def _a1_texts(
    zf: zipfile.ZipFile, rels: etree._Element, wb_part: str, parts: dict[int, str]
) -> dict[int, tuple[str | None, bool]]:
    """Text of cell A1 of each sheet part, read as a spreadsheet program would have saved it
    (inline, a formula's text or a shared string), and whether it was inline (never saved by a
    program since xlcore wrote it). Each part is read only up to its first cell."""
    out: dict[int, tuple[str | None, bool]] = {}
    shared: dict[int, int] = {}  # sheet position -> shared-string index
    for i, part in parts.items():
        kind, value = _first_cell(zf, part)
        if kind == "s" and value is not None and value.strip().isdigit():
            shared[i] = int(value)
        out[i] = (value if kind in ("inlineStr", "str") else None, kind == "inlineStr")
    if shared:
        sst = _shared_strings(zf, rels, wb_part, set(shared.values()))
        for i, k in shared.items():
            out[i] = (sst.get(k), False)
    return out


def _first_cell(zf: zipfile.ZipFile, part: str) -> tuple[str | None, str | None]:
    """(type, text) of A1 when it is the sheet's first cell, else (None, None)."""
    try:
        with zf.open(part) as fh:
            for _, el in etree.iterparse(
                fh, events=("end",), tag=f"{M}c", resolve_entities=False, no_network=True
            ):
                if el.get("r", "A1") != "A1":
                    return None, None
                kind = el.get("t", "n")
                if kind == "inlineStr":
                    box = el.find(f"{M}is")
                    return kind, _string_item(box) if box is not None else ""
                v = el.find(f"{M}v")
                return kind, v.text if v is not None else None
    except (etree.XMLSyntaxError, zipfile.BadZipFile, OSError, EOFError):
        return None, None
    return None, None


def _string_item(el: etree._Element) -> str:
    """Text of a string item (plain <t> or rich-text runs), without phonetic runs."""
    return "".join(t.text or "" for t in el.iter(f"{M}t") if t.getparent().tag != f"{M}rPh")


def _shared_strings(
    zf: zipfile.ZipFile, rels: etree._Element, wb_part: str, want: set[int]
) -> dict[int, str]:
    part = next(
        (part_path(wb_part, r.get("Target")) for r in rels if r.get("Type", "").endswith("/sharedStrings")),
        "xl/sharedStrings.xml",
    )
    out: dict[int, str] = {}
    if part not in zf.namelist() or not want:
        return out
    last = max(want)
    try:
        with zf.open(part) as fh:
            for k, (_, el) in enumerate(
                etree.iterparse(fh, events=("end",), tag=f"{M}si", resolve_entities=False, no_network=True)
            ):
                if k in want:
                    out[k] = _string_item(el)
                el.clear()
                if k >= last:
                    break
    except (etree.XMLSyntaxError, zipfile.BadZipFile, OSError, EOFError):
        pass
    return out


def _only_used_by(
    zf: zipfile.ZipFile, names: set[str], dropped: set[str], wb_rels: etree._Element, wb_part: str
) -> set[str]:
    """Parts to drop with `dropped`: their relationship parts and every part they reach that
    nothing kept reaches (a comment or drawing a program added to a result sheet, its VML,
    printer settings). Parts nothing refers to at all are the engineer's and stay. One pass
    over the relationships reached from each side: linear in the package."""
    cache: dict[str, list[str]] = {}

    def targets(part: str) -> list[str]:
        if part in cache:
            return cache[part]
        if part == wb_part:
            rel_el = wb_rels
        else:
            rp = "_rels/.rels" if part == "" else _rels_of(part)
            if rp not in names:
                cache[part] = []
                return []
            try:
                rel_el = read_xml(zf, rp)
            except (etree.XMLSyntaxError, KeyError, zipfile.BadZipFile):
                cache[part] = []
                return []
        src = part or "/"
        cache[part] = [
            part_path(src, r.get("Target", "")) if part else r.get("Target", "").lstrip("/")
            for r in rel_el.iter(f"{{{NS_PKG_REL}}}Relationship")
            if r.get("TargetMode") != "External" and r.get("Target")
        ]
        return cache[part]

    def reach(starts: list[str], stop: set[str]) -> set[str]:
        seen: set[str] = set()
        todo = list(starts)
        while todo:
            p = todo.pop()
            for t in targets(p):
                if t not in seen and t not in stop:
                    seen.add(t)
                    todo.append(t)
        return seen

    kept = reach([""], dropped)
    theirs = reach(sorted(dropped), set()) - kept - dropped
    out = {p for p in theirs if p in names}
    out |= {_rels_of(p) for p in dropped | out if _rels_of(p) in names}
    return out


def _rels_of(part: str) -> str:
    head, _, tail = part.rpartition("/")
    return f"{head}/_rels/{tail}.rels" if head else f"_rels/{tail}.rels"


def posixpath_rels(part: str) -> str:
    return _rels_of(part)


def _styles_part(rels: etree._Element, wb_part: str) -> str:
    for r in rels:
        if r.get("Type", "").endswith("/styles"):
            return part_path(wb_part, r.get("Target"))
    return "xl/styles.xml"


def _fresh(used: set[str], prefix: str) -> str:
    i = 1
    while f"{prefix}{i}" in used:
        i += 1
    used.add(f"{prefix}{i}")
    return f"{prefix}{i}"


def _xml(el: etree._Element) -> bytes:
    return etree.tostring(el, xml_declaration=True, encoding="UTF-8", standalone=True)


# ------------------------------------------------------------------ styles


def _child(parent: etree._Element, tag: str, before: tuple[str, ...] = ()) -> etree._Element:
    el = parent.find(f"{M}{tag}")
    if el is None:
        el = etree.Element(f"{M}{tag}", count="0")
        anchor = next((parent.find(f"{M}{b}") for b in before if parent.find(f"{M}{b}") is not None), None)
        if anchor is not None:
            anchor.addprevious(el)
        else:
            parent.append(el)
    return el


def _intern(parent: etree._Element, xml: str) -> int:
    """Index of an entry equal to `xml` in a style list, appending it if absent.

    Reusing equal entries keeps repeated runs from growing the style sheet.
    """
    new = etree.fromstring(f'<w xmlns="{NS_MAIN}">{xml}</w>', PARSER)[0]
    want = _canon(new)
    for i, el in enumerate(parent):
        if _canon(el) == want:
            return i
    parent.append(new)
    parent.set("count", str(len(parent)))
    return len(parent) - 1


def _canon(el: etree._Element) -> bytes:
    return etree.tostring(el, method="c14n", exclusive=True, with_comments=False)


def _add_styles(root: etree._Element | None, formats: list[str]) -> tuple[bytes, Styles]:
    if root is None:
        raise FileProblem("workbook has no style sheet part; open and save it in a spreadsheet program")
    order = ("fonts", "fills", "borders", "cellStyleXfs", "cellXfs", "cellStyles", "dxfs")
    numfmts = _child(root, "numFmts", before=order)
    fonts = _child(root, "fonts", before=order[1:])
    fills = _child(root, "fills", before=order[2:])
    xfs = _child(root, "cellXfs", before=order[5:])
    if len(fills) == 0:  # the two reserved fills every style sheet starts with
        _intern(fills, '<fill><patternFill patternType="none"/></fill>')
        _intern(fills, '<fill><patternFill patternType="gray125"/></fill>')
    if len(fonts) == 0:
        _intern(fonts, '<font><sz val="11"/><name val="Calibri"/></font>')
    if len(xfs) == 0:
        _intern(xfs, '<xf numFmtId="0" fontId="0" fillId="0" borderId="0"/>')

    def fmt_id(code: str) -> int:
        builtin = {"0": 1, "0.00": 2}
        if code in builtin:
            return builtin[code]
        for el in numfmts:
            if el.get("formatCode") == code:
                return int(el.get("numFmtId"))
        new_id = max([163] + [int(e.get("numFmtId")) for e in numfmts]) + 1
        etree.SubElement(numfmts, f"{M}numFmt", numFmtId=str(new_id), formatCode=code)
        numfmts.set("count", str(len(numfmts)))
        return new_id

    def xf(num: int = 0, font: int = 0, fill: int = 0, wrap: bool = False, top: bool = False) -> int:
        attrs = f'numFmtId="{num}" fontId="{font}" fillId="{fill}" borderId="0" xfId="0"'
        attrs += (
            f' applyNumberFormat="{int(num > 0)}" applyFont="{int(font > 0)}" applyFill="{int(fill > 0)}"'
        )
        inner = '<alignment wrapText="1" vertical="top"/>' if wrap else ""
        inner = inner or ('<alignment vertical="top"/>' if top else "")
        attrs += ' applyAlignment="1"' if inner else ""
        return _intern(xfs, f"<xf {attrs}>{inner}</xf>" if inner else f"<xf {attrs}/>")

    dxfs = _child(root, "dxfs", before=("tableStyles", "colors", "extLst"))
    bands = tuple(
        _intern(
            dxfs,
            f'<dxf><font><color rgb="{font_rgb}"/></font><fill><patternFill patternType="solid">'
            f'<fgColor rgb="{fill_rgb}"/><bgColor rgb="{fill_rgb}"/></patternFill></fill></dxf>',
        )
        for _, _, font_rgb, fill_rgb in results.BANDS
    )

    bold = _intern(fonts, '<font><b/><sz val="11"/><name val="Calibri"/></font>')
    title = _intern(fonts, '<font><b/><sz val="14"/><name val="Calibri"/></font>')
    warn = _intern(fonts, '<font><b/><sz val="11"/><color rgb="FF9C2A00"/><name val="Calibri"/></font>')
    white = _intern(fonts, '<font><b/><sz val="11"/><color rgb="FFFFFFFF"/><name val="Calibri"/></font>')
    slate = _intern(
        fills,
        '<fill><patternFill patternType="solid"><fgColor rgb="FF2F4858"/>'
        '<bgColor indexed="64"/></patternFill></fill>',
    )
    styles = Styles(
        title=xf(font=title),
        caution=xf(font=warn, wrap=True),
        label=xf(font=bold, wrap=True),
        header=xf(font=white, fill=slate, wrap=True),
        number={code: xf(num=fmt_id(code), top=True) for code in dict.fromkeys(formats)},
        text=xf(top=True),
        wrap=xf(wrap=True),
        bands=bands,
    )
    if len(numfmts) == 0:
        root.remove(numfmts)
    return _xml(root), styles
