"""The shear phi of ACI 318-19 special structural walls stated where it is used: the shear
amplification rows' basis names where phi came from and the 0.60 of 21.2.4.1 (phi for shear of a
member whose nominal shear strength is less than the shear at its nominal flexural strength;
ACI 318-19 21.2.4.1, from memory, as codes/aci318.py PHI_SHEAR_SEISMIC records). The limit
follows the setting: phi Vn scales with phi (hand evaluation, the Vn of
tests/test_aci318_special_walls.py::test_shear_amplification_by_hand)."""

import math

import pytest
from test_aci318_special_walls import SW, _acts, _rows, _tower

from xlcore.checks.section14 import check_section14
from xlcore.model import Settings


def test_basis_states_the_phi_and_the_seismic_060():
    piers = _tower()
    acts = _acts(piers, n=2000.0, m=3000.0, v=500.0, combo="E1")
    blank = _rows(check_section14(piers, acts, Settings(**SW)), "L1", "shear amplification", "E1")
    assert "phi 0.75 (Table 21.2.1, 'phi for wall shear' blank" in blank.basis
    assert "21.2.4.1 asks 0.60" in blank.basis
    out = check_section14(piers, acts, Settings(**SW, phi_shear=0.6))
    set_060 = _rows(out, "L1", "shear amplification", "E1")
    assert "phi 0.6 (Project setting 'phi for wall shear'" in set_060.basis
    # phi Vn = phi (0.17 sqrt(40) + rho_t 420) 3000 x 200 (hand evaluation): 0.60 / 0.75 of the blank's
    rho_t = 2 * math.pi * 36 / (200 * 200)
    vn = min((0.17 * math.sqrt(40) + rho_t * 420) * 600_000, 0.66 * math.sqrt(40) * 600_000)
    assert set_060.limit == pytest.approx(0.60 * vn * 1e-3)
    assert blank.limit == pytest.approx(0.75 * vn * 1e-3)
