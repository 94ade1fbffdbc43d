"""JSON records, with the printed digits of numbers kept."""

from __future__ import annotations

import pytest

from audit.errors import InputError


def test_list_of_records(read_text):
    ds = read_text('[{"T/K": 300.10, "P/kPa": 3.50, "source": "A"},'
                   ' {"T/K": 301, "P/kPa": "12.3*"}, {"T/K": null, "P/kPa": NaN}]', "t.json")
    assert ds.file_format == "json"
    assert ds.n_rows == 3
    assert ds.points[0].T_text == "300.10"  # JSON text kept as printed, not re-printed
    assert ds.points[0].P_Pa == pytest.approx(3500.0)
    assert ds.points[1].source is None and "footnote" in ds.points[1].reason
    assert "temperature cell is empty" in ds.points[2].reason
    assert "not a finite number" in ds.points[2].reason
    assert ds.header == ("T/K", "P/kPa", "source")
    assert ds.cells[1] == ("301", "12.3*", "")


def test_data_wrapper(read_text):
    ds = read_text('{"data": [{"T (°C)": 25, "P/Pa": 3169.93}], "title": "water"}', "t.json")
    assert ds.points[0].T_K == pytest.approx(298.15, rel=1e-12)
    assert any("'title'" in n for n in ds.notes)


def test_json_sniffed_without_extension(read_text):
    ds = read_text('[{"T/K": 300, "P/Pa": 1}]', "t.txt")
    assert ds.file_format == "json"


@pytest.mark.parametrize("text, says", [
    ('[{"T/K": 300', "invalid JSON"), ('{"rows": []}', '"data"'), ("[]", "empty"),
    ("[1, 2]", "record 1"), ('"x"', "no list"), ("[" * 100000 + "]" * 100000, "nested"),
])
def test_bad_json(read_text, text, says):
    with pytest.raises(InputError, match=says):
        read_text(text, "t.json")
