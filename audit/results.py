"""The results object: everything an audit found, and nothing else.

The reports (HTML, PDF, JSON, CSV) render from an :class:`AuditResult`
only; nothing is recomputed there.  :meth:`AuditResult.to_findings` produces
the ``findings.json`` contract (schema_version 1, see
``audit/schema/findings-v1.schema.json``).  Later work adds fields, never
renames or removes them.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Literal, Mapping

from .model import Dataset

Status = Literal["pass", "warn", "fail", "skipped"]
PointStatus = Literal["ok", "suspect", "reject", "unreadable"]
#: how bad a row's status is: a later check may raise a row's status, never lower it
STATUS_RANK = {"ok": 0, "suspect": 1, "reject": 2, "unreadable": 3}
#: the kinds of likely cause a row or a source may be given
CAUSE_KINDS = ("pressure-unit", "temperature-unit", "decimal-shift", "digit-swap", "phase-label", "other-compound")
SCHEMA_VERSION = 1


@dataclass(frozen=True)
class PointFlag:
    """A check's remark on one row."""

    row: int
    check: str
    severity: Literal["warn", "fail"]
    message: str

    def to_dict(self) -> dict:
        return {"check": self.check, "severity": self.severity, "message": self.message}


@dataclass(frozen=True)
class Cause:
    """The likely cause of a suspect or rejected point, with the corrected value."""

    kind: str
    explanation: str
    suggested_T_K: float | None
    suggested_P_Pa: float | None

    def to_dict(self) -> dict:
        return {"kind": self.kind, "explanation": self.explanation,
                "suggested": {"T_K": _num(self.suggested_T_K), "P_Pa": _num(self.suggested_P_Pa)}}


@dataclass(frozen=True)
class CheckResult:
    """What one check found.

    ``point_status`` proposes a status for rows (``suspect`` or ``reject``);
    the audit keeps the most severe proposal per row.  ``causes`` and
    ``residual_sigma`` fill the matching fields of the points.
    """

    id: str
    title: str
    status: Status
    message: str
    metrics: Mapping[str, Any] = field(default_factory=dict)
    flags: tuple[PointFlag, ...] = ()
    point_status: Mapping[int, str] = field(default_factory=dict)
    causes: Mapping[int, Cause] = field(default_factory=dict)
    residual_sigma: Mapping[int, float] = field(default_factory=dict)
    phase_inferred: Mapping[int, str] = field(default_factory=dict)
    #: what the phases in ``phase_inferred`` were inferred from (e.g. "the known triple point …")
    phase_basis: str = ""

    def __post_init__(self):
        _freeze(self, "metrics", "point_status", "causes", "residual_sigma", "phase_inferred")

    def to_dict(self) -> dict:
        return {"id": self.id, "title": self.title, "status": self.status,
                "message": self.message, "metrics": _jsonable(dict(self.metrics))}


@dataclass(frozen=True)
class PointVerdict:
    """The audit's verdict on one input row."""

    row: int
    T_K: float | None
    P_Pa: float | None
    phase: str
    source: str | None
    status: str
    flags: tuple[PointFlag, ...]
    cause: Cause | None
    residual_sigma: float | None
    phase_inferred: bool = False
    #: 100·(P − P_fit)/P_fit against the branch's consensus fit [%]
    deviation_percent: float | None = None
    #: the point's standard uncertainty in the same relative terms [%]
    u_percent: float | None = None
    #: 100·(P − P_ref)/P_ref against the reference correlation, when one is used [%]
    reference_deviation_percent: float | None = None
    #: what an inferred phase was inferred from (None when the input labelled the row)
    phase_basis: str | None = None
    #: the offset of the point's source that the consensus removed before judging it,
    #: 100·(exp(Δln P) − 1) [%]; 0 when its source is not off, None when not judged
    source_offset_percent: float | None = None

    @property
    def printed_deviation_percent(self) -> float | None:
        """100·(P − P_fit)/P_fit of the point as printed, its source's offset not removed [%]."""
        if self.deviation_percent is None:
            return None
        off = self.source_offset_percent or 0.0
        return 100.0 * ((1 + self.deviation_percent / 100) * (1 + off / 100) - 1)

    def corrections(self) -> tuple[float | None, float | None]:
        """(T [K], P [Pa]) its cause suggests, each None unless finite and different from the
        value read (a phase label changes neither; the findings repeat the unchanged one)."""
        if self.cause is None:
            return None, None

        def changed(suggested, as_read):
            if suggested is None or not math.isfinite(suggested):
                return None
            same = as_read is not None and math.isclose(suggested, as_read, rel_tol=1e-9)
            return None if same else suggested

        return changed(self.cause.suggested_T_K, self.T_K), changed(self.cause.suggested_P_Pa, self.P_Pa)

    def to_dict(self) -> dict:
        branch = _branch_fields(self.phase)
        d = {"row": self.row, "T_K": _num(self.T_K), "P_Pa": _num(self.P_Pa),
             "phase": branch["branch"], "source": self.source, "status": self.status,
             "flags": [f.to_dict() for f in self.flags],
             "cause": None if self.cause is None else self.cause.to_dict(),
             "residual_sigma": _num(self.residual_sigma)}
        if self.deviation_percent is not None:
            d["deviation_percent"] = _num(self.deviation_percent)
            d["source_offset_percent"] = _num(self.source_offset_percent)
            d["u_percent"] = _num(self.u_percent)
        if self.phase_inferred:
            d["phase_inferred_from"] = self.phase_basis or "the audit"
        if "crystal_form" in branch:
            d["crystal_form"] = branch["crystal_form"]
        return d


@dataclass(frozen=True)
class FitRecord:
    """A fitted vapor-pressure equation for one branch, as reported."""

    branch: str
    equation: str
    parameters: Mapping[str, float]
    covariance: tuple[tuple[float, ...], ...]
    T_range_K: tuple[float, float]
    n_used: int
    rms_percent: float
    recommended: bool = True
    extra: Mapping[str, Any] = field(default_factory=dict)
    #: the fitted equation object, for plotting (not serialised)
    model: Any = field(default=None, compare=False, repr=False)

    def __post_init__(self):
        _freeze(self, "parameters", "extra")

    @property
    def correlation(self) -> tuple[tuple[float, ...], ...]:
        """The parameters' correlation matrix, from ``covariance`` [-] (NaN where a variance is not positive)."""
        cov = self.covariance
        sd = [math.sqrt(cov[i][i]) if cov[i][i] is not None and cov[i][i] > 0 else math.nan
              for i in range(len(cov))]
        return tuple(tuple(cov[i][j] / (sd[i] * sd[j]) for j in range(len(cov))) for i in range(len(cov)))

    def strongest_correlation(self) -> tuple[str, str, float] | None:
        """The pair of parameters most strongly correlated, with their coefficient, or None."""
        names = list(self.parameters)
        r = self.correlation
        pairs = [(names[i], names[j], r[i][j]) for i in range(len(r)) for j in range(i + 1, len(r))
                 if i < len(names) and j < len(names) and math.isfinite(r[i][j])]
        return max(pairs, key=lambda t: abs(t[2])) if pairs else None

    def to_dict(self) -> dict:
        d = {**_branch_fields(self.branch), "equation": self.equation,
             "parameters": _jsonable(dict(self.parameters)),
             "covariance": [[_num(v) for v in row] for row in self.covariance],
             "T_range_K": [_num(self.T_range_K[0]), _num(self.T_range_K[1])],
             "n_used": self.n_used, "rms_percent": _num(self.rms_percent)}
        if not self.recommended:
            d["recommended"] = False
        d.update(_jsonable(dict(self.extra)))
        return d


@dataclass(frozen=True)
class EnthalpyValue:
    branch: str
    T_K: float
    dH_J_per_mol: float
    u_dH_J_per_mol: float | None
    real_gas_corrected: bool
    dH_apparent_J_per_mol: float | None = None
    delta_z: float | None = None
    #: why this temperature was chosen, for the condensed table ("round", "normal boiling
    #: point", "triple point", "low end", "high end"); None for a data temperature
    at: str | None = None

    def to_dict(self) -> dict:
        d = {**_branch_fields(self.branch), "T_K": _num(self.T_K), "dH_J_per_mol": _num(self.dH_J_per_mol),
             "u_dH_J_per_mol": _num(self.u_dH_J_per_mol),
             "real_gas_corrected": self.real_gas_corrected,
             "dH_apparent_J_per_mol": _num(self.dH_apparent_J_per_mol),
             "delta_z": _num(self.delta_z)}
        if self.at is not None:
            d["at"] = self.at
        return d


@dataclass(frozen=True)
class SourceAgreement:
    source: str
    n: int
    bias_percent: float | None
    u_bias_percent: float | None
    temperature_offset_K: float | None
    pattern: str
    status: str
    extra: Mapping[str, Any] = field(default_factory=dict)

    def __post_init__(self):
        _freeze(self, "extra")

    def to_dict(self) -> dict:
        d = {"source": self.source, "n": self.n, "bias_percent": _num(self.bias_percent),
             "u_bias_percent": _num(self.u_bias_percent),
             "temperature_offset_K": _num(self.temperature_offset_K),
             "pattern": self.pattern, "status": self.status}
        d.update(_jsonable(dict(self.extra)))
        return d


@dataclass(frozen=True)
class TriplePointRecord:
    T_K: float
    u_T_K: float | None
    P_Pa: float
    u_P_Pa: float | None
    dH_fus_J_per_mol: float | None
    u_dH_fus_J_per_mol: float | None
    reference: Mapping[str, Any] | None

    def __post_init__(self):
        _freeze(self, "reference")

    def to_dict(self) -> dict:
        return {"T_K": _num(self.T_K), "u_T_K": _num(self.u_T_K), "P_Pa": _num(self.P_Pa),
                "u_P_Pa": _num(self.u_P_Pa), "dH_fus_J_per_mol": _num(self.dH_fus_J_per_mol),
                "u_dH_fus_J_per_mol": _num(self.u_dH_fus_J_per_mol),
                "reference": None if self.reference is None else _jsonable(dict(self.reference))}


@dataclass(frozen=True)
class TransitionRecord:
    """Where the sublimation curves of two crystal forms cross: a solid–solid transition.

    ``low_form`` is stable below ``T_K``, ``high_form`` above; the enthalpy of
    transition is ΔH_sub(low form) − ΔH_sub(high form) at the crossing
    (real-gas corrected when both branches could be) [J/mol].
    """

    low_form: str
    high_form: str
    T_K: float
    u_T_K: float | None
    P_Pa: float
    u_P_Pa: float | None
    dH_J_per_mol: float
    u_dH_J_per_mol: float | None

    def to_dict(self) -> dict:
        return {"low_form": self.low_form, "high_form": self.high_form, "T_K": _num(self.T_K),
                "u_T_K": _num(self.u_T_K), "P_Pa": _num(self.P_Pa), "u_P_Pa": _num(self.u_P_Pa),
                "dH_J_per_mol": _num(self.dH_J_per_mol), "u_dH_J_per_mol": _num(self.u_dH_J_per_mol)}


@dataclass(frozen=True)
class SheetRecord:
    """What a supplier's sheet says and what its coefficients really are (findings ``sheet``).

    ``stated`` and ``decoded`` give the reading (what the equation gives, T and P units);
    ``evidence`` the best readings with their misfits in ln P and the reasons; ``si`` the
    coefficients in SI (T in K, P in Pa, log10 and ln); ``reference`` the reference used and the
    equation's deviation from it over the stated range.
    """

    form: str
    expression: str | None
    coefficients: Mapping[str, float]
    stated: Mapping[str, Any]
    decoded: Mapping[str, Any]
    differs: bool
    basis: str
    evidence: tuple[Mapping[str, Any], ...]
    T_range_K: tuple[float, float] | None
    si: Mapping[str, Any]
    reference: Mapping[str, Any] | None
    supplier: str | None = None
    product: str | None = None

    def __post_init__(self):
        _freeze(self, "coefficients", "stated", "decoded", "evidence", "si", "reference")

    def to_dict(self) -> dict:
        return _jsonable({"form": self.form, "expression": self.expression,
                          "coefficients": dict(self.coefficients), "stated": dict(self.stated),
                          "decoded": dict(self.decoded), "differs_from_stated": self.differs,
                          "decided_by": self.basis, "evidence": [dict(e) for e in self.evidence],
                          "T_range_K": None if self.T_range_K is None else list(self.T_range_K),
                          "si_coefficients": dict(self.si),
                          "reference": None if self.reference is None else dict(self.reference),
                          "supplier": self.supplier, "product": self.product})


@dataclass(frozen=True)
class AuditResult:
    """Everything one audit of one dataset under one profile found."""

    dataset: Dataset
    profile_name: str
    profile_sha256: str
    profile_text: str
    tool_version: str
    audited_at: str
    checks: tuple[CheckResult, ...]
    points: tuple[PointVerdict, ...]
    fits: tuple[FitRecord, ...] = ()
    enthalpy: tuple[EnthalpyValue, ...] = ()
    sources: tuple[SourceAgreement, ...] = ()
    triple_point: TriplePointRecord | None = None
    notes: tuple[str, ...] = ()
    #: solid–solid transitions between crystal forms (findings ``transitions``)
    transitions: tuple[TransitionRecord, ...] = ()
    #: the enthalpy at round temperatures, the normal boiling point, the triple point and
    #: each branch's ends (findings ``enthalpy_table``; ``enthalpy`` keeps every data temperature)
    enthalpy_table: tuple[EnthalpyValue, ...] = ()
    #: series prepared for plots (computed by the audit, only drawn by the report)
    plot_data: Mapping[str, Any] = field(default_factory=dict, compare=False, repr=False)
    #: "check-id: ExceptionType: message" for each check an unexpected exception stopped
    internal_errors: tuple[str, ...] = ()
    #: a supplier sheet's stated and decoded reading (None for a table audit)
    sheet: SheetRecord | None = None

    def __post_init__(self):
        _freeze(self, "plot_data")

    @property
    def verdict(self) -> str:
        statuses = {c.status for c in self.checks}
        if "fail" in statuses:
            return "fail"
        if "warn" in statuses:
            return "warn"
        return "pass"

    def count(self, status: str) -> int:
        return sum(1 for p in self.points if p.status == status)

    def summary(self, max_rows: int = 25) -> str:
        """The audit in a few lines, as ``vpaudit check`` and ``vpaudit sheet`` print it.

        The verdict and counts; for a sheet, what it states and what it was decoded as, and the
        checks that warn or fail; one line per flagged row (its cause and the corrected value,
        at most ``max_rows``) and per source found off.
        """
        lines = [f"{self.dataset.file_name}: verdict {self.verdict.upper()} — {len(self.points)} rows, "
                 f"{self.count('reject')} rejected, {self.count('suspect')} suspect, "
                 f"{self.count('unreadable')} unreadable"]
        if self.sheet is not None:
            st = self.sheet.stated
            lines.append(f"  stated:  gives {st.get('gives') or '?'}, T in {st.get('T_unit') or '?'}, "
                         f"P in {st.get('P_unit') or '?'}")
            lines.append(f"  decoded: {self.sheet.decoded['label']} ({self.sheet.basis})"
                         + ("  <- not as stated" if self.sheet.differs else ""))
            lines += [f"  {c.status:4s} {c.id}: {c.message}" for c in self.checks if c.status in ("warn", "fail")]
        flagged = [p for p in self.points if p.status != "ok"]
        for p in flagged[:max_rows]:
            lines.append(f"  row {p.row:<5d} {p.status:10s} {_row_text(p)}")
        if len(flagged) > max_rows:
            lines.append(f"  … and {len(flagged) - max_rows} more flagged rows (see the report)")
        lines += [f"  source '{s.source}' {s.status}: {_source_text(s)}" for s in self.sources if s.status != "ok"]
        return "\n".join(lines)

    def summary_html(self, max_rows: int = 25) -> str:
        """:meth:`summary` as an HTML fragment (escaped text in a ``<pre>``), for a report page."""
        from html import escape

        return f'<pre class="audit-summary">{escape(self.summary(max_rows))}</pre>'

    @property
    def usable_points(self) -> list[PointVerdict]:
        return [p for p in self.points if p.status in ("ok", "suspect")]

    def to_findings(self) -> dict:
        """The ``findings.json`` document (schema_version 1)."""
        ds = self.dataset
        usable = self.usable_points
        Ts = [p.T_K for p in usable]
        Ps = [p.P_Pa for p in usable]
        branches = sorted({_branch_fields(p.phase)["branch"] for p in usable})
        forms = sorted({_branch_fields(p.phase)["crystal_form"] for p in usable if p.phase.startswith("solid ")})
        return {
            "schema_version": SCHEMA_VERSION,
            "tool": {"name": "vpaudit", "version": self.tool_version},
            "profile": {"name": self.profile_name, "sha256": self.profile_sha256},
            "input": {"file": ds.file_name, "sha256": ds.sha256, "format": ds.file_format,
                      "rows": ds.n_rows},
            "audited_at": self.audited_at,
            "dataset": {
                "substance": ds.metadata.substance,
                "n_points": ds.n_rows,
                "n_usable": len(usable),
                "T_range_K": [min(Ts), max(Ts)] if Ts else None,
                "P_range_Pa": [min(Ps), max(Ps)] if Ps else None,
                "branches": branches,
                **({"crystal_forms": forms} if forms else {}),
                "sources": ds.sources,
                "columns": [{"role": c.role, "column": c.column, "unit": c.unit, "log": c.log,
                             "how": c.how} for c in ds.columns],
                "constants": {k: c.to_dict() for k, c in ds.metadata.constants.items()},
                "notes": list(ds.notes),
            },
            "verdict": self.verdict,
            "checks": [c.to_dict() for c in self.checks],
            "points": [p.to_dict() for p in self.points],
            "sources": [s.to_dict() for s in self.sources],
            "fits": [f.to_dict() for f in self.fits],
            "enthalpy": [e.to_dict() for e in self.enthalpy],
            "triple_point": None if self.triple_point is None else self.triple_point.to_dict(),
            "notes": list(self.notes),
            "internal_errors": list(self.internal_errors),
            "transitions": [t.to_dict() for t in self.transitions],
            "enthalpy_table": [e.to_dict() for e in self.enthalpy_table],
            **({"sheet": self.sheet.to_dict()} if self.sheet is not None else {}),
        }


def _row_text(p: "PointVerdict") -> str:
    """A flagged row's cause and the corrected quantity only (the contract repeats the unchanged one)."""
    if p.cause is not None:
        T, P = p.corrections()
        changed = ([f"T = {T:.6g} K"] if T is not None else []) + ([f"P = {P:.6g} Pa"] if P is not None else [])
        return (f"{p.cause.kind}, suggested " + ", ".join(changed) if changed
                else f"{p.cause.kind}: {p.cause.explanation}")
    worst = max(p.flags, key=lambda f: f.severity == "fail", default=None)
    return "no likely cause found" if worst is None else f"{worst.check}: {worst.message}"


def _source_text(src: "SourceAgreement") -> str:
    cause = src.extra.get("cause") or {}
    if src.bias_percent is None or src.u_bias_percent is None:
        what = src.extra.get("reason", "not compared with the other sources")
    else:
        what = (f"pattern {src.pattern}, bias {src.bias_percent:+.3g} ± {src.u_bias_percent:.2g} %"
                + (f", thermometer offset {src.temperature_offset_K:+.3g} K"
                   if src.pattern == "temperature-offset" and src.temperature_offset_K is not None else ""))
    if cause.get("kind") in ("pressure-unit", "temperature-unit") and cause.get("real_unit"):
        what += f"; cause {cause['kind']}: printed in {cause['real_unit']}, not {cause['printed_unit']}"
    elif cause.get("kind"):
        what += f"; cause {cause['kind']} ({cause['n_rows']} rows)"
    return what


def _freeze(obj, *names) -> None:
    """Make the named fields of a frozen dataclass read-only all the way down (its mappings
    and lists), so that a result handed to a report, a worker or an archive cannot change."""
    from .frozen import frozen

    for name in names:
        object.__setattr__(obj, name, frozen(getattr(obj, name)))


def _branch_fields(branch: str) -> dict:
    """``{"branch": …}`` as schema 1 names it, with ``crystal_form`` for one form's branch ('solid II')."""
    if branch.startswith("solid "):
        return {"branch": "solid", "crystal_form": branch[len("solid "):]}
    return {"branch": branch}


def _num(x: Any) -> float | None:
    """A JSON-safe number: NaN and inf become null (JSON has neither)."""
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None


def _jsonable(obj: Any) -> Any:
    """Convert numpy scalars/arrays and tuples to plain JSON values."""
    if obj is None or isinstance(obj, (bool, str)):
        return obj
    if isinstance(obj, int):
        return obj
    if isinstance(obj, float):
        return _num(obj)
    if isinstance(obj, Mapping):
        return {str(k): _jsonable(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_jsonable(v) for v in obj]
    if hasattr(obj, "tolist"):
        return _jsonable(obj.tolist())
    if hasattr(obj, "item"):
        return _jsonable(obj.item())
    return str(obj)
