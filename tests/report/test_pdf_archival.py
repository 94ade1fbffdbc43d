"""The PDF report: PDF/A-3b identification, embedded evidence, metadata, and
refusal of every external fetch.

PDF/A identification is read back with pypdf from the XMP packet, as
ISO 19005-3 §6.6.4 requires it to be recorded: ``pdfaid:part = 3`` and
``pdfaid:conformance = B`` (namespace http://www.aiim.org/pdfa/ns/id/).
"""

from __future__ import annotations

import io

import pypdf
import pytest

from audit.report.annotated_csv import annotated_bytes
from audit.report.findings_json import findings_text
from audit.report.pdf import RefusingURLFetcher, render_pdf, write_pdf

from .conftest import AUDIT_TIME

INPUT_BYTES = "t / °C,p / kPa\n1.85,0.69\n".encode("utf-8")
PDFAID = "http://www.aiim.org/pdfa/ns/id/"


@pytest.fixture(scope="module")
def rich_pdf(rich_result):
    fetcher = RefusingURLFetcher.create()
    data = render_pdf(rich_result, INPUT_BYTES, fetcher=fetcher)
    return data, fetcher


def _reader(data: bytes) -> pypdf.PdfReader:
    return pypdf.PdfReader(io.BytesIO(data))


def test_pdfa_3b_identification(rich_pdf):
    xmp = _reader(rich_pdf[0]).xmp_metadata
    assert xmp is not None
    desc = [d for d in xmp.rdf_root.getElementsByTagNameNS(
        "http://www.w3.org/1999/02/22-rdf-syntax-ns#", "Description")
        if d.getAttributeNS(PDFAID, "part")]
    assert desc and desc[0].getAttributeNS(PDFAID, "part") == "3"
    assert desc[0].getAttributeNS(PDFAID, "conformance") == "B"


def test_four_attachments_with_identical_bytes(rich_pdf, rich_result):
    att = _reader(rich_pdf[0]).attachments
    assert set(att) == {"water_planted.csv", "findings.json", "default.toml", "annotated.csv"}
    assert att["water_planted.csv"] == [INPUT_BYTES]
    assert att["findings.json"] == [findings_text(rich_result).encode("utf-8")]
    assert att["default.toml"] == [rich_result.profile_text.encode("utf-8")]
    # every row with its verdict: the PDF lists only the flagged ones
    assert att["annotated.csv"] == [annotated_bytes(rich_result)]


def test_attachments_declare_mime_type_and_relationship(rich_pdf):
    reader = _reader(rich_pdf[0])
    root = reader.trailer["/Root"]
    names = root["/Names"]["/EmbeddedFiles"]["/Names"]
    found = {}
    for i in range(0, len(names), 2):
        spec = names[i + 1].get_object()
        ef = spec["/EF"]["/F"].get_object()
        found[str(spec["/UF"])] = (str(ef["/Subtype"]), str(spec["/AFRelationship"]))
    # PDF name objects encode '/' as #2F; pypdf decodes them
    assert found["findings.json"] == ("/application/json", "/Data")
    assert found["water_planted.csv"] == ("/text/csv", "/Source")
    assert found["default.toml"] == ("/application/toml", "/Supplement")
    assert found["annotated.csv"] == ("/text/csv", "/Data")
    assert len(root["/AF"]) == 4  # PDF/A-3 associated files listed in the catalog


def test_document_metadata(rich_pdf):
    info = _reader(rich_pdf[0]).metadata
    assert "water" in info.title
    assert info["/Creator"] == "vpaudit 0.1.0"
    # the audit time, 2026-03-01T12:00:00Z, as a PDF date
    assert info["/CreationDate"] == info["/ModDate"] == "D:20260301120000Z"
    assert AUDIT_TIME.startswith("2026-03-01T12:00:00")


def test_nothing_was_fetched(rich_pdf):
    assert rich_pdf[1].requested == []


def test_write_pdf_without_input_bytes(tmp_path, bare_result):
    path = tmp_path / "report.pdf"
    write_pdf(bare_result, path)
    assert set(_reader(path.read_bytes()).attachments) == {"findings.json", "default.toml", "annotated.csv"}


def test_refusing_fetcher_refuses_local_files_and_network():
    """Independently of our own page: a page that *does* reference a local file
    and a network image gets neither (the fetcher is asked, and refuses)."""
    from weasyprint import HTML

    fetcher = RefusingURLFetcher.create()
    page = ('<p>x</p><img src="file:///etc/passwd"><img src="http://example.invalid/x.png">'
            '<link rel="stylesheet" href="file:///etc/hostname">')
    data = HTML(string=page, url_fetcher=fetcher).write_pdf()
    assert "file:///etc/passwd" in fetcher.requested
    assert "http://example.invalid/x.png" in fetcher.requested
    with open("/etc/passwd", "rb") as fh:  # present on any Linux test machine
        first_line = fh.readline().strip()
    assert first_line not in data
