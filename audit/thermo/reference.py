"""Reference vapor-pressure equations of water and ice (IAPWS).

Both are instances with the interface of :mod:`audit.thermo.equations`
(``ln_p``, ``dlnp_dT``, ``d2lnp_dT2``, ``dlnp_dinvT``, ``p``) and carry their
range of validity as ``T_min``/``T_max``.  They evaluate outside the range
too (extrapolation is the caller's decision); ``in_range(T)`` tells.

References
----------
.. [1] W. Wagner and A. Pruss, "International equations for the saturation
   properties of ordinary water substance. Revised according to the
   international temperature scale of 1990", J. Phys. Chem. Ref. Data 22,
   783-787 (1993), doi:10.1063/1.555926; auxiliary equation (2.5) of
   W. Wagner and A. Pruss, J. Phys. Chem. Ref. Data 31, 387 (2002),
   doi:10.1063/1.1461829.
.. [2] IAPWS R14-08(2011); W. Wagner, T. Riethmann, R. Feistel, A. H. Harvey,
   "New equations for the sublimation pressure and melting pressure of H2O
   ice Ih", J. Phys. Chem. Ref. Data 40, 043103 (2011), doi:10.1063/1.3657937.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from .constants import WATER_P_CRITICAL, WATER_P_TRIPLE, WATER_T_CRITICAL, WATER_T_TRIPLE
from .equations import VaporPressureEquation, as_temperature, reduced_power_series

__all__ = [
    "WaterSaturationWagnerPruss",
    "IceSublimationIAPWS2011",
    "WATER_SATURATION",
    "ICE_SUBLIMATION",
    "water_saturation_pressure",
    "ice_sublimation_pressure",
]


class _ReferenceEquation(VaporPressureEquation):
    """Fixed reference equation: no fitted parameters."""

    linear: ClassVar[bool] = False
    T_min: ClassVar[float]
    T_max: ClassVar[float]

    def in_range(self, T) -> np.ndarray:
        """True where `T` [K] lies inside the equation's range of validity."""
        T = as_temperature(T)
        return (T >= self.T_min) & (T <= self.T_max)

    def fixed_parameters(self) -> dict:
        return {}


@dataclass(frozen=True)
class WaterSaturationWagnerPruss(_ReferenceEquation):
    """Vapor pressure of liquid water: the IAPWS-95 auxiliary equation [1].

    ln(p/pc) = (Tc/T)(a1 τ + a2 τ^1.5 + a3 τ^3 + a4 τ^3.5 + a5 τ^4 + a6 τ^7.5),
    τ = 1 - T/Tc, Tc = 647.096 K, pc = 22.064 MPa.  Valid from the triple point
    to the critical point; consistent with the full IAPWS-95 formulation to
    better than 0.01 %.
    """

    coefficients: tuple[float, ...] = (-7.85951783, 1.84408259, -11.7866497,
                                       22.6807411, -15.9618719, 1.80122502)
    exponents: tuple[float, ...] = (1.0, 1.5, 3.0, 3.5, 4.0, 7.5)
    Tc: float = WATER_T_CRITICAL
    Pc: float = WATER_P_CRITICAL

    T_min: ClassVar[float] = WATER_T_TRIPLE
    T_max: ClassVar[float] = WATER_T_CRITICAL
    form_name: ClassVar[str] = "iapws95-saturation"

    def ln_p(self, T):
        return math.log(self.Pc) + reduced_power_series(T, self.Tc, self.coefficients, self.exponents)[0]

    def dlnp_dT(self, T):
        return reduced_power_series(T, self.Tc, self.coefficients, self.exponents)[1]

    def d2lnp_dT2(self, T):
        return reduced_power_series(T, self.Tc, self.coefficients, self.exponents)[2]

    def describe(self) -> str:
        return ("saturation pressure of liquid water, Wagner & Pruss (1993) auxiliary equation "
                f"of IAPWS-95, valid {self.T_min}-{self.T_max} K")


@dataclass(frozen=True)
class IceSublimationIAPWS2011(_ReferenceEquation):
    """Sublimation pressure of ice Ih, IAPWS R14-08(2011) [2].

    ln(p/pt) = θ^-1 Σ a_i θ^b_i,  θ = T/Tt, Tt = 273.16 K, pt = 611.657 Pa;
    valid 50 K to 273.16 K.
    """

    coefficients: tuple[float, ...] = (-0.212144006e2, 0.273203819e2, -0.610598130e1)
    exponents: tuple[float, ...] = (0.333333333e-2, 0.120666667e1, 0.170333333e1)
    Tt: float = WATER_T_TRIPLE
    pt: float = WATER_P_TRIPLE

    T_min: ClassVar[float] = 50.0
    T_max: ClassVar[float] = WATER_T_TRIPLE
    form_name: ClassVar[str] = "iapws-r14-sublimation"

    def ln_p(self, T):
        th = as_temperature(T) / self.Tt
        s = sum(a * th ** (b - 1.0) for a, b in zip(self.coefficients, self.exponents))
        return math.log(self.pt) + s

    def dlnp_dT(self, T):
        th = as_temperature(T) / self.Tt
        return sum(a * (b - 1.0) * th ** (b - 2.0) for a, b in zip(self.coefficients, self.exponents)) / self.Tt

    def d2lnp_dT2(self, T):
        th = as_temperature(T) / self.Tt
        return sum(a * (b - 1.0) * (b - 2.0) * th ** (b - 3.0)
                   for a, b in zip(self.coefficients, self.exponents)) / self.Tt ** 2

    def describe(self) -> str:
        return (f"sublimation pressure of ice Ih, IAPWS R14-08(2011), valid {self.T_min}-{self.T_max} K")


#: The IAPWS-95 auxiliary saturation equation of liquid water.
WATER_SATURATION = WaterSaturationWagnerPruss()
#: The IAPWS R14-08(2011) sublimation equation of ice Ih.
ICE_SUBLIMATION = IceSublimationIAPWS2011()


def water_saturation_pressure(T):
    """Saturation pressure of liquid water [Pa] at `T` [K] (Wagner & Pruss)."""
    return WATER_SATURATION.p(T)


def ice_sublimation_pressure(T):
    """Sublimation pressure of ice Ih [Pa] at `T` [K] (IAPWS R14-08(2011))."""
    return ICE_SUBLIMATION.p(T)
