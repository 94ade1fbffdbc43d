"""Influence diagnostics of a weighted (linearised) least-squares fit.

For a fit of y ≈ f(x; β) with weights w_i = 1/σ_i² (times any robust or
prior weight), linearised at the solution with Jacobian J = ∂f/∂β, the
whitened design is X = √W J and the hat matrix H = X (XᵀX)⁻¹ Xᵀ.  With
e_i = √w_i r_i the whitened residuals, n the points with w > 0 and p the
parameters:

* leverage            h_i = H_ii
* scale               s² = Σ e_i² / (n − p)
* internally studentized  e_i / (s √(1 − h_i))
* leave-one-out scale     s_(i)² = ((n − p) s² − e_i²/(1 − h_i)) / (n − p − 1)
* externally studentized  t_i = e_i / (s_(i) √(1 − h_i))   (t with n − p − 1 dof)
* Cook's distance     D_i = e_i² h_i / (p s² (1 − h_i)²)
* deletion residual   r_(i) = r_i / (1 − h_i): the point's residual against
  the fit made without it.

Points outside the fit (weight 0) get the prediction form: their residual is
already out-of-sample, h*_i = σ_i⁻² J_i (XᵀX)⁻¹ J_iᵀ, and the standardized
prediction residual is r_i / (σ_i s √(1 + h*_i)).

A wrong point at the end of the range pulls the curve towards itself (high
leverage, small raw residual); the deletion residual and t_i undo that.

References
----------
.. [1] R. D. Cook, "Detection of influential observation in linear
   regression", Technometrics 19, 15 (1977), doi:10.1080/00401706.1977.10489493.
.. [2] D. A. Belsley, E. Kuh, R. E. Welsch, *Regression Diagnostics*
   (Wiley, 1980), doi:10.1002/0471725153, ch. 2.
.. [3] R. D. Cook and S. Weisberg, *Residuals and Influence in Regression*
   (Chapman & Hall, 1982), §2.2 (studentized residuals).

Verified against statsmodels ``OLSInfluence`` (on the whitened problem) and
``GLM(...).get_influence()`` with ``var_weights`` in
``tests/thermo/test_influence_statsmodels.py``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .data import readonly

__all__ = ["Influence", "GroupDeletion", "influence_measures", "group_deletion", "fit_influence"]


@dataclass(frozen=True)
class Influence:
    """Result of :func:`influence_measures`.

    Attributes
    ----------
    leverage : ndarray
        h_i [-] for points in the fit; h*_i (prediction leverage) for points
        with weight 0.
    in_fit : ndarray of bool
        Points with weight > 0.
    scale : float
        s = √(Σ e²/(n − p)) [-] (the Birge ratio when σ are absolute).
    scale_loo : ndarray
        s_(i) [-], the scale without point i (equal to `scale` for points outside).
    standardized : ndarray
        Internally studentized residuals e_i/(s √(1 − h_i)) [-]; prediction form
        for points outside the fit.
    studentized : ndarray
        Externally studentized residuals t_i [-]; prediction form
        r_i/(σ_i s √(1 + h*_i)) for points outside.
    studentized_known_scale : ndarray
        The same with the scale taken as 1 [-] (σ_i are absolute standard
        uncertainties): r_i/(σ_i √(1 − h_i)) or r_i/(σ_i √(1 + h*_i)).
    deletion_residuals : ndarray
        r_i/(1 − h_i) for points in the fit, r_i for points outside [y unit].
    cooks_distance : ndarray
        D_i [-] (0 for points outside the fit).
    n, p, dof : int
        Points in the fit, parameters, n − p (counts).
    """

    leverage: np.ndarray
    in_fit: np.ndarray
    scale: float
    scale_loo: np.ndarray
    standardized: np.ndarray
    studentized: np.ndarray
    studentized_known_scale: np.ndarray
    deletion_residuals: np.ndarray
    cooks_distance: np.ndarray
    n: int
    p: int
    dof: int

    def summary(self) -> str:
        """The largest studentized residual, Cook's distance and leverage.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        i = int(np.argmax(np.abs(np.where(np.isfinite(self.studentized), self.studentized, 0))))
        j = int(np.argmax(self.cooks_distance))
        return (f"{self.n} points in fit, {self.p} parameters, s = {self.scale:.4g}; "
                f"largest |t| = {abs(self.studentized[i]):.3g} (index {i}); "
                f"largest Cook's D = {self.cooks_distance[j]:.3g} (index {j}); "
                f"max leverage {np.max(self.leverage[self.in_fit]) if self.n else math.nan:.3g}")


def influence_measures(jacobian, residuals, sigma=None, weights=None) -> Influence:
    """Leverage, studentized residuals and Cook's distance of a weighted fit.

    Parameters
    ----------
    jacobian : array_like, shape (n, p)
        ∂f/∂β at the solution (the design matrix of a linear model)
        [unit of the residuals per unit of each parameter].
    residuals : array_like, shape (n,)
        y − f(x; β̂) [y unit].
    sigma : array_like, optional
        Standard uncertainty of each y [y unit]; default 1.
    weights : array_like, optional
        Extra weights [-] in [0, 1] (robust or prior); 0 leaves a point out of the
        fit.  The fit weight is weights/σ².

    Returns
    -------
    Influence
        Leverage, residuals and influence of each point (no unit; the units of
        its fields are in the docstring of :class:`Influence`).

    Raises
    ------
    ValueError
        Mismatched shapes, fewer points in the fit than parameters, or a
        singular design.

    Notes
    -----
    Verified against statsmodels ``OLSInfluence`` on the whitened problem
    (leverage, both studentized residuals, Cook's distance to 1e-9) and
    ``GLMInfluence`` with ``var_weights``.
    """
    J = np.atleast_2d(np.asarray(jacobian, dtype=float))
    r = np.asarray(residuals, dtype=float).ravel()
    n_all, p = J.shape
    if r.size != n_all:
        raise ValueError(f"residuals has {r.size} values for a {n_all}-row Jacobian")
    s_i = np.ones(n_all) if sigma is None else np.broadcast_to(np.asarray(sigma, float), (n_all,)).copy()
    extra = np.ones(n_all) if weights is None else np.broadcast_to(np.asarray(weights, float), (n_all,)).copy()
    if np.any(~np.isfinite(s_i)) or np.any(s_i <= 0):
        raise ValueError("sigma must be finite and positive")
    if np.any(extra < 0):
        raise ValueError("weights must be non-negative")
    w = extra / s_i ** 2
    inside = w > 0
    n = int(inside.sum())
    if n <= p:
        raise ValueError(f"{n} points in the fit for {p} parameters")
    X = J * np.sqrt(w)[:, None]
    e = r * np.sqrt(w)
    # QR of the whitened design: h_i = |Q_i|², stable when columns differ in scale
    Q, Rm = np.linalg.qr(X[inside])
    if np.min(np.abs(np.diag(Rm))) <= 1e-13 * np.max(np.abs(np.diag(Rm))):
        raise ValueError("the design is singular (parameters not determined by the data)")
    Rinv = np.linalg.inv(Rm)
    h = np.zeros(n_all)
    h[inside] = np.sum(Q ** 2, axis=1)
    # prediction leverage of points outside, with their own σ: J (XᵀX)⁻¹ Jᵀ / σ²
    A = (J / s_i[:, None]) @ Rinv
    h_out = np.sum(A ** 2, axis=1)
    h = np.where(inside, np.clip(h, 0.0, 1.0 - 1e-12), h_out)

    dof = n - p
    ss = float(np.sum(e[inside] ** 2))
    s2 = ss / dof
    s = math.sqrt(s2)
    one_minus = np.where(inside, 1.0 - h, 1.0)
    if dof > 1:
        s2_loo = (ss - e ** 2 / one_minus) / (dof - 1)
        s2_loo = np.where(inside, np.maximum(s2_loo, 1e-300), s2)
    else:
        s2_loo = np.full(n_all, math.nan)
    s_loo = np.sqrt(s2_loo)
    e_full = r / s_i  # whitened without the extra weights, for points outside
    with np.errstate(divide="ignore", invalid="ignore"):
        standardized = np.where(inside, e / (s * np.sqrt(one_minus)), e_full / (s * np.sqrt(1.0 + h_out)))
        studentized = np.where(inside, e / (s_loo * np.sqrt(one_minus)),
                               e_full / (s * np.sqrt(1.0 + h_out)))
        known = np.where(inside, e / np.sqrt(one_minus), e_full / np.sqrt(1.0 + h_out))
        cooks = np.where(inside, e ** 2 * h / (p * s2 * one_minus ** 2), 0.0)
    deletion = np.where(inside, r / one_minus, r)
    return Influence(leverage=readonly(h), in_fit=np.array(inside), scale=s, scale_loo=readonly(s_loo),
                     standardized=readonly(standardized), studentized=readonly(studentized),
                     studentized_known_scale=readonly(known), deletion_residuals=readonly(deletion),
                     cooks_distance=readonly(cooks), n=n, p=p, dof=dof)


@dataclass(frozen=True)
class GroupDeletion:
    """Result of :func:`group_deletion`.

    Attributes
    ----------
    residuals : ndarray
        Residuals of the group's points against the fit made without the
        group's points [y unit].
    curve_variance : ndarray
        Variance of that fit's prediction at each of the group's points,
        J_i (XᵀX − X_GᵀX_G)⁻¹ J_iᵀ, with σ taken as absolute [y unit²].
    """

    residuals: np.ndarray
    curve_variance: np.ndarray


def group_deletion(jacobian, residuals, sigma, weights, group) -> GroupDeletion | None:
    """Residuals of a group of points against the fit made without them.

    The multi-point form of the deletion residual: with H̃_GG = J_G A⁻¹ J_Gᵀ W_G
    (A = JᵀWJ over the fit), deleting the group's fitted points changes the
    parameters by δβ = −A⁻¹ J_Gᵀ W_G (I − H̃_GG)⁻¹ r_G = −A₋⁻¹ J_Gᵀ W_G r_G
    (A₋ = A − J_Gᵀ W_G J_G, the kept points' normal matrix), so every point i
    of the group has r_i(−G) = r_i + J_i A₋⁻¹ J_Gᵀ W_G r_G.  Exact for a
    linear model, first order for a nonlinear one linearised at the solution.
    Used to judge a whole source against the curve of the others without a
    refit per source.

    Parameters
    ----------
    jacobian, residuals, sigma, weights
        As for :func:`influence_measures` (units there: residuals and
        sigma [ln Pa] for a vapor-pressure fit, weights [-]).
    group : array_like of bool, shape (n,)
        Flag per point [-]: the points to delete.  Members outside the fit (weight 0) move with
        the parameters but do not change them.

    Returns
    -------
    GroupDeletion or None
        The change of the fit when the group is left out (no unit; the units
        of its fields are in the docstring of :class:`GroupDeletion`).  None
        when the fit without the group is not determined (too few points
        left, or a singular design).

    References
    ----------
    R. D. Cook and S. Weisberg, *Residuals and Influence in Regression*
    (Chapman & Hall, 1982), §3.6 (deleting several cases at once).

    Verified against refits of a straight line and of a three-constant
    Clausius–Clapeyron form without the group, in
    ``tests/thermo/test_influence_statsmodels.py``.
    """
    J = np.atleast_2d(np.asarray(jacobian, dtype=float))
    r = np.asarray(residuals, dtype=float).ravel()
    s_i = np.broadcast_to(np.asarray(sigma, float), r.shape)
    w = np.broadcast_to(np.asarray(weights, float), r.shape) / s_i ** 2
    g = np.asarray(group, bool)
    p = J.shape[1]
    keep = (w > 0) & ~g
    if keep.sum() <= p:
        return None
    A_minus = (J[keep] * w[keep, None]).T @ J[keep]
    # refitting without the group solves the kept points' normal equations, A₋ δ = J_Gᵀ W_G r_G
    # (the push-through identity turns the textbook n_G × n_G form into this p × p one: the
    # former cost O(n_G³), minutes for a source of 5 000 rows)
    fitted = g & (w > 0)
    Jg = J[fitted]
    try:
        delta = np.linalg.solve(A_minus, Jg.T @ (w[fitted] * r[fitted])) if fitted.any() else np.zeros(p)
    except np.linalg.LinAlgError:
        return None
    Jall = J[g]
    # J_i (XᵀX)⁻¹ J_iᵀ as the squared norm of R⁻ᵀ J_iᵀ (X = QR, the weighted Jacobian of the
    # kept points): never negative, where the explicit inverse of an ill-conditioned XᵀX can
    # give a slightly negative "variance" (a one-digit source beside a 0.01 % one)
    R = np.linalg.qr(J[keep] * np.sqrt(w[keep])[:, None], mode="r")
    # a kept set that does not determine the parameters has a zero on R's diagonal: no fit
    # without the group exists (the solve raises, or the variance comes out infinite)
    try:
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            Z = _solve_upper_transposed(R, Jall.T)
            curve_variance = np.sum(Z ** 2, axis=0)
    except np.linalg.LinAlgError:
        return None
    if not np.all(np.isfinite(curve_variance)):
        return None
    return GroupDeletion(residuals=readonly(r[g] + Jall @ delta), curve_variance=readonly(curve_variance))


def _solve_upper_transposed(R, B):
    """X with Rᵀ X = B for an upper-triangular R (forward substitution)."""
    from scipy.linalg import solve_triangular

    return solve_triangular(R, B, trans="T", lower=False, check_finite=False)


def fit_influence(fit) -> Influence:
    """Influence measures of a :class:`~audit.thermo.fitting.VaporPressureFit`.

    The fit is linearised at its solution in ln P (exact for the linear forms);
    the fit's final weights (robust and prior) decide which points are in it.

    Parameters
    ----------
    fit : VaporPressureFit
        The fit (an object, no unit).

    Returns
    -------
    Influence
        Leverages [-], residual scales [ln Pa] and studentized residuals and
        Cook's distances [-], per point.
    """
    J = fit.equation.jacobian_ln_p(fit.T)
    return influence_measures(J, fit.residuals_lnP, fit.sigma_lnP, fit.weights)
