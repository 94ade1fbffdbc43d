"""Check ``sheet-reference``: the sheet's equation against a reference over its stated range."""

from __future__ import annotations

import math

import numpy as np

from ..results import CheckResult
from .registry import Check, Option, register


@register
class SheetReference(Check):
    """The decoded equation against the reference over the stated range.

    **What it checks.** The relative deviation of the sheet's equation, as
    decoded, from the reference (the sheet's own ``[reference_equation]``,
    IAPWS for water and ice, or a published coefficient set from the
    ``chemicals`` library, named in the finding) at 41 temperatures across
    the stated range where the reference is valid.  Beyond
    ``tolerance_percent`` it warns; beyond ``gross_percent`` it fails: no
    supplier's equation for the substance is that far off, and a coefficient
    set copied from another compound is.  Where the stated range leaves the
    reference's, the part compared is named.

    **Why it matters.** A sheet's equation is used across its whole stated
    range, far from the few temperatures anyone checks by hand; this is how
    far it strays from the best available knowledge there.

    **Method.** (1) The compared interval is the intersection of the stated
    range (or the table's) with the reference's range of validity; an empty
    intersection is reported. (2) At 41 evenly spaced temperatures of it, the
    deviation 100·(P_sheet/P_ref − 1) is computed from the difference of ln P,
    temperatures where the reference is undefined being left out. (3) The
    largest absolute deviation and the rms deviation are reported; a largest
    deviation beyond ``gross_percent`` (or undefined) fails as another
    substance's coefficients, one beyond ``tolerance_percent`` takes the
    profile's severity.

    **Example.** "largest deviation −3.1 % at 403.2 K from the Wagner 3-6
    coefficients of McGarry (1983) over 273.2–403.2 K (limit 5 %)".

    **Options.** ``tolerance_percent``, ``gross_percent``.
    """

    id = "sheet-reference"
    applies_to = "sheet"
    title = "The sheet's equation against a reference"
    method = ("Deviation 100·(P_sheet/P_ref − 1) at 41 temperatures of the stated range within the reference's "
              "range of validity; largest and rms deviation against two limits.")
    references = ("IAPWS R6-95(2018) and its auxiliary saturation equation (W. Wagner, A. Pruss, J. Phys. Chem. "
                  "Ref. Data 31, 387 (2002), doi:10.1063/1.1461829); IAPWS R14-08(2011) for ice.",
                  "C. Bell et al., chemicals: chemical properties component of Chemical Engineering Design "
                  "Library (ChEDL), https://github.com/CalebBell/chemicals (the coefficient tables it carries).")
    options = {
        "tolerance_percent": Option(float, "largest acceptable deviation from the reference", "%", 0.001, 1000),
        "gross_percent": Option(float, "a deviation beyond this is another substance's equation", "%", 0.01,
                                1e6),
    }

    def run(self, ctx) -> CheckResult:
        from ..thermo.equations import ln_p_where_defined
        from ._util import skipped

        s = ctx.settings(self.id)
        ref = ctx.reference
        if ref is None:
            who = ctx.dataset.metadata.substance or "the substance"
            return skipped(self, f"no reference correlation is known for {who}: give one in the sheet as "
                                 "[reference_equation]")
        if ctx.T_range_K is None:
            return skipped(self, "the sheet states no range and has no table to take one from")
        lo, hi = ctx.T_range_K
        a, b = max(lo, ref.T_min), min(hi, ref.T_max)
        if not b > a:
            return CheckResult(self.id, self.title, s.severity,
                               f"the stated range {lo:.5g}–{hi:.5g} K lies outside the range of {ref.name} "
                               f"({ref.T_min:.5g}–{ref.T_max:.5g} K): nothing to compare", {})
        T = np.linspace(a, b, 41)
        with np.errstate(all="ignore"):
            ln_ref = ln_p_where_defined(ref.equation, T)
            d = ctx.decoding.equation.ln_p(T) - ln_ref
        ok = np.isfinite(ln_ref)
        T, d = T[ok], d[ok]
        dev = 100 * np.expm1(d)
        finite = np.isfinite(dev)
        if not finite.any():
            return CheckResult(self.id, self.title, "fail", "the sheet's equation is not defined where the "
                               f"reference is ({a:.5g}–{b:.5g} K)", {})
        k = int(np.nanargmax(np.where(finite, np.abs(dev), -1)))
        worst = float(dev[k]) if finite.all() else float("inf")
        rms = float(np.sqrt(np.mean(dev[finite] ** 2)))
        curve = {"name": ref.name, "T_K": T.tolist(), "deviation_percent": dev.tolist()}
        d = ctx.decoding
        if d.differs and d.stated_evidence is not None:
            from ..sheet.readings import equation_for

            with np.errstate(all="ignore"):
                stated = 100 * np.expm1(equation_for(ctx.sheet, d.stated_evidence.reading).ln_p(T)
                                        - ln_p_where_defined(ref.equation, T))
            curve.update({"stated_deviation_percent": stated.tolist(), "stated_label": d.stated_evidence.reading.label})
        rows = [p for p in ctx.dataset.points if p.readable and ref.T_min <= p.T_K <= ref.T_max and p.P_Pa > 0]
        with np.errstate(all="ignore"):
            ln_ref_rows = np.atleast_1d(ln_p_where_defined(ref.equation, np.array([p.T_K for p in rows])))
            table = [(p.row, p.T_K, 100 * float(np.expm1(math.log(p.P_Pa) - lr))) for p, lr in zip(rows, ln_ref_rows)]
        curve["table"] = [{"row": r, "T_K": t, "deviation_percent": v, "status": ctx.status[r]}
                          for r, t, v in table if np.isfinite(v)]
        ctx.plot_data["sheet_reference"] = curve
        ctx.plot_data["sheet_reference_summary"] = {"compared_K": [float(a), float(b)], "max_deviation_percent": worst,
                                                    "at_K": float(T[k]), "rms_deviation_percent": rms}
        part = "" if (a, b) == (lo, hi) else f" (the part of the stated {lo:.5g}–{hi:.5g} K where it is valid)"
        text = (f"largest deviation {worst:+.3g} % at {T[k]:.5g} K, rms {rms:.2g} %, from {ref.name} over "
                f"{a:.5g}–{b:.5g} K{part}")
        metrics = {"max_deviation_percent": worst, "at_K": float(T[k]), "rms_deviation_percent": rms,
                   "reference": ref.name, "compared_from_K": float(a), "compared_to_K": float(b)}
        if not abs(worst) <= s["gross_percent"]:
            return CheckResult(self.id, self.title, "fail",
                               f"{text}: beyond {s['gross_percent']:g} %, the coefficients are likely another "
                               "substance's", metrics)
        if abs(worst) > s["tolerance_percent"]:
            return CheckResult(self.id, self.title, s.severity, f"{text} (limit {s['tolerance_percent']:g} %)",
                               metrics)
        return CheckResult(self.id, self.title, "pass", f"{text}, within {s['tolerance_percent']:g} %", metrics)
