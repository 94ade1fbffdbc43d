"""Printed precision is a floor that no estimated scale lowers.

A handbook series printed to two significant digits: water's saturation
pressures from IAPWS-95 (``iapws`` package) rounded as printed, so that
every row lies within half a unit of its last printed digit of the true
curve.  With no uncertainty columns the audit estimates the scatter; a
scale below 1 must not shrink the rounding floor and flag rows that lie
within their printed precision.
"""

from __future__ import annotations

import numpy as np
import pytest

from audit.ingest import read_table
from audit.pipeline import run_audit
from tests.conftest import iapws_saturation_pressure


def _sig(x: float, digits: int) -> str:
    return f"{x:.{digits}g}"


@pytest.mark.parametrize("digits", [1, 2, 3])
@pytest.mark.parametrize("start", [275.0, 281.0, 293.0])
def test_rows_within_printed_precision_are_not_flagged(tmp_path, default_profile, digits, start):
    T = np.arange(start, 372.0, 4.0)
    P_kPa = iapws_saturation_pressure(T) / 1000.0
    lines = ["T/K,P/kPa"] + [f"{t:.0f},{_sig(p, digits)}" for t, p in zip(T, P_kPa)]
    path = tmp_path / f"handbook_{digits}.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    result = run_audit(read_table(path), default_profile)
    flagged = [(p.row, p.status, p.residual_sigma) for p in result.points if p.status in ("suspect", "reject")]
    by_outliers = [f for p in result.points for f in p.flags if f.check == "outliers"]
    assert not by_outliers, flagged
