"""The report's drawings, by matplotlib: utilisation up the height, storey plans, N-M diagrams.

Each function draws into an Axes it is given, from tables it is given: no file, no workbook.
Plan in m, forces in kN and kNm, compression positive.
"""

from __future__ import annotations

import numpy as np
import pandas as pd
from matplotlib.axes import Axes
from matplotlib.patches import Polygon as Patch

from xlcore import results
from xlcore.mechanics.section import rectangle

OVER, CLOSE_C, OK = "#b2182b", "#c48a00", "#1e5631"  # our own: over, close, comfortable
HIGHLIGHT = ("#1f77b4", "#ff7f0e", "#2ca02c", "#9467bd", "#8c564b", "#e377c2")  # worst members
NAMED = 6  # members named in a utilisation plot's legend (the worst ones); the rest grey


def utilisation_up_height(ax: Axes, df: pd.DataFrame, member: str | None, util: str, title: str) -> None:
    """Worst utilisation over the combinations per storey, one line per member (pier, wall or
    lintel; one line for the whole core when `member` is None), floor level up the y axis, the
    1.0 line marked. `df` has storey, level, the member column and the utilisation column."""
    ax.set_title(title, fontsize=9, loc="left")
    ax.axvline(1.0, color=OVER, lw=1.2, ls="--")
    ax.axvline(results.CLOSE, color=CLOSE_C, lw=0.6, ls=":")
    ax.set_xlabel("utilisation", fontsize=7)
    ax.set_ylabel("floor level [m]", fontsize=7)
    ax.tick_params(labelsize=7)
    ax.grid(True, lw=0.3, color="#cccccc")
    if df.empty:
        ax.text(0.5, 0.5, "no rows: not checked", transform=ax.transAxes, ha="center", fontsize=8)
        ax.set_xlim(0, 1.2)
        return
    key = [member] if member else []
    per = df.groupby([*key, "storey", "level"], sort=False)[util].max().reset_index()
    peak = per.groupby(key)[util].max().sort_values(ascending=False) if key else None
    named = list(peak.index[:NAMED]) if peak is not None else []
    groups = per.groupby(key, sort=False) if key else [(None, per)]
    for name, g in groups:
        name = name[0] if isinstance(name, tuple) else name
        g = g.sort_values("level")
        if name is None or name in named:
            i = named.index(name) if name in named else 0
            ax.plot(
                g[util], g.level, lw=1.3, marker="o", ms=2.2, color=HIGHLIGHT[i % len(HIGHLIGHT)], label=name
            )
        else:
            ax.plot(g[util], g.level, lw=0.6, color="#9a9a9a", alpha=0.7)
    top = float(np.nanmax(per[util].to_numpy(dtype=float)))
    ax.set_xlim(0, max(1.1, top * 1.08) if np.isfinite(top) else 1.1)
    if named:
        by_label = {h.get_label(): h for h in ax.get_lines()}
        handles = [by_label[str(n)] for n in named if str(n) in by_label]  # worst first
        rest = len(peak) - len(named)
        title_ = f"worst {len(named)} named" + (f"; {rest} more in grey" if rest > 0 else "")
        ax.legend(
            handles=handles,
            fontsize=6,
            loc="upper left",
            bbox_to_anchor=(1.01, 1.0),
            title=title_,
            title_fontsize=5.5,
            frameon=False,
            alignment="left",
        )


def ratio_up_height(ax: Axes, df: pd.DataFrame, levels: dict[str, float], title: str) -> None:
    """The comparison's ratio (second / first standard) against floor level, one marker per
    storey x pier, a colour per check; 1.0 marked (the standards agree)."""
    for k, (check, g) in enumerate(df.groupby("check", sort=False)):
        y = g.storey.map(levels).to_numpy(dtype=float)
        ax.scatter(g.ratio, y, s=9, color=HIGHLIGHT[k % len(HIGHLIGHT)], label=check, alpha=0.8)
    ax.axvline(1.0, color="black", lw=0.8, ls="--")
    ax.set_xlabel("ratio of utilisations (second / first standard)", fontsize=7.5)
    ax.set_ylabel("floor level [m]", fontsize=7.5)
    ax.set_title(title, fontsize=8.5, loc="left")
    ax.tick_params(labelsize=7)
    ax.legend(fontsize=6.5, loc="best", frameon=False)
    ax.grid(alpha=0.3)


def storey_plan(
    ax: Axes,
    piers: pd.DataFrame,
    openings: list[tuple[str, str, float, float, float, float, float]],
    marks: list[tuple[str, tuple[float, float], tuple[float, float] | None]],
) -> int:
    """Walls as their pier rectangles, openings dashed with their lintel IDs, pier IDs beside
    each pier, and for each core (name, centroid, centre of rigidity) its net section's
    centroid and centre of rigidity. `openings`: (lintel ID, wall ID, x1, y1, x2, y2,
    thickness m) of each opening's centreline. An ID much longer on paper than its member is
    left off (a large plan drawn small); returns how many were."""
    for r in piers.itertuples(index=False):
        poly = rectangle(r.px1, r.py1, r.px2, r.py2, r.tw / 1000.0)
        ax.add_patch(Patch(np.asarray(poly.exterior.coords), closed=True, fc="#b8b8b8", ec="#333333", lw=0.7))
    for _id, _wall, x1, y1, x2, y2, t in openings:
        poly = rectangle(x1, y1, x2, y2, t)
        ax.add_patch(
            Patch(np.asarray(poly.exterior.coords), closed=True, fill=False, ec="#8c510a", lw=0.6, ls="--")
        )
    ax.set_aspect("equal")
    ax.autoscale_view()
    x0, x1_ = ax.get_xlim()
    y0, y1_ = ax.get_ylim()
    pad = 0.08 * max(x1_ - x0, y1_ - y0) + 0.5
    ax.set_xlim(x0 - pad, x1_ + pad)
    ax.set_ylim(y0 - pad, y1_ + pad)
    box = ax.get_position()
    w_in, h_in = ax.figure.get_size_inches()
    scale = min(box.width * w_in * 72 / (x1_ - x0 + 2 * pad), box.height * h_in * 72 / (y1_ - y0 + 2 * pad))
    left_off = 0

    def label(x1, y1, x2, y2, t, text, size, colour, side) -> None:
        nonlocal left_off
        ux, uy = x2 - x1, y2 - y1
        length = float(np.hypot(ux, uy)) or 1.0
        if 1.6 * length * scale < 0.62 * size * len(text):  # points along the member vs the text
            left_off += 1
            return
        nx, ny = -uy / length * side, ux / length * side
        off = t / 2 + 0.7 * size / scale
        angle = np.degrees(np.arctan2(uy, ux))
        angle = angle - 180 if angle > 90 else angle + 180 if angle <= -90 else angle
        ax.text(
            (x1 + x2) / 2 + nx * off,
            (y1 + y2) / 2 + ny * off,
            text,
            fontsize=size,
            ha="center",
            va="center",
            rotation=angle,
            color=colour,
        )

    for r in piers.itertuples(index=False):
        label(r.px1, r.py1, r.px2, r.py2, r.tw / 1000.0, r.pier_id, 6.5, "#1f4e79", 1)
    for lintel_id, _wall, x1, y1, x2, y2, t in openings:  # the other side from the pier IDs
        label(x1, y1, x2, y2, t, lintel_id, 6, "#8c510a", -1)
    for k, (name, centroid, centre) in enumerate(marks):
        first = {} if k else {"label": "centroid of the net section"}
        ax.plot(*centroid, marker="+", ms=11, mew=1.6, color="#000000", ls="none", **first)
        if centre is not None:
            first = {} if k else {"label": "centre of rigidity"}
            ax.plot(*centre, marker="x", ms=9, mew=1.6, color=OVER, ls="none", **first)
        if name:
            ax.annotate(
                name, centroid, xytext=(6, -10), textcoords="offset points", fontsize=7, fontweight="bold"
            )
    ax.set_xlabel("x [m]", fontsize=7)
    ax.set_ylabel("y [m]", fontsize=7)
    ax.tick_params(labelsize=7)
    ax.grid(True, lw=0.3, color="#dddddd")
    ax.legend(fontsize=6.5, loc="upper left", bbox_to_anchor=(0.0, -0.13), ncol=2, frameon=False)
    return left_off


def interaction(
    ax: Axes,
    curve_m: np.ndarray,
    curve_n: np.ndarray,
    points: pd.DataFrame,
    governing: tuple[float, float],
    on_curve: tuple[float, float] | None,
    title: str,
    note: str = "",
    ray: bool = True,
) -> None:
    """The factored N-M diagram (M >= 0 side, N up) with every combination's design point
    (grey), the governing one (red) and the ray from the origin to where it meets the curve
    (with `ray` False: the capacity at the governing N* instead). `points`: columns m, n."""
    ax.set_title(title, fontsize=9, loc="left")
    ax.fill_betweenx(curve_n, 0, curve_m, color="#d9ead3", alpha=0.6, lw=0)
    ax.plot(curve_m, curve_n, color=OK, lw=1.4, label="factored capacity (phi Nu, phi Mu)")
    ax.plot(points.m, points.n, "o", ms=3, color="#7a7a7a", label="design points, every combination")
    gm, gn = governing
    if ray:
        ax.plot([0, gm], [0, gn], color=OVER, lw=0.7, ls=":")
    else:
        ax.plot([gm, on_curve[0]], [gn, on_curve[1]], color=OVER, lw=0.7, ls=":")
    ax.plot([gm], [gn], "o", ms=5.5, color=OVER, label="governing design point")
    if on_curve is not None and np.all(np.isfinite(on_curve)):
        what = "ray meets the curve" if ray else "capacity at N* along M*"
        ax.plot([on_curve[0]], [on_curve[1]], "s", ms=4.5, mfc="none", mec=OVER, label=what)
    ax.axhline(0, color="#555555", lw=0.5)
    ax.axvline(0, color="#555555", lw=0.5)
    ax.set_xlabel("M [kNm]", fontsize=7)
    ax.set_ylabel("N [kN] (compression +)", fontsize=7)
    ax.tick_params(labelsize=7)
    ax.grid(True, lw=0.3, color="#dddddd")
    ax.set_xlim(left=0, right=max(float(np.nanmax(curve_m)), float(points.m.max()), gm) * 1.1)
    ax.legend(fontsize=6.5, loc="upper right", framealpha=0.9)
    if note:
        ax.text(0.0, -0.16, note, transform=ax.transAxes, fontsize=6.5, va="top", wrap=True)
