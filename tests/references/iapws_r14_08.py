"""Sublimation pressure of ice Ih.

Source: IAPWS R14-08(2011), Revised Release on the Pressure along the Melting
and Sublimation Curves of Ordinary Water Substance; W. Wagner, T. Riethmann,
R. Feistel, A. H. Harvey, J. Phys. Chem. Ref. Data 40, 043103 (2011),
doi:10.1063/1.3657937, Eq. (6):

    ln(p/pt) = θ⁻¹ Σ aᵢ θ^bᵢ,   θ = T/Tt,   50 K ≤ T ≤ 273.16 K.
"""

import math

from .iapws_r10_06 import P_TRIPLE, T_TRIPLE

# Wagner et al. (2011), Table 4 / IAPWS R14-08(2011) Eq. (6): coefficients aᵢ.
A = (-0.212144006e2, 0.273203819e2, -0.610598130e1)
# Wagner et al. (2011), Table 4 / IAPWS R14-08(2011) Eq. (6): exponents bᵢ.
B = (0.333333333e-2, 0.120666667e1, 0.170333333e1)

# IAPWS R14-08(2011): range of validity of Eq. (6), K.
T_MIN = 50.0
T_MAX = T_TRIPLE

# Check values T [K] -> p [Pa]: computed from Eq. (6) with the coefficients
# above and cross-checked with the ``iapws`` package 1.5.5
# (``iapws._iapws._Sublimation_Pressure``); quoted to 6 significant digits.
CHECK_VALUES = {
    200.0: 0.162604,
    230.0: 8.94735,
    250.0: 76.0127,
    260.0: 195.802,
    270.0: 470.062,
}


def sublimation_pressure(T):
    """Eq. (6) of IAPWS R14-08(2011) evaluated from the coefficients above [Pa]."""
    theta = T / T_TRIPLE
    return P_TRIPLE * math.exp(sum(a * theta ** b for a, b in zip(A, B)) / theta)
