"""The registry of checks.

Each check is a subclass of :class:`Check` in a module of its own under
``audit/checks/``; the class docstring says what it checks, why it matters,
the method and its published source, and an example.  Its ``options`` declare
the thresholds it reads (type, unit and meaning); their values live in the
rule profile (``rules/default.toml``), never in code.
"""

from __future__ import annotations

import importlib
from typing import Any, ClassVar

from ..errors import InputError
from ..options import Option  # noqa: F401  (checks declare their options with it)


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

    def run(self, ctx: Any) -> Any:  # pragma: no cover - interface: an AuditContext in, a CheckResult out
        raise NotImplementedError


#: check modules in run order
_CHECK_MODULES = (
    "readability",
    "physical_range",
    "branch_split",
    "outliers",
    "source_agreement",
    "duplicates",
    "copied_values",
    "monotonic",
    "triple_point",
    "solid_transition",
    "clapeyron_linearity",
    "enthalpy_continuity",
    "enthalpy_plausibility",
    "reference_agreement",
    # supplier sheets (applies_to = "sheet"): run by audit.sheet.run, not by the table audit
    "sheet_units",
    "sheet_table",
    "sheet_reference",
    "sheet_enthalpy",
    "sheet_range",
)

_loaded = False


def _load_all() -> None:
    global _loaded
    if _loaded:
        return
    _loaded = True
    for name in _CHECK_MODULES:
        importlib.import_module(f"{__package__}.{name}")


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
    _load_all()
    rank = {f"{__package__}.{name}": i for i, name in enumerate(_CHECK_MODULES)}
    ordered = sorted(_REGISTRY.items(), key=lambda kv: rank.get(kv[1].__module__, len(rank)))
    return dict(ordered)


def get_check(check_id: str) -> type[Check]:
    checks = all_checks()
    if check_id not in checks:
        raise InputError(f"unknown check {check_id!r}", hint=f"known checks: {', '.join(checks)}")
    return checks[check_id]
