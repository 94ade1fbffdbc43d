"""Trouton's ratio implied by a series' own Clausius–Clapeyron line.

A two-constant line ln P = A + B/T through one series gives an apparent
enthalpy ΔH = −R·B and a normal boiling temperature T_b where the line
reaches p° = 101 325 Pa, so its Trouton ratio is

    ΔH/T_b = R·(A − ln p°)

— the entropy change on vaporization at the line's normal boiling point.
Trouton's rule says it is roughly 85–110 J mol⁻¹ K⁻¹ for liquids; a series
whose temperatures were printed in another scale (°C under a kelvin header,
or the reverse) gives a ratio far outside any substance's, because the scale
shift moves 1/T and with it both A and B.  The ratio needs no other source,
so it judges a series no other source reaches in temperature.

Pure function, no thresholds: the caller brings the band.

References
----------
.. [1] F. Trouton, "On molecular latent heat", Phil. Mag. 18, 54 (1884),
   doi:10.1080/14786448408627563.
.. [2] B. E. Poling, J. M. Prausnitz, J. P. O'Connell, The Properties of
   Gases and Liquids, 5th ed., McGraw-Hill (2000), §7-4 (Trouton's rule).

Verified against: water's saturation curve (IAPWS-95, ``iapws`` package),
whose line through 330–370 K gives a ratio near the 109 J mol⁻¹ K⁻¹ of
ΔH_vap(373.12 K)/T_b = 40.65 kJ/mol / 373.12 K, in
``tests/thermo/test_trouton.py``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .constants import P_ATM, R

__all__ = ["LineTrouton", "line_trouton_ratio"]


@dataclass(frozen=True)
class LineTrouton:
    """Trouton's ratio of a series' own two-constant line.

    Attributes
    ----------
    ratio : float
        R·(A − ln p°) [J mol⁻¹ K⁻¹].
    u_ratio : float
        Its standard uncertainty from the line's intercept [J mol⁻¹ K⁻¹].
    dH : float
        −R·B, the line's apparent enthalpy [J/mol].
    T_boiling : float
        Where the line reaches p° [K] (inf when the line never does).
    """

    ratio: float
    u_ratio: float
    dH: float
    T_boiling: float


def line_trouton_ratio(T_K, ln_P, u_lnP=None) -> LineTrouton | None:
    """Trouton's ratio of the least-squares line ln P = A + B/T through a series.

    Parameters
    ----------
    T_K : array_like
        Temperatures [K], all positive.
    ln_P : array_like
        ln of the pressures [ln Pa].
    u_lnP : array_like, optional
        Each pressure's standard uncertainty in ln P [-], e.g. from its printed
        rounding.  With it the line is weighted and the intercept's
        uncertainty is the larger of what these u and the residuals give
        (Birge ratio at least 1): pressures printed to one digit follow a
        staircase that a line fits closely, yet say little about its intercept.

    Returns
    -------
    LineTrouton or None
        The ratio [J mol⁻¹ K⁻¹], its uncertainty, ΔH [J/mol] and T_b [K]
        (an object, no unit of its own).  None when the line is not determined (fewer than three distinct
        temperatures, a temperature at or below 0 K, a non-finite value) or
        the pressure does not rise with temperature (B ≥ 0: no enthalpy).

    Examples
    --------
    A line through water's normal boiling point (373.124 K, 101 325 Pa) with
    ΔH = 40 650 J/mol gives back 40 650/373.124 = 108.9 J mol⁻¹ K⁻¹:

    >>> T = np.array([340.0, 355.0, 373.124, 390.0])
    >>> lnP = math.log(101325.0) - 40650.0 / 8.314462618 * (1 / T - 1 / 373.124)
    >>> round(line_trouton_ratio(T, lnP).ratio, 1)
    108.9
    """
    T = np.asarray(T_K, float)
    y = np.asarray(ln_P, float)
    if T.size != y.size or T.size < 3 or not (np.all(np.isfinite(T)) and np.all(np.isfinite(y))):
        return None
    if np.any(T <= 0) or np.unique(T).size < 3:
        return None
    x = 1.0 / T
    u = None if u_lnP is None else np.asarray(u_lnP, float)
    weighted = u is not None and u.size == T.size and bool(np.all(np.isfinite(u) & (u > 0)))
    with np.errstate(all="ignore"):
        w = 1.0 / u ** 2 if weighted else np.ones_like(x)
        x_mean = float(np.sum(w * x) / np.sum(w))
        X = np.column_stack([np.ones_like(x), x - x_mean])
        sw = np.sqrt(w)
        A_w, y_w = X * sw[:, None], y * sw
    # a printed value of 1e-300 gives a weight beyond the float range: no line is determined
    if not (np.all(np.isfinite(A_w)) and np.all(np.isfinite(y_w)) and math.isfinite(x_mean)):
        return None
    try:
        coef, *_ = np.linalg.lstsq(A_w, y_w, rcond=None)
    except np.linalg.LinAlgError:
        return None
    a_c, b = float(coef[0]), float(coef[1])
    if not b < 0:
        return None
    resid = y - X @ coef
    dof = T.size - 2
    chi2_per_dof = float(np.sum(w * resid ** 2)) / dof if dof > 0 else 0.0
    scale = max(1.0, chi2_per_dof) if weighted else chi2_per_dof
    try:
        cov = scale * np.linalg.inv((X * w[:, None]).T @ X)
    except np.linalg.LinAlgError:
        return None
    # A = a_c − b·x̄ (the intercept at 1/T = 0); its variance from the centred fit's covariance
    grad = np.array([1.0, -x_mean])
    var_A = float(grad @ cov @ grad)
    A = a_c - b * x_mean
    if not (math.isfinite(var_A) and math.isfinite(A)):
        return None
    ratio = R * (A - math.log(P_ATM))
    excess = A - math.log(P_ATM)
    T_b = -b / excess if excess > 0 else math.inf
    return LineTrouton(ratio=ratio, u_ratio=R * math.sqrt(max(var_A, 0.0)), dH=-R * b, T_boiling=T_b)
