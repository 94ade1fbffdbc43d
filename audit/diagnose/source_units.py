"""Which pressure or temperature unit a whole series was really printed in.

A series typed in mmHg under a "Pa" header, or in kPa under "Pa", sits off
the other sources by one constant factor: the ratio of the two unit sizes.
When a source's offset matches such a ratio, its pressures were printed in
that other unit; the suggested values are its values read in that unit.
A series whose temperatures were printed in °C under a kelvin header (or
the reverse, or in °F) is off by a pressure ratio that changes along the
range; read in the right scale, its points fall on the others' curve.
Pure functions: the tolerances are passed in by the check.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..units import PRESSURE_UNITS
from .units import (COMMON_TEMPERATURE_UNITS, canonical_temperature_unit, pressure_unit_size_Pa, split_log_unit,
                    temperature_from_K, temperature_to_K)

__all__ = ["SourceUnitReading", "source_pressure_unit", "SourceTemperatureReading", "source_temperature_unit"]


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


def source_pressure_unit(offset_lnP: float, printed_unit: str, tolerance_lnP: float,
                         relative_tolerance: float = 0.0) -> SourceUnitReading | None:
    """The other pressure unit that explains a source's offset, or None.

    Every unit the ingest knows is a candidate (a whole series in mTorr or
    kgf/cm² is as easy to mislabel as one in mmHg).

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
    relative_tolerance : float
        For a large unit ratio r, the offset left may also reach this fraction
        of |ln r| [-]: the others' curve at the source's temperatures carries
        the compilation's own systematic spread (tens of percent), while a
        ratio of ×100 or ×10⁵ is far beyond any bias.  The larger of the two
        tolerances applies.

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
    for real in PRESSURE_UNITS:
        expected = math.log(size_printed / pressure_unit_size_Pa(real))  # ln(P_read / P_true)
        if abs(expected) <= 3 * tolerance_lnP:
            continue
        left = offset_lnP - expected
        allowed = max(tolerance_lnP, relative_tolerance * abs(expected))
        if abs(left) <= allowed and (best is None or abs(left) < abs(best[1])):
            best = (real, left)
    if best is None:
        return None
    real, left = best
    return SourceUnitReading(printed_unit=unit, real_unit=real,
                             factor=pressure_unit_size_Pa(real) / size_printed,
                             remaining_percent=100.0 * math.expm1(left))


@dataclass(frozen=True)
class SourceTemperatureReading:
    """A source's temperatures read in another scale.

    Attributes
    ----------
    printed_unit, real_unit : str
        The scale of the header and the scale the values were really in ('K', 'degC', 'degF').
    T_K : tuple of float
        Each row's temperature in that reading [K] (order of the rows given).
    remaining_percent : float
        The source's median offset from the others' curve after the correction [%].
    n_judged : int
        Rows whose corrected temperature lies where the curve can judge them.
    """

    printed_unit: str
    real_unit: str
    T_K: tuple[float, ...]
    remaining_percent: float
    n_judged: int


def source_temperature_unit(T_K, ln_P, printed_unit: str, curve_ln_p, T_range, tolerance_lnP: float,
                            wide_lnP: float = 0.0) -> SourceTemperatureReading | None:
    """The other temperature scale that puts a whole series on the others' curve, or None.

    Parameters
    ----------
    T_K : array_like
        The source's temperatures as read in ``printed_unit`` [K].
    ln_P : array_like
        ln of its pressures [ln Pa].
    printed_unit : str
        The temperature unit of the column as printed.
    curve_ln_p : callable
        ln P of the others' curve at T [K] → [ln Pa].
    T_range : (float, float)
        Temperatures where that curve can judge a point [K].
    tolerance_lnP : float
        Largest median offset left after the correction [-]; as printed, the
        series must be more than three times this far off (or not judgeable).
    wide_lnP : float
        A larger offset [-] still accepted when the reading explains at least
        nine tenths of the series' offset as printed (or the series was not
        judgeable as printed): a series in °C under a kelvin header beside
        biased sources lands near, not on, a consensus that is itself off.
        The caller checks such a reading further (its slope); 0 turns it off.

    Returns
    -------
    SourceTemperatureReading or None
        The reading whose median offset is smallest, when it is within the
        tolerance for a majority of the rows.

    Examples
    --------
    Two rows printed in °C under a kelvin header, against a straight ln P–1/T
    curve through (300 K, 3536.8 Pa) and (350 K, 41 682 Pa) (water's
    saturation pressures in IAPWS-95, quoted from memory of its tables):

    >>> import math
    >>> b = math.log(41682.0 / 3536.8) / (1 / 300 - 1 / 350)
    >>> curve = lambda T: math.log(3536.8) - b * (1 / np.asarray(T) - 1 / 300)
    >>> r = source_temperature_unit([26.85, 76.85], [math.log(3536.8), math.log(41682.0)], "K", curve,
    ...                             (290.0, 360.0), math.log1p(0.03))
    >>> r.real_unit, [round(t, 2) for t in r.T_K]
    ('degC', [300.0, 350.0])
    """
    T_K = np.asarray(T_K, float)
    ln_P = np.asarray(ln_P, float)
    try:
        unit = canonical_temperature_unit(printed_unit)
    except ValueError:
        return None
    lo, hi = T_range
    if T_K.size == 0 or not (math.isfinite(lo) and math.isfinite(hi)):
        return None

    def median_offset(T):
        inside = np.isfinite(T) & (T > 0) & (T >= lo) & (T <= hi)
        # a reading must put most of the series where the curve is known
        if 2 * inside.sum() <= T.size:
            return None, int(inside.sum())
        with np.errstate(all="ignore"):
            r = ln_P[inside] - curve_ln_p(T[inside])
        r = r[np.isfinite(r)]
        if r.size * 2 <= T.size:
            return None, int(inside.sum())
        return float(np.median(r)), int(r.size)

    as_printed, _ = median_offset(T_K)
    if as_printed is not None and abs(as_printed) <= 3 * tolerance_lnP:
        return None
    values = np.array([temperature_from_K(t, unit) for t in T_K])
    best = None
    for alt in COMMON_TEMPERATURE_UNITS:
        if alt == unit:
            continue
        T_alt = np.array([temperature_to_K(v, alt) for v in values])
        off, n = median_offset(T_alt)
        if off is None:
            continue
        if abs(off) > tolerance_lnP and not (abs(off) <= wide_lnP
                                             and (as_printed is None or abs(off) <= 0.1 * abs(as_printed))):
            continue
        if best is None or abs(off) < abs(best[1]):
            best = (alt, off, n, T_alt)
    if best is None:
        return None
    alt, off, n, T_alt = best
    return SourceTemperatureReading(printed_unit=unit, real_unit=alt, T_K=tuple(float(t) for t in T_alt),
                                    remaining_percent=100.0 * math.expm1(off), n_judged=n)
