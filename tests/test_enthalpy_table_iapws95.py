"""The condensed enthalpy table (findings ``enthalpy_table``) for water, against IAPWS-95.

Source: IAPWS-95 through the ``iapws`` package — saturation pressures for the
input, and (h_vap − h_liq)·M for the reference enthalpy; 40.651 kJ/mol at the
normal boiling point 373.124 K.  The table is what the report shows: each
branch's ends, round temperatures between them, and the normal boiling point.
"""

from __future__ import annotations

import numpy as np
import pytest

from audit.model import from_arrays
from audit.pipeline import run_audit
from audit.products import round_temperatures
from audit.profiles import load_profile
from audit.substances import with_library_constants
from audit.thermo.constants import WATER_MOLAR_MASS
from tests.references import iapws95_enthalpy


def _iapws95_dH(T):
    from iapws import IAPWS95

    liq, vap = IAPWS95(T=T, x=0), IAPWS95(T=T, x=1)
    return (vap.h - liq.h) * 1e3 * WATER_MOLAR_MASS  # kJ/kg → J/mol


@pytest.fixture(scope="module")
def water_table():
    from iapws import IAPWS95

    T = np.linspace(331.3, 418.7, 25)
    rng = np.random.default_rng(7)
    P = np.array([IAPWS95(T=float(t), x=0).P * 1e6 for t in T]) * (1 + rng.normal(0, 5e-4, T.size))
    ds = with_library_constants(from_arrays(T, np.round(P, 1), phase=["liquid"] * T.size, u_P_Pa=5e-4 * P,
                                            file_name="water.csv"), "water")
    return run_audit(ds, load_profile("default")).enthalpy_table


def test_round_temperatures_use_the_smallest_step_that_keeps_the_table_short():
    assert round_temperatures(331.3, 418.7) == [340.0, 360.0, 380.0, 400.0]  # 10 K would give 8
    assert round_temperatures(281.0, 299.0, most=6) == [285.0, 290.0, 295.0]
    assert round_temperatures(300.0, 300.5) == []
    assert round_temperatures(float("nan"), 300.0) == []


def test_the_table_has_the_ends_round_temperatures_and_the_normal_boiling_point(water_table):
    at = {round(e.T_K, 3): e.at for e in water_table}
    assert at[331.3] == "low end" and at[418.7] == "high end"
    assert [T for T, a in at.items() if a == "round"] == [340.0, 360.0, 380.0, 400.0]
    (Tb,) = [T for T, a in at.items() if a == "normal boiling point"]
    assert Tb == pytest.approx(iapws95_enthalpy.T_BOILING, abs=0.01)  # the library's normal boiling point of water


def test_the_table_agrees_with_iapws95(water_table):
    for e in water_table:
        assert e.real_gas_corrected
        ref = _iapws95_dH(e.T_K)
        # 0.05 % noise on 25 points: u(ΔH) ≈ 0.05–0.3 % (the fit alone); the real-gas
        # correction (second virial coefficient only, Rackett volume) is not in u and errs
        # by up to about 0.35 % at 0.4 MPa (418.7 K), by about 0.02 % near Tb
        assert e.dH_J_per_mol == pytest.approx(ref, rel=6e-3), (e.at, e.T_K)
        if e.T_K <= 390.0:
            assert abs(e.dH_J_per_mol - ref) < 3 * e.u_dH_J_per_mol + 1e-3 * ref, (e.at, e.T_K)
