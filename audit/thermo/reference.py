"""Reference vapor-pressure equations of water and ice (IAPWS).

Both are instances with the interface of :mod:`audit.thermo.equations`
(``ln_p``, ``dlnp_dT``, ``d2lnp_dT2``, ``dlnp_dinvT``, ``p``) and carry their
range of validity as ``T_min``/``T_max``.  They evaluate outside the range
too (extrapolation is the caller's decision); ``in_range(T)`` tells.

References
----------
.. [1] W. Wagner and A. Pruss, "International equations for the saturation
   properties of ordinary water substance. Revised according to the
   international temperature scale of 1990", J. Phys. Chem. Ref. Data 22,
   783-787 (1993), doi:10.1063/1.555926; auxiliary equation (2.5) of
   W. Wagner and A. Pruss, J. Phys. Chem. Ref. Data 31, 387 (2002),
   doi:10.1063/1.1461829.
.. [2] IAPWS R14-08(2011); W. Wagner, T. Riethmann, R. Feistel, A. H. Harvey,
   "New equations for the sublimation pressure and melting pressure of H2O
   ice Ih", J. Phys. Chem. Ref. Data 40, 043103 (2011), doi:10.1063/1.3657937.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from typing import ClassVar, Mapping

import numpy as np

from ..units import kelvin_affine, pascal_per
from .constants import WATER_P_CRITICAL, WATER_P_TRIPLE, WATER_T_CRITICAL, WATER_T_TRIPLE
from .equations import FORMS, Antoine, VaporPressureEquation, as_temperature, reduced_power_series

__all__ = [
    "WaterSaturationWagnerPruss",
    "IceSublimationIAPWS2011",
    "WATER_SATURATION",
    "ICE_SUBLIMATION",
    "water_saturation_pressure",
    "ice_sublimation_pressure",
    "REFERENCE_TABLE_KEYS",
    "ReferenceTableError",
    "TabulatedReference",
    "reference_from_table",
]


class _ReferenceEquation(VaporPressureEquation):
    """Fixed reference equation: no fitted parameters."""

    linear: ClassVar[bool] = False
    T_min: ClassVar[float]
    T_max: ClassVar[float]

    def in_range(self, T) -> np.ndarray:
        """True where `T` [K] lies inside the equation's range of validity."""
        T = as_temperature(T)
        return (T >= self.T_min) & (T <= self.T_max)

    def fixed_parameters(self) -> dict:
        return {}


@dataclass(frozen=True)
class WaterSaturationWagnerPruss(_ReferenceEquation):
    """Vapor pressure of liquid water: the IAPWS-95 auxiliary equation [1].

    ln(p/pc) = (Tc/T)(a1 τ + a2 τ^1.5 + a3 τ^3 + a4 τ^3.5 + a5 τ^4 + a6 τ^7.5),
    τ = 1 - T/Tc, Tc = 647.096 K, pc = 22.064 MPa.  Valid from the triple point
    to the critical point; consistent with the full IAPWS-95 formulation to
    better than 0.01 %.
    """

    coefficients: tuple[float, ...] = (-7.85951783, 1.84408259, -11.7866497,
                                       22.6807411, -15.9618719, 1.80122502)
    exponents: tuple[float, ...] = (1.0, 1.5, 3.0, 3.5, 4.0, 7.5)
    Tc: float = WATER_T_CRITICAL
    Pc: float = WATER_P_CRITICAL

    T_min: ClassVar[float] = WATER_T_TRIPLE
    T_max: ClassVar[float] = WATER_T_CRITICAL
    form_name: ClassVar[str] = "iapws95-saturation"

    def ln_p(self, T):
        return math.log(self.Pc) + reduced_power_series(T, self.Tc, self.coefficients, self.exponents)[0]

    def dlnp_dT(self, T):
        return reduced_power_series(T, self.Tc, self.coefficients, self.exponents)[1]

    def d2lnp_dT2(self, T):
        return reduced_power_series(T, self.Tc, self.coefficients, self.exponents)[2]

    def describe(self) -> str:
        """The equation's name, source and range of validity.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        return ("saturation pressure of liquid water, Wagner & Pruss (1993) auxiliary equation "
                f"of IAPWS-95, valid {self.T_min}-{self.T_max} K")


@dataclass(frozen=True)
class IceSublimationIAPWS2011(_ReferenceEquation):
    """Sublimation pressure of ice Ih, IAPWS R14-08(2011) [2].

    ln(p/pt) = θ^-1 Σ a_i θ^b_i,  θ = T/Tt, Tt = 273.16 K, pt = 611.657 Pa;
    valid 50 K to 273.16 K.
    """

    coefficients: tuple[float, ...] = (-0.212144006e2, 0.273203819e2, -0.610598130e1)
    exponents: tuple[float, ...] = (0.333333333e-2, 0.120666667e1, 0.170333333e1)
    Tt: float = WATER_T_TRIPLE
    pt: float = WATER_P_TRIPLE

    T_min: ClassVar[float] = 50.0
    T_max: ClassVar[float] = WATER_T_TRIPLE
    form_name: ClassVar[str] = "iapws-r14-sublimation"

    def ln_p(self, T):
        th = as_temperature(T) / self.Tt
        s = sum(a * th ** (b - 1.0) for a, b in zip(self.coefficients, self.exponents))
        return math.log(self.pt) + s

    def dlnp_dT(self, T):
        th = as_temperature(T) / self.Tt
        return sum(a * (b - 1.0) * th ** (b - 2.0) for a, b in zip(self.coefficients, self.exponents)) / self.Tt

    def d2lnp_dT2(self, T):
        th = as_temperature(T) / self.Tt
        return sum(a * (b - 1.0) * (b - 2.0) * th ** (b - 3.0)
                   for a, b in zip(self.coefficients, self.exponents)) / self.Tt ** 2

    def describe(self) -> str:
        """The equation's name, source and range of validity.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        return (f"sublimation pressure of ice Ih, IAPWS R14-08(2011), valid {self.T_min}-{self.T_max} K")


#: The IAPWS-95 auxiliary saturation equation of liquid water.
WATER_SATURATION = WaterSaturationWagnerPruss()
#: The IAPWS R14-08(2011) sublimation equation of ice Ih.
ICE_SUBLIMATION = IceSublimationIAPWS2011()


def water_saturation_pressure(T):
    """Saturation pressure of liquid water [Pa] at `T` [K] (Wagner & Pruss).

    Parameters
    ----------
    T : float or array_like
        Temperature [K], between the triple point and the critical point.

    Returns
    -------
    float or ndarray
        Saturation pressure [Pa].

    Examples
    --------
    At the normal boiling point on ITS-90, 373.1243 K (IAPWS-95), the
    Wagner & Pruss auxiliary equation gives one standard atmosphere,
    101 325 Pa, to within about 1 Pa:

    >>> bool(abs(water_saturation_pressure(373.1243) - 101325.0) < 2.0)
    True
    """
    return WATER_SATURATION.p(T)


def ice_sublimation_pressure(T):
    """Sublimation pressure of ice Ih [Pa] at `T` [K] (IAPWS R14-08(2011)).

    Parameters
    ----------
    T : float or array_like
        Temperature [K], at or below the triple point 273.16 K.

    Returns
    -------
    float or ndarray
        Sublimation pressure [Pa].

    Examples
    --------
    At the triple point the equation returns the triple-point pressure
    611.657 Pa exactly (it is reduced by it, IAPWS R14-08):

    >>> round(float(ice_sublimation_pressure(273.16)), 3)
    611.657
    """
    return ICE_SUBLIMATION.p(T)


# -- a reference equation given as a table (the metadata's [reference_equation]) --------
#: Keys of a reference-equation table.
REFERENCE_TABLE_KEYS: tuple[str, ...] = ("form", "parameters", "fixed", "base", "P_unit", "T_unit",
                                         "valid_from_K", "valid_to_K", "branch", "source")
_REQUIRED_KEYS = ("form", "parameters", "valid_from_K", "valid_to_K", "source")
_ANTOINE_ONLY = ("base", "P_unit", "T_unit")
# Antoine's base and units are table keys, not coefficients.
_NOT_COEFFICIENTS = {"antoine": ("base", "P_unit", "T_unit")}
# Points at which a tabulated equation must give a finite pressure over its range.
_RANGE_PROBES = 65


class ReferenceTableError(ValueError):
    """A reference-equation table that cannot be used.

    Attributes
    ----------
    key : str
        Dotted key of the offending entry inside the table, e.g. ``'P_unit'``
        or ``'parameters.C'``.
    """

    def __init__(self, key: str, problem: str):
        super().__init__(problem)
        self.key = key


@dataclass(frozen=True)
class TabulatedReference:
    """A reference correlation read from a table.

    Attributes
    ----------
    branch : {'liquid', 'solid'}
        The branch it describes.
    equation : VaporPressureEquation
        The equation (T in K, ln(P/Pa)) whatever units the table quoted.
    T_min, T_max : float
        Range of validity [K].
    name : str
        ``'<form> (<source>)'``, for messages.
    """

    branch: str
    equation: VaporPressureEquation
    T_min: float
    T_max: float
    name: str


def _is_number(x) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool) and math.isfinite(x)


def _coefficient(name: str, kind: str, value, key: str):
    """`value` as the type the form's field `name` declares (float, int or str)."""
    if kind == "str":
        if not isinstance(value, str):
            raise ReferenceTableError(key, f"{name} must be text, not {value!r}")
        return value
    if not _is_number(value):
        raise ReferenceTableError(key, f"{name} must be a finite number, not {value!r}")
    if kind == "int":
        if float(value) != int(value):
            raise ReferenceTableError(key, f"{name} must be a whole number, not {value!r}")
        return int(value)
    return float(value)


def _coefficients(form: str, cls, table: Mapping) -> dict:
    params = table["parameters"]
    fixed = table.get("fixed", {})
    for key, sub in (("parameters", params), ("fixed", fixed)):
        if not isinstance(sub, Mapping):
            raise ReferenceTableError(key, f"{key} must be a table of name = number")
    skip = _NOT_COEFFICIENTS.get(form, ())
    declared = {f.name: f for f in dataclasses.fields(cls) if f.init and f.name not in skip}
    both = sorted(set(params) & set(fixed))
    if both:
        raise ReferenceTableError(f"fixed.{both[0]}", f"{both[0]} is given both in parameters and in fixed")
    values = {}
    for key, sub in (("parameters", params), ("fixed", fixed)):
        for name, value in sub.items():
            if name not in declared:
                raise ReferenceTableError(f"{key}.{name}", f"the {form} form has no coefficient {name!r} "
                                                           f"(it has {', '.join(declared)})")
            kind = declared[name].type if isinstance(declared[name].type, str) else declared[name].type.__name__
            values[name] = _coefficient(name, kind, value, f"{key}.{name}")
    for name, f in declared.items():
        if name not in values and f.default is dataclasses.MISSING:
            raise ReferenceTableError(f"parameters.{name}", f"the {form} form needs coefficient {name!r}")
    return values


def _units_of(form: str, table: Mapping) -> dict:
    """Antoine's base and units checked through :mod:`audit.units`; SI for other forms."""
    given = {k: table[k] for k in _ANTOINE_ONLY if k in table}
    for key, value in given.items():
        if not isinstance(value, str):
            raise ReferenceTableError(key, f"{key} must be text, not {value!r}")
    if form == "antoine":
        if given.get("base", "log10") not in ("log10", "ln"):
            raise ReferenceTableError("base", f"base must be 'log10' or 'ln', not {given['base']!r}")
        for key, convert in (("P_unit", pascal_per), ("T_unit", kelvin_affine)):
            if key in given:
                try:
                    convert(given[key])
                except ValueError as exc:
                    raise ReferenceTableError(key, str(exc)) from None
        return given
    if "base" in given:
        raise ReferenceTableError("base", f"base applies to the antoine form only; the {form} form is "
                                          "written in ln(P/Pa)")
    for key, convert, si in (("P_unit", pascal_per, (1.0,)), ("T_unit", kelvin_affine, ((1.0, 0.0),))):
        if key in given:
            try:
                ok = convert(given[key]) in si
            except ValueError as exc:
                raise ReferenceTableError(key, str(exc)) from None
            if not ok:
                raise ReferenceTableError(key, f"the {form} form takes SI coefficients (T in K, P in Pa); "
                                               f"{key} = {given[key]!r} applies to the antoine form only")
    return {}


def reference_from_table(table: Mapping) -> TabulatedReference:
    """Build a reference equation from a table such as a metadata ``[reference_equation]``.

    Example (TOML)::

        form = "antoine"          # or clausius-clapeyron-2, clausius-clapeyron-3, clarke-glew, wagner
        parameters = { A = 6.95464, B = 1344.8, C = 219.482 }
        base = "log10"            # antoine only
        P_unit = "mmHg"           # antoine only; any unit a table header may use (Torr, kPa, bar, psi, ...)
        T_unit = "degC"           # antoine only (K, degC, °C, degF, ...)
        fixed = { Tc = 591.75, Pc = 4.1263e6 }   # quantities held fixed (wagner, clarke-glew), SI
        valid_from_K = 286.0
        valid_to_K = 410.0
        branch = "liquid"         # or "solid"
        source = "..."

    Parameters
    ----------
    table : Mapping
        The table, as read from TOML (a mapping of names to values, no unit).

    Returns
    -------
    TabulatedReference
        The reference curve through the table (no unit; the units of its fields
        are in the docstring of :class:`TabulatedReference`).

    Raises
    ------
    ReferenceTableError
        Unknown key or form, a missing or non-numeric coefficient, a unit the
        vocabulary of :mod:`audit.units` does not accept, a validity range
        that is empty or where the equation is not finite; ``key`` names the
        entry.
    """
    if not isinstance(table, Mapping):
        raise ReferenceTableError("", "must be a table")
    for key in table:
        if key not in REFERENCE_TABLE_KEYS:
            raise ReferenceTableError(str(key), f"unknown key; allowed: {', '.join(REFERENCE_TABLE_KEYS)}")
    for key in _REQUIRED_KEYS:
        if key not in table:
            raise ReferenceTableError(key, f"missing (a reference equation needs {', '.join(_REQUIRED_KEYS)})")
    form = table["form"]
    if not isinstance(form, str) or form.lower() not in FORMS:
        raise ReferenceTableError("form", f"unknown form {form!r}; known: {', '.join(sorted(FORMS))}")
    form = form.lower()
    branch = table.get("branch", "liquid")
    if branch not in ("liquid", "solid"):
        raise ReferenceTableError("branch", f"branch must be 'liquid' or 'solid', not {branch!r}")
    source = table["source"]
    if not isinstance(source, str) or not source.strip():
        raise ReferenceTableError("source", "source must be a non-empty text naming where the equation comes from")
    lo, hi = table["valid_from_K"], table["valid_to_K"]
    for key, value in (("valid_from_K", lo), ("valid_to_K", hi)):
        if not _is_number(value) or value <= 0:
            raise ReferenceTableError(key, f"{key} must be a temperature above 0 K, not {value!r}")
    if not lo < hi:
        raise ReferenceTableError("valid_to_K", f"the validity range is empty ({lo} K to {hi} K)")
    cls = FORMS[form]
    units = _units_of(form, table)
    values = _coefficients(form, cls, table)
    try:
        equation = cls(**values, **units)
    except ValueError as exc:
        raise ReferenceTableError("parameters", str(exc)) from None
    grid = np.linspace(float(lo), float(hi), _RANGE_PROBES)
    with np.errstate(all="ignore"):
        ln_p = np.asarray(equation.ln_p(grid), dtype=float)
    pole = isinstance(equation, Antoine) and _antoine_pole_inside(equation, float(lo), float(hi))
    if pole or not np.all(np.isfinite(ln_p)):
        raise ReferenceTableError("parameters", f"the equation gives no finite pressure over the whole "
                                                f"validity range {lo}–{hi} K"
                                  + (" (its pole T/T_unit = -C lies inside)" if pole else ""))
    return TabulatedReference(branch, equation, float(lo), float(hi), f"{table['form']} ({source})")


def _antoine_pole_inside(eq: Antoine, lo: float, hi: float) -> bool:
    """True when T_unit + C changes sign (or is 0) between `lo` and `hi` [K]."""
    x = [eq._parts(T)[3] for T in (lo, hi)]
    return bool(x[0] * x[1] <= 0)
