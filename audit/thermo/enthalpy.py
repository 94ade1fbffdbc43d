"""Enthalpies implied by vapor-pressure curves, and the real-gas correction.

The Clapeyron equation gives d ln p / d(1/T) = -ΔH/(R Δz) with
Δz = z_vapor - z_condensed.  The *apparent* enthalpy -R d ln p/d(1/T) is
therefore ΔH/Δz; the corrected enthalpy is the apparent one times Δz.
Δz is estimated from a second virial coefficient B (Tsonopoulos, or the
Harvey-Lemmon correlation for water) and a condensed-phase molar volume
(Rackett/Yamada-Gunn for liquids, or a given value):

    Δz = (1 + B P/(R T)) - P V_condensed/(R T).

References
----------
.. [1] C. Tsonopoulos, "An empirical correlation of second virial
   coefficients", AIChE J. 20, 263-272 (1974), doi:10.1002/aic.690200209.
.. [2] A. H. Harvey and E. W. Lemmon, "Correlation for the second virial
   coefficient of water", J. Phys. Chem. Ref. Data 33, 369-376 (2004),
   doi:10.1063/1.1587731.
.. [3] H. G. Rackett, "Equation of state for saturated liquids", J. Chem.
   Eng. Data 15, 514-517 (1970), doi:10.1021/je60047a012; T. Yamada and
   R. D. Gunn, J. Chem. Eng. Data 18, 234-236 (1973), doi:10.1021/je60057a006.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

import numpy as np

from .constants import R
from .data import InsufficientData, as_data, as_uncertainty, weighted_lstsq
from .distributions import f_sf
from .equations import as_temperature
# the slope's enthalpy and ΔCp live below fitting (which needs them) and are re-exported here
from .slope import (HeatCapacityChange, _equation_and_cov, _shape_like, apparent_enthalpy,  # noqa: F401
                    enthalpy_uncertainty, heat_capacity_change)

__all__ = [
    "apparent_enthalpy",
    "enthalpy_uncertainty",
    "HeatCapacityChange",
    "heat_capacity_change",
    "PolarTerms",
    "tsonopoulos_polar_terms",
    "tsonopoulos_B",
    "water_second_virial",
    "rackett_volume",
    "yamada_gunn_z_ra",
    "delta_z",
    "RealGasModel",
    "DeltaZCorrection",
    "ImpliedEnthalpy",
    "implied_enthalpy",
    "LocalEnthalpy",
    "local_enthalpy",
    "WindowDepartures",
    "window_departures",
    "EnthalpyStep",
    "enthalpy_steps",
]


@dataclass(frozen=True)
class PolarTerms:
    """Tsonopoulos polar parameters a, b [1] and the reduced dipole moment used."""

    a: float
    b: float
    kind: str
    mu_r: float | None = None


_KETONE_LIKE = ("ketone", "aldehyde", "ether", "ester", "nitrile")


def tsonopoulos_polar_terms(kind: str, dipole_debye: float | None = None, Tc: float | None = None,
                            Pc: float | None = None) -> PolarTerms:
    """Polar terms a, b of the Tsonopoulos correlation [1].

    Parameters
    ----------
    kind : {'nonpolar', 'water', 'alkanol', 'methanol', 'ketone', 'aldehyde', 'ether', 'ester', 'nitrile'}
        Name of the compound class; 'alkanol' means aliphatic alcohols
        other than methanol.
    dipole_debye : float, optional
        Dipole moment [D]; needed for 'alkanol' and the ketone-like kinds.
    Tc, Pc : float, optional
        Critical constants [K], [Pa]; needed with the dipole moment.

    Returns
    -------
    PolarTerms
        Polar terms a and b [-], with the reduced dipole moment [-]
        μr = 1e5 μ²(Pc/101325 Pa)/Tc² (μ in debye, Tc in K) where used.
    """
    kind = kind.lower()
    if kind == "nonpolar":
        return PolarTerms(0.0, 0.0, kind)
    if kind == "water":
        return PolarTerms(-0.0109, 0.0, kind)
    if kind == "methanol":
        return PolarTerms(0.0878, 0.0525, kind)
    if kind in ("alkanol",) + _KETONE_LIKE:
        if dipole_debye is None or Tc is None or Pc is None:
            raise ValueError(f"Tsonopoulos terms for {kind!r} need the dipole moment, Tc and Pc")
        if not (Tc > 0 and Pc > 0 and dipole_debye >= 0):
            raise ValueError("Tc, Pc must be positive and the dipole moment non-negative")
        mu_r = 1e5 * dipole_debye ** 2 * (Pc / 101325.0) / Tc ** 2
        if kind == "alkanol":
            return PolarTerms(0.0878, 0.00908 + 0.0006957 * mu_r, kind, mu_r)
        return PolarTerms(-2.14e-4 * mu_r - 4.308e-21 * mu_r ** 8, 0.0, kind, mu_r)
    raise ValueError(f"unknown Tsonopoulos class {kind!r}")


def tsonopoulos_B(T, Tc: float, Pc: float, omega: float, a: float = 0.0, b: float = 0.0):
    """Second virial coefficient from the Tsonopoulos correlation [m³/mol].

    B Pc/(R Tc) = f0 + ω f1 + a/Tr⁶ - b/Tr⁸ [1].

    Parameters
    ----------
    T : array_like
        Temperature [K].
    Tc, Pc, omega : float
        Critical temperature [K], pressure [Pa], acentric factor [-].
    a, b : float
        Polar terms [-] (:func:`tsonopoulos_polar_terms`); 0 for nonpolar gases.

    Returns
    -------
    float or ndarray
        B [m³/mol], shaped like `T`.
    """
    if not (Tc > 0 and Pc > 0 and math.isfinite(omega)):
        raise ValueError("Tsonopoulos B needs Tc > 0, Pc > 0 and a finite acentric factor")
    Tr = as_temperature(T) / Tc
    f0 = 0.1445 - 0.330 / Tr - 0.1385 / Tr ** 2 - 0.0121 / Tr ** 3 - 0.000607 / Tr ** 8
    f1 = 0.0637 + 0.331 / Tr ** 2 - 0.423 / Tr ** 3 - 0.008 / Tr ** 8
    return (f0 + omega * f1 + a / Tr ** 6 - b / Tr ** 8) * R * Tc / Pc


_HL_A = (0.34404, -0.75826, -24.219, -3978.2)  # dm³/mol
_HL_B = (-0.5, -0.8, -3.35, -8.3)


def water_second_virial(T):
    """Second virial coefficient of water, Harvey & Lemmon (2004) [m³/mol].

    B = Σ aᵢ (T/100 K)^bᵢ with a = (0.34404, -0.75826, -24.219, -3978.2)
    dm³/mol and b = (-0.5, -0.8, -3.35, -8.3) [2]; stated range 273-1273 K.

    Parameters
    ----------
    T : float or array_like
        Temperature [K].

    Returns
    -------
    float or ndarray
        B [m³/mol], shaped like `T`.

    Notes
    -----
    The coefficients give B in dm³/mol (L/mol).  Verified against the
    virial limit of IAPWS-95 (the ``iapws`` package) in
    ``tests/thermo/test_tsonopoulos_1974.py``: within 0.2 % at 373 K, 2 %
    from 350 to 700 K and 6 % at 273 K, where IAPWS-95 itself is less
    certain.
    """
    tau = as_temperature(T) / 100.0
    return sum(a * tau ** b for a, b in zip(_HL_A, _HL_B)) * 1e-3


# -- condensed volume ------------------------------------------------------------------
def yamada_gunn_z_ra(omega: float) -> float:
    """Rackett compressibility from the acentric factor, Z_RA = 0.29056 - 0.08775 ω [3].

    Parameters
    ----------
    omega : float
        Acentric factor [-].

    Returns
    -------
    float
        Z_RA [-].

    Examples
    --------
    The correlation's own identity at ω = 0:

    >>> yamada_gunn_z_ra(0.0)
    0.29056
    """
    return 0.29056 - 0.08775 * omega


def rackett_volume(T, Tc: float, Pc: float, omega: float | None = None, Z_RA: float | None = None):
    """Saturated-liquid molar volume, Rackett equation [m³/mol].

    V = (R Tc/Pc) Z_RA^[1 + (1 - Tr)^(2/7)] [3].

    Parameters
    ----------
    T : array_like
        Temperature [K], below Tc.
    Tc, Pc : float
        Critical temperature [K] and pressure [Pa].
    omega : float, optional
        Acentric factor [-]; gives Z_RA by Yamada-Gunn when `Z_RA` is not given.
    Z_RA : float, optional
        Rackett compressibility [-].

    Returns
    -------
    float or ndarray
        Saturated-liquid molar volume [m³/mol], shaped like `T`.

    Notes
    -----
    Rackett's original choice Z_RA = Zc = Pc Vc/(R Tc) is within 1 % of
    CoolProp for benzene, toluene and n-hexane and 1-8 % low for water
    (0.5-0.8 Tc).  The Yamada-Gunn Z_RA from ω is 1-1.7 % off for those
    hydrocarbons but 15-22 % high for water and about 14 % off for acetone
    and ethanol (measured against CoolProp in ``tests/thermo/test_rackett.py``):
    pass Z_RA (e.g. Zc) for polar substances.  For Δz the P V term is small
    (6e-4 for water at Tb), so even 20 % there changes ΔH by about 0.01 %.
    """
    if Z_RA is None:
        if omega is None:
            raise ValueError("rackett_volume needs omega or Z_RA")
        Z_RA = yamada_gunn_z_ra(omega)
    if not (Tc > 0 and Pc > 0 and 0 < Z_RA < 1):
        raise ValueError("rackett_volume needs Tc > 0, Pc > 0 and 0 < Z_RA < 1")
    T = as_temperature(T)
    if np.any(T >= Tc):
        raise ValueError("rackett_volume needs T below Tc")
    return R * Tc / Pc * Z_RA ** (1.0 + (1.0 - T / Tc) ** (2.0 / 7.0))


def delta_z(T, P, B, V_condensed):
    """Δz = z_vapor - z_condensed = (1 + B P/(R T)) - P V_condensed/(R T) [1].

    Parameters
    ----------
    T : array_like
        Temperature [K].
    P : array_like
        Pressure [Pa].
    B : array_like
        Second virial coefficient [m³/mol].
    V_condensed : array_like
        Condensed-phase molar volume [m³/mol].

    Returns
    -------
    ndarray
        Δz [-].

    Examples
    --------
    An ideal gas over a condensed phase of no volume gives Δz = 1 (identity):

    >>> float(delta_z(300.0, 1000.0, 0.0, 0.0))
    1.0
    """
    T = as_temperature(T)
    P = np.asarray(P, dtype=float)
    x = P / (R * T)
    return 1.0 + np.asarray(B, dtype=float) * x - x * np.asarray(V_condensed, dtype=float)


@dataclass(frozen=True)
class DeltaZCorrection:
    """Δz evaluated at given (T, P), with what went into it."""

    T: np.ndarray
    P: np.ndarray
    B: np.ndarray
    V_condensed: np.ndarray
    delta_z: np.ndarray
    description: str


@dataclass(frozen=True)
class RealGasModel:
    """How to compute Δz for a substance: virial B plus condensed volume.

    Parameters
    ----------
    Tc, Pc : float
        Critical constants [K], [Pa].
    omega : float
        Acentric factor [-].
    polar_kind : str
        Tsonopoulos class (:func:`tsonopoulos_polar_terms`), or
        'water-harvey-lemmon' to use :func:`water_second_virial`.
    dipole_debye : float, optional
        Dipole moment [D].
    phase : {'liquid', 'solid'}
    V_condensed : float, optional
        Condensed molar volume [m³/mol]; when omitted a liquid uses Rackett
        and a solid's volume is neglected (P V_s/RT < 1e-5 for ice at Tt).
    Z_RA : float, optional
        Rackett compressibility [-] (else Yamada-Gunn from ω).
    """

    Tc: float
    Pc: float
    omega: float
    polar_kind: str = "nonpolar"
    dipole_debye: float | None = None
    phase: Literal["liquid", "solid"] = "liquid"
    V_condensed: float | None = None
    Z_RA: float | None = None

    def second_virial(self, T):
        """Second virial coefficient of the vapor by this model's correlation.

        Parameters
        ----------
        T : float or array_like
            Temperature [K].

        Returns
        -------
        float or ndarray
            B [m³/mol]: Harvey-Lemmon for 'water-harvey-lemmon', else Tsonopoulos.
        """
        if self.polar_kind == "water-harvey-lemmon":
            return water_second_virial(T)
        terms = tsonopoulos_polar_terms(self.polar_kind, self.dipole_debye, self.Tc, self.Pc)
        return tsonopoulos_B(T, self.Tc, self.Pc, self.omega, terms.a, terms.b)

    def evaluate(self, T, P) -> DeltaZCorrection:
        """Δz = z_vapor - z_condensed at each (T, P).

        Parameters
        ----------
        T : float or array_like
            Temperature [K].
        P : float or array_like
            Pressure [Pa]; broadcast against `T`.

        Returns
        -------
        DeltaZCorrection
            T [K], P [Pa], B and V_condensed [m³/mol], Δz [-] and a description
            of the models used.
        """
        T = np.atleast_1d(as_temperature(T))
        P = np.broadcast_to(np.asarray(P, dtype=float), T.shape).copy()
        if not (np.all(np.isfinite(P)) and np.all(P > 0)):
            raise ValueError("pressures must be finite and positive")
        B = np.atleast_1d(self.second_virial(T))
        if self.polar_kind == "water-harvey-lemmon":
            btxt = "B of water from Harvey & Lemmon (2004)"
        else:
            btxt = f"Tsonopoulos B ({self.polar_kind})"
        if self.V_condensed is not None:
            V = np.full_like(T, float(self.V_condensed))
            vtxt = f"given {self.phase} volume {self.V_condensed:.4g} m³/mol"
        elif self.phase == "liquid":
            V = rackett_volume(T, self.Tc, self.Pc, self.omega, self.Z_RA)
            vtxt = "Rackett liquid volume" + (" (Yamada-Gunn Z_RA)" if self.Z_RA is None else "")
        else:
            V = np.zeros_like(T)
            vtxt = "solid volume neglected"
        return DeltaZCorrection(T=T, P=P, B=B, V_condensed=V, delta_z=delta_z(T, P, B, V),
                                description=f"Δz from {btxt} and {vtxt}")


IDEAL_DESCRIPTION = "ideal gas, negligible condensed volume (Δz = 1)"


@dataclass(frozen=True)
class ImpliedEnthalpy:
    """Enthalpy implied by a vapor-pressure curve at temperatures T.

    Attributes
    ----------
    T, P : ndarray
        [K], [Pa] (P from the curve unless given).
    dH_apparent, u_dH_apparent : ndarray
        -R d ln p/d(1/T) and its standard uncertainty [J/mol] (NaN without covariance).
    delta_z : ndarray
        Δz applied.
    dH, u_dH : ndarray
        Corrected enthalpy = apparent × Δz and its uncertainty (Δz taken as exact) [J/mol].
    correction : str
        Exactly what was applied.
    """

    T: np.ndarray
    P: np.ndarray
    dH_apparent: np.ndarray
    u_dH_apparent: np.ndarray
    delta_z: np.ndarray
    dH: np.ndarray
    u_dH: np.ndarray
    correction: str

    def summary(self) -> str:
        """A table of the implied enthalpy at each temperature.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        rows = [f"enthalpy implied by the curve; correction: {self.correction}",
                "   T/K      apparent/(kJ/mol)   Δz        ΔH/(kJ/mol)"]
        for i in range(self.T.size):
            rows.append(f"  {self.T[i]:8.3f}  {self.dH_apparent[i] / 1e3:9.4f} ± {self.u_dH_apparent[i] / 1e3:.2g}"
                        f"  {self.delta_z[i]:.5f}  {self.dH[i] / 1e3:9.4f} ± {self.u_dH[i] / 1e3:.2g}")
        return "\n".join(rows)


def implied_enthalpy(fit_or_eq, T, P=None, correction=None) -> ImpliedEnthalpy:
    """Apparent and real-gas-corrected enthalpy of vaporization/sublimation.

    Parameters
    ----------
    fit_or_eq : VaporPressureFit or equation
        The curve (an object, no unit).  With a fit, uncertainties come
        from its covariance.
    T : array_like
        Temperature [K].
    P : array_like, optional
        Pressure [Pa]; default the curve's own pressure at T.
    correction : None, 'ideal', RealGasModel, DeltaZCorrection or array_like
        Δz [-].  None/'ideal': Δz = 1.  A :class:`RealGasModel` is evaluated
        at (T, P).  A number or array is used as Δz directly.

    Returns
    -------
    ImpliedEnthalpy
        Apparent and corrected enthalpies [J/mol] and Δz [-] at `T` [K].
    """
    eq, cov = _equation_and_cov(fit_or_eq)
    Ta = np.atleast_1d(as_temperature(T))
    Pa = eq.p(Ta) if P is None else np.broadcast_to(np.asarray(P, dtype=float), Ta.shape).copy()
    app = np.atleast_1d(apparent_enthalpy(eq, Ta))
    u_app = (np.atleast_1d(enthalpy_uncertainty(fit_or_eq, Ta)) if cov is not None
             else np.full_like(app, np.nan))
    if correction is None or (isinstance(correction, str) and correction == "ideal"):
        dz = np.ones_like(Ta)
        text = IDEAL_DESCRIPTION
    elif isinstance(correction, RealGasModel):
        c = correction.evaluate(Ta, Pa)
        dz, text = c.delta_z, c.description
    elif isinstance(correction, DeltaZCorrection):
        if correction.delta_z.size != Ta.size:
            raise ValueError("the Δz correction was evaluated at other temperatures")
        dz, text = correction.delta_z, correction.description
    elif isinstance(correction, str):
        raise ValueError(f"unknown correction {correction!r}")
    else:
        dz = np.broadcast_to(np.asarray(correction, dtype=float), Ta.shape).copy()
        if not (np.all(np.isfinite(dz)) and np.all(dz > 0)):
            raise ValueError("Δz must be finite and positive")
        text = "Δz given by the caller"
    return ImpliedEnthalpy(T=Ta, P=Pa, dH_apparent=app, u_dH_apparent=u_app, delta_z=dz,
                           dH=app * dz, u_dH=u_app * dz, correction=text)


# -- local enthalpy and steps --------------------------------------------------------
@dataclass(frozen=True)
class LocalEnthalpy:
    """Apparent enthalpy from sliding windows of neighbouring points (ordered by T).

    Attributes
    ----------
    T_center : ndarray
        1/mean(1/T) of each window [K].
    dH, u_dH : ndarray
        Apparent enthalpy -R b of the local fit ln P = a + b/T and its
        standard uncertainty [J/mol].
    start, stop : ndarray of int
        Window k covers ``order[start[k]:stop[k]]``.
    order : ndarray of int
        Indices that sort the input by T.
    scale_estimated : bool
        True when no uncertainties were given (u from each window's scatter,
        with only window - 2 degrees of freedom).
    """

    T_center: np.ndarray
    dH: np.ndarray
    u_dH: np.ndarray
    start: np.ndarray
    stop: np.ndarray
    order: np.ndarray
    scale_estimated: bool


def local_enthalpy(T, P, u_T=None, u_P=None, window: int = 5) -> LocalEnthalpy:
    """Apparent enthalpy from local two-parameter fits over sliding windows.

    Each window spans `window` neighbouring *distinct* temperatures, with
    every replicate measured at them, and is fitted with ln P = a + b/T by
    weighted least squares with the effective variance (u_T counted through
    the local slope); without uncertainties the window's own residual scale
    sets u.  Counting distinct temperatures keeps replicate measurements
    (several points at one T, common in published data) from forming a
    window that holds no slope information.

    Parameters
    ----------
    T, P : array_like
        Temperatures [K] and pressures [Pa].
    u_T, u_P : array_like, optional
        Standard uncertainties [K], [Pa].
    window : int
        Distinct temperatures per window (a count, at least 3).

    Returns
    -------
    LocalEnthalpy
        Window temperatures [K] and apparent enthalpies with uncertainties
        [J/mol].

    Raises
    ------
    InsufficientData
        Fewer distinct temperatures than `window`.
    """
    from .fitting import fit_equation  # lazy: fitting imports this module

    T, P = as_data(T, P)
    n = T.size
    window = int(window)
    if window < 3:
        raise ValueError("local windows need at least 3 temperatures")
    order = np.argsort(T, kind="stable")
    Ts, Ps = T[order], P[order]
    # index of the first point of each distinct temperature, and the end
    firsts = np.concatenate([np.flatnonzero(np.diff(Ts, prepend=-np.inf) > 0), [n]])
    n_T = firsts.size - 1
    if n_T < window:
        raise InsufficientData(f"windows of {window} temperatures need at least {window} distinct "
                               f"temperatures; got {n} points at {n_T}")
    given = u_T is not None or u_P is not None
    uT = as_uncertainty(u_T, n, "u_T")[order]
    uP = as_uncertainty(u_P, n, "u_P")[order]
    Tc, dH, u = [], [], []
    starts = firsts[:n_T - window + 1]
    stops = firsts[window:]
    for a, b in zip(starts, stops):
        sl = slice(int(a), int(b))
        fit = fit_equation(Ts[sl], Ps[sl], "cc2", uT[sl] if given else None, uP[sl] if given else None,
                           robust=False)
        Tc.append(fit.T_ref)
        dH.append(-R * fit.params[1])
        u.append(R * fit.standard_errors[1])
    return LocalEnthalpy(T_center=np.array(Tc), dH=np.array(dH), u_dH=np.array(u),
                         start=np.asarray(starts, dtype=int), stop=np.asarray(stops, dtype=int), order=order,
                         scale_estimated=not given)


@dataclass(frozen=True)
class WindowDepartures:
    """Local enthalpies of a fit's own points against the fit's smooth ΔH(T).

    Attributes
    ----------
    T_center : ndarray
        Temperature of each window [K]: 1/x̄, x̄ the weighted mean of 1/T, where
        the local slope is uncorrelated with the local level.
    dH, u_dH : ndarray
        Local apparent enthalpy −R·b of the window's weighted straight line
        ln P = a + b/T, and its standard uncertainty from the points' σ [J/mol].
    smooth, u_smooth : ndarray
        The fit's apparent enthalpy at ``T_center`` and its standard
        uncertainty (delta method) [J/mol].
    departure, u_departure : ndarray
        dH − smooth and its standard uncertainty [J/mol], counting the
        covariance of the two (the window's points are in the fit); NaN when
        the difference is numerically certain (the window is the whole fit).
    start, stop : ndarray of int
        Window k covers ``order[start[k]:stop[k]]``.
    order : ndarray of int
        Indices of the fit's points sorted by group, then T.
    """

    T_center: np.ndarray
    dH: np.ndarray
    u_dH: np.ndarray
    smooth: np.ndarray
    u_smooth: np.ndarray
    departure: np.ndarray
    u_departure: np.ndarray
    start: np.ndarray
    stop: np.ndarray
    order: np.ndarray


def window_departures(fit, window: int = 5, groups=None) -> WindowDepartures:
    """Local enthalpies from sliding windows of a fit's points, against that fit.

    Each window spans `window` neighbouring distinct temperatures (with every
    replicate at them) *within one group* — one source of a compilation, so
    that two series' levels never make a slope — and is fitted with the
    straight line ln P = a + b/T weighted by the σ the fit itself used
    (``fit.sigma_lnP_scaled``).  Those σ are taken as known: a window of
    five points has only three degrees of freedom, and a scale estimated
    from them ranges over a factor of ten by chance (and is zero for values
    printed alike).

    Both the local and the smooth enthalpy are linear in the same ln P, so
    the variance of their difference is

        u_w² + u_s² − 2 cov,   cov = R² Σ_i a_i · (G C J_iᵀ),

    a_i the window slope's weight of point i, G the gradient of
    d ln p/d(1/T) at the window's temperature with respect to the fit's
    parameters, C their covariance and J_i the gradient of ln p at point i.
    For an efficient fit this is u_w² − u_s² (Hausman 1978): counting the
    curve's own uncertainty without the correlation would double-count it.

    Parameters
    ----------
    fit : VaporPressureFit
        The fit of record (its ``T``, ``P``, ``sigma_lnP``, ``weights``,
        ``covariance`` and equation); points of zero weight are left out.
        (An object, no unit.)
    window : int
        Distinct temperatures per window (a count, at least 3).
    groups : sequence, optional
        Labels, one per point of the fit (e.g. its source); windows never span two.

    Returns
    -------
    WindowDepartures
        Window temperatures [K], local and smooth enthalpies and their
        difference with its uncertainty [J/mol].  Empty arrays when no group has `window` distinct temperatures.

    References
    ----------
    J. A. Hausman, "Specification tests in econometrics", Econometrica 46,
    1251-1271 (1978), doi:10.2307/1913827 — variance of the difference of an
    efficient and a consistent estimator.

    Notes
    -----
    Verified in ``tests/thermo/test_window_departures.py`` against
    IAPWS-95 slopes and by a Monte Carlo of the departures' spread.
    """
    window = int(window)
    if window < 3:
        raise ValueError("local windows need at least 3 temperatures")
    T = np.asarray(fit.T, float)
    y = np.log(np.asarray(fit.P, float))
    sig = np.asarray(fit.sigma_lnP_scaled, float)
    used = (np.asarray(fit.weights, float) > 0) & np.isfinite(sig) & (sig > 0)
    labels = np.asarray([""] * T.size if groups is None else [str(g) for g in groups], dtype=object)
    if labels.size != T.size:
        raise ValueError("groups must give one label per point of the fit")
    _, code = np.unique(labels, return_inverse=True)
    idx = np.flatnonzero(used)
    order = idx[np.lexsort((T[idx], code[idx]))]
    Ts, ys, ws, gs = T[order], y[order], 1.0 / sig[order] ** 2, code[order]
    new_T = np.diff(Ts, prepend=-np.inf) > 0
    new_group = np.diff(gs, prepend=-1) != 0
    firsts = np.flatnonzero(new_T | new_group)
    starts, stops = [], []
    for g in np.unique(gs):
        f = firsts[gs[firsts] == g]
        end = int(np.flatnonzero(gs == g)[-1]) + 1
        bounds = np.concatenate([f, [end]])
        for k in range(bounds.size - 1 - window + 1):
            starts.append(int(bounds[k]))
            stops.append(int(bounds[k + window]))
    eq, C = _equation_and_cov(fit)
    m = len(starts)
    Tc, dH, u_w = (np.empty(m) for _ in range(3))
    if m:
        J = eq.jacobian_ln_p(Ts)
        pull = np.empty((m, J.shape[1]))  # Σ_i a_i J_i of each window
    for k, (a, b) in enumerate(zip(starts, stops)):
        x, yy, w = 1.0 / Ts[a:b], ys[a:b], ws[a:b]
        xbar = float(np.sum(w * x) / np.sum(w))
        dx = x - xbar
        Sxx = float(np.sum(w * dx ** 2))
        slope_weight = w * dx / Sxx
        Tc[k] = 1.0 / xbar
        dH[k] = -R * float(slope_weight @ yy)
        u_w[k] = R / math.sqrt(Sxx)
        pull[k] = slope_weight @ J[a:b]
    # G of every window at once: one gradient call per window made a 20 000-point audit
    # spend seconds here
    cov = R ** 2 * np.einsum("kp,kp->k", pull, eq.param_gradient("dlnp_dinvT", Tc) @ C.T) if m else np.empty(0)
    smooth = np.atleast_1d(apparent_enthalpy(eq, Tc)) if m else np.empty(0)
    u_s = np.atleast_1d(enthalpy_uncertainty(fit, Tc)) if m else np.empty(0)
    var = u_w ** 2 + u_s ** 2 - 2 * cov
    # rounding: a difference whose variance is a sliver of the window's own is numerically certain
    u_dep = np.where(var > 1e-12 * u_w ** 2, np.sqrt(np.clip(var, 0.0, None)), np.nan)
    return WindowDepartures(T_center=Tc, dH=dH, u_dH=u_w, smooth=smooth, u_smooth=u_s, departure=dH - smooth,
                            u_departure=u_dep, start=np.asarray(starts, dtype=int),
                            stop=np.asarray(stops, dtype=int), order=order)


@dataclass(frozen=True)
class EnthalpyStep:
    """Most likely step of ΔH(T) along T (see :func:`enthalpy_steps`).

    Attributes
    ----------
    T_step : float
        Temperature of the step [K] (between two neighbouring points).
    split : int
        Number of T-sorted points below the step (a count).
    dH_step, u_dH_step : float
        ΔH above minus ΔH below [J/mol] and standard uncertainty.
    F, p_value : float
        F statistic of the step vs no step, nominal p-value [-].
    p_value_adjusted : float
        Bonferroni-adjusted [-] over the `n_tested` candidate positions (the
        nominal value is optimistic because the best position was picked).
    n_tested : int
        Number of candidate positions tested (a count).
    """

    T_step: float
    split: int
    dH_step: float
    u_dH_step: float
    F: float
    p_value: float
    p_value_adjusted: float
    n_tested: int


def running_moments(x, w, Z=None):
    """Weighted running sums over the first k points, k = 1..n, in O(n).

    The co-moment C_k = Σ_{i<k} w_i (x_i − x̄_k)² is accumulated with the
    weighted Welford update w_k (x_k − x̄_{k−1})(x_k − x̄_k), whose terms are
    never negative, so it keeps its digits where the expanded Σw x² − W x̄²
    would cancel; centre x first (e.g. on its overall weighted mean) so the
    running means are themselves exact to rounding.

    Parameters
    ----------
    x, w : ndarray, shape (n,)
        Values [unit of x] (e.g. 1/T [1/K]) and positive weights [unit of w].
    Z : ndarray, shape (n, q), optional
        Further columns [unit of Z] whose running sums Σ Z and Σ Z·x are wanted.

    Returns
    -------
    W, mean, C : ndarray, shape (n,)
        Σ w [unit of w], weighted mean of x [unit of x] and co-moment
        [unit of w × (unit of x)²] over the first k points.
    SZ, SZx : ndarray, shape (n, q)
        Only when Z is given: Σ Z [unit of Z] and Σ Z·x [unit of Z × unit
        of x] over the first k points.
    """
    W = np.cumsum(w)
    mean = np.cumsum(w * x) / W
    prev = np.concatenate([x[:1], mean[:-1]])
    C = np.cumsum(w * (x - prev) * (x - mean))
    if Z is None:
        return W, mean, C
    return W, mean, C, np.cumsum(Z, axis=0), np.cumsum(Z * x[:, None], axis=0)


def running_comoment(x, y, w, mean_x, mean_y):
    """Σ_{i<k} w_i (x_i − x̄_k)(y_i − ȳ_k) for k = 1..n by the same update as
    :func:`running_moments` (running means passed in) [units of x·y].

    Parameters
    ----------
    x, y : ndarray, shape (n,)
        Values [unit of x], [unit of y] (e.g. 1/T [1/K] and ln P [ln Pa]).
    w : ndarray, shape (n,)
        Positive weights [unit of w].
    mean_x, mean_y : ndarray, shape (n,)
        Running weighted means of x and y over the first k points
        [unit of x], [unit of y] (from :func:`running_moments`).

    Returns
    -------
    ndarray, shape (n,)
        Co-moment over the first k points [unit of w × unit of x × unit of y].
    """
    prev_x = np.concatenate([x[:1], mean_x[:-1]])
    return np.cumsum(w * (x - prev_x) * (y - mean_y))


#: splits whose fast estimate is this close (relative to the no-step χ²) to the
#: best are refitted exactly; the fast update's rounding is far below it
_REFIT_RELATIVE = 1e-8
_REFIT_MAX = 16


def _refit_candidates(rss_fast, scale, exact):
    """Indices of the candidates to refit exactly and the winner among them.

    ``exact(i)`` returns (rss, payload) for candidate i; the first of equal
    exact values wins, as in a scan in order.
    """
    finite = np.isfinite(rss_fast)
    if not finite.any():
        return None
    lo = float(np.min(rss_fast[finite]))
    near = np.flatnonzero(finite & (rss_fast <= lo + _REFIT_RELATIVE * max(scale, abs(lo))))
    if near.size > _REFIT_MAX:
        near = np.sort(near[np.argsort(rss_fast[near], kind="stable")[:_REFIT_MAX]])
    best = None
    for i in near:
        rss, payload = exact(int(i))
        if best is None or rss < best[0]:
            best = (rss, int(i), payload)
    return best


def _smooth_columns(u, X0, w, k: int) -> np.ndarray:
    """Legendre polynomials of degrees 2 … k + 1 in u scaled to [−1, 1], each made
    orthogonal (weights w) to the columns of X0 and to the ones before it, so that
    they add to the base model only what it cannot already follow; a column left
    with (numerically) nothing is dropped."""
    from numpy.polynomial import legendre

    lo, hi = float(u.min()), float(u.max())
    x = 2.0 * (u - lo) / (hi - lo) - 1.0 if hi > lo else np.zeros_like(u)
    sw = np.sqrt(w)
    basis = [c * sw for c in X0.T]
    kept = []
    for degree in range(2, k + 2):
        col = legendre.legval(x, [0.0] * degree + [1.0]) * sw
        norm0 = np.linalg.norm(col)
        for b in basis:  # Gram–Schmidt, twice against rounding
            col = col - b * (b @ col) / (b @ b)
        for b in basis:
            col = col - b * (b @ col) / (b @ b)
        if norm0 > 0 and np.linalg.norm(col) > 1e-8 * norm0:
            basis.append(col)
            kept.append(col / sw)
    return np.column_stack(kept) if kept else np.empty((u.size, 0))


def enthalpy_steps(T, P, u_T=None, u_P=None, min_points_per_side: int = 4, groups=None, form="cc3",
                   fixed=None, smooth_terms: int = 0) -> EnthalpyStep:
    """Locate a step in the apparent enthalpy along T.

    The base model is ln P = A + B/T + C ln T (ΔH linear in T); a step of
    size Δ at T_k adds a hinge (-Δ/R)·min(0, 1/T - 1/T_k), which keeps
    ln P continuous but changes its slope, i.e. ΔH jumps by Δ.  Every split
    between neighbouring points with at least `min_points_per_side`
    distinct temperatures on each side is tried; the largest F statistic
    wins.  The σ of each point follows the effective variance with the
    slope of the base fit.

    `form` (with its ``fixed`` quantities) replaces the base model, e.g. by
    the form of a branch's fit of record: over a wide range ΔH is not linear
    in T, and precise data would show the base model's own misfit as a step.
    The hinge is then tested in the base model linearized at its fit (its
    Jacobian as base columns, its residuals as response): for a form linear
    in its coefficients this is the same test.

    With `smooth_terms` = k the base model also gets the Legendre polynomials
    of degrees 2 … k + 1 in 1/T (scaled to [−1, 1]) as k further columns: a
    curvature no equation of the family follows — ΔH falling steeply towards
    the critical point, where it goes as (1 − T/Tc)^0.38 (Watson 1943) — is then
    taken up by smooth terms, while a kink (a step in ΔH) is not.

    Parameters
    ----------
    T, P : array_like
        Temperatures [K] and pressures [Pa].
    u_T, u_P : float or array_like, optional
        Standard uncertainties [K], [Pa].
    min_points_per_side : int
        Distinct temperatures each side of a split needs (a count).
    groups : sequence, optional
        Labels, one per point (e.g. its source); each group gets its own level.
    form : type or str
        Name (or class) of the base equation form, as in
        :func:`~audit.thermo.fitting.fit_equation`.
    fixed : dict, optional
        Quantities held fixed in `form`, by name, each in the unit
        :func:`~audit.thermo.fitting.fit_equation` takes ([K] for Tc, [Pa] for Pc).
    smooth_terms : int
        Number of extra Legendre columns in 1/T (a count).

    Returns
    -------
    EnthalpyStep
        The best split: its temperature [K], step size [J/mol] and F test
        (no unit; the units of its fields are in the docstring of
        :class:`EnthalpyStep`).

        With `groups` (a label per point, e.g. its source) the base model gives
        each group a level of its own: two series that agree in slope but not
        in level — a question for the comparison of sources — then make no
        step, while a series whose slope differs from the others' still does.

    Notes
    -----
    O(n) after sorting.  Adding the hinge h lowers the base χ² by
    (hᵀW e₀)²/(h⊥ᵀW h⊥) (e₀ the base residuals, h⊥ the part of h outside
    the base columns), and for h = 1/T − c on one side of the split every
    sum this needs is a running sum in c's powers; the side with the smaller
    Σw h² is used (the two hinges differ by 1/T − c, a base column, so they
    give the same fit).  The few splits within rounding of the best are
    refitted exactly, so the result is that of fitting every split (the
    former O(n²) scan) to rounding.  A split whose hinge lies numerically in
    the span of the base columns is passed over.
    """
    from .fitting import fit_equation  # lazy: fitting imports this module

    T, P = as_data(T, P)
    n = T.size
    m = int(min_points_per_side)
    if m < 2:
        raise ValueError("min_points_per_side must be at least 2")
    order = np.argsort(T, kind="stable")
    Ts, y = T[order], np.log(P[order])
    # distinct temperatures up to and including each sorted point: a side made of
    # replicates at one temperature has no slope of its own
    distinct_upto = np.cumsum(np.diff(Ts, prepend=-np.inf) > 0)
    n_T = int(distinct_upto[-1])
    if n_T < max(2 * m, 6):
        raise InsufficientData(f"need at least {max(2 * m, 6)} distinct temperatures to look for a step; "
                               f"got {n} points at {n_T}")
    given = u_T is not None or u_P is not None
    base = fit_equation(Ts, np.exp(y), form, as_uncertainty(u_T, n, "u_T")[order] if given else None,
                        as_uncertainty(u_P, n, "u_P")[order] if given else None, robust=False, **(fixed or {}))
    w = 1.0 / base.sigma_lnP ** 2
    X0 = base.equation.jacobian_ln_p(Ts)
    y = y - base.equation.ln_p(Ts)  # residuals: the fit's normal equations make them orthogonal to X0
    rss0 = base.chi2
    if smooth_terms > 0:
        X0 = np.column_stack([X0, _smooth_columns(1.0 / Ts, X0, w, int(smooth_terms))])
        b0, _ = weighted_lstsq(X0, y, w)
        rss0 = float(np.sum(w * (y - X0 @ b0) ** 2))
    if groups is not None:
        labels = np.asarray([str(g) for g in groups], dtype=object)
        if labels.size != n:
            raise ValueError("groups must give one label per point")
        names, code = np.unique(labels[order], return_inverse=True)
        if names.size > 1:
            X0 = np.column_stack([X0] + [(code == j).astype(float) for j in range(1, names.size)])
            if n - X0.shape[1] - 1 <= 0:
                raise InsufficientData(f"{n} points cannot hold a level for each of {names.size} groups and a step")
            b0, _ = weighted_lstsq(X0, y, w)
            rss0 = float(np.sum(w * (y - X0 @ b0) ** 2))
    # split k has points 0..k-1 below; candidates as in a scan over k = 1..n-1
    k_all = np.arange(1, n)
    below = distinct_upto[:-1]
    ok = (Ts[1:] != Ts[:-1]) & (below >= m) & (n_T - below >= m)
    ks = k_all[ok]
    if ks.size == 0:
        raise ValueError("no split position with distinct temperatures on both sides")
    inv = 0.5 * (1.0 / Ts[ks - 1] + 1.0 / Ts[ks])

    # base columns orthonormal in the weighted metric; e₀ the weighted base residuals
    sw = np.sqrt(w)
    A = X0 * sw[:, None]
    Q, _ = np.linalg.qr(A / np.linalg.norm(A, axis=0))
    e = sw * y
    for _ in range(2):  # second pass: re-orthogonalise against rounding
        e = e - Q @ (Q.T @ e)
    rss0_fast = float(e @ e)
    u = 1.0 / Ts
    u_mid = float(np.sum(w * u) / np.sum(w))
    uc, cc = u - u_mid, inv - u_mid
    Z = np.column_stack([Q, e]) * sw[:, None]  # hᵀ(√w Q) and hᵀ(√w e₀) are Σ Z·h

    def side(uc_, w_, Z_, idx, c):
        W, mean, C, SZ, SZu = running_moments(uc_, w_, Z_)
        H2 = C[idx] + W[idx] * (mean[idx] - c) ** 2
        Zh = SZu[idx] - c[:, None] * SZ[idx]
        return H2, Zh

    H2_lo, Zh_lo = side(uc, w, Z, ks - 1, cc)                          # points 0..k-1
    H2_hi, Zh_hi = side(uc[::-1], w[::-1], Z[::-1], n - ks - 1, cc)    # points k..n-1
    use_lo = (H2_lo <= H2_hi)[:, None]
    H2 = np.where(use_lo[:, 0], H2_lo, H2_hi)
    Zh = np.where(use_lo, Zh_lo, Zh_hi)
    D = H2 - np.sum(Zh[:, :-1] ** 2, axis=1)
    with np.errstate(divide="ignore", invalid="ignore"):
        rss_fast = np.where(D > 1e-12 * H2, rss0_fast - Zh[:, -1] ** 2 / D, np.inf)

    def exact(i):
        hinge = np.minimum(0.0, 1.0 / Ts - inv[i])
        X = np.column_stack([X0, hinge])
        b, cov = weighted_lstsq(X, y, w)
        return float(np.sum(w * (y - X @ b) ** 2)), (b, cov)

    found = _refit_candidates(rss_fast, rss0_fast, exact)
    if found is None:
        raise InsufficientData("every split's hinge lies in the span of the base model")
    rss1, i, (b, cov) = found
    k, inv_k, tested = int(ks[i]), float(inv[i]), int(ks.size)
    dof = n - X0.shape[1] - 1
    s2 = rss1 / dof
    F = max(rss0 - rss1, 0.0) / s2 if s2 > 0 else math.inf
    p = f_sf(F, 1, dof)
    return EnthalpyStep(T_step=float(1.0 / inv_k), split=int(k), dH_step=float(-R * b[-1]),
                        u_dH_step=float(R * math.sqrt(cov[-1, -1] * s2)), F=float(F), p_value=p,
                        p_value_adjusted=min(1.0, p * tested), n_tested=tested)
