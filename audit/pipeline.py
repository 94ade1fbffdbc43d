"""The audit of one dataset: a pure function of (dataset, profile).

:func:`run_audit` is what the CLI, the tests and any batch or distributed
runner call.  It reads no files and writes none; it returns an
:class:`~audit.results.AuditResult` that the writers in :mod:`audit.report`
render.  The only input besides the two arguments is the audit time, which a
caller may fix for reproducible output.
"""

from __future__ import annotations

import datetime as _dt
import os
from dataclasses import replace

from . import __version__
from .checks import registry
from .context import AuditContext
from .model import Dataset
from .profiles import Profile
from .results import AuditResult, Cause, CheckResult, PointVerdict


def audit_time(fixed: str | None = None) -> str:
    """ISO 8601 UTC time of the audit; honours ``SOURCE_DATE_EPOCH``.

    Reproducible builds convention (reproducible-builds.org): when
    ``SOURCE_DATE_EPOCH`` is set, it is the time stamp of every output.
    """
    if fixed:
        return fixed
    epoch = os.environ.get("SOURCE_DATE_EPOCH")
    if epoch and epoch.strip().isdigit():
        t = _dt.datetime.fromtimestamp(int(epoch), tz=_dt.timezone.utc)
    else:
        t = _dt.datetime.now(tz=_dt.timezone.utc).replace(microsecond=0)
    return t.isoformat().replace("+00:00", "Z")


def _complete(cause: Cause | None, p) -> Cause | None:
    """A suggestion names both values: the one a cause leaves alone is kept as read."""
    if cause is None:
        return None
    return replace(cause,
                   suggested_T_K=p.T_K if cause.suggested_T_K is None else cause.suggested_T_K,
                   suggested_P_Pa=p.P_Pa if cause.suggested_P_Pa is None else cause.suggested_P_Pa)


#: the message of a check stopped by an unexpected exception starts with this
INTERNAL_ERROR_PREFIX = "internal error: "


def _one_line(exc: BaseException) -> str:
    text = str(exc).strip().splitlines()
    return f"{type(exc).__name__}: {text[0][:200]}" if text else type(exc).__name__


def _run_guarded(check_cls, ctx: AuditContext, internal_errors: list[str]) -> CheckResult:
    """Run one check; an unexpected exception skips that check only.

    This is the last guard, for what the tests have not found yet: the other
    checks still run and every output is still written, the check is
    ``skipped`` with a message starting "internal error:", and the CLI exits
    with code 3 asking for a bug report.  The fuzzing harness counts such a
    message as a failure, so the guard never hides a bug from the tests.
    ``VPAUDIT_DEBUG=1`` lets the exception through for a traceback.
    """
    try:
        return check_cls().run(ctx)
    except Exception as exc:  # noqa: BLE001 -- reported, never silent: see the docstring
        if os.environ.get("VPAUDIT_DEBUG"):
            raise
        internal_errors.append(f"{check_cls.id}: {_one_line(exc)}")
        return CheckResult(check_cls.id, check_cls.title, "skipped",
                           f"{INTERNAL_ERROR_PREFIX}{_one_line(exc)} — this is a bug in vpaudit, "
                           "please report it with the input file",
                           metrics={"internal_error": True})


def run_audit(dataset: Dataset, profile: Profile, *, audited_at: str | None = None) -> AuditResult:
    """Run every enabled check of ``profile`` on ``dataset``.

    Parameters
    ----------
    dataset : Dataset
        From :func:`audit.ingest.read_table` or :func:`audit.model.from_arrays`.
    profile : Profile
        From :func:`audit.profiles.load_profile`.
    audited_at : str, optional
        ISO 8601 time to record; default now (or ``SOURCE_DATE_EPOCH``).

    Returns
    -------
    AuditResult

    Raises
    ------
    InputError
        The dataset has more points than the profile's ``limits.max_rows``.
    """
    profile.row_limit.check(len(dataset.points), dataset.file_name)
    ctx = AuditContext(dataset=dataset, profile=profile)
    results: list[CheckResult] = []
    internal_errors: list[str] = []
    for check_id, check_cls in registry.all_checks().items():
        if check_cls.applies_to != "table":
            continue
        settings = profile.settings(check_id)
        if not settings.enabled:
            results.append(CheckResult(check_id, check_cls.title, "skipped",
                                       f"disabled in profile '{profile.name}'"))
            continue
        result = _run_guarded(check_cls, ctx, internal_errors)
        ctx.absorb(result)
        results.append(result)

    from .products import AuditProducts, gather_products  # fits, enthalpy, sources, triple point from the final state

    try:
        products = gather_products(ctx)
    except Exception as exc:  # the last guard: see _run_guarded
        if os.environ.get("VPAUDIT_DEBUG"):
            raise
        internal_errors.append(f"summary: {_one_line(exc)}")
        products = AuditProducts(notes=("internal error while gathering fits and enthalpies: "
                                   f"{_one_line(exc)}; the sections fits, enthalpy, sources "
                                   "and triple_point are empty",))
    points = []
    for p in dataset.points:
        points.append(PointVerdict(
            row=p.row, T_K=p.T_K, P_Pa=p.P_Pa, phase=ctx.phase(p), source=p.source,
            status=ctx.status[p.row], flags=tuple(ctx.flags.get(p.row, ())),
            cause=_complete(ctx.causes.get(p.row), p), residual_sigma=ctx.residual_sigma.get(p.row),
            phase_inferred=p.row in ctx.phase_inferred and p.phase == "unknown",
            phase_basis=ctx.phase_basis.get(p.row) if p.phase == "unknown" else None,
            deviation_percent=products.deviation_percent.get(p.row),
            u_percent=products.u_percent.get(p.row),
            source_offset_percent=products.offset_percent.get(p.row),
            reference_deviation_percent=products.reference_deviation_percent.get(p.row),
        ))
    return AuditResult(
        dataset=dataset,
        profile_name=profile.name,
        profile_sha256=profile.sha256,
        profile_text=profile.text,
        tool_version=__version__,
        audited_at=audit_time(audited_at),
        checks=tuple(results),
        points=tuple(points),
        fits=products.fits,
        enthalpy=products.enthalpy,
        enthalpy_table=products.enthalpy_table,
        sources=products.sources,
        triple_point=products.triple_point,
        transitions=products.transitions,
        notes=tuple(ctx.notes) + products.notes,
        plot_data=products.plot_data,
        internal_errors=tuple(internal_errors),
    )
