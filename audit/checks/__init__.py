"""Checks: one module per check, each a registered :class:`Check`.

The order of ``registry._CHECK_MODULES`` is the run order.  Checks that reject points
(physical range, outliers) run before those that judge what is left: a row
the outlier screening rejected with a cause (say, kPa typed in an mmHg
column) does not also make its innocent neighbour suspect through the
``duplicates`` or ``monotonic`` pair it forms.
"""

from .registry import _CHECK_MODULES, Check, Option, all_checks, get_check, register  # noqa: F401

__all__ = ["Check", "Option", "all_checks", "get_check", "register"]
