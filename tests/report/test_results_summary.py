"""AuditResult.summary(): the text vpaudit prints, from the results object alone.

Data: the bundled SYNTHETIC demo compilation of benzene (reports_demo/README.md lists its
planted faults and the values the audit must suggest)."""

from __future__ import annotations


def test_summary_names_each_planted_row_with_its_corrected_value(demo_literature_result):
    text = demo_literature_result.summary()
    lines = text.splitlines()
    assert lines[0].endswith("verdict WARN — 63 rows, 5 rejected, 0 suspect, 0 unreadable")
    assert "  row 8     reject     temperature-unit, suggested T = 318.25 K" in lines
    assert "  row 57    reject     decimal-shift, suggested P = 352.9 Pa" in lines
    # the demo plants a 1.2 % gauge scale error in that source (reports_demo/README.md)
    castell = next(line for line in lines
                   if line.startswith("  source 'Castell et al. 1994' suspect: pattern pressure-scale, bias +"))
    bias = float(castell.split("bias +", 1)[1].split()[0])
    assert abs(bias - 1.2) < 0.3
    # the unchanged quantity of a corrected row is not repeated
    row8 = next(line for line in lines if line.startswith("  row 8 "))
    assert "P =" not in row8


def test_summary_caps_the_rows_it_lists(demo_literature_result):
    lines = demo_literature_result.summary(max_rows=2).splitlines()
    assert sum(line.startswith("  row ") for line in lines) == 2
    assert "  … and 3 more flagged rows (see the report)" in lines


def test_a_sheets_summary_says_what_it_states_and_what_it_is(demo_sheet_result):
    text = demo_sheet_result.summary()
    assert "  stated:  gives log10, T in degC, P in kPa" in text
    assert "  decoded: log10(P/mmHg) with T in °C (reference)  <- not as stated" in text


def test_summary_html_is_the_escaped_text_and_the_report_shows_it(hostile_result):
    from audit.report.html import render_html

    fragment = hostile_result.summary_html()
    assert fragment.startswith('<pre class="audit-summary">') and "<script>" not in fragment
    assert fragment in render_html(hostile_result)
