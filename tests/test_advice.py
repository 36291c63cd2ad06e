"""Advice for failing piers (issue 14 §4): every change is one a site could build. The
recommended change, applied to the building, passes every check; every cheaper option of the
search fails; a grade is priced over its whole pour; bar layers stay equal both ways; a thicker
wall keeps its bars' ratio. Engineering values come from the checks, which their own test
modules tie to outside references; here the search and the costs (hand arithmetic) are tested."""

import re

import builders
import numpy as np
import pandas as pd
import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from xlcore import costs, geometry
from xlcore.checks.advice import (
    GRADE_KIND,
    PIER_KINDS,
    advise,
    cheapest_fixes,
    evaluate_options,
    pour_premiums,
)
from xlcore.checks.axial import check_pier_axial
from xlcore.checks.detailing import check_detailing
from xlcore.checks.section14 import check_section14
from xlcore.checks.shear import check_pier_shear
from xlcore.codes import as3600
from xlcore.mechanics import stiffness
from xlcore.model import Settings, Storey

STOREYS = [Storey(index=0, name="L1", level=0.0, height=3.2, slab=200.0)]  # clear height 3.0 m
NONE = "none in the search range passes every check"


def pier_table(walls, storeys=STOREYS):
    return stiffness.with_stiffness(geometry.derive(storeys, walls, []).piers, 0.2, "fixed-fixed")


def w1(**fields):
    f = dict(thickness=200.0, fc=25.0, h_dia=10.0, h_spacing=300.0) | fields
    return builders.wall("W1", 0.0, 0.0, f.pop("Lw", 3.0), 0.0, **f)


def one_pier(fc=25.0, tw=200.0, Lw=3.0, h_spacing=300.0, h_dia=10.0):
    return pier_table([w1(fc=fc, thickness=tw, Lw=Lw, h_spacing=h_spacing, h_dia=h_dia)])


def acts(v, n=500.0, m=100.0, pier="W1", storey="L1"):
    return pd.DataFrame(
        dict(
            row=[2],
            storey=[storey],
            combination=["C1"],
            wall_id=[pier],
            pier_id=[pier],
            position=[0],
            k=[1.0],
            share=[1.0],
            n=[n],
            v=[v],
            m=[m],
            m_out=[np.nan],
            source=["given"],
            origin=[0],
        )
    )


TARGET = pd.DataFrame(dict(storey=["L1"], pier_id=["W1"]))


def failing(*piers, storey="L1", check="x", util=2.0):
    return pd.DataFrame(dict(storey=storey, pier_id=list(piers), status="FAIL", check=check, util=util))


def all_checks_pass(piers, a, s=None) -> bool:
    """Every check of the design, run in full (with working) on the changed building."""
    s = s or Settings()
    shear = check_pier_shear(piers, a, s)
    axial = check_pier_axial(piers, a, s)
    hwe = axial.groupby(["storey", "pier_id"]).hwe.first()
    detailing = check_detailing(piers, a, s, hwe)
    section14 = check_section14(piers, a, s, hwe)
    return (
        (shear.status != "FAIL").all()
        and (axial.status != "FAIL").all()
        and (axial.status_s != "FAIL").all()
        and (detailing.status != "FAIL").all()
        and (section14.status != "FAIL").all()
    )


BARS = re.compile(r"N(\d+) @ (\d+) x (\d) layers?")


def changed(wall_fields: dict, option: str) -> dict:
    """The wall's fields with an advice option applied (grade, bars, thickness; pairs too)."""
    f = dict(wall_fields)
    for part in option.split("; "):
        if g := re.search(r"f'c (\d+) MPa", part):
            f["fc"] = float(g.group(1))
        elif t := re.search(r"tw (\d+) mm", part):
            f["thickness"] = float(t.group(1))
            part = part.split(":", 1)[1]
        for label, p in (("vertical", "v"), ("horizontal", "h")):
            if label in part:
                b = BARS.search(part.split(label, 1)[1])
                f |= {
                    f"{p}_dia": float(b.group(1)),
                    f"{p}_spacing": float(b.group(2)),
                    f"{p}_layers": int(b.group(3)),
                }
    return f


def apply_row(row, base: dict) -> dict:
    f = dict(base)
    if row.kind in ("horizontal bars", "vertical bars"):
        b = BARS.fullmatch(row.option)
        p = row.kind[0]
        return f | {
            f"{p}_dia": float(b.group(1)),
            f"{p}_spacing": float(b.group(2)),
            f"{p}_layers": int(b.group(3)),
        }
    if " + " in row.kind:
        first, second = row.option.split("; ", 1)
        kinds = row.kind.split(" + ")
        f = apply_row(pd.Series(dict(kind=kinds[0], option=first)), f)
        return apply_row(pd.Series(dict(kind=kinds[1], option=second)), f)
    return changed(f, row.option)


# --------------------------------------------------------------------------------------------
# the recommended change passes every check on the changed building; cheaper ones fail


@pytest.mark.parametrize(
    "v, n",
    [
        (1300.0, 500.0),  # shear: horizontal bars
        (900.0, 6000.0),  # Cl 11.5 and shear: thickness or the pour's grade
        (2400.0, 15000.0),  # no single change passes: a pair (grade + horizontal bars)
    ],
)
def test_recommended_change_applied_to_the_building_passes_every_check(v, n):
    base = dict(thickness=200.0, fc=25.0, h_dia=10.0, h_spacing=300.0)
    a = acts(v, n=n, m=300.0)
    assert not all_checks_pass(pier_table([w1(**base)]), a)
    out = advise(pier_table([w1(**base)]), a, failing("W1"), Settings())
    fix = cheapest_fixes(out)[("L1", "W1")]
    words = fix.rsplit(" (+", 1)[0]
    if words.startswith("plan of pour"):  # the pour's grade and the pier's own part
        fields = changed(base, words.split(": ", 1)[1].replace(" (pour)", ""))
    else:
        kind, option = words.split(": ", 1)
        fields = apply_row(pd.Series(dict(kind=kind, option=option)), base)
    assert fields != base
    assert all_checks_pass(pier_table([w1(**fields)]), a), fix
    # every pier row offered as passing passes too when built
    for r in out[(out.scope == "pier") & (out.util <= 1.0)].itertuples():
        if r.kind != "end-zone bars":
            assert all_checks_pass(pier_table([w1(**apply_row(r, base))]), a), r.option


def test_pair_is_searched_only_where_no_single_change_passes_and_is_the_cheapest_pair():
    a = acts(2400.0, n=15000.0, m=300.0)
    out = advise(one_pier(), a, failing("W1"), Settings())
    singles = out[out.kind.isin(PIER_KINDS)]
    assert (singles.option.str.startswith("none")).all()
    assert out[out.scope == "pour"].option.str.contains("no grade alone passes").all()
    pair = out[(out.scope == "pier") & out.kind.str.contains(r" \+ ")].iloc[0]
    assert pair["rank"] == 1 and pair.util <= 1.0
    every = evaluate_options(one_pier(), a, TARGET, Settings(), pairs=True)
    ok = every[every.util <= 1.0].sort_values("added_cost", kind="stable")
    assert pair.option == ok.option.iloc[0]  # the exhaustive search's cheapest passing pair
    cheaper = every[every.added_cost < pair.added_cost - 1e-6]
    assert len(cheaper) and (cheaper.util > 1.0).all()


def test_recommended_bars_pass_and_every_cheaper_arrangement_fails():
    piers = one_pier()
    assert not all_checks_pass(piers, acts(1300.0))
    opts = evaluate_options(piers, acts(1300.0), TARGET, Settings())
    bars = opts[(opts.kind == "horizontal bars") & opts.offered]
    best = bars[bars.util <= 1.0].sort_values("added_cost").iloc[0]
    cheaper = bars[bars.added_cost < best.added_cost - 1e-9]
    assert len(cheaper) and (cheaper.util > 1.0).all()
    assert best.rho_h > piers.rho_h.iloc[0]


@settings(max_examples=8, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(v=st.floats(min_value=500.0, max_value=1600.0), n=st.floats(min_value=-800.0, max_value=3000.0))
def test_early_stopping_search_equals_exhaustive_search(v, n):
    piers = one_pier()
    a = acts(v, n=n, m=600.0)
    fast = advise(piers, a, failing("W1"), Settings())
    fast = fast[fast.scope == "pier"].set_index("kind")
    every = evaluate_options(piers, a, TARGET, Settings())
    for kind, g in every[every.offered & every.kind.isin(PIER_KINDS)].groupby("kind"):
        ok = g[g.util <= 1.0].sort_values("added_cost", kind="stable")
        expected = ok.option.iloc[0] if len(ok) else NONE
        got = fast.loc[kind, "option"]
        assert got == expected or got.startswith("none alone: horizontal bars")


def two_storey_pier():
    storeys = [builders.storey("L1"), builders.storey("L2", index=1, level=3.2)]
    wall = builders.wall("W1", 0.0, 0.0, 3.0, 0.0, storeys=("L1", "L2"), fc=25.0, h_dia=10.0, h_spacing=300.0)
    return pier_table([wall], storeys)


def many_combinations(storey, v, n, m):
    out = pd.concat([acts(vi, n=ni, m=mi) for vi, ni, mi in zip(v, n, m, strict=True)], ignore_index=True)
    return out.assign(storey=storey, combination=[f"C{i}" for i in range(len(out))])


@settings(max_examples=6, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    v=st.lists(st.floats(100.0, 1500.0), min_size=8, max_size=8),
    n=st.lists(st.floats(-800.0, 4000.0), min_size=8, max_size=8),
    m=st.lists(st.floats(0.0, 2500.0), min_size=8, max_size=8),
)
# found by hypothesis: the screen's values were looked up by variant ID in a table indexed by row,
# so a cheaper passing option at the storey whose governing shear came last was passed over
@example(v=[100.0] * 7 + [1412.0], n=[0.0] * 8, m=[0.0] * 8)
def test_screened_search_over_storeys_and_combinations_equals_exhaustive_search_per_storey(v, n, m):
    """The search screens options on the few governing combinations and confirms on all; the
    answer must be the exhaustive search's, storey by storey (each storey its own search)."""
    piers = two_storey_pier()
    a = pd.concat(
        [many_combinations("L1", v, n, m), many_combinations("L2", v[::-1], n[1:] + n[:1], m[::-1])],
        ignore_index=True,
    )
    summary = pd.concat([failing("W1", storey="L1"), failing("W1", storey="L2")], ignore_index=True)
    fast = advise(piers, a, summary, Settings())
    fast = fast[fast.scope == "pier"].set_index(["storey", "kind"])
    for storey in ("L1", "L2"):
        alone = evaluate_options(
            piers[piers.storey == storey],
            a[a.storey == storey],
            summary[summary.storey == storey],
            Settings(),
        )
        for kind, g in alone[alone.offered & alone.kind.isin(PIER_KINDS)].groupby("kind"):
            ok = g[g.util <= 1.0].sort_values("added_cost", kind="stable")
            expected = ok.option.iloc[0] if len(ok) else NONE
            got = fast.loc[(storey, kind), "option"]
            assert got == expected or got.startswith("none alone: horizontal bars")


# --------------------------------------------------------------------------------------------
# costs by hand (default illustrative prices: 25 -> 240, 32 -> 260, 40 -> 285 per m3; steel
# 2400 per t at 7850 kg/m3). The pier's storey: 3.2 m floor to floor less a 200 mm slab = 3.0 m.


def test_added_cost_by_hand():
    """Horizontal N12 @ 200 x 2 for N10 @ 300 x 2 in a 3 m x 200 mm pier: rho_h 2 x 113.10 /
    (200 x 200) = 0.0056549 for 2 x 78.540 / (300 x 200) = 0.0026180, +0.0030369 x 0.6 m2 =
    0.00182217 m3 of steel per m x 7.85 t/m3 = 0.0143040 t x 2400 = 34.330 per m x 3.0 m =
    102.99 over the storey."""
    opts = evaluate_options(one_pier(), acts(700.0), TARGET, Settings())
    row = opts[(opts.kind == "horizontal bars") & (opts.option == "N12 @ 200 x 2 layers")].iloc[0]
    assert row.added_cost == pytest.approx(102.99, abs=0.01)


def test_end_zone_cost_by_hand():
    """8N20 at each end of the 3 m pier: 2 x 8 x 314.16 = 5026.5 mm2 = 0.0050265 m2 per m height
    x 7850 kg/m3 = 39.46 kg x 2.4 per kg = 94.70 per m x 3.0 m = 284.09 over the storey."""
    opts = evaluate_options(one_pier(), acts(200.0, n=-2000.0, m=1500.0), TARGET, Settings())
    row = opts[(opts.kind == "end-zone bars") & opts.option.str.startswith("8N20 ")].iloc[0]
    assert row.added_cost == pytest.approx(284.09, abs=0.02)


def core_of_two(fc2=32.0, storeys=STOREYS, upto=None, **w1):
    """Core A: W1 3 m and W2 2 m, both 200 mm (W1 f'c 25, W2 f'c `fc2`); core B: W3 2 m."""
    s = (storeys[0].name, (upto or storeys[-1]).name)
    return pier_table(
        [
            builders.wall("W1", 0, 0, 3.0, 0, storeys=s, **(dict(thickness=200.0, fc=25.0, core="A") | w1)),
            builders.wall("W2", 0, 0, 0, 2.0, storeys=s, thickness=200.0, fc=fc2, core="A"),
            builders.wall("W3", 9, 0, 9, 2.0, storeys=s, thickness=200.0, fc=25.0, core="B"),
        ],
        storeys,
    )


def test_pour_grade_is_priced_over_every_wall_of_the_pour_by_hand():
    """Core A at L1 to f'c 40: W1 3 x 0.2 x 3.0 = 1.8 m3 x (285 - 240) = 81.0; W2 2 x 0.2 x 3.0
    = 1.2 m3 x (285 - 260) = 30.0; together 111.0. To f'c 32: W1 1.8 x (260 - 240) = 36.0, W2
    already 32: nothing; 36.0. Core B is its own pour: 1.2 x 45 = 54.0 at f'c 40."""
    prem = pour_premiums(core_of_two(), Settings()).set_index(["pour", "grade"]).premium
    assert prem[("core A, L1", 40.0)] == pytest.approx(111.0)
    assert prem[("core A, L1", 32.0)] == pytest.approx(36.0)
    assert prem[("core B, L1", 40.0)] == pytest.approx(54.0)
    # each wall its own pour (Project setting)
    each = pour_premiums(core_of_two(), Settings(grade_pour="each wall at one storey"))
    assert each.set_index(["pour", "grade"]).premium[("wall W1, L1", 40.0)] == pytest.approx(81.0)


def test_pour_over_storeys_groups_storeys_from_the_lowest():
    """Over 2 storeys: L1-L2 one pour, L3 the next; at f'c 40 the L1-L2 pour of core A is
    twice the one-storey 111.0 = 222.0 (same walls, same 3.0 m clear height each storey)."""
    st3 = [builders.storey(f"L{i + 1}", index=i, level=3.2 * i) for i in range(3)]
    prem = pour_premiums(core_of_two(storeys=st3), Settings(grade_pour="the core over 2 storeys"))
    prem = prem.set_index(["pour", "grade"]).premium
    assert prem[("core A, L1 to L2", 40.0)] == pytest.approx(222.0)
    assert prem[("core A, L3", 40.0)] == pytest.approx(111.0)


def test_pour_grade_passes_only_where_every_failing_pier_of_the_pour_passes():
    """W1 (f'c 25) and W2 (f'c 32) of core A fail in shear; the pour row's grade is the least
    with which both pass, priced over the pour (W1 and W2), one row naming both piers; built,
    every pier of the pour passes (a higher grade makes no other pier fail)."""
    piers = core_of_two()
    a = pd.concat(
        [acts(1000.0, n=500.0, m=100.0, pier=p) for p in ("W1", "W2", "W3")], ignore_index=True
    ).assign(wall_id=lambda d: d.pier_id)
    a.loc[a.pier_id == "W2", "v"] = 700.0
    a.loc[a.pier_id == "W3", "v"] = 100.0  # core B passes
    out = advise(piers, a, failing("W1", "W2"), Settings())
    pour = out[out.scope == "pour"]
    assert len(pour) == 1
    row = pour.iloc[0]
    assert row.pour == "core A, L1" and row.fixes == "W1, W2" and row.kind == GRADE_KIND
    grade = float(re.match(r"f'c (\d+) MPa", row.option).group(1))
    # the least grade passing both, from the per-pier search: W1's and W2's least passing grades
    every = evaluate_options(piers, a, failing("W1", "W2"), Settings())
    g = every[every.kind == GRADE_KIND]
    least = {p: g[(g.pier_id == p) & (g.util <= 1.0)].fc.min() for p in ("W1", "W2")}
    assert grade == max(least.values())
    prem = pour_premiums(piers, Settings()).set_index(["pour", "grade"]).premium
    assert row.added_cost == pytest.approx(prem[("core A, L1", grade)])
    # built: every wall of core A below the grade raised to it; all piers pass
    built = pier_table(
        [
            builders.wall("W1", 0, 0, 3.0, 0, thickness=200.0, fc=max(25.0, grade), core="A"),
            builders.wall("W2", 0, 0, 0, 2.0, thickness=200.0, fc=max(32.0, grade), core="A"),
            builders.wall("W3", 9, 0, 9, 2.0, thickness=200.0, fc=25.0, core="B"),
        ]
    )
    assert all_checks_pass(built, a)


def test_pour_grade_fails_where_a_failing_pier_is_already_at_the_grade():
    """W2 already at f'c 100 fails in shear beyond what any grade gives: no grade fixes the pour
    (a pier at or above a grade is not changed by it)."""
    piers = core_of_two(fc2=100.0)
    a = pd.concat([acts(900.0, pier="W1"), acts(3000.0, pier="W2")], ignore_index=True)
    a["wall_id"] = a.pier_id
    out = advise(piers, a, failing("W1", "W2"), Settings())
    pour = out[out.scope == "pour"].iloc[0]
    assert pour.option.startswith("none") and np.isnan(pour.added_cost)


# --------------------------------------------------------------------------------------------
# layers buildable; thicker wall keeps the ratio


def layers_in(option: str) -> list[int]:
    return [int(x) for x in re.findall(r"x (\d) layers?", option)]


def test_no_advice_row_has_horizontal_layers_different_from_vertical_layers():
    """A pier with vertical bars in one layer and horizontal in two (200 mm, Section 14 both
    faces by default): every row's bars end in equal layers both ways."""
    piers = pier_table([w1(v_layers=1, h_dia=12.0, h_spacing=200.0)])
    for a in (acts(700.0), acts(2400.0, n=15000.0, m=300.0), acts(200.0, n=-2000.0, m=1500.0)):
        out = advise(piers, a, failing("W1"), Settings())
        rows = out[(out.scope == "pier") & out.util.le(1.0)]
        assert len(rows)
        for r in rows.itertuples():
            f = apply_row(r, dict(v_layers=1, h_layers=2)) if r.kind != "end-zone bars" else None
            if f is not None:
                assert f["v_layers"] == f["h_layers"], r.option
            else:  # end-zone bars alone change no layers: offered only where they match
                assert piers.v_layers.iloc[0] == piers.h_layers.iloc[0], r.option
    # one layer is never offered where Section 14 asks for two (the default ductility)
    opts = evaluate_options(piers, acts(700.0), TARGET, Settings())
    bars = opts[opts.kind.isin(["horizontal bars", "vertical bars"])]
    assert (bars.layers == 2).all()


def test_one_layer_offered_only_in_a_thin_wall_without_section_14():
    """Elastic structure (no Section 14): a 150 mm wall may keep one layer; a 200 mm one-layer
    limit (Cl 11.7 as the detailing check applies it) means a 225 mm wall gets two."""
    s = Settings(ductility="elastic (mu = 1)")
    thin = pier_table([w1(thickness=150.0, v_layers=1, h_layers=1)])
    opts = evaluate_options(thin, acts(400.0), TARGET, s)
    assert (opts[opts.kind == "horizontal bars"].layers == 1).any()
    assert not opts[(opts.kind == "horizontal bars") & (opts.layers == 2)].offered.any()
    thick = opts[opts.kind == "thickness"]
    assert thick[thick.tw > 200].option.map(layers_in).map(set).eq({2}).all()
    assert thick[thick.tw <= 200].option.map(layers_in).map(set).eq({1}).all()


def test_thicker_wall_keeps_the_ratio_of_its_bars_by_hand():
    """N12 @ 200 x 2 both ways in 200 mm: rho = 2 x 113.10 / (200 x 200) = 0.0056549. At 225 mm
    the least catalogue ratio at or above it: N12 @ 175 x 2 = 226.19 / (175 x 225) = 0.0057446
    (N16 @ 300 x 2 = 402.12 / (300 x 225) = 0.0059574, N10 @ 100 x 2 = 0.0069813 are more).
    Cost per m: concrete 0.025 x 3 m2 x 240 = 18.0; steel 2 x (0.0057446 x 0.675 - 0.0056549 x
    0.6) = 0.00096934 m3 x 7.85 x 2400 = 18.262; 36.262 x 3.0 m = 108.79."""
    piers = one_pier(h_spacing=200.0, h_dia=12.0)
    opts = evaluate_options(piers, acts(700.0), TARGET, Settings())
    t = opts[(opts.kind == "thickness") & (opts.tw == 225.0)].iloc[0]
    assert t.rho_v == pytest.approx(0.0057446, rel=1e-4) and t.rho_h == pytest.approx(0.0057446, rel=1e-4)
    assert "vertical N12 @ 175 x 2 layers" in t.option and "horizontal N12 @ 175 x 2 layers" in t.option
    assert t.added_cost == pytest.approx(108.79, abs=0.02)
    # every thickness: the ratio held within the rounding of a 25 mm spacing step
    rho0 = 2 * np.pi * 36 / (200 * 200)
    for r in opts[opts.kind == "thickness"].itertuples():
        for rho in (r.rho_v, r.rho_h):
            assert rho0 * (1 - 1e-9) <= rho <= rho0 * 1.25, r.option


# --------------------------------------------------------------------------------------------
# end zones and ranking (kept from the search before)


def test_end_zone_option_passes_and_every_cheaper_one_fails():
    """Tension with bending: the cheapest end-zone option passes every check and every cheaper
    end-zone option in the search space fails (the search's own claim)."""
    piers = one_pier()
    a = acts(200.0, n=-2000.0, m=1500.0)
    opts = evaluate_options(piers, a, TARGET, Settings())
    zones = opts[opts.kind == "end-zone bars"]
    assert len(zones) > 10
    passing = zones[zones.util <= 1.0].sort_values("added_cost")
    assert len(passing) and len(passing) < len(zones)
    best = passing.iloc[0]
    cheaper = zones[zones.added_cost < best.added_cost - 1e-9]
    assert len(cheaper) and (cheaper.util > 1.0).all()
    assert "at each end" in best.option


def test_end_zone_bars_are_offered_first_where_axial_and_bending_fails():
    piers = one_pier()
    a = acts(200.0, n=-2000.0, m=1500.0)
    nm = advise(piers, a, failing("W1", check="axial + bending", util=1.4), Settings())
    top = nm[nm["rank"] == 1].iloc[0]
    assert top.kind == "end-zone bars" and top.util <= 1.0
    assert cheapest_fixes(nm)[("L1", "W1")].startswith("end-zone bars")
    other = advise(piers, a, failing("W1", check="in-plane shear", util=1.4), Settings())
    ranked = other[other.scope == "pier"].dropna(subset=["rank"]).sort_values("rank")
    assert ranked.added_cost.is_monotonic_increasing  # elsewhere the cheapest change ranks first


def test_summary_fix_is_the_cheaper_of_the_pier_change_and_the_pour_grade():
    out = advise(one_pier(), acts(900.0, n=6000.0, m=300.0), failing("W1"), Settings())
    pier = out[(out.scope == "pier") & (out["rank"] == 1)].iloc[0]
    pour = out[out.scope == "pour"].iloc[0]
    fix = cheapest_fixes(out)[("L1", "W1")]
    cheaper = pour if pour.added_cost < pier.added_cost else pier
    assert fix.startswith(cheaper.kind) and f"{cheaper.added_cost:,.0f}" in fix


def test_vu_max_capped_pier_gets_no_steel_fix_but_thickness_or_grade():
    # V* far beyond Vu.max = 0.2 x 25 x 0.8 x 3000 x 200 = 2400 kN x 0.7 = 1680 kN (Cl 11.6.2)
    opts = evaluate_options(one_pier(), acts(1900.0), TARGET, Settings())
    assert (opts[opts.kind == "horizontal bars"].util > 1.0).all()
    assert (opts[opts.kind.isin([GRADE_KIND, "thickness"])].util <= 1.0).any()


def test_prices_text_is_parsed_and_interpolated():
    p = costs.parse_concrete_prices("32:260; 40 = 285")
    assert costs.concrete_price(p, 36.0) == pytest.approx(272.5)  # halfway (hand evaluation)
    with pytest.raises(ValueError, match="grade:price"):
        costs.parse_concrete_prices("32-260")
    assert as3600.STANDARD_GRADES[0] == 20.0
    # a premium is never a credit: concrete already above the grade stays as it is
    assert costs.grade_premium(p, 40.0, 32.0, 1.0) == 0.0
    assert costs.grade_premium(p, 32.0, 40.0, 2.0) == pytest.approx(50.0)  # 2 x (285 - 260)


def test_pour_plan_where_no_grade_alone_fixes_the_pour_is_one_grade_and_passes_when_built():
    """W1 needs a grade and horizontal bars (no single change passes); W2 of the same pour
    fails in shear. No grade alone fixes both: the pour row becomes one plan, the highest grade
    the piers' pairs name for the whole pour plus each pier's own part; built, all pass."""
    piers = core_of_two(h_dia=10.0, h_spacing=300.0)
    a = pd.concat(
        [acts(2400.0, n=15000.0, m=300.0, pier="W1"), acts(800.0, pier="W2"), acts(100.0, pier="W3")],
        ignore_index=True,
    )
    out = advise(piers, a, failing("W1", "W2"), Settings())
    pour = out[out.scope == "pour"].iloc[0]
    assert pour.kind == "grade (whole pour) + pier changes" and pour.util <= 1.0
    grade = float(re.match(r"f'c (\d+) MPa", pour.option).group(1))
    prem = pour_premiums(piers, Settings()).set_index(["pour", "grade"]).premium[("core A, L1", grade)]
    assert pour.added_cost >= prem - 1e-9  # the premium once, plus the piers' parts
    # W1's summary fix is its part of the plan (its own best change names the pour's grade)
    assert cheapest_fixes(out)[("L1", "W1")].startswith("plan of pour core A, L1: f'c")
    fields = {}
    for p, fc0, base in (("W1", 25.0, dict(fc=25.0, h_dia=10.0, h_spacing=300.0)), ("W2", 32.0, {})):
        part = out[(out.pier_id == p) & (out.plan != "")].plan.iloc[0]
        assert part.startswith("plan of pour core A, L1: ")
        f = changed(dict(base, fc=max(fc0, grade)), part.split(": ", 1)[1])
        fields[p] = f
    built = pier_table(
        [
            builders.wall("W1", 0, 0, 3.0, 0, **(dict(thickness=200.0, core="A") | fields["W1"])),
            builders.wall("W2", 0, 0, 0, 2.0, **(dict(thickness=200.0, core="A") | fields["W2"])),
            builders.wall("W3", 9, 0, 9, 2.0, thickness=200.0, fc=25.0, core="B"),
        ]
    )
    assert all_checks_pass(built, a)


@settings(max_examples=10, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    v=st.floats(0.0, 900.0),
    n=st.floats(-1500.0, 5000.0),
    m=st.floats(0.0, 2000.0),
)
@example(v=300.0, n=1000.0, m=300.0)  # passes at f'c 25 (asserted below): the claim is tried
def test_a_higher_grade_makes_no_passing_pier_fail(v, n, m):
    """What a pour's grade assumes of the other piers of the pour (engineering-basis.md): a pier
    that passes every check at f'c 25 passes at every higher standard grade, the actions held."""
    a = acts(v, n=n, m=m)
    if not all_checks_pass(one_pier(h_dia=12.0, h_spacing=200.0), a):
        assert (v, n, m) != (300.0, 1000.0, 300.0)
        return  # only passing piers are the claim's
    for g in as3600.STANDARD_GRADES:
        if g > 25.0:
            assert all_checks_pass(one_pier(fc=g, h_dia=12.0, h_spacing=200.0), a), g


def test_the_search_keeps_to_the_projects_standard():
    """Under ACI 318-19 the grades offered are that standard's list (`Standard.grades`: common
    SI strengths, common practice, no source) and the bars keep its spacing limit: 11.7.2.1 /
    11.7.3.1, the least of 3 h and 450 mm for a wall whose shear steel is not required
    (ACI 318-19, from memory as docs/engineering-basis.md records) = 450 mm for 200 mm, wider
    than AS 3600 Cl 11.7.3's min(2.5 tw, 350) = 350 mm (hand evaluation); the catalogue stops at
    300 mm, so spacing does not separate them here and the grades do: 28 and 35 MPa are ACI's
    alone, 20 and 100 MPa AS 3600's alone."""
    from xlcore.codes import get_standard

    aci = Settings(standard="ACI 318-19")
    opts = evaluate_options(one_pier(), acts(1900.0), TARGET, aci)
    offered = set(opts[opts.kind == GRADE_KIND].option)
    aci_grades = [g for g in get_standard("ACI 318-19").grades() if g > 25.0]
    assert offered == {f"f'c {g:g} MPa" for g in aci_grades}
    assert "f'c 28 MPa" in offered and "f'c 100 MPa" not in offered
    as_opts = evaluate_options(one_pier(), acts(1900.0), TARGET, Settings())
    as_offered = set(as_opts[as_opts.kind == GRADE_KIND].option)
    assert "f'c 100 MPa" in as_offered and "f'c 28 MPa" not in as_offered
