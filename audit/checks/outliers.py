"""Check ``outliers``: points off the consensus curve, with a likely cause.

Design of the consensus and of source bias (shared with ``source-agreement``)
----------------------------------------------------------------------------
Per branch, gross errors are screened first: Siegel's repeated-median
ln P–1/T line (50 % breakdown, so a block of unit slips at one end cannot
carry it) keeps points far off even a straight line out of a robust
three-constant fit, whose zero-weight points start out rejected.  The
equation form is then chosen once by AICc among physically sane candidates
(:func:`audit.thermo.fitting.select_equation`), and the loop below runs until
the set of rejected points and of biased sources stops changing (at most
``max_iterations`` times):

1. robust (Huber → Tukey) weighted fit of that form to the points not
   rejected and not from a source found biased;
2. a classical weighted fit to the points the robust fit kept, and its
   influence measures (:mod:`audit.thermo.influence`): every point is scored
   by its leave-one-out residual — points in the fit by the externally
   studentized residual, points outside by their prediction residual — so a
   wrong end point cannot hide by pulling the curve.  A point far outside
   the fitted temperatures is scored by temperature instead: the distance to
   where the curve reaches its pressure, through the slope there;
3. with two or more named sources, each source is judged by its points'
   residuals against the fit made without them (group deletion), worst
   source first; one whose median offset exceeds both the
   ``source-agreement`` profile's ``k``·u and ``tolerance_percent`` is
   *biased*: its points are scored after removing its offset, constant or
   a thermometer offset ΔT·d ln P/dT, whichever leaves less scatter (they
   are not outliers for being systematically off — ``source-agreement``
   reports that), and with three or more sources it is left out of the
   consensus.

Without stated uncertainties the scale is a robust (MAD) scale of the
residuals, pooled unless the Brown–Forsythe test finds the sources'
scatters different.

The final consensus fit goes to ``ctx.shared["consensus"]`` (branch ->
VaporPressureFit), the deviations and uncertainties to
``ctx.shared["deviation_percent"]`` / ``["u_percent"]`` (row -> %), and the
biased sources seen here to ``ctx.shared["outliers_biased_sources"]``.
``source-agreement`` runs next, does the full leave-one-source-out analysis
and, when it finds a biased source that the consensus still contains,
refits and replaces these entries.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..diagnose import diagnose_point
from ..diagnose.units import COMMON_PRESSURE_UNITS, pressure_unit_size_Pa, split_log_unit
from ..results import Cause, CheckResult, PointFlag
from ..thermo.overlap import overlaps_others
from ..thermo.ratios import percent_from_log_ratio
from ..thermo.rounding import pressure_rounding_u_lnP, temperature_rounding_u_K
from ..thermo.stats import mad_scale, repeated_median_line
from ._util import rows_text, skipped, worst_status
from .registry import Check, Option, register

#: √(π/2): standard error of a median relative to that of a mean (normal data).
_MEDIAN_SE = math.sqrt(math.pi / 2)


def family_wise_critical(alpha: float, n: int, correction: str, dof: float | None = None) -> float:
    """Two-sided critical value of |z| for n tests at family-wise level alpha.

    Šidák: per-test α' = 1 − (1 − α)^(1/n); Bonferroni: α' = α/n.  Normal
    quantile when ``dof`` is None, Student t with ``dof`` otherwise.

    References: Z. Šidák, J. Am. Stat. Assoc. 62, 626 (1967),
    doi:10.1080/01621459.1967.10482935.
    """
    from scipy import stats

    n = max(1, int(n))
    a = 1 - (1 - alpha) ** (1 / n) if correction == "sidak" else alpha / n
    if dof is None or not math.isfinite(dof):
        return float(stats.norm.isf(a / 2))
    return float(stats.t.isf(a / 2, max(dof, 1.0)))


@dataclass(frozen=True)
class _SourceShift:
    """A source found off the curve inside the loop (internal)."""

    offset_lnP: float
    u_lnP: float
    pattern: str
    dT_K: float
    #: standard uncertainty of the offset removed from the points: of Δln P (pressure scale)
    #: or of ΔT [K] (temperature offset), from the scatter the pattern leaves
    u_removed: float


def _floors(points):
    fP = np.array([pressure_rounding_u_lnP(p.P_text, p.P_text_unit) for p in points])
    fT = np.array([temperature_rounding_u_K(p.T_text, p.T_text_unit) for p in points])
    return np.nan_to_num(fP, nan=0.0), np.nan_to_num(fT, nan=0.0)


#: asymptotic efficiency of the MAD for normal data (Rousseeuw & Croux 1993,
#: doi:10.1080/01621459.1993.10476408): its variance is that of a standard deviation
#: from 0.37 times as many points
_MAD_EFFICIENCY = 0.37


def _robust_scale(x) -> float:
    return mad_scale(x)


def _judgeable_range(fit) -> tuple[float, float]:
    """Temperatures at which the fit predicts ln P well enough to judge a point [K].

    The fitted range widened by a quarter of its span on each side; further
    out, the extrapolation's σ grows with the slope until anything "fits".
    """
    lo, hi = fit.T_range  # of the points the fit used
    span = hi - lo
    return lo - 0.25 * span, hi + 0.25 * span


def _median_u(values, floor: float) -> float:
    """Standard uncertainty of the median of ``values``: √(π/2)·scale/√n, the
    scale robust (MAD) and never below ``floor``."""
    return _MEDIAN_SE * max(_robust_scale(values), floor) / math.sqrt(len(values))


def _inverse_scores(z, fit, T, P, outside, rel, uT_eff, scale):
    """Score points far outside the fitted temperature range by temperature.

    Far beyond the range, the prediction of ln P is so uncertain that any
    value "fits" (a °C value in a kelvin column, 45 K for 318 K, scores
    −3 σ).  When the printed pressure lies within the pressures of the
    fitted range, the curve says at which temperature T* it belongs, and
    the point is scored by that distance through the slope there:
    z = (d ln P/dT)(T*)·(T* − T)/σ(T*).
    """
    from ..thermo.roots import bracketed_root

    eq = fit.equation
    lo, hi = fit.T_range
    T_lo, T_hi = _judgeable_range(fit)
    far = outside & ((T < T_lo) | (T > T_hi))
    if not far.any():
        return z
    ln_lo, ln_hi = (float(eq.ln_p(np.array([t]))[0]) for t in (lo, hi))
    z = np.array(z, dtype=float)
    for i in np.flatnonzero(far):
        y = math.log(P[i])
        if not ln_lo <= y <= ln_hi:
            continue
        T_star = bracketed_root(lambda t: float(eq.ln_p(np.array([t]))[0]) - y, lo, hi, xtol=1e-9)
        if T_star is None:  # the curve does not reach that pressure smoothly: leave z as it is
            continue
        slope = float(eq.dlnp_dT(np.array([T_star]))[0])
        sig = math.sqrt(rel[i] ** 2 + (slope * uT_eff[i]) ** 2) * scale
        z[i] = slope * (T_star - T[i]) / sig
    return z


def _understated(inf, dof: int, alpha: float) -> bool:
    """Do the data scatter more than their stated u say?

    χ² test of the scale without the most extreme fitted point (its own
    residual would otherwise raise the limit it is judged by): the smallest
    leave-one-out scale s_(i), with n − p − 1 degrees of freedom, against
    χ²(n − p − 1) at ``alpha``.  A scale merely above 1 by chance leaves the
    stated u in charge (normal critical values); a significant excess makes
    the scale estimated (Birge ratio, t critical values).
    """
    from scipy.stats import chi2

    if dof < 1 or not inf.in_fit.any():
        return False
    s_min = float(np.min(inf.scale_loo[inf.in_fit]))
    return bool(chi2.sf(s_min ** 2 * dof, dof) < alpha)


class _BranchAnalysis:
    """The consensus fit and point scores of one branch (internal)."""

    def __init__(self, points, settings, source_settings, Tc, Pc, branch):
        from ..thermo.fitting import fit_equation, select_equation
        from ..thermo.influence import group_deletion, influence_measures

        self.points = points
        s = settings
        n = len(points)
        T = np.array([p.T_K for p in points])
        P = np.array([p.P_Pa for p in points])
        src = np.array([p.source or "" for p in points], dtype=object)
        floorP, floorT = _floors(points)
        u_given = any(p.u_P_Pa is not None or p.u_T_K is not None for p in points)
        uPrel = np.array([(p.u_P_Pa or 0.0) / p.P_Pa for p in points])
        uT = np.array([p.u_T_K or 0.0 for p in points])
        uT_eff = np.sqrt(uT ** 2 + floorT ** 2)
        self.T, self.P, self.src, self.u_given = T, P, src, u_given

        # Gross errors first: a fast robust fit of a linear form (ln P = A + B/T + C ln T) marks the
        # points it gives zero weight; they start out rejected (scored by prediction, free to come
        # back) so that they neither steer the choice of form nor drag a nonlinear fit far away.
        uP_in = P * np.sqrt(uPrel ** 2 + floorP ** 2) if u_given else None
        uT_in = uT_eff if u_given else None
        crit_gross = family_wise_critical(s["reject_alpha"] / 100, n, s["correction"])
        # That robust fit starts from least squares, which a block of unit slips at one end of
        # the range drags far enough to hide in; a repeated-median line (50 % breakdown) first
        # keeps points far off even a straight ln P–1/T line out of it.  Curvature only widens
        # the line's scale, so this catches gross errors alone.
        line = repeated_median_line(1.0 / T, np.log(P))
        line_scale = np.maximum(self._scales(line.residuals, np.ones(n, bool), src, s),
                                s["min_scatter_percent"] / 100)
        far = np.abs(line.residuals - np.median(line.residuals)) > crit_gross * line_scale
        if n - far.sum() <= 4:
            far[:] = False
        screen = fit_equation(T, P, "cc3" if n >= 8 else "cc2", u_T=uT_in, u_P=uP_in, robust=True,
                              point_weights=(~far).astype(float))
        out_of_screen = np.asarray(screen.weights) == 0
        # a far-off point can hold a leverage near 1 and pass for good in the robust fit (the
        # curve runs through it); its leave-one-out residual gives it away
        scr = influence_measures(screen.equation.jacobian_ln_p(T), screen.residuals_lnP, screen.sigma_lnP,
                                 (~out_of_screen).astype(float))
        # "gross" means far beyond the reject limit (α/100): a point merely near the limit
        # is left to the stepwise test below, or its removal shrinks the scale and swamps
        # a clean neighbour.  Points the line alone kept out return when the screen fit,
        # made without them, predicts them well — judged by temperature when they lie far
        # outside its range, where a prediction of ln P is too uncertain to clear anything.
        if u_given:
            rel_screen, uT_screen, scale_screen = np.sqrt(uPrel ** 2 + floorP ** 2), uT_eff, max(1.0, scr.scale)
        else:
            # per source when the sources' scatters differ, as in the stepwise test below
            rel_screen = np.maximum(self._scales(screen.residuals_lnP, ~out_of_screen, src, s), 1e-12)
            uT_screen, scale_screen = np.zeros(n), 1.0
        z_screen = _inverse_scores(scr.studentized, screen, T, P, out_of_screen, rel_screen, uT_screen,
                                   scale_screen)
        gross = (out_of_screen & ~far) | (np.abs(z_screen) > family_wise_critical(
            s["reject_alpha"] / 100, n, s["correction"], scr.dof - 1))
        ok = ~gross
        choice = select_equation(T[ok], P[ok], u_T=None if uT_in is None else uT_in[ok],
                                 u_P=None if uP_in is None else uP_in[ok],
                                 Tc=Tc, Pc=Pc, branch=branch if branch in ("liquid", "solid") else "unknown")
        first = choice.chosen
        self.form_name = choice.chosen_name
        form = type(first.equation)
        fixed = first.equation.fixed_parameters()
        k_par = first.n_params

        # relative scatter per source when no uncertainties are given (robust, from the first fit)
        names = [x for x in dict.fromkeys(src) if x]
        multi = len(names) >= 2 and source_settings is not None
        resid0 = np.log(P) - first.equation.ln_p(T)
        active0 = ok.copy()
        active0[ok] = np.asarray(first.weights) > 0
        scale_pt = self._scales(resid0, active0, src, s) if not u_given else None

        rejected = gross.copy()
        biased: dict[str, _SourceShift] = {}
        offsets = np.zeros(n)
        u_off = np.zeros(n)
        history = []
        floor_rel = s["min_scatter_percent"] / 100
        it = 0
        # the last pass only evaluates: its fit excludes exactly the final rejected set, so
        # every z reported is measured against the curve the statuses imply
        final = False
        for it in range(1, s["max_iterations"] + 2):
            if u_given:
                rel = np.sqrt(uPrel ** 2 + floorP ** 2)
            else:
                rel = np.sqrt(scale_pt ** 2 + floorP ** 2)
            # no curve reproduces real data better than the profile's floor: below it the
            # "scatter" is the equation's own misfit, not noise (e.g. exact reference values)
            floored = bool(np.all(rel <= floor_rel))
            rel = np.maximum(rel, floor_rel)
            excluded_src = np.isin(src, list(biased)) if (biased and len(names) >= 3) else np.zeros(n, bool)
            prior = (~rejected & ~excluded_src).astype(float)
            if prior.sum() <= k_par + 1:
                prior = (~rejected).astype(float)
            # fits see only their own points: a far-off point left out must not constrain
            # a nonlinear form (the Antoine pole bound depends on every T passed in)
            use = prior > 0
            robust_fit = fit_equation(T[use], P[use], form, u_T=uT_eff[use], u_P=(P * rel)[use], robust=True,
                                      **fixed)
            # points Tukey's reweighting gives zero weight are scored by prediction, so that a
            # block of gross errors cannot mask itself by bending the curve
            in_fit = np.zeros(n, bool)
            in_fit[use] = np.asarray(robust_fit.weights) > 0
            if in_fit.sum() <= k_par + 1:
                in_fit = use.copy()
            fit = fit_equation(T[in_fit], P[in_fit], form, u_T=uT_eff[in_fit], u_P=(P * rel)[in_fit],
                               robust=False, **fixed)
            r = np.log(P) - fit.equation.ln_p(T)
            sigma = np.sqrt(rel ** 2 + (fit.equation.dlnp_dT(T) * uT_eff) ** 2)
            floor_sig = np.sqrt(floorP ** 2 + (fit.equation.dlnp_dT(T) * floorT) ** 2)
            if not u_given:
                scale_pt = self._scales(r - offsets, in_fit, src, s)
            J = fit.equation.jacobian_ln_p(T)
            inf = influence_measures(J, r, sigma, in_fit.astype(float))
            dof = inf.dof - 1
            if u_given and not _understated(inf, dof, s["scale_alpha"]):
                birge = 1.0
                z = np.array(inf.studentized_known_scale)
                crit_dof = None
            elif u_given:
                birge = max(1.0, inf.scale)
                s_loo = np.maximum(1.0, inf.scale_loo)
                z = np.where(inf.in_fit, inf.studentized_known_scale / s_loo,
                             inf.studentized_known_scale / birge)
                crit_dof = dof
            elif floored:
                birge = max(1.0, inf.scale)
                z = inf.studentized_known_scale / np.maximum(1.0, inf.scale_loo)
                crit_dof = None
            elif np.ptp(scale_pt) > 0:
                # each source has its own estimated scale: a Birge ratio below 1, set by a
                # precise series that scatters less than the profile's floor, must not shrink
                # the scatter of the others (a source is never judged by a more precise one)
                birge = max(1.0, inf.scale)
                z = inf.studentized_known_scale / np.maximum(1.0, inf.scale_loo)
                crit_dof = dof
            else:
                birge = inf.scale
                z = np.array(inf.studentized)
                crit_dof = dof
                # printed precision is a floor no estimated scale lowers: with a scale below 1
                # (a series that scatters less than its rounding) a point is never judged by a
                # σ smaller than the half-digit of its own printed values
                with np.errstate(divide="ignore", invalid="ignore"):
                    z_floor = np.where(floor_sig > 0, inf.studentized_known_scale * sigma / floor_sig, np.inf)
                z = np.where(np.abs(z_floor) < np.abs(z), z_floor, z)
            # biased sources: score their points after removing the source offset
            if multi:
                slope = fit.equation.dlnp_dT(T)
                biased = self._biased_sources(
                    r, slope, sigma, src, names, source_settings, T, in_fit,
                    lambda mask, left_out: group_deletion(J, r, sigma, (in_fit & ~left_out).astype(float), mask))
                offsets, u_off = self._point_offsets(biased, src, slope)
                if biased:
                    pred_var = (sigma * birge) ** 2 * np.where(inf.in_fit, 1 - inf.leverage, 1 + inf.leverage)
                    zb = (r - offsets) / np.sqrt(pred_var + u_off ** 2)
                    z = np.where(np.isin(src, list(biased)), zb, z)
            z = _inverse_scores(z, fit, T, P, ~inf.in_fit, rel, uT_eff, max(birge, 1e-300))
            crit_reject = family_wise_critical(s["reject_alpha"], n, s["correction"], crit_dof)
            crit_suspect = family_wise_critical(s["suspect_alpha"], n, s["correction"], crit_dof)
            # one new rejection per round among the fitted points, the most extreme: rejecting every point
            # above the limit at once let a rejected +3.3 σ point shrink the scale and drag
            # a clean neighbour over the limit (masking and swamping).  Points rejected
            # before stay rejected only while their prediction residual is still beyond it.
            if final:
                break
            above = np.abs(z) > crit_reject
            # ... except points the robust fit already left out: they go together
            new_rejected = (rejected | ~in_fit) & above
            candidates = np.flatnonzero(above & ~new_rejected)
            if candidates.size:
                new_rejected[candidates[np.argmax(np.abs(z[candidates]))]] = True
            state = (tuple(np.flatnonzero(new_rejected)), tuple(sorted(biased)))
            history.append(state)
            if np.array_equal(new_rejected, rejected) and it > 1 and state == history[-2]:
                break
            if state in history[:-1]:  # cycling: keep the union, stop
                new_rejected |= rejected
                final = True
            rejected = new_rejected
            final = final or it >= s["max_iterations"]
        self.iterations = it
        self.converged = it < s["max_iterations"] or (len(history) > 1 and history[-1] == history[-2])
        self.fit = fit
        self.robust_fit = robust_fit
        self.influence = inf
        self.z = z
        self.sigma_raw = sigma
        self.sigma = sigma * max(birge, 1.0) if u_given else np.maximum(sigma * birge, floor_sig)
        self.birge = birge
        self.crit_reject, self.crit_suspect = crit_reject, crit_suspect
        self.reject = np.abs(z) > crit_reject
        self.suspect = (np.abs(z) > crit_suspect) & ~self.reject
        self.biased = biased
        self.offsets = offsets
        self.uPrel, self.uT_eff, self.floorP = uPrel, uT_eff, floorP
        self.rel = rel
        self.scale_factor = max(birge, 1.0) if u_given else birge

    @staticmethod
    def _scales(r, active, src, s):
        """Relative scatter per point: pooled, or per source when sources differ in scatter.

        A source's own MAD from 8–15 points is itself uncertain by 25–40 %; used
        where the sources share one scatter it only adds noise to every
        standardized residual.  So own scales are used only when the
        Brown–Forsythe test (Levene's test about the median, robust to
        non-normal residuals) finds the sources' scatters different at
        ``source_scale_alpha``.  Then every source gets its own scale, shrunk
        toward a prior (the median of the sources' own scales, one vote per
        source, so that one large precise series does not set it) with the
        MAD's effective degrees of freedom, 0.37·(n − 1), against those of
        ``min_points_source_scale`` points — and shrunk only upward: a
        scattered source is never judged by the scatter of a more precise
        one.  A one-row source, with no scatter of its own, gets the larger
        of the prior and the pooled scale.
        """
        from scipy.stats import levene

        pooled = _robust_scale(r[active])
        pooled = pooled if pooled > 0 else 1e-6
        out = np.full(r.size, pooled)
        # a source's own scale comes from all its points, fitted or not: the MAD is robust to
        # the source's own outliers, and a scattered source whose points a precise series had
        # pushed out of the fit must still be measured by its own scatter
        named = [name for name in dict.fromkeys(src) if name]
        big = [name for name in named if (src == name).sum() >= s["min_points_source_scale"]]
        groups = [r[src == name] for name in big]
        small = np.isin(src, [x for x in named if x not in big])
        rest = r[(small | (active & (src == ""))) & ~np.isin(src, big)]
        if rest.size >= 3:
            groups.append(rest)
        if len(groups) < 2 or levene(*groups, center="median").pvalue >= s["source_scale_alpha"]:
            return out
        own = {name: _robust_scale(r[src == name]) for name in named if (src == name).sum() >= 2}
        own = {k: v for k, v in own.items() if v > 0}
        prior = float(np.median([own[k] for k in big if k in own] or list(own.values()) or [pooled]))
        nu0 = _MAD_EFFICIENCY * (s["min_points_source_scale"] - 1)
        for name in named:
            mine = src == name
            if name in own:
                nu = _MAD_EFFICIENCY * (int(mine.sum()) - 1)
                shrunk = math.sqrt((nu * own[name] ** 2 + nu0 * prior ** 2) / (nu + nu0))
                out[mine] = max(own[name], shrunk)
            else:
                out[mine] = max(prior, pooled)
        return out

    @staticmethod
    def _biased_sources(r, slope, sig, src, names, ss, T, in_fit, deletion):
        """Sources off the curve of the others by more than ``k``·u and ``tolerance_percent``.

        Each source is judged by its points' residuals against the fit made
        without them (``deletion(mask)``, a group deletion; the in-fit residuals
        ``r`` when that fit is not determined), so a source cannot pull its own
        yardstick.  ``sig`` is each point's own σ, not inflated by the fit's
        Birge ratio: a biased source inflates that ratio itself and would hide
        behind it.  The offset later removed from the source's points follows
        the better of the two patterns (constant Δln P, or a thermometer
        offset ΔT·d ln P/dT), judged by the robust spread each leaves, and is
        measured on the residuals those points will be scored with: against
        the next fit, which leaves the source out when three or more sources
        are named, else against this one.  A source none of whose points lies
        within the temperatures of the others' fitted points is not judged:
        its offset would be an extrapolation.  ``source-agreement`` does the
        full comparison later.
        """
        out: dict[str, _SourceShift] = {}
        # worst source first, then the others against a yardstick without it: one biased
        # source would otherwise make every other look off the opposite way
        while len(names) - len(out) >= 2:
            left_out = np.isin(src, list(out))
            worst, worst_score = None, 0.0
            for name in names:
                # all of the source's points: a source 3 % off with 0.1 % scatter has every point
                # rejected by the first screen, and the median is robust to its own outliers anyway
                mine = src == name
                if name in out or mine.sum() < 2:
                    continue
                # an offset is measured only where the other sources overlap the source in
                # temperature; far outside them, "the others' curve" is an extrapolation
                if not overlaps_others(T, mine, in_fit & ~left_out & ~mine):
                    continue
                gd = deletion(mine, left_out)
                r_out = r[mine] if gd is None else gd.residuals
                # median: one point far outside the others' range (a °C value in a K column)
                # must not make the whole source look unjudgeable
                curve_var = 0.0 if gd is None else float(np.median(gd.curve_variance))
                med_out = float(np.median(r_out))
                u = math.hypot(_median_u(r_out, float(np.median(sig[mine]))), math.sqrt(curve_var))
                if abs(med_out) > ss["k"] * u and abs(percent_from_log_ratio(med_out)) > ss["tolerance_percent"] \
                        and abs(med_out) / u > worst_score:
                    worst, worst_score = (name, u, r_out), abs(med_out) / u
            if worst is None:
                break
            name, u, r_out = worst
            mine = src == name
            # the offset is removed from the residuals the points are scored with: those against
            # the next fit, which leaves the source out when three or more sources are named
            rm = r_out if len(names) >= 3 else r[mine]
            sm, sg = slope[mine], sig[mine]
            med = float(np.median(rm))
            dT = float(np.median(-rm / sm)) if np.all(sm > 0) else math.nan
            temperature = math.isfinite(dT) and _robust_scale(rm + sm * dT) < _robust_scale(rm - med)
            if temperature:
                u_removed = _median_u(-rm / sm - dT, float(np.median(sg / sm)))
            else:
                u_removed = _median_u(rm - med, float(np.median(sg)))
            out[name] = _SourceShift(med, u, "temperature-offset" if temperature else "pressure-scale",
                                     dT if temperature else math.nan, u_removed)
        return out

    @staticmethod
    def _point_offsets(biased, src, slope):
        """Δln P to remove from each point of a biased source (0 elsewhere), and its u."""
        off, u = np.zeros(src.size), np.zeros(src.size)
        for name, b in biased.items():
            mine = src == name
            if b.pattern == "temperature-offset":
                off[mine], u[mine] = -slope[mine] * b.dT_K, slope[mine] * b.u_removed
            else:
                off[mine], u[mine] = b.offset_lnP, b.u_removed
        return off, u

    def z_of(self, i):
        """Standardized residual (T, P) -> z of a corrected reading of point i."""
        eq = self.fit.equation
        off = self.offsets[i]
        rel = self.rel[i]
        uT = self.uT_eff[i]
        base_sigma = self.sigma[i] / max(self.sigma_raw[i], 1e-300)  # the scale applied to point i
        # a corrected temperature far outside the fitted range cannot be judged
        T_lo, T_hi = _judgeable_range(self.fit)

        def z(T_K, P_Pa):
            if not (T_K > 0 and P_Pa > 0) or not (T_lo <= T_K <= T_hi):
                return math.nan
            # the point's own relative u(P) carries over; the rounding floor of a
            # corrected value is taken as that of the printed one
            try:
                sig = math.sqrt(rel ** 2 + (float(eq.dlnp_dT(np.array([T_K]))[0]) * uT) ** 2) * base_sigma
                return (math.log(P_Pa) - float(eq.ln_p(np.array([T_K]))[0]) - off) / sig
            except ValueError:  # e.g. a reduced (Wagner) form asked above Tc
                return math.nan
        return z


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
            alt = next((u for u in COMMON_PRESSURE_UNITS
                        if abs(pressure_unit_size_Pa(u) / size / factor - 1) < 1e-6), None)
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
    fit; one beyond that at ``suspect_alpha`` is suspect.  The loop repeats
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

    **Example.** Water, 20 points 280–370 K; row 12 printed 47.37 kPa where
    the curve gives 47.73 kPa → reject, "digit-swap: P printed '47.37' would
    read '47.73' …; residual −15.2 σ as printed, +0.3 σ corrected".

    **Options.** ``reject_alpha``, ``suspect_alpha``, ``correction``,
    ``max_iterations``, ``min_points``, ``min_points_source_scale``,
    ``scale_alpha``, ``source_scale_alpha``,
    ``cause_k``, ``cause_ratio``.
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
        "reject_alpha": Option(float, "family-wise false-rejection probability per branch", "", 1e-6, 0.5),
        "suspect_alpha": Option(float, "family-wise false-suspicion probability per branch", "", 1e-6, 0.9),
        "correction": Option(str, "multiple-testing correction over the n points", "",
                             choices=("sidak", "bonferroni")),
        "max_iterations": Option(int, "cap on reject-and-refit rounds", "", 1, 100),
        "min_scatter_percent": Option(float, "floor on the relative scatter a consensus curve is trusted to "
                                      "(common practice: vapor-pressure equations reproduce the best data to "
                                      "a few hundredths of a percent)", "%", 0, 10),
        "min_points": Option(int, "fewest usable points of a branch to test it", "", 4, 1000),
        "min_points_source_scale": Option(int, "fewest points of a source to estimate its own scatter",
                                          "", 3, 1000),
        "scale_alpha": Option(float, "significance at which data that state u(P), u(T) are taken to "
                              "scatter more than stated (χ² test); then the scale is estimated", "", 1e-6, 0.5),
        "source_scale_alpha": Option(float, "significance at which the sources' scatters are taken as "
                                     "different (Brown–Forsythe test) and each source gets its own scale",
                                     "", 1e-6, 0.5),
        "cause_k": Option(float, "a corrected point must lie within this many σ of the curve", "", 0.5, 10),
        "cause_ratio": Option(float, "the next-best cause, and the value as printed, must be this many "
                              "times worse", "", 1, 100),
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
        consensus, deviation, u_percent = {}, {}, {}
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
                continue
            try:
                a = _BranchAnalysis(pts, s, ss, Tc if branch != "solid" else None,
                                    Pc if branch != "solid" else None, branch)
            except (ValueError, np.linalg.LinAlgError) as exc:
                skipped_branches.append(f"{branch}: fit failed ({exc})")
                continue
            consensus[branch] = a.fit
            by_row = {p.row: p for p in pts}
            # in logs: a curve extrapolated to a misprinted temperature can overflow exp()
            with np.errstate(over="ignore", invalid="ignore"):
                dev = percent_from_log_ratio(np.log(a.P) - a.fit.equation.ln_p(a.T) - a.offsets)
            diagnoses = {}
            for i, p in enumerate(pts):
                resid_sigma[p.row] = float(a.z[i])
                deviation[p.row] = float(dev[i]) if not math.isnan(dev[i]) else math.inf
                u_percent[p.row] = float(100 * a.sigma[i])
                if a.reject[i] or a.suspect[i]:
                    diagnoses[p.row] = diagnose_point(p, a.z_of(i), s["cause_k"], s["cause_ratio"])
            diagnoses = _relabel_blocks(diagnoses, by_row, [p.row for p in pts])
            for i, p in enumerate(pts):
                if not (a.reject[i] or a.suspect[i]):
                    continue
                level = "reject" if a.reject[i] else "suspect"
                status[p.row] = level
                d = diagnoses[p.row]
                crit = a.crit_reject if level == "reject" else a.crit_suspect
                msg = (f"{level}: residual {a.z[i]:+.1f} σ (limit {crit:.2f} σ), P deviates "
                       f"{deviation[p.row]:+.3g} % from the {a.form_name} consensus fit; "
                       f"Cook's distance {a.influence.cooks_distance[i]:.3g}")
                if d.best is not None:
                    h = d.best.hypothesis
                    causes[p.row] = Cause(h.kind, d.explanation(),
                                          h.T_K if h.quantity == "T" else None,
                                          h.P_Pa if h.quantity == "P" else None)
                    msg += f"; likely cause: {h.kind}"
                flags.append(PointFlag(p.row, self.id, "fail" if level == "reject" else "warn", msg))
            metrics["branches"][branch] = {
                "n": len(pts), "equation": a.form_name, "n_reject": int(a.reject.sum()),
                "n_suspect": int(a.suspect.sum()), "critical_reject_sigma": a.crit_reject,
                "critical_suspect_sigma": a.crit_suspect, "iterations": a.iterations,
                "converged": bool(a.converged), "uncertainties_given": a.u_given,
                "scale": a.birge, "rms_percent": a.fit.rms_percent,
                "biased_sources": {k: percent_from_log_ratio(v.offset_lnP) for k, v in a.biased.items()},
                "max_cooks_distance": float(np.max(a.influence.cooks_distance)),
            }
            ctx.shared.setdefault("outliers_biased_sources", {})[branch] = sorted(a.biased)
        ctx.shared["consensus"] = consensus
        ctx.shared["deviation_percent"] = deviation
        ctx.shared["u_percent"] = u_percent
        if not consensus:
            why = "no branch has enough usable points to fit" + (
                f" ({'; '.join(skipped_branches)})" if skipped_branches else "")
            return skipped(self, why)
        n_rej = sum(1 for v in status.values() if v == "reject")
        n_sus = sum(1 for v in status.values() if v == "suspect")
        metrics.update({"n_reject": n_rej, "n_suspect": n_sus, "n_diagnosed": len(causes),
                        "skipped_branches": skipped_branches})
        if status:
            msg = (f"{n_rej} rejected and {n_sus} suspect point(s) off the consensus curve: {rows_text(status)}"
                   + (f"; likely cause found for {len(causes)}" if causes else ""))
        else:
            msg = "every point lies within the expected scatter of the consensus curve"
        if skipped_branches:
            msg += f" (not tested: {'; '.join(skipped_branches)})"
        st = "fail" if n_rej and s.severity == "fail" else worst_status(len(status), s.severity)
        return CheckResult(self.id, self.title, st, msg, metrics, tuple(flags), status, causes, resid_sigma)
