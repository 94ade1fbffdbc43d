"""A setting a rule profile declares: its type, meaning, unit and allowed values.

Checks declare their options with it (:mod:`audit.checks.registry`), and the
profile reader validates each value a profile gives (:mod:`audit.profiles`);
it lives apart from both so that neither imports the other to use it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from .errors import InputError

__all__ = ["Option"]


@dataclass(frozen=True)
class Option:
    """A threshold or setting a check reads from the profile."""

    kind: type  # float, int, bool, str, list
    doc: str
    unit: str = ""
    minimum: float | None = None
    maximum: float | None = None
    choices: tuple[str, ...] | None = None

    def validate(self, value: Any, where: str, file: str) -> Any:
        if self.kind is float and isinstance(value, int) and not isinstance(value, bool):
            value = float(value)
        if self.kind is list:
            if not isinstance(value, list) or len(value) != 2 or not all(
                    isinstance(v, (int, float)) and not isinstance(v, bool) for v in value):
                raise InputError(f"{where} must be a list of two numbers [low, high]", file=file)
            value = [float(v) for v in value]
            if value[0] > value[1]:
                raise InputError(f"{where} must be [low, high] with low <= high", file=file)
            return value
        if not isinstance(value, self.kind) or (self.kind is int and isinstance(value, bool)):
            raise InputError(f"{where} must be of type {self.kind.__name__}, got {value!r}", file=file)
        if isinstance(value, float) and not math.isfinite(value):
            raise InputError(f"{where} must be a finite number", file=file)
        if self.minimum is not None and value < self.minimum:
            raise InputError(f"{where} must be >= {self.minimum}, got {value}", file=file)
        if self.maximum is not None and value > self.maximum:
            raise InputError(f"{where} must be <= {self.maximum}, got {value}", file=file)
        if self.choices is not None and value not in self.choices:
            raise InputError(f"{where} must be one of {self.choices}, got {value!r}", file=file)
        return value
