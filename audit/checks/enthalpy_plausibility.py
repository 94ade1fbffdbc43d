"""Check ``enthalpy-plausibility``: Trouton's ratio, ΔH_sub > ΔH_vap, calorimetry."""

from __future__ import annotations

import math

import numpy as np

from ..results import CheckResult
from .fits import implied, recommended, solid_meeting_liquid
from ._util import skipped
from .registry import Check, Option, register

P_STANDARD_BOILING = 101325.0  # Pa: the normal boiling point is defined at 1 atm


@register
class EnthalpyPlausibility(Check):
    """The implied enthalpies against what thermodynamics and calorimetry say.

    **What it checks.** (1) Trouton's ratio ΔH_vap(Tb)/Tb of the liquid
    branch, when the normal boiling point (metadata, or where the fit
    reaches 101 325 Pa) lies within ``Tb_margin_K`` of the data; it must lie
    within the profile's band.  (2) Where both branches exist, ΔH_sub >
    ΔH_vap at the temperature where they meet (ΔH_fus > 0).  (3) A
    calorimetric enthalpy given in the metadata (``dH_vap_calorimetric`` at
    ``T_dH_vap_calorimetric``, likewise ``dH_sub_*``) agrees with the
    real-gas-corrected implied value within ``k`` × combined uncertainty
    plus ``tolerance_percent``.

    **Why it matters.** Trouton's rule is a rule of thumb of the trade
    (common practice): about 85–88 J mol⁻¹ K⁻¹ for non-associated liquids,
    near 109–111 for water and alcohols, lower for dimerising acids; a ratio
    far outside a wide band means the slope — hence a temperature column —
    is wrong.  Agreement with calorimetry is the classic independent test
    of vapor-pressure data.

    **Method.** ΔH is computed from the slope of each branch's fit of record
    by the Clapeyron equation, ΔH = −R·Δz·d ln P/d(1/T), with Δz from the
    second virial coefficient when the critical constants allow (else
    apparent, Δz = 1). (1) Trouton: the normal boiling point is taken from the
    metadata or substance library, else found by a bracketed root of ln P(T) =
    ln 101 325 Pa; the test applies only when Tb lies within ``Tb_margin_K``
    of the data's temperatures, and then ΔH_vap(Tb)/Tb must lie within
    ``trouton_band``. (2) Where a solid branch meets the liquid, ΔH_sub and
    ΔH_vap are computed at the midpoint between the solid's highest and the
    liquid's lowest temperature; ΔH_sub must exceed ΔH_vap. (3) A calorimetric
    ΔH_vap or ΔH_sub given at a temperature is compared with the implied value
    there: the deviation must not exceed ``k``·√(u_implied² + u_cal²) +
    ``tolerance_percent`` of the calorimetric value.

    **Example.** toluene: "Trouton ΔH_vap(383.75 K)/Tb = 86.7 J mol⁻¹ K⁻¹,
    within 75–120".

    **Options.** ``trouton_band``, ``Tb_margin_K``, ``k``, ``tolerance_percent``.
    """

    id = "enthalpy-plausibility"
    title = "Plausibility of the implied enthalpies"
    method = ("ΔH from the recommended fit's slope (Clapeyron, real-gas corrected where the constants "
              "allow) at Tb, compared with Trouton's band; ΔH_sub vs ΔH_vap at the junction of the "
              "branches; calorimetric ΔH compared within combined standard uncertainty.")
    references = (
        "F. Trouton, Phil. Mag. 18, 54 (1884) — Trouton's rule.",
        "M. Růžička, V. Majer, J. Phys. Chem. Ref. Data 23, 1 (1994), doi:10.1063/1.555942 — "
        "consistency of vapor pressures with calorimetric enthalpies.",
    )
    options = {
        "trouton_band": Option(list, "plausible ΔH_vap(Tb)/Tb [low, high] (wide; common practice)",
                               "J mol⁻¹ K⁻¹"),
        "Tb_margin_K": Option(float, "how far outside the data Tb may lie for the Trouton test", "K", 0, 200),
        "k": Option(float, "coverage factor on the combined uncertainty [-]", "", 0.5, 10),
        "tolerance_percent": Option(float, "allowed departure from calorimetry on top of k·u", "%", 0, 100),
    }

    def run(self, ctx):
        s = ctx.settings(self.id)
        md = ctx.dataset.metadata
        texts, problems, metrics = [], [], {}
        branches = ctx.branches()
        liquid = "liquid" if "liquid" in branches else ("unknown" if "unknown" in branches else None)
        tested = 0
        if liquid is not None:
            choice, data = recommended(ctx, liquid)
            if choice is not None:
                Tb = md.get("T_boiling")
                tb_source = "metadata/library"
                if Tb is None:
                    Tb = _temperature_at_pressure(choice.chosen.equation, P_STANDARD_BOILING,
                                                  data.T.min() - s["Tb_margin_K"], data.T.max() + s["Tb_margin_K"])
                    tb_source = "where the fit reaches 101 325 Pa"
                if Tb is not None and data.T.min() - s["Tb_margin_K"] <= Tb <= data.T.max() + s["Tb_margin_K"]:
                    h, corrected, why = implied(ctx, liquid, np.array([Tb]))
                    ratio = float(h.dH[0]) / Tb
                    lo, hi = s["trouton_band"]
                    tested += 1
                    metrics.update({"T_boiling_K": Tb, "T_boiling_source": tb_source,
                                    "dH_vap_at_Tb_J_per_mol": float(h.dH[0]), "trouton_ratio": ratio,
                                    "real_gas_corrected": corrected})
                    t = (f"Trouton ΔH_vap({Tb:.2f} K)/Tb = {ratio:.1f} J mol⁻¹ K⁻¹ "
                         f"({'real-gas corrected' if corrected else 'apparent; ' + why})")
                    if lo <= ratio <= hi:
                        texts.append(f"{t}, within {lo:g}–{hi:g}")
                    else:
                        problems.append(f"{t}, outside the band {lo:g}–{hi:g}")
                else:
                    texts.append("normal boiling point not within reach of the data: Trouton test not applied")
        solid = solid_meeting_liquid(ctx, branches)
        if solid is not None and liquid is not None:
            cs, ds = recommended(ctx, solid)
            cl, dl = recommended(ctx, liquid)
            if cs is not None and cl is not None:
                T_j = 0.5 * (float(ds.T.max()) + float(dl.T.min()))
                hs, _, _ = implied(ctx, solid, np.array([T_j]))
                hl, _, _ = implied(ctx, liquid, np.array([T_j]))
                tested += 1
                diff = float(hs.dH[0] - hl.dH[0])
                metrics.update({"T_junction_K": T_j, "dH_sub_J_per_mol": float(hs.dH[0]),
                                "dH_vap_J_per_mol": float(hl.dH[0])})
                t = (f"at {T_j:.2f} K ΔH_sub = {hs.dH[0] / 1e3:.4g} kJ/mol, ΔH_vap = {hl.dH[0] / 1e3:.4g} kJ/mol")
                if diff > 0:
                    texts.append(f"{t}: ΔH_sub > ΔH_vap as it must be")
                else:
                    problems.append(f"{t}: ΔH_sub ≤ ΔH_vap, impossible (ΔH_fus > 0)")
        for kind, branch in (("vap", liquid), ("sub", solid)):
            cal = md.constants.get(f"dH_{kind}_calorimetric")
            T_cal = md.get(f"T_dH_{kind}_calorimetric")
            if cal is None or T_cal is None or branch is None:
                continue
            h, corrected, why = implied(ctx, branch, np.array([T_cal]))
            if h is None:
                continue
            tested += 1
            u = math.hypot(float(h.u_dH[0]) if np.isfinite(h.u_dH[0]) else 0.0, cal.uncertainty or 0.0)
            dev = float(h.dH[0]) - cal.value
            lim = s["k"] * u + s["tolerance_percent"] / 100 * cal.value
            metrics.update({f"dH_{kind}_calorimetric_J_per_mol": cal.value,
                            f"dH_{kind}_implied_J_per_mol": float(h.dH[0]),
                            f"dH_{kind}_deviation_percent": 100 * dev / cal.value})
            t = (f"implied ΔH_{kind}({T_cal:.2f} K) = {h.dH[0] / 1e3:.4g} ± {h.u_dH[0] / 1e3:.2g} kJ/mol vs "
                 f"calorimetric {cal.value / 1e3:.4g} kJ/mol ({cal.source}): {100 * dev / cal.value:+.2g} %")
            if not corrected:
                t += f" [apparent: {why}]"
            (texts if abs(dev) <= lim else problems).append(f"{t} (limit {lim / 1e3:.2g} kJ/mol)")
        if not tested:
            return skipped(self, "; ".join(texts) or "no branch with a fit, no boiling point in reach, "
                                                     "no calorimetric enthalpy given")
        status = s.severity if problems else "pass"
        return CheckResult(self.id, self.title, status, "; ".join(problems + texts), metrics)


def _temperature_at_pressure(eq, P, lo, hi):
    """T [K] where the curve reaches P, searched in [lo, hi]; None if it does not."""
    from ..thermo.roots import bracketed_root, sign_change_brackets

    lnP = math.log(P)
    lo = max(lo, 1.0)
    Tc = getattr(eq, "Tc", None)
    if isinstance(Tc, float) and Tc > 0:  # reduced forms are undefined at and above Tc
        hi = min(hi, Tc * (1 - 1e-9))
    for a, b in sign_change_brackets(lambda t: eq.ln_p(t) - lnP, lo, hi):
        root = bracketed_root(lambda t: float(eq.ln_p(np.array([t]))[0]) - lnP, a, b)
        if root is not None:
            return root
    return None
