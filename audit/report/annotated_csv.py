"""``annotated.csv``: the input table as read, with the audit's verdict per row.

Every input row and column, in the original order and as printed, followed
by the audit's columns (all prefixed ``audit_``).  Cells that a spreadsheet
would run as a formula are neutralised with a leading apostrophe, following
the OWASP guidance on CSV injection.
"""

from __future__ import annotations

import csv
import io
import re
from pathlib import Path

from ..results import AuditResult
from .atomic import write_file

AUDIT_COLUMNS = ("audit_row", "audit_T_K", "audit_P_Pa", "audit_phase", "audit_status",
                 "audit_residual_sigma", "audit_flags", "audit_cause", "audit_cause_explanation",
                 "audit_suggested_T_K", "audit_suggested_P_Pa",
                 # added later (columns are only ever appended)
                 "audit_deviation_percent", "audit_source_offset_percent", "audit_u_percent",
                 "audit_dH_J_per_mol", "audit_u_dH_J_per_mol")

_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")
_PLAIN_NUMBER = re.compile(r"^[+-]?(\d+([.,]\d*)?|[.,]\d+)([eE][+-]?\d+)?$")


def neutralise(cell: str) -> str:
    """Prefix ``'`` to a text cell that a spreadsheet could run as a formula.

    A plain number such as ``-12.5`` is left alone: it is data, not a formula.
    """
    if cell.startswith(_FORMULA_START) and not _PLAIN_NUMBER.match(cell.strip()):
        return "'" + cell
    return cell


def _g(x) -> str:
    return "" if x is None else repr(float(x))


def annotated_rows(result: AuditResult):
    ds = result.dataset
    # ragged input rows: the table is as wide as its widest row, so the audit
    # columns line up; cells beyond the header get a placeholder name
    width = max([len(ds.header)] + [len(c) for c in ds.cells])
    header = list(ds.header) + [f"(unnamed {i + 1})" for i in range(len(ds.header), width)]
    yield [neutralise(h) for h in header] + list(AUDIT_COLUMNS)
    # the enthalpy of the row's branch at the row's temperature (findings ``enthalpy``)
    enthalpy = {(e.branch, e.T_K): e for e in result.enthalpy}
    for cells, v in zip(ds.cells, result.points):
        flags = " | ".join(f"{f.check} ({f.severity}): {f.message}" for f in v.flags)
        cause = v.cause
        audit = [str(v.row), _g(v.T_K), _g(v.P_Pa), v.phase, v.status, _g(v.residual_sigma), flags,
                 "" if cause is None else cause.kind, "" if cause is None else cause.explanation,
                 "" if cause is None else _g(cause.suggested_T_K),
                 "" if cause is None else _g(cause.suggested_P_Pa),
                 _g(v.deviation_percent), _g(v.source_offset_percent), _g(v.u_percent)]
        h = enthalpy.get((v.phase, v.T_K))
        audit += ["", ""] if h is None else [_g(h.dH_J_per_mol), _g(h.u_dH_J_per_mol)]
        row = list(cells) + [""] * (width - len(cells))
        yield [neutralise(c) for c in row] + [neutralise(a) for a in audit]


def annotated_text(result: AuditResult) -> str:
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerows(annotated_rows(result))
    return buf.getvalue()


def annotated_bytes(result: AuditResult) -> bytes:
    """The bytes of ``annotated.csv``."""
    # UTF-8 with BOM so that spreadsheet programs read the ° sign right.
    return annotated_text(result).encode("utf-8-sig")


def write_annotated_csv(result: AuditResult, path: Path) -> None:
    """Write ``annotated.csv`` to ``path``, replacing it only once complete."""
    write_file(path, annotated_bytes(result))
