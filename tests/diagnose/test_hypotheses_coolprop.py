"""Cause hypotheses on a toluene point from CoolProp (HEOS, independent of the fit code).

The consensus curve is CoolProp itself, so the corrected reading must land on it to the
printed precision; σ = 0.1 % in ln P is a stand-in scatter (common practice for good
static measurements).
"""

import math

import pytest

from audit.diagnose import adjacent_swaps, diagnose_point
from audit.model import Point

CP = pytest.importorskip("CoolProp.CoolProp")


def _p_sat(T):
    return CP.PropsSI("P", "T", T, "Q", 0, "Toluene")


def _z_of(T, P):
    if not 200.0 < T < 590.0:  # outside CoolProp's liquid-vapour range: no reading there
        return math.nan
    return (math.log(P) - math.log(_p_sat(T))) / 1e-3


def test_swaps_skip_the_decimal_separator_and_equal_digits():
    assert adjacent_swaps("3.215") == ["2.315", "3.125", "3.251"]
    assert adjacent_swaps("1,05") == ["0.15", "1.50"]
    assert adjacent_swaps("11.1") == []


def test_mmhg_value_in_a_kpa_column_is_a_pressure_unit_slip():
    T = 350.0
    P = _p_sat(T)
    printed = f"{P / 133.322387415:.5g}"  # printed in mmHg, column says kPa
    p = Point(row=3, T_K=T, P_Pa=float(printed) * 1e3, T_text="350.00", P_text=printed, P_text_unit="kPa")
    d = diagnose_point(p, _z_of, k=3, ratio=3)
    assert d.best is not None and d.best.hypothesis.kind == "pressure-unit"
    assert d.best.hypothesis.P_Pa == pytest.approx(P, rel=1e-4)  # 5 printed digits
    assert "mmHg" in d.explanation() and printed in d.explanation()


def test_celsius_value_in_a_kelvin_column():
    T = 330.0
    P = _p_sat(T)
    p = Point(row=1, T_K=56.85, P_Pa=P, T_text="56.85", P_text=f"{P:.6g}")
    d = diagnose_point(p, _z_of, k=3, ratio=3)
    assert d.best.hypothesis.kind == "temperature-unit"
    assert d.best.hypothesis.T_K == pytest.approx(330.0, abs=1e-9)


def test_log_column_digit_swap_is_corrected_in_the_log():
    T = 360.0
    lg = f"{math.log10(_p_sat(T)):.4f}"  # e.g. '4.7302'
    swapped = adjacent_swaps(lg)[2]
    p = Point(row=2, T_K=T, P_Pa=10 ** float(swapped), T_text="360.00", P_text=swapped, P_text_unit="log10(P/Pa)")
    d = diagnose_point(p, _z_of, k=3, ratio=3)
    assert d.best.hypothesis.kind == "digit-swap"
    assert d.best.hypothesis.P_Pa == pytest.approx(10 ** float(lg), rel=1e-12)


def test_random_error_gets_no_cause():
    T = 340.0
    P = _p_sat(T) * 1.013  # 13 σ off, no printed-text explanation
    p = Point(row=5, T_K=T, P_Pa=P, T_text="340.00", P_text=f"{P / 1e3:.5g}", P_text_unit="kPa")
    d = diagnose_point(p, _z_of, k=3, ratio=3)
    assert d.best is None



def test_a_mildly_off_value_gets_no_cause_even_when_a_swap_would_fit():
    # CoolProp toluene at 340 K: 24.1704 kPa, printed to 0.001 kPa as '24.170'.  Its last two
    # digits swapped, '24.107', is −0.26 % off (−2.6 σ at the 0.1 % stand-in scatter) and
    # swapping them back lands on the curve.  But the value as printed is a reading too:
    # ordinary scatter explains a −2.6 σ point about as well, so no cause may be claimed
    # (|z_before| must reach ratio·max(|z_after|, 1) = 3).
    T = 340.0
    exact = f"{_p_sat(T) / 1e3:.3f}"
    swapped = exact[:-2] + exact[-1] + exact[-2]
    assert (exact, swapped) == ("24.170", "24.107")
    p = Point(row=4, T_K=T, P_Pa=float(swapped) * 1e3, T_text="340.00", P_text=swapped, P_text_unit="kPa")
    d = diagnose_point(p, _z_of, k=3, ratio=3)
    assert -3 < d.z_before < -2
    assert d.ranked[0].hypothesis.kind == "digit-swap" and abs(d.ranked[0].z_after) < 0.5
    assert d.best is None and "ordinary scatter" in d.reason


def _z_of_scatter(sigma):
    def z_of(T, P):
        if not 200.0 < T < 590.0:
            return math.nan
        return (math.log(P) - math.log(_p_sat(T))) / sigma
    return z_of


@pytest.mark.parametrize("written_in, size_Pa, column, column_Pa", [
    ("mTorr", 0.13332236842105263, "Pa", 1.0),        # 1 mTorr = 101325/760000 Pa (definition)
    ("kgf/cm2", 98066.5, "kPa", 1e3),                  # 1 kgf/cm² = 98.0665 kPa (definition of g_n)
    ("mPa", 1e-3, "Pa", 1.0)])
def test_every_unit_a_header_may_name_is_a_reading(written_in, size_Pa, column, column_Pa):
    T = 330.0
    P = _p_sat(T)
    printed = f"{P / size_Pa:.5g}"
    p = Point(row=4, T_K=T, P_Pa=float(printed) * column_Pa, T_text="330.00", P_text=printed, P_text_unit=column)
    d = diagnose_point(p, _z_of, k=3, ratio=3)
    assert d.best is not None and d.best.hypothesis.kind == "pressure-unit", d.summary()
    assert f"written in {written_in}" in d.explanation()
    assert d.best.hypothesis.P_Pa == pytest.approx(P, rel=1e-4)


def test_units_of_about_one_size_leave_the_value_uncertain_not_the_cause():
    # a value in atm in a mmHg column, from a series scattering 2 %: bar (1.3 % smaller than atm)
    # and kgf/cm² (3.2 % smaller) fit about as well; the cause is a unit slip either way
    T = 360.0
    P = _p_sat(T)
    printed = f"{P / 101325.0:.4g}"
    p = Point(row=5, T_K=T, P_Pa=float(printed) * 133.322387415, T_text="360.00", P_text=printed,
              P_text_unit="mmHg")
    d = diagnose_point(p, _z_of_scatter(0.02), k=3, ratio=3)
    assert d.best is not None and d.best.hypothesis.kind == "pressure-unit", d.summary()
    assert "written in atm" in d.best.hypothesis.reading
    assert {a.hypothesis.reading.split(" in ")[-1] for a in d.alternatives} >= {"bar"}
    assert "about as likely" in d.explanation()


def test_a_digit_swap_rivalling_a_unit_reading_stays_ambiguous():
    # '0.0465' bar could be MPa written as bar (×10) or '0.4065' with two digits swapped back,
    # 13 % apart: with 8 % scatter neither is clearly better, so no cause is named
    T = 331.6
    P_true = 0.465e5

    def z_of(T_, P_):
        return (math.log(P_) - math.log(P_true)) / 0.08 if abs(T_ - T) < 1e-9 else math.nan

    p = Point(row=6, T_K=T, P_Pa=0.0465e5, T_text="331.60", P_text="0.0465", P_text_unit="bar")
    d = diagnose_point(p, z_of, k=3, ratio=3)
    assert d.best is None and d.reason.startswith("ambiguous")


def test_a_unit_is_preferred_to_a_decimal_shift_that_fits_as_well():
    # a kPa value printed under a kgf/cm² header: read in kPa it is exact, read as a decimal point
    # two places off (×10⁻²) it is 2 % low (1 kgf/cm² = 98.0665 kPa); with a 1.5 % scatter both fit,
    # and the unit slip is named, the decimal shift listed beside it
    T = 345.0
    P = _p_sat(T)
    printed = f"{P / 1e3:.5g}"
    p = Point(row=7, T_K=T, P_Pa=float(printed) * 98066.5, T_text="345.00", P_text=printed,
              P_text_unit="kgf/cm2")
    d = diagnose_point(p, _z_of_scatter(0.015), k=3, ratio=3)
    assert d.best is not None and d.best.hypothesis.kind == "pressure-unit", d.summary()
    assert "written in kPa" in d.best.hypothesis.reading
    assert any(a.hypothesis.kind == "decimal-shift" for a in d.alternatives)
    assert "printed 10^2 times" in d.explanation()
