"""A hostile input (markup, file:// and http:// strings in cells, source names
and metadata) is text in both reports and makes the PDF fetch nothing."""

from __future__ import annotations

import io

import pypdf
import pytest

from audit.report.html import render_html
from audit.report.pdf import RefusingURLFetcher, render_pdf

from ._pages import scan


@pytest.fixture(scope="module")
def hostile_pdf(hostile_result):
    fetcher = RefusingURLFetcher.create()
    data = render_pdf(hostile_result, b"<script>alert(1)</script>\n", fetcher=fetcher)
    return data, fetcher


def test_html_escapes_every_hostile_string(hostile_result):
    page = render_html(hostile_result)
    s = scan(page)
    assert not {"img", "link", "iframe", "object"} & set(s.tags)
    assert s.tags.count("script") == 1  # the page's own sorting script; nothing from the input
    # the only links are the report's own fragment links (evidence, SVG references)
    assert all(value.startswith("#") for _, _, value in s.url_attrs)
    text = "".join(s.text)
    for source in ("<script>alert(1)</script>", "file:///etc/passwd", '<img src="x.png">'):
        assert source in text  # shown, as text


def test_pdf_fetches_nothing_and_contains_no_local_file(hostile_pdf):
    data, fetcher = hostile_pdf
    assert fetcher.requested == []
    with open("/etc/passwd", "rb") as fh:
        first_line = fh.readline().strip()
    assert first_line not in data
    text = "".join(p.extract_text() for p in pypdf.PdfReader(io.BytesIO(data)).pages)
    assert first_line.decode() not in text
    assert "<script>alert(1)</script>" in text  # the hostile source name, printed as text


def test_hostile_file_name_gives_a_safe_attachment_name(hostile_pdf):
    names = set(pypdf.PdfReader(io.BytesIO(hostile_pdf[0])).attachments)
    assert {"findings.json", "default.toml", "annotated.csv"} <= names
    (input_name,) = names - {"findings.json", "default.toml", "annotated.csv"}
    assert "/" not in input_name and "<" not in input_name and input_name.endswith(".csv")
