"""Check ``duplicates``: one temperature, conflicting pressures."""

from __future__ import annotations

import math
from collections import defaultdict

from ..results import CheckResult, PointFlag
from ._util import fmt, rows_text, worst_status
from .registry import Check, Option, register


def pressure_conflict_limit(p1, p2, k: float, tolerance_percent: float) -> float:
    """Largest |P1 − P2| [Pa] two readings of one state may differ by.

    The larger of k times their combined standard uncertainty (when both are
    given) and the relative tolerance of their mean.
    """
    limit = tolerance_percent / 100 * 0.5 * (p1.P_Pa + p2.P_Pa)
    if p1.u_P_Pa is not None and p2.u_P_Pa is not None:
        limit = max(limit, k * math.hypot(p1.u_P_Pa, p2.u_P_Pa))
    return limit


@register
class Duplicates(Check):
    """Rows at the same temperature (and phase) whose pressures disagree.

    **What it checks.** Pairs of usable rows of one branch whose temperatures
    agree within ``T_tolerance_K`` (one state point measured or copied twice).
    If their pressures differ by more than the larger of ``k`` × combined u(P)
    and ``P_tolerance_percent`` of their mean, both rows become suspect; a
    row repeated to the digit is noted (possible copy–paste) but not
    suspected.

    **Why it matters.** A vapor pressure is a function of temperature: two
    different pressures at one temperature cannot both be right, and the
    outlier check alone may not tell which one is wrong.  Rows the outlier
    screening rejected are left out (they carry their own explanation).

    **Example.** rows 7 and 8 at 320.00 K with 10.65 kPa and 10.05 kPa → both
    suspect: "P differs by 5.8 % from row 8 at the same T (limit 1 %)".

    **Options.** ``T_tolerance_K``, ``P_tolerance_percent``, ``k``.
    """

    id = "duplicates"
    title = "Same temperature, conflicting pressure"
    method = ("Rows of one branch with |ΔT| ≤ T_tolerance_K are compared; |ΔP| above the larger of "
              "k·√(u1²+u2²) and the relative tolerance marks both rows suspect.")
    references = ("JCGM 100:2008 (GUM), §5 — combined standard uncertainty of a difference.",)
    options = {
        "T_tolerance_K": Option(float, "temperatures closer than this are one state point", "K", 0, 5),
        "P_tolerance_percent": Option(float, "allowed relative pressure difference", "%", 0, 100),
        "k": Option(float, "coverage factor applied to the combined u(P)", "", 0.5, 10),
    }

    def run(self, ctx):
        s = ctx.settings(self.id)
        flags: list[PointFlag] = []
        suspect: dict[int, str] = {}
        repeated: set[int] = set()
        by_branch = defaultdict(list)
        for p in ctx.usable():
            by_branch[ctx.phase(p)].append(p)
        n_pairs = 0
        for pts in by_branch.values():
            pts = sorted(pts, key=lambda q: q.T_K)
            for i, a in enumerate(pts):
                for b in pts[i + 1:]:
                    if b.T_K - a.T_K > s["T_tolerance_K"]:
                        break
                    n_pairs += 1
                    if a.T_text == b.T_text and a.P_text == b.P_text:
                        repeated.update((a.row, b.row))
                        flags.append(PointFlag(b.row, self.id, "warn",
                                               f"repeats row {a.row} to the digit (copied twice?)"))
                        continue
                    diff = abs(a.P_Pa - b.P_Pa)
                    limit = pressure_conflict_limit(a, b, s["k"], s["P_tolerance_percent"])
                    if diff > limit:
                        rel = 100 * diff / (0.5 * (a.P_Pa + b.P_Pa))
                        for me, other in ((a, b), (b, a)):
                            suspect[me.row] = "suspect"
                            flags.append(PointFlag(me.row, self.id, s.severity,
                                f"P differs by {rel:.3g} % ({fmt(diff, 4)} Pa) from row {other.row} at the "
                                f"same T ({fmt(me.T_K)} K); limit {fmt(limit, 3)} Pa"))
        if suspect:
            msg = (f"{len(suspect)} rows at a repeated temperature disagree in pressure beyond the limit: "
                   f"{rows_text(suspect)}")
        elif repeated:
            msg = f"no conflicting duplicates; {len(repeated)} rows repeat another to the digit"
        else:
            msg = "no two rows of one branch share a temperature with conflicting pressures"
        return CheckResult(self.id, self.title, worst_status(len(suspect), s.severity), msg,
                           {"n_same_T_pairs": n_pairs, "n_conflicting_rows": len(suspect),
                            "n_repeated_rows": len(repeated),
                            "T_tolerance_K": s["T_tolerance_K"],
                            "P_tolerance_percent": s["P_tolerance_percent"]},
                           tuple(flags), suspect)
