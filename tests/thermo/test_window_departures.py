"""Local enthalpies against the fit of record, and steps with a level per source.

Reference curve: saturation pressure of liquid water, IAPWS-95 (Wagner &
Pruss, J. Phys. Chem. Ref. Data 31, 387 (2002), doi:10.1063/1.1461829),
through the ``iapws`` package.  The calibration checks are Monte Carlo
experiments on that curve: with known σ, departure/u must be a standard
normal variable.
"""

import numpy as np
import pytest

from audit.thermo import enthalpy_steps, fit_equation, window_departures

from ._data import iapws_liquid

R = 8.314462618


def _iapws_apparent_enthalpy(T):
    h = 1e-3
    return np.array([-R * (np.log(iapws_liquid(t + h)[0]) - np.log(iapws_liquid(t - h)[0]))
                     / (1 / (t + h) - 1 / (t - h)) for t in np.atleast_1d(T)])


def test_local_enthalpies_track_iapws_95():
    rng = np.random.default_rng(4)
    T = np.linspace(290.0, 370.0, 33)
    P = iapws_liquid(T) * np.exp(2e-4 * rng.standard_normal(T.size))
    fit = fit_equation(T, P, "cc3", u_P=2e-4 * P, robust=False)
    wd = window_departures(fit, window=5)
    assert wd.dH.size == 33 - 5 + 1
    # a 5-point window over 10 K: u ≈ 0.2 kJ/mol; 50 J/mol for ΔH's curvature within it
    assert np.all(np.abs(wd.dH - _iapws_apparent_enthalpy(wd.T_center)) < 3 * wd.u_dH + 50)
    # the window's points are in the fit: the difference is less certain than the window alone,
    # never more than the window and the curve taken as independent
    assert np.all(wd.u_departure < np.hypot(wd.u_dH, wd.u_smooth))


@pytest.mark.parametrize("noise", [0.01, 0.003])
def test_departures_in_their_uncertainty_are_standard_normal(noise):
    # 80 series of 40 points, 280-420 K, known σ: the spread of departure/u is 1 within
    # sampling (and the form's own misfit of IAPWS-95, visible at 0.3 %)
    z = []
    for seed in range(80):
        rng = np.random.default_rng(seed)
        T = np.sort(rng.uniform(280.0, 420.0, 40))
        P = iapws_liquid(T) * np.exp(noise * rng.standard_normal(T.size))
        wd = window_departures(fit_equation(T, P, "cc3", u_P=noise * P, robust=False), window=5)
        z.append(wd.departure / wd.u_departure)
    z = np.concatenate(z)
    assert np.isfinite(z).all()
    assert 0.93 < np.std(z) < (1.07 if noise == 0.01 else 1.3)
    assert np.mean(np.abs(z) > 4) < 0.005


def test_windows_never_span_two_sources():
    # two series of IAPWS-95 water 3 % apart in level, one after the other in temperature:
    # windows across the hand-over would read the level difference as a slope ~10 % off
    rng = np.random.default_rng(8)
    T = np.r_[np.linspace(300.0, 330.0, 16), np.linspace(332.0, 360.0, 15)]
    src = np.where(T < 331.0, "Alder 1961", "Birch 1988")
    P = iapws_liquid(T) * np.where(T < 331.0, 1.0, 1.03) * np.exp(1e-3 * rng.standard_normal(T.size))
    fit = fit_equation(T, P, "cc3", u_P=0.02 * P, robust=False)
    mixed = window_departures(fit, window=5)
    by_source = window_departures(fit, window=5, groups=src)
    assert np.max(np.abs(mixed.dH / _iapws_apparent_enthalpy(mixed.T_center) - 1)) > 0.05
    assert by_source.dH.size == (16 - 5 + 1) + (15 - 5 + 1)
    assert np.all(np.abs(by_source.dH - _iapws_apparent_enthalpy(by_source.T_center)) < 3 * by_source.u_dH + 50)


def test_a_level_difference_between_sources_is_no_step_but_a_slope_change_is():
    rng = np.random.default_rng(11)
    T = np.linspace(290.0, 370.0, 40)
    P = iapws_liquid(T) * np.exp(3e-4 * rng.standard_normal(T.size))
    src = np.where(T > 330.0, "Cole 1975", "Dunn 1932")
    # the upper source 2 % high throughout: a level, not an enthalpy step
    shifted = np.where(T > 330.0, 1.02 * P, P)
    alone = enthalpy_steps(T, shifted, u_P=3e-4 * shifted)
    with_levels = enthalpy_steps(T, shifted, u_P=3e-4 * shifted, groups=src)
    assert alone.p_value_adjusted < 1e-6
    assert with_levels.p_value_adjusted > 1e-3
    # the upper source implies ΔH 2 kJ/mol higher (continuous in P at 330 K): found with levels too
    stepped = np.where(T > 330.0, P * np.exp(2000.0 / R * (1 / 330.0 - 1 / T)), P)
    st = enthalpy_steps(T, stepped, u_P=3e-4 * stepped, groups=src)
    assert st.p_value_adjusted < 1e-6
    assert st.dH_step == pytest.approx(2000.0, rel=0.3)
