"""Residual structure and curvature statistics of vapor-pressure fits.

Pure statistics (no thresholds): the checks decide what is significant.

References
----------
.. [1] A. Wald and J. Wolfowitz, "On a test whether two samples are from the
   same population", Ann. Math. Stat. 11, 147-162 (1940),
   doi:10.1214/aoms/1177731909 (runs test).
.. [2] J. Durbin and G. S. Watson, "Testing for serial correlation in least
   squares regression. I", Biometrika 37, 409-428 (1950),
   doi:10.1093/biomet/37.3-4.409.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .distributions import chi2_sf, durbin_watson, f_sf, normal_cdf, normal_isf, normal_sf, t_isf
from .enthalpy import heat_capacity_change

__all__ = ["family_wise_critical", "CurvatureTest", "curvature_test", "curvature_test_with_levels", "RunsTest",
           "residual_runs", "grouped_residual_runs", "coverage_for_estimated_scale", "RepeatedMedianLine",
           "repeated_median_line", "mad_scale", "MAD_EFFICIENCY", "mad_degrees_of_freedom"]


@dataclass(frozen=True)
class CurvatureTest:
    """Does the richer (curved) form fit significantly better?

    Attributes
    ----------
    method : str
        'F' (scale estimated from residuals) or 'chi2' (uncertainties given:
        the χ² difference is referred to χ²(Δk)).
    statistic, p_value : float
        Test statistic and its p-value [-].
    df : tuple of int
        (Δk, residual dof) for F; (Δk,) for χ² (counts).
    dCp, u_dCp : float
        Apparent ΔCp of the richer fit at `T_ref` and its standard
        uncertainty [J/(mol K)].
    T_ref : float
        [K].
    """

    method: str
    statistic: float
    p_value: float
    df: tuple[int, ...]
    dCp: float
    u_dCp: float
    T_ref: float

    def summary(self) -> str:
        """The test statistic, its p value and the implied ΔCp.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        return (f"curvature: {self.method} = {self.statistic:.4g} (df {self.df}), p = {self.p_value:.3g}; "
                f"implied ΔCp = {self.dCp:.3g} ± {self.u_dCp:.2g} J/(mol K) at {self.T_ref:.5g} K")


def curvature_test(fit2, fit3) -> CurvatureTest:
    """Compare a straight ln P vs 1/T fit with a curved (nested) one.

    Parameters
    ----------
    fit2, fit3 : VaporPressureFit
        Fits (objects, no unit) of the same points with the same weights (use ``robust=False``
        or the same ``point_weights``); `fit3` has more parameters.

    Returns
    -------
    CurvatureTest
        The test statistic, p value and implied ΔCp (no unit; the units of its
        fields are in the docstring of :class:`CurvatureTest`).

    Notes
    -----
    F = ((χ²₂ - χ²₃)/Δk)/(χ²₃/dof₃) when the scale was estimated; with given
    uncertainties the χ² difference is referred to χ²(Δk).  The implied ΔCp
    is d/dT of the apparent enthalpy of `fit3` at its T_ref.  Verified
    against statsmodels ``OLSResults.compare_f_test`` in
    ``tests/thermo/test_iapws95_saturation.py``.
    """
    if fit3.n_params <= fit2.n_params:
        raise ValueError("the second fit must have more parameters than the first")
    if fit2.T.size != fit3.T.size or not np.array_equal(fit2.T, fit3.T) or not np.array_equal(fit2.P, fit3.P):
        raise ValueError("the two fits must be of the same data")
    if not np.array_equal(fit2.weights > 0, fit3.weights > 0):
        raise ValueError("the two fits used different points; refit with the same point weights")
    dk = fit3.n_params - fit2.n_params
    d_chi2 = max(fit2.chi2 - fit3.chi2, 0.0)
    if fit3.scale_estimated:
        F = (d_chi2 / dk) / (fit3.chi2 / fit3.dof) if fit3.chi2 > 0 else math.inf
        stat, p, df, method = F, f_sf(F, dk, fit3.dof), (dk, fit3.dof), "F"
    else:
        stat, p, df, method = d_chi2, chi2_sf(d_chi2, dk), (dk,), "chi2"
    cp = heat_capacity_change(fit3, fit3.T_ref)
    return CurvatureTest(method=method, statistic=float(stat), p_value=p, df=df, dCp=float(cp.value),
                         u_dCp=float(cp.uncertainty), T_ref=fit3.T_ref)


def curvature_test_with_levels(T_K, ln_P, sigma_lnP, groups, scale_known: bool = False) -> CurvatureTest:
    """The curvature test of :func:`curvature_test` with a level of its own for each group.

    In a compilation each source sits a little off the others; a source a
    little high at the ends of the range and one a little low in the middle
    bend a common curve as a real curvature would.  Here both forms,

        ln P = a_g + B/T          and          ln P = a_g + B/T + C ln T,

    give each group (source) g its own level a_g, so the curvature is measured
    within the sources only.  Weighted least squares with the points' σ:
    with the scale estimated, an F test on Δχ² with n − G − 2 residual degrees
    of freedom for G groups; with the σ stated (`scale_known`), Δχ² referred to
    χ²(1), as :func:`curvature_test` does.  ΔCp = R·C exactly for this form,
    u(ΔCp) = R·u(C).

    Parameters
    ----------
    T_K : array_like
        Temperatures [K].
    ln_P : array_like
        ln of the pressures [ln Pa].
    sigma_lnP : array_like
        Each point's standard uncertainty in ln P [-] (relative weights unless
        `scale_known`).
    groups : sequence
        Each point's group label (its source).
    scale_known : bool
        Flag: the σ are stated uncertainties, not to be rescaled by the residuals.

    Returns
    -------
    CurvatureTest
        Method 'F' or 'chi2', the statistic, p value and implied ΔCp (no unit; the units
        of its fields are in the docstring of :class:`CurvatureTest`);
        ``T_ref`` is the weighted mean temperature (1/mean of 1/T).

    Raises
    ------
    ValueError
        When the curved form leaves no residual degree of freedom.

    Notes
    -----
    Verified against statsmodels ``WLS`` with one indicator column per group
    (``compare_f_test``, the weighted residual sums of squares for a known scale, and the
    standard errors of the ln T coefficient) in
    ``tests/thermo/test_stats_curvature_levels.py``.
    """
    from .constants import R

    T = np.asarray(T_K, float)
    y = np.asarray(ln_P, float)
    sig = np.asarray(sigma_lnP, float)
    labels = list(dict.fromkeys(groups))
    code = np.array([labels.index(g) for g in groups])
    n, G = T.size, len(labels)
    dof3 = n - G - 2
    if dof3 < 1 or not (np.all(np.isfinite(T)) and np.all(T > 0) and np.all(np.isfinite(y))
                        and np.all(np.isfinite(sig)) and np.all(sig > 0)):
        raise ValueError("too few points for a curvature within the groups")
    w = 1.0 / sig ** 2
    x = 1.0 / T
    T_ref = 1.0 / float(np.sum(w * x) / np.sum(w))
    levels = np.zeros((n, G))
    levels[np.arange(n), code] = 1.0
    # centred regressors keep the normal equations well conditioned
    X2 = np.column_stack([levels, x - 1.0 / T_ref])
    X3 = np.column_stack([X2, np.log(T / T_ref)])
    sw = np.sqrt(w)
    if not (np.all(np.isfinite(X3 * sw[:, None])) and np.all(np.isfinite(y * sw))):
        raise ValueError("weights or values beyond the float range")

    def wls(X):
        beta, *_ = np.linalg.lstsq(X * sw[:, None], y * sw, rcond=None)
        r = y - X @ beta
        return beta, float(np.sum(w * r * r))

    try:
        _, chi2_2 = wls(X2)
        beta3, chi2_3 = wls(X3)
        if np.linalg.matrix_rank(X3 * sw[:, None]) < X3.shape[1]:
            raise ValueError("the groups' temperatures do not determine a curvature")
    except np.linalg.LinAlgError as exc:
        raise ValueError(f"the least-squares problem failed: {exc}") from None
    d_chi2 = max(chi2_2 - chi2_3, 0.0)
    if scale_known:
        s2, stat, p, df, method = 1.0, d_chi2, chi2_sf(d_chi2, 1), (1,), "chi2"
    else:
        s2 = chi2_3 / dof3
        stat = d_chi2 / s2 if s2 > 0 else math.inf
        p, df, method = f_sf(stat, 1, dof3), (1, dof3), "F"
    try:
        cov = s2 * np.linalg.inv((X3 * w[:, None]).T @ X3)
    except np.linalg.LinAlgError as exc:
        raise ValueError(f"the curvature's covariance is singular: {exc}") from None
    C, u_C = float(beta3[-1]), math.sqrt(max(float(cov[-1, -1]), 0.0))
    if not (math.isfinite(C) and math.isfinite(u_C)):
        raise ValueError("the curvature is not determined in floating point")
    return CurvatureTest(method=method, statistic=float(stat), p_value=p, df=df, dCp=R * C, u_dCp=R * u_C,
                         T_ref=T_ref)


@dataclass(frozen=True)
class RunsTest:
    """Sign runs of residuals ordered by T.

    Attributes
    ----------
    n_pos, n_neg, runs : int
        Numbers of positive and negative residuals (zeros dropped) and of runs.
    expected_runs : float
        Expected number of runs for random signs [-].
    z : float
        (runs - expected)/sd [-], no continuity correction.
    p_value : float
        Two-sided normal p-value [-].
    p_value_too_few : float
        One-sided [-]: too few runs (systematic misfit, e.g. unmodelled curvature).
    durbin_watson : float
        Durbin-Watson statistic of the residuals [-] (about 2 without serial correlation).
    longest_run : int
        Number of points in the longest same-sign run (a count).
    longest_run_start, longest_run_stop : int
        Index range [start, stop) of the longest same-sign run in the input order.
    longest_run_members : tuple of int
        Indices (input order) of the points of that run; for runs counted
        within groups (:func:`grouped_residual_runs`) they need not be contiguous.
    """

    n_pos: int
    n_neg: int
    runs: int
    expected_runs: float
    z: float
    p_value: float
    p_value_too_few: float
    durbin_watson: float
    longest_run: int
    longest_run_start: int
    longest_run_stop: int
    longest_run_members: tuple[int, ...] = ()

    def summary(self) -> str:
        """The runs count, its p values and the Durbin-Watson statistic.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        return (f"{self.runs} runs of signs (expected {self.expected_runs:.1f}; z = {self.z:.2f}, "
                f"p = {self.p_value:.3g}, too few: p = {self.p_value_too_few:.3g}); "
                f"Durbin-Watson {self.durbin_watson:.2f}; longest run {self.longest_run} points "
                f"[{self.longest_run_start}:{self.longest_run_stop}]")


def _runs_moments(n_pos: int, n_neg: int) -> tuple[float, float]:
    """Mean and variance of the number of runs of n₊ and n₋ signs in random order (both > 0)."""
    n = n_pos + n_neg
    a = 2.0 * n_pos * n_neg
    return a / n + 1.0, a * (a - n) / (n * n * (n - 1.0))


def residual_runs(residuals_sorted_by_T) -> RunsTest:
    """Wald-Wolfowitz runs test on the signs of residuals, and Durbin-Watson.

    Parameters
    ----------
    residuals_sorted_by_T : array_like
        Residuals in order of increasing T.  Exact zeros are dropped from the
        run count (they belong to neither sign).

    Returns
    -------
    RunsTest
        The runs test and Durbin-Watson statistic (no unit; the units of its
        fields are in the docstring of :class:`RunsTest`).

    Notes
    -----
    μ = 2 n₊ n₋/n + 1, σ² = 2 n₊ n₋ (2 n₊ n₋ - n)/(n² (n - 1)) [1].
    Verified against ``statsmodels.sandbox.stats.runs.runstest_1samp``
    (cutoff 0, no correction) and ``statsmodels.stats.stattools.durbin_watson``
    in ``tests/thermo/test_stats_runs.py``.
    """
    r = np.asarray(residuals_sorted_by_T, dtype=float).ravel()
    if r.size < 2 or not np.all(np.isfinite(r)):
        raise ValueError("need at least two finite residuals")
    nonzero = np.flatnonzero(r != 0)
    s = np.sign(r[nonzero])
    n_pos, n_neg = int(np.sum(s > 0)), int(np.sum(s < 0))
    n = n_pos + n_neg
    changes = np.flatnonzero(s[1:] != s[:-1]) + 1
    runs = int(changes.size + 1) if n else 0
    if n_pos and n_neg and n > 1:
        mu, var = _runs_moments(n_pos, n_neg)
        z = (runs - mu) / math.sqrt(var) if var > 0 else 0.0
        p2, p1 = 2 * normal_sf(abs(z)), normal_cdf(z)
    else:  # all residuals of one sign: a single run, maximal structure
        mu, z, p2, p1 = 1.0, math.nan, math.nan, math.nan
    if n:
        bounds = np.concatenate([[0], changes, [s.size]])
        lengths = np.diff(bounds)
        j = int(np.argmax(lengths))
        longest, start, stop = int(lengths[j]), int(nonzero[bounds[j]]), int(nonzero[bounds[j + 1] - 1] + 1)
    else:  # every residual exactly zero (a curve through every point): no run at all
        longest, start, stop = 0, 0, 0
    members = tuple(int(i) for i in nonzero[bounds[j]:bounds[j + 1]]) if n else ()
    return RunsTest(n_pos=n_pos, n_neg=n_neg, runs=runs, expected_runs=float(mu), z=float(z), p_value=p2,
                    p_value_too_few=p1, durbin_watson=float(durbin_watson(r)) if np.any(r) else math.nan,
                    longest_run=longest, longest_run_start=start, longest_run_stop=stop,
                    longest_run_members=members)


def grouped_residual_runs(residuals_sorted_by_T, groups) -> RunsTest:
    """Runs of residual signs counted within each group (source), pooled.

    In a compilation, each source's small systematic offset puts its points
    on one side of the consensus; sorted together, the sources' blocks form
    runs that say nothing about the curve.  The Wald–Wolfowitz test is
    conditional on the numbers of each sign, so within one source an offset
    changes n₊ and n₋ but not the test's validity: runs are counted per
    group (in order of T within it) and the groups' counts, expectations and
    variances summed (independent groups; normal approximation of the sum).

    Parameters
    ----------
    residuals_sorted_by_T : array_like
        Residuals in order of increasing T [any unit: only their signs count].
    groups : sequence
        The label of each residual's group (its source); one group gives
        :func:`residual_runs`.

    Returns
    -------
    RunsTest
        The pooled test (no unit; fields as in :class:`RunsTest`); ``n_pos``,
        ``n_neg`` and ``runs`` are sums over groups, the Durbin-Watson
        statistic is that of the residuals ordered by group, then T, and the
        longest run is the longest within any group (its members in input
        order; start and stop span them).

    Notes
    -----
    Verified against :func:`residual_runs` for one group, and against the
    sum of per-group counts and moments, in ``tests/thermo/test_stats_runs.py``.
    """
    r = np.asarray(residuals_sorted_by_T, dtype=float).ravel()
    g = list(groups)
    if len(g) != r.size:
        raise ValueError("one group per residual")
    labels = list(dict.fromkeys(g))
    if len(labels) <= 1:
        return residual_runs(r)
    if r.size < 2 or not np.all(np.isfinite(r)):
        raise ValueError("need at least two finite residuals")
    n_pos = n_neg = runs = 0
    mu = var = 0.0
    best: tuple[int, ...] = ()
    order = []
    for label in labels:
        idx = np.array([i for i, x in enumerate(g) if x == label])
        order.extend(idx.tolist())
        if idx.size < 2:
            n_pos += int(np.sum(r[idx] > 0))
            n_neg += int(np.sum(r[idx] < 0))
            runs += int(np.any(r[idx] != 0))
            mu += float(np.any(r[idx] != 0))
            continue
        part = residual_runs(r[idx])
        n_pos, n_neg, runs = n_pos + part.n_pos, n_neg + part.n_neg, runs + part.runs
        mu += part.expected_runs
        if part.n_pos and part.n_neg:
            var += _runs_moments(part.n_pos, part.n_neg)[1]
        if part.longest_run > len(best):
            best = tuple(int(idx[i]) for i in part.longest_run_members)
    z = (runs - mu) / math.sqrt(var) if var > 0 else math.nan
    p2 = 2 * normal_sf(abs(z)) if var > 0 else math.nan
    p1 = normal_cdf(z) if var > 0 else math.nan
    by_group = r[np.array(order)]
    return RunsTest(n_pos=n_pos, n_neg=n_neg, runs=runs, expected_runs=float(mu), z=float(z), p_value=p2,
                    p_value_too_few=p1,
                    durbin_watson=float(durbin_watson(by_group)) if np.any(by_group) else math.nan,
                    longest_run=len(best), longest_run_start=min(best) if best else 0,
                    longest_run_stop=max(best) + 1 if best else 0, longest_run_members=best)


#: MAD of a standard normal variable, Φ⁻¹(3/4); MAD/this estimates σ
MAD_NORMAL = 0.6744897501960817


#: asymptotic efficiency of the MAD for normal data (Rousseeuw & Croux 1993,
#: doi:10.1080/01621459.1993.10476408): its variance is that of a standard deviation
#: from 0.37 times as many points
MAD_EFFICIENCY = 0.37


def coverage_for_estimated_scale(k: float, dof: float) -> float:
    """The coverage factor for a scale estimated with `dof` degrees of freedom.

    The Student t quantile of the one-sided probability that `k` has under a
    known (normal) scale: a deviation of k "σ" with σ from a handful of rows
    is far likelier than with σ known.

    Parameters
    ----------
    k : float
        Coverage factor for a known scale [-].
    dof : float
        Degrees of freedom the scale is known with [-] (at least 1 is used).

    Returns
    -------
    float
        The factor [-]; `k` itself for 10⁶ degrees of freedom or more.

    Examples
    --------
    Three σ (one-sided 0.135 %) with a scale from five degrees of freedom
    (Student t tables give t = 5.893 at 0.1 % and 4.773 at 0.25 %, five
    degrees of freedom, which bracket it):

    >>> round(coverage_for_estimated_scale(3.0, 5.0), 2)
    5.51
    """
    if not dof < 1e6:
        return k
    return t_isf(normal_sf(k), max(dof, 1.0))


def mad_degrees_of_freedom(n: int) -> float:
    """Effective degrees of freedom [-] of a MAD scale from n values: 0.37·(n − 1).

    Parameters
    ----------
    n : int
        Number of values (a count).

    Returns
    -------
    float
        Degrees of freedom of the standard deviation as precise as that MAD [-].

    Examples
    --------
    >>> round(mad_degrees_of_freedom(8), 2)
    2.59
    """
    return MAD_EFFICIENCY * max(int(n) - 1, 0)


def mad_scale(x) -> float:
    """Robust scale: median absolute deviation about the median / Φ⁻¹(3/4).

    Consistent for σ of normal data; NaN for an empty input.  Verified against
    ``scipy.stats.median_abs_deviation(x, scale='normal')``.

    Parameters
    ----------
    x : array_like
        Values [unit of x].

    Returns
    -------
    float
        Scale estimate [unit of x].
    """
    x = np.asarray(x, dtype=float)
    if x.size == 0:
        return float("nan")
    return float(np.median(np.abs(x - np.median(x))) / MAD_NORMAL)


@dataclass(frozen=True)
class RepeatedMedianLine:
    """Result of :func:`repeated_median_line`: y ≈ intercept + slope·x.

    Attributes
    ----------
    intercept : float
        Intercept [unit of y].
    slope : float
        Slope [unit of y / unit of x].
    residuals : ndarray
        y − (intercept + slope·x) of each input pair [unit of y]; not finite
        for pairs left out.
    """

    intercept: float
    slope: float
    residuals: np.ndarray


#: Most partner points each point's median slope is taken over (a count): beyond, an evenly
#: spread subsample of the points in order of x.
MAX_SLOPE_PARTNERS = 2000


def repeated_median_line(x, y, *, chunk_rows: int | None = None,
                         max_partners: int = MAX_SLOPE_PARTNERS) -> RepeatedMedianLine:
    """Siegel's repeated-median straight line, and the residuals about it.

    Its breakdown point is 50 %: up to half the points may be arbitrarily
    wrong, even clustered at one end, without carrying the line with them —
    unlike a least-squares start, which a block of unit slips at the end of
    a range drags far enough to hide in.  Used on ln P against 1/T, where it
    is the two-constant Clausius–Clapeyron line.

    The same estimator as ``scipy.stats.siegelslopes(y, x,
    method="hierarchical")`` — the slope is the median over points j of the
    median slope from j to every point at another x, the intercept the
    median of y − slope·x — and the same numbers to the last digit (tested),
    but the per-point medians are taken a block of rows at a time, so memory
    is O(chunk·n) instead of scipy's full n×n tables.  Up to ``max_partners``
    points time is O(n²); beyond, each point's median slope is taken to
    ``max_partners`` points spread evenly in order of x (a sample that keeps
    the 50 % breakdown up to its own granularity), so time grows as n: the
    exact line of 20 000 points took 6 s for what is a screen for gross errors.

    Parameters
    ----------
    x, y : array_like
        Abscissae [unit of x] and ordinates [unit of y] (same length, at least 2).  Pairs with a
        non-finite value are left out of the line; their residuals are not
        finite.
    chunk_rows : int, optional
        Points whose medians are computed together (a count; default: enough for
        about 2·10⁶ slopes, at most 512).
    max_partners : int, optional
        Most points each point's slopes are taken to (a count).

    Returns
    -------
    RepeatedMedianLine
        Slope, intercept and residuals of the line (no unit; the units of its
        fields are in the docstring of :class:`RepeatedMedianLine`).

    References
    ----------
    A. F. Siegel, "Robust regression using repeated medians",
    Biometrika 69, 242-244 (1982), doi:10.1093/biomet/69.1.242.
    """
    x = np.asarray(x, dtype=float).ravel()
    y = np.asarray(y, dtype=float).ravel()
    if x.size != y.size or x.size < 2:
        raise ValueError("repeated_median_line needs two or more (x, y) pairs of equal length")
    # pairs with a non-finite x or y carry no slope: the line rests on the finite ones (scipy's
    # siegelslopes, given them, never returns when every x is infinite — 1/T of a 1e-320 K row)
    finite = np.isfinite(x) & np.isfinite(y)
    xf, yf = x[finite], y[finite]
    if xf.size < 2 or np.all(xf == xf[0]):
        # no pair at distinct x: no slope is determined (scipy leaves it
        # uninitialised); a level line through the median keeps residuals finite
        slope, intercept = 0.0, float(np.median(yf)) if yf.size else 0.0
    else:
        if xf.size > max_partners:
            pick = np.argsort(xf, kind="stable")[np.linspace(0, xf.size - 1, max_partners).round().astype(int)]
            partners = (xf[pick], yf[pick])
        else:
            partners = None
        slope = float(np.median(_point_median_slopes(xf, yf, chunk_rows, partners)))
        intercept = float(np.median(yf - slope * xf))
    with np.errstate(invalid="ignore", over="ignore"):
        r = y - (intercept + slope * x)
    r.setflags(write=False)
    return RepeatedMedianLine(intercept, slope, r)


def _point_median_slopes(x, y, chunk_rows=None, partners=None) -> np.ndarray:
    """For each j, the median of (y_j − y_i)/(x_j − x_i) over i with x_i ≠ x_j.

    The i run over ``partners`` (x, y) when given, else over all the points.

    Rows are processed in blocks.  Pairs at equal x (the point itself and
    its replicates) are excluded by padding them with −∞ and +∞ in the
    numbers that leave the valid slopes' median(s) at fixed positions
    K = ⌊(n−1)/2⌋ (odd count) or K, K+1 (even count) of every row, so one
    partition per block finds them all.  Needs finite x and y and at least
    two distinct x (the caller sees to both).
    """
    xp, yp = (x, y) if partners is None else partners
    n = xp.size
    chunk_rows = int(min(512, max(1, 2_000_000 // n))) if chunk_rows is None else max(1, int(chunk_rows))
    K = (n - 1) // 2
    kth = [K, K + 1] if K + 1 < n else [K]
    out = np.empty(x.size)
    for start in range(0, x.size, chunk_rows):
        rows = slice(start, min(x.size, start + chunk_rows))
        dx = x[rows, None] - xp[None, :]
        s = y[rows, None] - yp[None, :]
        same = dx == 0
        with np.errstate(divide="ignore", invalid="ignore"):
            s /= dx
        del dx
        count = n - same.sum(axis=1)  # valid slopes per row
        # −∞ before the valid slopes: K − ⌊(c−1)/2⌋ of them, the rest +∞
        n_low = K - (count - 1) // 2
        ri, ci = np.nonzero(same)  # row-major, so each row's excluded pairs in a run
        rank = np.arange(ri.size) - np.searchsorted(ri, ri)  # 0-based within its row
        s[ri, ci] = np.where(rank < n_low[ri], -np.inf, np.inf)
        del same
        s.partition(kth, axis=1)
        even = count % 2 == 0
        lo = s[:, K]
        hi = s[:, K + 1] if K + 1 < n else lo
        with np.errstate(invalid="ignore"):
            med = np.where(even, (lo + hi) / 2.0, lo)
        out[rows] = med
    return out


def family_wise_critical(alpha: float, n: int, correction: str, dof: float | None = None) -> float:
    """Two-sided critical value of |z| for n tests at family-wise level alpha.

    Šidák: per-test α' = 1 − (1 − α)^(1/n); Bonferroni: α' = α/n.  Normal
    quantile when ``dof`` is None, Student t with ``dof`` otherwise.

    References: Z. Šidák, J. Am. Stat. Assoc. 62, 626 (1967),
    doi:10.1080/01621459.1967.10482935.

    Parameters
    ----------
    alpha : float
        Family-wise significance level [-].
    n : int
        Number of tests (a count).
    correction : {'sidak', 'bonferroni'}
        Name of the correction.
    dof : float, optional
        Degrees of freedom [-] of a Student t; None for the normal.

    Returns
    -------
    float
        Critical |z| (or |t|) [-].
    """
    n = max(1, int(n))
    a = 1 - (1 - alpha) ** (1 / n) if correction == "sidak" else alpha / n
    if dof is None or not math.isfinite(dof):
        return normal_isf(a / 2)
    return t_isf(a / 2, max(dof, 1.0))
