"""Triple point of water.

Source: IAPWS R10-06(2009), Revised Release on the Equation of State 2006 for
H2O Ice Ih (IAPWS-06), which adopts the triple point below; the same values
are used by IAPWS R14-08(2011) as the reducing point of the ice sublimation
and melting equations.
"""

# IAPWS R10-06(2009): triple-point temperature, K (exact on ITS-90 by definition).
T_TRIPLE = 273.16

# IAPWS R10-06(2009): triple-point pressure, Pa.
P_TRIPLE = 611.657
