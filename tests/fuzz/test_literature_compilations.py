"""Property test: every literature-like compilation ends in findings, one point per row.

The compilations are SYNTHETIC, drawn by ``benchmarks/compilations.py`` from
outside reference curves (IAPWS-IF97 and IAPWS R14-08 through ``iapws``,
CoolProp HEOS for the organics), with the edge cases a curator meets:
sources measured at one or two temperatures only (replicate groups),
one-row sources, one source spanning 1e-8 Pa to 1e5 Pa (ice at 130 K to
water at 373 K), rows printed twice, sources on disjoint temperature
ranges, and every planted fault class; half of them with the substance
named (``--substance``), so its reference correlation joins the sources.  Each table goes through the command
line (``vpaudit check --format json,csv``); the run must end with exit code
0 or 1 (never an ``InputError``: the tables are well formed), and
findings.json must hold one point per input row, in order, whose source is
the printed one and whose T and P are the printed values converted with the
header's units (ITS-90 definitions for °C and °F; pint, after NIST SP 811,
for the pressure units).

Deterministic: hypothesis derandomized, no example database, no deadline.
"""

from __future__ import annotations

import csv
import io
import json
import math
import os
import tempfile
from pathlib import Path
from unittest import mock

import numpy as np
import pytest
from hypothesis import HealthCheck, Phase, given, note, settings
from hypothesis import strategies as st

from audit.cli import main
from benchmarks.compilations import FAULTS, from_unit_T, make_compilation, pascal_per
from benchmarks.literature import substance_name


FOUND = Path(__file__).with_name("found")


def _audit_points(text: str, sources: list[str], substance: str | None = None) -> list[dict]:
    """Audit `text` through the CLI (with ``--substance`` when given); assert exit 0 or 1 and one
    point per row, in order, with its source."""
    with tempfile.TemporaryDirectory() as folder:
        data = Path(folder) / "compilation.csv"
        data.write_text(text, encoding="utf-8")
        out = Path(folder) / "out"
        # VPAUDIT_DEBUG: an internal error raises with its traceback instead of becoming exit 3
        with mock.patch.dict(os.environ, {"VPAUDIT_DEBUG": "1"}):
            code = main(["check", str(data), "--format", "json,csv", "--out", str(out),
                         "--audit-time", "2024-01-01T00:00:00Z"]
                        + (["--substance", substance] if substance else []))
        assert code in (0, 1), f"exit code {code}"
        assert data.read_text(encoding="utf-8") == text
        points = json.loads((out / "findings.json").read_text(encoding="utf-8"))["points"]
    assert [p["row"] for p in points] == list(range(1, len(sources) + 1))
    assert [p["source"] for p in points] == sources
    return points


@settings(max_examples=60, derandomize=True, database=None, deadline=None,
          phases=(Phase.explicit, Phase.generate), print_blob=False,
          suppress_health_check=[HealthCheck.too_slow])
@given(seed=st.integers(0, 2 ** 32 - 1), fault=st.sampled_from(FAULTS),
       replicate_only=st.booleans(), one_point_sources=st.booleans(), wide_span=st.booleans(),
       identical_rows=st.booleans(), no_overlap=st.booleans(), named=st.booleans())
def test_compilation_ends_with_exit_0_or_1_and_one_point_per_row(seed, fault, replicate_only, one_point_sources,
                                                                 wide_span, identical_rows, no_overlap, named):
    comp = make_compilation(np.random.default_rng(seed), fault=fault, replicate_only=replicate_only,
                            one_point_sources=one_point_sources, wide_span=wide_span,
                            identical_rows=identical_rows, no_overlap=no_overlap)
    text = comp.to_csv()
    note(f"seed {seed}, fault {fault}, substance {comp.substance}\n{text[:4000]}")
    # named: as a curator who knows the substance runs it (its reference joins the sources)
    points = _audit_points(text, [r.source for r in comp.rows], substance_name(comp) if named else None)
    P_factor = pascal_per(comp.P_unit)
    for p, r in zip(points, comp.rows):
        assert p["status"] in ("ok", "suspect", "reject")  # every cell printed is a number
        assert math.isclose(p["T_K"], float(from_unit_T(float(r.T_text), comp.T_unit)), rel_tol=1e-12, abs_tol=1e-9)
        # rel 1e-9: pint's factors and the audit's agree to rounding (both from NIST SP 811 definitions)
        assert math.isclose(p["P_Pa"], float(r.P_text) * P_factor, rel_tol=1e-9)


@pytest.mark.parametrize("path", sorted(FOUND.glob("literature_*.csv")), ids=lambda p: p.stem)
def test_found_compilation_ends_with_exit_0_or_1_and_one_point_per_row(path):
    """Compilations that once crashed the audit (reduced by deleting rows while the crash stayed);
    a file named ``literature_named-SUBSTANCE_…`` is audited with ``--substance SUBSTANCE``."""
    text = path.read_text(encoding="utf-8")
    dialect = csv.Sniffer().sniff(text.splitlines()[0], delimiters=",;\t")
    header, *rows = list(csv.reader(io.StringIO(text), dialect))
    col = next(i for i, h in enumerate(header) if h.lower() in ("source", "reference", "author"))
    substance = path.stem.split("named-", 1)[1].split("_", 1)[0] if "named-" in path.stem else None
    _audit_points(text, [r[col] for r in rows], substance)
