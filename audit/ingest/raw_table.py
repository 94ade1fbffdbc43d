"""The table as printed: header and data rows of cell texts, before any meaning.

Every file format is first reduced to a :class:`RawTable`; recognising
columns, units and numbers happens afterwards, identically for all formats.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class RawTable:
    """Header and data rows as printed.

    Attributes
    ----------
    header : tuple of str
        Column headers as printed.
    rows : tuple of tuple of str
        Data rows, in file order, each cell's text as printed.  Empty rows
        inside the table are kept (as rows of empty cells or no cells);
        empty rows after the last data row are not data rows and are dropped.
    file_format : str
        ``csv``, ``tsv``, ``csv-semicolon``, ``xlsx`` or ``json``.
    notes : tuple of str
        What was decided while reading (encoding, skipped lines, ...).
    may_use_decimal_comma : bool
        The delimiter leaves room for decimal commas (not a comma-separated
        file, not a format that stores numbers as numbers).
    """

    header: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    file_format: str
    notes: tuple[str, ...] = ()
    may_use_decimal_comma: bool = False


def is_blank_row(cells) -> bool:
    """True when a row has no cell with visible content."""
    return all(not c.strip() for c in cells)


def drop_trailing_blank_rows(rows: list) -> tuple[list, int]:
    """Rows without the blank rows at the end, and how many were dropped."""
    n = len(rows)
    while n and is_blank_row(rows[n - 1]):
        n -= 1
    return rows[:n], len(rows) - n
