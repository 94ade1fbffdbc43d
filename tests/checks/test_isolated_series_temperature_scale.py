"""A series no other source reaches, printed in another temperature scale.

Synthetic compilation with invented labels: two series of water from IAPWS-95
(``iapws`` package) at 380–450 K and a third at 300–350 K, below them, printed
in °C or °F under a kelvin header; 0.2 % noise.  No curve can judge the third
series where it lies, but its own Clausius–Clapeyron line gives a Trouton
ratio no substance has (about 12 J mol⁻¹ K⁻¹ as printed, about 112 read in
°C; Trouton's rule, common practice: 55–135 for liquids).
"""

from __future__ import annotations

import numpy as np
import pytest

from audit.model import Dataset, Point
from audit.pipeline import run_audit
from tests.conftest import iapws_saturation_pressure

_SCALE = {"K": (1.0, 0.0), "degC": (1.0, 273.15), "degF": (5 / 9, 273.15 - 32 * 5 / 9)}


def _compilation(written_in: str, phase: str | None, seed: int = 3):
    rng = np.random.default_rng(seed)
    series = [("Lab A", np.linspace(380, 440, 10), "K"), ("Lab B", np.linspace(390, 450, 8), "K"),
              ("Lab X", np.linspace(300, 350, 9), written_in)]
    pts, row = [], 0
    for name, T, real in series:
        P = iapws_saturation_pressure(T) * np.exp(rng.normal(0, 0.002, T.size))
        for t, p in zip(T, P):
            row += 1
            a, b = _SCALE[real]
            text = f"{(t - b) / a:.2f}"
            pts.append(Point(row=row, T_K=float(text), P_Pa=float(f"{p:.5g}"), source=name, phase=phase or "unknown",
                             T_text=text, P_text=f"{p:.5g}", T_text_unit="K", P_text_unit="Pa"))
    return Dataset(points=tuple(pts)), {p.row: t for p, t in zip(pts[18:], series[2][1])}


@pytest.mark.parametrize("written_in,phase", [("degC", "liquid"), ("degC", None), ("degF", None)])
def test_isolated_series_is_read_in_its_real_scale(default_profile, written_in, phase):
    ds, true_T = _compilation(written_in, phase)
    result = run_audit(ds, default_profile)
    x = {s.source: s for s in result.sources}["Lab X"]
    assert x.extra.get("isolated") is True
    cause = x.extra["cause"]
    assert cause["kind"] == "temperature-unit"
    assert cause["real_unit"] == {"degC": "°C", "degF": "°F"}[written_in]
    assert 55.0 <= cause["trouton_ratio_real"] <= 135.0
    for p in result.points:
        if p.row in true_T:
            assert p.status == "reject"
            # the printing keeps 0.01 of a degree: 0.01 K in °C, 0.0056 K in °F
            assert p.cause.suggested_T_K == pytest.approx(true_T[p.row], abs=0.01)
    assert all(p.status != "reject" for p in result.points if p.row not in true_T)


def test_isolated_series_printed_right_is_left_alone(default_profile):
    ds, true_T = _compilation("K", None)
    result = run_audit(ds, default_profile)
    x = {s.source: s for s in result.sources}["Lab X"]
    assert x.extra.get("cause") is None
    assert all(p.status != "reject" for p in result.points)


def test_isolated_series_printed_to_one_digit_is_not_reread(default_profile):
    # acetone, CoolProp (see the file's first line): printed to one digit, the series' own line
    # says little about its intercept, so its Trouton ratio is no evidence of another scale
    from pathlib import Path

    from audit.ingest import read_table

    path = Path(__file__).parents[1] / "regressions" / "data" / "isolated_one_digit_series.csv"
    result = run_audit(read_table(path), default_profile)
    jensen = {s.source: s for s in result.sources}["Jensen 1904"]
    assert jensen.extra.get("isolated") is True
    assert jensen.extra.get("cause") is None
    assert not any(p.status == "reject" for p in result.points if p.source == "Jensen 1904")


def test_good_series_beside_one_in_celsius_keeps_its_rows(default_profile):
    # water, IAPWS-IF97 (see the file's first line): the series in °C under a kelvin header is read
    # in °C from its own Trouton ratio, and the good series beside it keeps every row
    from pathlib import Path

    from audit.ingest import read_table

    path = Path(__file__).parents[1] / "regressions" / "data" / "celsius_series_beside_good_series_unknown_phase.csv"
    result = run_audit(read_table(path), default_profile)
    by = {s.source: s for s in result.sources}
    assert by["Quist 2000"].extra["cause"]["kind"] == "temperature-unit"
    assert by["Tanaka 1934"].status == "ok"
    assert not any(p.status == "reject" for p in result.points if p.source == "Tanaka 1934")
