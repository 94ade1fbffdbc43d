"""What to fix: the audit's findings gathered at the level they occur.

A curator reading a report wants, before any evidence, the short list of what
is wrong and what to do about it.  This module orders the findings of an
:class:`~audit.results.AuditResult` into that list:

* a **source** the audit found off (a pressure scale, a thermometer offset,
  another unit or compound for the whole series, a copied series);
* a **block** of consecutive rows of one source sharing one cause;
* a single **row**, with its cause and the suggested value;
* a **dataset**-level finding of a check that flags no row (an enthalpy step,
  a triple point off its reference, a level jump between branches).

A row whose only remark is its source's finding is not listed on its own: it
is part of its source's entry.  Nothing here judges data: every entry restates
a verdict, a cause or a check message the audit already made.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Iterable, Literal, Sequence

from ..results import AuditResult, PointVerdict, SourceAgreement
from ..values import all_finite as _finite
from .numbers import pressure_text

__all__ = ["Action", "what_to_fix", "SOURCE_LEVEL_CHECKS", "rows_only_under_their_source",
           "row_anchor", "source_anchor", "check_anchor"]

Level = Literal["source", "block", "row", "dataset"]
Severity = Literal["fail", "warn", "note"]

#: checks whose row flags restate a finding about the row's whole source
SOURCE_LEVEL_CHECKS = frozenset({"source-agreement", "copied-values"})
#: checks whose findings are all carried by row statuses and flags
ROW_LEVEL_CHECKS = frozenset({"readability", "physical-range", "outliers", "monotonic", "duplicates", "sheet-table"})

_SEVERITY_RANK = {"fail": 0, "warn": 1, "note": 2}
_LEVEL_RANK = {"source": 0, "block": 1, "row": 2, "dataset": 3}

#: what to do about a row, by the kind of its likely cause
_ROW_ACTION = {
    "temperature-unit": "correct the temperature",
    "pressure-unit": "correct the pressure",
    "decimal-shift": "correct the misplaced decimal point",
    "digit-swap": "correct the transposed digits",
    "phase-label": "correct the phase label (see the branch it fits)",
    "other-compound": "remove the row unless it is the substance audited",
}

#: what to do about a check's dataset-level finding
_CHECK_ACTION = {
    "triple-point": "check the phase labels and both branches near the triple point",
    "solid-transition": "check the crystal-form labels and the solid branches",
    "branch-split": "check which rows belong to which phase, and whether a block is another compound or unit",
    "enthalpy-continuity": "look for a step between sources or an unlabelled phase change",
    "enthalpy-plausibility": "check the units and the substance of the whole table",
    "clapeyron-linearity": "check the curvature: a mixed phase, a shifted series or a wrong unit",
    "reference-agreement": "compare the data with the reference correlation's own range and uncertainty",
    "sheet-units": "ask the supplier to correct the unit note, or use the coefficients in the units decoded",
    "sheet-reference": "ask the supplier for the source of the coefficients; do not use them beyond the tolerance",
    "sheet-enthalpy": "do not take enthalpies or boil-off rates from this equation; ask for a better fit",
    "sheet-range": "use the equation only where the table or the reference supports it",
}


@dataclass(frozen=True)
class Action:
    """One entry of the "what to fix" list.

    Attributes
    ----------
    level : {'source', 'block', 'row', 'dataset'}
    severity : {'fail', 'warn', 'note'}
        'fail' for rejected rows, rejected sources and failed checks; 'warn' for
        suspect ones and warnings; 'note' for suspects the audit found no cause for.
    subject : str
        What the entry is about ("source 'X'", "rows 30–33", "row 45", a check's title).
    finding : str
        What is wrong, with its likely cause.
    action : str
        What the curator should do.
    anchor : str
        The id of the evidence in the report page (a table row or a check).
    rows : tuple of int
        The input rows the entry covers.
    """

    level: Level
    severity: Severity
    subject: str
    finding: str
    action: str
    anchor: str
    rows: tuple[int, ...] = ()


def row_anchor(row: int) -> str:
    return f"row-{row}"


def source_anchor(index: int) -> str:
    return f"source-{index}"


def check_anchor(check_id: str) -> str:
    return f"check-{check_id}"


# -- sources ----------------------------------------------------------------------
def _source_finding(s: SourceAgreement) -> tuple[str, str]:
    """(finding, action) of a source the audit found off."""
    cause = s.extra.get("cause") or {}
    reason = str(s.extra.get("reason") or "").strip()
    kind = cause.get("kind")
    if kind == "pressure-unit" and "factor" in cause:
        return reason, f"convert the series' pressures (×{cause['factor']:.6g}) or exclude the series"
    if kind == "temperature-unit" and "real_unit" in cause:
        return reason, "convert the series' temperatures or exclude the series"
    if kind == "other-compound":
        return reason, "remove the series unless it is the substance audited"
    if s.pattern == "pressure-scale" and _finite(s.bias_percent):
        u = f" ± {s.u_bias_percent:.2g}" if _finite(s.u_bias_percent) else ""
        return (f"pressures {s.bias_percent:+.3g}{u} % off the other sources, pattern pressure-scale",
                "exclude the series or correct its pressure scale")
    if s.pattern == "temperature-offset" and _finite(s.temperature_offset_K):
        return (f"temperatures {s.temperature_offset_K:+.3g} K off the other sources, pattern temperature-offset",
                "check the series' temperature scale, or exclude the series")
    return reason or f"status {s.status}", "exclude the series or find why it disagrees"


def _source_actions(result: AuditResult) -> list[Action]:
    out = []
    rows_of = _rows_by_source(result.points)
    for i, s in enumerate(result.sources):
        if s.status not in ("suspect", "reject"):
            continue
        finding, action = _source_finding(s)
        out.append(Action("source", "fail" if s.status == "reject" else "warn", f"source '{s.source}'",
                          finding, action, source_anchor(i), tuple(rows_of.get(s.source, ()))))
    return out


def _copied_series_actions(result: AuditResult) -> list[Action]:
    out = []
    for c in result.checks:
        if c.id == "copied-values" and c.status in ("warn", "fail"):
            rows = tuple(sorted({f.row for f in c.flags}))
            out.append(Action("source", c.status, "copied series", _first_clause(c.message, 260),
                              "keep the original series and remove the copy", check_anchor(c.id), rows))
    return out


# -- rows -------------------------------------------------------------------------
def rows_only_under_their_source(result: AuditResult) -> set[int]:
    """Rows kept as ok whose only remarks come from findings about their whole source."""
    return {p.row for p in result.points
            if p.status == "ok" and p.flags and all(f.check in SOURCE_LEVEL_CHECKS for f in p.flags)}


def _row_needs_listing(p: PointVerdict, under_source: set[int]) -> bool:
    if p.row in under_source:
        return False
    return p.status in ("reject", "suspect", "unreadable") or bool(p.flags)


def _row_severity(p: PointVerdict) -> Severity:
    if p.status in ("reject", "unreadable"):
        return "fail"
    if p.status == "suspect" and p.cause is None and all(f.check == "outliers" for f in p.flags):
        return "note"
    return "warn"


def _row_finding(p: PointVerdict, result: AuditResult) -> str:
    if p.cause is not None:
        # the first clause says what was misprinted; the σ before and after are evidence
        return f"{p.cause.kind}: {_first_clause(p.cause.explanation, 200)}"
    if p.status == "unreadable":
        reason = next((pt.reason for pt in result.dataset.points if pt.row == p.row and pt.reason), "")
        return f"unreadable: {reason}" if reason else "unreadable"
    own = [f for f in p.flags if f.check not in SOURCE_LEVEL_CHECKS]
    if p.status in ("reject", "suspect"):
        sigma = f" ({p.residual_sigma:+.1f} σ)" if _finite(p.residual_sigma) else ""
        what = "rejected" if p.status == "reject" else "suspect"
        rest = next((f"{f.check}: {_first_clause(f.message)}" for f in own if f.check != "outliers"), "")
        return f"{what}{sigma}, no likely cause found" + (f"; {rest}" if rest else "")
    return "; ".join(f"{f.check}: {_first_clause(f.message)}" for f in own) or "remark"


def _row_action(p: PointVerdict) -> str:
    if p.status == "unreadable":
        return "correct the cell or remove the row"
    if p.cause is not None:
        act = _ROW_ACTION.get(p.cause.kind, "correct the row")
        suggested = suggested_value_text(p)
        return f"{act}: {suggested}" if suggested else act
    if p.status == "reject":
        return "check the row against the original publication; exclude it if unresolved"
    return "worth a look against the original publication"


def suggested_value_text(p: PointVerdict) -> str:
    """The cause's suggested values, e.g. 'T = 318.25 K; p = 139.28 kPa' ('' when none)."""
    T, P = p.corrections()
    return "; ".join(([f"T = {T:.6g} K"] if T is not None else [])
                     + ([f"p = {pressure_text(P)}"] if P is not None else []))


def _runs(rows: Sequence[PointVerdict], finding) -> list[list[PointVerdict]]:
    """Consecutive input rows of one source and status sharing one cause kind, or (without a
    cause) one finding, such as a run of same-sign residuals: a block."""
    def key(p):
        return (p.source, p.status, p.cause.kind if p.cause is not None else finding(p))

    runs: list[list[PointVerdict]] = []
    for p in rows:
        last = runs[-1][-1] if runs else None
        if last is not None and p.row == last.row + 1 and key(p) == key(last):
            runs[-1].append(p)
        else:
            runs.append([p])
    return runs


def _row_actions(result: AuditResult, covered: set[int]) -> list[Action]:
    under_source = rows_only_under_their_source(result)
    listed = [p for p in result.points if _row_needs_listing(p, under_source) and p.row not in covered]
    findings = {p.row: _row_finding(p, result) for p in listed}
    out = []
    for run in _runs(listed, lambda p: findings[p.row]):
        first = run[0]
        where = f" ({first.source})" if first.source else ""
        rows = tuple(p.row for p in run)
        if len(run) == 1:
            out.append(Action("row", _row_severity(first), f"row {first.row}{where}", findings[first.row],
                              _row_action(first), row_anchor(first.row), rows))
        elif first.cause is None:
            out.append(Action("block", _row_severity(first), f"rows {first.row}–{run[-1].row}{where}",
                              findings[first.row], _row_action(first), row_anchor(first.row), rows))
        else:
            kind = first.cause.kind
            factor_text = _common_explanation(run)
            out.append(Action("block", _row_severity(first), f"rows {first.row}–{run[-1].row}{where}",
                              f"{kind} in {len(run)} consecutive rows" + (f": {factor_text}" if factor_text else ""),
                              f"{_ROW_ACTION.get(kind, 'correct the rows')} (suggested values in the flagged-rows table)",
                              row_anchor(first.row), rows))
    return out


def _common_explanation(run: Sequence[PointVerdict]) -> str:
    """The part of the rows' explanations they share (e.g. 'taken as Pa but written in kPa')."""
    texts = [p.cause.explanation for p in run if p.cause is not None]
    if not texts:
        return ""
    # explanations read "P printed '…' taken as X but written in Y: …": keep the unit words
    head = texts[0].split(":")[0]
    if "taken as" in head:
        return head[head.index("taken as"):]
    if "times the intended" in head:
        return head[head.index("is ") + 3:head.index(" the intended")] + " the intended value"
    return ""


#: more row and block entries than this sharing one cause kind become one entry
MOST_ENTRIES_PER_CAUSE = 3


def _gathered_by_cause(actions: list[Action]) -> list[Action]:
    """Row and block entries sharing a cause kind, when there are many, as one entry:
    "48 rows: pressure-unit" says more on a first page than 48 lines of it."""
    by_kind: dict[tuple[str, str], list[Action]] = {}
    for a in actions:
        kind = a.finding.split(":")[0]
        if kind in _ROW_ACTION:
            by_kind.setdefault((a.severity, kind), []).append(a)
    out = [a for a in actions if a.finding.split(":")[0] not in _ROW_ACTION]
    for (severity, kind), group in by_kind.items():
        if len(group) <= MOST_ENTRIES_PER_CAUSE:
            out.extend(group)
            continue
        rows = tuple(sorted(r for a in group for r in a.rows))
        shown = ", ".join(map(str, rows[:12])) + (f" and {len(rows) - 12} more" if len(rows) > 12 else "")
        out.append(Action("row", severity, f"{len(rows)} rows", f"{kind} (rows {shown})",
                          f"{_ROW_ACTION[kind]} (suggested values in the flagged-rows table)",
                          group[0].anchor, rows))
    return out


# -- dataset-level ----------------------------------------------------------------
def _dataset_actions(result: AuditResult, listed_rows: set[int]) -> list[Action]:
    out = []
    for c in result.checks:
        if c.status not in ("warn", "fail") or c.id in ROW_LEVEL_CHECKS or c.id in SOURCE_LEVEL_CHECKS:
            continue
        if c.flags and {f.row for f in c.flags} <= listed_rows:
            continue  # its findings are the rows listed already (e.g. a phase label)
        out.append(Action("dataset", c.status, c.title, _first_clause(c.message, 260),
                          _CHECK_ACTION.get(c.id, "review the check's evidence"), check_anchor(c.id),
                          tuple(sorted({f.row for f in c.flags}))))
    return out


# -- the list ---------------------------------------------------------------------
def what_to_fix(result: AuditResult) -> tuple[Action, ...]:
    """The findings of ``result`` at the level they occur, most severe first.

    Order: severity (fail, warn, note), then level (source, block, row,
    dataset), then the first input row.  A rejected row whose cause is its
    source's own (a whole series in another unit) is part of the source's
    entry, not listed again.
    """
    sources = _source_actions(result) + _copied_series_actions(result)
    covered = _rows_explained_by_their_source(result)
    rows = _gathered_by_cause(_row_actions(result, covered))
    listed_rows = {r for a in rows for r in a.rows} | covered
    dataset = _dataset_actions(result, listed_rows)
    every = sources + rows + dataset
    return tuple(sorted(every, key=lambda a: (_SEVERITY_RANK[a.severity], _LEVEL_RANK[a.level],
                                              a.rows[0] if a.rows else math.inf)))


def _rows_explained_by_their_source(result: AuditResult) -> set[int]:
    """Flagged rows whose cause is the one diagnosed for their whole source."""
    kind_of = {}
    for s in result.sources:
        cause = s.extra.get("cause") or {}
        whole_series = "factor" in cause or "real_unit" in cause or cause.get("kind") == "other-compound"
        if s.status in ("suspect", "reject") and whole_series:
            kind_of[s.source] = cause.get("kind")
    return {p.row for p in result.points
            if p.source in kind_of and p.cause is not None and p.cause.kind == kind_of[p.source]}


# -- helpers ----------------------------------------------------------------------
def _rows_by_source(points: Iterable[PointVerdict]) -> dict[str, list[int]]:
    out: dict[str, list[int]] = {}
    for p in points:
        if p.source:
            out.setdefault(p.source, []).append(p.row)
    return out


def _first_clause(text: str, limit: int = 160) -> str:
    """The first clause of a message (up to its first ';'), cut to ``limit`` characters."""
    head = text.split(";")[0].strip()
    if len(head) > limit:
        head = head[:limit - 1].rstrip() + "…"
    return head
