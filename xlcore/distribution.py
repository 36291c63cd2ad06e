"""Actions reaching each pier: given directly, shared from a wall's actions, or shared from the
whole core's storey resultants. Mechanics only: no standard, no workbook.

Forces in kN and kNm, plan in m. Wall in-plane sign convention: V* acts along the wall from its
start towards its end; M* in-plane positive compresses the wall's end; compression positive.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from xlcore.mechanics import diaphragm, section
from xlcore.mechanics.stiffness import pier_stiffness, with_stiffness  # noqa: F401  (part of this API)
from xlcore.results import text_column

COMPOSITE = "composite section"
FROM_SHEAR = "pier moments from shear"
WALL_NM_METHODS = (COMPOSITE, FROM_SHEAR)
LOCAL_BESIDE_OPENINGS = "add V* h/2 beside openings"  # layout.CORE_LOCAL_MOMENT[0]
# core path: own bending, V* h/2, across the wall; the wall's V* that the pier shares
CORE_PIER_EXTRA = ["m_curv", "m_local", "m_oop", "wall_v"]

ACTION_COLUMNS = [
    "row",
    "storey",
    "combination",
    "wall_id",
    "pier_id",
    "position",
    "k",
    "share",
    "n",
    "v",
    "m",
    "source",
]


def pier_actions(piers: pd.DataFrame, actions: pd.DataFrame, method: str = COMPOSITE) -> pd.DataFrame:
    """One row per storey x pier x combination from the member-actions sheet.

    `piers` needs the geometry columns and `k`. Actions naming a pier (or an uncut wall) pass
    through. Actions naming a wall that openings cut at that storey are shared among its piers:
    V* by stiffness k; N* and M* by `method`:
    - composite section: linear stress N/A + M s/I over the piers' combined section (full
      coupling through the lintels): N_i = A_i (N/A + M s_i / I), own M_i = M I_i / I;
    - pier moments from shear: own M_i = V_i h_i / 2 (contraflexure at mid-height), the rest
      of M* as an axial couple N_i = A_i N/A + (M - sum M_i) A_i s_i / sum A_j s_j^2.
    Either way the pier forces sum back to the wall's N*, V* and M* (about the piers' centroid).
    """
    cols = ["storey", "wall_id", "pier_id", "position", "k", "start", "end", "Lw", "tw", "h"]
    if "m_out" not in actions:  # optional column
        actions = actions.assign(m_out=np.nan)
    base = columns_of(actions, ["row", "storey", "combination", "member", "n", "v", "m", "m_out"])
    keys = (Coded(base.storey), Coded(base.member))  # each row's text keys hashed once, for both
    direct = _given_for_piers(base, piers[cols], keys)
    direct["share"] = 1.0
    direct["source"] = "given for the pier"
    cut = piers.loc[piers.position > 0, cols]
    shared = base[_naming(keys, cut.storey, cut.wall_id)].merge(
        cut, left_on=["storey", "member"], right_on=["storey", "wall_id"]
    )  # the merge of only the rows that have a match: the same rows, in the same order
    if len(shared):
        shared = _share_wall(shared, method)
    return columns_of(concat_rows(direct, shared), ACTION_COLUMNS)


def columns_of(df: pd.DataFrame, names: list[str]) -> pd.DataFrame:
    """`df[names]`, the columns' arrays as they are: no copy of every row into new blocks (the
    member actions' 360 000 rows at the L tower were copied three times on their way here)."""
    return pd.DataFrame({c: df[c] for c in names}, copy=False)


def concat_rows(first: pd.DataFrame, rest: pd.DataFrame) -> pd.DataFrame:
    """`pd.concat([first, rest], ignore_index=True)`. Where `rest` has no row (at the L tower
    no member action names a cut wall, and the member actions give every storey x combination,
    so no core pier row is left), `first`'s columns as they are (no copy of its rows) in the
    concatenation's types (found on one row of `first`), `rest`'s own columns blank (NaN)."""
    if len(rest) or not len(first):
        return pd.concat([first, rest], ignore_index=True)
    template = pd.concat([first.iloc[:1], rest], ignore_index=True)
    out = {}
    for c in template.columns:
        dtype = template[c].dtype
        if c not in first:
            if not (isinstance(dtype, np.dtype) and dtype.kind == "f"):
                return pd.concat([first, rest], ignore_index=True)
            out[c] = np.full(len(first), np.nan, dtype=dtype)
        else:
            out[c] = first[c] if first[c].dtype == dtype else first[c].astype(dtype)
    return pd.DataFrame(out, copy=False).set_axis(pd.RangeIndex(len(first)))


class Coded:
    """A column's values as integer codes of its distinct values (NaN: -1), so that looking its
    rows up in a small table hashes each distinct value once, not every row."""

    def __init__(self, values) -> None:
        self.codes, self.values = factorize_runs(values)

    def __len__(self) -> int:
        return len(self.codes)

    def indexer(self, index: pd.Index) -> np.ndarray:
        """`index.get_indexer(values)` (-1 where a value is not in `index`; NaN never is, as in
        an index without NaN, the only kind asked)."""
        return np.where(self.codes >= 0, index.get_indexer(self.values)[self.codes], -1)


def factorize_runs(values) -> tuple[np.ndarray, np.ndarray]:
    """`pd.factorize(np.asarray(values))`. Text in runs of equal neighbours (a tower's member
    actions come storey by storey: 100 runs of 360 000 rows) is compared with its neighbour
    and only each run's first value hashed, its code spread over the run (a blank, equal to
    nothing, is a run of its own and takes the blank's code). Where the first rows show short
    runs, or a comparison gives no plain answer, every row hashed as before."""
    values = np.asarray(values)
    n = len(values)
    if values.dtype != object or n < 64:
        return pd.factorize(values)
    try:
        probe = values[1:1024] != values[: min(n, 1024) - 1]
        if probe.dtype != bool or probe.sum() * 4 > len(probe):  # short runs: no gain
            return pd.factorize(values)
        change = values[1:] != values[:-1]
    except (TypeError, ValueError):  # (pd.NA has no answer to !=)
        return pd.factorize(values)
    if change.dtype != bool:
        return pd.factorize(values)
    starts = np.flatnonzero(np.concatenate([[True], change]))
    codes, uniques = pd.factorize(values[starts])
    return np.repeat(codes, np.diff(np.append(starts, n))), uniques


def _naming(keys: tuple[Coded, Coded], table_a, table_b) -> np.ndarray:
    """Whether each row's key pair (`keys`) is among the table's pairs (table_a, table_b), as an
    inner merge matches them; all True where the table has a blank key (the merge decides)."""
    ta, tb = pd.Series(table_a), pd.Series(table_b)
    a, b = keys
    if ta.isna().any() or tb.isna().any():
        return np.ones(len(a), dtype=bool)
    ca = pd.Index(a.values).get_indexer(ta)  # codes of the table's pairs among the rows' keys
    cb = pd.Index(b.values).get_indexer(tb)
    there = (ca >= 0) & (cb >= 0)
    pairs = np.unique(ca[there] * len(b.values) + cb[there])
    return (a.codes >= 0) & (b.codes >= 0) & np.isin(a.codes * len(b.values) + b.codes, pairs)


def _given_for_piers(
    base: pd.DataFrame, piers: pd.DataFrame, keys: tuple[Coded, Coded] | None = None
) -> pd.DataFrame:
    """The action rows naming a pier, with its columns: the inner merge on storey x member =
    pier_id, by position where each pier is one row (no merge of 360 000 rows of text).
    `keys`: the rows' storey and member, `Coded` once by the caller."""
    at = rows_of(*(keys or (base.storey, base.member)), piers.storey, piers.pier_id)
    if at is None:
        return base.merge(piers, left_on=["storey", "member"], right_on=["storey", "pier_id"])
    found = at >= 0
    direct = (base if found.all() else base[found]).reset_index(drop=True)  # (no copy of every row)
    rows = at[found]
    # each pier column gathered once and joined as it is (assigning arrays copied each again)
    column = lambda c: pd.Series(_gathered(piers[c], rows), index=direct.index, copy=False)  # noqa: E731
    return direct.assign(**{c: column(c) for c in piers.columns if c != "storey"})


_TEXT = pd.Series(np.array(["a"], dtype=object)).dtype  # the type a column of strings takes


def _gathered(column: pd.Series, rows: np.ndarray):
    """`column.to_numpy()[rows]` in the type a table gives it: text of that type taken as it
    is (not strings made objects and their type found again, row by row)."""
    if column.dtype == _TEXT and isinstance(column.array, pd.arrays.StringArray):
        return column.array.take(rows)
    values = column.to_numpy()[rows]
    return values if values.dtype != object else pd.Series(values).array


def rows_of(a, b, table_a, table_b) -> np.ndarray | None:
    """Each pair (a, b)'s row in a table of pairs (table_a, table_b), -1 where it has none, by
    integer codes of each key (no joined text); `a`, `b` columns or `Coded`. None where the
    table's pairs are not unique or one is blank: a merge must then decide."""
    ta, tb = pd.Series(table_a), pd.Series(table_b)
    if ta.isna().any() or tb.isna().any():
        return None
    ia, ib = pd.Index(pd.unique(ta)), pd.Index(pd.unique(tb))
    own = ia.get_indexer(ta) * len(ib) + ib.get_indexer(tb)
    if len(np.unique(own)) != len(own):
        return None
    row_of = np.full(len(ia) * len(ib), -1)
    row_of[own] = np.arange(len(own))
    ca, cb = (x.indexer(i) if isinstance(x, Coded) else i.get_indexer(x) for x, i in ((a, ia), (b, ib)))
    if not len(row_of):  # an empty table: no pair has a row (the advice search's empty batches)
        return np.full(len(ca), -1)
    return np.where((ca >= 0) & (cb >= 0), row_of[np.maximum(ca, 0) * len(ib) + np.maximum(cb, 0)], -1)


def _share_wall(df: pd.DataFrame, method: str) -> pd.DataFrame:
    g = df.groupby("row")
    df["share"] = df.k / g.k.transform("sum")
    area = df.Lw * df.tw / 1e6  # m^2
    s = (df.start + df.end) / 2
    a_tot = area.groupby(df.row).transform("sum")
    s_bar = (area * s).groupby(df.row).transform("sum") / a_tot
    lever = s - s_bar
    own_i = df.tw / 1000 * (df.Lw / 1000) ** 3 / 12  # m^4
    couple_i = (area * lever**2).groupby(df.row).transform("sum")
    v_wall, n_wall, m_wall = df.v.copy(), df.n.copy(), df.m.copy()
    df["v"] = v_wall * df.share
    df["m_out"] = df.m_out * df.Lw / df.Lw.groupby(df.row).transform("sum")  # by length
    if method == COMPOSITE:
        i_tot = couple_i + own_i.groupby(df.row).transform("sum")
        df["n"] = area * (n_wall / a_tot + m_wall * lever / i_tot)
        df["m"] = m_wall * own_i / i_tot
        how = "N*, M* by linear stress over the piers' combined section"
    else:
        own_m = df.v * df.h / 1000 / 2
        rest = m_wall - own_m.groupby(df.row).transform("sum")
        single = couple_i <= 0
        couple = rest * area * lever / couple_i.where(~single, 1.0)
        df["n"] = area * n_wall / a_tot + np.where(single, 0.0, couple)
        df["m"] = np.where(single, m_wall, own_m)
        how = "own M* = V* h / 2, rest of M* as an axial couple"
    df["source"] = [
        f"wall {w}: V* {v:.1f} kN x share {sh:.3f}; {how}"
        for w, v, sh in zip(df.wall_id, v_wall, df.share, strict=True)
    ]
    return df


# ------------------------------------------------------------------ core actions


@dataclass
class StoreyPlan:
    """One storey's net section, the pieces' area moments and the walls for the diaphragm."""

    section: section.CoreSection
    piece_moments: np.ndarray  # piers x [A, Qx, Qy, ...], in the storey's pier order
    walls: diaphragm.Storey
    centre: tuple[float, float] | None  # centre of rigidity; None when the walls are unstable


def by_storey(df: pd.DataFrame) -> dict[str, pd.DataFrame]:
    """The table split by storey once (selecting a storey by comparison on every use costs a
    scan of the whole table each time)."""
    return dict(tuple(df.groupby("storey", sort=False)))


def storey_plans(piers: pd.DataFrame, walls: pd.DataFrame) -> dict[str, StoreyPlan]:
    """Net section and centre of rigidity of every storey."""
    out = {}
    seen: dict[bytes, StoreyPlan] = {}  # storeys alike in plan, thickness and stiffness share one
    # each storey's rows by position in arrays of the whole tables (a sub-table per storey cost
    # more than the plans themselves where storeys repeat); a sub-table only for a new plan
    plan_cols, wall_cols = piers[PLAN_COLUMNS].to_numpy(float), walls[WALL_COLUMNS].to_numpy(float)
    wall_ids = walls.wall_id.to_numpy()
    piers_at = piers.groupby("storey", sort=False).indices
    walls_at = walls.groupby("storey", sort=False).indices
    for storey in pd.unique(piers.storey[piers.storey.notna()]):  # a blank storey: no plan, as the group-by
        ip, iw = piers_at[storey], walls_at[storey]
        key = _plan_key_of(plan_cols[ip], wall_cols[iw], wall_ids[iw])
        if key in seen:
            out[storey] = seen[key]
            continue
        sp = piers.iloc[ip]
        pieces = section.disjoint_pieces(sp)  # the net section: each overlap once
        k, ux, uy, mx, my = (np.ascontiguousarray(wall_cols[iw, j]) for j in range(len(WALL_COLUMNS)))
        st = diaphragm.Storey(k, ux, uy, mx, my)
        try:
            centre = diaphragm.centre_of_rigidity(st)
        except diaphragm.Unstable:
            centre = None
        out[storey] = seen[key] = StoreyPlan(
            section.section_of(pieces), section.shared_moments(sp), st, centre
        )
    return out


PLAN_COLUMNS = ["px1", "py1", "px2", "py2", "tw"]  # the piers' plan rectangles
WALL_COLUMNS = ["k", "ux", "uy", "mx", "my"]  # the walls' stiffness and lines of action


def _plan_key(sp: pd.DataFrame, sw: pd.DataFrame) -> bytes:
    """Everything a storey plan is made from: the piers' plan rectangles in order and the
    walls' stiffness and lines of action."""
    return _plan_key_of(
        sp[PLAN_COLUMNS].to_numpy(float), sw[WALL_COLUMNS].to_numpy(float), sw.wall_id.to_numpy()
    )


def _plan_key_of(plan: np.ndarray, walls: np.ndarray, wall_ids: np.ndarray) -> bytes:
    """`_plan_key` from a storey's rows of the arrays (rows x `PLAN_COLUMNS`, rows x
    `WALL_COLUMNS`, wall IDs)."""
    parts = [
        np.ascontiguousarray(plan).tobytes(),
        np.ascontiguousarray(walls).tobytes(),
        "\x1f".join(map(str, wall_ids)).encode(),
    ]
    return b"\x1e".join(parts)


def sections_table(plans: dict[str, StoreyPlan], storey_index: dict[str, int]) -> pd.DataFrame:
    rows = []
    for storey, p in plans.items():
        sec = p.section
        xr, yr = p.centre if p.centre else (np.nan, np.nan)
        rows.append(
            dict(
                storey=storey,
                storey_index=storey_index[storey],
                area=sec.area,
                xc=sec.xc,
                yc=sec.yc,
                ixx=sec.ixx,
                iyy=sec.iyy,
                ixy=sec.ixy,
                i1=sec.i1,
                i2=sec.i2,
                angle=sec.angle,
                xr=xr,
                yr=yr,
                bx=sec.xmax - sec.xmin,
                by=sec.ymax - sec.ymin,
            )
        )
    return pd.DataFrame(rows).sort_values("storey_index", ascending=False).reset_index(drop=True)


@dataclass
class Layout:
    """How `core_actions_to_piers` made its tables' rows, for `pipeline.core_table` to order
    them by position instead of sorting every row: per storey a block of rows, case after case
    (a case: one core-actions row's walls, or its piers), every case of a block with the same
    members in the same order. `walls` and `piers`: each block's (cases, members), blocks in
    their table's order. Only counts: the rows, members and cores are read from the tables."""

    walls: list[tuple[int, int]] = field(default_factory=list)
    piers: list[tuple[int, int]] = field(default_factory=list)


@dataclass
class Block:
    """One storey's rows of one side of the core sharing (its walls, or its piers), before they
    are rows: each column given once per case (`CASE`: a core-actions row), per member
    (`MEMBER`), per case x member (`GRID`, cases x members), once (`FIXED`) or blank (None in
    every row). Its rows are the cases one after another, each with every member in order
    (`rows`); `pipeline.core_table` writes the columns straight to their places in the
    core-sharing table instead (each value written once, no table of rows made and reordered).
    Text columns are integer codes into `CoreBlocks.texts`."""

    CASE, MEMBER, GRID, FIXED = "case", "member", "grid", "fixed"
    cases: int
    members: int
    columns: dict[str, tuple[str, object]]  # name -> (how it is given, values)

    def rows(self) -> dict[str, np.ndarray | None]:
        """The columns as rows (what `stack` takes): cases repeated, members tiled."""
        n, out = self.cases * self.members, {}
        for name, (how, v) in self.columns.items():
            if how == Block.CASE:
                out[name] = np.repeat(v, self.members)
            elif how == Block.MEMBER:
                out[name] = np.tile(v, self.cases)
            elif how == Block.GRID:
                out[name] = None if v is None else np.asarray(v).ravel()
            else:
                out[name] = np.full(n, v)
        return out

    def taken(self, keep: np.ndarray) -> Block:
        """The block of the cases `keep` (booleans, one per case) alone."""
        cols: dict[str, tuple[str, object]] = {}
        for name, (how, v) in self.columns.items():
            if how == Block.CASE:
                v = v[keep]
            elif how == Block.GRID and v is not None:
                v = np.asarray(v)[keep]
            cols[name] = (how, v)
        return Block(int(keep.sum()), self.members, cols)


@dataclass
class CoreBlocks:
    """`core_actions_to_piers`' rows as blocks (`Block`), one per storey and side, in the
    order the tables' rows take; `texts`: the values of the text columns' codes."""

    walls: list[Block]
    piers: list[Block]
    texts: dict[str, list]
    all_text: bool  # every text value a str (a subset's columns then take the whole's types)

    def pier_table(self) -> pd.DataFrame:
        return stack([b.rows() for b in self.piers], ACTION_COLUMNS + CORE_PIER_EXTRA, self.texts)

    def wall_table(self) -> pd.DataFrame:
        return stack([b.rows() for b in self.walls], texts=self.texts)

    def with_piers(self, piers: list[Block]) -> CoreBlocks:
        return CoreBlocks([], piers, self.texts, self.all_text)


class CoreSharing:
    """Everything the core-sharing step derived, for the checks and for the results.

    `piers`: ACTION_COLUMNS, one row per storey x combination x pier; `walls`: one row per
    storey x combination x wall (k, direct, torsion, V, N); `layout`: how the rows were made
    (None where not known). Made by `core_actions_to_piers`, the tables are made from its
    blocks (`parts`: each core's `CoreBlocks`, the core's name or None for a table without a
    core column) only when first asked for: the pipeline writes the core-sharing table from
    the blocks and takes from them the few pier rows it needs (at the L tower none of 360 000).
    Once the tables are made they are what is read (a caller may change them), the blocks
    dropped."""

    def __init__(
        self,
        piers: pd.DataFrame | None = None,
        walls: pd.DataFrame | None = None,
        layout: Layout | None = None,
        parts: list[tuple[str | None, CoreBlocks]] | None = None,
    ) -> None:
        self._piers, self._walls, self.layout = piers, walls, layout
        self.parts = parts if piers is None and walls is None else None

    @property
    def piers(self) -> pd.DataFrame:
        self._made()
        return self._piers

    @property
    def walls(self) -> pd.DataFrame:
        self._made()
        return self._walls

    def _made(self) -> None:
        if self.parts is not None:
            self._piers, self._walls = _tables_of(self.parts)
            self.parts = None

    def piers_apart_from(self, rows: np.ndarray) -> pd.DataFrame:
        """`piers[~piers.row.isin(rows)]` (its index aside): made from the blocks, of the cases
        whose row is not among `rows` alone, where every text is a str (a part's columns then
        take the types of the whole table's); the table filtered otherwise."""
        parts = self.parts
        if parts is None or not all(b.all_text for _, b in parts) or not any(b.piers for _, b in parts):
            return self.piers[~self.piers.row.isin(rows)]
        kept = []
        for core, b in parts:
            blocks = [p.taken(~np.isin(p.columns["row"][1], rows)) for p in b.piers]
            if any(p.cases for p in blocks):
                kept.append((core, b.with_piers([p for p in blocks if p.cases])))
        if kept:
            return _pier_table(kept)
        # none kept: one case's rows, and none of them (the columns' types of the whole)
        core, b = next((c, b) for c, b in parts if b.piers)
        one = b.piers[0].taken(np.arange(b.piers[0].cases) == 0)
        return _pier_table([(core, b.with_piers([one]))]).iloc[:0]


def _tables_of(parts: list[tuple[str | None, CoreBlocks]]) -> tuple[pd.DataFrame, pd.DataFrame]:
    """The piers' and walls' tables of the blocks: one core's as `stack` makes them; each
    core's named (`cores.core_actions_to_piers`) with its `core` column, concatenated."""
    if len(parts) == 1 and parts[0][0] is None:
        return parts[0][1].pier_table(), parts[0][1].wall_table()
    walls = [b.wall_table().assign(core=core) for core, b in parts]
    return _pier_table(parts), pd.concat(walls, ignore_index=True)


def _pier_table(parts: list[tuple[str | None, CoreBlocks]]) -> pd.DataFrame:
    if len(parts) == 1 and parts[0][0] is None:
        return parts[0][1].pier_table()
    return pd.concat([b.pier_table().assign(core=core) for core, b in parts], ignore_index=True)


def core_actions_to_piers(
    piers: pd.DataFrame,
    walls: pd.DataFrame,
    plans: dict[str, StoreyPlan],
    core: pd.DataFrame,
    accidental: float = 0.0,
    local_moment: str = LOCAL_BESIDE_OPENINGS,
    text: bool = True,
) -> CoreSharing:
    """Share each storey's core resultants among walls (rigid diaphragm) and then piers.

    `piers` with stiffness (`with_stiffness`), `walls` from `stiffness.wall_stiffness`, `plans`
    from `storey_plans`, `core` the core-actions rows. Pier N* from the core's elastic stress
    N/A +- bending integrated over the pier's net area; pier V* = wall force x pier stiffness
    share; pier M* = its own in-plane moment from the core's curvature, the stress plane's
    moment over the pier's own net area about its own centroid (M_i = M_core I_i / I_core per
    direction, resolved into the wall's plane), plus V* h / 2 (contraflexure over the pier's
    free height) for piers beside openings when `local_moment` asks for it. Statics: the pier
    N* sum to N*, and sum N_i d_i + sum of own moments (in-plane and the small out-of-plane
    part, column `m_oop`) give Mx*, My* about the section centroid (parallel-axis theorem).
    Accidental eccentricity: a fraction of the plan dimension across each shear component,
    added in the sense that increases each wall's force (so with it the wall forces no longer
    sum exactly to the storey shear).

    Without `text` the piers' `source` is left blank for `core_source` to write on the rows
    that need it (the L tower's 360 000 core pier rows took 1.7 s of text that its member
    actions then replaced); `wall_v` (the wall's V* the pier shares) is kept for it.
    """
    pier_blocks: list[Block] = []
    wall_blocks: list[Block] = []
    # text columns as integer codes while the storeys' pieces are made, a column once at the end
    # (`stack`): no object array per storey, no text inferred row by row (648 000 rows at L)
    names = TextCodes()  # storeys, walls and piers
    layout = Layout()
    combos_of, combo_names = pd.factorize(core.combination.to_numpy(), use_na_sentinel=False)
    core = core.assign(_combo=combos_of)
    # column arrays per storey, sliced from the whole tables' arrays once (a column of a
    # storey's sub-table costs a pandas look-up each time: 2 400 of them at the L tower)
    piers = piers.assign(
        _wall_k=piers.groupby(["storey", "wall_id"], sort=False).k.transform("sum"),
        _wall=names.codes(piers.wall_id.to_numpy()),  # each table's IDs coded once, not per storey
        _pier=names.codes(piers.pier_id.to_numpy()),
    )
    walls = walls.assign(_wall=names.codes(walls.wall_id.to_numpy()))
    pier_cols = ["ux", "uy", "wall_id", "_wall", "_pier", "k", "_wall_k", "h", "position"]
    piers_at = arrays_by_storey(piers, pier_cols)
    walls_at = arrays_by_storey(walls, ["wall_id", "_wall", "k", "ux", "uy"])
    sharing: dict[int, tuple] = {}  # each storey's walls' diaphragm.Sharing, by the walls' id
    case_cols = ["row", "_combo", "vx", "vy", "t", "x_v", "y_v", "n", "mx", "my"]
    cases_at = arrays_by_storey(core, case_cols + (["acc"] if "acc" in core else []))
    for storey, cs in cases_at.items():
        sp, sw = piers_at[storey], walls_at[storey]
        plan = plans[storey]
        sec, st = plan.section, plan.walls
        if plan.centre is None:
            raise diaphragm.Unstable(
                f"walls at storey {storey} cannot resist shear in both directions and torsion"
            )
        xr, yr = plan.centre
        vx, vy, t = cs["vx"], cs["vy"], cs["t"]
        xv = _filled(cs["x_v"], xr)
        yv = _filled(cs["y_v"], yr)
        m_cr = t + vy * (xv - xr) - vx * (yv - yr)
        acc = cs["acc"].astype(float) if "acc" in cs else accidental  # per row where given
        d_acc = acc * (np.abs(vy) * (sec.xmax - sec.xmin) + np.abs(vx) * (sec.ymax - sec.ymin))
        if id(st) not in sharing:  # storeys alike in plan share their walls (`storey_plans`)
            sharing[id(st)] = (st, diaphragm.Sharing(st))
        base = sharing[id(st)][1].with_accidental(vx, vy, m_cr, d_acc)
        torsion, total = base.torsion, base.total
        a, b, c = section.stress_plane(sec, cs["n"], cs["mx"], cs["my"])
        n_piece = section.piece_forces(sec, plan.piece_moments, a, b, c)  # piers x combinations
        m_in, m_oop = own_moments(plan.piece_moments, b, c, sp["ux"], sp["uy"])
        walls_here = sw["wall_id"]
        n_w, n_c, n_p = len(walls_here), len(cs["row"]), len(sp["k"])
        wall_of_pier = positions(sw["_wall"], sp["_wall"], walls_here, sp["wall_id"], names)
        member_of = np.zeros((n_w, n_p))
        member_of[wall_of_pier, np.arange(n_p)] = 1.0  # walls x piers: which pier belongs to which wall
        along = vx[:, None] * sw["ux"][None, :] + vy[:, None] * sw["uy"][None, :]
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):  # blank when not finite
            share_pct = np.where(np.abs(along) < 1e-9, np.nan, 100 * base.direct.T / along)
        rows, combos = cs["row"], cs["_combo"]
        storey_code = names.codes([storey])[0]
        layout.walls.append((n_c, n_w))
        layout.piers.append((n_c, n_p))
        case, member, grid, fixed = Block.CASE, Block.MEMBER, Block.GRID, Block.FIXED
        wall_blocks.append(
            Block(
                n_c,
                n_w,
                dict(
                    row=(case, rows),
                    storey=(fixed, storey_code),
                    combination=(case, combos),
                    wall_id=(member, sw["_wall"]),
                    k=(member, sw["k"] * 1e-3),
                    direct=(grid, base.direct.T),
                    torsion=(grid, torsion.T),
                    v=(grid, total.T),
                    share_pct=(grid, share_pct),
                    xr=(fixed, xr),
                    yr=(fixed, yr),
                    m_cr=(case, m_cr),
                    m_acc=(case, d_acc),
                    n=(grid, (member_of @ n_piece).T),
                ),
            )
        )
        k_p = sp["k"]
        share = k_p / sp["_wall_k"]
        wall_v = total[wall_of_pier, :].T  # combos x piers
        v = wall_v * share[None, :]
        h = sp["h"] / 1000
        beside = (sp["position"] > 0) & (local_moment == LOCAL_BESIDE_OPENINGS)
        m_loc = np.where(beside[None, :], np.where(m_in.T >= 0, 1.0, -1.0) * np.abs(v) * h[None, :] / 2, 0.0)
        m_pier = m_in.T + m_loc  # combos x piers
        pier_walls = sp["wall_id"]
        tiled = lambda a, n_c=n_c: np.tile(a, n_c)  # noqa: E731
        source = (
            np.array(
                core_source(tiled(pier_walls), wall_v.ravel(), tiled(share), m_in.T.ravel(), m_loc.ravel()),
                dtype=object,
            ).reshape(n_c, n_p)
            if text
            else None  # blank, made once for every row (`stack`)
        )
        pier_blocks.append(
            Block(
                n_c,
                n_p,
                dict(
                    row=(case, rows),
                    storey=(fixed, storey_code),
                    combination=(case, combos),
                    wall_id=(member, sp["_wall"]),
                    pier_id=(member, sp["_pier"]),
                    position=(member, sp["position"]),
                    k=(member, k_p),
                    share=(member, share),
                    n=(grid, n_piece.T),
                    v=(grid, v),
                    m=(grid, m_pier),
                    source=(grid, source),
                    m_curv=(grid, m_in.T),
                    m_local=(grid, m_loc),
                    m_oop=(grid, m_oop.T),
                    wall_v=(grid, wall_v),
                ),
            )
        )
    texts = dict(storey=names.values, wall_id=names.values, pier_id=names.values, combination=combo_names)
    all_text = names.all_text() and all(isinstance(c, str) for c in combo_names)
    return CoreSharing(layout=layout, parts=[(None, CoreBlocks(wall_blocks, pier_blocks, texts, all_text))])


class TextCodes:
    """Integer codes of text values (IDs, names) for tables assembled in pieces: each distinct
    value numbered once (by type and value, so 1 and '1' stay apart), `values` the texts."""

    def __init__(self) -> None:
        self.values: list = []
        self._code: dict = {}
        self._text = 0  # the values up to here are all text (negative: one is not)

    def all_text(self) -> bool:
        """Whether every value is a str (checked once per value)."""
        if 0 <= self._text < len(self.values):  # the values added since
            new = self.values[self._text :]
            self._text = len(self.values) if all(isinstance(v, str) for v in new) else -1
        return self._text >= 0

    def codes(self, values) -> np.ndarray:
        out = np.empty(len(values), dtype=np.int64)
        for i, v in enumerate(values):
            key = (type(v), v)
            code = self._code.get(key)
            if code is None:
                code = self._code[key] = len(self.values)
                self.values.append(v)
            out[i] = code
        return out


def positions(key_codes: np.ndarray, codes: np.ndarray, keys, values, names: TextCodes) -> np.ndarray:
    """`pd.Index(keys).get_indexer(values)` (each value's position among the keys, -1 where
    none) by the integer codes `names` gave them (`key_codes`, `codes`): a look-up table of a
    few codes, not an Index of text per storey. The Index itself where a key is repeated (it
    raises) or a name is not text (an Index and `TextCodes` could tell other values apart
    differently)."""
    if not names.all_text():
        return pd.Index(keys).get_indexer(values)
    at = np.full(len(names.values), -1, dtype=np.intp)
    at[key_codes] = np.arange(len(key_codes))
    if not np.array_equal(at[key_codes], np.arange(len(key_codes))):  # a key repeated
        return pd.Index(keys).get_indexer(values)
    return at[codes]


def arrays_by_storey(df: pd.DataFrame, columns: list[str]) -> dict[str, dict[str, np.ndarray]]:
    """Each storey's rows of `df` (in the table's order, storeys in order of first appearance)
    as column arrays."""
    arrays = {c: df[c].to_numpy() for c in columns}
    at = df.groupby("storey", sort=False).indices  # positions, in the table's order
    return {storey: {c: a[at[storey]] for c, a in arrays.items()} for storey in pd.unique(df.storey)}


def _filled(values: np.ndarray, default: float) -> np.ndarray:
    """A float column with its blanks (NaN, None) as `default`."""
    values = np.asarray(values, dtype=float)
    return np.where(np.isnan(values), default, values)


def core_source(wall_id, wall_v, share, m_curv, m_local) -> list[str]:
    """The 'V* from' text of pier rows whose actions come from the core sharing (columns of
    `core_actions_to_piers(...).piers`, or arrays of them)."""
    return [
        f"core: wall {w} {wv:.1f} kN x share {sh:.3f}; N* from core stress; M* = own share of core "
        f"bending {mc:.1f}" + (f" + V* h/2 {ml:.1f} = {mc + ml:.1f} kNm" if ml else " kNm")
        for w, wv, sh, mc, ml in zip(
            *(np.asarray(a).tolist() for a in (wall_id, wall_v, share, m_curv, m_local)), strict=True
        )
    ]


def core_source_of(piers: pd.DataFrame) -> list[str]:
    """`core_source` of pier rows of `core_actions_to_piers(...).piers`."""
    return core_source(piers.wall_id, piers.wall_v, piers.share, piers.m_curv, piers.m_local)


def own_moments(piece_moments: np.ndarray, b, c, ux, uy) -> tuple[np.ndarray, np.ndarray]:
    """Each piece's own moment of the stress plane sigma = a + b (x - xc) + c (y - yc) about
    the piece's own centroid, split into the wall's plane and across it; pieces x planes.

    My_i = int sigma (x - x_i) dA = b Iyy_i + c Ixy_i and Mx_i = int sigma (y - y_i) dA =
    b Ixy_i + c Ixx_i with the piece's second moments about its own centroid: the same
    curvature as the core, so M_i = M_core I_i / I_core per direction (ENGINEERING basis 6a;
    elastic bending of a plane section, any strength-of-materials text). In-plane (positive
    compresses the wall's end) = My_i ux + Mx_i uy; across the wall = Mx_i ux - My_i uy."""
    area, qx, qy, ixx0, iyy0, ixy0 = (piece_moments[:, k : k + 1] for k in range(6))
    safe = np.where(area > 0, area, 1.0)
    xi, yi = np.where(area > 0, qx / safe, 0.0), np.where(area > 0, qy / safe, 0.0)
    iyy, ixx, ixy = iyy0 - area * xi**2, ixx0 - area * yi**2, ixy0 - area * xi * yi
    b, c = np.atleast_1d(b)[None, :], np.atleast_1d(c)[None, :]
    my, mx = b * iyy + c * ixy, b * ixy + c * ixx
    ux, uy = np.asarray(ux)[:, None], np.asarray(uy)[:, None]
    return my * ux + mx * uy, mx * ux - my * uy


def text_of_codes(codes: np.ndarray, values) -> pd.api.extensions.ExtensionArray:
    """A text column of `values[codes]` (`results.text_column`), of the type pandas gives a
    column of the values present: those no row names are left out first, so that the type is
    that of exactly the column's values, found on the few of them (a value of another type
    among the rest would leave an object array for the table to scan row by row)."""
    values = np.asarray(values, dtype=object)
    used = np.bincount(codes, minlength=len(values)) > 0
    if not used.all():
        codes, values = (np.cumsum(used) - 1)[codes], values[used]
    return text_column(codes, values)


def stack_blocks(blocks: list[Block], texts: dict | None = None) -> pd.DataFrame:
    """`stack([b.rows() for b in blocks], texts=texts)`, each value written once to its place
    (a block's rows one after another) instead of rows made per block and concatenated, the
    float columns one block of the table (not copied into one by the table)."""
    if not blocks:
        return stack([], texts=texts)
    texts = texts or {}
    n = sum(b.cases * b.members for b in blocks)
    at = np.cumsum([0] + [b.cases * b.members for b in blocks])
    first = blocks[0].columns
    dtypes = {
        c: None
        if how == Block.GRID and v is None
        else np.result_type(*(np.asarray(b.columns[c][1]) for b in blocks))
        for c, (how, v) in first.items()
    }
    floats = [c for c, d in dtypes.items() if d == np.float64 and c not in texts]
    flat = np.empty((len(floats), n))
    arrays = dict(zip(floats, flat, strict=True))
    for c, d in dtypes.items():
        if c not in arrays:
            arrays[c] = np.full(n, None, dtype=object) if d is None else np.empty(n, dtype=d)
    for b, a in zip(blocks, at[:-1].tolist(), strict=True):
        for c, (how, v) in b.columns.items():
            if dtypes[c] is None:
                continue
            if how == Block.CASE:
                v = np.asarray(v)[:, None]
            elif how == Block.MEMBER:
                v = np.asarray(v)[None, :]
            arrays[c][a : a + b.cases * b.members].reshape(b.cases, b.members)[...] = v
    out = pd.DataFrame(flat.T, columns=floats, copy=False)
    for i, c in enumerate(dtypes):
        if c in floats:
            continue
        a = text_of_codes(arrays[c], texts[c]) if c in texts else arrays[c]
        out.insert(i, c, pd.Series(a, index=out.index, copy=False, dtype=a.dtype))
    return out


def stack(
    parts: list[dict[str, np.ndarray | None]], columns: list[str] | None = None, texts: dict | None = None
) -> pd.DataFrame:
    """One table from per-storey column arrays. `texts`: columns given as integer codes into
    these values (`TextCodes`), made text columns once (`results.text_column`: the type a
    column of those strings takes); a column given as None in every piece is blank (None)."""
    if not parts:
        return pd.DataFrame(columns=columns)
    texts = texts or {}
    out = {}
    for k in parts[0]:
        if parts[0][k] is None:
            out[k] = np.full(sum(len(p["row"]) for p in parts), None, dtype=object)
        elif k in texts:
            out[k] = text_of_codes(np.concatenate([p[k] for p in parts]), texts[k])
        else:
            out[k] = np.concatenate([p[k] for p in parts])
    return pd.DataFrame(out, columns=columns)
