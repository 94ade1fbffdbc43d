"""The package's one unit vocabulary, conversion table and pint registry.

Every temperature or pressure unit the audit meets -- in a table header, on
the command line, in the metadata file (``[columns]``, ``[constants]``,
``[reference_equation]``) or in a cause hypothesis -- is read by the parsers
here, so one spelling means the same unit everywhere.

Conversion factors come from :mod:`pint`.  Building a pint registry takes
most of a second, which every ``vpaudit check`` would pay, so the few
factors the audit needs (each canonical unit's scale and offset to K or Pa)
are kept in :data:`SI_FACTORS`, a table *generated from pint* by
``python -m audit.units`` and compared with pint, entry by entry, by the test
suite (``tests/ingest/test_one_unit_registry.py``).  pint itself is built at
most once per process, on first use, by :func:`registry` -- only for unit
texts outside that vocabulary (free-form constant units other than the
common ones of :data:`CONSTANT_UNIT_TEXTS`, such as ``kJ/kg``).

The alias map keeps ``Torr`` (101325/760 Pa exactly) and ``mmHg`` (the
conventional millimetre of mercury, 133.322387415 Pa) apart, as NIST SP 811
(2008), Appendix B.8, does.

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

__all__ = [
    "TEMPERATURE_UNITS", "PRESSURE_UNITS", "SI_FACTORS", "ACCEPTED_TEMPERATURE_UNITS",
    "ACCEPTED_PRESSURE_UNITS", "PressureUnit", "parse_temperature_unit",
    "parse_plain_pressure_unit", "parse_pressure_unit", "split_log_prefix", "registry",
    "RefusedUnit", "CONSTANT_FACTORS", "CONSTANT_UNIT_TEXTS", "constant_factor",
    "derive_constant_factors", "derive_si_factors", "kelvin_per_unit", "pascal_per_unit", "temperature_to_kelvin",
    "pressure_to_pascal", "kelvin_affine", "pascal_per", "known_si_affine",
]

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

# GENERATED from pint 0.25.3 by `python -m audit.units` -- do not edit by hand.
# SI_FACTORS: canonical unit -> (scale, offset) with SI = scale * value + offset,
# SI being K for temperatures and Pa for pressures.  CONSTANT_FACTORS: (unit
# text, target) -> factor for the multiplicative units of CONSTANT_UNIT_TEXTS.
# A test compares every entry with what pint computes now (derive_si_factors,
# derive_constant_factors) and with NIST SP 811.
SI_FACTORS: dict[str, tuple[float, float]] = {
    "K": (1.0, 0.0),
    "degC": (1.0, 273.15),
    "degF": (0.5555555555555429, 255.37222222222223),
    "degR": (0.5555555555555556, 0.0),
    "Pa": (1.0, 0.0),
    "mPa": (0.001, 0.0),
    "hPa": (100.0, 0.0),
    "kPa": (1000.0, 0.0),
    "MPa": (1000000.0, 0.0),
    "bar": (100000.0, 0.0),
    "mbar": (100.0, 0.0),
    "atm": (101325.0, 0.0),
    "Torr": (133.32236842105263, 0.0),
    "mTorr": (0.13332236842105263, 0.0),
    "mmHg": (133.322387415, 0.0),
    "psi": (6894.7572931683635, 0.0),
    "inHg": (3386.3886403409997, 0.0),
    "kgf/cm2": (98066.5, 0.0),
}
CONSTANT_FACTORS: dict[tuple[str, str], float] = {
    ("g/mol", "kg/mol"): 0.001,
    ("kg/mol", "kg/mol"): 1.0,
    ("J/mol", "J/mol"): 1.0,
    ("kJ/mol", "J/mol"): 1000.0,
    ("cal/mol", "J/mol"): 4.184,
    ("kcal/mol", "J/mol"): 4184.0,
    ("cm^3/mol", "m^3/mol"): 1.0000000000000002e-06,
    ("dm^3/mol", "m^3/mol"): 0.0010000000000000002,
    ("L/mol", "m^3/mol"): 0.0010000000000000002,
    ("m^3/mol", "m^3/mol"): 1.0,
    ("debye", "debye"): 1.0,
}
# END GENERATED

#: Metadata-constant unit texts, exactly as pint reads them, with the unit
#: they convert to; :data:`CONSTANT_FACTORS` holds pint's factor for each, so
#: the usual metadata file needs no registry.  Any other text goes to pint.
CONSTANT_UNIT_TEXTS: tuple[tuple[str, str], ...] = (
    ("g/mol", "kg/mol"), ("kg/mol", "kg/mol"), ("J/mol", "J/mol"), ("kJ/mol", "J/mol"),
    ("cal/mol", "J/mol"), ("kcal/mol", "J/mol"), ("cm^3/mol", "m^3/mol"), ("dm^3/mol", "m^3/mol"),
    ("L/mol", "m^3/mol"), ("m^3/mol", "m^3/mol"), ("debye", "debye"),
)

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
             "millimeterofmercury", "millimetreofmercury", "mmmercury", "millimeterhg",
             "millimetrehg"),
    "psi": ("psi", "psia", "lbf/in2", "lbf/in^2", "lb/in2", "lb/in^2", "lbf/sqin",
            "poundforcepersquareinch"),
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


class RefusedUnit(ValueError):
    """A spelling that looks like a unit but is refused (ambiguous, gauge pressure)."""


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
    """Canonical temperature unit for a spelling.

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
    """Canonical (linear) pressure unit for a spelling.

    Letter case matters only where it decides the unit (``MPa`` vs ``mPa``);
    the lower-case ``mpa`` is refused as ambiguous, gauge units (``psig``,
    ``barg``) are refused.

    Raises
    ------
    RefusedUnit
        For a spelling refused on purpose (a :class:`ValueError`).
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
        raise RefusedUnit(_PRESSURE_REFUSED[key])
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


# -- pint ------------------------------------------------------------------------
@lru_cache(maxsize=1)
def registry():
    """The package's single pint registry (built on first use, once per process)."""
    import pint  # lazy: importing pint and building a registry take most of a second

    return pint.UnitRegistry()


def _linear_map(pint_unit: str, target: str) -> tuple[float, float]:
    """(scale, offset) with ``target = scale * value + offset``, from pint."""
    ureg = registry()
    zero = ureg.Quantity(0.0, pint_unit).to(target).magnitude
    one = ureg.Quantity(1.0, pint_unit).to(target).magnitude
    return float(one - zero), float(zero)


def derive_si_factors() -> dict[str, tuple[float, float]]:
    """Compute :data:`SI_FACTORS` from pint (builds the registry).

    Returns
    -------
    dict
        Canonical unit -> (scale, offset) with ``SI = scale * value + offset``
        (SI: [K] for temperature units, [Pa] for pressure units).
    """
    table = {c: _linear_map(p, "kelvin") for c, p in TEMPERATURE_UNITS.items()}
    table.update({c: _linear_map(p, "pascal") for c, p in PRESSURE_UNITS.items()})
    return table


def derive_constant_factors() -> dict[tuple[str, str], float]:
    """Compute :data:`CONSTANT_FACTORS` from pint (builds the registry).

    Raises
    ------
    ValueError
        If pint gives one of :data:`CONSTANT_UNIT_TEXTS` an offset (it must be
        a plain factor).
    """
    table = {}
    for text, target in CONSTANT_UNIT_TEXTS:
        scale, offset = _linear_map(text, target)
        if offset != 0.0:
            raise ValueError(f"{text!r} -> {target!r} is not a plain factor")
        table[(text, target)] = scale
    return table


def constant_factor(text: str, target: str) -> float | None:
    """pint's factor from `text` to `target` for a listed constant unit, or None.

    Parameters
    ----------
    text : str
        The unit exactly as written (surrounding spaces ignored), e.g. ``'g/mol'``.
    target : str
        The unit wanted, e.g. ``'kg/mol'``.
    """
    return CONSTANT_FACTORS.get((text.strip(), target))


# -- conversions -------------------------------------------------------------------
def kelvin_per_unit(unit: str) -> tuple[float, float]:
    """Scale [K per unit] and offset [K] of a canonical temperature unit.

    ``T_K = scale * t + offset``; an uncertainty (a temperature difference)
    converts with ``scale`` alone.
    """
    if unit not in TEMPERATURE_UNITS:
        raise ValueError(f"{unit!r} is not a canonical temperature unit")
    return SI_FACTORS[unit]


def pascal_per_unit(unit: str) -> float:
    """Pascal per one canonical pressure unit [Pa] (from pint, see :data:`SI_FACTORS`)."""
    if unit not in PRESSURE_UNITS:
        raise ValueError(f"{unit!r} is not a canonical pressure unit")
    return SI_FACTORS[unit][0]


def kelvin_affine(text: str) -> tuple[float, float]:
    """Scale [K per unit] and offset [K] of a temperature unit in any accepted spelling.

    Raises
    ------
    ValueError
        If `text` is not an accepted temperature unit.
    """
    if not isinstance(text, str):
        raise ValueError(f"a temperature unit must be text, not {text!r}")
    return kelvin_per_unit(parse_temperature_unit(text))


def pascal_per(text: str) -> float:
    """Size of one (plain) pressure unit in any accepted spelling [Pa].

    Raises
    ------
    ValueError
        If `text` is not an accepted absolute-pressure unit.
    """
    if not isinstance(text, str):
        raise ValueError(f"a pressure unit must be text, not {text!r}")
    return pascal_per_unit(parse_plain_pressure_unit(text))


def known_si_affine(text: str, si_unit: str) -> tuple[float, float] | None:
    """(scale, offset) to `si_unit` for a vocabulary unit, or None if `text` is not one.

    Parameters
    ----------
    text : str
        A unit as written, e.g. ``'degC'``, ``'Torr'``, ``'kJ/mol'``.
    si_unit : {'K', 'Pa'} or other
        The unit wanted; for anything but ``'K'`` and ``'Pa'`` the answer is None.

    Raises
    ------
    RefusedUnit
        If `text` is a pressure spelling refused on purpose (ambiguous, gauge).
    """
    try:
        if si_unit == "K":
            return kelvin_affine(text)
        if si_unit == "Pa":
            return pascal_per(text), 0.0
    except RefusedUnit:
        raise
    except ValueError:
        return None
    return None


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


def _generated_table_source() -> str:
    """The text of :data:`SI_FACTORS` as computed from pint now."""
    import pint

    lines = [f"# GENERATED from pint {pint.__version__} by `python -m audit.units` -- "
             "do not edit by hand.",
             "SI_FACTORS: dict[str, tuple[float, float]] = {"]
    lines += [f"    {unit!r}: ({scale!r}, {offset!r}),".replace("'", '"')
              for unit, (scale, offset) in derive_si_factors().items()]
    lines += ["}", "CONSTANT_FACTORS: dict[tuple[str, str], float] = {"]
    lines += [f"    ({text!r}, {target!r}): {factor!r},".replace("'", '"')
              for (text, target), factor in derive_constant_factors().items()]
    lines.append("}")
    return "\n".join(lines)


if __name__ == "__main__":  # pragma: no cover - regeneration aid
    print(_generated_table_source())
