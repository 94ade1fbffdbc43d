"""The collection index: ``index.csv`` and a self-contained ``index.html``, most severe first."""

from __future__ import annotations

import csv
import io
from pathlib import Path
from typing import Sequence

from ..report.atomic import write_file
from ..report.html import STATUS_MARK
from .work import Outcome

__all__ = ["write_index", "INDEX_COLUMNS"]

INDEX_COLUMNS = ("dataset", "kind", "input", "substance", "verdict", "rows", "rejected", "suspect", "unreadable",
                 "worst_check", "report", "error", "seconds", "archive_id")

_PAGE = """<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'">
<title>Collection audit — {{ title }}</title>
<style>
body { font-family: "DejaVu Sans", Arial, sans-serif; margin: 1.5em; color: #1b1b1b; }
table { border-collapse: collapse; width: 100%; font-size: 0.9em; }
th, td { border-bottom: 1px solid #c8c8c8; padding: 0.25em 0.5em; text-align: left; vertical-align: top; }
th { background: #f4f4f1; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
tr.sev-error td, tr.sev-fail td { background: #fbeadf; }
tr.sev-warn td { background: #fdf3de; }
.badge { font-weight: 600; white-space: nowrap; }
.small { color: #5a5a5a; font-size: 0.85em; }
</style></head><body>
<h1>Collection audit</h1>
<p>{{ n }} datasets: {% for k, v in counts %}<strong>{{ v }}</strong> {{ k }}{{ " · " if not loop.last }}{% endfor %}.
{% if interrupted %}<strong>Stopped before the end:</strong> {{ interrupted }} datasets were not audited.{% endif %}
Most severe first. Profile {{ profile }}.</p>
<table>
<thead><tr><th>dataset</th><th>verdict</th><th class="num">rows</th><th class="num">rejected</th><th class="num">suspect</th>
<th class="num">unreadable</th><th>worst check</th><th>substance</th><th>input</th></tr></thead>
<tbody>
{% for o in outcomes %}
<tr class="sev-{{ o.severity }}"><td>{% if o.report %}<a href="{{ o.report }}">{{ o.name }}</a>{% else %}{{ o.name }}{% endif %}</td>
<td class="badge">{{ mark[o.severity] }} {{ o.severity }}</td><td class="num">{{ o.n_rows }}</td><td class="num">{{ o.n_reject }}</td>
<td class="num">{{ o.n_suspect }}</td><td class="num">{{ o.n_unreadable }}</td>
<td>{{ o.error or o.worst_check or "—" }}</td><td>{{ o.substance or "—" }}</td><td class="small">{{ o.path }}</td></tr>
{% endfor %}
</tbody></table>
<p class="small">The audits screen the data; they do not replace qualified evaluation under local codes and licensed practice.</p>
</body></html>
"""
_MARK = {**STATUS_MARK, "error": STATUS_MARK["fail"]}


def _ordered(outcomes: Sequence[Outcome]) -> list[Outcome]:
    return sorted(outcomes, key=lambda o: o.sort_key())


def index_csv_text(outcomes: Sequence[Outcome]) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(INDEX_COLUMNS)
    for o in _ordered(outcomes):
        w.writerow([o.name, o.kind, o.path, o.substance or "", o.severity, o.n_rows, o.n_reject, o.n_suspect,
                    o.n_unreadable, o.worst_check or "", o.report or "", o.error or "", f"{o.seconds:.3f}",
                    "" if o.archive_id is None else o.archive_id])
    return buf.getvalue()


def index_html_text(outcomes: Sequence[Outcome], *, profile: str, title: str, interrupted: int = 0) -> str:
    from jinja2 import Environment

    env = Environment(autoescape=True)
    ordered = _ordered(outcomes)
    counts = [(k, sum(1 for o in ordered if o.severity == k)) for k in ("error", "fail", "warn", "pass")]
    return env.from_string(_PAGE).render(outcomes=ordered, counts=[c for c in counts if c[1]], n=len(ordered),
                                         profile=profile, title=title, interrupted=interrupted, mark=_MARK)


def write_index(out_root, outcomes: Sequence[Outcome], *, profile: str, interrupted: int = 0) -> tuple[Path, Path]:
    """Write ``index.csv`` and ``index.html`` into ``out_root`` (each replaced only once complete)."""
    root = Path(out_root)
    csv_path, html_path = root / "index.csv", root / "index.html"
    # UTF-8 with BOM so that spreadsheet programs read the names right, as annotated.csv
    write_file(csv_path, index_csv_text(outcomes).encode("utf-8-sig"))
    write_file(html_path, index_html_text(outcomes, profile=profile, title=root.name,
                                          interrupted=interrupted).encode("utf-8"))
    return csv_path, html_path
