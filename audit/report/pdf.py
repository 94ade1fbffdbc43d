"""The audit report as an archival PDF (PDF/A-3b) carrying its evidence.

The PDF is the HTML report (:mod:`audit.report.html`) laid out by WeasyPrint
in paged form, with three files embedded as PDF/A-3 associated files: the
audited input (as given), ``findings.json`` and the rule profile
(``<profile>.toml``).  A reader of the archived PDF can thus re-run the audit.

Safety: the page carries all its content inline, so WeasyPrint is given a URL
fetcher that refuses every request (:class:`RefusingURLFetcher`): text from a
hostile input (``file:///etc/passwd``, ``http://...``) can never make the PDF
read a local file or the network.

Reproducibility: the document's creation and modification dates, and the
attachments' dates, are the audit time (``result.audited_at``, which honours
``SOURCE_DATE_EPOCH``); the PDF file identifier is a hash of the content
(WeasyPrint's default for PDF/A); the figures are deterministic SVG.  The same
result therefore gives the same bytes.

References
----------
ISO 19005-3:2012, Document management — Electronic document file format for
long-term preservation — Part 3: PDF/A-3 (associated files, AFRelationship).
"""

from __future__ import annotations

import contextlib
import datetime as _dt
import os
import re
import threading
from dataclasses import dataclass
from pathlib import PurePath

from ..results import AuditResult
from .atomic import write_file

__all__ = ["render_pdf", "write_pdf", "RefusingURLFetcher", "FetchRefused", "PDF_VARIANT",
           "attachment_specs", "AttachmentSpec"]

PDF_VARIANT = "pdf/a-3b"

_MIME_BY_SUFFIX = {
    ".csv": "text/csv", ".tsv": "text/tab-separated-values", ".txt": "text/plain",
    ".json": "application/json", ".toml": "application/toml",
    ".xlsx": "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet",
}


class FetchRefused(ValueError):
    """Raised by :class:`RefusingURLFetcher` for every URL."""


def _fetcher_base():
    from weasyprint.urls import URLFetcher

    return URLFetcher


class RefusingURLFetcher:
    """A WeasyPrint URL fetcher that refuses everything and remembers what was asked.

    Instantiate with :meth:`create` (WeasyPrint's base class is imported lazily).
    ``requested`` lists every URL WeasyPrint asked for (none, for our pages).
    """

    @staticmethod
    def create():
        base = _fetcher_base()

        class _Refusing(base):
            def __init__(self):
                super().__init__(allowed_protocols=(), fail_on_errors=False)
                self.requested: list[str] = []

            def fetch(self, url, headers=None):
                self.requested.append(url)
                raise FetchRefused(f"the report fetches nothing; refused {url[:80]!r}")

            def open(self, url, data=None, timeout=None):
                return self.fetch(getattr(url, "full_url", url))

        return _Refusing()


@dataclass(frozen=True)
class AttachmentSpec:
    """A file embedded in the PDF."""

    name: str
    data: bytes
    mime_type: str
    relationship: str  # PDF/A-3 AFRelationship
    description: str


def _safe_name(name: str, fallback: str) -> str:
    base = PurePath(str(name).replace("\\", "/")).name
    base = re.sub(r"[^A-Za-z0-9._ -]+", "_", base).strip(" .")
    return base[:120] or fallback


def attachment_specs(result: AuditResult, input_bytes: bytes | None) -> list[AttachmentSpec]:
    """The files the PDF carries: the input (when given), findings.json, the profile
    and annotated.csv (every row with its verdict: the PDF shows the flagged ones)."""
    from .annotated_csv import annotated_bytes
    from .findings_json import findings_text

    specs = []
    if input_bytes is not None:
        name = _safe_name(result.dataset.file_name, "input.dat")
        specs.append(AttachmentSpec(
            name, bytes(input_bytes),
            _MIME_BY_SUFFIX.get(PurePath(name).suffix.lower(), "application/octet-stream"),
            "Source", "the audited input file, byte for byte"))
    specs.append(AttachmentSpec("findings.json", findings_text(result).encode("utf-8"),
                                "application/json", "Data",
                                "machine-readable findings (schema_version 1)"))
    specs.append(AttachmentSpec(f"{_safe_name(result.profile_name, 'profile')}.toml",
                                result.profile_text.encode("utf-8"), "application/toml",
                                "Supplement", "the rule profile the audit applied"))
    specs.append(AttachmentSpec("annotated.csv", annotated_bytes(result), "text/csv", "Data",
                                "every input row as printed, with the audit's verdict, cause and "
                                "suggested value"))
    return specs


def _audit_datetime(result: AuditResult) -> _dt.datetime:
    text = result.audited_at.strip().replace("Z", "+00:00")
    try:
        t = _dt.datetime.fromisoformat(text)
    except ValueError:
        raise ValueError(f"audited_at is not an ISO 8601 time: {result.audited_at!r}") from None
    if t.tzinfo is not None:
        t = t.astimezone(_dt.timezone.utc).replace(tzinfo=None)
    return t


def _finisher(specs):
    """A finisher that writes each attachment's MIME type (WeasyPrint guesses it
    from the file name, and knows neither TOML nor every spreadsheet type) and
    lists each associated file once in the catalog's /AF array (WeasyPrint 70
    adds every attachment twice)."""
    import hashlib

    by_md5 = {f"<{hashlib.md5(s.data, usedforsecurity=False).hexdigest()}>": s.mime_type
              for s in specs}

    def finisher(document, pdf):
        for obj in pdf.objects:
            extra = getattr(obj, "extra", None)
            if not isinstance(extra, dict) or extra.get("Type") != "/EmbeddedFile":
                continue
            mime = by_md5.get(extra["Params"]["CheckSum"])
            if mime:
                extra["Subtype"] = "/" + mime.replace("/", "#2f").replace("+", "#2b")
        af = pdf.catalog.get("AF")
        if af is not None:
            unique = list(dict.fromkeys(af))
            del af[:]
            af.extend(unique)

    return finisher


def render_pdf(result: AuditResult, input_bytes: bytes | None = None, *, plots=None,
               fetcher=None) -> bytes:
    """The PDF/A-3b report as bytes.

    Parameters
    ----------
    result : AuditResult
    input_bytes : bytes, optional
        The input file as read; embedded under the input's file name.
    plots : sequence of RenderedPlot, optional
        Figures already drawn.
    fetcher : optional
        A URL fetcher (tests pass one to inspect); default a fresh
        :class:`RefusingURLFetcher`.
    """
    from weasyprint import HTML, Attachment

    from .html import render_html

    when = _audit_datetime(result)
    fetcher = fetcher if fetcher is not None else RefusingURLFetcher.create()
    specs = attachment_specs(result, input_bytes)
    attachments = [Attachment(string=s.data, name=s.name, description=s.description,
                              created=when, modified=when, relationship=s.relationship,
                              url_fetcher=fetcher)
                   for s in specs]
    page = render_html(result, plots=plots, for_print=True)
    document = HTML(string=page, base_url=None, url_fetcher=fetcher, media_type="print")
    with _font_timestamps_at(when):
        return document.write_pdf(pdf_variant=PDF_VARIANT, attachments=attachments,
                                  finisher=_finisher(specs))


_ENVIRONMENT_LOCK = threading.Lock()


@contextlib.contextmanager
def _font_timestamps_at(when: _dt.datetime):
    """Font subsets stamped with the audit time instead of the clock.

    fontTools writes the time of subsetting into each embedded font's
    ``head`` table unless ``SOURCE_DATE_EPOCH`` is set (the reproducible-builds
    convention it follows), so two renderings of one audit a second apart
    differed in their font programs.  The variable is set to the audit time
    for the rendering and restored after it.
    """
    epoch = str(int(when.replace(tzinfo=_dt.timezone.utc).timestamp()))
    with _ENVIRONMENT_LOCK:
        before = os.environ.get("SOURCE_DATE_EPOCH")
        os.environ["SOURCE_DATE_EPOCH"] = epoch
        try:
            yield
        finally:
            if before is None:
                del os.environ["SOURCE_DATE_EPOCH"]
            else:
                os.environ["SOURCE_DATE_EPOCH"] = before


def write_pdf(result: AuditResult, path, input_bytes: bytes | None = None, *,
              plots=None) -> None:
    """Write the PDF/A-3b report to ``path``, replacing it only once complete;
    ``plots`` as for :func:`render_pdf`."""
    write_file(path, render_pdf(result, input_bytes, plots=plots))
