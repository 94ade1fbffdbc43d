"""The PDF report's layout: nothing overflows its cell, nothing reads "nan", the
pages stay within budget, and the first page says what to fix.

Every report the suite renders is checked here: the constructed results of
``conftest`` (water from IAPWS-95 / IAPWS R14-08 with planted faults, a hostile
input, a bare result, a real pipeline run), the two bundled demo audits
(SYNTHETIC data, ``reports_demo/README.md``) and a 2 000-row SYNTHETIC
compilation (IAPWS-IF97 water, four invented series), and the check of the
demo supplier sheet.
"""

from __future__ import annotations

import io
import re

import pytest

from audit.report.html import FLAGGED_ROWS_IN_PRINT, render_html
from audit.report.pdf import render_pdf

from ._layout import cell_overflows, non_numbers, overlapping_glyphs, page_count
from .conftest import LARGE_BIASED_SOURCE, LARGE_KPA_ROWS

EVERY_REPORT = ("rich_result", "hostile_result", "bare_result", "pipeline_fault_result",
                "demo_literature_result", "demo_supplier_result", "large_compilation_result",
                "demo_sheet_result")

_pdf_cache: dict[str, bytes] = {}


def _pdf(request, name: str) -> bytes:
    if name not in _pdf_cache:
        _pdf_cache[name] = render_pdf(request.getfixturevalue(name))
    return _pdf_cache[name]


def _page_texts(pdf: bytes) -> list[str]:
    import pdfplumber

    with pdfplumber.open(io.BytesIO(pdf)) as doc:
        return [p.extract_text() or "" for p in doc.pages]


@pytest.mark.parametrize("name", EVERY_REPORT)
def test_no_text_leaves_its_table_cell(request, name):
    page = render_html(request.getfixturevalue(name), for_print=True)
    overflows = cell_overflows(page)
    assert overflows == [], overflows[:10]


@pytest.mark.parametrize("name", EVERY_REPORT)
def test_no_glyphs_overlap_and_no_number_reads_nan(request, name):
    pdf = _pdf(request, name)
    assert overlapping_glyphs(pdf) == []
    assert non_numbers(pdf) == []


def test_the_overflow_checks_catch_an_overflow():
    """Negative control: a number wider than its fixed-width cell is found by both checks."""
    from weasyprint import HTML

    page = ("<html><body><table style='table-layout: fixed; width: 200px; border-collapse: collapse'>"
            "<tr><td style='width: 40px; white-space: nowrap'>1.130254e+05</td><td>liquid</td></tr>"
            "</table></body></html>")
    over = cell_overflows(page)
    assert over and over[0].text.startswith("1.130254e+05") and over[0].how_far_px > 10
    assert overlapping_glyphs(HTML(string=page).write_pdf())
    assert non_numbers(HTML(string="<p>residual +nan σ; inf %</p>").write_pdf()) == [(1, "+nan"), (1, "inf")]


def test_the_demo_literature_report_fits_five_pages_and_says_what_to_fix_on_page_one(request):
    pdf = _pdf(request, "demo_literature_result")
    assert page_count(pdf) <= 5
    first = " ".join(_page_texts(pdf)[0].split())
    fix = first[first.index("What to fix"):]
    # the planted faults of reports_demo/README.md, each with its cause, and the biased source
    for row, cause in ((8, "temperature-unit"), (21, "phase-label"), (45, "pressure-unit"),
                       (57, "decimal-shift"), (62, "digit-swap")):
        assert re.search(rf"row {row} \([^)]*\): {cause}", fix), (row, cause)
    assert re.search(r"source 'Castell et al\. 1994': pressures \+1\.[23]\d? ± [0-9.]+ % off the other "
                     r"sources, pattern pressure-scale — exclude the series or correct its pressure scale", fix)
    # the rows only the source's finding touches are not listed one by one
    assert "row 36 " not in fix and "row 46 " not in fix


def test_a_2000_row_compilation_fits_eight_pages_and_points_to_the_attached_csv(request):
    result = request.getfixturevalue("large_compilation_result")
    pdf = _pdf(request, "large_compilation_result")
    assert page_count(pdf) <= 8
    text = " ".join(" ".join(_page_texts(pdf)).split())
    flagged = sum(1 for p in result.points if p.status != "ok")
    assert flagged > FLAGGED_ROWS_IN_PRINT  # the budget is tested with more rows than the PDF lists
    assert f"the {FLAGGED_ROWS_IN_PRINT} most severe are listed here" in text
    assert "annotated.csv, attached to this PDF" in text
    # the planted kPa rows are found, and the biased series is a finding of its own
    assert {p.row for p in result.points if p.cause is not None and p.cause.kind == "pressure-unit"} >= set(LARGE_KPA_ROWS[:40])
    assert f"source '{LARGE_BIASED_SOURCE}'" in text


def test_the_demo_sheet_says_on_page_one_what_its_coefficients_are_and_which_row_is_wrong(request):
    pdf = _pdf(request, "demo_sheet_result")
    first = " ".join(_page_texts(pdf)[0].split())
    assert "log10(P/mmHg) with T in °C ▲ not as stated" in first
    assert "the sheet states gives log10; T in °C; P in kPa" in first
    assert "the sheet states log10(P/kPa) with T in °C, but the coefficients are log10(P/mmHg) with T in °C" in first
    assert re.search(r"row 5: rejected \([^)]*\), no likely cause found; sheet-table: row 5 \(70 °C, 191\.55\): "
                     r"-6 % from the equation", first)
    # how far the equation strays from the reference over its stated range
    assert re.search(r"largest deviation [+-]0\.\d+ % at [0-9.]+ K, rms [0-9.]+ %, over", first)
    assert page_count(pdf) <= 3
