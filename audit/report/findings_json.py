"""``findings.json``: the machine-readable contract (schema_version 1)."""

from __future__ import annotations

import json
from pathlib import Path

from ..results import AuditResult


def findings_text(result: AuditResult) -> str:
    """The findings document as JSON text (stable key order, UTF-8, no NaN)."""
    return json.dumps(result.to_findings(), indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def write_findings(result: AuditResult, path: Path) -> None:
    Path(path).write_text(findings_text(result), encoding="utf-8")
