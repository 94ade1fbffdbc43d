"""Fast fuzzing profile of the whole audit (ingest → checks → findings.json, annotated.csv).

Every generated table is SYNTHETIC (see ``tests/fuzz/tables.py``).  Fixed and
deterministic: hypothesis runs derandomized, with no example database and no
shrinking (a failing example prints its table instead; the long campaign,
``benchmarks/fuzz_campaign.py``, minimises reproducers).  A failure is any
exception other than ``InputError`` from ingest, any exception from the
audit or the writers, a check skipped with an "internal error" message, a
missing, extra or reordered row, an invalid status, a non-finite number in
``to_findings()``, findings that break the schema, or a modified input file.
"""

from __future__ import annotations

import math
import tempfile
from dataclasses import replace
from pathlib import Path

import pytest
from hypothesis import given, note

from .tables import (PRESSURE_SPELLINGS, TEMPERATURE_SPELLINGS, Table, contract_failures, non_finite_paths,
                     run_table, table_for_seed, table_from_json, tables)

from ._settings import fast

FOUND = Path(__file__).with_name("found")


def _report(table: Table, outcome) -> str:
    lines = [table.describe(), table.as_csv_text()[:3000]]
    if table.metadata_toml:
        lines.append("metadata:\n" + table.metadata_toml)
    for f in outcome.failures:
        lines.append(str(f))
        if f.trace:
            lines.append(f.trace)
    return "\n".join(lines)


def _audit_and_check(table: Table) -> None:
    with tempfile.TemporaryDirectory() as folder:
        outcome = run_table(table, Path(folder))
    note(_report(table, outcome))
    assert outcome.kind in ("findings", "input-error", "failure")
    assert not outcome.failures, "; ".join(str(f) for f in outcome.failures)


@fast(90)
@given(tables("realistic"))
def test_realistic_tables_end_in_findings(table):
    _audit_and_check(table)


@fast(25)
@given(tables("water"))
def test_water_tables_end_in_findings(table):
    _audit_and_check(table)


@fast(60)
@given(tables("garbage"))
def test_garbage_tables_end_in_findings_or_input_error(table):
    _audit_and_check(table)


@fast(120)
@given(tables("degenerate"))
def test_degenerate_tables_end_in_findings_or_input_error(table):
    _audit_and_check(table)


@pytest.mark.parametrize("spec", sorted(FOUND.glob("*.spec.json")) if FOUND.is_dir() else [],
                         ids=lambda p: p.name.removesuffix(".spec.json"))
def test_found_reproducers_no_longer_fail(spec, tmp_path):
    """Each table the campaign found failing (minimised), run again."""
    table = table_from_json(spec.read_text(encoding="utf-8"))
    outcome = run_table(table, tmp_path)
    assert not outcome.failures, "; ".join(str(f) for f in outcome.failures)


# --------------------------------------------------------------------------- the harness itself


def test_header_vocabulary_covers_every_unit_the_ingest_knows():
    from audit import units

    assert set(TEMPERATURE_SPELLINGS) == set(units.TEMPERATURE_UNITS)
    assert set(PRESSURE_SPELLINGS) == set(units.PRESSURE_UNITS)
    for unit, spellings in TEMPERATURE_SPELLINGS.items():
        assert {units.parse_temperature_unit(s) for s in spellings} == {unit}
    for unit, spellings in PRESSURE_SPELLINGS.items():
        assert {units.parse_plain_pressure_unit(s) for s in spellings} == {unit}


def test_the_generator_is_deterministic_per_seed():
    for seed in (0, 1, 17):
        a, b = table_for_seed(seed), table_for_seed(seed)
        assert a == b
        if a.layout != "xlsx":  # a workbook stores its creation time
            assert a.encode() == b.encode()
    assert table_for_seed(3) != table_for_seed(4)


def test_a_plain_table_passes_and_the_harness_sees_broken_promises(tmp_path):
    # SYNTHETIC: ln(P/kPa) = 16.0 - 4000/T (an invented Clausius–Clapeyron line), 12 rows
    rows = tuple((f"{T:.2f}", f"{math.exp(16.0 - 4000.0 / T):.5g}") for T in range(300, 360, 5))
    table = Table(header=("T/K", "P/kPa"), rows=rows, family="hand-made")
    outcome = run_table(table, tmp_path / "ok")
    assert outcome.kind == "findings" and not outcome.failures

    from audit.ingest import read_table
    from audit.pipeline import run_audit
    from audit.profiles import load_profile

    path = table.write(tmp_path / "again")
    dataset = read_table(path)
    result = run_audit(dataset, load_profile("default"))
    assert contract_failures(table, dataset, result) == []
    broken = replace(result, checks=(replace(result.checks[0], message="internal error: KeyError: 'x'"),)
                     + result.checks[1:])
    assert [f.stage for f in contract_failures(table, dataset, broken)] == ["check"]
    reordered = replace(result, points=result.points[::-1])
    assert "rows" in {f.exc_type for f in contract_failures(table, dataset, reordered)}
    short = replace(table, rows=table.rows + (("1", "1"),))
    assert "rows" in {f.exc_type for f in contract_failures(short, dataset, result)}
    odd = replace(result, points=(replace(result.points[0], status="maybe"),) + result.points[1:])
    assert "status" in {f.exc_type for f in contract_failures(table, dataset, odd)}


def test_non_finite_numbers_are_found_anywhere_in_a_document():
    doc = {"a": [1.0, {"b": float("nan")}], "c": None, "d": "nan", "e": float("-inf"), "f": True}
    assert non_finite_paths(doc) == ["$.a[1].b = nan", "$.e = -inf"]
