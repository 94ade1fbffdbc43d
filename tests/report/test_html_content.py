"""The HTML report: sections, flagged rows, escaping of hostile input.

The planted faults and their verdicts are those of ``conftest.build_result``
(water data from IAPWS-95 / IAPWS R14-08 through the ``iapws`` package).
"""

from __future__ import annotations

import re

import pytest

from audit.report.html import render_html, write_html

from ._pages import scan
from .conftest import HOSTILE, PLANTED


@pytest.fixture(scope="module")
def rich_page(rich_result):
    return render_html(rich_result)


@pytest.fixture(scope="module")
def hostile_page(hostile_result):
    return render_html(hostile_result)


def test_sections_in_the_required_order(rich_page):
    # what to fix first, then its evidence: sources, rows, figures, checks, equations
    ids = ["fix", "sources", "flagged", "figures", "checks", "fits", "enthalpy",
           "triple", "provenance", "skipped", "caution"]
    positions = [rich_page.index(f'id="{i}"') for i in ids]
    assert positions == sorted(positions)
    assert rich_page.index("Verdict: FAIL") < positions[0]


def test_verdict_banner_counts(rich_page, rich_result):
    # planted: rows 5 and 21 rejected, 12 suspect, plus the unreadable last row
    assert "2 rejected" in rich_page and "1 suspect" in rich_page and "1 unreadable" in rich_page
    assert 'class="verdict verdict-fail"' in rich_page
    assert rich_result.verdict == "fail"


def test_flagged_table_lists_exactly_the_flagged_rows(rich_page, rich_result):
    rows = scan(rich_page).flagged_rows
    listed = [int(r[0]) for r in rows]
    expected = sorted(list(PLANTED) + [len(rich_result.points)])
    assert listed == expected
    by_row = {int(r[0]): r for r in rows}
    # row 5: printed in degC / kPa, shown in SI; p was planted ×10 over IAPWS-95
    r5 = by_row[5]
    assert r5[1].endswith("degC") and r5[2].endswith("kPa")
    assert float(r5[3]) == pytest.approx(float(r5[1].split()[0]) + 273.15, abs=0.006)  # 2 decimals printed
    assert "rejected" in r5[7] and r5[9] == "decimal-shift"
    # suggested value = the IAPWS-95 saturation pressure at row 5's temperature (5 digits shown)
    from tests.conftest import iapws_saturation_pressure

    number, prefix = re.search(r"p = ([0-9.e+]+) (k|M|)Pa", r5[10]).groups()
    suggested = float(number) * {"": 1.0, "k": 1e3, "M": 1e6}[prefix]
    assert suggested == pytest.approx(iapws_saturation_pressure(rich_result.points[4].T_K)[0], rel=1e-4)
    assert "suspect" in by_row[12][7]
    # the row's own note (the line under its cells) says why it is unreadable
    assert "unreadable" in by_row[25][7] and "not a number" in by_row[25][11]


def test_every_section_says_when_it_has_nothing(bare_result):
    page = render_html(bare_result)
    text = " ".join(" ".join(scan(page).text).split())
    assert "No sources named in the data." in text
    assert "No equation was fitted." in text
    assert "No triple point was estimated" in text
    assert "No enthalpy was derived" in text
    assert "not drawn" in text  # skipped figures say why


def test_fit_table_uncertainties_are_sqrt_of_covariance_diagonal(rich_page, rich_result):
    fit = rich_result.fits[0]
    u_B = fit.covariance[1][1] ** 0.5
    assert f"{u_B:.2g}" in rich_page


def test_page_is_self_contained(rich_page):
    s = scan(rich_page)
    assert not {"link", "img", "iframe", "object", "embed"} & set(s.tags)
    # the only references are fragment links: the evidence links and the SVG figures' own
    assert all(v.startswith("#") for _, _, v in s.url_attrs), s.url_attrs[:5]
    assert "@import" not in rich_page and "url(http" not in rich_page


def test_the_one_inline_script_is_allowed_by_its_hash_alone(rich_page):
    import base64
    import hashlib

    scripts = re.findall(r"<script>(.*?)</script>", rich_page, flags=re.S)
    assert len(scripts) == 1 and "<script src" not in rich_page
    csp = re.search(r'http-equiv="Content-Security-Policy" content="([^"]+)"', rich_page).group(1)
    digest = base64.b64encode(hashlib.sha256(scripts[0].encode("utf-8")).digest()).decode()
    assert csp == f"default-src 'none'; style-src 'unsafe-inline'; script-src 'sha256-{digest}'"


def test_the_pdf_page_has_no_script(rich_result):
    page = render_html(rich_result, for_print=True)
    assert "<script" not in page and "script-src" not in page


def test_every_evidence_link_of_what_to_fix_has_its_target(rich_page):
    targets = re.findall(r'class="evidence" href="#([^"]+)"', rich_page)
    assert targets, "the rich result has findings to fix"
    for t in targets:
        assert f'id="{t}"' in rich_page, t


def test_hostile_input_is_shown_as_text(hostile_page):
    s = scan(hostile_page)
    assert "<script>alert(1)</script>" not in hostile_page
    assert "&lt;script&gt;alert(1)&lt;/script&gt;" in hostile_page
    assert s.tags.count("script") == 1  # the page's own sorting script, nothing from the input
    assert not {"img", "iframe"} & set(s.tags)
    assert all(v.startswith("#") for _, _, v in s.url_attrs)
    text = "".join(s.text)
    assert "file:///etc/passwd" in text and "http://example.invalid/x.png" in text
    assert HOSTILE in text  # metadata, notes and the printed cell keep their text


def test_svg_ids_are_unique_across_the_page(rich_page):
    ids = re.findall(r'\bid="([^"]+)"', rich_page)
    assert len(ids) == len(set(ids))


def test_write_html(tmp_path, rich_result):
    path = tmp_path / "report.html"
    write_html(rich_result, path)
    assert path.read_text(encoding="utf-8") == render_html(rich_result)


def test_the_enthalpy_table_shows_a_few_temperatures_per_branch_not_every_one():
    # findings.json keeps one enthalpy per data temperature; the report a curator reads shows at
    # most ENTHALPY_ROWS_PER_BRANCH per branch, spread from the first to the last temperature
    from audit.report.html import ENTHALPY_ROWS_PER_BRANCH, _enthalpy_shown
    from audit.results import EnthalpyValue

    values = [EnthalpyValue("liquid", 280.0 + k, 44000.0 - 40 * k, 50.0, True) for k in range(40)]
    values += [EnthalpyValue("solid", 240.0 + k, 51000.0, 80.0, True) for k in range(5)]
    shown = _enthalpy_shown(values)
    liquid = [e.T_K for e in shown if e.branch == "liquid"]
    assert len(liquid) == ENTHALPY_ROWS_PER_BRANCH and liquid[0] == 280.0 and liquid[-1] == 319.0
    assert liquid == sorted(liquid)
    assert [e.T_K for e in shown if e.branch == "solid"] == [240.0, 241.0, 242.0, 243.0, 244.0]
