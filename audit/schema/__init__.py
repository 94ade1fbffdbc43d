"""The JSON Schema of ``findings.json`` (schema_version 1)."""

from __future__ import annotations

import json
from functools import lru_cache
from importlib import resources

SCHEMA_FILE = "findings-v1.schema.json"


@lru_cache(maxsize=1)
def findings_schema() -> dict:
    return json.loads(resources.files(__name__).joinpath(SCHEMA_FILE).read_text("utf-8"))


def validate_findings(doc: dict) -> None:
    """Raise ``jsonschema.ValidationError`` if ``doc`` breaks the contract."""
    import jsonschema

    jsonschema.validate(doc, findings_schema(), cls=jsonschema.Draft202012Validator)
