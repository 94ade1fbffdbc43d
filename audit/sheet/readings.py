"""One reading of a sheet's coefficients: what the equation gives (log10 P, ln P
or P), the temperature unit and the pressure unit — and the equation it
makes, in SI.

A sheet equation is a function y(T_u) of the temperature in its unit; under
the reading (b, T_unit, P_unit) it is the vapor pressure

    ln(P/Pa) = ln(b)·y(T_u) + ln(P_unit/Pa)        (y = log_b P)
    ln(P/Pa) = ln y(T_u) + ln(P_unit/Pa)            (y = P itself)

with T_u = s·T/K + o the temperature in T_unit.  :class:`SheetEquation`
implements the interface of :mod:`audit.thermo.equations`, so the implied
enthalpy, the reference comparison and the plots treat it like any fitted
equation.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property
from typing import ClassVar, Mapping

import numpy as np

from ..diagnose.units import TEMPERATURE_SYMBOL
from ..thermo.equations import VaporPressureEquation, _pressure_ln_factor, _temperature_affine, as_temperature

__all__ = ["Reading", "SheetEquation", "equation_for", "y_and_slope", "LOG_FACTOR", "unit_label"]

#: ln of the logarithm base: y = log_b P  →  ln P = LOG_FACTOR[b]·y
LOG_FACTOR = {"log10": math.log(10.0), "ln": 1.0}
#: forms defined in ln P by construction: the reading's base is not theirs to choose
NATURAL_LOG_FORMS = ("wagner-2.5-5", "wagner-3-6", "clarke-glew")
_WAGNER_EXPONENTS = {"wagner-2.5-5": (1.0, 1.5, 2.5, 5.0), "wagner-3-6": (1.0, 1.5, 3.0, 6.0)}


def unit_label(T_unit: str) -> str:
    return TEMPERATURE_SYMBOL.get(T_unit, T_unit)


@dataclass(frozen=True, order=True)
class Reading:
    """What the coefficients give and in which units.

    Attributes
    ----------
    log : {'log10', 'ln', 'none'}
    T_unit : str
        Canonical temperature unit (``'K'``, ``'degC'``, ``'degF'``).
    P_unit : str
        Canonical pressure unit.
    """

    log: str
    T_unit: str
    P_unit: str

    @property
    def label(self) -> str:
        what = {"log10": "log10(P", "ln": "ln(P", "none": "(P"}[self.log]
        return f"{what}/{self.P_unit}) with T in {unit_label(self.T_unit)}"


def y_and_slope(form: str, coefficients: Mapping[str, float], T_u, expression=None):
    """The sheet's equation y(T_u) and dy/dT_u in its own units.

    Parameters
    ----------
    form : str
        One of :data:`audit.sheet.model.SHEET_FORMS`.
    coefficients : mapping
        As printed.
    T_u : array_like
        Temperature in the reading's unit.
    expression : Expression, optional
        The parsed formula of an ``expression`` sheet.

    Returns
    -------
    y, dy_dT : ndarray
        NaN where the equation is not defined (a Wagner form at or above its Tc).
    """
    c = coefficients
    T = np.asarray(T_u, dtype=float)
    with np.errstate(all="ignore"):
        if form in ("antoine", "antoine-extended"):
            x = T + c["C"]
            y = c["A"] - c["B"] / x
            dy = c["B"] / (x * x)
            if form == "antoine-extended":
                D, E, F = c.get("D", 0.0), c.get("E", 0.0), c.get("F", 0.0)
                y = y + D * T + E * T * T + (F * np.log(T) if F else 0.0)
                dy = dy + D + 2.0 * E * T + (F / T if F else 0.0)
            return y, dy
        if form == "clausius-clapeyron":
            return c["A"] - c["B"] / T, c["B"] / (T * T)
        if form in _WAGNER_EXPONENTS:
            Tc = c["Tc"]
            tau = 1.0 - T / Tc
            coef = (c["a"], c["b"], c["c"], c["d"])
            exps = _WAGNER_EXPONENTS[form]
            S = sum(a * tau ** e for a, e in zip(coef, exps))
            S1 = sum(a * e * tau ** (e - 1.0) for a, e in zip(coef, exps))
            y = np.log(c["Pc"]) + Tc / T * S
            dy = -Tc * S / T ** 2 - S1 / T
            bad = ~(tau > 0)
            return np.where(bad, np.nan, y), np.where(bad, np.nan, dy)
        if form == "clarke-glew":
            from ..thermo.equations import ClarkeGlew

            y, dy = np.full(T.shape, np.nan), np.full(T.shape, np.nan)
            try:  # p° = one unit of the sheet's pressure unit: the reading supplies the unit
                eq = ClarkeGlew(dG=c["dG"], dH=c["dH"], dCp=c["dCp"], ddCp_dT=c.get("d_dCp_dT", 0.0),
                                theta=c["theta"], p_ref=1.0, n_terms=4)
            except ValueError:  # a θ no temperature scale has: nowhere defined
                return y, dy
            # the form is defined for T > 0 K only; a reading may put the range below that
            ok = np.isfinite(T) & (T > 0)
            if ok.any():
                y[ok], dy[ok] = eq.ln_p(T[ok]), eq.dlnp_dT(T[ok])
            return y, dy
        if form == "expression":
            return expression.evaluate(T, c), expression.derivative_T(T, c)
    raise ValueError(f"unknown sheet form {form!r}")


@dataclass(frozen=True)
class SheetEquation(VaporPressureEquation):
    """The sheet's equation under one reading, as ln(P/Pa) of T [K].

    Parameters
    ----------
    form : str
    coefficients : tuple of (name, value)
        As printed (a tuple so that the equation is hashable and picklable).
    reading : Reading
    expression_text : str or None
    """

    form: str
    coefficients: tuple[tuple[str, float], ...]
    reading: Reading
    expression_text: str | None = None

    linear: ClassVar[bool] = False
    form_name: ClassVar[str] = "sheet"
    _names: ClassVar[tuple[str, ...]] = ()

    @cached_property
    def _coef(self) -> dict[str, float]:
        return dict(self.coefficients)

    @cached_property
    def _expression(self):
        if self.expression_text is None:
            return None
        from .expression import parse_expression

        return parse_expression(self.expression_text)

    def _T_u(self, T):
        s, o = _temperature_affine(self.reading.T_unit)
        # a reading may put a printed temperature at or below 0 K (0 read as kelvin): NaN there, so
        # that the reading loses on the evidence instead of stopping the decoding
        T = np.asarray(T, dtype=float)
        return s * np.where(T > 0, T, np.nan) + o, s

    def ln_p(self, T):
        T_u, _ = self._T_u(T)
        y, _ = y_and_slope(self.form, self._coef, T_u, self._expression)
        with np.errstate(all="ignore"):
            if self.reading.log == "none":
                core = np.where(y > 0, np.log(np.where(y > 0, y, 1.0)), np.nan)
            else:
                core = LOG_FACTOR[self.reading.log] * y
        return core + _pressure_ln_factor(self.reading.P_unit)

    def dlnp_dT(self, T):
        T_u, s = self._T_u(T)
        y, dy = y_and_slope(self.form, self._coef, T_u, self._expression)
        with np.errstate(all="ignore"):
            if self.reading.log == "none":
                return np.where(y > 0, dy / y, np.nan) * s
            return LOG_FACTOR[self.reading.log] * dy * s

    def d2lnp_dT2(self, T):
        T = as_temperature(T)
        h = 1e-3
        return (self.dlnp_dT(T + h) - self.dlnp_dT(T - h)) / (2 * h)

    def fixed_parameters(self) -> dict:
        return {}

    def to_dict(self) -> dict:
        return {"form": self.form, "parameters": dict(self.coefficients),
                "reading": {"gives": self.reading.log, "T_unit": self.reading.T_unit,
                            "P_unit": self.reading.P_unit},
                **({"expression": self.expression_text} if self.expression_text else {})}

    def describe(self) -> str:
        what = self.expression_text or self.form
        return f"{what} giving {self.reading.label}"


def equation_for(sheet, reading: Reading) -> SheetEquation:
    """The sheet's equation under ``reading``."""
    return SheetEquation(sheet.form, tuple(sorted(sheet.coefficients.items())), reading, sheet.expression)
