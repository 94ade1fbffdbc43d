"""JSON tables: a list of records (objects), or ``{"data": [records...]}``.

Numbers keep the exact text they had in the file (the parser hands over the
digits, never a re-printed float), so ``12.50`` stays ``12.50``.  The
columns are the record keys in order of first appearance; a key missing from
a record is an empty cell.
"""

from __future__ import annotations

import json

from audit.errors import InputError
from audit.ingest.raw_table import RawTable
from audit.ingest.text_table import decode


def _cell_text(value) -> str:
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, str):
        return value
    return json.dumps(value, ensure_ascii=False)


def read_json_table(data: bytes, file: str, row_limit=None) -> RawTable:
    """Read a JSON table.

    Parameters
    ----------
    data : bytes
        The file's bytes.
    file : str
        File name for messages.
    row_limit : audit.profiles.RowLimit, optional
        Most records accepted; checked before the records become rows.

    Returns
    -------
    RawTable

    Raises
    ------
    InputError
        Invalid JSON, JSON that is not a list of records, or more records
        than ``row_limit``.
    """
    text, encoding = decode(data, file)
    try:
        doc = json.loads(text, parse_float=str, parse_int=str, parse_constant=str)
    except json.JSONDecodeError as exc:
        raise InputError(f"invalid JSON at line {exc.lineno}, column {exc.colno}: {exc.msg}",
                         file=file) from None
    except RecursionError:
        raise InputError("the JSON is nested too deeply to be a table", file=file) from None
    notes = [f"read as {encoding} JSON"]
    if isinstance(doc, dict):
        if "data" not in doc:
            raise InputError("a JSON object must hold the records under the key \"data\"", file=file,
                             hint="write a list of records, or {\"data\": [records]}")
        others = [k for k in doc if k != "data"]
        if others:
            notes.append("ignored JSON keys beside \"data\": " + ", ".join(repr(k) for k in others))
        doc = doc["data"]
    if not isinstance(doc, list):
        raise InputError("the JSON holds no list of records", file=file,
                         hint="write a list of records, or {\"data\": [records]}")
    if not doc:
        raise InputError("the JSON list of records is empty", file=file)
    if row_limit is not None:
        row_limit.check(len(doc), file)
    header: dict[str, None] = {}
    for i, record in enumerate(doc, start=1):
        if not isinstance(record, dict):
            raise InputError(f"record {i} is not an object of column: value pairs", file=file,
                             row=i, hint="write each row as {\"T/K\": 300.0, \"P/kPa\": 3.5, ...}")
        for key in record:
            header.setdefault(key, None)
    columns = tuple(header)
    # Every record is a row by construction, an empty one included.
    rows = tuple(tuple(_cell_text(r.get(k)) for k in columns) for r in doc)
    return RawTable(header=columns, rows=rows, file_format="json", notes=tuple(notes),
                    may_use_decimal_comma=False)
