"""The wheel carries everything a user needs: profiles, schema, templates, demo data.

Builds the wheel, installs it (not editable) into a throwaway virtual
environment whose dependencies are borrowed from the test environment, and
runs ``vpaudit check`` on a bundled file from outside the source tree.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import sysconfig
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent


@pytest.fixture(scope="module")
def wheel(tmp_path_factory) -> Path:
    out = tmp_path_factory.mktemp("wheel")
    proc = subprocess.run([sys.executable, "-m", "pip", "wheel", "--no-deps", "-q", "-w", str(out), str(ROOT)],
                          capture_output=True, text=True)
    assert proc.returncode == 0, proc.stderr[-2000:]
    (whl,) = out.glob("vpaudit-*.whl")
    return whl


def test_wheel_contains_data_files(wheel):
    names = set(zipfile.ZipFile(wheel).namelist())
    for needed in ("audit/rules/default.toml", "audit/rules/strict.toml",
                   "audit/schema/findings-v1.schema.json", "audit/demo_data/supplier_toluene.csv"):
        assert needed in names, needed


def test_installed_wheel_runs_check_on_bundled_file(wheel, tmp_path):
    venv = tmp_path / "venv"
    subprocess.run([sys.executable, "-m", "venv", str(venv)], check=True)
    py = venv / "bin" / "python"
    site = subprocess.run([str(py), "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"],
                          capture_output=True, text=True, check=True).stdout.strip()
    # dependencies come from the test environment's site-packages (a plain path entry:
    # its .pth files, such as an editable install of this project, are not processed)
    Path(site, "borrowed_deps.pth").write_text(sysconfig.get_paths()["purelib"] + "\n")
    subprocess.run([str(py), "-m", "pip", "install", "-q", "--no-deps", "--no-index", str(wheel)], check=True)
    work = tmp_path / "elsewhere"
    work.mkdir()
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    find = subprocess.run([str(py), "-c", "import audit, importlib.resources as r; "
                           "print(audit.__file__); "
                           "print(r.files('audit.demo_data').joinpath('supplier_toluene.csv'))"],
                          capture_output=True, text=True, cwd=work, env=env, check=True).stdout.split()
    assert str(venv) in find[0], "audit must be imported from the installed wheel"
    proc = subprocess.run([str(venv / "bin" / "vpaudit"), "check", find[1], "--out", "out", "--format", "json,csv"],
                          capture_output=True, text=True, cwd=work, env=env)
    assert proc.returncode in (0, 1), proc.stderr
    findings = json.loads((work / "out" / "findings.json").read_text("utf-8"))
    # 23 values and the footnote line below the table, which is a row of the file
    assert findings["input"]["rows"] == 24
    assert findings["profile"]["name"] == "default"
