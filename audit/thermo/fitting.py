"""Weighted, robust fitting of vapor-pressure equations, and choice of form.

The fit minimises weighted squared residuals in ln P.  Each point's standard
uncertainty in ln P is the *effective variance*

    σ²(ln P) = (u_P/P)² + (d ln P/dT)² u_T²,

with the slope d ln P/dT re-evaluated from the current fit at every
iteration, so that a temperature uncertainty counts where the curve is steep.
Gross errors are handled by iteratively reweighted least squares (IRLS):
first Huber weights with a MAD scale updated each iteration (the estimator
of statsmodels' RLM), then Tukey's redescending biweight on
leverage-studentized residuals with the scale held at the Qn estimate
(Rousseeuw & Croux 1993) of the Huber residuals, so a point with a unit slip
gets weight zero instead of bending the curve.  With 0.05 % noise on 25
water points, a good point is cut off in about 0.5-1.5 % of data sets
(measured over 200 seeds for the 3- and 4-parameter forms).

References
----------
.. [1] J. Orear, "Least squares when both variables have uncertainties",
   Am. J. Phys. 50, 912 (1982), doi:10.1119/1.12972 (effective variance).
.. [2] P. J. Huber, "Robust estimation of a location parameter", Ann. Math.
   Stat. 35, 73 (1964), doi:10.1214/aoms/1177703732.
.. [3] A. E. Beaton and J. W. Tukey, "The fitting of power series, meaning
   polynomials, illustrated on band-spectroscopic data", Technometrics 16,
   147 (1974), doi:10.1080/00401706.1974.10489171 (biweight).
.. [5] P. J. Rousseeuw and C. Croux, "Alternatives to the median absolute
   deviation", J. Am. Stat. Assoc. 88, 1273 (1993), doi:10.1080/01621459.1993.10476408.
.. [4] C. M. Hurvich and C.-L. Tsai, "Regression and time series model
   selection in small samples", Biometrika 76, 297 (1989),
   doi:10.1093/biomet/76.2.297 (AICc).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Sequence

import numpy as np
from scipy import optimize

from .data import InsufficientData, as_data, as_uncertainty, readonly, weighted_lstsq
from .distributions import qn_scale
from .slope import apparent_enthalpy, heat_capacity_change
from .ratios import percent_from_log_ratio
from .equations import (Antoine, ClarkeGlew, ClausiusClapeyron2, VaporPressureEquation, Wagner,
                        _pressure_ln_factor, get_form)

__all__ = [
    "InsufficientData",
    "distinct_temperatures",
    "VaporPressureFit",
    "fit_equation",
    "CandidateAssessment",
    "EquationChoice",
    "select_equation",
    "CANDIDATES",
]

#: Φ⁻¹(3/4): MAD / this is a consistent estimate of a normal standard deviation.
_MAD_NORMAL = 0.6744897501960817
#: Most reweighting steps [-] of the Huber phase that starts a Tukey fit.
START_BUDGET = 50
#: Huber tuning constant (95 % efficiency at the normal; Huber 1964).
HUBER_C = 1.345
#: Tukey biweight tuning constant (95 % efficiency at the normal).
TUKEY_C = 4.685

# Old private names, kept because tests/thermo/test_scaling_equivalence.py
# (outside this package) still imports them from here.
_as_data = as_data
_as_uncertainty = as_uncertainty
_weighted_lstsq = weighted_lstsq


@dataclass(frozen=True)
class VaporPressureFit:
    """Result of :func:`fit_equation`.

    Attributes
    ----------
    equation : VaporPressureEquation
        The fitted equation.
    params, standard_errors : ndarray
        Parameter values and standard errors (order of ``parameter_names``).
    parameter_names : tuple of str
    covariance : ndarray
        Parameter covariance from the final weighted fit; multiplied by
        ``scale**2`` when ``scale_estimated``.
    T, P : ndarray
        The data fitted [K], [Pa], in the order given.
    residuals_lnP : ndarray
        ln P - ln P_fit for every point (also the rejected ones).
    sigma_lnP : ndarray
        Effective standard uncertainty of ln P per point (1 for all points
        when no uncertainties were given).
    weights : ndarray
        Final robust weight of each point in [0, 1] (times any point weights
        passed in); 0 means the point did not influence the fit.
    scale : float
        Residual scale sqrt(χ²/dof).  With uncertainties given it is the
        Birge ratio (about 1 when they are consistent with the scatter);
        without, the residual standard deviation of ln P.
    scale_estimated : bool
        True when no uncertainties were given, so the covariance is scaled by
        the residual variance.
    n_used, dof : int
        Points with non-zero weight; n_used minus the number of parameters.
    chi2 : float
        Σ w_i r_i²/σ_i² over all points (robust weights included).
    rms_percent : float
        RMS of 100 (P - P_fit)/P_fit over the points with non-zero weight.
    aicc, bic : float
        Small-sample Akaike and Bayesian information criteria with the
        common scale of the σ estimated (so the given uncertainties act as
        relative weights): AIC = n ln(χ²/n) + 2(k+1).
    T_range : (float, float)
        Range of the points with non-zero weight [K].
    T_ref : float
        1/mean(1/T) of those points [K]: where parameter correlations are
        smallest; a natural temperature to quote ΔH and ΔCp at.
    converged : bool
    iterations : int
    robust : str
        'none', 'huber' or 'huber+tukey'.
    uncertainties_given : bool
    """

    equation: VaporPressureEquation
    params: np.ndarray
    parameter_names: tuple[str, ...]
    covariance: np.ndarray
    standard_errors: np.ndarray
    T: np.ndarray
    P: np.ndarray
    residuals_lnP: np.ndarray
    sigma_lnP: np.ndarray
    weights: np.ndarray
    scale: float
    scale_estimated: bool
    n_used: int
    dof: int
    chi2: float
    rms_percent: float
    aicc: float
    bic: float
    T_range: tuple[float, float]
    T_ref: float
    converged: bool
    iterations: int
    robust: str
    uncertainties_given: bool

    @property
    def form_name(self) -> str:
        return type(self.equation).__name__

    @property
    def n_params(self) -> int:
        return len(self.params)

    @property
    def sigma_lnP_scaled(self) -> np.ndarray:
        """σ of ln P per point as the covariance counts it: ``sigma_lnP``, times the scale when estimated."""
        return self.sigma_lnP * (self.scale if self.scale_estimated else 1.0)

    @property
    def covariance_birge(self) -> np.ndarray:
        """The parameter covariance times max(1, scale)²: never narrower than the scatter the
        fit's points show about it (Birge, Phys. Rev. 40, 207 (1932)) [units of the parameters²]."""
        return np.asarray(self.covariance) * max(1.0, self.scale) ** 2

    @property
    def standardized_residuals(self) -> np.ndarray:
        """Residuals divided by σ and by the scale (about N(0, 1) for good points)."""
        s = self.scale if (self.scale_estimated and self.scale > 0) else 1.0
        return self.residuals_lnP / (self.sigma_lnP * s)

    @property
    def used(self) -> np.ndarray:
        return self.weights > 0

    def summary(self) -> str:
        """The fit: range, equation, parameters with standard errors, quality.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        lines = [f"{self.form_name} fit of {self.n_used} of {self.T.size} points, "
                 f"T = {self.T_range[0]:.6g}-{self.T_range[1]:.6g} K",
                 f"  {self.equation.describe()}"]
        for n, v, s, u in zip(self.parameter_names, self.params, self.standard_errors,
                              self.equation.parameter_units):
            lines.append(f"  {n:8s} = {v:.8g} ± {s:.2g} [{u}]")
        if self.scale_estimated:
            lines.append(f"  no uncertainties given: scale estimated from the residuals, "
                         f"s(ln P) = {self.scale:.3g}")
        else:
            lines.append(f"  χ²/dof = {self.chi2:.4g}/{self.dof} (Birge ratio {self.scale:.3g})")
        lines.append(f"  RMS deviation {self.rms_percent:.3g} %; AICc {self.aicc:.2f}; BIC {self.bic:.2f}; "
                     f"robust: {self.robust}; {'converged' if self.converged else 'NOT converged'} "
                     f"after {self.iterations} iterations")
        rejected = int(np.sum(self.weights == 0))
        if rejected:
            lines.append(f"  {rejected} point(s) given zero weight")
        return "\n".join(lines)

    def to_dict(self) -> dict:
        """JSON-ready description of the fit.

        Returns
        -------
        dict
            Field name to value (no unit as a whole): the equation as in
            :meth:`VaporPressureEquation.to_dict`, standard errors and covariance
            in the units of the parameters, and the fit's statistics.
        """
        return {
            "equation": self.equation.to_dict(),
            "standard_errors": dict(zip(self.parameter_names, map(float, self.standard_errors))),
            "covariance": self.covariance.tolist(),
            "scale": self.scale, "scale_estimated": self.scale_estimated,
            "n_used": self.n_used, "dof": self.dof, "chi2": self.chi2,
            "rms_percent": self.rms_percent, "aicc": self.aicc, "bic": self.bic,
            "T_range": list(self.T_range), "T_ref": self.T_ref,
            "converged": self.converged, "iterations": self.iterations, "robust": self.robust,
        }


# -- input handling -------------------------------------------------------------------
def distinct_temperatures(T) -> int:
    """Number of distinct temperatures among `T` [K].

    Replicate measurements at one temperature add points but no information
    on the shape of ln P(T): a curve with k parameters needs k distinct
    temperatures, however many points there are.

    Parameters
    ----------
    T : array_like
        Temperatures [K].

    Returns
    -------
    int
        Count of distinct values [-].

    Examples
    --------
    >>> distinct_temperatures([300.0, 300.0, 300.0, 310.0])
    2
    """
    return int(np.unique(np.asarray(T, dtype=float)).size)


def _default_fixed(cls, T, fixed: dict) -> dict:
    fixed = dict(fixed)
    if cls is ClarkeGlew:
        fixed.setdefault("theta", float(1.0 / np.mean(1.0 / T)))
        fixed.setdefault("n_terms", 3)
    elif cls is Wagner:
        if fixed.get("Tc") is None or fixed.get("Pc") is None:
            raise ValueError("the Wagner form needs the critical constants Tc and Pc")
        if np.any(T >= fixed["Tc"]):
            raise ValueError("the Wagner form needs all temperatures below Tc")
    elif cls is Antoine:
        fixed.setdefault("base", "log10")
        fixed.setdefault("P_unit", "Pa")
        fixed.setdefault("T_unit", "K")
    unknown = set(fixed) - _allowed_fixed(cls)
    if unknown:
        raise ValueError(f"{cls.__name__} does not take {sorted(unknown)}")
    return fixed


def _allowed_fixed(cls) -> set:
    return {ClarkeGlew: {"theta", "p_ref", "n_terms"}, Wagner: {"Tc", "Pc", "variant"},
            Antoine: {"base", "P_unit", "T_unit"}}.get(cls, set())


def _n_params(cls, fixed) -> int:
    if cls is ClarkeGlew:
        return int(fixed["n_terms"])
    return len(cls._names)


# -- numerical kernels -----------------------------------------------------------------
def _robust_weights(z, kind):
    a = np.abs(z)
    if kind == "huber":
        return np.where(a <= HUBER_C, 1.0, HUBER_C / np.maximum(a, 1e-300))
    u = z / TUKEY_C
    return np.where(a < TUKEY_C, (1.0 - u * u) ** 2, 0.0)


def _mad_scale(z, active):
    zz = np.abs(z[active])
    return float(np.median(zz) / _MAD_NORMAL) if zz.size else 0.0


def _qn_scale(z) -> float:
    return qn_scale(z) if z.size > 1 else 0.0


def _antoine_start(T, y, w, fixed) -> Antoine:
    b, _ = weighted_lstsq(ClausiusClapeyron2(0, 0).design_matrix(T), y, w)
    # ln P = a + b/T is the Antoine curve with C = 0 (T in K, natural log).
    start = Antoine(A=b[0], B=-b[1], C=0.0, base="ln", P_unit="Pa", T_unit="K")
    return start.converted(fixed["base"], fixed["P_unit"], fixed["T_unit"])


class _AntoineProfile:
    """Weighted least squares of Antoine constants with C held fixed.

    With C fixed, ln P = k·A − k·B/(T_u + C) + ln(unit) is a straight line in
    z = −1/(T_u + C), so (A, B) and the weighted sum of squares have a closed
    form (centred normal equations; stable because z is centred).
    """

    def __init__(self, eq: Antoine, T, y, w):
        _, k, _, x = eq._parts(T)
        self.k = k
        self.Tu = x - eq.C
        self.yk = (y - _pressure_ln_factor(eq.P_unit)) / k
        self.w = w
        self.W = float(np.sum(w))

    def solve(self, C: float) -> tuple[float, float, float]:
        """(weighted sum of squares in ln P, A, B) for this C."""
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            z = -1.0 / (self.Tu + C)
            zbar = float(np.sum(self.w * z)) / self.W
            ybar = float(np.sum(self.w * self.yk)) / self.W
            dz, dy = z - zbar, self.yk - ybar
            szz = float(np.sum(self.w * dz * dz))
            szy = float(np.sum(self.w * dz * dy))
            syy = float(np.sum(self.w * dy * dy))
        if not (szz > 0 and math.isfinite(szz) and math.isfinite(szy)):
            return math.inf, math.nan, math.nan
        B = szy / szz
        return max(syy - szy * B, 0.0) * self.k ** 2, ybar - B * zbar, B


def _antoine_profile_C(eq: Antoine, T, y, w) -> tuple[float, float, float]:
    """(A, B, C) minimising the weighted sum of squares, C searched alone.

    C is searched as d = C + min(T_u) > 0 (the distance of the pole below the
    coldest weighted point, in the constants' temperature unit), in ln d,
    between 1e-6 of the temperature span and 1e3 times the temperature
    scale.  From a C already on the right side of the pole (the reweighting
    loop's previous solution) Brent's bounded method [1]_ searches a factor e
    either way, widening while the minimum sits on the edge; otherwise a log
    grid of 61 values picks the cell Brent then refines.

    References
    ----------
    .. [1] R. P. Brent, *Algorithms for Minimization without Derivatives*,
       Prentice-Hall (1973), ch. 5.
    """
    prof = _AntoineProfile(eq, T, y, w)
    Tu = prof.Tu[w > 0]
    t_min = float(np.min(Tu))
    span = max(1.0, float(np.ptp(Tu)))
    lo, hi = math.log(1e-6 * span), math.log(1e3 * max(span, abs(t_min)))

    def sse(t):
        return prof.solve(math.exp(t) - t_min)[0]

    def refine(a, b):
        r = optimize.minimize_scalar(sse, bounds=(a, b), method="bounded", options={"xatol": 1e-10})
        return float(r.x), float(r.fun)

    d_now = eq.C + t_min
    best_t = None
    if d_now > 0 and lo < math.log(d_now) < hi:
        a, b = max(lo, math.log(d_now) - 1.0), min(hi, math.log(d_now) + 1.0)
        for _ in range(12):
            t, f = refine(a, b)
            edge = min(t - a, b - t) < 1e-3 * (b - a)
            if not edge or (a <= lo and t - a < b - t) or (b >= hi and b - t < t - a):
                best_t = t if math.isfinite(f) else None
                break
            a, b = (max(lo, a - 2.0), t + 0.1) if t - a < b - t else (t - 0.1, min(hi, b + 2.0))
    if best_t is None:
        grid = np.linspace(lo, hi, 61)
        vals = np.array([sse(t) for t in grid])
        i = int(np.argmin(vals))
        t, f = refine(grid[max(i - 1, 0)], grid[min(i + 1, grid.size - 1)])
        best_t = t if f <= vals[i] else float(grid[i])
    C = math.exp(best_t) - t_min
    _, A, B = prof.solve(C)
    return A, B, C


def _solve(cls, template, T, y, w, current, design=None):
    """One weighted solve; returns (equation, unscaled covariance).

    ``design``, for a linear form, is its (design matrix, offset) at T, computed once per fit.
    """
    if cls.linear:
        X, offset = design if design is not None else (template.design_matrix(T), template.design_offset(T))
        b, cov = weighted_lstsq(X, y - offset, w)
        return cls.from_coefficients(b, **template.fixed_parameters()), cov
    # Antoine is linear in (A, B) once C is fixed: minimise the profiled weighted sum of
    # squares over C alone (variable projection), on the positive side of the pole.  A
    # one-dimensional search with a closed-form inner solve costs milliseconds where a
    # three-parameter trust-region solve near the pole took a tenth of a second per call.
    sol_x = np.array(_antoine_profile_C(current, T, y, w))
    if not np.all(np.isfinite(sol_x)):
        raise InsufficientData("the Antoine constants are not determined by the data")
    eq = current.with_params(sol_x)
    J = eq.jacobian_ln_p(T) * np.sqrt(w)[:, None]
    norms = np.linalg.norm(J, axis=0)
    norms[norms == 0] = 1.0
    _, s, Vt = np.linalg.svd(J / norms, full_matrices=False)
    cov = ((Vt.T / s ** 2) @ Vt) / np.outer(norms, norms)
    return eq, cov


def _sigma_lnP(eq, T, rel_uP, uT, given: bool, temperature_given: bool):
    """Each point's σ in ln P: u(P)/P and the curve's slope times u(T) (effective variance)."""
    if not given:
        return np.ones(T.size)
    if not temperature_given:
        return np.sqrt(rel_uP ** 2)  # the line below with u(T) = 0, to the last bit
    return np.sqrt(rel_uP ** 2 + (eq.dlnp_dT(T) * uT) ** 2)


def fit_equation(T, P, form, u_T=None, u_P=None, robust=True, *, point_weights=None,
                 max_iter: int = 200, **fixed) -> VaporPressureFit:
    """Fit a vapor-pressure equation to (T, P) data.

    Parameters
    ----------
    T : array_like
        Temperatures [K].
    P : array_like
        Pressures [Pa].
    form : type or str
        An equation class of :mod:`audit.thermo.equations` or its short name
        ('cc2', 'cc3', 'antoine', 'clarke-glew', 'wagner').
    u_T, u_P : float or array_like, optional
        Standard uncertainties [K], [Pa].  Without either, all points weigh
        equally in ln P and the residual scale is estimated.
    robust : bool or {'huber', 'tukey'}, optional
        Flag or name of the robust scheme.  True or 'tukey': Huber IRLS then Tukey biweight (outliers get weight
        0).  'huber': Huber only (every point keeps some weight).  False:
        plain weighted least squares.
    point_weights : array_like, optional
        Prior weights [-] in [0, 1] (0 excludes a point), multiplied into the
        robust weights.
    max_iter : int
        Iteration limit (a count) of the effective-variance / IRLS loop.
    **fixed
        Quantities held fixed: ``theta``, ``p_ref``, ``n_terms`` (Clarke-Glew),
        ``Tc``, ``Pc``, ``variant`` (Wagner), ``base``, ``P_unit``, ``T_unit``
        (Antoine).

    Returns
    -------
    VaporPressureFit
        Parameters in the units of the form's ``parameter_units``, T [K],
        P [Pa], residuals in ln P [ln Pa] and the fit statistics.

    Notes
    -----
    Verified against: statsmodels ``RLM`` with ``HuberT`` norm and MAD scale
    (robust='huber', no uncertainties: same parameters to 1e-6 relative) and
    ``WLS`` (robust=False with u_P only: same parameters and covariance), in
    ``tests/thermo/test_fitting_robust.py``.
    """
    cls = get_form(form)
    T, P = as_data(T, P)
    n = T.size
    uT = as_uncertainty(u_T, n, "u_T")
    uP = as_uncertainty(u_P, n, "u_P")
    given = u_T is not None or u_P is not None
    prior = np.ones(n) if point_weights is None else as_uncertainty(point_weights, n, "point_weights")
    if np.any(prior > 1):
        raise ValueError("point_weights must lie in [0, 1]")
    active = prior > 0
    fixed = _default_fixed(cls, T[active] if active.any() else T, fixed)
    k = _n_params(cls, fixed)
    n_T = distinct_temperatures(T[active])
    if active.sum() <= k or n_T < k:
        raise InsufficientData(f"{cls.__name__} has {k} parameters: needs more than {k} points at {k} or more "
                               f"distinct temperatures, got {int(active.sum())} points at {n_T}")
    if given and np.any((uP == 0) & (uT == 0) & active):
        raise ValueError("a point has zero uncertainty in both T and P")
    if robust is True:
        robust = "tukey"
    if robust not in (False, None, "huber", "tukey"):
        raise ValueError("robust must be True, False, 'huber' or 'tukey'")
    y = np.log(P)
    rel_uP = uP / P
    temperature_given = bool(np.any(uT > 0))

    if cls.linear:
        template = cls.from_coefficients(np.zeros(k), **fixed)
        design = (template.design_matrix(T), template.design_offset(T))
        eq, cov = _solve(cls, template, T, y, prior, None, design)
    else:
        template = design = None
        eq = _antoine_start(T, y, prior, fixed)
        eq, cov = _solve(cls, None, T, y, prior, eq)

    phase = "huber" if robust else None
    mad = 1.0
    robust_w = np.ones(n)
    w = prior.copy()
    converged = False
    it = 0
    prev_lnp = eq.ln_p(T)
    # Reweighting converges linearly, so the tolerance and the iteration budget decide
    # what a fit costs and, where convergence is slow, what it returns.  Tolerances are
    # set against the scatter of the first fit's residuals: a curve that moves by a
    # millionth of the scatter has converged for any statistic drawn from it.  Antoine's
    # one-dimensional search for C is itself only good to about 1e-8 in ln P (the sum
    # of squares is flat along C), so its fits stop at a ten-thousandth.  The Huber
    # phase that only starts the redescending one stops at a thousandth, or after
    # START_BUDGET steps: with many points clipped it can shrink its change by only
    # 3 % a step, and the Tukey phase then gets the whole budget of its own.
    scatter = float(np.median(np.abs(y[active] - prev_lnp[active]))) / _MAD_NORMAL
    if cls.linear:
        final_tolerance = min(max(1e-6 * scatter, 1e-13), 1e-9)
    else:
        final_tolerance = min(max(1e-4 * scatter, 1e-10), 1e-6)
    start_tolerance = max(1e-3 * scatter, final_tolerance)
    # each nonlinear (Antoine) solve is itself iterative: bound the outer loop so that
    # a data set the form cannot describe (e.g. P falling with T) ends in seconds
    budget = max_iter if cls.linear else min(max_iter, 40)
    starting = robust == "tukey"
    phase_it = 0
    while phase_it < budget:
        it += 1
        phase_it += 1
        sigma = _sigma_lnP(eq, T, rel_uP, uT, given, temperature_given)
        z = (y - prev_lnp) / sigma
        if phase is not None:
            # Studentize by leverage for the redescending phase: an end point of
            # a flexible curve pulls the curve towards itself, so its raw
            # residual understates how far off it is.  (The Huber phase uses
            # raw residuals, exactly as statsmodels' RLM does.)
            J = design[0] if cls.linear else eq.jacobian_ln_p(T)
            h = np.clip(w * np.einsum("ij,jk,ik->i", J, cov, J), 0.0, 0.99)
            z_stud = z / np.sqrt(1.0 - h)
        if phase == "huber":
            mad = _mad_scale(z, active)
            if mad > 0:
                robust_w = _robust_weights(z / mad, "huber")
        elif phase == "tukey" and mad > 0:
            robust_w = _robust_weights(z_stud / mad, "tukey")
            kept = active & (robust_w > 0)
            if kept.sum() <= k or distinct_temperatures(T[kept]) < k:
                robust_w = _robust_weights(z / mad, "huber")  # too few left: stay with Huber
        w = prior * robust_w / sigma ** 2
        eq, cov = _solve(cls, template, T, y, w, eq, design)
        lnp = eq.ln_p(T)
        change = float(np.max(np.abs(lnp - prev_lnp)))
        prev_lnp = lnp
        if starting:
            if change < start_tolerance or phase_it >= min(budget, START_BUDGET):
                # Hold the scale for the redescending phase at Qn of the Huber
                # residuals: as robust as the MAD but about twice as efficient,
                # so fewer good points are cut off by a scale that came out low.
                phase, starting, phase_it = "tukey", False, 0
                mad = _qn_scale(z_stud[active]) or mad
            continue
        if change < final_tolerance:
            converged = True
            break

    sigma = _sigma_lnP(eq, T, rel_uP, uT, given, temperature_given)
    resid = y - eq.ln_p(T)
    weights = prior * robust_w
    used = weights > 0
    n_used = int(used.sum())
    dof = n_used - k
    chi2 = float(np.sum(weights * (resid / sigma) ** 2))
    scale = math.sqrt(chi2 / dof) if dof > 0 else float("nan")
    covariance = cov * scale ** 2 if not given else cov
    se = np.sqrt(np.diag(covariance))
    rel = percent_from_log_ratio(resid[used])  # (P - Pfit)/Pfit; a gross error kept: inf
    rms = float(np.sqrt(np.mean(rel ** 2)))
    rss = max(chi2, 1e-300)
    m = n_used
    aic = m * math.log(rss / m) + 2 * (k + 1)
    aicc = aic + (2 * (k + 1) * (k + 2) / (m - k - 2) if m - k - 2 > 0 else math.inf)
    bic = m * math.log(rss / m) + (k + 1) * math.log(m)
    Tu = T[used]
    return VaporPressureFit(
        equation=eq, params=readonly(eq.params), parameter_names=tuple(eq.parameter_names),
        covariance=readonly(covariance), standard_errors=readonly(se), T=readonly(T), P=readonly(P),
        residuals_lnP=readonly(resid), sigma_lnP=readonly(sigma), weights=readonly(weights),
        scale=scale, scale_estimated=not given, n_used=n_used, dof=dof, chi2=chi2, rms_percent=rms,
        aicc=aicc, bic=bic, T_range=(float(Tu.min()), float(Tu.max())),
        T_ref=float(1.0 / np.mean(1.0 / Tu)), converged=converged, iterations=it,
        robust={None: "none", False: "none", "huber": "huber", "tukey": "huber+tukey"}[robust],
        uncertainties_given=given,
    )


# -- choice of equation ---------------------------------------------------------------
#: Candidate forms offered by :func:`select_equation`: name -> (form, fixed kwargs).
CANDIDATES: dict[str, tuple[type, dict]] = {
    "clausius-clapeyron-2": (ClausiusClapeyron2, {}),
    "clausius-clapeyron-3": (get_form("cc3"), {}),
    "antoine": (Antoine, {}),
    "clarke-glew-4": (ClarkeGlew, {"n_terms": 4}),
    "wagner-2.5-5": (Wagner, {"variant": "2.5-5"}),
    "wagner-3-6": (Wagner, {"variant": "3-6"}),
}

DEFAULT_CANDIDATES = ("clausius-clapeyron-2", "clausius-clapeyron-3", "antoine",
                      "clarke-glew-4", "wagner-2.5-5")


@dataclass(frozen=True)
class CandidateAssessment:
    """One candidate form in :func:`select_equation`."""

    name: str
    n_params: int
    fit: VaporPressureFit | None
    aicc: float
    bic: float
    admissible: bool
    reasons: tuple[str, ...] = ()
    dCp_ref: float = math.nan
    u_dCp_ref: float = math.nan


@dataclass(frozen=True)
class EquationChoice:
    """Result of :func:`select_equation`."""

    chosen: VaporPressureFit
    chosen_name: str
    candidates: tuple[CandidateAssessment, ...]
    reason: str
    point_weights: np.ndarray = field(repr=False, default=None)

    def candidate(self, name: str) -> CandidateAssessment:
        """The assessment of one candidate form.

        Parameters
        ----------
        name : str
            Name of the candidate, a key of :data:`CANDIDATES`.

        Returns
        -------
        CandidateAssessment
            Its fit, AICc and BIC [-] and reasons for rejection.

        Raises
        ------
        KeyError
            When `name` was not among the candidates assessed.
        """
        for c in self.candidates:
            if c.name == name:
                return c
        raise KeyError(name)

    def summary(self) -> str:
        """The chosen form and, per candidate, its AICc, BIC and verdict.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        lines = [f"chosen: {self.chosen_name} — {self.reason}"]
        for c in self.candidates:
            a = f"AICc {c.aicc:9.2f}  BIC {c.bic:9.2f}" if c.fit is not None else " " * 29
            lines.append(f"  {c.name:22s} k={c.n_params}  {a}  "
                         f"{'ok' if c.admissible else 'rejected'}"
                         + (f": {'; '.join(c.reasons)}" if c.reasons else ""))
        return "\n".join(lines)


def _direction_changes(values: np.ndarray) -> int:
    d = np.diff(values)
    tol = 1e-9 * np.max(np.abs(values))
    s = np.sign(d[np.abs(d) > tol])
    return int(np.sum(s[1:] != s[:-1])) if s.size > 1 else 0


def select_equation(T, P, u_T=None, u_P=None, candidates: Sequence[str] = DEFAULT_CANDIDATES,
                    Tc: float | None = None, Pc: float | None = None, *, branch: str = "liquid",
                    robust: bool = True, significance: float = 2.0,
                    max_params_per_point: float = 1.0 / 3.0) -> EquationChoice:
    """Choose a vapor-pressure equation by AICc among physically sane candidates.

    Parameters
    ----------
    T, P : array_like
        Temperatures [K] and pressures [Pa].
    u_T, u_P : float or array_like, optional
        Standard uncertainties [K], [Pa].
    candidates : sequence of str
        Names of candidates from :data:`CANDIDATES`.
    Tc, Pc : float, optional
        Critical constants [K], [Pa]; the Wagner forms are offered only with them.
    branch : {'liquid', 'solid', 'unknown'}
        Name of the condensed phase.  The ΔCp < 0 rule is applied to 'liquid' and
        'unknown': for solids ΔCp = Cp,gas - Cp,solid may be positive at low
        temperature (ice below about 240 K).  A branch of unknown phase may be
        a solid's, but without the rule a curve bends through two unrelated
        series (a series in °C under a kelvin header beside the rest) and
        passes for a sublimation.
    robust : bool
        Flag: screen gross errors with a robust Clausius-Clapeyron fit first; the
        resulting weights are used for all candidates so that their AICc
        values refer to the same points.
    significance : float
        Coverage factor [-] for "significantly positive ΔCp" (ΔCp - k u > 0).
    max_params_per_point : float
        Fraction [-]: candidates with more than this fraction of n parameters are not
        offered (at least 2 parameters always are).

    Returns
    -------
    EquationChoice
        The chosen fit (see :func:`fit_equation` for its units) and every
        candidate's AICc/BIC [-] and apparent ΔCp at T_ref [J/(mol K)].

    Notes
    -----
    A candidate is rejected when, over the fitted range, its apparent
    enthalpy -R d ln P/d(1/T) is ≤ 0 anywhere, changes direction more than
    once (oscillates), or (liquids) its apparent ΔCp at T_ref is positive
    beyond `significance` standard uncertainties.  Among the rest the lowest
    AICc wins; when every candidate is rejected the two-parameter
    Clausius-Clapeyron fit is returned and the reason says so.
    """
    T, P = as_data(T, P)
    n = T.size
    if branch not in ("liquid", "solid", "unknown"):
        raise ValueError("branch must be 'liquid', 'solid' or 'unknown'")
    names = list(candidates)
    for name in names:
        if name not in CANDIDATES:
            raise ValueError(f"unknown candidate {name!r}; known: {sorted(CANDIDATES)}")
    if "clausius-clapeyron-2" not in names:
        names.insert(0, "clausius-clapeyron-2")
    # replicates add points but not shape: the parameters are bounded by distinct temperatures
    n_T = distinct_temperatures(T)
    if n_T < 2:
        raise InsufficientData(f"{n} points at {n_T} temperature: no curve can be fitted")
    max_k = max(2, int(math.floor(n_T * max_params_per_point)))

    if robust:
        screen_form = "cc3" if max_k >= 3 and n_T >= 6 else "cc2"
        screen = fit_equation(T, P, screen_form, u_T, u_P, robust=True)
        pw = np.array(screen.weights)
    else:
        pw = np.ones(n)

    assessed: list[CandidateAssessment] = []
    for name in names:
        cls, extra = CANDIDATES[name]
        kw = dict(extra)
        k = _n_params(cls, _default_fixed(cls, T, kw) if cls is not Wagner else kw)
        reasons: list[str] = []
        if k > max_k:
            assessed.append(CandidateAssessment(name, k, None, math.inf, math.inf, False,
                                                (f"{k} parameters is too many for {n} points at {n_T} temperatures",)))
            continue
        if cls is Wagner:
            if Tc is None or Pc is None:
                assessed.append(CandidateAssessment(name, k, None, math.inf, math.inf, False,
                                                    ("needs Tc and Pc",)))
                continue
            kw.update(Tc=Tc, Pc=Pc)
        try:
            fit = fit_equation(T, P, cls, u_T, u_P, robust=False, point_weights=pw, **kw)
        except (ValueError, np.linalg.LinAlgError) as exc:
            assessed.append(CandidateAssessment(name, k, None, math.inf, math.inf, False,
                                                (f"fit failed: {exc}",)))
            continue
        grid = np.linspace(fit.T_range[0], fit.T_range[1], 201)
        dH = apparent_enthalpy(fit.equation, grid)
        if np.any(dH <= 0):
            reasons.append(f"implied ΔH ≤ 0 in range (minimum {dH.min() / 1000:.3g} kJ/mol)")
        nchg = _direction_changes(dH)
        if nchg > 1:
            reasons.append(f"implied ΔH(T) oscillates ({nchg} changes of direction in range)")
        cp = heat_capacity_change(fit, fit.T_ref)
        if branch != "solid" and cp.value - significance * cp.uncertainty > 0:
            reasons.append(f"implied ΔCp = {cp.value:.3g} ± {cp.uncertainty:.2g} J/(mol K) at "
                           f"{fit.T_ref:.5g} K is significantly positive (ΔCp < 0 for a liquid)")
        if not fit.converged:
            reasons.append("fit did not converge")
        assessed.append(CandidateAssessment(name, k, fit, fit.aicc, fit.bic, not reasons, tuple(reasons),
                                            float(cp.value), float(cp.uncertainty)))

    ok = [c for c in assessed if c.admissible]
    if ok:
        best = min(ok, key=lambda c: c.aicc)
        others = sorted((c for c in ok if c is not best), key=lambda c: c.aicc)
        reason = f"lowest AICc among {len(ok)} admissible candidate(s)"
        if others:
            reason += f" (next: {others[0].name}, ΔAICc = {others[0].aicc - best.aicc:.2f})"
    else:
        best = next(c for c in assessed if c.name == "clausius-clapeyron-2")
        if best.fit is None:
            raise ValueError("no candidate equation could be fitted")
        reason = "every candidate failed a physical check; falling back to the two-parameter form"
    rejected = [f"{c.name}: {'; '.join(c.reasons)}" for c in assessed if not c.admissible]
    if rejected:
        reason += ". Not chosen: " + " | ".join(rejected)
    return EquationChoice(chosen=best.fit, chosen_name=best.name, candidates=tuple(assessed),
                          reason=reason, point_weights=readonly(pw))
