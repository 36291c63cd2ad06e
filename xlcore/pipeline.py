"""The one-direction flow: read -> validate -> geometry -> actions -> checks -> results -> write."""

from __future__ import annotations

import datetime as dt
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from xlcore import CAUTION, __version__, distribution, geometry, results
from xlcore.checks.shear import check_pier_shear
from xlcore.diagnostics import Findings  # noqa: F401  (re-exported)
from xlcore.model import Building
from xlcore.results import ResultSheet
from xlcore.validate import build  # noqa: F401  (re-exported for the CLI)
from xlcore.workbook.reader import read_workbook


@dataclass
class Outcome:
    building: Building
    findings: Findings
    geometry: geometry.Geometry
    shear: pd.DataFrame
    summary: pd.DataFrame
    sheets: list[ResultSheet] = field(default_factory=list)

    @property
    def failing(self) -> int:
        return int((self.summary.status == results.FAIL).sum())


def load(path: Path) -> tuple[Building, Findings]:
    """Read and validate; raises InputInvalid or FileProblem."""
    return build(read_workbook(path))


def compute(building: Building, findings: Findings, now: dt.datetime | None = None) -> Outcome:
    """Run every check on a validated building and lay out the result sheets."""
    s = building.settings
    geom = geometry.derive(building.storeys, building.walls, building.openings)
    piers = distribution.with_stiffness(geom.piers, s.poisson, s.pier_fixity)
    acts = distribution.pier_actions(piers, building.member_actions)
    shear = check_pier_shear(piers, acts, s)
    summary = envelope(shear, piers)
    stamp = _stamp(building, now or dt.datetime.now(dt.UTC))
    sheets = [
        ResultSheet(
            results.SUMMARY_SHEET,
            f"{results.MARKER}: summary (worst combination per pier per storey)",
            results.SUMMARY_COLUMNS,
            summary,
            preamble=stamp + _counts(summary, shear),
            scale_key="util",
        ),
        ResultSheet(
            results.SHEAR_SHEET,
            f"{results.MARKER}: in-plane shear of piers, {s.standard} Cl 11.6",
            results.SHEAR_COLUMNS,
            shear,
            preamble=stamp
            + [
                ("Height for Hw/Lw", s.shear_height),
                (
                    "Sharing of wall V*",
                    f"by pier stiffness, {s.pier_fixity}, nu = {s.poisson:g}; N* and M* are not shared yet",
                ),
            ],
            scale_key="util",
        ),
        ResultSheet(
            results.MEMBERS_SHEET,
            f"{results.MARKER}: piers and lintels derived from walls "
            "and openings (IDs to map analysis output to)",
            results.MEMBER_COLUMNS,
            members_table(piers, geom.lintels),
            preamble=stamp,
        ),
    ]
    return Outcome(building, findings, geom, shear, summary, sheets)


def _stamp(b: Building, now: dt.datetime) -> list[tuple[str, object]]:
    return [
        ("CAUTION", CAUTION),
        ("Project", b.settings.project_name),
        ("Standard", b.settings.standard),
        ("xlcore version", __version__),
        ("Computed (UTC)", now.strftime("%Y-%m-%d %H:%M:%S")),
        (results.STAMP_HASH_LABEL, b.input_hash),
    ]


def _counts(summary: pd.DataFrame, shear: pd.DataFrame) -> list[tuple[str, object]]:
    checked = summary[summary.status != results.NOT_CHECKED]
    worst = checked.loc[checked.util.idxmax()] if len(checked) else None
    lines: list[tuple[str, object]] = [
        ("Pier x storey cases", len(summary)),
        ("Passing", int((summary.status == results.PASS).sum())),
        ("Failing", int((summary.status == results.FAIL).sum())),
        ("Not checked", int((summary.status == results.NOT_CHECKED).sum())),
        ("Rows checked (pier x storey x combination)", len(shear)),
    ]
    if worst is not None:
        lines.append(
            (
                "Building's worst",
                f"{worst.pier_id} at {worst.storey}, {worst.combination}: "
                f"utilisation {worst.util:.3f} ({worst.check}, {worst.clause})",
            )
        )
    return lines


def envelope(shear: pd.DataFrame, piers: pd.DataFrame) -> pd.DataFrame:
    """Worst combination per storey x pier; piers without actions listed as not checked."""
    cols = [c.key for c in results.SUMMARY_COLUMNS]
    if len(shear):
        worst = shear.loc[shear.groupby(["storey", "pier_id"], sort=False).util.idxmax()].copy()
    else:
        worst = shear.copy()
    worst["check"] = "in-plane shear"
    worst["demand"] = worst.v.abs()
    worst["capacity"] = worst.phi_vu
    worst["unit"] = "kN"
    worst["note"] = worst.advice
    order = piers[["storey", "storey_index", "pier_id", "wall_id", "position"]]
    table = order.merge(worst, on=["storey", "pier_id"], how="left", suffixes=("", "_w"))
    missing = table.util.isna()
    table.loc[missing, "status"] = results.NOT_CHECKED
    table.loc[missing, "check"] = "in-plane shear"
    table.loc[missing, "note"] = "no actions for this pier or its wall at this storey"
    table = table.sort_values(
        ["storey_index", "wall_id", "position"],
        ascending=[False, True, True],
        key=lambda c: c.map(geometry._natural) if c.name == "wall_id" else c,
    )
    table["util"] = table.util.astype(float)
    return table[cols].reset_index(drop=True)


def members_table(piers: pd.DataFrame, lintels: pd.DataFrame) -> pd.DataFrame:
    p = piers.assign(
        member=piers.pier_id,
        kind="pier",
        height=piers.h,
        k=piers.k * 1e-3,
        note=np.where(piers.position > 0, "between openings / wall ends", "wall without openings"),
    )
    lin = lintels.merge(
        piers.drop_duplicates(["storey", "wall_id"])[
            ["storey", "wall_id", "Hc", "fc", "rho_v", "rho_h", "storey_index"]
        ],
        on=["storey", "wall_id", "storey_index"],
    )
    lin = lin.assign(
        member=lin.lintel_id,
        kind="lintel",
        Lw=lin.span * 1000.0,
        height=lin.depth,
        start=np.nan,
        end=np.nan,
        k=np.nan,
        note="span = opening width; depth = head to top of slab above; not checked yet",
    )
    out = pd.concat([p, lin], ignore_index=True)
    out = out.sort_values(["storey_index", "kind"], ascending=[False, False], kind="stable")
    return out.reset_index(drop=True)
