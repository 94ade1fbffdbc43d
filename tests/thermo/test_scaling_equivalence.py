"""The O(n)/O(n k²)/O(chunk·n) versions of four statistics routines give the
numbers of an outside implementation or of the former dense scan.

References and tolerances:

* GLS with V = diag + J C Jᵀ: statsmodels ``GLS`` with the dense V (an
  independent implementation; Aitken 1935).  Both are double-precision
  linear algebra on a well-conditioned V, so 1e-9 relative.
* Siegel's repeated median: ``scipy.stats.siegelslopes(y, x,
  method="hierarchical")``, the routine the function used to wrap.  The same
  slopes, divided the same way, and the same medians: equality to the digit.
* ``enthalpy_steps`` and ``find_slope_break``: a copy, kept in this file, of
  the scan that refitted every split (O(n²)) and the routine's former
  implementation, on water data from IAPWS-95 / IAPWS R14-08 (iapws
  package), with and without a planted step, uncertainties and replicates.
  Relative 1e-9 (the brief's "same results beyond rounding").  The chosen
  split's step and slopes are also checked against statsmodels ``WLS``.

All data below are synthetic: IAPWS pressures with seeded relative noise.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from scipy import stats

from tests.conftest import iapws_saturation_pressure, iapws_sublimation_pressure
from tests.references import iapws_r10_06

sm = pytest.importorskip("statsmodels.api")


def _noisy(P, rel, rng):
    return P * (1.0 + rel * rng.standard_normal(P.size))


def _assert_same(reference, result, rel=1e-9, ignore=()):
    for f in dataclasses.fields(reference):
        if f.name in ignore:
            continue
        a, b = getattr(reference, f.name), getattr(result, f.name)
        if isinstance(a, np.ndarray):
            np.testing.assert_array_equal(a, b, err_msg=f.name)
        elif isinstance(a, (bool, int, np.integer)):
            assert a == b, f.name
        else:
            assert b == pytest.approx(a, rel=rel, abs=1e-300), f.name


# -- 1. GLS with a diagonal-plus-low-rank covariance ----------------------------------
def _gls_problem(n, rank, singular, seed):
    rng = np.random.default_rng(seed)
    T = np.linspace(280.0, 370.0, n)
    J = np.column_stack([np.ones(n), 1.0 / T, np.log(T)])[:, :rank] * rng.uniform(0.5, 2.0, rank)
    if singular:
        v = rng.normal(size=rank)
        C = 1e-6 * np.outer(v, v)  # rank one: no C⁻¹ exists
    else:
        A = rng.normal(size=(rank, rank))
        C = 1e-6 * A @ A.T
    var = rng.uniform(0.5, 2.0, n) * 1e-8
    x = -5000.0 / T ** 2  # a temperature-offset regressor: −d ln P/dT of a Clausius–Clapeyron line
    r = 2e-4 * x + rng.normal(0, 1e-4, n)
    return x, r, var, J, C


@pytest.mark.parametrize("n, rank, singular", [(60, 2, False), (400, 3, False), (300, 3, True)])
def test_low_rank_gls_matches_statsmodels_gls_with_the_dense_covariance(n, rank, singular):
    from audit.thermo.source_bias import LowRankCovariance, gls_one_parameter_low_rank

    x, r, var, J, C = _gls_problem(n, rank, singular, seed=n)
    V = np.diag(var) + J @ C @ J.T
    ref = sm.GLS(r, x[:, None], sigma=V).fit()
    got = gls_one_parameter_low_rank(x, r, LowRankCovariance(var, J, C))
    assert got.estimate == pytest.approx(ref.params[0], rel=1e-9)
    # statsmodels scales bse by the residual variance; (xᵀV⁻¹x)⁻¹ itself is normalized_cov_params
    assert got.standard_error == pytest.approx(math.sqrt(ref.normalized_cov_params[0, 0]), rel=1e-9)
    assert got.chi2 == pytest.approx(ref.ssr, rel=1e-9)
    assert got.n == n


def test_source_offsets_match_statsmodels_gls_for_a_source_of_iapws_water():
    # Three synthetic sources on IAPWS-95 saturation pressures; "B" reads 0.5 % high.
    from audit.thermo.fitting import fit_equation
    from audit.thermo.source_bias import source_offsets

    rng = np.random.default_rng(11)
    T = np.concatenate([np.linspace(280, 360, 150), np.linspace(285, 365, 120), np.linspace(290, 355, 90)])
    src = ["A"] * 150 + ["B"] * 120 + ["C"] * 90
    P = _noisy(iapws_saturation_pressure(T), 2e-4, rng)
    P[150:270] *= 1.005
    sig = np.full(T.size, 2e-4)
    res = source_offsets(T, P, sig, src, "cc3")
    b = res.get("B")
    others = np.r_[0:150, 270:360]
    # B's points within reach of the others' 280-360 K (widened by a quarter of the span) are all compared
    mine = np.arange(150, 270)
    assert b.n == mine.size
    fit = fit_equation(T[others], P[others], "cc3", u_P=P[others] * sig[others], robust=True)
    Ts = T[mine]
    r = np.log(P[mine]) - fit.equation.ln_p(Ts)
    J = fit.equation.jacobian_ln_p(Ts)
    V = np.diag(sig[mine] ** 2) + J @ (np.asarray(fit.covariance) * max(1.0, fit.scale) ** 2) @ J.T
    pres = sm.GLS(r, np.ones((Ts.size, 1)), sigma=V).fit()
    temp = sm.GLS(r, -fit.equation.dlnp_dT(Ts)[:, None], sigma=V).fit()
    assert b.offset_lnP == pytest.approx(pres.params[0], rel=1e-9)
    assert b.temperature_offset_K == pytest.approx(temp.params[0], rel=1e-9)
    assert b.chi2_pressure_scale == pytest.approx(pres.ssr, rel=1e-9)
    assert b.chi2_temperature_offset == pytest.approx(temp.ssr, rel=1e-9)
    infl = max(1.0, b.birge_ratio)
    assert b.u_offset_lnP == pytest.approx(math.sqrt(pres.normalized_cov_params[0, 0]) * infl, rel=1e-9)
    # the planted +0.5 % is found (log 1.005 = 0.004988), within 5 standard uncertainties
    assert abs(b.offset_lnP - math.log(1.005)) < 5 * b.u_offset_lnP


# -- 2. Siegel's repeated median in row blocks -----------------------------------------
@pytest.mark.parametrize("n, replicates, chunk", [(2, 1, None), (3, 1, 1), (250, 1, 7), (251, 2, 16),
                                                   (600, 3, None), (1201, 4, 100)])
def test_repeated_median_line_equals_scipy_siegelslopes_to_the_digit(n, replicates, chunk):
    from audit.thermo.stats import repeated_median_line

    rng = np.random.default_rng(n)
    T = np.repeat(np.linspace(275.0, 370.0, -(-n // replicates)), replicates)[:n]
    P = _noisy(iapws_saturation_pressure(T), 1e-4, rng)
    P[: n // 10] *= 1000.0  # a block of unit slips at one end
    x, y = 1.0 / T, np.log(P)
    ref = stats.siegelslopes(y, x, method="hierarchical")
    line = repeated_median_line(x, y, chunk_rows=chunk)
    assert line.slope == float(ref.slope)
    assert line.intercept == float(ref.intercept)
    np.testing.assert_array_equal(line.residuals, y - (float(ref.intercept) + float(ref.slope) * x))


def test_repeated_median_line_with_every_x_equal_is_level_and_finite():
    # No two points at distinct x: no slope is determined.  scipy returns an
    # uninitialised number there; the line is level through the median instead.
    from audit.thermo.stats import repeated_median_line

    line = repeated_median_line(np.full(5, 0.003), np.array([1.0, 2.0, 4.0, 8.0, 16.0]))
    assert line.slope == 0.0 and line.intercept == 4.0
    assert np.all(np.isfinite(line.residuals))


# -- 3. enthalpy_steps -----------------------------------------------------------------
def _former_split_positions(Ts, m):
    """Splits k (points 0..k-1 below) the former scans tried, in order: between two
    distinct temperatures, with at least m distinct temperatures on each side."""
    distinct_upto = np.cumsum(np.diff(Ts, prepend=-np.inf) > 0)
    n_T = int(distinct_upto[-1])
    for k in range(1, Ts.size):
        below = int(distinct_upto[k - 1])
        if Ts[k] == Ts[k - 1] or below < m or n_T - below < m:
            continue
        yield k


def _former_enthalpy_steps_scan(T, P, u_T=None, u_P=None, min_points_per_side=4):
    """Test-local copy of the former O(n²) enthalpy_steps: one weighted fit per split."""
    from audit.thermo.constants import R
    from audit.thermo.enthalpy import EnthalpyStep
    from audit.thermo.fitting import _as_data, _as_uncertainty, _weighted_lstsq, fit_equation

    T, P = _as_data(T, P)
    n = T.size
    m = int(min_points_per_side)
    order = np.argsort(T, kind="stable")
    Ts, y = T[order], np.log(P[order])
    given = u_T is not None or u_P is not None
    base = fit_equation(Ts, np.exp(y), "cc3", _as_uncertainty(u_T, n, "u_T")[order] if given else None,
                        _as_uncertainty(u_P, n, "u_P")[order] if given else None, robust=False)
    w = 1.0 / base.sigma_lnP ** 2
    X0 = base.equation.design_matrix(Ts)
    rss0 = base.chi2
    best = None
    tested = 0
    for k in _former_split_positions(Ts, m):
        inv_k = 0.5 * (1.0 / Ts[k - 1] + 1.0 / Ts[k])
        hinge = np.minimum(0.0, 1.0 / Ts - inv_k)
        X = np.column_stack([X0, hinge])
        b, cov = _weighted_lstsq(X, y, w)
        rss = float(np.sum(w * (y - X @ b) ** 2))
        tested += 1
        if best is None or rss < best[0]:
            best = (rss, k, inv_k, b, cov)
    rss1, k, inv_k, b, cov = best
    dof = n - X0.shape[1] - 1
    s2 = rss1 / dof
    F = max(rss0 - rss1, 0.0) / s2 if s2 > 0 else math.inf
    p = float(stats.f.sf(F, 1, dof))
    return EnthalpyStep(T_step=float(1.0 / inv_k), split=int(k), dH_step=float(-R * b[-1]),
                        u_dH_step=float(R * math.sqrt(cov[-1, -1] * s2)), F=float(F), p_value=p,
                        p_value_adjusted=min(1.0, p * tested), n_tested=tested)


def _water_table(n, replicates, rel, seed, step_K=None, step_size=0.0, lo=275.0, hi=370.0):
    """IAPWS-95 saturation pressures (synthetic noise); optionally ln P gets a hinge
    step_size·min(0, 1/T − 1/step_K), i.e. ΔH jumps by −R·step_size at step_K."""
    rng = np.random.default_rng(seed)
    T = np.repeat(np.sort(rng.uniform(lo, hi, -(-n // replicates))), replicates)[:n]
    P = iapws_saturation_pressure(T)
    if step_K is not None:
        P = P * np.exp(step_size * np.minimum(0.0, 1.0 / T - 1.0 / step_K))
    return T, _noisy(P, rel, rng)


@pytest.mark.parametrize("n, replicates, step, with_u", [
    (40, 1, False, False), (300, 1, False, True), (301, 3, False, False),
    (250, 1, True, False), (400, 2, True, True), (600, 1, True, False),
])
def test_enthalpy_steps_matches_the_former_scan_on_iapws_water(n, replicates, step, with_u):
    from audit.thermo.enthalpy import enthalpy_steps

    # a step of −R·(−120 K) ≈ +1.0 kJ/mol at 320 K, ~2 % of ΔH_vap (planted)
    T, P = _water_table(n, replicates, 1e-5, seed=n + replicates, step_K=320.0 if step else None,
                        step_size=-120.0)
    uT, uP = (np.full(n, 0.01), 1e-5 * P) if with_u else (None, None)
    ref = _former_enthalpy_steps_scan(T, P, uT, uP)
    got = enthalpy_steps(T, P, uT, uP)
    _assert_same(ref, got)
    if step:
        assert abs(got.T_step - 320.0) < 2.0
        assert got.dH_step == pytest.approx(120.0 * 8.314462618, rel=0.1)


def test_enthalpy_steps_chosen_hinge_matches_statsmodels_wls():
    from audit.thermo.constants import R
    from audit.thermo.enthalpy import enthalpy_steps

    T, P = _water_table(500, 1, 1e-5, seed=7, step_K=330.0, step_size=-150.0)
    uT, uP = np.full(T.size, 0.01), 1e-5 * P
    got = enthalpy_steps(T, P, uT, uP)
    Ts = np.sort(T)
    inv_k = 1.0 / got.T_step
    X = np.column_stack([np.ones(T.size), 1.0 / Ts, np.log(Ts), np.minimum(0.0, 1.0 / Ts - inv_k)])
    # weights as the routine's base fit sets them: effective variance with the cc3 slope
    from audit.thermo.fitting import fit_equation

    order = np.argsort(T, kind="stable")
    base = fit_equation(Ts, P[order], "cc3", uT[order], uP[order], robust=False)
    ref = sm.WLS(np.log(P[order]), X, weights=1.0 / base.sigma_lnP ** 2).fit()
    assert got.dH_step == pytest.approx(-R * ref.params[-1], rel=1e-7)


# -- 4. find_slope_break ---------------------------------------------------------------
def _former_slope_break_scan(T, P, min_points_per_side=4, u_T=None, u_P=None):
    """Test-local copy of the former O(n²) find_slope_break: both lines refitted per split."""
    from audit.thermo.constants import R
    from audit.thermo.fitting import _as_data, _as_uncertainty
    from audit.thermo.triple_point import SlopeBreak, _line

    T, P = _as_data(T, P)
    n = T.size
    m = int(min_points_per_side)
    order = np.argsort(T, kind="stable")
    Ts, x, y = T[order], 1.0 / T[order], np.log(P[order])
    if u_T is not None or u_P is not None:
        uT = _as_uncertainty(u_T, n, "u_T")[order]
        uP = _as_uncertainty(u_P, n, "u_P")[order]
        _, b_all, _ = _line(x, y, np.ones(n))
        w = 1.0 / ((uP / P[order]) ** 2 + (-b_all / Ts ** 2 * uT) ** 2)
    else:
        w = np.ones(n)
    rss1 = _line(x, y, w)[2]
    best = None
    tested = 0
    for k in _former_split_positions(Ts, m):
        a1, b1, r1 = _line(x[:k], y[:k], w[:k])
        a2, b2, r2 = _line(x[k:], y[k:], w[k:])
        tested += 1
        if best is None or r1 + r2 < best[0]:
            best = (r1 + r2, k, a1, b1, a2, b2)
    rss2, k, a1, b1, a2, b2 = best
    dof = n - 4
    F = ((rss1 - rss2) / 2) / (rss2 / dof) if rss2 > 0 else math.inf
    p = float(stats.f.sf(F, 2, dof))
    x_lo, x_hi = x[k], x[k - 1]
    x_cross = (a2 - a1) / (b1 - b2) if b1 != b2 else math.nan
    x_break = x_cross if (math.isfinite(x_cross) and x_lo <= x_cross <= x_hi) else 0.5 * (x_lo + x_hi)
    return SlopeBreak(T_break=float(1.0 / x_break), split=int(k), order=order, F=float(F), p_value=p,
                      p_value_adjusted=min(1.0, p * tested), slope_low=float(b1), slope_high=float(b2),
                      dH_low=float(-R * b1), dH_high=float(-R * b2),
                      solid_side_steeper=bool(abs(b1) > abs(b2)), n_tested=tested)


def _ice_and_liquid(n, replicates, rel, seed):
    """Ice Ih sublimation (IAPWS R14-08) below 273.16 K, liquid (IAPWS-95) above."""
    rng = np.random.default_rng(seed)
    T = np.repeat(np.sort(rng.uniform(250.0, 300.0, -(-n // replicates))), replicates)[:n]
    ice = T < iapws_r10_06.T_TRIPLE
    P = np.empty(n)
    P[ice] = iapws_sublimation_pressure(T[ice])
    P[~ice] = iapws_saturation_pressure(T[~ice])
    return T, _noisy(P, rel, rng)


@pytest.mark.parametrize("kind, n, replicates, with_u", [
    ("ice+liquid", 60, 1, False), ("ice+liquid", 400, 1, True), ("ice+liquid", 401, 3, False),
    ("liquid", 300, 1, False), ("liquid", 350, 2, True),
])
def test_find_slope_break_matches_the_former_scan_on_iapws_water(kind, n, replicates, with_u):
    from audit.thermo.triple_point import find_slope_break

    if kind == "ice+liquid":
        T, P = _ice_and_liquid(n, replicates, 1e-4, seed=n)
    else:
        T, P = _water_table(n, replicates, 1e-4, seed=n)
    uT, uP = (np.full(n, 0.02), 1e-4 * P) if with_u else (None, None)
    ref = _former_slope_break_scan(T, P, 4, uT, uP)
    got = find_slope_break(T, P, 4, uT, uP)
    # the former scan chose the split only; the gap between the lines is measured at the split chosen
    _assert_same(ref, got, ignore=("gap_lnP", "u_gap_lnP"))
    if kind == "ice+liquid":
        # IAPWS: triple point 273.16 K; the break lies between the neighbouring points, where
        # solid and liquid pressures are equal: straight lines through the two curved branches
        # meet there to within 1 % (a level jump of another compound is tens of percent or more)
        assert got.T_break == pytest.approx(iapws_r10_06.T_TRIPLE, abs=1.0)
        assert got.solid_side_steeper
        assert abs(got.gap_lnP) < 0.01


def test_find_slope_break_side_slopes_match_statsmodels_wls():
    from audit.thermo.triple_point import find_slope_break

    T, P = _ice_and_liquid(300, 1, 1e-4, seed=5)
    got = find_slope_break(T, P, 4)
    Ts = T[got.order]
    x, y, k = 1.0 / Ts, np.log(P[got.order]), got.split
    low = sm.WLS(y[:k], sm.add_constant(x[:k]), weights=np.ones(k)).fit()
    high = sm.WLS(y[k:], sm.add_constant(x[k:]), weights=np.ones(Ts.size - k)).fit()
    assert got.slope_low == pytest.approx(low.params[1], rel=1e-9)
    assert got.slope_high == pytest.approx(high.params[1], rel=1e-9)
    rss1 = sm.OLS(y, sm.add_constant(x)).fit().ssr
    rss2 = low.ssr + high.ssr
    assert got.F == pytest.approx(((rss1 - rss2) / 2) / (rss2 / (Ts.size - 4)), rel=1e-8)
