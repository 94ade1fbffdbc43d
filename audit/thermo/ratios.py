"""Relative deviations from differences of logarithms, without overflow.

The audit works in ln P, where a source or a row far off the curve is a large
but ordinary number (a kPa column read as Pa is ln 1000 ≈ 6.9; a curve
extrapolated to a misprinted temperature can give hundreds).  Converting such
a difference to a percentage with ``exp`` overflows beyond about 709; these
helpers return ``inf`` there instead, so a report says "+inf %" (written as
null in JSON) rather than stopping the audit.
"""

from __future__ import annotations

import numpy as np

__all__ = ["percent_from_log_ratio", "u_percent_from_log_ratio"]


def percent_from_log_ratio(d_lnP):
    """100·(exp(d) − 1): the relative deviation of P [%] from d = ln P − ln P_ref.

    Parameters
    ----------
    d_lnP : float or array_like
        Difference of natural logarithms [-].

    Returns
    -------
    float or ndarray
        [%]; ``inf`` where exp overflows, −100 far below.

    Examples
    --------
    >>> round(percent_from_log_ratio(0.01), 6)  # 1 % in ln P is 1.005017 % in P
    1.005017
    >>> percent_from_log_ratio(800.0)
    inf
    """
    with np.errstate(over="ignore"):
        out = 100.0 * np.expm1(np.asarray(d_lnP, dtype=float))
    return float(out) if out.ndim == 0 else out


def u_percent_from_log_ratio(d_lnP, u_lnP):
    """Standard uncertainty [%] of :func:`percent_from_log_ratio` by first-order propagation.

    u = 100·exp(d)·u(d).

    Parameters
    ----------
    d_lnP, u_lnP : float or array_like
        Difference of natural logarithms and its standard uncertainty [-].

    Returns
    -------
    float or ndarray
        [%]; ``inf`` where exp overflows.

    Examples
    --------
    >>> round(u_percent_from_log_ratio(0.0, 0.002), 9)
    0.2
    """
    with np.errstate(over="ignore", invalid="ignore"):
        out = 100.0 * np.exp(np.asarray(d_lnP, dtype=float)) * np.asarray(u_lnP, dtype=float)
    return float(out) if out.ndim == 0 else out
