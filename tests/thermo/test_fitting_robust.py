"""Robust, effective-variance fitting.

Sources: data generated from IAPWS-95 (``iapws`` package); statsmodels
``RLM`` (Huber's T norm, MAD scale) and ``WLS`` as independent
implementations of the same estimators.
"""

import numpy as np
import pytest
import statsmodels.api as sm

from audit.thermo import fit_equation
from tests.references import iapws_r10_06

from ._data import iapws_liquid, noisy

T20 = np.linspace(iapws_r10_06.T_TRIPLE, 373.15, 20)


@pytest.fixture(scope="module")
def clean_and_slipped():
    P = noisy(iapws_liquid(T20), 5e-4, seed=2)
    slipped = P.copy()
    slipped[12] *= 7.50062  # a kPa value entered as mmHg-like factor
    kw = dict(form="clarke-glew", n_terms=4, theta=320.0)
    return fit_equation(T20, P, **kw), fit_equation(T20, slipped, **kw)


def test_unit_slip_does_not_bend_the_curve(clean_and_slipped):
    clean, robust = clean_and_slipped
    # Within 3 standard errors of the clean fit, parameter by parameter.
    z = (robust.params - clean.params) / clean.standard_errors
    assert np.all(np.abs(z) < 3), z
    assert robust.weights[12] == 0.0
    assert robust.n_used == 19


def test_non_robust_fit_is_bent(clean_and_slipped):
    # Guard that the test above can fail: without robustness the slip moves
    # ΔH(θ) by far more than 3 standard errors.
    clean, _ = clean_and_slipped
    P = np.array(clean.P)
    P[12] *= 7.50062
    plain = fit_equation(T20, P, "clarke-glew", n_terms=4, theta=320.0, robust=False)
    assert abs(plain.params[1] - clean.params[1]) > 3 * clean.standard_errors[1]


def test_effective_variance_hand_computed():
    P = noisy(iapws_liquid(T20), 5e-4, seed=4)
    u_T, u_P = 0.05, 2e-4 * P
    fit = fit_equation(T20, P, "cc3", u_T=u_T, u_P=u_P, robust=False)
    i = 7
    # By hand with the IAPWS-95 slope (finite difference of the iapws
    # package): σ² = (u_P/P)² + (d ln P/dT · u_T)².  The fitted slope agrees
    # with the true one to ~0.1 %, so σ² to ~0.2 %.
    h = 1e-3
    slope = (np.log(iapws_liquid(T20[i] + h)[0]) - np.log(iapws_liquid(T20[i] - h)[0])) / (2 * h)
    sigma2 = (u_P[i] / P[i]) ** 2 + (slope * u_T) ** 2
    assert fit.sigma_lnP[i] ** 2 == pytest.approx(sigma2, rel=2e-3)
    assert not fit.scale_estimated


def test_huber_matches_statsmodels_rlm():
    P = noisy(iapws_liquid(T20), 2e-3, seed=6)
    P[5] *= 1.05
    ours = fit_equation(T20, P, "cc2", robust="huber")
    X = np.column_stack([np.ones_like(T20), 1 / T20])
    ref = sm.RLM(np.log(P), X, M=sm.robust.norms.HuberT()).fit(tol=1e-12, maxiter=500)
    # Same estimator and scale rule, different iteration: converged values
    # agree to the convergence tolerance (1e-6 relative is ample).
    np.testing.assert_allclose(ours.params, ref.params, rtol=1e-6)


def test_wls_matches_statsmodels():
    P = noisy(iapws_liquid(T20), 1e-3, seed=8)
    u_P = 1e-3 * P
    ours = fit_equation(T20, P, "cc3", u_P=u_P, robust=False)
    X = np.column_stack([np.ones_like(T20), 1 / T20, np.log(T20)])
    ref = sm.WLS(np.log(P), X, weights=1 / (u_P / P) ** 2).fit()
    np.testing.assert_allclose(ours.params, ref.params, rtol=1e-8)
    # With uncertainties given, our covariance is the unscaled (XᵀWX)⁻¹.
    np.testing.assert_allclose(ours.covariance, ref.normalized_cov_params, rtol=1e-6)


def test_no_uncertainties_scale_estimated():
    P = noisy(iapws_liquid(T20), 1e-3, seed=9)
    fit = fit_equation(T20, P, "cc3", robust=False)
    assert fit.scale_estimated
    # The residual sd of ln P estimates the 0.1 % noise; with 17 dof the
    # estimate has ~17 % relative sd: allow a factor 0.6-1.5.
    assert 6e-4 < fit.scale < 1.5e-3
    assert "scale estimated" in fit.summary()


@pytest.mark.parametrize("bad", [
    dict(T=[300, 310], P=[1, 2, 3]),
    dict(T=[300, -310, 320, 330], P=[1, 2, 3, 4]),
    dict(T=[300, 310, 320, 330], P=[1, 0, 3, 4]),
    dict(T=[300, 310, 320], P=[1, 2, 3], form="clarke-glew", n_terms=4),
    dict(T=[300, 310, 320, 330], P=[1, 2, 3, 4], form="wagner"),
])
def test_bad_input_raises_value_error(bad):
    kw = dict(form="cc2")
    kw.update(bad)
    with pytest.raises(ValueError):
        fit_equation(**kw)
