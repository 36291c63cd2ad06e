"""The End zones sheet (issue 14 §1): every bad row is refused at its Sheet!Cell with the value
found and what was expected; the file is never changed; the sheet is optional; the demo's
zones reach the piers they name. Demo rows (from `demo.end_zones`): row 2 is LiftS GF-L4 'start'
(6N28 in 350 mm, N10 ties; pier LiftS-1 is 950 mm long), row 3 LiftS GF-L4 'opening 1 near' (6N28
in 350 mm), row 8 LiftS L5-L9 'start'."""

import hashlib

import openpyxl
import pytest
from conftest import column_letter as col
from conftest import edit

from xlcore import demo, geometry, layout
from xlcore.diagnostics import InputInvalid
from xlcore.model import EndZone, Opening, Storey, WallRun
from xlcore.pipeline import load

Z = layout.END_ZONES


def at(key, row):
    return (Z.name, f"{col(Z, key)}{row}")


def where(key, row):
    return f"'{Z.name}'!{col(Z, key)}{row}"


def test_demo_rows_are_as_these_tests_assume():
    rows = demo.end_zones()
    assert (rows[0]["wall_id"], rows[0]["location"], rows[0]["bars"], rows[0]["dia"], rows[0]["length"]) == (
        "LiftS",
        "start",
        6,
        28.0,
        350.0,
    )
    assert (rows[1]["location"], rows[6]["location"], rows[6]["storey_from"]) == (
        "opening 1 near",
        "start",
        "L5",
    )


CASES = [
    # (cells changed, cell of the error, words it must hold)
    (
        {at("length", 2): 1000},
        ("length", 2),
        ["found 1000 mm", "at most the length of pier LiftS-1 (950 mm at GF)"],
    ),
    # 3 N28 a face, cover 30, N10 ties, clear gap 3 x 28 = 84 (Cl 11.7 as transcribed):
    # 30 + 2 x 10 + 3 x 28 + 2 x 84 = 302 mm (hand evaluation)
    ({at("length", 2): 300}, ("length", 2), ["found 300 mm", "at least 302 mm", "3 N28 a face"]),
    ({at("wall_id", 2): "LW9"}, ("wall_id", 2), ["found 'LW9'", "a wall ID from the Walls sheet"]),
    ({at("storey_to", 2): "L99"}, ("storey_to", 2), ["found 'L99'", "a storey name"]),
    (
        {at("storey_from", 8): "L3"},
        ("storey_from", 8),
        ["storeys overlap row 2", "each storey in one row only"],
    ),
    ({at("location", 2): "opening 3 near"}, ("location", 2), ["'opening 3 near'", "no such free edge at GF"]),
    ({at("location", 2): "left jamb"}, ("location", 2), ["found 'left jamb'", "'opening K near'"]),
    ({at("bars", 2): 7}, ("bars", 2), ["found 7 bars", "multiple of wall 'LiftS''s 2 vertical layers"]),
    ({at("tie_spacing", 2): None}, ("tie_spacing", 2), ["blank", "tie spacing as well"]),
    ({at("bars", 2): 0}, ("bars", 2), ["found 0", "a whole number from 1 to 60"]),
    # pier LiftS-1 (950 mm): 350 mm at its start and 650 mm at the door jamb overlap
    ({at("length", 3): 650}, ("length", 3), ["found 650 mm", "pier LiftS-1 at GF", "350 + 650 mm"]),
    # zones of 460 mm facing each other in LiftS-1: innermost bars at 460 - 10 - 14 = 436 mm from
    # each edge, 950 - 2 x 436 = 78 mm apart, 78 - 28 = 50 mm clear < 3 x 28 = 84 (hand evaluation)
    (
        {at("length", 2): 460, at("length", 3): 460},
        ("length", 2),
        ["found 460 mm", "pier LiftS-1 at GF", "50 mm clear", "at least 3 db = 84 mm"],
    ),
]


@pytest.mark.parametrize(("changes", "cell", "words"), CASES)
def test_bad_end_zone_row_is_refused_at_its_cell(demo_book, changes, cell, words):
    edit(demo_book, changes)
    before = hashlib.sha256(demo_book.read_bytes()).hexdigest()
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    messages = [str(f) for f in info.value.findings.errors]
    hits = [m for m in messages if m.startswith(where(*cell))]
    assert hits, messages
    assert all(w in hits[0] for w in words), hits[0]
    assert hashlib.sha256(demo_book.read_bytes()).hexdigest() == before


def test_location_is_read_ignoring_case_and_spacing(demo_book):
    edit(demo_book, {at("location", 3): "  Opening 1   NEAR "})
    building, _ = load(demo_book)
    z = next(z for z in building.end_zones if z.row == 3)
    assert (z.which, z.opening, z.location) == ("near", 1, "opening 1 near")


def test_sheet_is_optional(demo_book, tmp_path):
    wb = openpyxl.load_workbook(demo_book)
    del wb[Z.name]
    path = tmp_path / "without.xlsx"
    wb.save(path)
    building, findings = load(path)
    assert building.end_zones == []
    assert not findings.errors


def test_zones_reach_the_pier_ends_they_name():
    """Row 'LiftS opening 1 far' gives the start side of LiftS-2; StairE has its opening from L1
    only, so 'opening 1 near' of StairE is the end of StairE-1 from L1 (the whole wall's end
    'end' at GF)."""
    st = [Storey(index=i, **s) for i, s in enumerate(demo.storeys())]
    zones = []
    for r in demo.end_zones():
        which, k = layout.parse_location(r["location"])
        zones.append(EndZone(**(r | dict(location=geometry.edge_label(which, k), which=which, opening=k))))
    g = geometry.derive(
        st, [WallRun(**w) for w in demo.walls()], [Opening(**o) for o in demo.openings()], zones
    )
    p = g.piers.set_index(["storey", "pier_id"])
    assert (p.loc[("GF", "LiftS-2"), "za_n"], p.loc[("GF", "LiftS-2"), "za_len"]) == (8, 450.0)
    assert p.loc[("GF", "LiftS-2"), "edge_a"] == "opening 1 far"
    assert p.loc[("L1", "StairE-1"), "zb_n"] > 0 and p.loc[("L1", "StairE-1"), "edge_b"] == "opening 1 near"
    assert p.loc[("GF", "StairE"), "zb_n"] > 0 and p.loc[("GF", "StairE"), "edge_b"] == "end"
    assert p.loc[("L10", "StairN"), "za_n"] == 0  # top third: no zones in the demo


@pytest.mark.parametrize(
    ("text", "parsed"),
    [
        ("start", ("start", 0)),
        ("Wall End", ("end", 0)),
        ("opening 2 far", ("far", 2)),
        ("opening 1 near jamb", ("near", 1)),
        ("opening 0 near", None),
        ("jamb 1", None),
        ("start 2", None),
    ],
)
def test_location_forms(text, parsed):
    assert layout.parse_location(text) == parsed


def test_aci_zone_bars_keep_the_boundary_element_gap_of_25_2_3(demo_book):
    # Under ACI 318-19 an end zone is a boundary element: clear spacing of its longitudinal bars
    # at least max(40 mm, 1.5 db), ACI 318-19 25.2.3 (in SI; 4/3 d_agg not given). Row 2: 6 x 28 mm
    # bars over 2 faces = 3 a face, cover 30, 10 mm ties:
    # 30 + 2 x 10 + 3 x 28 + 2 x max(40, 1.5 x 28 = 42) = 218 mm (hand evaluation), where AS 3600's
    # 3 db gives 302 mm (the CASES above).
    row = 2 + [s.key for s in layout.PROJECT.settings].index("standard")
    aci = {(layout.PROJECT.name, f"B{row}"): "ACI 318-19"}
    edit(demo_book, {**aci, at("length", 2): 250})
    load(demo_book)  # 250 mm holds them under ACI (it would not under AS 3600: 302 mm)
    edit(demo_book, {at("length", 2): 210})
    with pytest.raises(InputInvalid) as info:
        load(demo_book)
    hits = [str(f) for f in info.value.findings.errors if str(f).startswith(where("length", 2))]
    assert hits, [str(f) for f in info.value.findings.errors]
    for words in ("found 210 mm", "at least 218 mm", "max(40 mm, 1.5 db) = 42 mm", "ACI 318-19 25.2.3"):
        assert words in hits[0], hits[0]
