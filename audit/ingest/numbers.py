"""Reading one printed cell as a number — or saying exactly why not.

The rule is: accept only text that means one number without any guessing.
Footnote marks, limits (``<0.1``), approximate values (``~12``), ranges,
values with attached uncertainties and missing-value markers are *not*
numbers; the caller keeps such a row as unreadable, with the reason produced
here, instead of silently stripping the decoration.

Two unambiguous spellings are accepted and reported: the Unicode minus sign
(U+2212) and digit groups of three separated by a (thin) space, which is the
SI way of grouping digits (SI Brochure, 9th ed., 5.4.4).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

_NUMBER = re.compile(r"^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$")
_NUMBER_DECIMAL_COMMA = re.compile(r"^[+-]?(?:\d+(?:,\d*)?|,\d+)(?:[eE][+-]?\d+)?$")
_SI_GROUPED = re.compile(r"^[+-]?\d{1,3}(?: \d{3})+(?:[.,]\d+(?: ?\d{1,3})*)?(?:[eE][+-]?\d+)?$")
#: a cell like ``12,5`` (one comma between digits)
COMMA_DECIMAL = re.compile(r"^\s*[+\-−]?\d+,\d+(?:[eE][+-]?\d+)?\s*$")
#: a cell like ``12.5``
POINT_DECIMAL = re.compile(r"^\s*[+\-−]?\d+\.\d+(?:[eE][+-]?\d+)?\s*$")

_SPACES = str.maketrans({"\u2009": " ", "\u202f": " ", "\u00a0": " "})
_MISSING = {"", "-", "--", "---", "—", "–", "?", "n/a", "na", "n.a.", "nd", "n.d.",
            "null", "none", "missing", "x", "..."}
_NOT_FINITE = {"nan", "+nan", "-nan", "inf", "+inf", "-inf", "infinity", "+infinity",
               "-infinity", "∞", "-∞", "+∞"}


@dataclass(frozen=True)
class CellNumber:
    """The outcome of reading one cell.

    Attributes
    ----------
    value : float or None
        The number, or ``None`` when the cell is not one.
    problem : str or None
        Why the cell is not a number (``'empty'`` for an empty cell), e.g.
        ``'footnote mark?'``.
    unicode_minus : bool
        The text used the Unicode minus sign.
    grouped : bool
        The text used space-separated digit groups.
    """

    value: float | None
    problem: str | None = None
    unicode_minus: bool = False
    grouped: bool = False

    @property
    def is_empty(self) -> bool:
        return self.problem == "empty"

    @property
    def is_missing_marker(self) -> bool:
        return self.problem == "missing value"


def read_number(text: str, *, decimal_comma: bool = False,
                percent: bool = False) -> CellNumber:
    """Read a printed cell as one finite number.

    Parameters
    ----------
    text : str
        The cell as printed.
    decimal_comma : bool
        The file writes decimals with a comma (``12,5``); a decimal point is
        then refused rather than guessed.
    percent : bool
        The column holds percentages: a trailing ``%`` is allowed.

    Returns
    -------
    CellNumber
        ``value`` is a finite float, or ``None`` with ``problem`` saying why.
    """
    raw = text.translate(_SPACES).strip()
    low = raw.lower()
    if low == "":
        return CellNumber(None, "empty")
    if low in _MISSING:
        return CellNumber(None, "missing value")
    if low in _NOT_FINITE:
        return CellNumber(None, "not a finite number")
    unicode_minus = "−" in raw
    t = raw.replace("−", "-")
    if percent and t.endswith("%"):
        t = t[:-1].rstrip()
    grouped = False
    if _SI_GROUPED.match(t):
        grouped = True
        t = t.replace(" ", "")
    pattern = _NUMBER_DECIMAL_COMMA if decimal_comma else _NUMBER
    if pattern.match(t):
        value = float(t.replace(",", ".") if decimal_comma else t)
        if not math.isfinite(value):
            return CellNumber(None, "not a finite number (out of range)")
        return CellNumber(value, None, unicode_minus, grouped)
    return CellNumber(None, _diagnose(t, decimal_comma))


def _diagnose(t: str, decimal_comma: bool) -> str:
    """A short guess at what the text is, for the unreadable-row reason."""
    body = t.strip()
    if body.startswith("="):
        return "a formula without a stored result?"
    if decimal_comma and _NUMBER.match(body):
        return "decimal point in a file that writes decimals with a comma"
    if not decimal_comma and _NUMBER_DECIMAL_COMMA.match(body):
        return "decimal comma? this file writes decimals with a point"
    if body.count(",") > 1 or ("," in body and "." in body):
        return "several separators: digit grouping or more than one value?"
    if body[:1] in "<>≤≥" or body[:2] in ("<=", ">="):
        return "a limit, not a value"
    if body[:1] in "~≈" or body.lower().startswith(("ca.", "ca ", "approx", "circa")):
        return "an approximate value"
    if "±" in body or "+/-" in body or "+-" in body:
        return "a value with its uncertainty; give the uncertainty its own column"
    if body.startswith("(") and body.endswith(")") or body.startswith("[") and body.endswith("]"):
        return "bracketed: an estimated or excluded value?"
    if re.match(r"^[+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)\s*[-–—]\s*\d", body):
        return "a range?"
    if re.match(r"^[+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d+)?\s*"
                r"(?:[*†‡§¶#]+|\^?[a-zA-Z]|\(\w\)|\[\w+\])$", body):
        return "footnote mark?"
    if re.match(r"^[+-]?(?:\d+(?:\.\d*)?|\.\d+)[dD][+-]?\d+$", body):
        return "Fortran-style exponent; write E instead of D"
    if re.match(r"^[+-]?[\d.,]+\s*[×x·*]\s*10\s*(?:\^|\*\*)?", body):
        return "power-of-ten notation; write 1.2e-3"
    if body.endswith("%"):
        return "a percentage in a column that is not in %"
    return "not a number"
