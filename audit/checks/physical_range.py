"""Check ``physical-range``: values a vapor pressure can physically take."""

from __future__ import annotations

import math

from ..results import CheckResult, PointFlag
from ._util import fmt, rows_text, worst_status
from .registry import Check, Option, register


@register
class PhysicalRange(Check):
    """Temperatures and pressures outside what a saturation curve allows.

    **What it checks.** T > 0 K and P > 0 for every readable row; when the
    critical point is known (metadata or substance library), T ≤ Tc and
    P ≤ Pc, because a two-phase equilibrium — hence a vapor pressure — ends
    at the critical point.  For a row labelled solid, T ≤ T_triple (plus the
    allowance) when the triple point is known.

    **Why it matters.** A negative kelvin value is a °C value in a kelvin
    column or a sign slip; a pressure above Pc is a unit slip or a
    supercritical state point pasted into a saturation table.

    **Method.** Direct comparison with the thermodynamic limits, row by row,
    on every readable row (converted to K and Pa by the ingest): T must be a
    finite number above 0 K and P a finite number above 0 Pa; where the
    metadata give them, T ≤ Tc·(1 + a) and P ≤ Pc·(1 + a) with
    a = ``critical_allowance_percent``/100, which absorbs the uncertainty of
    the critical constants themselves; a row labelled solid must lie at or
    below T_triple + ``triple_allowance_K``.  A row breaking any limit is
    rejected, with every limit it breaks named, and no later check fits it.

    **Example.** ``T/K = -10`` → reject: "T = -10 K is not above 0 K".

    **Options.** ``critical_allowance_percent``, ``triple_allowance_K``.
    """

    id = "physical-range"
    title = "Physically possible temperature and pressure"
    method = ("Readable values are compared with absolute zero, zero pressure, the critical "
              "point and, for solid-labelled rows, the triple point.")
    references = ("IUPAC Green Book, 3rd ed. (2007), doi:10.1039/9781847557889 — thermodynamic "
                  "temperature is positive; a vapor–liquid coexistence curve ends at the critical point.",)
    options = {
        "critical_allowance_percent": Option(float, "tolerance above Tc and Pc before rejecting", "%", 0, 50),
        "triple_allowance_K": Option(float, "how far above T_triple a solid-labelled row may lie", "K", 0, 50),
    }

    def run(self, ctx):
        s = ctx.settings(self.id)
        md = ctx.dataset.metadata
        Tc, Pc, Tt = md.get("T_critical"), md.get("P_critical"), md.get("T_triple")
        allow = 1 + s["critical_allowance_percent"] / 100
        flags: list[PointFlag] = []
        reject: dict[int, str] = {}
        for p in ctx.dataset.points:
            if not p.readable:
                continue
            problems = []
            if not (math.isfinite(p.T_K) and p.T_K > 0):
                problems.append(f"T = {fmt(p.T_K)} K is not above 0 K")
            if not (math.isfinite(p.P_Pa) and p.P_Pa > 0):
                problems.append(f"P = {fmt(p.P_Pa)} Pa is not positive")
            if Tc is not None and p.T_K > Tc * allow:
                problems.append(f"T = {fmt(p.T_K)} K is above the critical temperature {fmt(Tc)} K")
            if Pc is not None and p.P_Pa > Pc * allow:
                problems.append(f"P = {fmt(p.P_Pa)} Pa is above the critical pressure {fmt(Pc)} Pa")
            if Tt is not None and p.phase == "solid" and p.T_K > Tt + s["triple_allowance_K"]:
                problems.append(f"row labelled solid at T = {fmt(p.T_K)} K, above the triple point "
                                f"{fmt(Tt)} K (limit +{s['triple_allowance_K']} K)")
            if problems:
                reject[p.row] = "reject"
                flags.append(PointFlag(p.row, self.id, s.severity, "; ".join(problems)))
        checked = sum(1 for p in ctx.dataset.points if p.readable)
        limits = ["T > 0 K", "P > 0"]
        if Tc is not None:
            limits.append(f"T ≤ Tc = {fmt(Tc)} K")
        if Pc is not None:
            limits.append(f"P ≤ Pc = {fmt(Pc)} Pa")
        if reject:
            msg = f"{len(reject)} of {checked} readable rows outside {', '.join(limits)}: {rows_text(reject)}"
        else:
            msg = f"all {checked} readable rows within {', '.join(limits)}"
        return CheckResult(self.id, self.title, worst_status(len(reject), s.severity), msg,
                           {"n_checked": checked, "n_outside": len(reject), "limits": limits},
                           tuple(flags), reject)
