"""Equation forms: analytic derivatives, linear design matrices, Clarke-Glew meaning.

Sources: calculus (central finite differences as the outside check of each
analytic derivative); Clarke & Glew, Trans. Faraday Soc. 62, 539 (1966),
doi:10.1039/TF9666200539 for the meaning of the parameters (ΔH(T) = ΔH(θ) +
ΔCp(θ)(T - θ) + ½ dΔCp/dT (T - θ)²).
"""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from audit.thermo import (Antoine, ClarkeGlew, ClausiusClapeyron2, ClausiusClapeyron3, Wagner,
                          apparent_enthalpy, heat_capacity_change)
from tests.references import wagner_pruss_2002

EQUATIONS = [
    ClausiusClapeyron2(25.0, -5000.0),
    ClausiusClapeyron3(60.0, -6800.0, -5.0),
    Antoine(10.2, 1740.0, -39.0),
    Antoine(7.0, 1700.0, 230.0, base="log10", P_unit="mmHg", T_unit="degC"),
    ClarkeGlew(6000.0, 43000.0, -40.0, 0.1, theta=320.0, n_terms=4),
    Wagner(-7.86, 1.84, -2.4, -1.9, Tc=wagner_pruss_2002.TC, Pc=wagner_pruss_2002.PC),
    Wagner(-7.86, 1.84, -2.4, -1.9, Tc=wagner_pruss_2002.TC, Pc=wagner_pruss_2002.PC, variant="3-6"),
]


@settings(max_examples=40, deadline=None)
@given(T=st.floats(260.0, 520.0), i=st.integers(0, len(EQUATIONS) - 1))
def test_derivatives_vs_finite_differences(T, i):
    eq = EQUATIONS[i]
    h = 1e-3 * T / 300  # central differences: error ~h² f''' ≈ 1e-9 relative
    fd1 = (eq.ln_p(T + h) - eq.ln_p(T - h)) / (2 * h)
    fd2 = (eq.dlnp_dT(T + h) - eq.dlnp_dT(T - h)) / (2 * h)
    assert eq.dlnp_dT(T) == pytest.approx(fd1, rel=1e-7)
    assert eq.d2lnp_dT2(T) == pytest.approx(fd2, rel=1e-5, abs=1e-12)
    assert eq.dlnp_dinvT(T) == pytest.approx(-T * T * eq.dlnp_dT(T), rel=1e-14)


@pytest.mark.parametrize("eq", [e for e in EQUATIONS if e.linear], ids=lambda e: type(e).__name__)
def test_linear_forms_design_matrix_reproduces_ln_p(eq):
    T = np.linspace(270, 500, 7)
    lnp = eq.design_offset(T) + eq.design_matrix(T) @ eq.params
    np.testing.assert_allclose(lnp, eq.ln_p(T), rtol=1e-13)
    again = type(eq).from_coefficients(eq.params, **eq.fixed_parameters())
    assert again == eq


def test_antoine_jacobian_vs_finite_difference():
    eq = EQUATIONS[3]
    T = np.array([290.0, 350.0])
    G = eq.jacobian_ln_p(T)
    for j in range(3):
        d = np.zeros(3)
        d[j] = 1e-6 * max(1, abs(eq.params[j]))
        fd = (eq.with_params(eq.params + d).ln_p(T) - eq.with_params(eq.params - d).ln_p(T)) / (2 * d[j])
        np.testing.assert_allclose(G[:, j], fd, rtol=1e-6)


def test_clarke_glew_parameters_mean_what_they_say():
    eq = ClarkeGlew(6000.0, 43000.0, -40.0, 0.1, theta=320.0, n_terms=4)
    for T in (300.0, 320.0, 350.0):
        expected = 43000.0 - 40.0 * (T - 320) + 0.5 * 0.1 * (T - 320) ** 2
        assert apparent_enthalpy(eq, T) == pytest.approx(expected, rel=1e-12)
        assert heat_capacity_change(eq, T).value == pytest.approx(-40.0 + 0.1 * (T - 320), rel=1e-9)
    # ΔG°(θ) = -Rθ ln(p(θ)/p°)
    assert eq.p(320.0) == pytest.approx(101325 * np.exp(-6000.0 / (8.314462618 * 320.0)), rel=1e-13)


def test_cc3_dcp_is_r_times_c():
    assert heat_capacity_change(EQUATIONS[1], 300.0).value == pytest.approx(-5.0 * 8.314462618, rel=1e-12)


def test_to_dict_and_describe():
    for eq in EQUATIONS:
        d = eq.to_dict()
        assert set(d["parameters"]) == set(eq.parameter_names)
        assert isinstance(eq.describe(), str) and eq.describe()


def test_invalid_construction():
    with pytest.raises(ValueError):
        Wagner(1, 1, 1, 1, Tc=0.0, Pc=1e6)
    with pytest.raises(ValueError):
        ClarkeGlew(1.0, 2.0, 3.0, 4.0, n_terms=3)
    with pytest.raises(ValueError):
        Antoine(1, 2, 3, base="log2")
    with pytest.raises(ValueError):
        Wagner(-7, 1, 1, 1, Tc=500.0, Pc=1e6).ln_p(510.0)
