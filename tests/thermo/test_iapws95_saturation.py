"""Liquid-water saturation pressure against IAPWS-95.

Sources: the full IAPWS-95 formulation as implemented by the ``iapws`` PyPI
package (``IAPWS95(T, x=0).P``, MPa); the values of the auxiliary equation
of W. Wagner & A. Pruss, J. Phys. Chem. Ref. Data 22, 783 (1993),
doi:10.1063/1.555926 (298.15 K -> 3169.82 Pa, 373.124 K -> 101 323.9 Pa,
500 K -> 2.639223 MPa, as computed with the release coefficients and
cross-checked numerically with iapws 1.5.5); IAPWS-95 ΔCp(298 K) ≈ -42 J/(mol K)
(Cp of ideal-gas vapor minus Cp of the liquid, from IAPWS-95 via CoolProp).
"""

import numpy as np
import pytest
import statsmodels.api as sm

from audit.thermo import WATER_SATURATION, curvature_test, fit_equation, select_equation

from ._data import iapws_liquid, noisy

from ..references.iapws95_enthalpy import DH_OVER_DZ_TB, T_BOILING
from ..references.iapws_r10_06 import T_TRIPLE
from ..references.wagner_pruss_2002 import CHECK_VALUES as WP_CHECK_VALUES
from ..references.wagner_pruss_2002 import PC, TC


@pytest.mark.parametrize("T, p_ref", sorted(WP_CHECK_VALUES.items()))
def test_auxiliary_equation_values(T, p_ref):
    # The reference values are quoted to 6 significant digits: 2e-6 relative.
    assert WATER_SATURATION.p(T) == pytest.approx(p_ref, rel=2e-6)


def test_auxiliary_equation_vs_full_iapws95():
    T = np.linspace(T_TRIPLE, 640.0, 40)
    # Wagner & Pruss state the auxiliary equation agrees with IAPWS-95 to
    # within 0.0072 % (references cross-check); allow 0.01 %.
    rel = WATER_SATURATION.p(T) / iapws_liquid(T) - 1
    assert np.max(np.abs(rel)) < 1e-4


def test_iapws_vapor_pressure_pitfall_is_mpa():
    # iapws.IAPWS95._Vapor_Pressure returns MPa although documented as Pa;
    # make sure we compare like with like.
    from iapws import IAPWS95

    assert IAPWS95._Vapor_Pressure(T_BOILING) * 1e6 == pytest.approx(WATER_SATURATION.p(T_BOILING), rel=1e-4)


@pytest.mark.parametrize("T", [280.0, T_BOILING, 600.0])
def test_derivatives_vs_finite_difference(T):
    h = 1e-3  # central differences: truncation error ~h², round-off ~1e-16/h
    fd1 = (WATER_SATURATION.ln_p(T + h) - WATER_SATURATION.ln_p(T - h)) / (2 * h)
    fd2 = (WATER_SATURATION.dlnp_dT(T + h) - WATER_SATURATION.dlnp_dT(T - h)) / (2 * h)
    assert WATER_SATURATION.dlnp_dT(T) == pytest.approx(fd1, rel=1e-8)
    assert WATER_SATURATION.d2lnp_dT2(T) == pytest.approx(fd2, rel=1e-6)
    assert WATER_SATURATION.dlnp_dinvT(T) == pytest.approx(-T * T * fd1, rel=1e-8)


def test_derivative_vs_iapws_clapeyron_slope():
    # At Tb, -d ln p/d(1/T) = ΔH/(RΔz) = 41.317 kJ/mol / R from IAPWS-95
    # (references cross-check table); the auxiliary equation reproduces the
    # slope to better than 0.05 %.
    from audit.thermo.constants import R

    assert -R * WATER_SATURATION.dlnp_dinvT(T_BOILING) == pytest.approx(DH_OVER_DZ_TB, rel=5e-4)


@pytest.fixture(scope="module")
def water_choice():
    T = np.linspace(T_TRIPLE, 373.15, 30)
    P = noisy(iapws_liquid(T), 5e-4, seed=7)
    return T, P, select_equation(T, P, u_P=5e-4 * P, Tc=TC, Pc=PC)


def test_selected_fit_reproduces_within_noise(water_choice):
    T, P, choice = water_choice
    # The noise is 0.05 % per point; a correct curve leaves residuals of that
    # size. 0.065 % allows for sampling fluctuation of the RMS of 30 points
    # (relative sd of an RMS of n normals ≈ 1/sqrt(2n) = 13 %, so 1.3 sd).
    assert choice.chosen.rms_percent < 0.065
    assert choice.chosen_name != "clausius-clapeyron-2", choice.summary()


def test_water_is_curved_and_dcp_plausible(water_choice):
    T, P, _ = water_choice
    f2 = fit_equation(T, P, "cc2", u_P=5e-4 * P, robust=False)
    f3 = fit_equation(T, P, "cc3", u_P=5e-4 * P, robust=False)
    test = curvature_test(f2, f3)
    # Over 100 K the constant-ΔH line misses by ~1 % in P: overwhelming.
    assert test.p_value < 1e-10
    # IAPWS-95: ΔCp ≈ -42 J/(mol K) at 298 K, about -44 near 320 K (T_ref).
    assert -60 < test.dCp < -30
    assert abs(test.dCp - (-42)) < 3 * test.u_dCp + 5  # 5 J/(mol K): ΔCp varies over the range


def test_curvature_f_test_matches_statsmodels():
    # Verification of curvature_test's F statistic against statsmodels'
    # nested-model F test on the same OLS problem (no uncertainties given).
    T = np.linspace(280, 360, 15)
    P = noisy(iapws_liquid(T), 1e-3, seed=3)
    f2 = fit_equation(T, P, "cc2", robust=False)
    f3 = fit_equation(T, P, "cc3", robust=False)
    ours = curvature_test(f2, f3)
    y = np.log(P)
    r2 = sm.OLS(y, np.column_stack([np.ones_like(T), 1 / T])).fit()
    r3 = sm.OLS(y, np.column_stack([np.ones_like(T), 1 / T, np.log(T)])).fit()
    F, p, df = r3.compare_f_test(r2)
    assert ours.statistic == pytest.approx(F, rel=1e-6)
    assert ours.p_value == pytest.approx(p, rel=1e-5, abs=1e-300)
