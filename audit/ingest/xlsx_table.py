"""Excel workbooks (.xlsx): one worksheet read as a table of printed cell texts.

A number's text is what the cell shows when that display holds the stored
number exactly (``25`` formatted ``0.00`` shows ``25.00``, keeping the printed
resolution); when the format rounds the stored number, the stored number's
shortest text is used instead, so text and value never disagree.  Percent
formats show ``5.00%``.  A formula whose result was never stored (files
written by scripts) is kept as its formula text, which then reads as
unreadable instead of silently empty.  openpyxl is imported only here.
"""

from __future__ import annotations

import datetime as _dt
import io
import re
from decimal import Decimal

from audit.errors import InputError
from audit.ingest.raw_table import RawTable, drop_trailing_blank_rows, is_blank_row

_FIXED = re.compile(r"^(?:#,##)?0(?:\.(0+))?$")
_SCIENTIFIC = re.compile(r"^(?:#*)0(?:\.(0+))?E\+0+$", re.IGNORECASE)
_PERCENT = re.compile(r"^0(?:\.(0+))?%$")


def _general(value: float) -> str:
    if value.is_integer() and abs(value) < 1e15:
        return str(int(value))
    return repr(value)


def display_text(value, number_format: str | None) -> str:
    """Text of a cell value as the worksheet shows it (see module notes).

    Parameters
    ----------
    value : object
        The cell's stored value (openpyxl type: int, float, str, bool,
        datetime, None).
    number_format : str or None
        The cell's number format code.

    Returns
    -------
    str
    """
    if value is None:
        return ""
    if isinstance(value, bool):
        return "TRUE" if value else "FALSE"
    if isinstance(value, (int, float)):
        fmt = (number_format or "General").strip()
        v = float(value)
        m = _PERCENT.match(fmt)
        if m:
            decimals = len(m.group(1) or "")
            shown = Decimal(repr(v)) * 100
            text = f"{shown:.{decimals}f}"
            if Decimal(text) != shown:
                text = format(shown.normalize(), "f")
            return text + "%"
        m = _FIXED.match(fmt)
        if m:
            text = f"{v:.{len(m.group(1) or '')}f}"
            return text if float(text) == v else _general(v)
        m = _SCIENTIFIC.match(fmt)
        if m:
            text = f"{v:.{len(m.group(1) or '')}E}"
            return text if float(text) == v else _general(v)
        return str(value) if isinstance(value, int) else _general(v)
    if isinstance(value, (_dt.datetime, _dt.date, _dt.time, _dt.timedelta)):
        return str(value)
    return str(value)


def read_xlsx_table(data: bytes, file: str, sheet: str | None = None, row_limit=None) -> RawTable:
    """Read one worksheet of an .xlsx workbook.

    Parameters
    ----------
    data : bytes
        The workbook file's bytes.
    file : str
        File name for messages.
    sheet : str, optional
        Worksheet name (default: the first worksheet).
    row_limit : audit.profiles.RowLimit, optional
        Most data rows accepted.  openpyxl holds the whole workbook in memory
        first (an .xlsx sheet has at most 1 048 576 rows), so the limit is
        checked on the cell texts, before the rows become points.

    Returns
    -------
    RawTable

    Raises
    ------
    InputError
        Not a readable workbook, unknown sheet, no table on the sheet, or
        more data rows than ``row_limit``.
    """
    import openpyxl

    try:
        book = openpyxl.load_workbook(io.BytesIO(data), data_only=True)
        formulas = openpyxl.load_workbook(io.BytesIO(data), data_only=False)
    except Exception as exc:  # noqa: BLE001 -- openpyxl raises many types for a damaged file
        raise InputError(f"cannot be read as an Excel .xlsx workbook ({type(exc).__name__}: {exc})",
                         file=file, hint="save it again as .xlsx, or export the sheet as CSV") from None
    names = book.sheetnames
    if not names:
        raise InputError("the workbook has no worksheet", file=file)
    notes = []
    if sheet is None:
        name = names[0]
        if len(names) > 1:
            notes.append(f"read the first worksheet {name!r} of {len(names)} "
                         f"({', '.join(repr(n) for n in names)}); choose another with --sheet")
    else:
        matches = [n for n in names if n == sheet] or [n for n in names
                                                      if n.strip().casefold() == sheet.strip().casefold()]
        if not matches:
            raise InputError(f"the workbook has no worksheet {sheet!r}", file=file,
                             hint="its worksheets are: " + ", ".join(repr(n) for n in names))
        name = matches[0]
        notes.append(f"read worksheet {name!r}")
    ws = book[name]
    if not hasattr(ws, "iter_rows"):
        raise InputError(f"{name!r} is a chart sheet, not a worksheet", file=file)
    fws = formulas[name]

    table: list[list[str]] = []
    n_unstored = 0
    for row in ws.iter_rows(min_row=1, max_row=ws.max_row, max_col=ws.max_column):
        texts = []
        for cell in row:
            value = cell.value
            if value is None:
                stored = fws.cell(row=cell.row, column=cell.column).value
                if isinstance(stored, str) and stored.startswith("="):
                    n_unstored += 1
                    texts.append(stored)
                    continue
            texts.append(display_text(value, cell.number_format))
        table.append(texts)
    if n_unstored:
        notes.append(f"{n_unstored} formula cell(s) have no stored result (the file was not saved "
                     "by a spreadsheet program); they are kept as formula text")
    # Lines before the header: empty rows, and rows whose first filled cell starts with '#'.
    start, n_comment = 0, 0
    while start < len(table):
        filled = [c for c in table[start] if c.strip()]
        if not filled:
            start += 1
        elif filled[0].lstrip().startswith("#"):
            n_comment += 1
            start += 1
        else:
            break
    if start >= len(table):
        raise InputError(f"worksheet {name!r} holds no table", file=file)
    if n_comment:
        notes.append(f"skipped {n_comment} comment row(s) starting with '#' above the header")
    header = table[start]
    # Trailing empty header cells are formatting, not columns.
    width = len(header)
    while width and not header[width - 1].strip() and all(
            len(r) < width or not r[width - 1].strip() for r in table[start + 1:]):
        width -= 1
    header = header[:width]
    rows = [r[:width] if all(not c.strip() for c in r[width:]) else r for r in table[start + 1:]]
    rows, n_trailing = drop_trailing_blank_rows(rows)
    if row_limit is not None:
        row_limit.check(len(rows), file)
    n_blank = sum(1 for r in rows if is_blank_row(r))
    if n_blank:
        notes.append(f"{n_blank} empty row(s) inside the table kept as unreadable rows ('empty row')")
    return RawTable(header=tuple(header), rows=tuple(tuple(r) for r in rows), file_format="xlsx",
                    notes=tuple(notes), may_use_decimal_comma=False)
