"""Rows with planted faults appear in the HTML table and in the PDF text.

Data: water, IAPWS-95 saturation pressures and IAPWS R14-08 sublimation
pressures (``iapws`` package); faults as listed in ``conftest.PLANTED`` and,
for the real pipeline run, a pressure multiplied by 10 at row 6.
"""

from __future__ import annotations

import io
import re

import pypdf

from audit.report.html import render_html
from audit.report.pdf import render_pdf

from ._pages import scan
from .conftest import PLANTED


def _pdf_text(data: bytes) -> str:
    return "\n".join(p.extract_text() for p in pypdf.PdfReader(io.BytesIO(data)).pages)


def test_planted_rows_in_html_and_pdf(rich_result):
    listed = {int(r[0]) for r in scan(render_html(rich_result)).flagged_rows}
    assert set(PLANTED) <= listed
    text = _pdf_text(render_pdf(rich_result))
    start = text.index("Flagged rows")
    flagged_part = text[start:text.index("Figures", start)]
    printed = {p.row: p for p in rich_result.dataset.points}
    for row in PLANTED:
        # the row's pressure as printed in the input is in the PDF's flagged table
        assert printed[row].P_text in flagged_part, row
    assert re.search(r"decimal-\s*shift", flagged_part)
    assert "2 rejected" in text and "1 suspect" in text


def test_pipeline_run_flags_reach_both_reports(pipeline_fault_result):
    r = pipeline_fault_result
    flagged = {p.row for p in r.points if p.status != "ok" or p.flags}
    assert 6 in flagged  # the ×10 pressure breaks monotonicity (rows 6/7) at least
    listed = {int(row[0]) for row in scan(render_html(r)).flagged_rows}
    assert listed == flagged
    text = _pdf_text(render_pdf(r))
    assert r.dataset.points[5].P_text in text
