"""The metadata TOML file: constants converted to SI with pint; every mistake named.

Conversions checked against exact definitions: 1 g/mol = 1e-3 kg/mol,
1 MPa = 1e6 Pa, t/°C + 273.15 = T/K, 1 kJ = 1e3 J, 1 cm3 = 1e-6 m3
(SI Brochure, 9th ed. 2019); tolerance 1e-12 (floating point only).
"""

from __future__ import annotations

import pytest

from audit.errors import InputError
from audit.ingest import ColumnOverrides, read_metadata, read_table
from audit.ingest.metadata import cas_number_is_valid

ROUNDOFF = 1e-12

GOOD = '''
substance = "naphthalene"
cas = "91-20-3"
notes = "test data"
[columns]
temperature = "Temp"
temperature_unit = "degC"
[constants]
T_triple = { value = 80.22, unit = "degC", source = "from memory", uncertainty = 0.02 }
P_critical = { value = 4.05, unit = "MPa", source = "from memory" }
molar_mass = { value = 128.17, unit = "g/mol", source = "from memory" }
dH_fusion = { value = 19.0, unit = "kJ/mol", source = "from memory" }
V_solid = { value = 111.9, unit = "cm^3/mol", source = "from memory" }
acentric_factor = { value = 0.302, unit = "1", source = "from memory" }
dipole_moment = { value = 0.0, unit = "debye", source = "symmetry" }
[reference_equation]
form = "antoine"
parameters = { A = 9.0, B = 1500.0, C = -40.0 }
valid_from_K = 300.0
valid_to_K = 400.0
source = "synthetic"
'''


def test_good_metadata(tmp_path):
    path = tmp_path / "m.toml"
    path.write_text(GOOD, encoding="utf-8")
    md = read_metadata(path)
    assert md.substance == "naphthalene" and md.cas == "91-20-3"
    c = md.constants
    assert c["T_triple"].value == pytest.approx(353.37, rel=ROUNDOFF)
    assert c["T_triple"].uncertainty == pytest.approx(0.02, rel=1e-9)  # a difference: no offset
    assert c["T_triple"].unit == "K" and c["T_triple"].source == "from memory"
    assert c["P_critical"].value == pytest.approx(4.05e6, rel=ROUNDOFF)
    assert c["molar_mass"].value == pytest.approx(0.12817, rel=ROUNDOFF)
    assert c["dH_fusion"].value == pytest.approx(19000.0, rel=ROUNDOFF)
    assert c["V_solid"].value == pytest.approx(111.9e-6, rel=ROUNDOFF)
    assert c["acentric_factor"].value == pytest.approx(0.302, rel=ROUNDOFF)
    assert c["dipole_moment"].unit == "debye"
    assert md.extra["reference_equation"] == {  # validated, kept verbatim
        "form": "antoine", "parameters": {"A": 9.0, "B": 1500.0, "C": -40.0}, "valid_from_K": 300.0,
        "valid_to_K": 400.0, "source": "synthetic"}
    assert md.extra["notes"] == ["test data"]


def test_metadata_beside_the_table_supplies_columns(tmp_path):
    (tmp_path / "nap.toml").write_text(GOOD, encoding="utf-8")
    (tmp_path / "nap.csv").write_text("Temp,P/Pa\n80,1000\n", encoding="utf-8")
    ds = read_table(tmp_path / "nap.csv")
    assert ds.points[0].T_K == pytest.approx(353.15, rel=ROUNDOFF)
    roles = {c.role: c for c in ds.columns}
    assert roles["T"].how == "metadata file"
    assert ds.metadata.get("P_critical") == pytest.approx(4.05e6)
    # the command line wins over the metadata file
    ds = read_table(tmp_path / "nap.csv", ColumnOverrides(temperature_unit="K", substance="x"))
    assert ds.points[0].T_K == 80.0 and ds.metadata.substance == "x"
    assert {c.role: c for c in ds.columns}["T"].how == "command line"


def test_explicit_metadata_path(tmp_path):
    (tmp_path / "meta.toml").write_text('[columns]\npressure_unit = "Torr"\n', encoding="utf-8")
    (tmp_path / "d.csv").write_text("T/K,P\n300,760\n", encoding="utf-8")
    ds = read_table(tmp_path / "d.csv", metadata_path=tmp_path / "meta.toml")
    assert ds.points[0].P_Pa == pytest.approx(101325.0, rel=ROUNDOFF)  # 760 Torr = 1 atm exactly


@pytest.mark.parametrize("text, says", [
    ('substanc = "x"', "unknown key"),
    ('[constants]\nT_boil = { value = 1, unit = "K", source = "s" }', "unknown constant 'constants.T_boil'"),
    ('[constants]\nT_boiling = { value = 1, unit = "K" }', "no 'source'"),
    ('[constants]\nT_boiling = { value = "1", unit = "K", source = "s" }', "finite number"),
    ('[constants]\nT_boiling = { value = true, unit = "K", source = "s" }', "finite number"),
    ('[constants]\nT_boiling = { value = 1, unit = "Pa", source = "s" }', "cannot be converted"),
    ('[constants]\nT_boiling = { value = 1, unit = "kelvin**", source = "s" }', "cannot be converted"),
    ('[constants]\nT_boiling = { value = 1, unit = "K", source = "s", note = "x" }', "unknown key"),
    ('[constants]\nT_boiling = { value = 1, unit = "K", source = "s", uncertainty = -1 }', ">= 0"),
    ('[constants]\nT_boiling = 5', "must be a table"),
    ('[columns]\ntemp = "T"', "under [columns]"),
    ('[columns]\ntemperature = 1', "must be text"),
    ('cas = "91-20-4"', "CAS"),
    ("substance = ", "invalid TOML"),
    ('notes = 3', "notes"),
    ('tsonopoulos_class = "alcohol"', "not a class of the Tsonopoulos correlation"),
    ('tsonopoulos_class = 2', "tsonopoulos_class"),
])
def test_bad_metadata_names_the_key(tmp_path, text, says):
    path = tmp_path / "bad.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(InputError) as e:
        read_metadata(path)
    assert says in e.value.message and str(path) in e.value.message


def test_missing_metadata_file(tmp_path):
    (tmp_path / "d.csv").write_text("T/K,P/Pa\n300,1\n", encoding="utf-8")
    with pytest.raises(InputError, match="cannot read the metadata file"):
        read_table(tmp_path / "d.csv", metadata_path=tmp_path / "none.toml")


@pytest.mark.parametrize("cas, ok", [
    ("7732-18-5", True),   # water (CAS RN, check digit by the rule)
    ("91-20-3", True),     # naphthalene
    ("71-43-2", True),     # benzene
    ("71-43-3", False), ("7732185", False), ("", False),
])
def test_cas_check_digit(cas, ok):
    assert cas_number_is_valid(cas) is ok
