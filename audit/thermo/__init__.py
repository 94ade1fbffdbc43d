"""Physics core: vapor-pressure equations, fitting, enthalpies, triple point.

Pure numeric functions, SI in and SI out (K, Pa, J/mol); no thresholds: the
checks in :mod:`audit.checks` decide what is significant.
"""

from .constants import R
from .enthalpy import (
    ImpliedEnthalpy,
    LocalEnthalpy,
    RealGasModel,
    apparent_enthalpy,
    delta_z,
    enthalpy_steps,
    enthalpy_uncertainty,
    heat_capacity_change,
    implied_enthalpy,
    local_enthalpy,
    window_departures,
    WindowDepartures,
    rackett_volume,
    tsonopoulos_B,
    tsonopoulos_polar_terms,
    water_second_virial,
)
from .equations import (
    Antoine,
    ClarkeGlew,
    ClausiusClapeyron2,
    ClausiusClapeyron3,
    VaporPressureEquation,
    Wagner,
    antoine_convert,
    get_form,
)
from .fitting import EquationChoice, VaporPressureFit, fit_equation, select_equation
from .reference import ICE_SUBLIMATION, WATER_SATURATION
from .stats import CurvatureTest, RunsTest, curvature_test, residual_runs
from .triple_point import SlopeBreak, TriplePointEstimate, find_slope_break, intersect_branches

__all__ = [
    "R",
    "VaporPressureEquation", "ClausiusClapeyron2", "ClausiusClapeyron3", "Antoine", "ClarkeGlew",
    "Wagner", "antoine_convert", "get_form",
    "WATER_SATURATION", "ICE_SUBLIMATION",
    "VaporPressureFit", "fit_equation", "EquationChoice", "select_equation",
    "apparent_enthalpy", "enthalpy_uncertainty", "heat_capacity_change", "implied_enthalpy",
    "ImpliedEnthalpy", "RealGasModel", "delta_z", "tsonopoulos_B", "tsonopoulos_polar_terms",
    "water_second_virial", "rackett_volume", "local_enthalpy", "LocalEnthalpy", "window_departures", "WindowDepartures", "enthalpy_steps",
    "intersect_branches", "TriplePointEstimate", "find_slope_break", "SlopeBreak",
    "curvature_test", "CurvatureTest", "residual_runs", "RunsTest",
]
