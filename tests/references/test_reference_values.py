"""The reference modules against independent evaluations.

A typo in a reference module must fail here: each value is recomputed from
the published formula or with the ``iapws`` (1.5.5) / CoolProp (8.0.0)
packages and compared within the digits the module quotes.
"""

import math
import warnings

import pytest

from . import coolprop_8_0_0 as cp_ref
from . import iapws95_enthalpy as h_ref
from . import iapws_r10_06 as r10
from . import iapws_r14_08 as r14
from . import tsonopoulos_1974 as ts_ref
from . import wagner_pruss_2002 as wp

R = 8.314462618  # J/(mol K), CODATA 2018 (exact)


def _half_unit_rel(value):
    """Relative half-unit of the last quoted digit of `value` (from its repr)."""
    text = repr(float(value)).lower()
    mant, _, exp = text.partition("e")
    decimals = len(mant.split(".")[1]) if "." in mant else 0
    if mant.endswith(".0"):
        decimals = 0
    return 0.5 * 10.0 ** (-decimals + (int(exp) if exp else 0)) / abs(value)


def test_half_unit_helper():
    assert _half_unit_rel(611.657) == pytest.approx(0.0005 / 611.657)
    assert _half_unit_rel(2.639223e6) == pytest.approx(0.5 / 2.639223e6)


# --- IAPWS R10-06 ----------------------------------------------------------

def test_triple_point_matches_iapws_package():
    from iapws._iapws import Pt, Tt

    assert r10.T_TRIPLE == Tt
    assert r10.P_TRIPLE == pytest.approx(Pt * 1e6, rel=1e-12)


def test_triple_point_pressure_on_iapws95():
    from iapws import IAPWS95

    # IAPWS-95 passes within 0.01 % of the triple point (611.655 Pa).
    assert IAPWS95(T=r10.T_TRIPLE, x=0).P * 1e6 == pytest.approx(r10.P_TRIPLE, rel=1e-4)


# --- IAPWS R14-08 ----------------------------------------------------------

def test_sublimation_coefficients_match_iapws_package():
    from iapws._iapws import _Sublimation_Pressure

    # Same equation, independent code; a change in any coefficient digit
    # moves p by more than 1e-9 somewhere in 50-273 K.
    for T in (50.0, 80.0, 120.0, 160.0, 200.0, 240.0, 270.0):
        assert r14.sublimation_pressure(T) == pytest.approx(_Sublimation_Pressure(T) * 1e6, rel=1e-9)


@pytest.mark.parametrize("T", sorted(r14.CHECK_VALUES))
def test_sublimation_check_values(T):
    p_ref = r14.CHECK_VALUES[T]
    assert r14.sublimation_pressure(T) == pytest.approx(p_ref, rel=_half_unit_rel(p_ref))


def test_sublimation_passes_through_triple_point():
    assert r14.sublimation_pressure(r14.T_MAX) == pytest.approx(r10.P_TRIPLE, rel=1e-8)


# --- Wagner & Pruss --------------------------------------------------------

def test_critical_constants_match_iapws_package():
    from iapws._iapws import Pc, Tc

    assert wp.TC == Tc
    assert wp.PC == pytest.approx(Pc * 1e6, rel=1e-12)


def test_auxiliary_coefficients_match_iapws_package():
    from iapws import IAPWS95

    assert tuple(IAPWS95._Pv["ao"]) == wp.A
    assert tuple(float(e) for e in IAPWS95._Pv["exp"]) == wp.EXPONENTS


@pytest.mark.parametrize("T", sorted(wp.CHECK_VALUES))
def test_auxiliary_check_values(T):
    from iapws import IAPWS95

    p_ref = wp.CHECK_VALUES[T]
    tol = _half_unit_rel(p_ref)
    assert wp.saturation_pressure(T) == pytest.approx(p_ref, rel=tol)
    assert IAPWS95._Vapor_Pressure(T) * 1e6 == pytest.approx(p_ref, rel=tol)  # MPa, not Pa


def test_auxiliary_vs_full_iapws95():
    from iapws import IAPWS95

    worst = max(abs(wp.saturation_pressure(T) / (IAPWS95(T=T, x=0).P * 1e6) - 1)
                for T in [273.16 + 10.0 * i for i in range(37)])
    # quoted as 0.0072 %: the worst of this grid lies within a tenth of that
    assert worst < wp.MAX_REL_DEVIATION_FROM_IAPWS95
    assert worst > 0.5 * wp.MAX_REL_DEVIATION_FROM_IAPWS95


# --- enthalpies from IAPWS-95 / IAPWS-06 -----------------------------------

def _vaporization(T):
    from iapws import IAPWS95

    M = h_ref.MOLAR_MASS_G_PER_MOL * 1e-3
    liq, vap = IAPWS95(T=T, x=0), IAPWS95(T=T, x=1)
    p = liq.P * 1e6
    dz = p * M / (R * T) * (1 / vap.rho - 1 / liq.rho)
    return (vap.h - liq.h) * 1e3 * M, dz, p


def _sublimation(T):
    from iapws import IAPWS95
    from iapws._iapws import _Ice, _Sublimation_Pressure

    p = _Sublimation_Pressure(T)  # MPa
    M = h_ref.MOLAR_MASS_G_PER_MOL * 1e-3
    # vapor below Tt: IAPWS-95 evaluated at the (nearly ideal) vapor density
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        vap = IAPWS95(T=T, rho=p * 1e6 * M / (R * T))
    return (vap.h - _Ice(T, p)["h"]) * 1e3 * M


def test_molar_mass_matches_iapws_package():
    from iapws._iapws import M

    assert h_ref.MOLAR_MASS_G_PER_MOL == M


def test_normal_boiling_point():
    from iapws import IAPWS95

    Tb = IAPWS95(P=0.101325, x=0).T
    assert h_ref.T_BOILING == pytest.approx(Tb, abs=5e-4)


def test_vaporization_at_tb():
    dH, dz, _ = _vaporization(h_ref.T_BOILING)
    assert dH == pytest.approx(h_ref.DH_VAP_TB, abs=0.5)
    assert dz == pytest.approx(h_ref.DZ_TB, abs=5e-7)
    assert dH / dz == pytest.approx(h_ref.DH_OVER_DZ_TB, abs=0.5)


def test_vaporization_at_298():
    dH, dz, _ = _vaporization(298.15)
    assert dH == pytest.approx(h_ref.DH_VAP_298, abs=0.5)
    assert dH / dz == pytest.approx(h_ref.DH_OVER_DZ_298, abs=0.5)


def test_phase_changes_at_triple_point():
    dH_vap, _, _ = _vaporization(r10.T_TRIPLE)
    dH_sub = _sublimation(r10.T_TRIPLE)
    assert dH_vap == pytest.approx(h_ref.DH_VAP_TT, abs=0.5)
    assert dH_sub == pytest.approx(h_ref.DH_SUB_TT, abs=0.5)
    assert dH_sub - dH_vap == pytest.approx(h_ref.DH_FUS_TT, abs=0.5)


@pytest.mark.parametrize("T", sorted(h_ref.DH_SUB))
def test_sublimation_enthalpy(T):
    assert _sublimation(T) == pytest.approx(h_ref.DH_SUB[T], abs=0.5)


def test_clapeyron_slopes_at_triple_point():
    h = 1e-4
    T = r10.T_TRIPLE

    def slope(f):  # d ln p / d(1/T) by central differences in T
        return -T * T * (math.log(f(T + h)) - math.log(f(T - h))) / (2 * h)

    ice, liq = slope(r14.sublimation_pressure), slope(wp.saturation_pressure)
    assert ice == pytest.approx(h_ref.DLNP_DINVT_ICE_TT, abs=0.05)
    assert liq == pytest.approx(h_ref.DLNP_DINVT_LIQUID_TT, abs=0.05)
    assert R * (liq - ice) == pytest.approx(h_ref.R_SLOPE_DIFFERENCE_TT, abs=0.5)


# --- Tsonopoulos (1974) ----------------------------------------------------

def _tsonopoulos_cm3(T, Tc, Pc, omega, a=0.0, b=0.0):
    """The published correlation, written out here independently of audit/."""
    Tr = T / Tc
    f0 = 0.1445 - 0.330 / Tr - 0.1385 / Tr ** 2 - 0.0121 / Tr ** 3 - 0.000607 / Tr ** 8
    f1 = 0.0637 + 0.331 / Tr ** 2 - 0.423 / Tr ** 3 - 0.008 / Tr ** 8
    return (f0 + omega * f1 + a / Tr ** 6 - b / Tr ** 8) * R * Tc / Pc * 1e6


def test_tsonopoulos_check_values():
    B_w = _tsonopoulos_cm3(*ts_ref.WATER_CASE, ts_ref.WATER_A, ts_ref.WATER_B)
    assert B_w == pytest.approx(ts_ref.WATER_B_CM3, abs=0.05)
    # benzene's quoted value is 0.09 cm³/mol from the evaluation (module note)
    assert _tsonopoulos_cm3(*ts_ref.BENZENE_CASE) == pytest.approx(ts_ref.BENZENE_B_CM3, abs=0.1)


# --- CoolProp 8.0.0 --------------------------------------------------------

@pytest.mark.parametrize("fluid", sorted(cp_ref.FLUIDS))
def test_coolprop_fluid_table(fluid):
    CP = pytest.importorskip("CoolProp.CoolProp")
    ref = cp_ref.FLUIDS[fluid]
    M = CP.PropsSI("molar_mass", fluid)
    Tb = CP.PropsSI("T", "P", 101325.0, "Q", 0, fluid)
    dH = (CP.PropsSI("H", "T", Tb, "Q", 1, fluid) - CP.PropsSI("H", "T", Tb, "Q", 0, fluid)) * M
    got = {"Tc": CP.PropsSI("Tcrit", fluid), "Pc": CP.PropsSI("pcrit", fluid),
           "omega": CP.PropsSI("acentric", fluid), "Tb": Tb, "dH_vap_Tb": dH,
           "trouton": dH / Tb, "p_298": CP.PropsSI("P", "T", 298.15, "Q", 0, fluid)}
    # half a unit of the last digit quoted (see the module)
    tol = {"Tc": 0.005, "Pc": 50.0, "omega": 5e-5, "Tb": 5e-4, "dH_vap_Tb": 0.5, "trouton": 0.005, "p_298": 0.005}
    for name, value in ref._asdict().items():
        assert got[name] == pytest.approx(value, abs=tol[name]), (fluid, name)


@pytest.mark.parametrize("key", sorted(cp_ref.B_EOS))
def test_coolprop_virial(key):
    CP = pytest.importorskip("CoolProp.CoolProp")
    fluid, T = key
    rho = 1e-3  # mol/m³: Z − 1 = Bρ + Cρ², Cρ² negligible
    B = (CP.PropsSI("Z", "T", T, "Dmolar", rho, fluid) - 1) / rho
    assert B == pytest.approx(cp_ref.B_EOS[key], abs=0.005e-6)
