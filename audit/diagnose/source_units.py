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

__all__ = ["SourceUnitReading", "source_pressure_unit", "TemperatureScaleReading", "SourceTemperatureReading",
           "source_temperature_unit",
           "TroutonTemperatureReading", "source_temperature_unit_by_trouton"]


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
class TemperatureScaleReading:
    """A series' temperatures read in another scale.

    Attributes
    ----------
    printed_unit, real_unit : str
        The scale of the header and the scale the values were really in ('K', 'degC', 'degF').
    T_K : tuple of float
        Each row's temperature in that reading [K] (order of the rows given).
    """

    printed_unit: str
    real_unit: str
    T_K: tuple[float, ...]


@dataclass(frozen=True)
class SourceTemperatureReading(TemperatureScaleReading):
    """A source's temperatures read in another scale that puts them on the others' curve.

    Attributes
    ----------
    remaining_percent : float
        The source's median offset from the others' curve after the correction [%].
    n_judged : int
        Rows whose corrected temperature lies where the curve can judge them.
    """

    remaining_percent: float
    n_judged: int


def _series_and_unit(T_K, ln_P, printed_unit):
    """(T [K], ln P [ln Pa], canonical printed unit) as arrays, or None for an unknown unit."""
    try:
        unit = canonical_temperature_unit(printed_unit)
    except ValueError:
        return None
    return np.asarray(T_K, float), np.asarray(ln_P, float), unit


def _other_scales(T_K, unit):
    """(scale, temperatures read in it [K]) for each common scale other than ``unit``."""
    values = np.array([temperature_from_K(t, unit) for t in T_K])
    return [(alt, np.array([temperature_to_K(v, alt) for v in values]))
            for alt in COMMON_TEMPERATURE_UNITS if alt != unit]


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
    series = _series_and_unit(T_K, ln_P, printed_unit)
    if series is None:
        return None
    T_K, ln_P, unit = series
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
    best = None
    for alt, T_alt in _other_scales(T_K, unit):
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


@dataclass(frozen=True)
class TroutonTemperatureReading(TemperatureScaleReading):
    """A series' temperatures read in another scale because its own Trouton ratio says so.

    Attributes
    ----------
    ratio_printed, u_ratio_printed : float
        Trouton's ratio of the series' own line as printed, and its uncertainty
        [J mol⁻¹ K⁻¹] (nan when a temperature is at or below 0 K as printed).
    ratio_real, u_ratio_real : float
        The same in the reading [J mol⁻¹ K⁻¹].
    """

    ratio_printed: float
    u_ratio_printed: float
    ratio_real: float
    u_ratio_real: float


def source_temperature_unit_by_trouton(T_K, ln_P, printed_unit: str, band, k: float,
                                       curve_ln_p=None, u_lnP=None) -> TroutonTemperatureReading | None:
    """The temperature scale whose reading gives a series a Trouton ratio a substance can have.

    For a series no other source reaches, where no curve can judge it: as
    printed, its own line's Trouton ratio (:func:`audit.thermo.trouton.line_trouton_ratio`)
    lies outside ``band`` by more than ``k`` standard uncertainties (or a
    temperature is at or below 0 K); read in another of K, °C, °F it lies
    inside the band.  When two readings qualify, the one closer to
    ``curve_ln_p`` (the others' curve, extrapolated: weak evidence, used
    only to choose) is taken; without a curve, none.

    Parameters
    ----------
    T_K : array_like
        The series' temperatures as read in ``printed_unit`` [K].
    ln_P : array_like
        ln of its pressures [ln Pa].
    printed_unit : str
        The temperature unit of the column as printed.
    band : (float, float)
        Plausible Trouton ratios [J mol⁻¹ K⁻¹] for the branch.
    k : float
        Coverage factor on the printed ratio's uncertainty [-].
    curve_ln_p : callable, optional
        ln P [ln Pa] of the others' curve at T [K].
    u_lnP : array_like, optional
        Each pressure's standard uncertainty in ln P [-] (its printed rounding):
        the printed ratio's uncertainty is never below what they allow.

    Returns
    -------
    TroutonTemperatureReading or None

    Examples
    --------
    Water between 320 and 360 K printed in °C under a kelvin header (pressures
    from the Clausius–Clapeyron line through water's normal boiling point,
    373.124 K, with ΔH = 42 kJ/mol — an approximation of IAPWS-95 there):

    >>> import math
    >>> T = np.array([320.0, 330.0, 340.0, 350.0, 360.0])
    >>> lnP = math.log(101325.0) - 42000.0 / 8.314462618 * (1 / T - 1 / 373.124)
    >>> r = source_temperature_unit_by_trouton(T - 273.15, lnP, "K", (55.0, 135.0), 3.0)
    >>> r.real_unit, round(r.ratio_real, 1), round(r.ratio_printed, 1)
    ('degC', 112.6, 11.8)
    """
    from ..thermo.trouton import line_trouton_ratio

    series = _series_and_unit(T_K, ln_P, printed_unit)
    if series is None:
        return None
    T_K, ln_P, unit = series
    lo, hi = band
    if T_K.size < 3 or not np.all(np.isfinite(T_K)) or not np.all(np.isfinite(ln_P)):
        return None
    printed = line_trouton_ratio(T_K, ln_P, u_lnP) if np.all(T_K > 0) else None
    if printed is not None:
        if lo - k * printed.u_ratio <= printed.ratio <= hi + k * printed.u_ratio:
            return None  # as printed, a substance could have it
    elif np.all(T_K > 0):
        return None  # no line as printed (pressure falling, too few temperatures): nothing to compare
    readings = []
    for alt, T_alt in _other_scales(T_K, unit):
        line = line_trouton_ratio(T_alt, ln_P, u_lnP) if np.all(T_alt > 0) else None
        if line is not None and lo <= line.ratio <= hi:
            readings.append((alt, T_alt, line))
    if len(readings) > 1:
        if curve_ln_p is None:
            return None

        def distance(reading):
            with np.errstate(all="ignore"):
                d = np.abs(ln_P - curve_ln_p(reading[1]))
            d = d[np.isfinite(d)]
            return float(np.median(d)) if d.size else math.inf

        readings.sort(key=distance)
        if not math.isfinite(distance(readings[0])):
            return None
    if not readings:
        return None
    alt, T_alt, line = readings[0]
    return TroutonTemperatureReading(
        printed_unit=unit, real_unit=alt, T_K=tuple(float(t) for t in T_alt),
        ratio_printed=printed.ratio if printed is not None else math.nan,
        u_ratio_printed=printed.u_ratio if printed is not None else math.nan,
        ratio_real=line.ratio, u_ratio_real=line.u_ratio)
