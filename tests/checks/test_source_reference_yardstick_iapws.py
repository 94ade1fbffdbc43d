"""The substance's reference correlation as one more yardstick of the sources.

IAPWS-95 water saturation pressures (iapws package) printed like a paper's table, with
faults planted in the printed text; the audit is told the substance is water, so the
IAPWS auxiliary vapor-pressure equation (Wagner & Pruß 2002) joins the sources.  Each test
also runs without the name and shows what the sources alone cannot tell.
"""

from dataclasses import replace

import numpy as np
import pytest

from audit.model import Metadata
from audit.pipeline import run_audit
from audit.substances import with_library_constants
from tests.checks._planted import water_table


def _audit(ds, profile, named: bool):
    if named:  # as `--substance water` does: the name, and the library's constants
        ds = with_library_constants(replace(ds, metadata=Metadata()), "water")
    res = run_audit(ds, profile, audited_at="2024-01-01T00:00:00Z")
    return res, {s.source: s for s in res.sources}


def test_two_sources_which_one_is_off(default_profile):
    # A and B interleaved over 300–360 K, 0.05 % noise; B's pressures 6 % high
    T = np.linspace(300.0, 360.0, 24)
    ds, _ = water_table(T, noise=0.0005, seed=3, source=["A", "B"] * 12, P_scale={"B": 1.06}, phase="liquid")
    _, alone = _audit(ds, default_profile, named=False)
    assert alone["B"].extra.get("two_sources_only") or alone["A"].extra.get("two_sources_only")
    res, rec = _audit(ds, default_profile, named=True)
    assert rec["A"].status == "ok"
    assert rec["B"].status != "ok" and rec["B"].pattern == "pressure-scale"
    assert rec["B"].bias_percent == pytest.approx(6.0, abs=0.5)
    assert not rec["B"].extra.get("two_sources_only")
    check = next(c for c in res.checks if c.id == "source-agreement")
    assert "reference correlation" in check.message


def test_series_no_other_source_reaches_is_compared_with_the_reference(default_profile):
    # A at 300–330 K; B alone at 345–370 K, 10 % high: the others' curve would be an
    # extrapolation, the reference is not
    T = np.concatenate([np.linspace(300.0, 330.0, 10), np.linspace(345.0, 370.0, 8)])
    ds, _ = water_table(T, noise=0.0005, seed=4, source=["A"] * 10 + ["B"] * 8, P_scale={"B": 1.10},
                        phase="liquid")
    _, alone = _audit(ds, default_profile, named=False)
    assert alone["B"].bias_percent is None and alone["B"].extra.get("isolated")
    _, rec = _audit(ds, default_profile, named=True)
    assert rec["B"].status != "ok"
    assert rec["B"].bias_percent == pytest.approx(10.0, abs=1.0)
    assert rec["A"].status == "ok"


def test_pressure_unit_read_against_the_reference_when_no_consensus_is_left(default_profile):
    # B's whole series printed in Pa under the kPa header (×1000); A has four rows only
    T = np.concatenate([np.linspace(300.0, 345.0, 4), np.linspace(302.0, 358.0, 12)])
    ds, _ = water_table(T, noise=0.0005, seed=5, source=["A"] * 4 + ["B"] * 12, P_scale={"B": 1000.0},
                        phase="liquid")
    _, rec = _audit(ds, default_profile, named=True)
    cause = rec["B"].extra.get("cause") or {}
    assert rec["B"].status == "reject"
    assert cause.get("kind") == "pressure-unit" and cause.get("real_unit") == "Pa"
    assert rec["A"].status == "ok"


def test_celsius_series_under_a_kelvin_header_is_not_made_a_solid_branch(default_profile):
    # A: 12 rows 300–360 K; B: 10 rows at 305–355 K printed in °C under the kelvin header.
    # Read as kelvin, B's rows lie far below water's triple point at pressures of kilopascals,
    # on neither curve: they are judged with the liquid, where their scale is read
    T = np.concatenate([np.linspace(300.0, 360.0, 12), np.linspace(305.0, 355.0, 10)])
    celsius = {i: (lambda t, p: (f"{float(t) - 273.15:.2f}", p)) for i in range(12, 22)}
    ds, _ = water_table(T, noise=0.0005, seed=6, source=["A"] * 12 + ["B"] * 10, edits=celsius)
    res, rec = _audit(ds, default_profile, named=True)
    split = next(c for c in res.checks if c.id == "branch-split")
    assert split.metrics["n_solid"] == 0 and split.metrics["n_above_triple_pressure"] == 10
    cause = rec["B"].extra.get("cause") or {}
    assert cause.get("kind") == "temperature-unit" and cause.get("real_unit") == "°C"
    assert rec["A"].status == "ok"


def test_series_beyond_the_critical_pressure_as_printed_keeps_its_branch_and_gets_its_unit(default_profile):
    # B printed in mPa under the kPa header: read as kPa every row lies beyond water's critical
    # pressure and physical-range rejects it before the phases are inferred; with the triple
    # point known, its rows still take the liquid side, so its source is diagnosed
    T = np.concatenate([np.linspace(300.0, 360.0, 12), np.linspace(305.0, 355.0, 8)])
    ds, _ = water_table(T, noise=0.0005, seed=7, source=["A"] * 12 + ["B"] * 8, P_scale={"B": 1e6})
    res, rec = _audit(ds, default_profile, named=True)
    assert next(c for c in res.checks if c.id == "physical-range").status != "pass"
    cause = rec["B"].extra.get("cause") or {}
    assert cause.get("kind") == "pressure-unit" and cause.get("real_unit") == "mPa"
    assert rec["A"].status == "ok"


def test_a_thermometer_offset_the_scattered_sources_cannot_show_is_found_and_named(default_profile):
    # B: 16 rows at 0.02 % noise, thermometer 0.5 K high over 290–370 K (ΔlnP falls from -3.4 % to
    # -2.1 % along the range, from the IAPWS slope); A: 6 rows at 3 % noise, whose curve can show
    # neither B's offset nor its pattern
    T = np.concatenate([np.linspace(295.0, 365.0, 6), np.linspace(290.0, 370.0, 16)])
    dsA, _ = water_table(T[:6], noise=0.03, seed=10, source="A", phase="liquid")
    dsB, _ = water_table(T[6:], noise=0.0002, seed=9, source="B", phase="liquid", P_sig=6,
                         T_shift={"B": 0.5})
    ds = replace(dsA, points=dsA.points + tuple(replace(p, row=p.row + 6) for p in dsB.points))
    _, alone = _audit(ds, default_profile, named=False)
    assert alone["B"].status == "ok"
    _, rec = _audit(ds, default_profile, named=True)
    assert rec["B"].status != "ok" and rec["B"].pattern == "temperature-offset"
    assert rec["B"].temperature_offset_K == pytest.approx(0.5, abs=0.15)
    assert rec["A"].status == "ok"
