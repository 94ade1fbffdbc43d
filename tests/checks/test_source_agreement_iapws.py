"""Source bias planted in IAPWS-95 water saturation pressures (iapws package).

Three sources interleaved over 280–370 K, 12 points each, 0.1 % noise, printed like a
table.  A +3 % pressure scale and, separately, a +0.3 K thermometer offset are planted
in source "B".  +0.3 K shifts ln P by 0.3·d ln P/dT ≈ 2.3 % at 280 K and 1.4 % at 370 K
(d ln P/dT = ΔH/RT² from the same IAPWS curve), so both faults are well above the 1 %
tolerance and the decline along the range tells the two patterns apart.
"""

import numpy as np
import pytest

from audit.pipeline import run_audit
from tests.checks._planted import water_table, with_stated_u

T_GRID = np.linspace(280.0, 370.0, 36)
SOURCES = ["A", "B", "C"] * 12


def _audit(default_profile, **kw):
    ds, _ = water_table(T_GRID, noise=0.001, seed=kw.pop("seed", 1), source=SOURCES,
                          phase="liquid", **kw)
    res = run_audit(ds, default_profile, audited_at="2024-01-01T00:00:00Z")
    check = next(c for c in res.checks if c.id == "source-agreement")
    out = next(c for c in res.checks if c.id == "outliers")
    return res, check, out


def test_clean_sources_raise_no_flag(default_profile):
    res, check, _ = _audit(default_profile)
    assert check.status == "pass"
    assert {s.source for s in res.sources} == {"A", "B", "C"}
    assert all(s.status == "ok" and s.pattern == "none" for s in res.sources)
    # 12 points of 0.1 % noise: the bias estimate of each source is within a few 0.01 %
    assert all(abs(s.bias_percent) < 0.2 for s in res.sources)


def test_pressure_scale_error_is_found_and_named(default_profile):
    res, check, out = _audit(default_profile, P_scale={"B": 1.03})
    rec = {s.source: s for s in res.sources}
    assert rec["B"].status != "ok" and rec["B"].pattern == "pressure-scale"
    assert rec["B"].bias_percent == pytest.approx(3.0, abs=0.3)  # ±3 u of a 12-point mean, roughly
    assert rec["A"].status == "ok" and rec["C"].status == "ok"
    # rows of B are warned, not rejected one by one
    b_rows = [p.row for p in res.dataset.points if p.source == "B"]
    assert all(res.points[r - 1].status != "reject" for r in b_rows)
    assert any(f.check == "source-agreement" for f in res.points[b_rows[0] - 1].flags)


def test_temperature_offset_is_found_and_named(default_profile):
    res, check, _ = _audit(default_profile, T_shift={"B": 0.3})
    rec = {s.source: s for s in res.sources}
    assert rec["B"].status != "ok" and rec["B"].pattern == "temperature-offset"
    assert rec["B"].temperature_offset_K == pytest.approx(0.3, abs=0.05)  # T printed to 0.01 K, 0.1 % noise
    assert rec["A"].status == "ok" and rec["C"].status == "ok"


def test_one_or_no_source_skips(default_profile):
    ds, _ = water_table(T_GRID[:10], seed=2, source="only")
    res = run_audit(ds, default_profile)
    c = next(c for c in res.checks if c.id == "source-agreement")
    assert c.status == "skipped" and c.message == "one source only"
    ds, _ = water_table(T_GRID[:10], seed=2)
    c = next(c for c in run_audit(ds, default_profile).checks if c.id == "source-agreement")
    assert c.status == "skipped" and c.message == "data name no sources"



def test_an_outlier_is_still_found_beside_a_source_with_a_thermometer_offset(default_profile):
    # A short table (15 rows, 5 per source, stating u(P) = 0.1 % and u(T) = 0.01 K) where
    # source B reads 0.3 K high — 1.4–2.3 % in P, i.e. 14–23 σ — and row 7 (source A) is
    # printed 1 % (10 σ) high.  The bias must be taken out of the consensus rather than
    # inflate the scale and hide the outlier: row 7 is rejected and no other row is, and B is
    # named with its pattern.
    T = np.linspace(282.0, 366.0, 15)
    src = ["A", "B", "C"] * 5
    row = 6  # 0-based index of row 7, source A
    ds, _ = water_table(T, noise=0.001, seed=21, source=src, phase="liquid", T_shift={"B": 0.3},
                        edits={row: lambda t, p: (t, f"{float(p) * 1.01:.5g}")})
    ds = with_stated_u(ds, u_P_relative=0.001, u_T_K=0.01)
    res = run_audit(ds, default_profile, audited_at="2024-01-01T00:00:00Z")
    assert {p.row for p in res.points if p.status == "reject"} == {row + 1}
    rec = {s.source: s for s in res.sources}
    assert rec["B"].status != "ok" and rec["B"].pattern == "temperature-offset"
    assert rec["A"].status == "ok" and rec["C"].status == "ok"
