"""The one key figure the archive keeps per check, for listings and quick comparisons.

The full metrics of every check stay in the archived findings document; this
picks the number a reader would ask for first ("how many rows were
rejected?"), so that it can be shown and queried without parsing JSON.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping
from typing import Any

#: check id → (metric name, how to combine it across branches when the check
#: reports it per branch rather than at the top level).  A check not listed
#: here (a check added later) falls back to its first top-level number.
KEY_METRICS: dict[str, tuple[str, str]] = {
    "readability": ("n_unreadable", "sum"),
    "physical-range": ("n_outside", "sum"),
    "branch-split": ("T_transition_K", "first"),
    "outliers": ("n_reject", "sum"),
    "source-agreement": ("n_flagged", "sum"),
    "duplicates": ("n_conflicting_rows", "sum"),
    "copied-values": ("n_pairs", "sum"),
    "monotonic": ("n_violating_pairs", "sum"),
    "triple-point": ("dT_K", "absmax"),
    "solid-transition": ("T_K", "first"),
    "clapeyron-linearity": ("curvature_p_value", "min"),
    "enthalpy-continuity": ("n_windows_flagged", "sum"),
    "enthalpy-plausibility": ("trouton_ratio", "first"),
    "reference-agreement": ("bias_percent", "absmax"),
    "sheet-units": ("stated_misfit_ln", "first"),
    "sheet-table": ("max_abs_deviation_percent", "first"),
    "sheet-reference": ("max_deviation_percent", "absmax"),
    "sheet-enthalpy": ("rise_percent", "first"),
    "sheet-range": ("reduced_T_high", "first"),
}

_COMBINE: dict[str, Callable[[list[float]], float]] = {
    "sum": sum,
    "min": min,
    "first": lambda xs: xs[0],
    "absmax": lambda xs: max(xs, key=abs),
}


def _number(v: Any) -> int | float | None:
    """An int or a finite float, or None (booleans are not figures)."""
    if isinstance(v, bool) or not isinstance(v, (int, float)):
        try:  # numpy scalars
            v = v.item()
        except AttributeError:
            return None
        if isinstance(v, bool) or not isinstance(v, (int, float)):
            return None
    if isinstance(v, int):
        return v  # a count stays a count
    return v if math.isfinite(v) else None


def key_metric(check_id: str, metrics: Mapping[str, Any]) -> tuple[str | None, int | float | None]:
    """The name and value of a check's key figure.

    Parameters
    ----------
    check_id : str
    metrics : mapping
        The check's metrics as the audit reported them.

    Returns
    -------
    (str or None, int or float or None)
        ``(None, None)`` when the check reported no number (e.g. it was skipped).
        A figure reported per branch is combined across branches as
        :data:`KEY_METRICS` says, and named as at the top level.
    """
    wanted = KEY_METRICS.get(check_id)
    if wanted is None:
        for name, value in metrics.items():
            number = _number(value)
            if number is not None:
                return name, number
        return None, None
    name, how = wanted
    top = _number(metrics.get(name))
    if top is not None:
        return name, top
    per_branch = [_number(sub.get(name)) for sub in metrics.values() if isinstance(sub, Mapping)]
    per_branch = [v for v in per_branch if v is not None]
    if not per_branch:
        return None, None
    return name, _COMBINE[how](per_branch)
