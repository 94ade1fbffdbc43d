"""Do two groups of points share temperatures?

A source's systematic offset is measured against the curve of the other
sources; where they do not reach its temperatures, that curve is an
extrapolation and the "offset" says more about the extrapolation than about
the source.
"""

from __future__ import annotations

import numpy as np

__all__ = ["overlaps_others"]


def overlaps_others(T, mine, others) -> bool:
    """True when at least one of `mine` lies within the temperature span of `others`.

    Parameters
    ----------
    T : array_like
        Temperatures of all points [K].
    mine, others : array_like of bool
        Masks of the source's points and of the points it is compared with.

    Returns
    -------
    bool
        False also when either group is empty.

    Examples
    --------
    >>> T = np.array([300.0, 310.0, 320.0, 400.0, 410.0])
    >>> overlaps_others(T, T >= 400, T < 400), overlaps_others(T, T >= 310, T < 315)
    (False, True)
    """
    T = np.asarray(T, dtype=float)
    mine, others = np.asarray(mine, dtype=bool), np.asarray(others, dtype=bool)
    if not mine.any() or not others.any():
        return False
    lo, hi = float(T[others].min()), float(T[others].max())
    Tm = T[mine]
    return bool(np.any((Tm >= lo) & (Tm <= hi)))
