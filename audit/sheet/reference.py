"""The reference a sheet's equation is compared with.

In order: the sheet's own ``[reference_equation]``; for water, the IAPWS
equations (liquid: Wagner & Pruss; ice: IAPWS R14-08); for another named
substance, a published coefficient set from the ``chemicals`` library, the
first it holds of (each with its range of validity as tabulated there):

1. Wagner 3-6 coefficients of McGarry (``Psat_data_WagnerMcGarry``),
2. Wagner 2.5-5 coefficients from Poling, Prausnitz & O'Connell, The
   Properties of Gases and Liquids, 5th ed. (2000) (``Psat_data_WagnerPoling``),
3. the VDI Heat Atlas PPDS equation 3 (``Psat_data_VDI_PPDS_3``; a Wagner
   2.5-5 form, valid from the melting point to Tc),
4. Perry's Chemical Engineers' Handbook, 8th ed., table 2-8 (DIPPR equation
   101; ``Psat_data_Perrys2_8``),
5. Antoine coefficients from Poling et al. (2000) (``Psat_data_AntoinePoling``).

The name of the set used goes into the findings.  ``chemicals`` is imported
only here, when a sheet is audited.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from ..thermo.equations import Antoine, VaporPressureEquation, Wagner, as_temperature
from ..values import all_finite as _finite

__all__ = ["SheetReference", "Dippr101", "sheet_reference", "library_references"]

WATER_CAS = "7732-18-5"


@dataclass(frozen=True)
class SheetReference:
    """A reference vapor-pressure equation with its range of validity.

    Attributes
    ----------
    equation : VaporPressureEquation
        ln(P/Pa) of T [K].
    T_min, T_max : float
        Range of validity [K].
    name : str
        What it is and where it comes from.
    """

    equation: VaporPressureEquation
    T_min: float
    T_max: float
    name: str


@dataclass(frozen=True)
class Dippr101(VaporPressureEquation):
    """ln(P/Pa) = C1 + C2/T + C3 ln T + C4 T^C5 (DIPPR equation 101; T in K)."""

    C1: float
    C2: float
    C3: float
    C4: float
    C5: float

    linear: ClassVar[bool] = False
    form_name: ClassVar[str] = "dippr-101"
    _names: ClassVar[tuple[str, ...]] = ("C1", "C2", "C3", "C4", "C5")

    def ln_p(self, T):
        T = as_temperature(T)
        return self.C1 + self.C2 / T + self.C3 * np.log(T) + self.C4 * T ** self.C5

    def dlnp_dT(self, T):
        T = as_temperature(T)
        return -self.C2 / T ** 2 + self.C3 / T + self.C4 * self.C5 * T ** (self.C5 - 1.0)

    def d2lnp_dT2(self, T):
        T = as_temperature(T)
        return 2 * self.C2 / T ** 3 - self.C3 / T ** 2 + self.C4 * self.C5 * (self.C5 - 1.0) * T ** (self.C5 - 2.0)

    def describe(self) -> str:
        return (f"ln(P/Pa) = C1 + C2/T + C3 ln T + C4 T^C5 with C1 = {self.C1:.6g}, C2 = {self.C2:.6g} K, "
                f"C3 = {self.C3:.6g}, C4 = {self.C4:.6g}, C5 = {self.C5:.6g}")


def _table_name(module, table) -> str:
    return next(n for n in dir(module) if getattr(module, n) is table)


def library_references(cas: str) -> list[SheetReference]:
    """Every reference coefficient set the ``chemicals`` library holds for ``cas``, in the order
    of the module docstring (an empty list when it holds none)."""
    import chemicals
    import chemicals.vapor_pressure as vp

    lib = f"chemicals {chemicals.__version__}"
    out: list[SheetReference] = []

    def row(table):
        return table.loc[cas] if cas in table.index else None

    # (table, Wagner variant, column of the lowest temperature, of the highest ('Tc': up to Tc), name)
    wagner_sets = ((vp.Psat_data_WagnerMcGarry, "3-6", "Tmin", "Tc",
                    "Wagner 3-6 coefficients of McGarry (1983)"),
                   (vp.Psat_data_WagnerPoling, "2.5-5", "Tmin", "Tmax",
                    "Wagner 2.5-5 coefficients of Poling, Prausnitz & O'Connell (2000)"),
                   (vp.Psat_data_VDI_PPDS_3, "2.5-5", "Tm", "Tc", "VDI Heat Atlas PPDS equation 3"))
    for table, variant, lo, hi, name in wagner_sets:
        r = row(table)
        if r is not None and _finite(r.A, r.B, r.C, r.D, r.Tc, r.Pc, r[lo], r[hi]):
            out.append(SheetReference(Wagner(float(r.A), float(r.B), float(r.C), float(r.D), Tc=float(r.Tc),
                                             Pc=float(r.Pc), variant=variant), float(r[lo]), float(r[hi]),
                                      f"{name} ({lib}, {_table_name(vp, table)})"))
    r = row(vp.Psat_data_Perrys2_8)
    if r is not None and _finite(r.C1, r.C2, r.C3, r.C4, r.C5, r.Tmin, r.Tmax):
        out.append(SheetReference(Dippr101(float(r.C1), float(r.C2), float(r.C3), float(r.C4), float(r.C5)),
                                  float(r.Tmin), float(r.Tmax),
                                  f"Perry's Chemical Engineers' Handbook, 8th ed., table 2-8, DIPPR "
                                  f"equation 101 ({lib}, Psat_data_Perrys2_8)"))
    r = row(vp.Psat_data_AntoinePoling)
    if r is not None and _finite(r.A, r.B, r.C, r.Tmin, r.Tmax):
        out.append(SheetReference(Antoine(float(r.A), float(r.B), float(r.C), base="log10", P_unit="Pa",
                                          T_unit="K"), float(r.Tmin), float(r.Tmax),
                                  f"Antoine coefficients of Poling, Prausnitz & O'Connell (2000) "
                                  f"({lib}, Psat_data_AntoinePoling)"))
    return out


def sheet_reference(sheet, cas: str | None, *, exclude: tuple[str, ...] = ()) -> SheetReference | None:
    """The reference for ``sheet`` (see the module docstring), or None when none is known.

    ``exclude`` leaves out library sets whose name contains one of its texts (a benchmark
    that states a library set wrongly must not compare it with itself).
    """
    if sheet.reference_equation:
        from ..checks.reference_agreement import _from_metadata

        _, (eq, lo, hi, name) = _from_metadata(dict(sheet.reference_equation), sheet.file_name)
        return SheetReference(eq, lo, hi, f"the sheet's [reference_equation]: {name}")
    if cas == WATER_CAS:
        from ..thermo.reference import IceSublimationIAPWS2011, WaterSaturationWagnerPruss

        if sheet.phase == "solid":
            ice = IceSublimationIAPWS2011()
            return SheetReference(ice, ice.T_min, ice.T_max, "IAPWS R14-08(2011) sublimation equation of ice Ih")
        liq = WaterSaturationWagnerPruss()
        return SheetReference(liq, liq.T_min, liq.T_max,
                              "IAPWS-95 auxiliary saturation equation of Wagner & Pruss (2002)")
    if cas is None or sheet.phase == "solid":
        return None
    for ref in library_references(cas):
        if not any(text in ref.name for text in exclude):
            return ref
    return None
