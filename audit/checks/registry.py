"""The registry of checks.

Each check is a subclass of :class:`Check` in a module of its own under
``audit/checks/``; the class docstring says what it checks, why it matters,
the method and its published source, and an example.  Its ``options`` declare
the thresholds it reads (type, unit and meaning); their values live in the
rule profile (``rules/default.toml``), never in code.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, ClassVar

from ..errors import InputError

if TYPE_CHECKING:  # pragma: no cover
    from ..context import AuditContext
    from ..results import CheckResult


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


class Check:
    """Base class of a check.  Subclasses set ``id``, ``title``, ``options``
    and implement :meth:`run`.

    Class attributes
    ----------------
    id : str
        Stable identifier, used in profiles and in ``findings.json``.
    title : str
        One line for reports.
    method : str
        The statistical or physical method, one paragraph.
    references : tuple of str
        Published sources of the method.
    options : dict of str to Option
    applies_to : {'table', 'sheet'}
        What the check audits: a table of pressures (:func:`audit.pipeline.run_audit`)
        or a supplier's sheet (:func:`audit.sheet.run.run_sheet_audit`).
    """

    id: ClassVar[str]
    applies_to: ClassVar[str] = "table"
    title: ClassVar[str]
    method: ClassVar[str] = ""
    references: ClassVar[tuple[str, ...]] = ()
    options: ClassVar[dict[str, Option]] = {}

    def run(self, ctx: "AuditContext") -> "CheckResult":  # pragma: no cover - interface
        raise NotImplementedError


_REGISTRY: dict[str, type[Check]] = {}


def register(cls: type[Check]) -> type[Check]:
    """Class decorator: add a check to the registry (in import order = run order)."""
    if cls.id in _REGISTRY:
        raise RuntimeError(f"check id {cls.id!r} registered twice")
    _REGISTRY[cls.id] = cls
    return cls


def all_checks() -> dict[str, type[Check]]:
    """Registered checks in run order: the order of ``_CHECK_MODULES``, not the order in
    which their modules happened to be imported (a caller importing one check's module
    first must not make it run before the checks it depends on)."""
    from . import _CHECK_MODULES, _load_all

    _load_all()
    rank = {f"{__package__}.{name}": i for i, name in enumerate(_CHECK_MODULES)}
    ordered = sorted(_REGISTRY.items(), key=lambda kv: rank.get(kv[1].__module__, len(rank)))
    return dict(ordered)


def get_check(check_id: str) -> type[Check]:
    checks = all_checks()
    if check_id not in checks:
        raise InputError(f"unknown check {check_id!r}", hint=f"known checks: {', '.join(checks)}")
    return checks[check_id]
