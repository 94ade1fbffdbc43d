"""Enthalpies of phase change of water computed from IAPWS-95 and IAPWS-06.

Source: these are not printed in a publication; they were COMPUTED with the
``iapws`` PyPI package 1.5.5 from
- IAPWS-95: W. Wagner & A. Pruß, J. Phys. Chem. Ref. Data 31, 387 (2002),
  doi:10.1063/1.1461829 (liquid and vapor), and
- IAPWS-06 (IAPWS R10-06(2009)): R. Feistel & W. Wagner, J. Phys. Chem. Ref.
  Data 35, 1021 (2006), doi:10.1063/1.2183324 (ice Ih; this journal citation
  is from memory, not checked against the paper),
as ΔH = (h_vap − h_condensed)·M and Δz = z_vap − z_condensed along the
saturation (IAPWS-95) or sublimation (IAPWS R14-08) curve.
``test_reference_values.py`` recomputes them.
"""

# IAPWS-95 (Wagner & Pruß 2002): molar mass of water, g/mol.
MOLAR_MASS_G_PER_MOL = 18.015268

# Normal boiling point (p = 101 325 Pa) on ITS-90, K: computed from IAPWS-95
# with iapws 1.5.5 (373.1243 K); quoted to 3 decimals as used in the tests.
T_BOILING = 373.124

# Computed, IAPWS-95 via iapws 1.5.5: ΔH_vap at T_BOILING, J/mol.
DH_VAP_TB = 40651.0
# Computed, IAPWS-95 via iapws 1.5.5: Δz = z_vap − z_liq at T_BOILING.
DZ_TB = 0.983891
# Computed, IAPWS-95 via iapws 1.5.5: ΔH_vap/Δz at T_BOILING (the Clapeyron
# quantity −R d ln p/d(1/T)), J/mol.
DH_OVER_DZ_TB = 41317.0

# Computed, IAPWS-95 via iapws 1.5.5: ΔH_vap(298.15 K) = 43987.45 J/mol
# (quoted elsewhere rounded up to 43.988 kJ/mol).
DH_VAP_298 = 43987.5
# Computed, IAPWS-95 via iapws 1.5.5: ΔH_vap/Δz at 298.15 K, J/mol.
DH_OVER_DZ_298 = 44061.0

# Computed, IAPWS-95 via iapws 1.5.5: ΔH_vap at the triple point, J/mol.
DH_VAP_TT = 45055.0
# Computed, IAPWS-95 + IAPWS-06 via iapws 1.5.5: ΔH_sub at the triple point, J/mol.
DH_SUB_TT = 51062.0
# Computed, IAPWS-95 + IAPWS-06 via iapws 1.5.5: ΔH_fus at the triple point, J/mol.
DH_FUS_TT = 6007.0

# Computed, IAPWS-95 + IAPWS-06 via iapws 1.5.5 (vapor on the R14-08
# sublimation curve): ΔH_sub(T) of ice Ih, T [K] -> J/mol.
DH_SUB = {
    150.0: 50631.0,
    200.0: 51040.0,
    230.0: 51136.0,
    240.0: 51141.0,
    250.0: 51134.0,
    270.0: 51076.0,
}

# Computed from the two IAPWS saturation equations at Tt (IAPWS R14-08 Eq. 6
# for ice, Wagner & Pruß (2002) Eq. 2.5 for liquid): d ln p/d(1/T), K.
DLNP_DINVT_ICE_TT = -6144.8
DLNP_DINVT_LIQUID_TT = -5420.9
# R × (difference of the two slopes above), J/mol (compare DH_FUS_TT).
R_SLOPE_DIFFERENCE_TT = 6019.0
