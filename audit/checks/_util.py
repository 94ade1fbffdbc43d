"""Small helpers shared by the checks (no physics, no thresholds)."""

from __future__ import annotations

from ..results import CheckResult


def worst_status(n_findings: int, severity: str) -> str:
    """'pass' when nothing was found, else the profile's severity."""
    return "pass" if n_findings == 0 else severity


def rows_text(rows, limit: int = 12) -> str:
    rows = sorted(set(rows))
    shown = ", ".join(str(r) for r in rows[:limit])
    more = f" and {len(rows) - limit} more" if len(rows) > limit else ""
    return f"row{'s' if len(rows) != 1 else ''} {shown}{more}"


def fmt(x: float, digits: int = 6) -> str:
    return f"{x:.{digits}g}"


def skipped(check_cls, why: str, **metrics) -> CheckResult:
    return CheckResult(check_cls.id, check_cls.title, "skipped", why, metrics)
