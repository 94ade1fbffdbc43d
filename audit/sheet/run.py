"""Audit a supplier's sheet: decode its coefficients, then run the sheet checks.

``run_sheet_audit(sheet, profile)`` is a pure function, like
:func:`audit.pipeline.run_audit`, and returns the same
:class:`~audit.results.AuditResult` (findings schema 1) with its ``sheet``
section filled: the sheet's table rows are the points, the decoded equation
is the fit, the enthalpy is the one it implies along the stated range.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..context import AuditContext
from ..errors import InputError
from ..model import ColumnRole, Constant, Dataset, Metadata, Point
from ..profiles import Profile
from ..results import AuditResult, CheckResult, FitRecord, PointVerdict, SheetRecord
from ..units import kelvin_affine, pascal_per
from .decode import DecodeSettings, Decoding, decode_sheet, pressure_unit_name
from .model import Sheet
from .readings import unit_label

__all__ = ["SheetContext", "run_sheet_audit", "sheet_dataset"]


@dataclass
class SheetContext(AuditContext):
    """The state the sheet checks share: the audit's context plus the sheet, its decoding
    and its reference (set before the checks run)."""

    sheet: Sheet | None = None
    decoding: Decoding | None = None
    reference: object = None
    deviation_percent: dict[int, float] = field(default_factory=dict)
    T_range_K: tuple[float, float] | None = None


def _library(sheet: Sheet) -> tuple[str | None, str | None, dict[str, Constant], str | None]:
    """(name, CAS, constants, note) of the sheet's substance from the property library."""
    from ..substances import library_constants

    key = sheet.cas or sheet.substance
    try:
        name, cas, constants = library_constants(key)
    except InputError as exc:
        return sheet.substance, sheet.cas, {}, f"{exc.problem}: no reference constants or correlation"
    if sheet.cas and cas != sheet.cas:
        cas = sheet.cas
    return sheet.substance or name, cas, constants, None


def sheet_dataset(sheet: Sheet, decoding: Decoding, metadata: Metadata) -> Dataset:
    """The sheet's table as a dataset in SI, its units those the decoding gives it (a table
    without units of its own shares the equation's)."""
    table = sheet.table
    if table is None:
        return Dataset(points=(), header=("T", "P"), cells=(), columns=(), metadata=metadata,
                       file_name=sheet.file_name, sha256=sheet.sha256, file_format="sheet")
    T_unit = table.T_unit if table.units_given else decoding.best.T_unit
    P_unit = table.P_unit if table.units_given else decoding.best.P_unit
    scale, offset = kelvin_affine(T_unit)
    factor = pascal_per(P_unit)
    points = []
    for r in table.rows:
        readable = r.T_value is not None and r.P_value is not None
        points.append(Point(
            row=r.row, T_K=None if r.T_value is None else scale * r.T_value + offset,
            P_Pa=None if r.P_value is None else factor * r.P_value, phase=sheet.phase,
            u_P_Pa=(None if table.u_P_percent is None or r.P_value is None
                    else factor * r.P_value * table.u_P_percent / 100),
            T_text=r.T_text, P_text=r.P_text, status="ok" if readable else "unreadable",
            reason=r.reason, T_text_unit=T_unit, P_text_unit=P_unit))
    header = (f"T/{unit_label(T_unit)}", f"p/{P_unit}")
    columns = (ColumnRole("T", header[0], T_unit, None, "the sheet" if table.units_given else "the decoding"),
               ColumnRole("P", header[1], P_unit, None, "the sheet" if table.units_given else "the decoding"))
    return Dataset(points=tuple(points), header=header, cells=tuple((r.T_text, r.P_text) for r in table.rows),
                   columns=columns, metadata=metadata, file_name=sheet.file_name, sha256=sheet.sha256,
                   file_format="sheet")


def decode_settings(profile: Profile) -> DecodeSettings:
    s = profile.settings("sheet-units")
    return DecodeSettings(decisive_ln=math.log1p(s["decisive_percent"] / 100),
                          min_dH_J_per_mol=1000 * s["min_dH_kJ_per_mol"],
                          max_dH_J_per_mol=1000 * s["max_dH_kJ_per_mol"],
                          trouton_band=tuple(s["trouton_band"]))


def run_sheet_audit(sheet: Sheet, profile: Profile, *, audited_at: str | None = None,
                    exclude_references: tuple[str, ...] = ()) -> AuditResult:
    """Audit one sheet under one profile.

    Parameters
    ----------
    sheet : Sheet
    profile : Profile
    audited_at : str, optional
        ISO 8601 time to record (default: now, or SOURCE_DATE_EPOCH).
    exclude_references : tuple of str
        Library reference sets to pass over (by a text in their name).
    """
    from .. import __version__
    from ..checks import all_checks
    from ..pipeline import _run_guarded, audit_time
    from .reference import sheet_reference

    name, cas, constants, library_note = _library(sheet)
    metadata = Metadata(substance=name, cas=cas, constants=constants)
    reference = sheet_reference(sheet, cas, exclude=exclude_references)
    values = {k: c.value for k, c in constants.items()}
    decoding = decode_sheet(sheet, reference, values, decode_settings(profile))
    dataset = sheet_dataset(sheet, decoding, metadata)
    notes = list(sheet.notes) + list(decoding.notes) + ([library_note] if library_note else [])
    T_range = decoding.best_evidence.T_range_K
    if T_range is not None and not (math.isfinite(T_range[0]) and math.isfinite(T_range[1])
                                    and 0 < T_range[0] < T_range[1]):
        notes.append(f"the range, read as {decoding.best.label}, is {T_range[0]:.5g}–{T_range[1]:.5g} K: not a "
                     "range of temperatures above 0 K, so nothing is evaluated over it")
        T_range = None
    ctx = SheetContext(dataset=dataset, profile=profile, sheet=sheet, decoding=decoding, reference=reference,
                       T_range_K=T_range)
    results: list[CheckResult] = []
    internal_errors: list[str] = []
    for check_id, check_cls in all_checks().items():
        if check_cls.applies_to != "sheet":
            continue
        if not profile.is_enabled(check_id):
            results.append(CheckResult(check_id, check_cls.title, "skipped", f"disabled in profile '{profile.name}'"))
            continue
        result = _run_guarded(check_cls, ctx, internal_errors)
        ctx.absorb(result)
        results.append(result)
    eq = decoding.equation
    # the equation is a fit of record only over a range; without one the sheet section keeps it
    fits = () if ctx.T_range_K is None else (FitRecord(
        branch=sheet.phase, equation=f"sheet {sheet.form}", parameters=dict(sheet.coefficients), covariance=(),
        T_range_K=ctx.T_range_K, n_used=0, rms_percent=_rms(ctx.deviation_percent),
        extra={"description": eq.describe(), "reading": decoding.best.label}, model=eq),)
    points = tuple(PointVerdict(
        row=p.row, T_K=p.T_K, P_Pa=p.P_Pa, phase=sheet.phase, source=None, status=ctx.status[p.row],
        flags=tuple(ctx.flags.get(p.row, ())), cause=ctx.causes.get(p.row),
        residual_sigma=ctx.residual_sigma.get(p.row), deviation_percent=ctx.deviation_percent.get(p.row),
        source_offset_percent=0.0 if p.row in ctx.deviation_percent else None)
        for p in dataset.points)
    return AuditResult(
        dataset=dataset, profile_name=profile.name, profile_sha256=profile.sha256, profile_text=profile.text,
        tool_version=__version__, audited_at=audit_time(audited_at), checks=tuple(results), points=points,
        fits=fits, enthalpy=tuple(ctx.plot_data.get("sheet_enthalpy", ())), notes=tuple(notes + ctx.notes),
        plot_data=dict(ctx.plot_data), internal_errors=tuple(internal_errors),
        sheet=sheet_record(sheet, decoding, reference, ctx))


def _rms(dev: dict[int, float]) -> float:
    v = [d for d in dev.values() if math.isfinite(d)]
    return float(np.sqrt(np.mean(np.square(v)))) if v else math.nan


def sheet_record(sheet: Sheet, decoding: Decoding, reference, ctx: SheetContext) -> SheetRecord:
    """The ``sheet`` section of the findings."""
    from .convert import si_coefficients

    def reading_dict(r):
        return {"gives": r.log, "T_unit": r.T_unit, "P_unit": pressure_unit_name(r.P_unit), "label": r.label}

    s = sheet.stated
    return SheetRecord(
        form=sheet.form, expression=sheet.expression, coefficients=dict(sheet.coefficients),
        stated={"gives": s.log, "T_unit": s.T_unit, "P_unit": s.P_unit, "range": list(sheet.T_range)
                if sheet.T_range else None},
        decoded=reading_dict(decoding.best), differs=decoding.differs, basis=decoding.basis,
        evidence=tuple({**reading_dict(e.reading), "misfit_ln": e.misfit, "reference_rms_ln": e.reference_ln,
                        "table_median_ln": e.table_ln, "boiling_point_ln": e.boiling_ln,
                        "violations": list(e.violations), "doubts": list(e.doubts), "summary": e.summary(),
                        "as_stated": e.matches_stated}
                       for e in decoding.candidates[:6]),
        T_range_K=ctx.T_range_K, si=si_coefficients(decoding.equation, ctx.T_range_K),
        reference=None if reference is None else {
            "name": reference.name, "T_min_K": reference.T_min, "T_max_K": reference.T_max,
            **dict(ctx.plot_data.get("sheet_reference_summary", {}))},
        supplier=sheet.supplier, product=sheet.product)
