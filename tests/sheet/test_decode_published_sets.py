"""Decoding published coefficient sets stated in the wrong units.

Coefficient sets: the Antoine constants of B. E. Poling, J. M. Prausnitz, J. P.
O'Connell, The Properties of Gases and Liquids, 5th ed. (McGraw-Hill, 2000),
as tabulated by the ``chemicals`` library (``Psat_data_AntoinePoling``:
log10(P/Pa) = A − B/(T/K + C), with each set's Tmin–Tmax).  Each set is
stated wrongly on purpose, in every combination of logarithm base ×
temperature unit × pressure unit but the true one, and the decoder must give
the published reading back.  The reference it compares with is another
published set (``sheet_reference`` with the Antoine set itself excluded): the
Wagner coefficients of McGarry (1983) or of Poling et al. (2000), the VDI
PPDS equation or Perry's table 2-8, as the library holds them.
"""

from __future__ import annotations

import itertools

import pytest

from audit.profiles import load_profile
from audit.sheet.decode import decode_sheet, same_pressure_unit
from audit.sheet.read import sheet_from_text
from audit.sheet.reference import sheet_reference
from audit.sheet.run import decode_settings, run_sheet_audit
from audit.substances import library_constants

#: stated pressure units tried: each size the ingest knows once (mmHg stands for Torr, hPa for mbar)
PRESSURE_UNITS = ("Pa", "mPa", "hPa", "kPa", "MPa", "bar", "atm", "mmHg", "psi", "inHg", "kgf/cm2")
SUBSTANCES = {"toluene": "108-88-3", "ethanol": "64-17-5", "acetone": "67-64-1", "n-hexane": "110-54-3"}


def _poling(cas):
    import chemicals.vapor_pressure as vp

    r = vp.Psat_data_AntoinePoling.loc[cas]
    return float(r.A), float(r.B), float(r.C), float(r.Tmin), float(r.Tmax)


def _sheet(cas, A, B, C, lo, hi, gives, T_unit, P_unit):
    text = (f'[sheet]\ncas = "{cas}"\n[equation]\nform = "antoine"\n'
            f"coefficients = {{ A = {A!r}, B = {B!r}, C = {C!r} }}\n"
            f'gives = "{gives}"\nT_unit = "{T_unit}"\nP_unit = "{P_unit}"\nrange = [{lo!r}, {hi!r}]\n')
    return sheet_from_text(text.encode(), f"{cas}.sheet.toml")


@pytest.mark.parametrize("name", sorted(SUBSTANCES))
def test_every_wrong_statement_of_a_published_set_is_decoded_back(name):
    cas = SUBSTANCES[name]
    A, B, C, lo, hi = _poling(cas)
    constants = {k: c.value for k, c in library_constants(cas)[2].items()}
    settings = decode_settings(load_profile("default"))
    wrong = []
    combos = list(itertools.product(("log10", "ln"), ("K", "degC", "degF"), PRESSURE_UNITS))
    for gives, T_unit, P_unit in combos:
        if (gives, T_unit, P_unit) == ("log10", "K", "Pa"):
            continue
        sheet = _sheet(cas, A, B, C, lo, hi, gives, T_unit, P_unit)
        d = decode_sheet(sheet, sheet_reference(sheet, cas, exclude=("AntoinePoling",)), constants, settings)
        if not (d.best.log == "log10" and d.best.T_unit == "K" and same_pressure_unit(d.best.P_unit, "Pa")
                and d.differs):
            wrong.append(((gives, T_unit, P_unit), d.best, d.best_evidence.summary()))
    assert len(combos) - 1 == 65
    assert wrong == [], wrong[:5]


@pytest.mark.parametrize("name", sorted(SUBSTANCES))
def test_the_published_set_stated_right_passes_without_a_warning(name):
    cas = SUBSTANCES[name]
    A, B, C, lo, hi = _poling(cas)
    sheet = _sheet(cas, A, B, C, lo, hi, "log10", "K", "Pa")
    result = run_sheet_audit(sheet, load_profile("default"), exclude_references=("AntoinePoling",))
    units = next(c for c in result.checks if c.id == "sheet-units")
    assert units.status == "pass" and not result.sheet.differs, units.message
    ref = next(c for c in result.checks if c.id == "sheet-reference")
    # Poling's Antoine sets and the Wagner/PPDS/DIPPR sets agree to a few percent in their ranges
    assert ref.status == "pass" and abs(ref.metrics["max_deviation_percent"]) < 5.0, ref.message


def test_the_same_set_in_mmhg_and_celsius_stated_as_kpa_is_found_in_mmhg():
    # toluene's Poling set converted exactly to log10(P/mmHg) with T in °C, then labelled kPa
    from audit.thermo.equations import Antoine

    cas = SUBSTANCES["toluene"]
    A, B, C, lo, hi = _poling(cas)
    eq = Antoine(A, B, C, base="log10", P_unit="Pa", T_unit="K").converted(P_unit="mmHg", T_unit="degC")
    sheet = _sheet(cas, eq.A, eq.B, eq.C, lo - 273.15, hi - 273.15, "log10", "degC", "kPa")
    result = run_sheet_audit(sheet, load_profile("default"), exclude_references=("AntoinePoling",))
    assert result.sheet.differs and result.sheet.decoded["P_unit"] == "mmHg/Torr"
    assert result.sheet.decoded["T_unit"] == "degC" and result.sheet.decoded["gives"] == "log10"
    units = next(c for c in result.checks if c.id == "sheet-units")
    assert units.status == "warn" and "log10(P/mmHg) with T in °C" in units.message
    # the SI coefficients are the published ones again (exact conversion)
    si = result.sheet.si["log10"]
    assert si["A"] == pytest.approx(A, abs=1e-9) and si["B"] == pytest.approx(B, rel=1e-12)
    assert si["C"] == pytest.approx(C, abs=1e-9)


def test_another_compounds_coefficients_fail_the_reference_comparison():
    # benzene's Poling set on a sheet that names toluene: toluene's vapour pressure is about a
    # third of benzene's at the same temperature
    A, B, C, lo, hi = _poling("71-43-2")
    sheet = _sheet(SUBSTANCES["toluene"], A, B, C, 300.0, 370.0, "log10", "K", "Pa")
    result = run_sheet_audit(sheet, load_profile("default"))
    ref = next(c for c in result.checks if c.id == "sheet-reference")
    assert ref.status == "fail" and "another substance" in ref.message
    assert ref.metrics["max_deviation_percent"] > 150
