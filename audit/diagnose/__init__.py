"""Cause diagnosis for suspect and rejected points.

Pure functions, no thresholds of their own: :mod:`.hypotheses` lists what a
printed row could have meant (pressure unit, temperature unit, decimal
shift, transposed digits), :mod:`.choose` scores the readings against the
consensus curve and keeps one only when it is convincing.  The data are
never changed; the corrected value goes into the findings as a suggestion.
"""

from .choose import Diagnosis, ScoredHypothesis, diagnose_point, score_hypotheses
from .hypotheses import (Hypothesis, adjacent_swaps, all_hypotheses, decimal_shift_hypotheses,
                         digit_swap_hypotheses, pressure_unit_hypotheses, temperature_unit_hypotheses)

__all__ = ["Diagnosis", "ScoredHypothesis", "diagnose_point", "score_hypotheses", "Hypothesis",
           "adjacent_swaps", "all_hypotheses", "decimal_shift_hypotheses", "digit_swap_hypotheses",
           "pressure_unit_hypotheses", "temperature_unit_hypotheses"]
