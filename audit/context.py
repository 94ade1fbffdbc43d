"""The state a run of checks shares.

Checks run in registry order.  Each sees the dataset, its own settings and
the verdicts of the checks before it: a point rejected by ``physical-range``
(T <= 0) or by ``outliers`` no longer bends the fits of later checks.
Products that later checks and ``audit.products`` use are typed attributes of the
context, each set by one named check: the consensus model (``outliers``;
``source-agreement`` may replace a branch), the source records
(``source-agreement``), the triple point (``triple-point``), the deviations
from a reference equation (``reference-agreement``) and the series the plots
draw (``plot_data``).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, field
from typing import Any

from .consensus.model import ConsensusModel
from .model import Dataset, Point
from .profiles import CheckSettings, Profile
from .results import STATUS_RANK, Cause, CheckResult, PointFlag, SourceAgreement, TriplePointRecord



@dataclass
class AuditContext:
    """Mutable while the checks run; the audit freezes it into an AuditResult.

    Products (set by the check named):
    ``consensus`` (outliers, a branch replaced by source-agreement): the
    :class:`~audit.consensus.ConsensusModel`; ``source_records``
    (source-agreement); ``triple_point`` (triple-point);
    ``reference_deviation_percent`` (reference-agreement): row → %;
    ``plot_data``: ``"local_enthalpy"`` (enthalpy-continuity) and
    ``"reference"`` (reference-agreement); ``fallback_fits``: the fit of a
    branch the consensus could not fit, made when first asked for
    (:func:`audit.checks.fits.recommended`).
    """

    dataset: Dataset
    profile: Profile
    status: dict[int, str] = field(default_factory=dict)
    flags: dict[int, list[PointFlag]] = field(default_factory=dict)
    causes: dict[int, Cause] = field(default_factory=dict)
    residual_sigma: dict[int, float] = field(default_factory=dict)
    phase_inferred: dict[int, str] = field(default_factory=dict)
    phase_basis: dict[int, str] = field(default_factory=dict)
    consensus: ConsensusModel = field(default_factory=ConsensusModel)
    source_records: tuple[SourceAgreement, ...] = ()
    triple_point: TriplePointRecord | None = None
    transitions: list = field(default_factory=list)
    reference_deviation_percent: dict[int, float] = field(default_factory=dict)
    plot_data: dict[str, Any] = field(default_factory=dict)
    fallback_fits: dict[str, Any] = field(default_factory=dict)
    notes: list[str] = field(default_factory=list)

    def __post_init__(self) -> None:
        for p in self.dataset.points:
            self.status.setdefault(p.row, "unreadable" if not p.readable else "ok")
            self.flags.setdefault(p.row, [])

    # -- what checks read -------------------------------------------------
    def settings(self, check_id: str) -> CheckSettings:
        return self.profile.settings(check_id)

    def phase(self, p: Point) -> str:
        """Branch of a point: its phase as labelled, else as inferred by a check.

        When the solid rows name two crystal forms or more, each form is a
        branch of its own, ``'solid I'``, ``'solid II'`` (a solid row naming
        no form stays ``'solid'``).
        """
        if p.phase != "unknown":
            if p.phase == "solid" and p.crystal_form and self._several_forms:
                return f"solid {p.crystal_form}"
            return p.phase
        return self.phase_inferred.get(p.row, "unknown")

    @functools.cached_property
    def _several_forms(self) -> bool:
        forms = {p.crystal_form for p in self.dataset.points if p.phase == "solid" and p.crystal_form}
        return len(forms) >= 2

    def usable(self, branch: str | None = None, *, include_suspect: bool = True) -> list[Point]:
        """Readable points not rejected so far, optionally of one branch."""
        allowed = ("ok", "suspect") if include_suspect else ("ok",)
        out = [p for p in self.dataset.points if self.status[p.row] in allowed]
        if branch is not None:
            out = [p for p in out if self.phase(p) == branch]
        return out

    def branches(self) -> list[str]:
        """Branches present among usable points ('solid', 'solid II', 'liquid', 'unknown')."""
        return sorted({self.phase(p) for p in self.usable()})

    # -- what the audit writes back ----------------------------------------
    def absorb(self, result: CheckResult) -> None:
        for f in result.flags:
            self.flags.setdefault(f.row, []).append(f)
        for row, st in result.point_status.items():
            if STATUS_RANK[st] > STATUS_RANK[self.status[row]]:
                self.status[row] = st
        for row, cause in result.causes.items():
            self.causes[row] = cause
        for row, sigma in result.residual_sigma.items():
            self.residual_sigma[row] = sigma
        for row, ph in result.phase_inferred.items():
            self.phase_inferred[row] = ph
            self.phase_basis[row] = result.phase_basis
