"""The calculation report: a PDF beside a computed workbook (`xlcore report PATH`).

The numbers are not read back from the result sheets: the pipeline is run again on the
workbook's own inputs, after checking that their hash equals the one stamped on the result
sheets (and the xlcore version is the one that computed them), with the stamp's time. The
report and the workbook therefore show the same numbers (tests compare them cell by cell) and
the report can draw what the sheets do not hold (interaction curves, plans).

The report summarises; it never prints every row: the summary lists the failing and the
nearest-to-failing cases up to a bound, the rest stays in the workbook.

PDF by matplotlib's PdfPages alone: one well-kept dependency for both the charts and the pages,
text kept as text (TrueType fonts embedded, so it can be searched and extracted), DejaVu fonts
bundled with matplotlib (nothing to install on a bare machine).
"""

from __future__ import annotations

import datetime as dt
import os
import tempfile
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from xlcore import __version__, api, layout, results
from xlcore.diagnostics import FileProblem
from xlcore.model import Settings
from xlcore.progress import SILENT, Reporter

MAX_SUMMARY_ROWS = 40  # pier x storey cases listed on the summary pages (attention first)
MAX_PLANS = 12  # distinct storey plans drawn; beyond, the report names how many it left out
PLOTS_PER_PAGE = 8  # utilisation charts per page (4 rows x 2)
MAX_NM_PIERS = 4  # governing piers given an N-M diagram (one per pier check at most)
MAX_NM_CORES = 6  # cores given an N-M diagram (the most utilised first)
PRINT_CAUTION = "An aid to a qualified engineer: check it; local codes and licensed practice govern."


class ReportRefused(FileProblem):
    """No results to report on, or results computed from other inputs (exit 2)."""


@dataclass
class Report:
    path: Path
    pages: int
    stale: bool


def report_path(workbook: Path) -> Path:
    """Where the report goes by default: beside the workbook, `NAME-report.pdf`."""
    return workbook.with_name(f"{workbook.stem}-report.pdf")


def make_report(
    path: str | Path, output: str | Path | None = None, stale_ok: bool = False, reporter: Reporter = SILENT
) -> Report:
    """Write the calculation report of a computed workbook. Refuses (ReportRefused) a workbook
    without results, or one whose results are stale (inputs changed, or computed by another
    xlcore version) unless `stale_ok`; then the report is of the inputs as they are now and
    says so on every page."""
    path = Path(path)
    target = Path(output) if output is not None else report_path(path)
    if target.is_dir():  # a folder given: the usual name inside it
        target = target / report_path(path).name
    inputs = api.check(path, reporter)
    stamp = inputs.stamp or {}
    if inputs.results_state == api.NO_RESULTS:
        raise ReportRefused(f"{path}: no result sheets yet; run `xlcore compute {path.name}` first")
    version = stamp.get("xlcore version", "")
    why = []
    if inputs.results_state == api.STALE:
        why.append(
            "the inputs changed since the last compute (input hash differs from the result sheets' stamp)"
        )
    if version != __version__:
        why.append(f"the results were computed by xlcore {version or '(unknown)'}, this is {__version__}")
    stale = bool(why)
    if stale and not stale_ok:
        raise ReportRefused(
            f"{path}: results are stale: {'; '.join(why)}. Run `xlcore compute {path.name}` again, "
            "or pass --stale-ok for a report of the inputs as they are now"
        )
    when = _stamp_time(stamp.get("Computed (UTC)"))
    reporter.begin("running the checks again for the report")
    second = _also_checked(stamp, inputs.building, stale)
    with api.own_defects("running the checks for the report"):
        outcome = api.pipeline.compute_compared(inputs.building, inputs.findings, second, now=when)
    run = api.Run(path, outcome)
    reporter.begin("drawing the report")
    from xlcore.report.build import build_pages  # matplotlib loads only when a report is made

    with api.own_defects("drawing the report"):
        pages = build_pages(run, stamp, stale, why, path.name)
    _save(pages, target, run)
    reporter.end()
    return Report(target, len(pages), stale)


def _also_checked(stamp: dict[str, str], building, stale: bool) -> str | None:
    """The second standard the results were computed with (the summary's 'Also checked to'
    line: it may have come from `compute --standards`, not the setting); of stale results, the
    Project setting as it is now."""
    if stale:
        return building.settings.compare_standard or None
    text = stamp.get(results.ALSO_CHECKED)
    if not text:
        return None
    return text.split(" (see ")[0].strip() or None


def _stamp_time(text: str | None) -> dt.datetime | None:
    """The time the result sheets were computed (their stamp), so the report shows the
    workbook's time rather than its own."""
    if not text:
        return None
    try:
        return dt.datetime.strptime(text.strip(), "%Y-%m-%d %H:%M:%S").replace(tzinfo=dt.UTC)
    except ValueError:
        return None


def _save(pages, target: Path, run: api.Run) -> None:
    """All pages into one PDF, written to a temporary file beside the target and renamed over
    it: a failure leaves the previous report whole."""
    from matplotlib import pyplot as plt
    from matplotlib import rc_context
    from matplotlib.backends.backend_pdf import PdfPages

    target.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent)
    os.close(fd)
    umask = os.umask(0)
    os.umask(umask)
    os.chmod(tmp, 0o666 & ~umask)  # a file like any other (mkstemp makes it private)
    s = run.outcome.building.settings
    meta = {
        "Title": f"Calculation report: {s.project_name or run.path.stem}",
        "Subject": f"Core walls and piers to {s.standard}",
        "Creator": f"xlcore {__version__}",
    }
    try:
        with rc_context({"pdf.fonttype": 42}), PdfPages(tmp, metadata=meta) as pdf:
            for fig in pages:
                pdf.savefig(fig)
        os.replace(tmp, target)
    except OSError as exc:  # a full disk, a read-only folder, the old report open elsewhere
        raise FileProblem(f"could not write the report {target}: {exc}; nothing was changed") from None
    finally:
        for fig in pages:
            plt.close(fig)
        if os.path.exists(tmp):
            os.unlink(tmp)


def changed_settings(s: Settings) -> list[tuple[str, str, str]]:
    """Project settings that differ from the defaults: label, value, default."""
    default = Settings()
    out = []
    for st in layout.PROJECT.settings:
        if st.key in ("project_name", "standard") or not hasattr(s, st.key):
            continue
        value, base = getattr(s, st.key), getattr(default, st.key)
        if value != base:
            out.append((st.label, _show(value), _show(base)))
    return out


def _show(v: object) -> str:
    if v is None:
        return "blank (the standard's value)"
    if v == "":
        return "blank (none)"
    return f"{v:g}" if isinstance(v, float) else str(v)


def fmt(value: object, code: str | None) -> str:
    """A value as its sheet column shows it (number format '0.000' -> 3 decimals)."""
    if code is None:
        if value is None or (isinstance(value, float) and not np.isfinite(value)):
            return ""
        return str(value)
    try:
        x = float(value)
    except (TypeError, ValueError):
        return str(value)
    if not np.isfinite(x):
        return ""
    decimals = code.split(".")[1] if "." in code else ""
    fixed, optional = decimals.count("0"), decimals.count("#")  # '0.0##': one, up to three
    text = f"{x:.{fixed + optional}f}"
    if optional:
        keep = len(text) - optional
        while len(text) > keep and text.endswith("0"):
            text = text[:-1]
        text = text.rstrip(".")
    return text


def column(sheet: results.ResultSheet, key: str) -> results.ResultColumn | None:
    return next((c for c in sheet.columns if c.key == key), None)
