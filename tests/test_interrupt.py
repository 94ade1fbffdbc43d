"""``vpaudit check`` stopped by a signal leaves no output that looks complete.

The input is a synthetic 300-row water table: temperatures from 275 K to
600 K, pressures from the IAPWS-IF97 saturation equation (``iapws.iapws97.
_PSat_T``, which returns MPa) printed in kPa to 8 significant digits, and
three invented source labels.  With all four formats the run lasts several
seconds (the PDF alone takes seconds), long enough to signal it while it
audits and while it writes.

The signal is timed on what the run does, not on a clock: the writing-phase
tests wait for the first temporary (``.<name>.<pid>.tmp``) to appear in the
output folder; the audit-phase test waits for the audit to begin (announced
by a wrapper around ``run_audit`` in the launching script, so the product has
no test-only path) and then waits a random extra moment.
"""

from __future__ import annotations

import json
import os
import random
import signal
import subprocess
import sys
import textwrap
import time

import pytest

from audit.report import FILE_NAMES
from audit.schema import validate_findings

pytestmark = pytest.mark.skipif(sys.platform == "win32", reason="POSIX signals")

FORMATS = "json,csv,html,pdf"

#: runs ``vpaudit`` through ``main`` and says when the audit starts and ends
_ANNOUNCING_LAUNCHER = textwrap.dedent("""
    import sys
    import audit.pipeline as pipeline
    from audit.cli import main

    real_run_audit = pipeline.run_audit

    def announced(*args, **kwargs):
        print("audit started", flush=True)
        result = real_run_audit(*args, **kwargs)
        print("audit finished", flush=True)
        return result

    pipeline.run_audit = announced
    sys.exit(main(sys.argv[1:]))
""")


@pytest.fixture(scope="module")
def table(tmp_path_factory):
    """SYNTHETIC: IAPWS-IF97 saturation pressures of water, invented sources."""
    from iapws.iapws97 import _PSat_T

    path = tmp_path_factory.mktemp("interrupt") / "synthetic_water_300.csv"
    sources = ("Synthetic lab North", "Synthetic lab South", "Synthetic lab East")
    lines = ["T (K),P (kPa),source"]
    for i in range(300):
        T = 275.0 + i * (600.0 - 275.0) / 299
        lines.append(f"{T:.4f},{_PSat_T(T) * 1e3:.8g},{sources[i % 3]}")
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


def _start(argv):
    # SIGINT back to its default in the child: a shell running these tests in
    # the background may have made the test process ignore it, and a child
    # would inherit that
    return subprocess.Popen(argv, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                            preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL))


def _temporaries(folder):
    return sorted(p.name for p in folder.iterdir() if p.name.endswith(".tmp")) if folder.exists() else []


def _wait_for_a_temporary(proc, folder):
    while not _temporaries(folder):
        if proc.poll() is not None:
            pytest.fail(f"the run ended (exit {proc.returncode}) before writing; stderr: {proc.stderr.read()}")
        time.sleep(0.005)


def _assert_no_output_looks_complete(folder):
    """No temporary remains, and the outputs are either absent or a complete, valid set."""
    assert _temporaries(folder) == []
    present = sorted(n for n in FILE_NAMES.values() if (folder / n).exists())
    assert present in ([], sorted(FILE_NAMES.values()))
    if present:  # the signal came during the renames, which complete first
        validate_findings(json.loads((folder / "findings.json").read_text("utf-8")))
    return present


@pytest.mark.parametrize("sig, code, word", [(signal.SIGINT, 130, "interrupted"),
                                             (signal.SIGTERM, 143, "terminated")])
def test_signal_while_writing(tmp_path, table, sig, code, word):
    out = tmp_path / "out"
    proc = _start([sys.executable, "-m", "audit", "check", str(table), "--out", str(out),
                   "--format", FORMATS])
    try:
        _wait_for_a_temporary(proc, out)
        proc.send_signal(sig)
        _, stderr = proc.communicate(timeout=600)
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.wait()
    assert proc.returncode == code, stderr
    assert f"vpaudit: {word}" in stderr
    assert "Traceback" not in stderr
    _assert_no_output_looks_complete(out)


def test_sigint_during_the_audit(tmp_path, table):
    out = tmp_path / "out"
    proc = _start([sys.executable, "-c", _ANNOUNCING_LAUNCHER, "check", str(table), "--out", str(out),
                   "--format", FORMATS])
    try:
        assert proc.stdout.readline().strip() == "audit started"
        delay = random.uniform(0.0, 0.5)  # [s]; in the messages below, to reproduce a failure
        time.sleep(delay)
        proc.send_signal(signal.SIGINT)
        stdout, stderr = proc.communicate(timeout=600)
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.wait()
    assert proc.returncode == 130, (delay, stderr)
    assert "vpaudit: interrupted" in stderr and "Traceback" not in stderr, (delay, stderr)
    present = _assert_no_output_looks_complete(out)
    if "audit finished" not in stdout:  # stopped inside the audit: nothing was written at all
        assert present == []
        assert not out.exists() or os.listdir(out) in ([], [".vpaudit.lock"])


def test_an_uninterrupted_run_leaves_only_its_outputs_and_the_lock(tmp_path, table):
    """The same run, not stopped: the complete set and the lock file, no temporaries."""
    out = tmp_path / "out"
    done = subprocess.run([sys.executable, "-m", "audit", "check", str(table), "--out", str(out),
                           "--format", FORMATS], capture_output=True, text=True, timeout=600)
    assert done.returncode in (0, 1), done.stderr
    assert sorted(os.listdir(out)) == sorted([".vpaudit.lock", *FILE_NAMES.values()])
    doc = json.loads((out / "findings.json").read_text("utf-8"))
    validate_findings(doc)
    assert doc["input"]["rows"] == 300
