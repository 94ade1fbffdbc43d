"""What to fix: findings gathered at the level they occur (source, block, row, dataset).

Data: water saturation pressures from IAPWS-95 (``iapws`` package, via
``tests.conftest.iapws_saturation_pressure``) with planted slips, and the
bundled SYNTHETIC demo compilation of benzene (``reports_demo/README.md`` lists
its planted faults).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from audit.model import from_arrays
from audit.pipeline import run_audit
from audit.profiles import load_profile
from audit.report.actions import MOST_ENTRIES_PER_CAUSE, what_to_fix
from audit.results import CheckResult
from tests.conftest import iapws_saturation_pressure


def _water(T, P, **kw):
    ds = from_arrays(np.asarray(T), np.asarray(P), substance="water", file_name="water.csv", **kw)
    return run_audit(ds, load_profile("default"))


def _saturation(T):
    return np.array([iapws_saturation_pressure(t)[0] for t in T])


def test_three_consecutive_rows_in_kpa_under_a_pa_header_are_one_block():
    T = np.linspace(280.0, 370.0, 30)
    P = _saturation(T)
    P[9:12] /= 1000.0  # rows 10-12 printed in kPa
    entries = [a for a in what_to_fix(_water(T, P)) if a.severity == "fail"]
    assert len(entries) == 1
    block = entries[0]
    assert block.level == "block" and block.rows == (10, 11, 12) and block.subject == "rows 10–12"
    assert block.finding.startswith("pressure-unit in 3 consecutive rows: taken as Pa but written in kPa")


def test_many_scattered_rows_with_one_cause_are_one_entry():
    T = np.linspace(280.0, 370.0, 60)
    P = _saturation(T)
    planted = (5, 13, 21, 29, 37, 45, 53)  # rows printed in kPa, never two in a row
    for row in planted:
        P[row - 1] /= 1000.0
    result = _water(T, P)
    assert {p.row for p in result.points if p.cause is not None and p.cause.kind == "pressure-unit"} == set(planted)
    entries = [a for a in what_to_fix(result) if "pressure-unit" in a.finding]
    assert len(planted) > MOST_ENTRIES_PER_CAUSE
    assert len(entries) == 1 and entries[0].rows == planted and entries[0].subject == "7 rows"


def test_a_whole_series_in_mmhg_is_one_source_entry_and_its_rows_are_not_repeated():
    rng = np.random.default_rng(1)
    T = np.concatenate([np.linspace(280, 370, 12), np.linspace(285, 365, 12), np.linspace(290, 360, 10)])
    P = _saturation(T) * (1 + rng.normal(0, 0.002, len(T)))
    P[24:] /= 133.322387415  # the third series typed in mmHg under the Pa header
    sources = ["Series A"] * 12 + ["Series B"] * 12 + ["Series C"] * 10
    entries = what_to_fix(_water(T, P, source=sources))
    assert len(entries) == 1
    (entry,) = entries
    assert (entry.level, entry.severity, entry.subject) == ("source", "fail", "source 'Series C'")
    assert "mmHg" in entry.finding and "×133.322" in entry.action and entry.rows == tuple(range(25, 35))


def test_the_demo_compilation_lists_its_planted_rows_then_the_biased_source(demo_literature_result):
    entries = what_to_fix(demo_literature_result)
    rows = [(a.rows, a.finding.split(":")[0]) for a in entries if a.level == "row"]
    assert rows == [((8,), "temperature-unit"), ((21,), "phase-label"), ((45,), "pressure-unit"),
                    ((57,), "decimal-shift"), ((62,), "digit-swap")]
    assert all(a.severity == "fail" for a in entries if a.level == "row")
    (source,) = [a for a in entries if a.level == "source"]
    assert source.subject == "source 'Castell et al. 1994'" and "pressure-scale" in source.finding
    assert entries[-1] is source  # a warning, after the rejected rows
    # the suggested value names only what changes: row 8's temperature, not its pressure
    (row8,) = [a for a in entries if a.rows == (8,)]
    assert row8.action == "correct the temperature: T = 318.25 K"


def test_a_check_that_flags_no_row_is_a_dataset_entry(rich_result):
    step = CheckResult("enthalpy-continuity", "Continuity of the implied enthalpy", "warn",
                       "liquid: step of +2.3 ± 0.1 kJ/mol (5.8 %) in ΔH at 501.7 K; more text")
    result = replace(rich_result, checks=rich_result.checks + (step,))
    entries = [a for a in what_to_fix(result) if a.level == "dataset"]
    assert [(a.subject, a.finding, a.anchor) for a in entries] == [
        ("Continuity of the implied enthalpy", "liquid: step of +2.3 ± 0.1 kJ/mol (5.8 %) in ΔH at 501.7 K",
         "check-enthalpy-continuity")]
    assert "step between sources" in entries[0].action


def test_entries_are_ordered_by_severity(large_compilation_result):
    entries = what_to_fix(large_compilation_result)
    ranks = [("fail", "warn", "note").index(a.severity) for a in entries]
    assert ranks == sorted(ranks) and len(set(ranks)) > 1


def test_every_cause_kind_has_an_action():
    from audit.report.actions import _ROW_ACTION
    from audit.results import CAUSE_KINDS

    assert set(_ROW_ACTION) == set(CAUSE_KINDS)
