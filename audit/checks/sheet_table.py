"""Check ``sheet-table``: the sheet's own table follows its equation."""

from __future__ import annotations

import math

import numpy as np

from ..results import Cause, CheckResult, PointFlag
from .registry import Check, Option, register


@register
class SheetTable(Check):
    """Each row of the sheet's table against the sheet's equation, as decoded.

    **What it checks.** Each readable row's deviation from the decoded
    equation at its temperature.  A row off by more than
    ``tolerance_percent`` and by more than its printed digits allow (half a
    unit of the last digit) is rejected, and the usual cause hypotheses (a
    pressure in another unit, a misplaced decimal point, transposed digits, a
    temperature in another unit) are tried against the equation: a reading
    that lands within the tolerance and is ``cause_ratio`` times closer than
    the printed value names the cause and the value meant.  A table that
    shares the equation's unit note is read in the decoded units.

    **Why it matters.** A table printed beside an equation is computed from
    it or measured for it; a row that does not follow is a typing error, a
    value from another product grade, or a sign that the table and the
    equation come from different sources.

    **Method.** For each readable row of the sheet's table: (1) the deviation
    d = ln P_row − ln P_eq(T_row) from the decoded equation; (2) the row's
    limit is the larger of ln(1 + ``tolerance_percent``/100) and half a unit
    of the last printed digit (√3 times the rectangular standard uncertainty
    of the rounding, u = δ/(2√3)); (3) a row with |d| beyond its limit is
    rejected, and the cause hypotheses (another pressure unit, a misplaced
    decimal point, transposed digits, another temperature unit) are scored by
    z = d/limit for each corrected reading: one is named when its corrected
    value lands within the limit (|z| ≤ 1) and the next-best reading and the
    printed value are at least ``cause_ratio`` times worse.

    **Example.** "row 7 (40 °C, 7.88): −94.2 % from the equation (limit 1 %);
    likely cause pressure-unit: written in kPa".

    **Options.** ``tolerance_percent``, ``cause_ratio``.
    """

    id = "sheet-table"
    applies_to = "sheet"
    title = "The sheet's table follows its equation"
    method = ("Relative deviation of each row from the decoded equation, judged against the tolerance and "
              "the printed rounding; cause hypotheses scored against the equation.")
    references = ("JCGM 100:2008 (GUM) §4.3.7: the rounding of a printed value as a rectangular distribution.",)
    options = {
        "tolerance_percent": Option(float, "largest deviation of a table row from the sheet's equation", "%",
                                    0.001, 100),
        "cause_ratio": Option(float, "a cause's corrected value must be this many times closer than the "
                              "printed one [-]", "", 1, 100),
    }

    def run(self, ctx) -> CheckResult:
        from ..diagnose.choose import diagnose_point
        from ..sheet.readings import unit_label
        from ..thermo.ratios import percent_from_log_ratio
        from ..thermo.rounding import pressure_rounding_u_lnP
        from ._util import skipped

        s = ctx.settings(self.id)
        pts = [p for p in ctx.dataset.points if p.readable]
        if not pts:
            return skipped(self, "the sheet has no table" if ctx.sheet.table is None else
                           "no row of the sheet's table is readable")
        eq = ctx.decoding.equation
        tol = math.log1p(s["tolerance_percent"] / 100)
        flags, status, causes, sigma, worst = [], {}, {}, {}, []

        def limit(p):
            # half a unit of the last printed digit is the most rounding can move a value
            return max(tol, math.sqrt(3.0) * pressure_rounding_u_lnP(p.P_text, p.P_text_unit))

        for p in pts:
            with np.errstate(all="ignore"):
                d = math.log(p.P_Pa) - float(eq.ln_p(p.T_K)) if p.P_Pa > 0 else math.nan
            ctx.deviation_percent[p.row] = float(percent_from_log_ratio(d)) if math.isfinite(d) else math.nan
            lim = limit(p)
            z = d / lim if math.isfinite(d) else math.inf
            sigma[p.row] = z
            if abs(z) <= 1:
                continue
            status[p.row] = "reject"

            def z_of(T, P, lim=lim):
                with np.errstate(all="ignore"):
                    v = (math.log(P) - float(eq.ln_p(T))) / lim if P > 0 and T > 0 else math.inf
                return v if math.isfinite(v) else math.inf

            dg = diagnose_point(p, z_of, k=1.0, ratio=s["cause_ratio"])
            dev = ctx.deviation_percent[p.row]
            what = (f"{dev:+.3g} %" if math.isfinite(dev) else
                    "more than 10^300 times off" if math.isfinite(d) else "where the equation is not defined")
            text = f"row {p.row} ({p.T_text} {unit_label(p.T_text_unit)}, {p.P_text}): {what} from the equation " \
                   f"(limit {100 * math.expm1(lim):.2g} %)"
            if dg.best is not None:
                h = dg.best.hypothesis
                causes[p.row] = Cause(h.kind, dg.explanation(), h.T_K, h.P_Pa)
                text += f"; likely cause {h.kind}: {h.reading}"
            else:
                text += "; no slip explains it (a value from another grade or source?)"
            flags.append(PointFlag(p.row, self.id, "fail", text))
            worst.append(text)
        metrics = {"n_rows": len(pts), "n_rejected": len(flags),
                   "max_abs_deviation_percent": max((abs(v) for v in ctx.deviation_percent.values()
                                                     if math.isfinite(v)), default=None)}
        if flags:
            return CheckResult(self.id, self.title, s.severity, "; ".join(worst[:5])
                               + (f"; and {len(worst) - 5} more" if len(worst) > 5 else ""),
                               metrics, tuple(flags), point_status=status, causes=causes, residual_sigma=sigma)
        return CheckResult(self.id, self.title, "pass",
                           f"all {len(pts)} readable rows within {s['tolerance_percent']:g} % of the equation "
                           f"(largest {metrics['max_abs_deviation_percent']:.2g} %)", metrics,
                           residual_sigma=sigma)
