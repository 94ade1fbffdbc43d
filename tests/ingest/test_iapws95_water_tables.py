"""End to end: tables of water's saturation pressure printed from IAPWS-95.

The fixture files in ``data/`` were printed from the PyPI package ``iapws``
(IAPWS-95, ``IAPWS95(T=..., x=0).P``, in MPa) at t = 1, 10, 25, 50, 75,
100 °C: one in conventional mmHg with 5 decimals, saved in Windows-1252 with
CRLF and comment lines; one in kPa with 5 decimals, semicolon-separated with
decimal commas and a UTF-8 byte-order mark.  Reading them must give back
IAPWS-95 at T = t + 273.15 K within half a unit of the last printed digit.
"""

from __future__ import annotations

from pathlib import Path

import pytest

iapws = pytest.importorskip("iapws")

from audit.ingest import read_table  # noqa: E402

DATA = Path(__file__).parent / "data"
MMHG_PA = 13595.1 * 9.80665e-3  # conventional mmHg definition (NIST SP 811 App. B.8)


def _iapws95_pa(T_K: float) -> float:
    return iapws.IAPWS95(T=T_K, x=0).P * 1e6  # the package returns MPa


@pytest.mark.parametrize("name, half_digit_pa", [
    ("water_iapws95_degC_mmHg_cp1252.csv", 0.5e-5 * MMHG_PA),  # 5 decimals of mmHg
    ("water_iapws95_degC_kPa_semicolon_bom.csv", 0.5e-5 * 1e3),  # 5 decimals of kPa
])
def test_water_table_round_trip(name, half_digit_pa):
    ds = read_table(DATA / name)
    assert ds.n_rows == 6
    assert all(p.readable for p in ds.points)
    assert [p.T_K for p in ds.points] == pytest.approx([274.15, 283.15, 298.15, 323.15, 348.15, 373.15],
                                                       rel=1e-12)
    for p in ds.points:
        # tolerance: the printing rounded to half a unit of the last digit (+ float slack)
        assert abs(p.P_Pa - _iapws95_pa(p.T_K)) <= half_digit_pa * 1.0001


def test_water_table_notes_say_what_was_decided():
    ds = read_table(DATA / "water_iapws95_degC_mmHg_cp1252.csv")
    assert any("Windows-1252" in n for n in ds.notes)
    assert any("2 comment line(s)" in n for n in ds.notes)
    ds = read_table(DATA / "water_iapws95_degC_kPa_semicolon_bom.csv")
    assert ds.file_format == "csv-semicolon"
    assert any("decimal comma" in n for n in ds.notes)
