"""``findings.json``: the machine-readable contract (schema_version 1)."""

from __future__ import annotations

import json
from pathlib import Path

from ..results import AuditResult
from .atomic import write_file


def findings_text(result: AuditResult) -> str:
    """The findings document as JSON text (stable key order, UTF-8, no NaN)."""
    return json.dumps(result.to_findings(), indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def findings_bytes(result: AuditResult) -> bytes:
    """The findings document as the bytes of ``findings.json`` (UTF-8)."""
    return findings_text(result).encode("utf-8")


def write_findings(result: AuditResult, path: Path) -> None:
    """Write ``findings.json`` to ``path``, replacing it only once complete."""
    write_file(path, findings_bytes(result))
