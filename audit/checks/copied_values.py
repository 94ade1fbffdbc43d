"""Check ``copied-values``: one source's printed series repeated by another.

Literature compilations sometimes carry the same measurements twice: a series
republished by a later author (often with the temperatures converted or
"corrected", so shifted by a constant), or copied with a unit conversion.
Each copy looks like an independent confirmation and passes the checks that
compare values, because the values agree.  This check compares the printed
digits of every pair of named sources and reports runs of rows that are too
alike to be independent.
"""

from __future__ import annotations

import math
from bisect import bisect_left, bisect_right
from collections import defaultdict
from dataclasses import dataclass
from functools import partial
from decimal import Decimal, InvalidOperation

from ..model import Point
from ..results import CheckResult, PointFlag
from ..thermo.rounding import (log_pressure_base, parse_printed_number, pressure_rounding_u_lnP,
                               temperature_rounding_u_K)
from ._util import skipped, worst_status
from .registry import Check, Option, register

__all__ = ["CopiedValues", "PrintedValue", "coincidence_probability", "gap_match_probability", "printed_value",
           "same_printed"]

_SQRT2 = math.sqrt(2.0)
_SQRT2PI = math.sqrt(2.0 * math.pi)
_SQRT12 = math.sqrt(12.0)  # a rounding step is √12 times its standard uncertainty (GUM §4.3.7)


def _t_rounding(p: Point) -> float:
    """Standard uncertainty [K] of a printed temperature from its rounding; 0 if unreadable."""
    u = temperature_rounding_u_K(p.T_text, p.T_text_unit)
    return u if math.isfinite(u) else 0.0


def _shift_beyond_rounding(p: Point, q: Point) -> float:
    """|T_q − T_p| less half a step of the coarser printed temperature [K], never below 0
    (81.85 K and 81.9 K may be one temperature)."""
    return max(0.0, abs(q.T_K - p.T_K) - _t_step(p, q) / 2)


def _evidence(pairs, pa, pb, ka, kb, min_digits: int, max_shift_K: float) -> list[tuple[int, int]]:
    """The matched rows of a same-pressure run that count as evidence of a copy.

    Rows whose pressures carry ``min_digits`` digits: coarser values coincide
    too easily (two-digit pressures of independent series a few percent
    apart at temperatures a kelvin apart fall into one rounding cell as
    readily as at one temperature).  When the temperatures are shifted, only
    rows moved by the run's own constant shift (within one printed step),
    and only for a shift within ``max_shift_K`` [K]: a copy is shifted by one
    correction, while pressures that agree at temperatures further apart, or
    at shifts that wander, belong to unrelated parts of the curve (another
    unit, a biased series), not to a copy.  A row that is no evidence
    neither counts nor breaks the run.
    """
    fine = [(i, j) for i, j in pairs if min(ka[i].digits, kb[j].digits) >= min_digits]
    if all(_shift_beyond_rounding(pa[i], pb[j]) == 0 for i, j in pairs):
        return fine
    shift = _median([pb[j].T_K - pa[i].T_K for i, j in pairs])
    if not abs(shift) <= max_shift_K:
        return []
    return [(i, j) for i, j in fine if abs(pb[j].T_K - pa[i].T_K - shift) <= _t_step(pa[i], pb[j])]


def _t_step(p: Point, q: Point) -> float:
    """One step of the coarser of two printed temperatures [K]."""
    return _SQRT12 * max(_t_rounding(p), _t_rounding(q))


def gap_match_probability(T_a, T_b, tolerance: float) -> float:
    """Chance that two independent series space consecutive temperatures alike.

    The share of all pairs (g_a, g_b) of a consecutive temperature step of
    one series and one of the other that differ by at most `tolerance`: 1
    for two series on one even grid (300, 310, 320 K … — alike by design,
    no evidence), small for temperatures set where each laboratory happened
    to measure.  An empirical (permutation) estimate from the two series
    themselves; their shared steps, if one copies the other, raise it by
    about one over the number of steps, so it errs toward chance.

    Parameters
    ----------
    T_a, T_b : array_like
        Temperatures of the two series, sorted [K].
    tolerance : float
        Largest difference of two steps still alike [K].

    Returns
    -------
    float
        Probability in [0, 1]; 1 when either series has fewer than two temperatures.

    Examples
    --------
    >>> gap_match_probability([300.0, 310.0, 320.0], [305.0, 315.0, 325.0], 0.1)
    1.0
    >>> gap_match_probability([300.0, 303.1, 311.4, 312.0], [301.0, 307.7, 309.9, 318.9], 0.1)
    0.0
    """
    ga = [b - a for a, b in zip(T_a, T_a[1:])]
    gb = [b - a for a, b in zip(T_b, T_b[1:])]
    if not ga or not gb:
        return 1.0
    gb_sorted = sorted(gb)
    alike = sum(bisect_right(gb_sorted, g + tolerance) - bisect_left(gb_sorted, g - tolerance) for g in ga)
    return alike / (len(ga) * len(gb))


def coincidence_probability(width: float, mu: float, sigma: float) -> float:
    """Probability that two independent values print alike at resolution `width`.

    Two values whose difference is ``d`` fall into the same cell of a grid of
    spacing ``width`` (whose position relative to the values is arbitrary)
    with probability ``max(0, 1 − |d|/width)``.  Averaged over
    ``d ~ N(mu, sigma²)`` this is, in closed form,

        E = G(−w, 0) + G(0, w) + [μ·(G(−w, 0) − G(0, w)) + σ²·(f(−w) − 2 f(0) + f(w))]/w

    with ``G(a, b) = Φ((b−μ)/σ) − Φ((a−μ)/σ)`` and ``f`` the normal density.

    Parameters
    ----------
    width : float
        Grid spacing (one unit of the last printed digit) [same unit as mu].
    mu : float
        Expected difference of the two independent values.
    sigma : float
        Standard deviation of their difference.

    Returns
    -------
    float
        Probability in [0, 1]; 1 for a zero width is not possible, so a
        non-positive width gives 0.
    """
    if not (width > 0) or not math.isfinite(width) or not math.isfinite(mu):
        return 0.0
    if not (sigma > 0) or not math.isfinite(sigma):
        return max(0.0, 1.0 - abs(mu) / width)

    def cdf(x: float) -> float:
        return 0.5 * (1.0 + math.erf((x - mu) / (sigma * _SQRT2)))

    def pdf(x: float) -> float:
        return math.exp(-0.5 * ((x - mu) / sigma) ** 2) / (sigma * _SQRT2PI)

    w = width
    g_lo, g_hi = cdf(0.0) - cdf(-w), cdf(w) - cdf(0.0)
    e = g_lo + g_hi + (mu * (g_lo - g_hi) + sigma ** 2 * (pdf(-w) - 2.0 * pdf(0.0) + pdf(w))) / w
    return min(1.0, max(0.0, e))


@dataclass(frozen=True)
class PrintedValue:
    """One printed cell: the number it shows, its last digit and resolution.

    Attributes
    ----------
    value : Decimal or None
        The printed number, exactly; None for text that is not a finite,
        non-zero decimal number.
    step : Decimal or None
        One unit of the last printed digit [column unit].
    digits : int
        Significant digits as printed.  Unlike :mod:`audit.thermo.rounding`
        (where a larger uncertainty is the cautious reading), an integer's
        trailing zeros are not counted: ``1000`` is one digit, step 1000.
    resolution_lnP : float
        ``step`` as a difference in ln P [-] (meaningful for pressures).
    """

    value: Decimal | None
    step: Decimal | None
    digits: int
    resolution_lnP: float


_UNREAD = PrintedValue(None, None, 0, math.nan)


def printed_value(text: str, P_text_unit: str = "Pa") -> PrintedValue:
    """Read a printed cell (grouping characters, decimal commas and exponents allowed).

    Parameters
    ----------
    text : str
        The cell as printed.
    P_text_unit : str
        The column unit; for a log-pressure column (``'log10(P/Pa)'``) the
        resolution in ln P is ln(10)·step rather than step/value.
    """
    try:
        pn = parse_printed_number(text)
        value = Decimal(pn.normalized)
    except (ValueError, InvalidOperation):
        return _UNREAD
    if not value.is_finite() or value == 0:
        return _UNREAD
    exponent = value.as_tuple().exponent
    if exponent == 0:
        # an integer's trailing zeros may be padding ("1000" for a value known to one digit): for the
        # chance of a coincidence the coarser reading is the cautious one
        exponent = value.normalize().as_tuple().exponent
    step = Decimal(1).scaleb(exponent)
    digits = max(int(value.adjusted() - exponent + 1), 0)
    base = log_pressure_base(P_text_unit)
    res = math.log(base) * float(step) if base is not None else float(step / abs(value))
    return PrintedValue(value, step, digits, res)


def same_printed(a: PrintedValue, b: PrintedValue) -> bool:
    """Do two cells print the same number, at the coarser of their two precisions?

    ``10.02`` and ``10.020`` do; so do ``10.0234`` and ``10.02`` (the second
    is the first rounded to its digits), and ``300.15`` and ``300.2``.
    Exact decimal arithmetic: no binary rounding decides a match.
    """
    if a.value is None or b.value is None:
        return False
    return abs(a.value - b.value) <= max(a.step, b.step) / 2


def _maximal_runs(xs: list[PrintedValue], ys: list[PrintedValue], min_len: int) -> list[tuple[int, int, int]]:
    """Maximal runs (start in xs, start in ys, length) of cells that :func:`same_printed` matches."""
    # the cells of ys by printed step, each group sorted by value: a cell x matches only ys within
    # half the coarser step of its own group, so a few coarse cells do not widen every search
    # (with one window as wide as the coarsest step, 20 000 rows took minutes)
    by_step: dict[Decimal, list[tuple[Decimal, int]]] = {}
    for j, y in enumerate(ys):
        if y.value is not None:
            by_step.setdefault(y.step, []).append((y.value, j))
    groups = []
    for step, members in by_step.items():
        members.sort()
        groups.append((step, members, [v for v, _ in members]))
    length: dict[tuple[int, int], int] = {}
    for i, x in enumerate(xs):
        if x.value is None:
            continue
        matches = []
        for step, members, values in groups:
            reach = max(x.step, step) / 2
            for k in range(bisect_left(values, x.value - reach), bisect_right(values, x.value + reach)):
                if same_printed(x, ys[members[k][1]]):
                    matches.append(members[k])
        for _, j in sorted(matches):
            length[(i, j)] = length.get((i - 1, j - 1), 0) + 1
    return [(i - n + 1, j - n + 1, n) for (i, j), n in length.items()
            if n >= min_len and (i + 1, j + 1) not in length]


def _clapeyron_slope(points: list[Point], consensus=None) -> float:
    """B [K] of ln P = A − B/T: the consensus's, else fitted by least squares to all the points;
    0 when undetermined.

    Used only to say how far apart two independent pressures at temperatures
    T_a and T_b should be, B·(1/T_a − 1/T_b) in ln P; 0 (no expected
    difference) is the lenient choice when the data cannot tell.  The
    consensus's fit of record (of its largest branch, B = T²·d ln P/dT at the
    median of its temperatures) comes first: a least-squares line through
    every point, a series in the wrong unit included, can give a slope many
    times the substance's, and with it call any coarse agreement a copy.
    """
    import numpy as np

    branches = [] if not consensus else [c for c in consensus.branches.values() if c.fit_data.n >= 2]
    if branches:
        c = max(branches, key=lambda b: b.fit_data.n)
        T_mid = np.float64(np.median(c.fit_data.T))
        with np.errstate(all="ignore"):
            # numpy floats: a garbage table's 1e200 K squares to inf (then "cannot tell"), not an error
            B = float(T_mid * T_mid * c.fit.equation.dlnp_dT(np.array([T_mid]))[0])
        if math.isfinite(B) and B > 0:
            return B
    if len(points) < 2:
        return 0.0
    # a temperature of 1e-300 K makes 1/T² overflow: inf or NaN here, and "cannot tell" below
    with np.errstate(all="ignore"):
        x = 1.0 / np.array([p.T_K for p in points], float)
        y = np.log(np.array([p.P_Pa for p in points], float))
        dx, dy = x - x.mean(), y - y.mean()
        sxx = float(np.sum(dx * dx))
        B = -float(np.sum(dx * dy)) / sxx if math.isfinite(sxx) and sxx > 0 else math.nan
    return B if math.isfinite(B) and B > 0 else 0.0


def _sigma_independent(p: Point, q: Point, scatter: float, measured: dict, shifted: bool = False) -> float:
    """Standard deviation [-] in ln P of the difference of two independent readings.

    The closest agreement of independent data, `scatter`, or the combined
    stated u(P) when smaller; with no stated u, the scatter the two rows'
    sources show about the consensus beyond their printed rounding
    (`measured`, source → [-], see :func:`_own_scatter`) when both are
    larger: two series that each scatter 2 % about the curve do not agree to
    0.1 % row after row by chance.  √2 times the smaller of the two, so that
    one source whose scatter is overstated (a block of another compound
    inside it widens its MAD) cannot make a pair look copied — except for
    readings at temperatures `shifted` apart beyond their rounding, where
    the expected difference is what makes a match improbable and the
    spread of that difference is √(s_p² + s_q²).
    """
    if p.u_P_Pa and q.u_P_Pa and p.u_P_Pa > 0 and q.u_P_Pa > 0:
        return min(scatter, math.hypot(p.u_P_Pa / p.P_Pa, q.u_P_Pa / q.P_Pa))
    s_p, s_q = measured.get(p.source, 0.0), measured.get(q.source, 0.0)
    if shifted:
        # at shifted temperatures a match is evidence only because the values should differ: the
        # difference of two independent readings spreads by both scatters, and a 15 % series that
        # lands on a precise one's shifted values by chance must not pass for its copy
        return max(scatter, math.hypot(s_p, s_q))
    return max(scatter, _SQRT2 * min(s_p, s_q))


#: fewest judged rows whose deviations give a source's own scatter: a MAD of four values is
#: already uncertain by half, and an overstated scatter makes chance agreement look improbable
_OWN_SCATTER_ROWS = 5


def _own_scatter(points: list[Point], deviation_percent, B: float) -> float:
    """A source's relative scatter about the consensus beyond its printed rounding [-].

    The robust (MAD) scale of its rows' deviations from the fit of record (its
    offset removed), with the variance its printed rounding explains taken
    out: the pressure's rounding is the width of a coincidence, and the
    temperature's, through the slope B/T² of ln P ([K] of ln P = A − B/T),
    moves two sources alike when they measured at one set point.  0 with
    fewer than ``_OWN_SCATTER_ROWS`` judged rows.
    """
    from ..thermo.stats import mad_scale

    judged = [(p, deviation_percent[p.row]) for p in points if math.isfinite(deviation_percent.get(p.row, math.nan))]
    lnr = [math.log1p(d / 100) for _, d in judged if d > -100]
    if len(lnr) < _OWN_SCATTER_ROWS:
        return 0.0

    def rounding(p: Point) -> float:
        r_P = pressure_rounding_u_lnP(p.P_text, p.P_text_unit)
        # B/T/T, not B/T²: a temperature of 1e200 K would overflow the square
        r_T = _t_rounding(p) * B / p.T_K / p.T_K if p.T_K > 0 else math.nan
        return sum(x * x for x in (r_P, r_T) if math.isfinite(x))

    explained = _median([rounding(p) for p, _ in judged])
    return math.sqrt(max(0.0, mad_scale(lnr) ** 2 - explained))


def _median(x: list[float]) -> float:
    s = sorted(x)
    n = len(s)
    return s[n // 2] if n % 2 else 0.5 * (s[n // 2 - 1] + s[n // 2])


def _family_probability(p_run: float, n_alignments: int) -> float:
    """Šidák: chance that at least one of n alignments shows such a run."""
    if p_run <= 0:
        return 0.0
    if p_run >= 1:
        return 1.0
    return -math.expm1(n_alignments * math.log1p(-p_run))


def _row_ranges(rows: list[int]) -> str:
    """``[12, 13, 14, 20]`` → ``'12–14, 20'``."""
    rows = sorted(set(rows))
    parts, start = [], rows[0]
    for prev, cur in zip(rows, rows[1:] + [None]):
        if cur is None or cur != prev + 1:
            parts.append(f"{start}–{prev}" if prev > start else f"{start}")
            start = cur
    return ", ".join(parts)


@dataclass(frozen=True)
class _Copy:
    source_a: str
    source_b: str
    rows_a: tuple[int, ...]
    rows_b: tuple[int, ...]
    shared: str  # "pressure" or "temperature"
    shift_K: float
    shift_spread_K: float
    ratio: float | None
    chance: float  # family-wise probability of so close a run between independent sources
    same_T: bool  # the temperatures print the same too (at the coarser precision)

    def metrics(self) -> dict:
        return {"source_a": self.source_a, "source_b": self.source_b,
                "rows_a": list(self.rows_a), "rows_b": list(self.rows_b),
                "shift_K": self.shift_K, "shift_spread_K": self.shift_spread_K,
                "shared": self.shared, "ratio": self.ratio, "n_rows": len(self.rows_a),
                "chance_probability": self.chance}

    def what(self) -> str:
        n = len(self.rows_a)
        if self.shared == "pressure":
            if self.same_T:
                how = "at the same temperatures"
            else:
                how = f"temperatures shifted by {self.shift_K:+.2f} K"
                if self.shift_spread_K >= 0.005:
                    how += f" (spread {self.shift_spread_K:.2f} K)"
            return f"print the same {n} pressures", how
        if self.ratio is not None and abs(self.ratio - 1.0) < 1e-9:
            return f"print the same {n} temperatures", "with pressures that agree to the last printed digit"
        return (f"print the same {n} temperatures",
                f"with pressures in the constant ratio {self.ratio:.6g} to the printed digits")

    def message(self) -> str:
        shared, how = self.what()
        return (f"sources '{self.source_a}' and '{self.source_b}' {shared} (rows "
                f"{_row_ranges(list(self.rows_a))} and {_row_ranges(list(self.rows_b))}), {how}: one series is "
                f"likely copied from the other — keep one (chance of so close a match between independent "
                f"sources {'< 1e-12' if self.chance < 1e-12 else f'{self.chance:.1g}'})")


@register
class CopiedValues(Check):
    """Runs of printed values one source shares with another.

    **What it checks.** For every pair of named sources, each sorted by
    temperature: runs of at least ``min_run`` consecutive rows where

    * the printed pressures are the same numbers, at the same temperatures
      or at temperatures shifted by one constant (within one printed step,
      at most ``max_shift_K``), or
    * the printed temperatures are the same and the pressures agree with one
      constant ratio to within the rounding of their printed digits (a copy
      through a unit conversion or a rescaling).

    "The same number" is judged at the coarser of the two printed
    precisions: ``10.0234`` and ``10.02`` are the same number (the second is
    the first rounded), as are ``300.15`` and ``300.2`` — a copy re-rounded to
    fewer digits is still a copy.

    A run is reported only when at least ``min_run`` of its pressures carry
    ``min_significant_digits`` digits or more (coarser rows neither count nor
    break the run) and when so close a match between two independent
    sources would have a probability below ``alpha`` (see Method).  Identical round temperatures on their own (300, 310, 320 K …)
    are never a finding, nor are values repeated inside one source
    (replicates).

    **Why it matters.** A series republished by a second author, often with
    its temperatures converted or "corrected", counts twice in a fit and in
    the agreement between sources, and each copy seems to confirm the other.
    Which copy is the original is the curator's call: keep one.

    **Method.** Printed cells are read as exact decimal numbers (grouping
    characters, decimal commas and exponents allowed) and compared as
    printed digits, never as floats: two cells match when they differ by at
    most half a unit of the coarser one's last digit.  For a run, each matched row contributes the
    probability that two *independent* sources would print it alike: with a
    printed resolution δ (one unit of the last digit, taken in ln P) and an
    expected difference μ ± σ of the two values in ln P, two values fall into
    the same rounding cell with probability E[max(0, 1 − |d|/δ)],
    d ~ N(μ, σ²) (closed form in :func:`coincidence_probability`).  μ is the
    pressure change the temperature shift implies, B·(1/T_a − 1/T_b), with
    B = T²·d ln P/dT of the consensus's fit of record at its median
    temperature (without a consensus, of ln P = A − B/T fitted to all the
    sources' points), for the part of
    the shift beyond half a step of the coarser printed temperature (zero
    for temperatures the same to the printed digits, and when the data do
    not determine B); σ is
    ``independent_scatter_percent``, or the combined stated u(P) of the two
    rows when smaller — so a pair is called copied only if even the closest
    agreement independent sources plausibly reach makes the match improbable —
    or, with no stated u, √2 times the smaller of the two sources' own
    scatters about the consensus (the MAD of their deviations from the fit
    of record, less the variance their printed rounding explains, from five
    rows or more) when that is larger: two series that each scatter 2 %
    do not agree to 0.1 % row after row by chance (at temperatures shifted
    beyond their rounding, √(s_a² + s_b²) instead: there the expected
    difference is the evidence, and its spread is both scatters').  Where
    in its printed step each temperature lies is unknown: its rounding
    (step/√12 each) times the slope B/T² is added to σ.
    For a constant-ratio run the window is the sum of both resolutions and
    the row that fixes the ratio is left out.  The rows' probabilities are
    multiplied, and so is, for each step between consecutive matched rows of
    a same-pressure run, the chance that two independent series space their
    temperatures alike (:func:`gap_match_probability`: the share of all pairs
    of their consecutive steps that agree within two printed steps — 1 for
    two series on one even grid, small for temperatures set where each
    laboratory happened to measure).  The product is corrected (Šidák) for
    the number of alignments compared, Σ n_a·n_b over source pairs for each
    of the two kinds of match.  Pressures printed to two digits at the same round
    temperatures therefore agree by chance (probability near 1) however long
    the run, while the same two digits repeated at temperatures 2 K apart are
    a finding.  With the default scatter, a copy at unchanged temperatures
    between two short sources is found from five rows of five printed digits
    or three of six; four digits at the same temperatures are not conclusive.  The shift is the median of T_b − T_a over the run, its spread
    the range (largest minus smallest).  Both sources' rows are flagged;
    none is made suspect, since the data cannot tell the original from the
    copy.

    **Example.** sources 'Smith 1962' and 'Jones 1971' print the same 7
    pressures (rows 12–18 and 40–46), temperatures shifted by +2.00 K: one
    series is likely copied from the other — keep one.

    **Options.** ``min_run``, ``min_significant_digits``,
    ``independent_scatter_percent``, ``alpha``, ``max_shift_K``.
    """

    id = "copied-values"
    title = "Values copied between sources"
    method = ("Printed pressures (or temperatures with pressures in a constant ratio) of each pair of named "
              "sources are matched digit for digit in runs of consecutive rows; each run's probability "
              "between independent sources is the product over its rows of E[max(0, 1-|d|/δ)], d ~ N(μ, σ²), "
              "δ the printed resolution in ln P, μ the change implied by the temperature shift, σ the "
              "independent scatter; Šidák-corrected for the alignments compared.")
    references = (
        "JCGM 100:2008 (GUM), §4.3.7 and §F.2.2.1 — the resolution of a printed value.",
        "Z. Šidák, J. Am. Stat. Assoc. 62, 626 (1967), doi:10.1080/01621459.1967.10482935 — "
        "family-wise probability over many comparisons.",
    )
    options = {
        "min_run": Option(int, "fewest consecutive matching rows reported", "rows", 2, 1000),
        "min_significant_digits": Option(int, "fewest significant digits a matched pressure must carry",
                                         "digits", 1, 15),
        "independent_scatter_percent": Option(float, "closest agreement expected of two independent "
                                              "sources (standard deviation of their difference in ln P "
                                              "about a constant ratio)", "%",
                                              1e-6, 100),
        "alpha": Option(float, "largest chance probability of a run between independent sources that is "
                        "still taken as chance [-]", "", 0, 1),
        "max_shift_K": Option(float, "largest constant temperature shift of a copied series", "K", 0, 1000),
    }

    def run(self, ctx):
        s = ctx.settings(self.id)
        by_source: dict[str, list[Point]] = defaultdict(list)
        for p in ctx.dataset.readable_points():
            if p.source:
                by_source[p.source].append(p)
        names = [n for n in ctx.dataset.sources if n in by_source]
        if len(names) < 2:
            return skipped(self, "fewer than two named sources", n_pairs=0, pairs=[])
        series = {n: sorted(by_source[n], key=lambda q: (q.T_K, q.row)) for n in names}
        min_run, min_digits = s["min_run"], s["min_significant_digits"]
        scatter = s["independent_scatter_percent"] / 100
        pkeys = {n: [printed_value(p.P_text, p.P_text_unit) for p in series[n]] for n in names}
        tkeys = {n: [printed_value(p.T_text) for p in series[n]] for n in names}
        sizes = [len(series[n]) for n in names]
        # alignments compared: n_a·n_b start pairs per source pair, for each of the two kinds of match
        n_alignments = max(1, sum(sizes) ** 2 - sum(x * x for x in sizes))
        B = _clapeyron_slope([p for n in names for p in series[n]], ctx.consensus)
        deviation = ctx.consensus.deviation_percent if ctx.consensus else {}
        measured = {n: _own_scatter(series[n], deviation, B) for n in names}
        sigma = partial(_sigma_independent, scatter=scatter, measured=measured)

        found: list[_Copy] = []
        for ia, a in enumerate(names):
            for b in names[ia + 1:]:
                pa, pb = series[a], series[b]
                same_p: set[tuple[int, int]] = set()
                for i0, j0, n in _maximal_runs(pkeys[a], pkeys[b], min_run):
                    pairs = [(i0 + k, j0 + k) for k in range(n)]
                    same_p.update(pairs)
                    evidence = _evidence(pairs, pa, pb, pkeys[a], pkeys[b], min_digits, s["max_shift_K"])
                    if len(evidence) < min_run:
                        continue
                    chance = _family_probability(
                        self._chance_same_p(pa, pb, pkeys[a], pkeys[b], evidence, sigma, B), n_alignments)
                    if chance < s["alpha"]:
                        found.append(self._record(a, b, pa, pb, tkeys, pairs, "pressure", None, chance))
                for i0, j0, n in _maximal_runs(tkeys[a], tkeys[b], min_run):
                    for pairs, ratio, p_run in self._ratio_segments(pa, pb, pkeys[a], pkeys[b],
                                                                    [(i0 + k, j0 + k) for k in range(n)],
                                                                    sigma, min_run, min_digits):
                        if set(pairs) <= same_p or all(same_printed(pkeys[a][i], pkeys[b][j]) for i, j in pairs):
                            continue  # the same pressures: the pressure match covers these rows
                        chance = _family_probability(p_run, n_alignments)
                        if chance < s["alpha"]:
                            found.append(self._record(a, b, pa, pb, tkeys, pairs, "temperature", ratio, chance))

        flags: list[PointFlag] = []
        for c in found:
            shared, how = c.what()
            for mine, other, me in ((c.rows_a, c.rows_b, c.source_b), (c.rows_b, c.rows_a, c.source_a)):
                for r in mine:
                    flags.append(PointFlag(r, self.id, s.severity,
                                           f"{shared.replace('print ', 'prints ')} as rows {_row_ranges(list(other))} "
                                           f"of '{me}', {how} (copied series?)"))
        metrics = {"pairs": [c.metrics() for c in found], "n_pairs": len(found),
                   "n_sources": len(names), "n_alignments": n_alignments,
                   "min_run": min_run, "alpha": s["alpha"]}
        if found:
            shown = "; ".join(c.message() for c in found[:3])
            more = f"; and {len(found) - 3} more" if len(found) > 3 else ""
            msg = f"{len(found)} run{'s' if len(found) != 1 else ''} of values shared between sources: {shown}{more}"
        else:
            msg = (f"no two of the {len(names)} sources share a run of {min_run} or more printed pressures (or "
                   f"temperatures with matching pressures) beyond chance (alpha {s['alpha']:g})")
        return CheckResult(self.id, self.title, worst_status(len(found), s.severity), msg, metrics, tuple(flags))

    @staticmethod
    def _chance_same_p(pa, pb, ka, kb, pairs, sigma, B) -> float:
        """Product over the run of the chance that independent sources print the same pressure,
        times the chance that they space the run's temperatures alike (one factor per step)."""
        steps = sorted(_t_step(pa[i], pb[j]) for i, j in pairs)
        # consecutive matched rows keep one shift within a step each, so their steps agree within two
        p_gap = gap_match_probability([p.T_K for p in pa], [p.T_K for p in pb], 2 * steps[len(steps) // 2])
        prob = p_gap ** (len(pairs) - 1)
        for i, j in pairs:
            # the change in ln P the temperature shift implies, ln P = A − B/T, for the part of the
            # shift the printed temperatures' rounding cannot explain (81.85 K and 81.9 K may be one T)
            dT = pb[j].T_K - pa[i].T_K
            beyond = _shift_beyond_rounding(pa[i], pb[j])
            mu = 0.0 if beyond == 0 else B * (1.0 / pa[i].T_K - 1.0 / pb[j].T_K) * beyond / abs(dT)
            width = max(ka[i].resolution_lnP, kb[j].resolution_lnP)
            # where in its printed step each temperature lies is unknown: through the slope B/T² that
            # blurs the expected difference (a series printed to whole kelvin, ±0.29 K, shifts ln P of
            # ice at 226 K by ±3.5 %, enough for two-digit pressures to agree by chance)
            # (at temperatures the same to the printed digits a wider σ would only make a match look
            # rarer: there the closest plausible agreement stays the yardstick)
            blur = B / pa[i].T_K / pa[i].T_K * math.hypot(_t_rounding(pa[i]), _t_rounding(pb[j])) \
                if beyond > 0 and pa[i].T_K > 0 else 0.0
            prob *= coincidence_probability(width, mu, math.hypot(sigma(pa[i], pb[j], shifted=beyond > 0), blur))
        return prob

    @staticmethod
    def _ratio_segments(pa, pb, ka, kb, pairs, sigma, min_run, min_digits):
        """Longest stretches of a same-temperature run whose pressures share one ratio to the digit.

        Yields (pairs, ratio, probability between independent sources).
        """
        def interval(i, j):
            if min(ka[i].digits, kb[j].digits) < min_digits:
                return None  # unreadable, or too few digits to carry evidence
            d = math.log(pb[j].P_Pa) - math.log(pa[i].P_Pa)
            half = 0.5 * (ka[i].resolution_lnP + kb[j].resolution_lnP)
            return d - half, d + half

        ivs = [interval(i, j) for i, j in pairs]
        covered_to = -1
        for start in range(len(pairs)):
            if ivs[start] is None:
                continue
            lo, hi = ivs[start]
            end = start
            while end + 1 < len(pairs) and ivs[end + 1] is not None:
                nlo, nhi = max(lo, ivs[end + 1][0]), min(hi, ivs[end + 1][1])
                if nlo > nhi:
                    break
                lo, hi, end = nlo, nhi, end + 1
            if end <= covered_to or end - start + 1 < min_run:
                continue
            covered_to = end
            seg = pairs[start:end + 1]
            probs = sorted(coincidence_probability(ka[i].resolution_lnP + kb[j].resolution_lnP, 0.0,
                                                   sigma(pa[i], pb[j])) for i, j in seg)
            p_run = math.prod(probs[:-1])  # one row fixes the ratio
            ratio = 1.0 if lo <= 0.0 <= hi else math.exp(_median(
                [math.log(pb[j].P_Pa / pa[i].P_Pa) for i, j in seg]))
            yield seg, ratio, p_run

    @staticmethod
    def _record(a, b, pa, pb, tkeys, pairs, shared, ratio, chance) -> _Copy:
        shifts = [pb[j].T_K - pa[i].T_K for i, j in pairs]
        same_T = all(same_printed(tkeys[a][i], tkeys[b][j]) for i, j in pairs)
        return _Copy(a, b, tuple(pa[i].row for i, _ in pairs), tuple(pb[j].row for _, j in pairs), shared,
                     float(_median(shifts)), float(max(shifts) - min(shifts)), ratio, float(chance), same_T)
