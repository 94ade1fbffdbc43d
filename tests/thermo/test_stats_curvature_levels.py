"""The curvature test with a level per source, against statsmodels WLS with indicator columns.

Data: water's saturation pressure from IAPWS-95 (Wagner & Pruss, J. Phys. Chem.
Ref. Data 31, 387 (2002), doi:10.1063/1.1461829) via the ``iapws`` package, three
synthetic series with invented labels, offsets and 0.3 % noise.  Reference
implementation: statsmodels ``WLS`` (``compare_f_test``, ``bse``), an
independent least-squares code.
"""

from __future__ import annotations

import numpy as np
import pytest
import statsmodels.api as sm

from audit.thermo.stats import curvature_test_with_levels
from tests.conftest import iapws_saturation_pressure

R = 8.314462618


def _three_series(seed=4, offsets=(0.0, 0.02, -0.015)):
    rng = np.random.default_rng(seed)
    T = np.concatenate([np.linspace(290, 330, 9), np.linspace(310, 350, 8), np.linspace(330, 370, 10)])
    g = ["A"] * 9 + ["B"] * 8 + ["C"] * 10
    off = np.array([dict(zip("ABC", offsets))[x] for x in g])
    y = np.log(iapws_saturation_pressure(T)) + off + rng.normal(0, 0.003, T.size)
    sig = np.full(T.size, 0.003)
    return T, y, sig, g


def test_matches_statsmodels_wls_with_one_indicator_per_source():
    T, y, sig, g = _three_series()
    res = curvature_test_with_levels(T, y, sig, g)
    dummies = np.column_stack([[x == k for x in g] for k in "ABC"]).astype(float)
    X2 = np.column_stack([dummies, 1 / T])
    X3 = np.column_stack([X2, np.log(T)])
    w = 1 / sig ** 2
    f2, f3 = sm.WLS(y, X2, weights=w).fit(), sm.WLS(y, X3, weights=w).fit()
    F, p, df = f3.compare_f_test(f2)
    assert res.statistic == pytest.approx(F, rel=1e-6)
    assert res.p_value == pytest.approx(p, rel=1e-6, abs=1e-300)
    assert res.df == (1, int(f3.df_resid))
    assert res.dCp == pytest.approx(R * f3.params[-1], rel=1e-6)
    assert res.u_dCp == pytest.approx(R * f3.bse[-1], rel=1e-6)


def test_source_offsets_do_not_bend_the_curve():
    # water's ΔH of vaporization falls from 43.91 kJ/mol at 300 K to 41.72 at 350 K (IAPWS-95,
    # computed with the iapws package), about -43 J/(mol K); the apparent ΔH of the vapor-pressure
    # curve follows it within the Δz correction, so the curvature's ΔCp is near that; offsets of
    # ±2 % between the series do not change it
    T, y, sig, g = _three_series(offsets=(0.0, 0.02, -0.02))
    res = curvature_test_with_levels(T, y, sig, g)
    assert res.dCp < 0
    assert abs(res.dCp - (-43.0)) < 3 * res.u_dCp + 10.0


def test_with_stated_uncertainties_the_chi2_difference_is_referred_to_chi2_1():
    # σ known: Δχ² = 2·(loglik₃ − loglik₂) of the weighted fits (statsmodels compare_lr_test,
    # whose likelihoods estimate the scale, gives the same statistic only up to that scale), so the
    # check is against the weighted residual sums of squares and bse without rescaling
    T, y, sig, g = _three_series(seed=6)
    res = curvature_test_with_levels(T, y, sig, g, scale_known=True)
    dummies = np.column_stack([[x == k for x in g] for k in "ABC"]).astype(float)
    X2 = np.column_stack([dummies, 1 / T])
    X3 = np.column_stack([X2, np.log(T)])
    w = 1 / sig ** 2
    f2, f3 = sm.WLS(y, X2, weights=w).fit(), sm.WLS(y, X3, weights=w).fit()
    d_chi2 = f2.ssr - f3.ssr  # WLS ssr is the weighted sum of squared residuals
    assert res.method == "chi2" and res.df == (1,)
    assert res.statistic == pytest.approx(d_chi2, rel=1e-6)
    from scipy.stats import chi2

    assert res.p_value == pytest.approx(chi2.sf(d_chi2, 1), rel=1e-6, abs=1e-300)
    assert res.u_dCp == pytest.approx(R * f3.bse[-1] / np.sqrt(f3.scale), rel=1e-6)
