"""Files that cannot be read give one InputError saying what to do."""

from __future__ import annotations

import pytest

from audit.errors import InputError
from audit.ingest import read_table


@pytest.mark.parametrize("content, name, says", [
    (b"", "e.csv", "empty"),
    (b"   \n\n", "e.csv", "empty"),
    (b"# only a comment\n", "c.csv", "no table"),
    (b"\x00\x01\x02binary\x00", "b.csv", "binary"),
    (b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1" + b"\x00" * 100, "old.xls", ".xls"),
    (b"%PDF-1.4 ...", "t.pdf", "PDF"),
    (b"\x81\x8d\x8f\x90\x9d,x\n1,2\n", "u.csv", "neither UTF-8 nor Windows-1252"),
    (b"a,b\n1,2\n", "x.csv", "no temperature column"),
])
def test_unreadable_files(write_table, content, name, says):
    with pytest.raises(InputError, match=says):
        read_table(write_table(content, name))


def test_missing_file_and_directory(tmp_path):
    with pytest.raises(InputError, match="not found") as e:
        read_table(tmp_path / "none.csv")
    assert str(tmp_path / "none.csv") in e.value.message
    with pytest.raises(InputError, match="directory"):
        read_table(tmp_path)


def test_huge_field_is_an_input_error(write_table):
    path = write_table(b'T/K,P/Pa\n300,"' + b"1" * 200_000 + b'"\n')
    with pytest.raises(InputError, match="split into cells"):
        read_table(path)


def test_title_line_above_the_header_gets_a_hint(write_table):
    with pytest.raises(InputError, match="below it has several columns"):
        read_table(write_table("Vapor pressure of naphthalene\nT/K,P/kPa\n300,1\n"))
    with pytest.raises(InputError, match="header seems to be further down"):
        read_table(write_table("Vapor pressure, naphthalene\nT/K,P/kPa\n300,1\n"))
