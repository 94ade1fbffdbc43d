"""Literature-like compilations of vapor-pressure data, with the truth of every row.

A compilation is what a curator gathers from the literature: three to ten
sources of one substance, each with its own scatter, systematic offset,
number of rows, temperature range and printing precision, all in one table
under one header.  The generator draws such tables from outside reference
equations and can plant faults whose kind and place it records:

Reference curves (every pressure from an outside reference, never from the audit)
    water (liquid): IAPWS-IF97 saturation equation, ``iapws.iapws97._PSat_T`` [MPa];
    ice Ih: IAPWS R14-08 sublimation equation, ``iapws._iapws._Sublimation_Pressure``
    [MPa]; benzene, toluene, n-hexane, n-heptane, ethanol, acetone, methanol:
    CoolProp (HEOS), ``PropsSI('P', 'T', T, 'Q', 0, fluid)`` [Pa].

Sources
    1–40 rows each (sometimes a single row); relative pressure scatter drawn
    log-uniform from 0.01 % to 30 %; pressures printed to 1–6 significant
    digits and temperatures to 0–3 decimals; replicate groups of 3–6 rows at
    one temperature; evenly spaced or random temperatures; sometimes ranges
    that overlap little (consecutive, nearly disjoint segments).

Systematic offsets (synthetic; the thresholds below are this benchmark's own)
    Each source has a pressure-scale offset (P × (1 + δ), |δ| ≤ 50 %) or a
    thermometer offset (T read δT high, |δT| ≤ 5 K), or none.  An offset is
    measured as the mean shift of ln P it causes, Δ, against the combined
    standard uncertainty u of the difference between the source's mean and
    the other sources' weighted mean (each source's u of the mean is
    √((s² + u_round²)/n), s its scatter, u_round the rounding of its printed
    values, uniform distribution).  Classes:

    * ``within`` — |Δ| ≤ u: within scatter; the source is good;
    * ``grey`` — neither: the audit may or may not report it; counted in no figure;
    * ``biased`` — |Δ| > 3 u and |Δ| ≥ 1 %: a fault the audit should report
      (a source fault of kind ``pressure-scale`` or ``temperature-offset``);
    * ``isolated`` — a ``grey`` or ``biased`` offset on a source that no
      other source (without a gross source fault) reaches in temperature:
      there is nothing to measure the offset against, so it is counted in no
      figure (the audit should say the source was not compared).
      The 1 % floor is common practice for literature compilations: smaller
      offsets are within what independent laboratories agree to.

    Only sources of three rows or more are given a ``biased`` or ``grey`` offset.

Source faults (``fault=`` of :func:`make_compilation`)
    ``pressure-unit``: one whole source printed in another pressure unit than
    the header's (any pair of units the ingest reads whose sizes differ by
    more than 5 %: hPa/mbar and Torr/mmHg are the same size, and bar, atm
    and kgf/cm² within 3.3 % of each other look like a calibration offset);
    ``temperature-unit``: one source printed in °C, K or °F while the header
    says another of these; ``other-compound``: a block of at least three rows
    (or the whole source) taken from another substance's curve at the same
    temperatures (a substance whose pressure there differs by more than 22 %);
    ``copied-series``: one source's printed pressures republished as another
    source with temperatures shifted by 0.5–5 K (or unshifted, with the
    pressures re-rounded to fewer digits); ``point``: one to three gross
    single-row errors (kinds as in ``benchmarks/detection.py``); ``biased``:
    at least one biased source (above); ``None``: a clean compilation (no
    fault, offsets within scatter only).  Biased sources also occur, at a
    realistic rate, in every compilation that is not clean.

All data are synthetic; the seeds make them reproducible.
"""

from __future__ import annotations

import csv
import io
import math
import sys
from dataclasses import dataclass, field, replace
from functools import lru_cache
from pathlib import Path
from typing import Callable

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from benchmarks.detection import _swap, unit_slip_for_factor  # noqa: E402  (shared with the detection benchmark)

__all__ = ["Row", "SourceTruth", "Compilation", "make_compilation", "draw_fault", "SOURCE_FAULTS",
           "FAULTS", "POINT_FAULTS", "EXPECTED_CAUSE", "SUBSTANCES", "sig_text"]

#: source-level faults; each is planted on one source (``biased``: on one or more)
SOURCE_FAULTS = ("pressure-unit", "temperature-unit", "other-compound", "copied-series", "biased")
FAULTS = (None, "point") + SOURCE_FAULTS
#: gross single-row errors, as in benchmarks/detection.py
POINT_FAULTS = ("random-gross", "pressure-unit", "decimal-shift", "digit-swap-P", "digit-swap-T",
                "temperature-unit")
#: cause kind the audit should name for each planted fault (a source's pattern for the offsets)
EXPECTED_CAUSE = {"pressure-unit": "pressure-unit", "temperature-unit": "temperature-unit",
                  "other-compound": "other-compound", "pressure-scale": "pressure-scale",
                  "temperature-offset": "temperature-offset", "decimal-shift": "decimal-shift",
                  "digit-swap-P": "digit-swap", "digit-swap-T": "digit-swap", "random-gross": None}

#: the pressure units the ingest reads (audit/ingest/units.py), with a header spelling of each
PRESSURE_HEADER = {"Pa": "Pa", "mPa": "mPa", "hPa": "hPa", "kPa": "kPa", "MPa": "MPa", "bar": "bar",
                   "mbar": "mbar", "atm": "atm", "Torr": "Torr", "mTorr": "mTorr", "mmHg": "mmHg",
                   "psi": "psia", "inHg": "inHg", "kgf/cm2": "kgf/cm2"}
#: how often each header pressure unit is drawn (common ones more often; synthetic weights)
_P_UNIT_WEIGHT = {"Pa": 4, "mPa": 0.3, "hPa": 1, "kPa": 6, "MPa": 1, "bar": 2, "mbar": 1, "atm": 1,
                  "Torr": 2, "mTorr": 0.3, "mmHg": 4, "psi": 1, "inHg": 0.5, "kgf/cm2": 0.5}
TEMPERATURE_HEADER = {"K": ("K", "K", "kelvin"), "degC": ("°C", "degC", "C"), "degF": ("°F", "degF", "F")}
#: kelvin = scale × printed + offset (ITS-90 definitions; 1 °F = 5/9 K)
_T_SCALE = {"K": (1.0, 0.0), "degC": (1.0, 273.15), "degF": (5.0 / 9.0, 273.15 - 32.0 * 5.0 / 9.0)}


# --------------------------------------------------------------------------- reference curves

@dataclass(frozen=True)
class Curve:
    """One reference vapor-pressure (or sublimation) curve.

    Attributes
    ----------
    name : str
        Substance name as the compilation prints it.
    T_min, T_max : float
        Range drawn from [K].
    phase : str
        ``'liquid'`` or ``'solid'``.
    p : callable
        Pressure [Pa] at a temperature array [K].
    reference : str
        Where the values come from.
    """

    name: str
    T_min: float
    T_max: float
    phase: str
    p: Callable[[np.ndarray], np.ndarray] = field(compare=False, repr=False)
    reference: str = ""


def _water(T):
    from iapws.iapws97 import _PSat_T

    return np.array([_PSat_T(float(t)) * 1e6 for t in np.atleast_1d(T)])  # MPa -> Pa


def _ice(T):
    from iapws._iapws import _Sublimation_Pressure

    return np.array([_Sublimation_Pressure(float(t)) * 1e6 for t in np.atleast_1d(T)])  # MPa -> Pa


def _coolprop(fluid):
    def p(T):
        import CoolProp.CoolProp as CP

        return np.array([CP.PropsSI("P", "T", float(t), "Q", 0, fluid) for t in np.atleast_1d(T)])
    return p


# ranges stay 6 K inside the triple and critical points, so a 5 K thermometer offset stays valid
_ORGANICS = {"benzene": ("Benzene", 285.0, 540.0), "toluene": ("Toluene", 200.0, 570.0),
             "n-hexane": ("n-Hexane", 190.0, 490.0), "n-heptane": ("n-Heptane", 195.0, 520.0),
             "ethanol": ("Ethanol", 200.0, 500.0), "acetone": ("Acetone", 190.0, 490.0),
             "methanol": ("Methanol", 190.0, 495.0)}


@lru_cache(maxsize=None)
def curves() -> dict[str, Curve]:
    """Every reference curve by substance name (ranges kept inside each equation's validity)."""
    out = {"water": Curve("water", 273.16, 620.0, "liquid", _water, "IAPWS-IF97 (iapws)"),
           "ice": Curve("ice", 130.0, 273.16, "solid", _ice, "IAPWS R14-08 (iapws)")}
    for name, (fluid, lo, hi) in _ORGANICS.items():
        out[name] = Curve(name, lo, hi, "liquid", _coolprop(fluid), f"CoolProp HEOS {fluid}")
    return out


SUBSTANCES = ("water", "ice", "water+ice") + tuple(_ORGANICS)


# --------------------------------------------------------------------------- printing

def sig_text(value: float, digits: int) -> str:
    """`value` printed to `digits` significant digits, as a table prints it.

    Plain decimals between 1e-5 and 1e9, exponent notation outside.
    """
    if value == 0 or not math.isfinite(value):
        return "0"
    e = math.floor(math.log10(abs(value)))
    if not -5 <= e < 9:
        return f"{value:.{digits - 1}e}"
    dec = digits - 1 - e
    q = round(value, dec)
    return f"{q:.{max(dec, 0)}f}"


def _dec_text(value: float, decimals: int) -> str:
    return f"{round(value, decimals):.{decimals}f}"


def _rounding_u_ln(text: str, digits: int | None = None) -> float:
    """Standard uncertainty of ln(value) from the rounding of its printed text (uniform).

    With `digits`, the significant digits the value was printed to: an integer
    such as ``2000`` printed to one digit was rounded to the nearest 1000, not
    the nearest 1, which the text alone cannot tell.
    """
    t = text.lower()
    mant, _, exp = t.partition("e")
    dec = len(mant.split(".")[1]) if "." in mant else 0
    step = 10.0 ** (-dec + (int(exp) if exp else 0))
    v = abs(float(text))
    if digits is not None and v > 0:
        step = max(step, 10.0 ** (math.floor(math.log10(v)) - digits + 1))
    return step / math.sqrt(12) / v if v > 0 else math.inf


def to_unit_T(T_K, unit):
    s, o = _T_SCALE[unit]
    return (np.asarray(T_K) - o) / s


def from_unit_T(t, unit):
    s, o = _T_SCALE[unit]
    return np.asarray(t) * s + o


#: pint expression of each pressure unit (pint's factors follow NIST SP 811, Appendix B.8)
_PINT = {"Pa": "pascal", "mPa": "millipascal", "hPa": "hectopascal", "kPa": "kilopascal", "MPa": "megapascal",
         "bar": "bar", "mbar": "millibar", "atm": "standard_atmosphere", "Torr": "torr", "mTorr": "millitorr",
         "mmHg": "millimeter_Hg", "psi": "pound_force_per_square_inch", "inHg": "inch_Hg",
         "kgf/cm2": "kilogram_force / centimeter ** 2"}


@lru_cache(maxsize=None)
def pascal_per(unit: str) -> float:
    """Pa per one `unit`, from pint (not from the audit, so that a wrong factor there shows)."""
    return float(_ureg().Quantity(1.0, _PINT[unit]).to("pascal").magnitude)


@lru_cache(maxsize=1)
def _ureg():
    import pint

    return pint.UnitRegistry()


# --------------------------------------------------------------------------- the records

@dataclass(frozen=True)
class Row:
    """One printed row and its truth.

    Attributes
    ----------
    T_text, P_text, source : str
        The cells as printed.
    phase : str or None
        The phase cell (when the table has a phase column).
    T_true_K, P_true_Pa : float
        The state on the reference curve this row stands for [K], [Pa].
    fault : str or None
        The planted fault this row carries (a point-fault kind, or the source
        fault's kind for rows of a faulty source or block).
    also_right : str or None
        A cause kind that is as right as the planted one: a decimal point
        moved by a factor that is also the ratio of two common units prints
        the same as that unit slip, and the audit's rule is to name the unit.
    """

    T_text: str
    P_text: str
    source: str
    phase: str | None
    T_true_K: float
    P_true_Pa: float
    fault: str | None = None
    #: another cause kind that is as right (a decimal shift by a factor that is also a ratio of units)
    also_right: str | None = None


@dataclass(frozen=True)
class SourceTruth:
    """What a source is, as generated.

    Attributes
    ----------
    name : str
    rows : tuple of int
        Indices (0-based) of its rows in the compilation.
    scatter : float
        Relative standard deviation of its pressures [-].
    digits, T_decimals : int
        Significant digits of its printed pressures; decimals of its temperatures.
    offset_kind : {'none', 'pressure-scale', 'temperature-offset'}
    offset : float
        δ (relative pressure scale) [-] or δT [K].
    offset_z : float
        |Δ ln P| / u of the offset (see the module docstring).
    offset_class : {'none', 'within', 'grey', 'biased', 'isolated'}
    fault : str or None
        Source fault planted on it (``'pressure-unit'``, ``'temperature-unit'``,
        ``'other-compound'``, ``'copied-series'`` for the copy, or the offset
        kind when ``offset_class == 'biased'``).
    fault_rows : tuple of int
        Rows the fault concerns (all its rows, or the block of another compound).
    detail : dict
        Fault parameters (printed unit, other substance, copy origin and shift, …).
    """

    name: str
    rows: tuple[int, ...]
    scatter: float
    digits: int
    T_decimals: int
    offset_kind: str = "none"
    offset: float = 0.0
    offset_z: float = 0.0
    offset_class: str = "none"
    fault: str | None = None
    fault_rows: tuple[int, ...] = ()
    detail: dict = field(default_factory=dict)

    @property
    def good(self) -> bool:
        """No planted fault and an offset within scatter (point faults are judged per row)."""
        return self.fault is None and self.offset_class in ("none", "within")


@dataclass(frozen=True)
class Compilation:
    """A printed compilation and its truth.

    Attributes
    ----------
    substance : str
        Substance name (``'water+ice'`` for both branches of water).
    T_unit, P_unit : str
        Header units (canonical: ``'K'``, ``'degC'``, ``'degF'``; a key of
        :data:`PRESSURE_HEADER`).
    header : tuple of str
        Column headers in printed order.
    columns : tuple of str
        Which field each column holds (``'T'``, ``'P'``, ``'source'``, ``'phase'``).
    delimiter : str
    rows : tuple of Row
    sources : tuple of SourceTruth
    fault : str or None
        The fault class asked for.
    copies : tuple of tuple of str
        Planted (original, copy) source pairs.
    """

    substance: str
    T_unit: str
    P_unit: str
    header: tuple[str, ...]
    columns: tuple[str, ...]
    delimiter: str
    rows: tuple[Row, ...]
    sources: tuple[SourceTruth, ...]
    fault: str | None
    copies: tuple[tuple[str, str], ...] = ()

    def to_csv(self) -> str:
        """The table as printed (header line, then one line per row)."""
        buf = io.StringIO()
        w = csv.writer(buf, delimiter=self.delimiter, lineterminator="\n")
        w.writerow(self.header)
        get = {"T": lambda r: r.T_text, "P": lambda r: r.P_text, "source": lambda r: r.source,
               "phase": lambda r: r.phase or ""}
        for r in self.rows:
            w.writerow([get[c](r) for c in self.columns])
        return buf.getvalue()

    def write(self, path: Path) -> Path:
        """Write :meth:`to_csv` to `path` (UTF-8); return it."""
        path.write_text(self.to_csv(), encoding="utf-8")
        return path

    def source(self, name: str) -> SourceTruth:
        return next(s for s in self.sources if s.name == name)


# --------------------------------------------------------------------------- the generator

def draw_fault(rng: np.random.Generator) -> str | None:
    """A fault class with the benchmark's mix: 25 % clean, 15 % point faults, 12 % each source fault."""
    return FAULTS[int(rng.choice(len(FAULTS), p=[0.25, 0.15, 0.12, 0.12, 0.12, 0.12, 0.12]))]


_DIGIT_P = np.array([0.04, 0.08, 0.2, 0.26, 0.26, 0.16])  # 1..6 significant digits (synthetic mix)
_LABELS = ("Adams", "Baker", "Chen", "Dubois", "Eriksen", "Fujita", "García", "Haddad", "Ivanova", "Jensen",
           "Kowalski", "Larsen", "Moreau", "Nakamura", "Okafor", "Petrov", "Quist", "Rossi", "Schmidt", "Tanaka")


@dataclass(frozen=True)
class _Draft:
    """A source before printing: its true states and how it measures and prints."""

    name: str
    T_meas: np.ndarray  # temperatures as the source measured them (before printing) [K]
    scatter: float
    digits: int
    T_decimals: int
    p: Callable[[np.ndarray], np.ndarray]  # the compilation's true curve [K] -> [Pa]
    noise: np.ndarray  # standard normal draws, one per row


def _T_grid(rng, lo, hi, n, T_decimals, replicates):
    """The measured temperatures of one source [K] (sorted ascending)."""
    if n == 1:
        return np.array([rng.uniform(lo, hi)])
    groups = []
    if replicates and n >= 3:
        left = n
        while left >= 3 and len(groups) < 3:
            g = int(rng.integers(3, min(6, left) + 1))
            groups.append(g)
            left -= g
            if rng.random() < 0.5:
                break
        singles = n - sum(groups)
    else:
        singles = n
    k = singles + len(groups)
    if rng.random() < 0.5 and k > 1:
        step = (hi - lo) / (k - 1)
        nice = [s for s in (0.1, 0.2, 0.5, 1, 2, 2.5, 5, 10, 20, 25, 50) if s <= step]
        step = nice[-1] if nice else step
        start = lo + rng.uniform(0, max(hi - lo - step * (k - 1), 0))
        start = round(start / step) * step if nice else start
        T = start + step * np.arange(k)
    else:
        T = np.sort(rng.uniform(lo, hi, k))
    T = np.clip(T, lo, hi)
    order = rng.permutation(k)
    reps = np.ones(k, dtype=int)
    reps[order[:len(groups)]] = groups
    return np.sort(np.repeat(T, reps))


def _ranges(rng, curve_lo, curve_hi, n_src, little_overlap):
    """(lo, hi) of each source [K] within the compilation's window."""
    width = (curve_hi - curve_lo) * rng.uniform(0.4, 1.0)
    lo = rng.uniform(curve_lo, curve_hi - width)
    hi = lo + width
    if little_overlap:
        edges = np.sort(rng.uniform(lo, hi, n_src - 1))
        edges = np.concatenate([[lo], edges, [hi]])
        pad = 0.02 * width
        return [(edges[i], min(hi, edges[i + 1] + pad)) for i in range(n_src)]
    out = []
    for _ in range(n_src):
        w = width * rng.uniform(0.1, 1.0)
        a = rng.uniform(lo, hi - w)
        out.append((a, a + w))
    return out


def _curves_for(substance):
    c = curves()
    if substance == "water+ice":
        return [c["ice"], c["water"]]
    return [c[substance]]


def _dlnp_dT(p, T):
    """d ln P/dT [1/K] by a central difference of 0.02 K."""
    T = np.asarray(T, float)
    return (np.log(p(T + 0.01)) - np.log(p(T - 0.01))) / 0.02


def _u_mean(d: _Draft, P_true):
    """u of the mean ln P of a source: scatter and rounding of P and T (uniform), over √n."""
    n = len(d.T_meas)
    u_round_P = np.array([_rounding_u_ln(sig_text(p, d.digits), d.digits) for p in P_true])
    u_round_T = 10.0 ** -d.T_decimals / math.sqrt(12) * np.abs(_dlnp_dT(d.p, d.T_meas))
    var = d.scatter ** 2 + np.mean(u_round_P ** 2 + u_round_T ** 2)
    return math.sqrt(var / n)


def _offset(rng, d: _Draft, u, clean):
    """(kind, δ, z, class) of one source's systematic offset (see the module docstring)."""
    n = len(d.T_meas)
    probs = {"none": 0.55, "within": 0.45} if clean or n < 3 else \
        {"none": 0.45, "within": 0.35, "grey": 0.08, "biased": 0.12}
    cls = str(rng.choice(list(probs), p=list(probs.values())))
    return _offset_of_class(rng, d, u, cls)


def _offset_of_class(rng, d: _Draft, u, cls):
    if cls == "none":
        return "none", 0.0, 0.0, "none"
    kind = "pressure-scale" if rng.random() < 0.5 else "temperature-offset"
    slope = float(np.mean(_dlnp_dT(d.p, d.T_meas)))  # Δ ln P per K of thermometer offset
    max_lnp = math.log(1.5) if kind == "pressure-scale" else 5.0 * abs(slope)
    lo_hi = {"within": (0.0, u), "grey": (u, 3 * u), "biased": (max(3 * u, math.log(1.01)) * 1.05, max_lnp)}[cls]
    lo, hi = lo_hi[0], min(lo_hi[1], max_lnp)
    if hi <= lo:
        if cls == "within":
            return "none", 0.0, 0.0, "none"
        return _offset_of_class(rng, d, u, "within")
    # log-uniform magnitude (uniform within scatter), random sign
    mag = rng.uniform(lo, hi) if cls == "within" else math.exp(rng.uniform(math.log(lo), math.log(hi)))
    sign = 1.0 if rng.random() < 0.5 else -1.0
    delta = sign * (math.expm1(mag) if kind == "pressure-scale" else mag / abs(slope))
    return kind, delta, mag / u if u > 0 else math.inf, cls


def _pressure_unit_pair(rng, header_unit):
    """Another unit the ingest reads, more than 5 % away in size from the header's."""
    others = [u for u in PRESSURE_HEADER if abs(math.log(pascal_per(u) / pascal_per(header_unit))) > math.log(1.05)]
    return others[int(rng.integers(len(others)))]


def _other_compound(rng, substance, p_true, T):
    """Another substance whose curve covers `T` [K] (±5 K) and differs there by more than 22 % in P."""
    c = curves()
    names = [n for n, cv in c.items() if n not in (substance, "ice") and cv.T_min <= T.min() - 5
             and cv.T_max >= T.max() + 5 and not (substance == "water+ice" and n == "water")]
    rng.shuffle(names)
    own = p_true(T)
    for n in names:
        if abs(np.median(np.log(c[n].p(T) / own))) > math.log(1.22):
            return c[n]
    return None


def make_compilation(rng: np.random.Generator, *, fault: str | None, replicate_only: bool = False,
                     one_point_sources: bool = False, wide_span: bool = False, identical_rows: bool = False,
                     no_overlap: bool = False, substance: str | None = None) -> Compilation:
    """Draw one literature-like compilation.

    Parameters
    ----------
    rng : numpy.random.Generator
    fault : str or None
        One of :data:`FAULTS` (``None``: clean).
    replicate_only : bool
        Every source measures at one or two temperatures only (replicate groups).
    one_point_sources : bool
        Some sources have a single row.
    wide_span : bool
        Water and ice over 130–373 K: pressures from about 1e-8 Pa to 1e5 Pa
        in one source.
    identical_rows : bool
        Some rows printed twice, identically.
    no_overlap : bool
        Sources on disjoint temperature ranges.
    substance : str or None
        Force one of :data:`SUBSTANCES`.

    Returns
    -------
    Compilation
    """
    if fault not in FAULTS:
        raise ValueError(f"unknown fault {fault!r}; one of {FAULTS}")
    clean = fault is None
    substance = substance or ("water+ice" if wide_span else SUBSTANCES[int(rng.integers(len(SUBSTANCES)))])
    branch_curves = _curves_for(substance)
    n_src = int(rng.integers(3, 11))
    if fault == "copied-series":
        n_src = min(n_src, 9)  # the copy is one more
    # ---- drafts: where and how each source measures
    names = list(rng.choice(_LABELS, n_src, replace=False))
    years = rng.integers(1890, 2024, n_src)
    names = [f"{a} {y}" for a, y in zip(names, years)]
    if wide_span:
        windows = [(130.0, 373.15)] * n_src
    else:
        lo_all = min(c.T_min for c in branch_curves)
        hi_all = max(c.T_max for c in branch_curves)
        if substance == "water+ice":
            lo_all, hi_all = 200.0, 420.0
        windows = _ranges(rng, lo_all, hi_all, n_src, no_overlap or rng.random() < 0.25)
    def branch_of(T):
        if len(branch_curves) == 1:
            return branch_curves[0]
        return branch_curves[0] if T < 273.16 else branch_curves[1]

    def p_true(T):
        return np.array([float(branch_of(t).p(np.array([t]))[0]) for t in np.atleast_1d(T)])

    drafts: list[_Draft] = []
    for i, name in enumerate(names):
        n = int(rng.integers(1, 41)) if rng.random() < 0.85 else int(rng.integers(1, 4))
        if one_point_sources and rng.random() < 0.5:
            n = 1
        if fault == "copied-series" and i == 0:
            n = max(n, 5)
        lo, hi = windows[i]
        if wide_span and i == 0:
            n = max(n, 25)
        if replicate_only:
            counts = [n - n // 2, n // 2] if n > 1 else [1]
            T = np.sort(np.repeat(rng.uniform(lo, hi, len(counts)), counts))
        else:
            T = _T_grid(rng, lo, hi, n, 0, rng.random() < 0.2)
        scatter = math.exp(rng.uniform(math.log(1e-4), math.log(0.3)))
        digits = int(rng.choice(6, p=_DIGIT_P)) + 1
        T_dec = int(rng.choice(4, p=[0.15, 0.35, 0.35, 0.15]))
        drafts.append(_Draft(name, T, scatter, digits, T_dec, p_true, rng.standard_normal(len(T))))

    # ---- offsets judged against the others' weighted mean
    u_src = [_u_mean(d, p_true(d.T_meas)) for d in drafts]
    offsets = []
    for i, d in enumerate(drafts):
        others = [u for j, u in enumerate(u_src) if j != i]
        u_others = 1 / math.sqrt(sum(1 / u ** 2 for u in others)) if others else 0.0
        u = math.hypot(u_src[i], u_others)
        offsets.append(_offset(rng, d, u, clean) + (u,))
    if fault == "biased" and not any(o[3] == "biased" for o in offsets):
        cands = [i for i, d in enumerate(drafts) if len(d.T_meas) >= 3]
        if not cands:
            i = 0
            drafts[0] = replace(drafts[0], T_meas=_T_grid(rng, *windows[0], 8, 0, False),
                                noise=rng.standard_normal(8))
            u_src[0] = _u_mean(drafts[0], p_true(drafts[0].T_meas))
            cands = [0]
        i = cands[int(rng.integers(len(cands)))]
        u = offsets[i][4]
        offsets[i] = _offset_of_class(rng, drafts[i], u, "biased") + (u,)
    # ---- layout and units
    T_unit = str(rng.choice(["K", "degC", "degF"], p=[0.7, 0.25, 0.05]))
    P_unit = str(rng.choice(list(_P_UNIT_WEIGHT), p=np.array(list(_P_UNIT_WEIGHT.values())) /
                            sum(_P_UNIT_WEIGHT.values())))
    with_phase = substance == "water+ice" or rng.random() < 0.15
    # ---- which source carries the source fault
    faulty = int(rng.integers(n_src))
    src_fault: dict = {}
    if fault == "pressure-unit":
        src_fault = {"unit": _pressure_unit_pair(rng, P_unit)}
    elif fault == "temperature-unit":
        src_fault = {"unit": str(rng.choice([u for u in _T_SCALE if u != T_unit]))}
    elif fault == "other-compound":
        cands = [i for i, d in enumerate(drafts) if len(d.T_meas) >= 3] or [faulty]
        faulty = cands[int(rng.integers(len(cands)))]
        d = drafts[faulty]
        if len(d.T_meas) < 3:
            drafts[faulty] = d = replace(d, T_meas=_T_grid(rng, *windows[faulty], 6, 0, False),
                                         noise=rng.standard_normal(6))
        n = len(d.T_meas)
        if rng.random() < 0.4:
            block = (0, n)
        else:
            size = int(rng.integers(3, n + 1))
            start = int(rng.integers(0, n - size + 1))
            block = (start, start + size)
        other = _other_compound(rng, substance, p_true, d.T_meas[block[0]:block[1]])
        src_fault = {"other": other, "block": block} if other is not None else {}
    elif fault == "copied-series":
        faulty = 0  # the original; the copy is appended below
    # ---- print every source
    rows: list[Row] = []
    truths: list[SourceTruth] = []
    printed_src: dict[str, tuple[list[str], list[str], np.ndarray, np.ndarray]] = {}
    for i, d in enumerate(drafts):
        kind, delta, z, cls, _u = offsets[i]
        T_meas = d.T_meas
        T_true = T_meas - delta if kind == "temperature-offset" else T_meas.copy()
        P = p_true(T_true)
        P_true = P.copy()
        fault_here = None
        fault_rows: tuple[int, ...] = ()
        detail: dict = {}
        row_fault = [None] * len(T_meas)
        if i == faulty and fault == "other-compound" and src_fault:
            a, b = src_fault["block"]
            P[a:b] = src_fault["other"].p(T_true[a:b])
            fault_here = "other-compound"
            fault_rows = tuple(range(a, b))
            detail = {"other": src_fault["other"].name, "block": (a, b)}
            for k in range(a, b):
                row_fault[k] = "other-compound"
        if kind == "pressure-scale":
            P = P * (1 + delta)
        P = P * np.exp(d.scatter * d.noise)
        t_unit, p_unit = T_unit, P_unit
        if i == faulty and fault == "pressure-unit":
            p_unit = src_fault["unit"]
            fault_here, detail = "pressure-unit", {"printed_unit": p_unit, "header_unit": P_unit}
        if i == faulty and fault == "temperature-unit":
            t_unit = src_fault["unit"]
            fault_here, detail = "temperature-unit", {"printed_unit": t_unit, "header_unit": T_unit}
        if fault_here in ("pressure-unit", "temperature-unit"):
            fault_rows = tuple(range(len(T_meas)))
            row_fault = [fault_here] * len(T_meas)
        T_dec = d.T_decimals + (1 if t_unit == "degF" and d.T_decimals < 3 else 0)
        T_txt = [_dec_text(float(t), T_dec) for t in to_unit_T(T_meas, t_unit)]
        P_txt = [sig_text(float(p) / pascal_per(p_unit), d.digits) for p in P]
        if cls == "biased" and fault_here is None:
            fault_here = kind
            fault_rows = tuple(range(len(T_meas)))
            detail = {"offset": delta}
        printed_src[d.name] = (T_txt, P_txt, T_true, P_true)
        truths.append(SourceTruth(d.name, (), d.scatter, d.digits, T_dec, kind, delta, z, cls, fault_here,
                                  fault_rows, detail))
        for k in range(len(T_meas)):
            rows.append(Row(T_txt[k], P_txt[k], d.name, branch_of(T_true[k]).phase, float(T_true[k]),
                            float(P_true[k]),
                            row_fault[k] or (fault_here if fault_here in ("pressure-scale", "temperature-offset")
                                             else None)))
    copies: list[tuple[str, str]] = []
    if fault == "copied-series":
        orig = drafts[0]
        T_txt, P_txt, T_true, P_true = printed_src[orig.name]
        n = len(T_txt)
        if rng.random() < 0.5 or n < 6:
            a, b = 0, n
        else:
            size = int(rng.integers(5, n + 1))
            a = int(rng.integers(0, n - size + 1))
            b = a + size
        unshifted = rng.random() < 0.25
        shift = 0.0 if unshifted else float(rng.choice([-1, 1]) * rng.uniform(0.5, 5.0))
        label = f"{rng.choice([x for x in _LABELS if not any(x in s for s in names)])} {int(rng.integers(1890, 2024))}"
        s_T = _T_SCALE[T_unit][0]
        dec = orig.T_decimals if not unshifted else max(0, orig.T_decimals - int(rng.integers(0, 2)))
        c_T = [_dec_text(float(t) + shift / s_T, dec) for t in T_txt[a:b]]
        if unshifted:
            digits = max(1, orig.digits - int(rng.integers(1, 3)))
            c_P = [sig_text(float(p), digits) for p in P_txt[a:b]]
        else:
            digits = orig.digits
            c_P = list(P_txt[a:b])
        truths.append(SourceTruth(label, (), orig.scatter, digits, dec, "none", 0.0, 0.0, "none", "copied-series",
                                  tuple(range(b - a)), {"copy_of": orig.name, "shift_K": shift,
                                                        "rows_of_original": (a, b)}))
        for k in range(b - a):
            rows.append(Row(c_T[k], c_P[k], label, branch_of(T_true[a + k]).phase, float(T_true[a + k]), float(P_true[a + k]),
                            "copied-series"))
        copies.append((orig.name, label))
    # ---- point faults on rows of good sources
    if fault == "point":
        rows = _plant_point_faults(rng, rows, truths, P_unit, T_unit, p_true)
    if identical_rows and rows:
        for _ in range(int(rng.integers(1, 4))):
            k = int(rng.integers(len(rows)))
            rows.insert(k + 1, rows[k])
    # ---- order: sources in blocks (usual), or everything sorted by temperature
    order = list(range(len(rows)))
    if rng.random() < 0.15:
        order.sort(key=lambda k: float(rows[k].T_text))
    elif rng.random() < 0.1:
        order = order[::-1]
    rows = [rows[k] for k in order]
    by_src: dict[str, list[int]] = {}
    for k, r in enumerate(rows):
        by_src.setdefault(r.source, []).append(k)
    # the rows of each source, and those its source fault concerns, as final row indices
    truths = [replace(t, rows=tuple(by_src.get(t.name, ())),
                      fault_rows=tuple(k for k in by_src.get(t.name, ()) if t.fault and rows[k].fault
                                       and not rows[k].fault.startswith("point:")))
              for t in truths]
    truths = _isolate(truths, rows)
    header, columns, delim = _layout(rng, T_unit, P_unit, with_phase)
    if not with_phase:
        rows = [replace(r, phase=None) for r in rows]
    return Compilation(substance, T_unit, P_unit, header, columns, delim, tuple(rows), tuple(truths), fault,
                       tuple(copies))


#: source faults that make a source's rows no yardstick for the others
_GROSS_SOURCE_FAULTS = ("pressure-unit", "temperature-unit", "other-compound")


def _isolate(truths, rows):
    """Sources with a systematic offset that no other source reaches in temperature.

    An offset is a disagreement with the other sources, measurable only
    where they overlap: a source none of whose rows lies within the true
    temperature span of another source's rows on the same branch (sources
    carrying a gross source fault are no yardstick) is classed
    ``isolated`` — counted neither as a biased source to find nor as a good
    one.  The audit is expected to say it was not compared.
    """
    out = []
    for t in truths:
        if t.offset_class in ("none", "within") or t.fault not in (None, "pressure-scale", "temperature-offset"):
            out.append(t)
            continue
        mine = [rows[k] for k in t.rows]
        overlapping = False
        for phase in {r.phase for r in mine}:
            for o in truths:
                if o.name == t.name or o.fault in _GROSS_SOURCE_FAULTS:
                    continue
                others = [r.T_true_K for r in (rows[k] for k in o.rows) if r.phase == phase]
                if others and any(min(others) <= r.T_true_K <= max(others) for r in mine if r.phase == phase):
                    overlapping = True
        out.append(t if overlapping else replace(t, offset_class="isolated", fault=None, fault_rows=()))
    return out


def _ln_p_step(p_true, T_old_K, T_new_K):
    """|Δ ln P| [-] a temperature misprint causes on the true curve (inf off the curve's range)."""
    if not T_new_K > 0:
        return math.inf
    try:
        step = float(np.log(p_true(np.array([T_new_K]))[0] / p_true(np.array([T_old_K]))[0]))
    except (ValueError, NotImplementedError, ZeroDivisionError, FloatingPointError):
        return math.inf
    return abs(step) if math.isfinite(step) else math.inf


def _plant_point_faults(rng, rows, truths, P_unit, T_unit, p_true):
    """One to three gross single-row errors on rows of good sources (kinds as in detection.py).

    Gross means more than 10 times the source's scatter (with its rounding) in ln P and more
    than a factor 1.5 for a plain random error; a digit swap smaller than that is not planted.
    """
    rows = list(rows)
    good = {t.name: t for t in truths if t.good}
    cands = [k for k, r in enumerate(rows) if r.source in good]
    picked = list(rng.choice(cands, size=min(len(cands), int(rng.integers(1, 4))), replace=False)) if cands else []
    for k in picked:
        r = rows[k]
        t = good[r.source]
        kind = POINT_FAULTS[int(rng.integers(len(POINT_FAULTS)))]
        T_txt, P_txt = r.T_text, r.P_text
        also = None
        sig_eff = math.hypot(t.scatter, _rounding_u_ln(P_txt, t.digits))
        if kind == "random-gross":
            step = max(10 * sig_eff, math.log(1.5)) * rng.choice([-1, 1])
            P_txt = sig_text(float(P_txt) * math.exp(step), t.digits)
        elif kind == "pressure-unit":
            alt = _pressure_unit_pair(rng, P_unit)
            P_txt = sig_text(float(P_txt) * pascal_per(P_unit) / pascal_per(alt), max(t.digits, 2))
        elif kind == "decimal-shift":
            power = int(rng.choice([-1, 1]))
            P_txt = sig_text(float(P_txt) * 10.0 ** power, t.digits)
            also = "pressure-unit" if unit_slip_for_factor(P_unit, 10.0 ** power) else None
        elif kind == "digit-swap-P":
            s = _swap(P_txt, rng)
            if s is None or abs(math.log(float(s) / float(P_txt))) < 10 * sig_eff:
                continue  # not a gross error for this source
            P_txt = s
        elif kind == "digit-swap-T":
            s = _swap(T_txt, rng)
            T_old = float(from_unit_T(float(T_txt), T_unit))
            if s is None or _ln_p_step(p_true, T_old, float(from_unit_T(float(s), T_unit))) < 10 * sig_eff:
                continue
            T_txt = s
        elif kind == "temperature-unit":
            alt = "degC" if T_unit != "degC" else "K"
            dec = len(T_txt.split(".")[1]) if "." in T_txt else 0
            T_txt = _dec_text(float(to_unit_T(from_unit_T(float(T_txt), T_unit), alt)), dec)
        if (T_txt, P_txt) == (r.T_text, r.P_text):
            continue
        rows[k] = replace(r, T_text=T_txt, P_text=P_txt, fault="point:" + kind,
                          also_right=also)
    return rows


def _layout(rng, T_unit, P_unit, with_phase):
    """Header texts, column order and delimiter of the printed table."""
    t_word = str(rng.choice(["T", "t", "Temperature", "T"]))
    t_unit = str(rng.choice(TEMPERATURE_HEADER[T_unit]))
    t_head = str(rng.choice([f"{t_word}/{t_unit}", f"{t_word} ({t_unit})", f"{t_word} [{t_unit}]"]))
    p_word = str(rng.choice(["P", "p", "Pressure", "psat"]))
    p_unit = PRESSURE_HEADER[P_unit]
    p_head = str(rng.choice([f"{p_word}/{p_unit}", f"{p_word} ({p_unit})", f"{p_word} [{p_unit}]"]))
    s_head = str(rng.choice(["source", "Reference", "author"]))
    cols = [("T", t_head), ("P", p_head), ("source", s_head)]
    if with_phase:
        cols.append(("phase", "phase"))
    r = rng.random()
    if r < 0.2:
        cols = [cols[2], cols[0], cols[1]] + cols[3:]
    elif r < 0.3:
        cols = [cols[1], cols[0]] + cols[2:]
    delim = str(rng.choice([",", ";", "\t"], p=[0.7, 0.2, 0.1]))
    return tuple(h for _, h in cols), tuple(c for c, _ in cols), delim
