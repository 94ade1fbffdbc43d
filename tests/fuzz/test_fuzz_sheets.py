"""Fast fuzzing profile of the sheet audit (sheet TOML → run_sheet_audit → findings.json, annotated.csv).

Every generated sheet is SYNTHETIC (see ``tests/fuzz/sheets.py``).  Fixed and
deterministic, like the table profile (``test_fuzz_audit.py``): hypothesis
runs derandomized, with no example database and no shrinking; a failing
example prints its sheet text and the traceback.  A failure is any exception
other than ``InputError`` from ``sheet_from_text``, any exception from
``run_sheet_audit`` or the writers, an internal error, points that are not
the table's rows in order, a non-finite number in ``to_findings()``, findings
that break the schema, or input bytes that changed (see
:func:`tests.fuzz.sheets.run_sheet`).

Sheets the fuzzing found failing are kept, minimal and by hand, as
``found/sheet_*.toml`` and run again by
:func:`test_found_sheet_reproducers_no_longer_fail`.
"""

from __future__ import annotations

import math
import tempfile
from dataclasses import replace
from pathlib import Path

import pytest
from hypothesis import example, given, note

from .sheets import (FAMILIES, FORMS, GARBAGE_GIVES, GARBAGE_P_UNITS, GARBAGE_T_UNITS, SHEET_P_SPELLINGS,
                     SHEET_T_SPELLINGS, SheetCase, case_from_text, failure_report, generate_sheet, run_sheet,
                     sheet_contract_failures, sheet_for_seed, sheets, toml_document)

from ._settings import fast

FOUND = Path(__file__).with_name("found")


def _audit_and_check(case: SheetCase) -> None:
    with tempfile.TemporaryDirectory() as folder:
        outcome = run_sheet(case, Path(folder))
    report = failure_report(case, outcome)
    note(report)
    assert outcome.kind in ("findings", "input-error", "failure")
    if outcome.failures:
        pytest.fail(report, pytrace=False)  # the sheet and its tracebacks say it all


# --------------------------------------------------------------------------- the nastiest cases, by hand

# SYNTHETIC: each sheet below is invented to sit on an edge of the sheet audit.
_HEAD = '# SYNTHETIC sheet (hand-made edge case for tests/fuzz/test_fuzz_sheets.py)\n[sheet]\nsubstance = "{}"\n'

# Antoine's pole (T + C = 0) in the middle of the stated range, with table rows on both sides of it and on it
POLE_IN_RANGE = case_from_text(_HEAD.format("Compound X-17 (SYNTHETIC)") + """
[equation]
form = "antoine"
coefficients = { A = 6.9, B = 1300.0, C = -50.0 }
gives = "log10"
T_unit = "degC"
P_unit = "kPa"
range = [0.0, 100.0]

[table]
rows = [[0, 1.0], [49.9, 2.0], [50, 3.0], [50.1, 4.0], [100, 5.0]]
""", n_rows=5)

# nothing stated: every reading is tried; the table states its own units and has text cells
NOTHING_STATED = case_from_text(_HEAD.format("toluene") + """
[equation]
form = "antoine"
coefficients = { A = 6.95464, B = 1344.8, C = 219.482 }

[table]
T_unit = "°C"
P_unit = "mm Hg"
rows = [[20, "21,9"], [40, "7,880"], [60, "406,98*"], ["n/a", 291.0], ["", ""], [100, "1e999"], [100, 556.6]]
u_P_percent = 1.0
""", n_rows=7)

# every cell unreadable
ALL_TEXT_TABLE = case_from_text(_HEAD.format("benzene") + """
[equation]
form = "antoine"
coefficients = { A = 6.90565, B = 1211.033, C = 220.79 }
gives = "log10"
T_unit = "degC"
P_unit = "mmHg"
range = [10.0, 80.0]

[table]
rows = [["n/a", "7,880"], ["", "406,98*"], ["1e999", "1e999"], ["-", "—"]]
""", n_rows=4)

# ice: a solid equation in °C for water (the IAPWS sublimation reference), range up to 0 °C, duplicate temperatures
WATER_ICE = case_from_text("""# SYNTHETIC sheet (hand-made edge case for tests/fuzz/test_fuzz_sheets.py)
[sheet]
cas = "7732-18-5"

[equation]
form = "clausius-clapeyron"
coefficients = { A = 12.54, B = 2660.0 }
gives = "log10"
T_unit = "K"
P_unit = "Pa"
range = [200.0, 273.16]
phase = "solid"

[table]
rows = [[250, 76.0], [250, 76.1], [260, 196.0], [273.16, 611.7], [273.16, 611.0]]
""", n_rows=5)

# a formula at the grammar's depth limit, with Greek names and the other operator spellings, giving P itself
DEEP_GREEK_FORMULA = case_from_text(_HEAD.format("ethanol") + """
[equation]
form = "expression"
expression = "{}exp(α − β ÷ (T + γ)){}"
coefficients = {{ "α" = 23.58, "β" = 3795.0, "γ" = -42.2 }}
gives = "none"
T_unit = "K"
P_unit = "Pa"
range = [280.0, 360.0]
""".format("(" * 47, ")" * 47))

# a Wagner equation whose Tc lies below the whole range: undefined everywhere
WAGNER_BELOW_TC = case_from_text(_HEAD.format("toluene") + """
[equation]
form = "wagner-3-6"
coefficients = { a = -7.28607, b = 1.38091, c = -2.83433, d = -2.79168, Tc = 250.0, Pc = 4106.45 }
gives = "ln"
T_unit = "K"
P_unit = "kPa"
range = [300.0, 400.0]

[table]
rows = [[300, 4.9], [350, 34.8], [400, 152.0]]
""", n_rows=3)

# a temperature unit the decoding does not try by itself (Rankine), stated completely
RANKINE = case_from_text(_HEAD.format("toluene") + """
[equation]
form = "clausius-clapeyron"
coefficients = { A = 10.5, B = 6200.0 }
gives = "log10"
T_unit = "°R"
P_unit = "psia"
range = [520.0, 700.0]
""")

# not UTF-8 (a cp1252 degree sign): an InputError, never a crash
NOT_UTF8 = SheetCase(("# SYNTHETIC\n[sheet]\nsubstance = \"toluene\"\n[equation]\nform = \"antoine\"\n"
                      "coefficients = { A = 6.95, B = 1344.8, C = 219.48 }\nT_unit = \"°C\"\n").encode("cp1252"),
                     "hand-made")


@fast(80)
@given(sheets("realistic"))
@example(NOTHING_STATED)
@example(ALL_TEXT_TABLE)
@example(WATER_ICE)
def test_realistic_sheets_end_in_findings(case):
    _audit_and_check(case)


@fast(50)
@given(sheets("wild"))
@example(POLE_IN_RANGE)
@example(WAGNER_BELOW_TC)
@example(RANKINE)
def test_wild_sheets_end_in_findings_or_input_error(case):
    _audit_and_check(case)


@fast(50)
@given(sheets("expression"))
@example(DEEP_GREEK_FORMULA)
def test_formula_sheets_end_in_findings_or_input_error(case):
    _audit_and_check(case)


@fast(40)
@given(sheets("hostile"))
@example(NOT_UTF8)
def test_hostile_sheets_end_in_input_error_or_findings(case):
    _audit_and_check(case)


@pytest.mark.parametrize("path", sorted(FOUND.glob("sheet_*.toml")) if FOUND.is_dir() else [],
                         ids=lambda p: p.stem)
def test_found_sheet_reproducers_no_longer_fail(path, tmp_path):
    """Each sheet the fuzzing found failing (minimal, by hand), run again."""
    case = SheetCase(path.read_bytes(), "found")
    outcome = run_sheet(case, tmp_path)
    if outcome.failures:
        pytest.fail(failure_report(case, outcome), pytrace=False)


# --------------------------------------------------------------------------- the harness itself


def test_the_unit_vocabulary_is_every_spelling_the_ingest_knows_and_garbage_is_refused():
    from audit import units

    assert set(SHEET_T_SPELLINGS) == set(units.TEMPERATURE_UNITS)
    assert set(SHEET_P_SPELLINGS) == set(units.PRESSURE_UNITS)
    for unit, spellings in SHEET_T_SPELLINGS.items():
        assert {units.parse_temperature_unit(s) for s in spellings} == {unit}
    for unit, spellings in SHEET_P_SPELLINGS.items():
        assert {units.parse_plain_pressure_unit(s) for s in spellings} == {unit}
    for text in GARBAGE_T_UNITS:
        with pytest.raises(ValueError):
            units.parse_temperature_unit(text)
    for text in GARBAGE_P_UNITS:
        with pytest.raises(ValueError):
            units.parse_plain_pressure_unit(text)
    from audit.sheet.read import _GIVES

    assert not {g.strip() for g in GARBAGE_GIVES} & set(_GIVES)


def test_the_generator_is_deterministic_and_reaches_every_form_and_family():
    for seed in (0, 1, 17):
        assert sheet_for_seed(seed) == sheet_for_seed(seed)
    assert sheet_for_seed(3) != sheet_for_seed(4)
    drawn = [sheet_for_seed(seed) for seed in range(300)]
    assert {c.family for c in drawn} == set(FAMILIES)
    assert {f for c in drawn for f in c.features} >= set(FORMS)
    for case in drawn:
        assert case.data == b"" or case.text.startswith("# SYNTHETIC") or "bytes-" in " ".join(case.features)


def test_realistic_sheets_are_self_consistent():
    # the realistic family is only useful if its sheets mostly pass: the table computed from the
    # equation must follow it, as the audit decodes it, when every unit is stated right
    from audit.errors import InputError
    from audit.profiles import load_profile
    from audit.sheet.read import sheet_from_text
    from audit.sheet.run import run_sheet_audit

    profile = load_profile("default")
    clean = 0
    for seed in range(2000):
        case = sheet_for_seed(seed, "realistic")
        odd = [f for f in case.features if f.startswith(("cells-", "range-", "table-own", "foreign-row"))
               or f.endswith(("-wrong", "-missing", "-garbage")) or f == "phase-solid"]
        if odd or case.n_rows is None:
            continue
        try:
            sheet = sheet_from_text(case.data)
        except InputError:
            continue
        result = run_sheet_audit(sheet, profile, audited_at="2000-01-01T00:00:00Z")
        status = {c.id: c for c in result.checks}
        assert status["sheet-table"].status == "pass", failure_report(case, _no_failures()) + "\n" + \
            status["sheet-table"].message
        assert status["sheet-units"].status == "pass", failure_report(case, _no_failures()) + "\n" + \
            status["sheet-units"].message
        clean += 1
        if clean >= 15:
            break
    assert clean >= 15


class _Doctored:
    """An audit result whose findings document is given (to show the harness what a bad one is)."""

    def __init__(self, result, doc):
        self._result, self._doc = result, doc

    def __getattr__(self, name):
        return getattr(self._result, name)

    def to_findings(self):
        return self._doc


def _no_failures():
    from .tables import Outcome

    return Outcome("findings")


def test_a_plain_sheet_passes_and_the_harness_sees_broken_promises(tmp_path):
    # SYNTHETIC: log10(P/kPa) = 6.2 - 1400/(T/°C + 220), an invented Antoine equation, and its own table
    rows = [[t, float(f"{10 ** (6.2 - 1400.0 / (t + 220.0)):.5g}")] for t in range(20, 101, 10)]
    text = toml_document({"sheet": {"substance": "Compound X-17 (SYNTHETIC)"},
                          "equation": {"form": "antoine", "coefficients": {"A": 6.2, "B": 1400.0, "C": 220.0},
                                       "gives": "log10", "T_unit": "degC", "P_unit": "kPa", "range": [20.0, 100.0]},
                          "table": {"rows": rows}}, "SYNTHETIC hand-made sheet")
    case = case_from_text(text, n_rows=len(rows))
    outcome = run_sheet(case, tmp_path / "ok")
    assert outcome.kind == "findings" and not outcome.failures, failure_report(case, outcome)

    from audit.profiles import load_profile
    from audit.sheet.read import sheet_from_text
    from audit.sheet.run import run_sheet_audit

    sheet = sheet_from_text(case.data)
    result = run_sheet_audit(sheet, load_profile("default"), audited_at="2000-01-01T00:00:00Z")
    assert {c.id: c.status for c in result.checks}["sheet-table"] == "pass"
    assert sheet_contract_failures(case, sheet, result) == []
    broken = replace(result, checks=(replace(result.checks[0], message="internal error: KeyError: 'x'"),)
                     + result.checks[1:])
    assert [f.stage for f in sheet_contract_failures(case, sheet, broken)] == ["check"]
    recorded = replace(result, internal_errors=("sheet-table: KeyError: 'x'",))
    assert [f.stage for f in sheet_contract_failures(case, sheet, recorded)] == ["check"]
    reordered = replace(result, points=result.points[::-1])
    assert "rows" in {f.exc_type for f in sheet_contract_failures(case, sheet, reordered)}
    short = replace(case, n_rows=len(rows) + 1)
    assert "rows" in {f.exc_type for f in sheet_contract_failures(short, sheet, result)}
    doc = result.to_findings()
    doc["fits"][0]["rms_percent"] = math.nan  # to_findings() itself turns NaN into null: doctor its output
    assert "non-finite" in {f.exc_type for f in sheet_contract_failures(case, sheet, _Doctored(result, doc))}
    bad_verdict = replace(result, checks=(replace(result.checks[0], status="maybe"),) + result.checks[1:])
    assert "schema" in {f.exc_type for f in sheet_contract_failures(case, sheet, bad_verdict)}
    other_bytes = replace(case, data=case.data + b"\n")
    assert "input" in {f.exc_type for f in sheet_contract_failures(other_bytes, sheet, result)}


def test_every_family_draws_without_error_under_a_plain_random_chooser():
    from .tables import RandomChooser

    for family in FAMILIES:
        for seed in range(40):
            case = generate_sheet(RandomChooser(seed), family)
            assert case.family == family and isinstance(case.data, bytes)
