"""Checks: one module per check, each a registered :class:`Check`.

The order of ``_CHECK_MODULES`` is the run order.  Checks that reject points
(physical range, outliers) run before those that judge what is left: a row
the outlier screening rejected with a cause (say, kPa typed in an mmHg
column) does not also make its innocent neighbour suspect through the
``duplicates`` or ``monotonic`` pair it forms.
"""

from .registry import Check, Option, all_checks, get_check, register  # noqa: F401

import importlib

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
        importlib.import_module(f"{__name__}.{name}")


__all__ = ["Check", "Option", "all_checks", "get_check", "register"]
