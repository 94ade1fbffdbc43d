"""Accuracy of the physics core on generated data (IAPWS-95/R14 and CoolProp).

Prints one table: recovered triple point of water, ΔH_vap at Tb with the
real-gas correction vs the equation of state, and the fit RMS.  Needs the
test extras (iapws, CoolProp).  Run: .venv/bin/python benchmarks/thermo_accuracy.py
"""

from __future__ import annotations

import numpy as np


def noisy(p, rel, seed):
    return np.asarray(p) * (1 + rel * np.random.default_rng(seed).standard_normal(np.shape(p)))


def main(seeds=range(10)) -> None:
    import CoolProp.CoolProp as CP
    from iapws import IAPWS95
    from iapws._iapws import _Sublimation_Pressure

    from audit.thermo import RealGasModel, implied_enthalpy, intersect_branches, select_equation

    rows = []
    # Water triple point, 40 ice + 30 liquid points, 0.05 % noise.
    Ti, Tl = np.linspace(200, 273.16, 40), np.linspace(273.16, 330, 30)
    pi = np.array([_Sublimation_Pressure(t) * 1e6 for t in Ti])
    pl = np.array([IAPWS95(T=t, x=0).P * 1e6 for t in Tl])
    dT, dP, uT, dHf, rms = [], [], [], [], []
    for s in seeds:
        Pi, Pl = noisy(pi, 5e-4, 2 * s), noisy(pl, 5e-4, 2 * s + 1)
        fs = select_equation(Ti, Pi, u_P=5e-4 * Pi, branch="solid").chosen
        fl = select_equation(Tl, Pl, u_P=5e-4 * Pl).chosen
        tp = intersect_branches(fs, fl)
        dT.append(tp.T - 273.16), dP.append(100 * (tp.P / 611.657 - 1)), uT.append(tp.u_T)
        dHf.append(100 * (tp.dH_fus / 6007 - 1)), rms.append(max(fs.rms_percent, fl.rms_percent))
    rows.append(("water triple point", f"ΔT rms {np.sqrt(np.mean(np.square(dT))):.3f} K (u {np.mean(uT):.3f})",
                 f"ΔP rms {np.sqrt(np.mean(np.square(dP))):.2f} %; ΔH_fus {np.mean(dHf):+.1f} %",
                 f"{np.mean(rms):.3f}"))

    cases = [("Water", "water-harvey-lemmon", None), ("Benzene", "nonpolar", None),
             ("Toluene", "nonpolar", None), ("Ethanol", "alkanol", 1.69)]
    for fluid, kind, mu in cases:
        Tc, Pc, w, M = (CP.PropsSI(k, fluid) for k in ("Tcrit", "pcrit", "acentric", "molar_mass"))
        Tb = CP.PropsSI("T", "P", 101325, "Q", 0, fluid)
        ref = (CP.PropsSI("H", "T", Tb, "Q", 1, fluid) - CP.PropsSI("H", "T", Tb, "Q", 0, fluid)) * M
        T = np.linspace(0.55 * Tc, 0.8 * Tc, 30)
        p = np.array([CP.PropsSI("P", "T", t, "Q", 0, fluid) for t in T])
        model = RealGasModel(Tc, Pc, w, polar_kind=kind, dipole_debye=mu)
        err_c, err_a, r, names = [], [], [], []
        for s in seeds:
            P = noisy(p, 5e-4, s)
            ch = select_equation(T, P, u_P=5e-4 * P, Tc=Tc, Pc=Pc)
            res = implied_enthalpy(ch.chosen, Tb, correction=model)
            err_c.append(100 * (res.dH[0] / ref - 1)), err_a.append(100 * (res.dH_apparent[0] / ref - 1))
            r.append(ch.chosen.rms_percent), names.append(ch.chosen_name)
        common = max(set(names), key=names.count)
        rows.append((f"{fluid} ΔH_vap(Tb)", f"corrected {np.mean(err_c):+.2f} ± {np.std(err_c):.2f} %",
                     f"apparent {np.mean(err_a):+.2f} %; form {common}", f"{np.mean(r):.3f}"))

    print(f"{'data set (0.05 % noise, 10 seeds)':28s} | {'result':34s} | {'detail':40s} | fit RMS %")
    print("-" * 120)
    for a, b, c, d in rows:
        print(f"{a:28s} | {b:34s} | {c:40s} | {d}")


if __name__ == "__main__":
    main()
