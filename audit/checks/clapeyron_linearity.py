"""Check ``clapeyron-linearity``: how straight is ln P against 1/T, and why not."""

from __future__ import annotations

import numpy as np

from ..model import is_solid
from ..results import CheckResult, PointFlag
from .fits import MIN_POINTS_FOR_FIT, recommended
from ._util import skipped
from .registry import Check, Option, register


@register
class ClapeyronLinearity(Check):
    """Curvature of ln P against 1/T and structure left in the residuals.

    **What it checks.** Per branch: (1) whether a curved form, ln P = A +
    B/T + C ln T (constant ΔCp), fits significantly better than the straight
    Clausius–Clapeyron line ln P = A + B/T (F-test, or χ² difference when
    uncertainties are given), and the sign and size of the ΔCp = R·C it
    implies; (2) whether the residuals of the recommended equation, ordered
    by temperature, still show runs of one sign (Wald–Wolfowitz runs test,
    with the Durbin–Watson statistic reported).

    **Why it matters.** The straight line assumes a constant enthalpy.  Real
    enthalpies of vaporization fall with temperature (ΔCp < 0, typically
    −30 to −120 J mol⁻¹ K⁻¹ for liquids near room temperature), so a
    significant curvature of that sign and size is physics and passes.  A
    curvature implying ΔH rising with temperature (ΔCp > 0 beyond its
    uncertainty, for a liquid: with the phase not known it is reported, not
    flagged, since a sublimation's ΔCp is positive at low temperatures, as
    ice's below about 200 K), or an implausibly large |ΔCp|, points to a
    temperature-scale error, mixed sources or a mislabelled branch; residual
    runs left by the recommended equation mean no smooth curve describes
    the data in that temperature range.

    **Method.** Weighted least squares on ln P with the effective variance
    σ²(ln P) = (u_P/P)² + (d ln P/dT)² u_T², nested-model F (or χ²) test —
    with two or more named sources, both forms with a level of their own for
    each source (:func:`audit.thermo.stats.curvature_test_with_levels`), so
    that sources a little apart do not bend the common curve;
    equation chosen by AICc among physically sane candidates
    (:func:`audit.thermo.fitting.select_equation`); runs test on the signs of
    the recommended fit's residuals — with named sources, runs counted
    within each source and pooled (:func:`audit.thermo.stats.grouped_residual_runs`):
    each source of a compilation sits a little off the consensus, all its
    points on one side, which is not a misfit of the curve.

    **Example.** water 0–100 °C: "liquid: curvature significant (p = 1e-12),
    ΔCp = −44 ± 3 J mol⁻¹ K⁻¹ — within the plausible band; residuals show
    no runs".

    **Options.** ``curvature_alpha``, ``max_abs_dCp_J_per_mol_K``,
    ``positive_dCp_k``, ``runs_alpha``, ``min_points``.
    """

    id = "clapeyron-linearity"
    title = "Straightness of ln P against 1/T (Clausius–Clapeyron)"
    method = ("Per branch, the two-constant Clausius–Clapeyron line and the constant-ΔCp form are "
              "fitted by effective-variance weighted least squares; a nested F- (or χ²-) test decides "
              "whether the curvature is real, and its ΔCp = R·C is judged for sign and size. The "
              "residuals of the recommended equation (AICc with physical sanity), ordered by T, get a "
              "Wald–Wolfowitz runs test and the Durbin–Watson statistic.")
    references = (
        "B. P. E. Clapeyron (1834); R. Clausius, Ann. Phys. 155, 500 (1850), doi:10.1002/andp.18501550403.",
        "D. Ambrose, in Experimental Thermodynamics Vol. II (Butterworths, 1975) — curvature of "
        "ln p vs 1/T and ΔCp of vaporization.",
        "J. W. Orear, Am. J. Phys. 50, 912 (1982), doi:10.1119/1.12972 — least squares when x and y "
        "both carry uncertainty (effective variance).",
        "A. Wald, J. Wolfowitz, Ann. Math. Stat. 11, 147 (1940), doi:10.1214/aoms/1177731909 — runs test.",
        "J. Durbin, G. S. Watson, Biometrika 37, 409 (1950), doi:10.1093/biomet/37.3-4.409.",
    )
    options = {
        "curvature_alpha": Option(float, "significance level of the curvature test [-]", "", 1e-9, 0.5),
        "max_abs_dCp_J_per_mol_K": Option(float, "largest plausible |ΔCp| of the phase change "
                                          "(common practice: about 200 for ordinary liquids)",
                                          "J mol⁻¹ K⁻¹", 1, 2000),
        "positive_dCp_k": Option(float, "ΔCp > 0 is flagged when ΔCp − k·u(ΔCp) > 0 (liquid branch) [-]",
                                 "", 0, 10),
        "runs_alpha": Option(float, "significance level of the runs test on residual signs [-]", "", 1e-9, 0.5),
        "min_points": Option(int, "fewest distinct temperatures of a branch for these tests [-]", "", 4, 1000),
    }

    def run(self, ctx):
        from ..thermo.fitting import distinct_temperatures, fit_equation
        from ..thermo.stats import curvature_test, curvature_test_with_levels, grouped_residual_runs

        s = ctx.settings(self.id)
        per_branch, flags, warn_texts, metrics = [], [], [], {}
        for branch in ctx.branches():
            choice, data = recommended(ctx, branch)
            w = None if choice is None else choice.point_weights
            # the three-constant form needs four temperatures; replicates add none
            n_T = 0 if w is None else distinct_temperatures(data.T[w > 0])
            if choice is None or data.n < MIN_POINTS_FOR_FIT or n_T < max(s["min_points"], 4):
                per_branch.append(f"{branch}: {data.n} points at {n_T} distinct temperatures used by the fit "
                                  f"— too few to test (at least {max(s['min_points'], 4)} temperatures)")
                continue
            f2 = fit_equation(data.T, data.P, "cc2", data.u_T, data.u_P, robust=False, point_weights=w)
            f3 = fit_equation(data.T, data.P, "cc3", data.u_T, data.u_P, robust=False, point_weights=w)
            curv = curvature_test(f2, f3)
            # with named sources, within each source: two sources a little apart bend a common curve
            src = np.array([p.source or "" for p in data.points], dtype=object)
            on = w > 0
            if len({x for x in src[on] if x}) >= 2:
                try:
                    curv = curvature_test_with_levels(data.T[on], np.log(data.P[on]), f3.sigma_lnP_scaled[on],
                                                      list(src[on]), scale_known=not f3.scale_estimated)
                except ValueError:
                    pass  # the sources' temperatures do not fix a curvature within them: the common one
            m = {"n": data.n, "curvature_p_value": curv.p_value, "curvature_test": curv.method,
                 "dCp_J_per_mol_K": curv.dCp, "u_dCp_J_per_mol_K": curv.u_dCp, "T_ref_K": curv.T_ref,
                 "recommended_equation": choice.chosen_name,
                 "rms_percent": choice.chosen.rms_percent}
            text = [f"{branch}: "]
            significant = curv.p_value < s["curvature_alpha"]
            band = s["max_abs_dCp_J_per_mol_K"]
            dcp_txt = f"ΔCp = {curv.dCp:.3g} ± {curv.u_dCp:.2g} J mol⁻¹ K⁻¹ at {curv.T_ref:.1f} K"
            if not significant:
                text.append(f"no significant curvature (p = {curv.p_value:.2g} ≥ {s['curvature_alpha']})")
            elif (not is_solid(branch) and abs(curv.dCp) <= band
                  and curv.dCp - s["positive_dCp_k"] * curv.u_dCp > 0):
                text.append(f"curvature implies ΔH rising with T: {dcp_txt} > 0 "
                            f"(more than {s['positive_dCp_k']}·u)")
                if branch == "unknown":
                    # a sublimation's ΔCp (vapour minus crystal) is positive at low temperatures, as
                    # ice's below about 200 K: with the phase not known this is no finding
                    text.append(" — impossible for a vaporization, possible for a sublimation (phase not known)")
                else:
                    warn_texts.append(text[-1])
            elif abs(curv.dCp) > band:
                text.append(f"curvature implies |ΔCp| beyond the plausible band: {dcp_txt}, limit {band:g}")
                warn_texts.append(text[-1])
            else:
                text.append(f"curved as expected, {dcp_txt} (p = {curv.p_value:.2g}), within ±{band:g}")
            # residual structure of the recommended fit, over the points it used
            used = choice.chosen.weights > 0
            resid = choice.chosen.residuals_lnP[used]
            rows_used = np.array(data.rows)[used]
            T_used = data.T[used]
            if resid.size >= s["min_points"]:
                # within each source: a compilation's sources sit a little apart, each on one side
                runs = grouped_residual_runs(resid, list(src[used]))
                m.update({"runs": runs.runs, "expected_runs": runs.expected_runs,
                          "runs_p_value": runs.p_value_too_few, "durbin_watson": runs.durbin_watson})
                if runs.p_value_too_few < s["runs_alpha"]:
                    members = list(runs.longest_run_members)
                    where = f"{T_used[members[0]]:.2f}–{T_used[members[-1]]:.2f} K"
                    t = (f"residuals of the {choice.chosen_name} fit form runs: {runs.runs} runs where "
                         f"{runs.expected_runs:.1f} are expected (p = {runs.p_value_too_few:.2g} < "
                         f"{s['runs_alpha']}), longest {runs.longest_run} points at {where}")
                    text.append("; " + t)
                    warn_texts.append(f"{branch}: {t}")
                    for r in rows_used[members]:
                        flags.append(PointFlag(int(r), self.id, s.severity,
                                               f"in a run of same-sign residuals of the {branch} fit at {where}"))
                    m["structure_T_range_K"] = [float(T_used[members[0]]), float(T_used[members[-1]])]
                else:
                    text.append(f"; residuals of the {choice.chosen_name} fit show no runs "
                                f"(p = {runs.p_value_too_few:.2g})")
            metrics[branch] = m
            per_branch.append("".join(text))
        if not metrics:
            return skipped(self, "no branch has enough usable points: " + "; ".join(per_branch))
        status = s.severity if warn_texts else "pass"
        return CheckResult(self.id, self.title, status, ". ".join(per_branch), metrics, tuple(flags))
