"""Where a curve reaches a value: bracketed roots that never raise on odd curves.

Vapor-pressure curves fitted to real data can have a pole inside the search
interval (an Antoine equation whose ``T + C`` passes through zero), regions
where they are not defined (reduced forms above Tc), or values that overflow.
A sign change across a pole is not a root, and a root finder asked to refine
it either fails to converge or converges on the pole.  These helpers scan a
grid for sign changes between *finite* values, refine each with Brent's
method, and keep a root only when the function is small there, so every
caller gets a root or ``None`` and decides what "no root" means.
"""

from __future__ import annotations

import math
from typing import Callable

import numpy as np

__all__ = ["sign_change_brackets", "bracketed_root"]


def sign_change_brackets(f: Callable[[np.ndarray], np.ndarray], lo: float, hi: float,
                         n_grid: int = 400) -> list[tuple[float, float]]:
    """Intervals of a grid over [lo, hi] across which ``f`` changes sign.

    Parameters
    ----------
    f : callable
        Vectorised function of temperature [K].
    lo, hi : float
        Search interval [K]; an empty list when it is empty or not finite.
    n_grid : int
        Number of grid points (a count).

    Returns
    -------
    list of (float, float)
        Neighbouring grid points (a, b) [K] with finite f(a), f(b) of opposite
        sign (or one of them exactly zero), in increasing order.

    Examples
    --------
    >>> sign_change_brackets(lambda t: t - 300.0, 250.0, 350.0, n_grid=5)
    [(275.0, 300.0)]
    """
    if not (math.isfinite(lo) and math.isfinite(hi)) or hi <= lo:
        return []
    grid = np.linspace(lo, hi, int(n_grid))
    with np.errstate(all="ignore"):
        vals = np.asarray(f(grid), dtype=float)
    ok = np.isfinite(vals)
    sign = np.sign(vals)
    both = ok[:-1] & ok[1:]
    change = both & (sign[:-1] != sign[1:])
    # a root exactly on a grid point ends one bracket and would start the next: keep it once
    on_point = np.flatnonzero(change[1:] & change[:-1] & (vals[1:-1] == 0)) + 1
    change[on_point] = False
    return [(float(grid[i]), float(grid[i + 1])) for i in np.flatnonzero(change)]


def bracketed_root(f: Callable[[float], float], a: float, b: float, *, xtol: float = 1e-12,
                   rtol: float = 4 * np.finfo(float).eps, max_iter: int = 200,
                   residual_tolerance: float = 1e-6) -> float | None:
    """Root of a scalar function inside a sign-change bracket, or None.

    Brent's method [1]_ (``scipy.optimize.brentq`` without raising), then a
    plausibility test: the root counts only when ``|f(root)|`` is below
    `residual_tolerance` (in the units of f, here ln P), so a jump across a
    pole or a region where f is undefined is not returned as a root.

    Parameters
    ----------
    f : callable
        Scalar function, e.g. ``ln P_fit(T) - ln P`` [-] of T [K].
    a, b : float
        Bracket [K] with f(a)·f(b) ≤ 0.
    xtol, rtol : float
        Absolute [K] and relative tolerances of the root.
    max_iter : int
        Iteration limit (a count) of Brent's method.
    residual_tolerance : float
        Largest |f| accepted at the root [unit of f].

    Returns
    -------
    float or None
        The root [K]; None when no root passes the plausibility test.

    References
    ----------
    .. [1] R. P. Brent, *Algorithms for Minimization without Derivatives*,
       Prentice-Hall (1973), ch. 4.

    Examples
    --------
    >>> round(bracketed_root(lambda t: math.log(t / 300.0), 250.0, 350.0), 9)
    300.0
    >>> bracketed_root(lambda t: 1.0 / (t - 300.0), 250.0, 350.0) is None  # a pole, not a root
    True
    """
    from scipy.optimize import brentq

    def g(t: float) -> float:
        # a curve evaluated on its pole with Python floats raises instead of giving inf
        try:
            with np.errstate(all="ignore"):
                v = float(f(t))
        except (ZeroDivisionError, OverflowError, ValueError):
            return math.nan
        return v if math.isfinite(v) else math.copysign(math.inf, v) if not math.isnan(v) else math.nan

    fa, fb = g(a), g(b)
    if math.isnan(fa) or math.isnan(fb) or fa * fb > 0:
        return None
    if fa == 0:
        return float(a)
    if fb == 0:
        return float(b)
    try:
        root, info = brentq(g, a, b, xtol=xtol, rtol=rtol, maxiter=max_iter, full_output=True, disp=False)
    except ValueError:  # f turned NaN inside the bracket: no root there
        return None
    value = g(root)
    if not info.converged or not math.isfinite(value) or abs(value) > residual_tolerance:
        return None
    return float(root)
