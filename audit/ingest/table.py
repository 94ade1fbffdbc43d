"""From a file to a :class:`~audit.model.Dataset`: every data row one point.

Nothing is lost and nothing is repaired silently: a row whose temperature or
pressure cell is not a number stays in the dataset as an *unreadable* point
whose reason names the column and the text seen; every decision taken on the
user's behalf (encoding, delimiter, decimal comma, unit of an uncertainty
column...) is written to ``Dataset.notes``.  A temperature <= 0 K or a
pressure <= 0 is readable here; rejecting it is a check's job.  The input
file is opened read-only and read once.
"""

from __future__ import annotations

import hashlib
import math
import os
from dataclasses import fields, replace
from pathlib import Path

from audit.errors import InputError
from audit.ingest import units as _units
from audit.ingest.columns import ColumnAssignment, ColumnOverrides, assign_columns
from audit.ingest.labels import crystal_form_from_label, phase_from_label
from audit.ingest.metadata import read_metadata_and_columns
from audit.ingest.numbers import COMMA_DECIMAL, POINT_DECIMAL, CellNumber, read_number
from audit.ingest.raw_table import RawTable, is_blank_row
from audit.model import Dataset, Metadata, Point

_ROLE_WORD = {"T": "temperature", "P": "pressure", "u_T": "u(T)", "u_P": "u(P)"}
_MAX_LISTED = 10


def _rows_text(rows: list[int]) -> str:
    shown = ", ".join(str(r) for r in rows[:_MAX_LISTED])
    return shown + (f" and {len(rows) - _MAX_LISTED} more" if len(rows) > _MAX_LISTED else "")


def _read_bytes(path, file: str) -> bytes:
    try:
        with open(path, "rb") as fh:
            return fh.read()
    except FileNotFoundError:
        raise InputError("file not found", file=file) from None
    except IsADirectoryError:
        raise InputError("this is a directory, not a data file", file=file) from None
    except OSError as exc:
        raise InputError(f"cannot read the file ({exc.strerror or exc})", file=file) from None


def read_raw_table(data: bytes, file: str, sheet: str | None = None, row_limit=None) -> RawTable:
    """Reduce a file's bytes to a :class:`RawTable`, choosing the reader by content.

    XLSX is recognised by its ZIP signature or extension, JSON by extension or
    a leading ``[``/``{`` that parses as JSON; everything else is read as a
    delimited text table.

    Parameters
    ----------
    data : bytes
        The file's bytes.
    file : str
        File name for messages.
    sheet : str, optional
        XLSX worksheet.
    row_limit : audit.profiles.RowLimit, optional
        Most data rows accepted; each reader checks it as early as its format
        allows (a text table while its rows are split).

    Raises
    ------
    InputError
        Empty, binary or unreadable content; more data rows than ``row_limit``.
    """
    if not data.strip():
        raise InputError("the file is empty", file=file)
    suffix = Path(file).suffix.lower()
    if data.startswith(b"\xd0\xcf\x11\xe0"):
        raise InputError("this is an old binary Excel (.xls) or other OLE file", file=file,
                         hint="save it as .xlsx or CSV")
    if data.startswith(b"%PDF"):
        raise InputError("this is a PDF file", file=file,
                         hint="extract the table to CSV or XLSX first")
    if data.startswith(b"PK\x03\x04") or suffix in (".xlsx", ".xlsm"):
        from audit.ingest.xlsx_table import read_xlsx_table

        return read_xlsx_table(data, file, sheet, row_limit)
    from audit.ingest.json_table import read_json_table

    if suffix == ".json":
        return read_json_table(data, file, row_limit)
    if data.lstrip(b"\xef\xbb\xbf \t\r\n")[:1] in (b"[", b"{"):
        try:
            raw = read_json_table(data, file)
        except InputError:
            pass  # not JSON after all: a text table may start with a bracket
        else:
            if row_limit is not None:  # checked here: the reader's own check would be taken for "not JSON"
                row_limit.check(len(raw.rows), file)
            return raw
    from audit.ingest.text_table import read_text_table

    return read_text_table(data, file, row_limit)


def _sibling_metadata(path) -> Path | None:
    candidate = Path(path).with_suffix(".toml")
    return candidate if candidate.is_file() and candidate != Path(path) else None


def read_table(path: str | os.PathLike, overrides: ColumnOverrides | None = None,
               metadata_path: str | os.PathLike | None = None, *, row_limit=None) -> Dataset:
    """Read a vapor-pressure table (CSV, TSV, semicolon CSV, XLSX or JSON).

    Parameters
    ----------
    path : str or path-like
        The data file (never modified).
    overrides : ColumnOverrides, optional
        Column and unit choices from the command line; they win over the
        metadata file's ``[columns]``, which win over the header.
    metadata_path : str or path-like, optional
        Metadata TOML file; by default the ``.toml`` file with the same stem
        beside the data file, if there is one.
    row_limit : audit.profiles.RowLimit, optional
        The rule profile's ``limits.max_rows`` (``profile.row_limit``): a
        table with more data rows is refused while it is split into rows,
        before any point is built.  Default: no limit.

    Returns
    -------
    Dataset
        One :class:`~audit.model.Point` per data row, in order; T in K, P in
        Pa; cells, header, column roles, SHA-256 and notes filled in.

    Raises
    ------
    InputError
        For anything the user can fix: unreadable file, no header, no
        temperature or pressure column, missing or unknown unit, ambiguous
        header, invalid metadata file, more data rows than ``row_limit``.
    """
    file = str(path)
    cli = overrides or ColumnOverrides()
    if not isinstance(cli, ColumnOverrides):
        raise ValueError("overrides must be a ColumnOverrides")
    data = _read_bytes(path, file)
    notes: list[str] = []

    meta_file = Path(metadata_path) if metadata_path is not None else _sibling_metadata(path)
    if meta_file is not None:
        metadata, meta_columns = read_metadata_and_columns(meta_file)
        notes.append(f"metadata read from {str(meta_file)!r}")
    else:
        metadata, meta_columns = Metadata(), ColumnOverrides()
    merged = cli.over(meta_columns)
    origins = {}
    for f in fields(ColumnOverrides):
        if getattr(cli, f.name) is not None:
            origins[f.name] = "command line"
        elif getattr(meta_columns, f.name) is not None:
            origins[f.name] = "metadata file"
    if cli.substance is not None:
        metadata = replace(metadata, substance=cli.substance)

    raw = read_raw_table(data, file, merged.sheet, row_limit)
    if not raw.rows:
        raise InputError("the table has a header but no data rows", file=file)
    try:
        assignment = assign_columns(raw.header, merged, origins, file)
    except InputError as exc:
        below = _header_further_down(raw.rows)
        if below is None or not exc.problem.startswith("no "):
            raise
        raise InputError(exc.problem, file=file, hint=(
            f"the header seems to be further down (data row {below} reads like one); remove the "
            "lines above it or start them with '#'")) from None
    notes = list(raw.notes) + notes + list(assignment.notes)
    points = _build_points(raw, assignment, notes)
    return Dataset(
        points=tuple(points),
        header=tuple(raw.header),
        cells=tuple(raw.rows),
        columns=assignment.roles(),
        metadata=metadata,
        file_name=file,
        sha256=hashlib.sha256(data).hexdigest(),
        file_format=raw.file_format,
        notes=tuple(notes),
    )


def _header_further_down(rows, look=10) -> int | None:
    """1-based data row that reads like a header (a title line above the real one?)."""
    from audit.ingest.columns import read_header

    for n, row in enumerate(rows[:look], start=1):
        roles = {read_header(c).role for c in row}
        if {"T", "P"} <= roles:
            return n
    return None


def _decide_decimal_comma(raw: RawTable, numeric_indexes: list[int], notes: list[str]) -> bool:
    if not raw.may_use_decimal_comma:
        return False
    n_comma = n_point = 0
    for row in raw.rows:
        for i in numeric_indexes:
            if i < len(row):
                n_comma += bool(COMMA_DECIMAL.match(row[i]))
                n_point += bool(POINT_DECIMAL.match(row[i]))
    if n_comma > n_point:
        notes.append(f"decimal commas: {n_comma} cell(s) like '12,5' read as 12.5"
                     + (f"; {n_point} cell(s) with a decimal point are unreadable" if n_point else ""))
        return True
    return False


def _build_points(raw: RawTable, assignment: ColumnAssignment, notes: list[str]) -> list[Point]:
    T, P = assignment.get("T"), assignment.get("P")
    uT, uP = assignment.get("u_T"), assignment.get("u_P")
    phase_col, source_col = assignment.get("phase"), assignment.get("source")
    numeric = [c.index for c in (T, P, uT, uP) if c is not None]
    decimal_comma = _decide_decimal_comma(raw, numeric, notes)
    T_unit = T.unit
    P_unit = _units.PressureUnit(P.unit, P.log)
    width = len(raw.header)

    unicode_minus, grouped, shifted = [], [], []
    u_problems: dict[str, list[tuple[int, str]]] = {"u_T": [], "u_P": []}
    unknown_phases: dict[str, list[int]] = {}
    points: list[Point] = []

    def cell(cells, choice):
        if choice is None or choice.index >= len(cells):
            return None
        return cells[choice.index]

    def number(text, role, row, percent=False) -> CellNumber:
        got = read_number(text, decimal_comma=decimal_comma, percent=percent)
        if got.unicode_minus:
            unicode_minus.append(row)
        if got.grouped:
            grouped.append(row)
        return got

    for row, cells in enumerate(raw.rows, start=1):
        T_raw, P_raw = cell(cells, T), cell(cells, P)
        T_text = (T_raw or "").strip()
        P_text = (P_raw or "").strip()
        base = dict(row=row, T_text=T_text, P_text=P_text, T_text_unit=T_unit,
                    P_text_unit=P_unit.text)
        if is_blank_row(cells):
            points.append(Point(T_K=None, P_Pa=None, status="unreadable", reason="empty row", **base))
            continue
        reasons: list[str] = []
        if len(cells) > width and any(c.strip() for c in cells[width:]):
            shifted.append(row)
            reasons.append(f"row has {len(cells)} cells but the header has {width} "
                           "(a decimal comma or an unquoted separator inside a cell?)")

        T_K = _read_quantity(T_raw, "T", row, number, reasons,
                             lambda v: _units.temperature_to_kelvin(v, T_unit))
        P_Pa = _read_quantity(P_raw, "P", row, number, reasons,
                              lambda v: _units.pressure_to_pascal(v, P_unit))
        if shifted and shifted[-1] == row:
            T_K = P_Pa = None  # cells do not line up with the header: values not trustworthy

        u_T_K = None
        if uT is not None:
            scale, _ = _units.kelvin_per_unit(uT.unit)
            v = _read_uncertainty(cell(cells, uT), "u_T", row, number, u_problems)
            u_T_K = None if v is None else v * scale
        u_P_Pa = None
        if uP is not None:
            relative = uP.unit in ("%", "1")
            v = _read_uncertainty(cell(cells, uP), "u_P", row, number, u_problems,
                                  percent=uP.unit == "%")
            if v is not None:
                if relative:
                    u_P_Pa = None if P_Pa is None else abs(P_Pa) * v / (100.0 if uP.unit == "%" else 1.0)
                else:
                    u_P_Pa = v * _units.pascal_per_unit(uP.unit)

        phase = "unknown"
        form = None
        label = (cell(cells, phase_col) or "").strip()
        if label:
            phase = phase_from_label(label)
            form = crystal_form_from_label(label) if phase == "solid" else None
            if phase == "unknown":
                unknown_phases.setdefault(label, []).append(row)
        source = (cell(cells, source_col) or "").strip() or None

        points.append(Point(
            T_K=T_K, P_Pa=P_Pa, phase=phase, source=source, u_T_K=u_T_K, u_P_Pa=u_P_Pa, crystal_form=form,
            status="unreadable" if reasons else "ok",
            reason="; ".join(reasons) if reasons else None, **base))

    if unicode_minus:
        notes.append(f"the Unicode minus sign '−' was read as '-' (rows {_rows_text(unicode_minus)})")
    if grouped:
        notes.append(f"digits grouped with spaces (e.g. '101 325') were read as one number "
                     f"(rows {_rows_text(grouped)})")
    for role, problems in u_problems.items():
        if problems:
            listed = ", ".join(f"row {r}: {msg}" for r, msg in problems[:_MAX_LISTED])
            more = f" and {len(problems) - _MAX_LISTED} more" if len(problems) > _MAX_LISTED else ""
            notes.append(f"{_ROLE_WORD[role]} not used where it could not be read ({listed}{more})")
    for label, rows in unknown_phases.items():
        notes.append(f"phase label {label!r} not recognised; read as 'unknown' (rows {_rows_text(rows)})")
    return points


def _read_quantity(raw_text, role, row, number, reasons, to_si):
    """Read a T or P cell; append the reason and return None when unreadable."""
    word = _ROLE_WORD[role]
    if raw_text is None:
        reasons.append(f"{word} cell is missing (the row is shorter than the header)")
        return None
    got = number(raw_text, role, row)
    if got.value is None:
        shown = raw_text.strip()
        if got.is_empty:
            reasons.append(f"{word} cell is empty")
        elif got.is_missing_marker:
            reasons.append(f"{word} cell {shown!r} marks a missing value")
        else:
            reasons.append(f"{word} cell {shown!r} is not a number ({got.problem})")
        return None
    try:
        value = to_si(got.value)
    except OverflowError:
        value = math.inf
    if not math.isfinite(value):
        reasons.append(f"{word} cell {raw_text.strip()!r} is out of range after unit conversion")
        return None
    return value


def _read_uncertainty(raw_text, role, row, number, problems, percent=False):
    """Read an uncertainty cell; empty means 'not given', anything odd is noted."""
    if raw_text is None:
        return None
    got = number(raw_text, role, row, percent)
    if got.is_empty or got.is_missing_marker:
        return None
    if got.value is None:
        problems[role].append((row, f"{raw_text.strip()!r} ({got.problem})"))
        return None
    if got.value < 0:
        problems[role].append((row, f"{raw_text.strip()!r} is negative"))
        return None
    return got.value
