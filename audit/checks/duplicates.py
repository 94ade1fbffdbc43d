"""Check ``duplicates``: replicates of one source that disagree beyond their scatter."""

from __future__ import annotations

import math
from collections import defaultdict

import numpy as np

from ..model import Point
from ..results import CheckResult, PointFlag
from ..thermo.ratios import percent_from_log_ratio
from ..thermo.replicates import (departure_from_median, difference_scale, median_departures,
                                 replicate_differences, replicate_groups)
from ..thermo.rounding import pressure_rounding_u_lnP, temperature_rounding_u_K
from ._util import coverage_for_source, fmt, rows_text, worst_status
from .registry import Check, Option, register

_SQRT3 = math.sqrt(3.0)


def explained_reason(ctx, p: Point) -> str | None:
    """Why a row needs no partner to account for it: rejected, or given a cause (else None)."""
    if ctx.status[p.row] == "reject":
        return "rejected"
    cause = ctx.causes.get(p.row)
    return None if cause is None else f"explained ({cause.kind})"


def series_points(ctx) -> dict[tuple[str, str], list[Point]]:
    """Readable rows with a finite positive T and P, by (branch, source).

    Rows already rejected are included (a caller tells them apart with
    :func:`explained_reason`); unreadable ones are not.  Rows without a
    source label form one series, so a table with no source column is one
    source.
    """
    out: dict[tuple[str, str], list[Point]] = defaultdict(list)
    for p in ctx.dataset.readable_points():
        if ctx.status[p.row] in ("ok", "suspect", "reject"):
            out[(ctx.phase(p), p.source or "")].append(p)
    return out


def temperature_radius_K(p: Point, floor_K: float) -> float:
    """Half a unit of the last printed digit of T [K], never below `floor_K`."""
    half = _SQRT3 * temperature_rounding_u_K(p.T_text, p.T_text_unit)  # u = (δ/2)/√3
    return max(floor_K, half) if math.isfinite(half) else floor_K


def group_series(points: list[Point], floor_K: float, k: float) -> list[list[Point]]:
    """The rows of one series grouped by temperature (replicates together)."""
    if not points:
        return []
    T = [p.T_K for p in points]
    radius = [temperature_radius_K(p, floor_K) for p in points]
    u_T = [p.u_T_K or 0.0 for p in points]
    return [[points[i] for i in g] for g in replicate_groups(T, radius, u_T, k)]


def _curve_terms(ctx, branch: str, pts: list[Point]):
    """ln P about the consensus curve and d ln P/dT [1/K] at each row, or raw ln P and 0.

    Comparing residuals about the curve takes out the small temperature
    differences within a group; without a usable consensus curve for the
    branch, ln P itself is compared and the temperature terms are left out.
    """
    T = np.array([p.T_K for p in pts])
    lnP = np.log([p.P_Pa for p in pts])
    c = ctx.consensus.get(branch)
    fit = None if c is None else c.fit
    if fit is not None:
        try:
            with np.errstate(all="ignore"):
                r = lnP - fit.equation.ln_p(T)
                slope = np.abs(fit.equation.dlnp_dT(T))
        except ValueError:  # e.g. a reduced (Wagner) form asked above Tc
            r = slope = None
        if r is not None and np.all(np.isfinite(r)) and np.all(np.isfinite(slope)):
            return r, slope
    return lnP, np.zeros(len(pts))


def expected_scatter_lnP(ctx, p: Point, slope: float = 0.0) -> float:
    """Standard uncertainty of one row in ln P [-]: the larger of what is stated or printed and
    what ``outliers`` found the row to scatter about the consensus.

    Stated: √((u_P/P)² + rounding of P² + (d ln P/dT)²·(u_T² + rounding of T²)), with
    `slope` = |d ln P/dT| [1/K] (0 leaves the temperature terms out).
    """
    fP = _nan0(pressure_rounding_u_lnP(p.P_text, p.P_text_unit))
    fT = _nan0(temperature_rounding_u_K(p.T_text, p.T_text_unit))
    # hypot, not a sum of squares: a stated u(P) or a slope far off the scale must not overflow
    stated = math.hypot((p.u_P_Pa or 0.0) / p.P_Pa, fP, slope * (p.u_T_K or 0.0), slope * fT)
    empirical = ctx.consensus.u_percent.get(p.row, math.nan) / 100
    return max(stated, _nan0(empirical))


def half_digit_lnP(p: Point, slope: float = 0.0) -> float:
    """Half a unit of the last printed digit of P, and of T through `slope`, in ln P [-]."""
    fP = _nan0(pressure_rounding_u_lnP(p.P_text, p.P_text_unit))
    fT = _nan0(temperature_rounding_u_K(p.T_text, p.T_text_unit))
    return _SQRT3 * (fP + slope * fT)  # u = (δ/2)/√3 → δ/2


def _n(n: int, noun: str) -> str:
    return f"{n} {noun}{'' if n == 1 else 's'}"


def _nan0(x: float) -> float:
    return x if math.isfinite(x) else 0.0


@register
class Duplicates(Check):
    """Replicates of one source that disagree beyond what their scatter allows.

    **What it checks.** Rows of one branch and one source (a table with no
    source column is one source) whose temperatures agree within the
    printed resolution of T (half its last digit), ``k`` × their combined
    u(T), or ``T_tolerance_K`` are *replicates* of one state point.  Each
    replicate's departure from the median of its group, in ln P about the
    consensus curve, is judged against the group's expected scatter: the
    largest of its stated u(P) and u(T) with the rounding of its printed
    digits, the scatter ``outliers`` found for the row, and the source's own
    replicate scatter from its other groups (a robust scale of the
    within-group differences, once there are ``min_scatter_differences``).
    A replicate is suspect when it departs by more than ``k`` times that
    scatter (for a named source, whose scatter is known only from its own
    rows and a prior's, ``k`` becomes the Student t quantile of the same
    one-sided probability, as in ``outliers``), more than what rounding to
    the printed digits alone explains,
    and more than the floor ``P_tolerance_percent``.  A row repeated to the
    digit is noted (copied twice?), not suspected.

    Rows of *different* sources at one temperature are not replicates: a
    disagreement between sources is measured by ``outliers`` and
    ``source-agreement`` against the consensus.  A row already rejected or
    explained (given a cause) by an earlier check does not make its
    replicates suspect: it is judged against them and noted, its partners
    are left alone.

    **Why it matters.** A vapor pressure is a function of temperature: two
    pressures of one source at one temperature differ by its repeatability,
    no more.  A replicate far outside that scatter is a typing or reading
    error; three to six replicates scattering ±20 % are a source's honest
    scatter, not errors — a fixed percent limit calls every one of them a
    conflict.

    **Method.** Complete-linkage grouping in T; departures from the group
    median with σ(d) = √(σ² + (π/2)·mean σ²/n) (half the combined σ for a
    pair); the source's scatter as median|x_i − x_j|/(Φ⁻¹(3/4)·√2) over the
    pairs of its other groups; rounding as a rectangular ±half digit (GUM
    §4.3.7).

    **Example.** Four rows of one source at 320.00 K, 10.65, 10.61, 10.67 and
    1.064 kPa (0.3 % scatter) → the fourth departs −90 % from the median of
    the four, far beyond a limit of about 1 %; the other three are not
    flagged.  Once ``outliers`` has rejected it, the note reads "already
    rejected: P departs −90 % from the median of its 3 kept replicates …,
    which are not flagged for it".

    **Options.** ``T_tolerance_K``, ``P_tolerance_percent``, ``k``,
    ``min_scatter_differences``.
    """

    id = "duplicates"
    title = "Replicates of one source, conflicting pressure"
    method = ("Rows of one branch and source whose T agree within the printed resolution, k·u(T) or "
              "T_tolerance_K are replicates; each replicate's departure from its group's median ln P "
              "(about the consensus curve) beyond k times the expected scatter (stated u, printed-digit "
              "rounding, the outliers scatter of the row, the source's own replicate scatter), beyond the "
              "rounding of the printed digits and beyond the percent floor marks it suspect.")
    references = ("JCGM 100:2008 (GUM), §4.3.7 (rounding) and §5 (combined standard uncertainty).",
                  "P. J. Rousseeuw, C. Croux, J. Am. Stat. Assoc. 88, 1273 (1993), "
                  "doi:10.1080/01621459.1993.10476408 (the MAD as a scale).")
    options = {
        "T_tolerance_K": Option(float, "temperatures of one source closer than this are one state point even "
                                "when printed more finely", "K", 0, 5),
        "P_tolerance_percent": Option(float, "floor: a replicate departing less than this from its group's "
                                      "median is never flagged, whatever its scatter", "%", 0, 100),
        "k": Option(float, "coverage factor applied to a replicate's expected scatter and to the combined "
                    "u(T) when grouping [-]", "", 0.5, 10),
        "min_scatter_differences": Option(int, "fewest within-group differences of a source's other "
                                          "replicate groups to estimate its own scatter [-]", "", 1, 1000),
    }

    def run(self, ctx):
        s = ctx.settings(self.id)
        k = s["k"]
        floor_ln = math.log1p(s["P_tolerance_percent"] / 100)
        flags: list[PointFlag] = []
        suspect: dict[int, str] = {}
        repeated: set[int] = set()
        explained_conflicts: set[int] = set()
        partners_left: set[int] = set()
        n_pairs = n_groups = n_rep_rows = 0
        source_scatter: dict[str, float] = {}

        for (branch, source), pts in series_points(ctx).items():
            groups = [g for g in group_series(pts, s["T_tolerance_K"], k) if len(g) >= 2]
            if not groups:
                continue
            # a named source's σ is known from its own rows and a prior's (as in outliers): the
            # departure limit k·σ takes the Student t quantile of k's one-sided probability
            k_dep = coverage_for_source(ctx, k, source, pts)
            # per group: kept rows, one per printed (T, P) — a copy adds no information
            # on scatter — and the rows already explained
            prepared = []
            for g in groups:
                n_pairs += len(g) * (len(g) - 1) // 2
                r, slope = _curve_terms(ctx, branch, g)
                reps, copies, explained = [], defaultdict(list), []
                seen: dict[tuple, int] = {}
                for i, p in enumerate(g):
                    if explained_reason(ctx, p):
                        explained.append(i)
                        continue
                    key = (p.T_text, p.T_text_unit, p.P_text, p.P_text_unit)
                    if key in seen:
                        copies[seen[key]].append(i)
                    else:
                        seen[key] = i
                        reps.append(i)
                prepared.append((g, r, slope, reps, copies, explained))
            n_groups += len(prepared)
            n_rep_rows += sum(len(g) for g in groups)

            diffs = [replicate_differences(o[1][o[3]], [np.arange(len(o[3]))]) for o in prepared]
            for gi, (g, r, slope, reps, copies, explained) in enumerate(prepared):
                for first, more in copies.items():
                    for i in more:
                        repeated.update((g[first].row, g[i].row))
                        flags.append(PointFlag(g[i].row, self.id, "warn",
                                               f"repeats row {g[first].row} to the digit (copied twice?)"))
                # the source's own scatter, from its other groups (this one may hold the error)
                others = [d for j, d in enumerate(diffs) if j != gi]
                others = np.concatenate(others) if others else np.array([])
                rep_scale = (difference_scale(others) if others.size >= s["min_scatter_differences"]
                             else math.nan)
                if math.isfinite(rep_scale):
                    source_scatter[source] = max(source_scatter.get(source, 0.0), 100 * rep_scale)

                sigma, half = np.zeros(len(g)), np.zeros(len(g))
                for i, p in enumerate(g):
                    sigma[i] = max(expected_scatter_lnP(ctx, p, slope[i]), _nan0(rep_scale))
                    half[i] = half_digit_lnP(p, slope[i])
                T_here = fmt(float(np.median([p.T_K for p in g])))
                label = f"source {source!r}" if source else "the table"

                def limit_text(sd, res):
                    lim = max(k_dep * sd, res, floor_ln)
                    return lim, (f"limit {percent_from_log_ratio(lim):.3g} % (k·σ {100 * k_dep * sd:.3g} %, "
                                 f"printed digits {100 * res:.3g} %, floor {s['P_tolerance_percent']:g} %)")

                if len(reps) >= 2:
                    idx = np.array(reps)
                    md = median_departures(r[idx], sigma[idx], half[idx])
                    for j, i in enumerate(reps):
                        d = float(md.departure[j])
                        lim, why = limit_text(float(md.sigma[j]), float(md.resolution[j]))
                        if abs(d) <= lim:
                            continue
                        rows = sorted(g[q].row for q in reps if q != i)
                        if len(reps) == 2:
                            text = (f"P differs by {percent_from_log_ratio(2 * d):+.3g} % from row {rows[0]}, its "
                                    f"replicate in {label} at the same T ({T_here} K): "
                                    f"{percent_from_log_ratio(d):+.3g} % from their median; {why}")
                        else:
                            text = (f"P departs {percent_from_log_ratio(d):+.3g} % from the median of {len(reps)} "
                                    f"replicates of {label} at {T_here} K (with {rows_text(rows)}); {why}")
                        for q in [i] + copies.get(i, []):
                            suspect[g[q].row] = "suspect"
                            flags.append(PointFlag(g[q].row, self.id, s.severity, text))
                if reps:
                    idx = np.array(reps)
                    kept_rows = sorted(g[q].row for q in range(len(g)) if q not in explained)
                    for i in explained:
                        d, sd, res = departure_from_median(r[i], sigma[i], half[i], r[idx], sigma[idx], half[idx])
                        lim, why = limit_text(sd, res)
                        if abs(d) <= lim:
                            continue
                        explained_conflicts.add(g[i].row)
                        partners_left.update(kept_rows)
                        flags.append(PointFlag(g[i].row, self.id, "warn",
                            f"already {explained_reason(ctx, g[i])}: P departs {percent_from_log_ratio(d):+.3g} % "
                            f"from the median of its {_n(len(reps), 'kept replicate')} of {label} at {T_here} K "
                            f"({rows_text(kept_rows)}), which are not flagged for it; {why}"))

        if suspect:
            msg = (f"{len(suspect)} replicate rows depart from the median of their group beyond the limit: "
                   f"{rows_text(suspect)}")
        elif n_groups:
            msg = f"no replicates of one source disagree beyond their scatter ({n_groups} groups, {n_rep_rows} rows)"
        else:
            msg = "no two rows of one branch and source share a temperature"
        if repeated:
            msg += f"; {len(repeated)} rows repeat another to the digit"
        if explained_conflicts:
            msg += (f"; {_n(len(partners_left), 'replicate row')} left to the "
                    f"{_n(len(explained_conflicts), 'row')} already rejected or explained that disagree with "
                    f"them ({rows_text(explained_conflicts)})")
        return CheckResult(self.id, self.title, worst_status(len(suspect), s.severity), msg,
                           {"n_same_T_pairs": n_pairs, "n_conflicting_rows": len(suspect),
                            "n_repeated_rows": len(repeated),
                            "n_replicate_groups": n_groups, "n_replicate_rows": n_rep_rows,
                            "n_explained_conflicts": len(explained_conflicts),
                            "n_partners_left": len(partners_left),
                            "source_scatter_percent": source_scatter,
                            "T_tolerance_K": s["T_tolerance_K"],
                            "P_tolerance_percent": s["P_tolerance_percent"]},
                           tuple(flags), suspect)
