"""Influence measures checked against statsmodels (an independent implementation).

statsmodels' ``OLSInfluence`` on the whitened problem (√w·X, √w·y) is the
textbook weighted case (Cook 1977; Belsley, Kuh & Welsch 1980); ``GLM`` with a
Gaussian family and ``var_weights`` is a second, separately coded route.
Tolerances: both sides are closed-form linear algebra in double precision, so
agreement to 1e-8 relative is expected; anything looser would hide a formula
error.
"""

import numpy as np
import pytest

from audit.thermo.influence import fit_influence, influence_measures

sm = pytest.importorskip("statsmodels.api")
from statsmodels.stats.outliers_influence import OLSInfluence  # noqa: E402


def _problem(seed=3, n=25):
    rng = np.random.default_rng(seed)
    T = np.linspace(280.0, 370.0, n)
    X = np.column_stack([np.ones(n), 1.0 / T, np.log(T)])
    sigma = rng.uniform(0.002, 0.02, n)
    y = X @ np.array([70.0, -7000.0, -5.0]) + rng.normal(0, sigma)
    y[n - 1] += 0.2  # a gross error at the end of the range: high leverage
    return X, y, sigma


def test_weighted_fit_matches_statsmodels_olsinfluence_on_whitened_problem():
    X, y, sigma = _problem()
    w = 1 / sigma ** 2
    res = sm.OLS(y * np.sqrt(w), X * np.sqrt(w)[:, None]).fit()
    ref = OLSInfluence(res)
    r = y - X @ res.params
    inf = influence_measures(X, r, sigma)
    np.testing.assert_allclose(inf.leverage, ref.hat_matrix_diag, rtol=1e-8)
    np.testing.assert_allclose(inf.standardized, ref.resid_studentized_internal, rtol=1e-8)
    np.testing.assert_allclose(inf.studentized, ref.resid_studentized_external, rtol=1e-8)
    np.testing.assert_allclose(inf.cooks_distance, ref.cooks_distance[0], rtol=1e-8)
    # the planted end point stands out in the leave-one-out statistic
    assert np.argmax(np.abs(inf.studentized)) == len(y) - 1


def test_weighted_fit_matches_statsmodels_glm_influence():
    X, y, sigma = _problem(seed=11)
    w = 1 / sigma ** 2
    res = sm.GLM(y, X, family=sm.families.Gaussian(), var_weights=w).fit()
    ref = res.get_influence()
    inf = influence_measures(X, y - X @ res.params, sigma)
    np.testing.assert_allclose(inf.leverage, ref.hat_matrix_diag, rtol=1e-8)
    np.testing.assert_allclose(inf.cooks_distance, ref.cooks_distance[0], rtol=1e-8)
    np.testing.assert_allclose(inf.standardized, ref.resid_studentized, rtol=1e-8)


def test_point_left_out_gets_prediction_residual_equal_to_deletion_residual():
    # A point with weight 0 is scored by prediction from the others; for a point in
    # the fit, r_i/(1 - h_i) must equal the residual of the fit made without it.
    X, y, sigma = _problem(seed=5)
    w = 1 / sigma ** 2
    i = 7
    full = sm.WLS(y, X, weights=w).fit()
    inf_full = influence_measures(X, y - X @ full.params, sigma)
    keep = np.ones(len(y), bool)
    keep[i] = False
    loo = sm.WLS(y[keep], X[keep], weights=w[keep]).fit()
    r_loo = y[i] - X[i] @ loo.params
    assert inf_full.deletion_residuals[i] == pytest.approx(r_loo, rel=1e-8)
    inf_out = influence_measures(X, y - X @ loo.params, sigma, weights=keep.astype(float))
    assert inf_out.deletion_residuals[i] == pytest.approx(r_loo, rel=1e-12)
    # known-scale prediction z: r/(σ√(1+h*)) with h* = σ⁻² x (XᵀWX)⁻¹ xᵀ (statsmodels' cov)
    h_star = X[i] @ loo.normalized_cov_params @ X[i] / sigma[i] ** 2
    assert inf_out.studentized_known_scale[i] == pytest.approx(r_loo / (sigma[i] * np.sqrt(1 + h_star)), rel=1e-8)


def test_fit_influence_of_a_vapor_pressure_fit_matches_statsmodels():
    # Water, IAPWS-95 auxiliary equation via the iapws package, 0.1 % noise.
    from audit.thermo.fitting import fit_equation
    from tests.conftest import iapws_saturation_pressure

    rng = np.random.default_rng(21)
    T = np.linspace(290.0, 360.0, 15)
    P = iapws_saturation_pressure(T) * np.exp(rng.normal(0, 1e-3, T.size))
    fit = fit_equation(T, P, "cc3", robust=False)
    inf = fit_influence(fit)
    X = fit.equation.jacobian_ln_p(T)
    ref = OLSInfluence(sm.OLS(np.log(P), X).fit())
    np.testing.assert_allclose(inf.studentized, ref.resid_studentized_external, rtol=1e-6)
    np.testing.assert_allclose(inf.cooks_distance, ref.cooks_distance[0], rtol=1e-6)


def test_bad_input_raises_value_error():
    with pytest.raises(ValueError):
        influence_measures(np.ones((3, 3)), np.zeros(3))
    with pytest.raises(ValueError):
        influence_measures(np.ones((5, 2)), np.zeros(4))


@pytest.mark.parametrize("columns", [2, 3])
def test_group_deletion_equals_a_weighted_refit_without_the_group(columns):
    # reference: statsmodels WLS refitted without the group's points; the group holds fitted
    # points and one point already outside the fit (weight 0), which must move with the curve.
    # Tolerance 1e-8 relative to the residuals' size: closed-form linear algebra both sides.
    from audit.thermo.influence import group_deletion

    X, y, sigma = _problem(seed=11)
    X = X[:, :columns]
    weights = np.ones(y.size)
    weights[5] = 0.0
    w = weights / sigma ** 2
    full = sm.WLS(y, X, weights=w).fit()
    group = np.zeros(y.size, bool)
    group[[3, 5, 17, 24]] = True
    keep = ~group & (weights > 0)
    refit = sm.WLS(y[keep], X[keep], weights=w[keep]).fit()
    got = group_deletion(X, full.resid, sigma, weights, group)
    expected = y[group] - X[group] @ refit.params
    assert np.allclose(got.residuals, expected, rtol=0, atol=1e-8 * np.max(np.abs(expected)))
    # prediction variance of the refit at the group's points (σ absolute, no rescaling)
    cov = np.linalg.inv((X[keep] * w[keep, None]).T @ X[keep])
    assert np.allclose(got.curve_variance, np.einsum("ij,jk,ik->i", X[group], cov, X[group]), rtol=1e-8)


def test_group_deletion_reports_an_undetermined_refit_as_none():
    from audit.thermo.influence import group_deletion

    X, y, sigma = _problem(n=5)
    group = np.array([True, True, True, False, False])
    assert group_deletion(X, y, sigma, np.ones(5), group) is None  # 2 points left for 3 parameters
