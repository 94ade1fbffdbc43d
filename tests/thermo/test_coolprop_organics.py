"""Benzene, toluene, ethanol: enthalpy of vaporization from vapor pressures.

Sources: CoolProp 8 (reference-quality Helmholtz equations of state):
saturation pressure, (H_vap - H_liq) at the normal boiling point, Tc, Pc, ω.
The critical constants fed to the real-gas correction come from CoolProp
itself (``chemicals`` would give the same numbers: it takes its defaults
from CoolProp, so it is not an independent source).  Ethanol's dipole moment
1.69 D is from memory (handbook value).  Trouton ratios: references table
(87.1 benzene, 86.6 toluene, 111.3 ethanol J/(mol K)).
"""

import numpy as np
import pytest

CP = pytest.importorskip("CoolProp.CoolProp")

from audit.thermo import RealGasModel, implied_enthalpy, select_equation  # noqa: E402

from ._data import noisy  # noqa: E402

FLUIDS = {"Benzene": ("nonpolar", None), "Toluene": ("nonpolar", None), "Ethanol": ("alkanol", 1.69)}


@pytest.mark.parametrize("fluid", sorted(FLUIDS))
def test_dh_vap_at_tb(fluid):
    Tc, Pc = CP.PropsSI("Tcrit", fluid), CP.PropsSI("pcrit", fluid)
    omega, M = CP.PropsSI("acentric", fluid), CP.PropsSI("molar_mass", fluid)
    Tb = CP.PropsSI("T", "P", 101325.0, "Q", 0, fluid)
    dH_ref = (CP.PropsSI("H", "T", Tb, "Q", 1, fluid) - CP.PropsSI("H", "T", Tb, "Q", 0, fluid)) * M
    T = np.linspace(0.55 * Tc, 0.8 * Tc, 30)
    p = np.array([CP.PropsSI("P", "T", t, "Q", 0, fluid) for t in T])
    P = noisy(p, 5e-4, seed=hash(fluid) % 1000)
    choice = select_equation(T, P, u_P=5e-4 * P, Tc=Tc, Pc=Pc)
    kind, mu = FLUIDS[fluid]
    model = RealGasModel(Tc=Tc, Pc=Pc, omega=omega, polar_kind=kind, dipole_debye=mu)
    res = implied_enthalpy(choice.chosen, Tb, correction=model)
    # Brief: within 1 %. Budget: u(ΔH) from 0.05 % noise ≈ 0.1-0.2 %;
    # Tsonopoulos B is ~4 % off for benzene (-993.7 vs -951.5 cm³/mol) which
    # moves Δz by ~0.15 %; Rackett ±0.6 % in V_L moves it by <0.02 %.
    assert res.dH[0] == pytest.approx(dH_ref, rel=0.01), choice.summary()
    # Trouton ratio ΔH/Tb, 80-115 J/(mol K) (common practice range spanning
    # normal and hydrogen-bonded liquids).
    assert 80 < res.dH[0] / Tb < 115
    # Without the correction the apparent value is 3.6-5.8 % high for
    # organics at Tb (references): the correction must matter.
    assert res.dH_apparent[0] / res.dH[0] - 1 > 0.02
