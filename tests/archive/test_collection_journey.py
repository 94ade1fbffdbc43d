"""The curator's journey over the demo collection, as the README tells it: audit it in
parallel into an archive, find one dataset's past audits, verify the archive, re-audit with
the strict profile and see what changed.

Data: the SYNTHETIC demo collection (reports_demo/collection/, CoolProp reference equations
of state with planted faults; reports_demo/make_demo_data.py)."""

from __future__ import annotations

import json
import shutil
from pathlib import Path

from audit.cli import main

COLLECTION = Path(__file__).resolve().parents[2] / "reports_demo" / "collection"


def test_audit_find_verify_reaudit_and_compare(tmp_path, capsys):
    inputs = tmp_path / "collection"
    shutil.copytree(COLLECTION, inputs)
    archive = tmp_path / "audits.sqlite"
    assert main(["batch", str(inputs), "--out", str(tmp_path / "run1"), "--jobs", "2", "--no-progress",
                 "--archive", str(archive)]) == 1  # one dataset fails (ethanol: rows above its Pc)
    capsys.readouterr()

    assert main(["archive", "list", "--archive", str(archive), "--substance", "ethanol"]) == 0
    listed = capsys.readouterr().out.strip().splitlines()
    assert len(listed) == 1 and "ethanol_supplier.csv" in listed[0] and "FAIL" in listed[0].upper()
    first_id = int(listed[0].split()[0].lstrip("#"))

    assert main(["archive", "verify", "--archive", str(archive)]) == 0
    # six audits, each with json + csv + its input (+ the tables' metadata files): all unchanged
    assert "of 6 audit(s) checked" in capsys.readouterr().out

    assert main(["batch", str(inputs), "--out", str(tmp_path / "run2"), "--jobs", "2", "--no-progress",
                 "--profile", "strict", "--archive", str(archive)]) in (0, 1)
    capsys.readouterr()
    assert main(["archive", "list", "--archive", str(archive), "--substance", "ethanol"]) == 0
    ids = sorted(int(line.split()[0].lstrip("#")) for line in capsys.readouterr().out.strip().splitlines())
    assert len(ids) == 2 and ids[0] == first_id
    assert main(["archive", "compare", str(ids[0]), str(ids[1]), "--archive", str(archive)]) == 0
    text = capsys.readouterr().out
    assert "strict" in text and "default" in text

    # a report changed after the audit is found by verify (exit 1)
    findings = tmp_path / "run1" / "ethanol_supplier" / "findings.json"
    data = json.loads(findings.read_text(encoding="utf-8"))
    data["verdict"] = "pass"
    findings.write_text(json.dumps(data), encoding="utf-8")
    assert main(["archive", "verify", "--archive", str(archive)]) == 1
    assert "findings.json" in capsys.readouterr().out
