"""Audit a file as the command line does: read it (with its metadata file and the
property library's constants), then run the pure audit.  The CLI, the demo and the
batch workers call these; they are the one place a file becomes an AuditResult."""

from __future__ import annotations

__all__ = ["audit_file", "audit_sheet_file"]


def _profile(profile):
    """A profile given by name or path is read; a resolved one (a batch worker's) is used as is."""
    from .profiles import Profile, load_profile

    return profile if isinstance(profile, Profile) else load_profile(profile)


def audit_file(data: str, *, profile="default", overrides=None, metadata: str | None = None,
               substance: str | None = None, audited_at: str | None = None):
    """Read, enrich and audit one file; return (dataset, profile, result).

    ``profile`` is a profile's name or path, or a resolved :class:`~audit.profiles.Profile`.
    """
    from .ingest import read_table
    from .pipeline import run_audit
    from .substances import with_library_constants

    prof = _profile(profile)
    dataset = read_table(data, overrides, metadata_path=metadata, row_limit=prof.row_limit)
    if substance:
        dataset = with_library_constants(dataset, substance)
    else:
        dataset = _metadata_substance(dataset)
    return dataset, prof, run_audit(dataset, prof, audited_at=audited_at)


def _metadata_substance(dataset):
    """The library's constants for a substance the metadata names (by CAS number, else by name),
    as ``--substance`` gives them; a name the library does not know is noted, not an error (the
    metadata may name an invented or proprietary substance)."""
    from dataclasses import replace

    from .errors import InputError
    from .substances import with_library_constants

    md = dataset.metadata
    key = (md.cas or "").strip() or (md.substance or "").strip()
    if not key:
        return dataset
    try:
        return with_library_constants(dataset, key)
    except InputError:
        return replace(dataset, notes=dataset.notes + (
            f"the metadata's substance {key!r} is not in the property library: no library constants or "
            "reference correlation (give them in the metadata file)",))


def audit_sheet_file(path: str, *, profile="default", audited_at: str | None = None):
    """Read and check one sheet file; return (sheet, profile, result) (``profile`` as for audit_file)."""
    from .sheet.read import read_sheet
    from .sheet.run import run_sheet_audit

    prof = _profile(profile)
    sheet = read_sheet(path)
    return sheet, prof, run_sheet_audit(sheet, prof, audited_at=audited_at)
