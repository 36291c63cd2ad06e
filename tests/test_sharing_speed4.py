"""Fast paths of the sixth speed round (issue 15: sharing actions to piers, core checks) against
the general ways they replace, bit for bit, on cases made to reach every branch."""

import numpy as np
import pandas as pd
import pytest
from demo_parts import demo_parts, same_frame


@pytest.fixture(scope="module")
def demo(demo_master):
    """The demo building (two cores) with its piers, walls and plans."""
    return demo_parts(demo_master)


def _rows(demo, shuffle: bool) -> pd.DataFrame:
    """The demo's core-actions rows; shuffled: some naming a core, all out of order (a
    storey's cases then stand apart in the table: written by index, not through a view)."""
    rows = demo[0].core_actions.copy()
    if shuffle:
        rows["core"] = ""
        rows.loc[rows.index[::5], "core"] = list(demo[3])[1]
        rows = rows.sample(frac=1.0, random_state=3).reset_index(drop=True)
    return rows


def _sharing(demo, rows: pd.DataFrame, text: bool = False, names: dict | None = None):
    """The core sharing as the pipeline makes it (its tables not made: blocks), its wall and
    pier IDs renamed by `names` in the blocks' texts."""
    from xlcore import cores, distribution

    b, piers, walls, plans = demo
    s = b.settings
    split = cores.share_among_cores(piers, plans, rows, s.accidental)
    core = cores.core_actions_to_piers(piers, walls, plans, split.actions, s.core_local_moment, text=text)
    assert core.parts is not None
    if names:
        rename = lambda vals: [names.get(v, v) for v in vals]  # noqa: E731
        core = distribution.CoreSharing(
            layout=core.layout,
            parts=[
                (
                    c,
                    distribution.CoreBlocks(
                        b.walls, b.piers, {k: rename(v) for k, v in b.texts.items()}, True
                    ),
                )
                for c, b in core.parts
            ],
        )
    return core


def _names(core) -> dict:
    """IDs renamed to reversed natural order (W2 before W10, unlike the plan's order), two of
    them of equal natural key (W01, W1: first seen first)."""
    ids = list(dict.fromkeys([*core.walls.wall_id, *core.piers.pier_id]))
    names = {v: f"W{len(ids) - i}" for i, v in enumerate(ids)}
    names[ids[0]], names[ids[1]] = "W01", "W1"
    return names


@pytest.mark.parametrize("shuffle", [False, True])
@pytest.mark.parametrize("text", [False, True])
def test_core_table_from_blocks_equals_the_tables_way(demo, shuffle, text, monkeypatch):
    """The core-sharing table written straight from the blocks equals the table made from the
    piers' and walls' tables (by their layout, and by the sort): two cores sharing the
    building's rows, rows naming a core and out of order (cases written by index), a storey's
    cases at equal steps of both cores' rows (through a view), members whose natural order is
    not the plan's (each block's members reordered), the 'V* from' text or none."""
    from xlcore import distribution, pipeline

    rows = _rows(demo, shuffle)
    names = _names(_sharing(demo, rows))
    fast_core = _sharing(demo, rows, text, names)
    blocks = [
        (k, c, b.texts, blk)
        for k, side in (("wall", "walls"), ("pier", "piers"))
        for c, b in fast_core.parts
        for blk in getattr(b, side)
    ]
    writers = pipeline._places(blocks)
    assert any(w.perm is not None for w in writers)
    if shuffle:
        assert any(not w.strided for w in writers)
    else:  # each storey's cases one after another, the other core's between them
        assert all(w.strided for w in writers) and any(w.step > w.members for w in writers)
    given = rows.row.to_numpy()[::4]
    with monkeypatch.context() as m:  # the blocks, not the tables
        m.setattr(pipeline, "_in_order", lambda *a: pytest.fail("the tables were used"))
        m.setattr(pipeline, "_sorted_order", lambda *a: pytest.fail("the tables were used"))
        fast = pipeline.core_table(fast_core, given)
    assert fast_core.parts is not None  # (the tables were not made)
    tables = _sharing(demo, rows, text, names)
    by_layout = distribution.CoreSharing(tables.piers, tables.walls, tables.layout)
    same_frame(fast, pipeline.core_table(by_layout, given))
    same_frame(fast, pipeline.core_table(distribution.CoreSharing(tables.piers, tables.walls), given))
    assert fast.core.nunique() == 2 and (fast.used != "yes").any() and (fast.used == "yes").any()
    assert fast.pier_id.isna().any() and fast.source.isna().any()


@pytest.mark.parametrize("keep", ["none", "some", "all"])
def test_pier_rows_apart_from_given_equal_the_filtered_table(demo, keep):
    """The core pier rows whose row the member actions do not cover, made from the blocks of
    those cases alone, equal the whole pier table filtered (its index aside): none left (the
    L tower: the columns' types of the whole), some, all."""
    rows = _rows(demo, True)
    every = rows.row.to_numpy()
    given = {"none": every, "some": every[::3], "all": every[:0]}[keep]
    core = _sharing(demo, rows)
    got = core.piers_apart_from(given)
    assert core.parts is not None  # (the whole tables were not made)
    whole = _sharing(demo, rows).piers
    want = whole[~whole.row.isin(given)]
    same_frame(got.reset_index(drop=True), want.reset_index(drop=True))
    assert (len(got) == 0) == (keep == "none") and (len(got) == len(whole)) == (keep == "all")


def test_tables_made_from_blocks_once_then_read(demo):
    """The tables are made from the blocks when first asked for, then they are what is read
    (a change to them counts; the blocks are dropped), and a sharing given its tables has no
    blocks."""
    from xlcore import distribution, pipeline

    rows = _rows(demo, False)
    core = _sharing(demo, rows)
    piers = core.piers
    assert core.parts is None and core.piers is piers
    core.walls["wall_id"] = core.walls.wall_id.map(lambda v: f"X{v}")
    table = pipeline.core_table(core, rows.row.to_numpy()[:0])
    assert table[table.kind == "wall"].member.str.startswith("X").all()
    assert distribution.CoreSharing(piers, core.walls).parts is None


# ------------------------------------------------------------------ core checks


def test_stack_of_blocks_equals_the_stack_of_their_rows(demo):
    """`stack_blocks` (each value written once to its place) equals `stack` of the blocks' rows:
    the demo's core-sharing blocks of both cores (text codes, a blank column, numbers per
    case, member, case x member and once) and blocks of one case."""
    from xlcore import distribution

    core = _sharing(demo, _rows(demo, True))
    for _, b in core.parts:
        for blocks, cols in (
            (b.piers, distribution.ACTION_COLUMNS + distribution.CORE_PIER_EXTRA),
            (b.walls, None),
        ):
            want = distribution.stack([x.rows() for x in blocks], cols, b.texts)
            got = distribution.stack_blocks(blocks, b.texts)
            same_frame(got, want)
            one = [x.taken(np.arange(x.cases) == x.cases - 1) for x in blocks]
            same_frame(
                distribution.stack_blocks(one, b.texts),
                distribution.stack([x.rows() for x in one], cols, b.texts),
            )


def test_core_stress_of_blocks_equals_the_stack(demo, monkeypatch):
    """The core stress table made with `stack_blocks` equals the one `stack` makes."""
    from xlcore import cores, distribution, pipeline
    from xlcore.checks import core_stress

    b, piers, _, plans = demo
    split = cores.share_among_cores(piers, plans, _rows(demo, True), b.settings.accidental)
    got = pipeline.per_core(core_stress.check_core_stress, piers, plans, split.actions, b.settings)
    with monkeypatch.context() as m:
        m.setattr(
            core_stress,
            "stack_blocks",
            lambda blocks, texts: distribution.stack([x.rows() for x in blocks], texts=texts),
        )
        want = pipeline.per_core(core_stress.check_core_stress, piers, plans, split.actions, b.settings)
    same_frame(got, want)


def test_frame_rows_equal_frames_of_each_case_alone(demo):
    """A frame of every section x angle, taken a row at a time (`Frame.row`), equals the frame
    of that case alone, and its forces and neutral-axis depths equal each case's own (the core
    N-M's one frame for the solve, key points and curves)."""
    from xlcore.checks import core_nm
    from xlcore.mechanics import nm_core

    b, piers, _, plans = demo
    core, by_storey = next(iter(plans.items()))
    storeys = list(by_storey)[:3]
    asm = core_nm.storey_assemblies(piers[piers.core == core], by_storey, storeys)
    si = np.repeat(np.arange(len(storeys)), 5)
    th = np.tile(np.linspace(-np.pi, np.pi, 5, endpoint=False), len(storeys))
    fr = nm_core.frame(asm, si, th)
    full = nm_core.full_depth(asm, si, th)
    dn = np.linspace(0.1, 0.9, len(si)) * full
    together = nm_core.forces_in(fr, dn)
    solved = nm_core.solve_dn(asm, si, th, 0.0, 1e-3 * full, full, fr=fr)
    np.testing.assert_array_equal(solved, nm_core.solve_dn(asm, si, th, 0.0, 1e-3 * full, full))
    for i in range(len(si)):
        alone = nm_core.frame(asm, si[i : i + 1], th[i : i + 1])
        row = fr.row(i)
        for k, v in vars(alone).items():
            np.testing.assert_array_equal(getattr(row, k), v)
        got = nm_core.forces_in(row, dn[i : i + 1])
        for a, want in zip(
            got, nm_core.forces(asm, si[i : i + 1], th[i : i + 1], dn[i : i + 1]), strict=True
        ):
            np.testing.assert_array_equal(a, want)
        assert all(t[i] == a[0] for t, a in zip(together, got, strict=True))


# ------------------------------------------------------------------ member actions


def _runs_cases():
    rng = np.random.default_rng(4)
    storeys = np.repeat(np.array([f"L{i:02d}" for i in range(30)], dtype=object), 200)
    blanks = storeys.copy()
    blanks[[5, 6, 7, 400, 401]] = [np.nan, np.nan, None, None, np.nan]  # blanks inside runs
    mixed = np.repeat(np.array([1, 1.0, True, "1", 2, 2.0, "L"], dtype=object), 150)
    again = np.concatenate([storeys[:3000], storeys[:3000]])  # a value's runs apart
    short = np.array([f"P{i % 7}" for i in range(5000)], dtype=object)  # every row a run
    na = storeys.copy()
    na[10] = pd.NA
    return [storeys, blanks, mixed, again, short, na, rng.integers(0, 5, 3000), storeys[:40]]


@pytest.mark.parametrize("case", range(8))
def test_factorize_by_runs_equals_factorize(case, monkeypatch):
    """Codes and distinct values by runs of equal neighbours equal `pd.factorize`: long runs,
    blanks (NaN, None) inside runs, numbers equal across types, a value's runs apart, every
    row a run (hashed as before), pd.NA (no answer to !=: hashed as before), numbers, few rows."""
    from xlcore import distribution

    values = _runs_cases()[case]
    factorize, sizes = pd.factorize, []

    def counted(v, *a, **k):
        sizes.append(len(v))
        return factorize(v, *a, **k)

    with monkeypatch.context() as m:
        m.setattr(distribution.pd, "factorize", counted)
        codes, uniques = distribution.factorize_runs(values)
    want_codes, want_uniques = factorize(np.asarray(values))
    np.testing.assert_array_equal(codes, want_codes)
    assert len(uniques) == len(want_uniques)
    if values.dtype == object:  # the first rows' values themselves
        assert all(a is b for a, b in zip(uniques, want_uniques, strict=True))
    np.testing.assert_array_equal(uniques, want_uniques)
    assert (sizes[0] < len(values)) == (case in (0, 1, 2, 3)), sizes  # runs hashed, or every row


def test_pier_columns_gathered_in_their_types():
    """Pier columns taken for action rows as they are (text, numbers, objects) equal the
    columns assigned from gathered arrays, types included (a text column with a blank)."""
    from xlcore import distribution

    piers = pd.DataFrame(
        dict(
            wall_id=pd.Series(["W1", "W2", np.nan, "W3"]),
            k=[1.0, 2.5, -0.0, 4.0],
            n=[1, 2, 3, 4],
            obj=np.array([1, "a", None, 2.5], dtype=object),
            strs=pd.Series(["a", "b", "c", "d"], dtype="string"),  # another text type: inferred
        )
    )
    rows = np.array([3, 0, 2, 2, 1])
    base = pd.DataFrame(dict(x=np.arange(5)))
    want = base.assign(**{c: piers[c].to_numpy()[rows] for c in piers.columns})
    got = base.assign(
        **{c: pd.Series(distribution._gathered(piers[c], rows), index=base.index) for c in piers.columns}
    )
    same_frame(got, want)


def _on_curves_by_mask(target, section, dn_curve, dmx_curve, dmy_curve):
    """The design curves read as before: every (case, angle) pair compared with every curve."""
    from xlcore.checks import core_nm

    a = core_nm.ANGLES
    kk = np.repeat(section, a) * a + np.tile(np.arange(a), len(section))
    px, py = np.empty(len(kk)), np.empty(len(kk))
    for row in np.unique(kk):
        here = kk == row
        px[here] = np.interp(target[here], dn_curve[row], dmx_curve[row])
        py[here] = np.interp(target[here], dn_curve[row], dmy_curve[row])
    return px, py


def test_design_curves_read_per_section_and_angle_equal_the_masks():
    """Points on the N-M design curves found per section's cases and angle equal the curves
    read by a mask of every pair: three sections (one no case uses), cases in any order,
    targets below, on and beyond the curves' ends."""
    from xlcore.checks import core_nm

    rng = np.random.default_rng(6)
    a, samples, cases = core_nm.ANGLES, 20, 300
    dn_curve = np.sort(rng.uniform(0, 1e7, (3 * a, samples)), axis=1)
    dmx_curve, dmy_curve = rng.normal(0, 1e9, (2, 3 * a, samples))
    section = rng.choice([0, 2], cases)
    target = rng.uniform(-1e6, 1.1e7, cases * a)
    target[:5] = dn_curve[section[0] * a, 0]
    got = core_nm._on_curves(target, section, dn_curve, dmx_curve, dmy_curve)
    want = _on_curves_by_mask(target, section, dn_curve, dmx_curve, dmy_curve)
    for g, w in zip(got, want, strict=True):
        np.testing.assert_array_equal(g, w)
