"""Runs test and Durbin-Watson against statsmodels; local enthalpy and steps.

Sources: statsmodels ``runstest_1samp`` and ``durbin_watson`` (independent
implementations of Wald & Wolfowitz 1940 and Durbin & Watson 1950);
IAPWS-95 and IAPWS R14 data via the ``iapws`` package; ΔH_fus(Tt) = 6.007
kJ/mol (IAPWS).
"""

import numpy as np
import pytest
from statsmodels.sandbox.stats.runs import runstest_1samp
from statsmodels.stats.stattools import durbin_watson

from audit.thermo import enthalpy_steps, local_enthalpy, residual_runs
from audit.thermo.stats import grouped_residual_runs

from ._data import iapws_ice, iapws_liquid, noisy

from ..references.iapws95_enthalpy import DH_FUS_TT
from ..references.iapws_r10_06 import T_TRIPLE


def test_runs_vs_statsmodels():
    r = np.random.default_rng(3).standard_normal(40)
    ours = residual_runs(r)
    z, p = runstest_1samp(r, cutoff=0, correction=False)
    assert ours.z == pytest.approx(z, rel=1e-12)
    assert ours.p_value == pytest.approx(p, rel=1e-12)
    assert ours.durbin_watson == pytest.approx(durbin_watson(r), rel=1e-12)


def test_longest_run_location():
    r = np.array([1, -1, 1, 1, 1, 1, -1, 1, -1.0])
    res = residual_runs(r)
    assert (res.longest_run, res.longest_run_start, res.longest_run_stop) == (4, 2, 6)
    assert res.runs == 6


def test_grouped_runs_with_one_group_is_the_plain_test():
    r = np.random.default_rng(5).standard_normal(30)
    assert grouped_residual_runs(r, ["A"] * 30) == residual_runs(r)


def test_grouped_runs_sum_the_groups_counts_and_moments():
    # four sources, each over its own stretch of temperature, each a little off the curve;
    # statsmodels gives each group's z, from which its runs count follows
    rng = np.random.default_rng(8)
    groups = [g for g in "ABCD" for _ in range(12)]
    offsets = {"A": 0.6, "B": -0.6, "C": 0.6, "D": -0.6}
    r = rng.normal(0.0, 1.0, 48) + np.array([offsets[g] for g in groups])
    pooled = grouped_residual_runs(r, groups)
    runs = mu = var = 0.0
    for g in "ABCD":
        part = r[[k for k in range(48) if groups[k] == g]]
        n_pos, n_neg = int(np.sum(part > 0)), int(np.sum(part < 0))
        n = n_pos + n_neg
        m = 2.0 * n_pos * n_neg / n + 1  # Wald & Wolfowitz (1940)
        v = 2.0 * n_pos * n_neg * (2.0 * n_pos * n_neg - n) / (n * n * (n - 1))
        z, _ = runstest_1samp(part, cutoff=0, correction=False)
        runs += m + z * np.sqrt(v)
        mu, var = mu + m, var + v
    assert pooled.runs == pytest.approx(runs, abs=1e-9)
    assert pooled.expected_runs == pytest.approx(mu, rel=1e-12)
    assert pooled.z == pytest.approx((runs - mu) / np.sqrt(var), rel=1e-9)
    # sorted together, the sources' offsets make blocks of one sign: fewer runs than chance, read
    # by the plain test as a misfit of the curve; within the sources there is none
    assert residual_runs(r).z < pooled.z


def test_grouped_longest_run_lists_its_members():
    r = np.array([1.0, -1.0, 1.0, 1.0, -1.0, 1.0, 1.0, 1.0])
    res = grouped_residual_runs(r, ["A", "B", "A", "B", "A", "A", "B", "A"])
    # A: 1, 1, -1, 1, 1 (rows 0, 2, 4, 5, 7); B: -1, 1, 1 (rows 1, 3, 6)
    assert res.longest_run == 2 and res.longest_run_members in ((0, 2), (5, 7), (3, 6))


def test_local_enthalpy_tracks_iapws():
    T = np.linspace(280, 370, 31)
    P = noisy(iapws_liquid(T), 2e-4, seed=12)
    le = local_enthalpy(T, P, u_P=2e-4 * P, window=7)
    # Apparent ΔH of IAPWS-95 (= -R dlnp/d(1/T) of the full formulation at
    # the window centre, by finite difference); a 7-point window over 18 K
    # has u ≈ 0.1-0.2 kJ/mol: 3u.
    h = 1e-3
    ref = np.array([-8.314462618 * (np.log(iapws_liquid(t + h)[0]) - np.log(iapws_liquid(t - h)[0]))
                    / (1 / (t + h) - 1 / (t - h)) for t in le.T_center])
    assert np.all(np.abs(le.dH - ref) < 3 * le.u_dH + 50)  # 50 J/mol: ΔH curvature within a window


def test_enthalpy_step_at_triple_point():
    Ti = np.linspace(230, T_TRIPLE, 15)
    Tl = np.linspace(274, 320, 15)
    T = np.concatenate([Ti, Tl])
    P = np.concatenate([noisy(iapws_ice(Ti), 5e-4, 1), noisy(iapws_liquid(Tl), 5e-4, 2)])
    st = enthalpy_steps(T, P)
    assert 273.0 < st.T_step < 274.2  # between the last ice and first liquid point
    # Step = -ΔH_fus (6.007 kJ/mol): within 4 u + 5 % (the base model has
    # constant ΔCp on both sides, the two phases' ΔCp differ).
    assert abs(st.dH_step + DH_FUS_TT) < 4 * st.u_dH_step + 300
    assert st.p_value_adjusted < 1e-6


def test_no_step_in_smooth_data():
    T = np.linspace(280, 370, 30)
    P = noisy(iapws_liquid(T), 5e-4, seed=13)
    st = enthalpy_steps(T, P)
    # Smooth data: the scanned maximum is not significant after adjustment
    # (would fail by chance in well under 5 % of seeds).
    assert st.p_value_adjusted > 0.01


def test_mad_scale_matches_scipy():
    # scipy.stats.median_abs_deviation with scale='normal' is the reference
    import numpy as np
    from scipy.stats import median_abs_deviation

    from audit.thermo.stats import mad_scale

    x = np.random.default_rng(8).standard_t(3, 41)
    assert mad_scale(x) == pytest.approx(median_abs_deviation(x, scale="normal"), rel=1e-12)
    assert np.isnan(mad_scale([]))


def test_the_ice_water_step_survives_two_smooth_terms():
    # the same ice + liquid set: the kink at the triple point is not taken up by
    # Legendre terms in 1/T, which follow curvature, not a change of slope
    Ti = np.linspace(230, T_TRIPLE, 15)
    Tl = np.linspace(274, 320, 15)
    T = np.concatenate([Ti, Tl])
    P = np.concatenate([noisy(iapws_ice(Ti), 5e-4, 1), noisy(iapws_liquid(Tl), 5e-4, 2)])
    st = enthalpy_steps(T, P, smooth_terms=2)
    assert 273.0 < st.T_step < 274.2
    assert st.p_value_adjusted < 1e-6


def test_water_towards_the_critical_point_is_curvature_not_a_step():
    # IAPWS-95 liquid–vapour saturation, 300–620 K (T/Tc up to 0.96): ΔH falls from 43.9 to
    # about 22 kJ/mol, steeply near Tc (as (1 − T/Tc)^0.38, Watson 1943), which ΔH linear in T
    # cannot follow, nor can the four-constant Clarke–Glew form the selection picks; 0.05 %
    # noise on 120 points
    from audit.thermo import select_equation

    T = np.linspace(300, 620, 120)
    P = noisy(iapws_liquid(T), 5e-4, seed=14)
    u_P = 5e-4 * P
    eq = select_equation(T, P, u_P=u_P).chosen.equation
    as_fitted = {"form": type(eq), "fixed": eq.fixed_parameters()}
    assert enthalpy_steps(T, P, u_P=u_P).p_value_adjusted < 1e-6  # ΔH linear in T calls a step
    assert enthalpy_steps(T, P, u_P=u_P, **as_fitted).p_value_adjusted < 1e-6  # so does the fitted form
    assert enthalpy_steps(T, P, u_P=u_P, smooth_terms=2, **as_fitted).p_value_adjusted > 0.01
