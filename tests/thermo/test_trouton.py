"""Trouton's ratio of a series' own line, against water's (IAPWS-95, ``iapws`` package).

Reference: ΔH_vap of water at its normal boiling point, from IAPWS-95
(``tests/references/iapws95_enthalpy.py``: 40.651 kJ/mol at 373.124 K), so
ΔH/T_b = 108.9 J mol⁻¹ K⁻¹.
A straight ln P–1/T line through 330–370 K carries the larger apparent ΔH of
those temperatures (about 42 kJ/mol), so its ratio lies a few percent above.
"""

from __future__ import annotations

import numpy as np
import pytest

from audit.thermo.trouton import line_trouton_ratio
from tests.conftest import iapws_saturation_pressure

from ..references.iapws95_enthalpy import DH_VAP_TB, T_BOILING


def test_water_line_gives_troutons_ratio_near_the_steam_tables():
    T = np.linspace(330.0, 370.0, 9)
    line = line_trouton_ratio(T, np.log(iapws_saturation_pressure(T)))
    assert line.ratio == pytest.approx(DH_VAP_TB / T_BOILING, rel=0.05)
    assert line.T_boiling == pytest.approx(T_BOILING, abs=1.0)
    assert line.u_ratio < 0.5  # exact values: only the line's misfit of the curvature


def test_water_printed_in_celsius_under_kelvin_gives_no_substances_ratio():
    T = np.linspace(330.0, 370.0, 9)
    line = line_trouton_ratio(T - 273.15, np.log(iapws_saturation_pressure(T)))
    assert line.ratio < 30.0  # no liquid has one this low (helium's is about 20 at 4.2 K)


@pytest.mark.parametrize("T,P", [([300.0, 310.0], [1.0, 2.0]),             # two temperatures
                                 ([300.0, 310.0, 320.0], [3.0, 2.0, 1.0]),  # pressure falling
                                 ([-5.0, 310.0, 320.0], [1.0, 2.0, 3.0])])  # below 0 K
def test_no_line_no_ratio(T, P):
    assert line_trouton_ratio(T, np.log(P)) is None


def test_pressures_printed_to_one_digit_leave_the_intercept_uncertain():
    # water at 400-430 K (IAPWS-95) printed to one significant digit: a staircase of 200000,
    # 300000, ... Pa.  With each value's rounding (step/√12) as its u, the ratio's uncertainty is
    # never below what the rounding alone propagates to the intercept (numpy's weighted polyfit,
    # unscaled covariance, computed independently here)
    T = np.linspace(400.0, 430.0, 12)
    P = iapws_saturation_pressure(T)
    step = 10.0 ** np.floor(np.log10(P))
    printed = np.round(P / step) * step
    u = step / np.sqrt(12.0) / printed
    line = line_trouton_ratio(T, np.log(printed), u)
    _, cov = np.polyfit(1.0 / T, np.log(printed), 1, w=1.0 / u, cov="unscaled")
    R = 8.314462618
    assert line.u_ratio >= R * np.sqrt(cov[1, 1]) * (1 - 1e-9)
    assert abs(line.ratio - DH_VAP_TB / T_BOILING) < 3 * line.u_ratio
