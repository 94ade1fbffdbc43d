"""Delimited text: delimiters, encodings, decimal commas, comments, empty rows."""

from __future__ import annotations

import hashlib

import pytest

from audit.errors import InputError


@pytest.mark.parametrize("sep, fmt", [(",", "csv"), ("\t", "tsv"), (";", "csv-semicolon")])
def test_delimiters(read_text, sep, fmt):
    ds = read_text(sep.join(["T/K", "P/kPa", "source"]) + "\n" + sep.join(["300", "3.5", "A"]) + "\n")
    assert ds.file_format == fmt
    assert (ds.points[0].T_K, ds.points[0].P_Pa, ds.points[0].source) == (300.0, 3500.0, "A")


def test_semicolon_with_decimal_commas(read_text):
    ds = read_text("T, K;P, kPa\n300,15;3,5\n310;4,25\n")
    assert [p.T_K for p in ds.points] == [300.15, 310.0]
    assert [p.P_Pa for p in ds.points] == [3500.0, 4250.0]
    assert [p.T_text for p in ds.points] == ["300,15", "310"]  # printed text kept
    assert any("decimal comma" in n for n in ds.notes)


def test_tab_with_decimal_commas(read_text):
    ds = read_text("T/K\tP/kPa\n300,5\t1,5\n")
    assert (ds.points[0].T_K, ds.points[0].P_Pa) == (300.5, 1500.0)


def test_decimal_point_among_decimal_commas_is_unreadable_not_guessed(read_text):
    ds = read_text("T/K;P/kPa\n300,5;1,5\n301,5;1,6\n302.5;1,7\n")
    assert ds.points[2].status == "unreadable"
    assert "decimal point" in ds.points[2].reason and "'302.5'" in ds.points[2].reason


def test_decimal_comma_in_a_comma_file_is_unreadable(read_text):
    ds = read_text('T/K,P/kPa\n300,"1,5"\n300,1.5\n')
    assert ds.points[0].status == "unreadable" and "decimal comma" in ds.points[0].reason
    assert ds.points[1].status == "ok"


def test_unquoted_decimal_comma_in_a_comma_file_shifts_the_row(read_text):
    """'300,1,5' has three cells under a two-column header: not read as P = 1."""
    ds = read_text("T/K,P/kPa\n300,1,5\n301,1.6\n")
    p = ds.points[0]
    assert p.status == "unreadable" and "3 cells" in p.reason
    assert p.P_Pa is None
    assert ds.cells[0] == ("300", "1", "5")
    assert ds.points[1].readable


def test_cp1252_degree_sign(read_text):
    data = "T (°C),P (kPa)\r\n25,3.17\r\n".encode("cp1252")
    assert b"\xb0" in data  # the degree sign as one cp1252 byte, invalid in UTF-8
    ds = read_text(data)
    assert ds.points[0].T_K == pytest.approx(298.15, rel=1e-12)
    assert ds.header[0] == "T (°C)"
    assert any("Windows-1252" in n for n in ds.notes)


def test_utf8_with_bom(read_text):
    ds = read_text(b"\xef\xbb\xbf" + "T/K,P/Pa\n300,1\n".encode())
    assert ds.header == ("T/K", "P/Pa")  # the BOM is not part of the first header
    assert any("byte-order mark" in n for n in ds.notes)


def test_utf16_tab_text_as_spreadsheets_export_it(read_text):
    ds = read_text("T (°C)\tP (kPa)\r\n25\t3.17\r\n".encode("utf-16"))
    assert ds.points[0].P_Pa == pytest.approx(3170.0)
    assert ds.file_format == "tsv"


def test_comment_lines_above_the_header_are_skipped_and_noted(read_text):
    ds = read_text("# naphthalene\n#  measured 1990\n\nT/K,P/Pa\n300,1\n")
    assert ds.n_rows == 1
    assert any("2 comment line(s)" in n for n in ds.notes)


def test_empty_lines_inside_are_rows_and_trailing_ones_are_not(read_text):
    ds = read_text("T/K,P/Pa\n300,1\n\n302,3\n,\n304,5\n\n\n")
    assert ds.n_rows == 5
    assert [p.row for p in ds.points] == [1, 2, 3, 4, 5]
    assert [p.reason for p in ds.points if not p.readable] == ["empty row", "empty row"]
    assert any("2 empty line(s) after" in n for n in ds.notes)


def test_comment_line_after_the_header_is_a_row(read_text):
    ds = read_text("T/K,P/Pa\n300,1\n# note\n302,3\n")
    assert ds.n_rows == 3 and ds.points[1].status == "unreadable"


def test_crlf_and_cr_line_endings(read_text):
    for eol in ("\r\n", "\r"):
        ds = read_text(eol.join(["T/K,P/Pa", "300,1", "301,2"]) + eol)
        assert [p.T_K for p in ds.points] == [300.0, 301.0]


def test_sha256_and_file_untouched(write_table):
    from audit.ingest import read_table

    data = "T/K,P/Pa\n300,1\n".encode()
    path = write_table(data)
    before = path.stat().st_mtime_ns
    ds = read_table(path)
    assert ds.sha256 == hashlib.sha256(data).hexdigest()
    assert path.read_bytes() == data and path.stat().st_mtime_ns == before
    assert ds.file_name == str(path)


def test_header_only_is_an_error(read_text):
    with pytest.raises(InputError, match="no data rows"):
        read_text("T/K,P/Pa\n")


def test_one_column_only_is_an_error(read_text):
    with pytest.raises(InputError, match="only one column"):
        read_text("T/K P/Pa\n300 1\n")
