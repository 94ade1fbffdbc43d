"""audit.files: a file to an AuditResult, with the substance its metadata names.

Data: IAPWS-95 water saturation pressures (iapws package), printed to six digits."""

from __future__ import annotations

import numpy as np

from audit.files import audit_file
from tests.conftest import iapws_saturation_pressure


def _table(tmp_path, metadata: str):
    T = np.linspace(290.0, 360.0, 8)
    rows = "\n".join(f"{t:.2f},{p / 1000:.6g}" for t, p in zip(T, iapws_saturation_pressure(T)))
    path = tmp_path / "water.csv"
    path.write_text("T/K,P/kPa\n" + rows + "\n", encoding="utf-8")
    path.with_suffix(".toml").write_text(metadata, encoding="utf-8")
    return str(path)


def test_a_substance_named_in_the_metadata_gets_the_library_constants(tmp_path):
    dataset, _, result = audit_file(_table(tmp_path, 'substance = "water"\n'))
    c = dataset.metadata.constants
    # IAPWS R6-95: Tc = 647.096 K, Pc = 22.064 MPa (the library's data sets agree to 0.1 %)
    assert abs(c["T_critical"].value - 647.096) < 1.0 and abs(c["P_critical"].value / 22.064e6 - 1) < 1e-3
    assert "chemicals" in c["T_critical"].source
    assert dataset.metadata.cas == "7732-18-5"
    assert result.verdict == "pass"


def test_an_unknown_substance_in_the_metadata_is_noted_not_refused(tmp_path):
    dataset, _, result = audit_file(_table(tmp_path, 'substance = "Compound X-17 (SYNTHETIC)"\n'))
    assert "T_critical" not in dataset.metadata.constants
    assert any("not in the property library" in n for n in dataset.notes)
    assert result.verdict in ("pass", "warn")
