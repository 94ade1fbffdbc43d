"""Check ``readability``: every row's temperature and pressure could be read."""

from __future__ import annotations

from ..results import CheckResult, PointFlag
from ._util import rows_text, worst_status
from .registry import Check, register


@register
class Readability(Check):
    """Rows whose temperature or pressure cell is not a number.

    **What it checks.** That each data row's temperature and pressure cells
    were read as finite numbers (ingest marks the others ``unreadable`` with
    the reason and keeps their original text).

    **Why it matters.** A cell such as ``12.3*`` (a footnote mark), ``<0.1``
    (a detection limit) or ``n/a`` hides a value the curator must resolve by
    hand; silently dropping it would make the audit look cleaner than the
    table is.

    **Method.** The check computes nothing of its own: the ingest has already
    tried to parse every temperature and pressure cell as a finite number in
    its column's unit, and marked each cell it could not read as unreadable,
    with the reason and the original text. The check collects the rows so
    marked, flags each with that reason at the profile's severity, and counts
    them against the number of data rows; the status is the severity when one
    row or more is unreadable, else pass. No row is dropped or changed.

    **Example.** ``T/K = 300.0, P/kPa = 3.54*`` → row unreadable: "pressure
    cell '3.54*' is not a number".

    **Options.** none besides ``enabled`` and ``severity``.
    """

    id = "readability"
    title = "Readable temperature and pressure values"
    method = "Each cell is parsed as a number in the column's unit; failures keep their text."
    references = ("Y. Shafranovich, RFC 4180, Common Format and MIME Type for Comma-Separated Values (CSV) "
                  "Files (IETF, 2005), doi:10.17487/RFC4180.",
                  "ISO 80000-1:2009, Quantities and units — Part 1: General, §7.3 (the decimal sign, a comma "
                  "or a point; digits grouped by thin spaces).")
    options = {}

    def run(self, ctx):
        sev = ctx.settings(self.id).severity
        bad = [p for p in ctx.dataset.points if not p.readable]
        flags = tuple(PointFlag(p.row, self.id, sev, p.reason or "value not readable") for p in bad)
        n = ctx.dataset.n_rows
        if bad:
            msg = f"{len(bad)} of {n} rows unreadable ({rows_text(p.row for p in bad)}); fix or confirm them by hand"
        else:
            msg = f"all {n} rows readable"
        return CheckResult(self.id, self.title, worst_status(len(bad), sev), msg,
                           {"n_rows": n, "n_unreadable": len(bad)}, flags)
