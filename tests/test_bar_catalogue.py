"""The bar catalogue each standard gives through `Standard.bar_catalogue` / `advice_bars` /
`bar_name`, and the advice naming and choosing its bars from the Project's standard.

Sources: ASTM A615/A615M Table 1 (deformed bar designations, nominal diameters and areas, the
bracketed SI values; seen reproduced at https://nomeesteel.pk/astm-standards and in a copy of
A615/A615M-04a; A706/A706M uses the same designations and dimensions); AS/NZS 4671 N bars:
designation N + nominal diameter in mm (from memory)."""

import math

import pytest
from test_advice import TARGET, acts, one_pier

from xlcore.checks import advice
from xlcore.codes import base, get_standard
from xlcore.model import Settings

AS, ACI = get_standard("AS 3600:2018"), get_standard("ACI 318-19")

# ASTM A615/A615M Table 1, SI: designation, nominal diameter [mm], nominal area [mm^2]
ASTM_TABLE_1 = [
    ("No. 10", 9.5, 71),
    ("No. 13", 12.7, 129),
    ("No. 16", 15.9, 199),
    ("No. 19", 19.1, 284),
    ("No. 22", 22.2, 387),
    ("No. 25", 25.4, 510),
    ("No. 29", 28.7, 645),
    ("No. 32", 32.3, 819),
    ("No. 36", 35.8, 1006),
]


def test_aci_catalogue_is_astm_a615m_table_1():
    # every designation, diameter and area as ASTM A615/A615M Table 1 gives them (SI)
    assert [(b.name, b.dia, b.area) for b in ACI.bar_catalogue()] == ASTM_TABLE_1


def test_aci_areas_agree_with_the_nominal_diameters():
    # a round bar of the nominal diameter (pi d^2 / 4, hand evaluation) is within 2.5 % of the
    # table's area: the table's areas are the inch-pound ones converted (No. 13: 0.20 in^2 x
    # 645.16 = 129 mm^2 against 126.7 for 12.7 mm; No. 19: 0.44 in^2 = 284 against 286.5)
    for bar in ACI.bar_catalogue():
        round_bar = math.pi * bar.dia**2 / 4
        assert abs(round_bar / bar.area - 1) < 0.025, bar
    assert ACI.bar_catalogue()[1].area == pytest.approx(0.20 * 25.4**2, abs=0.5)


def test_as_catalogue_and_advice_ranges_are_unchanged():
    # AS/NZS 4671 N bars (from memory); the advice's ranges as before: horizontal N10-N20,
    # vertical N12-N28, end zones N20-N36
    assert [b.name for b in AS.bar_catalogue()] == [f"N{d}" for d in (10, 12, 16, 20, 24, 28, 32, 36, 40)]
    for b in AS.bar_catalogue():
        assert b.area == pytest.approx(math.pi * b.dia**2 / 4, abs=0.05)
    assert [b.dia for b in AS.advice_bars("horizontal")] == [10.0, 12.0, 16.0, 20.0]
    assert [b.dia for b in AS.advice_bars("vertical")] == [12.0, 16.0, 20.0, 24.0, 28.0]
    assert [b.dia for b in AS.advice_bars("zone")] == [20.0, 24.0, 28.0, 32.0, 36.0]


@pytest.mark.parametrize("std", [AS, ACI], ids=lambda s: s.name)
def test_advice_bars_come_from_the_catalogue(std):
    for use in base.BAR_USES:
        offered = std.advice_bars(use)
        assert offered and set(offered) <= set(std.bar_catalogue())
        assert list(offered) == sorted(offered, key=lambda b: b.dia)
    # as many sizes of each use under both standards: the search is the same size
    assert [len(std.advice_bars(u)) for u in base.BAR_USES] == [4, 5, 5]


def test_bar_names():
    assert AS.bar_name(16.0) == "N16" and AS.bar_name(20.0, 4) == "4N20"
    assert AS.bar_name(14.0) == "N14"  # outside the catalogue: named as AS 3600 results always did
    assert ACI.bar_name(12.7) == "No. 13" and ACI.bar_name(19.1, 4) == "4 No. 19"
    # within 0.5 mm: the designation is the diameter rounded, so a workbook may give 13 or 10
    assert ACI.bar_name(13.0) == "No. 13" and ACI.bar_name(10.0) == "No. 10"
    assert ACI.bar_name(12.0) == "12 mm"  # no ASTM bar of 12 mm


def test_advice_under_aci_names_astm_bars():
    """Under ACI 318-19 every bar option names an ASTM bar ("No. 13 @ 200 x 2 layers") and no AS
    "N" bar; under AS 3600 the options read as before ("N12 @ 150 x 1 layer")."""
    aci = Settings(standard="ACI 318-19")
    opts = advice.evaluate_options(one_pier(), acts(1900.0), TARGET, aci)
    bars = opts[opts.kind.isin((advice.H_KIND, advice.V_KIND))].option
    assert len(bars)
    assert bars.str.match(r"No\. (10|13|16|19|25|29) @ \d+ x [12] layers?$").all(), bars.head()
    assert "No. 13 @ 200 x 2 layers" in set(opts.option) or "No. 13 @ 200 x 1 layer" in set(opts.option)
    zones = opts[opts.kind == advice.ZONE_KIND].option
    assert zones.str.match(r"\d+ No\. (19|25|29|32|36) in \d+ mm at each end").all(), zones.head()
    as_opts = advice.evaluate_options(one_pier(), acts(1900.0), TARGET, Settings())
    as_bars = as_opts[as_opts.kind.isin((advice.H_KIND, advice.V_KIND))].option
    assert as_bars.str.match(r"N(10|12|16|20|24|28) @ \d+ x [12] layers?$").all()
    # the diameters the options carry are the catalogue's nominal ones (ASTM Table 1)
    table = advice._option_table(ACI)
    assert set(table[table.kind == advice.H_KIND].dia) == {9.5, 12.7, 15.9, 19.1}
    assert set(table[table.kind == advice.V_KIND].dia) == {12.7, 15.9, 19.1, 25.4, 28.7}
    assert set(table[table.kind == advice.ZONE_KIND].zone_dia) == {19.1, 25.4, 28.7, 32.3, 35.8}


def test_search_lines_name_the_standards_bars():
    aci = dict(advice.search_lines(Settings(standard="ACI 318-19")))["Search"]
    assert "horizontal No. 10-No. 19 and vertical No. 13-No. 29" in aci and " N1" not in aci
    own = dict(advice.search_lines(Settings()))["Search"]
    assert "horizontal N10-N20 and vertical N12-N28" in own


def test_lintel_needs_name_the_assumed_bars_in_the_standards_terms():
    # a lintel without bars: the words say which bars were assumed for its geometry (16 mm: AS
    # N16; ACI No. 16, 15.9 mm within 0.5 mm); ACI 318 without special walls designs it the same
    # way (strut-and-tie, Chapter 23), so the words differ only in the bars' names
    from test_lintels import DEEP, actions, lintels

    from xlcore.checks.lintels import check_lintels

    bare = lintels(**DEEP, lintel_bars=None, lintel_dia=None)
    own = check_lintels(bare, actions(v=100.0), Settings()).iloc[0].need
    assert "N16 assumed" in own
    aci = Settings(standard="ACI 318-19", aci_special_walls="no")
    need = check_lintels(bare, actions(v=100.0), aci).iloc[0].need
    assert "No. 16 assumed" in need and "N16" not in need
