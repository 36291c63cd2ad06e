"""In-plane shear of every pier, every storey, every combination, to the Project's design
standard (AS 3600:2018 Cl 11.6; ACI 318-19 11.5.4 / 18.10.4): the standard (`codes.base.Standard`)
gives the capacity, the steel needed, the working text and the advice."""

from __future__ import annotations

import dataclasses

import numpy as np
import pandas as pd

from xlcore.checks import per_pier, pier_rows, plain
from xlcore.codes import get_standard
from xlcore.codes.base import ShearCapacity, Standard
from xlcore.model import Settings
from xlcore.results import status_column, text_column, utilisation

HEIGHT_OVERALL, HEIGHT_OPENING = "overall wall height", "opening height"  # layout.HEIGHT_BASES
DETAIL_COLUMNS = ("eq1", "eq2", "floor", "alpha_c")
"""The standards' intermediate shear terms as result columns (results.SHEAR_COLUMNS)."""


def check_pier_shear(
    piers: pd.DataFrame,
    actions: pd.DataFrame,
    settings: Settings,
    working: bool = True,
    text: bool = True,
    *,
    std: Standard | None = None,
    pier_of: np.ndarray | None = None,
) -> pd.DataFrame:
    """Shear table: one row per storey x pier x combination, forces in kN.

    `piers` from geometry (with stiffness), `actions` from distribution.pier_actions. Without
    `working` the numbers only (the advice search runs thousands of variants). Without `text`
    every column but the working text (f_vuc, f_vu, f_util), which the same call on the rows
    written makes later (`compute --detail`: most rows of a tall tower are not written).
    Column keys keep their first (AS 3600) names, e.g. `vuc` the concrete part; the headers
    (results.py) are neutral. `pier_of`: each action row's row in `piers` as
    `checks.pier_rows` gives it, where the caller has it (the pipeline matches the action rows
    once for shear, detailing and Section 14); None: matched here.
    """
    std = (std or get_standard(settings.standard)).configure(settings)
    geo = [
        "storey",
        "pier_id",
        "Lw",
        "tw",
        "Hc",
        "Ho",
        "H_wall",
        "wall_length",
        "fc",
        "fsy",
        "rho_h",
        "rho_v",
    ]
    df, at = _with_piers(actions, piers, geo, pier_of)
    # what depends on the pier alone (Hw, Hw/Lw, the capacity and its parts) is worked out once
    # per pier and gathered to the rows (`at`: each row's pier; element by element the same
    # arithmetic, so the same bits); per row where the merge decided (`at` None)
    own = df if at is None else piers
    spread = (lambda v: v) if at is None else (lambda v: v[at])  # noqa: E731
    basis = settings.shear_height
    if basis == HEIGHT_OVERALL:
        hw, h_whole = own.H_wall.to_numpy(), own.H_wall
    else:
        use_opening = basis == HEIGHT_OPENING
        hw, h_whole = np.where(use_opening & own.Ho.notna(), own.Ho, own.Hc), own.Hc
    if at is not None:  # > 0: a pier beside an opening
        beside = piers.position.to_numpy() > 0
    else:
        place = piers.set_index(["storey", "pier_id"]).position
        beside = place.reindex(pd.MultiIndex.from_frame(df[["storey", "pier_id"]])).to_numpy() > 0
    ratio, wall_governs = std.wall_aspect_ratio(hw, own.Lw, h_whole, own.wall_length * 1000.0, beside)
    # the result columns, in the order they are written, joined to the action rows at once (a
    # column insert each copied every column of 360 000 rows at L)
    new: dict[str, object] = {"Hw": spread(np.asarray(hw)), "hw_lw": spread(np.asarray(ratio))}
    if working:  # text on every row: not for the advice search's variants (10 % of its time)
        args = (
            np.asarray(hw, float),
            own.Lw.to_numpy(float),
            np.asarray(h_whole, float),
            own.wall_length.to_numpy(float) * 1000.0,
            beside,
            np.asarray(wall_governs),
        )
        new["hw_basis"] = _hw_basis(basis, args, at, len(piers))
    phi = settings.phi_shear if settings.phi_shear is not None else std.phi_wall_shear
    r = std.wall_shear(own.fc, own.fsy, own.Lw, own.tw, ratio, own.rho_h, own.rho_v, phi)
    kn = 1e-3
    # the standard's own intermediate terms (AS 3600: Eq (1), Eq (2), the floor; ACI 318:
    # alpha_c), NaN where a standard has no such term, so every standard fills the same columns
    for key in DETAIL_COLUMNS:
        v = r.detail.get(key)
        new[key] = np.nan if v is None else spread(v * (kn if key in ("eq1", "eq2", "floor") else 1.0))
    new["eq2"] = _finite_or_nan(new["eq2"], len(df))  # AS Eq (2) applies only where Hw/Lw > 1
    for key, v in (("vuc", r.concrete), ("vus", r.steel), ("vu_max", r.limit), ("phi_vu", r.design)):
        new[key] = spread(v * kn)
    new["rho_w"] = spread(np.asarray(r.detail.get("rho_w", own.rho_h.to_numpy(float))))
    new["phi"] = phi_rows = spread(np.asarray(r.phi))
    k = df.k * 1e-3  # N/mm -> kN/mm
    new["util"] = util = utilisation(df.v, new["phi_vu"])
    new["status"] = status_column(util)
    new["clause"] = _clauses(r, at)
    cap = r if at is None else _RowsOf(r, at)  # the capacity read by action row
    if working:
        rho_req, capped = std.wall_steel_required(
            df.v * 1e3, phi_rows, df.fc, df.fsy, df.Lw, df.tw, new["hw_lw"]
        )
        new["rho_req"] = rho_req
        new["advice"] = _advice(std, util, rho_req, capped, np.asarray(new["hw_lw"], dtype=float), cap)
    df = _joined(df.assign(k=k), new)
    if not working:
        return df
    if text:
        # capacity working depends on the pier's numbers alone: written once per distinct set
        # of them (piers alike over many storeys share it), then spread
        first, of = _text_rows(df, cap)
        once = df.iloc[first]
        f_vuc, f_vu = std.wall_shear_text(cap.take(first), once.fc, once.fsy, once.Lw, once.tw, once.hw_lw)
        df["f_vuc"] = np.asarray(f_vuc, dtype=object)[of]
        df["f_vu"] = np.asarray(f_vu, dtype=object)[of]
        design = std.symbols["shear_design"]
        df["f_util"] = [
            f"|V*| / {design} = {abs(v):.1f} / {pv:.1f} = {u:.3f}"
            for v, pv, u in zip(df.v.tolist(), df.phi_vu.tolist(), df.util.tolist(), strict=True)
        ]
    # the engineer's row order; piers shared from one wall row stay together, from the wall start
    order = ["origin", "row", "position"] if "origin" in df else ["row", "position"]
    if _in_order(df, order):  # the sharing gives them so: the same rows as the stable sort
        return df.reset_index(drop=True)
    return df.sort_values(order, kind="stable").reset_index(drop=True)


class _RowsOf:
    """A capacity worked out per pier, read by action row (`at`: each row's pier): `take(rows)`
    gives those rows' quantities, as the capacity worked out on every row gave them."""

    def __init__(self, per_pier: ShearCapacity, at: np.ndarray) -> None:
        self.per_pier, self.at = per_pier, at

    def take(self, rows) -> ShearCapacity:
        return self.per_pier.take(self.at[rows])


def _finite_or_nan(values, n: int):
    """`values` with NaN where not finite (a scalar broadcast to `n` rows first where it is
    not finite, as the column assignment did)."""
    a = np.asarray(values, dtype=float)
    if a.ndim == 0:
        return values if np.isfinite(a) else np.full(n, np.nan)
    return np.where(np.isfinite(a), a, np.nan)


def _joined(df: pd.DataFrame, new: dict) -> pd.DataFrame:
    """`df` with the columns `new` added as `df[name] = value` one after another adds them,
    in one step (one frame of the new columns beside the old: no copy of every column per
    insert). Arrays made here become columns as they are; a read-only one (a view of another
    table's column) or one given twice is copied, as the insert copied it. The inserts where
    a name is already a column of `df` (it keeps its place)."""
    if set(new) & set(df.columns):
        df = df.copy()
        for name, value in new.items():
            df[name] = value
        return df
    seen: set[int] = set()
    own = {}
    for name, value in new.items():
        if isinstance(value, np.ndarray) and (not value.flags.writeable or id(value) in seen):
            value = value.copy()
        seen.add(id(value))
        own[name] = value
    return pd.concat([df, pd.DataFrame(own, index=df.index, copy=False)], axis=1)


def _in_order(df: pd.DataFrame, keys: list[str]) -> bool:
    """Whether the rows already stand in the order a stable sort on the integer columns
    `keys` gives (then the sort would return them as they are)."""
    cols = [df[k].to_numpy() for k in keys]
    if len(df) < 2 or any(c.dtype.kind not in "iu" for c in cols):
        return len(df) < 2
    tied = np.ones(len(df) - 1, dtype=bool)  # pairs of neighbours equal on the keys so far
    for c in cols:
        a, b = c[:-1], c[1:]
        if (tied & (b < a)).any():
            return False
        tied &= b == a
    return True


def _hw_basis(
    basis: str, args: tuple, at: np.ndarray | None, n_piers: int
) -> pd.api.extensions.ExtensionArray:
    """`_basis_text` of every row as a text column, written once per distinct set of its
    numbers: a pier's, the same on all its combinations. With `at` (each row's pier) the
    distinct sets are found among one row of each pier instead of among every row; the column
    is taken from the few words (`text_column`), not made from a list of every row's. With
    `at` the `args` are per pier (row i reads pier at[i]'s), else per row."""
    if at is None:
        rows, slot = np.arange(len(args[0])), np.arange(len(args[0]))
    else:
        rows, slot = _piers_with_rows(at, n_piers)
    first, of = _distinct([a[rows] for a in args])
    words = _basis_text(basis, *(a[rows[first]] for a in args))
    return text_column(of[slot], words)


def _piers_with_rows(at: np.ndarray, n_piers: int) -> tuple[np.ndarray, np.ndarray]:
    """The piers that have rows (`at`: each row's pier), in pier order, and each row's index
    among them."""
    has = np.zeros(n_piers, dtype=bool)
    has[at] = True
    slot = np.cumsum(has) - 1
    return np.flatnonzero(has), slot[at]


def _with_piers(
    actions: pd.DataFrame, piers: pd.DataFrame, geo: list[str], pier_of: np.ndarray | None = None
) -> tuple[pd.DataFrame, np.ndarray | None]:
    """The action rows with their pier's `geo` columns, as a left merge on storey x pier_id
    would give them, and each row's pier row (None where the merge itself was used). Where
    every action row finds exactly one pier and no column name is shared, the pier columns are
    gathered by position (integer codes of the two keys; no merge of 360 000 rows of text).
    `pier_of`: `pier_rows`' answer for these tables where the caller has it."""
    keys = ["storey", "pier_id"]
    at = None
    if not (set(actions.columns) & set(geo)) - set(keys):
        at = pier_of if pier_of is not None else pier_rows(
            actions.storey, actions.pier_id, piers.storey, piers.pier_id
        )
        if at is not None and (at < 0).any():
            at = None
    if at is None:
        return actions.merge(piers[geo], on=keys, how="left"), None
    df = actions.reset_index(drop=True)
    return _joined(df, {c: piers[c].to_numpy()[at] for c in geo if c not in keys}), at


def _clauses(r, at: np.ndarray | None = None) -> pd.api.extensions.ExtensionArray:
    """`r.clauses()` (the governing clause of every row) looked up once per distinct code
    (codes by hashing, not sorting 360 000 rows); with `at`, `r` is per pier and row i takes
    pier at[i]'s clause."""
    of, codes = pd.factorize(np.ravel(r.governs), use_na_sentinel=False)
    text = dataclasses.replace(r, governs=np.asarray(codes)).clauses()
    return text_column(of if at is None else of[at], text)


def _advice(std: Standard, util: np.ndarray, rho_req, capped, hw_lw: np.ndarray, cap) -> np.ndarray:
    """The standard's advice on the rows that do not pass, '' on the others (what the
    standard's own rule gives them): a Python step per failing row only."""
    out = np.full(len(util), "", dtype=object)
    ask = np.flatnonzero(~(util <= 1.0))
    if len(ask):
        out[ask] = std.wall_shear_advice(
            util[ask], np.asarray(rho_req)[ask], np.asarray(capped)[ask], hw_lw[ask], cap.take(ask)
        )
    return out


def _text_rows(df: pd.DataFrame, r) -> tuple[np.ndarray, np.ndarray]:
    """For the capacity working text (`Standard.wall_shear_text`, a function of each row's own
    numbers): the first row of each distinct set of everything it may read (f'c, fsy, Lw, tw,
    Hw/Lw and every array of the capacity `r`) and each row's set. Numbers compare bit for
    bit (-0.0 is not 0.0: it prints differently), so rows of one set get the same text."""
    first, of = per_pier(df)  # a pier's numbers are the same on all its combinations
    cap = r.take(first)
    columns = [df[c].to_numpy()[first] for c in ("fc", "fsy", "Lw", "tw", "hw_lw")]
    columns += [getattr(cap, k) for k in ("area", "concrete", "steel", "limit", "nominal", "phi")]
    columns += [cap.design, cap.governs, *cap.detail.values()]
    same, set_of = _distinct([_bits(c) for c in columns])
    return first[same], set_of[of]


def _bits(values) -> np.ndarray:
    """A column as values that are equal exactly where the numbers are the same bit for bit
    (floats as their 64-bit patterns); other columns as they are."""
    a = np.asarray(values)
    if a.dtype.kind == "f":
        return np.ascontiguousarray(a, dtype=np.float64).view(np.int64)
    return a


def _distinct(columns) -> tuple[np.ndarray, np.ndarray]:
    """The first row of each distinct combination of values over `columns` (arrays of one
    length) and each row's combination: integer codes, no tuple per row."""
    codes = np.zeros(len(columns[0]), dtype=np.int64)
    for c in columns:
        own, values = pd.factorize(c, use_na_sentinel=False)
        codes, _ = pd.factorize(codes * len(values) + own)
    _, first, of = np.unique(codes, return_index=True, return_inverse=True)
    return first, of


def _basis_text(basis, hw, lw, h_whole, l_whole, beside, wall_governs) -> list[str]:
    """The height used in Hw/Lw on every row, and which ratio governs (Cl 11.6.3)."""
    out = []
    for b, h, length, hh, ll, side, gov in zip(
        [basis] * len(hw), *plain(hw, lw, h_whole, l_whole, beside, wall_governs), strict=True
    ):
        own = f"{b}: {h:.0f} / {length:.0f} = {h / length:.3f}"
        if not side:
            out.append(own)
            continue
        whole = f"whole wall {hh:.0f} / {ll:.0f} = {hh / ll:.3f}"
        pick = "whole wall governs" if gov else "pier governs"
        out.append(f"larger of pier {own} and {whole} ({pick}; common practice)")
    return out
