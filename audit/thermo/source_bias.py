"""Systematic deviation of one source from the consensus of the others.

For each source s the consensus curve is refitted to the *other* sources
only (leave-one-source-out), so that a biased source cannot pull the curve
it is compared with.  The residuals r_i = ln P_i − ln P_others(T_i) of its
points are then explained by two one-parameter models:

* pressure scale:      r_i = b                       (P read b·100 % high)
* temperature offset:  r_i = −(d ln P/dT)(T_i) · ΔT  (thermometer reads ΔT high)

each by generalised least squares with covariance
V = diag(σ_i²) + J C Jᵀ (own scatter plus the uncertainty of the others'
curve at the source's temperatures, which correlates its points).  The two
models have one parameter each, so their AIC difference is their χ²
difference; the model with the lower χ² explains the pattern better, and the
caller decides (threshold passed in) whether the difference is decisive.
Because d ln P/dT falls as T rises (≈ ΔH/RT²), a temperature offset
shows as a deviation that shrinks along the range, a pressure-scale error as
a constant one; over a narrow range the two cannot be told apart.

The standard error of each estimate is inflated by the source's Birge ratio
when its points scatter about the model more than their σ say.

No thresholds here: :mod:`audit.checks.source_agreement` applies the
profile's.  A random-effects model (statsmodels MixedLM) would give the same
offsets for a well-behaved data set, but leave-one-out GLS keeps each
source's estimate independent of itself and handles the temperature-offset
pattern, so it is used instead.

References
----------
.. [1] R. T. Birge, "The calculation of errors by the method of least
   squares", Phys. Rev. 40, 207 (1932), doi:10.1103/PhysRev.40.207.
.. [2] H. Akaike, "A new look at the statistical model identification",
   IEEE Trans. Autom. Control 19, 716 (1974), doi:10.1109/TAC.1974.1100705.
.. [3] JCGM 100:2008 (GUM), §5.2 (correlated input quantities).

Verified against: a hand-planted +3 % pressure scale and a +0.3 K
temperature offset on IAPWS-95 saturation pressures (iapws package), in
``tests/checks/test_source_agreement_iapws.py``; the GLS estimate reduces to
the weighted mean (pressure model) checked there against numpy; the GLS,
done without forming V (:class:`LowRankCovariance`, O(n k²) for a source of
n points and a k-parameter consensus), against statsmodels ``GLS`` with the
dense V in ``tests/thermo/test_scaling_equivalence.py``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Sequence

import numpy as np

from .overlap import within_span
from .ratios import percent_from_log_ratio, u_percent_from_log_ratio

__all__ = ["SourceOffset", "SourceBiasAnalysis", "gls_one_parameter", "LowRankCovariance",
           "gls_one_parameter_low_rank", "source_offsets", "offset_against_curve", "pattern_against_curve"]


@dataclass(frozen=True)
class OneParameterGLS:
    """Estimate b of r = x·b + e, Cov(e) = V."""

    estimate: float
    standard_error: float
    chi2: float
    n: int


def gls_one_parameter(x, r, V) -> OneParameterGLS:
    """Generalised least squares for one parameter, with a dense covariance.

    b = xᵀV⁻¹r / xᵀV⁻¹x, u(b) = (xᵀV⁻¹x)^(-1/2), χ² = (r − xb)ᵀV⁻¹(r − xb).
    Factorises V: O(n³) time and O(n²) memory, so only for small n or a V
    without structure; :func:`source_offsets` uses :class:`LowRankCovariance`.

    Parameters
    ----------
    x : array_like, shape (n,)
        Regressor [unit of r per unit of b] (e.g. 1 for a ln P offset).
    r : array_like, shape (n,)
        Residuals [unit of r], e.g. ln P [ln Pa].
    V : array_like, shape (n, n)
        Covariance of r [unit of r squared]; positive definite.

    Returns
    -------
    OneParameterGLS
        b [unit of b], its standard error [unit of b], χ² [-] and n [-].
    """
    x = np.asarray(x, float)
    r = np.asarray(r, float)
    L = np.linalg.cholesky(np.asarray(V, float))
    xw = np.linalg.solve(L, x)
    rw = np.linalg.solve(L, r)
    info = float(xw @ xw)
    if info <= 0:
        raise ValueError("the model is not determined by the data")
    b = float(xw @ rw) / info
    chi2 = float(np.sum((rw - xw * b) ** 2))
    return OneParameterGLS(b, 1.0 / math.sqrt(info), chi2, x.size)


class LowRankCovariance:
    """V = diag(variance) + J C Jᵀ, applied without forming V.

    Whitened by D = diag(variance), V becomes I + J̃ C J̃ᵀ with J̃ = D^(-1/2)J.
    With J̃ = Q R (Q orthonormal, n×k) that is I + Q M Qᵀ, M = R C Rᵀ, and
    with M = U Λ Uᵀ (eigenvalues below zero from rounding taken as zero)

        V⁻¹ = D^(-1/2) (I − Q U diag(λ/(1 + λ)) Uᵀ Qᵀ) D^(-1/2),

    the Woodbury identity in a form that never inverts C (a fit's parameter
    covariance: possibly singular, and for a three-constant equation
    conditioned like 10¹²).  Every quadratic form aᵀV⁻¹b then costs O(n k)
    after an O(n k²) set-up, and memory is O(n k).  M is factorised in the
    orthonormal basis of the whitened columns, where its rounding is of the
    order of V's own, not of C's spread of scales.

    Parameters
    ----------
    variance : array_like, shape (n,)
        Diagonal part (each point's own variance), positive.
    J : array_like, shape (n, k)
    C : array_like, shape (k, k)
        Symmetric positive semi-definite.
    """

    def __init__(self, variance, J, C):
        d = np.asarray(variance, float)
        if np.any(~np.isfinite(d)) or np.any(d <= 0):
            raise ValueError("the diagonal variances must be finite and positive")
        self._isd = 1.0 / np.sqrt(d)
        Jw = np.asarray(J, float).reshape(d.size, -1) * self._isd[:, None]
        Q, Rj = np.linalg.qr(Jw)
        M = Rj @ np.asarray(C, float) @ Rj.T
        lam, U = np.linalg.eigh(0.5 * (M + M.T))
        lam = np.clip(lam, 0.0, None)
        self._basis = Q @ U
        self._shrink = lam / (1.0 + lam)

    def quad(self, a, b=None) -> float:
        """aᵀV⁻¹b (aᵀV⁻¹a when b is omitted).

        Parameters
        ----------
        a : array_like, shape (n,)
            Vector [unit of a].
        b : array_like, shape (n,), optional
            Vector [unit of b]; default `a`.

        Returns
        -------
        float
            aᵀV⁻¹b [unit of a × unit of b / unit of V].
        """
        aw = np.asarray(a, float) * self._isd
        bw = aw if b is None else np.asarray(b, float) * self._isd
        pa = self._basis.T @ aw
        pb = pa if b is None else self._basis.T @ bw
        return float(aw @ bw - pa @ (self._shrink * pb))


def gls_one_parameter_low_rank(x, r, V: LowRankCovariance) -> OneParameterGLS:
    """:func:`gls_one_parameter` for V = diag + J C Jᵀ, in O(n k²).

    Same estimate, standard error and χ² as the dense version up to
    rounding; χ² is formed from the residual r − xb itself, so it does not
    lose digits to the cancellation of rᵀV⁻¹r − b²·xᵀV⁻¹x.

    Parameters
    ----------
    x : array_like, shape (n,)
        Regressor [unit of r per unit of b].
    r : array_like, shape (n,)
        Residuals [unit of r], e.g. ln P [ln Pa].
    V : LowRankCovariance
        Covariance of r [unit of r squared].

    Returns
    -------
    OneParameterGLS
        b [unit of b], its standard error [unit of b], χ² [-] and n [-].
    """
    x = np.asarray(x, float)
    r = np.asarray(r, float)
    info = V.quad(x)
    if not info > 0:
        raise ValueError("the model is not determined by the data")
    b = V.quad(x, r) / info
    chi2 = max(V.quad(r - x * b), 0.0)
    return OneParameterGLS(b, 1.0 / math.sqrt(info), chi2, x.size)


@dataclass(frozen=True)
class SourceOffset:
    """One source against the consensus of the others.

    Attributes
    ----------
    source : str
    n : int
        Points of the source used.
    offset_lnP, u_offset_lnP : float
        Pressure-scale model: mean Δln P and its standard uncertainty [-].
    temperature_offset_K, u_temperature_offset_K : float
        Temperature-offset model: ΔT [K] by which the source's temperatures
        read high (its pressures belong to T − ΔT), and its uncertainty.
    chi2_pressure_scale, chi2_temperature_offset : float
        χ² of each model (n − 1 degrees of freedom).
    birge_ratio : float
        √(min χ²/(n − 1)) (1 when n = 1); the standard uncertainties above
        are multiplied by max(1, this).
    T_range : (float, float)
        Temperatures of the source's points [K].
    """

    source: str
    n: int
    offset_lnP: float
    u_offset_lnP: float
    temperature_offset_K: float
    u_temperature_offset_K: float
    chi2_pressure_scale: float
    chi2_temperature_offset: float
    birge_ratio: float
    T_range: tuple[float, float]

    @property
    def bias_percent(self) -> float:
        """100·(exp(b) − 1): the source's pressures relative to the others' [%]."""
        return percent_from_log_ratio(self.offset_lnP)

    @property
    def u_bias_percent(self) -> float:
        return u_percent_from_log_ratio(self.offset_lnP, self.u_offset_lnP)

    @property
    def delta_chi2(self) -> float:
        """χ²(pressure scale) − χ²(temperature offset) = ΔAIC of the two
        one-parameter models; positive favours the temperature offset."""
        return self.chi2_pressure_scale - self.chi2_temperature_offset

    def preferred_pattern(self, min_delta_chi2: float) -> str | None:
        """'pressure-scale' or 'temperature-offset' when |Δχ²| ≥ the threshold, else None.

        Parameters
        ----------
        min_delta_chi2 : float
            Threshold on |Δχ²| [-] between the two patterns.

        Returns
        -------
        str or None
            Name of the better pattern, or None when neither is clearly better.
        """
        if abs(self.delta_chi2) < min_delta_chi2:
            return None
        return "temperature-offset" if self.delta_chi2 > 0 else "pressure-scale"


@dataclass(frozen=True)
class SourceBiasAnalysis:
    """Result of :func:`source_offsets`: one entry per source analysed, and the
    sources that could not be (too few points, or the others could not be fitted).

    Attributes
    ----------
    offsets : tuple of SourceOffset
        One per source analysed (no unit; the units of its fields are in the
        docstring of :class:`SourceOffset`).
    not_analysed : tuple of (str, str)
        Name of each source not analysed, and why.
    """

    offsets: tuple[SourceOffset, ...]
    not_analysed: tuple[tuple[str, str], ...] = ()

    def get(self, source: str) -> SourceOffset | None:
        """The offset of one source.

        Parameters
        ----------
        source : str
            Name of the source.

        Returns
        -------
        SourceOffset or None
            Its offsets (pressure bias [%], temperature offset [K]), or None
            when it was not analysed.
        """
        for o in self.offsets:
            if o.source == source:
                return o
        return None

    def summary(self) -> str:
        """A table of the offset of each source.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        lines = [f"{'source':20s} {'n':>3s} {'bias %':>8s} {'u %':>6s} {'ΔT/K':>7s} {'u/K':>6s} {'Δχ²':>7s}"]
        for o in self.offsets:
            lines.append(f"{o.source[:20]:20s} {o.n:3d} {o.bias_percent:8.3f} {o.u_bias_percent:6.3f} "
                         f"{o.temperature_offset_K:7.3f} {o.u_temperature_offset_K:6.3f} {o.delta_chi2:7.2f}")
        for s, why in self.not_analysed:
            lines.append(f"{s[:20]:20s}  not analysed: {why}")
        return "\n".join(lines)


def source_offsets(T, P, sigma_lnP, sources: Sequence[str | None], form, *, keep=None,
                   min_points: int = 2, exclude_from_consensus: Sequence[str] = (),
                   fit_options: dict | None = None) -> SourceBiasAnalysis:
    """Each source's offset from a curve fitted to the other sources.

    Only the source's points within the temperature span of the others,
    widened by :data:`~audit.thermo.overlap.JUDGEABLE_REACH` of it on each
    side, are used: further out the others' curve is an extrapolation whose
    uncertainty (carried by V below) swamps any offset.  A source with fewer
    than `min_points` such points is listed as not analysed.

    Parameters
    ----------
    T, P : array_like
        Temperatures [K], pressures [Pa].
    sigma_lnP : array_like
        Each point's standard uncertainty in ln P (effective variance: u_T
        through the slope already included) [-].
    sources : sequence of str or None
        Source labels, one per point (None: unlabelled; used in every consensus,
        never analysed).
    form : str or type
        Name (or class) of the equation form of the consensus (see :func:`audit.thermo.fitting.fit_equation`).
    keep : array_like of bool, optional
        Flag per point [-]: points allowed in any fit or estimate (e.g. not rejected as outliers).
    min_points : int
        Fewest points for a source to be analysed (a count).
    exclude_from_consensus : sequence of str
        Names of sources never used in the consensus of the others (known biased).
    fit_options : dict, optional
        Extra keyword arguments for ``fit_equation`` by name, in its units
        (Tc [K], Pc [Pa], n_terms, ...).

    Returns
    -------
    SourceBiasAnalysis
        The offset of each source (no unit; the units of its fields are in the
        docstring of :class:`SourceBiasAnalysis`).
    """
    from .fitting import fit_equation

    T = np.asarray(T, float)
    P = np.asarray(P, float)
    sig = np.asarray(sigma_lnP, float)
    src = np.array([s if s else "" for s in sources], dtype=object)
    keep = np.ones(T.size, bool) if keep is None else np.asarray(keep, bool)
    if not (T.size == P.size == sig.size == src.size == keep.size):
        raise ValueError("T, P, sigma_lnP, sources and keep must have one value per point")
    if np.any(~np.isfinite(sig)) or np.any(sig <= 0):
        raise ValueError("sigma_lnP must be finite and positive")
    excluded = np.isin(src, list(exclude_from_consensus)) if len(exclude_from_consensus) else np.zeros(T.size, bool)
    offsets, skipped = [], []
    names = [s for s in dict.fromkeys(src) if s]
    for name in names:
        mine = keep & (src == name)
        others = keep & (src != name) & ~excluded
        if mine.sum() < min_points:
            skipped.append((name, f"{int(mine.sum())} usable point(s), fewer than {min_points}"))
            continue
        # measured only where the others reach: beyond their temperatures their curve is an
        # extrapolation, and the "offset" would be the extrapolation's
        inside = mine.copy()
        inside[mine] = within_span(T[mine], T[others])
        if inside.sum() < min_points:
            skipped.append((name, f"{int(inside.sum())} usable point(s) within reach of the other sources' "
                                  f"temperatures, fewer than {min_points}"))
            continue
        mine = inside
        try:
            fit = fit_equation(T[others], P[others], form, u_P=P[others] * sig[others], robust=True,
                               **(fit_options or {}))
        except (ValueError, np.linalg.LinAlgError) as exc:
            skipped.append((name, f"the other sources could not be fitted ({exc})"))
            continue
        Ts = T[mine]
        r = np.log(P[mine]) - fit.equation.ln_p(Ts)
        J = fit.equation.jacobian_ln_p(Ts)
        cov = fit.covariance_birge
        # the others' curve uncertainty correlates the source's points; V is
        # diagonal plus rank k (k parameters), never formed as an n×n matrix
        V = LowRankCovariance(sig[mine] ** 2, J, cov)
        slope = fit.equation.dlnp_dT(Ts)
        pres = gls_one_parameter_low_rank(np.ones(Ts.size), r, V)
        temp = gls_one_parameter_low_rank(-slope, r, V)
        n = int(mine.sum())
        birge = math.sqrt(min(pres.chi2, temp.chi2) / (n - 1)) if n > 1 else 1.0
        infl = max(1.0, birge)
        offsets.append(SourceOffset(
            source=name, n=n, offset_lnP=pres.estimate, u_offset_lnP=pres.standard_error * infl,
            temperature_offset_K=temp.estimate, u_temperature_offset_K=temp.standard_error * infl,
            chi2_pressure_scale=pres.chi2, chi2_temperature_offset=temp.chi2, birge_ratio=birge,
            T_range=(float(Ts.min()), float(Ts.max()))))
    return SourceBiasAnalysis(tuple(offsets), tuple(skipped))


def offset_against_curve(source: str, T, residual, sigma, slope, u_level) -> SourceOffset | None:
    """One source's offset from a trusted curve (a reference correlation), both patterns.

    The two one-parameter models of :func:`source_offsets`, fitted to the
    residuals r = ln P − ln P_curve(T) with covariance
    V = diag(σ²) + u_level²·11ᵀ: the curve's error is taken as a level common
    to all the source's points (a reference correlation is far better known
    in shape than in level).  So a pressure-scale offset is uncertain by at
    least u_level, and the choice between the two patterns rests on how the
    departure changes along T, which the curve's shape pins.  Standard
    uncertainties are inflated by the Birge ratio as in :func:`source_offsets`.

    Parameters
    ----------
    source : str
        Name of the source.
    T : array_like, shape (n,)
        Temperatures of its points [K].
    residual : array_like, shape (n,)
        ln P of its points minus the curve's [-].
    sigma : array_like, shape (n,)
        Each point's standard uncertainty in ln P [-].
    slope : array_like, shape (n,)
        The curve's d ln P/dT at the points [1/K].
    u_level : float
        Standard uncertainty of the curve's level in ln P [-].

    Returns
    -------
    SourceOffset or None
        As :func:`source_offsets` gives (no unit; the units of its fields are
        in the docstring of :class:`SourceOffset`); None with fewer than three points.
    """
    r = np.asarray(residual, float)
    T = np.asarray(T, float)
    n = r.size
    if n < 3:
        return None
    V = LowRankCovariance(np.asarray(sigma, float) ** 2, np.ones((n, 1)), np.array([[float(u_level) ** 2]]))
    pres = gls_one_parameter_low_rank(np.ones(n), r, V)
    temp = gls_one_parameter_low_rank(-np.asarray(slope, float), r, V)
    birge = math.sqrt(min(pres.chi2, temp.chi2) / (n - 1))
    infl = max(1.0, birge)
    return SourceOffset(source=source, n=n, offset_lnP=pres.estimate, u_offset_lnP=pres.standard_error * infl,
                        temperature_offset_K=temp.estimate, u_temperature_offset_K=temp.standard_error * infl,
                        chi2_pressure_scale=pres.chi2, chi2_temperature_offset=temp.chi2, birge_ratio=birge,
                        T_range=(float(T.min()), float(T.max())))


def pattern_against_curve(residual, sigma, slope, u_level) -> float:
    """Δχ² (pressure scale − temperature offset) of one source's residuals from a trusted curve
    (:func:`offset_against_curve`): positive favours the temperature offset; NaN with fewer than
    three points.

    Parameters
    ----------
    residual, sigma, slope, u_level
        As for :func:`offset_against_curve` ([-], [-], [1/K], [-]).

    Returns
    -------
    float
        χ²(pressure scale) − χ²(temperature offset) [-].
    """
    r = np.asarray(residual, float)
    o = offset_against_curve("", np.zeros(r.size), r, sigma, slope, u_level)
    return math.nan if o is None else o.delta_chi2
