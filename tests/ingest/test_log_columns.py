"""Log-pressure columns: values are log10(P/unit) or ln(P/unit).

Check values are exact by definition (10**2 kPa = 1e5 Pa) or from NIST SP 811
(2008) App. B (1 mmHg = 133.3224 Pa, 7 digits -> rel. tolerance 5e-7).
"""

from __future__ import annotations

import math

import pytest

from audit.errors import InputError

ROUNDOFF = 1e-12  # exact by definition; floating-point only


@pytest.mark.parametrize("header, printed, pascal, rtol", [
    ("log10(P/Pa)", "3.5", 10 ** 3.5, ROUNDOFF),
    ("log(P/kPa)", "2", 1e5, ROUNDOFF),           # 'log' is read as log10
    ("lg(p/Pa)", "-1.25", 10 ** -1.25, ROUNDOFF),
    ("ln(p/kPa)", "4.5", math.exp(4.5) * 1e3, ROUNDOFF),
    ("log10 P [mmHg]", "2", 100 * 133.3224, 5e-7),  # NIST SP 811 B.8, 7 digits
])
def test_log_column_values(read_text, header, printed, pascal, rtol):
    ds = read_text(f"T/K,{header}\n300,{printed}\n")
    p = ds.points[0]
    assert p.P_Pa == pytest.approx(pascal, rel=rtol)
    assert p.P_text == printed
    base = "ln" if header.startswith("ln") else "log10"
    assert p.P_text_unit.startswith(base + "(P/")
    roles = {c.role: c for c in ds.columns}
    assert roles["P"].log == base


def test_log_column_unit_given_on_the_command_line(read_text):
    ds = read_text("T/K,logP\n300,2\n", pressure_unit="log10(P/kPa)")
    assert ds.points[0].P_Pa == pytest.approx(1e5, rel=ROUNDOFF)
    assert ds.points[0].P_text_unit == "log10(P/kPa)"
    roles = {c.role: c for c in ds.columns}
    assert roles["P"].how == "command line"


def test_log_value_too_large_is_unreadable_not_a_crash(read_text):
    ds = read_text("T/K,log10(P/Pa)\n300,400\n301,3\n")
    assert ds.points[0].status == "unreadable" and "out of range" in ds.points[0].reason
    assert ds.points[1].status == "ok"


def test_uncertainty_of_a_log_column_needs_its_unit(read_text):
    with pytest.raises(InputError, match="logarithm"):
        read_text("T/K,log10(P/Pa),u(P)\n300,3,0.1\n")
