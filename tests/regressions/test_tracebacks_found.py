"""Every traceback found by fuzzing or by users, rebuilt from its input.

The CSV files in ``data/`` are synthetic tables (marked so in their first
line) that ended in the traceback named beside each before the fix; they are
run as a user runs them, through ``vpaudit check``.  The other inputs are
built here from IAPWS-95 water (``iapws`` package) so that the expected
behaviour can be stated against a known curve.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest

from audit.cli import main
from audit.model import from_arrays
from audit.pipeline import INTERNAL_ERROR_PREFIX, run_audit
from audit.thermo.fitting import InsufficientData, fit_equation
from audit.thermo.roots import bracketed_root
from audit.thermo.stats import residual_runs
from tests.conftest import iapws_saturation_pressure

DATA = Path(__file__).parent / "data"

#: file -> the traceback it ended in before the fix
FOUND = {
    "replicates_only_windows.csv": "ValueError: a window has all points at the same temperature",
    "source_offset_overflow.csv": "OverflowError: math range error (math.expm1 of a source offset)",
    "two_temperatures_ill_posed.csv": "ValueError: the fit is ill-posed (parameters not determined by the data)",
    "huge_temperature_overflow.csv": "OverflowError: (34, 'Numerical result out of range') in duplicates",
    "water_temperature_above_tc.csv": "ValueError: reduced (Wagner-type) equations need T below Tc = 647.096 K",
    "one_digit_beside_precise_source.csv": "ValueError: math domain error (a negative curve variance from the "
                                           "inverse of an ill-conditioned XᵀX in group_deletion), caught as "
                                           "'fit failed': outliers skipped",
}


@pytest.mark.parametrize("name", sorted(FOUND))
def test_found_input_is_audited_without_internal_error(name, tmp_path):
    src = DATA / name
    before = src.read_bytes()
    out = tmp_path / "out"
    code = main(["check", str(src), "--out", str(out), "--format", "json,csv"])
    assert code in (0, 1), FOUND[name]
    findings = json.loads((out / "findings.json").read_text(encoding="utf-8"))
    n_rows = sum(1 for line in before.decode().splitlines()[2:] if line.strip())
    assert [p["row"] for p in findings["points"]] == list(range(1, n_rows + 1))
    assert findings["internal_errors"] == []
    assert not any(c["message"].startswith(INTERNAL_ERROR_PREFIX) for c in findings["checks"])
    assert src.read_bytes() == before


def test_replicates_form_windows_of_distinct_temperatures(default_profile):
    # 8 temperatures, 4 replicates each at 0.5 % scatter: the windows span temperatures
    rng = np.random.default_rng(7)
    T = np.repeat(np.linspace(290.0, 360.0, 8), 4)
    P = iapws_saturation_pressure(T) * np.exp(rng.normal(0.0, 0.005, T.size))
    result = run_audit(from_arrays(T, P, substance="water"), default_profile)
    cont = next(c for c in result.checks if c.id == "enthalpy-continuity")
    assert cont.status != "skipped", cont.message
    # water named: its triple point makes every row liquid
    assert cont.metrics["liquid"]["n_windows"] == 8 - 5 + 1  # default window = 5 temperatures


def test_two_temperatures_skip_curvature_with_the_counts(default_profile):
    T = np.array([300.0] * 4 + [340.0] * 3)
    P = iapws_saturation_pressure(T) * np.exp(np.linspace(-0.002, 0.002, T.size))
    result = run_audit(from_arrays(T, P), default_profile)
    lin = next(c for c in result.checks if c.id == "clapeyron-linearity")
    assert lin.status == "skipped"
    assert "7 points at 2 distinct temperatures" in lin.message


def test_three_parameter_form_refuses_three_temperatures():
    # ClausiusClapeyron3 "needs more than 3 points, got 3": now a typed error with both counts
    T = np.array([300.0, 300.0, 340.0, 340.0])
    with pytest.raises(InsufficientData, match="4 points at 2"):
        fit_equation(T, iapws_saturation_pressure(T), "cc3", robust=False)
    T3 = np.array([300.0, 320.0, 340.0])
    with pytest.raises(InsufficientData, match="3 points at 3"):
        fit_equation(T3, iapws_saturation_pressure(T3), "cc3", robust=False)
    T4 = np.array([300.0, 300.0, 320.0, 340.0])  # three temperatures determine three constants
    assert fit_equation(T4, iapws_saturation_pressure(T4), "cc3", robust=False).n_used == 4


def test_runs_of_all_zero_residuals():
    # IndexError: index 0 is out of bounds, for a curve through every point
    runs = residual_runs(np.zeros(7))
    assert (runs.runs, runs.longest_run, runs.n_pos, runs.n_neg) == (0, 0, 0, 0)
    assert math.isnan(runs.p_value_too_few)


def test_root_finder_neither_raises_nor_returns_a_pole():
    # brentq's RuntimeError after its iteration limit, and a sign change across a pole
    assert bracketed_root(lambda t: math.log(t / 273.16), 200.0, 400.0, max_iter=2) is None
    assert bracketed_root(lambda t: 1.0 / (t - 300.123), 250.0, 350.0) is None
    assert bracketed_root(lambda t: math.log(t / 273.16), 200.0, 400.0) == pytest.approx(273.16, abs=1e-9)


def test_source_far_outside_the_others_keeps_finite_findings(default_profile):
    # a source 40 K above the others with pressures 10^4 too high: its offset extrapolated
    # from the others' curve is ln(10^4) + extrapolation, far beyond exp()'s range in %
    T = np.concatenate([np.linspace(280.0, 320.0, 9), np.linspace(360.0, 370.0, 4)])
    P = iapws_saturation_pressure(T)
    P[9:] *= 1e300
    src = ["A"] * 5 + ["B"] * 4 + ["C"] * 4
    result = run_audit(from_arrays(T, P, source=src), default_profile)
    assert result.internal_errors == ()
    text = json.dumps(result.to_findings(), allow_nan=False)  # every number finite or null
    assert "NaN" not in text


def test_ill_conditioned_group_deletion_keeps_the_consensus(tmp_path):
    # a source printed to one significant digit (±50 % rounding) beside one at 0.01 %: the
    # weights span 10⁸, and the consensus must still be built (no check skipped for it), with
    # the source planted +19 % high (pressure scale) found as such
    out = tmp_path / "out"
    assert main(["check", str(DATA / "one_digit_beside_precise_source.csv"), "--out", str(out),
                 "--format", "json"]) in (0, 1)
    findings = json.loads((out / "findings.json").read_text(encoding="utf-8"))
    outliers = next(c for c in findings["checks"] if c["id"] == "outliers")
    assert outliers["status"] != "skipped", outliers["message"]
    quist = next(s for s in findings["sources"] if s["source"] == "Quist 2021")
    assert quist["status"] in ("suspect", "reject") and quist["pattern"] == "pressure-scale"
    assert 10.0 < quist["bias_percent"] < 30.0  # planted +19.3 %, 9.4 % scatter over 34 rows



def test_an_honest_fall_in_a_scattered_series_is_not_a_monotonic_failure(default_profile):
    # a clean compilation (see the file's header): the fall of 30 % between two rows of a series
    # scattering 14 % is noise once the series' scale is taken as estimated from its own rows
    from audit.ingest import read_table

    path = Path(__file__).parent / "data" / "scattered_series_honest_fall.csv"
    result = run_audit(read_table(path), default_profile)
    mono = next(c for c in result.checks if c.id == "monotonic")
    assert mono.status == "pass", mono.message
