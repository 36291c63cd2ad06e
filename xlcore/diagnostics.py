"""Findings about the input (errors and warnings), each pinned to a Sheet!Cell."""

from __future__ import annotations

from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from typing import Literal

from openpyxl.utils import get_column_letter


def cell_name(col: int, row: int) -> str:
    """A1 name of a cell from a 0-based column index and a 1-based row number."""
    return f"{get_column_letter(col + 1)}{row}"


def sheet_ref(sheet: str) -> str:
    """Sheet name as a spreadsheet formula writes it: quoted when it has spaces or symbols."""
    if sheet.replace("_", "").isalnum():
        return sheet
    return "'" + sheet.replace("'", "''") + "'"


def show(value: object) -> str:
    """The value found, as the engineer would recognise it."""
    if value is None or (isinstance(value, float) and value != value):  # NaN: a blank text cell
        return "blank"
    if isinstance(value, float) and value.is_integer():
        return repr(int(value))
    text = repr(value) if isinstance(value, str) else str(value)
    return text if len(text) <= 60 else text[:57] + "...'"


@dataclass(frozen=True)
class Finding:
    severity: Literal["error", "warning"]
    sheet: str | None
    cell: str | None
    message: str

    @property
    def where(self) -> str:
        if self.sheet is None:
            return "workbook"
        return f"{sheet_ref(self.sheet)}!{self.cell}" if self.cell else sheet_ref(self.sheet)

    def __str__(self) -> str:
        return f"{self.where}: {self.message}"


class Findings(list[Finding]):
    """Collects every finding of one pass, so the engineer sees all problems at once."""

    def error(self, sheet: str | None, cell: str | None, message: str) -> None:
        self.append(Finding("error", sheet, cell, message))

    def warning(self, sheet: str | None, cell: str | None, message: str) -> None:
        self.append(Finding("warning", sheet, cell, message))

    @property
    def errors(self) -> list[Finding]:
        return [f for f in self if f.severity == "error"]

    @property
    def warnings(self) -> list[Finding]:
        return [f for f in self if f.severity == "warning"]


class InputInvalid(Exception):
    """The workbook's inputs are wrong; nothing was written (exit code 1)."""

    def __init__(self, findings: Findings):
        self.findings = findings
        super().__init__(f"{len(findings.errors)} input error(s)")

    def __str__(self) -> str:
        """The count, then every error on its own line (Sheet!Cell: what was found and what was
        expected), as the command line prints them: a notebook shows them all at once."""
        lines = [f"{len(self.findings.errors)} input error(s)"]
        lines += [f"  {f}" for f in self.findings.errors]
        return "\n".join(lines)


class FileProblem(Exception):
    """The file itself cannot be used: missing, not a workbook, encrypted, locked (exit 2)."""


class Defect(Exception):
    """xlcore itself failed on input it had accepted: a defect to report, not a fault of the
    workbook; nothing was written (exit code 4). Raised in place of the original error (chained
    as its cause), so that a ValueError deep in the checks is not taken for a damaged file."""

    def __init__(self, step: str, cause: BaseException):
        self.step, self.cause = step, cause
        super().__init__(
            f"xlcore stopped on a defect of its own while {step} ({type(cause).__name__}: {cause}); "
            "this is not a fault of the workbook. Please report it with the workbook"
        )


@contextmanager
def own_defects(step: str) -> Iterator[None]:
    """Errors of xlcore's own code in `step` (validating, checking) raised as `Defect`; the
    library's refusals (InputInvalid, FileProblem) and running out of memory pass unchanged."""
    try:
        yield
    except (InputInvalid, FileProblem, Defect, MemoryError):
        raise
    except Exception as exc:
        raise Defect(step, exc) from exc
