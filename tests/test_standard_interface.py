"""Both standards satisfy the `codes.base.Standard` interface, and the AS 3600 adapter gives the
same numbers as the codes/as3600.py functions the checks call today (so wiring the checks to
the interface changes nothing for AS 3600). Both are selectable in the workbook
(layout.STANDARDS)."""

import inspect

import numpy as np
import pytest

from xlcore import layout
from xlcore.codes import as3600, base, get_standard, standard_names
from xlcore.codes.aci318 import ACI318
from xlcore.codes.as3600_standard import AS3600

STANDARDS = [AS3600(), ACI318()]
PROTOCOL_METHODS = [
    name
    for name, member in vars(base.Standard).items()
    if callable(member) and not name.startswith("_") and name not in ("register",)
]
PROTOCOL_ATTRIBUTES = [name for name in base.Standard.__annotations__]


def test_protocol_lists_the_quantities_the_checks_ask_for():
    # the interface is not empty: every group of the brief has a member
    for name in (
        "wall_shear",
        "stress_block",
        "phi_axial_bending",
        "squash_load",
        "tension_capacity",
        "simplified_capacity",
        "effective_height_factor",
        "min_ratios",
        "max_spacing",
        "beam_flexure",
        "beam_shear",
        "coupling_beam_shear",
        "boundary_stress_limits",
        "clause",
    ):
        assert name in PROTOCOL_METHODS
    assert set(PROTOCOL_ATTRIBUTES) >= {"name", "Es", "eps_cu", "phi_wall_shear", "phi_compression"}


@pytest.mark.parametrize("std", STANDARDS, ids=lambda s: s.name)
def test_standard_satisfies_the_interface(std):
    assert isinstance(std, base.Standard)  # runtime_checkable: every member present
    for name in PROTOCOL_METHODS:
        want = [p for p in inspect.signature(getattr(base.Standard, name)).parameters if p != "self"]
        have = list(inspect.signature(getattr(std, name)).parameters)
        assert have == want, f"{std.name}.{name}{have} differs from the interface {want}"
    for name in PROTOCOL_ATTRIBUTES:
        assert getattr(std, name) is not None


@pytest.mark.parametrize("std", STANDARDS, ids=lambda s: s.name)
def test_every_clause_key_has_a_text_naming_the_standard(std):
    for key in base.CLAUSE_KEYS:
        text = std.clause(key)
        assert std.name.split()[0] in text, (key, text)


@pytest.mark.parametrize("std", STANDARDS, ids=lambda s: s.name)
def test_methods_return_arrays_over_rows(std):
    fc, fy = np.array([32.0, 40.0, 50.0]), np.array([500.0, 500.0, 420.0])
    Lw, tw = np.array([3000.0, 1500.0, 800.0]), np.array([200.0, 250.0, 300.0])
    r = std.wall_shear(fc, fy, Lw, tw, np.array([0.5, 1.8, 3.0]), 0.003, 0.003)
    assert r.design.shape == (3,)
    assert np.all(r.design == r.phi * r.nominal)
    assert np.all(r.nominal <= r.limit + 1e-9)
    assert len(r.clauses()) == 3
    a, g = std.stress_block(fc)
    assert a.shape == g.shape == (3,)
    assert np.all(std.tension_capacity(1000.0, fy) < 0)
    assert np.all(std.max_compression(fc, 600_000.0, 3000.0, fy) < std.squash_load(fc, 600_000.0, 3000.0, fy))
    excl = std.simplified_exclusions(
        np.array([1e6, -1e5, 1e6]),
        np.array([1.0, -1.0, -1.0]),
        tw,
        3000.0,
        np.array([10.0, 10.0, 10.0]),
        2,
        1.0,
    )
    assert excl["not in compression"].tolist() == [False, True, False]
    assert excl["end in tension"].tolist() == [False, False, True]


def test_registry_returns_the_objects_and_names_unknown_ones():
    assert standard_names()[:2] == ("AS 3600:2018", "ACI 318-19")
    assert get_standard("AS 3600:2018").name == as3600.NAME
    assert get_standard("ACI 318-19").name == "ACI 318-19"
    with pytest.raises(KeyError, match="known: AS 3600:2018, ACI 318-19"):
        get_standard("EN 1992")


def test_registering_a_standard_by_object():
    base.register_standard("test-only", ACI318())
    try:
        assert get_standard("test-only").name == "ACI 318-19"
    finally:
        base._REGISTRY.pop("test-only")


def test_both_standards_are_selectable_in_the_workbook():
    # the checks take the standard through the interface (checks/shear.py, axial.py, core_nm.py,
    # core_stress.py): every name the Project sheet offers is a registered standard
    assert layout.STANDARDS == ("AS 3600:2018", "ACI 318-19")
    for name in layout.STANDARDS:
        assert get_standard(name).name == name


@pytest.mark.parametrize("std", STANDARDS, ids=lambda s: s.name)
def test_every_symbol_the_checks_write_is_given(std):
    assert set(base.SYMBOL_KEYS) <= set(std.symbols), set(base.SYMBOL_KEYS) - set(std.symbols)
    assert all(isinstance(std.symbols[k], str) and std.symbols[k] for k in base.SYMBOL_KEYS)


# ---- the AS 3600 adapter gives the numbers of the functions the checks call today

FC = np.array([25.0, 40.0, 65.0])
FSY = np.array([500.0, 500.0, 500.0])
LW = np.array([3000.0, 1200.0, 900.0])
TW = np.array([200.0, 250.0, 300.0])


def test_as3600_adapter_wall_shear_equals_as3600():
    ratio = np.array([0.5, 1.5, 3.0])
    ref = as3600.wall_shear(FC, FSY, LW, TW, ratio * LW, 0.004, 0.003, 0.7)
    got = AS3600().wall_shear(FC, FSY, LW, TW, ratio, 0.004, 0.003)
    np.testing.assert_array_equal(got.design, ref.phi_vu)
    np.testing.assert_array_equal(got.governs, ref.governs)
    np.testing.assert_array_equal(got.detail["eq2"], ref.eq2)
    assert got.clauses() == [as3600.GOVERNING_TEXT[g] for g in ref.governs]
    rho, capped = AS3600().wall_steel_required(np.array([800e3, 900e3, 5e6]), 0.7, FC, FSY, LW, TW, ratio)
    vuc, _ = as3600.wall_vuc(FC, ratio, LW, TW)
    r2, c2 = as3600.wall_rho_required(np.array([800e3, 900e3, 5e6]), 0.7, vuc, ref.vu_max, FSY, LW, TW)
    np.testing.assert_array_equal(rho, r2)
    np.testing.assert_array_equal(capped, c2)


def test_as3600_adapter_axial_and_detailing_equal_as3600():
    s = AS3600()
    a2, g = s.stress_block(FC)
    np.testing.assert_array_equal(a2, as3600.alpha2(FC))
    np.testing.assert_array_equal(g, as3600.gamma(FC))
    np.testing.assert_array_equal(s.squash_load(FC, 6e5, 3e3, FSY), as3600.squash_load(FC, 6e5, 3e3, FSY))
    state = base.SectionState(
        nu=np.array([-1e5, 2e5, 3e6]),
        dn=np.ones(3),
        d0=np.ones(3),
        fy=FSY,
        nub=np.array([1e6, 1e6, 1e6]),
        nuot=np.array([-5e5, -5e5, -5e5]),
        kuo=np.array([0.1, 0.3, 0.5]),
    )
    np.testing.assert_array_equal(
        s.phi_axial_bending(state), as3600.phi_axial_bending(state.nu, state.nub, state.nuot, state.kuo)
    )
    np.testing.assert_array_equal(s.design_moment(1e6, 2e6, LW), as3600.min_eccentricity_moment(1e6, 2e6, LW))
    k = s.effective_height_factor(np.array([3000.0] * 3), LW, np.array([0, 1, 2]), True)
    np.testing.assert_array_equal(k, as3600.effective_height_factor(3000.0, LW, np.array([0, 1, 2]), True))
    e = np.array([5.0, 20.0, 60.0])
    cap = s.simplified_capacity(FC, TW, LW, 2700.0, e)
    ecc, ea = as3600.simplified_eccentricity(e, TW), as3600.additional_eccentricity(2700.0, TW)
    np.testing.assert_array_equal(cap, as3600.simplified_capacity(FC, TW, ecc, ea, LW, as3600.PHI_SIMPLIFIED))
    v, h = s.min_ratios(
        fc=FC,
        fy=FSY,
        tw=TW,
        Lw=LW,
        wall_length=LW,
        sigma=np.array([0.5, 2.0, 3.0]),
        v_star=0.0,
        hw_lw=1.0,
        rho_h=0.003,
        bar_dia=12.0,
        restrained=True,
    )
    np.testing.assert_array_equal(v, as3600.wall_rho_v_min(np.array([0.5, 2.0, 3.0]), FC))
    np.testing.assert_array_equal(h, as3600.wall_rho_h_min(True, LW))
    sv, sh = s.max_spacing(TW, LW)
    np.testing.assert_array_equal(sv, as3600.wall_max_spacing(TW))
    np.testing.assert_array_equal(sh, as3600.wall_max_spacing(TW))


def test_as3600_adapter_beams_equal_as3600():
    s = AS3600()
    got = s.beam_flexure(200.0, 450.0, 900.0, 40.0, 500.0)
    ref = as3600.beam_flexure(200.0, 450.0, 900.0, 40.0, 500.0)
    for a, b in zip(got, ref, strict=True):
        assert a == b
    bs = s.beam_shear(40.0, 200.0, 450.0, 500.0, 157.0, 150.0, 500.0, 0.01)
    dv = as3600.beam_dv(450.0, 500.0)
    vuc, _ = as3600.beam_vuc(40.0, 200.0, dv, 157.0, as3600.beam_asv_min(40.0, 200.0, 150.0, 500.0))
    assert bs.concrete == vuc
    assert bs.nominal == min(
        vuc + as3600.beam_vus(157.0, 500.0, dv, 150.0), as3600.beam_vu_max(40.0, 200.0, dv)
    )
    assert np.isnan(s.coupling_beam_shear(1000.0, 500.0, 0.5, 40.0, 1e5))  # no such clause in AS 3600
