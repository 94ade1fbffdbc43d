"""Check ``sheet-range``: the range a sheet states against what stands behind it."""

from __future__ import annotations

from ..results import CheckResult
from .registry import Check, Option, register


@register
class SheetRange(Check):
    """The stated range of validity against the evidence and the phase diagram.

    **What it checks.** Where the stated range goes beyond the temperatures
    of the sheet's own table and beyond the reference's range of validity,
    it says by how much (extrapolation nobody has checked).  It warns when the
    range reaches above ``near_critical_fraction`` × Tc (an equation of the
    Antoine type fails near the critical point), and, for a liquid equation,
    when it starts below the triple point by more than
    ``triple_allowance_K`` (the liquid is not stable there; a sublimation
    equation is needed).

    **Why it matters.** A stated range is a promise: users read values
    anywhere inside it.  A range wider than the data behind it is the way a
    sheet's equation ends up used at the critical point or below the melting
    point.

    **Method.** Plain comparisons of the stated range [T_low, T_high], in
    kelvin as decoded: with the temperatures of the sheet's table (how many
    kelvin of the range lie beyond them), with the reference's range of
    validity, with ``near_critical_fraction``·Tc (T_high above it takes the
    profile's severity) and, for a liquid equation, with T_triple −
    ``triple_allowance_K`` (T_low below it takes the profile's severity). A
    range that does not decode to temperatures above 0 K fails.

    **Example.** "stated 273.2–573.2 K; the table covers 293.2–373.2 K, the
    reference 309–591.7 K; reaches 0.97 Tc (591.7 K)".

    **Options.** ``near_critical_fraction``, ``triple_allowance_K``.
    """

    id = "sheet-range"
    applies_to = "sheet"
    title = "The sheet's stated range"
    method = "Comparison of the stated range with the table's temperatures, the reference's range, Tc and Tt."
    references = ("B. E. Poling, J. M. Prausnitz, J. P. O'Connell, The Properties of Gases and Liquids, 5th ed. "
                  "(McGraw-Hill, 2000), ch. 7 (ranges of the vapor-pressure correlations).",)
    options = {
        "near_critical_fraction": Option(float, "a range reaching above this fraction of Tc warns [-]", "", 0.5, 1.0),
        "triple_allowance_K": Option(float, "a liquid range may start this far below the triple point", "K",
                                     0, 100),
    }

    def run(self, ctx) -> CheckResult:
        from ._util import skipped

        s = ctx.settings(self.id)
        if ctx.sheet.T_range is None:
            return skipped(self, "the sheet states no range of validity")
        if ctx.T_range_K is None:
            return CheckResult(self.id, self.title, "fail",
                               f"the stated range {ctx.sheet.T_range[0]:g} to {ctx.sheet.T_range[1]:g}, read as "
                               f"{ctx.decoding.best.label}, is not a range of temperatures above 0 K", {})
        lo, hi = ctx.T_range_K
        md = ctx.dataset.metadata
        facts, problems = [f"stated {lo:.5g}–{hi:.5g} K"], []
        Ts = [p.T_K for p in ctx.dataset.points if p.readable]
        if Ts:
            facts.append(f"the table covers {min(Ts):.5g}–{max(Ts):.5g} K")
            beyond = max(0.0, min(Ts) - lo) + max(0.0, hi - max(Ts))
            if beyond > 0:
                facts.append(f"{beyond:.4g} K of the range lie beyond the table")
        ref = ctx.reference
        if ref is not None:
            facts.append(f"the reference is valid over {ref.T_min:.5g}–{ref.T_max:.5g} K")
            if lo < ref.T_min or hi > ref.T_max:
                facts.append("the range leaves the reference's")
        Tc, Tt = md.get("T_critical"), md.get("T_triple")
        metrics = {"T_low_K": lo, "T_high_K": hi}
        if Tc:
            metrics["reduced_T_high"] = hi / Tc
            if hi > s["near_critical_fraction"] * Tc:
                problems.append(f"the range reaches {hi / Tc:.3g} Tc (Tc = {Tc:.5g} K; limit "
                                f"{s['near_critical_fraction']:g} Tc)")
        if Tt and ctx.sheet.phase == "liquid" and lo < Tt - s["triple_allowance_K"]:
            problems.append(f"a liquid equation stated from {lo:.5g} K, below the triple point {Tt:.5g} K")
        if problems:
            return CheckResult(self.id, self.title, s.severity, "; ".join(problems + facts), metrics)
        return CheckResult(self.id, self.title, "pass", "; ".join(facts), metrics)
