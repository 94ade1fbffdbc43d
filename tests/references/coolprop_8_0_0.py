"""Properties of organic liquids (and water) computed with CoolProp 8.0.0.

Source: COMPUTED with the CoolProp PyPI package, version 8.0.0
(``CoolProp.CoolProp.PropsSI``), from its reference Helmholtz equations of state:
- benzene: Thol, Lemmon, Span, High Temp. High Press. 41, 81 (2012)
  (citation from memory, not checked);
- toluene and acetone: Lemmon & Span, J. Chem. Eng. Data 51, 785 (2006),
  doi:10.1021/je050186n;
- n-hexane: Span & Wagner, Int. J. Thermophys. 24, 41 (2003)
  (citation from memory, not checked);
- ethanol: Schroeder, Penoncello, Schmidt, J. Phys. Chem. Ref. Data 43,
  043102 (2014), doi:10.1063/1.4895394;
- water: IAPWS-95, Wagner & Pruß, J. Phys. Chem. Ref. Data 31, 387 (2002),
  doi:10.1063/1.1461829.
``test_reference_values.py`` recomputes them with CoolProp.

Columns: Tc [K], Pc [Pa], ω, Tb [K] (p = 101 325 Pa), ΔH_vap(Tb) [J/mol],
Trouton ratio ΔH_vap(Tb)/Tb [J/(mol K)], p(298.15 K) [Pa].
"""

from typing import NamedTuple


class Fluid(NamedTuple):
    Tc: float
    Pc: float
    omega: float
    Tb: float
    dH_vap_Tb: float
    trouton: float
    p_298: float


# Keys are CoolProp fluid names.  Each row: CoolProp 8.0.0 with the equation of
# state named in the module docstring, rounded to the digits shown
# (Tc to 0.01 K, Pc to 100 Pa, ω to 1e-4, Tb to 1 mK, ΔH to 1 J/mol, Trouton
# ratio to 0.01 J/(mol K), p to 0.01 Pa).
FLUIDS = {
    # Benzene, Thol et al. (2012). Pc: CoolProp 8.0.0 gives 4.90629 MPa.
    "Benzene": Fluid(562.02, 4.9063e6, 0.2108, 353.216, 30749.0, 87.06, 12694.75),
    # Toluene, Lemmon & Span (2006).
    "Toluene": Fluid(591.75, 4.1263e6, 0.2657, 383.746, 33234.0, 86.60, 3799.30),
    # n-Hexane, Span & Wagner (2003).
    "n-Hexane": Fluid(507.82, 3.0441e6, 0.3003, 341.866, 28881.0, 84.48, 20164.09),
    # Acetone, Lemmon & Span (2006).
    "Acetone": Fluid(508.10, 4.6924e6, 0.3071, 329.225, 29122.0, 88.46, 30727.18),
    # Ethanol, Schroeder et al. (2014). Pc: CoolProp 8.0.0 gives 6.26791 MPa.
    "Ethanol": Fluid(514.71, 6.2679e6, 0.6440, 351.570, 39140.0, 111.33, 7885.87),
    # Water, IAPWS-95 (Wagner & Pruß 2002); ω = 0.34429 from its definition.
    "Water": Fluid(647.096, 22.064e6, 0.3443, 373.124, 40651.0, 108.95, 3169.93),
}

# Second virial coefficient B [m³/mol] from the equation of state,
# B = lim (Z − 1)/ρ as ρ → 0, CoolProp 8.0.0 (water: IAPWS-95 in CoolProp).
B_EOS = {
    # CoolProp 8.0.0 gives −951.56 cm³/mol (rounded to −951.5 in some notes)
    ("Benzene", 353.2): -951.56e-6,
    # CoolProp 8.0.0 gives −451.27 cm³/mol
    ("Water", 373.12): -451.27e-6,
}
