"""Units of printed temperatures and pressures (re-exported from :mod:`audit.units`).

The vocabulary, the conversion table and the pint registry live in
:mod:`audit.units`, shared by ingest, metadata, thermo and diagnose; this
module keeps the names the readers import.
"""

from __future__ import annotations

from audit.units import (ACCEPTED_PRESSURE_UNITS, ACCEPTED_TEMPERATURE_UNITS, PRESSURE_UNITS,
                         SI_FACTORS, TEMPERATURE_UNITS, PressureUnit, RefusedUnit, kelvin_per_unit,
                         parse_plain_pressure_unit, parse_pressure_unit, parse_temperature_unit,
                         pascal_per_unit, pressure_to_pascal, registry, split_log_prefix,
                         temperature_to_kelvin)

__all__ = ["ACCEPTED_PRESSURE_UNITS", "ACCEPTED_TEMPERATURE_UNITS", "PRESSURE_UNITS", "SI_FACTORS",
           "TEMPERATURE_UNITS", "PressureUnit", "RefusedUnit", "kelvin_per_unit",
           "parse_plain_pressure_unit", "parse_pressure_unit", "parse_temperature_unit",
           "pascal_per_unit", "pressure_to_pascal", "registry", "split_log_prefix",
           "temperature_to_kelvin"]
