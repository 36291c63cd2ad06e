"""Result headers and summary lines that hold either standard's numbers name neither standard's
clauses: the summary's compliance columns, and under ACI 318-19 the lines above the summary
(ACI's own section numbers, written out by hand from the clause lists in codes/aci318.py)."""

import pandas as pd

from xlcore import results
from xlcore.codes import get_standard
from xlcore.results.envelope import count_lines, worst_per_check

AS, ACI = get_standard("AS 3600:2018"), get_standard("ACI 318-19")


def test_summary_headers_are_standard_neutral_and_unique():
    headers = [c.header for c in results.SUMMARY_COLUMNS]
    assert len(headers) == len(set(headers))
    for h in headers:
        assert "Section 14" not in h and "Cl " not in h and "Ch. 18" not in h, h
    by_key = {c.key: c.header for c in results.SUMMARY_COLUMNS}
    assert by_key["section14"] == "Earthquake wall rules" and by_key["u_section14"] == "U earthquake rules"
    assert by_key["detailing"] == "Detailing rules"


def _summary():
    return pd.DataFrame(
        dict(
            storey=["L1"], pier_id=["W1"], status=["FAIL"], util=[1.2], check=["x"], combination=["C1"],
            clause=["c"], detailing=["pass 0.50"], section14=["FAIL 1.20"], u_shear=[0.5], u_nm=[1.2],
            u_simplified=[0.4], u_detailing=[0.5],
        )
    )  # fmt: skip


def test_summary_lines_name_the_standards_rules():
    s = _summary()
    aci = dict(count_lines(s, s, True, ACI.symbols) + worst_per_check(s, sym=ACI.symbols))
    assert "Detailing 11.6 / 11.7 failing" in aci and "Earthquake ACI 318 Ch. 18 failing" in aci
    assert "Worst 11.5.3 compression" in aci and "Worst detailing 11.6 / 11.7" in aci
    assert not any("Cl " in k or "Section 14" in k for k in aci)
    own = dict(count_lines(s, s, False, AS.symbols) + worst_per_check(s, sym=AS.symbols))
    # AS 3600's lines as they were
    assert {"Detailing Cl 11.7 failing", "Earthquake Section 14 failing", "Worst Cl 11.5 compression",
            "Worst detailing Cl 11.7"} <= set(own)  # fmt: skip
    assert set(own) == set(dict(count_lines(s, s) + worst_per_check(s)))  # the defaults are AS 3600's
