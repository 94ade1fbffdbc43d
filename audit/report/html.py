"""The audit report as one self-contained HTML file.

The page is rendered by Jinja2 with autoescaping on for every value: whatever
the input file holds (source names, cells, metadata) is shown as text, never
as markup, links or references.  The only unescaped content is the figures'
SVG, which :mod:`audit.report.plots` draws itself and checks for anything
active.  The page needs no network, no script, no external style sheet,
font or image; it reads on screen and prints (print CSS).  The same page is
the source of the PDF (:mod:`audit.report.pdf`).

Rendering is deterministic: the same :class:`~audit.results.AuditResult`
gives the same bytes (the time shown is ``result.audited_at``).
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass
from typing import Any, Mapping

from ..results import AuditResult
from .actions import (SOURCE_LEVEL_CHECKS, check_anchor, row_anchor, rows_only_under_their_source, source_anchor,
                      suggested_value_text, what_to_fix)
from .atomic import write_file
from .numbers import pressure_text

__all__ = ["render_html", "write_html", "report_context", "format_number", "VERDICT_TEXT"]

VERDICT_TEXT = {
    "pass": ("PASS", "No check failed or warned."),
    "warn": ("WARN", "Some checks raised warnings: review the rows and checks below."),
    "fail": ("FAIL", "At least one check failed: the data should not be used as they stand."),
}
STATUS_TEXT = {"pass": "pass", "warn": "warn", "fail": "fail", "skipped": "skipped",
               "ok": "ok", "suspect": "suspect", "reject": "rejected", "unreadable": "unreadable"}
#: marks that carry the status without colour (shape of the glyph)
STATUS_MARK = {"pass": "✓", "warn": "▲", "fail": "✖", "skipped": "–", "ok": "●",
               "suspect": "△", "reject": "✖", "unreadable": "?"}
CAUTION = (
    "This audit screens a table of vapor pressures for internal consistency and "
    "plausibility. It does not replace the evaluation of the data by a qualified "
    "person. Vapor pressures feed the sizing of relief devices and estimates of "
    "flammability and of exposure; such work follows the applicable local codes "
    "and licensed professional practice."
)


# -- formatting ----------------------------------------------------------------------
def format_number(x: Any, digits: int = 5) -> str:
    """A number for a table: ``digits`` significant digits, '—' when missing.

    >>> format_number(101325.0)
    '1.0132e+05'
    >>> format_number(273.16)
    '273.16'
    """
    if x is None:
        return "—"
    if isinstance(x, bool):
        return "yes" if x else "no"
    if isinstance(x, int):
        return str(x)
    try:
        v = float(x)
    except (TypeError, ValueError):
        return str(x)
    if not math.isfinite(v):
        return "—"
    if v == 0:
        return "0"
    text = f"{v:.{digits}g}"
    return text


def _fixed(x: Any, decimals: int) -> str:
    if x is None or not isinstance(x, (int, float)) or not math.isfinite(x):
        return "—"
    return f"{x:.{decimals}f}"


def _metric_text(metrics: Mapping[str, Any], limit: int = 3) -> str:
    """The key metrics of a check, as one short line (scalars only)."""
    parts = []
    for k, v in metrics.items():
        if isinstance(v, (list, tuple, dict)) or v is None:
            continue
        parts.append(f"{k} = {format_number(v, 4) if not isinstance(v, str) else v}")
        if len(parts) == limit:
            break
    return "; ".join(parts)


# -- the view model ------------------------------------------------------------------
@dataclass(frozen=True)
class FlaggedRow:
    """One line of the flagged-rows table: short cells, then the row's own note."""

    row: int
    anchor: str
    T_printed: str
    P_printed: str
    T_K: str
    P_SI: str
    phase: str
    phase_inferred: bool
    source: str
    status: str
    sigma: str
    cause: str
    suggested: str
    note: str
    #: sort keys for the page's sortable table (numbers as text, '' when missing)
    sort_sigma: str


#: the most flagged rows the PDF lists (the most severe first); the HTML lists every one and
#: annotated.csv, attached to the PDF, carries every row
FLAGGED_ROWS_IN_PRINT = 40
_STATUS_ORDER = {"reject": 0, "unreadable": 1, "suspect": 2, "ok": 3}


def format_T(T_K: Any) -> str:
    """A temperature for a table column: 6 significant digits [K] ('—' when missing)."""
    return format_number(T_K, 6)


def format_sigma(z: Any) -> str:
    """A residual in σ: one decimal up to ±999.9, then two significant digits."""
    if not isinstance(z, (int, float)) or not math.isfinite(z):
        return "—"
    return f"{z:+.1f}" if abs(z) < 999.95 else f"{z:+.2g}"


def _short_flag(f) -> str:
    """The part of a flag message that is specific to its row (the σ has its own column)."""
    if f.check == "outliers":
        parts = [p.strip() for p in f.message.replace(";", ",").split(",")]
        deviation = next((p for p in parts if "deviates" in p), "")
        return deviation.replace(" consensus fit", " consensus") or f.message.split(";")[0]
    return f.message


def _row_note(v, reason: str | None) -> str:
    notes = []
    if v.cause is not None:
        notes.append(v.cause.explanation)
    elif reason and v.status == "unreadable":
        notes.append(reason)
    for f in v.flags:
        if f.check in SOURCE_LEVEL_CHECKS or (v.cause is not None and f.check == "outliers"):
            continue
        text = _short_flag(f)
        if text and text not in notes and text != reason:
            notes.append(text if f.check == "outliers" else f"{f.check}: {text}")
    return "; ".join(notes) or "—"


def flagged_rows(result: AuditResult) -> list[FlaggedRow]:
    """Rows with a verdict other than ok or a remark of their own, in input order.

    A row kept as ok whose only remark is its source's finding is left to the
    sources table (see :func:`audit.report.actions.rows_only_under_their_source`).
    """
    by_row = {p.row: p for p in result.dataset.points}
    under_source = rows_only_under_their_source(result)
    out = []
    for v in result.points:
        if not (v.status in ("suspect", "reject", "unreadable") or v.flags) or v.row in under_source:
            continue
        pt = by_row.get(v.row)
        out.append(FlaggedRow(
            row=v.row, anchor=row_anchor(v.row), **_value_cells(v, pt),
            phase=v.phase, phase_inferred=v.phase_inferred, source=v.source or "—",
            status=v.status, sigma=format_sigma(v.residual_sigma),
            cause=v.cause.kind if v.cause is not None else "—",
            suggested=suggested_value_text(v) or "—",
            note=_row_note(v, pt.reason if pt is not None else None),
            sort_sigma=f"{abs(v.residual_sigma):.6g}" if isinstance(v.residual_sigma, (int, float))
            and math.isfinite(v.residual_sigma) else ""))
    return out


def _rows_for_print(rows: list[FlaggedRow], most: int = FLAGGED_ROWS_IN_PRINT) -> list[FlaggedRow]:
    """At most ``most`` rows, the most severe first (rejected, unreadable, suspect, remarks),
    shown in input order."""
    if len(rows) <= most:
        return rows
    keep = sorted(rows, key=lambda r: (_STATUS_ORDER.get(r.status, 9), r.row))[:most]
    return sorted(keep, key=lambda r: r.row)


#: the most entries the first page lists under "what to fix" (the rest: the flagged-rows table)
MOST_ACTIONS_LISTED = 15


def _all_rows(result: AuditResult) -> list[dict]:
    """Every input row, short, for the page's "show all rows" list (screen only)."""
    by_row = {p.row: p for p in result.dataset.points}
    out = []
    for v in result.points:
        pt = by_row.get(v.row)
        out.append({"row": v.row, **_value_cells(v, pt), "phase": v.phase, "source": v.source or "—",
                    "status": v.status, "sigma": format_sigma(v.residual_sigma), "deviation": _deviation_text(v)})
    return out


def _value_cells(v, pt, T_unit_name=lambda unit: unit) -> dict:
    """A row's values as printed (with their units) and in SI, as every row table shows them."""
    return {"T_printed": _printed(pt.T_text if pt else "", T_unit_name(pt.T_text_unit) if pt else ""),
            "P_printed": _printed(pt.P_text if pt else "", pt.P_text_unit if pt else ""),
            "T_K": format_T(v.T_K), "P_SI": pressure_text(v.P_Pa)}


def _deviation_text(v) -> str:
    return "—" if not _is_number(v.deviation_percent) else f"{v.deviation_percent:+.3g}"


#: longest cell text shown as printed in a table (the row's note and annotated.csv keep all of it)
PRINTED_CELL_CHARS = 18


def _printed(text: str, unit: str) -> str:
    if not text:
        return "(empty)"
    if len(text) > PRINTED_CELL_CHARS:
        text = text[:PRINTED_CELL_CHARS - 1].rstrip() + "…"
    return f"{text} {unit}".strip()


def _fit_rows(result: AuditResult) -> list[dict]:
    rows = []
    for f in result.fits:
        params = []
        for i, name in enumerate(f.parameters):
            u = None
            try:
                var = f.covariance[i][i]
                u = math.sqrt(var) if var is not None and var >= 0 else None
            except (IndexError, TypeError):
                u = None
            params.append({"name": name, "value": format_number(f.parameters[name], 8),
                           "u": format_number(u, 2)})
        strongest = f.strongest_correlation()
        rows.append({"branch": branch_name(f.branch), "equation": f.equation, "params": params,
                     "range": f"{format_T(f.T_range_K[0])} – {format_T(f.T_range_K[1])}",
                     "n": f.n_used, "rms": format_number(f.rms_percent, 3),
                     "recommended": f.recommended,
                     "description": str(f.extra.get("description") or ""),
                     "selection": str(f.extra.get("selection") or ""),
                     "correlation": None if strongest is None else
                     {"a": strongest[0], "b": strongest[1], "r": f"{strongest[2]:+.4f}"}})
    return rows


#: most enthalpy rows the report shows per branch (findings.json keeps one per data temperature)
ENTHALPY_ROWS_PER_BRANCH = 8


def _enthalpy_shown(values, most: int = ENTHALPY_ROWS_PER_BRANCH):
    """Per branch, at most `most` values spread evenly over its temperatures (ends included)."""
    by_branch: dict[str, list] = {}
    for e in values:
        by_branch.setdefault(e.branch, []).append(e)
    shown = []
    for branch_values in by_branch.values():
        ordered = sorted(branch_values, key=lambda e: e.T_K)
        distinct = list({round(e.T_K, 6): e for e in ordered}.values())
        if len(distinct) > most:
            picks = sorted({round(k * (len(distinct) - 1) / (most - 1)) for k in range(most)})
            distinct = [distinct[k] for k in picks]
        shown.extend(distinct)
    return shown


def _enthalpy_rows(result: AuditResult) -> list[dict]:
    """The condensed enthalpy table (``result.enthalpy_table``: round temperatures, the
    normal boiling point, the triple point, each branch's ends); for a result without one,
    a few data temperatures per branch."""
    values = result.enthalpy_table or tuple(_enthalpy_shown(result.enthalpy))
    rows = []
    for e in values:
        corrected = e.dH_J_per_mol if e.real_gas_corrected else None
        apparent = e.dH_apparent_J_per_mol if e.real_gas_corrected else e.dH_J_per_mol
        rows.append({"branch": branch_name(e.branch), "T": format_T(e.T_K), "at": e.at or "",
                     "corrected": _fixed(None if corrected is None else corrected / 1000, 3),
                     "apparent": _fixed(None if apparent is None else apparent / 1000, 3),
                     "dz": _fixed(e.delta_z, 5),
                     "u": _fixed(None if e.u_dH_J_per_mol is None else e.u_dH_J_per_mol / 1000, 3)})
    return rows


def _source_rows(result: AuditResult) -> list[dict]:
    rows = []
    for i, s in enumerate(result.sources):
        x = s.extra
        rng = x.get("T_range_K")
        rows.append({"anchor": source_anchor(i), "source": s.source,
                     "n": x.get("n_rows", s.n), "n_used": s.n,
                     "T_range": (f"{rng[0]:.1f} – {rng[1]:.1f}" if isinstance(rng, (list, tuple)) and len(rng) == 2
                                 and _is_number(rng[0]) and _is_number(rng[1]) else "—"),
                     "scatter": format_number(x.get("scatter_percent"), 2),
                     # fixed decimals per column: a percent to 0.01, a kelvin offset to 0.001
                     "bias": "—" if not _is_number(s.bias_percent) else
                     _signed_fixed(s.bias_percent, 2) + (f" ± {s.u_bias_percent:.2f}" if _is_number(s.u_bias_percent) else ""),
                     "T_offset": "—" if not _is_number(s.temperature_offset_K) else _signed_fixed(s.temperature_offset_K, 3),
                     "pattern": s.pattern, "status": s.status,
                     "reason": str(x.get("reason") or "—"),
                     "rejected": x.get("n_reject", 0)})
    return rows


def _signed_fixed(x: float, decimals: int) -> str:
    """``x`` with a sign and fixed decimals; large values in exponent form so the cell stays short."""
    return f"{x:+.{decimals}f}" if abs(x) < 1e4 else f"{x:+.2e}"


def _is_number(x: Any) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool) and math.isfinite(x)


def _action_rows(result: AuditResult, most: int | None = None) -> tuple[list[dict], int]:
    actions = what_to_fix(result)
    shown = actions if most is None else actions[:most]
    return [{"a": a, "level": a.level, "severity": a.severity} for a in shown], len(actions) - len(shown)


def _transitions(result: AuditResult) -> list[dict]:
    """Rows of the solid–solid transitions table (on heating: low form → high form)."""
    return [{"name": f"{t.low_form} → {t.high_form}", "T": format_number(t.T_K, 6), "uT": format_number(t.u_T_K, 2),
             "P": format_number(t.P_Pa, 5), "uP": format_number(t.u_P_Pa, 2),
             "H": _fixed(t.dH_J_per_mol / 1000, 3),
             "uH": _fixed(None if t.u_dH_J_per_mol is None else t.u_dH_J_per_mol / 1000, 3)}
            for t in result.transitions]


def _triple_point(result: AuditResult) -> dict | None:
    tp = result.triple_point
    if tp is None:
        return None
    ref = dict(tp.reference or {})
    T_ref, P_ref = ref.get("T_K"), ref.get("P_Pa")
    d = {"T": format_number(tp.T_K, 6), "uT": format_number(tp.u_T_K, 2),
         "P": format_number(tp.P_Pa, 5), "uP": format_number(tp.u_P_Pa, 2),
         "H": _fixed(None if tp.dH_fus_J_per_mol is None else tp.dH_fus_J_per_mol / 1000, 3),
         "uH": _fixed(None if tp.u_dH_fus_J_per_mol is None else tp.u_dH_fus_J_per_mol / 1000, 3),
         "ref_name": str(ref.get("name") or ref.get("source") or "") or None,
         "T_ref": format_number(T_ref, 6) if T_ref is not None else None,
         "P_ref": format_number(P_ref, 6) if P_ref is not None else None,
         "dT": None, "dP": None, "zT": None,
         "ref_other": [(str(k), format_number(v, 6)) for k, v in ref.items()
                       if k not in ("T_K", "P_Pa", "name", "source")]}
    if isinstance(T_ref, (int, float)) and math.isfinite(T_ref):
        d["dT"] = f"{tp.T_K - T_ref:+.3g}"
        if tp.u_T_K:
            d["zT"] = f"{(tp.T_K - T_ref) / tp.u_T_K:+.2g}"
    if isinstance(P_ref, (int, float)) and P_ref:
        d["dP"] = f"{100 * (tp.P_Pa - P_ref) / P_ref:+.3g}"
    return d


def report_context(result: AuditResult, *, plots=None, for_print: bool = False) -> dict:
    """Everything the template shows, prepared from ``result`` (strings and lists).

    ``plots`` are the :class:`~audit.report.plots.RenderedPlot` objects; by
    default they are drawn here.
    """
    from markupsafe import Markup

    from .plots import render_all

    ds = result.dataset
    verdict = result.verdict
    if plots is None:
        plots = render_all(result)
    substance = ds.metadata.substance or "substance not named"
    checks = [c for c in result.checks if c.status != "skipped"]
    flagged = flagged_rows(result)
    flagged_shown = _rows_for_print(flagged) if for_print else flagged
    under = rows_only_under_their_source(result)
    under_source_counts = sorted(
        {(p.source or "—"): sum(1 for q in result.points if q.row in under and q.source == p.source)
         for p in result.points if p.row in under}.items())
    actions, actions_more = _action_rows(result, MOST_ACTIONS_LISTED)
    # an entry whose row the PDF does not list points to the table itself
    shown_anchors = {f.anchor for f in flagged_shown}
    for item in actions:
        anchor = item["a"].anchor
        item["href"] = "flagged" if anchor.startswith("row-") and anchor not in shown_anchors else anchor
    skipped = [c for c in result.checks if c.status == "skipped"]
    return {
        "title": f"Vapor-pressure audit — {substance} — {ds.file_name or 'input'}",
        "substance": substance,
        "result": result,
        "ds": ds,
        "verdict": verdict,
        "verdict_word": VERDICT_TEXT[verdict][0],
        "verdict_text": VERDICT_TEXT[verdict][1],
        "counts": {s: result.count(s) for s in ("ok", "suspect", "reject", "unreadable")},
        "n_rows": len(result.points),
        "checks": [{"c": c, "metric": _metric_text(c.metrics)} for c in checks],
        "skipped": skipped,
        "columns": ds.columns,
        "constants": sorted(ds.metadata.constants.items()),
        "extra_meta": [(str(k), str(v)) for k, v in ds.metadata.extra.items()],
        "flagged": flagged,
        "flagged_shown": flagged_shown,
        "under_source": under_source_counts,
        "actions": actions,
        "actions_more": actions_more,
        "source_rows": _source_rows(result),
        "all_rows": [] if for_print else _all_rows(result),
        "fits": _fit_rows(result),
        "enthalpy": _enthalpy_rows(result),
        "triple": _triple_point(result),
        "transitions": _transitions(result),
        "sources": result.sources,
        "sources_named": bool(ds.sources),
        "plots": [{"p": p, "svg": Markup(p.svg) if p.svg else None} for p in plots],
        "caution": CAUTION,
        "summary_html": Markup(result.summary_html()),
        "severity_text": {"fail": "fix", "warn": "check", "note": "look"},
        "status_rank": _STATUS_ORDER,
        "status_text": STATUS_TEXT,
        "status_mark": STATUS_MARK,
    }


def sheet_context(result: AuditResult) -> dict:
    """What the sheet report shows beyond the common frame (``result.sheet`` is set)."""
    from ..sheet.readings import unit_label

    sh = result.sheet
    ev = {e.get("label"): e for e in sh.evidence}
    stated_ev = next((e for e in sh.evidence if e.get("as_stated")), None)
    st = sh.stated
    stated_parts = [f"gives {st['gives']}" if st.get("gives") else "does not say what it gives (log10, ln, P)",
                    f"T in {unit_label(st['T_unit'])}" if st.get("T_unit") else "no temperature unit",
                    f"P in {st['P_unit']}" if st.get("P_unit") else "no pressure unit"]
    rng = st.get("range")
    T_K = sh.T_range_K
    ref = sh.reference
    reference = "none known (give one in the sheet as [reference_equation])"
    if ref is not None:
        reference = ref["name"]
        if ref.get("max_deviation_percent") is not None:
            reference += (f"; largest deviation {ref['max_deviation_percent']:+.3g} % at {ref['at_K']:.5g} K, "
                          f"rms {ref['rms_deviation_percent']:.2g} %, over {ref['compared_K'][0]:.5g}–"
                          f"{ref['compared_K'][1]:.5g} K")
    best = ev.get(sh.decoded["label"]) or (sh.evidence[0] if sh.evidence else {})
    view = {
        "supplier": sh.supplier, "product": sh.product,
        "equation": sh.expression or sh.form,
        "coefficients": ", ".join(f"{k} = {v:.10g}" for k, v in sh.coefficients.items()),
        "stated": "; ".join(stated_parts),
        "decoded": sh.decoded["label"], "differs": sh.differs, "basis": sh.basis,
        "evidence": best.get("summary", "—"),
        "stated_evidence": stated_ev.get("summary", "—") if stated_ev else "—",
        "range": ("not stated" if not rng else
                  f"{rng[0]:g} to {rng[1]:g} (in the decoded unit: {T_K[0]:.5g}–{T_K[1]:.5g} K)" if T_K else
                  f"{rng[0]:g} to {rng[1]:g}"),
        "reference": reference,
    }
    table_rows = []
    for v, pt in zip(result.points, result.dataset.points):
        table_rows.append({"row": v.row, "anchor": row_anchor(v.row), **_value_cells(v, pt, unit_label),
                           "deviation": _deviation_text(v), "status": v.status, "cause": v.cause.kind if v.cause else "—",
                           "suggested": suggested_value_text(v) or "—"})
    si = dict(sh.si)
    names, rows = [], []
    for base in ("log10", "ln"):
        if isinstance(si.get(base), dict):
            part = si[base]
            names = [k for k in part if k != "equation"]
            rows.append({"equation": part["equation"], "values": [format_number(part[k], 10) for k in names]})
    if si.get("form", "").startswith("wagner"):
        names = ["a", "b", "c", "d", "Tc_K", "Pc_Pa"]
        rows.append({"equation": si.get("equation", ""), "values": [format_number(si.get(k), 10) for k in names]})
    note = ("Exact conversion of the decoded coefficients." if si.get("exact") else
            si.get("note", "No conversion to SI is available for this form."))
    return {"sh": view, "table_rows": table_rows, "si_names": names, "si_rows": rows, "si_note": note,
            "title": f"Supplier sheet check — {result.dataset.metadata.substance or 'substance not named'} — "
                     f"{result.dataset.file_name or 'sheet'}"}


#: how a branch is named to a reader: a branch whose phase is not known may be either process
_BRANCH_NAMES = {"liquid": "liquid (vaporization)", "solid": "solid (sublimation)",
                 "unknown": "vaporization or sublimation (phase not known)"}


def branch_name(branch: str) -> str:
    """The reader's name of a branch ('unknown' → 'vaporization or sublimation (phase not known)')."""
    if branch.startswith("solid "):
        return f"solid, form {branch[len('solid '):]} (sublimation)"
    return _BRANCH_NAMES.get(branch, branch)


@functools.cache
def _environment():
    # one environment per process: building it and compiling the template
    # took as long as filling it in
    from jinja2 import Environment, PackageLoader, StrictUndefined

    env = Environment(loader=PackageLoader("audit.report", "templates"), autoescape=True,
                      undefined=StrictUndefined, trim_blocks=True, lstrip_blocks=True,
                      keep_trailing_newline=True)
    env.filters["num"] = format_number
    env.filters["fixed"] = _fixed
    env.globals["check_anchor"] = check_anchor
    return env


def render_html(result: AuditResult, *, plots=None, for_print: bool = False) -> str:
    """The report page as a string.

    Parameters
    ----------
    result : AuditResult
    plots : sequence of RenderedPlot, optional
        Figures already drawn (the PDF writer reuses them).
    for_print : bool
        Paged layout for the PDF (running header with page numbers).
    """
    env = _environment()
    css = env.loader.get_source(env, "report.css")[0]
    ctx = report_context(result, plots=plots, for_print=for_print)
    if result.sheet is not None:
        ctx.update(sheet_context(result))
    # the page's one script (sorting the flagged rows) is allowed by its hash alone; the
    # PDF has no use for it
    script = "" if for_print else sort_script()
    if result.sheet is not None:
        script = ""  # the sheet's table is short: nothing to sort
    template = "sheet.html.j2" if result.sheet is not None else "report.html.j2"
    return env.get_template(template).render(**ctx, css=css, for_print=for_print, script=script,
                                             script_hash=script_hash(script) if script else "")


@functools.cache
def sort_script() -> str:
    """The inline script that sorts the flagged-rows table (the page's only script)."""
    env = _environment()
    return env.loader.get_source(env, "sort_flagged.js")[0].strip()


def script_hash(script: str) -> str:
    """The CSP source expression allowing exactly ``script`` inline ('sha256-…', CSP Level 2)."""
    import base64
    import hashlib

    return "sha256-" + base64.b64encode(hashlib.sha256(script.encode("utf-8")).digest()).decode("ascii")


def html_bytes(result: AuditResult, *, plots=None) -> bytes:
    """The bytes of ``report.html`` (UTF-8); ``plots`` as for :func:`render_html`."""
    return render_html(result, plots=plots).encode("utf-8")


def write_html(result: AuditResult, path, *, plots=None) -> None:
    """Write the self-contained report page to ``path`` (UTF-8), replacing it
    only once complete; ``plots`` as for :func:`render_html`."""
    write_file(path, html_bytes(result, plots=plots))
