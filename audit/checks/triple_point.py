"""Check ``triple-point``: solid and liquid branches meet where they should."""

from __future__ import annotations

import math


from ..results import Cause, CheckResult, PointFlag, TriplePointRecord
from .fits import corrected_crossing, known_triple_point, recommended, solid_meeting_liquid
from ._util import skipped
from .registry import Check, Option, register


@register
class TriplePoint(Check):
    """Intersection of the solid and liquid branches, against a reference.

    **What it checks.** When both a solid (sublimation) and a liquid
    (vaporization) branch have enough points, their recommended equations
    are intersected: the crossing temperature and pressure with standard
    uncertainties (delta method, both covariances), and the enthalpy of
    fusion ΔH_fus = ΔH_sub − ΔH_vap there (real-gas corrected when the
    constants allow).  Fails when the branches do not cross near their
    junction or ΔH_fus ≤ 0.  Compares T and P with a reference triple point
    (metadata, or built in for water) within ``k`` × combined uncertainty
    plus tolerance, and ΔH_fus with the metadata's enthalpy of fusion.  A
    point labelled with one phase that the outlier screening marked and
    that fits the other branch gets cause ``phase-label``.  Supercooled
    liquid below the triple point is legitimate where it fits the liquid
    curve, and is not flagged.

    **Why it matters.** Two branches measured well must meet at the triple
    point with a jump in slope equal to the enthalpy of fusion; a crossing
    in the wrong place exposes a temperature-scale or pressure-scale error
    in one branch, and an ice point labelled liquid is a common
    transcription slip.

    **Method.** Needs a solid branch meeting the liquid and the fits of record
    of both with at least ``min_points_per_branch`` points. (1) The two
    recommended equations are intersected: the root of ln P_s(T) − ln P_l(T)
    is bracketed and found by Brent's method. (2) u(T) and u(P) of the
    crossing follow from both fits' parameter covariances by the delta method
    (the implicit-function theorem gives dT/dθ at the crossing); ΔH_fus =
    Δz_s·ΔH_sub,app − Δz_l·ΔH_vap,app there, with Δz from the second virial
    coefficient when the critical constants allow, else apparent. (3) The
    crossing must lie within ``crossing_margin_K`` of the junction of the two
    branches' data and ΔH_fus must be positive, else the check fails. (4)
    Against a reference triple point (metadata, substance library, or IAPWS
    for water): |T − T_ref| ≤ ``k``·√(u(T)² + u(T_ref)²) + ``T_tolerance_K``
    and likewise for P in percent; ΔH_fus against the metadata's enthalpy of
    fusion with ``dH_fus_tolerance_percent``. (5) A row the outlier screening
    marked suspect or rejected whose residual, in robust (MAD) scales of each
    fit, lies within ``phase_label_k`` σ of the other branch and beyond twice
    that of its own gets the cause phase-label.

    **Example.** "branches cross at 273.17 ± 0.01 K, 611.9 ± 0.6 Pa; ΔH_fus
    = 6.01 ± 0.05 kJ/mol; reference 273.16 K, 611.657 Pa — agrees".

    **Options.** ``k``, ``T_tolerance_K``, ``P_tolerance_percent``,
    ``crossing_margin_K``, ``dH_fus_tolerance_percent``, ``phase_label_k``,
    ``min_points_per_branch``.
    """

    id = "triple-point"
    title = "Triple point: where solid and liquid branches meet"
    method = ("The recommended equations of the solid and liquid branches are intersected (Brent's "
              "method); u(T), u(P) and u(ΔH_fus) follow from both parameter covariances by the delta "
              "method (implicit-function theorem at the crossing). ΔH_fus = Δz_s·ΔH_sub,app − "
              "Δz_l·ΔH_vap,app at the crossing.")
    references = (
        "IAPWS R10-06(2009) — triple point of water 273.16 K, 611.657 Pa.",
        "W. Wagner, T. Riethmann, R. Feistel, A. H. Harvey, J. Phys. Chem. Ref. Data 40, 043103 (2011), "
        "doi:10.1063/1.3657937 — sublimation and melting pressures of ice Ih.",
        "JCGM 100:2008 (GUM) §5.1 — propagation of uncertainty (delta method).",
        "R. P. Brent, Algorithms for Minimization without Derivatives (Prentice-Hall, 1973), ch. 4 — the "
        "root finder.",
    )
    options = {
        "k": Option(float, "coverage factor for agreement with the reference [-]", "", 0.5, 10),
        "T_tolerance_K": Option(float, "allowed |T − T_ref| on top of k·u", "K", 0, 50),
        "P_tolerance_percent": Option(float, "allowed |P − P_ref| on top of k·u", "%", 0, 100),
        "crossing_margin_K": Option(float, "how far outside the branches' junction the crossing may lie",
                                    "K", 0, 200),
        "dH_fus_tolerance_percent": Option(float, "allowed departure from a reference ΔH_fus on top of k·u",
                                           "%", 0, 100),
        "phase_label_k": Option(float, "a marked point fits the other branch when its residual there "
                                "is within this many σ [-]", "", 0.5, 10),
        "min_points_per_branch": Option(int, "fewest points on each branch [-]", "", 3, 1000),
    }

    def run(self, ctx):
        s = ctx.settings(self.id)
        branches = ctx.branches()
        solid = solid_meeting_liquid(ctx, branches)
        if solid is None or "liquid" not in branches:
            return skipped(self, "needs both a solid and a liquid branch (labelled, or found by branch-split); "
                                 f"branches present: {', '.join(branches) or 'none'}")
        cs, ds = recommended(ctx, solid)
        cl, dl = recommended(ctx, "liquid")
        nmin = s["min_points_per_branch"]
        if cs is None or cl is None or ds.n < nmin or dl.n < nmin:
            return skipped(self, f"too few points: {ds.n} solid, {dl.n} liquid (at least {nmin} each)")
        est, notes = corrected_crossing(ctx, solid, cs.chosen, "liquid", cl.chosen)
        junction = (float(ds.T.max()), float(dl.T.min()))
        lo, hi = min(junction) - s["crossing_margin_K"], max(junction) + s["crossing_margin_K"]
        causes, flags, point_status = self._phase_labels(ctx, cs.chosen, cl.chosen, s, solid)
        metrics = {"T_K": est.T, "u_T_K": est.u_T, "P_Pa": est.P, "u_P_Pa": est.u_P,
                   "dH_sub_J_per_mol": est.dH_sub, "dH_vap_J_per_mol": est.dH_vap,
                   "dH_fus_J_per_mol": est.dH_fus, "u_dH_fus_J_per_mol": est.u_dH_fus,
                   "delta_z_solid": est.delta_z_solid, "delta_z_liquid": est.delta_z_liquid,
                   "n_phase_label": len(causes)}
        if not est.crossed or not (lo <= est.T <= hi):
            where = (est.message if not est.crossed else
                     f"they cross at {est.T:.2f} K, outside {lo:.2f}–{hi:.2f} K (junction of the branches "
                     f"± {s['crossing_margin_K']} K)")
            return CheckResult(self.id, self.title, "fail",
                               f"solid and liquid branches do not meet in a sensible range: {where}",
                               metrics, flags, point_status, causes)
        ref = self._reference(ctx)
        problems = []
        text = (f"branches cross at {est.T:.3f} ± {est.u_T:.2g} K, {est.P:.5g} ± {est.u_P:.2g} Pa; "
                f"ΔH_fus = {est.dH_fus / 1e3:.4g} ± {est.u_dH_fus / 1e3:.2g} kJ/mol "
                f"({'real-gas corrected' if not notes else 'apparent: ' + '; '.join(notes)})")
        if est.dH_fus <= 0:
            problems.append(f"ΔH_fus = {est.dH_fus / 1e3:.3g} kJ/mol ≤ 0: the solid branch is not steeper")
        if ref is not None:
            T_ref, P_ref, u_T_ref, u_P_ref, source = ref
            dT = est.T - T_ref
            lim_T = s["k"] * math.hypot(est.u_T, u_T_ref) + s["T_tolerance_K"]
            dP = 100 * (est.P - P_ref) / P_ref
            lim_P = s["k"] * 100 * math.hypot(est.u_P, u_P_ref) / P_ref + s["P_tolerance_percent"]
            metrics.update({"T_ref_K": T_ref, "P_ref_Pa": P_ref, "dT_K": dT, "dP_percent": dP,
                            "limit_T_K": lim_T, "limit_P_percent": lim_P})
            verdict = []
            if abs(dT) > lim_T:
                verdict.append(f"T off by {dT:+.3g} K (limit {lim_T:.2g} K)")
            if abs(dP) > lim_P:
                verdict.append(f"P off by {dP:+.3g} % (limit {lim_P:.2g} %)")
            if verdict:
                problems.append(f"disagrees with the reference {source}: " + ", ".join(verdict))
            else:
                text += f"; agrees with the reference {source} (ΔT = {dT:+.3g} K, ΔP = {dP:+.3g} %)"
        fus = ctx.dataset.metadata.constants.get("dH_fusion")
        if fus is not None and est.dH_fus > 0:
            u_ref = fus.uncertainty or 0.0
            dev = 100 * (est.dH_fus - fus.value) / fus.value
            lim = s["k"] * 100 * math.hypot(est.u_dH_fus, u_ref) / fus.value + s["dH_fus_tolerance_percent"]
            metrics.update({"dH_fus_ref_J_per_mol": fus.value, "dH_fus_dev_percent": dev})
            if abs(dev) > lim:
                problems.append(f"ΔH_fus differs from the reference {fus.value / 1e3:.4g} kJ/mol ({fus.source}) "
                                f"by {dev:+.3g} % (limit {lim:.2g} %)")
        if causes:
            text += f"; {len(causes)} row(s) fit the other branch (phase label)"
        ctx.triple_point = TriplePointRecord(
            T_K=est.T, u_T_K=est.u_T, P_Pa=est.P, u_P_Pa=est.u_P, dH_fus_J_per_mol=est.dH_fus,
            u_dH_fus_J_per_mol=est.u_dH_fus,
            reference=None if ref is None else {"T_K": ref[0], "P_Pa": ref[1], "source": ref[4]})
        status = "fail" if est.dH_fus <= 0 else (s.severity if (problems or causes) else "pass")
        return CheckResult(self.id, self.title, status, "; ".join([text] + problems), metrics,
                           flags, point_status, causes)

    @staticmethod
    def _reference(ctx):
        known = known_triple_point(ctx)
        if known is None or known.P_Pa is None:
            return None
        return known.T_K, known.P_Pa, known.u_T_K, known.u_P_Pa, known.text

    def _phase_labels(self, ctx, fit_s, fit_l, s, solid="solid"):
        """Rows marked by the outlier screening that fit the other branch."""
        from ..thermo.equations import ln_p_where_defined

        causes, flags, status = {}, [], {}
        fits = {"solid": fit_s, "liquid": fit_l}
        scale = {b: _fit_residual_scale(f) for b, f in fits.items()}
        for p in ctx.dataset.points:
            # a row of another crystal form is judged by the transition check, not here
            if ctx.phase(p) not in (solid, "liquid") or p.phase not in fits:
                continue
            if ctx.status.get(p.row) not in ("suspect", "reject") or not p.readable:
                continue
            if not (p.T_K > 0 and p.P_Pa > 0):
                continue
            other = "liquid" if p.phase == "solid" else "solid"
            lnp = math.log(p.P_Pa)
            # a curve is asked only where it is defined (a row labelled solid at 700 K lies above
            # the Tc of a reduced liquid form): such a row is no phase-label candidate
            r_own = (lnp - float(ln_p_where_defined(fits[p.phase].equation, p.T_K)[0])) / scale[p.phase]
            r_other = (lnp - float(ln_p_where_defined(fits[other].equation, p.T_K)[0])) / scale[other]
            if not (math.isfinite(r_own) and math.isfinite(r_other)):
                continue
            if abs(r_other) <= s["phase_label_k"] and abs(r_own) > 2 * s["phase_label_k"]:
                msg = (f"labelled {p.phase} but fits the {other} branch ({r_other:+.1f} σ) far better than its "
                       f"own ({r_own:+.1f} σ): phase label probably wrong")
                causes[p.row] = Cause("phase-label", msg, p.T_K, p.P_Pa)
                flags.append(PointFlag(p.row, self.id, s.severity, msg))
                status[p.row] = "suspect"
        return causes, tuple(flags), status


def _fit_residual_scale(fit) -> float:
    """Residual scale of ln P over the points a fit used (normal-consistent MAD), floored."""
    from ..thermo.stats import mad_scale

    r = fit.residuals_lnP[fit.weights > 0]
    return max(mad_scale(r), 1e-4) if r.size else 1e-4
