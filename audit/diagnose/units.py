"""Units a table may have been printed in by mistake, and their sizes.

Only what the cause hypotheses need: the size of a pressure unit in pascal,
the affine conversion of a temperature unit to kelvin, and the common units
a table may have been written in by mistake.  Spellings are read and sizes
looked up by :mod:`audit.units` (factors derived from pint), the same
vocabulary the table headers use.
"""

from __future__ import annotations

import functools
import math

from audit.units import (PRESSURE_UNITS, kelvin_affine, parse_pressure_unit, parse_temperature_unit, pascal_per,
                         split_log_prefix)

__all__ = ["COMMON_PRESSURE_UNITS", "COMMON_TEMPERATURE_UNITS", "TEMPERATURE_SYMBOL", "pressure_unit_size_Pa",
           "pressure_units_of_size",
           "temperature_to_K", "temperature_from_K", "split_log_unit", "canonical_temperature_unit"]

#: Pressure units a value may have been printed in by mistake: every unit a table header may
#: name (canonical names of audit.units, in its order: where two give the same size, as hPa
#: and mbar, the first is the one named).
COMMON_PRESSURE_UNITS: tuple[str, ...] = tuple(PRESSURE_UNITS)
#: Temperature units a value may have been printed in by mistake.
COMMON_TEMPERATURE_UNITS: tuple[str, ...] = ("K", "degC", "degF")
#: How a temperature unit's canonical name is written in a message.
TEMPERATURE_SYMBOL: dict[str, str] = {"K": "K", "degC": "°C", "degF": "°F", "degR": "°R"}

_LOG_BASE = {"log10": 10.0, "ln": math.e}


def split_log_unit(unit: str) -> tuple[float | None, str]:
    """``'log10(P/kPa)'`` -> (10, 'kPa'); a linear unit -> (None, its canonical name).

    A text the vocabulary does not know comes back as written (after the log
    prefix), so that :func:`pressure_unit_size_Pa` refuses it.
    """
    text = (unit or "Pa").strip()
    try:
        pu = parse_pressure_unit(text)
    except ValueError:
        base, rest = split_log_prefix(text)
        return (None if base is None else _LOG_BASE[base]), rest
    return (None if pu.log is None else _LOG_BASE[pu.log]), pu.unit


@functools.lru_cache(maxsize=64)
def pressure_unit_size_Pa(unit: str) -> float:
    """Size of one `unit` in pascal [Pa].  Raises ValueError for an unknown unit."""
    return pascal_per(unit)


def pressure_units_of_size(size_Pa: float, rel: float = 1e-3) -> str | None:
    """The common pressure units of one size, as a reader names them ('mmHg/Torr', 'hPa/mbar').

    None when no common unit has that size (within `rel`).
    """
    names = [u for u in COMMON_PRESSURE_UNITS if abs(pressure_unit_size_Pa(u) / size_Pa - 1) < rel]
    # mmHg is how tables name it: list it before its twin
    names.sort(key=lambda u: (u != "mmHg",))
    return "/".join(names) or None


def canonical_temperature_unit(unit: str) -> str:
    """'K', 'degC' or 'degF' for any accepted spelling; ValueError otherwise.

    Other accepted units (°R) raise too: the hypotheses consider only
    :data:`COMMON_TEMPERATURE_UNITS`.
    """
    canon = parse_temperature_unit(unit or "K")
    if canon not in COMMON_TEMPERATURE_UNITS:
        raise ValueError(f"temperature unit {unit!r} is not among {COMMON_TEMPERATURE_UNITS}")
    return canon


def temperature_to_K(value: float, unit: str) -> float:
    """A printed temperature in `unit` ('K', 'degC', 'degF', ...) in kelvin [K]."""
    scale, offset = kelvin_affine(canonical_temperature_unit(unit))
    return scale * value + offset


def temperature_from_K(T_K: float, unit: str) -> float:
    """Kelvin [K] to `unit`."""
    scale, offset = kelvin_affine(canonical_temperature_unit(unit))
    return (T_K - offset) / scale
