"""A water sheet whose equation is the IAPWS-95 auxiliary saturation equation written as a
formula, checked against the full IAPWS-95 formulation (``iapws`` package).

Equation: W. Wagner, A. Pruss, J. Phys. Chem. Ref. Data 22, 783 (1993) and 31, 387
(2002): ln(p/pc) = (Tc/T)(a1 τ + a2 τ^1.5 + a3 τ^3 + a4 τ^3.5 + a5 τ^4 + a6 τ^7.5),
τ = 1 − T/Tc, Tc = 647.096 K, pc = 22.064 MPa, a = (−7.85951783, 1.84408259,
−11.7866497, 22.6807411, −15.9618719, 1.80122502).
"""

from __future__ import annotations

import pytest

from audit.profiles import load_profile
from audit.sheet.read import sheet_from_text
from audit.sheet.run import run_sheet_audit
from tests.references import iapws95_enthalpy, iapws_r10_06, wagner_pruss_2002

FORMULA = ("ln(Pc) + (Tc/T)*(a1*(1 - T/Tc) + a2*(1 - T/Tc)^1.5 + a3*(1 - T/Tc)^3 + a4*(1 - T/Tc)^3.5"
           " + a5*(1 - T/Tc)^4 + a6*(1 - T/Tc)^7.5)")
COEFFICIENTS = ", ".join([f"a{i} = {a!r}" for i, a in enumerate(wagner_pruss_2002.A, start=1)]
                         + [f"Tc = {wagner_pruss_2002.TC!r}"])


def _sheet(P_unit_stated, Pc, gives="ln", T_unit="K"):
    text = (f'[sheet]\nsubstance = "water"\n[equation]\nform = "expression"\nexpression = "{FORMULA}"\n'
            f"coefficients = {{ {COEFFICIENTS}, Pc = {Pc!r} }}\n"
            f'gives = "{gives}"\nT_unit = "{T_unit}"\nP_unit = "{P_unit_stated}"\nrange = [{iapws_r10_06.T_TRIPLE!r}, 640.0]\n')
    return sheet_from_text(text.encode(), "water.sheet.toml")


@pytest.fixture(scope="module")
def as_stated():
    return run_sheet_audit(_sheet("MPa", wagner_pruss_2002.PC / 1e6), load_profile("default"))


def test_the_formula_reproduces_iapws95(as_stated):
    from iapws import IAPWS95

    eq = as_stated.fits[0].model
    for T in (280.0, iapws95_enthalpy.T_BOILING, 500.0, 620.0):
        p_ref = IAPWS95(T=T, x=0).P * 1e6  # MPa → Pa
        # the auxiliary equation represents IAPWS-95 to within 0.0072 % (Wagner & Pruss 2002)
        assert float(eq.p(T)) == pytest.approx(p_ref, rel=1e-4)


def test_the_water_sheet_passes_against_the_iapws_reference(as_stated):
    by_id = {c.id: c for c in as_stated.checks}
    assert by_id["sheet-units"].status == "pass" and not as_stated.sheet.differs
    assert by_id["sheet-reference"].status == "pass"
    assert abs(by_id["sheet-reference"].metrics["max_deviation_percent"]) < 1e-6  # the same equation
    assert "IAPWS" in by_id["sheet-reference"].metrics["reference"]
    # ΔH at the normal boiling point: 40.651 kJ/mol (IAPWS-95), Trouton 108.9 J/(mol K)
    assert by_id["sheet-enthalpy"].metrics["trouton_J_per_mol_K"] == pytest.approx(
        iapws95_enthalpy.DH_VAP_TB / iapws95_enthalpy.T_BOILING, rel=3e-3)
    # the range reaches 640 K = 0.989 Tc: an equation used that close to Tc is worth a warning
    assert by_id["sheet-range"].status == "warn" and "0.989 Tc" in by_id["sheet-range"].message


def test_pc_printed_in_kpa_under_an_mpa_note_is_decoded():
    result = run_sheet_audit(_sheet("MPa", wagner_pruss_2002.PC / 1e3), load_profile("default"))
    assert result.sheet.differs and result.sheet.decoded["P_unit"] == "kPa"
    assert next(c for c in result.checks if c.id == "sheet-units").status == "warn"
