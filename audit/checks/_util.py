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


def coverage_for_source(ctx, k: float, source: str | None, rows) -> float:
    """The coverage factor for a departure judged by the σ of one source's rows.

    A named source's σ (without a stated u(P) on every row) is known only
    from its own ``rows`` and a prior's — 0.37·(n − 1) degrees of freedom
    each, the prior's n being ``outliers.min_points_source_scale`` — so `k`,
    meant for a known σ, becomes the Student t quantile of the same one-sided
    probability (:func:`audit.thermo.stats.coverage_for_estimated_scale`), as
    ``outliers`` judges the source's points.  Unnamed rows, and rows that all
    state their u(P), keep `k`.
    """
    from ..thermo.stats import coverage_for_estimated_scale, mad_degrees_of_freedom

    rows = list(rows)
    if not (ctx.dataset.sources and source) or all(p.u_P_Pa for p in rows):
        return k
    prior = ctx.settings("outliers")["min_points_source_scale"]
    return coverage_for_estimated_scale(k, mad_degrees_of_freedom(len(rows)) + mad_degrees_of_freedom(prior))
