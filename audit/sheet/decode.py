"""Decode a sheet: which reading of its coefficients is the real one.

Every reading — what the equation gives (log10 P, ln P, or P) × temperature
unit (K, °C, °F) × pressure unit (each size the ingest knows once: mmHg and
Torr, hPa and mbar are one reading) — is scored by the evidence at hand:

* **reference**: the rms of ln(P_sheet/P_ref) over the stated range, where the
  reference is valid (:mod:`audit.sheet.reference`);
* **table**: the median |ln(P_sheet/P_table)| over the sheet's own table (a
  median, so that one bad row does not decide).  A table printed without units
  of its own shares the equation's, and a wrong unit note applies to both:
  such a table then tells only what the equation gives (log10, ln, P) and
  whether the table follows the equation;
* **normal boiling point**, when there is no reference: |ln(P_sheet(Tb)/101.325 kPa)|;
* **physics**: P defined and finite over the range, the implied enthalpy
  positive and between ``min_dH``/``max_dH``, below the critical pressure and
  temperature (each a violation, weighed heavily), Trouton's ratio at the
  normal boiling point within its band and Antoine's C in the usual range for
  the temperature unit (each a doubt, weighed lightly).

The reading with the least misfit (the evidence's sum, in ln P) is the decoded
one; ties go to the stated reading.  The sheet's stated reading is accepted
unless another is better by more than ``decisive_ln`` (a factor in P) and by a
factor of two, or the stated reading breaks physics where another does not.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Mapping

import numpy as np

from ..diagnose.units import pressure_units_of_size
from ..thermo.equations import ln_p_where_defined
from ..units import PRESSURE_UNITS, kelvin_affine, pascal_per
from .model import Sheet, StatedReading
from .readings import NATURAL_LOG_FORMS, Reading, SheetEquation, equation_for, unit_label

__all__ = ["Decoding", "ReadingEvidence", "DecodeSettings", "decode_sheet", "candidate_readings",
           "same_reading", "pressure_unit_name"]

P_ATM = 101325.0
R = 8.314462618
#: readings tried for the temperature unit
TEMPERATURE_UNITS = ("K", "degC", "degF")
#: Antoine's C usually lies in these ranges [T_unit] (common practice: about −30 to −80 K for
#: organic liquids with T in K, about 180–270 °C with T in °C; widened on purpose)
ANTOINE_C_RANGE = {"K": (-150.0, 10.0), "degC": (100.0, 400.0), "degF": (150.0, 750.0)}


def same_pressure_unit(a: str, b: str) -> bool:
    """Whether two pressure units are one size (mmHg and Torr, hPa and mbar)."""
    return abs(pascal_per(a) / pascal_per(b) - 1) < 1e-4


def _distinct_pressure_units() -> tuple[str, ...]:
    """One canonical unit per size (mmHg/Torr, hPa/mbar), in the ingest's order."""
    out: list[str] = []
    # of twins, the name tables use most (mmHg before Torr)
    for u in sorted(PRESSURE_UNITS, key=lambda u: u == "Torr"):
        if not any(same_pressure_unit(u, v) for v in out):
            out.append(u)
    return tuple(sorted(out, key=list(PRESSURE_UNITS).index))


PRESSURE_READINGS = _distinct_pressure_units()


def pressure_unit_name(unit: str) -> str:
    """The unit as a reader names it, twins included ('mmHg/Torr', 'hPa/mbar')."""
    return pressure_units_of_size(pascal_per(unit)) or unit


def same_reading(a: Reading, b: Reading) -> bool:
    return a.log == b.log and a.T_unit == b.T_unit and same_pressure_unit(a.P_unit, b.P_unit)


def matches_stated(r: Reading, stated: StatedReading) -> bool:
    return ((stated.log is None or stated.log == r.log)
            and (stated.T_unit is None or stated.T_unit == r.T_unit)
            and (stated.P_unit is None or same_pressure_unit(stated.P_unit, r.P_unit)))


#: pressure units from the most to the least often printed on sheets (common practice; a
#: tie-breaker only, between readings the evidence cannot tell apart)
_COMMONNESS = {u: i for i, u in enumerate(("Pa", "kPa", "bar", "mmHg", "atm", "MPa", "psi", "hPa", "inHg",
                                            "kgf/cm2", "mPa", "mTorr"))}


def _parts_as_stated(r: Reading, stated: StatedReading) -> int:
    return ((stated.log == r.log) + (stated.T_unit == r.T_unit)
            + (stated.P_unit is not None and same_pressure_unit(stated.P_unit, r.P_unit)))


@dataclass(frozen=True)
class DecodeSettings:
    """Thresholds of the decoding (profile section ``sheet-units``)."""

    decisive_ln: float = math.log(1.1)
    min_dH_J_per_mol: float = 50.0
    max_dH_J_per_mol: float = 300000.0
    trouton_band: tuple[float, float] = (55.0, 135.0)


@dataclass(frozen=True)
class ReadingEvidence:
    """The evidence for one reading.

    ``table_ln`` / ``reference_ln`` / ``boiling_ln`` are misfits in ln P (None when that
    evidence is not at hand for the reading); ``violations`` break physics, ``doubts`` are
    unusual but possible.
    """

    reading: Reading
    matches_stated: bool
    table_ln: float | None
    reference_ln: float | None
    boiling_ln: float | None
    violations: tuple[str, ...]
    doubts: tuple[str, ...]
    misfit: float
    T_range_K: tuple[float, float] | None

    def summary(self) -> str:
        parts = []
        if self.reference_ln is not None:
            parts.append(f"reference rms {_percent(self.reference_ln)}")
        if self.table_ln is not None:
            parts.append(f"table median {_percent(self.table_ln)}")
        if self.boiling_ln is not None:
            parts.append(f"at the normal boiling point {_percent(self.boiling_ln)}")
        parts += list(self.violations) + list(self.doubts)
        return "; ".join(parts) or "no evidence against it"


def _percent(d_ln: float) -> str:
    """A misfit in ln P as a percentage of P (or a factor, when large)."""
    if not math.isfinite(d_ln) or d_ln > 690:  # exp overflows a float near 709
        return "beyond any factor (P undefined or infinite somewhere)"
    if d_ln > math.log(3):
        return f"×{math.exp(d_ln):.3g}"
    return f"{100 * (math.exp(d_ln) - 1):.3g} %"


@dataclass(frozen=True)
class Decoding:
    """The decoded reading of a sheet, with the evidence.

    Attributes
    ----------
    stated : StatedReading
    best : Reading
    equation : SheetEquation
        The sheet's equation under ``best``.
    candidates : tuple of ReadingEvidence
        The readings, best first.
    stated_evidence : ReadingEvidence or None
        The best reading consistent with what the sheet states (None when it states
        something no reading has, which cannot happen for units the reader accepted).
    differs : bool
        The decoded reading is not what the sheet states (a warning).
    basis : str
        What decided: 'reference', 'table', 'normal boiling point', or 'physics only'.
    """

    stated: StatedReading
    best: Reading
    equation: SheetEquation
    candidates: tuple[ReadingEvidence, ...]
    stated_evidence: ReadingEvidence | None
    differs: bool
    basis: str
    notes: tuple[str, ...] = field(default=())

    @property
    def best_evidence(self) -> ReadingEvidence:
        return self.candidates[0]


def candidate_readings(sheet: Sheet) -> list[Reading]:
    """Every reading of the sheet's coefficients that is tried."""
    if sheet.form in NATURAL_LOG_FORMS:
        logs, temps = ("ln",), ("K",)
    elif sheet.form == "expression":
        logs, temps = ("log10", "ln", "none"), TEMPERATURE_UNITS
    else:
        logs, temps = ("log10", "ln"), TEMPERATURE_UNITS
    readings = [Reading(g, t, p) for g in logs for t in temps for p in PRESSURE_READINGS]
    s = sheet.stated
    if s.complete and not any(same_reading(r, Reading(s.log, s.T_unit, s.P_unit)) for r in readings):
        readings.append(Reading(s.log, s.T_unit, s.P_unit))  # e.g. a Wagner sheet stating °R
    return readings


def _range_numbers(sheet: Sheet, reference, stated_T_unit: str) -> tuple[float, float] | None:
    """The temperature range as numbers in the sheet's temperature unit (whatever that is)."""
    if sheet.T_range is not None:
        return sheet.T_range
    if sheet.table is not None and not sheet.table.units_given:
        Ts = [r.T_value for r in sheet.table.rows if r.T_value is not None]
        if len(Ts) >= 2 and min(Ts) < max(Ts):
            return min(Ts), max(Ts)
    if reference is not None:
        scale, offset = kelvin_affine(stated_T_unit)
        return (reference.T_min - offset) / scale, (reference.T_max - offset) / scale
    return None


def _to_K(values, T_unit: str):
    scale, offset = kelvin_affine(T_unit)
    return scale * np.asarray(values, dtype=float) + offset


def _table_points(sheet: Sheet, reading: Reading):
    """(T [K], ln P [Pa]) of the table's readable rows under ``reading`` (its own units if it has them)."""
    rows = [r for r in sheet.table.rows if r.T_value is not None and r.P_value is not None and r.P_value > 0]
    if not rows:
        return None
    T_unit = sheet.table.T_unit if sheet.table.units_given else reading.T_unit
    P_unit = sheet.table.P_unit if sheet.table.units_given else reading.P_unit
    T = _to_K([r.T_value for r in rows], T_unit)
    lnP = np.log([r.P_value for r in rows]) + math.log(pascal_per(P_unit))
    return T, lnP


def _evidence(sheet: Sheet, reading: Reading, numbers, reference, constants: Mapping[str, float],
              settings: DecodeSettings) -> ReadingEvidence:
    eq = equation_for(sheet, reading)
    violations: list[str] = []
    doubts: list[str] = []
    T_range = None
    reference_ln = table_ln = boiling_ln = None
    Tc, Pc, Tb = constants.get("T_critical"), constants.get("P_critical"), constants.get("T_boiling")
    with np.errstate(all="ignore"):
        if numbers is not None:
            lo, hi = _to_K(numbers, reading.T_unit)
            T_range = (float(lo), float(hi))
            if not lo > 0:
                violations.append(f"the range starts at {lo:.4g} K")
            grid = np.linspace(max(lo, 1.0), max(hi, 2.0), 41)
            lnP = eq.ln_p(grid)
            dH = R * grid ** 2 * eq.dlnp_dT(grid)
            if not np.all(np.isfinite(lnP)):
                violations.append("P is not defined over the whole range")
            finite = np.isfinite(dH)
            if np.any(dH[finite] <= 0):
                violations.append("the implied enthalpy is negative in the range")
            elif finite.any():
                mid = float(np.median(dH[finite]))
                if not settings.min_dH_J_per_mol <= mid <= settings.max_dH_J_per_mol:
                    violations.append(f"implied enthalpy {mid / 1000:.3g} kJ/mol")
            if Tc and hi > Tc * 1.001:
                violations.append(f"the range reaches {hi:.4g} K, above Tc = {Tc:.4g} K")
            if Pc and np.nanmax(np.where(np.isfinite(lnP), lnP, -np.inf)) > math.log(Pc * 1.05):
                violations.append(f"P exceeds Pc = {Pc:.4g} Pa in the range")
            if reference is not None:
                a, b = max(lo, reference.T_min), min(hi, reference.T_max)
                if not (b > a and (b - a) >= 0.2 * (hi - lo)):
                    # little or no overlap: the reference extrapolated over the range still tells a
                    # unit's factor (≥ 1.3) from its own error there; no evidence would win instead
                    a, b = lo, hi
                    doubts.append("the range lies mostly outside the reference's")
                g = np.linspace(max(a, 1.0), max(b, 2.0), 31)
                ln_ref = ln_p_where_defined(reference.equation, g)
                d = (eq.ln_p(g) - ln_ref)[np.isfinite(ln_ref)]
                if d.size:
                    reference_ln = float(np.sqrt(np.mean(d * d))) if np.all(np.isfinite(d)) else math.inf
            if Tb:
                # the one pressure every substance is known at; extrapolated if need be, since a
                # reading that moves the range away from Tb must not escape the test that way
                d = float(eq.ln_p(Tb)) - math.log(P_ATM)
                boiling_ln = abs(d) if math.isfinite(d) else math.inf
            # Trouton's rule at the equation's own normal boiling point (common practice)
            # Trouton's rule (common practice) at the known normal boiling point, else at the
            # equation's own: the slope there tells a °F or K reading from a °C one, which the
            # pressure at one temperature cannot
            T_nb = Tb
            rising = np.all(np.isfinite(lnP)) and np.all(np.diff(lnP) > 0)
            if T_nb is None and rising and lnP[0] < math.log(P_ATM) < lnP[-1]:
                T_nb = float(np.interp(math.log(P_ATM), lnP, grid))
            if T_nb is not None and sheet.phase == "liquid":
                ratio = float(R * T_nb * eq.dlnp_dT(T_nb))  # ΔH(Tb)/Tb
                if math.isfinite(ratio) and not settings.trouton_band[0] <= ratio <= settings.trouton_band[1]:
                    doubts.append(f"Trouton's ratio {ratio:.3g} J/(mol K) at the boiling point {T_nb:.4g} K")
        if sheet.table is not None:
            pts = _table_points(sheet, reading)
            if pts is not None:
                d = eq.ln_p(pts[0]) - pts[1]
                d = d[np.isfinite(d)]
                table_ln = float(np.median(np.abs(d))) if d.size else math.inf
    if sheet.form in ("antoine", "antoine-extended") and reading.T_unit in ANTOINE_C_RANGE:
        c_lo, c_hi = ANTOINE_C_RANGE[reading.T_unit]
        C = sheet.coefficients["C"]
        if not c_lo <= C <= c_hi:
            doubts.append(f"Antoine C = {C:.4g} is unusual with T in {unit_label(reading.T_unit)}")
    # the boiling point counts fully without a reference, half beside one (the two largely repeat)
    misfit = (sum(x for x in (reference_ln, table_ln) if x is not None)
              + (0.0 if boiling_ln is None else boiling_ln if reference_ln is None else 0.5 * boiling_ln)
              + 10.0 * len(violations) + 0.25 * len(doubts))
    return ReadingEvidence(reading, matches_stated(reading, sheet.stated), table_ln, reference_ln, boiling_ln,
                           tuple(violations), tuple(doubts), float(misfit) if math.isfinite(misfit) else math.inf,
                           T_range)


def decode_sheet(sheet: Sheet, reference=None, constants: Mapping[str, float] | None = None,
                 settings: DecodeSettings = DecodeSettings()) -> Decoding:
    """Score every reading of the sheet's coefficients and choose one (module docstring).

    Parameters
    ----------
    sheet : Sheet
    reference : SheetReference, optional
    constants : mapping, optional
        ``T_critical`` [K], ``P_critical`` [Pa], ``T_boiling`` [K] when known.
    settings : DecodeSettings
    """
    constants = dict(constants or {})
    stated_T = sheet.stated.T_unit or "K"
    numbers = _range_numbers(sheet, reference, stated_T)
    readings = candidate_readings(sheet)
    order = {r: i for i, r in enumerate(readings)}
    evidence = [_evidence(sheet, r, numbers, reference, constants, settings) for r in readings]
    ranked = sorted(evidence, key=lambda e: (e.misfit, not e.matches_stated, order[e.reading]))
    # readings the evidence cannot tell apart (atm, bar and kgf/cm² differ by 1–3 %; a sheet's
    # equation and the reference often by as much): the one agreeing with more of what the
    # sheet states, then the more common unit
    noise = max(0.5 * ranked[0].misfit, 0.005)
    close = [e for e in ranked if e.misfit <= ranked[0].misfit + noise]
    close.sort(key=lambda e: (-_parts_as_stated(e.reading, sheet.stated), _COMMONNESS.get(e.reading.P_unit, 99),
                              e.misfit))
    ranked = close + [e for e in ranked if e not in close]
    best = ranked[0]
    twins = [e.reading for e in close[1:] if e.reading.log == best.reading.log
             and e.reading.T_unit == best.reading.T_unit]
    stated_best = next((e for e in ranked if e.matches_stated), None)
    basis = ("reference" if best.reference_ln is not None else
             "table" if best.table_ln is not None and (sheet.table.units_given or sheet.form == "expression"
                                                        or len({r.log for r in readings}) > 1) else
             "normal boiling point" if best.boiling_ln is not None else "physics only")
    chosen = best
    differs = False
    if stated_best is not None and stated_best is not best:
        clearly_better = (stated_best.misfit - best.misfit > settings.decisive_ln
                          and stated_best.misfit > 2.0 * best.misfit)
        breaks = bool(stated_best.violations) and not best.violations
        if clearly_better or breaks:
            differs = True
        else:
            chosen = stated_best  # the evidence does not overturn what the sheet says
    notes = []
    if twins and not differs and chosen is best:
        notes.append(f"the evidence cannot tell {pressure_unit_name(best.reading.P_unit)} from "
                     + ", ".join(pressure_unit_name(t.P_unit) for t in twins)
                     + " (their sizes differ by a few percent, about the equation's own deviation from "
                     "the evidence)")
    if not sheet.stated.complete:
        notes.append(f"the sheet does not state all its units; decoded as {chosen.reading.label} "
                     f"({basis})")
    ranked = [chosen] + [e for e in ranked if e is not chosen]
    return Decoding(sheet.stated, chosen.reading, equation_for(sheet, chosen.reading), tuple(ranked),
                    stated_best, differs, basis, tuple(notes))
