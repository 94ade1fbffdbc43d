"""Check ``sheet-units``: the units a sheet states for its coefficients are the units they are in."""

from __future__ import annotations

from ..results import CheckResult
from .registry import Check, Option, register


@register
class SheetUnits(Check):
    """Which reading of a supplier sheet's coefficients is the real one.

    **What it checks.** Every reading of the coefficients — what the equation
    gives (log10 P, ln P or P) × temperature unit × pressure unit — is scored
    by the evidence at hand: the reference over the stated range, the sheet's
    own table, the normal boiling point, and physics (P defined, the implied
    enthalpy positive and between ``min_dH_kJ_per_mol`` and
    ``max_dH_kJ_per_mol``, below the critical point; Trouton's ratio within
    ``trouton_band`` and Antoine's C in its usual range as lighter doubts).
    The reading the sheet states is kept unless another is better by more
    than ``decisive_percent`` in P and by a factor of two, or the stated one
    breaks physics where another does not.  See :mod:`audit.sheet.decode`.

    **Why it matters.** A unit note that is wrong or missing ("P in kPa" on
    coefficients for mmHg, log10 for ln, K for °C) is the commonest fault of a
    property sheet, and it moves every pressure by a constant factor — a
    factor a relief-valve calculation silently inherits.

    **Method.** Every candidate reading — what the equation gives (log10 P, ln
    P or P) × temperature unit (K, °C, °F) × one pressure unit per size — is
    scored by the evidence available, in ln P: the rms of ln(P_sheet/P_ref)
    over the stated range where the reference is valid; the median
    |ln(P_sheet/P_table)| over the sheet's own table; without a reference,
    |ln(P_sheet(Tb)/101.325 kPa)| at the normal boiling point; and physics — P
    defined over the range, the implied enthalpy positive and between
    ``min_dH_kJ_per_mol`` and ``max_dH_kJ_per_mol``, below the critical point
    (violations, weighed heavily), Trouton's ratio within ``trouton_band`` and
    Antoine's C in its usual range (doubts, weighed lightly). The reading of
    least total misfit is the decoded one; the stated reading stands unless
    another is better by more than ``decisive_percent`` and by a factor of
    two, or the stated one violates physics where another does not. The check
    fails when no reading is physical, and warns when the decoded reading
    differs from the stated one or when missing units could be decided by
    physics only.

    **Example.** "the sheet states log10(P/kPa) with T in °C, but the
    coefficients are log10(P/mmHg) with T in °C: reference rms 0.3 % (as
    stated ×7.5)".

    **Options.** ``decisive_percent``, ``min_dH_kJ_per_mol``,
    ``max_dH_kJ_per_mol``, ``trouton_band``.
    """

    id = "sheet-units"
    applies_to = "sheet"
    title = "Units of the sheet's coefficients"
    method = ("Each reading (log base × T unit × P unit) of the coefficients is scored by its rms deviation "
              "from the reference over the stated range, its median deviation from the sheet's table, its "
              "pressure at the normal boiling point, and physical violations; the stated reading stands "
              "unless another is decisively better.")
    references = ("F. M. Trouton, Phil. Mag. 18, 54 (1884) (Trouton's rule, common practice as a band).",
                  "C. Antoine, C. R. Acad. Sci. 107, 681 (1888).")
    options = {
        "decisive_percent": Option(float, "how much better (in P) another reading must fit to overturn the "
                                   "stated one", "%", 0.1, 1000),
        "min_dH_kJ_per_mol": Option(float, "smallest plausible implied enthalpy", "kJ/mol", 0, 1000),
        "max_dH_kJ_per_mol": Option(float, "largest plausible implied enthalpy", "kJ/mol", 1, 10000),
        "trouton_band": Option(list, "plausible ΔH(Tb)/Tb at the equation's normal boiling point", "J/(mol K)"),
    }

    def run(self, ctx) -> CheckResult:
        s = ctx.settings(self.id)
        d = ctx.decoding
        best, stated = d.best_evidence, d.stated_evidence
        metrics = {"decoded": d.best.label, "decided_by": d.basis, "misfit_ln": best.misfit,
                   "stated": stated.reading.label if stated is not None else None,
                   "stated_misfit_ln": None if stated is None else stated.misfit}
        if best.violations:
            return CheckResult(self.id, self.title, "fail",
                               f"no reading of the coefficients is physical; the best, {d.best.label}: "
                               f"{best.summary()}", metrics)
        if d.differs:
            return CheckResult(self.id, self.title, s.severity,
                               f"the sheet states {stated.reading.label}, but the coefficients are {d.best.label}: "
                               f"{best.summary()} (as stated: {stated.summary()})", metrics)
        if not ctx.sheet.stated.complete and d.basis == "physics only":
            return CheckResult(self.id, self.title, s.severity,
                               f"the sheet does not state all its units, and neither a reference nor a table "
                               f"with units of its own can decide them; taken as {d.best.label} "
                               f"({best.summary()})", metrics)
        how = "as stated" if ctx.sheet.stated.complete else "decoded (the sheet does not state them all)"
        return CheckResult(self.id, self.title, "pass",
                           f"the coefficients read {how}: {d.best.label}; decided by {d.basis}: {best.summary()}",
                           metrics)
