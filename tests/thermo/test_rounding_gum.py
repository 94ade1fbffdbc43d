"""Rounding floor from printed digits: GUM JCGM 100:2008 §4.3.7.

A value rounded to a last-digit unit δ has a rectangular error of half-width
a = δ/2, so u = a/√3 (GUM §4.3.7; §F.2.2.1 gives the same for the resolution
of a digital indication).  The expected values below are that formula worked
by hand; tolerances are floating-point only (1e-12 relative).
"""

import math

import numpy as np
import pytest

from audit.thermo.rounding import (log_pressure_base, parse_printed_number, pressure_rounding_u_lnP,
                                   rounding_standard_uncertainty, temperature_rounding_u_K)


@pytest.mark.parametrize("text, value, delta", [
    ("0.0002", 0.0002, 1e-4),
    ("760", 760.0, 1.0),
    ("1.2e-3", 1.2e-3, 1e-4),
    ("1,25", 1.25, 1e-2),
    ("1.013,25", 1013.25, 1e-2),
    ("101 325", 101325.0, 1.0),
    ("3.1699E+03", 3169.9, 0.1),
    ("-5.25", -5.25, 1e-2),
    ("12.", 12.0, 1.0),
])
def test_last_digit_unit(text, value, delta):
    pn = parse_printed_number(text)
    assert pn.value == pytest.approx(value, rel=1e-12)
    assert pn.last_digit_unit == pytest.approx(delta, rel=1e-12)


def test_gum_rectangular_half_unit():
    # 0.0002: a = 0.00005, u = 0.00005/√3 = 2.886751e-5 (GUM 4.3.7)
    assert rounding_standard_uncertainty("0.0002") == pytest.approx(0.00005 / math.sqrt(3), rel=1e-12)
    # 760 mmHg: a = 0.5 mmHg, relative u(ln P) = 0.5/√3/760
    assert pressure_rounding_u_lnP("760", "mmHg") == pytest.approx(0.5 / math.sqrt(3) / 760, rel=1e-12)


def test_gum_floor_matches_monte_carlo_of_rounding():
    # Independent check of the a/√3 formula: round uniformly spread values to 4 decimals
    # and measure the error's standard deviation (2e5 draws: SE of an SD ≈ 0.16 %, tolerance 1 %).
    rng = np.random.default_rng(7)
    x = rng.uniform(0.0001, 0.001, 200_000)
    err = np.round(x, 4) - x
    assert np.std(err) == pytest.approx(rounding_standard_uncertainty("0.0002"), rel=0.01)


def test_log_column_rounding_is_in_the_log_value():
    # log10(P/Pa) printed 3.501 (δ = 0.001): u(ln P) = ln(10)·0.0005/√3, whatever P is
    assert log_pressure_base("log10(P/Pa)") == 10.0
    assert log_pressure_base("ln(P/kPa)") == pytest.approx(math.e)
    assert log_pressure_base("mmHg") is None
    assert pressure_rounding_u_lnP("3.501", "log10(P/Pa)") == pytest.approx(
        math.log(10) * 0.0005 / math.sqrt(3), rel=1e-12)
    assert pressure_rounding_u_lnP("-1.52", "ln(P/kPa)") == pytest.approx(0.005 / math.sqrt(3), rel=1e-12)


def test_heavily_rounded_low_pressure_has_large_relative_floor():
    # "0.0002 mmHg": half a unit is 25 % of the value -> u(ln P) ≈ 14 %: 10 % off is within 1 σ
    assert pressure_rounding_u_lnP("0.0002", "mmHg") == pytest.approx(0.25 / math.sqrt(3), rel=1e-12)


def test_temperature_floor_in_kelvin():
    assert temperature_rounding_u_K("25.1", "degC") == pytest.approx(0.05 / math.sqrt(3), rel=1e-12)
    assert temperature_rounding_u_K("77", "degF") == pytest.approx(0.5 * 5 / 9 / math.sqrt(3), rel=1e-12)


def test_unreadable_text():
    with pytest.raises(ValueError):
        parse_printed_number("n/a")
    assert math.isnan(pressure_rounding_u_lnP("abc", "Pa"))
