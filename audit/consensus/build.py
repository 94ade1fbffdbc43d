"""Build the consensus of one branch: gross-error screen, equation choice, and
the reject-and-refit loop that decides which points and sources the fit of
record rests on.

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
scatters different.  A point of a named source is rejected only beyond the
Student t quantile of the effective degrees of freedom with which its
source's scatter is known — 0.37·(n − 1) of its n rows plus a prior's
0.37·(``min_points_source_scale`` − 1), whether the source keeps the pooled
scale or its own (that it shares the pooled scatter is itself known only
from its rows) — the posterior-predictive spread of a scale known from a few
rows; it is shown as suspect at the normal quantile as before.  A source of
one or two rows, judged by a scale borrowed from the others, counts the
prior's alone; a large source's t is the normal quantile.

The limits (α, the correction, the source tolerances) are the profile's,
passed in as settings; nothing here is a threshold of its own.  The result
is a frozen :class:`~audit.consensus.model.BranchConsensus` whose fit of
record is refitted to exactly the accepted points, in order of temperature.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np

from ..thermo.overlap import JUDGEABLE_REACH, overlaps_others, within_span
from ..thermo.ratios import percent_from_log_ratio
from ..thermo.rounding import pressure_rounding_u_lnP, temperature_rounding_u_K
from ..thermo.stats import (MAD_EFFICIENCY, family_wise_critical, mad_degrees_of_freedom, mad_scale,
                           repeated_median_line)
from ..model import base_phase
from .model import BranchConsensus, BranchData, SourceShift, finite_or_inf

#: √(π/2): standard error of a median relative to that of a mean (normal data).
_MEDIAN_SE = math.sqrt(math.pi / 2)


def _floors(points):
    fP = np.array([pressure_rounding_u_lnP(p.P_text, p.P_text_unit) for p in points])
    fT = np.array([temperature_rounding_u_K(p.T_text, p.T_text_unit) for p in points])
    return np.nan_to_num(fP, nan=0.0), np.nan_to_num(fT, nan=0.0)


def _own_scale(r, inv_T, max_scale_lnP: float) -> float:
    """Robust scatter of one source's residuals [-]: about their median, or, when
    that is beyond any plausible scatter, about their own trend in 1/T.

    The MAD about the median is the source's scatter as long as it stays
    within ``max_scale_lnP``.  A "scatter" beyond it (a series read in the
    wrong temperature scale lies 10–200 in ln P off the curve, in a smooth
    trend) is no measurement scatter: then, with four or more distinct
    temperatures, the MAD about the residuals' repeated-median line in 1/T
    (Siegel 1982), times √((n − 1)/(n − 2)) for the line's second parameter.
    """
    from ..thermo.fitting import distinct_temperatures

    r = np.asarray(r, float)
    inv_T = np.asarray(inv_T, float)
    about_median = mad_scale(r)
    if not about_median > max_scale_lnP or r.size < 4 \
            or not (np.all(np.isfinite(r)) and np.all(np.isfinite(inv_T))) or distinct_temperatures(1.0 / inv_T) < 4:
        return about_median
    line = repeated_median_line(inv_T, r)
    return min(about_median, mad_scale(line.residuals) * math.sqrt((r.size - 1) / (r.size - 2)))


#: fewest rows from which a source's own scatter is estimated at all (a MAD of two values
#: is their half-difference: no measure of a laboratory's precision)
_OWN_SCATTER_ROWS = 3


def _few_row_scales(out, src, named):
    """Give every source of fewer than three rows the widest scatter of the others.

    A source of one or two rows has no scatter of its own, and the compilation
    says only that its sources scatter somewhere between the most precise and
    the least: judged by the pooled scale it would borrow the precision of the
    modern series beside it (a single value from a 5 % study rejected at 40 σ
    against a 0.05 % one).  So it gets the largest per-point scale of the
    sources of three rows or more (their own scales as chosen above), never
    less than its current one.
    """
    counts = {name: int((src == name).sum()) for name in named}
    estimated = [name for name in named if counts[name] >= _OWN_SCATTER_ROWS]
    few = [name for name in named if counts[name] < _OWN_SCATTER_ROWS]
    if not estimated or not few:
        return out
    widest = max(float(np.max(out[src == name])) for name in estimated)
    for name in few:
        mine = src == name
        out[mine] = np.maximum(out[mine], widest)
    return out


def _with_dof(out, dof, src, named, nu0, with_dof):
    """``out``, or (``out``, per-point degrees of freedom) when asked: a source of fewer than
    three rows, judged by a scale borrowed from the others, counts ``nu0`` (a prior's)."""
    if not with_dof:
        return out
    for name in named:
        mine = src == name
        if int(mine.sum()) < _OWN_SCATTER_ROWS:
            dof[mine] = np.minimum(dof[mine], nu0)
    return out, dof


def _critical_per_point(base: float, alpha: float, n: int, correction: str, dof) -> np.ndarray | float:
    """The critical |z| per point: ``base``, raised to the Student t quantile of the point's
    scale's degrees of freedom where those are finite (None: ``base`` for every point)."""
    if dof is None:
        return base
    out = np.full(dof.shape, base)
    for nu in np.unique(dof[np.isfinite(dof)]):
        out[dof == nu] = max(base, family_wise_critical(alpha, n, correction, float(nu)))
    return out


def judgeable_range(fit) -> tuple[float, float]:
    """Temperatures at which the fit predicts ln P well enough to judge a point [K].

    The fitted range widened by a quarter of its span on each side; further
    out, the extrapolation's σ grows with the slope until anything "fits".
    A form reduced by a fixed critical temperature ends just below it.

    Parameters
    ----------
    fit : VaporPressureFit
        The fit of record (an object, no unit).

    Returns
    -------
    (float, float)
        Lowest and highest judgeable temperature [K].
    """
    lo, hi = fit.T_range  # of the points the fit used
    span = hi - lo
    top = hi + JUDGEABLE_REACH * span
    # a form reduced by a critical temperature is not defined at or above it
    Tc = fit.equation.fixed_parameters().get("Tc")
    if Tc is not None and math.isfinite(Tc) and Tc > hi:
        top = min(top, math.nextafter(float(Tc), 0.0))
    return lo - JUDGEABLE_REACH * span, top


def _median_u(values, floor: float) -> float:
    """Standard uncertainty of the median of ``values``: √(π/2)·scale/√n, the
    scale robust (MAD) and never below ``floor``."""
    return _MEDIAN_SE * max(mad_scale(values), floor) / math.sqrt(len(values))


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
    T_lo, T_hi = judgeable_range(fit)
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
    from ..thermo.distributions import chi2_sf

    if dof < 1 or not inf.in_fit.any():
        return False
    s_min = float(np.min(inf.scale_loo[inf.in_fit]))
    return bool(chi2_sf(s_min ** 2 * dof, dof) < alpha)


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
        line_scale = np.maximum(self._scales(line.residuals, np.ones(n, bool), src, s, 1.0 / T),
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
            rel_screen = np.maximum(self._scales(screen.residuals_lnP, ~out_of_screen, src, s, 1.0 / T), 1e-12)
            uT_screen, scale_screen = np.zeros(n), 1.0
        z_screen = _inverse_scores(scr.studentized, screen, T, P, out_of_screen, rel_screen, uT_screen,
                                   scale_screen)
        gross = (out_of_screen & ~far) | (np.abs(z_screen) > family_wise_critical(
            s["reject_alpha"] / 100, n, s["correction"], scr.dof - 1))
        ok = ~gross
        choice = select_equation(T[ok], P[ok], u_T=None if uT_in is None else uT_in[ok],
                                 u_P=None if uP_in is None else uP_in[ok],
                                 Tc=Tc, Pc=Pc, branch=base_phase(branch))
        self.choice = choice
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
        scale_pt = self._scales(resid0, active0, src, s, 1.0 / T) if not u_given else None

        rejected = gross.copy()
        scale_dof = None  # degrees of freedom of each point's estimated scale (None: stated u)
        biased: dict[str, SourceShift] = {}
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
                scale_pt, scale_dof = self._scales(r - offsets, in_fit, src, s, 1.0 / T, with_dof=True)
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
            # a point judged by its own source's scale, estimated from that source's rows, is
            # rejected only beyond the Student t quantile of that scale's degrees of freedom: a
            # 3-row source's MAD may be a tenth of its scatter.  It is still shown as suspect at
            # the normal quantile, so a gross error in a small source is not lost from view.
            crit_r_pt = _critical_per_point(crit_reject, s["reject_alpha"], n, s["correction"], scale_dof)
            crit_s_pt = np.minimum(crit_suspect, crit_r_pt)
            # one new rejection per round among the fitted points, the most extreme: rejecting every point
            # above the limit at once let a rejected +3.3 σ point shrink the scale and drag
            # a clean neighbour over the limit (masking and swamping).  Points rejected
            # before stay rejected only while their prediction residual is still beyond it.
            if final:
                break
            above = np.abs(z) > crit_r_pt
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
        self.reject = np.abs(z) > crit_r_pt
        self.suspect = (np.abs(z) > crit_s_pt) & ~self.reject
        self.biased = biased
        self.offsets = offsets
        self.uPrel, self.uT_eff, self.floorP = uPrel, uT_eff, floorP
        self.rel = rel

    @staticmethod
    def _scales(r, active, src, s, inv_T, with_dof=False):
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
        of the prior and the pooled scale.  When the test finds no difference,
        a source whose own scale exceeds the pooled one significantly (F test
        of the two MAD scales at ``source_scale_alpha``) still gets its own,
        shrunk toward the pooled scale with the same degrees of freedom: the
        test can miss a 12 % series beside 0.01 % ones (their residuals carry
        the curve's misfit in the first rounds, and sources of fewer than
        ``min_points_source_scale`` rows are not in it), and a source is never
        judged by a scatter smaller than its own.

        A source whose scatter about the consensus would exceed
        ``max_source_scatter_percent`` is measured about its own trend in 1/T
        (:func:`_own_scale`): a whole series read in the wrong temperature
        scale lies off the curve by an amount that changes along its range,
        and measured about the consensus that trend would pass for scatter
        and the series would certify itself.
        """
        from ..thermo.distributions import f_sf, levene_median_pvalue

        pooled = mad_scale(r[active])
        pooled = pooled if pooled > 0 else 1e-6
        out = np.full(r.size, pooled)
        # a source's own scale comes from all its points, fitted or not: the MAD is robust to
        # the source's own outliers, and a scattered source whose points a precise series had
        # pushed out of the fit must still be measured by its own scatter — from three rows or
        # more: the MAD of two is their half-difference, and one gross row made its own σ 110 %
        # (a tenfold decimal slip then stood at 2.7 σ)
        named = [name for name in dict.fromkeys(src) if name]
        big = [name for name in named if (src == name).sum() >= s["min_points_source_scale"]]
        groups = [r[src == name] for name in big]
        small = np.isin(src, [x for x in named if x not in big])
        rest = r[(small | (active & (src == ""))) & ~np.isin(src, big)]
        if rest.size >= 3:
            groups.append(rest)
        own = {name: _own_scale(r[src == name], inv_T[src == name],
                                      math.log1p(s["max_source_scatter_percent"] / 100))
               for name in named if (src == name).sum() >= _OWN_SCATTER_ROWS}
        own = {k: v for k, v in own.items() if v > 0}
        nu0 = mad_degrees_of_freedom(s["min_points_source_scale"])
        # effective degrees of freedom of each point's scale: the pooled one's are many (∞ here)
        dof = np.full(r.size, np.inf)
        if len(groups) < 2 or levene_median_pvalue(*groups) >= s["source_scale_alpha"]:
            # one shared scatter, as far as the test can tell — yet a source is never judged by
            # a scatter smaller than its own: a 12 % series beside 0.01 % ones can pass the test
            # (the others' residuals carry the curve's misfit, and a few-row source is not in
            # it), so each source's own scale, shrunk toward the pooled one, raises its σ
            nu_pooled = MAD_EFFICIENCY * max(int(np.count_nonzero(active)) - 1, 1)
            for name, mine_scale in own.items():
                mine = src == name
                nu = mad_degrees_of_freedom(int(mine.sum()))
                # only a scatter significantly above the pooled one (F test on the two MAD
                # scales with their effective degrees of freedom): a source merely above it by
                # chance keeps the pooled scale, and with it the power to find its 4σ errors
                # (numpy floats: a scale ratio of 1e200 from a garbage fit squares to inf, not an error)
                ratio = np.float64(mine_scale) / np.float64(pooled)
                with np.errstate(over="ignore"):
                    if mine_scale > pooled and f_sf(ratio * ratio, nu, nu_pooled) < s["source_scale_alpha"]:
                        out[mine] = np.sqrt((nu * np.float64(mine_scale) ** 2 + nu0 * np.float64(pooled) ** 2)
                                            / (nu + nu0))
                # whichever scale it keeps, whether this source shares the pooled scatter is known only
                # from its own rows (the F test above has little power on three): its degrees of freedom
                dof[mine] = nu + nu0
            return _with_dof(_few_row_scales(out, src, named), dof, src, named, nu0, with_dof)
        # the prior from the scales about the median: a precise series whose residuals trace the
        # equation's own misfit must not, by that trend being removed, lower every source's prior
        plain = {k: mad_scale(r[src == k]) for k in own}
        plain = {k: v for k, v in plain.items() if v > 0}
        prior = float(np.median([plain[k] for k in big if k in plain] or list(plain.values()) or [pooled]))
        for name in named:
            mine = src == name
            if name in own:
                nu = mad_degrees_of_freedom(int(mine.sum()))
                with np.errstate(over="ignore"):
                    shrunk = float(np.sqrt((nu * np.float64(own[name]) ** 2 + nu0 * np.float64(prior) ** 2) / (nu + nu0)))
                out[mine] = max(own[name], shrunk)
                dof[mine] = nu + nu0
            else:
                out[mine] = max(prior, pooled)
                dof[mine] = nu0
        return _with_dof(_few_row_scales(out, src, named), dof, src, named, nu0, with_dof)

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
        its offset would be an extrapolation; one that does is measured from its
        points within reach of them alone (:func:`~audit.thermo.overlap.within_span`).
        Fewer than half of the sources of ``min_points`` rows or more are ever
        found off (one at least): the consensus is what most sources say.
        ``source-agreement`` does the full comparison later.
        """
        out: dict[str, SourceShift] = {}
        # the consensus is what most sources say: fewer than half of the sources that can be
        # judged are ever found off, or a curve pulled by one biased series (or fitted to a
        # narrow few) makes the majority look off and the consensus becomes an extrapolation
        judged = sum(int((src == name).sum()) >= max(2, ss["min_points"]) for name in names)
        most_off = max(1, (judged - 1) // 2)
        # worst source first, then the others against a yardstick without it: one biased
        # source would otherwise make every other look off the opposite way
        while len(names) - len(out) >= 2 and len(out) < most_off:
            left_out = np.isin(src, list(out))
            worst, worst_score = None, 0.0
            for name in names:
                # all of the source's points: a source 3 % off with 0.1 % scatter has every point
                # rejected by the first screen, and the median is robust to its own outliers anyway
                mine = src == name
                # as few points as `source-agreement` compares (it reports what is found here)
                if name in out or mine.sum() < max(2, ss["min_points"]):
                    continue
                # an offset is measured only where the other sources overlap the source in
                # temperature; far outside them, "the others' curve" is an extrapolation
                yardstick = in_fit & ~left_out & ~mine
                if not overlaps_others(T, mine, yardstick):
                    continue
                # ... and from the source's points within the others' judgeable range alone: a
                # median over points far outside it measures the extrapolation (a narrow
                # precise series made every wide scattered one look tens of percent off)
                inside = within_span(T[mine], T[yardstick])
                if inside.sum() < 2:
                    continue
                gd = deletion(mine, left_out)
                r_out = (r[mine] if gd is None else gd.residuals)[inside]
                # median: one point far outside the others' range (a °C value in a K column)
                # must not make the whole source look unjudgeable
                curve_var = 0.0 if gd is None else float(np.median(gd.curve_variance[inside]))
                med_out = float(np.median(r_out))
                u = math.hypot(_median_u(r_out, float(np.median(sig[mine][inside]))), math.sqrt(curve_var))
                if abs(med_out) > ss["k"] * u and abs(percent_from_log_ratio(med_out)) > ss["tolerance_percent"] \
                        and abs(med_out) / u > worst_score:
                    worst, worst_score = (name, u, r_out, inside), abs(med_out) / u
            if worst is None:
                break
            name, u, r_out, inside = worst
            mine = src == name
            # the offset is removed from the residuals the points are scored with: those against
            # the next fit, which leaves the source out when three or more sources are named
            rm = r_out if len(names) >= 3 else r[mine][inside]
            sm, sg = slope[mine][inside], sig[mine][inside]
            med = float(np.median(rm))
            dT = float(np.median(-rm / sm)) if np.all(sm > 0) else math.nan
            temperature = math.isfinite(dT) and mad_scale(rm + sm * dT) < mad_scale(rm - med)
            if temperature:
                u_removed = _median_u(-rm / sm - dT, float(np.median(sg / sm)))
            else:
                u_removed = _median_u(rm - med, float(np.median(sg)))
            out[name] = SourceShift(name, med, u, "temperature-offset" if temperature else "pressure-scale",
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

    def z_of_source(self, source):
        """Standardized residual (T, P) -> z of a reading of a row the branch did not judge.

        For a row set aside before the consensus (e.g. by ``physical-range``:
        a temperature below 0 K) whose corrected reading is to be scored: it
        takes the median scale and offset of the judged points of its source
        (of every judged point when the source has none here).
        """
        own = self.src == (source or "") if source else np.zeros(self.src.size, bool)
        idx = np.flatnonzero(own) if own.any() else np.arange(self.src.size)
        sig = float(np.median(self.sigma[idx]))
        if not sig > 0:
            return lambda T_K, P_Pa: math.nan
        return self._z_function(float(np.median(self.offsets[idx])), lambda T_K: sig)

    def z_of(self, i):
        """Standardized residual (T, P) -> z of a corrected reading of point i."""
        eq = self.fit.equation
        rel = self.rel[i]
        uT = self.uT_eff[i]
        base_sigma = self.sigma[i] / max(self.sigma_raw[i], 1e-300)  # the scale applied to point i

        # the point's own relative u(P) carries over; the rounding floor of a
        # corrected value is taken as that of the printed one
        def sigma_at(T_K):
            return math.sqrt(rel ** 2 + (float(eq.dlnp_dT(np.array([T_K]))[0]) * uT) ** 2) * base_sigma
        return self._z_function(self.offsets[i], sigma_at)

    def _z_function(self, offset_lnP, sigma_at):
        """(T, P) -> (ln P − ln P_fit(T) − offset)/σ(T); NaN where the fit cannot judge a reading."""
        eq = self.fit.equation
        # a corrected temperature far outside the fitted range cannot be judged
        T_lo, T_hi = judgeable_range(self.fit)

        def z(T_K, P_Pa):
            if not (T_K > 0 and P_Pa > 0) or not (T_lo <= T_K <= T_hi):
                return math.nan
            try:
                return (math.log(P_Pa) - float(eq.ln_p(np.array([T_K]))[0]) - offset_lnP) / sigma_at(T_K)
            except ValueError:  # e.g. a reduced (Wagner) form asked above Tc
                return math.nan
        return z




def points_data(branch: str, points) -> BranchData:
    """Points as arrays (SI), sorted by T (stable: replicates keep their input order).

    Parameters
    ----------
    branch : str
        Name of the branch.
    points : sequence of Point
        The branch's points (objects carrying T [K], P [Pa] and uncertainties).

    Returns
    -------
    BranchData
        T [K], P [Pa], u_T [K] and u_P [Pa] (None unless every point has one).
    """
    pts = sorted(points, key=lambda p: (p.T_K, p.row))
    T = np.array([p.T_K for p in pts], float)
    P = np.array([p.P_Pa for p in pts], float)
    # uncertainties count only when every point of the branch has them: a
    # partial column would mix weights from two different scales
    u_T = np.array([p.u_T_K for p in pts], float) if pts and all(p.u_T_K is not None for p in pts) else None
    u_P = np.array([p.u_P_Pa for p in pts], float) if pts and all(p.u_P_Pa is not None for p in pts) else None
    return BranchData(branch, tuple(pts), T, P, u_T, u_P)


def _fit_of_record(branch, points, accepted, T, P, u_T, u_P, form, fixed, u_given: bool):
    """The classical weighted fit of exactly the accepted points, in order of temperature.

    The same least-squares problem as the scoring fit of the last round
    (same points, same effective uncertainties), so the same parameters;
    ordered by T so that residual runs and local windows read it directly.
    The points come back carrying the uncertainties the fit weighted them
    by when the data state any (the effective ones: stated u, never below
    the printed precision or the profile's scatter floor, so a stated zero
    cannot make a later fit of the same points singular), else None, as the
    data gave none and later fits estimate their scale.
    """
    from ..thermo.fitting import fit_equation

    idx = np.flatnonzero(accepted)
    idx = idx[np.argsort(T[idx], kind="stable")]
    fit = fit_equation(T[idx], P[idx], form, u_T=u_T[idx], u_P=u_P[idx], robust=False, **fixed)
    pts = tuple(points[i] for i in idx)
    if u_given:
        return fit, BranchData(branch, pts, T[idx], P[idx], np.asarray(u_T[idx], float),
                               np.asarray(u_P[idx], float))
    return fit, BranchData(branch, pts, T[idx], P[idx], None, None)


def _deviations(rows, T, P, equation, offsets_lnP) -> dict[int, float]:
    # in logs: a curve extrapolated to a misprinted temperature can overflow exp()
    with np.errstate(over="ignore", invalid="ignore"):
        dev = percent_from_log_ratio(np.log(P) - equation.ln_p(T) - offsets_lnP)
    return {r: finite_or_inf(d) for r, d in zip(rows, np.atleast_1d(dev))}


def build_branch_consensus(points, settings, source_settings, Tc, Pc, branch: str) -> BranchConsensus:
    """The consensus of one branch's usable points (see the module docstring).

    Parameters
    ----------
    points : sequence of Point
        The branch's usable points (objects carrying T [K], P [Pa] and
        their uncertainties), in input order.
    settings : Mapping
        The ``outliers`` profile section by name (α [-], correction, iterations, scale options).
    source_settings : Mapping or None
        The ``source-agreement`` section by name (``k`` [-], ``tolerance_percent`` [%]), or None
        when sources are not to be judged.
    Tc, Pc : float or None
        Critical constants [K], [Pa] for the equation choice (None for a solid).
    branch : str
        Name of the branch ('liquid', 'solid', ...).

    Returns
    -------
    BranchConsensus
        Fit of record (T [K], P [Pa], residuals [ln Pa]), per-point scores
        [-] and deviations [%], and the source judgements.

    Raises
    ------
    ValueError, numpy.linalg.LinAlgError
        When no equation can be fitted (the caller reports the branch as not fitted).
    """
    a = _BranchAnalysis(points, settings, source_settings, Tc, Pc, branch)
    eq = a.fit.equation
    in_fit = np.asarray(a.influence.in_fit, bool)
    record, data = _fit_of_record(branch, points, in_fit, a.T, a.P, a.uT_eff, a.P * a.rel, type(eq),
                                  eq.fixed_parameters(), a.u_given)
    names = [x for x in dict.fromkeys(a.src) if x]
    excluded = tuple(sorted(name for name in a.biased if not in_fit[a.src == name].any()))
    n_rej = int(a.reject.sum())
    origin = (f"{a.form_name} fitted to {record.n_used} of the {len(points)} usable points"
              + (f" ({n_rej} rejected)" if n_rej else "")
              + (f"; left out as systematically off: {', '.join(excluded)}" if excluded else "")
              + (f"; {len(names)} sources" if names else ""))
    rows = tuple(p.row for p in points)
    return BranchConsensus(
        branch=branch, form_name=a.form_name, choice=a.choice, fit=record, fit_data=data, origin=origin,
        rows=rows, z=np.asarray(a.z, float), sigma=np.asarray(a.sigma, float),
        offsets_lnP=np.asarray(a.offsets, float),
        deviation_percent=_deviations(rows, a.T, a.P, record.equation, a.offsets),
        source_shifts=dict(a.biased), excluded_sources=excluded,
        reject=np.asarray(a.reject, bool), suspect=np.asarray(a.suspect, bool),
        critical_reject=float(a.crit_reject), critical_suspect=float(a.crit_suspect),
        scale=float(a.birge), uncertainties_given=bool(a.u_given), iterations=int(a.iterations),
        converged=bool(a.converged), cooks_distance=np.asarray(a.influence.cooks_distance, float),
        corrected_z=a.z_of, reading_z=a.z_of_source)


def refit_without_sources(consensus: BranchConsensus, points, keep, sigma_rel, sources) -> BranchConsensus:
    """The branch's consensus with ``sources`` left out of the fit of record.

    The same form; a robust (Huber → Tukey) fit of the kept points of the
    other sources decides which points are accepted, and the fit of record
    is the classical fit of those.  Point scores stay those of the
    consensus (a systematically off source is a finding about the source,
    not about its points); deviations are recomputed against the new fit.

    Parameters
    ----------
    consensus : BranchConsensus
        The branch's consensus to refit (an object, no unit).
    points : sequence of Point
        The branch's usable points (input order; objects carrying T [K] and P [Pa]).
    keep : array_like of bool
        Flag per point [-]: points that may enter the fit (not rejected).
    sigma_rel : array_like
        Each point's relative standard uncertainty in P [-].
    sources : sequence of str
        Names of the sources to leave out.

    Returns
    -------
    BranchConsensus
        The new consensus: fit of record (T [K], P [Pa], ln P residuals
        [ln Pa]) and deviations [%] against it.
    """
    from ..thermo.fitting import fit_equation

    eq = consensus.fit.equation
    fixed = eq.fixed_parameters()
    T = np.array([p.T_K for p in points])
    P = np.array([p.P_Pa for p in points])
    src = np.array([p.source or "" for p in points], dtype=object)
    sigma_rel = np.asarray(sigma_rel, float)
    use = np.asarray(keep, bool) & ~np.isin(src, list(sources))
    robust = fit_equation(T[use], P[use], type(eq), u_P=(P * sigma_rel)[use], robust=True, **fixed)
    accepted = np.zeros(T.size, bool)
    accepted[np.flatnonzero(use)[np.asarray(robust.weights) > 0]] = True
    if accepted.sum() <= robust.n_params + 1:
        accepted = use
    u_T = np.array([p.u_T_K or 0.0 for p in points])
    record, data = _fit_of_record(consensus.branch, points, accepted, T, P, u_T, P * sigma_rel, type(eq), fixed,
                                  consensus.uncertainties_given)
    excluded = tuple(sorted(set(consensus.excluded_sources) | set(sources)))
    offsets = {r: o for r, o in zip(consensus.rows, consensus.offsets_lnP)}
    rows = [p.row for p in points]
    dev = dict(consensus.deviation_percent)
    dev.update(_deviations(rows, T, P, record.equation, np.array([offsets.get(r, 0.0) for r in rows])))
    return replace(consensus, fit=record, fit_data=data, excluded_sources=excluded, deviation_percent=dev,
                   origin=(f"{consensus.form_name} refitted to {record.n_used} points without "
                           f"{', '.join(sources)} (systematically off the other sources)"))
