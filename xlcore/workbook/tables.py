"""Full result tables as Parquet files beside the workbook, for the tables whose rows the
workbook holds only in part (`compute --detail governing`, or `auto` above the row limit).

Where: a folder `NAME.xlcore-tables` beside the workbook `NAME` (its real file, through a
symbolic link, as the backup), one file per table named after the sheet
(`Results core N-M` -> `core-n-m.parquet`). Every row, every column except the working text
(the numbers it substitutes are columns of their own), headers as on the sheet.

Ours: a file is xlcore's only when its name has the pattern above AND its Parquet key-value
metadata carries `xlcore.file` equal to that very name (a copy under another name is the
user's). Only such files are ever replaced or removed; a file of the same name that is not ours
stops the run before anything is written. Every run removes the files of earlier runs that it
does not write again, after the workbook is saved. Files are written like the workbook: a
temporary file in the folder, synced, then renamed over the old one.

Parquet (pyarrow): columnar, typed, compressed, read by pandas, R, DuckDB, Polars and most
analysis tools; the key-value metadata carries the stamp (input hash, version, time) so a file
can be matched to the workbook it belongs to.
"""

from __future__ import annotations

import contextlib
import os
import re
import tempfile
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from xlcore import __version__, results
from xlcore.diagnostics import FileProblem
from xlcore.layout import RESULT_PREFIX
from xlcore.results import ResultSheet

FOLDER_SUFFIX = ".xlcore-tables"
_OURS = re.compile(r"[a-z0-9]+(?:-[a-z0-9]+)*\.parquet")
_TMP_SUFFIX = ".xlcore-tmp"
KEY_FILE, KEY_SHEET, KEY_HASH = b"xlcore.file", b"xlcore.sheet", b"xlcore.input_hash"
KEY_VERSION, KEY_COMPUTED, KEY_ROWS = b"xlcore.version", b"xlcore.computed", b"xlcore.rows"


def folder_for(workbook: Path) -> Path:
    """The tables' folder beside the workbook's real file (through a symbolic link)."""
    p = Path(workbook)
    real = Path(os.path.realpath(p)) if os.path.islink(p) else p
    return real.with_name(real.name + FOLDER_SUFFIX)


def file_name(sheet_name: str) -> str:
    """`Results core N-M` -> `core-n-m.parquet`: lower case, runs of other characters to '-'."""
    base = sheet_name[len(RESULT_PREFIX) :] if sheet_name.startswith(RESULT_PREFIX) else sheet_name
    slug = re.sub(r"[^a-z0-9]+", "-", base.lower()).strip("-") or "table"
    return f"{slug}.parquet"


def is_ours(path: Path) -> bool:
    """Name pattern and metadata both say xlcore wrote this very file (see the module text)."""
    if not _OURS.fullmatch(path.name) or not path.is_file() or path.is_symlink():
        return False
    import pyarrow.parquet as pq

    try:
        meta = pq.read_schema(path).metadata or {}
    except Exception:  # not a Parquet file, or a damaged one: not ours to touch
        return False
    return meta.get(KEY_FILE) == path.name.encode()


def arrow_table(sheet: ResultSheet, stamp: dict[str, str]):
    """The sheet's table as an Arrow table: its columns but the working text, under the sheet's
    headers; numbers as they are (no value: null; inf kept, where the sheet shows a blank),
    text as strings."""
    import pyarrow as pa

    arrays, names = [], []
    n = len(sheet.table)
    for c in sheet.columns:
        if c.is_working:
            continue
        if c.key in sheet.table:
            arrays.append(_array(sheet.table[c.key], numeric=c.fmt is not None))
        else:  # a column the sheet shows blank (this building has no values for it)
            arrays.append(pa.nulls(n, type=pa.float64() if c.fmt is not None else pa.string()))
        names.append(c.title)
    t = pa.table(arrays, names=names)
    return t.replace_schema_metadata(
        {
            KEY_FILE: file_name(sheet.name),
            KEY_SHEET: sheet.name,
            KEY_HASH: stamp.get(results.STAMP_HASH_LABEL, ""),
            KEY_VERSION: __version__,
            KEY_COMPUTED: stamp.get("Computed (UTC)", ""),
            KEY_ROWS: str(len(sheet.table)),
            b"xlcore.caution": stamp.get("CAUTION", ""),
        }
    )


def _array(col: pd.Series, numeric: bool):
    """One column as Arrow: a numeric column as it is, text as strings (blank: null)."""
    import pyarrow as pa

    if col.dtype == bool:
        return pa.array(np.where(col.to_numpy(), "yes", "no"), type=pa.string())
    if pd.api.types.is_numeric_dtype(col.dtype):
        return pa.array(col.to_numpy(), from_pandas=True)  # NaN: null (a blank cell)
    if numeric:  # numbers held as objects (with None): float64 unless some cell is text
        x = pd.to_numeric(col, errors="coerce")
        if not (x.isna() & col.notna() & (col != "")).any():
            return pa.array(x.to_numpy(dtype=float), type=pa.float64(), from_pandas=True)
    if isinstance(col.dtype, pd.StringDtype) and col.dtype.storage == "python":
        # its own array of str and a missing-value mark (NaN or NA, both null from pandas): a
        # third less time than pandas' `__arrow_array__`, which copies it and marks the nulls
        return pa.array(col.to_numpy(), type=pa.string(), from_pandas=True)
    if isinstance(col.dtype, pd.StringDtype):  # pandas' own strings: Arrow's, no Python objects
        out = pa.array(col, type=pa.string(), from_pandas=True)
        return out.combine_chunks() if isinstance(out, pa.ChunkedArray) else out
    vals = col.to_numpy(dtype=object, na_value=None)
    try:
        return pa.array(vals, type=pa.string(), from_pandas=True)
    except (pa.ArrowInvalid, pa.ArrowTypeError):  # numbers among the text: as the sheet shows them
        return pa.array([None if v is None else str(v) for v in vals], type=pa.string())


@dataclass
class Staged:
    """Tables written to temporary files in the folder, waiting for the workbook to be saved."""

    folder: Path
    files: dict[str, str] = field(default_factory=dict)  # final name -> temporary path
    created: bool = False
    # the process's umask, read once where the files are staged: reading it sets it for a
    # moment (os.umask), which a thread writing files meanwhile must never see
    umask: int = field(default_factory=lambda: _umask())

    def commit(self) -> list[Path]:
        """Rename every temporary file over its final name, then remove the files of earlier
        runs (ours by name and metadata) that this run did not write. Returns the files."""
        done = []
        for name, tmp in self.files.items():
            os.replace(tmp, self.folder / name)
            done.append(self.folder / name)
        self.files = {}
        if self.folder.is_dir():
            for p in self.folder.iterdir():
                if p not in done and is_ours(p):
                    p.unlink()
            with contextlib.suppress(OSError):  # only when empty: a user's file keeps it
                if not any(self.folder.iterdir()):
                    self.folder.rmdir()
        return done

    def write(self, sheets: Sequence[ResultSheet], stamp: dict[str, str]) -> None:
        """Each table to a temporary file in the folder, synced; on any failure the files
        written so far and a folder made for them are removed (the folder is as it was), and
        the error raised."""
        if not sheets:
            return
        import pyarrow as pa
        import pyarrow.parquet as pq

        folder = self.folder
        try:
            for sheet in sheets:
                name = file_name(sheet.name)
                fd, tmp = tempfile.mkstemp(prefix=f".{name}.", suffix=_TMP_SUFFIX, dir=folder)
                self.files[name] = tmp
                with os.fdopen(fd, "wb") as fh:
                    # into Arrow's own buffer, then one write: pyarrow writing to a Python file
                    # takes the GIL back for every page, stalling behind the thread making the XML
                    out = pa.BufferOutputStream()
                    pq.write_table(arrow_table(sheet, stamp), out, compression="zstd")
                    fh.write(out.getvalue())
                    fh.flush()
                    os.fsync(fh.fileno())
                os.chmod(tmp, 0o666 & ~self.umask)  # mkstemp makes it private; a new file's mode
        except OSError as exc:
            self.discard()
            raise FileProblem(
                f"could not write the full tables in {folder} ({exc.strerror or exc}); "
                "the workbook is unchanged"
            ) from exc
        except BaseException:
            self.discard()
            raise

    def discard(self) -> None:
        """The run failed before the workbook was saved: the folder is as it was."""
        for tmp in self.files.values():
            with contextlib.suppress(FileNotFoundError):
                os.unlink(tmp)
        self.files = {}
        if self.created:
            with contextlib.suppress(OSError):
                self.folder.rmdir()


def stage(workbook: Path, sheets: Sequence[ResultSheet], stamp: dict[str, str]) -> Staged:
    """Write `sheets` to temporary files in the tables' folder of `workbook` (none written when
    `sheets` is empty). Refuses, before writing any, a folder path that is not a folder and a
    file of a final name that is not ours. Called holding the workbook's lock."""
    staged = prepare(workbook, sheets)
    staged.write(sheets, stamp)
    return staged


def prepare(workbook: Path, sheets: Sequence[ResultSheet]) -> Staged:
    """`stage`'s refusals and the folder, before any table is written: the writer does these
    first and at once (a refusal leaves everything as it was, before any work), then writes
    the files (`Staged.write`) in a thread of their own while the workbook is written."""
    folder = folder_for(workbook)
    if sheets and (folder.exists() or folder.is_symlink()) and not folder.is_dir():
        raise FileProblem(
            f"{folder} is in the way: xlcore keeps the full result tables in a folder of that "
            "name; move the file away and run again; the workbook is unchanged"
        )
    for sheet in sheets:
        p = folder / file_name(sheet.name)
        if (p.exists() or p.is_symlink()) and not is_ours(p):
            raise FileProblem(
                f"{p} exists and was not written by xlcore (no xlcore mark in its metadata); "
                "xlcore writes the full table of that name there: move your file away and run "
                "again; the workbook is unchanged"
            )
    staged = Staged(folder)
    if folder.is_dir():  # left by a run that was killed (none runs now: locked)
        for stale in folder.glob(f".*{_TMP_SUFFIX}"):
            if _OURS.fullmatch(stale.name[1:].split(".parquet.", 1)[0] + ".parquet"):
                stale.unlink()
    if sheets and not folder.is_dir():
        try:
            folder.mkdir()
        except OSError as exc:
            raise FileProblem(
                f"cannot create {folder} ({exc.strerror or exc}); the workbook is unchanged"
            ) from exc
        staged.created = True
    return staged


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def read_stamp(path: Path) -> dict[str, str]:
    """The xlcore metadata of a tables file (empty if it has none)."""
    import pyarrow.parquet as pq

    meta = pq.read_schema(path).metadata or {}
    return {k.decode(): v.decode() for k, v in meta.items() if k.startswith(b"xlcore.")}
