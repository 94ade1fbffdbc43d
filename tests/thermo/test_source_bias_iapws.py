"""thermo.source_bias.pattern_against_curve on IAPWS-95 water saturation pressures (iapws).

A thermometer reading ΔT high puts each pressure at T − ΔT: ln P_printed(T) − ln P(T) =
ln P(T − ΔT) − ln P(T) ≈ −(d ln P/dT)·ΔT, which falls along the range as ΔH/RT² does; a
pressure scale is a constant. The slope is the IAPWS curve's own, by central difference.
"""

import numpy as np

from audit.thermo.source_bias import pattern_against_curve
from tests.conftest import iapws_saturation_pressure

T = np.linspace(290.0, 370.0, 16)
LN_P = np.log(iapws_saturation_pressure(T))
SLOPE = (np.log(iapws_saturation_pressure(T + 0.01)) - np.log(iapws_saturation_pressure(T - 0.01))) / 0.02
SIGMA = np.full(T.size, 2e-4)


def test_a_thermometer_offset_is_told_from_a_pressure_scale():
    shifted = np.log(iapws_saturation_pressure(T - 0.5)) - LN_P  # thermometer 0.5 K high
    assert pattern_against_curve(shifted, SIGMA, SLOPE, 0.01) > 100
    # a constant residual: the temperature-offset model can explain it only through the curve's
    # level error, here ten standard uncertainties of it (χ² ≈ (ln 1.10 / 0.01)² ≈ 90)
    scaled = np.full(T.size, np.log(1.10))
    assert pattern_against_curve(scaled, SIGMA, SLOPE, 0.01) < -50


def test_the_curve_level_uncertainty_does_not_decide():
    # a constant residual of the size of the curve's own level uncertainty is explained by it in
    # either model: no decision either way
    tiny = np.full(T.size, 0.002)
    assert abs(pattern_against_curve(tiny, SIGMA, SLOPE, 0.01)) < 1.0


def test_fewer_than_three_points_give_nan():
    assert np.isnan(pattern_against_curve([0.01, 0.02], [1e-3, 1e-3], [0.05, 0.05], 0.01))
