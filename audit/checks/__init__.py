"""Checks: one module per check, each a registered :class:`Check`.

The import order below is the run order: checks that reject points (physical
range, outliers) run before the checks that fit what is left.
"""

from .registry import Check, Option, all_checks, get_check, register  # noqa: F401

import importlib

#: check modules in run order
_CHECK_MODULES = (
    "readability",
    "physical_range",
    "duplicates",
    "monotonic",
)

_loaded = False


def _load_all() -> None:
    global _loaded
    if _loaded:
        return
    _loaded = True
    for name in _CHECK_MODULES:
        importlib.import_module(f"{__name__}.{name}")


__all__ = ["Check", "Option", "all_checks", "get_check", "register"]
