"""Regenerate the synthetic demo input files in ``audit/demo_data/``.

SYNTHETIC DATA.  The demo tables are invented for this project: the values
are computed from published reference equations of state (through the
CoolProp package, which implements them) with seeded noise and deliberately
planted faults; the company and laboratory names are fictitious.

Run: ``.venv/bin/python reports_demo/make_demo_data.py`` (needs the test
extra, which installs CoolProp).  The committed files are what ``vpaudit
demo`` audits; rerunning this script reproduces them byte for byte.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

OUT = Path(__file__).resolve().parent.parent / "audit" / "demo_data"
MMHG_PA = 133.322387415  # conventional millimetre of mercury [Pa], NIST SP 811 (2008) App. B


def supplier_sheet() -> None:
    """A supplier's property sheet for toluene: °C, mmHg, decimal commas.

    Saturation pressure of toluene from the reference equation of state of
    Lemmon & Span, J. Chem. Eng. Data 51, 785 (2006), via CoolProp, rounded
    as a sheet would print it, with 0.3 % seeded noise and three planted
    problems: a footnote-marked cell, a value keyed in kPa inside the mmHg
    column, and two transposed digits.
    """
    import CoolProp.CoolProp as CP

    rng = np.random.default_rng(20261202)
    t_c = np.arange(0.0, 111.0, 5.0)
    rows = []
    for i, t in enumerate(t_c):
        p_pa = CP.PropsSI("P", "T", t + 273.15, "Q", 0, "toluene") * (1 + 0.003 * rng.standard_normal())
        p_mmhg = p_pa / MMHG_PA
        text = f"{p_mmhg:.2f}".replace(".", ",")
        if t == 40.0:
            text = f"{p_pa / 1000:.3f}".replace(".", ",")       # kPa typed into the mmHg column
        if t == 65.0:
            text = text[0] + text[2] + text[1] + text[3:]        # transposed digits
        if t == 90.0:
            text = text + "*"                                   # footnote mark
        rows.append((f"{t:.1f}".replace(".", ","), text))
    lines = ["# SYNTHETIC DATA for the vpaudit demo - fictitious supplier 'Halden Solvents', sheet HS-TOL-07",
             "Temperature (°C);Vapour pressure p (mmHg)"]
    lines += [f"{a};{b}" for a, b in rows]
    lines.append("# * value under review by the supplier")
    (OUT / "supplier_toluene.csv").write_bytes(("\n".join(lines) + "\n").encode("cp1252"))
    (OUT / "supplier_toluene.toml").write_text(
        '# SYNTHETIC demo metadata: constants from CoolProp 8 (reference EOS of Lemmon & Span 2006)\n'
        'substance = "toluene"\ncas = "108-88-3"\n\n[constants]\n'
        'molar_mass = { value = 92.13842, unit = "g/mol", source = "CoolProp 8.0 (Lemmon & Span 2006)" }\n'
        'T_critical = { value = 591.75, unit = "K", source = "CoolProp 8.0 (Lemmon & Span 2006)" }\n'
        'P_critical = { value = 4.1263, unit = "MPa", source = "CoolProp 8.0 (Lemmon & Span 2006)" }\n'
        'acentric_factor = { value = 0.2657, unit = "1", source = "CoolProp 8.0 (Lemmon & Span 2006)" }\n'
        'T_boiling = { value = 383.746, unit = "K", source = "CoolProp 8.0 (Lemmon & Span 2006)" }\n'
        'T_triple = { value = 178.0, unit = "K", source = "CoolProp 8.0 (Lemmon & Span 2006)" }\n',
        encoding="utf-8")


R = 8.314462618  # J/(mol K), CODATA 2018


def supplier_equation_sheet() -> None:
    """A supplier's equation sheet for toluene whose unit note is wrong.

    An Antoine equation log10(P/mmHg) = A − B/(t/°C + C) is fitted (weighted least squares
    in ln P) to the saturation pressure of toluene from the reference equation of state of
    Lemmon & Span, J. Chem. Eng. Data 51, 785 (2006), via CoolProp, at 0–130 °C; the sheet
    prints its constants to the usual digits and states them for kPa.  Its table prints the
    equation's own values in mmHg to 0.01 (also under the kPa note), except the 70 °C row,
    copied from another grade's sheet (6 % lower).
    """
    import CoolProp.CoolProp as CP
    from scipy.optimize import least_squares

    t = np.linspace(0.0, 130.0, 27)
    p_mmhg = np.array([CP.PropsSI("P", "T", x + 273.15, "Q", 0, "toluene") for x in t]) / MMHG_PA

    def resid(c):
        return np.log(10) * (c[0] - c[1] / (t + c[2])) - np.log(p_mmhg)

    A, B, C = least_squares(resid, [7.0, 1345.0, 219.0]).x
    A, B, C = round(A, 5), round(B, 3), round(C, 3)
    rows = []
    for x in (0, 20, 40, 60, 70, 80, 100, 110):
        p = 10 ** (A - B / (x + C))
        if x == 70:
            p *= 0.94  # copied from another grade's sheet
        rows.append(f"  [{x}, \"{p:.2f}\"],")  # as text: the printed digits are kept
    text = (
        "# SYNTHETIC demo: a supplier's vapor-pressure sheet for toluene (invented supplier).\n"
        "# The constants were fitted for this demo to CoolProp's reference equation of state of\n"
        "# toluene (Lemmon & Span 2006) in mmHg and degC; the sheet states kPa by mistake, and its\n"
        "# 70 degC row is copied from another grade. See reports_demo/README.md.\n\n"
        "[sheet]\nsubstance = \"toluene\"\ncas = \"108-88-3\"\n"
        "supplier = \"Northfield Solvents (invented)\"\nproduct = \"Toluene, reagent grade, data sheet rev. 3\"\n\n"
        f"[equation]\nform = \"antoine\"\ncoefficients = {{ A = {A}, B = {B}, C = {C} }}\n"
        "gives = \"log10\"\nT_unit = \"degC\"\nP_unit = \"kPa\"\nrange = [0.0, 130.0]\n\n"
        "[table]\nrows = [\n" + "\n".join(rows) + "\n]\n")
    (OUT / "supplier_toluene.sheet.toml").write_text(text, encoding="utf-8")


COLLECTION = Path(__file__).resolve().parent / "collection"


def collection() -> None:
    """A small collection for ``vpaudit batch`` (reports_demo/collection/): five tables and a sheet.

    Saturation pressures from CoolProp's reference equations of state (water: IAPWS-95;
    ethanol: Schroeder et al. 2014; n-hexane: Span & Wagner 2003; acetone: Lemmon & Span 2006;
    cyclohexane: Zhou et al. 2014), with seeded noise and a planted fault in some: the
    laboratories and suppliers are invented.
    """
    import CoolProp.CoolProp as CP

    COLLECTION.mkdir(exist_ok=True)
    rng = np.random.default_rng(20261205)

    def psat(fluid, T_K):
        return np.array([CP.PropsSI("P", "T", float(t), "Q", 0, fluid) for t in np.atleast_1d(T_K)])

    def write(name, header, rows, comment):
        text = f"# SYNTHETIC demo data for vpaudit batch: {comment}\n" + header + "\n" + "\n".join(rows) + "\n"
        (COLLECTION / name).write_text(text, encoding="utf-8")
        substance = name.split("_")[0]
        (COLLECTION / name).with_suffix(".toml").write_text(
            f'# SYNTHETIC demo metadata\nsubstance = "{substance}"\n', encoding="utf-8")

    T = np.arange(280.0, 371.0, 5.0)
    p = psat("Water", T) * (1 + 0.001 * rng.standard_normal(T.size))
    write("water_static_cell.csv", "T/K,p/kPa", [f"{t:.2f},{x / 1000:.5g}" for t, x in zip(T, p)],
          "water, IAPWS-95 via CoolProp, 0.1 % noise; clean")
    T = np.arange(0.0, 76.0, 5.0)
    p = psat("Ethanol", T + 273.15) * (1 + 0.002 * rng.standard_normal(T.size)) / 1000
    rows = [f"{t:.1f},{x:.4g}" for t, x in zip(T, p)]
    for k in (6, 7, 8):  # printed in Pa under the kPa header
        rows[k] = f"{T[k]:.1f},{p[k] * 1000:.4g}"
    write("ethanol_supplier.csv", "t/°C,p/kPa", rows, "ethanol via CoolProp; rows 7-9 printed in Pa")
    Ta = np.arange(280.0, 341.0, 6.0)
    Tb = np.arange(283.0, 344.0, 6.0)
    pa = psat("n-Hexane", Ta) * (1 + 0.002 * rng.standard_normal(Ta.size))
    pb = psat("n-Hexane", Tb) * 1.03 * (1 + 0.002 * rng.standard_normal(Tb.size))
    rows = [f"{t:.2f},{x / 1000:.5g},Lab North 1979" for t, x in zip(Ta, pa)]
    rows += [f"{t:.2f},{x / 1000:.5g},Lab South 2004" for t, x in zip(Tb, pb)]
    write("hexane_two_labs.csv", "T/K,p/kPa,source", rows, "n-hexane via CoolProp; Lab South 3 % high")
    T = np.arange(260.0, 331.0, 10.0)
    p = psat("Acetone", T)
    write("acetone_handbook.csv", "T/K,p/kPa", [f"{t:.0f},{x / 1000:.3g}" for t, x in zip(T, p)],
          "acetone via CoolProp, printed to 3 significant digits as a handbook does; clean")
    T = np.arange(290.0, 351.0, 5.0)
    p = psat("Cyclohexane", T) * (1 + 0.001 * rng.standard_normal(T.size))
    rows = [f"{t:.2f},{x:.6g}" for t, x in zip(T, p)]
    rows[4] = f"{T[4]:.2f},{p[4] * 10:.6g}"  # decimal point one place off
    write("cyclohexane_lab.csv", "T/K,p/Pa", rows, "cyclohexane via CoolProp; row 5 ten times too high")


def _benzene_curves():
    """Liquid and solid vapor-pressure functions of benzene [Pa].

    Liquid: CoolProp's reference equation of state for benzene (Thol et al.,
    Int. J. Thermophys. 33, 1 (2012)), valid from the triple point up.
    Solid: a two-constant Clausius-Clapeyron curve through CoolProp's triple
    point (278.674 K, 4783.8 Pa) whose slope is the liquid's apparent slope
    there plus ΔH_fus = 9.87 kJ/mol (CRC Handbook value as given by the
    `chemicals` library), i.e. the Clapeyron equation with ΔH_sub = ΔH_vap +
    ΔH_fus at the triple point.  It is a construction for the demo, not a
    measured sublimation curve.
    """
    import CoolProp.CoolProp as CP

    Tt = CP.PropsSI("Ttriple", "benzene")
    pt = CP.PropsSI("P", "T", Tt, "Q", 0, "benzene")
    h = 1e-3
    # d ln p/d(1/T) of the liquid just above the triple point (one-sided difference)
    T1, T2 = Tt + h, Tt + 2 * h
    slope_liq = ((np.log(CP.PropsSI("P", "T", T2, "Q", 0, "benzene"))
                  - np.log(CP.PropsSI("P", "T", T1, "Q", 0, "benzene"))) / (1 / T2 - 1 / T1))
    dH_sub = -slope_liq * R + 9870.0

    def liquid(T):
        return np.array([CP.PropsSI("P", "T", float(t), "Q", 0, "benzene") for t in np.atleast_1d(T)])

    def solid(T):
        return pt * np.exp(-dH_sub / R * (1 / np.atleast_1d(T) - 1 / Tt))

    return liquid, solid, Tt


def literature_merge() -> None:
    """Four synthetic 'literature' series for benzene merged by a data group.

    Planted faults (row numbers are data rows, the first under the header is 1):
    see reports_demo/README.md, which lists them with what the audit should say.
    """
    liquid, solid, Tt = _benzene_curves()
    rng = np.random.default_rng(1958)
    rows = []  # (T text, p text, phase, source, u(T) text, u(p) text)

    def series(source, phase, T, u_T, u_rel, T_fmt, p_digits, bias=1.0, T_offset=0.0):
        curve = liquid if phase == "liquid" else solid
        for t in T:
            p = curve(t + T_offset)[0] * bias * (1 + u_rel * rng.standard_normal())
            t_obs = t + u_T * rng.standard_normal()
            rows.append([T_fmt.format(t_obs), f"{p / 1000:.{p_digits}g}", phase, source,
                         f"{u_T:g}", f"{100 * u_rel:g}"])

    series("Arlen & Voss 1958", "liquid", np.arange(283.15, 354.0, 5.0), 0.05, 0.003, "{:.2f}", 4)
    series("Brekke 1971", "solid", np.linspace(236.0, 277.0, 12), 0.02, 0.002, "{:.3f}", 5)
    series("Brekke 1971", "liquid", np.linspace(281.0, 330.0, 8), 0.02, 0.002, "{:.3f}", 5)
    series("Castell et al. 1994", "liquid", np.linspace(300.0, 420.0, 18), 0.02, 0.001, "{:.3f}", 6, bias=1.012)
    series("Dunmore 2009", "solid", np.linspace(231.0, 275.0, 10), 0.01, 0.004, "{:.2f}", 4)

    def find(source, phase, k):
        idx = [i for i, r in enumerate(rows) if r[3] == source and r[2] == phase]
        return idx[k]

    faults = []
    i = find("Arlen & Voss 1958", "liquid", 7)                 # °C written in the kelvin column
    rows[i][0] = f"{float(rows[i][0]) - 273.15:.2f}"
    faults.append((i, "temperature-unit"))
    i = find("Brekke 1971", "solid", 5)                       # a solid point labelled liquid
    rows[i][2] = "liquid"
    faults.append((i, "phase-label"))
    i = find("Castell et al. 1994", "liquid", 9)               # value keyed in mmHg, not kPa
    rows[i][1] = f"{float(rows[i][1]) * 1000 / MMHG_PA:.6g}"
    faults.append((i, "pressure-unit"))
    # decimal point one place off, ten times too small: ten times too large on a kPa column
    # would read as hPa, a unit slip (the two print the same)
    i = find("Dunmore 2009", "solid", 3)
    rows[i][1] = f"{float(rows[i][1]) / 10:.4g}"
    faults.append((i, "decimal-shift"))
    # two digits transposed: the first Dunmore row (from the 8th on) whose first adjacent
    # pair of unlike digits, swapped, changes the value by more than 5 %
    for k in range(7, 10):
        i = find("Dunmore 2009", "solid", k)
        text = rows[i][1]
        pairs = [(a, a + 1) for a in range(len(text) - 1)
                 if text[a].isdigit() and text[a + 1].isdigit() and text[a] != text[a + 1]]
        if not pairs:
            continue
        a, b = pairs[0]
        swapped = text[:a] + text[b] + text[a] + text[b + 1:]
        if abs(float(swapped) / float(text) - 1) > 0.05:
            rows[i][1] = swapped
            break
    faults.append((i, "digit-swap"))

    lines = ["# SYNTHETIC DATA for the vpaudit demo: benzene vapor pressures merged from four invented",
             "# 'literature' series (the sources and their authors do not exist). Generated from a published",
             "# equation of state with planted faults; see reports_demo/README.md.",
             "T/K,p/kPa,phase,source,u(T)/K,u(p)/%"]
    lines += [",".join(f'"{c}"' if "," in c else c for c in r) for r in rows]
    (OUT / "literature_benzene.csv").write_text("\n".join(lines) + "\n", encoding="utf-8")
    (OUT / "literature_benzene.toml").write_text(
        '# SYNTHETIC demo metadata. Constants: CoolProp 8.0 (reference equation of state of benzene,\n'
        '# Thol et al. 2012); enthalpy of fusion: CRC Handbook as given by the chemicals library.\n'
        'substance = "benzene"\ncas = "71-43-2"\n\n[constants]\n'
        'molar_mass = { value = 78.1118, unit = "g/mol", source = "CoolProp 8.0 (Thol et al. 2012)" }\n'
        'T_critical = { value = 562.02, unit = "K", source = "CoolProp 8.0 (Thol et al. 2012)" }\n'
        'P_critical = { value = 4.9063, unit = "MPa", source = "CoolProp 8.0 (Thol et al. 2012)" }\n'
        'acentric_factor = { value = 0.2108, unit = "1", source = "CoolProp 8.0 (Thol et al. 2012)" }\n'
        'T_boiling = { value = 353.216, unit = "K", source = "CoolProp 8.0 (Thol et al. 2012)" }\n'
        'T_triple = { value = 278.674, unit = "K", source = "CoolProp 8.0 (Thol et al. 2012)" }\n'
        'P_triple = { value = 4.7838, unit = "kPa", source = "CoolProp 8.0 (Thol et al. 2012)" }\n'
        'dH_fusion = { value = 9.87, unit = "kJ/mol", source = "CRC Handbook, via chemicals 1.5" }\n',
        encoding="utf-8")
    for i, kind in faults:
        print(f"  planted {kind:17s} at data row {i + 1}: {rows[i]}")


if __name__ == "__main__":
    OUT.mkdir(parents=True, exist_ok=True)
    supplier_sheet()
    literature_merge()
    supplier_equation_sheet()
    collection()
    print(f"wrote demo data to {OUT} and {COLLECTION}")
