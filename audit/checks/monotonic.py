"""Check ``monotonic``: within a branch, pressure rises with temperature."""

from __future__ import annotations

import math

from ..results import CheckResult, PointFlag
from ._util import coverage_for_source, fmt, rows_text, worst_status
from .duplicates import expected_scatter_lnP, explained_reason, group_series, series_points
from .registry import Check, Option, register


@register
class Monotonic(Check):
    """Pairs of neighbouring rows where pressure falls as temperature rises.

    **What it checks.** Within one branch (solid, liquid, or unlabelled)
    and one source, points sorted by temperature must have rising pressure.
    Neighbours from different sources are not compared: a fall between them
    is a disagreement of the sources, which ``source-agreement`` and
    ``outliers`` measure against the consensus of all the data.  Replicates
    (rows whose temperatures agree within the printed resolution of T,
    ``k`` × combined u(T) or ``T_tolerance_K``) are one temperature, judged
    among themselves by ``duplicates``; each group enters the series through
    its median-pressure row.  Each pair of temperature neighbours whose
    pressure falls by more than the larger of ``k`` × combined u(P) and
    ``P_tolerance_percent`` is flagged, naming both rows; both become
    suspect, since either may be the wrong one.

    **Why it matters.** The Clapeyron equation, dP/dT = ΔH/(T·ΔV), has
    ΔH > 0 and ΔV > 0 for vaporization and sublimation, so a saturation
    pressure must increase with temperature.  A fall is a typing error, a
    unit slip or a mislabelled phase.  The check runs after the outlier
    screening and judges the rows it kept: a row already rejected, or given
    a cause, carries its explanation and does not drag its innocent
    neighbour into a pair — the falls it makes are counted in the message
    and metrics (``pairs_left_to_explained``), not flagged.

    **Method.** Sort each branch-and-source series by T, leaving out rows
    already rejected or given a cause; group replicates (temperatures within
    ``T_tolerance_K``, their printed resolution or ``k`` times their combined
    u(T)) and let each group enter through its median-pressure row; then
    compare consecutive rows.  The fall allowed between neighbours a and b,
    in ln P, is the larger of ``P_tolerance_percent`` and ``k`` times the
    combined scatter √(u_a² + u_b²), each u the larger of the row's stated
    relative u(P) and its expected scatter in ln P (printed digits, or what
    the outliers check found it to scatter).  For a named source, whose scatter
    is estimated from its own n rows, ``k`` becomes the Student t quantile of
    the same one-sided probability with 0.37·(n − 1) degrees of freedom plus
    those of the outliers check's ``min_points_source_scale``-row prior (the
    MAD's efficiency; Rousseeuw & Croux 1993).  Both rows of a pair beyond it are
    suspect.  Falls involving a row already rejected or explained are
    counted and left to that row, not flagged.

    **Example.** 300 K → 3.54 kPa, 305 K → 3.45 kPa → "P falls from row 4 to
    row 5 as T rises by 5 K".

    **Options.** ``T_tolerance_K``, ``P_tolerance_percent``, ``k``.
    """

    id = "monotonic"
    title = "Pressure rises with temperature"
    method = ("Points of each branch and source are sorted by T, replicates merged into their "
              "median-pressure row; neighbours with P falling by more than the noise allowance are "
              "reported in pairs, except pairs with a row already rejected or explained.")
    references = ("B. P. E. Clapeyron, J. École Polytechnique 14, 153 (1834); see e.g. P. Atkins, "
                  "J. de Paula, Physical Chemistry, §4B (the Clapeyron equation).",)
    options = {
        "T_tolerance_K": Option(float, "neighbours closer than this (or within the printed resolution of T) "
                                "are replicates, left to the duplicates check", "K", 0, 5),
        "P_tolerance_percent": Option(float, "allowed relative fall in pressure (noise)", "%", 0, 100),
        "k": Option(float, "coverage factor applied to the combined u(P), and to the combined u(T) "
                    "when grouping replicates [-]", "", 0.5, 10),
    }

    def run(self, ctx):
        s = ctx.settings(self.id)
        flags: list[PointFlag] = []
        suspect: dict[int, str] = {}
        pairs: list[list[int]] = []
        left: list[list[int]] = []
        explained_rows: set[int] = set()
        for (_, source), pts in series_points(ctx).items():
            # a named source's scatter is known from its own rows and a prior's (as in outliers): the
            # coverage factor k, meant for a known scale, becomes the Student t quantile of the same
            # one-sided probability with those degrees of freedom (a 19-row series scattering 14 % had
            # a MAD of 7 % and falls of 3.6 "σ" between honest neighbours)
            k = coverage_for_source(ctx, s["k"], source, pts)
            kept = [p for p in pts if not explained_reason(ctx, p)]
            # replicates (one temperature within its printed resolution) are the duplicates check's;
            # each group enters the series through its median-pressure row
            reps = [sorted(g, key=lambda q: (q.P_Pa, q.row))[(len(g) - 1) // 2]
                    for g in group_series(kept, s["T_tolerance_K"], s["k"])]
            for a, b in zip(reps, reps[1:]):
                fall, allowed = self._fall(ctx, a, b, s, k)
                if fall > allowed:
                    pairs.append([a.row, b.row])
                    text = (f"P falls by {100 * fall / a.P_Pa:.3g} % from row {a.row} "
                            f"({fmt(a.T_K)} K, {fmt(a.P_Pa)} Pa) to row {b.row} ({fmt(b.T_K)} K, "
                            f"{fmt(b.P_Pa)} Pa) as T rises; allowed fall {fmt(allowed, 3)} Pa")
                    for r in (a.row, b.row):
                        suspect[r] = "suspect"
                        flags.append(PointFlag(r, self.id, s.severity, text))
            # a row already rejected or explained does not drag its neighbour into a pair:
            # the falls it would make are counted, not flagged
            series = sorted(reps + [p for p in pts if explained_reason(ctx, p)], key=lambda q: (q.T_K, q.row))
            for a, b in zip(series, series[1:]):
                if not (explained_reason(ctx, a) or explained_reason(ctx, b)):
                    continue
                if b.T_K - a.T_K <= s["T_tolerance_K"]:
                    continue
                fall, allowed = self._fall(ctx, a, b, s, k)
                if fall > allowed:
                    left.append([a.row, b.row])
                    explained_rows.update(q.row for q in (a, b) if explained_reason(ctx, q))
        if pairs:
            msg = f"{len(pairs)} neighbouring pairs with P falling as T rises: {rows_text(suspect)}"
        else:
            msg = "pressure rises with temperature within every branch" + (
                " and source" if ctx.dataset.sources else "")
        if left:
            msg += (f"; {len(left)} pair{'s' if len(left) != 1 else ''} left to the rows already rejected or "
                    f"explained ({rows_text(explained_rows)})")
        return CheckResult(self.id, self.title, worst_status(len(pairs), s.severity), msg,
                           {"n_violating_pairs": len(pairs), "pairs": pairs,
                            "n_pairs_left_to_explained": len(left), "pairs_left_to_explained": left},
                           tuple(flags), suspect)

    @staticmethod
    def _fall(ctx, a, b, s, k: float) -> tuple[float, float]:
        """Fall of P from a to b [Pa] and the fall the noise allows [Pa].

        Judged in ln P, where a series' scatter is a spread of ratios: the
        larger of the percent floor and k × the combined scatter of the two
        rows (stated u, printed digits, or what ``outliers`` found them to
        scatter), as a fall from P_a.  A series scattering ±5 % may show a
        fall of 5 % between neighbours 0.2 K apart without either row being
        wrong, and one scattering ±27 % a fall of 67 % (a linear allowance,
        k·P·σ, would cap any fall below 100 %).
        """
        s_a = expected_scatter_lnP(ctx, a)
        s_b = expected_scatter_lnP(ctx, b)
        if a.u_P_Pa is not None and b.u_P_Pa is not None:
            s_a, s_b = max(s_a, a.u_P_Pa / a.P_Pa), max(s_b, b.u_P_Pa / b.P_Pa)
        allowed_lnP = max(-math.log1p(-min(s["P_tolerance_percent"], 99.0) / 100), k * math.hypot(s_a, s_b))
        return a.P_Pa - b.P_Pa, -a.P_Pa * math.expm1(-allowed_lnP)
