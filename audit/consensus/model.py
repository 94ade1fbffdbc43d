"""The consensus model of a dataset: per branch, one equation and one fit of record.

A :class:`BranchConsensus` says, for one branch (solid, liquid or a branch of
unknown phase), which equation form was chosen and why, which sources were
accepted and which left out of the fit, the offset found for each source
that is systematically off, every judged point's scale and standardized
residual, and the single fit of record: the classical weighted fit of the
accepted points that every later number (deviations, enthalpy, triple
point, Trouton, the ``fits`` section of ``findings.json``) is computed from.
A :class:`ConsensusModel` holds the branches of one audit.  Both are frozen:
a later decision (``source-agreement`` leaving a source out) makes a new
model with :meth:`ConsensusModel.with_branch`, never edits one in place.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property
from typing import Callable, Mapping

import numpy as np

from ..model import Point
from ..thermo.ratios import percent_from_log_ratio


@dataclass(frozen=True)
class SourceShift:
    """A source found systematically off the curve of the others.

    Attributes
    ----------
    source : str
    offset_lnP : float
        Median offset of the source's ln P from the others' curve [-].
    u_lnP : float
        Its standard uncertainty [-].
    pattern : str
        ``pressure-scale`` (constant Δln P) or ``temperature-offset``
        (Δln P = −(d ln P/dT)·ΔT), whichever leaves the smaller robust scatter.
    dT_K : float
        Thermometer offset [K] when the pattern is a temperature offset, else NaN.
    u_removed : float
        Standard uncertainty of what is removed from the source's points
        before they are scored: of Δln P [-] (pressure scale) or of ΔT [K].
    """

    source: str
    offset_lnP: float
    u_lnP: float
    pattern: str
    dT_K: float
    u_removed: float


@dataclass(frozen=True)
class BranchData:
    """Points of one branch as arrays (SI), sorted by T.

    ``u_T`` and ``u_P`` are the standard uncertainties [K], [Pa] given with
    the data (None unless every point has one) — or, for the points of a
    fit of record, the effective uncertainties that fit weighted them by.
    """

    branch: str
    points: tuple[Point, ...]
    T: np.ndarray
    P: np.ndarray
    u_T: np.ndarray | None
    u_P: np.ndarray | None

    @property
    def rows(self) -> list[int]:
        return [p.row for p in self.points]

    @property
    def n(self) -> int:
        return len(self.points)


@dataclass(frozen=True)
class BranchConsensus:
    """The consensus of one branch (see the module docstring).

    Attributes
    ----------
    branch : str
    form_name : str
        Name of the equation form chosen by AICc among the sane candidates.
    choice : EquationChoice
        That selection (every candidate with its AICc and reasons).
    fit : VaporPressureFit
        The fit of record: the chosen form, fitted (classical weighted least
        squares) to the accepted points in order of temperature.
    fit_data : BranchData
        Those points, with the effective uncertainties of the fit.
    origin : str
        One line on how the fit of record was made (which points, which sources left out).
    rows : tuple of int
        Every judged point of the branch (the usable rows, input order).
    z : ndarray
        Standardized residual of each judged point [σ] (leave-one-out; by
        temperature far outside the fitted range).
    sigma : ndarray
        Each judged point's relative standard uncertainty in P, as the
        scores use it (scale applied, never below its printed precision) [-].
    offsets_lnP : ndarray
        Δln P removed from each judged point before scoring (its source's
        offset; 0 for sources not off) [-].
    deviation_percent : Mapping[int, float]
        Row → 100·(P − offset − P_fit)/P_fit [%] against the fit of record.
    source_shifts : Mapping[str, SourceShift]
        Sources found systematically off.
    excluded_sources : tuple of str
        Sources left out of the fit of record.
    reject, suspect : ndarray of bool
        Points beyond the critical values (aligned with ``rows``).
    critical_reject, critical_suspect : float
        Family-wise critical values of |z| [σ].
    scale : float
        Birge ratio (uncertainties given) or estimated scale factor [-].
    uncertainties_given : bool
    iterations : int
    converged : bool
    cooks_distance : ndarray
        Cook's distance [-] of each judged point in the last scoring fit.
    corrected_z : callable
        Row index → ((T [K], P [Pa]) → z [-]) of a corrected reading of a
        judged point (for cause hypotheses).
    reading_z : callable
        Source name → ((T [K], P [Pa]) → z [-]) for a row the branch did not
        judge (scale and offset of its source).
    """

    branch: str
    form_name: str
    choice: object
    fit: object
    fit_data: BranchData
    origin: str
    rows: tuple[int, ...]
    z: np.ndarray = field(repr=False)
    sigma: np.ndarray = field(repr=False)
    offsets_lnP: np.ndarray = field(repr=False)
    deviation_percent: Mapping[int, float] = field(repr=False)
    source_shifts: Mapping[str, SourceShift]
    excluded_sources: tuple[str, ...]
    reject: np.ndarray = field(repr=False)
    suspect: np.ndarray = field(repr=False)
    critical_reject: float
    critical_suspect: float
    scale: float
    uncertainties_given: bool
    iterations: int
    converged: bool
    cooks_distance: np.ndarray = field(repr=False)
    #: (T, P) → z of a corrected reading of a judged point, by index (for cause hypotheses)
    corrected_z: Callable[[int], Callable[[float, float], float]] = field(repr=False, compare=False,
                                                                           default=None)
    #: source name → ((T, P) → z) for a row the branch did not judge (scale and offset of its source)
    reading_z: Callable[[str | None], Callable[[float, float], float]] = field(repr=False, compare=False,
                                                                               default=None)

    @cached_property
    def u_percent(self) -> dict[int, float]:
        """Row → the point's standard uncertainty in P as scored [%] (read only)."""
        return {r: float(100 * s) for r, s in zip(self.rows, self.sigma)}

    @cached_property
    def offset_percent(self) -> dict[int, float]:
        """Row → its source's offset removed before scoring, as 100·(exp(Δln P) − 1) [%]
        (0 for sources not off; read only).  A point as printed deviates from the fit
        of record by (1 + deviation/100)·(1 + offset/100) − 1."""
        return {r: float(percent_from_log_ratio(o)) for r, o in zip(self.rows, self.offsets_lnP)}

    def index(self, row: int) -> int:
        """Position of an input row in this branch's arrays.

        Parameters
        ----------
        row : int
            Row number of the point in the input (a label, no unit).

        Returns
        -------
        int
            Index [-] into the branch's per-point arrays.
        """
        return self.rows.index(row)

    def summary(self) -> str:
        """The branch's fit of record, rejections and source shifts.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        fit = self.fit
        lines = [f"{self.branch}: {self.form_name}, {fit.n_used} points in the fit of record "
                 f"({fit.T_range[0]:.5g}–{fit.T_range[1]:.5g} K), rms {fit.rms_percent:.3g} %",
                 f"  {self.origin}",
                 f"  rejected {int(self.reject.sum())}, suspect {int(self.suspect.sum())} "
                 f"(limits {self.critical_reject:.2f} σ / {self.critical_suspect:.2f} σ), scale {self.scale:.3g}"]
        for s in self.source_shifts.values():
            what = (f"ΔT {s.dT_K:+.3g} K" if s.pattern == "temperature-offset"
                    else f"Δln P {s.offset_lnP:+.3g}")
            lines.append(f"  source {s.source!r} off: {what} ({s.pattern})"
                         + (" — left out of the fit" if s.source in self.excluded_sources else ""))
        return "\n".join(lines)


@dataclass(frozen=True)
class ConsensusModel:
    """The consensus of every branch that could be fitted, and why the others were not.

    Attributes
    ----------
    branches : Mapping of str to BranchConsensus
        Branch name to its consensus (no unit; the units of its fields are
        in the docstring of :class:`BranchConsensus`).
    not_fitted : Mapping of str to str
        Branch name to the reason it was not fitted.
    """

    branches: Mapping[str, BranchConsensus] = field(default_factory=dict)
    not_fitted: Mapping[str, str] = field(default_factory=dict)

    def get(self, branch: str) -> BranchConsensus | None:
        """The consensus of one branch.

        Parameters
        ----------
        branch : str
            Name of the branch.

        Returns
        -------
        BranchConsensus or None
            The branch's consensus (no unit; the units of its fields are in the
            docstring of :class:`BranchConsensus`); None when the branch has no
            consensus.
        """
        return self.branches.get(branch)

    def __contains__(self, branch: str) -> bool:
        return branch in self.branches

    def __bool__(self) -> bool:
        return bool(self.branches)

    def with_branch(self, branch: BranchConsensus) -> "ConsensusModel":
        """A copy with one branch's consensus added or replaced.

        Parameters
        ----------
        branch : BranchConsensus
            The new consensus (an object, no unit); replaces any of the same name.

        Returns
        -------
        ConsensusModel
            A copy with the branch added or replaced (no unit; the units of its
            fields are in the docstring of :class:`ConsensusModel`).
        """
        return ConsensusModel({**self.branches, branch.branch: branch}, dict(self.not_fitted))

    def _every_branch(self, by_row: str) -> dict[int, float]:
        out: dict[int, float] = {}
        for b in self.branches.values():
            out.update(getattr(b, by_row))
        return out

    @cached_property
    def deviation_percent(self) -> dict[int, float]:
        """Row → deviation from its branch's fit of record [%], every branch (read only)."""
        return self._every_branch("deviation_percent")

    @cached_property
    def offset_percent(self) -> dict[int, float]:
        """Row → its source's offset removed before scoring [%], every branch (read only)."""
        return self._every_branch("offset_percent")

    @cached_property
    def u_percent(self) -> dict[int, float]:
        """Row → standard uncertainty in P as scored [%], every branch (read only)."""
        return self._every_branch("u_percent")

    def summary(self) -> str:
        """The summary of each branch, and the branches not fitted.

        Returns
        -------
        str
            Text for display (no unit; the quantities in it carry their units).
        """
        lines = [b.summary() for b in self.branches.values()]
        lines += [f"{k}: not fitted — {v}" for k, v in self.not_fitted.items()]
        return "\n".join(lines) or "no branch fitted"


def finite_or_inf(x: float) -> float:
    """A deviation that cannot be computed (curve overflow) is reported as infinite, not NaN.

    Parameters
    ----------
    x : float
        A deviation [%] (or any quantity [unit of x]).

    Returns
    -------
    float
        `x` [unit of x], or +inf when `x` is NaN.
    """
    return float(x) if not math.isnan(x) else math.inf
