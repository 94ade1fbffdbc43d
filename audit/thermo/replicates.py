"""Replicates: rows of one source measured at one temperature.

Pure functions, no thresholds (the caller passes its tolerances in):

* :func:`replicate_groups` — which rows of one series are one temperature
  (within the printed resolution of T, a stated u(T) and a fixed floor);
* :func:`pooled_replicate_scale` — the series' own scatter, robustly, from
  the differences between replicates;
* :func:`median_departures` — each replicate's departure from the median of
  its group, with the standard uncertainty of that departure and the part
  that rounding to the printed digits alone can explain.

All pressures are in ln P (a departure of 0.01 is 1 % of P).

References
----------
.. [1] JCGM 100:2008 (GUM), §4.3.7 (rounding: a rectangular distribution of
   half-width half a unit of the last digit) and §5 (combined uncertainty).
.. [2] P. J. Rousseeuw, C. Croux, J. Am. Stat. Assoc. 88, 1273 (1993),
   doi:10.1080/01621459.1993.10476408 (the MAD as a scale estimator).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
import numpy as np

from .stats import MAD_NORMAL

__all__ = ["ReplicateDepartures", "replicate_groups", "replicate_differences", "difference_scale",
           "pooled_replicate_scale", "median_departures", "departure_from_median"]


def replicate_groups(T_K, radius_K, u_T_K, k: float) -> list[np.ndarray]:
    """Group the rows of one series that were measured at one temperature.

    Rows are taken in order of temperature; a row joins the current group
    when it agrees with every row already in it: |T_i − T_j| ≤
    max(r_i, r_j, k·√(u_i² + u_j²)), with r the radius of each printed
    temperature (half its last digit, or a floor) and u its stated standard
    uncertainty.  Comparing with every member (complete linkage) keeps a
    closely spaced series from chaining into one group.

    Parameters
    ----------
    T_K : array_like
        Temperatures [K].
    radius_K : array_like
        Half-width within which each printed temperature is one state [K].
    u_T_K : array_like
        Stated standard uncertainties of T [K] (0 when not given).
    k : float
        Coverage factor applied to the combined u(T) [-].

    Returns
    -------
    list of numpy.ndarray
        Indices into `T_K` of each group [-] (singletons included), groups in
        order of temperature.
    """
    T = np.asarray(T_K, dtype=float)
    rad = np.asarray(radius_K, dtype=float)
    uT = np.asarray(u_T_K, dtype=float)
    groups: list[list[int]] = []
    for i in np.argsort(T, kind="stable"):
        g = groups[-1] if groups else None
        if g is not None and all(
                T[i] - T[j] <= max(rad[i], rad[j], k * math.hypot(uT[i], uT[j])) for j in g):
            g.append(int(i))
        else:
            groups.append([int(i)])
    return [np.array(g, dtype=int) for g in groups]


def replicate_differences(values, groups) -> np.ndarray:
    """Every within-group difference x_i − x_j (i < j) of every group [unit of `values`].

    Parameters
    ----------
    values : array_like
        Values of one quantity [unit of values].
    groups : iterable of array_like of int
        Labels: indices [-] of each group into `values`.

    Returns
    -------
    ndarray
        The differences [unit of values].
    """
    x = np.asarray(values, dtype=float)
    out = []
    for g in groups:
        g = np.asarray(g, dtype=int)
        i, j = np.triu_indices(g.size, 1)
        out.append(x[g[i]] - x[g[j]])
    return np.concatenate(out) if out else np.array([])


def difference_scale(differences) -> float:
    """σ of one replicate from differences of pairs of replicates: median|d|/(Φ⁻¹(3/4)·√2).

    ``nan`` for no differences.

    Parameters
    ----------
    differences : array_like
        Pairwise differences [unit of the replicated quantity].

    Returns
    -------
    float
        σ of one replicate [unit of the replicated quantity].
    """
    d = np.asarray(differences, dtype=float)
    if d.size == 0:
        return math.nan
    return float(np.median(np.abs(d)) / (MAD_NORMAL * math.sqrt(2.0)))


def pooled_replicate_scale(values, groups) -> tuple[float, int]:
    """Robust standard deviation of one replicate, from within-group differences.

    Every pair of rows within a group gives a difference d = x_i − x_j whose
    standard deviation is √2·σ; the median of |d| over all pairs of all
    groups, divided by Φ⁻¹(3/4)·√2, estimates σ (the MAD about zero: the
    differences of replicates centre on zero by construction, and their
    signs are arbitrary).

    Parameters
    ----------
    values : array_like
        The quantity compared (e.g. residuals in ln P [-]).
    groups : iterable of array_like of int
        Labels: indices [-] of each group into `values`.

    Returns
    -------
    scale : float
        σ estimate [unit of `values`]; ``nan`` when no group has two rows.
    n_differences : int
        Number of within-group differences it rests on (a count).
    """
    d = replicate_differences(values, groups)
    return difference_scale(d), int(d.size)


@dataclass(frozen=True)
class ReplicateDepartures:
    """Each replicate's departure from the median of its group (ln P).

    Attributes
    ----------
    median : float
        The group's median [-].
    departure : numpy.ndarray
        x_i − median [-].
    sigma : numpy.ndarray
        Standard uncertainty of each departure [-].
    resolution : numpy.ndarray
        Largest departure that rounding to the printed digits alone explains [-].
    """

    median: float
    departure: np.ndarray
    sigma: np.ndarray
    resolution: np.ndarray


def median_departures(values, sigma, half_digit) -> ReplicateDepartures:
    """Departures of the replicates of one group from their median.

    For two rows the median is their mean: each departs by half their
    difference, with σ = √(σ₁² + σ₂²)/2, and rounding explains up to
    (h₁ + h₂)/2.  For three or more, the median is robust to one wrong row;
    σ of x_i − median is taken as √(σ_i² + (π/2)·mean(σ²)/n) (the standard
    error of a median is √(π/2) that of a mean for normal data; the
    positive covariance of x_i with the median is ignored, which errs on
    the side of a larger σ), and rounding explains up to h_i + median(h).

    Parameters
    ----------
    values : array_like
        The replicates (e.g. ln P or residuals in ln P) [-].
    sigma : array_like
        Standard uncertainty of each [-].
    half_digit : array_like
        Half a unit of each value's last printed digit, in the same terms [-].

    Returns
    -------
    ReplicateDepartures
        The departure of each point from its group's median (no unit; the units
        of its fields are in the docstring of :class:`ReplicateDepartures`).
    """
    x = np.asarray(values, dtype=float)
    s = np.asarray(sigma, dtype=float)
    h = np.asarray(half_digit, dtype=float)
    n = x.size
    if n < 2:
        raise ValueError("median_departures needs two or more replicates")
    med = float(np.median(x))
    d = x - med
    if n == 2:
        sd = np.full(2, 0.5 * math.hypot(s[0], s[1]))
        res = np.full(2, 0.5 * (h[0] + h[1]))
    else:
        sd = np.sqrt(s ** 2 + (math.pi / 2) * float(np.mean(s ** 2)) / n)
        res = h + float(np.median(h))
    for a in (d, sd, res):
        a.setflags(write=False)
    return ReplicateDepartures(med, d, sd, res)


def departure_from_median(value: float, sigma: float, half_digit: float,
                          values, sigmas, half_digits) -> tuple[float, float, float]:
    """Departure of one value from the median of a group it is not part of.

    Used for a row already explained (rejected, or given a cause) judged
    against the replicates kept: d = x − median(group), σ(d) = √(σ² +
    c·mean(σ_g²)/n) with c = 1 for n ≤ 2 (the median is a mean) and π/2
    beyond, and rounding explains up to h + median(h_g).

    Parameters
    ----------
    value, sigma, half_digit : float
        The value judged, its standard uncertainty and half its last printed
        digit [-].
    values, sigmas, half_digits : array_like
        The same for the group (one or more rows) [-].

    Returns
    -------
    tuple of float
        (departure, its standard uncertainty, the part rounding explains) [-].
    """
    g = np.asarray(values, dtype=float)
    sg = np.asarray(sigmas, dtype=float)
    if g.size == 0:
        raise ValueError("departure_from_median needs a group of one or more values")
    c = 1.0 if g.size <= 2 else math.pi / 2
    sd = math.sqrt(sigma ** 2 + c * float(np.mean(sg ** 2)) / g.size)
    return (float(value - np.median(g)), sd, float(half_digit + np.median(np.asarray(half_digits, float))))
