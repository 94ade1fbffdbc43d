"""Saturation pressure of liquid water: the IAPWS-95 auxiliary equation.

Sources: W. Wagner & A. Pruß, J. Phys. Chem. Ref. Data 31, 387 (2002),
doi:10.1063/1.1461829 (IAPWS-95; critical constants and the auxiliary
vapor-pressure equation, Eq. 2.5); the equation first appeared in W. Wagner &
A. Pruß, J. Phys. Chem. Ref. Data 22, 783 (1993), doi:10.1063/1.555926, and in
the IAPWS Revised Supplementary Release on Saturation Properties of Ordinary
Water Substance (1992):

    ln(p/pc) = (Tc/T)(a₁τ + a₂τ^1.5 + a₃τ³ + a₄τ^3.5 + a₅τ⁴ + a₆τ^7.5),  τ = 1 − T/Tc.
"""

import math

# Wagner & Pruß (2002), Eq. (2.1) / IAPWS R6-95(2018): critical temperature, K.
TC = 647.096
# Wagner & Pruß (2002), Eq. (2.2) / IAPWS R6-95(2018): critical pressure, Pa.
PC = 22.064e6

# Wagner & Pruß (2002), Eq. (2.5) (= Wagner & Pruß (1993)): coefficients a₁…a₆.
A = (-7.85951783, 1.84408259, -11.7866497, 22.6807411, -15.9618719, 1.80122502)
# Wagner & Pruß (2002), Eq. (2.5): exponents of τ.
EXPONENTS = (1.0, 1.5, 3.0, 3.5, 4.0, 7.5)

# Check values T [K] -> p [Pa]: computed from Eq. (2.5) with the coefficients
# above and cross-checked with the ``iapws`` package 1.5.5
# (``IAPWS95._Vapor_Pressure``, which returns MPa); 6-7 significant digits.
CHECK_VALUES = {
    298.15: 3169.82,
    373.124: 101323.9,
    500.0: 2.639223e6,
}

# Largest relative deviation of Eq. (2.5) from the full IAPWS-95 saturation
# pressure, 273.16 K to Tc: 0.0072 %, computed with iapws 1.5.5 (the paper
# states agreement within the uncertainty of IAPWS-95).
MAX_REL_DEVIATION_FROM_IAPWS95 = 7.2e-5


def saturation_pressure(T):
    """Eq. (2.5) of Wagner & Pruß (2002) evaluated from the coefficients above [Pa]."""
    tau = 1.0 - T / TC
    return PC * math.exp(TC / T * sum(a * tau ** e for a, e in zip(A, EXPONENTS)))
