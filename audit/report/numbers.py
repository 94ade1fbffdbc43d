"""How the report writes a number: short, with its unit, never "nan"."""

from __future__ import annotations

import math

__all__ = ["pressure_text"]


def pressure_text(P_Pa: float, digits: int = 5) -> str:
    """A pressure with an SI prefix chosen to keep the number short: '139.28 kPa', '352.9 Pa'."""
    if not isinstance(P_Pa, (int, float)) or not math.isfinite(P_Pa) or P_Pa <= 0:
        return "—"
    for factor, unit in ((1e9, "GPa"), (1e6, "MPa"), (1e3, "kPa")):
        if P_Pa >= factor:
            return f"{P_Pa / factor:.{digits}g} {unit}"
    if P_Pa >= 1e-2:
        return f"{P_Pa:.{digits}g} Pa"
    return f"{P_Pa:.{digits - 2}e} Pa"
