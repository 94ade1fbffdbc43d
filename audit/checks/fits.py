"""Fits and physical models shared by the consistency checks.

The curve of each branch is the consensus model's fit of record
(:mod:`audit.consensus`, built by ``outliers``): :func:`recommended` hands it
to every check and to the summary, so enthalpy, triple point, Trouton and
the ``fits`` section all come from the one fit.  Only a branch the
consensus could not fit (too few points for ``outliers``, or that check
disabled) gets a fit of its own here, made from its usable points when
first asked for and kept in ``ctx.fallback_fits``.  The real-gas model for
Δz is built from the reference constants, and says in words what it applied
or why it could not.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..consensus import BranchData, points_data  # noqa: F401  (re-exported for the checks)
from ..context import AuditContext
from ..model import base_phase, is_solid

WATER_NAMES = {"water", "h2o", "ice", "water (h2o)"}
WATER_CAS = "7732-18-5"
MIN_POINTS_FOR_FIT = 3


def branch_data(ctx: AuditContext, branch: str) -> BranchData:
    return points_data(branch, ctx.usable(branch))


def is_water(ctx: AuditContext) -> bool:
    return names_water(ctx.dataset.metadata)


def names_water(metadata) -> bool:
    """Does the metadata name water (its CAS number, or a name of water or ice)?"""
    return (metadata.cas or "").strip() == WATER_CAS or (metadata.substance or "").strip().lower() in WATER_NAMES


@dataclass(frozen=True)
class KnownTriplePoint:
    """The substance's triple point as known before the audit (not from its data).

    ``T_K`` [K], ``P_Pa`` [Pa] (None when not known) and their standard
    uncertainties (0 when the source gives none); ``source`` says where the
    temperature comes from, ``text`` states both values with their sources.
    """

    T_K: float
    P_Pa: float | None
    u_T_K: float
    u_P_Pa: float
    source: str
    text: str


def known_triple_point(ctx: AuditContext) -> KnownTriplePoint | None:
    """The triple point known before the audit, or None.

    In order: ``T_triple`` (with ``P_triple`` when given) from the metadata or
    the property library; else the normal melting point ``T_melting`` as its
    stand-in (no pressure); else water's (IAPWS R10-06) for water.
    """
    from ..thermo.constants import WATER_P_TRIPLE, WATER_T_TRIPLE

    c = ctx.dataset.metadata.constants
    Tt, Pt = c.get("T_triple"), c.get("P_triple")
    if Tt is not None and math.isfinite(Tt.value) and Tt.value > 0:
        text = f"{Tt.value:.6g} K ({Tt.source})" + (f", {Pt.value:.6g} Pa ({Pt.source})" if Pt is not None else "")
        return KnownTriplePoint(Tt.value, None if Pt is None else Pt.value, Tt.uncertainty or 0.0,
                                0.0 if Pt is None else (Pt.uncertainty or 0.0), Tt.source, text)
    Tm = c.get("T_melting")
    if Tm is not None and math.isfinite(Tm.value) and Tm.value > 0:
        # the normal melting point lies within ~0.1 K of the triple point for most substances
        # (dT/dp of melting ~ 0.01-0.05 K/bar, common practice): the same side for every row but
        # those within that of it
        return KnownTriplePoint(Tm.value, None, max(Tm.uncertainty or 0.0, 0.1), 0.0,
                                f"normal melting point, {Tm.source}", f"{Tm.value:.6g} K ({Tm.source})")
    if is_water(ctx):
        return KnownTriplePoint(WATER_T_TRIPLE, WATER_P_TRIPLE, 0.0, 0.0, "IAPWS R10-06(2009)",
                                f"IAPWS R10-06(2009): {WATER_T_TRIPLE} K, {WATER_P_TRIPLE} Pa")
    return None


def solid_meeting_liquid(ctx: AuditContext, branches=None) -> str | None:
    """The solid branch that meets the liquid: the one reaching the highest temperature.

    'solid' when there is one solid branch; with several crystal forms
    ('solid I', 'solid II'), the form stable just below the triple point.
    None without a solid branch.
    """
    solids = [b for b in (branches if branches is not None else ctx.branches()) if is_solid(b)]
    if len(solids) <= 1:
        return solids[0] if solids else None
    return max(solids, key=lambda b: max(p.T_K for p in ctx.usable(b)))


def recommended(ctx: AuditContext, branch: str):
    """(EquationChoice or None, BranchData): the fit of record of a branch and its points.

    The consensus model's fit of record when the branch has one — the
    choice's ``chosen`` is that fit and its data are exactly the points it
    was fitted to, in order of temperature; else a fit chosen now from the
    branch's usable points (None when too few), cached.
    """
    from ..thermo.fitting import EquationChoice, select_equation

    c = ctx.consensus.get(branch)
    if c is not None:
        choice = EquationChoice(chosen=c.fit, chosen_name=c.form_name, candidates=c.choice.candidates,
                                reason=f"{c.choice.reason}; fit of record: {c.origin}",
                                point_weights=np.ones(c.fit_data.n))
        return choice, c.fit_data
    cache = ctx.fallback_fits
    if branch in cache:
        return cache[branch]
    data = branch_data(ctx, branch)
    choice = None
    if data.n >= MIN_POINTS_FOR_FIT and np.ptp(data.T) > 0:
        md = ctx.dataset.metadata
        try:
            choice = select_equation(data.T, data.P, data.u_T, data.u_P,
                                     Tc=md.get("T_critical"), Pc=md.get("P_critical"),
                                     branch=base_phase(branch))
        except ValueError as exc:  # e.g. degenerate data: report, don't crash
            ctx.notes.append(f"no equation could be fitted to the {branch} branch: {exc}")
    cache[branch] = (choice, data)
    return cache[branch]


def real_gas_model(ctx: AuditContext, branch: str):
    """(RealGasModel or None, text): what Δz correction can be applied."""
    from ..thermo.enthalpy import RealGasModel

    md = ctx.dataset.metadata
    Tc, Pc, omega = md.get("T_critical"), md.get("P_critical"), md.get("acentric_factor")
    phase = "solid" if is_solid(branch) else "liquid"
    if is_water(ctx):
        from ..thermo.constants import WATER_ACENTRIC_FACTOR, WATER_P_CRITICAL, WATER_T_CRITICAL

        return (RealGasModel(Tc=Tc or WATER_T_CRITICAL, Pc=Pc or WATER_P_CRITICAL,
                             omega=omega if omega is not None else WATER_ACENTRIC_FACTOR,
                             polar_kind="water-harvey-lemmon", phase=phase, V_condensed=md.get("V_solid")
                             if phase == "solid" else None),
                "water: second virial coefficient of Harvey & Lemmon (2004)")
    missing = [n for n, v in (("T_critical", Tc), ("P_critical", Pc), ("acentric_factor", omega)) if v is None]
    if missing:
        return None, ("real-gas correction not possible: " + ", ".join(missing) +
                      " unknown (give them in the metadata file or use --substance)")
    from ..thermo.enthalpy import tsonopoulos_polar_terms
    from ..thermo.polarity import tsonopoulos_class

    cls = tsonopoulos_class(md.cas, md.extra.get("tsonopoulos_class"))
    kind, why = cls.kind, cls.reason
    try:  # the alcohol and ketone-like terms need the dipole moment
        tsonopoulos_polar_terms(kind, md.get("dipole_moment"), Tc, Pc)
    except ValueError as exc:
        kind, why = "nonpolar", f"{why}, but {exc}: nonpolar terms used"
    return (RealGasModel(Tc=Tc, Pc=Pc, omega=omega, polar_kind=kind, dipole_debye=md.get("dipole_moment"),
                         phase=phase, V_condensed=md.get("V_solid") if phase == "solid" else None,
                         Z_RA=md.get("Z_rackett")),
            f"second virial coefficient of Tsonopoulos, class '{kind}': {why}")


def corrected_crossing(ctx: AuditContext, low_branch: str, low_fit, high_branch: str, high_fit):
    """(estimate, notes): where two branches' fits cross, real-gas corrected where the constants allow.

    :func:`audit.thermo.triple_point.intersect_branches` of the fits, done
    again with Δz of each branch at the crossing when either has a real-gas
    model; ``notes`` says, per branch without one, why (the enthalpies stay
    apparent there).  Used for the triple point (solid, liquid) and for a
    transition between two crystal forms (low-T form, high-T form).
    """
    from ..thermo.triple_point import intersect_branches

    est = intersect_branches(low_fit, high_fit)
    notes = []
    if not est.crossed:
        return est, notes
    dz = []
    for branch in (low_branch, high_branch):
        model, why = real_gas_model(ctx, branch)
        if model is None:
            notes.append(f"{branch}: {why}")
        d = float(model.evaluate(est.T, est.P).delta_z[0]) if model is not None else 1.0
        if not (math.isfinite(d) and d > 0):
            # the virial model outside its range (a pressure near or above Pc at a low temperature):
            # no correction rather than an impossible one
            notes.append(f"{branch}: the real-gas model gives Δz = {d:.3g} at the crossing ({est.T:.5g} K, "
                         f"{est.P:.4g} Pa), outside its range: apparent enthalpy kept")
            d = 1.0
        dz.append(d)
    if dz != [1.0, 1.0]:
        est = intersect_branches(low_fit, high_fit, delta_z_solid=dz[0], delta_z_liquid=dz[1])
    return est, notes


def implied(ctx: AuditContext, branch: str, T, P=None):
    """ImpliedEnthalpy of a branch's recommended fit at T (corrected when possible)."""
    from ..thermo.enthalpy import implied_enthalpy

    choice, _ = recommended(ctx, branch)
    if choice is None:
        return None, False, "no fit"
    model, why = real_gas_model(ctx, branch)
    if model is None:
        return implied_enthalpy(choice.chosen, T, P), False, why
    try:
        return implied_enthalpy(choice.chosen, T, P, correction=model), True, why
    except ValueError as exc:
        return implied_enthalpy(choice.chosen, T, P), False, f"real-gas correction failed: {exc}"
