"""The advice search checks ACI 318-19 special walls with the design check's ns (18.10.3.1.3):
the storeys up to the building's highest wall where the Project setting is blank, not the
highest storey of the batch of variants it happens to check (checks/advice.py `building_ns`).
Values: ACI 318-19 18.10.3.1.3, omega_v = 1.3 + ns/30 <= 1.8 for ns > 6 and ns not less than
0.007 hwcs (in.), evaluated by hand as tests/test_aci_special_rows.py does for the same tower."""

import pytest
from test_aci318_special_walls import SW, _acts, _rows, _tower

from xlcore.checks.advice import building_ns
from xlcore.checks.section14 import check_section14
from xlcore.model import Settings


def test_ns_is_the_buildings_where_the_setting_is_blank():
    piers = _tower()  # ten storeys, hwcs = 32 000 mm
    assert building_ns(Settings(**SW), piers).aci_storeys_above == 10.0
    # a value the engineer entered is kept
    assert building_ns(Settings(**SW, aci_storeys_above=4), piers).aci_storeys_above == 4.0


def test_a_batch_of_low_storey_rows_amplifies_shear_as_the_design_check_does():
    piers = _tower()
    acts = _acts(piers, n=2000.0, m=3000.0, v=500.0, combo="E1")
    low = piers[piers.storey == "L1"]
    low_acts = acts[acts.storey == "L1"]
    whole = _rows(check_section14(piers, acts, Settings(**SW)), "L1", "shear amplification", "E1")
    # hand: ns = 10 storeys > 0.007 x 32000/25.4 = 8.82; omega_v = 1.3 + 10/30; Ve = 1.5 omega_v Vu
    assert whole.value == pytest.approx(1.5 * (1.3 + 10 / 30) * 500.0)
    fixed = building_ns(Settings(**SW), piers)
    alone = _rows(check_section14(low, low_acts, fixed), "L1", "shear amplification", "E1")
    assert alone.value == pytest.approx(whole.value)
    # without it, the L1 rows alone see one storey: the least ns 8.82 governs, a smaller Ve
    plain = _rows(check_section14(low, low_acts, Settings(**SW)), "L1", "shear amplification", "E1")
    assert plain.value == pytest.approx(1.5 * (1.3 + 0.007 * 32000 / 25.4 / 30) * 500.0)
    assert plain.value < whole.value
