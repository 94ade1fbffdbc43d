"""Water's constants in ``audit.thermo.constants`` against the IAPWS releases.

Sources: IAPWS-95 (Wagner & Pruss, J. Phys. Chem. Ref. Data 31, 387 (2002),
doi:10.1063/1.1461829) through the ``iapws`` package, whose critical constants
are those of the release; triple point from IAPWS R10-06(2009).
"""

import math

import pytest
from iapws import IAPWS95
from iapws._iapws import Pc, Tc

from audit.thermo import constants as c

from ..references.iapws_r10_06 import P_TRIPLE, T_TRIPLE


def test_critical_point_is_that_of_iapws_95():
    assert c.WATER_T_CRITICAL == Tc  # 647.096 K
    assert c.WATER_P_CRITICAL == pytest.approx(Pc * 1e6, rel=1e-12)  # 22.064 MPa


def test_acentric_factor_follows_its_definition_on_iapws_95():
    # ω = −log10(p_sat(0.7 Tc)/pc) − 1 (Pitzer); IAPWS-95 gives 0.34429
    p = IAPWS95(T=0.7 * Tc, x=0).P * 1e6
    assert c.WATER_ACENTRIC_FACTOR == pytest.approx(-math.log10(p / (Pc * 1e6)) - 1, abs=5e-5)


def test_triple_point_is_that_of_iapws_r10_06():
    assert (c.WATER_T_TRIPLE, c.WATER_P_TRIPLE) == (T_TRIPLE, P_TRIPLE)
    # the saturation pressure of IAPWS-95 at the triple-point temperature agrees to 0.01 %
    assert IAPWS95(T=T_TRIPLE, x=0).P * 1e6 == pytest.approx(c.WATER_P_TRIPLE, rel=1e-4)
