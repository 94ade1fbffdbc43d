"""The consensus model: per branch, one equation, the accepted sources and their
offsets, point weights and scales, and the single fit of record.

Built once per audit, when the ``outliers`` check runs (it owns the profile
section with the limits the loop applies), and kept on the audit context
as a frozen :class:`ConsensusModel`; ``source-agreement`` may replace a
branch with one whose fit leaves a systematically off source out
(:func:`refit_without_sources`).  Every later check and the summary read
their curve from :func:`audit.checks.fits.recommended`, which returns this
fit of record — there is no second fit of the same branch.
"""

from .build import build_branch_consensus, points_data, refit_without_sources
from .model import BranchConsensus, BranchData, ConsensusModel, SourceShift

__all__ = ["BranchConsensus", "BranchData", "ConsensusModel", "SourceShift", "build_branch_consensus",
           "points_data", "refit_without_sources"]
