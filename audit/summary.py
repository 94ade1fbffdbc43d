"""Collect the audit's products (fits, enthalpy, sources, triple point)
from the final state of a run, once every check has had its say.

Checks leave their products in :attr:`AuditContext.shared`; this module only
gathers them (and the plot series the report draws), so that the reports
render and nothing is computed twice.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Mapping

from .context import AuditContext
from .results import EnthalpyValue, FitRecord, SourceAgreement, TriplePointRecord


@dataclass(frozen=True)
class Products:
    fits: tuple[FitRecord, ...] = ()
    enthalpy: tuple[EnthalpyValue, ...] = ()
    sources: tuple[SourceAgreement, ...] = ()
    triple_point: TriplePointRecord | None = None
    notes: tuple[str, ...] = ()
    plot_data: Mapping[str, Any] = field(default_factory=dict)
    deviation_percent: Mapping[int, float] = field(default_factory=dict)
    u_percent: Mapping[int, float] = field(default_factory=dict)
    reference_deviation_percent: Mapping[int, float] = field(default_factory=dict)


def summarise(ctx: AuditContext) -> Products:
    return Products(
        fits=tuple(ctx.shared.get("fit_records", ())),
        enthalpy=tuple(ctx.shared.get("enthalpy_records", ())),
        sources=tuple(ctx.shared.get("source_records", ())),
        triple_point=ctx.shared.get("triple_point_record"),
        plot_data=dict(ctx.shared.get("plot_data", {})),
    )
