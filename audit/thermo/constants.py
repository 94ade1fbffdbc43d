"""Physical constants used by the thermodynamic core (SI units).

References
----------
.. [1] E. Tiesinga et al., "CODATA recommended values of the fundamental
   physical constants: 2018", Rev. Mod. Phys. 93, 025010 (2021),
   doi:10.1103/RevModPhys.93.025010.
.. [2] IAPWS R6-95(2018), Revised Release on the IAPWS Formulation 1995 for the
   Thermodynamic Properties of Ordinary Water Substance for General and
   Scientific Use; W. Wagner and A. Pruss, J. Phys. Chem. Ref. Data 31, 387
   (2002), doi:10.1063/1.1461829.
.. [3] IAPWS R14-08(2011), Revised Release on the Pressure along the Melting and
   Sublimation Curves of Ordinary Water Substance; W. Wagner, T. Riethmann,
   R. Feistel, A. H. Harvey, J. Phys. Chem. Ref. Data 40, 043103 (2011),
   doi:10.1063/1.3657937.
"""

from __future__ import annotations

#: Molar gas constant [J/(mol K)]: N_A * k exactly, both fixed in the 2019 SI [1].
R: float = 8.314462618

#: Standard atmosphere [Pa] (definition); default reference pressure p°.
P_ATM: float = 101325.0

#: Triple-point temperature of water [K] [2, 3].
WATER_T_TRIPLE: float = 273.16
#: Triple-point pressure of water [Pa] [3].
WATER_P_TRIPLE: float = 611.657
#: Critical temperature of water [K] [2].
WATER_T_CRITICAL: float = 647.096
#: Critical pressure of water [Pa] [2].
WATER_P_CRITICAL: float = 22.064e6
#: Critical density of water [kg/m^3] [2].
WATER_RHO_CRITICAL: float = 322.0
#: Acentric factor of water [-]: −log10(p_sat(0.7 Tc)/pc) − 1 (Pitzer's definition) evaluated with
#: IAPWS-95 [2] (p_sat(452.967 K) = 0.998601 MPa, through the ``iapws`` package): 0.34429.
WATER_ACENTRIC_FACTOR: float = 0.3443
#: Molar mass of water [kg/mol] [2].
WATER_MOLAR_MASS: float = 0.018015268
