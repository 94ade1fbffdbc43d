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


def _render(fmt: str, result: AuditResult, plots, input_bytes: bytes | None) -> bytes:
    """The bytes of one output file, built by that format's writer module."""
    if fmt == "json":
        from .findings_json import findings_bytes
        return findings_bytes(result)
    if fmt == "csv":
        from .annotated_csv import annotated_bytes
        return annotated_bytes(result)
    if fmt == "html":
        from .html import html_bytes
        return html_bytes(result, plots=plots)
    from .pdf import render_pdf
    return render_pdf(result, input_bytes, plots=plots)


def write_outputs(result: AuditResult, out_dir: str | Path, formats=FORMATS,
                  input_bytes: bytes | None = None) -> dict[str, Path]:
    """Write the requested formats into ``out_dir``; return {format: path}.

    The outputs of one call appear together or not at all.  Each format is
    written to a temporary beside its final name (``.findings.json.<pid>.tmp``)
    as soon as it is rendered; once every requested format is on disk, all are
    renamed onto their final names in one step that SIGINT and SIGTERM cannot
    split (see :mod:`audit.report.atomic`).  An exception or interruption
    before that removes the temporaries and leaves the folder as it was, so a
    folder never holds a half set from this call nor a file that looks
    complete but is not.  Files of formats not requested this time are left
    alone: they may be from an earlier audit (``findings.json`` records the
    input's hash and the audit time, to tell).

    While it writes, the call holds the folder's lock (``.vpaudit.lock``); a
    second run writing into the same folder meanwhile gets an InputError
    instead of mixing its files in.  Temporaries that a killed run left there
    are removed.

    Raises
    ------
    InputError
        The folder cannot be created or written to, or another run holds it.
    """
    from .atomic import StagedFiles, folder_lock, remove_stale_temporaries

    out = Path(out_dir)
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise InputError(f"cannot create the output folder ({exc.strerror})", file=str(out),
                         hint="choose another --out folder") from None
    written = {fmt: out / FILE_NAMES[fmt] for fmt in formats}
    with folder_lock(out):
        remove_stale_temporaries(out, FILE_NAMES.values())
        plots = None
        if "html" in formats and "pdf" in formats:
            # both reports show the same figures: draw them once
            from .plots import render_all
            plots = render_all(result)
        with StagedFiles() as staged:
            for fmt, path in written.items():
                staged.write(path, _render(fmt, result, plots, input_bytes))
    return written
