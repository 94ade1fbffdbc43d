"""Sublimation of ice Ih against IAPWS R14-08(2011).

Sources: W. Wagner, T. Riethmann, R. Feistel, A. H. Harvey, J. Phys. Chem.
Ref. Data 40, 043103 (2011), doi:10.1063/1.3657937, values 200 K -> 0.162604
Pa, 230 K -> 8.94735 Pa, 250 K -> 76.0127 Pa, 260 K -> 195.802 Pa, 270 K ->
470.062 Pa (computed from the release, cross-checked with iapws 1.5.5);
``iapws._iapws._Sublimation_Pressure`` (MPa).  ΔH_sub(T) of ice from IAPWS-95
+ IAPWS-06: 51.040 (200 K), 51.136 (230 K), 51.141 (240 K), 51.134 (250 K),
51.076 kJ/mol (270 K).
"""

import numpy as np
import pytest

from audit.thermo import ICE_SUBLIMATION, implied_enthalpy, select_equation

from ._data import iapws_ice, noisy

from ..references.iapws95_enthalpy import DH_SUB
from ..references.iapws_r10_06 import P_TRIPLE, T_TRIPLE
from ..references.iapws_r14_08 import CHECK_VALUES as R14_CHECK_VALUES


@pytest.mark.parametrize("T, p_ref", sorted(R14_CHECK_VALUES.items()))
def test_release_values(T, p_ref):
    # Values quoted to 6 significant figures: 3e-6 relative.
    assert ICE_SUBLIMATION.p(T) == pytest.approx(p_ref, rel=3e-6)


def test_vs_iapws_package():
    T = np.linspace(50.0, T_TRIPLE, 60)
    # Same equation, independent code: agreement to rounding (1e-10).
    np.testing.assert_allclose(ICE_SUBLIMATION.p(T), iapws_ice(T), rtol=1e-10)


def test_triple_point_and_range():
    assert ICE_SUBLIMATION.p(T_TRIPLE) == pytest.approx(P_TRIPLE, rel=1e-9)  # pt by construction
    assert ICE_SUBLIMATION.in_range(T_TRIPLE) and not ICE_SUBLIMATION.in_range(280.0)


def test_derivative_vs_finite_difference():
    T, h = 240.0, 1e-3
    fd = (ICE_SUBLIMATION.ln_p(T + h) - ICE_SUBLIMATION.ln_p(T - h)) / (2 * h)
    assert ICE_SUBLIMATION.dlnp_dT(T) == pytest.approx(fd, rel=1e-8)


def test_equation_enthalpy_vs_iapws06():
    # Apparent -R dlnp/d(1/T) of the release equation vs the calorimetric
    # ΔH_sub from IAPWS-95 + IAPWS-06; Δz of ice differs from 1 by < 1e-3
    # below 273 K, and the release equation fits ΔH to ~0.1 %: allow 0.3 %.
    res = implied_enthalpy(ICE_SUBLIMATION, [200.0, 230.0, 250.0, 270.0])
    np.testing.assert_allclose(res.dH_apparent, [DH_SUB[T] for T in (200.0, 230.0, 250.0, 270.0)], rtol=3e-3)


def test_fitted_sublimation_enthalpy():
    T = np.linspace(200.0, 273.0, 30)
    P = noisy(iapws_ice(T), 1e-3, seed=5)
    choice = select_equation(T, P, u_P=1e-3 * P, branch="solid")
    res = implied_enthalpy(choice.chosen, 230.0)
    # Brief tolerance 0.5 % of 51.136 kJ/mol at 230 K (the middle of the
    # range, where the fit's u(ΔH) ≈ 0.05 %; curvature of ΔH_sub(T) is only
    # ~0.1 kJ/mol = 0.2 % over the range).
    assert res.dH[0] == pytest.approx(DH_SUB[230.0], rel=5e-3)
    assert abs(res.dH[0] - DH_SUB[230.0]) < 3 * res.u_dH[0] + 100
