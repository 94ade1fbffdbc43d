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


@dataclass(frozen=True)
class Products:
    fits: tuple[FitRecord, ...] = ()
    enthalpy: tuple[EnthalpyValue, ...] = ()
    sources: tuple[SourceAgreement, ...] = ()
    triple_point: TriplePointRecord | None = None
    transitions: tuple = ()
    notes: tuple[str, ...] = ()
    plot_data: Mapping[str, Any] = field(default_factory=dict)
    deviation_percent: Mapping[int, float] = field(default_factory=dict)
    u_percent: Mapping[int, float] = field(default_factory=dict)
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


def summarise(ctx: AuditContext) -> Products:
    from .checks._fits import implied, recommended

    fits: list[FitRecord] = []
    enthalpy: list[EnthalpyValue] = []
    notes: list[str] = []
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
                u_dH_J_per_mol=_finite(h.u_dH[i]), real_gas_corrected=corrected,
                dH_apparent_J_per_mol=float(h.dH_apparent[i]), delta_z=float(h.delta_z[i])))
    return Products(
        fits=tuple(fits),
        enthalpy=tuple(enthalpy),
        sources=every_source(ctx, ctx.source_records),
        triple_point=ctx.triple_point,
        transitions=tuple(ctx.transitions),
        notes=tuple(notes),
        plot_data=dict(ctx.plot_data),
        deviation_percent=dict(ctx.consensus.deviation_percent),
        u_percent=dict(ctx.consensus.u_percent),
        reference_deviation_percent=dict(ctx.reference_deviation_percent),
    )


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
                  "n_unreadable": n_unreadable, "cause": cause}
        if rec is not None and "not_analysed" not in rec.extra:
            if _source_cause_reason(rec.extra.get("cause")) is not None:
                reason = _source_cause_reason(rec.extra["cause"])
            elif rec.status == "ok":
                reason = "agrees with the other sources within its uncertainty"
            elif rec.pattern == "temperature-offset" and rec.temperature_offset_K is not None:
                reason = f"temperatures read {rec.temperature_offset_K:+.3g} K off the other sources"
            else:
                reason = f"pressures {rec.bias_percent:+.3g} % off the other sources"
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


def _finite(x) -> float | None:
    x = float(x)
    return x if math.isfinite(x) else None
