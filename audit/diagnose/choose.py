"""Score cause hypotheses against the consensus curve and keep one only
when it is convincing.

A hypothesis is kept when (1) the corrected point lies within ``k`` of its
own expected scatter from the curve, |z_after| ≤ k, (2) the next-best
hypothesis with a different corrected value is clearly worse:
|z_next| ≥ ratio · max(|z_best|, 1), and (3) so is the value as printed,
|z_before| ≥ ratio · max(|z_best|, 1): "no slip, just scatter" is a reading
too, and a 2.4 σ point that a digit swap would move to 1.6 σ is not
explained by it.  The max(…, 1) keeps two readings that both land within
one σ from being told apart by noise.  Rivals that are all pressure-unit
readings (bar, atm and kgf/cm² lie within 3.3 % of each other), or unit and
decimal-shift readings (kPa and ×10⁻² on a kgf/cm² column lie 2 % apart), do
not make the cause ambiguous, only its value: the best unit reading is kept
— a unit is preferred to a misplaced decimal point that fits as well — and
the others are named beside it.  Both ``k`` and ``ratio`` are passed in (they come from the
rule profile).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable, Sequence

from ..model import Point
from .hypotheses import Hypothesis, all_hypotheses

__all__ = ["ScoredHypothesis", "Diagnosis", "score_hypotheses", "diagnose_point"]

#: kinds of reading that multiply the printed pressure by a factor (decimal shifts of P only)
_FACTOR_ON_P = ("pressure-unit", "decimal-shift")


@dataclass(frozen=True)
class ScoredHypothesis:
    hypothesis: Hypothesis
    z_after: float


@dataclass(frozen=True)
class Diagnosis:
    """Result of :func:`diagnose_point`.

    Attributes
    ----------
    row : int
    z_before : float
        Standardized residual of the row as printed.
    best : ScoredHypothesis or None
        The kept hypothesis, or None when none is convincing.
    ranked : tuple of ScoredHypothesis
        Distinct readings, best first (at most 5 kept for reporting).
    reason : str
        Why a hypothesis was kept or not.
    """

    row: int
    z_before: float
    best: ScoredHypothesis | None
    ranked: tuple[ScoredHypothesis, ...]
    reason: str
    #: readings that multiply P by another factor and fit about as well as the best (the value is
    #: uncertain between them, not the cause)
    alternatives: tuple[ScoredHypothesis, ...] = ()

    def explanation(self) -> str:
        if self.best is None:
            return self.reason
        h = self.best.hypothesis
        value = (f"T = {h.T_K:.6g} K" if h.quantity == "T" else f"P = {h.P_Pa:.6g} Pa")
        before = (f"residual {self.z_before:+.1f} σ as printed" if math.isfinite(self.z_before)
                  else "off the curve's range as printed")
        text = f"{h.reading}: {value}; {before}, {self.best.z_after:+.1f} σ corrected"
        if self.alternatives:
            text += "; about as likely: " + ", ".join(
                f"{_short_reading(a.hypothesis)} (P = {a.hypothesis.P_Pa:.6g} Pa, {a.z_after:+.1f} σ)"
                for a in self.alternatives)
        return text

    def summary(self) -> str:
        lines = [f"row {self.row}: {self.reason}"]
        for s in self.ranked:
            lines.append(f"  {s.hypothesis.kind:17s} z_after = {s.z_after:+8.2f}  {s.hypothesis.reading}")
        return "\n".join(lines)


def _short_reading(h: Hypothesis) -> str:
    """'written in bar', or 'printed 10^2 times the intended 0.369': what sets this reading apart."""
    if " but " in h.reading:
        return h.reading.split(" but ", 1)[1]
    if " is " in h.reading:
        return "printed " + h.reading.split(" is ", 1)[1]
    return h.reading


def score_hypotheses(hypotheses: Sequence[Hypothesis], z_of: Callable[[float, float], float]
                     ) -> list[ScoredHypothesis]:
    """z_after of each hypothesis, merged when two give the same corrected point.

    `z_of(T_K, P_Pa)` is the standardized residual of a point against the
    curve.  Readings that give the same (T, P) to 1e-9 are one reading (the
    first listed wins), so they do not compete with each other.
    """
    out: list[ScoredHypothesis] = []
    for h in hypotheses:
        if any(abs(s.hypothesis.T_K - h.T_K) <= 1e-9 * h.T_K and abs(s.hypothesis.P_Pa - h.P_Pa) <= 1e-9 * h.P_Pa
               for s in out):
            continue
        z = z_of(h.T_K, h.P_Pa)
        if math.isfinite(z):
            out.append(ScoredHypothesis(h, z))
    out.sort(key=lambda s: abs(s.z_after))
    return out


def diagnose_point(point: Point, z_of: Callable[[float, float], float], k: float, ratio: float,
                   hypotheses: Sequence[Hypothesis] | None = None) -> Diagnosis:
    """Find the likely cause of a suspect or rejected row.

    Parameters
    ----------
    point : Point
        The row, with its printed texts and their units.
    z_of : callable (T_K, P_Pa) -> float
        Standardized residual of a point against the consensus fit (uses the
        point's own expected scatter at the corrected value).
    k : float
        A corrected point must land within k σ of the curve.
    ratio : float
        The next-best reading, and the value as printed, must be at least
        `ratio` times worse (|z| ≥ ratio·max(|z_best|, 1)).
    hypotheses : sequence of Hypothesis, optional
        Default: :func:`audit.diagnose.hypotheses.all_hypotheses`.

    Returns
    -------
    Diagnosis
    """
    if k <= 0 or ratio < 1:
        raise ValueError("k must be positive and ratio at least 1")
    z0 = z_of(point.T_K, point.P_Pa)
    hyps = all_hypotheses(point) if hypotheses is None else list(hypotheses)
    scored = score_hypotheses(hyps, z_of)
    ranked = tuple(scored[:5])
    if not scored:
        return Diagnosis(point.row, z0, None, ranked, "no alternative reading of the printed cells")
    best = scored[0]
    if abs(best.z_after) > k:
        return Diagnosis(point.row, z0, None, ranked,
                         f"no alternative reading brings the point within {k:g} σ of the curve "
                         f"(best: {best.hypothesis.kind}, {best.z_after:+.1f} σ)")
    if abs(z0) < ratio * max(abs(best.z_after), 1.0):
        return Diagnosis(point.row, z0, None, ranked,
                         f"the value as printed ({z0:+.1f} σ) is not clearly worse than the best "
                         f"alternative reading ({best.hypothesis.kind}, {best.z_after:+.1f} σ): "
                         "ordinary scatter explains it as well")
    rivals = tuple(x for x in scored[1:] if abs(x.z_after) < ratio * max(abs(best.z_after), 1.0))
    close = (best,) + rivals
    units = [x for x in close if x.hypothesis.kind == "pressure-unit" and abs(x.z_after) <= k]
    if rivals and units and all(x.hypothesis.kind in _FACTOR_ON_P and x.hypothesis.quantity == "P" for x in close):
        # every close reading multiplies P by a factor, and one of them is a unit: the cause is a unit
        # slip (preferred to a misplaced decimal point that fits as well); its size is what is uncertain
        chosen = units[0]
        others = tuple(x for x in close if x is not chosen)
        return Diagnosis(point.row, z0, chosen, ranked, f"pressure-unit fits; the factor is uncertain between "
                         f"{len(close)} readings of about the same size", alternatives=others)
    if rivals:
        nxt = scored[1]
        return Diagnosis(point.row, z0, None, ranked,
                         f"ambiguous: {best.hypothesis.kind} ({best.z_after:+.1f} σ) and "
                         f"{nxt.hypothesis.kind} ({nxt.z_after:+.1f} σ) fit about equally well")
    return Diagnosis(point.row, z0, best, ranked, f"{best.hypothesis.kind} fits; next best "
                     + (f"{scored[1].hypothesis.kind} at {scored[1].z_after:+.1f} σ" if len(scored) > 1 else "none"))
