"""The rule tables of AS 3600 Section 14 and ACI 318 Chapter 18 are built by one set of helpers
(xlcore/checks/__init__.py): their columns, the empty table and the summary's worst-rule words.
The expected values are written out by hand."""

import pandas as pd

from xlcore.checks import (
    RULE_COLUMNS,
    empty_rules,
    rule_columns,
    rule_rows,
    section14,
    special_walls,
    worst_rule_text,
)


def test_columns_of_both_tables():
    assert section14.COLUMNS == RULE_COLUMNS
    assert special_walls.COLUMNS == (
        "storey", "storey_index", "pier_id", "wall_id", "combination", "rule", "basis", "value", "kind",
        "limit", "unit", "util", "status", "working",
    )  # fmt: skip
    assert rule_columns() == RULE_COLUMNS
    assert list(empty_rules(special_walls.COLUMNS, True).columns) == [*special_walls.COLUMNS, "clause"]
    assert list(empty_rules(RULE_COLUMNS, False).columns) == ["pier_id", "util"]


def test_rows_and_the_worst_rule_in_words():
    p = pd.DataFrame(
        dict(storey=["L1", "L2"], storey_index=[0, 1], pier_id=["W1", "W1"], wall_id=["W1", "W1"])
    )
    a = rule_rows(
        p, "Hwe/tw", [18.0, 22.0], 20.0, "max", "-", ["pass", "FAIL"], [0.9, 1.1], lambda: ["x", "y"], "b",
        True,
    )  # fmt: skip
    assert set(a.columns) == set(RULE_COLUMNS) and a.working.tolist() == ["x", "y"]
    assert a.kind.tolist() == ["at most", "at most"] and a.limit.tolist() == [20.0, 20.0]
    assert worst_rule_text(a) == "worst 1.100 FAIL at W1, L2 (Hwe/tw; 1 of 2 rule rows fail)"
    b = rule_rows(
        p, "shear", 1.0, 2.0, "max", "kN", ["pass", "n/a"], 0.5, lambda: [], "b", False, combo=["E1", "E2"]
    )
    assert set(b.columns) == set(rule_columns(per_combination=True))
    assert b.working.tolist() == ["", ""]  # no working asked for
    assert worst_rule_text(b) == "worst 0.500 pass at W1, L1 (shear, E1; 0 of 1 rule rows fail)"
    assert worst_rule_text(b.assign(combination="(all)"), every="(all)") == (
        "worst 0.500 pass at W1, L1 (shear; 0 of 1 rule rows fail)"
    )
    assert worst_rule_text(b[b.status == "n/a"]) is None


def test_finish_rules_orders_piers_then_rules_and_keeps_pass_fail_for_the_search():
    from xlcore.checks import finish_rules

    p = pd.DataFrame(dict(storey=["L1", "L1", "L2"], storey_index=[0, 0, 1], pier_id=["A", "B", "A"]))
    out = pd.DataFrame(
        dict(
            storey=["L1", "L2", "L1", "L1"],
            storey_index=[0, 1, 0, 0],
            pier_id=["B", "A", "A", "A"],
            rule=["r2", "r1", "r2", "r1"],
            status=["pass", "FAIL", "n/a", "pass"],
            util=[0.5, 1.2, float("nan"), 0.7],
        )
    )
    done = finish_rules(out.copy(), p, True, {"r1": "c1", "r2": "c2"}, ("r1", "r2"))
    # storeys top down, then the pier table's order, then the rules' order (written out by hand)
    assert list(zip(done.storey, done.pier_id, done.rule, done.clause, strict=True)) == [
        ("L2", "A", "r1", "c1"),
        ("L1", "A", "r1", "c1"),
        ("L1", "A", "r2", "c2"),
        ("L1", "B", "r2", "c2"),
    ]
    search = finish_rules(out.copy(), p, False, {}, ("r1", "r2"))
    assert list(search.columns) == ["pier_id", "util"] and search.util.tolist() == [0.5, 1.2, 0.7]
