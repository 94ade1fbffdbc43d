"""Fits and physical models shared by the consistency checks.

The recommended equation of each branch is chosen once per audit, from the
points still usable when it is first asked for (after ``physical-range``
and ``outliers`` have rejected what they reject), and cached in
``ctx.shared["recommended"]``.  The real-gas model for Δz is built from the
reference constants, and says in words what it applied or why it could not.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..context import AuditContext
from ..model import Point

WATER_NAMES = {"water", "h2o", "ice", "water (h2o)"}
WATER_CAS = "7732-18-5"
MIN_POINTS_FOR_FIT = 3


@dataclass(frozen=True)
class BranchData:
    """Usable points of one branch as arrays (SI), sorted by T."""

    branch: str
    points: tuple[Point, ...]
    T: np.ndarray
    P: np.ndarray
    u_T: np.ndarray | None
    u_P: np.ndarray | None

    @property
    def rows(self) -> list[int]:
        return [p.row for p in self.points]

    @property
    def n(self) -> int:
        return len(self.points)


def branch_data(ctx: AuditContext, branch: str) -> BranchData:
    return points_data(branch, ctx.usable(branch))


def points_data(branch: str, points) -> BranchData:
    """Points as arrays (SI), sorted by T."""
    pts = sorted(points, key=lambda p: (p.T_K, p.row))
    T = np.array([p.T_K for p in pts], float)
    P = np.array([p.P_Pa for p in pts], float)
    # uncertainties count only when every point of the branch has them: a
    # partial column would mix weights from two different scales
    u_T = np.array([p.u_T_K for p in pts], float) if pts and all(p.u_T_K is not None for p in pts) else None
    u_P = np.array([p.u_P_Pa for p in pts], float) if pts and all(p.u_P_Pa is not None for p in pts) else None
    return BranchData(branch, tuple(pts), T, P, u_T, u_P)


def is_water(ctx: AuditContext) -> bool:
    md = ctx.dataset.metadata
    return (md.cas or "").strip() == WATER_CAS or (md.substance or "").strip().lower() in WATER_NAMES


def recommended(ctx: AuditContext, branch: str):
    """The EquationChoice of a branch (None when too few points), cached."""
    from ..thermo.fitting import select_equation

    cache = ctx.shared.setdefault("recommended", {})
    if branch in cache:
        return cache[branch]
    data = branch_data(ctx, branch)
    choice = None
    if data.n >= MIN_POINTS_FOR_FIT and np.ptp(data.T) > 0:
        md = ctx.dataset.metadata
        try:
            choice = select_equation(data.T, data.P, data.u_T, data.u_P,
                                     Tc=md.get("T_critical"), Pc=md.get("P_critical"),
                                     branch=branch if branch != "unknown" else "liquid")
        except ValueError as exc:  # e.g. degenerate data: report, don't crash
            ctx.notes.append(f"no equation could be fitted to the {branch} branch: {exc}")
    cache[branch] = (choice, data)
    return cache[branch]


def real_gas_model(ctx: AuditContext, branch: str):
    """(RealGasModel or None, text): what Δz correction can be applied."""
    from ..thermo.enthalpy import RealGasModel

    md = ctx.dataset.metadata
    Tc, Pc, omega = md.get("T_critical"), md.get("P_critical"), md.get("acentric_factor")
    phase = "solid" if branch == "solid" else "liquid"
    if is_water(ctx):
        return (RealGasModel(Tc=Tc or 647.096, Pc=Pc or 22.064e6, omega=omega if omega is not None else 0.3443,
                             polar_kind="water-harvey-lemmon", phase=phase, V_condensed=md.get("V_solid")
                             if phase == "solid" else None),
                "water: second virial coefficient of Harvey & Lemmon (2004)")
    missing = [n for n, v in (("T_critical", Tc), ("P_critical", Pc), ("acentric_factor", omega)) if v is None]
    if missing:
        return None, ("real-gas correction not possible: " + ", ".join(missing) +
                      " unknown (give them in the metadata file or use --substance)")
    polar = str(md.extra.get("tsonopoulos_class", "nonpolar")) if hasattr(md, "extra") else "nonpolar"
    return (RealGasModel(Tc=Tc, Pc=Pc, omega=omega, polar_kind=polar, dipole_debye=md.get("dipole_moment"),
                         phase=phase, V_condensed=md.get("V_solid") if phase == "solid" else None,
                         Z_RA=md.get("Z_rackett")),
            f"Tsonopoulos class '{polar}'")


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
