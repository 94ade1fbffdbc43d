"""Trouton's ratio of a series' own line, against water's (IAPWS-95, ``iapws`` package).

Reference: ΔH_vap of water at its normal boiling point 373.124 K is
40.657 kJ/mol (IAPWS-95 via the IAPWS-IF97 steam tables' 2256.4 kJ/kg ×
18.015 g/mol; quoted from memory of the tables), so ΔH/T_b = 109.0 J mol⁻¹ K⁻¹.
A straight ln P–1/T line through 330–370 K carries the larger apparent ΔH of
those temperatures (about 42 kJ/mol), so its ratio lies a few percent above.
"""

from __future__ import annotations

import numpy as np
import pytest

from audit.thermo.trouton import line_trouton_ratio
from tests.conftest import iapws_saturation_pressure


def test_water_line_gives_troutons_ratio_near_the_steam_tables():
    T = np.linspace(330.0, 370.0, 9)
    line = line_trouton_ratio(T, np.log(iapws_saturation_pressure(T)))
    assert line.ratio == pytest.approx(40657.0 / 373.124, rel=0.05)
    assert line.T_boiling == pytest.approx(373.124, abs=1.0)
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
