"""The wheel carries the migration scripts, and an archive opened from it reaches head.

Without the scripts in the wheel an installed vpaudit could not create or
upgrade an archive: the editable install of the tests would not notice.
"""

from __future__ import annotations

import os
import subprocess
import sys
import zipfile

from .conftest import ROOT


def test_wheel_ships_the_migrations_and_they_run(tmp_path):
    out = tmp_path / "wheel"
    proc = subprocess.run([sys.executable, "-m", "pip", "wheel", "--no-deps", "-q", "-w", str(out), str(ROOT)],
                          capture_output=True, text=True, check=False)
    assert proc.returncode == 0, proc.stderr[-2000:]
    (whl,) = out.glob("vpaudit-*.whl")
    names = set(zipfile.ZipFile(whl).namelist())
    for needed in ("audit/archive/migrations/env.py", "audit/archive/migrations/script.py.mako",
                   "audit/archive/migrations/versions/0001_archive_tables.py",
                   "audit/archive/migrations/versions/0002_findings_hash_and_revision.py",
                   "audit/cli_archive.py"):
        assert needed in names, needed

    unpacked = tmp_path / "unpacked"
    zipfile.ZipFile(whl).extractall(unpacked)
    code = ("import audit, audit.archive as a; "
            "archive = a.open_archive('new.sqlite'); "
            "print(audit.__file__); print(archive.revision)")
    # from a folder outside the source tree, the unpacked wheel first on the path
    env = {**os.environ, "PYTHONPATH": str(unpacked)}
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=tmp_path, env=env,
                          check=False)
    assert proc.returncode == 0, proc.stderr[-2000:]
    where, revision = proc.stdout.split()
    assert where.startswith(str(unpacked)), "audit must come from the wheel"
    assert revision == "0002"
