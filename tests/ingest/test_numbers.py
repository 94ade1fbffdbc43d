"""Cells that are not plain numbers: kept as unreadable rows, with the reason."""

from __future__ import annotations

import pytest

from audit.ingest.numbers import read_number


@pytest.mark.parametrize("text, hint", [
    ("12.3*", "footnote"), ("12.3a", "footnote"), ("12.3†", "footnote"), ("12.3 (b)", "footnote"),
    ("<0.1", "limit"), (">1e5", "limit"), ("~12", "approximate"), ("ca. 12", "approximate"),
    ("12.3 ± 0.1", "uncertainty"), ("(12.3)", "bracketed"), ("12-14", "range"),
    ("1,2,3", "several separators"), ("1.013,25", "several separators"),
    ("1.2D+03", "Fortran"), ("1.2×10^3", "power-of-ten"), ("5%", "percentage"),
    ("=A2*1000", "formula"), ("abc", "not a number"),
    ("NaN", "finite"), ("inf", "finite"), ("-Infinity", "finite"), ("1e999", "finite"),
    ("n/a", "missing"), ("—", "missing"), ("-", "missing"), ("", "empty"), ("   ", "empty"),
])
def test_not_a_number(text, hint):
    got = read_number(text)
    assert got.value is None
    assert hint in got.problem


@pytest.mark.parametrize("text, value", [
    ("12.5", 12.5), ("-3", -3.0), ("+3.", 3.0), (".5", 0.5), ("1.5e-3", 1.5e-3), ("2E+05", 2e5),
    ("  7  ", 7.0), ("0", 0.0), ("-273.15", -273.15),
])
def test_plain_numbers(text, value):
    assert read_number(text).value == value


def test_unicode_minus_and_si_digit_groups_are_read_and_flagged():
    got = read_number("−12.5")
    assert got.value == -12.5 and got.unicode_minus
    got = read_number("101 325")
    assert got.value == 101325.0 and got.grouped
    got = read_number("101\u2009325.5")
    assert got.value == 101325.5 and got.grouped
    assert read_number("1 2").value is None  # not groups of three: two numbers?


def test_decimal_comma_mode():
    assert read_number("12,5", decimal_comma=True).value == 12.5
    assert "decimal point" in read_number("12.5", decimal_comma=True).problem
    assert "decimal comma" in read_number("12,5").problem


def test_percent_allowed_only_where_asked():
    assert read_number("5.00%", percent=True).value == 5.0
    assert read_number("5.00%").value is None


def test_unreadable_rows_are_kept_with_column_and_text(read_text):
    ds = read_text("T/K,P/kPa\n300,12.3*\n<250,1\nn/a,\n305,1e-3\n-5,0\n")
    assert ds.n_rows == 5
    p1, p2, p3, p4, p5 = ds.points
    assert p1.reason == "pressure cell '12.3*' is not a number (footnote mark?)"
    assert p1.T_K == 300.0 and p1.P_Pa is None and p1.P_text == "12.3*"
    assert "temperature cell '<250'" in p2.reason
    assert "temperature cell 'n/a'" in p3.reason and "pressure cell is empty" in p3.reason
    assert p4.readable
    # T <= 0 K and P <= 0 are readable here; a check rejects them later.
    assert p5.status == "ok" and p5.T_K == -5.0 and p5.P_Pa == 0.0


def test_short_row_is_unreadable_not_lost(read_text):
    ds = read_text("T/K,P/kPa,source\n300\n301,1,A\n")
    assert ds.points[0].status == "unreadable" and "missing" in ds.points[0].reason
    assert ds.cells[0] == ("300",)
