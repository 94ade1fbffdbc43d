"""Collect the audit's products (fits, enthalpy, sources, triple point)
from the final state of a run, once every check has had its say.

Checks leave their products as typed attributes of the context; this module
gathers them, and evaluates each branch's recommended equation (the one the
checks used, or — when every fitting check is disabled — chosen now from the
points left usable) for the ``fits`` and ``enthalpy`` sections of the
contract.  The report renders these; it computes nothing itself.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Any, Mapping

import numpy as np

from .context import AuditContext
from .results import EnthalpyValue, FitRecord, SourceAgreement, TriplePointRecord
from .values import finite_or_none


@dataclass(frozen=True)
class AuditProducts:
    fits: tuple[FitRecord, ...] = ()
    enthalpy: tuple[EnthalpyValue, ...] = ()
    enthalpy_table: tuple[EnthalpyValue, ...] = ()
    sources: tuple[SourceAgreement, ...] = ()
    triple_point: TriplePointRecord | None = None
    transitions: tuple = ()
    notes: tuple[str, ...] = ()
    plot_data: Mapping[str, Any] = field(default_factory=dict)
    deviation_percent: Mapping[int, float] = field(default_factory=dict)
    u_percent: Mapping[int, float] = field(default_factory=dict)
    offset_percent: Mapping[int, float] = field(default_factory=dict)
    reference_deviation_percent: Mapping[int, float] = field(default_factory=dict)


def _fit_record(branch: str, choice) -> FitRecord:
    fit = choice.chosen
    eq = fit.equation
    params = {n: float(v) for n, v in zip(fit.parameter_names, fit.params)}
    extra = {"form": eq.to_dict(), "description": eq.describe(),
             "standard_errors": {n: float(v) for n, v in zip(fit.parameter_names, fit.standard_errors)},
             "scale": fit.scale, "scale_estimated": fit.scale_estimated,
             "uncertainties_given": fit.uncertainties_given,
             "aicc": fit.aicc, "bic": fit.bic, "selection": choice.reason,
             "candidates": [{"name": c.name, "n_params": c.n_params, "aicc": c.aicc, "admissible": c.admissible,
                             "reasons": list(c.reasons)} for c in choice.candidates]}
    return FitRecord(branch=branch, equation=choice.chosen_name, parameters=params,
                     covariance=tuple(tuple(float(v) for v in row) for row in np.asarray(fit.covariance)),
                     T_range_K=(float(fit.T_range[0]), float(fit.T_range[1])), n_used=int(fit.n_used),
                     rms_percent=float(fit.rms_percent), extra=extra, model=eq)


def gather_products(ctx: AuditContext) -> AuditProducts:
    from .checks.fits import implied, recommended

    fits: list[FitRecord] = []
    enthalpy: list[EnthalpyValue] = []
    notes: list[str] = []
    table: list[EnthalpyValue] = []
    for branch in ctx.branches():
        choice, data = recommended(ctx, branch)
        if choice is None:
            continue
        record = _fit_record(branch, choice)
        c = ctx.consensus.get(branch)
        origin = (c.origin if c is not None else
                  "fitted to the branch's usable points: " + ctx.consensus.not_fitted.get(
                      branch, "the outliers check made no consensus"))
        fits.append(replace(record, extra={**record.extra, "fit_of_record": origin}))
        h, corrected, why = implied(ctx, branch, data.T, data.P)
        notes.append(f"{branch} enthalpy: {h.correction} ({why})")
        for i, T in enumerate(data.T):
            enthalpy.append(EnthalpyValue(
                branch=branch, T_K=float(T), dH_J_per_mol=float(h.dH[i]),
                u_dH_J_per_mol=finite_or_none(h.u_dH[i]), real_gas_corrected=corrected,
                dH_apparent_J_per_mol=float(h.dH_apparent[i]), delta_z=float(h.delta_z[i])))
        table.extend(_enthalpy_at_chosen_temperatures(ctx, branch, record.T_range_K))
    return AuditProducts(
        fits=tuple(fits),
        enthalpy=tuple(enthalpy),
        enthalpy_table=tuple(table),
        sources=every_source(ctx, ctx.source_records),
        triple_point=ctx.triple_point,
        transitions=tuple(ctx.transitions),
        notes=tuple(notes),
        plot_data=dict(ctx.plot_data),
        deviation_percent=dict(ctx.consensus.deviation_percent),
        u_percent=dict(ctx.consensus.u_percent),
        offset_percent=dict(ctx.consensus.offset_percent),
        reference_deviation_percent=dict(ctx.reference_deviation_percent),
    )


#: at most this many round temperatures per branch in the condensed enthalpy table
ROUND_TEMPERATURES_PER_BRANCH = 6
_ROUND_STEPS_K = (1.0, 2.0, 5.0, 10.0, 20.0, 25.0, 50.0, 100.0, 200.0, 500.0)


def round_temperatures(T_lo: float, T_hi: float, most: int = ROUND_TEMPERATURES_PER_BRANCH) -> list[float]:
    """Multiples of the smallest step of 1, 2, 5, 10, 20, 25, 50, … K that gives at most
    ``most`` temperatures strictly inside (T_lo, T_hi) [K].

    >>> round_temperatures(281.0, 353.2)
    [300.0, 320.0, 340.0]
    """
    if not (math.isfinite(T_lo) and math.isfinite(T_hi) and 0 < T_lo < T_hi):
        return []
    for step in _ROUND_STEPS_K:
        first, last = math.floor(T_lo / step) + 1, math.ceil(T_hi / step) - 1
        if last - first + 1 <= most:
            return [k * step for k in range(first, last + 1)]
    return []


def _enthalpy_at_chosen_temperatures(ctx: AuditContext, branch: str, T_range) -> list[EnthalpyValue]:
    """The branch's enthalpy at its ends, at round temperatures between them, and at the
    normal boiling point (liquid) or the triple point when they lie within its range."""
    from .checks.fits import implied, known_triple_point

    lo, hi = float(T_range[0]), float(T_range[1])
    marks: dict[float, str] = {lo: "low end", hi: "high end"}
    for T in round_temperatures(lo, hi):
        marks.setdefault(T, "round")
    # a landmark a little beyond the data (the triple point just below a liquid series)
    # is still worth its value; farther out the curve is an extrapolation nobody should read
    reach = max(2.0, 0.1 * (hi - lo))

    def mark(T, name):
        if T is None or not math.isfinite(T) or not (lo - reach <= T <= hi + reach):
            return
        marks[float(T)] = name if lo <= T <= hi else f"{name} (extrapolated)"

    Tb = ctx.dataset.metadata.constants.get("T_boiling")
    if branch == "liquid" and Tb is not None:
        mark(Tb.value, "normal boiling point")
    triple = ctx.triple_point.T_K if ctx.triple_point is not None else None
    known = known_triple_point(ctx)
    if triple is None and known is not None:
        triple = known.T_K
    if branch in ("liquid", "solid") or branch.startswith("solid "):
        mark(triple, "triple point")
    Ts = np.array(sorted(marks))
    h, corrected, _ = implied(ctx, branch, Ts)
    if h is None:
        return []
    return [EnthalpyValue(branch=branch, T_K=float(T), dH_J_per_mol=float(h.dH[i]),
                          u_dH_J_per_mol=finite_or_none(h.u_dH[i]), real_gas_corrected=corrected,
                          dH_apparent_J_per_mol=float(h.dH_apparent[i]), delta_z=float(h.delta_z[i]),
                          at=marks[float(T)])
            for i, T in enumerate(Ts)]


def every_source(ctx: AuditContext, records) -> tuple[SourceAgreement, ...]:
    """One record per named source, in the order the data name them, whatever was decided.

    ``source-agreement`` compares the sources it can (usable points, a
    consensus to compare with); a source it could not compare — every row
    rejected, too few rows, the only source of its branch, the check disabled
    — is still listed, with its row counts and a one-line ``reason``, so a
    curator sees what happened to every source.  ``cause`` names the cause
    kind most of the source's flagged rows share, when most of them share one.
    """

    by_name = {r.source: r for r in records}
    out = []
    for name in ctx.dataset.sources:
        rows = [p for p in ctx.dataset.points if p.source == name]
        status = [ctx.status[p.row] for p in rows]
        n_reject, n_suspect = status.count("reject"), status.count("suspect")
        n_unreadable = status.count("unreadable")
        kinds = [ctx.causes[p.row].kind for p in rows if p.row in ctx.causes and ctx.status[p.row] != "ok"]
        cause = None
        if kinds:
            top = max(set(kinds), key=kinds.count)
            if kinds.count(top) * 2 > n_reject + n_suspect:
                cause = {"kind": top, "n_rows": kinds.count(top)}
        rec = by_name.get(name)
        if rec is not None and rec.extra.get("cause"):  # a source-level diagnosis wins
            cause = rec.extra["cause"]
        counts = {"n_rows": len(rows), "n_reject": n_reject, "n_suspect": n_suspect,
                  "n_unreadable": n_unreadable, "cause": cause,
                  "scatter_percent": _own_scatter_percent(ctx, rows)}
        if rec is not None and "not_analysed" not in rec.extra:
            if _source_cause_reason(rec.extra.get("cause")) is not None:
                reason = _source_cause_reason(rec.extra["cause"])
            elif rec.status == "ok":
                reason = "agrees with the other sources within its uncertainty"
            else:
                yardstick = ("the substance's reference correlation" if rec.extra.get("judged_against") == "reference"
                             else "the other sources")
                if rec.pattern == "temperature-offset" and rec.temperature_offset_K is not None:
                    reason = f"temperatures read {rec.temperature_offset_K:+.3g} K off {yardstick}"
                else:
                    reason = f"pressures {rec.bias_percent:+.3g} % off {yardstick}"
            out.append(replace(rec, extra={**rec.extra, **counts, "reason": reason}))
            continue
        usable = len(rows) - n_reject - n_unreadable
        if rows and usable == 0:
            st, reason = "reject", (f"every row rejected or unreadable ({n_reject} rejected, "
                                    f"{n_unreadable} unreadable): not compared with the other sources")
            if rec is not None and _source_cause_reason(rec.extra.get("cause")):
                reason = f"{_source_cause_reason(rec.extra['cause'])}: every row rejected"
            elif rec is not None:
                reason += f"; {rec.extra['not_analysed']}"
        elif rec is not None:
            st, reason = rec.status, f"not compared: {rec.extra['not_analysed']}"
        else:
            st = "ok"
            reason = ("not compared: the only named source" if len(ctx.dataset.sources) < 2 else
                      "not compared: no other source on its branch, or no consensus fit to compare with")
        base = rec if rec is not None else SourceAgreement(name, len(rows), None, None, None, "none", st)
        out.append(replace(base, n=len(rows), status=st, extra={**base.extra, **counts, "reason": reason}))
    return tuple(out)


def _own_scatter_percent(ctx: AuditContext, rows) -> float | None:
    """Sample standard deviation [%] of the deviations (offset removed) of a source's
    rows kept as ok from the consensus: the series' own scatter; None below three rows."""
    dev = ctx.consensus.deviation_percent
    values = [dev[p.row] for p in rows if ctx.status[p.row] == "ok" and p.row in dev
              and math.isfinite(dev[p.row])]
    if len(values) < 3:
        return None
    return float(np.std(values, ddof=1))


def _source_cause_reason(c) -> str | None:
    """One line for a source-level cause (another unit, another compound), None for none."""
    kind = (c or {}).get("kind")
    if kind == "pressure-unit":
        return f"printed in {c['real_unit']}, not {c['printed_unit']}: pressures ×{c['factor']:.6g}"
    if kind == "temperature-unit":
        return f"temperatures printed in {c['real_unit']}, not {c['printed_unit']}"
    if kind == "other-compound" and "dH_source_J_per_mol" in c:
        return (f"likely another compound: its slope implies ΔH {c['dH_source_J_per_mol'] / 1e3:.4g} "
                f"kJ/mol against {c['dH_consensus_J_per_mol'] / 1e3:.4g} kJ/mol from the others")
    if kind == "other-compound":
        return (f"likely another compound: {c['bias_percent']:+.3g} % off the others (as a thermometer error "
                f"{c['temperature_offset_K']:+.3g} K), beyond any gauge or thermometer error")
    return None


