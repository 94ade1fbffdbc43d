"""Audit a file as the command line does: read it (with its metadata file and the
property library's constants), then run the pure audit.  The CLI, the demo and the
batch workers call these; they are the one place a file becomes an AuditResult."""

from __future__ import annotations

__all__ = ["audit_file", "audit_sheet_file"]


def audit_file(data: str, *, profile: str = "default", overrides=None, metadata: str | None = None,
               substance: str | None = None, audited_at: str | None = None):
    """Read, enrich and audit one file; return (dataset, profile, result)."""
    from .ingest import read_table
    from .pipeline import run_audit
    from .profiles import load_profile
    from .substances import with_library_constants

    prof = load_profile(profile)
    dataset = read_table(data, overrides, metadata_path=metadata, row_limit=prof.row_limit)
    dataset = with_library_constants(dataset, substance)
    return dataset, prof, run_audit(dataset, prof, audited_at=audited_at)


def audit_sheet_file(path: str, *, profile: str = "default", audited_at: str | None = None):
    """Read and check one sheet file; return (sheet, profile, result)."""
    from .profiles import load_profile
    from .sheet.read import read_sheet
    from .sheet.run import run_sheet_audit

    prof = load_profile(profile)
    sheet = read_sheet(path)
    return sheet, prof, run_sheet_audit(sheet, prof, audited_at=audited_at)
