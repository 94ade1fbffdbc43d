"""What the archive hands back: frozen records of archived audits and of a verification.

This module imports nothing beyond the standard library, so that code which
only passes these records around (the CLI's printing, a batch summary) does
not load SQLAlchemy.
"""

from __future__ import annotations

import datetime as _dt
import json
from dataclasses import dataclass, field
from functools import cached_property
from typing import Any, Literal

FileStatus = Literal["ok", "changed", "missing", "unreadable"]


@dataclass(frozen=True)
class ArchivedCheck:
    """One check of an archived audit.

    Attributes
    ----------
    id : str
        The check id (``outliers``, ``sheet-units``, ...).
    status : str
        ``pass``, ``warn``, ``fail`` or ``skipped``.
    message : str
        The check's message as the audit wrote it.
    metric_name : str or None
        The metric chosen as the check's key figure (see
        :func:`audit.archive.metrics.key_metric`); None when the check
        reported no number.
    metric_value : int, float or None
        Its value.
    """

    id: str
    status: str
    message: str
    metric_name: str | None = None
    metric_value: int | float | None = None


@dataclass(frozen=True)
class ArchivedFile:
    """A file an audit read or wrote, as recorded: its path as given and its SHA-256.

    Attributes
    ----------
    role : str
        ``json``, ``csv``, ``html``, ``pdf`` (outputs), ``input`` or ``metadata``.
    path : str
        The path as given when the audit was recorded (a relative path is
        relative to the working directory of whoever verifies it).
    sha256 : str
        SHA-256 of the file's bytes when the audit was recorded.
    size_bytes : int or None
        Its size then (None for inputs, whose size the archive does not keep).
    """

    role: str
    path: str
    sha256: str
    size_bytes: int | None = None


@dataclass(frozen=True)
class ArchivedAudit:
    """Everything the archive holds about one audit.

    Attributes
    ----------
    id : int
        The archive's id of the audit.
    kind : str
        ``table`` (a pressure–temperature table) or ``sheet`` (a supplier sheet).
    input_name, input_sha256 : str
        The input's file name as the audit saw it and the SHA-256 of the bytes it read.
    input_path, input_file_sha256 : str or None
        The input file's path as given to :meth:`Archive.record` and its SHA-256
        when recorded (None when no path was given).
    metadata_path, metadata_sha256 : str or None
        The metadata file read with the input, and its SHA-256 (None when there was none).
    profile_name, profile_sha256 : str
        The rule profile and the SHA-256 of its file.
    profile_text : str
        The profile file's text as it was (a profile that ``extends`` another
        holds only its own settings).
    tool_version : str
    audited_at : str
        The audit's time stamp exactly as the audit recorded it.
    audited_at_utc : datetime.datetime or None
        The same instant as a naive UTC datetime (None if the stamp was not ISO 8601).
    recorded_at : datetime.datetime
        When the archive received the record (naive UTC).
    verdict : str
        ``pass``, ``warn`` or ``fail``.
    n_rows, n_ok, n_suspect, n_reject, n_unreadable : int
        Row counts by status.
    substance : str or None
    checks : tuple of ArchivedCheck
        In run order.
    outputs : tuple of ArchivedFile
        The output files written, in the order given.
    findings_json : str
        The findings document as archived (the same text as ``findings.json``).
    findings_sha256 : str or None
        SHA-256 of ``findings_json``'s UTF-8 bytes when it was archived.
    schema_revision : str or None
        The archive schema revision the record was written under.
    """

    id: int
    kind: str
    input_name: str
    input_sha256: str
    input_path: str | None
    input_file_sha256: str | None
    metadata_path: str | None
    metadata_sha256: str | None
    profile_name: str
    profile_sha256: str
    profile_text: str = field(repr=False)
    tool_version: str
    audited_at: str
    audited_at_utc: _dt.datetime | None
    recorded_at: _dt.datetime
    verdict: str
    n_rows: int
    n_ok: int
    n_suspect: int
    n_reject: int
    n_unreadable: int
    substance: str | None
    checks: tuple[ArchivedCheck, ...]
    outputs: tuple[ArchivedFile, ...]
    findings_json: str = field(repr=False)
    findings_sha256: str | None = None
    schema_revision: str | None = None

    @cached_property
    def findings(self) -> dict[str, Any]:
        """The findings document (parsed once, on first use: a search need not parse them all)."""
        return json.loads(self.findings_json)

    def check(self, check_id: str) -> ArchivedCheck | None:
        """The archived check with this id, or None."""
        return next((c for c in self.checks if c.id == check_id), None)

    @property
    def files(self) -> tuple[ArchivedFile, ...]:
        """Every file whose hash was recorded: the outputs, then the input and metadata files."""
        extra = []
        if self.input_path is not None and self.input_file_sha256 is not None:
            extra.append(ArchivedFile("input", self.input_path, self.input_file_sha256))
        if self.metadata_path is not None and self.metadata_sha256 is not None:
            extra.append(ArchivedFile("metadata", self.metadata_path, self.metadata_sha256))
        return self.outputs + tuple(extra)

    def one_line(self) -> str:
        """A line for listings: id, time, verdict, substance, input, profile, counts."""
        return (f"#{self.id}  {self.audited_at}  {self.verdict.upper():4s}  "
                f"{self.substance or '-'}  {self.input_name}  sha256:{self.input_sha256[:12]}  "
                f"profile {self.profile_name}  vpaudit {self.tool_version}  "
                f"rows {self.n_rows} (ok {self.n_ok}, suspect {self.n_suspect}, "
                f"reject {self.n_reject}, unreadable {self.n_unreadable})")


@dataclass(frozen=True)
class FileCheck:
    """One recorded file re-hashed.

    Attributes
    ----------
    audit_id : int
    role : str
        As in :class:`ArchivedFile`, or ``findings`` for the archived findings text itself.
    path : str
        As recorded.
    recorded_sha256 : str
    actual_sha256 : str or None
        None when the file could not be read.
    status : {"ok", "changed", "missing", "unreadable"}
    """

    audit_id: int
    role: str
    path: str
    recorded_sha256: str
    actual_sha256: str | None
    status: FileStatus

    def line(self) -> str:
        what = {"ok": "ok", "changed": "CHANGED", "missing": "MISSING", "unreadable": "UNREADABLE"}[self.status]
        text = f"{what:10s} audit #{self.audit_id} {self.role:8s} {self.path}"
        if self.status == "changed":
            text += f"  (recorded sha256 {self.recorded_sha256[:16]}…, now {self.actual_sha256[:16]}…)"
        return text


@dataclass(frozen=True)
class VerifyReport:
    """Every recorded file of the audits verified, re-hashed.

    Attributes
    ----------
    files : tuple of FileCheck
        One per recorded file, by audit id, then outputs, input, metadata, findings.
    n_audits : int
        How many audits were verified.
    """

    files: tuple[FileCheck, ...]
    n_audits: int

    @property
    def ok(self) -> bool:
        """True when every file is as recorded."""
        return all(f.status == "ok" for f in self.files)

    @property
    def problems(self) -> tuple[FileCheck, ...]:
        """The files that changed, are missing or cannot be read."""
        return tuple(f for f in self.files if f.status != "ok")

    def count(self, status: str) -> int:
        return sum(1 for f in self.files if f.status == status)

    def summary(self) -> str:
        """One line per problem, then the totals."""
        lines = [f.line() for f in self.problems]
        lines.append(f"{len(self.files)} file(s) of {self.n_audits} audit(s) checked: "
                     f"{self.count('ok')} ok, {self.count('changed')} changed, "
                     f"{self.count('missing')} missing, {self.count('unreadable')} unreadable")
        return "\n".join(lines)
