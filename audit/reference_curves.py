"""The reference vapor-pressure curve of a branch, when the substance is known.

A compilation's own sources are the first yardstick of each other, but when
they are few, scattered or mostly off together, which of them is off cannot
be told from them alone.  A curator then looks at the substance's recommended
correlation.  This module gathers, per branch, the correlations known for the
substance and their standard uncertainty in ln P:

1. the metadata file's ``[reference_equation]`` table(s), if any;
2. else, for water, the IAPWS equations (liquid: the Wagner & Pruss auxiliary
   equation of IAPWS-95; ice Ih: IAPWS R14-08(2011));
3. else, for a substance with a CAS number (``--substance``), every
   coefficient set the ``chemicals`` library holds
   (:func:`audit.sheet.reference.library_references`), for the liquid.

Where several sets cover a temperature, the curve is their median and its
uncertainty at least half their spread: the library's sets disagree by up to
tens of percent near the triple point (where pressures are small and were
poorly measured), and by well under 1 % in their core.  A set's own
uncertainty is never taken below ``floor_u_lnP`` (the caller's, from the
profile).

No thresholds here: the caller passes the floor, and decides what to do with
a source off the curve.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .thermo.equations import ln_p_where_defined

__all__ = ["ReferenceSet", "ReferenceCurve", "reference_curves", "IAPWS_LIQUID_U_LNP", "IAPWS_ICE_U_LNP"]

#: standard uncertainty of ln P of the IAPWS-95 saturation pressure: ±0.025 % (k = 2) from the
#: triple point to 373 K, rising towards the critical point (value from memory of the IAPWS-95
#: release); 0.05 % is taken as a conservative standard uncertainty over the whole range
IAPWS_LIQUID_U_LNP = 5e-4
#: standard uncertainty of ln P of the IAPWS R14-08(2011) sublimation equation: about 0.1 % near
#: the triple point and a few tenths of a percent at 200 K (value from memory of the release);
#: 0.5 % is taken as a conservative standard uncertainty
IAPWS_ICE_U_LNP = 5e-3


@dataclass(frozen=True)
class ReferenceSet:
    """One correlation: ln(P/Pa) of T [K] inside [T_min, T_max] [K], its standard
    uncertainty in ln P [-] and where it comes from."""

    equation: object
    T_min: float
    T_max: float
    u_lnP: float
    name: str


@dataclass(frozen=True)
class ReferenceCurve:
    """The reference of one branch: one or more correlations.

    Attributes
    ----------
    branch : str
        Branch it serves ('liquid', 'solid' or 'unknown').
    sets : tuple of ReferenceSet
        The correlations, each with its range [K] and uncertainty [-].
    """

    branch: str
    sets: tuple[ReferenceSet, ...]

    @property
    def name(self) -> str:
        return "; ".join(s.name for s in self.sets)

    @property
    def T_span(self) -> tuple[float, float]:
        """Lowest and highest temperature any set covers [K]."""
        return min(s.T_min for s in self.sets), max(s.T_max for s in self.sets)

    def _values(self, T):
        T = np.atleast_1d(np.asarray(T, float))
        ln = np.full((len(self.sets), T.size), np.nan)
        u = np.full_like(ln, np.nan)
        for i, s in enumerate(self.sets):
            inside = (T >= s.T_min) & (T <= s.T_max)
            if inside.any():
                with np.errstate(all="ignore"):
                    ln[i, inside] = ln_p_where_defined(s.equation, T[inside])
                u[i, inside] = s.u_lnP
        ln[~np.isfinite(ln)] = np.nan
        return ln, u

    def covers(self, T) -> np.ndarray:
        """True where at least one set covers `T` [K] (a flag per temperature)."""
        ln, _ = self._values(T)
        return np.isfinite(ln).any(axis=0)

    def ln_p(self, T) -> np.ndarray:
        """Median ln(P/Pa) of the sets covering `T` [K]; NaN where none does."""
        ln, _ = self._values(T)
        out = np.full(ln.shape[1], np.nan)
        has = np.isfinite(ln).any(axis=0)
        out[has] = np.nanmedian(ln[:, has], axis=0)
        return out

    def dlnp_dT(self, T) -> np.ndarray:
        """d ln P/dT of :meth:`ln_p` [1/K], by central difference over ±0.01 K."""
        T = np.atleast_1d(np.asarray(T, float))
        return (self.ln_p(T + 0.01) - self.ln_p(T - 0.01)) / 0.02

    def u_ln_p(self, T) -> np.ndarray:
        """Standard uncertainty of :meth:`ln_p` [-]: the covering sets' median stated
        uncertainty, or half their spread when that is larger; NaN where none covers."""
        ln, u = self._values(T)
        out = np.full(ln.shape[1], np.nan)
        has = np.isfinite(ln).any(axis=0)
        if has.any():
            spread = 0.5 * (np.nanmax(ln[:, has], axis=0) - np.nanmin(ln[:, has], axis=0))
            out[has] = np.maximum(np.nanmedian(u[:, has], axis=0), spread)
        return out


def reference_curves(dataset, floor_u_lnP: float) -> dict[str, ReferenceCurve]:
    """Branch → reference curve for `dataset`'s substance (empty when none is known).

    Parameters
    ----------
    dataset : audit.model.Dataset
        Its metadata names the substance (``substance``, ``cas``), may give
        ``[reference_equation]`` tables and the triple or melting point.
    floor_u_lnP : float
        Smallest standard uncertainty in ln P [-] taken for a correlation
        that states none.

    Returns
    -------
    dict
        'liquid', 'solid' and/or 'unknown' → :class:`ReferenceCurve`; a
        branch of unknown phase gets every set, each where it is valid (the
        liquid's only above the triple or melting point, when one is known).
    """
    from .checks.fits import names_water

    md = dataset.metadata
    floor = float(floor_u_lnP)
    given = md.extra.get("reference_equation") if md.extra else None
    liquid: list[ReferenceSet] = []
    solid: list[ReferenceSet] = []
    if given:
        from .checks.reference_agreement import _from_metadata

        for table in (given if isinstance(given, list) else [given]):
            branch, (eq, lo, hi, name) = _from_metadata(table, dataset.file_name)
            (solid if branch == "solid" else liquid).append(ReferenceSet(eq, lo, hi, floor, name))
    elif names_water(md):
        from .thermo.reference import IceSublimationIAPWS2011, WaterSaturationWagnerPruss

        liq, ice = WaterSaturationWagnerPruss(), IceSublimationIAPWS2011()
        liquid.append(ReferenceSet(liq, liq.T_min, liq.T_max, IAPWS_LIQUID_U_LNP,
                                   "IAPWS-95 auxiliary saturation equation (Wagner & Pruss)"))
        solid.append(ReferenceSet(ice, ice.T_min, ice.T_max, IAPWS_ICE_U_LNP,
                                  "IAPWS R14-08(2011) sublimation equation"))
    elif md.cas:
        from .sheet.reference import library_references

        try:
            found = library_references(md.cas.strip())
        except Exception:  # the library cannot be read: no reference, as for an unknown substance
            found = []
        melt = _melting_point(md.constants)
        for r in found:
            lo = max(r.T_min, melt) if melt is not None else r.T_min
            if lo < r.T_max:
                liquid.append(ReferenceSet(r.equation, lo, r.T_max, floor, r.name))
    out: dict[str, ReferenceCurve] = {}
    if liquid:
        out["liquid"] = ReferenceCurve("liquid", tuple(liquid))
    if solid:
        out["solid"] = ReferenceCurve("solid", tuple(solid))
    if liquid or solid:
        out["unknown"] = ReferenceCurve("unknown", tuple(solid) + tuple(liquid))
    return out


def _melting_point(constants) -> float | None:
    for key in ("T_triple", "T_melting"):
        c = constants.get(key)
        if c is not None and math.isfinite(c.value) and c.value > 0:
            return float(c.value)
    return None
