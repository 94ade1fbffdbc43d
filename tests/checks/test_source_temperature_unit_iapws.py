"""A whole series printed in another temperature scale, in a compilation of water data.

Synthetic compilation with invented labels: three series of liquid water from
IAPWS-95 saturation pressures (W. Wagner, A. Pruß, J. Phys. Chem. Ref. Data 31,
387 (2002), doi:10.1063/1.1461829, via the ``iapws`` package), 0.2 % noise.  The
third series is printed in one scale under a header naming another: °C under
"K", K under "°C", °F under "°C".  Read in the right scale its rows fall on the
other series' curve, so the source is rejected as a whole with cause
``temperature-unit`` and each row's suggested temperature is its printed value
in that scale (checked against the true temperature to 0.01 K, the printing).
"""

from __future__ import annotations

import numpy as np
import pytest

from audit.model import Dataset, Point
from audit.pipeline import run_audit
from tests.conftest import iapws_saturation_pressure

_SCALE = {"K": (1.0, 0.0), "degC": (1.0, 273.15), "degF": (5 / 9, 273.15 - 32 * 5 / 9)}


def _printed(T_K: float, unit: str) -> str:
    a, b = _SCALE[unit]
    return f"{(T_K - b) / a:.2f}"


def _compilation(written_in: str, header: str, seed: int = 2, others_factor: float = 1.0):
    rng = np.random.default_rng(seed)
    series = [("Lab A", np.linspace(285, 365, 12), "K", "K"),
              ("Lab B", np.linspace(290, 360, 10), "degC", "degC"),
              ("Lab X", np.linspace(295, 355, 8), written_in, header)]
    pts, row = [], 0
    for name, T, real, shown in series:
        P = iapws_saturation_pressure(T) * np.exp(rng.normal(0, 0.002, T.size))
        if name != "Lab X":
            P = P * others_factor
        for t, p in zip(T, P):
            row += 1
            text = _printed(t, real)
            a, b = _SCALE[shown]
            pts.append(Point(row=row, T_K=a * float(text) + b, P_Pa=float(f"{p / 1e3:.5g}") * 1e3, source=name,
                             phase="liquid", T_text=text, P_text=f"{p / 1e3:.5g}", T_text_unit=shown,
                             P_text_unit="kPa"))
    return Dataset(points=tuple(pts)), {p.row: t for p, t in zip(pts[22:], series[2][1])}


@pytest.mark.parametrize("written_in,header", [("degC", "K"), ("K", "degC"), ("degF", "degC")])
def test_a_series_in_another_temperature_scale_is_named_and_corrected(default_profile, written_in, header):
    ds, true_T = _compilation(written_in, header)
    result = run_audit(ds, default_profile)
    x = {s.source: s for s in result.sources}["Lab X"]
    assert x.status == "reject" and x.extra["cause"]["kind"] == "temperature-unit"
    assert x.extra["cause"]["real_unit"] == {"degC": "°C", "K": "K", "degF": "°F"}[written_in]
    rows_x = [p for p in result.points if p.source == "Lab X"]
    assert all(p.status == "reject" and p.cause.kind == "temperature-unit" for p in rows_x)
    for p in rows_x:
        assert abs(p.cause.suggested_T_K - true_T[p.row]) < 0.01
    # the other series are kept: no good row rejected
    assert not [p.row for p in result.points if p.source != "Lab X" and p.status == "reject"]


def test_a_series_in_the_stated_scale_is_not_given_a_temperature_cause(default_profile):
    ds, _ = _compilation("K", "K")
    result = run_audit(ds, default_profile)
    causes = [s.extra.get("cause") for s in result.sources]
    assert not [c for c in causes if c and c["kind"] == "temperature-unit"]


def test_series_read_below_absolute_zero_gets_its_scale(tmp_path):
    # A literature-like compilation of ice (benchmarks/compilations.py, seed 1018; pressures
    # from the IAPWS R14-08 sublimation equation, invented labels) in which "Schmidt 2002"
    # is printed in °F under a kelvin header: every one of its 13 rows reads -86 to -44 K,
    # so physical-range rejects them all.  Before the fix no source-level reading was tried
    # on a series with no row above 0 K, and the rows got no cause.
    from pathlib import Path

    from audit.ingest import read_table
    from audit.profiles import load_profile

    path = Path(__file__).parents[1] / "regressions" / "data" / "fahrenheit_series_under_kelvin_header.csv"
    result = run_audit(read_table(path), load_profile("default"))
    schmidt = next(s for s in result.sources if s.source == "Schmidt 2002")
    assert schmidt.status == "reject"
    assert schmidt.extra["cause"]["kind"] == "temperature-unit"
    assert schmidt.extra["cause"]["real_unit"] == "°F"
    rows = [p for p in result.points if p.source == "Schmidt 2002"]
    assert len(rows) == 13 and all(p.cause is not None and p.cause.kind == "temperature-unit" for p in rows)
    # each suggested temperature is the printed °F value in kelvin: inside the ice range
    assert all(190.0 < p.cause.suggested_T_K < 235.0 for p in rows)


def test_a_series_in_celsius_is_named_beside_a_consensus_that_is_itself_off(default_profile):
    # Labs A and B both read 12 % high (one gauge correction copied between them, say): Lab X,
    # printed in °C under a kelvin header, lands 11 % below their curve once read in °C — beyond
    # the 3 % unit tolerance, but with water's slope and a level no other reading explains
    ds, true_T = _compilation("degC", "K", others_factor=1.12)
    result = run_audit(ds, default_profile)
    x = {s.source: s for s in result.sources}["Lab X"]
    assert x.extra["cause"]["kind"] == "temperature-unit", x.extra
    assert x.extra["cause"]["remaining_percent"] == pytest.approx(100 * (1 / 1.12 - 1), abs=1.0)
    for p in result.points:
        if p.source == "Lab X":
            assert abs(p.cause.suggested_T_K - true_T[p.row]) < 0.01
