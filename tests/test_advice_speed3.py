"""The advice search's round-2 fast paths against the code they replace: the rounds by group
numbers (`_rounds`) against the rounds by joins on text keys (`_rounds_by_keys`), and the pair
words by position against a label lookup per pair. Each test fails with its fast path broken."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from test_advice_speed import actions_for, failing_of, tower

from xlcore.checks import advice
from xlcore.model import Settings


def search_case(scale: float):
    """The test tower's single options (shuffled, some costs tied) and its pairs, with the
    action rows and the screening set the search uses."""
    piers = tower()
    s = Settings()
    acts = actions_for(piers, scale)
    failing = failing_of(piers)
    var, meta = advice._candidates(piers, failing, s)
    meta["pour"], _ = advice.pour_keys(meta.assign(**advice._pier_cols(piers, meta)), piers, s)
    screen = advice.ActionRows(advice._screening_actions(acts, failing), cheap_first=True)
    rows = advice.ActionRows(acts, cheap_first=True)
    return piers, s, var, meta, rows, screen


@pytest.mark.parametrize("scale", [1.0, 2.5, 4.0])
def test_rounds_by_group_numbers_equal_the_rounds_by_keys(scale):
    """Same utilisations, same variants, same order: singles by (storey, pier, kind) with tied
    costs and shuffled rows, and pairs by (storey, pier)."""
    piers, s, var, meta, rows, screen = search_case(scale)
    alone = meta[meta.kind.isin(advice.PIER_KINDS).to_numpy()].sample(frac=1.0, random_state=3)
    cost = alone.added_cost.to_numpy(float).copy()
    cost[np.random.default_rng(5).random(len(cost)) < 0.1] = 1000.0
    alone = alone.assign(added_cost=cost)
    group = ["storey", "pier_id", "kind"]

    def single_rows(m):
        return var.iloc[m.variant.to_numpy()]

    want = advice._rounds_by_keys(single_rows, alone, group, rows, screen, s)
    got = advice._rounds(single_rows, alone, group, rows, screen, s)
    assert (want <= 1.0).any() and (want > 1.0).any()
    pd.testing.assert_series_equal(got, want, check_exact=True)
    rows_of = advice._pair_rows(var)
    pairs = advice._pairs(meta, advice.pour_premiums(piers, s), len(var), s)
    want = advice._rounds_by_keys(rows_of, pairs, ["storey", "pier_id"], rows, screen, s)
    got = advice._rounds(rows_of, pairs, ["storey", "pier_id"], rows, screen, s)
    assert len(want)
    pd.testing.assert_series_equal(got, want, check_exact=True)


def test_rounds_with_a_missing_key_take_the_joins():
    """A NaN key: the rounds by keys' answer (pandas' rules), not an error."""
    piers, s, var, meta, rows, screen = search_case(2.5)
    alone = meta[meta.kind.isin(advice.PIER_KINDS).to_numpy()].copy()
    alone["kind"] = alone.kind.where(np.arange(len(alone)) % 7 != 0, np.nan)
    group = ["storey", "pier_id", "kind"]

    def single_rows(m):
        return var.iloc[m.variant.to_numpy()]

    want = advice._rounds_by_keys(single_rows, alone, group, rows, screen, s)
    got = advice._rounds(single_rows, alone, group, rows, screen, s)
    pd.testing.assert_series_equal(got, want, check_exact=True)


def reference_pair_words(pairs: pd.DataFrame, meta: pd.DataFrame) -> list[str]:
    """`pair_words` as it was: a label lookup of both single options per pair."""
    by = meta.set_index("variant")
    out = []
    for a, b in zip(pairs.a.tolist(), pairs.b.tolist(), strict=True):
        ra, rb = by.loc[a], by.loc[b]
        first = f"{ra.option} for the pour ({ra.pour})" if ra.kind == advice.GRADE_KIND else ra.option
        out.append(f"{first}; {rb.option}")
    return out


def test_pair_words_by_position_equal_the_lookup_by_label():
    """Every pair of the tower (grades with their pours among them), meta shuffled so that
    position and variant ID differ; an unknown variant fails loudly, as the lookup did."""
    piers, s, var, meta, rows, screen = search_case(1.0)
    pairs = advice._pairs(meta, advice.pour_premiums(piers, s), len(var), s)
    shuffled = meta.sample(frac=1.0, random_state=8)
    want = reference_pair_words(pairs, shuffled)
    assert any("for the pour" in w for w in want) and any("for the pour" not in w for w in want)
    assert advice.pair_words(pairs, shuffled) == want
    with pytest.raises(KeyError):
        advice.pair_words(pairs.assign(b=pairs.b + 10**9), shuffled)


def reference_pour_keys(rows: pd.DataFrame, piers: pd.DataFrame, settings: Settings):
    """`pour_keys` as it was: a label formatted per row."""
    import re

    m = re.search(r"over (\d+) storeys", settings.grade_pour)
    per = int(m.group(1)) if m else 1
    group = rows.storey_index.to_numpy(int) // per
    core = rows.core.fillna("").astype(str).to_numpy() if "core" in rows else np.full(len(rows), "")
    names = piers[["storey", "storey_index"]].drop_duplicates().assign(g=lambda d: d.storey_index // per)
    lo = names.sort_values("storey_index").groupby("g").storey.first()
    hi = names.sort_values("storey_index").groupby("g").storey.last()
    span = {g: (lo[g] if lo[g] == hi[g] else f"{lo[g]} to {hi[g]}") for g in lo.index}
    if settings.grade_pour.startswith("each wall"):
        who = [f"wall {w}" for w in rows.wall_id.astype(str)]
    else:
        who = [f"core {c}" if c else "the core" for c in core]
    label = [f"{w}, {span[g]}" for w, g in zip(who, group.tolist(), strict=True)]
    return pd.Series(label, index=rows.index), pd.Series(group, index=rows.index)


@pytest.mark.parametrize(
    "pour", ["the core at one storey", "each wall at one storey", "the core over 2 storeys"]
)
def test_pour_labels_once_per_pour_equal_labels_row_by_row(pour):
    """The search's option rows (shuffled, index kept), cores named, unnamed (NaN) and empty:
    the same labels and groups; no rows, no labels."""
    piers, s, var, meta, rows, screen = search_case(1.0)
    s = Settings(grade_pour=pour)
    cols = advice._pier_cols(piers, meta)
    third = np.arange(len(meta)) % 3
    cols["core"] = np.where(third == 0, "C2", np.where(third == 1, None, ""))
    opts = meta.assign(**cols).sample(frac=1.0, random_state=6)
    want = reference_pour_keys(opts, piers, s)
    got = advice.pour_keys(opts, piers, s)
    assert want[0].nunique() > 1
    for g, w in zip(got, want, strict=True):
        pd.testing.assert_series_equal(g, w, check_exact=True)
    none = advice.pour_keys(opts.iloc[0:0], piers, s)
    want = reference_pour_keys(opts.iloc[0:0], piers, s)
    pd.testing.assert_series_equal(none[0], want[0], check_exact=True)
