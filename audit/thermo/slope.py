"""The enthalpy and the heat-capacity change an equation's slope implies, with their
uncertainties from a fit's covariance.

ΔH_app = −R·d ln P/d(1/T) (Clausius–Clapeyron, ideal gas, negligible condensed
volume) and ΔCp = dΔH/dT.  These need only an equation (and a fit's
covariance), so they sit below :mod:`audit.thermo.fitting`, which uses them to
judge candidate forms; :mod:`audit.thermo.enthalpy` re-exports them with the
real-gas correction.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .constants import R
from .equations import as_temperature

__all__ = ["apparent_enthalpy", "enthalpy_uncertainty", "HeatCapacityChange", "heat_capacity_change"]


def _equation_and_cov(fit_or_eq):
    if hasattr(fit_or_eq, "equation"):
        return fit_or_eq.equation, np.asarray(fit_or_eq.covariance)
    return fit_or_eq, None


def _shape_like(T, values):
    return values.reshape(np.shape(T)) if np.ndim(T) else float(np.asarray(values).ravel()[0])


# -- enthalpy and ΔCp from an equation ----------------------------------------------
def apparent_enthalpy(eq, T):
    """Apparent (Clausius-Clapeyron) enthalpy -R d ln p / d(1/T) [J/mol].

    Parameters
    ----------
    eq : VaporPressureEquation or VaporPressureFit
        The curve (an object, no unit).
    T : array_like
        Temperature [K].

    Returns
    -------
    float or ndarray
        ΔH/Δz [J/mol]; equals ΔH only for an ideal gas and a condensed
        phase of negligible volume.
    """
    eq, _ = _equation_and_cov(eq)
    return -R * eq.dlnp_dinvT(as_temperature(T))


def enthalpy_uncertainty(fit, T):
    """Standard uncertainty of :func:`apparent_enthalpy` [J/mol] (delta method).

    u(ΔH) = R sqrt(g C gᵀ), g = ∂(d ln p/d(1/T))/∂parameters, C the fit's
    parameter covariance.  Verified against a parametric bootstrap in
    ``tests/thermo/test_triple_point_water.py``.

    Parameters
    ----------
    fit : VaporPressureFit
        A fit with a parameter covariance (an object, no unit); a bare
        equation raises ``ValueError``.
    T : float or array_like
        Temperature [K].

    Returns
    -------
    float or ndarray
        u(ΔH/Δz) [J/mol], shaped like `T`.
    """
    eq, cov = _equation_and_cov(fit)
    if cov is None:
        raise ValueError("enthalpy_uncertainty needs a fit (with a covariance), not a bare equation")
    Ta = np.atleast_1d(as_temperature(T))
    G = eq.param_gradient("dlnp_dinvT", Ta)
    u = R * np.sqrt(np.einsum("ij,jk,ik->i", G, cov, G))
    return _shape_like(T, u)


@dataclass(frozen=True)
class HeatCapacityChange:
    """Apparent ΔCp = d(ΔH_apparent)/dT [J/(mol K)] and its standard uncertainty."""

    T: np.ndarray | float
    value: np.ndarray | float
    uncertainty: np.ndarray | float


def heat_capacity_change(fit_or_eq, T) -> HeatCapacityChange:
    """Apparent ΔCp = d/dT(-R d ln p/d(1/T)) = R(2T p' + T² p'') [J/(mol K)].

    The uncertainty (delta method) is NaN for a bare equation.  For the
    three-parameter Clausius-Clapeyron form this is exactly R·C.

    Parameters
    ----------
    fit_or_eq : VaporPressureFit or VaporPressureEquation
        The curve (an object, no unit); a fit also gives the uncertainty.
    T : float or array_like
        Temperature [K].

    Returns
    -------
    HeatCapacityChange
        ``T`` [K], ``value`` and ``uncertainty`` [J/(mol K)].

    Examples
    --------
    The identity ΔCp = R·C for ln P = A + B/T + C ln T (C = -3 here):

    >>> from .equations import ClausiusClapeyron3
    >>> cp = heat_capacity_change(ClausiusClapeyron3(A=50.0, B=-6000.0, C=-3.0), 300.0)
    >>> round(float(cp.value / R), 9)
    -3.0
    """
    eq, cov = _equation_and_cov(fit_or_eq)
    Ta = np.atleast_1d(as_temperature(T))
    val = R * (2 * Ta * eq.dlnp_dT(Ta) + Ta ** 2 * eq.d2lnp_dT2(Ta))
    if cov is None:
        u = np.full_like(val, np.nan)
    else:
        G = R * (2 * Ta[:, None] * eq.param_gradient("dlnp_dT", Ta)
                 + Ta[:, None] ** 2 * eq.param_gradient("d2lnp_dT2", Ta))
        u = np.sqrt(np.einsum("ij,jk,ik->i", G, cov, G))
    return HeatCapacityChange(T=_shape_like(T, Ta), value=_shape_like(T, val), uncertainty=_shape_like(T, u))


# -- second virial coefficient -------------------------------------------------------
