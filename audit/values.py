"""Whether a value is a usable number: one definition for the modules that ask."""

from __future__ import annotations

import math

__all__ = ["all_finite", "finite_or_none"]


def all_finite(*values) -> bool:
    """True when every value is a finite real number (a bool is not a number here).

    >>> all_finite(1, 2.5), all_finite(1.0, float("nan")), all_finite(None), all_finite(True)
    (True, False, False, False)
    """
    for v in values:
        if isinstance(v, bool) or not isinstance(v, (int, float)):
            return False
        try:
            if not math.isfinite(v):
                return False
        except OverflowError:  # an int beyond a float's range
            return False
    return True


def finite_or_none(x) -> float | None:
    """``x`` as a float when it is finite, else None (how findings.json writes a missing number).

    >>> finite_or_none(2), finite_or_none(float("inf"))
    (2.0, None)
    """
    x = float(x)
    return x if math.isfinite(x) else None
