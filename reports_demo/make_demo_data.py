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


if __name__ == "__main__":
    OUT.mkdir(parents=True, exist_ok=True)
    supplier_sheet()
    print(f"wrote demo data to {OUT}")
