"""Which pressure unit a whole series was really printed in.

A series typed in mmHg under a "Pa" header, or in kPa under "Pa", sits off
the other sources by one constant factor: the ratio of the two unit sizes.
When a source's offset matches such a ratio, its pressures were printed in
that other unit; the suggested values are its values read in that unit.
Pure function: the tolerance is passed in by the check.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .units import COMMON_PRESSURE_UNITS, pressure_unit_size_Pa, split_log_unit

__all__ = ["SourceUnitReading", "source_pressure_unit"]


@dataclass(frozen=True)
class SourceUnitReading:
    """A source's pressures read in another unit.

    Attributes
    ----------
    printed_unit, real_unit : str
        The unit of the header and the unit the values were really in.
    factor : float
        Multiply each pressure as read [Pa] by this to get it in the real unit [Pa].
    remaining_percent : float
        The source's offset from the others after the correction [%].
    """

    printed_unit: str
    real_unit: str
    factor: float
    remaining_percent: float


def source_pressure_unit(offset_lnP: float, printed_unit: str, tolerance_lnP: float) -> SourceUnitReading | None:
    """The other pressure unit that explains a source's offset, or None.

    Parameters
    ----------
    offset_lnP : float
        ln(P_source/P_others), the source's constant offset [-].
    printed_unit : str
        The unit of the pressure column as printed (a log column gives None).
    tolerance_lnP : float
        Largest offset left after the correction [-]; a unit ratio closer to 1
        than three times this (bar and atm, 1.3 % apart) is never claimed,
        since a bias of that size explains it as well.

    Returns
    -------
    SourceUnitReading or None

    Examples
    --------
    kPa values under a Pa header are 1000 times too small:

    >>> r = source_pressure_unit(math.log(1e-3) + 0.004, "Pa", math.log1p(0.03))
    >>> r.real_unit, r.factor, round(r.remaining_percent, 2)
    ('kPa', 1000.0, 0.4)
    """
    base, unit = split_log_unit(printed_unit)
    if base is not None or not math.isfinite(offset_lnP):
        return None
    try:
        size_printed = pressure_unit_size_Pa(unit)
    except ValueError:
        return None
    best = None
    for real in COMMON_PRESSURE_UNITS:
        expected = math.log(size_printed / pressure_unit_size_Pa(real))  # ln(P_read / P_true)
        if abs(expected) <= 3 * tolerance_lnP:
            continue
        left = offset_lnP - expected
        if abs(left) <= tolerance_lnP and (best is None or abs(left) < abs(best[1])):
            best = (real, left)
    if best is None:
        return None
    real, left = best
    return SourceUnitReading(printed_unit=unit, real_unit=real,
                             factor=pressure_unit_size_Pa(real) / size_printed,
                             remaining_percent=100.0 * math.expm1(left))
