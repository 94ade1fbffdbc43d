"""How the report writes a pressure: an SI prefix that keeps the number short."""

from __future__ import annotations

import math

import pytest

from audit.report.numbers import pressure_text

from ..references.iapws_r10_06 import P_TRIPLE
from ..references.wagner_pruss_2002 import PC


@pytest.mark.parametrize("P_Pa, text", [
    (139277.0, "139.28 kPa"),      # demo row 45, 1044.66 mmHg × 133.322 Pa/mmHg
    (352.9, "352.9 Pa"),
    (PC, "22.064 MPa"),      # water's critical pressure (IAPWS-95)
    (P_TRIPLE, "611.66 Pa"),        # water's triple-point pressure (IAPWS R10-06)
    (1.2345e-4, "1.234e-04 Pa"),
    (math.nan, "—"), (math.inf, "—"), (0.0, "—"), (-5.0, "—"), (None, "—"),
])
def test_pressure_text(P_Pa, text):
    assert pressure_text(P_Pa) == text
