"""Every named source appears in ``sources[]``, whatever was decided about it.

Synthetic compilation from IAPWS-95 water (``iapws`` package), 280–370 K,
with invented source labels: two good series, one series whose every row is
printed in kPa under a Pa header (×1000 off: every row rejected), and one
single-row source.
"""

from __future__ import annotations

import numpy as np
import pytest

from audit.model import from_arrays
from audit.pipeline import run_audit
from audit.schema import validate_findings
from tests.conftest import iapws_saturation_pressure


def test_rejected_and_single_row_sources_are_listed(default_profile):
    rng = np.random.default_rng(3)
    T_a, T_b, T_c = np.linspace(280, 370, 12), np.linspace(285, 365, 10), np.linspace(300, 340, 6)
    T_d = np.array([350.0])
    T = np.concatenate([T_a, T_b, T_c, T_d])
    P = iapws_saturation_pressure(T) * np.exp(rng.normal(0, 0.002, T.size))
    src = ["Good A"] * 12 + ["Good B"] * 10 + ["kPa as Pa"] * 6 + ["One row"]
    P[22:28] /= 1000.0  # kPa values written under a Pa header
    result = run_audit(from_arrays(T, P, source=src, substance="water"), default_profile)
    by = {s.source: s for s in result.sources}
    assert list(by) == ["Good A", "Good B", "kPa as Pa", "One row"]
    assert by["kPa as Pa"].status == "reject"
    assert by["kPa as Pa"].extra["n_reject"] == 6
    assert by["kPa as Pa"].extra["cause"]["kind"] == "pressure-unit"
    assert by["Good A"].status == by["Good B"].status == "ok"
    assert by["Good A"].extra["n_reject"] == by["Good B"].extra["n_reject"] == 0
    assert by["One row"].n == 1 and by["One row"].extra["reason"]
    findings = result.to_findings()
    validate_findings(findings)
    assert [s["source"] for s in findings["sources"]] == list(by)


MMHG = 133.322387415  # Pa, NIST SP 811 (2008) Appendix B


def _compilation(tmp_path, header_unit: str, size_header: float, odd_size: float, odd_bias: float = 0.0):
    """Three series of IAPWS-95 water printed in `header_unit`, the third really in another unit."""
    from audit.ingest import read_table

    rng = np.random.default_rng(11)
    lines = [f"T/K,P/{header_unit},source"]
    for name, Ts, size in (("Lab A", np.linspace(280, 370, 12), size_header),
                           ("Lab B", np.linspace(283, 367, 9), size_header),
                           ("Lab C", np.linspace(290, 360, 8), odd_size)):
        P = iapws_saturation_pressure(Ts) * np.exp(rng.normal(0, 0.002, Ts.size))
        if name == "Lab C":
            P = P * (1 + odd_bias)
        lines += [f"{t:.2f},{p / size:.6g},{name}" for t, p in zip(Ts, P)]
    path = tmp_path / "compilation.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return read_table(path)


@pytest.mark.parametrize("header_unit,size_header,odd_unit,odd_size", [
    ("Pa", 1.0, "mmHg", MMHG),          # mmHg typed under a Pa header: 133.3 times too low
    ("Pa", 1.0, "kPa", 1000.0),
    ("kPa", 1000.0, "Pa", 1.0),         # the other direction: 1000 times too high
    ("kPa", 1000.0, "mmHg", MMHG),
    ("bar", 1e5, "kPa", 1000.0),
])
def test_series_in_another_pressure_unit_gets_the_cause(tmp_path, default_profile, header_unit, size_header,
                                                          odd_unit, odd_size):
    result = run_audit(_compilation(tmp_path, header_unit, size_header, odd_size), default_profile)
    by = {s.source: s for s in result.sources}
    cause = by["Lab C"].extra["cause"]
    assert by["Lab C"].status == "reject" and cause["kind"] == "pressure-unit"
    assert cause["factor"] == pytest.approx(odd_size / size_header, rel=1e-9)
    rows_c = [p for p in result.points if p.source == "Lab C"]
    assert all(p.status == "reject" and p.cause.kind == "pressure-unit" for p in rows_c)
    truth = iapws_saturation_pressure(np.array([p.T_K for p in rows_c]))
    suggested = np.array([p.cause.suggested_P_Pa for p in rows_c])
    assert np.allclose(suggested, truth, rtol=0.01)  # 0.2 % noise and printed to 6 digits
    good = [p for p in result.points if p.source != "Lab C"]
    # the good series keep every row (a chance 3σ "suspect" among 21 rows may remain)
    assert not [p.row for p in good if p.status == "reject" or p.cause is not None]


def test_a_bias_the_size_of_bar_versus_atm_is_not_called_a_unit(tmp_path, default_profile):
    # 1.3 % high (the bar/atm ratio is 1.01325): a bias, not a unit slip
    result = run_audit(_compilation(tmp_path, "bar", 1e5, 1e5, odd_bias=0.01325), default_profile)
    lab_c = {s.source: s for s in result.sources}["Lab C"]
    assert lab_c.status != "ok" and lab_c.pattern == "pressure-scale"
    assert lab_c.extra["cause"] is None


def test_a_source_no_other_source_overlaps_is_not_given_an_offset(default_profile):
    # two series at 280-320 K and a third at 350-370 K, 20 % high: its "offset" against the
    # others would be an extrapolation over 30 K: it is listed, no offset is measured or
    # removed, and the reason says why (its rows are then judged, as printed, against the
    # extrapolated curve with that extrapolation's uncertainty)
    rng = np.random.default_rng(5)
    T = np.concatenate([np.linspace(280, 320, 9), np.linspace(282, 318, 8), np.linspace(350, 370, 6)])
    P = iapws_saturation_pressure(T) * np.exp(rng.normal(0, 0.002, T.size))
    P[17:] *= 1.2
    src = ["Low A"] * 9 + ["Low B"] * 8 + ["High C"] * 6
    result = run_audit(from_arrays(T, P, source=src, phase="liquid", substance="water"), default_profile)
    high = {s.source: s for s in result.sources}["High C"]
    assert high.bias_percent is None and high.temperature_offset_K is None
    assert "extrapolation" in high.extra["reason"]
