"""write_outputs: the HTML and the PDF report show the same figures, drawn once."""

from __future__ import annotations

import pypdf

from audit.report import plots, write_outputs
from audit.report.html import render_html


def test_html_and_pdf_share_one_drawing_of_the_figures(tmp_path, rich_result, monkeypatch):
    calls = []
    draw = plots.render_all
    monkeypatch.setattr(plots, "render_all", lambda result: calls.append(result) or draw(result))
    written = write_outputs(rich_result, tmp_path, ("html", "pdf"))
    assert calls == [rich_result]
    monkeypatch.undo()
    assert written["html"].read_text(encoding="utf-8") == render_html(rich_result)
    text = " ".join(page.extract_text() for page in pypdf.PdfReader(written["pdf"]).pages)
    assert "Clausius–Clapeyron plot." in text and "Deviation from the consensus fit." in text


def test_one_report_alone_draws_its_figures(tmp_path, rich_result, monkeypatch):
    calls = []
    draw = plots.render_all
    monkeypatch.setattr(plots, "render_all", lambda result: calls.append(result) or draw(result))
    write_outputs(rich_result, tmp_path, ("json", "html"))
    assert calls == [rich_result]
    assert 'id="fig-clapeyron"' in (tmp_path / "report.html").read_text(encoding="utf-8")
