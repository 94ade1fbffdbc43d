"""Unit conversion of printed values, against NIST Special Publication 811.

Reference: A. Thompson and B. N. Taylor, *Guide for the Use of the
International System of Units (SI)*, NIST SP 811, 2008 edition, Appendix B
(B.8 "Factors for units listed alphabetically", B.9 by kind of quantity),
https://doi.org/10.6028/NIST.SP.811e2008.  Factors printed there with 7
significant digits are compared with a relative tolerance of 5e-7 (half a unit
in the 7th digit: the table's own rounding); exact factors with 1e-12
(floating-point round-off only).
"""

from __future__ import annotations

import pytest

from audit.ingest.units import (kelvin_per_unit, parse_plain_pressure_unit,
                                parse_temperature_unit, pascal_per_unit, pressure_to_pascal,
                                temperature_to_kelvin, PressureUnit)

SEVEN_DIGITS = 5e-7  # half a unit in the 7th significant digit of SP 811's table
EXACT = 1e-12        # definitions: only floating-point round-off

# (header, value printed, pascal per unit from NIST SP 811 App. B, tolerance)
PRESSURE_CASES = [
    ("P/Pa", 1234.5, 1.0, EXACT),
    ("P/mPa", 12.5, 1e-3, EXACT),
    ("P/hPa", 12.5, 1e2, EXACT),
    ("P/kPa", 12.5, 1e3, EXACT),
    ("P/MPa", 1.25, 1e6, EXACT),
    ("P/bar", 1.25, 1.0e5, EXACT),                # SP 811 B.8: bar = 1.0 E+05 Pa
    ("P/mbar", 12.5, 1.0e2, EXACT),               # millibar = 1.0 E+02 Pa
    ("P/atm", 0.5, 1.01325e5, EXACT),             # standard atmosphere = 1.01325 E+05 Pa
    ("P/Torr", 760.0, 1.333224e2, SEVEN_DIGITS),  # torr = 1.333 224 E+02 Pa
    ("P/mTorr", 500.0, 1.333224e-1, SEVEN_DIGITS),
    ("P/mmHg", 23.77, 1.333224e2, SEVEN_DIGITS),  # mmHg (conventional) = 1.333 224 E+02 Pa
    ("P (mm Hg)", 23.77, 1.333224e2, SEVEN_DIGITS),
    ("P/psi", 14.7, 6.894757e3, SEVEN_DIGITS),    # lbf/in2 (psi) = 6.894 757 E+03 Pa
    ("P/psia", 14.7, 6.894757e3, SEVEN_DIGITS),
    ("P/inHg", 29.92, 3.386389e3, SEVEN_DIGITS),  # inHg (conventional) = 3.386 389 E+03 Pa
    ("P/kgf/cm2", 1.5, 9.80665e4, EXACT),         # kgf/cm2 = 9.806 65 E+04 Pa (exact)
]


@pytest.mark.parametrize("header, value, factor, rtol", PRESSURE_CASES)
def test_pressure_column_in_pascal(read_text, header, value, factor, rtol):
    ds = read_text(f"T/K,{header}\n300,{value!r}\n")
    assert ds.points[0].P_Pa == pytest.approx(value * factor, rel=rtol)


# (header, value printed, kelvin per SP 811 B.9 formula)
TEMPERATURE_CASES = [
    ("T/K", 300.5, 300.5),
    ("T (°C)", 25.0, 25.0 + 273.15),            # T/K = t/°C + 273.15
    ("T (°F)", 77.0, (77.0 + 459.67) / 1.8),    # T/K = (t/°F + 459.67)/1.8
    ("T (°R)", 536.67, 536.67 / 1.8),           # T/K = (T/°R)/1.8
    ("T (°F)", -40.0, (-40.0 + 459.67) / 1.8),  # -40 °F = -40 °C
]


@pytest.mark.parametrize("header, value, kelvin", TEMPERATURE_CASES)
def test_temperature_column_in_kelvin(read_text, header, value, kelvin):
    ds = read_text(f"{header},P/Pa\n{value!r},1000\n")
    assert ds.points[0].T_K == pytest.approx(kelvin, rel=EXACT)


def test_torr_and_mmhg_are_kept_distinct():
    """Torr ≡ 101325/760 Pa; conventional mmHg ≡ 13.5951 g/cm3 × g_n × 1 mm
    with g_n = 9.80665 m/s2 (NIST SP 811, App. B.8 footnotes).  They differ
    by 1.4e-7 relatively — below SP 811's 7-digit table, so the definitions
    are compared instead, to round-off (1e-12)."""
    torr = pascal_per_unit(parse_plain_pressure_unit("Torr"))
    mmhg = pascal_per_unit(parse_plain_pressure_unit("mmHg"))
    assert torr == pytest.approx(101325 / 760, rel=EXACT)
    assert mmhg == pytest.approx(13595.1 * 9.80665 * 1e-3, rel=EXACT)
    assert (mmhg - torr) / torr == pytest.approx(1.42e-7, rel=0.01)  # 1.4246e-7 by hand


def test_uncertainty_of_a_celsius_temperature_is_a_difference():
    """A temperature difference in °C or K is the same number; in °F it is ×5/9
    (SP 811 B.9: 1 °F interval = 5/9 K)."""
    assert kelvin_per_unit("degC")[0] == pytest.approx(1.0, rel=EXACT)
    assert kelvin_per_unit("degF")[0] == pytest.approx(5 / 9, rel=EXACT)
    assert kelvin_per_unit("degR")[0] == pytest.approx(5 / 9, rel=EXACT)


@pytest.mark.parametrize("spelling, unit", [
    ("K", "K"), ("k", "K"), ("kelvin", "K"), ("°K", "K"),
    ("°C", "degC"), ("ºC", "degC"), ("℃", "degC"), ("degC", "degC"), ("deg C", "degC"),
    ("C", "degC"), ("celsius", "degC"), ("oC", "degC"),
    ("°F", "degF"), ("F", "degF"), ("degF", "degF"), ("Fahrenheit", "degF"),
    ("°R", "degR"), ("degR", "degR"), ("Rankine", "degR"), ("R", "degR"),
])
def test_temperature_unit_spellings(spelling, unit):
    assert parse_temperature_unit(spelling) == unit


@pytest.mark.parametrize("spelling, unit", [
    ("Pa", "Pa"), ("pa", "Pa"), ("kPa", "kPa"), ("kpa", "kPa"), ("MPa", "MPa"), ("mPa", "mPa"),
    ("hPa", "hPa"), ("bar", "bar"), ("mbar", "mbar"), ("atm", "atm"), ("Torr", "Torr"),
    ("torr", "Torr"), ("mTorr", "mTorr"), ("mmHg", "mmHg"), ("mm Hg", "mmHg"), ("mm_Hg", "mmHg"),
    ("psi", "psi"), ("psia", "psi"), ("inHg", "inHg"), ("in. Hg", "inHg"),
])
def test_pressure_unit_spellings(spelling, unit):
    assert parse_plain_pressure_unit(spelling) == unit


@pytest.mark.parametrize("spelling, says", [
    ("mpa", "ambiguous"), ("psig", "gauge"), ("barg", "gauge"), ("mm", "mmHg"),
    ("furlongs", "accepted"),
])
def test_refused_pressure_units_say_why(spelling, says):
    with pytest.raises(ValueError, match=says):
        parse_plain_pressure_unit(spelling)


def test_log_pressure_conversion():
    """log10(P/kPa) = 2 is 100 kPa; ln(P/Pa) = ln(101325) is 1 atm (exact)."""
    import math

    assert pressure_to_pascal(2.0, PressureUnit("kPa", "log10")) == pytest.approx(1e5, rel=EXACT)
    assert pressure_to_pascal(math.log(101325.0), PressureUnit("Pa", "ln")) == pytest.approx(
        101325.0, rel=1e-12)
    assert temperature_to_kelvin(0.0, "degC") == pytest.approx(273.15, rel=EXACT)
