"""Do two groups of points share temperatures?

A source's systematic offset is measured against the curve of the other
sources; where they do not reach its temperatures, that curve is an
extrapolation and the "offset" says more about the extrapolation than about
the source.
"""

from __future__ import annotations

import numpy as np

__all__ = ["JUDGEABLE_REACH", "overlaps_others", "within_span"]


def overlaps_others(T, mine, others) -> bool:
    """True when at least one of `mine` lies within the temperature span of `others`.

    Parameters
    ----------
    T : array_like
        Temperatures of all points [K].
    mine, others : array_like of bool
        Flag masks [-] of the source's points and of the points it is compared with.

    Returns
    -------
    bool
        Whether the group overlaps the others (a flag); False also when either
        group is empty.

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



#: how far beyond a fitted temperature span a curve still judges a point, as a fraction of that
#: span on each side: further out, the extrapolation's σ grows with the slope until anything
#: "fits" (our choice; the same reach as the consensus's judgeable range)
JUDGEABLE_REACH = 0.25


def within_span(T_mine, T_others, reach: float = JUDGEABLE_REACH) -> np.ndarray:
    """Which of `T_mine` lie within the temperature span of `T_others`, widened by
    `reach` times that span on each side (mask).

    Parameters
    ----------
    T_mine, T_others : array_like
        Temperatures [K].
    reach : float
        Widening on each side as a fraction of the span [-].

    Returns
    -------
    ndarray of bool
        Flag [-] per temperature of `T_mine`: True inside the widened span.

    Examples
    --------
    A span of 300–320 K widened by a quarter of its 20 K on each side reaches 295–325 K:

    >>> within_span(np.array([280.0, 290.0, 300.0, 320.0]), np.array([300.0, 320.0]))
    array([False, False,  True,  True])
    """
    T_mine, T_others = np.asarray(T_mine, dtype=float), np.asarray(T_others, dtype=float)
    if T_others.size == 0:
        return np.zeros(T_mine.shape, bool)
    lo, hi = float(T_others.min()), float(T_others.max())
    widen = reach * (hi - lo)
    return (T_mine >= lo - widen) & (T_mine <= hi + widen)
