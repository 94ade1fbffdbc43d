"""Reading a sheet file: what is refused, with a message naming the file and the key."""

from __future__ import annotations

import pytest

from audit.errors import InputError
from audit.sheet.read import read_sheet, sheet_from_text

GOOD = """[sheet]
substance = "toluene"
[equation]
form = "antoine"
coefficients = { A = 6.95464, B = 1344.8, C = 219.482 }
gives = "log10"
T_unit = "°C"
P_unit = "mm Hg"
range = [0, 130]
[table]
rows = [[20, "21,84"], [40, 59.14], [50, "n/a"]]
"""


def test_a_good_sheet_is_read_with_its_printed_text():
    s = sheet_from_text(GOOD.encode(), "good.toml")
    assert s.form == "antoine" and s.coefficients == {"A": 6.95464, "B": 1344.8, "C": 219.482}
    assert (s.stated.log, s.stated.T_unit, s.stated.P_unit) == ("log10", "degC", "mmHg")
    rows = s.table.rows
    assert rows[0].P_text == "21,84" and rows[0].P_value == pytest.approx(21.84)  # a decimal comma
    assert rows[2].P_value is None and "n/a" in rows[2].reason
    assert not s.table.units_given and s.table.P_unit == "mmHg"


@pytest.mark.parametrize("change, expected", [
    (("form = \"antoine\"", "form = \"antwine\""), "form 'antwine' is not known"),
    (("B = 1344.8, ", ""), "needs coefficient(s) B"),
    (("C = 219.482", "C = 219.482, D = 1"), "has no coefficient(s) D"),
    (("P_unit = \"mm Hg\"", "P_unit = \"psig\""), "P_unit"),
    (("T_unit = \"°C\"", "T_unit = \"Celsiuss\""), "T_unit"),
    (("range = [0, 130]", "range = [130, 0]"), "range"),
    (("substance = \"toluene\"", "cas = \"108-88-4\""), "not a valid CAS number"),
    (("gives = \"log10\"", "gives = \"log2\""), "gives"),
    (("[table]", "[tabel]"), "unknown key(s): tabel"),
    (("rows = [[20, \"21,84\"], [40, 59.14], [50, \"n/a\"]]", "rows = [[20]]"), "row 1 must be [T, P]"),
])
def test_unusable_input_is_one_clear_error(change, expected):
    text = GOOD.replace(*change)
    assert text != GOOD
    with pytest.raises(InputError) as info:
        sheet_from_text(text.encode(), "bad.toml")
    assert expected in str(info.value) and "bad.toml" in str(info.value)


def test_an_expression_that_would_run_code_is_refused():
    text = GOOD.replace('form = "antoine"', 'form = "expression"\nexpression = "__import__(\'os\').system(\'x\')"')
    with pytest.raises(InputError) as info:
        sheet_from_text(text.encode(), "hostile.toml")
    assert "expression cannot be read" in str(info.value)


def test_the_sheet_file_is_only_read(tmp_path):
    path = tmp_path / "s.toml"
    path.write_bytes(GOOD.encode())
    before = path.stat().st_mtime_ns, path.read_bytes()
    read_sheet(path)
    assert (path.stat().st_mtime_ns, path.read_bytes()) == before


def test_invalid_toml_and_bytes_are_errors():
    with pytest.raises(InputError, match="not valid TOML"):
        sheet_from_text(b"[sheet\n", "x.toml")
    with pytest.raises(InputError, match="not UTF-8"):
        sheet_from_text(b"\xff\xfe[sheet]", "x.toml")
