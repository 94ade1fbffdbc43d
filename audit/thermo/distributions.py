"""Tail probabilities, critical values and robust scales the audit needs, from
``scipy.special`` alone.

``scipy.stats`` (and statsmodels, which imports it) costs about 0.5 s to import
on a plain CPU — more than a whole 50-point audit — for the handful of
distribution functions used here; ``scipy.special`` is imported anyway by the
optimisers.  Each function is the textbook identity on a special function and
is verified against ``scipy.stats`` / statsmodels in
``tests/thermo/test_distributions_scipy.py``.

References
----------
.. [1] M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*,
   NBS Applied Mathematics Series 55 (1964), §26.2 (normal), §26.4 (χ²),
   §26.6 (F), §26.7 (Student t).
.. [2] P. J. Rousseeuw and C. Croux, "Alternatives to the median absolute
   deviation", J. Am. Stat. Assoc. 88, 1273 (1993), doi:10.1080/01621459.1993.10476408.
.. [3] M. B. Brown and A. B. Forsythe, "Robust tests for the equality of
   variances", J. Am. Stat. Assoc. 69, 364 (1974), doi:10.1080/01621459.1974.10482955.
.. [4] J. Durbin and G. S. Watson, "Testing for serial correlation in least
   squares regression. I", Biometrika 37, 409 (1950), doi:10.2307/2332391.
"""

from __future__ import annotations

import math

import numpy as np
from scipy import special

__all__ = ["chi2_sf", "durbin_watson", "f_sf", "levene_median_pvalue", "normal_cdf", "normal_isf", "normal_sf",
           "qn_scale", "t_isf"]

#: Qn's consistency factor at the normal, 1/(√2 Φ⁻¹(5/8)) [-] [2]_.
QN_NORMAL = 1.0 / (math.sqrt(2.0) * -float(special.ndtri(3.0 / 8.0)))
#: Largest sample whose pairwise differences are all formed at once (n(n−1)/2 floats).
_QN_DIRECT_MAX = 2000


def normal_cdf(z: float) -> float:
    """Φ(z), the standard normal distribution function.

    Parameters
    ----------
    z : float
        Standard normal deviate [-].

    Returns
    -------
    float
        Probability [-].

    Examples
    --------
    >>> round(normal_cdf(1.959963984540054), 6)
    0.975
    """
    return float(special.ndtr(z))


def normal_sf(z: float) -> float:
    """1 − Φ(z), accurate far in the upper tail.

    Parameters
    ----------
    z : float
        Standard normal deviate [-].

    Returns
    -------
    float
        Upper-tail probability [-].

    Examples
    --------
    >>> f"{normal_sf(6.0):.4e}"
    '9.8659e-10'
    """
    return float(special.ndtr(-z))


def normal_isf(p: float) -> float:
    """The z with 1 − Φ(z) = p.

    Parameters
    ----------
    p : float
        Upper-tail probability [-].

    Returns
    -------
    float
        Standard normal deviate [-].

    Examples
    --------
    >>> round(normal_isf(0.025), 6)
    1.959964
    """
    return float(-special.ndtri(p))


def t_isf(p: float, dof: float) -> float:
    """The t with P(T > t) = p for Student's t.

    Taken as −t(p) rather than t(1 − p), so that tail probabilities of 1e-10
    keep their digits.

    Parameters
    ----------
    p : float
        Upper-tail probability [-].
    dof : float
        Degrees of freedom [-].

    Returns
    -------
    float
        Critical value [-].

    Examples
    --------
    >>> round(t_isf(0.025, 10.0), 4)
    2.2281
    """
    return float(-special.stdtrit(dof, p))


def chi2_sf(x: float, dof: float) -> float:
    """P(χ² > x).

    Parameters
    ----------
    x : float
        Value of the statistic [-].
    dof : float
        Degrees of freedom [-].

    Returns
    -------
    float
        Upper-tail probability [-].

    Examples
    --------
    >>> round(chi2_sf(3.841458820694124, 1), 6)
    0.05
    """
    return float(special.chdtrc(dof, x))


def f_sf(F: float, dof_num: float, dof_den: float) -> float:
    """P(F > F) for Fisher's F.

    Parameters
    ----------
    F : float
        Value of the statistic [-].
    dof_num, dof_den : float
        Degrees of freedom of numerator and denominator [-].

    Returns
    -------
    float
        Upper-tail probability [-].

    Examples
    --------
    >>> round(f_sf(4.964602743730711, 1, 10), 6)
    0.05
    """
    return float(special.fdtrc(dof_num, dof_den, F))


def levene_median_pvalue(*groups) -> float:
    """p-value of the Brown–Forsythe test [3]_ that the groups share one variance.

    Levene's statistic on absolute deviations from each group's median
    (``scipy.stats.levene(..., center='median')``), referred to F(k − 1, N − k).

    Parameters
    ----------
    *groups : array_like
        Two or more samples [any unit, the same for all].

    Returns
    -------
    float
        p-value [-]; NaN when the statistic is undefined (no spread within groups).
    """
    z = [np.abs(np.asarray(g, float) - np.median(g)) for g in groups]
    k = len(z)
    n_i = np.array([x.size for x in z], float)
    N = float(n_i.sum())
    means = np.array([x.mean() for x in z])
    grand = float(np.sum(n_i * means) / N)
    within = float(sum(np.sum((x - m) ** 2) for x, m in zip(z, means)))
    between = float(np.sum(n_i * (means - grand) ** 2))
    if not within > 0 or k < 2 or N <= k:
        return math.nan
    W = (N - k) / (k - 1) * between / within
    return float(f_sf(W, k - 1, N - k))


def durbin_watson(residuals) -> float:
    """Σ(e_t − e_{t−1})² / Σ e_t² [4]_: near 2 for independent residuals, near 0 for runs.

    Parameters
    ----------
    residuals : array_like
        Residuals in their order [any unit].

    Returns
    -------
    float
        The statistic [-].

    Examples
    --------
    >>> durbin_watson([1.0, -1.0, 1.0, -1.0])
    3.0
    """
    e = np.asarray(residuals, float)
    return float(np.sum(np.diff(e) ** 2) / np.sum(e * e))


def qn_scale(x) -> float:
    """Rousseeuw and Croux's Qn scale [2]_ [same unit as x].

    QN_NORMAL times the k-th smallest of the n(n − 1)/2 distances |x_i − x_j|,
    k = h(h − 1)/2 with h = ⌊n/2⌋ + 1 — as statsmodels' ``qn_scale`` (no small-sample
    factor).  Up to 2 000 values all distances are formed at once; beyond, the
    k-th is bracketed by bisection on the number of distances below a value
    (counted by binary search in the sorted sample, O(n log n) each) and chosen
    among the few left in the bracket.

    Parameters
    ----------
    x : array_like
        The sample [any unit].

    Returns
    -------
    float
        The scale [unit of x]; NaN for an empty sample, 0 for one value.

    Examples
    --------
    >>> round(qn_scale([1.0, 2.0, 4.0, 7.0, 11.0]), 6)
    6.657433
    """
    a = np.sort(np.asarray(x, float).ravel())
    n = a.size
    if n == 0:
        return math.nan
    if n == 1:
        return 0.0
    h = n // 2 + 1
    k = h * (h - 1) // 2
    if n <= _QN_DIRECT_MAX:
        i, j = np.triu_indices(n, 1)
        d = a[j] - a[i]
        return float(QN_NORMAL * np.partition(d, k - 1)[k - 1])
    ranks = np.arange(1, n + 1)

    def below(v):  # number of pairs i < j with a_j − a_i ≤ v
        return int(np.sum(np.searchsorted(a, a + v, side="right") - ranks))

    if below(0.0) >= k:
        return 0.0
    lo, hi = 0.0, float(a[-1] - a[0])
    while below(hi) - below(lo) > 8 * n:
        mid = 0.5 * (lo + hi)
        if not lo < mid < hi:
            break
        if below(mid) >= k:
            hi = mid
        else:
            lo = mid
    start = np.searchsorted(a, a + lo, side="right")
    stop = np.searchsorted(a, a + hi, side="right")
    between = np.concatenate([a[s:e] - a[i] for i, (s, e) in enumerate(zip(start, stop)) if e > s])
    return float(QN_NORMAL * np.partition(between, k - below(lo) - 1)[k - below(lo) - 1])
