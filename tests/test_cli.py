"""The vpaudit command as a user runs it: exit codes, outputs, messages.

The supplier-style table below is written in the layout of the foundation
issue's acceptance case: semicolon-separated, decimal commas, °C and mmHg,
a footnote-marked cell.  Its pressures are water's saturation pressures from
IAPWS-95 (via the iapws package) converted with 1 mmHg = 133.322387415 Pa
(NIST SP 811 (2008), Appendix B).
"""

from __future__ import annotations

import csv
import hashlib
import json
import subprocess
import sys
from pathlib import Path

import pytest

from audit.cli import main
from audit.schema import validate_findings

from .references.iapws95_enthalpy import DH_FUS_TT
from .references.iapws_r10_06 import P_TRIPLE, T_TRIPLE
from tests.conftest import iapws_saturation_pressure

MMHG = 133.322387415  # Pa, NIST SP 811 (2008) Appendix B


def _supplier_table(path: Path) -> list[str]:
    t_c = [10.0, 20.0, 30.0, 40.0, 50.0, 60.0, 70.0, 80.0]
    p = iapws_saturation_pressure([t + 273.15 for t in t_c]) / MMHG
    cells = [f"{v:.2f}".replace(".", ",") for v in p]
    cells[5] = cells[5] + "*"  # footnote mark
    lines = ["Temperature (°C);Vapour pressure (mmHg);Reference"]
    lines += [f"{t:.1f}".replace(".", ",") + f";{c};=HYPERLINK(\"x\")" if i == 2 else
              f"{t:.1f}".replace(".", ",") + f";{c};Lab A" for i, (t, c) in enumerate(zip(t_c, cells))]
    path.write_bytes(("\n".join(lines) + "\n").encode("cp1252"))
    return cells


def test_check_semicolon_mmhg_celsius_with_footnote(tmp_path, capsys):
    data = tmp_path / "supplier.csv"
    cells = _supplier_table(data)
    before = hashlib.sha256(data.read_bytes()).hexdigest()
    out = tmp_path / "out"
    code = main(["check", str(data), "--out", str(out), "--format", "json,csv"])
    assert code in (0, 1)
    assert hashlib.sha256(data.read_bytes()).hexdigest() == before  # input untouched

    findings = json.loads((out / "findings.json").read_text("utf-8"))
    validate_findings(findings)
    assert findings["input"]["rows"] == 8
    assert findings["input"]["sha256"] == before
    assert [p["row"] for p in findings["points"]] == list(range(1, 9))
    # the footnote-marked cell is kept, unreadable, with its text in the reason
    assert findings["points"][5]["status"] == "unreadable"
    assert any("70,35*" in f["message"] or cells[5] in f["message"] for f in findings["points"][5]["flags"])
    # 20 °C: IAPWS-95 gives 2339.2 Pa; the table printed it in mmHg to 0.01 mmHg (±0.67 Pa)
    p20 = findings["points"][1]
    assert p20["T_K"] == pytest.approx(293.15, abs=1e-9)
    assert p20["P_Pa"] == pytest.approx(2339.2, abs=1.0)

    with open(out / "annotated.csv", encoding="utf-8-sig", newline="") as fh:
        rows = list(csv.reader(fh))
    assert rows[0][:3] == ["Temperature (°C)", "Vapour pressure (mmHg)", "Reference"]
    assert len(rows) == 1 + 8
    assert rows[1][1] == cells[0]  # original text kept
    assert rows[3][2] == "'=HYPERLINK(\"x\")"  # formula neutralised
    status_col = rows[0].index("audit_status")
    assert rows[6][status_col] == "unreadable"


def test_missing_file_is_exit_2_with_one_message(tmp_path, capsys):
    code = main(["check", str(tmp_path / "nope.csv"), "--out", str(tmp_path / "o")])
    err = capsys.readouterr().err
    assert code == 2
    assert "nope.csv" in err and "Traceback" not in err
    assert len(err.strip().splitlines()) == 1


def test_unknown_unit_names_the_column(tmp_path, capsys):
    data = tmp_path / "bad.csv"
    data.write_text("T/K,P/furlong\n300,1\n", encoding="utf-8")
    code = main(["check", str(data), "--out", str(tmp_path / "o")])
    err = capsys.readouterr().err
    assert code == 2
    assert "P/furlong" in err and "bad.csv" in err


def test_unknown_format_and_profile_are_usage_errors(tmp_path, capsys):
    data = tmp_path / "w.csv"
    data.write_text("T/K,P/Pa\n300,3536.8\n310,6231.4\n", encoding="utf-8")
    assert main(["check", str(data), "--format", "docx", "--out", str(tmp_path / "o")]) == 2
    assert "docx" in capsys.readouterr().err
    assert main(["check", str(data), "--profile", "nonesuch", "--out", str(tmp_path / "o")]) == 2
    assert "nonesuch" in capsys.readouterr().err


def test_fail_verdict_exits_1_and_strict_turns_warn_into_1(tmp_path):
    data = tmp_path / "w.csv"
    # IAPWS-95: 300 K -> 3536.8 Pa, 310 K -> 6231.4 Pa, 320 K -> 10546.7 Pa; the last row drops
    data.write_text("T/K,P/Pa\n300,3536.8\n310,6231.4\n320,1054.67\n", encoding="utf-8")
    assert main(["check", str(data), "--out", str(tmp_path / "o"), "--format", "json"]) == 1
    warn = tmp_path / "warn.csv"
    warn.write_text("T/K,P/Pa\n300,3536.8\n310,n/a\n320,10546.7\n", encoding="utf-8")
    assert main(["check", str(warn), "--out", str(tmp_path / "o2"), "--format", "json",
                 "--profile", "default"]) in (0, 1)
    doc = json.loads((tmp_path / "o2" / "findings.json").read_text())
    if doc["verdict"] == "warn":
        assert main(["check", str(warn), "--out", str(tmp_path / "o3"), "--format", "json", "--strict"]) == 1


def test_profiles_and_explain(capsys):
    assert main(["profiles"]) == 0
    out = capsys.readouterr().out
    assert "default" in out and "strict" in out and "P_tolerance_percent=1.0" in out
    assert main(["explain", "monotonic"]) == 0
    out = capsys.readouterr().out
    assert "Clapeyron" in out and "T_tolerance_K" in out and "Published sources" in out
    assert main(["explain", "no-such-check"]) == 2


def test_python_dash_m_audit_runs():
    proc = subprocess.run([sys.executable, "-m", "audit", "--version"], capture_output=True, text=True)
    assert proc.returncode == 0 and proc.stdout.startswith("vpaudit ")


def test_check_on_an_ice_plus_liquid_table_reports_the_triple_point(tmp_path):
    # Ice Ih (IAPWS R14-08) and liquid water (IAPWS-95) through the iapws package,
    # printed in Pa to 6 significant figures, phases labelled, substance named so that
    # the triple point is compared with IAPWS R10-06 (273.16 K, 611.657 Pa).
    import numpy as np

    from tests.conftest import iapws_sublimation_pressure

    Ts = np.linspace(240.0, 272.0, 9)
    Tl = np.linspace(275.0, 370.0, 20)
    lines = ["T/K,P/Pa,phase"]
    lines += [f"{t:.2f},{p:.6g},ice" for t, p in zip(Ts, iapws_sublimation_pressure(Ts))]
    lines += [f"{t:.2f},{p:.6g},liquid" for t, p in zip(Tl, iapws_saturation_pressure(Tl))]
    data = tmp_path / "ice_water.csv"
    data.write_text("\n".join(lines) + "\n", encoding="utf-8")
    (tmp_path / "ice_water.toml").write_text('substance = "water"\n', encoding="utf-8")
    assert main(["check", str(data), "--out", str(tmp_path / "o"), "--format", "json"]) == 0
    doc = json.loads((tmp_path / "o" / "findings.json").read_text("utf-8"))
    validate_findings(doc)
    tp = doc["triple_point"]
    # exact reference values, printed to 6 digits: the crossing is within 0.02 K
    assert tp["T_K"] == pytest.approx(T_TRIPLE, abs=0.02)
    assert tp["P_Pa"] == pytest.approx(P_TRIPLE, rel=0.003)
    # ΔH_fus(Tt) = 6.007 kJ/mol from IAPWS-95 and IAPWS-06
    assert tp["dH_fus_J_per_mol"] == pytest.approx(DH_FUS_TT, rel=0.01)
    assert tp["reference"]["T_K"] == T_TRIPLE
    assert {e["branch"] for e in doc["enthalpy"]} == {"solid", "liquid"}
    assert all(e["real_gas_corrected"] and e["u_dH_J_per_mol"] > 0 for e in doc["enthalpy"])
    assert any("Harvey & Lemmon" in n for n in doc["notes"])


def test_substance_option_looks_up_constants_with_their_source(tmp_path):
    # toluene's saturation pressures from CoolProp (Lemmon & Span 2006), in kPa
    import numpy as np

    CP = pytest.importorskip("CoolProp.CoolProp")
    T = np.linspace(300.0, 380.0, 12)
    lines = ["T/K,p/kPa"] + [f"{t:.2f},{CP.PropsSI('P', 'T', t, 'Q', 0, 'toluene') / 1000:.5g}" for t in T]
    data = tmp_path / "tol.csv"
    data.write_text("\n".join(lines) + "\n", encoding="utf-8")
    assert main(["check", str(data), "--substance", "toluene", "--out", str(tmp_path / "o"),
                 "--format", "json"]) == 0
    doc = json.loads((tmp_path / "o" / "findings.json").read_text("utf-8"))
    consts = doc["dataset"]["constants"]
    # Tc of toluene 591.75 K (CoolProp; chemicals takes its default from the same source)
    assert consts["T_critical"]["value"] == pytest.approx(591.75, abs=0.1)
    assert consts["T_critical"]["source"].startswith("chemicals ")
    assert all(e["real_gas_corrected"] for e in doc["enthalpy"])


def test_unknown_substance_is_exit_2(tmp_path, capsys):
    data = tmp_path / "w.csv"
    data.write_text("T/K,P/Pa\n300,3536.8\n310,6231.4\n", encoding="utf-8")
    assert main(["check", str(data), "--substance", "unobtainium-xyz", "--out", str(tmp_path / "o")]) == 2
    assert "unobtainium-xyz" in capsys.readouterr().err


def test_check_names_each_planted_row_its_cause_and_the_biased_source(tmp_path, capsys):
    # the bundled synthetic benzene table (CoolProp-generated, faults listed in
    # reports_demo/README.md): the console names every wrong row with its cause and the
    # corrected value, and the biased source with its pattern
    from importlib import resources

    with resources.as_file(resources.files("audit") / "demo_data" / "literature_benzene.csv") as data:
        code = main(["check", str(data), "--out", str(tmp_path / "o"), "--format", "json"])
    out = capsys.readouterr().out
    assert code == 0
    for expected in ("row 8     reject     temperature-unit, suggested T = 318.25 K",
                     "row 21    reject     phase-label: labelled liquid but fits the solid branch",
                     "row 45    reject     pressure-unit, suggested P = 139",
                     "row 57    reject     decimal-shift, suggested P = 352.9 Pa",
                     "row 62    reject     digit-swap, suggested P = 2583 Pa",
                     "source 'Castell et al. 1994' suspect: pattern pressure-scale, bias +"):
        assert expected in out, out
    # the planted gauge error is +1.2 % (reports_demo/README.md): found within 3 u
    import re

    bias, u = map(float, re.search(r"Castell et al. 1994' suspect: pattern pressure-scale, "
                                   r"bias \+([\d.]+) ± ([\d.]+) %", out).groups())
    assert abs(bias - 1.2) < 3 * u, out


def _demo_sheet(tmp_path) -> Path:
    from importlib import resources

    src = resources.files("audit.demo_data").joinpath("supplier_toluene.sheet.toml")
    path = tmp_path / "supplier_toluene.sheet.toml"
    path.write_bytes(src.read_bytes())
    return path


def test_sheet_command_decodes_the_demo_sheet_and_writes_the_outputs(tmp_path, capsys):
    sheet = _demo_sheet(tmp_path)
    before = sheet.read_bytes()
    out = tmp_path / "out"
    code = main(["sheet", str(sheet), "--out", str(out), "--format", "json,csv,html",
                 "--audit-time", "2026-12-01T00:00:00Z"])
    text = capsys.readouterr().out
    assert code == 0  # a warning: exit 1 only with --strict
    assert "decoded: log10(P/mmHg) with T in °C (reference)  <- not as stated" in text
    assert "row 5 " in text and "reject" in text
    findings = json.loads((out / "findings.json").read_text(encoding="utf-8"))
    validate_findings(findings)
    assert findings["sheet"]["decoded"]["P_unit"] == "mmHg/Torr" and findings["sheet"]["differs_from_stated"]
    assert (out / "report.html").exists() and (out / "annotated.csv").exists()
    assert sheet.read_bytes() == before  # the sheet is only read
    assert main(["sheet", str(sheet), "--out", str(out), "--format", "json", "--strict"]) == 1


def test_sheet_command_with_an_unusable_sheet_is_exit_2_with_one_message(tmp_path, capsys):
    bad = tmp_path / "bad.toml"
    bad.write_text('[sheet]\nsubstance = "toluene"\n[equation]\nform = "antoine"\ncoefficients = { A = 1 }\n',
                   encoding="utf-8")
    assert main(["sheet", str(bad), "--out", str(tmp_path / "o")]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "bad.toml" in err[0] and "needs coefficient(s) B, C" in err[0]
