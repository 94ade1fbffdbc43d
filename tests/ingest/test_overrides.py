"""Command-line column and unit choices (ColumnOverrides)."""

from __future__ import annotations

import pytest

from audit.errors import InputError
from audit.ingest import ColumnOverrides


def test_choose_columns_by_name(read_text):
    ds = read_text("Temp,Druck,Bemerkung\n25,3.17,x\n", temperature="Temp", temperature_unit="degC",
                   pressure="Druck", pressure_unit="kPa", source="Bemerkung")
    p = ds.points[0]
    assert p.T_K == pytest.approx(298.15, rel=1e-12) and p.P_Pa == pytest.approx(3170.0)
    assert p.source == "x"
    assert all(c.how == "command line" for c in ds.columns)


def test_choice_resolves_an_ambiguous_header(read_text):
    ds = read_text("T/K,t/°C,P/kPa\n298.15,25,3.17\n", temperature="t/°C")
    assert ds.points[0].T_text == "25" and ds.points[0].T_text_unit == "degC"


def test_column_name_matching_ignores_case_and_outer_spaces(read_text):
    ds = read_text("T/K, Pressure (kPa)\n300,1\n", pressure="pressure (kpa)")
    assert ds.points[0].P_Pa == 1000.0


def test_unit_choice_wins_over_the_header_and_is_noted(read_text):
    ds = read_text("T/K,P/kPa\n300,760\n", pressure_unit="Torr")
    assert ds.points[0].P_Pa == pytest.approx(101325.0, rel=1e-12)  # 760 Torr = 1 atm by definition
    assert any("header says kPa" in n for n in ds.notes)


def test_uncertainty_columns_by_name(read_text):
    ds = read_text("T/K,P/Pa,dT,dP\n300,1000,0.1,2\n", u_temperature="dT", u_pressure="dP",
                   u_pressure_unit="%")
    assert ds.points[0].u_T_K == pytest.approx(0.1) and ds.points[0].u_P_Pa == pytest.approx(20.0)


@pytest.mark.parametrize("kw, says", [
    (dict(temperature="nope"), "not in the table"),
    (dict(temperature_unit="furlong"), "not accepted"),
    (dict(pressure_unit="log7(P/Pa)"), "not accepted"),
    (dict(temperature="P/kPa", pressure="P/kPa"), "two roles"),
])
def test_bad_choices(read_text, kw, says):
    with pytest.raises(InputError, match=says):
        read_text("T/K,P/kPa\n300,1\n", **kw)


def test_over_merges_field_by_field():
    cli = ColumnOverrides(temperature="A")
    meta = ColumnOverrides(temperature="B", pressure="C")
    assert cli.over(meta) == ColumnOverrides(temperature="A", pressure="C")
