"""Same result, same time → the same bytes, for the HTML and the PDF; a
different audit time → a different PDF (so the comparison can fail)."""

from __future__ import annotations

import numpy as np

from audit.report.html import render_html
from audit.report.pdf import render_pdf

from .conftest import build_result, with_time


def test_html_and_pdf_are_byte_identical_across_runs():
    a, b = build_result(), build_result()  # rebuilt from scratch: nothing cached
    assert render_html(a) == render_html(b)
    pdf_a, pdf_b = render_pdf(a, b"x,y\n"), render_pdf(b, b"x,y\n")
    assert pdf_a == pdf_b
    assert render_pdf(with_time(a, "2027-01-01T00:00:00Z"), b"x,y\n") != pdf_a


def test_source_date_epoch_fixes_the_time(monkeypatch, pipeline_fault_result):
    from audit.model import from_arrays
    from audit.pipeline import run_audit
    from audit.profiles import load_profile

    from tests.conftest import iapws_saturation_pressure

    monkeypatch.setenv("SOURCE_DATE_EPOCH", "1767225600")  # 2026-01-01T00:00:00Z
    T = np.linspace(280.0, 370.0, 8)
    runs = [run_audit(from_arrays(T, iapws_saturation_pressure(T), file_name="w.csv"),
                      load_profile("default")) for _ in range(2)]
    assert runs[0].audited_at == runs[1].audited_at == "2026-01-01T00:00:00Z"
    assert render_html(runs[0]) == render_html(runs[1])
    assert render_pdf(runs[0], b"1") == render_pdf(runs[1], b"1")
