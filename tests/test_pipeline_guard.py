"""The last guard of run_audit: a bug inside one check stops that check only.

The table is water's saturation curve from IAPWS-95 (via the ``iapws``
package), 273.16–373.15 K; the bug is planted by making one real check raise,
as a check with an unknown defect would.
"""

from __future__ import annotations

import json

import numpy as np
import pytest

from audit.checks.monotonic import Monotonic
from audit.cli import EXIT_INTERNAL, main
from audit.model import from_arrays
from audit.pipeline import INTERNAL_ERROR_PREFIX, run_audit
from audit.schema import validate_findings
from tests.conftest import iapws_saturation_pressure

T_K = np.linspace(280.0, 370.0, 19)


def _raise(self, ctx):
    raise ZeroDivisionError("planted defect\nsecond line that must not reach the message")


@pytest.fixture
def broken_monotonic(monkeypatch):
    monkeypatch.setattr(Monotonic, "run", _raise)


def test_a_failing_check_is_skipped_and_the_others_run(broken_monotonic, default_profile):
    ds = from_arrays(T_K, iapws_saturation_pressure(T_K), substance="water")
    result = run_audit(ds, default_profile, audited_at="2026-01-01T00:00:00Z")
    by_id = {c.id: c for c in result.checks}
    mono = by_id["monotonic"]
    assert mono.status == "skipped"
    assert mono.message.startswith(INTERNAL_ERROR_PREFIX + "ZeroDivisionError: planted defect")
    assert "second line" not in mono.message
    assert result.internal_errors == ("monotonic: ZeroDivisionError: planted defect",)
    # every other enabled check still ran on the clean IAPWS curve
    others = [c for c in result.checks if c.id != "monotonic"]
    assert all(not c.message.startswith(INTERNAL_ERROR_PREFIX) for c in others)
    assert by_id["outliers"].status == "pass"
    assert len(result.points) == T_K.size
    findings = result.to_findings()
    validate_findings(findings)
    assert findings["internal_errors"] == ["monotonic: ZeroDivisionError: planted defect"]


def test_debug_lets_the_exception_through(broken_monotonic, default_profile, monkeypatch):
    monkeypatch.setenv("VPAUDIT_DEBUG", "1")
    ds = from_arrays(T_K, iapws_saturation_pressure(T_K))
    with pytest.raises(ZeroDivisionError):
        run_audit(ds, default_profile)


def test_cli_exits_3_with_one_line_and_writes_every_output(broken_monotonic, tmp_path, capsys):
    data = tmp_path / "water.csv"
    data.write_text("T/K,P/Pa\n" + "".join(f"{t:.2f},{p:.6g}\n" for t, p in
                                           zip(T_K, iapws_saturation_pressure(T_K))), encoding="utf-8")
    before = data.read_bytes()
    out = tmp_path / "out"
    code = main(["check", str(data), "--out", str(out), "--format", "json,csv"])
    assert code == EXIT_INTERNAL == 3
    err = [line for line in capsys.readouterr().err.splitlines() if line.strip()]
    assert len(err) == 1 and "internal error in 'monotonic'" in err[0] and "report it" in err[0]
    findings = json.loads((out / "findings.json").read_text(encoding="utf-8"))
    assert len(findings["points"]) == T_K.size
    assert (out / "annotated.csv").exists()
    assert data.read_bytes() == before


def test_run_order_does_not_depend_on_import_order():
    # this module imports audit.checks.monotonic before the registry is loaded; the run
    # order must still be _CHECK_MODULES' (monotonic after outliers, which it relies on)
    from audit.checks import _CHECK_MODULES, all_checks

    modules = [cls.__module__.rsplit(".", 1)[1] for cls in all_checks().values()]
    assert modules == list(_CHECK_MODULES)
