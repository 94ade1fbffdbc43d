"""Check ``outliers``: points off the consensus curve, with a likely cause.

The consensus of each branch — gross-error screen, equation choice,
reject-and-refit loop, sources found systematically off and their offsets,
the fit of record — is built by :mod:`audit.consensus` with this check's
limits (its profile section) and kept on the context as
``ctx.consensus``.  This check reads it: points beyond the critical
values are flagged, and each gets the cause hypotheses of
:mod:`audit.diagnose` scored against the consensus.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np

from ..consensus import ConsensusModel, build_branch_consensus
from ..diagnose import diagnose_point
from ..diagnose.units import pressure_unit_size_Pa, pressure_units_of_size, split_log_unit
from ..model import is_solid
from ..results import Cause, CheckResult, PointFlag
from ..thermo.ratios import percent_from_log_ratio
from ._util import rows_text, skipped, worst_status
from .registry import Check, Option, register


def _relabel_blocks(diagnoses, points_by_row, branch_rows):
    """A contiguous block (≥ 2 rows, input order) with the same power-of-ten
    pressure slip is a unit slip, not a decimal point misplaced twice."""
    order = sorted(branch_rows)
    out = dict(diagnoses)
    run: list[int] = []

    def flush(run):
        if len(run) >= 2:
            p0 = points_by_row[run[0]]
            base, unit = split_log_unit(p0.P_text_unit)
            try:
                size = pressure_unit_size_Pa(unit)
            except ValueError:
                return
            factor = out[run[0]].best.hypothesis.factor
            alt = pressure_units_of_size(size * factor, rel=1e-6)
            if alt is None:
                return
            for row in run:
                d = out[row]
                h = d.best.hypothesis
                reading = (f"P printed '{h.printed}' taken as {unit} but written in {alt} "
                           f"(rows {run[0]}–{run[-1]} share this slip)")
                out[row] = type(d)(d.row, d.z_before, type(d.best)(type(h)("pressure-unit", h.T_K, h.P_Pa, "P",
                                   h.printed, reading, h.factor), d.best.z_after), d.ranked, d.reason)

    def key(row):
        d = out.get(row)
        if d is None or d.best is None:
            return None
        h = d.best.hypothesis
        if h.quantity != "P" or h.kind not in ("decimal-shift", "pressure-unit"):
            return None
        return round(math.log10(h.factor), 6)

    prev = None
    for row in order:
        kk = key(row)
        if kk is not None and kk == prev and run:
            run.append(row)
        else:
            flush(run)
            run = [row] if kk is not None else []
        prev = kk
    flush(run)
    return out


def _extend_unit_blocks(diagnoses, c, pts, k: float):
    """Rejected rows beside a row read in another pressure unit, with no cause of their own.

    A block of rows typed in another unit often runs to one end of the range,
    where the consensus curve is an extrapolation: the row nearest the data
    reads right in the other unit, the far ones miss by the curve's own
    error there.  For a run of neighbouring rejected rows (input order) that
    holds one such reading and rows with none, all the run's rows are read
    in that unit and fitted together with the branch's kept rows (three
    Clausius–Clapeyron constants, each row weighed by its σ in the
    consensus): when every row of the run then lies within ``k`` σ of that
    curve and no kept row moves beyond ``k`` σ, the rows without a cause get
    the block's.
    """
    from ..diagnose.choose import ScoredHypothesis
    from ..diagnose.hypotheses import pressure_unit_hypotheses
    from ..thermo.fitting import distinct_temperatures, fit_equation

    index = {p.row: i for i, p in enumerate(pts)}
    order = sorted(index)
    out = dict(diagnoses)
    runs, run = [], []
    for row in order:
        if c.reject[index[row]]:
            run.append(row)
        else:
            runs.append(run)
            run = []
    runs.append(run)
    kept = ~np.asarray(c.reject, bool)
    T_all = np.array([p.T_K for p in pts])
    P_all = np.array([p.P_Pa for p in pts]) * np.exp(-np.asarray(c.offsets_lnP, float))
    sig_all = np.asarray(c.sigma, float)
    for run in runs:
        units = [r for r in run if out.get(r) is not None and out[r].best is not None
                 and out[r].best.hypothesis.kind == "pressure-unit" and out[r].best.hypothesis.quantity == "P"]
        bare = [r for r in run if out.get(r) is not None and out[r].best is None]
        factors = {round(math.log10(out[r].best.hypothesis.factor), 6) for r in units}
        if not units or not bare or len(factors) != 1:
            continue
        factor = out[units[0]].best.hypothesis.factor
        idx = np.array([index[r] for r in run])
        use = kept.copy()
        use[idx] = True
        T, P, sig = T_all[use], P_all.copy(), sig_all[use]
        P[idx] *= factor
        P = P[use]
        if not (np.all(np.isfinite(sig)) and np.all(sig > 0)) or distinct_temperatures(T) < 5:
            continue
        try:
            fit = fit_equation(T, P, "cc3", u_P=sig * P, robust=False)
        except (ValueError, np.linalg.LinAlgError):
            continue
        z = np.full(len(pts), np.nan)
        z[use] = np.asarray(fit.residuals_lnP) / sig
        if not (np.all(np.abs(z[idx]) <= k) and np.all(np.abs(z[kept]) <= k)):
            continue
        for r in bare:
            p, d = pts[index[r]], out[r]
            h = next((h for h in pressure_unit_hypotheses(p) if abs(h.factor / factor - 1) < 1e-9), None)
            if h is None:
                continue
            h = replace(h, reading=h.reading + f" (rows {run[0]}–{run[-1]} share this slip; read together with "
                                               "the kept rows)")
            out[r] = type(d)(d.row, d.z_before, ScoredHypothesis(h, float(z[index[r]])), d.ranked, d.reason)
    return out


def _causes_of_rows_set_aside(ctx, branches, s) -> dict[int, Cause]:
    """Causes of rows rejected before the consensus (``physical-range``: T ≤ 0 K, P ≤ 0, …).

    Such a row is the clearest slip of all (a °C value in a kelvin column
    reads −32 K) and was never judged against a curve; its readings are
    scored against the curve of its branch (of each branch when its phase is
    not known; the best-fitting reading wins) with its source's scale.
    """
    out: dict[int, Cause] = {}
    if not branches:
        return out
    for p in ctx.dataset.points:
        if ctx.status.get(p.row) != "reject" or not p.readable or p.row in ctx.causes:
            continue
        if any(p.row in c.rows for c in branches.values()):
            continue
        phase = ctx.phase(p)
        candidates = [branches[phase]] if phase in branches else list(branches.values())
        found = [diagnose_point(p, c.reading_z(p.source), s["cause_k"], s["cause_ratio"]) for c in candidates]
        found = [d for d in found if d.best is not None]
        if not found:
            continue
        d = min(found, key=lambda x: abs(x.best.z_after))
        h = d.best.hypothesis
        out[p.row] = Cause(h.kind, d.explanation(), h.T_K if h.quantity == "T" else None,
                           h.P_Pa if h.quantity == "P" else None)
    return out


@register
class Outliers(Check):
    """Points that lie off the consensus vapor-pressure curve, with their likely cause.

    **What it checks.** For each branch, every point's standardized
    leave-one-out residual in ln P against the robust consensus fit: the
    externally studentized residual for points in the fit, the prediction
    residual for points outside it.  The standard uncertainty of each point
    is its effective variance (u_P and u_T through the slope) when the table
    gives uncertainties, else a robust scale (MAD) of the residuals — per
    source when a source has ``min_points_source_scale`` points or more and
    the sources' scatters differ at ``source_scale_alpha`` (Brown–Forsythe) —
    and never less than the rounding of its printed digits.  A point beyond
    the family-wise critical value at ``reject_alpha`` (Šidák or Bonferroni
    over the n points of the branch) is rejected and no longer bends the
    fit; one beyond that at ``suspect_alpha`` is suspect (the check warns
    when a point is rejected, or is suspect with a likely cause; suspect
    points alone are listed but, being expected by chance in up to that
    share of clean tables, do not make it warn).  The loop repeats
    until the rejected set is stable (at most ``max_iterations``).  For each
    suspect or rejected point the cause hypotheses of :mod:`audit.diagnose`
    (pressure unit, temperature unit, decimal shift, transposed digits) are
    scored; one is reported when the corrected point lies within
    ``cause_k`` σ of the curve and both the next-best reading and the value
    as printed are at least ``cause_ratio`` times worse.  The data are never changed.

    **Why it matters.** One wrong point bends a fitted curve and every
    quantity derived from it (enthalpy, extrapolations); a point at the end
    of the range bends it most and hides its own residual.  Heavily rounded
    low pressures of old tables are not wrong for being 10 % off.

    **Method.** Per branch with at least ``min_points`` usable points, the
    consensus is built in this order. (1) Gross-error screen: Siegel's
    repeated-median line of ln P on 1/T, then a robust three-constant fit
    whose zero-weight points start out rejected. (2) Equation choice: the form
    of least AICc among the physically sane candidates (critical constants
    used where known), chosen once. (3) Standard uncertainty of each point in
    ln P: the effective variance u² = u_r(P)² + (d ln P/dT)²·u(T)² when the
    table states uncertainties (replaced by the estimated scale when a χ² test
    at ``scale_alpha`` finds the data scatter more than stated), else the
    normal-consistent MAD of the residuals — per source when the source has
    ``min_points_source_scale`` points or more and the Brown–Forsythe test
    (Levene's test about the median) at ``source_scale_alpha`` finds the
    sources' scatters different — floored by the rounding of the printed
    digits, u = δ/(2√3), and by ``min_scatter_percent``. (4) Reject-and-refit
    loop, at most ``max_iterations`` times, until the rejected points and
    biased sources stop changing: a robust (Huber, then Tukey biweight)
    weighted fit of the points not rejected; a classical weighted fit of the
    points it kept; each point's leave-one-out residual from the weighted hat
    matrix — externally studentized inside the fit, the prediction residual
    outside it, and by temperature (distance to where the curve reaches its
    pressure, through the slope) far outside the fitted range; with two named
    sources or more, group-deletion residuals per source, a source beyond the
    source-agreement limits being scored after removing its offset (constant,
    or a thermometer offset ΔT·d ln P/dT). (5) A point whose |z| exceeds the
    family-wise critical value — the two-sided normal quantile at the
    per-point level 1 − (1 − α)^(1/n) (Šidák) or α/n (Bonferroni), α =
    ``reject_alpha`` or ``suspect_alpha`` — is rejected or suspect; without
    stated uncertainties a point of a named source is rejected only beyond
    the Student t quantile of the degrees of freedom with which its source's
    scatter is known (0.37·(n − 1) of the source's n rows plus those of a
    ``min_points_source_scale``-row prior, whether it keeps the pooled scale
    or its own; a one- or two-row source, whose scale is borrowed, the
    prior's alone), so that a small source is not judged as if its scatter
    were known; Cook's distance is reported for each. (6) For each suspect or rejected point the
    cause hypotheses (pressure unit, temperature unit, decimal shift,
    transposed digits) are re-scored against the final curve; a cause is named
    when its corrected point lies within ``cause_k`` σ and the next-best
    reading and the printed value are ``cause_ratio`` times worse; a
    contiguous block of two rows or more sharing one power-of-ten slip is
    renamed a pressure-unit slip; rejected rows with no cause beside a row read
    in another pressure unit (a block running off the end of the data, where the
    curve is extrapolated) take that reading when the whole run, so read, and
    the kept rows fit one three-constant curve within ``cause_k`` σ; and rows
    the physical-range check rejected are diagnosed against their branch's curve too.

    **Example.** Water, 20 points 280–370 K; row 12 printed 47.37 kPa where
    the curve gives 47.73 kPa → reject, "digit-swap: P printed '47.37' would
    read '47.73' …; residual −15.2 σ as printed, +0.3 σ corrected".

    **Options.** ``reject_alpha``, ``suspect_alpha``, ``correction``,
    ``max_iterations``, ``min_points``, ``min_points_source_scale``,
    ``scale_alpha``, ``source_scale_alpha``, ``max_source_scatter_percent``,
    ``cause_k``, ``cause_ratio``, ``min_scatter_percent``.
    """

    id = "outliers"
    title = "Points off the consensus curve"
    method = ("Repeated-median ln P–1/T screen for gross errors; robust (Huber then Tukey biweight) "
              "effective-variance fit of the AICc-chosen equation in ln P; externally studentized / "
              "prediction residuals from the weighted hat matrix (by temperature far outside the fitted "
              "range); sources judged by group-deletion residuals; Šidák or Bonferroni family-wise critical "
              "values; rounding floor u = δ/(2√3) per printed value; iterated until the rejected set is "
              "stable; cause hypotheses scored against the final fit.")
    references = (
        "R. D. Cook, Technometrics 19, 15 (1977), doi:10.1080/00401706.1977.10489493 (Cook's distance).",
        "D. A. Belsley, E. Kuh, R. E. Welsch, Regression Diagnostics (Wiley, 1980), doi:10.1002/0471725153.",
        "Z. Šidák, J. Am. Stat. Assoc. 62, 626 (1967), doi:10.1080/01621459.1967.10482935.",
        "J. Orear, Am. J. Phys. 50, 912 (1982), doi:10.1119/1.12972 (effective variance).",
        "JCGM 100:2008 (GUM), §4.3.7 (rounding as a rectangular distribution).",
        "A. F. Siegel, Biometrika 69, 242 (1982), doi:10.1093/biomet/69.1.242 (repeated medians).",
        "M. B. Brown, A. B. Forsythe, J. Am. Stat. Assoc. 69, 364 (1974), doi:10.1080/01621459.1974.10482955 "
        "(equality of variances).",
    )
    options = {
        "reject_alpha": Option(float, "family-wise false-rejection probability per branch [-]", "", 1e-6, 0.5),
        "suspect_alpha": Option(float, "family-wise false-suspicion probability per branch [-]", "", 1e-6, 0.9),
        "correction": Option(str, "multiple-testing correction over the n points (a method's name, not a "
                             "quantity: no unit)", "",
                             choices=("sidak", "bonferroni")),
        "max_iterations": Option(int, "cap on reject-and-refit rounds [-]", "", 1, 100),
        "min_scatter_percent": Option(float, "floor on the relative scatter a consensus curve is trusted to "
                                      "(common practice: vapor-pressure equations reproduce the best data to "
                                      "a few hundredths of a percent)", "%", 0, 10),
        "min_points": Option(int, "fewest usable points of a branch to test it [-]", "", 4, 1000),
        "min_points_source_scale": Option(int, "fewest points of a source to estimate its own scatter [-]",
                                          "", 3, 1000),
        "scale_alpha": Option(float, "significance at which data that state u(P), u(T) are taken to "
                              "scatter more than stated (χ² test); then the scale is estimated [-]", "", 1e-6, 0.5),
        "max_source_scatter_percent": Option(float, "largest scatter a source's rows can have as measurement "
                                             "scatter about the consensus; beyond it the source's scatter is "
                                             "measured about its own trend in 1/T", "%", 1, 1e6),
        "source_scale_alpha": Option(float, "significance at which the sources' scatters are taken as "
                                     "different (Brown–Forsythe test) and each source gets its own scale [-]",
                                     "", 1e-6, 0.5),
        "cause_k": Option(float, "a corrected point must lie within this many σ of the curve [-]", "", 0.5, 10),
        "cause_ratio": Option(float, "the next-best cause, and the value as printed, must be this many "
                              "times worse [-]", "", 1, 100),
    }

    def run(self, ctx):
        s = ctx.settings(self.id)
        ss = None
        try:
            sa = ctx.settings("source-agreement")
            ss = sa if sa.enabled else None
        except KeyError:
            ss = None
        meta = ctx.dataset.metadata
        Tc, Pc = meta.get("T_critical"), meta.get("P_critical")
        branches, not_fitted = {}, {}
        flags: list[PointFlag] = []
        status: dict[int, str] = {}
        causes: dict[int, Cause] = {}
        resid_sigma: dict[int, float] = {}
        metrics: dict = {"branches": {}}
        skipped_branches = []
        for branch in ctx.branches():
            pts = ctx.usable(branch)
            if len(pts) < s["min_points"]:
                skipped_branches.append(f"{branch}: {len(pts)} points (< {s['min_points']})")
                not_fitted[branch] = skipped_branches[-1]
                continue
            try:
                c = build_branch_consensus(pts, s, ss, None if is_solid(branch) else Tc,
                                           None if is_solid(branch) else Pc, branch)
            except (ValueError, np.linalg.LinAlgError) as exc:
                skipped_branches.append(f"{branch}: fit failed ({exc})")
                not_fitted[branch] = skipped_branches[-1]
                continue
            branches[branch] = c
            by_row = {p.row: p for p in pts}
            diagnoses = {}
            for i, p in enumerate(pts):
                resid_sigma[p.row] = float(c.z[i])
                if c.reject[i] or c.suspect[i]:
                    diagnoses[p.row] = diagnose_point(p, c.corrected_z(i), s["cause_k"], s["cause_ratio"])
            diagnoses = _relabel_blocks(diagnoses, by_row, [p.row for p in pts])
            diagnoses = _extend_unit_blocks(diagnoses, c, pts, s["cause_k"])
            for i, p in enumerate(pts):
                if not (c.reject[i] or c.suspect[i]):
                    continue
                level = "reject" if c.reject[i] else "suspect"
                status[p.row] = level
                d = diagnoses[p.row]
                crit = c.critical_reject if level == "reject" else c.critical_suspect
                msg = (f"{level}: residual {c.z[i]:+.1f} σ (limit {crit:.2f} σ), P deviates "
                       f"{c.deviation_percent[p.row]:+.3g} % from the {c.form_name} consensus fit; "
                       f"Cook's distance {c.cooks_distance[i]:.3g}")
                if d.best is not None:
                    h = d.best.hypothesis
                    causes[p.row] = Cause(h.kind, d.explanation(),
                                          h.T_K if h.quantity == "T" else None,
                                          h.P_Pa if h.quantity == "P" else None)
                    msg += f"; likely cause: {h.kind}"
                flags.append(PointFlag(p.row, self.id, "fail" if level == "reject" else "warn", msg))
            metrics["branches"][branch] = {
                "n": len(pts), "equation": c.form_name, "n_reject": int(c.reject.sum()),
                "n_suspect": int(c.suspect.sum()), "critical_reject_sigma": c.critical_reject,
                "critical_suspect_sigma": c.critical_suspect, "iterations": c.iterations,
                "converged": c.converged, "uncertainties_given": c.uncertainties_given,
                "scale": c.scale, "rms_percent": c.fit.rms_percent,
                "biased_sources": {k: percent_from_log_ratio(v.offset_lnP) for k, v in c.source_shifts.items()},
                "max_cooks_distance": float(np.max(c.cooks_distance)),
                "fit_of_record": c.origin,
            }
        ctx.consensus = ConsensusModel(branches, not_fitted)
        for row, cause in _causes_of_rows_set_aside(ctx, branches, s).items():
            causes[row] = cause
            flags.append(PointFlag(row, self.id, "fail", f"rejected before the consensus (impossible as "
                                   f"read); likely cause: {cause.kind}"))
        if not branches:
            why = "no branch has enough usable points to fit" + (
                f" ({'; '.join(skipped_branches)})" if skipped_branches else "")
            return skipped(self, why)
        n_rej = sum(1 for v in status.values() if v == "reject")
        n_sus = sum(1 for v in status.values() if v == "suspect")
        metrics.update({"n_reject": n_rej, "n_suspect": n_sus, "n_diagnosed": len(causes),
                        "skipped_branches": skipped_branches})
        # a suspect row alone is no finding about the dataset: at the suspect level's family-wise
        # probability it turns up by chance in that share of clean tables; a rejected row, or a
        # suspect one whose printed text explains it (a cause), is
        findings = n_rej + sum(1 for r, v in status.items() if v == "suspect" and r in causes)
        if status:
            msg = (f"{n_rej} rejected and {n_sus} suspect point(s) off the consensus curve: {rows_text(status)}"
                   + (f"; likely cause found for {len(causes)}" if causes else ""))
            if not findings:
                msg += (f" — worth a look, no more: at the suspect level (family-wise {s['suspect_alpha']:g} "
                        f"per branch) a suspect row turns up by chance in up to {100 * s['suspect_alpha']:.0f} % "
                        "of clean tables")
        else:
            msg = "every point lies within the expected scatter of the consensus curve"
        if skipped_branches:
            msg += f" (not tested: {'; '.join(skipped_branches)})"
        st = "fail" if n_rej and s.severity == "fail" else worst_status(findings, s.severity)
        return CheckResult(self.id, self.title, st, msg, metrics, tuple(flags), status, causes, resid_sigma)
