"""Changes a site could build that make each failing pier pass every check at its storey.

A search over discrete options, each evaluated with the same vectorised checks as the design
(shear, axial + bending, Cl 11.5, detailing Cl 11.7 and Section 14), the actions held as
analysed (a stiffer pier would attract more; re-run the analysis after a change):

- **a higher standard grade for a whole pour**, never one pier: the walls that share a pour
  follow the Project setting `grade_pour` (default: every wall of the core, Walls sheet's Core
  ID, at one storey; or the core over N storeys, or each wall). The whole pour is priced at the
  new grade (each wall's length x thickness x clear height, openings not deducted), and a grade
  passes only where every failing pier of the pour passes with it. A higher grade lowers no
  capacity and raises no demand in these checks (the actions are held), so it makes no other
  pier of the pour fail. One row per pour.
- **horizontal or vertical bars**, the lightest arrangement per diameter, spacing and layers;
  an option whose layers differ from the other direction's is not offered alone (the pair
  search changes both), nor one layer where the wall is thicker than the one-layer limit
  (Cl 11.7, checks/detailing.py) or Section 14 asks for both faces (checks/section14.py);
- **end-zone bars** at both free edges of the pier (offered first where axial + bending fails);
- **a thicker wall** in 25 mm steps that keeps the steel ratio of its bars: each direction gets
  the arrangement of the bar catalogue with the least ratio at or above the present one (two
  layers where the new thickness or Section 14 asks for them), stated in the option;
- **pairs of changes**, only for a pier that no single change (nor its pour's grade) fixes:
  the kinds paired are grade + each pier change, horizontal + vertical bars (layers equal),
  horizontal or vertical bars + end-zone bars, end-zone bars + thickness (a thicker wall
  re-chooses its bars, so it is not paired with a change of bars). Bound: at most
  7 x (72 + 90 + 25 + 12) + 36 x 45 x 2 + 72 x 25 + 90 x 25 + 25 x 12 = 8 983 pairs per
  such pier (7 grades above the lowest, 72 horizontal and 90 vertical arrangements, 25
  end-zone options, 12 thicknesses), priced in one vectorised step and checked in rounds,
  cheapest first (6, 12, 24, ... per pier), stopping at the first round holding a pass; so
  each pier gets the cheapest passing pair: every cheaper pair was checked and failed, or is
  of a pair of kinds whose strongest pair fails (the probe below).
  Where no grade alone fixes a pour, one plan: the highest grade its piers' pairs name for the
  whole pour, each pier's other change checked again at that grade.
- **probe**: each group (pier x kind, or pier x pair of kinds) first checks its most expensive
  option; where that fails the group is not searched. Assumes the most of a change does at least
  as well as less of it: so for grade in these checks; for thickness, whose bars are re-chosen
  at each step, within the rounding of the bar choice (the ratio never falls below the present);
  for steel, phi falling as kuo grows (AS 3600 Table 2.2.2) is the one known exception
  (docs/engineering-basis.md). The tests compare the search with the exhaustive one.

Costs are totals over the pier's storey (clear height) for a change to a pier and over the
whole pour for a grade (`costs.py`).
"""

from __future__ import annotations

import functools
import itertools
import re

import numpy as np
import pandas as pd

from xlcore import costs, geometry
from xlcore.checks import group_max, special_walls
from xlcore.checks.axial import check_pier_axial
from xlcore.checks.detailing import check_detailing
from xlcore.checks.section14 import check_section14, not_applicable_reason
from xlcore.checks.shear import check_pier_shear
from xlcore.codes import get_standard
from xlcore.codes.base import Standard
from xlcore.mechanics import bars
from xlcore.model import Settings

SPACINGS = tuple(float(s) for s in range(100, 301, 25))
LAYERS = (1, 2)
THICKNESS_STEP, THICKNESS_STEPS = 25.0, 12
ZONE_BARS = (4, 6, 8, 10, 12)  # bars in each zone over all faces
ZONE_ROUND = 25.0  # mm: zone lengths rounded up to this
GRADE_KIND = "grade (whole pour)"
H_KIND, V_KIND, ZONE_KIND, THICK_KIND = "horizontal bars", "vertical bars", "end-zone bars", "thickness"
PIER_KINDS = (H_KIND, V_KIND, ZONE_KIND, THICK_KIND)
PAIRS = (
    (GRADE_KIND, H_KIND),
    (GRADE_KIND, V_KIND),
    (GRADE_KIND, ZONE_KIND),
    (GRADE_KIND, THICK_KIND),
    (H_KIND, V_KIND),
    (H_KIND, ZONE_KIND),
    (V_KIND, ZONE_KIND),
    (ZONE_KIND, THICK_KIND),
)
BAR_FIELDS = {p: (f"{p}_dia", f"{p}_spacing", f"{p}_layers", f"rho_{p}") for p in "hv"}
# the pier fields each kind of change sets (the kinds paired never share one)
OWNS = {
    GRADE_KIND: ("fc",),
    H_KIND: BAR_FIELDS["h"],
    V_KIND: BAR_FIELDS["v"],
    ZONE_KIND: tuple(geometry.ZONE_COLUMNS),
    THICK_KIND: ("tw", *BAR_FIELDS["h"], *BAR_FIELDS["v"]),
}
# the priced quantities each kind sets (meta columns)
PRICED = {
    GRADE_KIND: ("fc",),
    H_KIND: ("rho_h",),
    V_KIND: ("rho_v",),
    ZONE_KIND: ("zarea",),
    THICK_KIND: ("tw", "rho_v", "rho_h"),
}
AXIAL_CHECK = "axial + bending"  # the summary's name of the pier N-M check
NONE_PASSES = "none in the search range passes every check"
PAIR_KIND = "pair of changes"
ADVICE_KEYS = [
    "storey",
    "pier_id",
    "pour",
    "check",
    "util_now",
    "rank",
    "kind",
    "option",
    "fixes",
    "util",
    "added_cost",
    "plan",
]


def _std(settings: Settings) -> Standard:
    """The Project's design standard with its own settings: the grades, spacing, clear-gap and
    layer limits the search keeps to are that standard's (the checks then judge every option)."""
    return get_standard(settings.standard).configure(settings)


def _dias(std: Standard, use: str) -> tuple[float, ...]:
    """Nominal diameters [mm] of the bars the standard's catalogue offers for `use`
    (`Standard.advice_bars`: AS 3600 N10-N20 horizontal, N12-N28 vertical, N20-N36 end zones)."""
    return tuple(b.dia for b in std.advice_bars(use))


@functools.lru_cache(maxsize=4)
def _option_table(std: Standard) -> pd.DataFrame:
    """Every option of the search, in the order ties on cost are broken: grades up (the
    standard's, `Standard.grades`), then horizontal and vertical bars (diameter, spacing,
    layers; the standard's bars, `Standard.advice_bars`), then end zones and thickness."""
    rows = [dict(kind=GRADE_KIND, option=f"f'c {g:g} MPa", grade=g) for g in std.grades()]
    for kind, use, prefix in ((H_KIND, "horizontal", "h"), (V_KIND, "vertical", "v")):
        for d, sp, n in itertools.product(_dias(std, use), SPACINGS, LAYERS):
            rows.append(
                dict(kind=kind, option=_bars_text(d, sp, n, std), prefix=prefix, dia=d, spacing=sp,
                     layers=float(n))
            )
    rows += [
        dict(kind=ZONE_KIND, option="", zone_dia=d, zone_bars=float(n))
        for d, n in itertools.product(_dias(std, "zone"), ZONE_BARS)
    ]
    rows += [dict(kind=THICK_KIND, option="", step=k * THICKNESS_STEP) for k in range(1, THICKNESS_STEPS + 1)]
    return pd.DataFrame(rows)


def _bars_text(d: float, sp: float, n: float, std: Standard) -> str:
    return f"{std.bar_name(d)} @ {sp:g} x {n:g} layer{'s' if n > 1 else ''}"


def _words(f, *columns) -> list[str]:
    """`[f(*row) for row in zip(*columns)]` (floats), with f called once per distinct row: the L
    tower words 150 000 options from a few thousand distinct arrangements (a format and a
    catalogue lookup per row cost 0.5 s). Rows are told apart by their bytes, so two rows share
    words only where every value is the same float (0.0 and -0.0, NaNs of other bits, differ)."""
    table = np.column_stack([np.asarray(c, dtype=float) for c in columns]) if columns else None
    if table is None or not len(table):
        return []
    rows = np.ascontiguousarray(table).view(np.dtype((np.void, table.dtype.itemsize * table.shape[1])))
    _, first, inverse = np.unique(rows.ravel(), return_index=True, return_inverse=True)
    words = np.asarray([f(*row) for row in table[first].tolist()], dtype=object)
    return words[inverse.ravel()].tolist()



def two_layers_required(settings: Settings) -> bool:
    """Section 14's both-faces rule applies (checks/section14.py: a ductile structure and the
    Project setting): every option keeps two layers each way."""
    return not_applicable_reason(settings) is None and settings.eq_two_layers == "yes"


def _layers_needed(tw: np.ndarray, settings: Settings) -> np.ndarray:
    """Least layers each way a wall of thickness `tw` may have: two above the one-layer
    thickness limit of Cl 11.7 (checks/detailing.py) or where Section 14 asks for both faces."""
    thickest_one_layer = _std(settings).single_layer_limits()[0]
    two = (np.asarray(tw, dtype=float) > thickest_one_layer) | two_layers_required(settings)
    return np.where(two, 2.0, 1.0)


def _hold_ratio(rho0, layers, tw, dias, dia_now, std: Standard, Lw, way: int):
    """`_hold_ratio_rows` once per distinct row of (rho0, layers, tw, dia_now, Lw), spread to
    the rows: its answer for a row reads that row alone (the L tower's 48 000 thickness options
    hold 48 distinct rows; each row's arrangements are a row of a rows x catalogue grid).
    Rows are told apart by their bytes (-0.0 from 0.0), as `_words` tells them."""
    cols = [np.asarray(c) for c in (rho0, layers, tw, dia_now, Lw)]
    if len(cols[0]) < 2:
        return _hold_ratio_rows(cols[0], cols[1], cols[2], dias, cols[3], std, cols[4], way)
    table = np.ascontiguousarray(np.column_stack([c.astype(float) for c in cols]))
    rows = table.view(np.dtype((np.void, table.dtype.itemsize * table.shape[1]))).ravel()
    _, first, inverse = np.unique(rows, return_index=True, return_inverse=True)
    r, n, t, now, L = (c[first] for c in cols)
    d, sp, rho, found = _hold_ratio_rows(r, n, t, dias, now, std, L, way)
    inverse = inverse.ravel()
    return d[inverse], sp[inverse], rho[inverse], found[inverse]


def _hold_ratio_rows(rho0, layers, tw, dias, dia_now, std: Standard, Lw, way: int):
    """Per row, the catalogue arrangement (`dias` x SPACINGS, `layers` layers) with the least
    ratio at or above `rho0` in a wall `tw` thick, within the Cl 11.7 spacing and clear-gap
    limits (exact ties: the present diameter). Returns dia, spacing, ratio and whether found."""
    d = np.repeat(np.asarray(dias, dtype=float), len(SPACINGS))
    sp = np.tile(np.asarray(SPACINGS, dtype=float), len(dias))
    rho = geometry.bar_ratio(layers[:, None], d[None, :], sp[None, :], tw[:, None])
    # way: 0 vertical, 1 horizontal bars (`Standard.max_spacing` gives both)
    ok = (sp[None, :] <= std.max_spacing(tw, Lw)[way][:, None]) & (
        (sp - d)[None, :] >= std.min_clear_gap(d)[None, :]
    )
    ok &= rho >= rho0[:, None] * (1.0 - 1e-9)
    score = np.where(ok, rho + 1e-12 * (d[None, :] != dia_now[:, None]), np.inf)
    k = np.argmin(score, axis=1) if len(score) else np.zeros(0, dtype=int)
    found = np.isfinite(score[np.arange(len(k)), k]) if len(k) else np.zeros(0, dtype=bool)
    return d[k], sp[k], rho[np.arange(len(k)), k] if len(k) else np.zeros(0), found


def _cost_total(Lw, tw, rho_v, rho_h, fc, zarea, Hc, prices, settings: Settings) -> np.ndarray:
    """Cost of a pier over its storey's clear height: concrete at its grade, wall bars, end-zone
    bars (`costs.py`)."""
    concrete = costs.concrete_price(prices, np.asarray(fc, float))
    zone = costs.bars_per_metre_height(zarea, settings.steel_price)
    return _cost_priced(Lw, tw, rho_v, rho_h, concrete, zone, Hc, settings)


def _cost_priced(Lw, tw, rho_v, rho_h, concrete, zone, Hc, settings: Settings) -> np.ndarray:
    """`_cost_total` with the concrete's price per m3 and the end-zone bars' cost per metre
    given (each a function of one field alone: the pairs take them from their option rows)."""
    per_m = np.asarray(
        costs.per_metre_height(
            np.asarray(Lw, float),
            np.asarray(tw, float),
            np.asarray(rho_v, float),
            np.asarray(rho_h, float),
            concrete,
            settings.steel_price,
        )
    ) + zone
    return costs.over_height(per_m, Hc)


def _zone_area(df: pd.DataFrame) -> np.ndarray:
    return sum(
        np.nan_to_num(df[f"z{side}_n"].to_numpy(float)) * bars.bar_area(np.nan_to_num(df[f"z{side}_dia"]))
        for side in "ab"
    )


# pier columns neither the search nor the checks it runs read (plan position, stiffness, core
# N-M outline, edge names: the axial check's `util_only` leaves those out): not copied to the
# 380 000 variant rows of the L tower nor through the checks' copies and joins of them. Named
# columns dropped, not a list kept: a column a check comes to read stays (tests/test_advice_speed5.py)
UNREAD = (
    "start", "end", "wx", "wy", "ux", "uy", "strip", "core", "edge_a", "edge_b",
    "px1", "py1", "px2", "py2", "mx", "my", "h", "Ec", "k",
)  # fmt: skip


def _candidates(
    piers: pd.DataFrame, targets: pd.DataFrame, settings: Settings
) -> tuple[pd.DataFrame, pd.DataFrame]:
    """Every single option for every target as a variant pier row, with its added cost over the
    storey: the targets crossed with the option table, less options that do not add to what is
    there (a lower grade, less steel) or cannot be built (one layer where two are needed), all
    column by column. `offered`: may stand alone (bar layers equal to the other direction's)."""
    prices = costs.parse_concrete_prices(settings.concrete_prices)
    base = piers.drop(columns=[c for c in UNREAD if c in piers])
    base = base.merge(targets[["storey", "pier_id"]], on=["storey", "pier_id"]).reset_index(drop=True)
    for c in geometry.ZONE_COLUMNS:
        if c not in base:
            base[c] = np.nan if c.endswith("_ties") else 0.0
    std = _std(settings)
    o = _option_table(std)
    # 32-bit positions while the cross product is whole (855 000 rows at L), 64-bit once filtered
    bi = np.repeat(np.arange(len(base), dtype=np.int32), len(o))
    oi = np.tile(np.arange(len(o), dtype=np.int32), len(base))
    # the grades and bars that the rules below drop, dropped before the rows are made (the L
    # tower: 855 000 rows of every pier column, 380 000 kept): the same tests on the same
    # numbers, so the rows kept and their order are those the rules below keep
    pre = _built_options(base, o, bi, oi, std, settings)
    bi, oi = bi[pre].astype(np.int64), oi[pre].astype(np.int64)
    var = base.iloc[bi].reset_index(drop=True)
    kind = o.kind.to_numpy()[oi]
    tw0 = var.tw.to_numpy(float)
    keep = np.ones(len(var), dtype=bool)
    offered = np.ones(len(var), dtype=bool)
    layers_opt = np.full(len(var), np.nan)
    # which kind each row is, tested on the option table and gathered (not 380 000 text tests)
    of_kind = {k: (o.kind.to_numpy() == k)[oi] for k in (GRADE_KIND, *PIER_KINDS)}
    grade = of_kind[GRADE_KIND]
    keep[grade] = o.grade.to_numpy()[oi][grade] > var.fc.to_numpy(float)[grade]
    var["fc"] = np.where(grade, o.grade.to_numpy()[oi], var.fc.to_numpy(float))
    need = _layers_needed(tw0, settings)
    # the arrangement's numbers and the limits, the same for both directions: worked out once
    d, sp, n = (o[k].to_numpy()[oi] for k in ("dia", "spacing", "layers"))
    rho = geometry.bar_ratio(n, d, sp, tw0)
    max_spacing, gap_ok = std.max_spacing(tw0, var.Lw.to_numpy(float)), sp - d >= std.min_clear_gap(d)
    for prefix, other, name in (("h", "v", H_KIND), ("v", "h", V_KIND)):
        sel = of_kind[name]
        # only more steel, never fewer layers than the thickness or Section 14 asks for, and
        # within the Cl 11.7 spacing and clear-gap limits (checks/detailing.py fails the rest)
        way = 0 if prefix == "v" else 1
        built = (sp <= max_spacing[way]) & gap_ok
        keep[sel] = ((rho > var[f"rho_{prefix}"].to_numpy(float) + 1e-12) & (n >= need) & built)[sel]
        offered[sel] = (n == var[f"{other}_layers"].to_numpy(float))[sel]
        layers_opt[sel] = n[sel]
        for field, new in ((f"{prefix}_dia", d), (f"{prefix}_spacing", sp), (f"rho_{prefix}", rho)):
            var[field] = np.where(sel, new, var[field].to_numpy(float))
        var[f"{prefix}_layers"] = np.where(sel, n, var[f"{prefix}_layers"].to_numpy(float)).astype(int)
    thick = of_kind[THICK_KIND]
    thick_text = _thicker(var, thick, tw0 + np.nan_to_num(o.step.to_numpy()[oi]), keep, settings)
    keep &= _zone_options(var, of_kind[ZONE_KIND], o.zone_dia.to_numpy()[oi], o.zone_bars.to_numpy()[oi], std)
    option = o.option.to_numpy()[oi].copy()
    option[thick] = thick_text
    if not keep.all():  # (at L the rules before the rows were made left nothing to drop here)
        var, kind, oi, bi = var[keep].reset_index(drop=True), kind[keep], oi[keep], bi[keep]
        option, offered, layers_opt = option[keep], offered[keep], layers_opt[keep]
    zoned = of_kind[ZONE_KIND][keep]
    option[zoned] = _words(
        lambda n, d, length: f"{std.bar_name(d, n)} in {length:g} mm at each end (ties not priced)",
        *(var[k].to_numpy()[zoned] for k in ("za_n", "za_dia", "za_len")),
    )
    # each variant's own pier ID, unique over storeys too: an integer, so that the checks' joins
    # on (storey, pier) and the maps by variant hash numbers, not text (a text ID per variant cost
    # a Python format per row and string factorising in every join); the variant is its row
    variant = np.arange(len(var), dtype=np.int64)
    meta = pd.DataFrame(
        dict(
            storey=var.storey.to_numpy(),
            pier_id=var.pier_id.to_numpy(),
            variant=variant,
            bi=bi,
            kind=kind,
            option=option,
            offered=offered,
            layers=layers_opt,
        )
    )
    var["pier_id"] = variant
    meta["zarea"] = _zone_area(var)
    for key in ("fc", "tw", "rho_v", "rho_h"):
        meta[key] = var[key].to_numpy(float)
    # the four base columns read, by position (not every pier column taken again)
    for key in ("Lw", "Hc"):
        meta[key] = base[key].to_numpy(float)[bi]
    meta["fc0"], meta["tw0"] = base.fc.to_numpy(float)[bi], base.tw.to_numpy(float)[bi]
    base_cost = _cost_total(
        base.Lw, base.tw, base.rho_v, base.rho_h, base.fc, _zone_area(base), base.Hc, prices, settings
    )
    meta["base_cost"] = base_cost[bi]
    meta["added_cost"] = (
        _cost_total(meta.Lw, meta.tw, meta.rho_v, meta.rho_h, meta.fc, meta.zarea, meta.Hc, prices, settings)
        - meta.base_cost
    )
    return var, meta


def _built_options(
    base: pd.DataFrame, o: pd.DataFrame, bi: np.ndarray, oi: np.ndarray, std: Standard, settings: Settings
) -> np.ndarray:
    """Which of the (pier `bi`, option `oi`) rows `_candidates` may keep: a grade above the
    pier's, bars adding steel within the layer, spacing and clear-gap rules (its tests, on the
    pier's own numbers); end zones and thickness all (their rules need the rows).

    Worked out on the grid of piers x options (`_built_grid`) and read at (bi, oi): the same
    tests on the same numbers, without gathering each pier and option field to the 855 000
    rows of the L tower's cross product (a score of arrays of 7 MB each)."""
    return _built_grid(base, o, std, settings)[bi, oi]


def _built_grid(base: pd.DataFrame, o: pd.DataFrame, std: Standard, settings: Settings) -> np.ndarray:
    """`_built_options` for every pier (rows) x option (columns): each test elementwise on the
    pier's and the option's numbers broadcast, the same operations in the same order as on
    gathered rows, so the same bits."""
    kind = o.kind.to_numpy()
    grid = np.zeros((len(base), len(o)), dtype=bool)
    grid[:, (kind == ZONE_KIND) | (kind == THICK_KIND)] = True
    grade = np.flatnonzero(kind == GRADE_KIND)
    fc = base.fc.to_numpy(float)[:, None]
    grid[:, grade] = o.grade.to_numpy()[grade][None, :] > fc
    tw0, Lw = base.tw.to_numpy(float), base.Lw.to_numpy(float)
    need = _layers_needed(tw0, settings)[:, None]
    max_spacing = std.max_spacing(tw0, Lw)
    for prefix, name in (("h", H_KIND), ("v", V_KIND)):
        sel = np.flatnonzero(kind == name)
        d, sp, n = (o[k].to_numpy()[sel][None, :] for k in ("dia", "spacing", "layers"))
        rho = geometry.bar_ratio(n, d, sp, tw0[:, None])
        way = 0 if prefix == "v" else 1
        built = (sp <= max_spacing[way][:, None]) & (sp - d >= std.min_clear_gap(d))
        now = base[f"rho_{prefix}"].to_numpy(float)[:, None]
        grid[:, sel] = (rho > now + 1e-12) & (n >= need) & built
    return grid


def _thicker(
    var: pd.DataFrame, sel: np.ndarray, tw: np.ndarray, keep: np.ndarray, settings: Settings
) -> list[str]:
    """Put the thickness options `sel` into the variant rows: the new thickness and, each way,
    the bars that keep the present ratio (`_hold_ratio`) in the layers the new thickness needs
    (at least the present ones, the same both ways). Drops options whose ratio the catalogue
    cannot hold; returns each kept option's words."""
    idx = np.flatnonzero(sel)
    if not len(idx):
        return []
    t = tw[idx]
    rows = var.iloc[idx]
    layers = np.maximum.reduce(
        [rows.v_layers.to_numpy(float), rows.h_layers.to_numpy(float), _layers_needed(t, settings)]
    )
    found = np.ones(len(idx), dtype=bool)
    std = _std(settings)
    chosen = {}
    for prefix, label in (("v", "vertical"), ("h", "horizontal")):
        rho0 = rows[f"rho_{prefix}"].to_numpy(float)
        d, sp, rho, ok = _hold_ratio(
            rho0, layers, t, _dias(std, label), rows[f"{prefix}_dia"].to_numpy(float), std,
            rows.Lw.to_numpy(float), 0 if prefix == "v" else 1,
        )
        found &= ok
        for field, new in (
            (f"{prefix}_dia", d),
            (f"{prefix}_spacing", sp),
            (f"{prefix}_layers", layers),
            (f"rho_{prefix}", rho),
        ):
            col = var[field].to_numpy(float).copy()
            col[idx] = new
            var[field] = col
        chosen[prefix] = (d, sp, rho0, rho)
    for p in "hv":
        var[f"{p}_layers"] = var[f"{p}_layers"].to_numpy(float).astype(int)
    col = var.tw.to_numpy(float).copy()
    col[idx] = t
    var["tw"] = col
    keep[idx] &= found

    def words(x, n, a, b, c, e, f, g, h, i):
        return (
            f"tw {x:g} mm, bars for the same ratio: vertical {_bars_text(a, b, n, std)} "
            f"(rho {c:.5f} -> {e:.5f}); horizontal {_bars_text(f, g, n, std)} (rho {h:.5f} -> {i:.5f})"
        )

    return _words(words, t, layers, *chosen["v"], *chosen["h"])


def _zone_options(
    var: pd.DataFrame, sel: np.ndarray, dia: np.ndarray, n: np.ndarray, std: Standard
) -> np.ndarray:
    """Put the end-zone options `sel` (n bars of `dia` at both free edges of the pier) into the
    variant rows; which of them to keep: a whole number of bars a face, a zone (the least
    length holding the bars at the clear-gap rule, rounded up to ZONE_ROUND) short enough that
    the two zones' innermost bars keep that gap, and more zone steel at each side than the pier
    has."""
    keep = np.ones(len(var), dtype=bool)
    if not sel.any():
        return keep
    # the rules on the option rows alone (the same operations on their own numbers)
    idx = np.flatnonzero(sel)
    layers = var.v_layers.to_numpy(float)[idx]
    d, count = np.nan_to_num(dia), np.nan_to_num(n)
    ds, cs = d[idx], count[idx]
    need = bars.zone_min_length(
        cs, layers, ds, var.cover.to_numpy(float)[idx], 0.0, std.zone_clear_gap(ds)
    )
    length = np.zeros(len(var))
    length[idx] = np.ceil(need / ZONE_ROUND) * ZONE_ROUND
    area = cs * bars.bar_area(ds)
    more = np.ones(len(idx), dtype=bool)
    for side in "ab":
        now = np.nan_to_num(var[f"z{side}_n"].to_numpy(float)[idx]) * bars.bar_area(
            np.nan_to_num(var[f"z{side}_dia"].to_numpy(float)[idx])
        )
        more &= area > now + 1e-9
    # the two zones' innermost bars (no ties) keep the standard's zone clear gap: 2 L <= Lw - gap
    room = (var.Lw.to_numpy(float)[idx] - std.zone_clear_gap(ds)) / 2
    keep[idx] = (cs % np.maximum(layers, 1) == 0) & (length[idx] <= room) & more
    for side in "ab":
        for k, v in (("n", count), ("dia", d), ("len", length), ("tie", 0.0), ("ties", np.nan)):
            col = f"z{side}_{k}"
            var[col] = np.where(sel, v, var[col].to_numpy(float))
    return keep


# ---------------------------------------------------------------------------------------------
# pours


def pour_keys(rows: pd.DataFrame, piers: pd.DataFrame, settings: Settings) -> tuple[pd.Series, pd.Series]:
    """Each row's pour (the walls that take one grade together, Project setting `grade_pour`):
    its name and its storey group (lowest first). `rows` carry storey_index, core and wall_id;
    `piers` (the whole pier table) names each group's storeys."""
    m = re.search(r"over (\d+) storeys", settings.grade_pour)
    per = int(m.group(1)) if m else 1
    group = rows.storey_index.to_numpy(int) // per
    core = rows.core.fillna("").astype(str).to_numpy() if "core" in rows else np.full(len(rows), "")
    # the storeys of each group: the names of its lowest and highest storeys in the building
    names = piers[["storey", "storey_index"]].drop_duplicates().assign(g=lambda d: d.storey_index // per)
    lo = names.sort_values("storey_index").groupby("g").storey.first()
    hi = names.sort_values("storey_index").groupby("g").storey.last()
    span = {g: (lo[g] if lo[g] == hi[g] else f"{lo[g]} to {hi[g]}") for g in lo.index}
    if settings.grade_pour.startswith("each wall"):
        names, who = rows.wall_id.astype(str).to_numpy(), "wall {}".format
    else:
        names, who = core, lambda c: f"core {c}" if c else "the core"
    # one label per distinct (name, storey group), not per row (the search labels 380 000
    # options of a few thousand pours)
    label = np.empty(len(rows), dtype=object)
    if len(rows):
        name, named = pd.factorize(names)
        part, parts = pd.factorize(group)
        pours, at = np.unique(name.astype(np.int64) * len(parts) + part, return_inverse=True)
        words = [f"{who(named[k // len(parts)])}, {span[parts[k % len(parts)]]}" for k in pours.tolist()]
        label = np.asarray(words, dtype=object)[at.ravel()]
    return pd.Series(label.tolist(), index=rows.index), pd.Series(group, index=rows.index)


def pour_premiums(piers: pd.DataFrame, settings: Settings) -> pd.DataFrame:
    """Added cost of each pour at each standard grade: every wall of the pour below the grade
    raised to it, priced over the wall's length x thickness x clear height (openings not
    deducted: slightly over, never under). Columns pour, grade, premium."""
    prices = costs.parse_concrete_prices(settings.concrete_prices)
    walls = piers.drop_duplicates(["storey", "wall_id"]).copy()
    walls["pour"], _ = pour_keys(walls, piers, settings)
    volume = (
        walls.wall_length.to_numpy(float) * walls.tw.to_numpy(float) / 1e3 * walls.Hc.to_numpy(float) / 1e3
    )
    grades = np.asarray(_std(settings).grades())
    prem = costs.grade_premium(prices, walls.fc.to_numpy(float)[:, None], grades[None, :], volume[:, None])
    table = pd.DataFrame(prem, columns=grades).assign(pour=walls.pour.to_numpy()).groupby("pour").sum()
    return table.stack().rename("premium").rename_axis(["pour", "grade"]).reset_index()


# ---------------------------------------------------------------------------------------------
# evaluation


CHUNK_ROWS = 60_000  # action rows the checks of the search take at once (`_utilisation`)


class ActionRows:
    """Action rows found by position: each (storey, pier) of `actions` is factorised once, its
    rows listed in order, so the rows of a batch of variants are gathered by integer indexing.
    The search asks for them in every screen and confirmation; joining the whole actions table
    on text keys each time cost more than the checks of a small batch (the L tower: 360 000
    action rows, a 0.2 s join to confirm 24 variants). `for_variants` gives the rows the join
    `actions.merge(meta, on=[storey, pier_id])` gives, in its order (tests/test_advice_speed.py)."""

    def __init__(self, actions: pd.DataFrame, cheap_first: bool = False, codes: tuple | None = None) -> None:
        self.frame = actions.reset_index(drop=True)
        self.cheap_first = cheap_first  # `_worst`: closed-form checks first (the search only)
        # (storey, pier) as one integer from each column's codes (no tuple per row); `codes`:
        # `pier_codes(actions)`, where the caller has them (the search: `_distinct_actions`')
        storey, self.storeys, pier, self.piers = pier_codes(self.frame) if codes is None else codes
        self.storey_codes = storey
        self.coded_keys = not ((storey < 0).any() or (pier < 0).any())  # no NaN storey or pier
        codes, self.keys = pd.factorize(storey.astype(np.int64) * len(self.piers) + pier)
        self.codes = codes  # each row's (storey, pier), numbered in order of appearance
        self.order = np.argsort(codes, kind="stable")  # each key's rows together, in table order
        self.starts = np.concatenate([[0], np.cumsum(np.bincount(codes, minlength=len(self.keys)))])
        # a screen's: flags over the full action rows (`_confirm`'s), those this screen holds
        self.holds: np.ndarray | None = None

    def __len__(self) -> int:
        return len(self.frame)

    @property
    def empty(self) -> bool:
        return self.frame.empty

    @functools.cached_property
    def coded(self) -> pd.DataFrame:
        """`frame` with each storey as its integer code (`code_storeys`): shares every other
        column with `frame`."""
        return self.frame.assign(storey=self.storey_codes)

    def code_storeys(self, storey) -> np.ndarray:
        """Storey names as the integer codes of `coded` (-1: a storey without action rows)."""
        return pd.Index(self.storeys).get_indexer(storey)

    def for_variants(self, meta: pd.DataFrame, coded: bool = False) -> pd.DataFrame:
        """The action rows of each variant's pier, the pier ID replaced by the variant's ID: the
        rows of the join of the actions with `meta` on (storey, pier), action row by action row
        and within one the variants in `meta`'s order (the join's order), same columns. With
        `coded`, the storey as its integer code (`code_storeys`)."""
        return self.frame_of(*self.rows_of(meta), meta, coded)

    def rows_of(self, meta: pd.DataFrame) -> tuple[np.ndarray, np.ndarray]:
        """`for_variants`' rows as positions: each one's action row (in `frame`) and its row
        of `meta`, in the join's order."""
        lo, count = self.spans(meta)
        which = np.repeat(np.arange(len(meta)), count)  # the meta row of each action row taken
        step = np.arange(len(which)) - np.repeat(np.cumsum(count) - count, count)
        row = self.order[np.repeat(lo, count) + step]
        by = np.argsort(row, kind="stable")  # by row, then `which` (ascending as made): a lexsort
        return row[by], which[by]

    def spans(self, meta: pd.DataFrame) -> tuple[np.ndarray, np.ndarray]:
        """Per row of `meta`, where its pier's rows start in `order` and how many there are."""
        storey = pd.Index(self.storeys).get_indexer(meta.storey)
        pier = pd.Index(self.piers).get_indexer(meta.pier_id)
        joint = np.where((storey >= 0) & (pier >= 0), storey.astype(np.int64) * len(self.piers) + pier, -1)
        key = pd.Index(self.keys).get_indexer(joint)
        lo = np.where(key >= 0, self.starts[np.maximum(key, 0)], 0)
        count = np.where(key >= 0, self.starts[np.maximum(key, 0) + 1] - lo, 0)
        return lo, count

    def frame_of(
        self, row: np.ndarray, which: np.ndarray, meta: pd.DataFrame, coded: bool = False
    ) -> pd.DataFrame:
        """The action rows `row` (of `frame`) as the variants `which` (rows of `meta`) take them."""
        out = (self.coded if coded else self.frame).take(row).reset_index(drop=True)
        out = out.drop(columns="pier_id")
        out["pier_id"] = meta.variant.to_numpy()[which]
        return out


def pier_codes(frame: pd.DataFrame) -> tuple[np.ndarray, pd.Index, np.ndarray, pd.Index]:
    """Each row's storey and pier as integer codes (-1: missing) and the names they number, in
    order of appearance (`pd.factorize` of each column): what `ActionRows` and
    `_distinct_actions` key the rows by, worked out once for both."""
    storey, storeys = pd.factorize(frame.storey)
    pier, piers = pd.factorize(frame.pier_id)
    return storey, storeys, pier, piers


# action columns that set no number of a pier check: the engineer's row and its origin (the
# shear table's row order only) and the combination's name (read by the earthquake rules alone,
# for the combinations the Project names: `_distinct_actions` keeps those apart)
ORDER_ONLY = ("row", "origin", "combination")


def _distinct_actions(frame: pd.DataFrame, settings: Settings, codes: tuple | None = None) -> pd.DataFrame:
    """The action rows the search checks: of the rows of one storey and pier equal in every
    other column (every number a check reads), the first; an earthquake combination's rows
    (Project setting) are kept apart by name. The checks work row by row and the search reads
    each variant's largest utilisation over its rows (and which rows govern for the screen),
    so the rows left give every variant the same worst value to the bit: the L tower's 60
    combinations per pier hold 3 distinct sets of (N*, V*, M*), and the confirmations ran the
    N-M solve on all 60.

    Rows are told apart by their (storey, pier) codes and every other kept column's own values
    (floats by their bits: -0.0 from 0.0), checked against the first row of the same hash: a
    row is dropped only where it equals an earlier one exactly, never on a hash alone (a text
    column's missing value equals none, so such rows stay). `codes`: `pier_codes(frame)`, where
    the caller has them."""
    n = len(frame)
    cols = [c for c in frame.columns if c not in (*ORDER_ONLY, "storey", "pier_id")]
    if n < 2:
        return frame
    numeric = [c for c in cols if frame[c].dtype.kind in "fiub"]
    # (storey, pier) as one number, a missing name (code -1) a value of its own
    storey, _, pier, piers = pier_codes(frame) if codes is None else codes
    at = (storey.astype(np.int64) + 1) * (len(piers) + 1) + (pier + 1)
    key = pd.DataFrame({f"c{i}": frame[c].to_numpy() for i, c in enumerate(numeric)})
    key["_pier"] = at
    code, _ = pd.factorize(pd.util.hash_pandas_object(key, index=False).to_numpy())
    if int(code.max()) + 1 == n:  # no two rows alike in their numbers (a varied analysis): all kept
        return frame
    first = np.full(int(code.max()) + 1, n, dtype=np.int64)
    np.minimum.at(first, code, np.arange(n))
    rep = first[code]  # the first row of each hash
    same = (rep != np.arange(n)) & (at[rep] == at)
    for c in numeric:
        values = frame[c].to_numpy()
        if values.dtype.kind == "f":
            values = values.astype(np.float64, copy=False).view(np.int64)
        same &= values[rep] == values
    texts = [frame[c].to_numpy(dtype=object) for c in cols if c not in numeric]
    quake = settings.earthquake
    if quake and "combination" in frame:
        named = frame.combination.astype(str)
        texts.append(named.where(named.isin(quake), "").to_numpy(dtype=object))
    for values in texts:
        same &= values[rep] == values
    return frame[~same] if same.any() else frame


def _utilisation(
    rows: pd.DataFrame,
    meta: pd.DataFrame,
    actions: ActionRows,
    settings: Settings,
    only_axial: bool = False,
) -> pd.Series:
    """Worst utilisation of the variant rows `rows` (pier ID = variant) of `meta`, by variant ID
    (of the axial checks alone with `only_axial`), under `actions` of their piers.

    The checks see each storey as an integer code, in the variant rows and their action rows
    alike: they read the storey only as a key, with the pier ID, which is the variant's own
    (unique over storeys), so the same rows meet; text keys cost a fifth of the checks' time in
    their joins and groupings (tests/test_advice_speed5.py)."""
    return _utilisation_at(rows, meta, actions, settings, only_axial, *actions.rows_of(meta))


def _utilisation_at(
    rows: pd.DataFrame,
    meta: pd.DataFrame,
    actions: ActionRows,
    settings: Settings,
    only_axial: bool,
    row: np.ndarray,
    which: np.ndarray,
) -> pd.Series:
    """`_utilisation` under the action rows `row` of `actions.frame` as the variants `which`
    (rows of `meta`) take them: some of `actions.rows_of(meta)`, in its order (`_confirm`
    leaves the screen's out)."""
    rows = rows.assign(storey=actions.code_storeys(rows.storey))
    if len(row) <= CHUNK_ROWS:
        acts = actions.frame_of(row, which, meta, coded=True)
        return _worst(rows, acts, settings, only_axial, actions.cheap_first)
    # in pieces of about CHUNK_ROWS action rows, whole variants each: every check is row by
    # row (a variant's numbers do not depend on the others in its batch), and the pieces bound
    # the checks' working arrays (the L tower confirms 3 000 variants on 60 combinations at once).
    # Each piece's action rows taken alone (its rows of the join, in order), not the whole
    # join's table made and then searched by variant ID per piece
    piece = np.cumsum(np.bincount(which, minlength=len(meta))) // CHUNK_ROWS
    parts = []
    for k in np.unique(piece):
        at = np.flatnonzero(piece == k)
        mine = np.flatnonzero(piece[which] == k)
        acts = actions.frame_of(row[mine], which[mine], meta, coded=True)
        parts.append(_worst(rows.iloc[at], acts, settings, only_axial, actions.cheap_first))
    return pd.concat(parts).sort_index()


def _confirm(
    rows_of, first: pd.DataFrame, screened: np.ndarray, actions, settings, screen: ActionRows | None = None
) -> pd.Series:
    """Full utilisation of the variants `first` that passed the screen: shear governs at the
    largest |V*| and detailing at the largest N*, both in the screen; axial + bending and
    Cl 11.5 need every combination. A variant whose screen held every action row of its pier
    (`screen`'s rows are some of `actions`': as many are all of them) is not run again: the
    screen ran axial + bending on those rows (it passed the closed-form checks), so its value
    is the full one (the L tower: each pier's distinct rows, `_distinct_actions`, are few
    enough for the screen to take them all).

    Nor are the screen's rows run again where it says which of `actions`' rows it holds
    (`screen.holds`, the search's): a variant confirmed passed the screen, so the axial checks
    ran on its screen rows there (they follow the closed-form checks, which it passed) and
    `screened` is at least their largest; the largest of it and the other rows' is the
    largest of it and every row's, the same value (the varied L tower: 74 000 of the
    confirmations' 492 000 action rows; tests/test_advice_speed8.py)."""
    again = np.ones(len(first), dtype=bool)
    if screen is not None:
        count = actions.spans(first)[1]
        again = (screen.spans(first)[1] != count) | (count == 0)
    skip = None
    if screen is not None and screen.holds is not None and len(screen.holds) == len(actions):
        skip = screen.holds

    def axial_of(part: pd.DataFrame) -> np.ndarray:
        if skip is None:
            got = _utilisation(rows_of(part), part, actions, settings, only_axial=True)
        else:  # every row of the variants' piers but the screen's
            row, which = actions.rows_of(part)
            keep = ~skip[row]
            got = _utilisation_at(rows_of(part), part, actions, settings, True, row[keep], which[keep])
        return part.variant.map(got).to_numpy(float)

    axial = np.full(len(first), np.nan)
    if again.all():
        axial = axial_of(first)
    elif again.any():
        axial[again] = axial_of(first[again])
    full = pd.Series(np.fmax(screened, axial), index=first.variant.to_numpy())
    unseen = first[np.isnan(screened)]  # no screen rows (not expected): every check
    if len(unseen):
        full.update(_utilisation(rows_of(unseen), unseen, actions, settings))
    return full


def _every(rows_of, meta: pd.DataFrame, actions, screen, settings) -> pd.Series:
    """Utilisation of every variant in `meta`, by variant (screened, then confirmed)."""
    if meta.empty:
        return pd.Series(dtype=float)
    screened = meta.variant.map(_utilisation(rows_of(meta), meta, screen, settings)).to_numpy(float)
    hopeful = ~(screened > 1.0)
    util = pd.Series(screened, index=meta.variant.to_numpy())
    if hopeful.any():
        util.update(_confirm(rows_of, meta[hopeful], screened[hopeful], actions, settings, screen))
    return util


def _probed(rows_of, meta: pd.DataFrame, group: list[str], actions, screen, settings, keep_all=False):
    """The options of `meta` in groups (a pier's kind of change, or pair of kinds) whose most
    expensive option, the most of that change, passes every check: a group whose strongest
    option fails holds no passing option (the module docstring states the assumption). With
    `keep_all`, every option, marked `_hope`."""
    if meta.empty:
        return meta.assign(_hope=True) if keep_all else meta
    order, of = _group_order(meta, group)
    if order is None:  # a key missing somewhere: pandas' sort, merge and NaN rules
        meta = meta.sort_values([*group, "added_cost"], kind="stable")
        probe = meta.groupby(group, sort=False).tail(1)
        hope = probe[probe.variant.map(_every(rows_of, probe, actions, screen, settings)).le(1.0).to_numpy()]
        marked = meta.merge(hope[group].assign(_hope=True), on=group, how="left")
        marked["_hope"] = marked._hope.eq(True)
        return marked if keep_all else marked[marked._hope].drop(columns="_hope")
    meta = meta.iloc[order]
    probe = meta.iloc[np.flatnonzero(np.append(of[1:] != of[:-1], True))]  # each group's last
    passes = probe.variant.map(_every(rows_of, probe, actions, screen, settings)).le(1.0).to_numpy()
    marked = meta.reset_index(drop=True)  # the rows and order of the merge of the sorted table
    marked["_hope"] = passes[of]
    return marked if keep_all else marked[marked._hope].drop(columns="_hope")


def _group_order(meta: pd.DataFrame, group: list[str]) -> tuple[np.ndarray | None, np.ndarray]:
    """The stable sort of `meta` by (*group, added_cost), NaN costs last (`sort_values`'s order),
    as positions, and each sorted row's group number: by integer codes of the keys, each
    numbered in sorted order of its values, instead of sorting the text keys (the L tower's
    380 000 options by storey, pier and kind). None where a key is missing (NaN)."""
    codes = [pd.factorize(meta[c], sort=True)[0] for c in group]
    if any((c < 0).any() for c in codes):
        return None, np.zeros(0, dtype=np.int64)
    # the keys' codes as one number in mixed radix (the same order as sorting them in turn),
    # so one sort key and one comparison per row instead of one per column
    key, span = np.zeros(len(meta), dtype=np.int64), 1
    for c in codes:
        size = int(c.max()) + 1 if len(c) else 1
        span *= size
        key = key * size + c
    if span >= 2**62:  # (not met: a few thousand piers x five kinds) the columns in turn
        order = np.lexsort((meta.added_cost.to_numpy(float), *reversed(codes)))
        new = np.zeros(len(order), dtype=bool)
        for c in codes:
            k = c[order]
            new[1:] |= k[1:] != k[:-1]
    else:
        order = np.lexsort((meta.added_cost.to_numpy(float), key))
        k = key[order]
        new = np.append(False, k[1:] != k[:-1])
    if len(new):
        new[0] = True
    return order, np.cumsum(new) - 1


ROUND = 6  # options per group tried in the first round, cheapest first; doubling after


def _rounds(rows_of, meta: pd.DataFrame, group: list[str], actions, screen, settings) -> pd.Series:
    """Utilisation by variant of the options `meta` checked, in rounds cheapest first per group:
    a group stops at the first round that holds a passing option. Every cheaper option was
    tried in an earlier round and failed, so the cheapest pass is the one an exhaustive search
    gives, at a fraction of its work. Variants not checked are absent.

    The groups are numbered once (`_group_order`: the stable sort by group and cost) and the
    rounds keep them as flags by number: the search's joins of open, settled and done groups on
    text keys (a merge each, per round and per confirmation) were a fifth of its time outside
    the checks. Where a key is missing, the joins on keys (`_rounds_by_keys`)."""
    if meta.empty:
        return pd.Series(dtype=float)
    order, of = _group_order(meta, group)
    if order is None:
        return _rounds_by_keys(rows_of, meta, group, actions, screen, settings)
    if not np.array_equal(order, np.arange(len(order))):  # the search hands them sorted already
        meta = meta.iloc[order]
    meta = meta.reset_index(drop=True)
    starts = np.flatnonzero(np.append(True, of[1:] != of[:-1]))
    rank = np.arange(len(of)) - starts[of]  # each option's place in its group, cheapest first
    is_open = np.ones(len(starts), dtype=bool)
    variant_all = meta.variant.to_numpy()
    out = []
    start, size, last = 0, ROUND, int(rank.max())
    while start <= last and is_open.any():
        at = np.flatnonzero((rank >= start) & (rank < start + size) & is_open[of])
        start, size = start + size, 2 * size  # later rounds larger: the piers still open need more
        if not len(at):
            break
        batch, bg, variant = meta.iloc[at].reset_index(drop=True), of[at], variant_all[at]
        # the few combinations that govern now first: an option failing those fails (the worst
        # over some combinations is at most the worst over all). Of those passing, the cheapest
        # per group is confirmed on every combination; if it fails there, the next.
        screened = batch.variant.map(_utilisation(rows_of(batch), batch, screen, settings)).to_numpy(float)
        util = np.where(screened > 1.0, screened, np.nan)  # a screen pass proves nothing yet
        hopeful = np.flatnonzero(np.isnan(util))
        while len(hopeful):
            _, head = np.unique(bg[hopeful], return_index=True)
            first = hopeful[np.sort(head)]  # each group's first hopeful option, in batch order
            full = _confirm(rows_of, batch.iloc[first], screened[first], actions, settings, screen)
            util[first] = full.reindex(variant[first]).to_numpy(float)
            settled = np.zeros(len(is_open), dtype=bool)
            settled[bg[first][util[first] <= 1.0]] = True
            tried = np.zeros(len(batch), dtype=bool)
            tried[first] = True
            hopeful = hopeful[~tried[hopeful] & ~settled[bg[hopeful]]]
        out.append(pd.Series(util, index=variant).dropna())
        is_open[bg[util <= 1.0]] = False
    return pd.concat(out) if out else pd.Series(dtype=float)


def _rounds_by_keys(rows_of, meta: pd.DataFrame, group: list[str], actions, screen, settings) -> pd.Series:
    """`_rounds` by joins on the group's keys, pandas' rules for a missing key (NaN): the rounds
    as they were written first, kept for that case and as the tests' reference."""
    if meta.empty:
        return pd.Series(dtype=float)
    meta = meta.sort_values([*group, "added_cost"], kind="stable")
    meta = meta.assign(order=meta.groupby(group, sort=False).cumcount().to_numpy())
    out = []
    open_groups = meta[group].drop_duplicates()
    start, size, last = 0, ROUND, int(meta.order.max())
    while start <= last and len(open_groups):
        batch = meta[(meta.order >= start) & (meta.order < start + size)].merge(open_groups, on=group)
        start, size = start + size, 2 * size  # later rounds larger: the piers still open need more
        if batch.empty:
            break
        # the few combinations that govern now first: an option failing those fails (the worst
        # over some combinations is at most the worst over all). Of those passing, the cheapest
        # per group is confirmed on every combination; if it fails there, the next.
        screened = batch.variant.map(_utilisation(rows_of(batch), batch, screen, settings))
        by_variant = pd.Series(screened.to_numpy(), index=batch.variant.to_numpy())
        util = screened.where(screened > 1.0)  # a screen pass proves nothing yet
        hopeful = batch[util.isna().to_numpy()]
        while len(hopeful):
            first = hopeful.groupby(group, sort=False).head(1)
            # the screen's value by variant ID (`screened` is indexed by the batch's rows)
            full = _confirm(
                rows_of, first, first.variant.map(by_variant).to_numpy(float), actions, settings, screen
            )
            util = util.where(~batch.variant.isin(full.index), batch.variant.map(full))
            settled = first[first.variant.map(full).le(1.0).to_numpy()][group]
            hopeful = hopeful[~hopeful.variant.isin(first.variant)]
            hopeful = hopeful.merge(settled, on=group, how="left", indicator=True)
            hopeful = hopeful[hopeful._merge == "left_only"].drop(columns="_merge")
        out.append(pd.Series(util.to_numpy(), index=batch.variant.to_numpy()).dropna())
        done = batch.assign(util=util.to_numpy())
        done = done[done.util <= 1.0][group].drop_duplicates()
        open_groups = open_groups.merge(done, on=group, how="left", indicator=True)
        open_groups = open_groups[open_groups._merge == "left_only"].drop(columns="_merge")
    return pd.concat(out) if out else pd.Series(dtype=float)


def _pairs(meta: pd.DataFrame, premiums: pd.DataFrame, first_id: int, settings: Settings) -> pd.DataFrame:
    """Every pair of options of the kinds in PAIRS for the piers in `meta` (their single
    options, offered alone or not), priced exactly: the pier's cost with both changes, and for
    a grade the whole pour's premium (less the pier's own part, already in the pier's cost).
    Variant IDs from `first_id`; `a`, `b` the two single variants (words: `pair_words`)."""
    prices = costs.parse_concrete_prices(settings.concrete_prices)
    cols = ["storey", "pier_id", "bi", "variant", "offered", "layers", "pour", *PRICED_ALL, *BASE]
    parts = []
    for k, (ka, kb) in enumerate(PAIRS):
        a = meta.loc[meta.kind == ka, cols]
        b = meta.loc[meta.kind == kb, ["bi", "variant", "offered", "layers", *PRICED_ALL]]
        if a.empty or b.empty:
            continue
        m = a.merge(b, on="bi", suffixes=("_a", "_b"))
        if (ka, kb) == (H_KIND, V_KIND):
            ok = m.layers_a.to_numpy() == m.layers_b.to_numpy()  # both directions in the same layers
        else:
            ok = m.offered_a.to_numpy() & m.offered_b.to_numpy()
        m = m[ok]
        if m.empty:
            continue
        field = {f: m[f"{f}_b" if f in PRICED[kb] else f"{f}_a"].to_numpy(float) for f in PRICED_ALL}
        cost = _cost_total(
            m.Lw,
            field["tw"],
            field["rho_v"],
            field["rho_h"],
            field["fc"],
            field["zarea"],
            m.Hc,
            prices,
            settings,
        ) - m.base_cost.to_numpy(float)
        if ka == GRADE_KIND:
            pour = m[["pour", "fc_a"]].merge(
                premiums, left_on=["pour", "fc_a"], right_on=["pour", "grade"], how="left"
            )
            own = costs.grade_premium(prices, m.fc0, m.fc_a, m.Lw * m.tw0 * m.Hc / 1e9)
            cost = cost + pour.premium.to_numpy(float) - own
        parts.append(
            pd.DataFrame(
                dict(
                    storey=m.storey.to_numpy(),
                    pier_id=m.pier_id.to_numpy(),
                    bi=m.bi.to_numpy(),
                    pair=k,
                    a=m.variant_a.to_numpy(),
                    b=m.variant_b.to_numpy(),
                    added_cost=cost,
                )
            )
        )
    cols = ["storey", "pier_id", "bi", "pair", "a", "b", "added_cost"]
    out = pd.concat(parts, ignore_index=True) if parts else pd.DataFrame(columns=cols)
    out["kind"] = np.asarray([f"{ka} + {kb}" for ka, kb in PAIRS], dtype=object)[out.pair.to_numpy(int)]
    out["kb"] = np.asarray([kb for _, kb in PAIRS], dtype=object)[out.pair.to_numpy(int)]
    out["variant"] = np.arange(first_id, first_id + len(out), dtype=np.int64)
    return out


PAIR_ARRAYS = ("pair", "a", "b", "added_cost")


def _pair_runs(
    meta: pd.DataFrame, premiums: pd.DataFrame, settings: Settings
) -> list[tuple[int, np.ndarray, np.ndarray, np.ndarray]]:
    """The pairs `_pair_arrays` lists, in its order, as runs of about PAIR_CHUNK pairs: (k, a,
    b, added_cost), k the index in PAIRS, a and b positions in `meta` (32-bit). The search keeps
    them so (`_probed_pairs`): the L tower's 4.4 M pairs never in arrays of every pair, which
    cost more in page faults and copies than their pricing."""
    prices = costs.parse_concrete_prices(settings.concrete_prices)
    kind, bi = meta.kind.to_numpy(), meta.bi.to_numpy()
    col = {f: meta[f].to_numpy(float) for f in (*PRICED_ALL, *BASE)}
    # what each option row alone sets, worked out once per row instead of once per pair: the
    # concrete's price (its grade), the end-zone bars' cost (its zones) and a grade's premium
    # over the pier's own concrete; the same functions of the same numbers
    col["_concrete"] = costs.concrete_price(prices, col["fc"])
    col["_zone"] = costs.bars_per_metre_height(col["zarea"], settings.steel_price)
    col["_own"] = costs.grade_premium(
        prices, col["fc0"], col["fc"], col["Lw"] * col["tw0"] * col["Hc"] / 1e9
    )
    offered, layers = meta.offered.to_numpy(bool), meta.layers.to_numpy(float)
    premium = np.full(len(meta), np.nan)
    grade = np.flatnonzero(kind == GRADE_KIND)
    if len(grade):
        at = pd.MultiIndex.from_arrays([premiums.pour, premiums.grade.astype(float)]).get_indexer(
            pd.MultiIndex.from_arrays([meta.pour.to_numpy()[grade], col["fc"][grade]])
        )
        premium[grade] = np.where(at >= 0, premiums.premium.to_numpy(float)[np.maximum(at, 0)], np.nan)
    runs: list[tuple[int, np.ndarray, np.ndarray, np.ndarray]] = []
    code, kinds = pd.factorize(kind)  # each row's kind as a number: 16 tests of text were 50 ms
    named = {k: i for i, k in enumerate(kinds)}
    for k, (ka, kb) in enumerate(PAIRS):
        ia, ib = np.flatnonzero(code == named.get(ka, -2)), np.flatnonzero(code == named.get(kb, -2))
        if not len(ia) or not len(ib):
            continue
        # the join on the pier (bi): each a in order, with its pier's b options in their order
        ob = ib[np.argsort(bi[ib], kind="stable")]
        lo = np.searchsorted(bi[ob], bi[ia], "left")
        count = np.searchsorted(bi[ob], bi[ia], "right") - lo
        # a run of the a options at a time, about PAIR_CHUNK pairs each: the same operations
        # on each pair's own numbers (so the same bits), on arrays that stay in the cache
        # instead of a score of 10 MB arrays per kind (page faults were half of this step)
        ends = np.cumsum(count)
        cuts = np.searchsorted(ends, np.arange(PAIR_CHUNK, int(ends[-1]) if len(ends) else 0, PAIR_CHUNK))
        for run in np.split(np.arange(len(ia)), np.unique(cuts[cuts < len(ia)] + 1)):
            at = (ia[run], ob, lo[run], count[run])
            got = _pair_run(k, *at, col, premium, offered, layers, prices, settings)
            if got is not None:
                runs.append((k, *got))
    return runs


PAIR_CHUNK = 1 << 16  # pairs priced at once (`_pair_arrays`)


def _pair_run(
    k, ia, ob, lo, count, col, premium, offered, layers, prices, settings: Settings
) -> tuple[np.ndarray, np.ndarray, np.ndarray] | None:
    """The pairs of kind PAIRS[k] of the a options `ia` (each with its pier's b options `ob`
    from `lo`, `count` of them), filtered and priced as `_pair_arrays` states: a, b (32-bit)
    and added cost; None where none is left."""
    ka, kb = PAIRS[k]
    a = np.repeat(ia, count)
    b = ob[np.repeat(lo, count) + np.arange(len(a)) - np.repeat(np.cumsum(count) - count, count)]
    if (ka, kb) == (H_KIND, V_KIND):
        ok = layers[a] == layers[b]  # both directions in the same layers
    else:
        ok = offered[a] & offered[b]
    a, b = a[ok], b[ok]
    if not len(a):
        return None
    # each priced field from the option that sets it (the concrete's price with the grade,
    # the zones' cost with the zones)
    side = {f: b if f in PRICED[kb] else a for f in PRICED_ALL}
    cost = _cost_priced(
        col["Lw"][a],
        col["tw"][side["tw"]],
        col["rho_v"][side["rho_v"]],
        col["rho_h"][side["rho_h"]],
        col["_concrete"][side["fc"]],
        col["_zone"][side["zarea"]],
        col["Hc"][a],
        settings,
    ) - col["base_cost"][a]
    if ka == GRADE_KIND:
        cost = cost + premium[a] - col["_own"][a]
    # narrow types: the L tower holds 4.4 M pairs at once (positions fit 32 bits)
    return a.astype(np.int32), b.astype(np.int32), cost


def _pair_frame(
    meta: pd.DataFrame, arrays: dict[str, np.ndarray], rows: np.ndarray, variant: np.ndarray
) -> pd.DataFrame:
    """The rows `rows` of `_pair_arrays` as the table `_pairs` makes (variant IDs given)."""
    a, b, k = arrays["a"][rows], arrays["b"][rows], arrays["pair"][rows]
    return pd.DataFrame(
        dict(
            storey=meta.storey.to_numpy()[a],
            pier_id=meta.pier_id.to_numpy()[a],
            bi=meta.bi.to_numpy()[a],
            pair=k.astype(np.int64),
            a=meta.variant.to_numpy()[a],
            b=meta.variant.to_numpy()[b],
            added_cost=arrays["added_cost"][rows],
            kind=np.asarray([f"{ka} + {kb}" for ka, kb in PAIRS], dtype=object)[k],
            kb=np.asarray([kb for _, kb in PAIRS], dtype=object)[k],
            variant=variant,
        )
    )


def _probed_pairs(
    meta: pd.DataFrame, premiums: pd.DataFrame, first_id: int, settings: Settings, rows_of, actions, screen
) -> pd.DataFrame:
    """`_probed(rows_of, _pairs(meta, premiums, first_id, settings), ["bi", "pair"], ...)`, the
    same table (rows, order, index, variant IDs), with only the probes and the pairs of the
    groups whose probe passes made into a table: the order is the same stable sort, of arrays.
    The pairs stay in their runs (`_pair_runs`): the groups, probes and members are found run by
    run (`_run_groups`, `_run_members`), the same as `_pair_groups` and `_sorted_members` find
    them in arrays of every pair (tests/test_advice_speed5.py)."""
    runs = _pair_runs(meta, premiums, settings)
    if not runs:
        pm = _pairs(meta, premiums, first_id, settings)
        return _probed(rows_of, pm, ["bi", "pair"], actions, screen, settings)
    bi = meta.bi.to_numpy()
    group_of, count, last, starts = _run_groups(runs, bi)
    probe = _pair_frame(meta, _run_take(runs, starts, last), np.arange(len(last)), first_id + last)
    passes = probe.variant.map(_every(rows_of, probe, actions, screen, settings)).le(1.0).to_numpy()
    rows, at, arrays = _run_members(runs, starts, bi, group_of, np.flatnonzero(passes), count)
    out = _pair_frame(meta, arrays, np.arange(len(rows)), first_id + rows.astype(np.int64))
    out.index = at
    return out


def _run_keys(k: int, a: np.ndarray, bi: np.ndarray) -> np.ndarray:
    """The group key (pier `bi` x pair kind k) of each pair of a run, as `_pair_groups` forms it."""
    return bi[a].astype(np.int64) * len(PAIRS) + k


def _run_groups(
    runs: list, bi: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """`_pair_groups` over the pairs in runs: each key's group number (groups in (bi, pair)
    order), each group's size and probe (as a position among all pairs), and each run's first
    position. Two passes over the runs: sizes, NaNs and largest costs, then the latest pair at
    its group's largest cost (or its latest NaN), with the same ufuncs on the same numbers."""
    nk = (int(bi.max()) + 1) * len(PAIRS) if len(bi) else 0
    size, nans, top = np.zeros(nk, np.int64), np.zeros(nk, np.int64), np.full(nk, -np.inf)
    starts = np.cumsum([0] + [len(a) for _, a, _, _ in runs[:-1]]).astype(np.int64)
    for k, a, _, cost in runs:
        key = _run_keys(k, a, bi)
        size += np.bincount(key, minlength=nk)
        nan = np.isnan(cost)
        if nan.any():
            nans += np.bincount(key[nan], minlength=nk)
        _fold_max(top, key, cost)  # each group's largest cost (NaN left out: nans says)
    any_nan = nans > 0
    last = np.full(nk, -1, dtype=np.int64)
    for (k, a, _, cost), s0 in zip(runs, starts.tolist(), strict=True):
        key = _run_keys(k, a, bi)
        hit = np.where(any_nan[key], np.isnan(cost), cost == top[key])
        np.maximum.at(last, key[hit], s0 + np.flatnonzero(hit))  # the latest, as a stable sort
    present = size > 0
    return np.cumsum(present) - 1, size[present], last[present], starts


def _fold_max(top: np.ndarray, key: np.ndarray, cost: np.ndarray) -> None:
    """`np.fmax.at(top, key, cost)` (NaN left out), by segments where the keys come sorted,
    as a run's pairs do (pier by pier): one `fmax.reduceat` and one write per group instead of
    one indexed update per pair. The same largest value (a zero's sign aside, which the probe's
    comparison `cost == top` does not see)."""
    if len(key) and bool((key[1:] >= key[:-1]).all()):
        seg = np.concatenate([[0], np.flatnonzero(key[1:] != key[:-1]) + 1])
        at = key[seg]
        top[at] = np.fmax(top[at], np.fmax.reduceat(cost, seg))
    else:
        np.fmax.at(top, key, cost)


def _run_take(runs: list, starts: np.ndarray, rows: np.ndarray) -> dict[str, np.ndarray]:
    """The pairs at positions `rows` (among all, in `_pair_arrays`' order) of the runs, as the
    arrays `_pair_arrays` gives, in the order of `rows`."""
    run = np.searchsorted(starts, rows, "right") - 1
    out = {
        "pair": np.zeros(len(rows), np.int8),
        "a": np.zeros(len(rows), np.int32),
        "b": np.zeros(len(rows), np.int32),
        "added_cost": np.zeros(len(rows), float),
    }
    for r in np.unique(run).tolist():
        at = np.flatnonzero(run == r)
        k, a, b, cost = runs[r]
        local = rows[at] - starts[r]
        out["pair"][at], out["a"][at], out["b"][at] = k, a[local], b[local]
        out["added_cost"][at] = cost[local]
    return out


def _run_members(
    runs: list,
    starts: np.ndarray,
    bi: np.ndarray,
    group_of: np.ndarray,
    chosen: np.ndarray,
    count: np.ndarray,
) -> tuple[np.ndarray, np.ndarray, dict[str, np.ndarray]]:
    """`_sorted_members` over the pairs in runs: the pairs of the groups `chosen` in the stable
    sort by (group, cost), NaN last, their positions among all pairs, each one's position in
    that sort of every pair, and the pairs themselves (`_pair_arrays`' arrays, in that order)."""
    take = np.zeros(len(count), dtype=bool)
    take[chosen] = True
    got: dict[str, list[np.ndarray]] = {key: [] for key in ("rows", "group", *PAIR_ARRAYS)}
    for (k, a, b, cost), s0 in zip(runs, starts.tolist(), strict=True):
        g = group_of[_run_keys(k, a, bi)]
        sel = np.flatnonzero(take[g])
        if len(sel):
            got["rows"].append(s0 + sel)
            got["group"].append(g[sel])
            got["pair"].append(np.full(len(sel), k, dtype=np.int8))
            got["a"].append(a[sel])
            got["b"].append(b[sel])
            got["added_cost"].append(cost[sel])
    if not got["rows"]:
        empty = _run_take(runs, starts, np.zeros(0, dtype=np.int64))
        return np.zeros(0, dtype=np.int32), np.zeros(0, dtype=np.int64), empty
    cat = {key: np.concatenate(v) for key, v in got.items()}
    order = np.lexsort((cat["added_cost"], cat["group"]))
    g = cat["group"][order]
    first = np.concatenate([[0], np.flatnonzero(g[1:] != g[:-1]) + 1])
    rank = np.arange(len(order)) - np.repeat(first, np.diff(np.append(first, len(order))))
    offset = np.concatenate([[0], np.cumsum(count)[:-1]])
    arrays = {key: cat[key][order] for key in ("pair", "a", "b", "added_cost")}
    return cat["rows"][order].astype(np.int32), offset[g] + rank, arrays


def pair_words(pairs: pd.DataFrame, meta: pd.DataFrame) -> list[str]:
    """The two options of each pair in words (a grade named with its pour). The single options'
    fields are read by position (a label lookup of two rows per pair cost most of this)."""
    at = pd.Index(meta.variant.to_numpy()).get_indexer
    ia, ib = at(pairs.a.to_numpy()), at(pairs.b.to_numpy())
    if ((ia < 0) | (ib < 0)).any():
        raise KeyError("a pair names a variant that is not among the single options")
    option, kind, pour = (meta[c].to_numpy() for c in ("option", "kind", "pour"))
    first = [
        f"{option[a]} for the pour ({pour[a]})" if kind[a] == GRADE_KIND else option[a] for a in ia.tolist()
    ]
    return [f"{x}; {option[b]}" for x, b in zip(first, ib.tolist(), strict=True)]


PRICED_ALL = ("fc", "tw", "rho_v", "rho_h", "zarea")
BASE = ("Lw", "Hc", "fc0", "tw0", "base_cost")


def _pair_rows(var: pd.DataFrame):
    """The variant rows of pairs: the first change's row with the second's fields over it."""

    def rows_of(m: pd.DataFrame) -> pd.DataFrame:
        rows = var.iloc[m.a.to_numpy()].reset_index(drop=True)
        bsel = m.b.to_numpy()
        for kb in m.kb.unique():
            on = (m.kb == kb).to_numpy()
            for f in OWNS[kb]:
                col = rows[f].to_numpy().copy()
                col[on] = var[f].to_numpy()[bsel[on]]
                rows[f] = col
        rows["pier_id"] = m.variant.to_numpy()
        return rows

    return rows_of


def evaluate_options(
    piers: pd.DataFrame, actions: pd.DataFrame, targets: pd.DataFrame, settings: Settings, pairs: bool = False
) -> pd.DataFrame:
    """Every single option for every target (storey, pier_id), or with `pairs` every pair of
    options: worst utilisation and added cost (all run through the checks: the exhaustive search
    `advise` must agree with). Singles carry `offered` (may stand alone); grades are per pier
    and priced for the pier alone here (the pour is `advise`'s)."""
    var, meta = _candidates(piers, targets, settings)
    screen = ActionRows(_screening_actions(actions, targets, earthquake=settings.earthquake))
    actions = ActionRows(actions)

    def single_rows(m):
        return var.iloc[m.variant.to_numpy()]

    if not pairs:
        meta["util"] = meta.variant.map(_every(single_rows, meta, actions, screen, settings)).astype(float)
        return meta
    meta["pour"], _ = pour_keys(meta.assign(**_pier_cols(piers, meta)), piers, settings)
    pm = _pairs(meta, pour_premiums(piers, settings), len(var), settings)
    pm["util"] = pm.variant.map(_every(_pair_rows(var), pm, actions, screen, settings)).astype(float)
    pm["option"] = pair_words(pm, meta)
    return pm


def _ranked(rows: pd.DataFrame, one: pd.DataFrame, of: np.ndarray, group: list[str]) -> list[str]:
    """The keys to sort and group `rows` by in place of `group` (storey, pier ID, kind): the
    storey and pier ID as their ranks among `one`'s (`_storey`, `_pier`, added to `rows`; `of`:
    each row's pier in `one`), the kind as its rank among the rows' (`_kind`), numbered in
    sorted order as `pd.factorize(sort=True)` numbers the text, so `_group_order` sorts the
    same and joins, groups and de-duplications by them find the same rows, hashing integers
    rather than 370 000 strings a time. `group` itself where a storey or pier ID is missing, a
    missing kind kept as text (pandas' rules for NaN keys)."""
    storey = pd.factorize(one.storey, sort=True)[0]
    pier = pd.factorize(one.pier_id, sort=True)[0]
    if (storey < 0).any() or (pier < 0).any() or group[:2] != ["storey", "pier_id"]:
        return group
    rows["_storey"], rows["_pier"] = storey[of], pier[of]
    by = ["_storey", "_pier"]
    for c in group[2:]:  # the rest (the kind) ranked among the rows once, where none is missing
        code = pd.factorize(rows[c], sort=True)[0]
        if (code < 0).any():
            by.append(c)
        else:
            rows[f"_{c}"] = code
            by.append(f"_{c}")
    return by


def _one_row_per_pier(meta: pd.DataFrame) -> tuple[pd.DataFrame, np.ndarray]:
    """A row of each pier (`bi`: its storey and pier ID are the same on every one of its rows)
    and each row's pier among them, so what depends on the pier alone is worked out a few
    thousand times, not for the L tower's 380 000 option rows (joins on text keys each)."""
    bi = meta.bi.to_numpy()
    rep = np.full(int(bi.max()) + 1 if len(bi) else 0, -1, dtype=np.int64)
    rep[bi] = np.arange(len(bi))
    present = rep >= 0
    return meta.iloc[rep[present]], (np.cumsum(present) - 1)[bi]


def _pier_cols(piers: pd.DataFrame, meta: pd.DataFrame) -> dict[str, np.ndarray]:
    """The pier columns a pour needs, for the rows of `meta`."""
    p = meta[["storey", "pier_id"]].merge(
        piers[["storey", "pier_id", "storey_index", "core", "wall_id"]], on=["storey", "pier_id"], how="left"
    )
    return {k: p[k].to_numpy() for k in ("storey_index", "core", "wall_id")}


# ---------------------------------------------------------------------------------------------
# the search


def building_ns(settings: Settings, piers: pd.DataFrame) -> Settings:
    """The settings with ACI 318-19 ns (18.10.3.1.3, the storeys above the critical section)
    fixed at the building's own where the Project setting is blank: the design check takes the
    storeys up to the highest wall of the whole pier table (`special_walls.check_special_walls`),
    while the search checks batches of variants whose highest storey is the batch's own, which
    gave a smaller ns, a smaller omega_v and an amplified shear below the design check's
    (unconservative, and dependent on which variants shared a batch)."""
    if settings.aci_storeys_above is not None or piers.empty:
        return settings
    return settings.model_copy(update={"aci_storeys_above": float(int(piers.storey_index.max()) + 1)})


def advise(
    piers: pd.DataFrame, actions: pd.DataFrame, summary: pd.DataFrame, settings: Settings
) -> pd.DataFrame:
    """The advice table: per failing storey x pier one row per kind of pier change (its cheapest
    passing option or why there is none), a row with the cheapest passing pair of changes where
    no single change passes, and one row per pour holding a failing pier (the cheapest grade
    that makes every failing pier of the pour pass). Columns ADVICE_KEYS (+ scope: pier/pour)."""
    failing = summary[summary.status == "FAIL"][["storey", "pier_id"]]
    if failing.empty:
        return pd.DataFrame(columns=[*ADVICE_KEYS, "scope"])
    settings = building_ns(settings, piers)
    var, meta = _candidates(piers, failing, settings)
    one, of = _one_row_per_pier(meta)  # pour and flags worked out per pier, not per option row
    pours_of = pour_keys(one.assign(**_pier_cols(piers, one)), piers, settings)[0]
    meta["pour"] = pours_of.take(of).set_axis(meta.index)
    # each pier's distinct action rows (`_distinct_actions`): every variant's worst value the same
    # (the storey and pier codes once for both; the ActionRows' own where rows were dropped)
    codes = pier_codes(actions)
    kept = _distinct_actions(actions, settings, codes)
    actions = ActionRows(kept, cheap_first=True, codes=codes if kept is actions else None)
    screened, where = _screening(actions.frame, failing, actions, earthquake=settings.earthquake)
    screen = ActionRows(screened, cheap_first=True)
    if where is not None:  # which of the full rows the screen holds: `_confirm` leaves them out
        screen.holds = np.zeros(len(actions), dtype=bool)
        screen.holds[where] = True

    def single_rows(m):
        return var.iloc[m.variant.to_numpy()]

    group = ["storey", "pier_id", "kind"]
    # horizontal bars change neither axial + bending nor Cl 11.5: where either fails they cannot
    # help alone, so those options are not run (exactly what running them would show)
    cols = [c for c in ("u_nm", "u_simplified") if c in summary]
    hopeless = (
        summary[(summary[cols] > 1.0).any(axis=1)][["storey", "pier_id"]] if cols else summary.iloc[0:0]
    )
    flagged = (
        one.merge(hopeless.assign(_h=True), on=["storey", "pier_id"], how="left")._h.eq(True).to_numpy()[of]
    )
    # the kinds tested on their few distinct names and spread by code (not 380 000 text tests)
    code, names = pd.factorize(meta.kind.to_numpy())
    names = np.asarray(names, dtype=object)
    single = np.isin(names, PIER_KINDS)[code] & meta.offered.to_numpy()
    skip = single & flagged & (names == H_KIND)[code]
    skipped = meta.loc[skip, group].drop_duplicates()
    alone = meta[single & ~skip]  # one copy of the option rows kept, not two
    by = _ranked(alone, one, of[alone.index.to_numpy()], group)  # the same order, by numbers
    alone = _probed(single_rows, alone, by, actions, screen, settings, keep_all=True)
    util = _rounds(single_rows, alone[alone._hope], by, actions, screen, settings)
    alone["util"] = alone.variant.map(util)  # (a table of its own: `_probed` made it)

    # grades: every grade of every failing pier, then per pour
    grades = meta[(names == GRADE_KIND)[code]]
    grades = grades.assign(util=grades.variant.map(_every(single_rows, grades, actions, screen, settings)))
    premiums = pour_premiums(piers, settings)  # once for the pours, the pairs and the plans
    pours = _pour_rows(piers, failing, summary, grades, settings, premiums)

    # pairs where neither a single change nor the pour's grade fixes the pier
    fixed = alone[alone.util <= 1.0].drop_duplicates(by[:2])[["storey", "pier_id"]]  # by numbers
    fixed_by_pour = pours[pours.util <= 1.0].pour
    by_pour = one[pours_of.isin(fixed_by_pour).to_numpy()][["storey", "pier_id"]]  # per pier, as above
    done = pd.concat([fixed, by_pour]).drop_duplicates()
    left = failing.merge(done, how="left", indicator=True)
    left = left[left._merge == "left_only"][["storey", "pier_id"]]
    pair_rows = pd.DataFrame(columns=[*group, "option", "util", "added_cost"])
    if len(left):
        # the option rows of the piers left, in their order (an inner join on the keys, per pier)
        wanted = one.merge(left.assign(_l=True), on=["storey", "pier_id"], how="left")._l.eq(True).to_numpy()
        sub = meta[wanted[of]].reset_index(drop=True)
        rows_of = _pair_rows(var)
        pm = _probed_pairs(sub, premiums, len(var), settings, rows_of, actions, screen)
        putil = _rounds(rows_of, pm, ["storey", "pier_id"], actions, screen, settings)
        pm["util"] = pm.variant.map(putil)  # (a table of its own: `_probed_pairs` made it)
        best = (
            pm[pm.util <= 1.0].sort_values("added_cost", kind="stable").groupby(["storey", "pier_id"]).head(1)
        )
        best = best.assign(option=pair_words(best, meta))
        pair_rows = left.merge(
            best[[*group, "option", "util", "added_cost"]], on=["storey", "pier_id"], how="left"
        )
        pair_rows["kind"] = pair_rows.kind.astype(object).fillna(PAIR_KIND)
        pair_rows["option"] = pair_rows.option.astype(object).fillna(
            "none: no single change, pour grade or pair of changes in the search range passes every check"
        )
        pours, plans = _pour_plans(
            pours, best, alone, grades, meta, var, actions, screen, piers, settings, premiums
        )
    else:
        plans = {}

    passing = alone[alone.util <= 1.0].sort_values("added_cost", kind="stable")
    best = passing.groupby(by, sort=False).head(1)  # the ranks stand for the keys one to one
    kinds = pd.concat([alone.drop_duplicates(by)[group], skipped], ignore_index=True)
    out = kinds.merge(best[[*group, "option", "util", "added_cost"]], on=group, how="left")
    out["option"] = out.option.fillna(NONE_PASSES)
    out.loc[out.merge(skipped.assign(_s=True), on=group, how="left")._s.eq(True).to_numpy(), "option"] = (
        "none alone: horizontal bars do not change axial + bending or "
        f"{_std(settings).symbols['simplified']}, which fail"
    )
    out = pd.concat([out, pair_rows], ignore_index=True)
    out = out.merge(
        summary[["storey", "pier_id", "check", "util"]].rename(columns={"util": "util_now"}),
        on=["storey", "pier_id"],
    )
    # where axial + bending fails (tension or flexure: the failures end bars are for), a passing
    # end-zone option is offered first; otherwise the cheapest change ranks first
    first = ((out.kind == ZONE_KIND) & (out.check == AXIAL_CHECK)).to_numpy()
    key = out.added_cost.to_numpy(float) - np.where(first, 1e15, 0.0)
    out["rank"] = pd.Series(key, index=out.index).groupby([out.storey, out.pier_id]).rank(method="first")
    out_cols = _pier_cols(piers, out)  # once for the pour names and the order
    names, _ = pour_keys(out.assign(**out_cols), piers, settings)
    out["pour"] = names.to_numpy()
    out["fixes"] = ""
    out["scope"] = "pier"
    # said once, on the pier's first row: looked up for those rows alone
    plan = np.full(len(out), "", dtype=object)
    lead = np.flatnonzero(out["rank"].eq(1).to_numpy()) if plans else np.zeros(0, dtype=np.int64)
    keys = zip(out.storey.to_numpy()[lead].tolist(), out.pier_id.to_numpy()[lead].tolist(), strict=True)
    plan[lead] = [plans.get(k, "") for k in keys]
    out["plan"] = plan.tolist()
    at = out_cols["storey_index"]
    out["_order"] = at
    pours["scope"] = "pour"
    table = pd.concat([pours, out], ignore_index=True)
    table["_kind"] = table.kind.map({k: i for i, k in enumerate((GRADE_KIND, *PIER_KINDS))}).fillna(
        len(PIER_KINDS) + 1
    )
    table["_pour_at"] = table.groupby("pour")._order.transform("min")
    table = table.sort_values(
        ["_pour_at", "pour", "scope", "_order", "pier_id", "rank", "_kind"],
        ascending=[True, True, False, True, True, True, True],
        na_position="last",
        kind="stable",
    )
    table["plan"] = table.plan.fillna("")
    return table[[*ADVICE_KEYS, "scope"]].reset_index(drop=True)


def _pour_rows(
    piers: pd.DataFrame,
    failing: pd.DataFrame,
    summary: pd.DataFrame,
    grades: pd.DataFrame,
    settings: Settings,
    premiums: pd.DataFrame | None = None,
) -> pd.DataFrame:
    """One row per pour holding a failing pier: the cheapest standard grade with which every
    failing pier of the pour passes (a pier already at or above a grade is not changed by it,
    so it must pass as it is: it fails), priced over the whole pour."""
    f = failing.assign(**_pier_cols(piers, failing))
    f["pour"], _ = pour_keys(f, piers, settings)
    f = f.merge(summary[["storey", "pier_id", "check", "util"]], on=["storey", "pier_id"])
    f["_order"] = f.storey_index.to_numpy(float)
    prem = pour_premiums(piers, settings) if premiums is None else premiums
    count = f.groupby("pour").size().rename("n")
    g = grades.drop(columns="pour", errors="ignore").merge(
        f[["storey", "pier_id", "pour"]], on=["storey", "pier_id"]
    )
    ok = (
        g[g.util <= 1.0]
        .groupby(["pour", "fc"])
        .agg(n_ok=("util", "size"), util=("util", "max"))
        .reset_index()
    )
    ok = ok.merge(count.reset_index(), on="pour")
    ok = ok[ok.n_ok == ok.n].merge(prem, left_on=["pour", "fc"], right_on=["pour", "grade"])
    best = ok.sort_values(["premium", "fc"], kind="stable").groupby("pour").head(1).set_index("pour")
    # the pours' members by position in the sorted rows, their fields as arrays and the best
    # grades as columns by pour: a few numbers per pour, not a group frame and label lookups each
    srt = f.sort_values(["_order", "pier_id"])
    code, named = pd.factorize(srt.pour.to_numpy())  # in order of first appearance, as groupby
    order = np.argsort(code, kind="stable")
    ends = np.cumsum(np.bincount(code, minlength=len(named)))
    util, order_at = srt.util.to_numpy(float), srt._order.to_numpy(float)
    check, storey, pier = (srt[c].to_numpy(dtype=object) for c in ("check", "storey", "pier_id"))
    best_of = {c: best[c].to_dict() for c in ("fc", "util", "premium")}
    rows = []
    for g, pour in enumerate(named.tolist()):
        at = order[(ends[g - 1] if g else 0) : ends[g]]
        w = at[int(np.nanargmax(util[at]))]  # the first largest, as idxmax (all NaN: ValueError too)
        names = storey[at].tolist()
        if len({x for x in names if not pd.isna(x)}) == 1:
            listed = ", ".join(str(x) for x in pier[at].tolist())
        else:
            listed = ", ".join(f"{a} {b}" for a, b in zip(names, pier[at].tolist(), strict=True))
        row = dict(
            storey=pour.split(", ", 1)[1],
            pier_id="",
            pour=pour,
            check=check[w],
            util_now=util[w],
            rank=np.nan,
            kind=GRADE_KIND,
            fixes=listed,
            _order=np.fmin.reduce(order_at[at]),
        )
        if pour in best_of["fc"]:
            row |= dict(
                option=f"f'c {best_of['fc'][pour]:g} MPa for every wall of the pour below it ({pour})",
                util=best_of["util"][pour],
                added_cost=best_of["premium"][pour],
            )
        else:
            row |= dict(
                option="none: no standard grade makes every failing pier of the pour pass",
                util=np.nan,
                added_cost=np.nan,
                fixes="",
            )
        rows.append(row)
    return pd.DataFrame(rows)


PLAN_KIND = GRADE_KIND + " + pier changes"
GRADE_PAIRS = {k for k, (ka, _) in enumerate(PAIRS) if ka == GRADE_KIND}


def _pour_plans(
    pours, best, alone, grades, meta, var, actions, screen, piers, settings: Settings, premiums=None
):
    """One buildable plan for a pour that no grade alone fixes but whose piers' pairs name a
    grade: the highest grade those pairs name, G, for the whole pour, and each failing pier
    either passing at G alone, or its pair's other change at G (checked again at G), or its own
    cheapest change. Priced once: the pour's premium at G plus the piers' changes. Returns the
    pour rows (a plan fills a row that had none) and, per pier, its part of the plan in words."""
    plans: dict[tuple[str, str], str] = {}
    if best.empty or not pours.util.isna().any():
        return pours, plans
    prices = costs.parse_concrete_prices(settings.concrete_prices)
    premiums = pour_premiums(piers, settings) if premiums is None else premiums
    prem = premiums.set_index(["pour", "grade"]).premium
    by = meta.set_index("variant")
    key = ["storey", "pier_id"]
    # rows by key as records (a label lookup per pier and grade cost most of this step at
    # building scale); the same rows `.loc` found
    own = {
        (r.storey, r.pier_id): r
        for r in alone[alone.util <= 1.0]
        .sort_values("added_cost", kind="stable")
        .groupby(key)
        .head(1)
        .itertuples(index=False)
    }
    pair = {(r.storey, r.pier_id): r for r in best.itertuples(index=False)}
    # the grade rows by key: their position, and the two fields read as lists (a record per row
    # cost more)
    keys = zip(grades.storey.tolist(), grades.pier_id.tolist(), grades.fc.tolist(), strict=True)
    g = dict(zip(keys, range(len(grades)), strict=True))
    g_util, g_variant = grades.util.tolist(), grades.variant.tolist()
    # each pier's first row (a pier's rows share its bi), then `drop_duplicates` on those few
    _, first = np.unique(meta.bi.to_numpy(), return_index=True)
    members = meta.iloc[np.sort(first)].drop_duplicates(key)[[*key, "pour"]]
    wanted, check = {}, []
    mine_of = {
        pour: list(zip(group.storey.tolist(), group.pier_id.tolist(), strict=True))
        for pour, group in members.groupby("pour", sort=False)
    }
    for pour in pours[pours.util.isna()].pour:
        mine = mine_of.get(pour, [])
        named = [by.at[pair[m].a, "fc"] for m in mine if m in pair and pair[m].pair in GRADE_PAIRS]
        if not named:
            continue
        top = max(named)
        wanted[pour] = (top, mine)
        for m in mine:
            if m in pair and pair[m].pair in GRADE_PAIRS and (*m, top) in g and g_util[g[(*m, top)]] > 1.0:
                check.append((*m, int(g_variant[g[(*m, top)]]), int(pair[m].b)))
    if not wanted:
        return pours, plans
    c = pd.DataFrame(check, columns=[*key, "a", "b"])
    c["kb"] = by.kind.reindex(c.b).to_numpy()
    c["variant"] = np.arange(len(c), dtype=np.int64) + len(var) + 10**9
    util = _every(_pair_rows(var), c, actions, screen, settings) if len(c) else pd.Series(dtype=float)
    c["util"] = c.variant.map(util)
    if len(c):
        ra, rb = by.loc[c.a], by.loc[c.b]
        field = {}
        for f in PRICED_ALL:
            field[f] = np.where([f in PRICED[k] for k in c.kb], rb[f].to_numpy(float), ra[f].to_numpy(float))
        c["cost"] = (
            _cost_total(
                ra.Lw,
                field["tw"],
                field["rho_v"],
                field["rho_h"],
                field["fc"],
                field["zarea"],
                ra.Hc,
                prices,
                settings,
            )
            - ra.base_cost.to_numpy(float)
            - costs.grade_premium(prices, ra.fc0, ra.fc, ra.Lw.to_numpy(float) * ra.tw0 * ra.Hc / 1e9)
        )
    c = {(r.storey, r.pier_id): r for r in c.itertuples(index=False)}
    pours = pours.copy()
    for pour, (top, mine) in wanted.items():
        total, worst, words, ok = float(prem[(pour, top)]), 0.0, {}, True
        for m in mine:
            at_top = g_util[g[(*m, top)]] if (*m, top) in g else np.nan
            if at_top <= 1.0:
                words[m], u, cost = f"f'c {top:g} MPa (pour) alone", at_top, 0.0
            elif m in c and c[m].util <= 1.0:
                other = by.loc[c[m].b]
                words[m] = f"f'c {top:g} MPa (pour); {other.kind}: {other.option}"
                u, cost = c[m].util, c[m].cost
            elif m in own:
                words[m], u, cost = f"{own[m].kind}: {own[m].option}", own[m].util, own[m].added_cost
            elif m in pair and pair[m].pair not in GRADE_PAIRS:
                words[m], u, cost = f"{pair[m].kind}: {pair[m].option}", pair[m].util, pair[m].added_cost
            else:
                ok = False
                break
            total, worst = total + cost, max(worst, u)
        if not ok:
            continue
        i = pours.index[pours.pour == pour][0]
        pours.loc[i, ["kind", "option", "util", "added_cost"]] = [
            PLAN_KIND,
            f"f'c {top:g} MPa for every wall of the pour below it, and each failing pier's own change at "
            f"that grade (its rows; no grade alone passes)",
            worst,
            total,
        ]
        pours.loc[i, "fixes"] = (
            ", ".join(p for _, p in mine)
            if len({s for s, _ in mine}) == 1
            else ", ".join(f"{s} {p}" for s, p in mine)
        )
        plans |= {m: f"plan of pour {pour}: {w}" for m, w in words.items()}
    return pours, plans


def cheapest_fixes(advice: pd.DataFrame) -> dict[tuple[str, str], str]:
    """(storey, pier) -> the cheapest passing change in words: the pier's rank-1 row or its
    pour's grade, whichever costs less (an end-zone option offered first stays first); in a
    pour with a plan, the plan's part for a pier whose own best change names the pour's grade."""
    if advice.empty:
        return {}
    rows = advice[advice.scope == "pier"]
    best = {
        (r.storey, r.pier_id): r
        for r in rows[(rows["rank"] == 1) & (rows.util <= 1.0)].itertuples(index=False)
    }
    plan = rows[rows.plan != ""].groupby(["storey", "pier_id"]).plan.first().to_dict()
    pours = {
        r.pour: r for r in advice[(advice.scope == "pour") & (advice.util <= 1.0)].itertuples(index=False)
    }
    out = {}
    for r in rows.drop_duplicates(["storey", "pier_id"]).itertuples(index=False):
        key = (r.storey, r.pier_id)
        pick, p = best.get(key), pours.get(r.pour)
        if p is not None and p.kind == PLAN_KIND:
            if key in plan and (pick is None or pick.kind.startswith(GRADE_KIND)):
                out[key] = f"{plan[key]} (+{p.added_cost:,.0f} for the pour's plan)"
                continue
        elif p is not None:
            zone_first = pick is not None and pick.kind == ZONE_KIND and r.check == AXIAL_CHECK
            if pick is None or (not zone_first and p.added_cost < pick.added_cost):
                out[key] = f"{GRADE_KIND}: {p.option} (+{p.added_cost:,.0f} for the pour)"
                continue
        if pick is not None:
            out[key] = f"{pick.kind}: {pick.option} (+{pick.added_cost:,.0f})"
    return out


SCREEN = 2  # combinations per pier and measure of demand in the screening set


def _screening_actions(
    actions: pd.DataFrame,
    failing: pd.DataFrame,
    rows: ActionRows | None = None,
    earthquake: set[str] | frozenset[str] = frozenset(),
) -> pd.DataFrame:
    """The screen's action rows (`_screening`)."""
    return _screening(actions, failing, rows, earthquake)[0]


def _screening(
    actions: pd.DataFrame,
    failing: pd.DataFrame,
    rows: ActionRows | None = None,
    earthquake: set[str] | frozenset[str] = frozenset(),
) -> tuple[pd.DataFrame, np.ndarray | None]:
    """Per failing pier, the action rows of the combinations with the largest |V*|, N*, -N*,
    |M*|, |M*|/N* and out-of-plane M*: those that govern shear, squash, tension, bending and
    Cl 11.5 for any change of section in the search (a screen only: axial + bending and Cl 11.5
    are confirmed on every row), and every row of an `earthquake` combination (Project
    setting): the earthquake rules (AS 3600 Section 14, ACI 318 special walls) read N* and M*
    together (a stress N/A + M/Z, a neutral-axis depth at N*) and only those rows, and are not
    confirmed, so their worst row must be in the screen. Without them the search offered ACI
    demo variants that still failed a boundary-element rule under an earthquake row the six
    rankings had left out.

    `rows`, the ActionRows of `actions`: the failing piers' rows found by its codes instead of
    joining the actions on text keys, and its codes group them (the same rows, order and index
    as the join; tests/test_advice_speed5.py), and each row's position in `rows.frame` (None
    without `rows`: `_confirm` leaves the screen's rows out by those)."""
    keys = failing[["storey", "pier_id"]]
    if rows is not None and rows.coded_keys and not keys.duplicated().any():
        where = _failing_positions(rows, keys)
        acts, groups = rows.frame.take(where).reset_index(drop=True), rows.codes[where]
    else:
        acts = actions.merge(keys, on=["storey", "pier_id"])
        groups = where = None
    if acts.empty:
        return acts, where
    n = acts.n.to_numpy(float)
    m = np.abs(acts.m.to_numpy(float))
    measures = {
        "v": np.abs(acts.v.to_numpy(float)),
        "n": n,
        "t": -n,
        "m": m,
        "e": m / np.maximum(np.abs(n), 1e-9),
        "o": np.abs(np.nan_to_num(acts.m_out.to_numpy(float))) if "m_out" in acts else np.zeros(len(acts)),
    }
    # each (storey, pier) as one integer, factorised once for the six rankings (ranks within a
    # group do not depend on how the groups are labelled)
    if groups is None:
        storey, _ = pd.factorize(acts.storey)
        pier, piers = pd.factorize(acts.pier_id)
        groups = storey.astype(np.int64) * max(len(piers), 1) + pier
    pick = np.zeros(len(acts), dtype=bool)
    top = _TopRows(groups)
    for values in measures.values():
        pick |= top.first(np.nan_to_num(values, nan=-np.inf), SCREEN)
    if earthquake and "combination" in acts:
        pick |= acts.combination.astype(str).isin(earthquake).to_numpy()
    return acts[pick], (None if where is None else where[pick])


class _TopRows:
    """Per group of rows (integer codes, none missing), which rows hold its `k` largest values:
    `pd.Series(values).groupby(groups).rank(method="first", ascending=False) <= k`, the same
    rows (ties to the earlier row), without pandas' rank of every row (six rankings of the
    varied L tower's 240 000 failing-pier rows were most of the screen's making). The rows are
    put in group order once (a stable sort: each group's rows keep their order) and each
    group's largest found by segments, k times, the rows taken before left out."""

    def __init__(self, groups: np.ndarray) -> None:
        groups = np.asarray(groups, dtype=np.int64)
        self.n = len(groups)
        self.order = np.argsort(groups, kind="stable")
        g = groups[self.order]
        new = np.append(True, g[1:] != g[:-1]) if self.n else np.zeros(0, dtype=bool)
        self.starts = np.flatnonzero(new)  # each group's first row in group order
        self.seg = np.cumsum(new) - 1  # each row's group, numbered in that order

    def first(self, values: np.ndarray, k: int) -> np.ndarray:
        """Flags of the rows ranked 1..k in their group, largest first (values without NaN)."""
        out = np.zeros(self.n, dtype=bool)
        if not self.n:
            return out
        v = np.asarray(values, dtype=float)[self.order]
        taken = np.zeros(self.n, dtype=bool)
        place = np.arange(self.n)
        for _ in range(k):
            # each group's largest among the rows not taken, then its first row holding it
            left = np.where(taken, -np.inf, v)
            best = np.maximum.reduceat(left, self.starts)
            hit = (left == best[self.seg]) & ~taken
            at = np.minimum.reduceat(np.where(hit, place, self.n), self.starts)
            taken[at[at < self.n]] = True
        out[self.order[taken]] = True
        return out


def _failing_rows(rows: ActionRows, keys: pd.DataFrame) -> tuple[pd.DataFrame, np.ndarray]:
    """The action rows of `rows` at the (storey, pier) `keys` (unique, no NaN in the actions'),
    in table order with a fresh index, as the inner join on the keys gives them, and each one's
    (storey, pier) code."""
    at = _failing_positions(rows, keys)
    return rows.frame.take(at).reset_index(drop=True), rows.codes[at]


def _failing_positions(rows: ActionRows, keys: pd.DataFrame) -> np.ndarray:
    """`_failing_rows`' rows as their positions in `rows.frame`, ascending."""
    storey = pd.Index(rows.storeys).get_indexer(keys.storey)
    pier = pd.Index(rows.piers).get_indexer(keys.pier_id)
    known = (storey >= 0) & (pier >= 0)
    key = pd.Index(rows.keys).get_indexer(storey[known].astype(np.int64) * len(rows.piers) + pier[known])
    wanted = np.zeros(len(rows.keys), dtype=bool)
    wanted[key[key >= 0]] = True
    return np.flatnonzero(wanted[rows.codes])


def _worst(
    var: pd.DataFrame, acts: pd.DataFrame, s: Settings, only_axial: bool = False, cheap_first: bool = False
) -> pd.Series:
    """Worst utilisation of every variant over every check and combination (over axial +
    bending and Cl 11.5 alone with `only_axial`), by variant ID (sorted), for the variants with
    a row in some check: `pd.concat(parts).groupby("pier_id").util.max()` of the checks' tables.

    With `cheap_first` (the search, `ActionRows.cheap_first`), the closed-form checks (shear,
    detailing, Section 14) run first and a variant already over 1 in them is not run through
    the axial ones (the neutral-axis solve): its value is then over 1 but not its worst, which
    the search never reads (it compares with 1, and reports utilisations of passing options
    only). Detailing and Section 14 then take the effective height Cl 11.4 gives the axial
    check (`_effective_heights`), the same numbers.

    Each check's rows are folded into one maximum per variant by the variant's position
    (`_Worst`) instead of concatenating the checks' tables and grouping them by variant (a
    fifth of the search's time in the checks was those concatenations, groupings and the
    filters of rows by variant ID)."""
    w = _Worst(var, acts)
    if cheap_first and not only_axial:
        shear = check_pier_shear(var, acts, s, working=False)
        w.fold(shear)
        # detailing and Section 14, pier by pier, only on the variants shear leaves at or under
        # 1 (most variants of a screen fail shear, the demand the search mostly fixes); ACI 318's
        # special-wall rules on every variant as before (their ns reads the rows' highest storey;
        # they take no effective height)
        live, live_acts = w.without(w.worst > 1.0)
        hwe = _effective_heights(live, live_acts, s)
        quake = (var, acts) if special_walls.applies(s) else (live, live_acts)
        w.fold(check_detailing(live, live_acts, s, hwe, working=False, shear=shear))
        w.fold(check_section14(*quake, s, hwe, working=False))
        var, acts = w.without(w.worst > 1.0)
        axial = check_pier_axial(var, acts, s, working=False, util_only=True)
        if len(axial):
            w.fold(axial)
            w.fold(axial, "util_s")
        return w.series()
    axial = check_pier_axial(var, acts, s, working=False, util_only=True)
    # the shear table also goes to detailing, which otherwise runs the same shear check again
    shear = None if only_axial else check_pier_shear(var, acts, s, working=False)
    if shear is not None:
        w.fold(shear)
    if len(axial):
        w.fold(axial)
        w.fold(axial, "util_s")
        hwe = axial.groupby(["storey", "pier_id"]).hwe.first()
    else:
        hwe = None
    if not only_axial:
        w.fold(check_detailing(var, acts, s, hwe, working=False, shear=shear))
        w.fold(check_section14(var, acts, s, hwe, working=False))
    return w.series()


class _Worst:
    """Each variant's largest utilisation so far, by its position among the variant rows
    `var` (pier ID = variant, one row each), and each action row's variant position: the
    checks' tables folded in one at a time (`fold`), the rows of the variants already over 1
    left out by position (`without`). The maxima are `group_max`'s (NaN skipped, NaN where
    none), the same numbers `groupby(...).max()` gives over the checks' tables together."""

    def __init__(self, var: pd.DataFrame, acts: pd.DataFrame) -> None:
        self.var, self.acts = var, acts
        self.ids = var.pier_id.to_numpy()
        self.index = pd.Index(self.ids)
        self.at = self.index.get_indexer(acts.pier_id.to_numpy())  # -1: no variant row (kept)
        self.worst = np.full(len(self.ids), np.nan)
        self.seen = np.zeros(len(self.ids), dtype=bool)  # a row in some check's table
        self.kept = np.ones(len(self.ids), dtype=bool)  # rows of `var` and `acts` still in play

    def _positions(self, ids: np.ndarray) -> np.ndarray:
        at = self.index.get_indexer(ids)
        if (at < 0).any():
            raise KeyError("a check's row names a variant that is not among the variant rows")
        return at

    def fold(self, table: pd.DataFrame, column: str = "util") -> None:
        """Fold a check's rows (pier ID = variant) into each variant's maximum."""
        if not len(table):
            return
        at = self._positions(table.pier_id.to_numpy())
        values = table[column].to_numpy(float)
        if column != "util":  # Cl 11.5's column: only its rows with a value count as rows
            ok = ~np.isnan(values)
            at, values = at[ok], values[ok]
        self.seen[at] = True
        self.worst = _fmax_keep(self.worst, group_max(values, at, len(self.ids)))

    def without(self, out: np.ndarray) -> tuple[pd.DataFrame, pd.DataFrame]:
        """The variant rows and action rows still in play, less those of the variants `out`
        (a flag per position); the same rows, in order, as filtering by variant ID."""
        self.kept &= ~out
        if self.kept.all():  # none left out: the tables themselves, not copies
            return self.var, self.acts
        return self.var[self.kept], self.acts[(self.at < 0) | self.kept[self.at]]

    def series(self) -> pd.Series:
        """The maxima by variant ID, sorted, of the variants with a row in some check."""
        at = np.flatnonzero(self.seen)
        at = at[np.argsort(self.ids[at], kind="stable")]
        return pd.Series(self.worst[at], index=pd.Index(self.ids[at], name="pier_id"), name="util")


def _fmax_keep(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """`np.fmax(a, b)`, the earlier's zero where both are zeros (`group_max`'s rule: the first
    row's zero, whichever sign)."""
    out = np.fmax(a, b)
    both = (a == 0.0) & (b == 0.0)
    if both.any():
        out[both] = a[both]
    return out


def _effective_heights(var: pd.DataFrame, acts: pd.DataFrame, s: Settings) -> pd.Series | None:
    """Per (storey, variant) the effective height the axial check gives detailing and Section
    14 (`axial.groupby(...).hwe.first()` in `_worst`): its Cl 11.4 k Hc (checks/axial.py
    `_simplified`, the same call on the same numbers), for the variants with an action row the
    axial check keeps (N* and M* given); None where none has one, as there."""
    kept = acts[acts.n.notna() & acts.m.notna()].pier_id.unique()
    p = var[var.pier_id.isin(kept).to_numpy()]
    if p.empty:
        return None
    std = get_standard(s.standard)  # as check_pier_axial takes it
    Hc = p.Hc.to_numpy(float)
    restrained = s.ends_restrained == "yes"
    k = std.effective_height_factor(Hc, p.Lw.to_numpy(float), p.supported_edges.to_numpy(), restrained)
    return pd.Series(k * Hc, index=pd.MultiIndex.from_arrays([p.storey, p.pier_id]), name="hwe")


def search_lines(s: Settings) -> list[tuple[str, str]]:
    """The lines above the advice table: what was searched, how it is priced, what a pour is."""
    std = _std(s)
    h, v = (std.advice_bars(use) for use in ("horizontal", "vertical"))
    sym = std.symbols
    layers = (
        f"two layers each way ({sym['earthquake_rules']} both faces)"
        if two_layers_required(s)
        else (f"one or two layers (two above {std.single_layer_limits()[0]:g} mm)")
    )
    return [
        (
            "Search",
            f"a standard grade for the whole pour; horizontal {h[0].name}-{h[-1].name} and vertical "
            f"{v[0].name}-{v[-1].name} at "
            f"100-300 mm in 25 mm steps, {layers}, the same layers both ways; end-zone bars at both "
            "free edges; thickness +25 mm steps to +300 mm keeping the bars' ratio; where none of "
            "these passes alone, pairs of them (cheapest first). Each option run through every "
            f"check (shear, axial + bending, {sym['simplified']}, detailing, {sym['earthquake_rules']}) "
            "with the actions held as analysed (re-run the analysis after a change)",
        ),
        (
            "Pour",
            f"{s.grade_pour} (Project setting): a grade passes only where every failing pier of the "
            "pour passes with it; a higher grade makes no other pier fail (no capacity falls, the "
            "actions are held). Where no grade alone does, one plan for the pour: the highest grade "
            "the piers' pairs name, with each pier's own part at that grade",
        ),
        (
            "Cost",
            f"added cost over the storey's clear height for a pier, over the whole pour for a grade "
            f"(each wall's length x thickness x clear height, openings not deducted): concrete "
            f"{s.concrete_prices} per m3, reinforcement {s.steel_price:g} per t (defaults are "
            "illustrative, not market data)",
        ),
    ]


# ---------------------------------------------------------------------------------------------
# the search by parts of whole pours (pipeline.compute runs the parts on several processes)


def failing_pours(piers: pd.DataFrame, summary: pd.DataFrame, settings: Settings) -> pd.DataFrame:
    """Each failing storey x pier (the summary's order) with its pour and storey index: what
    splits the search into parts of whole pours. A pour's failing piers must stay together (its
    grade row, its plan and its pairs with the grade read all of them); piers of different
    pours share nothing the search reads but the whole pier table, the actions and the
    settings (tests/test_parallel.py: every part's rows equal the whole search's)."""
    failing = summary[summary.status == "FAIL"][["storey", "pier_id"]]
    f = failing.assign(**_pier_cols(piers, failing))
    f["pour"], _ = pour_keys(f, piers, settings)
    return f[["storey", "pier_id", "pour", "storey_index"]]


def summary_part(summary: pd.DataFrame, failing: pd.DataFrame) -> pd.DataFrame:
    """The summary's rows at the storey x pier keys of `failing` (a part of `failing_pours`),
    in the summary's order: what `advise` is given for that part."""
    keys = pd.MultiIndex.from_frame(failing[["storey", "pier_id"]])
    return summary[pd.MultiIndex.from_frame(summary[["storey", "pier_id"]]).isin(keys)]


def join_advice(parts: list[pd.DataFrame], failing: pd.DataFrame) -> pd.DataFrame:
    """The advice tables of parts of whole pours as one, in the order `advise` gives the whole:
    its table is sorted first by each pour's lowest storey index and the pour's name (each
    pour's rows then together, in an order of their own that a part gives the same), so the
    parts' rows are put in that order by a stable sort on those two keys alone."""
    parts = [p for p in parts if len(p)]
    if not parts:
        return pd.DataFrame(columns=[*ADVICE_KEYS, "scope"])
    if len(parts) == 1:
        return parts[0]
    table = pd.concat(parts, ignore_index=True)
    # `advise` appends its pair rows to the pier rows; with no pier needing a pair they are an
    # empty table of object columns, which makes storey, pier_id, util and added_cost object.
    # The whole search has pair rows where any part has them: a column a part holds typed,
    # made object by another part's empty pair rows, is given that part's type back (the same
    # values; the dtype the whole search gives).
    for c in table.columns:
        typed = [p[c].dtype for p in parts if p[c].dtype != object]
        if typed and table[c].dtype == object and all(t == typed[0] for t in typed):
            table[c] = table[c].astype(typed[0])
    lowest = failing.groupby("pour").storey_index.min()
    key = pd.DataFrame({"_pour_at": table.pour.map(lowest).to_numpy(float), "pour": table.pour.to_numpy()})
    order = key.sort_values(["_pour_at", "pour"], na_position="last", kind="stable").index.to_numpy()
    return table.take(order).reset_index(drop=True)
