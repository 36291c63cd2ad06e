"""Invalid workbooks: each is refused with the exact Sheet!Cell and the gist of the problem,
and checking never changes the file. Protects: an engineer who types a wrong value is told
exactly where, and nothing is computed from bad input."""

import datetime as dt
import hashlib

import openpyxl
import pytest
from conftest import column_letter as col
from conftest import edit
from typer.testing import CliRunner

from xlcore import layout
from xlcore.cli import app
from xlcore.diagnostics import InputInvalid
from xlcore.pipeline import load

W, S, OP, A, C, P, EZ = (
    layout.WALLS,
    layout.STOREYS,
    layout.OPENINGS,
    layout.MEMBER_ACTIONS,
    layout.CORE_ACTIONS,
    layout.PROJECT,
    layout.END_ZONES,
)


def at(t, key, row):
    return (t.name, f"{col(t, key)}{row}")


def where(t, key, row):
    name = t.name if " " not in t.name else f"'{t.name}'"
    return f"{name}!{col(t, key)}{row}"


def setting_row(key):
    return 2 + [s.key for s in P.settings].index(key)


# (id, changes to the demo, expected Sheet!Cell, words the message must contain)
CASES = [
    ("thickness in metres", {at(W, "thickness", 2): 0.25}, where(W, "thickness", 2), "did you enter metres"),
    ("f'c below range", {at(W, "fc", 2): 15}, where(W, "fc", 2), "17 to 100"),
    # AS 3600:2018 covers 20 to 100 MPa (Cl 1.1.2, from memory); 18 MPa is only ACI 318-19's
    ("f'c below AS 3600 grades", {at(W, "fc", 2): 18}, where(W, "fc", 2), "outside what AS 3600:2018 covers"),
    ("fsy above range", {at(W, "fsy", 2): 1000}, where(W, "fsy", 2), "250 to 600"),
    ("number with unit", {at(W, "thickness", 2): "180mm"}, where(W, "thickness", 2), "number only"),
    ("text for number", {at(W, "thickness", 2): "thick"}, where(W, "thickness", 2), "expected a number"),
    ("nan typed as text", {at(W, "cover", 2): "nan"}, where(W, "cover", 2), "expected a number"),
    ("negative thickness", {at(W, "thickness", 3): -200}, where(W, "thickness", 3), "75 to 1500"),
    ("unknown storey in walls", {at(W, "storey_from", 2): "L99"}, where(W, "storey_from", 2), "storey name"),
    (
        "wall range upside down",
        {at(W, "storey_to", 2): "GF", at(W, "storey_from", 2): "L4"},
        where(W, "storey_to", 2),
        "below the from storey",
    ),
    ("zero-length wall", {at(W, "x2", 2): 0.0}, where(W, "x2", 2), "length of 0 mm"),
    ("wall ranges overlap", {at(W, "storey_from", 3): "L4"}, where(W, "storey_from", 3), "overlap"),
    ("wall ranges leave a gap", {at(W, "storey_from", 3): "L6"}, where(W, "storey_from", 3), "gap"),
    ("three bar layers", {at(W, "v_layers", 2): 3}, where(W, "v_layers", 2), "1 to 2"),
    ("fractional layers", {at(W, "h_layers", 2): 1.5}, where(W, "h_layers", 2), "whole number"),
    ("blank wall ID", {at(W, "wall_id", 2): None}, where(W, "wall_id", 2), "blank"),
    ("duplicate storey", {at(S, "name", 3): "GF"}, where(S, "name", 3), "used twice"),
    ("levels not increasing", {at(S, "level", 3): -1.0}, where(S, "level", 3), "lowest first"),
    ("height disagrees with next level", {at(S, "height", 2): 4.5}, where(S, "height", 2), "next floor"),
    ("height in millimetres", {at(S, "height", 3): 3150}, where(S, "height", 3), "did you enter millimetres"),
    ("negative slab", {at(S, "slab", 2): -5}, where(S, "slab", 2), "0 to 2000"),
    ("opening in unknown wall", {at(OP, "wall_id", 2): "LiftQ"}, where(OP, "wall_id", 2), "wall ID"),
    ("opening past wall end", {at(OP, "offset", 3): 5.5}, where(OP, "width", 3), "past the end"),
    ("openings overlap", {at(OP, "offset", 3): 1.0}, where(OP, "offset", 3), "overlaps the opening of row 2"),
    ("opening taller than clear height", {at(OP, "head", 2): 3.5}, where(OP, "head", 2), "clear height"),
    ("sill above head", {at(OP, "sill", 2): 2.5}, where(OP, "sill", 2), "below the head"),
    (
        "opening where the wall is not",
        {at(W, k, 4): None for k in W.keys} | {at(W, "storey_to", 3): "L9"},
        where(OP, "storey_from", 2),
        "does not exist at storey L10",
    ),
    # lintel reinforcement (Openings rows 2-3: lift doors with diagonal groups; row 4: riser)
    ("diagonal bars without size", {at(OP, "diag_dia", 2): None}, where(OP, "diag_dia", 2), "found blank"),
    ("diagonal size without bars", {at(OP, "diag_bars", 3): None}, where(OP, "diag_bars", 3), "is given"),
    ("lintel bars without size", {at(OP, "lintel_dia", 4): None}, where(OP, "lintel_dia", 4), "found blank"),
    (
        "fitments without spacing",
        {at(OP, "stirrup_spacing", 4): None},
        where(OP, "stirrup_spacing", 4),
        "found blank",
    ),
    ("diagonal bars below range", {at(OP, "diag_bars", 2): 1}, where(OP, "diag_bars", 2), "2 to 20"),
    ("diagonal bar size in metres", {at(OP, "diag_dia", 2): 0.024}, where(OP, "diag_dia", 2), "metres"),
    (
        "diagonal groups deeper than the lintel",
        # head at the clear height leaves D = slab = 200 mm above the door from L1; groups of N40
        # in N20 ties sit 30 + 20 + 1.5 x 40 = 110 mm from each face: 2 x 110 > 200
        {
            at(OP, "head", 2): 3.0,
            at(OP, "storey_to", 2): "L13",
            at(OP, "diag_dia", 2): 40,
            at(OP, "stirrup_dia", 2): 20,
        },
        where(OP, "diag_dia", 2),
        "deeper than",
    ),
    ("unknown member", {at(A, "member", 2): "LiftS-9"}, where(A, "member", 2), "no such wall, pier"),
    ("unknown storey in actions", {at(A, "storey", 2): "L20"}, where(A, "storey", 2), "storey name"),
    ("duplicate action row", {at(A, "member", 3): "LiftE"}, where(A, "member", 3), "also given in row 2"),
    (
        "wall and its piers both given",  # rows 5-7: GF, 1.35G, LiftS-1..3
        {at(A, "member", 6): "LiftS"},
        where(A, "member", 6),
        "both for the whole wall and for its piers",
    ),
    ("force with unit", {at(A, "n", 2): "12 kN"}, where(A, "n", 2), "number only"),
    ("error value in input", {at(A, "v", 2): "#DIV/0!"}, where(A, "v", 2), "error value #DIV/0!"),
    ("date where a number belongs", {at(A, "m", 2): dt.datetime(2026, 3, 4)}, where(A, "m", 2), "date"),
    (
        "phi out of range",
        {(P.name, f"B{setting_row('phi_shear')}"): 1.5},
        f"Project!B{setting_row('phi_shear')}",
        "0.5 to 1",
    ),
    (
        "strut phi out of range",
        {(P.name, f"B{setting_row('phi_strut')}"): 1.2},
        f"Project!B{setting_row('phi_strut')}",
        "0.4 to 0.9",
    ),
    (
        "beta_s above one",
        {(P.name, f"B{setting_row('lintel_beta_s')}"): 1.5},
        f"Project!B{setting_row('lintel_beta_s')}",
        "0.3 to 1",
    ),
    (
        "unknown standard",
        {(P.name, f"B{setting_row('standard')}"): "EC2"},
        f"Project!B{setting_row('standard')}",
        "one of: AS 3600:2018",
    ),
    (
        "price list that does not parse",
        {(P.name, f"B{setting_row('concrete_prices')}"): "32-260"},
        f"Project!B{setting_row('concrete_prices')}",
        "expected pairs like",
    ),
    (
        "duplicate core action",
        {at(C, "combination", 3): "1.35G"},
        where(C, "combination", 3),
        "also given in row 2",
    ),
    (
        "header unit changed",
        {(W.name, f"{col(W, 'thickness')}1"): "Thickness [m]"},
        f"Walls!{col(W, 'thickness')}1",
        "reads this column in mm",
    ),
    (
        "required column missing",
        {(W.name, f"{col(W, 'fsy')}1"): "Steel"},
        "Walls!1:1",
        "'fsy [MPa]' not found",
    ),
]


@pytest.mark.parametrize("changes,cell,gist", [c[1:] for c in CASES], ids=[c[0] for c in CASES])
def test_invalid_input_names_cell_and_problem(demo_book, changes, cell, gist):
    edit(demo_book, changes)
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    found = [str(f) for f in info.value.findings.errors]
    assert any(f.startswith(f"{cell}: ") and gist in f for f in found), found


def test_corpus_is_large_enough():
    assert len(CASES) >= 25


def _remove_sheet(path, name):
    wb = openpyxl.load_workbook(path)
    del wb[name]
    wb.save(path)


def _rename_sheet(path, old, new):
    wb = openpyxl.load_workbook(path)
    wb[old].title = "temporary name"  # openpyxl would de-duplicate a case-only rename
    wb["temporary name"].title = new
    wb.save(path)


def test_missing_sheet(demo_book):
    _remove_sheet(demo_book, OP.name)
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    assert any(f.sheet == OP.name and "is missing" in f.message for f in info.value.findings.errors)


def test_renamed_sheet_is_pointed_out(demo_book):
    _rename_sheet(demo_book, W.name, "WALLS")
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    assert any("found a sheet named 'WALLS'" in f.message for f in info.value.findings.errors)


def test_all_errors_reported_in_one_pass(demo_book):
    edit(demo_book, {at(W, "fc", 2): 15, at(S, "name", 3): "GF", at(A, "n", 5): "x"})
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    wheres = {f.where for f in info.value.findings.errors}
    assert {where(W, "fc", 2), where(S, "name", 3), where(A, "n", 5)} <= wheres


def test_columns_may_be_reordered(demo_book):
    """Columns are found by header, so a moved column still reads (documented tolerance)."""
    wb = openpyxl.load_workbook(demo_book)
    ws = wb[W.name]
    a, b = W.keys.index("fc") + 1, W.keys.index("fsy") + 1
    for row in ws.iter_rows():
        row[a - 1].value, row[b - 1].value = row[b - 1].value, row[a - 1].value
    wb.save(demo_book)
    building, _ = load(demo_book)
    assert building.walls[0].fc == 50.0 and building.walls[0].fsy == 500.0


def test_check_leaves_file_bytes_unchanged_and_exits_1(demo_book):
    edit(demo_book, {at(W, "fc", 2): 15})
    before = hashlib.sha256(demo_book.read_bytes()).hexdigest()
    result = CliRunner().invoke(app, ["check", str(demo_book)])
    assert result.exit_code == 1
    assert where(W, "fc", 2) in result.output
    assert hashlib.sha256(demo_book.read_bytes()).hexdigest() == before
    result = CliRunner().invoke(app, ["compute", str(demo_book)])
    assert result.exit_code == 1 and "nothing was written" in result.output
    assert hashlib.sha256(demo_book.read_bytes()).hexdigest() == before


def test_unit_slip_warning_text_and_numbers_as_text_accepted(demo_book):
    """Numbers stored as text (' 250 ') are accepted; trimmed text IDs match."""
    edit(demo_book, {at(W, "thickness", 2): " 250 ", at(A, "member", 2): " LiftE "})
    building, findings = load(demo_book)
    assert building.walls[0].thickness == 250.0
    assert findings.errors == []


def test_unusual_but_legal_input_warns(demo_book):
    # row 4 (the top run, which has no end zones: a cover this large would leave no room for
    # their bars): 200 mm wall, N12 vertical and N10 horizontal in 2 layers:
    # 2 x 80 + 2 x (12 + 10) = 204 mm > 200 (hand evaluation)
    edit(demo_book, {at(W, "fc", 2): 45, at(W, "cover", 4): 80})
    building, findings = load(demo_book)
    text = [str(f) for f in findings.warnings]
    assert any(t.startswith(where(W, "fc", 2)) and "not a standard grade" in t for t in text), text
    assert any(t.startswith(where(W, "cover", 4)) and "cover and bars take" in t for t in text), text


def test_diagonal_groups_wider_than_the_wall_warn(demo_book):
    # 12 bars per group in two layers: 6 side by side with clear gaps of one bar, (2 x 6 - 1) x 24
    # = 264 mm, but a 250 mm wall with 30 mm cover leaves 190 mm (hand evaluation)
    edit(demo_book, {at(OP, "diag_bars", 2): 12})
    _, findings = load(demo_book)
    text = [str(f) for f in findings.warnings]
    cell = where(OP, "diag_bars", 2)
    assert any(t.startswith(cell) and "264 mm" in t and "190 mm" in t for t in text), text


def test_core_actions_on_walls_that_cannot_take_torsion(tmp_path):
    """Two parallel walls only: no stiffness across them or in torsion (statics)."""
    from xlcore.workbook.template import write_template

    path = tmp_path / "parallel.xlsx"
    write_template(path)
    wb = openpyxl.load_workbook(path)
    wb[S.name].append(["GF", 0.0, 3.0, 200])
    for wid, y in (("A", 0.0), ("B", 4.0)):
        wb[W.name].append([wid, 0.0, y, 5.0, y, 200, "GF", "GF", 40, 500, 12, 200, 2, 12, 200, 2, 30])
    wb[C.name].append(["GF", "wind", 100, 50, 0, 0, 0, 0])
    wb.save(path)
    with pytest.raises(InputInvalid) as info:
        load(path)
    assert any(
        str(f).startswith(f"'Core actions'!{col(C, 'storey')}2: the walls at storey GF (A, B)")
        for f in info.value.findings.errors
    )


def test_typing_error_in_one_wall_does_not_hide_an_opening_overrunning_another(demo_book):
    """Issue 12: cross-sheet checks run on every row that parsed (LiftE's bad thickness, LiftS's
    opening past its end: both in one pass)."""
    edit(demo_book, {at(W, "thickness", 5): "x", at(OP, "offset", 2): 5.5})
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    found = {f.where: f.message for f in info.value.findings.errors}
    assert where(W, "thickness", 5) in found
    assert "past the end" in found.get(where(OP, "width", 2), ""), found


def test_unknown_storey_gets_a_close_match(demo_book):
    edit(demo_book, {at(A, "storey", 2): "Gf"})
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    found = {f.where: f.message for f in info.value.findings.errors}
    assert "did you mean 'GF'" in found[where(A, "storey", 2)]


def test_combination_names_differing_by_case_and_partial_storeys_warn(demo_book):
    edit(demo_book, {at(A, "combination", 2): "1.35 g"})
    _, findings = load(demo_book)
    text = " ".join(w.message for w in findings.warnings)
    assert "differ only by case or spacing" in text and "'1.35 g'" in text
    assert "'1.35 g' is given at 1 of 15 storeys" in text


def _cell(path, t, key, row):
    return openpyxl.load_workbook(path, read_only=True)[t.name][f"{col(t, key)}{row}"].value


def test_typing_error_does_not_hide_an_unknown_member(demo_book):
    """Issue 12 §2: a bad thickness on the Walls sheet and an unknown pier on the actions sheet
    are both reported in one pass (piers are derived from the rows that parsed)."""
    edit(demo_book, {at(W, "thickness", 2): "x", at(A, "member", 2): "ZZ9-1"})
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    found = {f.where: f.message for f in info.value.findings.errors}
    assert where(W, "thickness", 2) in found
    assert "no such wall, pier or lintel" in found.get(where(A, "member", 2), ""), found


def test_storeys_error_does_not_hide_a_wall_storey_typo(demo_book):
    """Issue 12 §2: storey names are still known when a storey's height disagrees, so a wall's
    unknown storey is reported in the same pass."""
    edit(demo_book, {at(S, "height", 2): 4.5, at(W, "storey_from", 2): "L99"})
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    found = {f.where: f.message for f in info.value.findings.errors}
    assert "next floor" in found.get(where(S, "height", 2), ""), found
    assert "storey name" in found.get(where(W, "storey_from", 2), ""), found


def test_bad_row_of_a_wall_draws_no_false_member_errors(demo_book):
    """The piers of a wall with a bad cell are not known; actions naming them are not judged
    (only the bad cell is reported), while members of other walls still are."""
    wall = _cell(demo_book, W, "wall_id", 2)
    edit(demo_book, {at(W, "fc", 2): "forty"})
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    errors = info.value.findings.errors
    assert [e.where for e in errors] == [where(W, "fc", 2)], [str(e) for e in errors]
    assert not any(f"'{wall}" in e.message for e in errors if e.sheet == A.name)


# ---------------------------------------------------------------- cores (issue 13 section 2)


def test_a_wall_keeps_one_core_over_its_height(demo_book):
    """Rows 2-4 are LiftS over three storey ranges: the middle one may not move to another core."""
    edit(demo_book, {at(W, "core", 3): "stair"})
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    found = {f.where: f.message for f in info.value.findings.errors}
    assert "one core over its whole height" in found[where(W, "core", 3)]
    assert "'lift' as in row 2" in found[where(W, "core", 3)]


def test_core_actions_name_a_known_core_and_not_beside_a_building_row(demo_book):
    edit(demo_book, {at(C, "core", 2): "lfit", at(C, "core", 3): "stair"})
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    found = {f.where: f.message for f in info.value.findings.errors}
    assert "expected a core named on the walls sheet" in found[where(C, "core", 2)]
    assert "did you mean 'lift'" in found[where(C, "core", 2)]
    # row 3 (GF, 1.2G+1.5Q) for the stair core alone while no blank row gives that pair: allowed;
    # give the pair twice for one core and it is refused
    edit(demo_book, {at(C, "core", 2): "stair", at(C, "combination", 2): "1.2G+1.5Q"})
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    found = {f.where: f.message for f in info.value.findings.errors}
    assert "for core 'stair' is also given in row 2" in found[where(C, "combination", 3)]


def test_core_row_beside_the_buildings_row_is_refused(demo_book):
    edit(demo_book, {at(C, "core", 3): "lift", at(C, "combination", 3): "1.35G"})
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    found = {f.where: f.message for f in info.value.findings.errors}
    assert "expected one or the other" in found[where(C, "core", 3)]


def test_a_core_that_cannot_stand_on_its_own_is_named(tmp_path):
    """Core 'B' is one straight wall: it cannot resist torsion or shear across it on its own
    (statics), so the building's actions cannot be shared to it."""
    from xlcore.workbook.template import write_template

    path = tmp_path / "blade.xlsx"
    write_template(path)
    wb = openpyxl.load_workbook(path)
    wb[S.name].append(["GF", 0.0, 3.0, 200])
    walls = [("A1", 0, 0, 5, 0, "A"), ("A2", 5, 0, 5, 4, "A"), ("A3", 5, 4, 0, 4, "A")]
    walls.append(("B1", 9, 0, 9, 4, "B"))
    for wid, x1, y1, x2, y2, core in walls:
        wb[W.name].append([wid, x1, y1, x2, y2, 200, "GF", "GF", 40, 500, 12, 200, 2, 12, 200, 2, 30, core])
    wb[C.name].append(["GF", "wind", 100, 50, 0, 0, 0, 0])
    wb.save(path)
    with pytest.raises(InputInvalid) as info:
        load(path)
    assert any(
        str(f).startswith(f"'Core actions'!{col(C, 'storey')}2: the walls of core 'B' at storey GF (B1)")
        and "on their own" in str(f)
        for f in info.value.findings.errors
    ), [str(f) for f in info.value.findings.errors]


def test_a_wall_without_a_core_beside_named_ones_is_an_error(demo_book):
    edit(demo_book, {at(W, "core", k): None for k in (5, 6, 7)})  # LiftE's three rows
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    found = {f.where: f.message for f in info.value.findings.errors}
    assert "blank core for wall 'LiftE'" in found[where(W, "core", 5)]


def test_a_storey_above_every_wall_computes(demo_book):
    """A plant level on the roof slab with no core walls (storey row 17, after L14 at 45.95 m
    + 3.2 m) is legal input: no error, and no result row names it (nothing there to check)."""
    from xlcore import pipeline

    plant = {"name": "Plant", "level": 49.15, "height": 3.0, "slab": 200}
    edit(demo_book, {at(S, key, 17): value for key, value in plant.items()})
    building, findings = load(demo_book)
    assert findings.errors == []
    assert building.storeys[-1].name == "Plant"
    out = pipeline.compute(building, findings)
    assert len(out.shear) and "Plant" not in set(out.shear.storey)
    assert "Plant" not in set(out.summary.storey)


def test_a_blank_key_cell_of_an_action_row_draws_one_finding(demo_book):
    """A blank storey, combination or member on either actions sheet is named once, as blank;
    it drew a second finding before ("found nan; no such wall, pier or lintel", "found nan;
    expected a storey name"), and two blank members at one storey counted as a repeat."""
    blanked = [(A, "storey", 5), (A, "combination", 7), (A, "member", 9), (A, "member", 10),
               (C, "storey", 3), (C, "combination", 4)]
    edit(demo_book, {at(t, key, row): None for t, key, row in blanked})
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    _each_named_once_as_blank(info.value.findings.errors, blanked)


def _each_named_once_as_blank(errors, blanked) -> None:
    for t, key, row in blanked:
        here = [e.message for e in errors if e.where == where(t, key, row)]
        assert len(here) == 1 and here[0].startswith("blank; expected"), (t.name, key, row, here)
    assert not [e for e in errors if "nan" in e.message], [e.message for e in errors]


def test_a_blank_storey_name_is_an_error_at_its_cell_not_a_damaged_package(demo_book):
    """A blank storey name stopped the whole check with 'the workbook package is damaged' (the
    typed table holds NaN for it, the storeys pass looked for None); a blank wall ID or storey
    of a wall, an opening or an end zone drew a second finding, 'found nan; expected ...'."""
    blanked = [(S, "name", 2), (W, "storey_from", 3), (W, "storey_to", 4), (OP, "wall_id", 2),
               (OP, "storey_from", 3), (EZ, "wall_id", 2), (EZ, "storey_to", 3), (EZ, "location", 4)]
    edit(demo_book, {at(t, key, row): None for t, key, row in blanked})
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    _each_named_once_as_blank(info.value.findings.errors, blanked)
