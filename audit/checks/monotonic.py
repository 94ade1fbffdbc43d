"""Check ``monotonic``: within a branch, pressure rises with temperature."""

from __future__ import annotations

import math
from collections import defaultdict

from ..results import CheckResult, PointFlag
from ._util import fmt, rows_text, worst_status
from .registry import Check, Option, register


@register
class Monotonic(Check):
    """Pairs of neighbouring rows where pressure falls as temperature rises.

    **What it checks.** Within one branch (solid, liquid, or unlabelled)
    and one source, points sorted by temperature must have rising pressure.
    Neighbours from different sources are not compared: a fall between them
    is a disagreement of the sources, which ``source-agreement`` and
    ``outliers`` measure against the consensus of all the data.  Each pair of
    temperature neighbours (|ΔT| > ``T_tolerance_K``) whose pressure falls by
    more than the larger of ``k`` × combined u(P) and
    ``P_tolerance_percent`` is flagged, naming both rows; both become
    suspect, since either may be the wrong one.

    **Why it matters.** The Clapeyron equation, dP/dT = ΔH/(T·ΔV), has
    ΔH > 0 and ΔV > 0 for vaporization and sublimation, so a saturation
    pressure must increase with temperature.  A fall is a typing error, a
    unit slip or a mislabelled phase.  The check runs after the outlier
    screening and judges the rows it kept: a rejected row already carries its
    explanation and does not drag its neighbour into a pair.

    **Example.** 300 K → 3.54 kPa, 305 K → 3.45 kPa → "P falls from row 4 to
    row 5 as T rises by 5 K".

    **Options.** ``T_tolerance_K``, ``P_tolerance_percent``, ``k``.
    """

    id = "monotonic"
    title = "Pressure rises with temperature"
    method = ("Points of each branch are sorted by T; neighbours with P falling by more than the "
              "noise allowance are reported in pairs.")
    references = ("B. P. E. Clapeyron, J. École Polytechnique 14, 153 (1834); see e.g. P. Atkins, "
                  "J. de Paula, Physical Chemistry, §4B (the Clapeyron equation).",)
    options = {
        "T_tolerance_K": Option(float, "neighbours closer than this are left to the duplicates check", "K", 0, 5),
        "P_tolerance_percent": Option(float, "allowed relative fall in pressure (noise)", "%", 0, 100),
        "k": Option(float, "coverage factor applied to the combined u(P)", "", 0.5, 10),
    }

    def run(self, ctx):
        s = ctx.settings(self.id)
        flags: list[PointFlag] = []
        suspect: dict[int, str] = {}
        pairs: list[list[int]] = []
        by_branch = defaultdict(list)
        for p in ctx.usable():
            # a measurement series is one source; unlabelled rows count as one series
            by_branch[(ctx.phase(p), p.source or "")].append(p)
        for pts in by_branch.values():
            pts = sorted(pts, key=lambda q: (q.T_K, q.row))
            for a, b in zip(pts, pts[1:]):
                if b.T_K - a.T_K <= s["T_tolerance_K"]:
                    continue
                fall = a.P_Pa - b.P_Pa
                allowed = s["P_tolerance_percent"] / 100 * a.P_Pa
                if a.u_P_Pa is not None and b.u_P_Pa is not None:
                    allowed = max(allowed, s["k"] * math.hypot(a.u_P_Pa, b.u_P_Pa))
                if fall > allowed:
                    pairs.append([a.row, b.row])
                    text = (f"P falls by {100 * fall / a.P_Pa:.3g} % from row {a.row} "
                            f"({fmt(a.T_K)} K, {fmt(a.P_Pa)} Pa) to row {b.row} ({fmt(b.T_K)} K, "
                            f"{fmt(b.P_Pa)} Pa) as T rises; allowed fall {fmt(allowed, 3)} Pa")
                    for r in (a.row, b.row):
                        suspect[r] = "suspect"
                        flags.append(PointFlag(r, self.id, s.severity, text))
        if pairs:
            msg = f"{len(pairs)} neighbouring pairs with P falling as T rises: {rows_text(suspect)}"
        else:
            msg = "pressure rises with temperature within every branch" + (
                " and source" if ctx.dataset.sources else "")
        return CheckResult(self.id, self.title, worst_status(len(pairs), s.severity), msg,
                           {"n_violating_pairs": len(pairs), "pairs": pairs}, tuple(flags), suspect)
