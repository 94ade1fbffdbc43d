"""A small source's own scale is known from few rows: rejection uses its degrees of freedom.

Synthetic compilation with invented labels; pressures are IAPWS-95 saturation
pressures of water (``iapws`` package), two precise series (0.05 % noise)
and a three-row series with hand-planted deviations of 0 %, +0.3 % and +5 %:
a scatter of a few percent, plausible for an old static measurement, not a
gross error.  Its two close rows make its own MAD small, and the +5 % row
lies about 9.5 of that scale off — but a scale from three rows is uncertain
by a factor of several, so the row is shown as suspect, not rejected (with
the normal quantile it was rejected); a decimal point moved in the same
source (×10) is still rejected.

A source of two rows has no scale of its own at all (the MAD of two values is
their half-difference): a regression input from the detection benchmark,
described in its header, checks that a tenfold slip there is rejected.
"""

from __future__ import annotations

import numpy as np
import pytest

from audit.model import from_arrays
from audit.pipeline import run_audit
from tests.conftest import iapws_saturation_pressure


def _compilation(third_factors):
    rng = np.random.default_rng(11)
    Ta, Tb, Tc = np.linspace(290, 360, 15), np.linspace(295, 355, 12), np.array([305.0, 325.0, 345.0])
    Pa = iapws_saturation_pressure(Ta) * np.exp(rng.normal(0, 5e-4, Ta.size))
    Pb = iapws_saturation_pressure(Tb) * np.exp(rng.normal(0, 5e-4, Tb.size))
    Pc = iapws_saturation_pressure(Tc) * np.asarray(third_factors)
    src = ["Lab A (synthetic)"] * 15 + ["Lab B (synthetic)"] * 12 + ["Lab C (synthetic)"] * 3
    return from_arrays(np.concatenate([Ta, Tb, Tc]), np.concatenate([Pa, Pb, Pc]), source=src, phase="liquid",
                       substance="water")


def _lab_c(result):
    return [p for p in result.points if p.source == "Lab C (synthetic)"]


def test_a_row_within_a_three_row_sources_plausible_scatter_is_suspect_not_rejected(default_profile):
    rows = _lab_c(run_audit(_compilation([1.0, 1.003, 1.05]), default_profile))
    assert [p.status for p in rows] == ["ok", "ok", "suspect"]


def test_a_decimal_shift_in_a_three_row_source_is_still_rejected(default_profile):
    rows = _lab_c(run_audit(_compilation([1.0, 1.003, 10.0]), default_profile))
    assert rows[2].status == "reject"
    assert rows[2].cause is not None and rows[2].cause.kind in ("decimal-shift", "pressure-unit")


def test_a_two_row_source_has_no_scale_of_its_own(default_profile):
    # the half-difference of two rows, one of them a tenfold slip, had become the source's own
    # scale (110 %): the slip stood at 2.7 σ, suspect, with no cause (see the file's header)
    from pathlib import Path

    from audit.ingest import read_table

    path = Path(__file__).parents[1] / "regressions" / "data" / "two_row_source_decimal_slip.csv"
    result = run_audit(read_table(path), default_profile)
    row = next(p for p in result.points if p.row == 16)
    assert row.status == "reject"
    assert row.cause is not None and row.cause.kind in ("decimal-shift", "pressure-unit")
    assert row.cause.suggested_P_Pa == pytest.approx(4827.7, rel=1e-6)
