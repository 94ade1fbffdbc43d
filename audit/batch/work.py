"""What one worker does with one job: read, audit with the pure ``run_audit`` (or
``run_sheet_audit``), write the outputs atomically, and return a small outcome.

The worker function and its arguments are plain picklable values, so the same
function runs in a process pool and on a Dask cluster.  A worker keeps its
profile and its imports between jobs (``functools.cache``): the imports and the
profile cost more than a small table's audit.
"""

from __future__ import annotations

import functools
import time
from dataclasses import dataclass
from pathlib import Path

from .jobs import Job

__all__ = ["BatchSettings", "Outcome", "run_job", "warm_up", "SEVERITY_ORDER"]

#: how an outcome sorts in the index: errors first, then fail, warn, pass
SEVERITY_ORDER = {"error": 0, "fail": 1, "warn": 2, "pass": 3}


@dataclass(frozen=True)
class BatchSettings:
    """What every job of a batch shares.

    Attributes
    ----------
    out_root : str
        The collection's output folder; each job writes into ``out_root/<job name>``.
    profile : str
        Rule profile name or path.
    formats : tuple of str
        Outputs per dataset (``json``, ``csv``, ``html``, ``pdf``).
    audited_at : str or None
        ISO 8601 time recorded in every audit (None: each audit's own time).
    archive : str or None
        Archive URL or path; each audit is recorded there when given.
    """

    out_root: str
    profile: str = "default"
    formats: tuple[str, ...] = ("json", "csv")
    audited_at: str | None = None
    archive: str | None = None


@dataclass(frozen=True)
class Outcome:
    """The outcome of one job, as the index lists it."""

    name: str
    path: str
    kind: str
    verdict: str | None
    n_rows: int = 0
    n_reject: int = 0
    n_suspect: int = 0
    n_unreadable: int = 0
    worst_check: str | None = None
    report: str | None = None
    error: str | None = None
    seconds: float = 0.0
    substance: str | None = None
    archive_id: int | None = None

    @property
    def severity(self) -> str:
        return "error" if self.error is not None else (self.verdict or "error")

    def sort_key(self):
        return (SEVERITY_ORDER[self.severity], -self.n_reject, -self.n_suspect, self.name)


@functools.cache
def _profile(name: str):
    from ..profiles import load_profile

    return load_profile(name)


def warm_up(profile: str = "default") -> None:
    """Import the audit and read the profile once in a fresh worker."""
    from .. import pipeline  # noqa: F401
    from ..checks import all_checks

    all_checks()
    _profile(profile)


def _worst_check(result) -> str | None:
    rank = {"fail": 0, "warn": 1}
    bad = sorted((c for c in result.checks if c.status in rank), key=lambda c: rank[c.status])
    return f"{bad[0].id} ({bad[0].status})" if bad else None


def _audit(job: Job, profile):
    from ..files import audit_file, audit_sheet_file
    from ..ingest import ColumnOverrides

    if job.kind == "sheet":
        return audit_sheet_file(job.path, profile=profile)[2]
    overrides = ColumnOverrides(sheet=job.worksheet) if job.worksheet else None
    return audit_file(job.path, profile=profile, overrides=overrides, substance=job.substance)[2]


def run_job(job: Job, settings: BatchSettings) -> Outcome:
    """Audit one dataset and write its outputs; never raises for the data's sake.

    An input the audit refuses (an ``InputError``) and an unexpected exception are
    both recorded in the outcome's ``error``: one dataset must not stop a batch.
    ``KeyboardInterrupt`` is let through (the batch is being stopped).
    """
    from dataclasses import replace

    from ..errors import InputError
    from ..pipeline import audit_time
    from ..report import write_outputs

    t0 = time.perf_counter()
    try:
        profile = _profile(settings.profile)
        result = _audit(job, profile)
        if settings.audited_at:
            result = replace(result, audited_at=audit_time(settings.audited_at))
        out = Path(settings.out_root) / job.name
        written = write_outputs(result, out, settings.formats, input_bytes=Path(job.path).read_bytes())
        archive_id = None
        if settings.archive:
            from ..archive import record_audit

            archive_id = record_audit(settings.archive, result, written, job.path)
        report = written.get("html") or written.get("pdf") or written.get("json")
        return Outcome(
            name=job.name, path=job.path, kind=job.kind, verdict=result.verdict, n_rows=len(result.points),
            n_reject=result.count("reject"), n_suspect=result.count("suspect"),
            n_unreadable=result.count("unreadable"), worst_check=_worst_check(result),
            report=None if report is None else str(Path(report).relative_to(settings.out_root)),
            seconds=time.perf_counter() - t0, substance=result.dataset.metadata.substance,
            error="; ".join(f"internal error: {e}" for e in result.internal_errors) or None,
            archive_id=archive_id)
    except InputError as exc:
        return Outcome(job.name, job.path, job.kind, None, error=exc.message, seconds=time.perf_counter() - t0,
                       substance=job.substance)
    except Exception as exc:  # a bug of ours on this input: recorded, the batch goes on
        return Outcome(job.name, job.path, job.kind, None, seconds=time.perf_counter() - t0, substance=job.substance,
                       error=f"internal error: {type(exc).__name__}: {exc} (a bug in vpaudit; please report it "
                             "with the input)")
