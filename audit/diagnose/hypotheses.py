"""Cause hypotheses for a wrong vapor-pressure point: what else the printed
cell could have meant.

Each generator takes one :class:`~audit.model.Point` and returns candidate
readings (:class:`Hypothesis`), each with the corrected T and P in SI.  They
know nothing about fits or thresholds: :mod:`audit.diagnose.choose` scores
them against the consensus curve.  Corrected values are re-read in the
column's own unit (``Point.P_text_unit`` / ``T_text_unit``) so that, e.g., a
transposed digit of a value printed in mmHg gives the right pascal value, and
a log-pressure column is corrected in the log.

Kinds
-----
``pressure-unit``
    The printed pressure was written in another unit a table may name (Pa,
    mPa, hPa, kPa, MPa, bar, mbar, atm, Torr/mmHg, mTorr, psi, inHg, kgf/cm²;
    sizes from pint).  Ratios that
    are a power of ten (Pa↔kPa, hPa↔kPa, bar↔MPa, …) are unit readings too:
    a misplaced decimal point and a Pa/kPa slip print the same, and when
    the factor is a ratio of units the unit reading is the one kept (it is
    listed first, so it wins when both give the same value), as a curator
    would first suspect the unit; ``decimal-shift`` remains for factors that
    no pair of common units gives (×10 on a Pa column, ×1e-2 on a bar column, …).
``temperature-unit``
    °C printed where K was meant or the reverse (±273.15 K), or °F.
``decimal-shift``
    The printed value is 10ⁿ times the intended one, n = ±1, ±2, ±3
    (pressure), n = ±1 (temperature).
``digit-swap``
    Two adjacent digits of the printed text transposed (the decimal
    separator is skipped: ``3.215`` -> ``2.315`` is a swap of 3 and 2).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..model import Point
from ..thermo.rounding import parse_printed_number
from .units import (COMMON_PRESSURE_UNITS, COMMON_TEMPERATURE_UNITS, TEMPERATURE_SYMBOL, canonical_temperature_unit,
                    pressure_unit_size_Pa, pressure_units_of_size, split_log_unit, temperature_from_K,
                    temperature_to_K)

__all__ = ["Hypothesis", "pressure_unit_hypotheses", "temperature_unit_hypotheses",
           "decimal_shift_hypotheses", "digit_swap_hypotheses", "all_hypotheses", "adjacent_swaps"]


@dataclass(frozen=True)
class Hypothesis:
    """One alternative reading of a row.

    Attributes
    ----------
    kind : str
        ``pressure-unit``, ``temperature-unit``, ``decimal-shift``, ``digit-swap``.
    T_K, P_Pa : float
        The corrected temperature [K] and pressure [Pa].
    quantity : {'T', 'P'}
        Which value the hypothesis changes.
    printed : str
        The cell as printed.
    reading : str
        What the printed cell means under the hypothesis (for explanations).
    factor : float
        P_new/P_old for pressure hypotheses (1 for temperature ones); lets a
        check find a block of rows with the same slip.
    """

    kind: str
    T_K: float
    P_Pa: float
    quantity: str
    printed: str
    reading: str
    factor: float = 1.0


def _printed_P_value(p: Point) -> float | None:
    try:
        return parse_printed_number(p.P_text).value
    except ValueError:
        return None


def _reread_P(p: Point, new_value: float) -> float | None:
    """The pressure [Pa] the row would have if its printed value were `new_value`."""
    base, _ = split_log_unit(p.P_text_unit)
    old = _printed_P_value(p)
    if old is None:
        return None
    if base is not None:
        step = (new_value - old) * math.log(base)
        if abs(step) > 700:  # beyond any pressure a float can hold
            return None
        return p.P_Pa * math.exp(step)
    if old == 0 or new_value <= 0:
        return None
    return p.P_Pa * new_value / old


def _reread_T(p: Point, new_value: float) -> float | None:
    try:
        old = parse_printed_number(p.T_text).value
        unit = canonical_temperature_unit(p.T_text_unit)
    except ValueError:
        return None
    scale = temperature_to_K(1.0, unit) - temperature_to_K(0.0, unit)
    T = p.T_K + scale * (new_value - old)
    return T if T > 0 else None


def pressure_unit_hypotheses(p: Point) -> list[Hypothesis]:
    """The printed pressure read in each other common unit (powers of ten among them)."""
    base, unit = split_log_unit(p.P_text_unit)
    try:
        size = pressure_unit_size_Pa(unit)
    except ValueError:
        return []
    out: list[Hypothesis] = []
    seen: list[float] = []
    for alt in COMMON_PRESSURE_UNITS:
        ratio = pressure_unit_size_Pa(alt) / size
        if abs(ratio - 1) < 1e-3 or any(abs(ratio / s - 1) < 1e-3 for s in seen):
            continue  # mmHg/Torr differ by 1e-7: one hypothesis
        seen.append(ratio)
        shown = p.P_text if base is None else f"{p.P_text} ({p.P_text_unit})"
        names = pressure_units_of_size(pressure_unit_size_Pa(alt))
        out.append(Hypothesis("pressure-unit", p.T_K, p.P_Pa * ratio, "P", p.P_text,
                              f"P printed '{shown}' taken as {unit} but written in {names}", ratio))
    return out


def temperature_unit_hypotheses(p: Point) -> list[Hypothesis]:
    """The printed temperature read as each other temperature unit (K, °C, °F)."""
    try:
        unit = canonical_temperature_unit(p.T_text_unit)
    except ValueError:
        return []
    value = temperature_from_K(p.T_K, unit)
    out = []
    for alt in COMMON_TEMPERATURE_UNITS:
        if alt == unit:
            continue
        T_new = temperature_to_K(value, alt)
        if T_new <= 0:
            continue
        out.append(Hypothesis("temperature-unit", T_new, p.P_Pa, "T", p.T_text,
                              f"T printed '{p.T_text}' taken as {TEMPERATURE_SYMBOL[unit]} but written in {TEMPERATURE_SYMBOL[alt]}"))
    return out


def decimal_shift_hypotheses(p: Point, pressure_powers=(-3, -2, -1, 1, 2, 3),
                             temperature_powers=(-1, 1)) -> list[Hypothesis]:
    """The printed value divided by 10ⁿ (decimal point misplaced by n places)."""
    out = []
    base, _ = split_log_unit(p.P_text_unit)
    Pv = _printed_P_value(p)
    if Pv is not None and Pv != 0:
        for n in pressure_powers:
            P_new = _reread_P(p, Pv / 10.0 ** n)
            if P_new is None or not math.isfinite(P_new) or P_new <= 0:
                continue
            out.append(Hypothesis("decimal-shift", p.T_K, P_new, "P", p.P_text,
                                  f"P printed '{p.P_text}' is 10^{n} times the intended {Pv / 10.0 ** n:.6g}",
                                  P_new / p.P_Pa))
    try:
        Tv = parse_printed_number(p.T_text).value
    except ValueError:
        Tv = None
    if Tv:
        for n in temperature_powers:
            T_new = _reread_T(p, Tv / 10.0 ** n)
            if T_new is None:
                continue
            out.append(Hypothesis("decimal-shift", T_new, p.P_Pa, "T", p.T_text,
                                  f"T printed '{p.T_text}' is 10^{n} times the intended {Tv / 10.0 ** n:.6g}"))
    return out


def adjacent_swaps(text: str) -> list[str]:
    """Texts with two adjacent digits of the mantissa of `text` exchanged.

    The decimal separator does not count as a position (``12.5`` gives
    ``21.5`` and ``15.2``); identical digits are not swapped; the exponent is
    left alone.
    """
    try:
        s = parse_printed_number(text).normalized
    except ValueError:
        return []
    cut = len(s)
    for ch in "eE":
        if ch in s:
            cut = s.index(ch)
    pos = [i for i, c in enumerate(s[:cut]) if c.isdigit()]
    out = []
    for a, b in zip(pos, pos[1:]):
        if s[a] == s[b]:
            continue
        chars = list(s)
        chars[a], chars[b] = chars[b], chars[a]
        out.append("".join(chars))
    return out


def digit_swap_hypotheses(p: Point) -> list[Hypothesis]:
    """Each transposition of two adjacent printed digits of P and of T."""
    out = []
    for new_text in adjacent_swaps(p.P_text):
        P_new = _reread_P(p, float(new_text))
        if P_new is None or not math.isfinite(P_new) or P_new <= 0:
            continue
        out.append(Hypothesis("digit-swap", p.T_K, P_new, "P", p.P_text,
                              f"P printed '{p.P_text}' would read '{new_text}' with two adjacent digits "
                              f"swapped back", P_new / p.P_Pa))
    for new_text in adjacent_swaps(p.T_text):
        T_new = _reread_T(p, float(new_text))
        if T_new is None:
            continue
        out.append(Hypothesis("digit-swap", T_new, p.P_Pa, "T", p.T_text,
                              f"T printed '{p.T_text}' would read '{new_text}' with two adjacent digits "
                              f"swapped back"))
    return out


def all_hypotheses(p: Point) -> list[Hypothesis]:
    """Every hypothesis for one readable row (phase-label is not among them)."""
    if not p.readable:
        return []
    return (pressure_unit_hypotheses(p) + temperature_unit_hypotheses(p)
            + decimal_shift_hypotheses(p) + digit_swap_hypotheses(p))
