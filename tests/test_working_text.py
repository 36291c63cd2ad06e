"""The working text a checker reads beside each result: every number it names is the number in
the row's own cells (issue 12 §3). Protects against a working column that drifts from the
values it explains, or that names a ratio without substituting its numbers.

Each rule below says which cells a working column must quote and in which format the text
quotes them; rows across the demo (worst, middle, first) are checked, on every result sheet
that carries working text.
"""

from __future__ import annotations

import pandas as pd
import pytest

from xlcore import results
from xlcore.pipeline import compute, load


def _f(fmt):
    return lambda x: format(x, fmt)


def _abs(fmt):
    return lambda x: format(abs(x), fmt)


def _int(x):
    return f"{x:.0f}"


F1, F2, F3 = _f(".1f"), _f(".2f"), _f(".3f")


# sheet -> [(working column, row filter or None, [(value column, formatter)])]
RULES: dict[str, list] = {
    results.SHEAR_SHEET: [
        ("f_vuc", None, [("eq1", F1), ("eq2", F1), ("floor", F1)]),
        ("f_vu", None, [("vus", F1), ("vu_max", F1), ("phi_vu", F1), ("phi", F2)]),
        ("f_util", None, [("v", _abs(".1f")), ("phi_vu", F1), ("util", F3)]),
    ],
    results.AXIAL_SHEET: [
        ("f_nm", None, [("m_design", F1), ("n", F1), ("util", F3), ("u_fixed_n", F3)]),
        (
            "f_s",
            lambda t: t.status_s.isin([results.PASS, results.FAIL]),
            [
                ("hwe", _int),
                ("e", F1),
                ("ea", F1),
                ("phi_nu_s", F1),
                ("n_end", F1),
                ("util_s", F3),
            ],
        ),
    ],
    results.CORE_STRESS_SHEET: [
        ("working", None, [("tension", F1), ("as_req", _int), ("as_prov", _int), ("sigma_max", F2)]),
    ],
    results.SECTION14_SHEET: [
        ("working", lambda t: t.rule == "both faces", [("value", _int)]),
        ("working", lambda t: t.rule.str.endswith("ratio"), [("value", _f(".5f")), ("limit", _f("g"))]),
        ("working", lambda t: t.rule == "Hwe/tw", [("value", F1), ("limit", _f("g"))]),
        (
            "working",
            lambda t: (t.rule == "end-zone trigger") & (t.status != results.NOT_APPLICABLE),
            [("value", F2), ("limit", F2)],
        ),
        ("working", lambda t: t.rule == "end-zone ties", [("limit", _int)]),
    ],
    results.CORES_SHEET: [
        ("working", None, [("vx", F1), ("vy", F1), ("n", F1), ("my", F1), ("mx", F1)]),
    ],
    results.CORE_NM_SHEET: [
        ("working", None, [("n", _int), ("phi_mu", _int), ("m_res", _int), ("util", F3)]),
        ("working", lambda t: t.n >= 0, [("phi_nuo", _int)]),
        ("working", lambda t: t.n < 0, [("phi_nuot", _int)]),
    ],
    results.LINTELS_SHEET: [
        (
            "working",
            lambda t: t.model == "strut-and-tie",
            [
                ("v", _abs(".1f")),
                ("theta", F1),
                ("beta_s", F3),
                ("c_star", F1),
                ("strut_cap", F1),
                ("node_cap", F1),
                ("t_star", F1),
                ("tie_cap", F1),
                ("u_strut", F3),
                ("util", F3),
            ],
        ),
        (
            "working",
            lambda t: t.model == "diagonal bars",
            [
                ("v", _abs(".1f")),
                ("alpha", F1),
                ("A_sd", _int),
                ("vu_diag", F1),
                ("v_cap", F1),
                ("phi_vu", F1),
                ("util", F3),
            ],
        ),
    ],
}


@pytest.fixture(scope="module")
def demo_sheets(demo_master):
    building, findings = load(demo_master)
    return {s.name: s.table for s in compute(building, findings).sheets}


def _rows(table: pd.DataFrame) -> pd.DataFrame:
    """The worst row by utilisation, one from the middle, and the first."""
    picks = {0, len(table) // 2}
    if "util" in table:
        picks.add(int(table.util.to_numpy().argmax()))
    return table.iloc[sorted(picks)]


@pytest.mark.parametrize("sheet", list(RULES))
def test_working_text_quotes_the_rows_own_numbers(demo_sheets, sheet):
    table = demo_sheets[sheet]
    assert len(table), f"{sheet} has no rows on the demo"
    checked = 0
    for column, where, quoted in RULES[sheet]:
        rows = table[where(table)] if where is not None else table
        for _, row in _rows(rows).iterrows() if len(rows) else []:
            text = row[column]
            for key, show in quoted:
                assert show(row[key]) in text, f"{sheet} {column}: {key} = {show(row[key])} not in {text!r}"
                checked += 1
    assert checked >= 6


def test_core_nm_axial_ratio_has_its_numbers(demo_sheets):
    """No bare 'N*/phiN': the axial ratio is written with both numbers (issue 12 §3)."""
    text = " ".join(demo_sheets[results.CORE_NM_SHEET].working)
    assert "N*/phiN)" not in text and "N*/phiNuo = " in text
