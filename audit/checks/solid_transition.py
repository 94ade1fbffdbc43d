"""Check ``solid-transition``: where the sublimation curves of two crystal forms cross."""

from __future__ import annotations

from ..model import crystal_form_of, is_solid
from ..results import CheckResult, TransitionRecord
from .fits import corrected_crossing, recommended
from ._util import skipped
from .registry import Check, Option, register


@register
class SolidTransition(Check):
    """Transition temperatures and enthalpies between crystal forms.

    **What it checks.** When the phase labels name two crystal forms or more
    (``cr I``/``cr II``, ``s1``/``s2``, ``α``/``β``: each form is a solid
    branch of its own), the fits of record of forms adjacent in temperature
    are intersected like solid and liquid at a triple point: the transition
    temperature and pressure with their standard uncertainties, and the
    enthalpy of transition ΔH_trs = ΔH_sub(low-T form) − ΔH_sub(high-T form)
    there (real-gas corrected when the constants allow).  Fails when the two
    curves do not cross within ``crossing_margin_K`` of the junction of the
    two forms' data, or when ΔH_trs ≤ 0 (the form stable below the
    transition must have the steeper sublimation curve).

    **Why it matters.** Each crystal form has its own vapor pressure; mixed
    into one solid branch, two forms bend the fit and get good points
    rejected.  Where the forms' curves cross is the transition temperature,
    a property a curator can compare with calorimetry.

    **Method.** The solid branches whose labels name a crystal form and whose
    fits of record rest on at least ``min_points_per_branch`` points are
    ordered by temperature; for each pair adjacent in temperature: (1) the two
    fits are intersected (root of the difference of ln P bracketed and found
    by Brent's method); (2) u(T), u(P) and u(ΔH_trs) follow from both
    parameter covariances by the delta method; ΔH_trs = Δz·ΔH_sub,app(low-T
    form) − Δz·ΔH_sub,app(high-T form) at the crossing, real-gas corrected
    when the constants allow; (3) the check fails when the curves do not
    cross, cross farther than ``crossing_margin_K`` from the junction of the
    two forms' data, or give ΔH_trs ≤ 0.

    **Example.** forms II (250–300 K) and I (300–340 K) → "II → I at
    300.2 ± 0.4 K, 1.23 ± 0.05 kPa; ΔH_trs = 2.9 ± 0.3 kJ/mol".

    **Options.** ``crossing_margin_K``, ``min_points_per_branch``.
    """

    id = "solid-transition"
    title = "Transitions between crystal forms"
    method = ("The fits of record of crystal forms adjacent in temperature are intersected (Brent's "
              "method); u(T), u(P) and u(ΔH_trs) follow from both parameter covariances by the delta "
              "method; ΔH_trs = Δz·ΔH_sub,app(low-T form) − Δz·ΔH_sub,app(high-T form).")
    references = (
        "Clapeyron equation for each solid–vapor equilibrium; at a solid–solid transition both forms "
        "have one vapor pressure and ΔH_trs = ΔH_sub,low − ΔH_sub,high (Hess), e.g. Atkins' Physical "
        "Chemistry, §4B.",
        "R. P. Brent, Algorithms for Minimization without Derivatives (Prentice-Hall, 1973), ch. 4 — the "
        "root finder.",
        "JCGM 100:2008 (GUM) §5.1 — propagation of uncertainty (delta method).",
    )
    options = {
        "crossing_margin_K": Option(float, "how far outside the junction of the two forms' data the "
                                    "curves may cross", "K", 0, 200),
        "min_points_per_branch": Option(int, "fewest points on each form's branch [-]", "", 3, 1000),
    }

    def run(self, ctx):
        s = ctx.settings(self.id)
        forms = [b for b in ctx.branches() if is_solid(b) and crystal_form_of(b)]
        if len(forms) < 2:
            return skipped(self, "the data name fewer than two crystal forms")
        nmin = s["min_points_per_branch"]
        fitted = []
        for b in forms:
            choice, data = recommended(ctx, b)
            if choice is not None and data.n >= nmin:
                fitted.append((float(data.T.min()), float(data.T.max()), b, choice.chosen))
        if len(fitted) < 2:
            return skipped(self, f"fewer than two crystal forms have {nmin} points and a fit")
        fitted.sort()
        texts, problems, records, metrics, failed = [], [], [], {}, False
        for (lo_min, lo_max, low, fit_low), (hi_min, hi_max, high, fit_high) in zip(fitted, fitted[1:]):
            est, _ = corrected_crossing(ctx, low, fit_low, high, fit_high)
            a, b = crystal_form_of(low), crystal_form_of(high)
            name = f"{a} → {b}"  # on heating: the low-temperature form turns into the other
            junction = (lo_max, hi_min)
            edge_lo, edge_hi = min(junction) - s["crossing_margin_K"], max(junction) + s["crossing_margin_K"]
            metrics[name] = {"T_K": est.T, "u_T_K": est.u_T, "P_Pa": est.P, "u_P_Pa": est.u_P,
                             "dH_J_per_mol": est.dH_fus, "u_dH_J_per_mol": est.u_dH_fus, "crossed": est.crossed}
            if not est.crossed or not edge_lo <= est.T <= edge_hi:
                failed = True
                where = (est.message if not est.crossed else f"they cross at {est.T:.2f} K, outside "
                         f"{edge_lo:.2f}–{edge_hi:.2f} K (junction of the forms' data ± {s['crossing_margin_K']} K)")
                problems.append(f"forms {a} and {b} do not meet in a sensible range: {where}")
                continue
            text = (f"{name} at {est.T:.2f} ± {est.u_T:.2g} K, {est.P:.5g} ± {est.u_P:.2g} Pa; "
                    f"ΔH_trs = {est.dH_fus / 1e3:.4g} ± {est.u_dH_fus / 1e3:.2g} kJ/mol")
            if est.dH_fus <= 0:
                failed = True
                problems.append(f"{text}: ΔH_trs ≤ 0, the form stable below the transition ({a}) must have "
                                "the steeper sublimation curve")
            else:
                texts.append(text)
            records.append(TransitionRecord(low_form=a, high_form=b, T_K=est.T, u_T_K=est.u_T, P_Pa=est.P,
                                            u_P_Pa=est.u_P, dH_J_per_mol=est.dH_fus,
                                            u_dH_J_per_mol=est.u_dH_fus))
        ctx.transitions = records
        return CheckResult(self.id, self.title, "fail" if failed else "pass", "; ".join(problems + texts),
                           metrics)
