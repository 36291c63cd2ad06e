"""The advice search's round-7 fast path against what it replaces, bit for bit (issue 15): the
confirmations leave out the action rows the screen holds (`ActionRows.holds`, `_confirm`),
since a variant confirmed passed the screen, whose axial checks ran on those rows.

- the screen's positions (`_screening`) name the full rows the screen took;
- `_confirm` with the screen's rows left out equals `_confirm` over every row, on every
  variant that passed the screen, under both standards; and leaving them out does change the
  axial answer over the rows left (so the screen's value is what keeps the result: the test
  fails where `_confirm` drops it, tried);
- the search as a whole: `advise` with the rows left out equals `advise` without (the fast
  path disabled by giving the screen no positions), bit for bit.

Each fails with its fast path broken (tried: the screen's positions shifted by one; the
screened value left out of the confirmation's maximum; the mask inverted).
"""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from test_advice_speed import actions_for, failing_of, tower

from xlcore.checks import advice
from xlcore.model import Settings

STANDARDS = ["AS 3600:2018", "ACI 318-19"]


def search(standard, scale):
    """The search's inputs on the two-storey tower: settings, variant rows and options, the
    full and screen ActionRows as `advise` makes them (the screen's `holds` set)."""
    s = Settings(standard=standard)
    piers = tower()
    failing = failing_of(piers)
    var, meta = advice._candidates(piers, failing, s)
    full = advice.ActionRows(actions_for(piers, scale), cheap_first=True)
    frame, where = advice._screening(full.frame, failing, full)
    screen = advice.ActionRows(frame, cheap_first=True)
    screen.holds = np.zeros(len(full), dtype=bool)
    screen.holds[where] = True
    return s, var, meta, full, screen, where


@pytest.mark.parametrize("standard", STANDARDS)
def test_screen_positions_name_the_rows_it_took(standard):
    s, var, meta, full, screen, where = search(standard, 2.0)
    assert 0 < len(where) < len(full)
    assert (np.diff(where) > 0).all()
    pd.testing.assert_frame_equal(
        full.frame.take(where).reset_index(drop=True), screen.frame.reset_index(drop=True), check_exact=True
    )
    # the screen itself as `_screening_actions` gives it
    want = advice._screening_actions(full.frame, failing_of(tower()), full).reset_index(drop=True)
    pd.testing.assert_frame_equal(screen.frame, want, check_exact=True)


@pytest.mark.parametrize("standard", STANDARDS)
@pytest.mark.parametrize("scale", [0.6, 1.0, 2.0])
def test_confirmation_without_the_screen_rows_equals_every_row(standard, scale):
    s, var, meta, full, screen, where = search(standard, scale)

    def rows_of(m):
        return var.iloc[m.variant.to_numpy()]

    screened = meta.variant.map(advice._utilisation(rows_of(meta), meta, screen, s)).to_numpy(float)
    passed = meta[~(screened > 1.0)]
    on_screen = screened[~(screened > 1.0)]
    assert len(passed) > 20
    fast = advice._confirm(rows_of, passed, on_screen, full, s, screen)
    holds, screen.holds = screen.holds, None
    every = advice._confirm(rows_of, passed, on_screen, full, s, screen)
    pd.testing.assert_series_equal(fast, every, check_exact=True)
    # the rows left out matter: over the other rows alone some variant's axial worst is lower
    # (its worst row is in the screen), so only the screened value keeps the result
    row, which = full.rows_of(passed)
    keep = ~holds[row]
    left = advice._utilisation_at(rows_of(passed), passed, full, s, True, row[keep], which[keep])
    whole = advice._utilisation(rows_of(passed), passed, full, s, only_axial=True)
    assert (left.reindex(whole.index).fillna(-np.inf) < whole).any()


@pytest.mark.parametrize("standard", STANDARDS)
@pytest.mark.parametrize("scale", [0.8, 2.5])
def test_search_equals_the_search_over_every_row(standard, scale, monkeypatch):
    s = Settings(standard=standard)
    piers = tower()
    acts = actions_for(piers, scale)
    summary = failing_of(piers)
    fast = advice.advise(piers, acts, summary, s)
    screening = advice._screening
    monkeypatch.setattr(advice, "_screening", lambda *a, **k: (screening(*a, **k)[0], None))
    every = advice.advise(piers, acts, summary, s)
    assert len(fast) and (fast.util <= 1.0).any()
    pd.testing.assert_frame_equal(fast, every, check_exact=True)
