"""The decoded sheet equation's coefficients in SI: T in K, P in Pa, log10 and ln.

An Antoine or two-constant Clausius–Clapeyron sheet converts exactly
(:meth:`audit.thermo.equations.Antoine.converted`; B and C scale with the
temperature unit's size, C shifts with its zero, A with the logarithm base
and the pressure unit).  A Wagner sheet converts Tc to K and Pc to Pa.  Other
forms (an extended Antoine whose extra terms are in °C, a formula) have no
closed conversion: an Antoine equation in K and Pa is fitted to the decoded
curve over the stated range, and the largest deviation of that fit is
reported with it.
"""

from __future__ import annotations

import math

import numpy as np

from ..thermo.equations import Antoine
from .readings import LOG_FACTOR, SheetEquation

__all__ = ["si_coefficients"]


def _antoine_both_bases(eq: Antoine) -> dict:
    si10 = eq.converted(base="log10", P_unit="Pa", T_unit="K")
    si_e = eq.converted(base="ln", P_unit="Pa", T_unit="K")
    return {"form": "antoine", "exact": True,
            "log10": {"A": si10.A, "B": si10.B, "C": si10.C, "equation": "log10(P/Pa) = A - B/(T/K + C)"},
            "ln": {"A": si_e.A, "B": si_e.B, "C": si_e.C, "equation": "ln(P/Pa) = A - B/(T/K + C)"}}


def si_coefficients(eq: SheetEquation, T_range_K) -> dict:
    """The coefficients of ``eq`` in SI, as a JSON-ready mapping (see the module docstring)."""
    c = dict(eq.coefficients)
    r = eq.reading
    if eq.form in ("antoine", "clausius-clapeyron") and r.log in LOG_FACTOR:
        C = c.get("C", 0.0)
        if eq.form == "clausius-clapeyron" and r.T_unit != "K":
            C = None  # A - B/T with T in °C is not an Antoine form in K with the same B
        if C is not None:
            out = _antoine_both_bases(Antoine(c["A"], c["B"], C, base=r.log, P_unit=r.P_unit, T_unit=r.T_unit))
            if eq.form == "clausius-clapeyron":
                out["form"] = "clausius-clapeyron"
            return out
    if eq.form.startswith("wagner") and r.T_unit == "K":
        from ..units import pascal_per

        return {"form": eq.form, "exact": True, "a": c["a"], "b": c["b"], "c": c["c"], "d": c["d"],
                "Tc_K": c["Tc"], "Pc_Pa": c["Pc"] * pascal_per(r.P_unit),
                "equation": "ln(P/Pc) = (Tc/T)(a τ + b τ^1.5 + c τ^x + d τ^y), τ = 1 - T/Tc"}
    return _fitted_antoine(eq, T_range_K)


def _fitted_antoine(eq: SheetEquation, T_range_K) -> dict:
    """An Antoine equation in K and Pa fitted to the decoded curve (no closed conversion)."""
    from ..thermo.fitting import fit_equation

    if T_range_K is None or not all(math.isfinite(t) for t in T_range_K) or not T_range_K[0] < T_range_K[1]:
        return {"form": "antoine", "exact": False, "note": "no temperature range to convert over"}
    T = np.linspace(T_range_K[0], T_range_K[1], 40)
    lnP = eq.ln_p(T)
    ok = np.isfinite(lnP)
    if ok.sum() < 5:
        return {"form": "antoine", "exact": False, "note": "the decoded equation is not defined over the range"}
    try:
        fit = fit_equation(T[ok], np.exp(lnP[ok]), "antoine", robust=False)
    except (ValueError, ArithmeticError, np.linalg.LinAlgError) as exc:
        return {"form": "antoine", "exact": False, "note": f"no Antoine equation could be fitted: {exc}"}
    a = fit.equation
    dev = 100 * np.max(np.abs(np.expm1(a.ln_p(T[ok]) - lnP[ok])))
    out = _antoine_both_bases(a.converted(base=a.base, P_unit=a.P_unit, T_unit=a.T_unit))
    out.update({"exact": False, "max_deviation_percent": float(dev),
                "note": f"an Antoine equation fitted to the decoded curve over {T_range_K[0]:.5g}–"
                        f"{T_range_K[1]:.5g} K; largest deviation {dev:.2g} %"})
    return out
