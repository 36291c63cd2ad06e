"""AS 3600 rows are unchanged by the checks taking the `Standard` interface: detailing of a thin
single-layer wall and lintels by each model (beam, strut-and-tie, diagonal bars, no bars), every
number and word as the checks gave them before (tests/data/as3600_rows_before_interface.json,
captured from main at 398d8e9 with these inputs, before the wiring). The engineering of these
rows is tested by hand in test_as3600_detailing.py and test_lintels.py; this holds the wiring."""

import json
import math
from pathlib import Path

import builders
import pandas as pd
import pytest

from xlcore import geometry
from xlcore.checks.detailing import check_detailing
from xlcore.checks.lintels import check_lintels
from xlcore.codes import get_standard
from xlcore.mechanics import stiffness
from xlcore.model import Opening, Settings, Storey

BEFORE = json.loads((Path(__file__).parent / "data" / "as3600_rows_before_interface.json").read_text())


def _same(got, want):
    if want is None:
        return got is None or (isinstance(got, float) and math.isnan(got))
    if isinstance(want, float):
        return got == pytest.approx(want, rel=1e-12, abs=0.0)
    return got == want


@pytest.mark.parametrize("std", [None, get_standard("AS 3600:2018")], ids=["project", "explicit"])
def test_detailing_rows_as_before(std):
    st = [Storey(index=0, name="L1", level=0.0, height=3.2, slab=200.0)]
    base = dict(thickness=150.0, fc=32.0, v_spacing=400.0, v_layers=1, h_dia=10.0, h_layers=1, cover=25.0)
    geom = geometry.derive(st, [builders.wall("W1", 0.0, 0.0, 3.0, 0.0, **base)], [])
    piers = stiffness.with_stiffness(geom.piers, 0.2, "fixed-fixed")
    acts = pd.DataFrame(dict(storey=["L1"], pier_id=["W1"], n=[1000.0]))
    got = check_detailing(piers, acts, Settings(), std=std).to_dict("records")
    assert len(got) == len(BEFORE["detailing"])
    for g, w in zip(got, BEFORE["detailing"], strict=True):
        for k, v in w.items():
            assert _same(g[k], v), (w["rule"], k, g[k], v)


LST = [Storey(index=0, name="L1", level=0.0, height=3.6, slab=200.0)]
W = builders.wall("W1", 0.0, 0.0, 8.0, 0.0)
CASES = (
    {},
    dict(width=1.5),
    dict(width=1.5, diag_bars=4, diag_dia=20.0),
    dict(lintel_bars=None, lintel_dia=None, stirrup_dia=None, stirrup_legs=None, stirrup_spacing=None),
)


@pytest.mark.parametrize("i", range(len(CASES)))
def test_lintel_rows_as_before(i):
    o = dict(
        wall_id="W1", storey_from="L1", storey_to="L1", offset=2.0, width=5.0, sill=0.0, head=2.4,
        lintel_bars=3, lintel_dia=20.0, stirrup_dia=10.0, stirrup_legs=2, stirrup_spacing=150.0,
    ) | CASES[i]  # fmt: skip
    lintels = geometry.derive(LST, [W], [Opening(**o)]).lintels
    acts = pd.DataFrame(
        dict(row=[2], storey=["L1"], combination=["C1"], member=["W1-L1"], n=[0.0], v=[500.0], m=[300.0])
    )
    got = check_lintels(lintels, acts, Settings()).iloc[0]
    for k, v in BEFORE["lintels"][i].items():
        assert _same(got[k], v), (i, k, got[k], v)
