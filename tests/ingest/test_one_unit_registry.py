"""One unit vocabulary and one pint registry for headers, metadata, reference equations and causes.

Unit factors are checked against NIST SP 811 (2008), Appendix B.8
(https://doi.org/10.6028/NIST.SP.811e2008): torr = 101325/760 Pa exactly
(footnote), conventional mmHg = 133.322387415 Pa exactly, psi = 6.894 757 E+03
Pa and inHg = 3.386 389 E+03 Pa to the table's 7 digits (tolerance 5e-7, half
a unit of the 7th digit), bar = 1e5 Pa, atm = 101325 Pa, kPa = 1e3 Pa exactly.

The Antoine constants of water, log10(p/mmHg) = 8.07131 - 1730.63/(t/°C +
233.426) for 1-100 °C, are the widely tabulated ones (e.g. Lange's Handbook of
Chemistry; quoted from memory); here they are *declared* in Torr (1.4e-7 from
mmHg) to exercise the unit, and the table's pressures come from IAPWS-95
through the ``iapws`` package.
"""

from __future__ import annotations

import math
import re
from pathlib import Path

import numpy as np
import pytest

import audit.units
from audit.cli import main
from audit.errors import InputError
from audit.ingest import read_metadata, read_table
from audit.pipeline import run_audit
from audit.thermo.equations import Antoine, antoine_convert
from audit.thermo.reference import reference_from_table
from tests.conftest import iapws_saturation_pressure

EXACT = 1e-12        # definitions: floating-point round-off only
SEVEN_DIGITS = 5e-7  # half a unit in the 7th digit of SP 811's table
TORR = 101325 / 760  # Pa, NIST SP 811 B.8 footnote (exact)

A, B, C = 8.07131, 1730.63, 233.426  # log10(P/Torr) = A - B/(t/°C + C), see module docstring
T_C = [20.0, 30.0, 40.0, 50.0, 60.0, 70.0, 80.0, 90.0]


def _reference_toml(P_unit="Torr", T_unit="degC", a=A, b=B, c=C, extra=""):
    return (f'substance = "synthetic"\n[reference_equation]\nform = "antoine"\n'
            f'parameters = {{ A = {a!r}, B = {b!r}, C = {c!r} }}\nbase = "log10"\n'
            f'P_unit = "{P_unit}"\nT_unit = "{T_unit}"\nvalid_from_K = 274.15\nvalid_to_K = 373.15\n'
            f'source = "water constants of Lange\'s Handbook (from memory), declared in {P_unit}"\n{extra}')


def _write_case(folder: Path, stem: str, toml: str) -> Path:
    """A synthetic table of IAPWS-95 pressures [kPa] at T_C, with `toml` beside it."""
    P = iapws_saturation_pressure(np.array(T_C) + 273.15) / 1e3
    rows = "".join(f"{t:.2f},{p:.6g},liquid\n" for t, p in zip(T_C, P))
    (folder / f"{stem}.csv").write_text("# SYNTHETIC (IAPWS-95 via iapws)\nT (°C),P (kPa),phase\n" + rows,
                                        encoding="utf-8")
    (folder / f"{stem}.toml").write_text(toml, encoding="utf-8")
    return folder / f"{stem}.csv"


def _reference_check(tmp_path, stem, toml, profile):
    result = run_audit(read_table(_write_case(tmp_path, stem, toml)), profile)
    chk = next(c for c in result.checks if c.id == "reference-agreement")
    return chk, result.plot_data["reference"]["curves"]["liquid"]


def test_torr_reference_equation_is_the_hand_converted_pa_curve(tmp_path, default_profile):
    """Same curve as the equation converted by hand with 1 Torr = 101325/760 Pa, t/°C = T/K - 273.15."""
    torr_chk, torr_curve = _reference_check(tmp_path, "torr", _reference_toml("Torr", "degC"), default_profile)
    pa = _reference_toml("Pa", "K", a=A + math.log10(TORR), b=B, c=C - 273.15)
    pa_chk, pa_curve = _reference_check(tmp_path, "pa", pa, default_profile)
    assert torr_chk.status != "skipped" and torr_chk.metrics["liquid"]["n"] == len(T_C)
    np.testing.assert_allclose(torr_curve["T_K"], pa_curve["T_K"], rtol=0)
    np.testing.assert_allclose(torr_curve["P_Pa"], pa_curve["P_Pa"], rtol=EXACT)
    T = np.array(torr_curve["T_K"])
    by_hand = 10.0 ** (A - B / (T - 273.15 + C)) * TORR
    np.testing.assert_allclose(torr_curve["P_Pa"], by_hand, rtol=EXACT)
    assert torr_chk.metrics["liquid"]["bias_percent"] == pytest.approx(
        pa_chk.metrics["liquid"]["bias_percent"], rel=1e-9, abs=1e-12)
    # these old 3-constant water values lie within 0.5 % of IAPWS-95 over 20-90 °C
    # (-0.42 % at 20 °C, see tests/thermo/test_antoine_conversion.py)
    assert abs(torr_chk.metrics["liquid"]["bias_percent"]) < 0.5


@pytest.mark.parametrize("spelling, pa_per_unit, rtol", [
    ("Torr", TORR, EXACT), ("torr", TORR, EXACT),
    ("mmHg", 133.322387415, EXACT), ("mm Hg", 133.322387415, EXACT),
    ("kPa", 1e3, EXACT), ("bar", 1e5, EXACT), ("atm", 101325.0, EXACT),
    ("psi", 6.894757e3, SEVEN_DIGITS), ("psia", 6.894757e3, SEVEN_DIGITS),
    ("inHg", 3.386389e3, SEVEN_DIGITS),
])
def test_reference_pressure_unit_reads_like_a_header(read_text, tmp_path, spelling, pa_per_unit, rtol):
    """Every header spelling works as P_unit and means the same size as in a header."""
    path = tmp_path / "m.toml"
    path.write_text(_reference_toml(spelling, "degC"), encoding="utf-8")
    ref = reference_from_table(read_metadata(path).extra["reference_equation"])
    in_pa = reference_from_table({**read_metadata(path).extra["reference_equation"], "P_unit": "Pa"})
    T = np.array([300.0, 350.0])
    np.testing.assert_allclose(ref.equation.p(T) / in_pa.equation.p(T), pa_per_unit, rtol=rtol)
    header = read_text(f"T/K,P ({spelling})\n300,1\n").points[0].P_Pa
    assert header == pytest.approx(pa_per_unit, rel=rtol)


@pytest.mark.parametrize("spelling, t_of_373_15_K", [
    ("degC", 100.0), ("°C", 100.0), ("C", 100.0), ("celsius", 100.0), ("K", 373.15),
    ("degF", 212.0), ("°F", 212.0),  # SP 811 B.9: t/°F = 1.8 t/°C + 32
])
def test_reference_temperature_unit_spellings(tmp_path, spelling, t_of_373_15_K):
    path = tmp_path / "m.toml"
    path.write_text(_reference_toml("Torr", spelling, c=2000.0), encoding="utf-8")
    eq = reference_from_table(read_metadata(path).extra["reference_equation"]).equation
    expected = TORR * 10.0 ** (A - B / (t_of_373_15_K + 2000.0))
    assert eq.p(373.15) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("change, key, says", [
    ({"P_unit": "furlong"}, "reference_equation.P_unit", "unknown pressure unit 'furlong'"),
    ({"P_unit": "psig"}, "reference_equation.P_unit", "gauge"),
    ({"T_unit": "Torr"}, "reference_equation.T_unit", "unknown temperature unit"),
    ({"base": "log2"}, "reference_equation.base", "'log10' or 'ln'"),
    ({"form": "antoin"}, "reference_equation.form", "unknown form"),
    ({"parameters": {"A": A, "B": B}}, "reference_equation.parameters.C", "needs coefficient 'C'"),
    ({"parameters": {"A": A, "B": B, "C": "x"}}, "reference_equation.parameters.C", "finite number"),
    ({"parameters": {"A": A, "B": B, "C": C, "D": 1.0}}, "reference_equation.parameters.D", "no coefficient"),
    ({"valid_to_K": 200.0}, "reference_equation.valid_to_K", "empty"),
    ({"source": ""}, "reference_equation.source", "non-empty"),
    ({"colour": "red"}, "reference_equation.colour", "unknown key"),
    ({"parameters": {"A": A, "B": B, "C": -50.0}}, "reference_equation.parameters", "pole"),
])
def test_bad_reference_equation_names_the_toml_file_and_key(tmp_path, change, key, says):
    import tomllib

    table = tomllib.loads(_reference_toml())["reference_equation"] | change
    path = tmp_path / "bad.toml"
    lines = [f"{k} = {_toml_value(v)}" for k, v in table.items()]
    path.write_text("[reference_equation]\n" + "\n".join(lines) + "\n", encoding="utf-8")
    with pytest.raises(InputError) as e:
        read_metadata(path)
    assert e.value.file == str(path)
    assert key in e.value.message and says in e.value.message


def _toml_value(v):
    if isinstance(v, dict):
        return "{ " + ", ".join(f"{k} = {_toml_value(x)}" for k, x in v.items()) + " }"
    return f'"{v}"' if isinstance(v, str) else repr(v)


def test_si_forms_refuse_a_non_si_unit(tmp_path):
    path = tmp_path / "w.toml"
    path.write_text('[reference_equation]\nform = "clausius-clapeyron-2"\nparameters = { A = 25.0, B = -5000.0 }\n'
                    'P_unit = "Torr"\nvalid_from_K = 300.0\nvalid_to_K = 400.0\nsource = "synthetic"\n',
                    encoding="utf-8")
    with pytest.raises(InputError, match=r"reference_equation\.P_unit = 'Torr'.*antoine form only"):
        read_metadata(path)


def test_one_table_per_branch(tmp_path):
    liquid = _reference_toml().split("[reference_equation]\n")[1]
    path = tmp_path / "two.toml"
    path.write_text(f"[[reference_equation]]\n{liquid}\n[[reference_equation]]\n{liquid}", encoding="utf-8")
    with pytest.raises(InputError, match=r"reference_equation\[1\]\.branch.*second reference"):
        read_metadata(path)
    path.write_text(f"[[reference_equation]]\n{liquid}\n[[reference_equation]]\n{liquid}branch = \"solid\"\n",
                    encoding="utf-8")
    assert len(read_metadata(path).extra["reference_equation"]) == 2


def test_cli_exit_2_names_the_toml_not_the_csv(tmp_path, capsys):
    csv = _write_case(tmp_path, "d", _reference_toml("furlong"))
    rc = main(["check", str(csv), "--out", str(tmp_path / "out"), "--format", "json"])
    err = capsys.readouterr().err
    assert rc == 2
    assert str(tmp_path / "d.toml") in err and "reference_equation.P_unit" in err
    assert str(csv) not in err


@pytest.mark.parametrize("unit, target, factor", [
    ("g/mol", "kg/mol", 1e-3), ("kJ/mol", "J/mol", 1e3), ("cm^3/mol", "m^3/mol", 1e-6),
    ("L/mol", "m^3/mol", 1e-3),  # SI Brochure (2019): 1 L = 1 dm^3 = 1e-3 m^3
    ("kcal/mol", "J/mol", 4184.0),  # SP 811 B.8: thermochemical calorie = 4.184 J (exact)
])
def test_usual_constant_units_without_pint_agree_with_the_definitions(unit, target, factor):
    assert audit.units.constant_factor(f" {unit} ", target) == pytest.approx(factor, rel=EXACT)


def test_metadata_constants_use_the_header_vocabulary(tmp_path):
    """'C' and 'mm Hg' mean what they mean in a header (pint would read coulomb, or fail)."""
    path = tmp_path / "c.toml"
    path.write_text('[constants]\nT_triple = { value = 80.0, unit = "C", source = "synthetic" }\n'
                    'P_triple = { value = 7.5, unit = "mm Hg", source = "synthetic" }\n'
                    'P_critical = { value = 1.0, unit = "psig", source = "synthetic" }\n', encoding="utf-8")
    with pytest.raises(InputError, match="constants.P_critical.unit 'psig'.*gauge"):
        read_metadata(path)
    path.write_text(path.read_text(encoding="utf-8").replace("psig", "psia"), encoding="utf-8")
    c = read_metadata(path).constants
    assert c["T_triple"].value == pytest.approx(353.15, rel=EXACT)
    assert c["P_triple"].value == pytest.approx(7.5 * 133.322387415, rel=EXACT)
    assert c["P_critical"].value == pytest.approx(6.894757e3, rel=SEVEN_DIGITS)


def test_factor_table_is_what_pint_computes():
    """The factor tables are generated from pint; they must match pint now, entry by entry, and the file."""
    assert audit.units.SI_FACTORS == audit.units.derive_si_factors()
    assert audit.units.CONSTANT_FACTORS == audit.units.derive_constant_factors()
    generated = audit.units._generated_table_source().splitlines()[1:]  # without the version comment
    source = Path(audit.units.__file__).read_text(encoding="utf-8")
    assert "\n".join(generated) in source


@pytest.fixture
def count_registries(monkeypatch):
    """Count every pint.UnitRegistry construction, starting with no registry cached."""
    import pint

    built = []
    original = pint.UnitRegistry.__init__

    def counting(self, *args, **kwargs):
        built.append(1)
        original(self, *args, **kwargs)

    audit.units.registry.cache_clear()
    monkeypatch.setattr(pint.UnitRegistry, "__init__", counting)
    yield built
    audit.units.registry.cache_clear()


def test_one_pint_registry_per_process(count_registries, tmp_path, read_text):
    from audit.diagnose.hypotheses import all_hypotheses
    from audit.diagnose.units import pressure_unit_size_Pa, temperature_to_K

    # headers, the command-line vocabulary, thermo and diagnose: the generated table, no registry
    ds = read_text("T (°F),P (mmHg)\n77,23.77\n")
    assert antoine_convert((A, B, C), "log10", "ln", "mmHg", "kPa", "degC", "K").base == "ln"
    assert Antoine(A, B, C, P_unit="Torr", T_unit="°C").p(373.15) > 0
    assert pressure_unit_size_Pa("inHg") == pytest.approx(3.386389e3, rel=SEVEN_DIGITS)
    assert temperature_to_K(77.0, "degF") == pytest.approx(298.15, rel=EXACT)
    assert all_hypotheses(ds.points[0])
    # the usual constant units: pint's factors from the generated table, no registry either
    path = tmp_path / "m.toml"
    path.write_text('[constants]\nmolar_mass = { value = 18.015, unit = "g/mol", source = "synthetic" }\n'
                    'dH_fusion = { value = 6.01, unit = "kJ/mol", source = "synthetic" }\n', encoding="utf-8")
    assert read_metadata(path).constants["dH_fusion"].value == pytest.approx(6010.0, rel=EXACT)
    assert count_registries == []
    # a free-form unit text needs pint: built once, then reused by everyone
    path.write_text('[constants]\nmolar_mass = { value = 18.015, unit = "mg/mmol", source = "synthetic" }\n'
                    'dH_fusion = { value = 6.01, unit = "kJ / mol", source = "synthetic" }\n', encoding="utf-8")
    assert read_metadata(path).constants["molar_mass"].value == pytest.approx(0.018015, rel=EXACT)
    read_metadata(path)
    audit.units.derive_si_factors()
    from audit.ingest import units as ingest_units

    assert ingest_units.registry() is audit.units.registry()
    assert count_registries == [1]


def test_no_module_builds_its_own_registry():
    """Only audit/units.py names pint's registry class."""
    root = Path(audit.units.__file__).parent
    owners = sorted(str(p.relative_to(root)) for p in root.rglob("*.py")
                    if re.search(r"UnitRegistry\s*\(", p.read_text(encoding="utf-8")))
    assert owners == ["units.py"]
