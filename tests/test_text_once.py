"""Working text made once per distinct set of its numbers and spread to the rows (issue 15 §1)
against the same text made row by row: byte for byte. A consistency check inside the project;
the text's numbers are the checks' own, tied to outside references in their test modules."""

import builders
import numpy as np
import pandas as pd
import pytest

from xlcore import geometry
from xlcore.checks import shear
from xlcore.mechanics import stiffness
from xlcore.model import Opening, Settings

STOREYS = [builders.storey("L1"), builders.storey("L2", index=1, level=3.2)]


def piers():
    walls = [
        builders.wall("W1", 0, 0, 3.0, 0, storeys=("L1", "L2")),
        builders.wall("W2", 0, 4, 6.0, 4, storeys=("L1", "L2"), thickness=250.0),
    ]
    door = Opening(wall_id="W2", storey_from="L1", storey_to="L2", offset=2.0, width=1.2, sill=0.0, head=2.4)
    return stiffness.with_stiffness(geometry.derive(STOREYS, walls, [door]).piers, 0.2, "fixed-fixed")


def actions(p):
    rows = [
        dict(storey=r.storey, combination=f"C{c}", wall_id=r.wall_id, pier_id=r.pier_id, position=0, k=1.0,
             share=1.0, n=100.0 * c, v=50.0 + 30.0 * c, m=80.0 * c, m_out=np.nan, source="given", origin=0)
        for c in range(5)
        for r in p.itertuples()
    ]  # fmt: skip
    return pd.DataFrame(rows).assign(row=lambda d: np.arange(len(d)))


@pytest.mark.parametrize("basis", ["overall wall height", "storey clear height", "opening height"])
def test_hw_lw_basis_text_once_per_pier_equals_row_by_row(basis):
    p = piers()
    s = Settings(shear_height=basis)
    out = shear.check_pier_shear(p, actions(p), s)
    beside = out.pier_id.str.contains("-").to_numpy()  # W2-1, W2-2 stand beside the door
    assert beside.any() and (~beside).any()
    h_whole = out.H_wall if basis == "overall wall height" else out.Hc
    by_row = shear._basis_text(
        basis, out.Hw.to_numpy(float), out.Lw.to_numpy(float), np.asarray(h_whole, float),
        out.wall_length.to_numpy(float) * 1000.0, beside,
        out.hw_lw.to_numpy() > out.Hw.to_numpy(float) / out.Lw.to_numpy(float),
    )  # fmt: skip
    assert out.hw_basis.tolist() == by_row
