"""Check ``enthalpy-continuity``: the enthalpy the slope implies is positive and smooth."""

from __future__ import annotations

from collections import defaultdict

import numpy as np

from ..results import CheckResult, PointFlag
from .fits import recommended
from ._util import coverage_for_source, skipped
from .registry import Check, Option, register


@register
class EnthalpyContinuity(Check):
    """Local enthalpies from sliding windows against the smooth ΔH(T).

    **What it checks.** Per branch, the apparent enthalpy −R·d ln P/d(1/T)
    estimated locally from each window of ``window`` neighbouring
    temperatures *of one source* (a weighted straight line in 1/T; each
    point weighed by the σ the fit of record gave it, i.e. its source's
    consensus scatter, never below its printed precision) is compared with
    the smooth ΔH(T) of the branch's fit of record at the window's
    temperature, through the uncertainty of their difference (the window's,
    the curve's, and their covariance: the window's points are in the fit).
    A window departing by more than ``k`` times that uncertainty AND by more
    than ``tolerance_percent`` is flagged with its rows.  A step in ΔH(T) —
    the signature of one source handing over to another with a different
    temperature scale — is located by a hinge fit (F-test over all split
    positions, Bonferroni adjusted) in a model that gives each source its own
    level; it is reported when significant both against ΔH linear in T and
    against the fit of record's own form widened by ``step_smooth_terms``
    smooth terms (a fall of ΔH towards the critical point that no equation of
    the family follows is curvature, not a step).  A smooth ΔH ≤ 0, or a window
    below zero by more than ``k`` u, fails.

    **Why it matters.** By the Clapeyron equation every local slope is an
    enthalpy of vaporization or sublimation: it must be positive and change
    smoothly with temperature.  A window with a slope out of line is a
    cluster of bad points that a global fit spreads thin; a step shows
    where two data sets do not join.

    **Method.** Per branch, on the points the fit of record uses, weighted by
    the σ it gave them. (1) Points are grouped by source and sorted by T;
    every window of ``window`` consecutive distinct temperatures (replicates
    included) gets a weighted straight line ln P = a + b/T, whose local
    apparent enthalpy is −R·b. (2) Each is compared with the fit of record's
    smooth apparent ΔH(T) at the window's centre; the standard uncertainty of
    the difference combines the window's, the curve's and their covariance
    (the window's points are in the fit, as in Hausman's test). A window
    beyond ``k`` u and ``tolerance_percent`` is flagged; for a named source,
    whose σ is known only from its own rows and a prior's
    (0.37·(n − 1) degrees of freedom from each, as in ``outliers``), ``k``
    becomes the Student t quantile of the same one-sided probability. (3) With eight
    distinct temperatures or more, a continuous hinge in ln P vs 1/T (a step
    in ΔH) with a level per source is fitted at every split with at least four
    points a side; its F-test p-value is Bonferroni-adjusted over the splits,
    once against ΔH linear in T and once against the fit of record's form plus
    ``step_smooth_terms`` Legendre terms in 1/T; a step is reported when the
    larger p is below ``step_alpha`` and it exceeds ``step_tolerance_percent``
    of the median ΔH. (4) A window below zero by more than ``k`` u, or a
    smooth ΔH ≤ 0 on 64 temperatures of the fit's range, fails.

    **Example.** "liquid: step of +1.9 kJ/mol in ΔH at 331.2 K (p = 2e-5);
    window at 305 K: 47.1 ± 0.4 kJ/mol vs 43.8 smooth (8 σ, 7 %)".

    **Options.** ``window``, ``k``, ``tolerance_percent``, ``step_alpha``,
    ``step_tolerance_percent``, ``step_smooth_terms``.
    """

    id = "enthalpy-continuity"
    title = "Continuity of the implied enthalpy (Clapeyron)"
    method = ("Sliding windows of neighbouring temperatures within one source give local apparent "
              "enthalpies −R·b from ln P = a + b/T, weighted by the fit of record's σ; each is compared "
              "with that fit's smooth ΔH(T) through the variance of the difference (window, curve and "
              "their covariance). A continuous hinge in ln P vs 1/T (a step in ΔH), with a level per "
              "source, is tested at every split with an F-test, Bonferroni-adjusted over the splits, "
              "against ΔH linear in T and against the fit of record's form.")
    references = (
        "B. P. E. Clapeyron (1834) — ΔH = −R Δz d ln p/d(1/T).",
        "J. W. Orear, Am. J. Phys. 50, 912 (1982), doi:10.1119/1.12972 — effective variance.",
        "G. C. Chow, Econometrica 28, 591 (1960), doi:10.2307/1910133 — test for a structural break.",
        "J. A. Hausman, Econometrica 46, 1251 (1978), doi:10.2307/1913827 — variance of a difference of "
        "an efficient and a consistent estimator.",
    )
    options = {
        "window": Option(int, "distinct temperatures per local window (replicates at them included) [-]", "", 3, 50),
        "k": Option(float, "coverage factor on the local window's uncertainty [-]", "", 0.5, 20),
        "tolerance_percent": Option(float, "smallest relative departure worth flagging", "%", 0, 100),
        "step_alpha": Option(float, "significance level (adjusted) of a step in ΔH(T) [-]", "", 1e-12, 0.5),
        "step_tolerance_percent": Option(float, "smallest step in ΔH worth reporting", "%", 0, 100),
        "step_smooth_terms": Option(int, "smooth terms (Legendre polynomials in 1/T) added to the fit of "
                                    "record's form before a step is called [-]", "", 0, 6),
    }

    def run(self, ctx):
        from ..thermo.enthalpy import apparent_enthalpy, enthalpy_steps, window_departures
        from ..thermo.fitting import InsufficientData, distinct_temperatures

        s = ctx.settings(self.id)
        texts, flags, metrics, problems, failed = [], [], {}, [], False
        local_series = []
        for branch in ctx.branches():
            choice, data = recommended(ctx, branch)
            if choice is None:
                texts.append(f"{branch}: {data.n} points — no fit to compare windows with")
                continue
            fit = choice.chosen
            used = fit.weights > 0
            T, P = data.T[used], data.P[used]
            rows = np.array(data.rows)
            sig = fit.sigma_lnP_scaled
            sources = [p.source or "" for p in data.points]
            n_T = distinct_temperatures(T)
            if n_T < s["window"] + 1:
                texts.append(f"{branch}: {T.size} points at {n_T} distinct temperatures used by the fit — too "
                             f"few for windows of {s['window']} temperatures (at least {s['window'] + 1})")
                continue
            loc = window_departures(fit, window=s["window"], groups=sources)
            with np.errstate(divide="ignore", invalid="ignore"):
                z = np.abs(loc.departure) / loc.u_departure
                rel = 100 * np.abs(loc.departure) / np.abs(loc.smooth)
            # a named source's σ is known from its own rows and a prior's (as in outliers): k, meant
            # for a known σ, becomes the Student t quantile of the same one-sided probability
            rows_of = defaultdict(list)
            for i in np.flatnonzero(used):
                rows_of[sources[i]].append(data.points[i])
            k_of = {label: coverage_for_source(ctx, s["k"], label, pts) for label, pts in rows_of.items()}
            k_window = np.array([k_of.get(sources[int(loc.order[a])], s["k"]) for a in loc.start], dtype=float)
            k_window = k_window.reshape(z.shape)
            bad = (z > k_window) & (rel > s["tolerance_percent"])
            for w in np.flatnonzero(bad):
                window_rows = sorted(int(r) for r in rows[loc.order[loc.start[w]:loc.stop[w]]])
                msg = (f"local ΔH {loc.dH[w] / 1e3:.4g} ± {loc.u_dH[w] / 1e3:.2g} kJ/mol at "
                       f"{loc.T_center[w]:.2f} K vs {loc.smooth[w] / 1e3:.4g} kJ/mol from the {branch} fit: "
                       f"{z[w]:.1f} u and {rel[w]:.2g} % (limits {k_window[w]:.3g} u and {s['tolerance_percent']} %)")
                problems.append(f"{branch}: window rows {window_rows[0]}–{window_rows[-1]}: {msg}")
                centre = window_rows[len(window_rows) // 2]
                flags.append(PointFlag(centre, self.id, s.severity, msg))
            # a window's slope below zero by more than k u is impossible; one merely
            # scattered below zero is noise, judged like any other window above
            negative = int(np.sum(loc.dH + s["k"] * loc.u_dH < 0))
            smooth_T = np.linspace(fit.T_range[0], fit.T_range[1], 64)
            smooth_nonpositive = bool(np.any(apparent_enthalpy(fit.equation, smooth_T) <= 0))
            if negative or smooth_nonpositive:
                failed = True
                what = [f"{negative} local enthalpies below zero by more than {s['k']} u"] if negative else []
                what += ["the fit's smooth ΔH(T) reaches zero or below"] if smooth_nonpositive else []
                problems.append(f"{branch}: {' and '.join(what)} — impossible for vaporization or sublimation")
            m = {"n_windows": int(loc.dH.size), "n_windows_flagged": int(bad.sum()),
                 "max_departure_u": float(np.nanmax(z)) if np.isfinite(z).any() else None,
                 "max_departure_percent": float(np.nanmax(rel)) if np.isfinite(rel).any() else None,
                 "n_nonpositive": negative + int(smooth_nonpositive),
                 "windows_within": "source" if any(sources) else "branch"}
            for i in range(loc.dH.size):
                local_series.append({"branch": branch, "T_K": float(loc.T_center[i]),
                                     "dH_J_per_mol": float(loc.dH[i]), "u_dH_J_per_mol": float(loc.u_dH[i])})
            if n_T >= 8:
                groups = np.asarray(sources, dtype=object)[used] if any(sources) else None
                try:
                    # sized against ΔH linear in T (a flexible equation bends towards a step and
                    # would understate it), reported only when the fit of record's own form does
                    # not explain it either (over a wide range ΔH is not linear in T)
                    step = enthalpy_steps(T, P, None, sig[used] * P, min_points_per_side=4, groups=groups)
                    beyond = enthalpy_steps(T, P, None, sig[used] * P, min_points_per_side=4, groups=groups,
                                            form=type(fit.equation), fixed=fit.equation.fixed_parameters(),
                                            smooth_terms=s["step_smooth_terms"])
                except (InsufficientData, ValueError):
                    step = beyond = None
                if step is not None:
                    step_rel = 100 * abs(step.dH_step) / float(np.median(np.abs(
                        apparent_enthalpy(fit.equation, T))))
                    m.update({"step_T_K": step.T_step, "step_dH_J_per_mol": step.dH_step,
                              "u_step_dH_J_per_mol": step.u_dH_step, "step_p_adjusted": step.p_value_adjusted,
                              "step_p_adjusted_beyond_fit_of_record": beyond.p_value_adjusted})
                    if (max(step.p_value_adjusted, beyond.p_value_adjusted) < s["step_alpha"]
                            and step_rel > s["step_tolerance_percent"]):
                        problems.append(f"{branch}: step of {step.dH_step / 1e3:+.3g} ± "
                                        f"{step.u_dH_step / 1e3:.2g} kJ/mol ({step_rel:.2g} %) in ΔH at "
                                        f"{step.T_step:.2f} K (adjusted p = {step.p_value_adjusted:.2g}, and "
                                        f"{beyond.p_value_adjusted:.2g} beyond the {choice.chosen_name} fit of "
                                        f"record with {s['step_smooth_terms']} further smooth terms; limit "
                                        f"{s['step_alpha']})")
            metrics[branch] = m
            if not any(p.startswith(f"{branch}:") for p in problems):
                if loc.dH.size and m["max_departure_u"] is not None and m["max_departure_percent"] is not None:
                    texts.append(f"{branch}: {loc.dH.size} windows of {s['window']} temperatures"
                                 + (" within one source each" if any(sources) else "")
                                 + f" agree with the smooth ΔH(T) (largest departure {m['max_departure_u']:.2g} u, "
                                 f"{m['max_departure_percent']:.2g} %); no step")
                elif loc.dH.size:
                    # windows whose departure is not finite (a fit that cannot be evaluated there)
                    texts.append(f"{branch}: {loc.dH.size} windows of {s['window']} temperatures, none with a "
                                 "finite departure from the smooth ΔH(T); no step tested")
                else:
                    texts.append(f"{branch}: no source has {s['window']} distinct temperatures for a local window; "
                                 "no step")
        ctx.plot_data["local_enthalpy"] = local_series
        if not metrics:
            return skipped(self, "; ".join(texts) or "no usable branch")
        status = "fail" if failed else (s.severity if problems else "pass")
        return CheckResult(self.id, self.title, status, "; ".join(problems + texts), metrics, tuple(flags))
