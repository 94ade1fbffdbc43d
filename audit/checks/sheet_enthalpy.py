"""Check ``sheet-enthalpy``: the enthalpy a sheet's equation implies along its range."""

from __future__ import annotations

import math

import numpy as np

from ..results import CheckResult, EnthalpyValue
from .registry import Check, Option, register


@register
class SheetEnthalpy(Check):
    """The enthalpy of vaporization (or sublimation) the decoded equation implies.

    **What it checks.** ΔH = −R·Δz·d ln P/d(1/T) along the stated range (real-gas
    corrected when the critical constants and acentric factor are known): it
    must be positive everywhere (else fail); for a liquid it must not rise
    with temperature by more than ``rise_tolerance_percent`` (the enthalpy of
    vaporization falls towards zero at the critical point); where the
    equation passes 101.325 kPa, ΔH(Tb)/Tb must lie within ``trouton_band``.

    **Why it matters.** An equation can reproduce a few tabulated pressures
    and still have a slope that no substance has somewhere in its range — an
    Antoine C near the range's temperatures, a fitted extra term that turns
    over — and the slope is what an enthalpy, a heat load or a boil-off rate
    is computed from.

    **Method.** (1) The decoded equation's ln P and its analytic derivative d
    ln P/dT are evaluated at 25 evenly spaced temperatures of the stated
    range; an undefined value (a pole or a domain limit) fails. (2) ΔH =
    −R·Δz·d ln P/d(1/T) = R·Δz·T²·d ln P/dT at each, with Δz from the second
    virial coefficient when the critical constants and acentric factor are
    known (else apparent, Δz = 1); a ΔH ≤ 0 anywhere fails. (3) For a liquid,
    the rise 100·(max ΔH/ΔH(T_low) − 1) must not exceed
    ``rise_tolerance_percent``. (4) When ln P increases across the range and
    passes 101.325 kPa, Tb is interpolated on the grid and ΔH(Tb)/Tb must lie
    within ``trouton_band``.

    **Example.** "ΔH from 38.9 kJ/mol (273.2 K) to 33.1 kJ/mol (403.2 K),
    falling; Trouton ΔH(Tb)/Tb = 87.3 J/(mol K) at 383.8 K".

    **Options.** ``rise_tolerance_percent``, ``trouton_band``.
    """

    id = "sheet-enthalpy"
    applies_to = "sheet"
    title = "Enthalpy implied by the sheet's equation"
    method = ("Analytic slope of the decoded equation on 25 temperatures of the stated range; Clapeyron with "
              "Δz from the second virial coefficient when the constants allow.")
    references = ("B. P. E. Clapeyron, J. École Polytechnique 14, 153 (1834).",
                  "K. M. Watson, Ind. Eng. Chem. 35, 398 (1943) (ΔH_vap falls towards Tc).",
                  "F. M. Trouton, Phil. Mag. 18, 54 (1884) (Trouton's rule, common practice as a band).")
    options = {
        "rise_tolerance_percent": Option(float, "largest rise of a liquid's ΔH with T across the range", "%",
                                         0, 100),
        "trouton_band": Option(list, "plausible ΔH(Tb)/Tb at the normal boiling point", "J/(mol K)"),
    }

    def run(self, ctx) -> CheckResult:
        from ..products import round_temperatures
        from ..thermo.enthalpy import implied_enthalpy
        from .fits import real_gas_model
        from ._util import skipped

        s = ctx.settings(self.id)
        if ctx.T_range_K is None:
            return skipped(self, "the sheet states no range and has no table to take one from")
        lo, hi = ctx.T_range_K
        eq = ctx.decoding.equation
        model, why = real_gas_model(ctx, ctx.sheet.phase)
        T = np.linspace(lo, hi, 25)
        with np.errstate(all="ignore"):
            defined = np.isfinite(eq.ln_p(T)) & np.isfinite(eq.dlnp_dT(T))
        if not defined.all():
            bad = T[~defined]
            return CheckResult(self.id, self.title, "fail",
                               f"the equation is not defined at {bad[0]:.5g} K ({len(bad)} of 25 temperatures of "
                               f"the stated range {lo:.5g}–{hi:.5g} K): a pole or a domain limit inside the range",
                               {"n_undefined": int(len(bad))})
        try:
            h = implied_enthalpy(eq, T, correction=model) if model is not None else implied_enthalpy(eq, T)
            corrected = model is not None
        except ValueError as exc:
            h, corrected, why = implied_enthalpy(eq, T), False, f"real-gas correction failed: {exc}"
        dH = np.asarray(h.dH, dtype=float)
        shown = sorted({lo, hi, *round_temperatures(lo, hi)})
        with np.errstate(all="ignore"):
            # a pole between the 25 points may still sit on a round temperature
            shown = [t for t in shown if np.isfinite(eq.ln_p(t)).all() and np.isfinite(eq.dlnp_dT(t)).all()]
        if shown:
            hs = (implied_enthalpy(eq, np.array(shown), correction=model) if corrected
                  else implied_enthalpy(eq, np.array(shown)))
            ctx.plot_data["sheet_enthalpy"] = tuple(
                EnthalpyValue(ctx.sheet.phase, float(t), float(hs.dH[i]), None, corrected,
                              float(hs.dH_apparent[i]), float(hs.delta_z[i]),
                              "low end" if t == lo else "high end" if t == hi else "round")
                for i, t in enumerate(shown))
        kind = "real-gas corrected" if corrected else "apparent"
        metrics = {"dH_low_J_per_mol": float(dH[0]), "dH_high_J_per_mol": float(dH[-1]), "corrected": corrected}
        ctx.notes.append(f"{ctx.sheet.phase} enthalpy of the sheet's equation: {h.correction} ({why})")
        if not np.all(np.isfinite(dH)) or np.any(dH <= 0):
            bad = T[~(np.isfinite(dH) & (dH > 0))]
            return CheckResult(self.id, self.title, "fail",
                               f"the implied enthalpy is zero, negative or undefined at {bad[0]:.5g} K "
                               f"({len(bad)} of 25 temperatures of the range)", metrics)
        problems = []
        text = (f"ΔH ({kind}) from {dH[0] / 1000:.4g} kJ/mol ({lo:.5g} K) to {dH[-1] / 1000:.4g} kJ/mol "
                f"({hi:.5g} K)")
        if ctx.sheet.phase == "liquid":
            rise = 100 * (float(np.max(dH)) / float(dH[0]) - 1)
            metrics["rise_percent"] = rise
            if rise > s["rise_tolerance_percent"]:
                k = int(np.argmax(dH))
                problems.append(f"ΔH rises with T by {rise:.2g} % (to {dH[k] / 1000:.4g} kJ/mol at {T[k]:.5g} K; "
                                f"limit {s['rise_tolerance_percent']:g} %): a liquid's falls towards Tc")
            lnP = eq.ln_p(T)
            if np.all(np.isfinite(lnP)) and lnP[0] < math.log(101325.0) < lnP[-1] and np.all(np.diff(lnP) > 0):
                Tb = float(np.interp(math.log(101325.0), lnP, T))
                hb = implied_enthalpy(eq, Tb, correction=model) if corrected else implied_enthalpy(eq, Tb)
                ratio = float(hb.dH[0]) / Tb
                metrics.update({"T_boiling_K": Tb, "trouton_J_per_mol_K": ratio})
                band = s["trouton_band"]
                text += f"; Trouton ΔH(Tb)/Tb = {ratio:.3g} J/(mol K) at {Tb:.5g} K"
                if not band[0] <= ratio <= band[1]:
                    problems.append(f"Trouton's ratio {ratio:.3g} J/(mol K) at {Tb:.5g} K is outside "
                                    f"{band[0]:g}–{band[1]:g}")
        if problems:
            return CheckResult(self.id, self.title, s.severity, "; ".join(problems) + f"; {text}", metrics)
        return CheckResult(self.id, self.title, "pass", text, metrics)
