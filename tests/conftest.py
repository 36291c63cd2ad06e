"""Shared fixtures: workbooks built from the project's own template, changed cell by cell."""

from __future__ import annotations

import os
import shutil
from pathlib import Path

import openpyxl
import pytest
from openpyxl.utils import get_column_letter

from xlcore import layout
from xlcore.workbook.template import write_template

_CACHE: dict[bool, Path] = {}


def column_letter(sheet: layout.TableSheet, key: str) -> str:
    """Letter of a layout column in the template (tests never spell headers)."""
    return get_column_letter(sheet.keys.index(key) + 1)


@pytest.fixture(scope="session")
def demo_master(tmp_path_factory) -> Path:
    path = tmp_path_factory.mktemp("master") / "demo.xlsx"
    write_template(path, example=True)
    return path


@pytest.fixture(scope="session")
def blank_master(tmp_path_factory) -> Path:
    path = tmp_path_factory.mktemp("master") / "blank.xlsx"
    write_template(path)
    return path


@pytest.fixture
def demo_book(demo_master, tmp_path) -> Path:
    dst = tmp_path / "tower.xlsx"
    shutil.copy(demo_master, dst)
    return dst


def edit(path: Path, changes: dict[tuple[str, str], object], out: Path | None = None) -> Path:
    """Set cells {(sheet, 'B3'): value} with openpyxl and save (to `out`, or in place)."""
    wb = openpyxl.load_workbook(path)
    for (sheet, cell), value in changes.items():
        wb[sheet][cell] = value
    wb.save(out or path)
    return out or path


# Hypothesis: a CI-sized default; `HYPOTHESIS_PROFILE=slow` runs 10 000 examples per property.
from hypothesis import HealthCheck  # noqa: E402
from hypothesis import settings as _hsettings  # noqa: E402

_hsettings.register_profile(
    "ci", max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow]
)
_hsettings.register_profile(
    "slow", max_examples=10_000, deadline=None, suppress_health_check=[HealthCheck.too_slow]
)
_hsettings.load_profile(os.environ.get("HYPOTHESIS_PROFILE", "ci"))
