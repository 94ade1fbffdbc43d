"""What changed between two archived audits.

Everything is read from the two archived records (their findings documents
and profile texts), never recomputed, so that two audits can be compared
years later with neither the data nor the profiles at hand.
"""

from __future__ import annotations

import math
import tomllib
from collections.abc import Iterable
from dataclasses import dataclass
from typing import Any

from .records import ArchivedAudit


@dataclass(frozen=True)
class CheckChange:
    """A check whose status differs (None: the check did not run in that audit)."""

    check_id: str
    before: str | None
    after: str | None


@dataclass(frozen=True)
class RowChange:
    """A row whose status or likely cause differs (a cause is its ``kind``)."""

    row: int
    status_before: str | None
    status_after: str | None
    cause_before: str | None
    cause_after: str | None


@dataclass(frozen=True)
class SourceChange:
    """A source whose status or pattern differs (None: not judged in that audit)."""

    source: str
    branch: str | None
    status_before: str | None
    status_after: str | None
    pattern_before: str | None
    pattern_after: str | None


@dataclass(frozen=True)
class FitChange:
    """A branch whose fitted equation differs, or that only one audit fitted."""

    branch: str
    equation_before: str | None
    equation_after: str | None


@dataclass(frozen=True)
class ParameterShift:
    """A fitted parameter that moved by more than its standard uncertainty.

    ``u_before`` and ``u_after`` are the square roots of the covariance
    diagonal of each fit; the shift is judged against the larger of the two,
    so that only a move neither fit can account for is reported.  When
    neither fit has an uncertainty for it, any change is reported and
    ``shift_in_u`` is None.
    """

    branch: str
    equation: str
    name: str
    before: float
    after: float
    u_before: float | None
    u_after: float | None

    @property
    def shift_in_u(self) -> float | None:
        """|after − before| in units of the larger standard uncertainty."""
        u = max((x for x in (self.u_before, self.u_after) if x is not None), default=None)
        return None if not u else abs(self.after - self.before) / u


@dataclass(frozen=True)
class SettingChange:
    """A profile setting (dotted TOML key) that differs; None: not set in that profile file."""

    key: str
    before: Any
    after: Any


@dataclass(frozen=True)
class AuditComparison:
    """What changed from audit ``a`` to audit ``b``.

    Each tuple lists only what differs; an empty tuple means "the same".
    Row numbers are compared as numbers: when the inputs differ
    (``same_input`` False) they may name different data, and
    :meth:`summary` says so first.
    """

    a: int
    b: int
    input_before: tuple[str, str]
    input_after: tuple[str, str]
    verdict_before: str
    verdict_after: str
    profile_before: tuple[str, str]
    profile_after: tuple[str, str]
    tool_version_before: str
    tool_version_after: str
    checks: tuple[CheckChange, ...]
    rows: tuple[RowChange, ...]
    sources: tuple[SourceChange, ...]
    fits: tuple[FitChange, ...]
    parameters: tuple[ParameterShift, ...]
    profile_settings: tuple[SettingChange, ...]

    @property
    def same_input(self) -> bool:
        return self.input_before[1] == self.input_after[1]

    @property
    def profile_changed(self) -> bool:
        return self.profile_before != self.profile_after

    @property
    def tool_changed(self) -> bool:
        return self.tool_version_before != self.tool_version_after

    @property
    def changed(self) -> bool:
        """True when the audits' conclusions differ (verdict, checks, rows, sources, fits)."""
        return bool(self.verdict_before != self.verdict_after or self.checks or self.rows
                    or self.sources or self.fits or self.parameters)

    def summary(self) -> str:
        """The comparison as text, a heading line then one line per difference."""
        lines = [f"audit #{self.a} → audit #{self.b}"]
        if self.same_input:
            lines.append(f"input: the same file ({self.input_before[0]}, sha256 {self.input_before[1][:16]}…)")
        else:
            lines.append(f"input: DIFFERENT files — {self.input_before[0]} (sha256 {self.input_before[1][:16]}…) "
                         f"and {self.input_after[0]} (sha256 {self.input_after[1][:16]}…); "
                         "row numbers may name different data")
        if self.profile_changed:
            lines.append(f"profile: {self.profile_before[0]} (sha256 {self.profile_before[1][:12]}…) → "
                         f"{self.profile_after[0]} (sha256 {self.profile_after[1][:12]}…)")
            for s in self.profile_settings:
                lines.append(f"  {s.key}: {_setting(s.before)} → {_setting(s.after)}")
        else:
            lines.append(f"profile: the same ({self.profile_before[0]})")
        if self.tool_changed:
            lines.append(f"vpaudit: {self.tool_version_before} → {self.tool_version_after}")
        else:
            lines.append(f"vpaudit: the same version ({self.tool_version_before})")
        if self.verdict_before != self.verdict_after:
            lines.append(f"verdict: {self.verdict_before.upper()} → {self.verdict_after.upper()}")
        else:
            lines.append(f"verdict: {self.verdict_before.upper()} in both")
        lines.append(_section("checks whose status changed", self.checks,
                              lambda c: f"{c.check_id}: {c.before or 'not run'} → {c.after or 'not run'}"))
        lines.append(_section("rows whose status or cause changed", self.rows,
                              lambda r: f"row {r.row}: {_row_state(r.status_before, r.cause_before)} → "
                                        f"{_row_state(r.status_after, r.cause_after)}"))
        lines.append(_section("sources whose status or pattern changed", self.sources,
                              lambda s: f"{s.source}{f' ({s.branch})' if s.branch else ''}: "
                                        f"{s.status_before or 'not judged'}/{s.pattern_before or '-'} → "
                                        f"{s.status_after or 'not judged'}/{s.pattern_after or '-'}"))
        lines.append(_section("fitted equations that changed", self.fits,
                              lambda f: f"{f.branch}: {f.equation_before or 'no fit'} → {f.equation_after or 'no fit'}"))
        lines.append(_section("fitted parameters that moved beyond their standard uncertainty", self.parameters,
                              _parameter_line))
        return "\n".join(line for line in lines if line)


def _setting(v: Any) -> str:
    return "(not set in the file)" if v is None else repr(v)


def _row_state(status: str | None, cause: str | None) -> str:
    if status is None:
        return "absent"
    return f"{status} ({cause})" if cause else status


def _parameter_line(p: ParameterShift) -> str:
    text = f"{p.branch} {p.equation} {p.name}: {p.before:.6g} → {p.after:.6g}"
    if p.shift_in_u is None:
        return text + " (no standard uncertainty)"
    u = max(x for x in (p.u_before, p.u_after) if x is not None)
    return text + f" (shift {p.shift_in_u:.2g} × u = {u:.3g})"


def _section(title: str, items: tuple, fmt) -> str:
    if not items:
        return f"{title}: none"
    return "\n".join([f"{title}: {len(items)}", *(f"  {fmt(i)}" for i in items)])


def compare_audits(a: ArchivedAudit, b: ArchivedAudit) -> AuditComparison:
    """Compare two archived audits, ``a`` the earlier reference.

    Parameters
    ----------
    a, b : ArchivedAudit

    Returns
    -------
    AuditComparison
    """
    fa, fb = a.findings, b.findings
    fit_changes, shifts = _fits(fa.get("fits") or [], fb.get("fits") or [])
    return AuditComparison(
        a=a.id, b=b.id,
        input_before=(a.input_name, a.input_sha256), input_after=(b.input_name, b.input_sha256),
        verdict_before=a.verdict, verdict_after=b.verdict,
        profile_before=(a.profile_name, a.profile_sha256), profile_after=(b.profile_name, b.profile_sha256),
        tool_version_before=a.tool_version, tool_version_after=b.tool_version,
        checks=_checks(a, b),
        rows=_rows(fa.get("points") or [], fb.get("points") or []),
        sources=_sources(fa.get("sources") or [], fb.get("sources") or []),
        fits=fit_changes, parameters=shifts,
        profile_settings=(profile_setting_changes(a.profile_name, a.profile_text, b.profile_name, b.profile_text)
                          if a.profile_sha256 != b.profile_sha256 else ()),
    )


def _checks(a: ArchivedAudit, b: ArchivedAudit) -> tuple[CheckChange, ...]:
    before = {c.id: c.status for c in a.checks}
    after = {c.id: c.status for c in b.checks}
    order = list(dict.fromkeys([*before, *after]))
    return tuple(CheckChange(cid, before.get(cid), after.get(cid)) for cid in order
                 if before.get(cid) != after.get(cid))


def _cause_kind(point: dict) -> str | None:
    cause = point.get("cause")
    return cause.get("kind") if isinstance(cause, dict) else None


def _rows(pa: list[dict], pb: list[dict]) -> tuple[RowChange, ...]:
    before = {p["row"]: p for p in pa}
    after = {p["row"]: p for p in pb}
    out = []
    for row in sorted(set(before) | set(after)):
        x, y = before.get(row), after.get(row)
        sx, sy = (x or {}).get("status"), (y or {}).get("status")
        cx, cy = (_cause_kind(x) if x else None), (_cause_kind(y) if y else None)
        if sx != sy or cx != cy:
            out.append(RowChange(row, sx, sy, cx, cy))
    return tuple(out)


def _sources(sa_: list[dict], sb: list[dict]) -> tuple[SourceChange, ...]:
    def keyed(items):
        return {(s.get("source"), s.get("branch")): s for s in items}

    before, after = keyed(sa_), keyed(sb)
    out = []
    for key in list(dict.fromkeys([*before, *after])):
        x, y = before.get(key) or {}, after.get(key) or {}
        if x.get("status") != y.get("status") or x.get("pattern") != y.get("pattern"):
            out.append(SourceChange(key[0], key[1], x.get("status"), y.get("status"),
                                    x.get("pattern"), y.get("pattern")))
    return tuple(out)


def _branch_label(fit: dict) -> str:
    form = fit.get("crystal_form")
    return f"{fit.get('branch')} {form}" if form else str(fit.get("branch"))


def _recommended(fits: Iterable[dict]) -> dict[str, dict]:
    """Branch label → its recommended fit (a fit without the flag is the recommended one)."""
    return {_branch_label(f): f for f in fits if f.get("recommended", True)}


def _std_uncertainties(fit: dict) -> dict[str, float | None]:
    """Parameter name → sqrt of its covariance diagonal entry (None when not positive or absent)."""
    cov = fit.get("covariance") or []
    out: dict[str, float | None] = {}
    for i, name in enumerate(fit.get("parameters") or {}):
        v = cov[i][i] if i < len(cov) and i < len(cov[i]) else None
        out[name] = math.sqrt(v) if isinstance(v, (int, float)) and v > 0 else None
    return out


def _fits(fa: list[dict], fb: list[dict]) -> tuple[tuple[FitChange, ...], tuple[ParameterShift, ...]]:
    before, after = _recommended(fa), _recommended(fb)
    changes, shifts = [], []
    for label in list(dict.fromkeys([*before, *after])):
        x, y = before.get(label), after.get(label)
        ex, ey = (x or {}).get("equation"), (y or {}).get("equation")
        if ex != ey:
            # different equations (or one audit without a fit): their parameters are not comparable
            changes.append(FitChange(label, ex, ey))
            continue
        ux, uy = _std_uncertainties(x), _std_uncertainties(y)
        px, py = x.get("parameters") or {}, y.get("parameters") or {}
        for name in px:
            vx, vy = px.get(name), py.get(name)
            if not isinstance(vx, (int, float)) or not isinstance(vy, (int, float)):
                continue
            u = max((v for v in (ux.get(name), uy.get(name)) if v is not None), default=None)
            moved = abs(vy - vx) > u if u else not math.isclose(vx, vy, rel_tol=1e-12, abs_tol=0.0)
            if moved:
                shifts.append(ParameterShift(label, ex, name, float(vx), float(vy), ux.get(name), uy.get(name)))
    return tuple(changes), tuple(shifts)


def _flatten(doc: dict, prefix: str = "") -> dict[str, Any]:
    out: dict[str, Any] = {}
    for key, value in doc.items():
        name = f"{prefix}{key}"
        if isinstance(value, dict):
            out.update(_flatten(value, name + "."))
        else:
            out[name] = value
    return out


def profile_setting_changes(name_a: str, text_a: str, name_b: str, text_b: str) -> tuple[SettingChange, ...]:
    """The settings by which two profile files differ, as dotted keys (``checks.duplicates.severity``).

    When one profile ``extends`` the other (by name), only the settings the
    extending file makes are compared — with the value the base file gives
    them — since everything else it inherits unchanged.  Otherwise every key
    set in either file and not equal in both is listed (None where a file
    does not set it: that profile inherits it).  Keys of the ``[profile]``
    table (name, description, extends) are not settings and are left out.
    """
    try:
        a = _flatten(tomllib.loads(text_a))
        b = _flatten(tomllib.loads(text_b))
    except tomllib.TOMLDecodeError:
        return ()
    if b.get("profile.extends") == name_a:
        keys = [k for k in b if not k.startswith("profile.")]
    elif a.get("profile.extends") == name_b:
        keys = [k for k in a if not k.startswith("profile.")]
    else:
        keys = [k for k in dict.fromkeys([*a, *b]) if not k.startswith("profile.")]
    return tuple(SettingChange(k, a.get(k), b.get(k)) for k in keys if a.get(k) != b.get(k))
