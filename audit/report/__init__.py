"""Writers: render an :class:`~audit.results.AuditResult` to files.

Every writer reads only the results object; nothing is recomputed here.
Heavy libraries (matplotlib, WeasyPrint) load only inside the writers that
need them.
"""

from __future__ import annotations

from pathlib import Path

from ..errors import InputError
from ..results import AuditResult

FORMATS = ("json", "csv", "html", "pdf")
FILE_NAMES = {"json": "findings.json", "csv": "annotated.csv", "html": "report.html", "pdf": "report.pdf"}


def available_formats() -> tuple[str, ...]:
    """The formats this installation can write (reports need their writers)."""
    from importlib.util import find_spec

    return tuple(f for f in FORMATS if f in ("json", "csv") or find_spec(f"{__name__}.{f}") is not None)


def parse_formats(text: str) -> tuple[str, ...]:
    """``'json,csv'`` → ('json', 'csv'); unknown names are an InputError."""
    wanted = tuple(dict.fromkeys(t.strip().lower() for t in text.split(",") if t.strip()))
    unknown = [w for w in wanted if w not in FORMATS]
    if unknown or not wanted:
        raise InputError(f"unknown output format(s): {', '.join(unknown) or '(none given)'}",
                         hint=f"choose from {', '.join(FORMATS)}, comma-separated")
    return wanted


def write_outputs(result: AuditResult, out_dir: str | Path, formats=FORMATS,
                  input_bytes: bytes | None = None) -> dict[str, Path]:
    """Write the requested formats into ``out_dir``; return {format: path}."""
    out = Path(out_dir)
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise InputError(f"cannot create the output folder ({exc.strerror})", file=str(out),
                         hint="choose another --out folder") from None
    written: dict[str, Path] = {}
    plots = None
    if "html" in formats and "pdf" in formats:
        # both reports show the same figures: draw them once
        from .plots import render_all
        plots = render_all(result)
    for fmt in formats:
        path = out / FILE_NAMES[fmt]
        if fmt == "json":
            from .findings_json import write_findings
            write_findings(result, path)
        elif fmt == "csv":
            from .annotated_csv import write_annotated_csv
            write_annotated_csv(result, path)
        elif fmt == "html":
            from .html import write_html
            write_html(result, path, plots=plots)
        elif fmt == "pdf":
            from .pdf import write_pdf
            write_pdf(result, path, input_bytes=input_bytes, plots=plots)
        written[fmt] = path
    return written
