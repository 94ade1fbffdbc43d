"""Check ``reference-agreement``: the data against a trusted reference correlation."""

from __future__ import annotations

import math


import numpy as np

from ..errors import InputError
from ..results import CheckResult, PointFlag
from .fits import is_water
from ._util import skipped
from .registry import Check, Option, register


@register
class ReferenceAgreement(Check):
    """Deviations from a reference correlation, by branch and by source.

    **What it checks.** Each usable point's relative deviation
    100·(P − P_ref)/P_ref from a reference vapor-pressure correlation, and
    the mean (bias) and RMS of those deviations per branch and per source.
    A branch or source whose bias exceeds ``k`` × its standard error plus
    ``tolerance_percent`` warns; points outside the reference's validity
    range are flagged (the comparison there is an extrapolation).

    **References used.** Built in for water: the IAPWS-95 auxiliary
    saturation-pressure equation (Wagner & Pruss) for the liquid and the
    IAPWS R14-08(2011) sublimation equation for ice Ih.  For any substance,
    a ``[reference_equation]`` table in the metadata file gives one of the
    equation forms with its coefficients, units, validity range and source.

    **Why it matters.** A curator trusts a recommended correlation more than
    any single table; a systematic departure from it is the first sign of a
    biased source, and a new data set should say where it stands.

    **Method.** (1) The reference equations in force are taken from the
    metadata's ``[reference_equation]`` table(s), else, for water, the
    built-in IAPWS equations for liquid and ice. (2) For each usable point of
    a branch the reference covers, the relative deviation 100·(P −
    P_ref)/P_ref is computed; points outside the reference's validity range
    are flagged as compared by extrapolation, and points where the reference
    is undefined are left out. (3) Per branch, and per source when there are
    two or more, the bias (mean deviation), the RMS and the standard error of
    the mean s/√n (sample standard deviation, n − 1 degrees of freedom; never
    below the points' own standard uncertainty, the consensus's or the
    rounding of the printed digits, so that one row or a few that happen to
    agree do not claim a scatter of zero) are computed; a bias beyond ``k`` times its standard error plus
    ``tolerance_percent`` is reported.

    **Example.** "liquid vs IAPWS-95 auxiliary equation: bias +0.012 ± 0.010 %,
    RMS 0.05 % over 25 points".

    **Options.** ``k``, ``tolerance_percent``.
    """

    id = "reference-agreement"
    title = "Agreement with a reference correlation"
    method = ("Relative deviations from the reference are averaged per branch and per source; the "
              "bias is compared with k times its standard error (scatter/√n) plus a tolerance.")
    references = (
        "W. Wagner, A. Pruß, J. Phys. Chem. Ref. Data 31, 387 (2002), doi:10.1063/1.1461829 "
        "(auxiliary equation for the vapor pressure; first given in J. Phys. Chem. Ref. Data 22, 783 (1993)).",
        "IAPWS R14-08(2011); W. Wagner et al., J. Phys. Chem. Ref. Data 40, 043103 (2011), "
        "doi:10.1063/1.3657937 — sublimation pressure of ice Ih.",
    )
    options = {
        "k": Option(float, "coverage factor on the bias's standard error [-]", "", 0.5, 10),
        "tolerance_percent": Option(float, "bias always tolerated (reference's own uncertainty)", "%", 0, 100),
    }

    def run(self, ctx):
        s = ctx.settings(self.id)
        refs = reference_equations(ctx)
        if not refs:
            return skipped(self, "no reference correlation: built in for water only; give one in the "
                                 "metadata file as [reference_equation]")
        flags, problems, texts, metrics = [], [], [], {}
        deviations, curves = {}, {}
        for branch, (eq, T_lo, T_hi, name) in refs.items():
            pts = ctx.usable(branch) if branch in ctx.branches() else []
            if not pts:
                continue
            T = np.array([p.T_K for p in pts])
            P = np.array([p.P_Pa for p in pts])
            P_ref = _reference_p(eq, T)
            dev = 100 * (P - P_ref) / P_ref
            u_points = _point_u_percent(ctx, pts)
            outside = (T < T_lo) | (T > T_hi)
            for p, o in zip(pts, outside):
                if o:
                    flags.append(PointFlag(p.row, self.id, "warn",
                                           f"T = {p.T_K:.6g} K is outside the validity range of {name} "
                                           f"({T_lo:.6g}–{T_hi:.6g} K): compared by extrapolation"))
            ok = np.isfinite(dev)
            for p, d in zip(pts, dev):
                if np.isfinite(d):
                    deviations[p.row] = float(d)
            grid = np.linspace(max(T.min(), T_lo), min(T.max(), T_hi), 200) if T.min() < T_hi and T.max() > T_lo else T
            curves[branch] = {"T_K": grid.tolist(), "P_Pa": _reference_p(eq, grid).tolist()}
            groups = {f"{branch}": ok}
            sources = sorted({p.source for p in pts if p.source})
            if len(sources) > 1:
                for src in sources:
                    groups[f"{branch}/{src}"] = ok & np.array([p.source == src for p in pts])
            for label, mask in groups.items():
                d = dev[mask]
                if d.size == 0:
                    continue
                bias = float(d.mean())
                rms = float(np.sqrt(np.mean(d ** 2)))
                # the points' own standard uncertainty is a floor on their scatter: one row, or a
                # few that happen to agree, says nothing of a source's scatter
                own = u_points[mask]
                var = max(float(d.var(ddof=1)) if d.size > 1 else 0.0,
                          float(np.mean(own[np.isfinite(own)] ** 2)) if np.isfinite(own).any() else 0.0)
                se = math.sqrt(var / d.size) if var > 0 else float("nan")
                lim = s["k"] * (se if np.isfinite(se) else 0.0) + s["tolerance_percent"]
                metrics[label] = {"n": int(d.size), "bias_percent": bias, "u_bias_percent": se,
                                  "rms_percent": rms, "limit_percent": lim, "reference": name,
                                  "n_outside_validity": int(outside[mask].sum())}
                t = (f"{label} vs {name}: bias {bias:+.3g} ± {se:.2g} %, RMS {rms:.3g} % over {d.size} points")
                (problems if abs(bias) > lim else texts).append(t + (f" (limit {lim:.2g} %)" if abs(bias) > lim else ""))
            if outside.any():
                problems.append(f"{int(outside.sum())} {branch} point(s) outside the validity range of {name}")
        if not metrics:
            return skipped(self, "no usable points in a branch the reference covers")
        ctx.reference_deviation_percent = deviations
        ctx.plot_data["reference"] = {
            "name": "; ".join(sorted({v[3] for v in refs.values()})), "curves": curves}
        status = s.severity if problems else "pass"
        return CheckResult(self.id, self.title, status, "; ".join(problems + texts), metrics, tuple(flags))


def reference_equations(ctx) -> dict:
    """branch → (equation, T_min, T_max, name) of the reference correlations in force."""
    from ..thermo.reference import IceSublimationIAPWS2011, WaterSaturationWagnerPruss

    md = ctx.dataset.metadata
    given = md.extra.get("reference_equation") if md.extra else None
    if given:
        tables = given if isinstance(given, list) else [given]
        return dict(_from_metadata(t, ctx.dataset.file_name) for t in tables)
    if is_water(ctx):
        liq, ice = WaterSaturationWagnerPruss(), IceSublimationIAPWS2011()
        return {"liquid": (liq, liq.T_min, liq.T_max, "IAPWS-95 auxiliary saturation equation (Wagner & Pruss)"),
                "solid": (ice, ice.T_min, ice.T_max, "IAPWS R14-08(2011) sublimation equation")}
    return {}


_FORM_KEYS = {"form", "parameters", "base", "P_unit", "T_unit", "valid_from_K", "valid_to_K", "source",
              "branch", "fixed"}


def _from_metadata(table: dict, file_name: str):
    """Build a reference equation from a metadata ``[reference_equation]`` table.

    Example::

        [reference_equation]
        form = "antoine"                  # or clausius-clapeyron-2, clausius-clapeyron-3, clarke-glew, wagner
        parameters = { A = 6.95464, B = 1344.8, C = 219.482 }
        base = "log10"                    # antoine only
        P_unit = "mmHg"                   # antoine only (other forms: SI)
        T_unit = "degC"                   # antoine only
        valid_from_K = 286.0
        valid_to_K = 410.0
        branch = "liquid"                 # or "solid"
        source = "..."
    """
    from ..thermo.equations import Antoine, get_form

    where = "[reference_equation]"
    if not isinstance(table, dict):
        raise InputError(f"{where} must be a table", file=file_name)
    unknown = set(table) - _FORM_KEYS
    if unknown:
        raise InputError(f"{where} has unknown key(s): {', '.join(sorted(unknown))}", file=file_name,
                         hint=f"allowed: {', '.join(sorted(_FORM_KEYS))}")
    for key in ("form", "parameters", "valid_from_K", "valid_to_K", "source"):
        if key not in table:
            raise InputError(f"{where} needs '{key}'", file=file_name)
    branch = table.get("branch", "liquid")
    if branch not in ("liquid", "solid"):
        raise InputError(f"{where} branch must be 'liquid' or 'solid'", file=file_name)
    params = table["parameters"]
    try:
        if str(table["form"]).lower() == "antoine":
            eq = Antoine(A=float(params["A"]), B=float(params["B"]), C=float(params["C"]),
                         base=table.get("base", "log10"), P_unit=table.get("P_unit", "Pa"),
                         T_unit=table.get("T_unit", "K"))
        else:
            cls = get_form(str(table["form"]))
            eq = cls(**{k: float(v) for k, v in {**params, **table.get("fixed", {})}.items()})
        lo, hi = float(table["valid_from_K"]), float(table["valid_to_K"])
    except (KeyError, TypeError, ValueError, OverflowError, AttributeError) as exc:
        raise InputError(f"{where} cannot be used: {exc}", file=file_name,
                         hint="see 'vpaudit explain reference-agreement' for the format") from None
    if not (math.isfinite(lo) and math.isfinite(hi) and 0 < lo < hi):
        raise InputError(f"{where} valid_from_K = {lo!r}, valid_to_K = {hi!r} must be finite, above 0 K, "
                         "low then high", file=file_name)
    return branch, (eq, lo, hi, f"{table['form']} ({table['source']})")


def _point_u_percent(ctx, points) -> np.ndarray:
    """Each point's standard uncertainty [%]: the consensus's, else the rounding of its printed
    pressure; NaN when neither is known."""
    from ..thermo.rounding import pressure_rounding_u_lnP

    u_cons = ctx.consensus.u_percent if ctx.consensus else {}
    out = []
    for p in points:
        u = u_cons.get(p.row, math.nan)
        if not (math.isfinite(u) and u > 0):
            u = 100 * pressure_rounding_u_lnP(p.P_text, p.P_text_unit)
        out.append(u)
    return np.array(out, float)


def _reference_p(eq, T) -> np.ndarray:
    """The reference's P [Pa] at T [K]; NaN where it is not defined (at or above the Tc of a
    reduced form, T ≤ 0): those points are not compared rather than stopping the check."""
    from ..thermo.equations import ln_p_where_defined

    with np.errstate(over="ignore"):
        return np.exp(ln_p_where_defined(eq, T)).reshape(np.shape(T))
