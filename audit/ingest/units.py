"""Units of printed temperatures and pressures, and their conversion to SI.

Every conversion factor and offset comes from :mod:`pint` (the registry is
created once, on first use, because importing pint takes most of a second).
What lives here is only the *vocabulary*: which spellings found in table
headers mean which unit.  The alias map deliberately keeps ``Torr``
(101325/760 Pa exactly) and ``mmHg`` (the conventional millimetre of mercury,
133.322387415 Pa) apart, as NIST SP 811 (2008), Appendix B.8, does.

References
----------
.. [1] A. Thompson and B. N. Taylor, "Guide for the Use of the International
   System of Units (SI)", NIST Special Publication 811, 2008 edition,
   Appendix B. https://doi.org/10.6028/NIST.SP.811e2008
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

#: Canonical temperature unit -> pint unit name.
TEMPERATURE_UNITS: dict[str, str] = {
    "K": "kelvin",
    "degC": "degree_Celsius",
    "degF": "degree_Fahrenheit",
    "degR": "degree_Rankine",
}

#: Canonical pressure unit -> pint unit expression.
PRESSURE_UNITS: dict[str, str] = {
    "Pa": "pascal",
    "mPa": "millipascal",
    "hPa": "hectopascal",
    "kPa": "kilopascal",
    "MPa": "megapascal",
    "bar": "bar",
    "mbar": "millibar",
    "atm": "standard_atmosphere",
    "Torr": "torr",
    "mTorr": "millitorr",
    "mmHg": "millimeter_Hg",
    "psi": "pound_force_per_square_inch",
    "inHg": "inch_Hg",
    "kgf/cm2": "kilogram_force / centimeter ** 2",
}

ACCEPTED_TEMPERATURE_UNITS = "K, °C (degC, C), °F (degF, F), °R (degR, R)"
ACCEPTED_PRESSURE_UNITS = (
    "Pa, mPa, hPa, kPa, MPa, bar, mbar, atm, Torr, mTorr, mmHg (mm Hg), psi (psia), "
    "inHg, kgf/cm2; log columns as log10(P/kPa), log(P/kPa) (= log10), lg(P/kPa) "
    "or ln(P/kPa)"
)

# Spellings whose letter case decides the unit; looked up before lower-casing.
_CASE_SENSITIVE_PRESSURE = {
    "Pa": "Pa", "mPa": "mPa", "MPa": "MPa", "hPa": "hPa", "kPa": "kPa",
    "KPa": "kPa", "MPA": "MPa",
}

# Spellings after lower-casing and removing spaces, dots, underscores, hyphens.
_TEMPERATURE_ALIASES = {
    "K": ("k", "kelvin", "kelvins", "°k", "degk", "degreeskelvin"),
    "degC": ("c", "°c", "degc", "degreec", "degreesc", "celsius", "degreescelsius",
             "degreecelsius", "oc", "centigrade", "degcelsius"),
    "degF": ("f", "°f", "degf", "degreef", "degreesf", "fahrenheit",
             "degreesfahrenheit", "degreefahrenheit", "of"),
    "degR": ("r", "°r", "degr", "degreer", "degreesr", "rankine", "ra",
             "degreesrankine", "degreerankine"),
}
_PRESSURE_ALIASES = {
    "Pa": ("pa", "pascal", "pascals"),
    "mPa": ("millipascal", "millipascals"),
    "hPa": ("hpa", "hectopascal", "hectopascals"),
    "kPa": ("kpa", "kilopascal", "kilopascals"),
    "MPa": ("megapascal", "megapascals"),
    "bar": ("bar", "bara", "bars"),
    "mbar": ("mbar", "millibar", "millibars", "mbara"),
    "atm": ("atm", "atmosphere", "atmospheres", "standardatmosphere", "atma"),
    "Torr": ("torr",),
    "mTorr": ("mtorr", "millitorr"),
    "mmHg": ("mmhg", "mmofhg", "millimetersofmercury", "millimetresofmercury",
             "millimeterofmercury", "millimetreofmercury", "mmmercury"),
    "psi": ("psi", "psia", "lbf/in2", "lbf/in^2", "lb/in2", "lb/in^2", "lbf/sqin"),
    "inHg": ("inhg", "inofhg", "inchhg", "inchesofmercury", "inchofmercury",
             "inchesofhg"),
    "kgf/cm2": ("kgf/cm2", "kgf/cm^2", "kgf/cm²", "kg/cm2", "kg/cm^2", "kg/cm²"),
}
_TEMPERATURE_LOOKUP = {a: canon for canon, al in _TEMPERATURE_ALIASES.items() for a in al}
_PRESSURE_LOOKUP = {a: canon for canon, al in _PRESSURE_ALIASES.items() for a in al}

# Spellings that look like a unit but must not be guessed.
_PRESSURE_REFUSED = {
    "mpa": "'mpa' is ambiguous: write 'MPa' (megapascal) or 'mPa' (millipascal)",
    "psig": "'psig' is a gauge pressure; convert to absolute pressure (psia) first",
    "barg": "'barg' is a gauge pressure; convert to absolute pressure (bar) first",
    "kpag": "'kPag' is a gauge pressure; convert to absolute pressure first",
    "mm": "'mm' alone does not say mm of mercury; write 'mmHg' (or 'Torr')",
    "in": "'in' alone does not say inches of mercury; write 'inHg'",
}

# No word boundary after the prefix: 'logP' and 'lnP' are common; a header
# like 'logger' is harmless because the rest must then read as a pressure.
_LOG_PREFIX = re.compile(r"^\s*(log\s*_?\s*10|log₁₀|log|lg|ln)\s*(.*)$", re.IGNORECASE)


@dataclass(frozen=True)
class PressureUnit:
    """How printed pressure values relate to pascal.

    Attributes
    ----------
    unit : str
        Canonical unit of the pressure (or of the pressure inside the log),
        e.g. ``'kPa'``.
    log : {None, 'log10', 'ln'}
        ``None`` for plain values; otherwise the values are log10(P/unit) or
        ln(P/unit).
    """

    unit: str
    log: str | None = None

    @property
    def text(self) -> str:
        """The printed-value unit, e.g. ``'kPa'`` or ``'log10(P/kPa)'``."""
        return self.unit if self.log is None else f"{self.log}(P/{self.unit})"


def _normalise(text: str) -> str:
    t = text.strip()
    t = (t.replace("º", "°").replace("˚", "°").replace("℃", "°C")
         .replace("℉", "°F").replace("\u00a0", " "))
    return t


def _squeeze(text: str) -> str:
    return re.sub(r"[\s._\-]+", "", text).lower()


def parse_temperature_unit(text: str) -> str:
    """Canonical temperature unit for a header spelling.

    Parameters
    ----------
    text : str
        The unit as written, e.g. ``'°C'``, ``'deg C'``, ``'K'``, ``'F'``.

    Returns
    -------
    str
        One of ``'K'``, ``'degC'``, ``'degF'``, ``'degR'``.

    Raises
    ------
    ValueError
        If the spelling is not a temperature unit.
    """
    key = _squeeze(_normalise(text))
    if key in _TEMPERATURE_LOOKUP:
        return _TEMPERATURE_LOOKUP[key]
    raise ValueError(f"unknown temperature unit {text!r}; accepted: {ACCEPTED_TEMPERATURE_UNITS}")


def parse_plain_pressure_unit(text: str) -> str:
    """Canonical (linear) pressure unit for a header spelling.

    Letter case matters only where it decides the unit (``MPa`` vs ``mPa``);
    the lower-case ``mpa`` is refused as ambiguous, gauge units (``psig``,
    ``barg``) are refused.

    Raises
    ------
    ValueError
        If the spelling is not an accepted absolute-pressure unit.
    """
    t = _normalise(text)
    compact = re.sub(r"\s+", "", t)
    if compact in _CASE_SENSITIVE_PRESSURE:
        return _CASE_SENSITIVE_PRESSURE[compact]
    key = _squeeze(t)
    if key in _PRESSURE_LOOKUP:
        return _PRESSURE_LOOKUP[key]
    if key in _PRESSURE_REFUSED:
        raise ValueError(_PRESSURE_REFUSED[key])
    raise ValueError(f"unknown pressure unit {text!r}; accepted: {ACCEPTED_PRESSURE_UNITS}")


def split_log_prefix(text: str) -> tuple[str | None, str]:
    """Split ``'log10(P/kPa)'`` style text into (``'log10'`` or ``'ln'`` or None, rest).

    ``log`` and ``lg`` mean the decadic logarithm (ISO 80000-2 writes lg for
    log10; ``log`` without a base is read as log10, which is how vapor-pressure
    tables use it).  The rest has one enclosing pair of brackets removed.
    """
    m = _LOG_PREFIX.match(text)
    if not m:
        return None, text
    base = "ln" if m.group(1).lower() == "ln" else "log10"
    rest = m.group(2).strip().lstrip("_").strip()
    return base, _strip_enclosing(rest)


def _strip_enclosing(text: str) -> str:
    pairs = {"(": ")", "[": "]", "{": "}"}
    t = text.strip()
    while len(t) >= 2 and t[0] in pairs and t[-1] == pairs[t[0]]:
        depth = 0
        for i, ch in enumerate(t):
            if ch == t[0]:
                depth += 1
            elif ch == pairs[t[0]]:
                depth -= 1
                if depth == 0 and i != len(t) - 1:
                    return t  # the first bracket closes early: not enclosing
        t = t[1:-1].strip()
    return t


def parse_pressure_unit(text: str) -> PressureUnit:
    """Pressure unit for a unit text given on the command line or in metadata.

    Accepts plain units (``'kPa'``) and log forms (``'log10(P/kPa)'``,
    ``'ln(p/Pa)'``, ``'log10(kPa)'``, ``'lg(P, mmHg)'``).

    Raises
    ------
    ValueError
        If the text is not an accepted pressure unit.
    """
    base, rest = split_log_prefix(text)
    if base is None:
        return PressureUnit(parse_plain_pressure_unit(text))
    m = re.match(r"^(?:p|P)\s*(?:/|,|\s+in\s+|\s)\s*(.+)$", rest)
    unit_text = m.group(1) if m else rest
    return PressureUnit(parse_plain_pressure_unit(_strip_enclosing(unit_text)), base)


@lru_cache(maxsize=1)
def registry():
    """The package's single pint registry (created on first use)."""
    import pint

    return pint.UnitRegistry()


@lru_cache(maxsize=None)
def _linear_map(pint_unit: str, target: str) -> tuple[float, float]:
    """(scale, offset) with ``target = scale * value + offset``, from pint."""
    ureg = registry()
    zero = ureg.Quantity(0.0, pint_unit).to(target).magnitude
    one = ureg.Quantity(1.0, pint_unit).to(target).magnitude
    return one - zero, zero


def kelvin_per_unit(unit: str) -> tuple[float, float]:
    """Scale [K per unit] and offset [K] of a canonical temperature unit.

    ``T_K = scale * t + offset``; an uncertainty (a temperature difference)
    converts with ``scale`` alone.
    """
    return _linear_map(TEMPERATURE_UNITS[unit], "kelvin")


def pascal_per_unit(unit: str) -> float:
    """Pascal per one canonical pressure unit (from pint)."""
    scale, offset = _linear_map(PRESSURE_UNITS[unit], "pascal")
    assert offset == 0.0  # pressure units have no offset
    return scale


def temperature_to_kelvin(value: float, unit: str) -> float:
    """Convert a printed temperature to kelvin.

    Parameters
    ----------
    value : float
        Temperature in ``unit``.
    unit : str
        Canonical unit (``'K'``, ``'degC'``, ``'degF'``, ``'degR'``).

    Returns
    -------
    float
        Temperature [K].
    """
    scale, offset = kelvin_per_unit(unit)
    return scale * value + offset


def pressure_to_pascal(value: float, unit: PressureUnit) -> float:
    """Convert a printed pressure (plain or log) to pascal.

    Parameters
    ----------
    value : float
        The printed value: a pressure in ``unit.unit``, or its log10/ln.
    unit : PressureUnit

    Returns
    -------
    float
        Pressure [Pa].

    Raises
    ------
    OverflowError
        If a log value is too large to exponentiate.
    """
    factor = pascal_per_unit(unit.unit)
    if unit.log is None:
        return value * factor
    if unit.log == "ln":
        return math.exp(value) * factor
    return math.pow(10.0, value) * factor
