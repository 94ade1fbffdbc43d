"""Vapor-pressure equation forms.

Every form is a frozen dataclass holding its parameters.  Whatever units the
parameters are quoted in, the methods take the temperature in kelvin and work
with the natural logarithm of the pressure in pascal:

``ln_p(T)``
    ln(P/Pa).
``dlnp_dT(T)``, ``d2lnp_dT2(T)``
    First and second temperature derivatives [1/K], [1/K^2].
``dlnp_dinvT(T)``
    d ln P / d(1/T) = -T^2 d ln P/dT [K]; -R times it is the apparent
    (Clausius-Clapeyron) enthalpy.
``p(T)``
    Pressure [Pa].

Forms that are linear in their parameters once some quantities are held fixed
(the reference temperature of Clarke-Glew, Tc and Pc of Wagner) expose
``design_matrix(T)`` (columns d ln P / d parameter), ``design_offset(T)`` (the
part of ln P that does not depend on the parameters) and the classmethod
``from_coefficients(vector, **fixed)``, so that fitting is a weighted linear
least-squares problem.  The Antoine form is nonlinear.

References
----------
.. [1] B. P. E. Clapeyron (1834); R. Clausius (1850): d ln p / d(1/T) = -ΔH/(RΔz).
.. [2] C. Antoine, C. R. Acad. Sci. 107, 681-684 and 836-837 (1888).
.. [3] E. C. W. Clarke and D. N. Glew, "Evaluation of thermodynamic functions
   from equilibrium constants", Trans. Faraday Soc. 62, 539-547 (1966),
   doi:10.1039/TF9666200539.
.. [4] W. Wagner, "New vapour pressure measurements for argon and nitrogen and
   a new method for establishing rational vapour pressure equations",
   Cryogenics 13, 470-482 (1973), doi:10.1016/0011-2275(73)90003-9.
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass, fields, replace
from typing import ClassVar, Sequence

import numpy as np

from ..units import kelvin_affine, pascal_per
from .constants import P_ATM, R

__all__ = [
    "VaporPressureEquation",
    "ClausiusClapeyron2",
    "ClausiusClapeyron3",
    "Antoine",
    "ClarkeGlew",
    "Wagner",
    "antoine_convert",
    "FORMS",
    "get_form",
    "ln_p_where_defined",
]

_LN10 = math.log(10.0)


def as_temperature(T) -> np.ndarray:
    """Return `T` as a float array, raising ``ValueError`` unless finite and > 0 K.

    Parameters
    ----------
    T : float or array_like
        Temperature(s) [K].

    Returns
    -------
    ndarray
        The same temperatures as floats [K] (0-d for a scalar).

    Examples
    --------
    >>> as_temperature(273.16).item()
    273.16
    """
    arr = np.asarray(T, dtype=float)
    if arr.size == 0:
        raise ValueError("temperature array is empty")
    # two reductions instead of four temporaries: called ~10⁴ times per audit; a NaN fails
    # the first comparison, an infinity the second
    if not (arr.min() > 0 and arr.max() < math.inf):
        raise ValueError("temperatures must be finite and above 0 K")
    return arr


class VaporPressureEquation:
    """Common interface of the vapor-pressure equation forms (abstract)."""

    #: Whether ln P is linear in the fitted parameters (with the fixed ones held).
    linear: ClassVar[bool] = True
    #: Short machine name of the form.
    form_name: ClassVar[str] = ""
    #: Names of the fitted parameters, in vector order.
    _names: ClassVar[tuple[str, ...]] = ()
    _units: ClassVar[tuple[str, ...]] = ()

    # -- interface every form implements -------------------------------------------
    def design_offset(self, T) -> np.ndarray:
        """Part of ln P not multiplied by a fitted parameter (linear forms).

        Zero unless a form holds a fixed quantity in ln P (Clarke–Glew's
        ln p_ref, Wagner's ln Pc), which then overrides this.

        Parameters
        ----------
        T : array_like
            Temperature [K].

        Returns
        -------
        ndarray
            Zeros [ln Pa], one per temperature.
        """
        return np.zeros_like(np.atleast_1d(as_temperature(T)))

    def ln_p(self, T):  # pragma: no cover - abstract
        """Natural logarithm of the vapor pressure.

        Parameters
        ----------
        T : float or array_like
            Temperature [K].

        Returns
        -------
        float or ndarray
            ln(P/Pa) [ln Pa].
        """
        raise NotImplementedError

    def dlnp_dT(self, T):  # pragma: no cover - abstract
        """First temperature derivative of ln P.

        Parameters
        ----------
        T : float or array_like
            Temperature [K].

        Returns
        -------
        float or ndarray
            d ln P/dT [1/K].
        """
        raise NotImplementedError

    def d2lnp_dT2(self, T):  # pragma: no cover - abstract
        """Second temperature derivative of ln P.

        Parameters
        ----------
        T : float or array_like
            Temperature [K].

        Returns
        -------
        float or ndarray
            d² ln P/dT² [1/K²].
        """
        raise NotImplementedError

    def describe(self) -> str:  # pragma: no cover - abstract
        raise NotImplementedError

    # -- shared ---------------------------------------------------------------------
    def dlnp_dinvT(self, T):
        """d ln P / d(1/T) = -T^2 d ln P/dT [K].

        Parameters
        ----------
        T : float or array_like
            Temperature [K].

        Returns
        -------
        float or ndarray
            d ln P/d(1/T) [K]; times -R it is the apparent enthalpy.
        """
        T = as_temperature(T)
        return -T * T * self.dlnp_dT(T)

    def p(self, T):
        """Pressure [Pa].

        Parameters
        ----------
        T : float or array_like
            Temperature [K].

        Returns
        -------
        float or ndarray
            Vapor pressure exp(ln_p(T)) [Pa].
        """
        return np.exp(self.ln_p(T))

    @property
    def parameter_names(self) -> tuple[str, ...]:
        return self._names

    @property
    def parameter_units(self) -> tuple[str, ...]:
        return self._units

    @property
    def params(self) -> np.ndarray:
        """The fitted parameters as a vector (order of `parameter_names`)."""
        return np.array([getattr(self, n) for n in self.parameter_names], dtype=float)

    @property
    def n_params(self) -> int:
        return len(self.parameter_names)

    def fixed_parameters(self) -> dict:
        """The quantities held fixed when fitting (keyword arguments of the form).

        Returns
        -------
        dict
            Name to value, each in the unit the form's constructor takes
            (no unit as a whole; e.g. [K] for Tc, [Pa] for Pc).
        """
        return {f.name: getattr(self, f.name) for f in fields(self)
                if f.init and f.name not in self.parameter_names}

    def with_params(self, vector) -> "VaporPressureEquation":
        """A copy with the fitted parameters replaced by `vector`.

        Parameters
        ----------
        vector : array_like, shape (n_params,)
            New parameter values, in the order and units of ``parameter_names``
            and ``parameter_units`` [units of parameter_units].

        Returns
        -------
        VaporPressureEquation
            Same form and fixed quantities, new parameters (no unit; the units
            of its fields are in the docstring of
            :class:`VaporPressureEquation`).
        """
        vector = np.asarray(vector, dtype=float).ravel()
        if vector.size != self.n_params:
            raise ValueError(f"{type(self).__name__} takes {self.n_params} parameters, got {vector.size}")
        return replace(self, **{n: float(v) for n, v in zip(self.parameter_names, vector)})

    def to_dict(self) -> dict:
        """JSON-ready description: form, parameters with units, fixed quantities.

        Returns
        -------
        dict
            ``form`` (the class name), ``parameters`` (name to value, each in
            the unit given under ``units``), ``units`` (name to unit label) and
            ``fixed`` (as :meth:`fixed_parameters`).
        """
        return {
            "form": type(self).__name__,
            "parameters": {n: float(getattr(self, n)) for n in self.parameter_names},
            "units": dict(zip(self.parameter_names, self.parameter_units)),
            "fixed": {k: (float(v) if isinstance(v, (int, float)) and not isinstance(v, bool) else v)
                      for k, v in self.fixed_parameters().items()},
        }

    def param_gradient(self, quantity: str, T) -> np.ndarray:
        """Gradient of ``quantity(T)`` with respect to the fitted parameters.

        Parameters
        ----------
        quantity : {'ln_p', 'dlnp_dT', 'd2lnp_dT2', 'dlnp_dinvT'}
            Name of the method to differentiate (a name, no unit).
        T : array_like
            Temperature [K].

        Returns
        -------
        ndarray, shape (len(T), n_params)
            ∂quantity/∂parameter [unit of quantity per unit of parameter].
            Exact for the linear forms (evaluation with unit coefficient
            vectors); central differences for nonlinear forms unless overridden.
        """
        T = np.atleast_1d(as_temperature(T))
        k = self.n_params
        out = np.empty((T.size, k))
        if self.linear:
            fixed = self.fixed_parameters()
            base = getattr(type(self).from_coefficients(np.zeros(k), **fixed), quantity)(T)
            for j in range(k):
                e = np.zeros(k)
                e[j] = 1.0
                out[:, j] = getattr(type(self).from_coefficients(e, **fixed), quantity)(T) - base
            return out
        p0 = self.params
        for j in range(k):
            h = 1e-6 * max(abs(p0[j]), 1.0)
            up, dn = p0.copy(), p0.copy()
            up[j] += h
            dn[j] -= h
            out[:, j] = (getattr(self.with_params(up), quantity)(T)
                         - getattr(self.with_params(dn), quantity)(T)) / (2 * h)
        return out

    def jacobian_ln_p(self, T) -> np.ndarray:
        """d ln P / d parameters, shape (len(T), n_params).

        Parameters
        ----------
        T : array_like
            Temperature [K].

        Returns
        -------
        ndarray, shape (len(T), n_params)
            ∂ ln P/∂parameter [ln Pa per unit of parameter].
        """
        return self.param_gradient("ln_p", T)


# ---------------------------------------------------------------------------------
@dataclass(frozen=True)
class ClausiusClapeyron2(VaporPressureEquation):
    """Two-parameter Clausius-Clapeyron form, ln(P/Pa) = A + B/T.

    Parameters
    ----------
    A : float
        Intercept [ln Pa] (ln P extrapolated to 1/T = 0; equals ΔS/R + ln p°).
    B : float
        Slope d ln P / d(1/T) [K]; B = -ΔH/R for a constant apparent enthalpy ΔH.

    References
    ----------
    R. Clausius, Ann. Phys. 155, 500 (1850), doi:10.1002/andp.18501550403.
    """

    A: float
    B: float

    form_name: ClassVar[str] = "clausius-clapeyron-2"
    _names: ClassVar[tuple[str, ...]] = ("A", "B")
    _units: ClassVar[tuple[str, ...]] = ("ln Pa", "K")

    def ln_p(self, T):
        T = as_temperature(T)
        return self.A + self.B / T

    def dlnp_dT(self, T):
        T = as_temperature(T)
        return -self.B / (T * T)

    def d2lnp_dT2(self, T):
        T = as_temperature(T)
        return 2.0 * self.B / T ** 3

    def design_matrix(self, T) -> np.ndarray:
        """Columns of the linear model ln P = X b + offset.

        Parameters
        ----------
        T : array_like
            Temperature [K].

        Returns
        -------
        ndarray, shape (len(T), 2)
            Basis [1, 1/T] [-], [1/K].
        """
        T = np.atleast_1d(as_temperature(T))
        return np.column_stack([np.ones_like(T), 1.0 / T])

    @classmethod
    def from_coefficients(cls, vector, **fixed) -> "ClausiusClapeyron2":
        """Build the form from a coefficient vector of :meth:`design_matrix`.

        Parameters
        ----------
        vector : array_like, shape (2,)
            (A [ln Pa], B [K]).
        **fixed
            Unused: this form holds nothing fixed.

        Returns
        -------
        ClausiusClapeyron2
            The equation with these coefficients (no unit; the units of its
            fields are in the docstring of :class:`ClausiusClapeyron2`).
        """
        a, b = np.asarray(vector, dtype=float)
        return cls(A=float(a), B=float(b))

    def describe(self) -> str:
        """The equation and the meaning of its parameters.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        return (f"ln(P/Pa) = A + B/T with A = {self.A:.6g} (ln P at 1/T -> 0) and "
                f"B = {self.B:.6g} K (= -ΔH/R: constant apparent enthalpy "
                f"{-R * self.B / 1000:.4g} kJ/mol)")


@dataclass(frozen=True)
class ClausiusClapeyron3(VaporPressureEquation):
    """Three-parameter Clausius-Clapeyron form with constant ΔCp.

    ln(P/Pa) = A + B/T + C ln(T/K); the apparent enthalpy is
    ΔH(T) = R (C T - B), so C = ΔCp/R.

    Parameters
    ----------
    A : float
        [ln Pa].
    B : float
        [K]; -B R is the (extrapolated) enthalpy at T = 0.
    C : float
        [-]; ΔCp/R (negative for evaporation of ordinary liquids).

    References
    ----------
    G. R. Kirchhoff (1858) for ΔH(T) linear in T; the integrated form is the
    classic "Kirchhoff-Rankine" vapor-pressure equation.
    """

    A: float
    B: float
    C: float

    form_name: ClassVar[str] = "clausius-clapeyron-3"
    _names: ClassVar[tuple[str, ...]] = ("A", "B", "C")
    _units: ClassVar[tuple[str, ...]] = ("ln Pa", "K", "1")

    def ln_p(self, T):
        T = as_temperature(T)
        return self.A + self.B / T + self.C * np.log(T)

    def dlnp_dT(self, T):
        T = as_temperature(T)
        return -self.B / (T * T) + self.C / T

    def d2lnp_dT2(self, T):
        T = as_temperature(T)
        return 2.0 * self.B / T ** 3 - self.C / (T * T)

    def design_matrix(self, T) -> np.ndarray:
        """Columns of the linear model ln P = X b + offset.

        Parameters
        ----------
        T : array_like
            Temperature [K].

        Returns
        -------
        ndarray, shape (len(T), 3)
            Basis [1, 1/T, ln T] [-], [1/K], [-].
        """
        T = np.atleast_1d(as_temperature(T))
        return np.column_stack([np.ones_like(T), 1.0 / T, np.log(T)])

    @classmethod
    def from_coefficients(cls, vector, **fixed) -> "ClausiusClapeyron3":
        """Build the form from a coefficient vector of :meth:`design_matrix`.

        Parameters
        ----------
        vector : array_like, shape (3,)
            Coefficients of the columns of :meth:`design_matrix`, in the units
            of ``parameter_units`` [ln Pa], [K], [-].
        **fixed
            Unused: this form holds nothing fixed.

        Returns
        -------
        ClausiusClapeyron3
            The equation with these coefficients (no unit; the units of its
            fields are in the docstring of :class:`ClausiusClapeyron3`).
        """
        a, b, c = np.asarray(vector, dtype=float)
        return cls(A=float(a), B=float(b), C=float(c))

    def describe(self) -> str:
        """The equation and the meaning of its parameters.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        return (f"ln(P/Pa) = A + B/T + C ln(T/K) with A = {self.A:.6g}, B = {self.B:.6g} K, "
                f"C = {self.C:.6g} (= ΔCp/R: constant ΔCp = {R * self.C:.4g} J/(mol K); "
                f"ΔH(T) = R(C T - B))")


# ---------------------------------------------------------------------------------
@functools.lru_cache(maxsize=64)
def _pressure_ln_factor(unit: str) -> float:
    """ln(size of one `unit` in pascal) for any spelling :mod:`audit.units` accepts."""
    return math.log(pascal_per(unit))


@functools.lru_cache(maxsize=64)
def _temperature_affine(unit: str) -> tuple[float, float]:
    """(scale, offset) with T_unit = scale * T_K + offset, for any accepted spelling."""
    scale, offset = kelvin_affine(unit)  # T_K = scale * T_unit + offset
    return 1.0 / scale, -offset / scale


def _check_base(base: str) -> float:
    if base == "ln":
        return 1.0
    if base == "log10":
        return _LN10
    raise ValueError(f"Antoine base must be 'ln' or 'log10', got {base!r}")


@dataclass(frozen=True)
class Antoine(VaporPressureEquation):
    """Antoine equation, log_b(P/P_unit) = A - B/(T/T_unit + C).

    Parameters
    ----------
    A : float
        [log_b P_unit].
    B : float
        [T_unit]; positive.
    C : float
        [T_unit]; with T in K typically -40 to -56 K, with T in °C near +230.
    base : {'log10', 'ln'}
        Logarithm base of the published constants.
    P_unit : str
        Pressure unit of the published constants, in any spelling a table
        header may use ('Pa', 'kPa', 'mmHg', 'Torr', 'bar', 'psi', ...; see
        :mod:`audit.units`).
    T_unit : str
        Temperature unit of the published constants ('K', 'degC', '°C',
        'degF', ...; any spelling :mod:`audit.units` accepts).

    Notes
    -----
    The methods still take T in K and return ln(P/Pa).  The apparent enthalpy
    is ΔH = R k B s T^2/(T_u + C)^2 with k = ln b and s = dT_u/dT_K, so it is
    monotonic in T: the form cannot represent a ΔH(T) with changing curvature.

    References
    ----------
    C. Antoine, C. R. Acad. Sci. 107, 681 and 836 (1888).
    """

    A: float
    B: float
    C: float
    base: str = "log10"
    P_unit: str = "Pa"
    T_unit: str = "K"

    linear: ClassVar[bool] = False
    form_name: ClassVar[str] = "antoine"
    _names: ClassVar[tuple[str, ...]] = ("A", "B", "C")

    def __post_init__(self):
        _check_base(self.base)
        _pressure_ln_factor(self.P_unit)
        _temperature_affine(self.T_unit)

    @property
    def parameter_units(self) -> tuple[str, ...]:
        return (f"{self.base}({self.P_unit})", self.T_unit, self.T_unit)

    def _parts(self, T):
        T = as_temperature(T)
        k = _check_base(self.base)
        s, o = _temperature_affine(self.T_unit)
        x = s * T + o + self.C
        return T, k, s, x

    def ln_p(self, T):
        T, k, s, x = self._parts(T)
        return k * (self.A - self.B / x) + _pressure_ln_factor(self.P_unit)

    def dlnp_dT(self, T):
        T, k, s, x = self._parts(T)
        return k * self.B * s / (x * x)

    def d2lnp_dT2(self, T):
        T, k, s, x = self._parts(T)
        return -2.0 * k * self.B * s * s / x ** 3

    def jacobian_ln_p(self, T) -> np.ndarray:
        T, k, s, x = self._parts(np.atleast_1d(T))
        return np.column_stack([np.full_like(x, k), -k / x, k * self.B / (x * x)])

    def converted(self, base: str | None = None, P_unit: str | None = None,
                  T_unit: str | None = None) -> "Antoine":
        """The same curve with constants for another base and units.

        Parameters
        ----------
        base : {'log10', 'ln'}, optional
            Logarithm base of the new constants (a name, no unit); default: this one's.
        P_unit : str, optional
            Name of the new pressure unit (e.g. 'mmHg'); default: this one's.
        T_unit : str, optional
            Name of the new temperature unit (e.g. 'degC'); default: this one's.

        Returns
        -------
        Antoine
            Constants A [log_base(P_unit)], B and C [T_unit] of the same curve.

        Examples
        --------
        Converting mmHg to Pa in log10 adds log10(133.322387415) = 2.1249 to A
        (the mmHg is 13.5951 kg/L × 9.80665 m/s² × 1 mm = 133.322387415 Pa) and
        leaves B and C alone:

        >>> a = Antoine(8.0, 1700.0, -40.0, base="log10", P_unit="mmHg", T_unit="K")
        >>> round(a.converted(P_unit="Pa").A - 8.0, 4)
        2.1249
        """
        return antoine_convert(self, self.base, base or self.base, self.P_unit,
                               P_unit or self.P_unit, self.T_unit, T_unit or self.T_unit)

    def describe(self) -> str:
        """The equation and the meaning of its parameters.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        lg = "log10" if self.base == "log10" else "ln"
        return (f"{lg}(P/{self.P_unit}) = A - B/(T/{self.T_unit} + C) with A = {self.A:.6g}, "
                f"B = {self.B:.6g} {self.T_unit} (sets the enthalpy scale), "
                f"C = {self.C:.6g} {self.T_unit} (curvature; the pole is at T = -C)")


def antoine_convert(params, from_base: str, to_base: str, from_P_unit: str, to_P_unit: str,
                    from_T_unit: str = "K", to_T_unit: str = "K") -> Antoine:
    """Re-express Antoine constants in another logarithm base and units.

    Parameters
    ----------
    params : Antoine or sequence of 3 floats
        (A, B, C) as published for `from_base`, `from_P_unit`, `from_T_unit`:
        A [log_base(P/from_P_unit)], B and C [from_T_unit].
    from_base, to_base : {'log10', 'ln'}
        Name of the logarithm base before and after.
    from_P_unit, to_P_unit : str
        Names of the pressure units, in any spelling :mod:`audit.units` accepts (e.g.
        'mmHg', 'Torr', 'kPa', 'Pa', 'bar').
    from_T_unit, to_T_unit : str
        Names of the temperature units ('K', 'degC', '°C', ...).

    Returns
    -------
    Antoine
        The same curve, constants for the new base and units (no unit; the
        units of its fields are in the docstring of :class:`Antoine`).

    Notes
    -----
    With P2 = g P1 and T2 = a T1 + b (g, a, b from pint, via audit.units):
    A' = (k1 A + ln g)/k2, B' = a B k1/k2, C' = a C - b, where k = ln(base).
    E.g. mmHg -> Pa in log10 adds log10(133.322...) = 2.1249 to A and
    °C -> K gives C' = C - 273.15.
    """
    if isinstance(params, Antoine):
        A, B, C = params.A, params.B, params.C
    else:
        vals = np.asarray(params, dtype=float).ravel()
        if vals.size != 3 or not np.all(np.isfinite(vals)):
            raise ValueError("Antoine constants must be three finite numbers (A, B, C)")
        A, B, C = (float(v) for v in vals)
    k1, k2 = _check_base(from_base), _check_base(to_base)
    ln_g = _pressure_ln_factor(from_P_unit) - _pressure_ln_factor(to_P_unit)
    s1, o1 = _temperature_affine(from_T_unit)
    s2, o2 = _temperature_affine(to_T_unit)
    # T2 = a*T1 + b with T_u = s*T_K + o for each unit.
    a = s2 / s1
    b = o2 - a * o1
    return Antoine(A=(k1 * A + ln_g) / k2, B=a * B * k1 / k2, C=a * C - b,
                   base=to_base, P_unit=to_P_unit, T_unit=to_T_unit)


# ---------------------------------------------------------------------------------
@dataclass(frozen=True)
class ClarkeGlew(VaporPressureEquation):
    """Clarke-Glew expansion about a reference temperature θ.

    R ln(p/p°) = -ΔG°(θ)/θ + ΔH(θ)(1/θ - 1/T) + ΔCp(θ)[θ/T - 1 + ln(T/θ)]
                 + (θ/2)(dΔCp/dT)[T/θ - θ/T - 2 ln(T/θ)]

    The apparent enthalpy is ΔH(T) = ΔH(θ) + ΔCp(θ)(T - θ) + ½ dΔCp/dT (T - θ)^2,
    so the parameters have direct physical meaning at θ.

    Parameters
    ----------
    dG : float
        Standard Gibbs energy of vaporization at θ relative to p° [J/mol]
        (= -R θ ln(p(θ)/p°)).
    dH : float
        Apparent enthalpy at θ [J/mol].
    dCp : float
        Apparent heat-capacity change at θ [J/(mol K)].
    ddCp_dT : float
        Its temperature derivative [J/(mol K^2)].
    theta : float
        Reference temperature θ [K] (held fixed when fitting).
    p_ref : float
        Standard pressure p° [Pa] (default 101325 Pa).
    n_terms : {2, 3, 4}
        How many of (dG, dH, dCp, ddCp_dT) are free; the rest must be 0.

    References
    ----------
    E. C. W. Clarke and D. N. Glew, Trans. Faraday Soc. 62, 539 (1966),
    doi:10.1039/TF9666200539.
    """

    dG: float
    dH: float
    dCp: float = 0.0
    ddCp_dT: float = 0.0
    theta: float = 298.15
    p_ref: float = P_ATM
    n_terms: int = 3

    form_name: ClassVar[str] = "clarke-glew"
    _all_names: ClassVar[tuple[str, ...]] = ("dG", "dH", "dCp", "ddCp_dT")
    _all_units: ClassVar[tuple[str, ...]] = ("J/mol", "J/mol", "J/(mol K)", "J/(mol K^2)")

    def __post_init__(self):
        if self.n_terms not in (2, 3, 4):
            raise ValueError("ClarkeGlew n_terms must be 2, 3 or 4")
        if not (math.isfinite(self.theta) and self.theta > 0):
            raise ValueError("ClarkeGlew reference temperature theta must be > 0 K")
        if not (math.isfinite(self.p_ref) and self.p_ref > 0):
            raise ValueError("ClarkeGlew reference pressure p_ref must be > 0 Pa")
        for name in self._all_names[self.n_terms:]:
            if getattr(self, name) != 0.0:
                raise ValueError(f"ClarkeGlew with n_terms={self.n_terms} needs {name} = 0")

    @property
    def parameter_names(self) -> tuple[str, ...]:
        return self._all_names[: self.n_terms]

    @property
    def parameter_units(self) -> tuple[str, ...]:
        return self._all_units[: self.n_terms]

    def fixed_parameters(self) -> dict:
        """The quantities held fixed when fitting (keyword arguments of the form).

        Returns
        -------
        dict
            Name to value: ``theta`` [K], ``p_ref`` [Pa] and ``n_terms`` (a count).
        """
        return {"theta": self.theta, "p_ref": self.p_ref, "n_terms": self.n_terms}

    def _basis(self, T):
        T = np.atleast_1d(as_temperature(T))
        th = self.theta
        lr = np.log(T / th)
        cols = [np.full_like(T, -1.0 / th), 1.0 / th - 1.0 / T, th / T - 1.0 + lr,
                0.5 * th * (T / th - th / T - 2.0 * lr)]
        return np.column_stack(cols[: self.n_terms]) / R

    def design_matrix(self, T) -> np.ndarray:
        """Columns of the linear model ln P = X b + offset (the Clarke-Glew basis).

        Parameters
        ----------
        T : array_like
            Temperature [K].

        Returns
        -------
        ndarray, shape (len(T), n_terms)
            Basis functions multiplying ΔG, ΔH, ΔCp, dΔCp/dT [mol/J], [mol/J],
            [mol K/J], [mol K²/J].
        """
        return self._basis(T)

    def design_offset(self, T) -> np.ndarray:
        """Part of ln P not multiplied by a fitted parameter: ln p_ref.

        Parameters
        ----------
        T : array_like
            Temperature [K].

        Returns
        -------
        ndarray
            ln(p_ref/Pa) at every T [ln Pa].
        """
        return np.full(np.atleast_1d(as_temperature(T)).shape, math.log(self.p_ref))

    @classmethod
    def from_coefficients(cls, vector, theta: float = 298.15, p_ref: float = P_ATM,
                          n_terms: int | None = None) -> "ClarkeGlew":
        """Build the form from a coefficient vector of :meth:`design_matrix`.

        Parameters
        ----------
        vector : array_like, shape (n_terms,)
            ΔG° [J/mol], ΔH° [J/mol], ΔCp° [J/(mol K)], dΔCp/dT [J/(mol K²)], the
            first `n_terms` of them.
        theta : float
            Reference temperature θ [K].
        p_ref : float
            Standard pressure [Pa].
        n_terms : int, optional
            Number of fitted terms (a count, 2-4); default: ``len(vector)``.

        Returns
        -------
        ClarkeGlew
            The equation with these coefficients (no unit; the units of its
            fields are in the docstring of :class:`ClarkeGlew`).
        """
        v = [float(x) for x in np.asarray(vector, dtype=float).ravel()]
        n = len(v) if n_terms is None else int(n_terms)
        if len(v) != n:
            raise ValueError(f"ClarkeGlew with n_terms={n} takes {n} coefficients, got {len(v)}")
        v += [0.0] * (4 - len(v))
        return cls(dG=v[0], dH=v[1], dCp=v[2], ddCp_dT=v[3], theta=float(theta),
                   p_ref=float(p_ref), n_terms=n)

    def ln_p(self, T):
        T = as_temperature(T)
        th = self.theta
        lr = np.log(T / th)
        rhs = (-self.dG / th + self.dH * (1.0 / th - 1.0 / T)
               + self.dCp * (th / T - 1.0 + lr)
               + 0.5 * th * self.ddCp_dT * (T / th - th / T - 2.0 * lr))
        return math.log(self.p_ref) + rhs / R

    def dlnp_dT(self, T):
        T = as_temperature(T)
        th = self.theta
        d = (self.dH / T ** 2 + self.dCp * (1.0 / T - th / T ** 2)
             + 0.5 * th * self.ddCp_dT * (1.0 / th + th / T ** 2 - 2.0 / T))
        return d / R

    def d2lnp_dT2(self, T):
        T = as_temperature(T)
        th = self.theta
        d = (-2.0 * self.dH / T ** 3 + self.dCp * (-1.0 / T ** 2 + 2.0 * th / T ** 3)
             + 0.5 * th * self.ddCp_dT * (-2.0 * th / T ** 3 + 2.0 / T ** 2))
        return d / R

    def describe(self) -> str:
        """The equation and the meaning of its parameters.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        s = (f"Clarke-Glew expansion about θ = {self.theta:.6g} K, p° = {self.p_ref:.6g} Pa: "
             f"ΔG°(θ) = {self.dG:.6g} J/mol, ΔH(θ) = {self.dH:.6g} J/mol")
        if self.n_terms >= 3:
            s += f", ΔCp(θ) = {self.dCp:.6g} J/(mol K)"
        if self.n_terms >= 4:
            s += f", dΔCp/dT = {self.ddCp_dT:.6g} J/(mol K^2)"
        return s


# ---------------------------------------------------------------------------------
def reduced_power_series(T, Tc: float, coefficients: Sequence[float], exponents: Sequence[float]):
    """f = (Tc/T) Σ a_i τ^e_i with τ = 1 - T/Tc, and its first two T-derivatives.

    Parameters
    ----------
    T : array_like
        Temperature [K]; below `Tc`.
    Tc : float
        Critical (reducing) temperature [K].
    coefficients : sequence of float
        a_i [-].
    exponents : sequence of float
        e_i [-].

    Returns
    -------
    f, df/dT [1/K], d2f/dT2 [1/K^2] : ndarray
        f is dimensionless [-] (ln(P/Pc) for the Wagner form).
    """
    T = as_temperature(T)
    if np.any(T >= Tc):
        raise ValueError(f"reduced (Wagner-type) equations need T below Tc = {Tc} K")
    tau = 1.0 - T / Tc
    S = np.zeros_like(tau)
    S1 = np.zeros_like(tau)
    S2 = np.zeros_like(tau)
    for a, e in zip(coefficients, exponents):
        S = S + a * tau ** e
        S1 = S1 + a * e * tau ** (e - 1.0)
        S2 = S2 + (a * e * (e - 1.0) * tau ** (e - 2.0) if e != 1.0 else 0.0)
    f = Tc / T * S
    df = -Tc * S / T ** 2 - S1 / T
    d2f = 2.0 * Tc * S / T ** 3 + 2.0 * S1 / T ** 2 + S2 / (T * Tc)
    return f, df, d2f


_WAGNER_EXPONENTS = {"2.5-5": (1.0, 1.5, 2.5, 5.0), "3-6": (1.0, 1.5, 3.0, 6.0)}


@dataclass(frozen=True)
class Wagner(VaporPressureEquation):
    """Wagner equation in reduced variables.

    ln(p/pc) = (a τ + b τ^1.5 + c τ^e3 + d τ^e4)/Tr,  τ = 1 - T/Tc, Tr = T/Tc,
    with (e3, e4) = (2.5, 5) for the "2.5-5" form (usual from Tr ≈ 0.5 to Tc)
    or (3, 6) for the original "3-6" form.

    Parameters
    ----------
    a, b, c, d : float
        Coefficients [-].
    Tc : float
        Critical temperature [K] (held fixed when fitting).
    Pc : float
        Critical pressure [Pa] (held fixed when fitting).
    variant : {'2.5-5', '3-6'}

    References
    ----------
    W. Wagner, Cryogenics 13, 470 (1973), doi:10.1016/0011-2275(73)90003-9.
    """

    a: float
    b: float
    c: float
    d: float
    Tc: float = 0.0
    Pc: float = 0.0
    variant: str = "2.5-5"

    form_name: ClassVar[str] = "wagner"
    _names: ClassVar[tuple[str, ...]] = ("a", "b", "c", "d")
    _units: ClassVar[tuple[str, ...]] = ("1", "1", "1", "1")

    def __post_init__(self):
        if self.variant not in _WAGNER_EXPONENTS:
            raise ValueError(f"Wagner variant must be one of {sorted(_WAGNER_EXPONENTS)}, got {self.variant!r}")
        if not (math.isfinite(self.Tc) and self.Tc > 0 and math.isfinite(self.Pc) and self.Pc > 0):
            raise ValueError("Wagner equation needs Tc > 0 K and Pc > 0 Pa")

    @property
    def exponents(self) -> tuple[float, ...]:
        return _WAGNER_EXPONENTS[self.variant]

    def _series(self, T):
        return reduced_power_series(T, self.Tc, (self.a, self.b, self.c, self.d), self.exponents)

    def ln_p(self, T):
        return math.log(self.Pc) + self._series(T)[0]

    def dlnp_dT(self, T):
        return self._series(T)[1]

    def d2lnp_dT2(self, T):
        return self._series(T)[2]

    def design_matrix(self, T) -> np.ndarray:
        """Columns of the linear model ln P = X b + offset.

        Parameters
        ----------
        T : array_like
            Temperature [K]; below Tc.

        Returns
        -------
        ndarray, shape (len(T), 4)
            (Tc/T) τ^e_i for the variant's exponents e_i [-].
        """
        T = np.atleast_1d(as_temperature(T))
        if np.any(T >= self.Tc):
            raise ValueError(f"Wagner equation needs T below Tc = {self.Tc} K")
        tau = 1.0 - T / self.Tc
        return np.column_stack([self.Tc / T * tau ** e for e in self.exponents])

    def design_offset(self, T) -> np.ndarray:
        """Part of ln P not multiplied by a fitted parameter: ln Pc.

        Parameters
        ----------
        T : array_like
            Temperature [K].

        Returns
        -------
        ndarray
            ln(Pc/Pa) at every T [ln Pa].
        """
        return np.full(np.atleast_1d(as_temperature(T)).shape, math.log(self.Pc))

    @classmethod
    def from_coefficients(cls, vector, Tc: float = 0.0, Pc: float = 0.0, variant: str = "2.5-5") -> "Wagner":
        """Build the form from a coefficient vector of :meth:`design_matrix`.

        Parameters
        ----------
        vector : array_like, shape (4,)
            Wagner coefficients a, b, c, d [-].
        Tc : float
            Critical temperature [K].
        Pc : float
            Critical pressure [Pa].
        variant : {'2.5-5', '3-6'}
            Name of the exponent set.

        Returns
        -------
        Wagner
            The equation with these coefficients (no unit; the units of its
            fields are in the docstring of :class:`Wagner`).
        """
        a, b, c, d = (float(x) for x in np.asarray(vector, dtype=float).ravel())
        return cls(a=a, b=b, c=c, d=d, Tc=float(Tc), Pc=float(Pc), variant=variant)

    def describe(self) -> str:
        """The equation and the meaning of its parameters.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        e = self.exponents
        return (f"Wagner {self.variant}: ln(p/pc) = (a τ + b τ^{e[1]:g} + c τ^{e[2]:g} + d τ^{e[3]:g})/Tr, "
                f"τ = 1 - T/Tc, Tc = {self.Tc:.6g} K, pc = {self.Pc:.6g} Pa; a = {self.a:.6g} "
                f"(limiting slope at Tc, related to the acentric factor), b = {self.b:.6g}, "
                f"c = {self.c:.6g}, d = {self.d:.6g} (shape of ΔH(T) away from Tc)")


#: Forms known by short name (for rule profiles and the command line).
FORMS: dict[str, type] = {
    "clausius-clapeyron-2": ClausiusClapeyron2,
    "cc2": ClausiusClapeyron2,
    "clausius-clapeyron-3": ClausiusClapeyron3,
    "cc3": ClausiusClapeyron3,
    "antoine": Antoine,
    "clarke-glew": ClarkeGlew,
    "wagner": Wagner,
}


def get_form(form) -> type:
    """Resolve a form given as a class or a short name.

    Parameters
    ----------
    form : type or str
        A :class:`VaporPressureEquation` subclass, or its short name ('cc2',
        'cc3', 'antoine', 'clarke-glew', 'wagner'); no unit.

    Returns
    -------
    type
        The equation class (no unit).

    Examples
    --------
    >>> get_form("cc2") is ClausiusClapeyron2
    True
    """
    if isinstance(form, type) and issubclass(form, VaporPressureEquation):
        return form
    if isinstance(form, str) and form.lower() in FORMS:
        return FORMS[form.lower()]
    raise ValueError(f"unknown vapor-pressure form {form!r}; known: {sorted(set(FORMS))}")


def ln_p_where_defined(equation: VaporPressureEquation, T) -> np.ndarray:
    """ln P of an equation [ln Pa] at T [K]; NaN where the equation is not defined.

    A reduced (Wagner-type) form is defined below its Tc only, and no form at
    T ≤ 0 or a non-finite T.  Callers that compare a printed row with a curve
    (a row labelled solid at 700 K, say) then skip the row instead of stopping.

    Parameters
    ----------
    equation : VaporPressureEquation
        The curve (an object, no unit).
    T : array_like
        Temperatures [K].

    Returns
    -------
    ndarray
        ln P [ln Pa], NaN outside the domain.

    Examples
    --------
    A Wagner 2.5-5 form with water's critical point (IAPWS R6-95: Tc =
    647.096 K, Pc = 22.064 MPa; coefficients illustrative) is defined below Tc only:

    >>> eq = Wagner(-7.8, 1.8, -2.0, -3.0, Tc=647.096, Pc=22.064e6)
    >>> np.isfinite(ln_p_where_defined(eq, [373.124, 647.096, 700.0, -5.0])).tolist()
    [True, False, False, False]
    """
    T = np.atleast_1d(np.asarray(T, dtype=float))
    out = np.full(T.shape, np.nan)
    ok = np.isfinite(T) & (T > 0)
    Tc = getattr(equation, "Tc", None)
    if isinstance(Tc, (int, float)) and Tc > 0:
        ok &= T < Tc
    if ok.any():
        with np.errstate(all="ignore"):
            out[ok] = equation.ln_p(T[ok])
    return out
