"""Delimited text tables: comma, tab or semicolon separated, any common encoding.

Encodings tried, in order: UTF-16 (only with its byte-order mark, as
spreadsheet programs write "Unicode text"), UTF-8 (with or without BOM),
Windows-1252.  The delimiter is chosen by parsing the header and the first
rows with each candidate and keeping the one that splits the header into at
least two columns and gives the most rows of the header's width (ties:
tab, then semicolon, then comma).  Lines before the header that are empty or
start with ``#`` are skipped and counted in the notes.  With a row limit, the
rows past it are only counted, not kept, so that a table far above the limit
is refused with its row count before it fills the memory.
"""

from __future__ import annotations

import codecs
import csv
import re

from audit.errors import InputError
from audit.ingest.raw_table import RawTable, is_blank_row

_DELIMITERS = (("\t", "tsv", "tab"), (";", "csv-semicolon", "semicolon"), (",", "csv", "comma"))
_LEADING_LINES = re.compile(r"\A(?:[ \t]*(?:#[^\r\n]*)?(?:\r\n|\r|\n))*")
_SAMPLE_ROWS = 50
# a line with its ending, split where a file opened with newline="" would split it
_LINE = re.compile(r"[^\r\n]*(?:\r\n|\r|\n)|[^\r\n]+\Z")


def decode(data: bytes, file: str) -> tuple[str, str]:
    """Text of a file and the name of the encoding used.

    Raises
    ------
    InputError
        If the bytes are neither UTF-8 nor Windows-1252 text, or look binary.
    """
    if data.startswith((codecs.BOM_UTF16_LE, codecs.BOM_UTF16_BE)):
        try:
            return data.decode("utf-16"), "UTF-16"
        except UnicodeDecodeError:
            raise InputError("the file starts like UTF-16 text but is not valid UTF-16",
                             file=file, hint="save it as UTF-8 CSV") from None
    if b"\x00" in data:
        raise InputError("this looks like a binary file, not a text table", file=file,
                         hint="give a CSV, TSV, XLSX or JSON file")
    try:
        text = data.decode("utf-8-sig")
        return text, ("UTF-8 with byte-order mark" if data.startswith(codecs.BOM_UTF8) else "UTF-8")
    except UnicodeDecodeError:
        pass
    try:
        return data.decode("cp1252"), "Windows-1252"
    except UnicodeDecodeError:
        raise InputError("the file is neither UTF-8 nor Windows-1252 text", file=file,
                         hint="save it as UTF-8") from None


def _lines(text: str):
    """The lines of ``text`` one by one, endings kept (csv joins quoted line breaks).

    Unlike ``io.StringIO``, which copies the text at 4 bytes a character, this
    reads it in place, and a sample of the first rows costs only those rows.
    """
    return (m.group(0) for m in _LINE.finditer(text))


def _parse(text: str, delimiter: str, limit: int | None = None) -> list[list[str]]:
    reader = csv.reader(_lines(text), delimiter=delimiter, strict=False)
    rows = []
    for row in reader:
        rows.append(row)
        if limit is not None and len(rows) >= limit:
            break
    return rows


def _parse_body(text: str, delimiter: str, row_limit, file: str
                ) -> tuple[tuple[str, ...], list[list[str]], int]:
    """Header, data rows (trailing blank rows dropped) and how many blank rows were dropped.

    With a ``row_limit`` (:class:`audit.profiles.RowLimit`), rows past the limit
    are counted, not kept, and a table with more data rows than the limit raises
    its :class:`InputError` before the rows are returned.
    """
    reader = csv.reader(_lines(text), delimiter=delimiter, strict=False)
    header = tuple(next(reader, ()))
    keep = None if row_limit is None else row_limit.max_rows
    rows: list[list[str]] = []
    n_rows = last_filled = 0
    for row in reader:
        n_rows += 1
        if keep is None or n_rows <= keep:
            rows.append(row)
        if not is_blank_row(row):
            last_filled = n_rows
    if row_limit is not None:
        row_limit.check(last_filled, file)
    return header, rows[:last_filled], n_rows - last_filled


def _choose_delimiter(text: str) -> tuple[str, str, str] | None:
    best, best_score = None, -1.0
    for delimiter, fmt, name in _DELIMITERS:
        sample = _parse(text, delimiter, _SAMPLE_ROWS + 1)
        if not sample or len(sample[0]) < 2:
            continue
        width = len(sample[0])
        body = [r for r in sample[1:] if not is_blank_row(r)]
        score = (sum(len(r) == width for r in body) / len(body)) if body else 1.0
        if score > best_score:
            best, best_score = (delimiter, fmt, name), score
    return best


def read_text_table(data: bytes, file: str, row_limit=None) -> RawTable:
    """Read a delimited text table.

    Parameters
    ----------
    data : bytes
        The file's bytes.
    file : str
        File name for messages.
    row_limit : audit.profiles.RowLimit, optional
        Most data rows accepted; checked while the rows are read.

    Returns
    -------
    RawTable

    Raises
    ------
    InputError
        Undecodable or binary content, no header, a single column, or more
        data rows than ``row_limit``.
    """
    text, encoding = decode(data, file)
    notes = [f"read as {encoding} text"]
    if encoding == "Windows-1252":
        notes[0] += " (not valid UTF-8)"
    lead = _LEADING_LINES.match(text).group(0)
    if lead:
        n_comment = sum(1 for line in lead.splitlines() if line.strip().startswith("#"))
        if n_comment:
            notes.append(f"skipped {n_comment} comment line(s) starting with '#' above the header")
    body = text[len(lead):]
    if not body.strip():
        raise InputError("the file has no table (it is empty or holds only comments)", file=file)
    try:
        chosen = _choose_delimiter(body)
    except csv.Error as exc:
        raise InputError(f"the table cannot be split into cells ({exc})", file=file) from None
    if chosen is None:
        lines = body.splitlines()
        first = lines[0] if lines else ""
        hint = "separate columns with commas, tabs or semicolons"
        for line in lines[1:11]:
            if any(len(next(iter(_parse(line, d, 1)), [])) >= 2 for d, _, _ in _DELIMITERS):
                hint = (f"the line {line[:60]!r} below it has several columns: if that is the "
                        "header, remove the lines above it or start them with '#'")
                break
        raise InputError(f"only one column found in the header {first[:80]!r}", file=file, hint=hint)
    delimiter, fmt, name = chosen
    try:
        header, rows, n_trailing = _parse_body(body, delimiter, row_limit, file)
    except csv.Error as exc:
        raise InputError(f"the table cannot be split into cells ({exc})", file=file) from None
    notes.append(f"columns separated by {name}s")
    if n_trailing:
        notes.append(f"ignored {n_trailing} empty line(s) after the last data row")
    n_blank = sum(1 for r in rows if is_blank_row(r))
    if n_blank:
        notes.append(f"{n_blank} empty line(s) inside the table kept as unreadable rows ('empty row')")
    return RawTable(header=header, rows=tuple(tuple(r) for r in rows), file_format=fmt,
                    notes=tuple(notes), may_use_decimal_comma=delimiter != ",")
