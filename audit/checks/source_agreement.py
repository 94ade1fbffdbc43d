"""Check ``source-agreement``: is one source systematically off the others?

Runs after ``outliers`` and uses the consensus model's form per branch
(``ctx.consensus``).  For each named source it estimates, by
leave-one-source-out GLS (:func:`audit.thermo.source_bias.source_offsets`),
a pressure-scale offset and a temperature offset against the curve of the
*other* sources, so a biased source cannot pull its own yardstick.  A source
is flagged when its offset exceeds ``k`` times its standard uncertainty AND
``tolerance_percent``.  Its rows get a warning flag but keep their status:
a systematic offset is a property of the source, not of its single points.

When a flagged source is still part of the consensus (``outliers`` leaves
biased sources out only when three or more sources are named), the
branch of the consensus model is replaced by one whose fit of record leaves
it out (:func:`audit.consensus.refit_without_sources`), so that later checks
and the report use the unbiased curve.  Results go to ``ctx.source_records``
(:class:`audit.results.SourceAgreement`, one per source).
"""

from __future__ import annotations

import math

from dataclasses import dataclass, replace
from functools import partial

import numpy as np

from ..consensus import refit_without_sources
from ..diagnose.units import TEMPERATURE_SYMBOL
from ..model import base_phase
from ..results import STATUS_RANK, Cause, CheckResult, PointFlag, SourceAgreement
from ..thermo.constants import R as R_GAS
from ..thermo.ratios import percent_from_log_ratio
from ..thermo.overlap import overlaps_others
from ._util import skipped, worst_status
from .registry import Check, Option, register

#: sources tried as the one to set aside in each round (the furthest off in units of u first)
_MAX_TRIALS = 3



@dataclass(frozen=True)
class _SlopeDeparture:
    """A source's own apparent ΔH [J/mol] (two-constant fit) against the consensus's at T_ref [K]."""

    dH_source: float
    u_dH_source: float
    dH_consensus: float
    u_dH_consensus: float
    T_ref: float
    percent: float
    #: beyond both k·u and other_compound_dH_percent
    beyond: bool


@register
class SourceAgreement_(Check):
    """Sources whose values are systematically offset from the others'.

    **What it checks.** When the data name two or more sources: each
    source's mean deviation in ln P from a curve fitted to the other sources
    (same equation form as the consensus), with its standard uncertainty
    (own scatter, inflated by its Birge ratio, plus the other sources' curve
    uncertainty).  A pressure-scale error (constant Δln P) is told from a
    temperature offset (Δln P = −(d ln P/dT)·ΔT, shrinking along the range)
    by the χ² of the two one-parameter models; the pattern is named when
    their difference reaches ``pattern_delta_chi2``.  A source beyond both
    ``k``·u and ``tolerance_percent`` is ``suspect``, beyond
    ``reject_tolerance_percent`` ``reject`` (in the source record; its rows
    are only warned).

    **Why it matters.** A miscalibrated gauge or thermometer shifts every
    value of a source; the points look consistent among themselves and
    pass any point-by-point test, yet bias the recommended curve.

    **Method.** Per branch of the outliers check's consensus with two named
    sources or more, using each point's consensus standard uncertainty in ln P
    (never below the rounding of its printed digits) and leaving out rows
    already rejected. (1) A source whose temperatures no other source reaches
    is not analysed (an offset there would be an extrapolation). (2) For each
    source, a curve of the consensus equation form is fitted to the other
    sources' points, and the source's constant offset Δln P and, as an
    alternative one-parameter model, its temperature offset ΔT (Δln P = −(d ln
    P/dT)·ΔT) are estimated by generalised least squares with covariance
    diag(σ²) + J·C·Jᵀ (its own scatter plus the uncertainty C of the others'
    curve), the uncertainty inflated by the Birge ratio; the two models are
    compared by their Δχ² (equal to ΔAIC, each having one parameter). (3) Of
    the sources beyond both ``k``·u and ``tolerance_percent``, the one whose
    absence leaves the others most consistent (least Σ(offset/u)² of the
    sources still in; of the three furthest off in units of u) is excluded
    from the consensus and the others are re-assessed without it, repeated
    while candidates remain and at least two sources stay in — the consensus
    is what most sources say, and the most precise series is the furthest
    off in units of u whenever the others are off together. (4) Each flagged
    source is suspect, or reject beyond ``reject_tolerance_percent``; with
    three sources or more the consensus is refitted without it. (5) A flagged
    source is then diagnosed in turn: its offset read as the ratio of two
    pressure units (within ``unit_tolerance_percent``, or
    ``unit_ratio_tolerance``·|ln r| when its slope is the substance's), its
    temperatures read in another scale, and its own apparent enthalpy against
    the consensus's (beyond ``k``·u and ``other_compound_dH_percent``, or an
    offset beyond ``max_gauge_error_percent`` and ``max_thermometer_error_K``)
    as another compound.  Sources are explained one at a time, the first
    excluded first; after each, the others are compared again without it (a
    series in another unit was part of every other source's yardstick).

    **Example.** Three sources of water data; source "B" reads 3.1 ± 0.2 %
    high everywhere → "B: pressures +3.1 % (u 0.2 %) vs. the other sources;
    pattern: pressure-scale".

    A flagged source (or one whose rows were mostly rejected one by one)
    whose offset is the ratio of two pressure units, within
    ``unit_tolerance_percent`` — or, for a ratio r, within
    ``unit_ratio_tolerance``·|ln r| when its own slope is the substance's —
    was printed in that other unit (a series in mmHg under a "Pa" header is
    133.3 times too low): its rows are rejected with the cause
    ``pressure-unit`` and the value read in the real unit, and the source
    record carries that cause.  One that lies on the others' curve once its
    temperatures are read in °C, K or °F instead of the header's scale gets
    ``temperature-unit`` and each row's temperature in that scale (tried too
    on a series every row of which reads below 0 K, and on one no other
    source reaches in temperature) — on the curve within
    ``unit_tolerance_percent``, or within ``max_gauge_error_percent`` when
    the reading removes nine tenths of the series' offset as printed (or it
    could not be judged as printed) and the series so read keeps the
    substance's slope (a consensus of biased series is itself tens of
    percent off).  A series no curve can judge (no other source reaches
    it) gets the same cause when its own Clausius–Clapeyron line's Trouton
    ratio lies outside ``trouton_band`` by more than ``k``·u as printed and
    inside it read in another scale (the upper end raised to
    ``trouton_max_sublimation`` for a branch that may be a solid's; of two
    such scales, the one nearer the other sources' own two-constant line).
    A flagged source whose own
    slope implies an apparent enthalpy more than ``k``·u and
    ``other_compound_dH_percent`` away from the consensus's, and whose level
    no unit ratio explains, is taken for data of another compound: cause
    ``other-compound``, rows rejected, the rest of the data kept.  Sources
    whose every row was rejected before are diagnosed the same way.  So is
    a flagged source whose level is off by more than any gauge or
    calibration error gives (beyond ``max_gauge_error_percent``) and,
    read as a thermometer error, by more than ``max_thermometer_error_K``,
    when no unit ratio explains it and no block of its rows has a cause of
    its own: a series 4.9 times the others' with the substance's slope is
    no miscalibration.

    When the substance is named (``--substance`` or the metadata), its
    reference correlation (:mod:`audit.reference_curves`: the metadata's
    ``[reference_equation]``, IAPWS for water, else the ``chemicals``
    library's coefficient sets for the liquid) is one more yardstick: eight
    points of it over the branch's temperatures join every "other sources"
    fit in (2), weighing together as two measurements with the curve's
    uncertainty (never below ``reference_u_floor_percent``); a series no
    other source reaches is then compared with it, one source left beside
    the reference may be set aside in (3), and with two sources the one off
    is named.  A source the others pass is also compared with the reference
    alone (its uncertainty a level common to the source's points): beyond
    ``k``·u and ``tolerance_percent`` of it, the source is set aside from
    the others' yardstick and all are compared again — two precise series
    off together otherwise vouch for each other.  A flagged source's pattern
    is taken from its residuals from the reference when they decide it
    (|Δχ²| ≥ ``pattern_delta_chi2``, each point weighed by the source's own
    scatter about its own line): the reference's shape is known far better
    than the others' curve's.  The unit readings in (5) are tried against
    the reference too when the others' curve gives none.

    A source more than ``remnant_share`` of whose rows the outliers check
    rejected is no yardstick for the others: its rows left near the curve
    are the remnant of a series wrong as a whole (a series in mmHg under a
    kPa header meets the curve at one end), and a series beside it must
    not be judged against them.

    Within a source, a run of rows that forms a series of its own is
    diagnosed as a block (another unit, scale or compound): among rows
    rejected one by one against the consensus; against the reference, when
    named; and, for a source flagged as off as a whole, against the others'
    curve refitted without it — a source most of whose rows are another
    compound's is off as a whole, and its rows of this substance show which
    rows are not.

    **Options.** ``k``, ``tolerance_percent``, ``reject_tolerance_percent``,
    ``pattern_delta_chi2``, ``min_points``, ``unit_tolerance_percent``, ``unit_ratio_tolerance``, ``min_block_rows``,
    ``other_compound_dH_percent``, ``max_gauge_error_percent``, ``max_thermometer_error_K``, ``trouton_band``,
    ``trouton_max_sublimation``, ``reference_u_floor_percent``, ``remnant_share``.
    """

    id = "source-agreement"
    title = "Sources agree with each other"
    method = ("Leave-one-source-out consensus of the outliers check's equation form; GLS estimate of a "
              "constant Δln P and of a temperature offset per source with covariance diag(σ²)+JCJᵀ; "
              "models compared by Δχ² (= ΔAIC, one parameter each).")
    references = (
        "R. T. Birge, Phys. Rev. 40, 207 (1932), doi:10.1103/PhysRev.40.207.",
        "H. Akaike, IEEE Trans. Autom. Control 19, 716 (1974), doi:10.1109/TAC.1974.1100705.",
        "JCGM 100:2008 (GUM), §5.2 (correlated input quantities).",
    )
    options = {
        "k": Option(float, "coverage factor on the offset's standard uncertainty [-]", "", 0.5, 10),
        "tolerance_percent": Option(float, "smallest offset worth flagging", "%", 0, 100),
        "reject_tolerance_percent": Option(float, "offset beyond which the source record says reject",
                                           "%", 0, 1000),
        "pattern_delta_chi2": Option(float, "Δχ² needed to name pressure-scale vs temperature-offset [-]",
                                     "", 0, 100),
        "min_points": Option(int, "fewest usable points of a source to assess it [-]", "", 2, 1000),
        "other_compound_dH_percent": Option(float, "departure of a flagged source's own apparent enthalpy "
                                                   "from the consensus's beyond which it is taken for "
                                                   "another compound", "%", 0, 100),
        "unit_tolerance_percent": Option(float, "largest offset left after reading a source's pressures in "
                                                "another unit, for that reading to be its cause", "%", 0, 50),
        "min_block_rows": Option(int, "fewest contiguous rejected rows of one source read as a block of their "
                                 "own (another unit, scale or compound) [-]", "", 2, 1000),
        "unit_ratio_tolerance": Option(float, "for a unit ratio r, the offset left may also reach this fraction "
                                       "of |ln r| when the source keeps the substance's slope [-]", "", 0, 0.5),
        "max_gauge_error_percent": Option(float, "largest pressure-scale error a gauge or calibration gives; a "
                                          "flagged source further off (and beyond max_thermometer_error_K) with "
                                          "no unit ratio is taken for another compound, and a series read in "
                                          "another temperature scale may be this far off a consensus of biased "
                                          "series", "%", 1, 10000),
        "max_thermometer_error_K": Option(float, "largest thermometer error; see max_gauge_error_percent",
                                          "K", 0.1, 1000),
        "trouton_band": Option(list, "Trouton ratios [low, high] a liquid series' own line may have; a series no "
                                     "other source reaches, outside it as printed and inside it read in another "
                                     "temperature scale, was printed in that scale", "J mol⁻¹ K⁻¹"),
        "reference_u_floor_percent": Option(float, "standard uncertainty taken for a reference correlation "
                                                   "of the named substance that states none (its curve is one "
                                                   "more yardstick of the sources)", "%", 0.01, 50),
        "trouton_max_sublimation": Option(float, "the band's upper end for a solid or unknown branch (sublimation "
                                                 "adds the entropy of fusion)", "J mol⁻¹ K⁻¹", 55, 1000),
        "remnant_share": Option(float, "share of a source's rows rejected by the outliers check beyond which "
                                       "its other rows are no yardstick for the other sources [-]", "", 0, 1),
    }

    def run(self, ctx):
        s = ctx.settings(self.id)
        names = ctx.dataset.sources
        if not names:
            return skipped(self, "data name no sources")
        if len(names) == 1:
            return skipped(self, "one source only", source=names[0])
        original = ctx.consensus
        if not original:
            return skipped(self, "no consensus fit to compare sources with (outliers check did not fit)")
        from ..reference_curves import reference_curves

        references = reference_curves(ctx.dataset, s["reference_u_floor_percent"] / 100)
        best, model, notes, order = self._compare(ctx, original, s, frozenset(), references)
        reference_fits = _reference_fits(ctx, references, original)
        explained: dict[str, tuple] = {}

        def rank(r):
            if r.source in order:
                return (0, order.index(r.source))
            if r.status != "ok" and r.bias_percent is not None:
                return (1, -abs(r.bias_percent) / max(r.u_bias_percent or 0.0, 1e-300))
            return (2, 0.0)

        # one source explained at a time, the first set aside first: a source wrong as a whole
        # (another unit, scale or compound) was part of every other source's yardstick, so once it
        # is explained the others are compared again without it — a good series is not called
        # off (nor read in another unit) for disagreeing with a series printed in mmHg
        for _ in range(len(best)):
            found = None
            for r in sorted((r for r in best.values() if r.source not in explained), key=rank):
                diagnosis = self._source_cause(ctx, r, model, s, reference_fits)
                if diagnosis is not None:
                    found = (r, diagnosis)
                    break
            if found is None:
                break
            explained[found[0].source] = found
            rest = [n for n in best if n not in explained]
            if not any(best[n].status != "ok" for n in rest):
                continue
            again, model, notes, order = self._compare(ctx, original, s, frozenset(explained), references)
            notes.append(f"sources compared again without {', '.join(sorted(explained))}")
            best = {n: (explained[n][0] if n in explained else again.get(n, best[n])) for n in best}
        records = list(best.values())
        point_status, causes = {}, {}
        flags: list[PointFlag] = []
        for i, r in enumerate(records):
            if r.source not in explained:
                continue
            cause, text, suggest = explained[r.source][1]
            records[i] = replace(r, status="reject", extra={**r.extra, "cause": cause})
            for p in ctx.dataset.points:  # rows rejected before get the source's cause too
                if p.source == r.source and ctx.status[p.row] != "unreadable":
                    point_status[p.row] = "reject"
                    causes[p.row] = Cause(cause["kind"], text, *suggest(p))
        whole = {r.source for r in records if r.extra.get("cause")}
        off = {r.source for r in records if r.status != "ok" and not r.extra.get("cause")}
        for row, cause in _block_causes(ctx, model, s, whole, references, off).items():
            point_status[row] = "reject"
            causes[row] = cause
        # a level no gauge or thermometer error reaches, once the unit readings and the blocks had
        # their turn (a source with a block of its own keeps that finer story)
        for i, r in enumerate(records):
            level = _implausible_level(r, s)
            if level is None or r.extra.get("cause"):
                continue
            rows = [p for p in ctx.dataset.points if p.source == r.source and ctx.status[p.row] != "unreadable"]
            if any(p.row in causes for p in rows):
                continue
            cause = {"kind": "other-compound", "n_rows": len(rows), "bias_percent": r.bias_percent,
                     "temperature_offset_K": r.temperature_offset_K}
            records[i] = replace(r, status="reject", extra={**r.extra, "cause": cause})
            for p in rows:
                point_status[p.row] = "reject"
                causes[p.row] = Cause("other-compound", level, None, None)
        ctx.source_records = tuple(records)
        ctx.consensus = model
        bad = [r for r in records if r.status != "ok"]
        for r in bad:
            if r.bias_percent is None:
                msg = f"source '{r.source}': {(r.extra.get('cause') or {}).get('kind', 'not compared')}"
            else:
                what = (f"temperatures read {r.temperature_offset_K:+.3g} K high"
                        if r.pattern == "temperature-offset" else f"pressures {r.bias_percent:+.3g} % off")
                yardstick = ("the substance's reference correlation"
                             if r.extra.get("judged_against") == "reference" else "the other sources")
                msg = (f"source '{r.source}' is systematically off {yardstick}: {what} "
                       f"(bias {r.bias_percent:+.3g} ± {r.u_bias_percent:.2g} %, pattern {r.pattern})")
            if r.extra.get("two_sources_only"):
                msg += "; with two sources only, which one is off cannot be told"
            for p in ctx.dataset.points:
                if p.source == r.source and ctx.status[p.row] in ("ok", "suspect"):
                    flags.append(PointFlag(p.row, self.id, "warn", msg))
        if bad:
            message = "; ".join(f"'{r.source}' {r.bias_percent:+.3g} ± {r.u_bias_percent:.2g} % ({r.pattern}"
                                + (", against the reference" if r.extra.get("judged_against") == "reference" else "")
                                + ")"
                                if r.bias_percent is not None else f"'{r.source}' (not compared)" for r in bad)
            kinds = [(r.source, r.extra["cause"]) for r in bad if r.extra.get("cause")]
            if kinds:
                message += "; causes: " + ", ".join(
                    f"'{n}' {c['kind']}" + (f" (printed in {c['real_unit']})" if c.get("real_unit") else "")
                    for n, c in kinds)
            message = f"{len(bad)} of {len(records)} sources systematically off: {message}"
        else:
            message = f"the {len(records)} sources agree within their uncertainties"
        if notes:
            message += " [" + "; ".join(notes) + "]"
        metrics = {"n_sources": len(records), "n_flagged": len(bad),
                   "sources": [r.to_dict() for r in records]}
        return CheckResult(self.id, self.title, worst_status(len(bad), s.severity), message, metrics,
                           tuple(flags), point_status=point_status, causes=causes)

    def _compare(self, ctx, consensus, s, dropped: frozenset, references: dict):
        """Compare every source with the others, per branch, leaving out ``dropped`` sources.

        Returns (records by source, the consensus refitted without the flagged sources,
        notes, the sources set aside in the order they were).  Sources in ``dropped`` (found
        wrong as a whole) are neither compared nor part of any yardstick.
        """
        from ..thermo.rounding import pressure_rounding_u_lnP
        from ..thermo.source_bias import source_offsets

        u_percent = consensus.u_percent

        def sigmas(points):
            """Each point's σ in ln P: the consensus's, else the rounding of its printed digits."""
            sig = np.array([u_percent.get(p.row, math.nan) / 100 for p in points])
            floor = np.nan_to_num([pressure_rounding_u_lnP(p.P_text, p.P_text_unit) for p in points], nan=0.0)
            return np.where(np.isfinite(sig) & (sig > 0), sig, np.maximum(floor, 1e-6))

        best: dict[str, SourceAgreement] = {}
        notes: list[str] = []
        order: list[str] = []
        model = consensus
        for branch, branch_model in consensus.branches.items():
            all_pts = ctx.usable(branch)
            pts = [p for p in all_pts if p.source not in dropped]
            src = [p.source for p in pts]
            # two named sources among the branch's readable rows, also those rejected already: a
            # source all of whose rows were rejected is still diagnosed as a whole
            named = {p.source for p in ctx.dataset.points if p.readable and p.source and p.source not in dropped
                     and ctx.phase(p) == branch}
            if len(named) < 2 or not any(src):
                continue
            T = np.array([p.T_K for p in pts])
            P = np.array([p.P_Pa for p in pts])
            sig = sigmas(pts)
            rounding = np.nan_to_num([pressure_rounding_u_lnP(p.P_text, p.P_text_unit) for p in pts], nan=0.0)
            # the few rows the outliers check left of a source it mostly rejected are the remnant of
            # a series wrong as a whole (another unit or compound lying near the curve at one end),
            # not a yardstick: they neither make another source overlap nor pull its comparison
            remnant = _mostly_rejected(ctx, branch, s["remnant_share"])
            keep = np.array([ctx.status[p.row] != "reject" and p.source not in remnant for p in pts])
            eq = branch_model.fit.equation
            fixed = eq.fixed_parameters()
            form = type(eq)
            # an offset is measured only where other sources overlap in temperature
            # (judged on every readable row of the source, also those rejected already)
            everyone = [p for p in ctx.dataset.points if p.readable and p.source and ctx.phase(p) == branch
                        and p.source not in dropped]
            T_all = np.array([p.T_K for p in everyone])
            src_all = np.array([p.source for p in everyone], dtype=object)
            kept_all = np.array([ctx.status[p.row] in ("ok", "suspect") and p.source not in remnant
                                 for p in everyone])
            reference = references.get(branch)
            # over the usable points' span, below a fixed critical temperature of the form
            anchor = (_reference_anchor(reference, T, fixed.get("Tc", math.inf))
                      if reference is not None else None)
            if anchor is not None:
                T_ref, P_ref, sig_ref = anchor
                T = np.concatenate([T, T_ref])
                P = np.concatenate([P, P_ref])
                sig = np.concatenate([sig, sig_ref])
                rounding = np.concatenate([rounding, np.zeros(T_ref.size)])
                src = src + [None] * T_ref.size
                keep = np.concatenate([keep, np.ones(T_ref.size, bool)])
                more = len(reference.sets) - 1
                notes.append(f"{branch}: the substance's reference correlation ({reference.sets[0].name}"
                             + (f", and {more} more set(s)" if more else "") + ") is one more yardstick")
            isolated = {}
            for name in dict.fromkeys(src_all):
                mine = src_all == name
                if anchor is not None and overlaps_others(np.concatenate([T_all, anchor[0]]),
                                                          np.concatenate([mine, np.zeros(anchor[0].size, bool)]),
                                                          np.concatenate([np.zeros(mine.size, bool),
                                                                          np.ones(anchor[0].size, bool)])):
                    continue
                if not overlaps_others(T_all, mine, kept_all & ~mine):
                    isolated[name] = (f"no other source reaches its temperatures ({T_all[mine].min():.5g}–"
                                      f"{T_all[mine].max():.5g} K): an offset there would be an "
                                      "extrapolation, so none is measured or removed")

            def analyse(excluded):
                return source_offsets(T, P, sig, src, form, keep=keep, min_points=s["min_points"],
                                      exclude_from_consensus=excluded, fit_options=fixed)

            def off(o):
                return (o.source not in isolated and abs(o.offset_lnP) > s["k"] * o.u_offset_lnP
                        and abs(o.bias_percent) > s["tolerance_percent"])

            excluded: list[str] = []
            try:
                analysis = analyse(excluded)
                while True:
                    candidates = [o for o in analysis.offsets if o.source not in excluded and off(o)]
                    # keep at least two sources in the consensus
                    if not candidates or len(analysis.offsets) - len(excluded) <= (1 if anchor else 2):
                        break
                    # the consensus is what most sources say: of the sources off, set aside the one
                    # whose absence leaves the rest most consistent (the most precise series is the
                    # furthest off in units of u when the others are all off together)
                    candidates.sort(key=lambda o: -abs(o.offset_lnP) / o.u_offset_lnP)
                    trials = [(self._inconsistency(again, excluded + [o.source], isolated, analysis), o.source, again)
                              for o in candidates[:_MAX_TRIALS] for again in (analyse(excluded + [o.source]),)]
                    _, worst, analysis = min(trials, key=lambda t: t[0])
                    excluded.append(worst)
                # series the others pass but the reference does not (precise series off together
                # make each other's yardstick) are set aside too, and the rest compared again
                by_reference: list[str] = []
                if reference is not None:
                    by_reference = [o.source for o in analysis.offsets
                                    if o.source not in excluded and o.source not in isolated and not off(o)
                                    and (r := _offset_against_reference(o.source, reference, T, P, sig, src,
                                                                        keep)) is not None and off(r)]
                    if by_reference:
                        excluded.extend(by_reference)
                        analysis = analyse(excluded)
            except (ValueError, np.linalg.LinAlgError) as exc:
                notes.append(f"{branch}: {exc}")
                continue
            order.extend(excluded)
            n_src = len(analysis.offsets)
            flagged = []
            for o in analysis.offsets:
                if o.source in isolated:
                    continue
                against = {"judged_against": "reference"} if o.source in by_reference else {}
                if not off(o) and reference is not None:
                    # the others may be off together (two precise series agreeing with each
                    # other, the reference not): the reference has its own say
                    versus = _offset_against_reference(o.source, reference, T, P, sig, src, keep)
                    if versus is not None and off(versus):
                        o, against = versus, {"judged_against": "reference"}
                if off(o):
                    status = "reject" if abs(o.bias_percent) > s["reject_tolerance_percent"] else "suspect"
                    pattern = _pattern(o, reference, T, P, rounding, src, keep, s["pattern_delta_chi2"])
                    flagged.append(o.source)
                else:
                    status, pattern = "ok", "none"
                rec = SourceAgreement(
                    source=o.source, n=o.n, bias_percent=o.bias_percent, u_bias_percent=o.u_bias_percent,
                    temperature_offset_K=o.temperature_offset_K, pattern=pattern, status=status,
                    extra={"branch": branch, "u_temperature_offset_K": o.u_temperature_offset_K,
                           "delta_chi2_pressure_minus_temperature": o.delta_chi2,
                           "pattern_decisive": o.preferred_pattern(s["pattern_delta_chi2"]) is not None,
                           "birge_ratio": o.birge_ratio, "T_range_K": list(o.T_range),
                           "two_sources_only": n_src == 2 and anchor is None, **against})
                prev = best.get(o.source)
                if prev is None or STATUS_RANK[status] > STATUS_RANK[prev.status]:
                    best[o.source] = rec
            for name in dict.fromkeys(src_all):
                if not kept_all[src_all == name].any():
                    isolated.setdefault(name, f"more than {s['remnant_share']:.0%} of its rows rejected before the "
                                              "sources were compared: judged as a whole, not as a yardstick"
                                        if name in remnant else "every row rejected before the sources were compared")
            for name, why in isolated.items():
                best.setdefault(name, SourceAgreement(name, int((src_all == name).sum()), None, None, None,
                                                      "none", "ok", {"branch": branch, "not_analysed": why,
                                                                    "isolated": why.startswith("no other")}))
            for name, why in analysis.not_analysed:
                best.setdefault(name, SourceAgreement(name, sum(1 for x in src if x == name), None, None, None,
                                                      "none", "ok", {"branch": branch, "not_analysed": why}))
            # flagged or dropped sources still in the consensus: refit without them (needs >= 1 other source)
            leave_out = flagged + sorted(x for x in dropped if x in {p.source for p in all_pts})
            newly = [x for x in leave_out if x not in branch_model.excluded_sources]
            if newly and (n_src >= 3 or dropped):
                all_keep = np.array([ctx.status[p.row] != "reject" for p in all_pts])
                try:
                    model = model.with_branch(refit_without_sources(branch_model, all_pts, all_keep,
                                                                    sigmas(all_pts), leave_out))
                    notes.append(f"{branch}: consensus refitted without {', '.join(newly)}")
                except (ValueError, np.linalg.LinAlgError) as exc:
                    notes.append(f"{branch}: consensus could not be refitted without {', '.join(newly)} ({exc})")
        return best, model, notes, order

    @staticmethod
    def _inconsistency(analysis, excluded, isolated, before) -> float:
        """Σ (offset/u)² of the sources still in the consensus: how far they disagree.

        A source compared ``before`` that can no longer be (its only overlapping
        partner was set aside) keeps its earlier (offset/u)²: setting a source aside
        must not look consistent merely by leaving another with nothing to compare to.
        """
        def z2(o):
            return (o.offset_lnP / o.u_offset_lnP) ** 2 if o.u_offset_lnP > 0 else 0.0

        now = {o.source: o for o in analysis.offsets}
        return float(sum(z2(now.get(o.source, o)) for o in before.offsets
                         if o.source not in excluded and o.source not in isolated))

    @staticmethod
    def _source_cause(ctx, record: SourceAgreement, consensus, s, reference_fits=None):
        """(cause, explanation, suggestion) of a source that is wrong as a whole, or None.

        ``suggestion(point)`` gives the row's suggested (T [K], P [Pa]), None
        where that quantity stays as printed.  Judged from all a source's
        readable rows against the branch's consensus:

        1. another pressure unit (for sources flagged as off the others, or
           whose every row was rejected before) — the median offset is a unit
           ratio (:func:`audit.diagnose.source_units.source_pressure_unit`);
        2. another temperature scale (the same sources) — read in °C, K or
           °F instead of the header's scale, the series' median offset from
           the consensus is within ``unit_tolerance_percent``
           (:func:`audit.diagnose.source_units.source_temperature_unit`);
           for a source not compared, its own line's Trouton ratio
           (:func:`audit.diagnose.source_units.source_temperature_unit_by_trouton`);
        3. another compound (the same sources) — the slope of the source's own two-constant
           fit implies an apparent enthalpy that departs from the
           consensus's at the same temperature by more than ``k`` combined
           standard uncertainties (the source's slope and the consensus's there)
           and ``other_compound_dH_percent``: no gauge or
           thermometer error changes the slope that much.

        When the substance's reference correlation covers the branch
        (``reference_fits``: branch → the consensus's form fitted to it), the
        unit readings (1, 2) are tried against it too when the consensus gives
        none: a consensus of few or biased series, or none left once the
        flagged sources are set aside, reads no unit ratio a reference reads.
        """

        branch = record.extra.get("branch")
        branch_model = consensus.get(branch)
        fit = None if branch_model is None else branch_model.fit
        yardsticks = [(f, name) for f, name in ((fit, "the other sources"),
                                                ((reference_fits or {}).get(branch),
                                                 "the substance's reference correlation")) if f is not None]
        fit = yardsticks[0][0] if yardsticks else None
        # every row with a pressure, also those read below 0 K (°C printed under a kelvin header):
        # the temperature-scale reading is tried on them, the other readings on the rows above 0 K
        every = [p for p in ctx.dataset.points if p.source == record.source and p.readable
                 and ctx.phase(p) == branch and math.isfinite(p.T_K) and p.P_Pa > 0
                 and math.isfinite(p.P_Pa)]
        rows = [p for p in every if p.T_K > 0]
        if fit is None or not every:
            return None
        all_rejected = bool(rows) and all(ctx.status[p.row] == "reject" for p in rows)
        # most rows rejected one by one: a unit slip of the whole series is the likelier story
        # (a series in °F under a °C header keeps a few rows near the curve by chance)
        mostly_rejected = 2 * sum(ctx.status[p.row] == "reject" for p in rows) > len(rows)
        if not mostly_rejected:  # rows a check rejected on their own do not bend the source's slope
            rows = [p for p in rows if ctx.status[p.row] != "reject"]
        flagged = record.status != "ok" or all_rejected
        # no row above 0 K: only another temperature scale can explain the series
        unit_candidate = flagged or mostly_rejected or not rows
        T = np.array([p.T_K for p in rows])
        P = np.array([p.P_Pa for p in rows])
        for i, (yardstick, against) in enumerate(yardsticks):
            found = _unit_reading(ctx, record, rows, every, T, P, yardstick, s, unit_candidate, against)
            if found is None and i == 0 and record.extra.get("not_analysed") and (
                    unit_candidate or record.extra.get("isolated")):
                # no curve reads it: its own line's Trouton ratio may (independent of the yardstick)
                t_printed, same = _printed_scale(every)
                found = _trouton_reading(ctx, same, t_printed, branch, s) if same else None
            if found is not None:
                return found
        # the slope test only for sources already off the others: on every source it
        # rejected good scattered series whose few rows give a noisy slope (benchmark
        # seeds 5000-5199: good sources mass-rejected 7.7 % -> 10.6 %)
        if not flagged or not rows:
            return None
        slope = _slope_departure(T, P, fit, s)
        if slope is not None and slope.beyond:
            cause = {"kind": "other-compound", "n_rows": len(rows), "dH_source_J_per_mol": slope.dH_source,
                     "u_dH_source_J_per_mol": slope.u_dH_source, "dH_consensus_J_per_mol": slope.dH_consensus,
                     "u_dH_consensus_J_per_mol": slope.u_dH_consensus}
            text = (f"source '{record.source}' implies ΔH = {slope.dH_source / 1e3:.4g} ± "
                    f"{slope.u_dH_source / 1e3:.2g} kJ/mol at {slope.T_ref:.1f} K against "
                    f"{slope.dH_consensus / 1e3:.4g} ± {slope.u_dH_consensus / 1e3:.2g} kJ/mol from the other sources "
                    f"({slope.percent:.2g} % > {s['other_compound_dH_percent']} %, beyond {s['k']} u) and no unit "
                    "ratio explains its level: likely another compound's data — exclude it")
            return cause, text, lambda p: (None, None)
        return None


def _mostly_rejected(ctx, branch, share) -> frozenset:
    """Sources more than ``share`` [-] of whose readable rows in ``branch`` are rejected."""
    counts: dict[str, list[int]] = {}
    for p in ctx.dataset.points:
        if p.readable and p.source and ctx.phase(p) == branch:
            c = counts.setdefault(p.source, [0, 0])
            c[0] += ctx.status[p.row] == "reject"
            c[1] += 1
    return frozenset(name for name, (bad, n) in counts.items() if bad > share * n)


def _printed_scale(points) -> tuple[str, list]:
    """The temperature scale most of `points` are printed in ('K' for none) and those points."""
    units = [p.T_text_unit for p in points]
    printed = max(set(units), key=units.count) if units else "K"
    return printed, [p for p in points if p.T_text_unit == printed]


def _unit_reading(ctx, record, rows, every, T, P, fit, s, unit_candidate, against):
    """(cause, explanation, suggestion) when the whole series reads in another pressure unit or
    temperature scale against the curve `fit` (named `against` in the explanation), else None
    (see ``_source_cause``, steps 1–2)."""
    from ..consensus.build import judgeable_range
    from ..diagnose.source_units import source_pressure_unit, source_temperature_unit
    from ..thermo.equations import ln_p_where_defined

    eq = fit.equation
    with np.errstate(all="ignore"):
        # rows beyond a reduced form's Tc are left out of the level, not allowed to stop the reading
        r = np.log(P) - ln_p_where_defined(eq, T) if rows else np.array([])
        offset = float(np.median(r[np.isfinite(r)])) if np.isfinite(r).any() else math.nan
    units = [p.P_text_unit for p in rows]
    tolerance = math.log1p(s["unit_tolerance_percent"] / 100)
    slope = _slope_departure(T, P, fit, s) if unit_candidate and rows else None
    # a wide reading (a large unit ratio matched only roughly) must keep the substance's slope:
    # another compound's block 10³ lower can sit near a unit ratio by chance
    wide = s["unit_ratio_tolerance"] if slope is None or not slope.beyond else 0.0
    reading = None
    if unit_candidate and rows:
        reading = source_pressure_unit(offset, max(set(units), key=units.count), tolerance, wide)
    if reading is not None:
        cause = {"kind": "pressure-unit", "n_rows": len(rows), "printed_unit": reading.printed_unit,
                 "real_unit": reading.real_unit, "factor": reading.factor,
                 "remaining_percent": reading.remaining_percent}
        text = (f"the whole series of source '{record.source}' reads as {reading.real_unit}, not "
                f"{reading.printed_unit}: its pressures ×{reading.factor:.6g} agree with {against} "
                f"within {reading.remaining_percent:+.2g} %")
        return cause, text, lambda p, f=reading.factor: (None, p.P_Pa * f)
    # a series no other source reaches in temperature, with pressures the others reach, is
    # what a whole series in °C under a kelvin header looks like: its scale is tried too
    if unit_candidate or record.extra.get("isolated"):
        t_printed, same = _printed_scale(every)
        t_reading = source_temperature_unit(
            [p.T_K for p in same], np.log([p.P_Pa for p in same]), t_printed, eq.ln_p,
            judgeable_range(fit), tolerance, math.log1p(s["max_gauge_error_percent"] / 100)) if same else None
        # a reading left further off than the unit tolerance (beside a consensus that is itself off)
        # must at least keep the substance's slope once so read: another compound's block does not
        if t_reading is not None and abs(math.log1p(t_reading.remaining_percent / 100)) > tolerance:
            re_read = _slope_departure(np.array(t_reading.T_K), np.array([p.P_Pa for p in same]), fit, s)
            if re_read is None or re_read.beyond:
                t_reading = None
        if t_reading is not None:
            real, shown = TEMPERATURE_SYMBOL[t_reading.real_unit], TEMPERATURE_SYMBOL[t_reading.printed_unit]
            cause = {"kind": "temperature-unit", "n_rows": len(same), "printed_unit": shown,
                     "real_unit": real, "remaining_percent": t_reading.remaining_percent}
            text = (f"the whole series of source '{record.source}' reads as {real}, not {shown}: its "
                    f"temperatures read in {real} put {t_reading.n_judged} of its {len(same)} rows on the "
                    f"curve of {against} within {t_reading.remaining_percent:+.2g} % (median)")
            by_row = {p.row: t for p, t in zip(same, t_reading.T_K)}
            return cause, text, lambda p: (by_row.get(p.row), None)
    return None


#: points of the reference curve put among the other sources, evenly in 1/T over the branch's data
_ANCHOR_POINTS = 8


def _reference_anchor(reference, T_data, T_below=math.inf, points=_ANCHOR_POINTS):
    """(T [K], P [Pa], σ(ln P) [-]) of the reference curve as points among the other sources,
    over the data's temperatures where the reference is valid (and below `T_below` [K], a
    critical temperature the consensus's form is reduced by); None when it covers none of them.

    The reference's error is not independent from point to point but smooth along T, so its
    `points` together must not weigh as that many independent measurements: each gets
    √(points/2) times the curve's uncertainty, and together they weigh as two (one at each
    end of the range).
    """
    T_data = np.asarray(T_data, float)
    if T_data.size == 0:
        return None
    span_lo, span_hi = reference.T_span
    lo, hi = max(float(T_data.min()), span_lo), min(float(T_data.max()), span_hi, T_below)
    if not hi >= lo:
        return None
    T = 1.0 / np.linspace(1.0 / lo, 1.0 / hi, points) if hi > lo else np.array([lo])
    ln = reference.ln_p(T)
    u = reference.u_ln_p(T)
    ok = np.isfinite(ln) & np.isfinite(u) & (u > 0) & (T < T_below)
    if not ok.any():
        return None
    return T[ok], np.exp(ln[ok]), u[ok] * math.sqrt(points / 2)


def _covered(source, reference, T, src, keep) -> np.ndarray:
    """Indices of the source's kept points the reference curve covers."""
    mine = np.flatnonzero(keep & (np.asarray(src, dtype=object) == source))
    return mine[reference.covers(T[mine])] if mine.size else mine


def _offset_against_reference(source, reference, T, P, sig, src, keep):
    """The source's offset from the reference curve alone (:func:`offset_against_curve`, the
    curve's uncertainty a common level), over its kept points the curve covers; None with
    fewer than three such points."""
    from ..thermo.source_bias import offset_against_curve

    idx = _covered(source, reference, T, src, keep)
    if idx.size < 3:
        return None
    Tm = T[idx]
    return offset_against_curve(source, Tm, np.log(P[idx]) - reference.ln_p(Tm), sig[idx],
                                reference.dlnp_dT(Tm), float(np.median(reference.u_ln_p(Tm))))


def _pattern(offset, reference, T, P, rounding, src, keep, min_delta_chi2) -> str:
    """'pressure-scale' or 'temperature-offset' for a flagged source.

    Against the substance's reference, when it covers three of the source's
    points or more and tells the two patterns apart (|Δχ²| ≥ the threshold):
    its shape is known far better than the others' curve's, whose slope error
    over a narrow range fakes either pattern. The source's points are weighed
    by its own scatter about its own Clausius–Clapeyron line (robust, never
    below the rounding of its printed digits): a thermometer offset moves
    that line, it does not scatter the points about it. Else the
    leave-one-out comparison's decisive pattern, else the sign of its Δχ².
    """
    from ..thermo.source_bias import pattern_against_curve
    from ..thermo.stats import mad_scale

    idx = _covered(offset.source, reference, T, src, keep) if reference is not None else np.array([], int)
    if idx.size >= 4 and np.unique(T[idx]).size >= 3:
        Tm, lnPm = T[idx], np.log(P[idx])
        line = np.polyval(np.polyfit(1.0 / Tm, lnPm, 1), 1.0 / Tm)
        own = mad_scale(lnPm - line)
        sigma = np.maximum(np.maximum(rounding[idx], own), 1e-6)
        delta = pattern_against_curve(lnPm - reference.ln_p(Tm), sigma, reference.dlnp_dT(Tm),
                                      float(np.median(reference.u_ln_p(Tm))))
        if math.isfinite(delta) and abs(delta) >= min_delta_chi2:
            return "temperature-offset" if delta > 0 else "pressure-scale"
    return offset.preferred_pattern(min_delta_chi2) or (
        "temperature-offset" if offset.delta_chi2 > 0 else "pressure-scale")


def _reference_fits(ctx, references: dict, consensus) -> dict:
    """Branch → the consensus's equation form fitted to the reference curve over the branch's
    readable rows (a yardstick with a covariance, as the consensus is); branches the reference
    does not cover, or where the fit fails, are left out."""
    from ..thermo.fitting import fit_equation

    out = {}
    for branch, branch_model in consensus.branches.items():
        reference = references.get(branch)
        if reference is None:
            continue
        T_rows = [p.T_K for p in ctx.dataset.points if p.readable and ctx.phase(p) == branch
                  and math.isfinite(p.T_K) and p.T_K > 0]
        eq = branch_model.fit.equation
        fixed = eq.fixed_parameters()
        anchor = _reference_anchor(reference, T_rows, fixed.get("Tc", math.inf), points=4 * _ANCHOR_POINTS)
        if anchor is None or anchor[0].size < 4:
            continue
        T, P, sig = anchor
        try:
            out[branch] = fit_equation(T, P, type(eq), u_P=P * sig, robust=False, **fixed)
        except (ValueError, np.linalg.LinAlgError):
            continue
    return out


def _trouton_reading(ctx, rows, printed_unit, branch, s):
    """(cause, explanation, suggestion) for a series no curve can judge whose own Trouton ratio
    is impossible as printed and plausible in another temperature scale, else None.

    When two scales give a plausible ratio, the one nearer the other sources' own
    two-constant line (a Clausius–Clapeyron extrapolation, which cannot bend away as a
    several-constant form's does) is taken; the consensus of record may hold the series itself.
    """
    from ..diagnose.source_units import source_temperature_unit_by_trouton
    from ..thermo.fitting import InsufficientData, distinct_temperatures, fit_equation
    from .copied_values import printed_value

    lo, hi = s["trouton_band"]
    if base_phase(branch) != "liquid":
        hi = max(hi, s["trouton_max_sublimation"])
    others = [p for p in ctx.usable(branch) if p.source != rows[0].source and ctx.status[p.row] != "reject"]
    curve = None
    T_o = np.array([p.T_K for p in others])
    if others and distinct_temperatures(T_o) >= 3:
        try:
            curve = fit_equation(T_o, np.array([p.P_Pa for p in others]), "cc2", robust=True).equation.ln_p
        except InsufficientData:
            curve = None
    # each pressure's rounding, an integer's trailing zeros not counted ("2000" printed to one digit
    # is known to ±500): the cautious reading, for a claim made on the series' own line alone
    u_print = np.array([printed_value(p.P_text, p.P_text_unit).resolution_lnP / math.sqrt(12.0) for p in rows])
    known = np.isfinite(u_print) & (u_print > 0)
    # a cell whose rounding cannot be read weighs as the series' typical one; none readable: no weights
    u_print = np.where(known, u_print, float(np.median(u_print[known]))) if known.any() else None
    reading = source_temperature_unit_by_trouton(
        [p.T_K for p in rows], np.log([p.P_Pa for p in rows]), printed_unit, (lo, hi), s["k"], curve, u_print)
    if reading is None:
        return None
    real, shown = TEMPERATURE_SYMBOL[reading.real_unit], TEMPERATURE_SYMBOL[reading.printed_unit]
    printed = ("a temperature at or below 0 K" if not math.isfinite(reading.ratio_printed) else
               f"a Trouton ratio of {reading.ratio_printed:.3g} ± {reading.u_ratio_printed:.2g} J mol⁻¹ K⁻¹")
    cause = {"kind": "temperature-unit", "n_rows": len(rows), "printed_unit": shown, "real_unit": real,
             "trouton_ratio_printed": reading.ratio_printed, "trouton_ratio_real": reading.ratio_real}
    text = (f"the whole series of source '{rows[0].source}' reads as {real}, not {shown}: the other sources' "
            f"curve cannot judge it, and as printed its own Clausius–Clapeyron line gives {printed}, outside "
            f"the {lo:g}–{hi:g} any substance has; read in {real} it gives {reading.ratio_real:.3g} J mol⁻¹ K⁻¹")
    by_row = {p.row: t for p, t in zip(rows, reading.T_K)}
    return cause, text, lambda p: (by_row.get(p.row), None)


def _implausible_level(record: SourceAgreement, s) -> str | None:
    """The explanation when a flagged source is further off than a gauge or thermometer
    error goes (both limits the profile's), else None."""
    if record.status == "ok" or record.bias_percent is None or record.temperature_offset_K is None:
        return None
    ratio = 1 + record.bias_percent / 100
    if not (ratio > 0 and abs(math.log(ratio)) > math.log1p(s["max_gauge_error_percent"] / 100)
            and abs(record.temperature_offset_K) > s["max_thermometer_error_K"]):
        return None
    return (f"source '{record.source}' lies {record.bias_percent:+.3g} % off the other sources (read as a "
            f"thermometer error, {record.temperature_offset_K:+.3g} K): beyond any gauge error "
            f"({s['max_gauge_error_percent']:g} %) or thermometer error ({s['max_thermometer_error_K']:g} K), and "
            "no unit ratio explains its level: likely another compound's data — exclude it")


def _slope_departure(T, P, fit, s):
    """The source's own two-constant slope against the consensus's (a _SlopeDeparture), or None.

    The departure is judged against both slopes' uncertainties: the source's
    own and the consensus fit's at the source's temperatures, which grows
    where the consensus is extrapolated (a series beside the others, not
    among them).
    """
    from ..thermo.enthalpy import apparent_enthalpy
    from ..thermo.fitting import InsufficientData, distinct_temperatures, fit_equation
    from ..thermo.slope import enthalpy_uncertainty

    # a series re-read in another temperature scale can put a row at or below 0 K: not on any line
    T, P = np.asarray(T, float), np.asarray(P, float)
    ok = np.isfinite(T) & (T > 0) & np.isfinite(P) & (P > 0)
    T, P = T[ok], P[ok]
    if distinct_temperatures(T) < 3:
        return None
    try:
        own = fit_equation(T, P, "cc2", robust=True)
    except InsufficientData:
        return None
    dH_own = -R_GAS * float(own.params[1])
    u_own = R_GAS * float(own.standard_errors[1])
    try:
        dH_cons = float(apparent_enthalpy(fit.equation, own.T_ref))
    except ValueError:  # the source's temperatures beyond a reduced form's Tc: no slope to compare
        return None
    try:
        u_cons = float(enthalpy_uncertainty(fit, own.T_ref))
    except ValueError:  # a consensus without a covariance: its slope taken as exact
        u_cons = 0.0
    if not math.isfinite(u_cons):
        u_cons = 0.0
    departure = dH_own - dH_cons
    if not (math.isfinite(departure) and dH_cons > 0):
        return None
    rel = 100 * abs(departure) / dH_cons
    beyond = bool(abs(departure) > s["k"] * math.hypot(u_own, u_cons) and rel > s["other_compound_dH_percent"])
    return _SlopeDeparture(dH_own, u_own, dH_cons, u_cons, float(own.T_ref), rel, beyond)


#: point-level causes a coherent block's own diagnosis replaces: a digit swapped or a decimal
#: point moved is a story about one row, not about several in a row that agree among themselves
_REPLACEABLE = (None, "digit-swap", "decimal-shift")


def _block_causes(ctx, model, s, whole_sources, references=None, off_sources=frozenset()) -> dict:
    """Causes for contiguous blocks of rejected rows that form a series of their own.

    Within one source (or the unnamed rows), in input order, a run of at
    least ``min_block_rows`` rows rejected row by row — with no cause, or only
    a digit-swap or decimal-shift story — whose rows lie close to a smooth
    curve of their own (robust scatter about their own two-constant fit,
    times ``k``, below their offset from the consensus) is one block: read
    in another pressure unit or temperature scale when one explains its
    level (the same tests as for a whole source), else another compound's
    rows pasted into the table.

    With the substance's reference curve (``references``, by branch), a run
    of more than ``min_block_rows`` rows of a named source far from the
    reference (beyond ``k`` times the reference's uncertainty and
    ``tolerance_percent``) and, in median, from the rest of the source
    (beyond ``k`` times the rest's scatter about the reference, never below
    its printed rounding), in a source that also has ``min_block_rows`` rows near the
    reference, is judged the same way against the reference, rejected or
    not: a precise block can capture the consensus and pass, while the
    source's own right rows are rejected around it.  The same search runs
    on each source flagged as off (``off_sources``) against the others'
    curve, refitted without it: a source most of whose rows are another
    compound's is off as a whole, and its rows of this substance show
    which rows are not.
    """
    from ..consensus.build import judgeable_range
    from ..thermo.equations import ln_p_where_defined

    out: dict = {}
    m = s["min_block_rows"]
    for branch, c in model.branches.items():
        eq = c.fit.equation
        groups: dict = {}
        for p in ctx.dataset.points:
            if (p.readable and ctx.phase(p) == branch and p.source not in whole_sources
                    and math.isfinite(p.T_K) and p.T_K > 0 and math.isfinite(p.P_Pa) and p.P_Pa > 0):
                groups.setdefault(p.source or "", []).append(p)
        reference = (references or {}).get(branch)
        for name, pts in groups.items():
            def where(run, name=name):
                return f"rows {run[0].row}–{run[-1].row}" + (f" of source '{name}'" if name else "")

            for run in _runs(pts, lambda p: ctx.status[p.row] == "reject" and (
                    ctx.causes.get(p.row) is None or ctx.causes[p.row].kind in _REPLACEABLE), m):
                out.update(_judge_block(run, partial(ln_p_where_defined, eq), judgeable_range(c.fit), s, where(run),
                                        "the consensus"))
            if not name:
                continue
            if reference is not None:
                out.update(_blocks_off_a_curve(ctx, pts, reference.ln_p, reference.u_ln_p, reference.T_span,
                                               s, where, "the substance's reference correlation", out))
            if name in off_sources:
                # a flagged source most of whose rows are another compound's: the others' curve,
                # refitted without it, shows which of its rows are this substance's
                fit = c.fit
                cov = fit.covariance_birge

                def u_fit(T, eq=eq, cov=cov):
                    J = eq.jacobian_ln_p(np.atleast_1d(np.asarray(T, float)))
                    return np.sqrt(np.maximum(np.einsum("ij,jk,ik->i", J, cov, J), 0.0))

                out.update(_blocks_off_a_curve(ctx, pts, partial(ln_p_where_defined, eq), u_fit,
                                               judgeable_range(fit), s, where, "the other sources", out))
    return out


def _blocks_off_a_curve(ctx, pts, curve_ln_p, curve_u, judgeable, s, where, against: str, found: dict) -> dict:
    """Blocks of one named source's rows (in input order) far from a curve (beyond ``k`` times
    its uncertainty and ``tolerance_percent``) and, in median, from the rest of the source (beyond
    ``k`` times the rest's scatter about the curve, never below its printed rounding), in a source
    with ``min_block_rows`` rows near the curve; each judged by :func:`_judge_block`."""
    from ..thermo.rounding import pressure_rounding_u_lnP
    from ..thermo.stats import mad_scale

    out: dict = {}
    m = s["min_block_rows"]
    T = np.array([p.T_K for p in pts])
    with np.errstate(all="ignore"):
        r = np.log([p.P_Pa for p in pts]) - curve_ln_p(T)
        limit = s["k"] * np.asarray(curve_u(T), float) + math.log1p(s["tolerance_percent"] / 100)
    near = np.isfinite(r) & np.isfinite(limit) & (np.abs(r) <= limit)
    if near.sum() < m:
        return out
    far = {p.row for p, ri, li in zip(pts, r, limit) if math.isfinite(ri) and math.isfinite(li) and abs(ri) > li}
    rounding = np.nan_to_num([pressure_rounding_u_lnP(p.P_text, p.P_text_unit) for p in pts], nan=0.0)
    index = {p.row: i for i, p in enumerate(pts)}
    for run in _runs(pts, lambda p: p.row in far and p.row not in found and p.row not in out, m + 1):
        if all(ctx.causes.get(p.row) is not None and ctx.causes[p.row].kind not in _REPLACEABLE for p in run):
            continue
        # a scattered series has runs of rows off any curve by chance
        inside = np.zeros(len(pts), bool)
        inside[[index[p.row] for p in run]] = True
        rest = ~inside & np.isfinite(r)
        if rest.sum() < m:
            continue
        spread = max(mad_scale(r[rest]), float(np.median(rounding[rest])))
        if not abs(float(np.median(r[inside])) - float(np.median(r[rest]))) > s["k"] * spread:
            continue
        out.update(_judge_block(run, curve_ln_p, judgeable, s, where(run), against))
    return out


def _runs(points, member, min_len) -> list[list]:
    """Maximal runs, in input order, of at least `min_len` consecutive points for which `member` holds."""
    runs, run = [], []
    for p in points:
        if member(p):
            run.append(p)
        else:
            runs.append(run)
            run = []
    runs.append(run)
    return [r for r in runs if len(r) >= min_len]


def _judge_block(run, curve_ln_p, judgeable, s, where: str, against: str) -> dict:
    """Row → Cause for a run of rows that forms a series of its own off `curve_ln_p` (see
    :func:`_block_causes`); empty when the run is no such block."""
    from ..diagnose.source_units import source_pressure_unit, source_temperature_unit
    from ..thermo.fitting import InsufficientData, distinct_temperatures, fit_equation
    from ..thermo.stats import mad_scale

    tolerance = math.log1p(s["unit_tolerance_percent"] / 100)
    T = np.array([p.T_K for p in run])
    P = np.array([p.P_Pa for p in run])
    if distinct_temperatures(T) < 3:
        return {}
    with np.errstate(all="ignore"):
        r = np.log(P) - curve_ln_p(T)
    if not np.all(np.isfinite(r)):
        return {}
    offset = float(np.median(r))
    try:
        own = fit_equation(T, P, "cc2", robust=True)
    except (InsufficientData, ValueError, np.linalg.LinAlgError):
        return {}
    own_scale = mad_scale(own.residuals_lnP)
    if not abs(offset) > s["k"] * max(own_scale, tolerance / s["k"]):
        return {}
    units = [p.P_text_unit for p in run]
    reading = source_pressure_unit(offset, max(set(units), key=units.count), tolerance)
    if reading is not None:
        text = (f"{where} form a block printed in {reading.real_unit}, not {reading.printed_unit}: "
                f"×{reading.factor:.6g} puts them on {against} within {reading.remaining_percent:+.2g} %")
        return {p.row: Cause("pressure-unit", text, None, p.P_Pa * reading.factor) for p in run}
    t_printed, same = _printed_scale(run)
    t_reading = source_temperature_unit([p.T_K for p in same], np.log([p.P_Pa for p in same]),
                                        t_printed, curve_ln_p, judgeable, tolerance)
    if t_reading is not None and len(same) == len(run):
        text = (f"{where} form a block whose temperatures were printed in {t_reading.real_unit}, not "
                f"{t_reading.printed_unit}: so read, they lie on {against} within "
                f"{t_reading.remaining_percent:+.2g} %")
        return {p.row: Cause("temperature-unit", text, t, None) for p, t in zip(same, t_reading.T_K)}
    text = (f"{where} form a block of their own: {len(run)} rows "
            f"{percent_from_log_ratio(offset):+.3g} % off {against} with only "
            f"{100 * own_scale:.2g} % scatter among themselves, and no unit ratio or temperature "
            "scale explains the level — likely another compound's rows pasted into the table; "
            "exclude them")
    return {p.row: Cause("other-compound", text, None, None) for p in run}
