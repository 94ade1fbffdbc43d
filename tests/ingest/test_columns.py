"""Header recognition: every header style in the brief maps to a role and unit.

Expected roles/units are the meaning of the header as a reader would take it
(no outside numbers involved); conversions are checked in
``test_nist_sp811_units.py``.
"""

from __future__ import annotations

import pytest

from audit.errors import InputError
from audit.ingest.columns import read_header

HEADERS = [
    # temperature
    ("T/K", "T", "K", None), ("T (°C)", "T", "degC", None), ("t [degC]", "T", "degC", None),
    ("temp_F", "T", "degF", None), ("T, K", "T", "K", None), ("T in K", "T", "K", None),
    ("Temperature [°C]", "T", "degC", None), ("T_sat (K)", "T", "K", None),
    ("Tsat/K", "T", "K", None), ("TEMP (DEG C)", "T", "degC", None), ("T(K)", "T", "K", None),
    ("T / °R", "T", "degR", None), ("t/ºC", "T", "degC", None), ("T", "T", None, None),
    ("t", "T", None, None), ("temperature", "T", None, None),
    # pressure
    ("P/kPa", "P", "kPa", None), ("p (mmHg)", "P", "mmHg", None),
    ("Pressure [Torr]", "P", "Torr", None), ("psat_bar", "P", "bar", None),
    ("P (kPa)", "P", "kPa", None), ("p_sat/Pa", "P", "Pa", None),
    ("vapor pressure (kPa)", "P", "kPa", None), ("Vapour Pressure / mmHg", "P", "mmHg", None),
    ("Pvap [atm]", "P", "atm", None), ("VP (psia)", "P", "psi", None), ("p, MPa", "P", "MPa", None),
    ("P in inHg", "P", "inHg", None), ("p", "P", None, None), ("vapor pressure", "P", None, None),
    # log pressure
    ("log10(P/Pa)", "P", "Pa", "log10"), ("log(P/kPa)", "P", "kPa", "log10"),
    ("lg(p/Pa)", "P", "Pa", "log10"), ("ln(p/kPa)", "P", "kPa", "ln"),
    ("log10 P [mmHg]", "P", "mmHg", "log10"), ("ln P (Pa)", "P", "Pa", "ln"),
    ("log10(p, Torr)", "P", "Torr", "log10"), ("logP/kPa", "P", "kPa", "log10"),
    # labels
    ("phase", "phase", None, None), ("State", "phase", None, None), ("ph", "phase", None, None),
    ("source", "source", None, None), ("Ref.", "source", None, None),
    ("reference", "source", None, None), ("Author", "source", None, None), ("lab", "source", None, None),
    # uncertainties
    ("u(T)/K", "u_T", "K", None), ("u_T (K)", "u_T", "K", None), ("uT/K", "u_T", "K", None),
    ("sigma_T/K", "u_T", "K", None), ("±T (°C)", "u_T", "degC", None),
    ("u(P)/kPa", "u_P", "kPa", None), ("u_P [Pa]", "u_P", "Pa", None),
    ("u(P)/%", "u_P", "%", None), ("u(P) (%)", "u_P", "%", None), ("u_P_rel", "u_P", "%", None),
    ("u(p)/p", "u_P", "1", None),
]


@pytest.mark.parametrize("header, role, unit, log", HEADERS)
def test_header_styles(header, role, unit, log):
    r = read_header(header)
    assert (r.role, r.unit, r.log) == (role, unit, log)
    assert r.unit_problem is None


@pytest.mark.parametrize("header", ["1000/T (1/K)", "ln(1/T)", "T_cell", "Pressure drop x", "",
                                    "comment"])
def test_other_headers_are_not_taken(header):
    assert read_header(header).role is None


def test_unknown_unit_is_reported_not_ignored():
    r = read_header("P/furlongs")
    assert r.role == "P" and r.unit is None and "furlongs" in r.unit_problem


def test_unknown_unit_error_names_column_and_lists_units(read_text):
    with pytest.raises(InputError) as e:
        read_text("T/K,P/furlongs\n300,1\n")
    assert e.value.column == "P/furlongs"
    assert "furlongs" in e.value.message and "mmHg" in e.value.message and "Torr" in e.value.message


def test_temperature_without_unit_asks_for_it(read_text):
    with pytest.raises(InputError) as e:
        read_text("T,P/kPa\n300,1\n")
    assert e.value.column == "T"
    assert "--temperature-unit" in e.value.message and "[columns]" in e.value.message


def test_pressure_without_unit_asks_for_it(read_text):
    with pytest.raises(InputError, match="pressure unit is not given"):
        read_text("T/K,pressure\n300,1\n")


@pytest.mark.parametrize("header, pair, option", [
    ("T/K,t/°C,P/kPa", ("T/K", "t/°C"), "--temperature-column "),
    ("T/K,P/kPa,log10(P/Pa)", ("P/kPa", "log10(P/Pa)"), "--pressure-column "),
    ("T/K,P/kPa,u(P)/%,u(P)/Pa", ("u(P)/%", "u(P)/Pa"), "--u-pressure-column "),
])
def test_two_candidate_columns_is_an_ambiguous_header(read_text, header, pair, option):
    n = header.count(",") + 1
    with pytest.raises(InputError, match="ambiguous header") as e:
        read_text(header + "\n" + ",".join(["1"] * n) + "\n")
    assert all(f"{c!r}" in e.value.message for c in pair)
    assert option in e.value.message  # says how to choose


def test_a_column_with_an_understood_unit_wins_over_one_without(read_text):
    ds = read_text("T/K,P/kPa,p/p0 ratio\n300,1,0.5\n")
    assert ds.points[0].P_Pa == 1000.0
    assert any("'p/p0 ratio'" in n and "not used" in n for n in ds.notes)


def test_no_pressure_column(read_text):
    with pytest.raises(InputError, match="no pressure column") as e:
        read_text("T/K,density/kg m-3\n300,1\n")
    assert "'density/kg m-3'" in e.value.message


def test_uncertainty_without_unit_takes_the_value_column_unit(read_text):
    ds = read_text("T (°C),P/kPa,u(T),u(P)\n25,3.0,0.5,0.01\n")
    p = ds.points[0]
    assert p.u_T_K == pytest.approx(0.5) and p.u_P_Pa == pytest.approx(10.0)
    assert any("u(T)" in n and "degC" in n for n in ds.notes)


def test_relative_uncertainty_in_percent_and_as_fraction(read_text):
    ds = read_text("T/K,P/kPa,u(P)/%\n300,2.0,0.5\n")
    assert ds.points[0].u_P_Pa == pytest.approx(2000 * 0.005)
    ds = read_text("T/K,P/kPa,u(p)/p\n300,2.0,0.005\n")
    assert ds.points[0].u_P_Pa == pytest.approx(2000 * 0.005)
    ds = read_text("T/K,P/kPa,u_P_rel\n300,2.0,0.5\n")
    assert ds.points[0].u_P_Pa == pytest.approx(2000 * 0.005)
    assert any("'u_P_rel'" in n and "percent" in n for n in ds.notes)


def test_column_roles_record_how(read_text):
    ds = read_text("T (°C),P/kPa,phase,source\n25,3,l,x\n")
    roles = {c.role: c for c in ds.columns}
    assert roles["T"].unit == "degC" and roles["T"].how == "header"
    assert roles["P"].column == "P/kPa"
    assert set(roles) == {"T", "P", "phase", "source"}


@pytest.mark.parametrize("label, phase", [
    ("solid", "solid"), ("ice", "solid"), ("s", "solid"), ("cr", "solid"), ("crystal", "solid"),
    ("cr II", "solid"), ("Ice Ih", "solid"), ("s-g", "solid"),
    ("liquid", "liquid"), ("l", "liquid"), ("liq", "liquid"), ("L", "liquid"), ("l/v", "liquid"),
    ("gas", "unknown"), ("?", "unknown"), ("supercritical", "unknown"),
])
def test_phase_labels(read_text, label, phase):
    ds = read_text(f"T/K,P/Pa,phase\n300,100,{label}\n")
    assert ds.points[0].phase == phase
    if phase == "unknown":
        assert any(repr(label) in n for n in ds.notes)
