"""Checked (T, P) input, read-only result arrays and the weighted solve.

These helpers are shared by :mod:`audit.thermo.fitting`,
:mod:`audit.thermo.enthalpy`, :mod:`audit.thermo.triple_point` and
:mod:`audit.thermo.influence`.  They live in this leaf module, which imports
nothing else from the package, so that those modules can use them without
importing one another (fitting imports enthalpy; enthalpy used to reach back
into fitting for these).
"""

from __future__ import annotations

import numpy as np

__all__ = ["InsufficientData", "as_data", "as_uncertainty", "weighted_lstsq", "readonly"]


class InsufficientData(ValueError):
    """The data cannot determine the fit asked for (too few points or distinct
    temperatures, or parameters not separable).  A property of the data, not
    a bug: callers skip or degrade the analysis and say why, with the counts."""


def as_data(T, P):
    """Validate and flatten paired temperatures and pressures.

    Parameters
    ----------
    T : array_like
        Temperatures [K]; finite and above 0 K.
    P : array_like
        Pressures [Pa]; finite and positive.

    Returns
    -------
    T, P : ndarray
        1-D float copies [K], [Pa], in the order given.

    Raises
    ------
    ValueError
        On differing lengths, no points, or a non-finite or non-positive value.

    Examples
    --------
    >>> T, P = as_data([[300.0, 310.0]], [3536.0, 6231.0])
    >>> T.shape, P.shape
    ((2,), (2,))
    """
    T = np.asarray(T, dtype=float).ravel()
    P = np.asarray(P, dtype=float).ravel()
    if T.size != P.size:
        raise ValueError(f"T and P differ in length ({T.size} vs {P.size})")
    if T.size == 0:
        raise ValueError("no data points")
    if not (np.all(np.isfinite(T)) and np.all(T > 0)):
        raise ValueError("temperatures must be finite and above 0 K")
    if not (np.all(np.isfinite(P)) and np.all(P > 0)):
        raise ValueError("pressures must be finite and positive")
    return T, P


def as_uncertainty(u, n, name):
    """Validate per-point standard uncertainties (or weights) for `n` points.

    Parameters
    ----------
    u : None, float or array_like
        Standard uncertainties, in the unit of the quantity they belong to
        ([K] for u_T, [Pa] for u_P; [-] for point weights).  None means
        "not given"; a scalar applies to every point.
    n : int
        Number of points (a count).
    name : str
        Argument name used in error messages (a name, no unit).

    Returns
    -------
    ndarray
        `n` finite, non-negative values in the unit of `u` ([K], [Pa], or
        [-] for weights); zeros when `u` is None.

    Examples
    --------
    >>> as_uncertainty(0.01, 3, "u_T").tolist()
    [0.01, 0.01, 0.01]
    """
    if u is None:
        return np.zeros(n)
    arr = np.asarray(u, dtype=float)
    if arr.ndim == 0:
        arr = np.full(n, float(arr))
    arr = arr.ravel()
    if arr.size != n:
        raise ValueError(f"{name} has {arr.size} values for {n} points")
    if not (np.all(np.isfinite(arr)) and np.all(arr >= 0)):
        raise ValueError(f"{name} must be finite and non-negative")
    return arr


def weighted_lstsq(X, y, w):
    """Solve min Σ w (y - X b)²; return b and (XᵀWX)⁻¹.

    The columns of √w·X are scaled to unit norm before the SVD so that a
    badly scaled design (1/T next to ln T) does not lose digits; the
    solution and covariance are scaled back.

    Parameters
    ----------
    X : ndarray, shape (n, k)
        Design matrix [unit of y per unit of each coefficient].
    y : ndarray, shape (n,)
        Response, usually ln P [ln Pa].
    w : ndarray, shape (n,)
        Non-negative weights [1/(unit of y)²], e.g. 1/σ²(ln P).

    Returns
    -------
    b : ndarray, shape (k,)
        Coefficients [unit of y per unit of the column of X].
    cov : ndarray, shape (k, k)
        Unscaled covariance (XᵀWX)⁻¹ [units of b squared].

    Raises
    ------
    InsufficientData
        When the weighted design is rank deficient to 1e-14 relative.

    Examples
    --------
    An exact straight line is recovered exactly (identity check):

    >>> X = np.column_stack([np.ones(3), [0.0, 1.0, 2.0]])
    >>> b, _ = weighted_lstsq(X, 1.0 + 2.0 * X[:, 1], np.ones(3))
    >>> np.round(b, 12).tolist()
    [1.0, 2.0]
    """
    sw = np.sqrt(w)
    A = X * sw[:, None]
    norms = np.linalg.norm(A, axis=0)
    norms[norms == 0] = 1.0
    U, s, Vt = np.linalg.svd(A / norms, full_matrices=False)
    if s[-1] <= s[0] * 1e-14:
        raise InsufficientData("the fit is ill-posed (parameters not determined by the data)")
    b = (Vt.T @ ((U.T @ (y * sw)) / s)) / norms
    cov = (Vt.T / s ** 2) @ Vt
    cov = cov / np.outer(norms, norms)
    return b, cov


def readonly(a) -> np.ndarray:
    """A float copy of `a` that cannot be written to.

    Results are frozen dataclasses; freezing their arrays too stops a caller
    from changing a fit's residuals in place behind a cached summary.

    Parameters
    ----------
    a : array_like
        Values in any unit [unit of a]; the copy keeps it.

    Returns
    -------
    ndarray
        Float copy [unit of a] with ``flags.writeable`` False.

    Examples
    --------
    >>> readonly([1, 2]).flags.writeable
    False
    """
    a = np.array(a, dtype=float)
    a.setflags(write=False)
    return a
