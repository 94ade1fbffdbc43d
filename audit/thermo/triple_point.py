"""Triple point from the crossing of sublimation and vaporization curves.

At the triple point the two curves ln p_s(T) and ln p_l(T) cross; the
enthalpy of fusion is the difference of the two enthalpies there,
ΔH_fus = ΔH_sub - ΔH_vap.  Without phase labels the crossing shows up as a
break in the slope of ln P against 1/T (steeper on the solid side).

References
----------
.. [1] IAPWS R14-08(2011) and W. Wagner, T. Riethmann, R. Feistel,
   A. H. Harvey, J. Phys. Chem. Ref. Data 40, 043103 (2011),
   doi:10.1063/1.3657937 (water's triple point as the crossing point).
.. [2] J. R. Taylor, *An Introduction to Error Analysis*, 2nd ed., University
   Science Books (1997), ch. 3 (propagation of uncertainty by the delta method).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .constants import R
from .data import InsufficientData, as_data, as_uncertainty
from .distributions import f_sf
from .enthalpy import _refit_candidates, heat_capacity_change, running_comoment, running_moments
from .roots import bracketed_root, sign_change_brackets

__all__ = ["TriplePointEstimate", "intersect_branches", "SlopeBreak", "find_slope_break"]


@dataclass(frozen=True)
class TriplePointEstimate:
    """Crossing of a solid and a liquid vapor-pressure curve.

    Attributes
    ----------
    T, u_T : float
        Crossing temperature and standard uncertainty [K].
    P, u_P : float
        Crossing pressure and standard uncertainty [Pa].
    dH_sub, u_dH_sub, dH_vap, u_dH_vap, dH_fus, u_dH_fus : float
        Enthalpies at the crossing [J/mol] (apparent × the Δz passed in),
        uncertainties by the delta method including the uncertainty of T.
    delta_z_solid, delta_z_liquid : float
        Δz [-] applied to each branch (1 = none).
    crossed : bool
        False when the curves do not cross in the searched interval (then
        the numbers are NaN).
    message : str
    """

    T: float
    u_T: float
    P: float
    u_P: float
    dH_sub: float
    u_dH_sub: float
    dH_vap: float
    u_dH_vap: float
    dH_fus: float
    u_dH_fus: float
    delta_z_solid: float
    delta_z_liquid: float
    crossed: bool
    message: str

    def summary(self) -> str:
        """The crossing point and the three enthalpies, or why there is none.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        if not self.crossed:
            return f"no crossing: {self.message}"
        return (f"branches cross at T = {self.T:.4f} ± {self.u_T:.2g} K, P = {self.P:.6g} ± {self.u_P:.2g} Pa; "
                f"ΔH_sub = {self.dH_sub / 1e3:.3f} ± {self.u_dH_sub / 1e3:.2g}, "
                f"ΔH_vap = {self.dH_vap / 1e3:.3f} ± {self.u_dH_vap / 1e3:.2g}, "
                f"ΔH_fus = {self.dH_fus / 1e3:.3f} ± {self.u_dH_fus / 1e3:.2g} kJ/mol. {self.message}")


def _eq_cov(fit):
    if hasattr(fit, "equation"):
        return fit.equation, np.asarray(fit.covariance)
    return fit, np.zeros((fit.n_params, fit.n_params))


def _range(fit, eq):
    if hasattr(fit, "T_range"):
        return fit.T_range
    return (getattr(eq, "T_min", None), getattr(eq, "T_max", None))


def _nan_estimate(message: str, dzs: float, dzl: float) -> TriplePointEstimate:
    nan = math.nan
    return TriplePointEstimate(nan, nan, nan, nan, nan, nan, nan, nan, nan, nan, dzs, dzl, False, message)


def intersect_branches(fit_solid, fit_liquid, T_guess: float | None = None,
                       delta_z_solid: float = 1.0, delta_z_liquid: float = 1.0) -> TriplePointEstimate:
    """Intersect a sublimation and a vaporization curve.

    Parameters
    ----------
    fit_solid, fit_liquid : VaporPressureFit or equation
        The two branches (objects, no unit).  With fits, the (independent) parameter
        covariances give the uncertainties; bare equations give zero.
    T_guess : float, optional
        Temperature [K] near which to look for the crossing; by default
        the junction of the two fitted ranges.  Needed for bare equations
        without a range (the search then spans ±20 % around it).
    delta_z_solid, delta_z_liquid : float
        Δz [-] at the crossing for each branch (see
        :class:`audit.thermo.enthalpy.RealGasModel`); the enthalpies are
        apparent × Δz.

    Returns
    -------
    TriplePointEstimate
        The crossing point of the branches and the enthalpies there (no unit;
        the units of its fields are in the docstring of
        :class:`TriplePointEstimate`).

    Notes
    -----
    The root of ln p_s - ln p_l is bracketed on a grid spanning both
    ranges widened by 10 % of their joint span and refined with Brent's
    method.  With g = ∂ ln p/∂parameters and s = d ln p/dT,
    u(T)² = (g_sᵀ C_s g_s + g_lᵀ C_l g_l)/(s_s - s_l)²; P and the
    enthalpies carry both their direct parameter dependence and that
    through T.  Verified against a parametric bootstrap in
    ``tests/thermo/test_triple_point_water.py``.
    """
    eq_s, C_s = _eq_cov(fit_solid)
    eq_l, C_l = _eq_cov(fit_liquid)
    dzs, dzl = float(delta_z_solid), float(delta_z_liquid)
    if not (dzs > 0 and dzl > 0):
        raise ValueError("Δz must be positive")
    (a_s, b_s), (a_l, b_l) = _range(fit_solid, eq_s), _range(fit_liquid, eq_l)
    lows = [v for v in (a_s, a_l) if v is not None]
    highs = [v for v in (b_s, b_l) if v is not None]
    if not lows or not highs:
        if T_guess is None:
            raise ValueError("cannot tell the temperature ranges of the branches: give T_guess")
        lows, highs = [0.8 * T_guess], [1.2 * T_guess]
    lo, hi = min(lows), max(highs)
    span = hi - lo
    lo, hi = max(lo - 0.1 * span, 1e-3 * lo), hi + 0.1 * span
    for eq in (eq_s, eq_l):  # reduced forms are undefined at and above Tc
        Tc = getattr(eq, "Tc", None)
        if isinstance(Tc, float) and Tc > 0:
            hi = min(hi, Tc * (1 - 1e-9))
    if T_guess is None:
        T_guess = 0.5 * (b_s + a_l) if (b_s is not None and a_l is not None) else 0.5 * (lo + hi)
    if not (math.isfinite(T_guess) and T_guess > 0):
        raise ValueError("T_guess must be a positive temperature")

    def f(T):
        return eq_s.ln_p(T) - eq_l.ln_p(T)

    brackets = sign_change_brackets(f, lo, hi, n_grid=2001)
    roots = [r for r in (bracketed_root(lambda t: float(f(np.array([t]))[0]), a, b, xtol=1e-13)
                         for a, b in brackets) if r is not None]
    if not roots:
        return _nan_estimate(f"the curves do not cross between {lo:.5g} and {hi:.5g} K", dzs, dzl)
    T0 = min(roots, key=lambda r: abs(r - T_guess))
    idx = roots
    message = "" if len(idx) == 1 else f"{len(idx)} crossings found; the one nearest {T_guess:.5g} K taken"

    Ta = np.array([T0])
    s_s, s_l = float(eq_s.dlnp_dT(Ta)[0]), float(eq_l.dlnp_dT(Ta)[0])
    ds = s_s - s_l
    if ds == 0:
        return _nan_estimate("the curves touch without crossing", dzs, dzl)
    k_s, k_l = eq_s.n_params, eq_l.n_params
    g_s = eq_s.param_gradient("ln_p", Ta)[0] if k_s else np.zeros(0)
    g_l = eq_l.param_gradient("ln_p", Ta)[0] if k_l else np.zeros(0)
    # Implicit function theorem on ln p_s(T, θs) - ln p_l(T, θl) = 0.
    dT = np.concatenate([-g_s / ds, g_l / ds])
    C = np.zeros((k_s + k_l, k_s + k_l))
    C[:k_s, :k_s] = C_s
    C[k_s:, k_s:] = C_l
    lnP = float(eq_s.ln_p(Ta)[0])
    dlnP = np.concatenate([g_s, np.zeros(k_l)]) + s_s * dT

    def enthalpy_and_gradient(eq, k, offset, dz):
        h = float(-R * eq.dlnp_dinvT(Ta)[0]) * dz
        direct = np.zeros(k_s + k_l)
        if k:
            direct[offset:offset + k] = -R * eq.param_gradient("dlnp_dinvT", Ta)[0] * dz
        cp = float(heat_capacity_change(eq, T0).value) * dz
        return h, direct + cp * dT

    h_s, gh_s = enthalpy_and_gradient(eq_s, k_s, 0, dzs)
    h_l, gh_l = enthalpy_and_gradient(eq_l, k_l, k_s, dzl)

    def u(g):
        return float(math.sqrt(max(g @ C @ g, 0.0)))

    P = math.exp(lnP)
    return TriplePointEstimate(T=T0, u_T=u(dT), P=P, u_P=P * u(dlnP), dH_sub=h_s, u_dH_sub=u(gh_s),
                               dH_vap=h_l, u_dH_vap=u(gh_l), dH_fus=h_s - h_l, u_dH_fus=u(gh_s - gh_l),
                               delta_z_solid=dzs, delta_z_liquid=dzl, crossed=True, message=message)


@dataclass(frozen=True)
class SlopeBreak:
    """Best two-line description of ln P against 1/T (see :func:`find_slope_break`).

    Attributes
    ----------
    T_break : float
        Where the two lines cross if that lies between the neighbouring
        points, else the midpoint (in 1/T) between them [K].
    split : int
        Number of T-sorted points on the low-temperature side (a count).
    order : ndarray of int
        Indices that sort the input by T [-].
    F, p_value : float
        F statistic of two lines vs one (2 extra parameters) and its nominal p-value [-].
    p_value_adjusted : float
        Bonferroni-adjusted over the `n_tested` split positions [-].
    slope_low, slope_high : float
        d ln P/d(1/T) of each side [K].
    dH_low, dH_high : float
        Apparent enthalpies -R × slope [J/mol].
    solid_side_steeper : bool
        True when the low-temperature side is steeper, as for a solid below
        its triple point.
    n_tested : int
        Number of split positions tested (a count).
    gap_lnP, u_gap_lnP : float
        ln P of the high-T line minus the low-T line at the split (midpoint
        in 1/T), and its standard uncertainty from the two lines' scatter
        [-] (differences of ln P): a phase change keeps P continuous.
    """

    T_break: float
    split: int
    order: np.ndarray
    F: float
    p_value: float
    p_value_adjusted: float
    slope_low: float
    slope_high: float
    dH_low: float
    dH_high: float
    solid_side_steeper: bool
    n_tested: int
    #: ln P of the high-T line minus the low-T line at the split (midpoint in 1/T), and its
    #: standard uncertainty from the two lines' scatter: a phase change keeps P continuous
    gap_lnP: float = math.nan
    u_gap_lnP: float = math.nan


def _line(x, y, w):
    sw = w.sum()
    xm, ym = (w * x).sum() / sw, (w * y).sum() / sw
    sxx = (w * (x - xm) ** 2).sum()
    b = (w * (x - xm) * (y - ym)).sum() / sxx
    a = ym - b * xm
    return a, b, float((w * (y - a - b * x) ** 2).sum())


def find_slope_break(T, P, min_points_per_side: int = 4, u_T=None, u_P=None) -> SlopeBreak:
    """Find the best split of ln P vs 1/T into two straight lines.

    Parameters
    ----------
    T, P : array_like
        [K], [Pa]; any order.
    min_points_per_side : int
        At least this many points on each side (a count, ≥ 3).
    u_T, u_P : float or array_like, optional
        Standard uncertainties [K], [Pa]; the weights use the effective
        variance with the slope of one straight line through all points.

    Returns
    -------
    SlopeBreak
        The best break in slope along one series (no unit; the units of its
        fields are in the docstring of :class:`SlopeBreak`).

    Notes
    -----
    Each side gets its own line (not forced to meet).  F = ((RSS₁ - RSS₂)/2)
    / (RSS₂/(n - 4)).  Because the best split is picked, the nominal p-value
    is optimistic; ``p_value_adjusted`` is conservative.

    O(n) after sorting: every split's two residual sums come from running
    weighted sums (Σw, means, co-moments of 1/T and ln P) in one pass each
    way, and the few splits within rounding of the best are refitted
    exactly, so the result is that of refitting both sides at every split
    (the former O(n²) scan) to rounding.
    """
    T, P = as_data(T, P)
    n = T.size
    m = int(min_points_per_side)
    if m < 3:
        raise ValueError("min_points_per_side must be at least 3")
    order = np.argsort(T, kind="stable")
    Ts, x, y = T[order], 1.0 / T[order], np.log(P[order])
    # each side needs m distinct temperatures: replicates at one T give a side no slope
    distinct_upto = np.cumsum(np.diff(Ts, prepend=-np.inf) > 0)
    n_T = int(distinct_upto[-1])
    if n_T < 2 * m + 1:
        raise InsufficientData(f"need at least {2 * m + 1} distinct temperatures to look for a slope break; "
                               f"got {n} points at {n_T}")
    if u_T is not None or u_P is not None:
        uT = as_uncertainty(u_T, n, "u_T")[order]
        uP = as_uncertainty(u_P, n, "u_P")[order]
        _, b_all, _ = _line(x, y, np.ones(n))
        slope_T = -b_all / Ts ** 2
        var = (uP / P[order]) ** 2 + (slope_T * uT) ** 2
        if np.any(var <= 0):
            raise ValueError("a point has zero uncertainty in both T and P")
        w = 1.0 / var
    else:
        w = np.ones(n)
    a_all, b_all_w, rss1 = _line(x, y, w)
    # split k puts points 0..k-1 on the low-temperature side, as in a scan over k = 1..n-1
    ks = np.arange(1, n)
    below = distinct_upto[:-1]
    ks = ks[(Ts[1:] != Ts[:-1]) & (below >= m) & (n_T - below >= m)]
    if ks.size == 0:
        raise ValueError("no split with distinct temperatures on both sides")
    # Each side's residual sum of squares from running weighted moments (O(n) in all);
    # taken about the one-line fit, which leaves each side's RSS unchanged but makes
    # the sums small, so RSS = C_ee − C_xe²/C_xx keeps its digits
    xc = x - float(np.sum(w * x) / np.sum(w))
    e = y - (a_all + b_all_w * x)

    def side_rss(xc_, e_, w_, idx):
        W, mx, Cxx = running_moments(xc_, w_)
        _, me, Cee = running_moments(e_, w_)
        Cxe = running_comoment(xc_, e_, w_, mx, me)
        with np.errstate(divide="ignore", invalid="ignore"):
            return np.maximum(Cee[idx] - Cxe[idx] ** 2 / Cxx[idx], 0.0)

    rss_fast = side_rss(xc, e, w, ks - 1) + side_rss(xc[::-1], e[::-1], w[::-1], n - ks - 1)

    def exact(i):
        k = int(ks[i])
        a1, b1, r1 = _line(x[:k], y[:k], w[:k])
        a2, b2, r2 = _line(x[k:], y[k:], w[k:])
        return r1 + r2, (k, a1, b1, a2, b2)

    # the few splits within rounding of the best are refitted exactly
    found = _refit_candidates(np.where(np.isfinite(rss_fast), rss_fast, np.inf), rss1, exact)
    if found is None:
        raise ValueError("no split with distinct temperatures on both sides")
    tested = int(ks.size)
    rss2, _, (k, a1, b1, a2, b2) = found
    dof = n - 4
    F = ((rss1 - rss2) / 2) / (rss2 / dof) if rss2 > 0 else math.inf
    p = f_sf(F, 2, dof)
    x_lo, x_hi = x[k], x[k - 1]  # 1/T just above and just below the split
    x_cross = (a2 - a1) / (b1 - b2) if b1 != b2 else math.nan
    x_break = x_cross if (math.isfinite(x_cross) and x_lo <= x_cross <= x_hi) else 0.5 * (x_lo + x_hi)
    x_mid = 0.5 * (x_lo + x_hi)
    s2 = rss2 / dof if dof > 0 else math.nan
    var_gap = 0.0
    for xs, ws in ((x[:k], w[:k]), (x[k:], w[k:])):
        xm = float(np.sum(ws * xs) / np.sum(ws))
        var_gap += 1.0 / float(np.sum(ws)) + (x_mid - xm) ** 2 / float(np.sum(ws * (xs - xm) ** 2))
    return SlopeBreak(T_break=float(1.0 / x_break), split=int(k), order=order, F=float(F), p_value=p,
                      p_value_adjusted=min(1.0, p * tested), slope_low=float(b1), slope_high=float(b2),
                      dH_low=float(-R * b1), dH_high=float(-R * b2),
                      solid_side_steeper=bool(abs(b1) > abs(b2)), n_tested=tested,
                      gap_lnP=float((a2 + b2 * x_mid) - (a1 + b1 * x_mid)),
                      u_gap_lnP=float(math.sqrt(s2 * var_gap)) if math.isfinite(s2) else math.nan)
