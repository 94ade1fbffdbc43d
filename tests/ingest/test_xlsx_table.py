"""XLSX workbooks written with openpyxl in the test, read back."""

from __future__ import annotations

import pytest

openpyxl = pytest.importorskip("openpyxl")

from audit.errors import InputError  # noqa: E402
from audit.ingest import ColumnOverrides, read_table  # noqa: E402


def _book(tmp_path, sheets, name="table.xlsx"):
    wb = openpyxl.Workbook()
    wb.remove(wb.active)
    for title, rows in sheets.items():
        ws = wb.create_sheet(title)
        for r in rows:
            ws.append(r)
    path = tmp_path / name
    wb.save(path)
    return path, wb


def test_first_sheet_numbers_and_text_cells(tmp_path):
    path, _ = _book(tmp_path, {
        "data": [["T (°C)", "P/kPa", "phase"], [25, 3.1699, "l"], [30.5, "12.3*", "l"],
                 [None, None, None], [40, 7.38, "l"]],
        "other": [["x"], [1]],
    })
    ds = read_table(path)
    assert ds.file_format == "xlsx"
    assert ds.n_rows == 4
    assert ds.points[0].T_K == pytest.approx(298.15, rel=1e-12)
    assert ds.points[0].P_Pa == pytest.approx(3169.9, rel=1e-12)
    assert ds.points[0].T_text == "25" and ds.points[1].T_text == "30.5"
    assert ds.points[1].reason == "pressure cell '12.3*' is not a number (footnote mark?)"
    assert ds.points[2].reason == "empty row"
    assert any("'data'" in n and "'other'" in n for n in ds.notes)


def test_sheet_choice_and_unknown_sheet(tmp_path):
    path, _ = _book(tmp_path, {"a": [["x"]], "b": [["T/K", "P/Pa"], [300, 1]]})
    ds = read_table(path, ColumnOverrides(sheet="b"))
    assert ds.points[0].T_K == 300.0
    with pytest.raises(InputError, match="no worksheet 'c'") as e:
        read_table(path, ColumnOverrides(sheet="c"))
    assert "'a', 'b'" in e.value.message


def test_number_format_keeps_printed_trailing_zeros(tmp_path):
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.append(["T/K", "P/kPa", "u(P)/%"])
    ws.append([300, 3.5, 0.005])
    ws["A2"].number_format = "0.00"      # shows 300.00: same number, printed resolution kept
    ws["B2"].number_format = "0.0"       # shows 3.5
    ws["C2"].number_format = "0.0%"      # shows 0.5%
    ws.append([301, 3.14159])
    ws["B3"].number_format = "0.00"      # shows 3.14: rounds, so the stored number is used
    path = tmp_path / "fmt.xlsx"
    wb.save(path)
    ds = read_table(path)
    p1, p2 = ds.points
    assert p1.T_text == "300.00" and p1.T_K == 300.0
    assert ds.cells[0][2] == "0.5%"
    assert p1.u_P_Pa == pytest.approx(3500 * 0.005, rel=1e-12)
    assert p2.P_text == "3.14159" and p2.P_Pa == pytest.approx(3141.59, rel=1e-12)


def test_formula_without_stored_result_is_not_silently_empty(tmp_path):
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.append(["T/K", "P/kPa"])
    ws.append([300, "=1+2"])  # openpyxl stores no result for a formula
    path = tmp_path / "f.xlsx"
    wb.save(path)
    ds = read_table(path)
    assert ds.points[0].status == "unreadable" and "formula" in ds.points[0].reason


def test_comment_rows_above_header(tmp_path):
    path, _ = _book(tmp_path, {"s": [["# title"], [], ["T/K", "P/Pa"], [300, 1]]})
    ds = read_table(path)
    assert ds.n_rows == 1 and ds.header == ("T/K", "P/Pa")


def test_damaged_workbook_is_an_input_error(write_table):
    path = write_table(b"PK\x03\x04garbage" * 10, "bad.xlsx")
    with pytest.raises(InputError, match="Excel"):
        read_table(path)
