"""Triple point of water from generated ice and liquid branches.

Sources: triple point 273.16 K, 611.657 Pa (IAPWS R14-08(2011) and IAPWS-95);
ΔH_fus(Tt) = 6.007 kJ/mol (IAPWS-95 + IAPWS-06; R × slope difference of the
two IAPWS equations at Tt is 6.019 kJ/mol).  Data generated from the
``iapws`` package's IAPWS-95 and R14 sublimation equation.
"""

import numpy as np
import pytest

from audit.thermo import fit_equation, find_slope_break, intersect_branches, select_equation

from ._data import iapws_ice, iapws_liquid, noisy

from ..references.iapws95_enthalpy import (DH_FUS_TT, DLNP_DINVT_ICE_TT, DLNP_DINVT_LIQUID_TT,
                                           R_SLOPE_DIFFERENCE_TT)
from ..references.iapws_r10_06 import P_TRIPLE, T_TRIPLE


def branches(n_ice, n_liq, rel, seed):
    Ti = np.linspace(200.0, T_TRIPLE, n_ice)
    Tl = np.linspace(T_TRIPLE, 330.0, n_liq)
    return Ti, noisy(iapws_ice(Ti), rel, seed), Tl, noisy(iapws_liquid(Tl), rel, seed + 1)


@pytest.fixture(scope="module")
def realistic():
    # 0.05 % noise, 40 ice and 30 liquid points.
    Ti, Pi, Tl, Pl = branches(40, 30, 5e-4, seed=21)
    fs = select_equation(Ti, Pi, u_P=5e-4 * Pi, branch="solid").chosen
    fl = select_equation(Tl, Pl, u_P=5e-4 * Pl).chosen
    return fs, fl, intersect_branches(fs, fl)


def test_triple_point_within_stated_uncertainty(realistic):
    _, _, tp = realistic
    assert tp.crossed
    # The curves cross at a shallow angle (slopes differ by ~1 % per K), so
    # 0.05 % noise gives u(T) of a few hundredths of a kelvin; the estimate
    # must lie within 3 u (and the u must be that small).
    assert tp.u_T < 0.06
    assert abs(tp.T - T_TRIPLE) < 3 * tp.u_T
    # P follows T along the curve (d ln p/dT ≈ 0.08 /K at Tt), so its error
    # is ~0.08 × the T error; the same 3 u criterion applies.
    assert abs(tp.P / P_TRIPLE - 1) < 3 * tp.u_P / P_TRIPLE


def test_dh_fus(realistic):
    _, _, tp = realistic
    # Brief: within the stated uncertainty + 5 % of 6.0 kJ/mol.
    assert abs(tp.dH_fus - DH_FUS_TT) < tp.u_dH_fus + 0.05 * DH_FUS_TT
    assert tp.dH_sub > tp.dH_vap


def test_triple_point_precise_data():
    # With 0.01 % noise (good static measurements) the crossing is within the
    # brief's 0.02 K and 0.3 % in P.
    Ti, Pi, Tl, Pl = branches(40, 30, 1e-4, seed=31)
    fs = select_equation(Ti, Pi, u_P=1e-4 * Pi, branch="solid").chosen
    fl = select_equation(Tl, Pl, u_P=1e-4 * Pl).chosen
    tp = intersect_branches(fs, fl)
    assert abs(tp.T - T_TRIPLE) < 0.02
    assert tp.P == pytest.approx(P_TRIPLE, rel=3e-3)


def test_delta_method_vs_parametric_bootstrap(realistic):
    fs, fl, tp = realistic
    rng = np.random.default_rng(1)
    Ts = []
    for _ in range(300):
        es = fs.equation.with_params(rng.multivariate_normal(fs.params, fs.covariance))
        el = fl.equation.with_params(rng.multivariate_normal(fl.params, fl.covariance))
        r = intersect_branches(es, el, T_guess=tp.T)
        if r.crossed:
            Ts.append(r.T)
    # 300 draws: the sd estimate has ~4 % relative sd; the delta method is
    # linear in a nearly linear problem: agree within 15 %.
    assert np.std(Ts) == pytest.approx(tp.u_T, rel=0.15)


def test_exact_equations_cross_at_triple_point():
    from audit.thermo import ICE_SUBLIMATION, WATER_SATURATION

    tp = intersect_branches(ICE_SUBLIMATION, WATER_SATURATION)
    # Both IAPWS equations pass through (Tt, pt): the auxiliary liquid
    # equation gives 611.655 Pa at 273.16 K, 0.0003 % low, i.e. 0.3 mK.
    assert tp.T == pytest.approx(T_TRIPLE, abs=2e-3)
    # R × slope difference at Tt is 6.019 kJ/mol (references cross-check).
    assert tp.dH_fus == pytest.approx(R_SLOPE_DIFFERENCE_TT, rel=2e-3)


def test_no_crossing_reported():
    a = fit_equation([250, 260, 270, 280], [100, 200, 400, 800], "cc2")
    b = fit_equation([250, 260, 270, 280], [200, 400, 800, 1600], "cc2")
    tp = intersect_branches(a, b)
    assert not tp.crossed and "do not cross" in tp.message


def test_slope_break_without_labels():
    Ti, Pi, Tl, Pl = branches(20, 15, 5e-4, seed=41)
    T = np.concatenate([Tl, Ti])  # unordered on purpose
    P = np.concatenate([Pl, Pi])
    br = find_slope_break(T, P, min_points_per_side=4)
    # The junction of the data is at 273.16 K (a point on each side); the
    # next points are 1.9 K below and 4.1 K above.
    assert 271.0 < br.T_break < 277.5
    assert br.solid_side_steeper
    assert br.p_value_adjusted < 1e-6
    # Slopes: -6144.8 K (ice) and -5420.9 K (liquid) at Tt (references);
    # each side's straight line averages over its range: within 1.5 %.
    assert br.slope_low == pytest.approx(DLNP_DINVT_ICE_TT, rel=0.015)
    assert br.slope_high == pytest.approx(DLNP_DINVT_LIQUID_TT, rel=0.03)
