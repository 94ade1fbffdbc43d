"""Unit names as tables print them, and their sizes (from pint).

Only what the cause hypotheses need: the size of a pressure unit in pascal,
the affine conversion of a temperature unit to kelvin, and the common units
a table may have been written in by mistake.  Factors come from pint's
definitions (pint.readthedocs.io), not from a hand-written table.
"""

from __future__ import annotations

import functools
import math
import re

__all__ = ["COMMON_PRESSURE_UNITS", "COMMON_TEMPERATURE_UNITS", "pressure_unit_size_Pa",
           "temperature_to_K", "split_log_unit", "canonical_temperature_unit"]

#: Pressure units a value may have been printed in by mistake.
COMMON_PRESSURE_UNITS: tuple[str, ...] = ("Pa", "hPa", "kPa", "MPa", "bar", "mbar", "atm", "mmHg", "torr",
                                          "psi", "inHg")
#: Temperature units a value may have been printed in by mistake.
COMMON_TEMPERATURE_UNITS: tuple[str, ...] = ("K", "degC", "degF")

_PRESSURE_ALIASES = {"torr": "torr", "mm hg": "mmHg", "mmhg": "mmHg", "psia": "psi", "inhg": "inHg",
                     "in hg": "inHg", "pa": "Pa", "kpa": "kPa", "mpa": "MPa", "hpa": "hPa", "bar": "bar",
                     "mbar": "mbar", "atm": "atm", "psi": "psi"}
_LOG_UNIT = re.compile(r"^\s*(log10|log|lg|ln)\s*\(\s*[Pp]\s*/\s*([^)]+?)\s*\)\s*$")


@functools.lru_cache(maxsize=1)
def _registry():
    import pint  # lazy: building a registry takes a noticeable moment

    return pint.UnitRegistry()


def split_log_unit(unit: str) -> tuple[float | None, str]:
    """``'log10(P/kPa)'`` -> (10, 'kPa'); a linear unit -> (None, unit)."""
    m = _LOG_UNIT.match(unit or "")
    if not m:
        return None, (unit or "Pa").strip()
    return (math.e if m.group(1) == "ln" else 10.0), m.group(2)


@functools.lru_cache(maxsize=64)
def pressure_unit_size_Pa(unit: str) -> float:
    """Size of one `unit` in pascal (pint).  Raises ValueError for an unknown unit."""
    name = _PRESSURE_ALIASES.get(unit.strip().lower(), unit.strip())
    if name == "Pa":
        return 1.0
    try:
        q = _registry().Quantity(1.0, name).to("Pa").magnitude
    except Exception as exc:  # pint raises several exception types
        raise ValueError(f"unknown pressure unit {unit!r}") from exc
    return float(q)


def canonical_temperature_unit(unit: str) -> str:
    """'K', 'degC' or 'degF' for the usual spellings; ValueError otherwise."""
    u = (unit or "K").strip().replace("°", "deg").replace("º", "deg").lower()
    if u in ("k", "kelvin"):
        return "K"
    if u in ("degc", "c", "celsius", "degree_celsius"):
        return "degC"
    if u in ("degf", "f", "fahrenheit", "degree_fahrenheit"):
        return "degF"
    raise ValueError(f"unknown temperature unit {unit!r}")


@functools.lru_cache(maxsize=8)
def _temperature_affine(unit: str) -> tuple[float, float]:
    """(scale, offset) with T_K = scale·t + offset (pint)."""
    if unit == "K":
        return 1.0, 0.0
    ureg = _registry()
    t0 = ureg.Quantity(0.0, unit).to("kelvin").magnitude
    t1 = ureg.Quantity(1.0, unit).to("kelvin").magnitude
    return float(t1 - t0), float(t0)


def temperature_to_K(value: float, unit: str) -> float:
    """A printed temperature in `unit` ('K', 'degC', 'degF', ...) in kelvin."""
    scale, offset = _temperature_affine(canonical_temperature_unit(unit))
    return scale * value + offset


def temperature_from_K(T_K: float, unit: str) -> float:
    """Kelvin to `unit`."""
    scale, offset = _temperature_affine(canonical_temperature_unit(unit))
    return (T_K - offset) / scale
