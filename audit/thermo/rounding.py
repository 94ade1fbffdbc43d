"""Uncertainty floor from the printed precision of a value.

A value printed as ``0.0002`` may have been anything from 0.00015 to 0.00025
before it was rounded: the rounding error is uniformly distributed over ±half
a unit of the last printed digit, so its standard uncertainty is

    u = (δ/2)/√3,   δ = unit of the last printed digit,

(GUM JCGM 100:2008, §4.3.7, rectangular distribution of half-width a = δ/2:
u = a/√3).  An integer such as ``760`` has δ = 1 (trailing zeros of an integer
are taken as significant: the table does not say otherwise).  For a pressure
printed as log10(P) or ln(P) the rounding happens in the log value, so the
floor is a constant in ln P rather than in P.

Heavily rounded low pressures of old tables (``0.0002 mmHg``) thereby carry
a large relative uncertainty and are not called outliers for being 10 % off.

References
----------
.. [1] JCGM 100:2008, Evaluation of measurement data — Guide to the expression
   of uncertainty in measurement (GUM), §4.3.7 and §F.2.2.1 (resolution of a
   digital indication).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

__all__ = [
    "PrintedNumber",
    "parse_printed_number",
    "rounding_standard_uncertainty",
    "pressure_rounding_u_lnP",
    "temperature_rounding_u_K",
    "log_pressure_base",
]

_SQRT3 = math.sqrt(3.0)
_NUMBER = re.compile(r"^([+-]?)(\d*)(?:\.(\d*))?(?:[eE]([+-]?\d+))?$")
_SPACES = re.compile(r"[\s\u00a0\u2009\u202f'_]")


@dataclass(frozen=True)
class PrintedNumber:
    """A number as printed.

    Attributes
    ----------
    text : str
        The cell text as given.
    value : float
        Its value [unit of the column].
    last_digit_unit : float
        Value of one unit in the last printed digit, δ [unit of the
        column]: 0.0001 for ``0.0002``, 1 for ``760``, 1e-4 for ``1.2e-3``.
    normalized : str
        The text with a decimal point, no grouping characters: what the value
        was read from; digit positions refer to this string.
    """

    text: str
    value: float
    last_digit_unit: float
    normalized: str

    @property
    def standard_uncertainty(self) -> float:
        """Rounding standard uncertainty δ/(2√3) (GUM §4.3.7) [column unit]."""
        return 0.5 * self.last_digit_unit / _SQRT3


def _normalize(text: str) -> str:
    s = _SPACES.sub("", text.strip())
    s = s.replace("\u2212", "-")  # typographic minus
    if "," in s and "." in s:
        # both present: the later one is the decimal separator, the other groups digits
        if s.rfind(",") > s.rfind("."):
            s = s.replace(".", "").replace(",", ".")
        else:
            s = s.replace(",", "")
    elif "," in s:
        if s.count(",") > 1:
            s = s.replace(",", "")  # 1,013,250: grouping
        else:
            s = s.replace(",", ".")  # decimal comma
    return s


@lru_cache(maxsize=1 << 16)  # a cell's text is read by several checks; the result is immutable
def parse_printed_number(text: str) -> PrintedNumber:
    """Read a printed number and the unit of its last digit.

    Handles decimal commas (``1,25``), grouping spaces or separators
    (``101 325``, ``1.013,25``), exponents (``1.2e-3``, ``1,2E+03``) and a
    typographic minus.

    Parameters
    ----------
    text : str
        The cell as printed (text in the column's unit, no unit conversion).

    Returns
    -------
    PrintedNumber
        The value and its printed precision (no unit; the units of its fields
        are in the docstring of :class:`PrintedNumber`).

    Raises
    ------
    ValueError
        When `text` is not a plain decimal number.
    """
    s = _normalize(str(text))
    m = _NUMBER.match(s)
    if not m or not (m.group(2) or m.group(3)):
        raise ValueError(f"not a printed decimal number: {text!r}")
    decimals = len(m.group(3) or "")
    exponent = int(m.group(4) or 0)
    return PrintedNumber(text=str(text), value=float(s), last_digit_unit=10.0 ** (exponent - decimals),
                         normalized=s)


def rounding_standard_uncertainty(text: str) -> float:
    """Standard uncertainty [column unit] from rounding to the printed digits.

    u = δ/(2√3), δ the unit of the last digit (GUM JCGM 100:2008 §4.3.7).

    Parameters
    ----------
    text : str
        The number as printed [column unit].

    Returns
    -------
    float
        u [column unit].

    Examples
    --------
    >>> round(rounding_standard_uncertainty("0.0002"), 10)
    2.88675e-05
    """
    return parse_printed_number(text).standard_uncertainty


_LOG_UNIT = re.compile(r"^\s*(log10|log|lg|ln)\s*\(\s*[Pp]\s*/\s*([^)]+?)\s*\)\s*$")


def log_pressure_base(P_text_unit: str) -> float | None:
    """Base of a log-pressure column unit such as ``'log10(P/Pa)'`` or ``'ln(P/kPa)'``.

    Returns 10.0 or e, or None for a linear unit.

    Parameters
    ----------
    P_text_unit : str
        Name of the pressure column's unit.

    Returns
    -------
    float or None
        The logarithm's base [-], or None for a linear unit.
    """
    m = _LOG_UNIT.match(P_text_unit or "")
    if not m:
        return None
    return math.e if m.group(1) == "ln" else 10.0


def pressure_rounding_u_lnP(P_text: str, P_text_unit: str = "Pa") -> float:
    """Rounding floor of a pressure in ln P (a relative standard uncertainty).

    Parameters
    ----------
    P_text : str
        The printed pressure cell (text, in `P_text_unit`; no unit of its own).
    P_text_unit : str
        Name of its unit; a linear unit (``'Pa'``, ``'mmHg'``, ...) or a log unit
        (``'log10(P/Pa)'``, ``'ln(P/kPa)'``).

    Returns
    -------
    float
        u(ln P) [-]: u(P)/P for a linear column, ln(10)·u(log10 P) for a
        log10 column.  ``nan`` when the text cannot be read or the value is 0.
    """
    try:
        pn = parse_printed_number(P_text)
    except ValueError:
        return math.nan
    base = log_pressure_base(P_text_unit)
    if base is not None:
        return math.log(base) * pn.standard_uncertainty
    if pn.value == 0:
        return math.nan
    return pn.standard_uncertainty / abs(pn.value)


def temperature_rounding_u_K(T_text: str, T_text_unit: str = "K") -> float:
    """Rounding floor of a temperature [K].

    A printed °F digit is 5/9 K; kelvin and °C digits are 1 K.  ``nan`` when
    the text cannot be read.

    Parameters
    ----------
    T_text : str
        The printed temperature [T_text_unit].
    T_text_unit : str
        Name of its unit ('K', 'degC', 'degF', ...).

    Returns
    -------
    float
        Standard uncertainty from rounding [K].
    """
    try:
        pn = parse_printed_number(T_text)
    except ValueError:
        return math.nan
    unit = (T_text_unit or "K").strip().lower().replace("°", "deg").replace("º", "deg")
    scale = 5.0 / 9.0 if unit in ("degf", "f", "fahrenheit", "degree_fahrenheit") else 1.0
    if unit in ("degr", "r", "rankine"):
        scale = 5.0 / 9.0
    return scale * pn.standard_uncertainty
