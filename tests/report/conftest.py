"""Audit results to render, for the report tests.

``rich_result`` is built by hand so that every section of the report has
something to show while the fitting / enthalpy / source / triple-point checks
are written in parallel: water points on both branches from the IAPWS
releases (liquid: IAPWS-95 through ``iapws``; ice Ih: IAPWS R14-08(2011)
through ``iapws``), with planted faults whose verdicts are written down here,
and FitRecords whose ``model`` is a two-parameter Clausius–Clapeyron line
ln(p/Pa) = A + B/T fitted to those points.  The figures in the report are
therefore checked against the IAPWS data, not against the report's own
output.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np
import pytest

from audit.model import ColumnRole, Constant, Dataset, Metadata, Point
from audit.results import (AuditResult, Cause, CheckResult, EnthalpyValue, FitRecord, PointFlag,
                           PointVerdict, SourceAgreement, TriplePointRecord)
from tests.conftest import iapws_saturation_pressure, iapws_sublimation_pressure

from ..references.iapws95_enthalpy import MOLAR_MASS_G_PER_MOL, T_BOILING
from ..references.iapws_r10_06 import P_TRIPLE, T_TRIPLE
from ..references.wagner_pruss_2002 import TC

AUDIT_TIME = "2026-03-01T12:00:00Z"
R = 8.314462618  # J mol-1 K-1, CODATA 2018 exact value

#: rows planted as faulty, with the verdict the (hand-made) audit gives them
PLANTED = {
    5: ("reject", "decimal-shift"),   # liquid pressure printed ten times too large
    12: ("suspect", None),            # 1.5 % high: a warning only
    21: ("reject", "phase-label"),    # an ice point labelled liquid
}


@dataclass(frozen=True)
class LineModel:
    """ln(p/Pa) = A + B/T (T in K), the two-parameter Clausius–Clapeyron line."""

    A: float
    B: float

    def ln_p(self, T):
        return self.A + self.B / np.asarray(T, dtype=float)

    def p(self, T):
        return np.exp(self.ln_p(T))


def _fit_line(T, P):
    X = np.column_stack([np.ones_like(T), 1.0 / T])
    y = np.log(P)
    coef, *_ = np.linalg.lstsq(X, y, rcond=None)
    resid = y - X @ coef
    s2 = float(resid @ resid) / max(len(T) - 2, 1)
    cov = s2 * np.linalg.inv(X.T @ X)
    rms = 100 * float(np.sqrt(np.mean(np.expm1(resid) ** 2)))
    return LineModel(float(coef[0]), float(coef[1])), cov, rms


def build_result(*, source_names=("Lab A", "Lab B"), substance="water",
                 hostile_text: str | None = None, n_liquid: int = 16, n_solid: int = 8,
                 with_products: bool = True) -> AuditResult:
    """A complete AuditResult on IAPWS water data with the faults of ``PLANTED``."""
    T_liq = np.linspace(275.0, 370.0, n_liquid)
    T_sol = np.linspace(230.0, 272.0, n_solid)
    P_liq = iapws_saturation_pressure(T_liq)
    P_sol = iapws_sublimation_pressure(T_sol)
    T_all = np.concatenate([T_liq, T_sol])
    P_true = np.concatenate([P_liq, P_sol])
    phases = ["liquid"] * n_liquid + ["solid"] * n_solid
    P_printed = P_true.copy()
    if 5 <= len(P_printed):
        P_printed[4] *= 10.0
    if 12 <= len(P_printed):
        P_printed[11] *= 1.015
    if n_liquid + 5 <= len(P_printed) and n_liquid == 16 and n_solid == 8:
        phases[20] = "liquid"  # row 21 is ice (T < 273.16 K) but labelled liquid

    points, cells = [], []
    for i, (T, P) in enumerate(zip(T_all, P_printed)):
        row = i + 1
        src = source_names[i % len(source_names)] if source_names else None
        T_text = f"{T - 273.15:.2f}"
        P_text = f"{P / 1000:.5g}"
        if hostile_text and row == 3:
            T_text = hostile_text
        points.append(Point(row=row, T_K=float(T), P_Pa=float(P), phase=phases[i], source=src,
                            u_T_K=0.02, u_P_Pa=0.002 * float(P), T_text=T_text, P_text=P_text,
                            T_text_unit="degC", P_text_unit="kPa"))
        cells.append((T_text, P_text, phases[i], src or ""))
    # one unreadable row at the end
    points.append(Point(row=len(points) + 1, T_K=None, P_Pa=None, T_text="n/a", P_text="—",
                        status="unreadable", reason="temperature cell 'n/a' is not a number",
                        T_text_unit="degC", P_text_unit="kPa"))
    cells.append(("n/a", "—", "", ""))

    constants = {
        "T_triple": Constant(T_TRIPLE, "K", "IAPWS R14-08(2011)"),
        "P_triple": Constant(P_TRIPLE, "Pa", "IAPWS R14-08(2011)"),
        "T_critical": Constant(TC, "K", "IAPWS-95 (Wagner & Pruss 2002)"),
        "molar_mass": Constant(MOLAR_MASS_G_PER_MOL * 1e-3, "kg/mol", "IAPWS-95"),
    }
    notes = ("decimal separator: point", "temperatures read as degC (header 't / °C')")
    extra = {}
    if hostile_text:
        constants["T_boiling"] = Constant(T_BOILING, "K", hostile_text)
        notes = notes + (hostile_text,)
        extra = {"comment": hostile_text}
    ds = Dataset(
        points=tuple(points), header=("t / °C", "p / kPa", "phase", "source"), cells=tuple(cells),
        columns=(ColumnRole("T", "t / °C", "degC"), ColumnRole("P", "p / kPa", "kPa"),
                 ColumnRole("phase", "phase"), ColumnRole("source", "source", how="header")),
        metadata=Metadata(substance=hostile_text or substance, cas="7732-18-5", constants=constants,
                          extra=extra),
        file_name=(hostile_text or "water_planted") + ".csv", sha256="ab" * 32, file_format="csv",
        notes=notes,
    )

    # -- the verdicts (hand-made; what a correct audit says about the planted rows)
    status = {p.row: ("ok" if p.readable else "unreadable") for p in points}
    flags: dict[int, list[PointFlag]] = {}
    causes: dict[int, Cause] = {}
    for row, (st, kind) in PLANTED.items():
        if row > len(T_all):
            continue
        status[row] = st
        msg = {5: "12.3 σ above the consensus fit", 12: "3.1 σ above the consensus fit",
               21: "lies on the ice branch: 272 K is below the triple point"}[row]
        flags[row] = [PointFlag(row, "outliers", "fail" if st == "reject" else "warn", msg)]
        if kind == "decimal-shift":
            causes[row] = Cause(kind, "the pressure reads 10× the fitted value: a shifted "
                                "decimal point", None, float(P_true[row - 1]))
        elif kind == "phase-label":
            causes[row] = Cause(kind, "below the triple point the point follows the ice branch",
                                None, None)
    unread_row = len(points)
    flags[unread_row] = [PointFlag(unread_row, "readability", "fail", "temperature cell 'n/a' "
                                   "is not a number")]

    good_liq = [i for i in range(n_liquid) if status[i + 1] == "ok"]
    good_sol = [n_liquid + i for i in range(n_solid) if status[n_liquid + i + 1] == "ok"]
    fits, branch_model = [], {}
    for branch, idx in (("liquid", good_liq), ("solid", good_sol)):
        if len(idx) < 3:
            continue
        model, cov, rms = _fit_line(T_all[idx], P_printed[idx])
        branch_model[branch] = model
        fits.append(FitRecord(branch=branch, equation="Clausius–Clapeyron (2 parameters)",
                              parameters={"A": model.A, "B / K": model.B},
                              covariance=tuple(tuple(r) for r in cov),
                              T_range_K=(float(T_all[idx].min()), float(T_all[idx].max())),
                              n_used=len(idx), rms_percent=rms, model=model))

    verdicts = []
    for i, p in enumerate(points):
        dev = u = refdev = None
        branch = "solid" if p.row == 21 else p.phase
        if p.readable and branch in branch_model:
            fit_p = float(branch_model[branch].p(p.T_K))
            dev = 100 * (p.P_Pa - fit_p) / fit_p
            u = 100 * p.u_P_Pa / p.P_Pa
            refdev = 100 * (p.P_Pa - P_true[i]) / P_true[i]
        verdicts.append(PointVerdict(
            row=p.row, T_K=p.T_K, P_Pa=p.P_Pa, phase=branch if p.readable else p.phase,
            source=p.source, status=status[p.row], flags=tuple(flags.get(p.row, ())),
            cause=causes.get(p.row), residual_sigma={5: 12.3, 12: 3.1}.get(p.row),
            phase_inferred=False, deviation_percent=dev, u_percent=u,
            reference_deviation_percent=refdev))

    checks = (
        CheckResult("readability", "Readable temperature and pressure values", "fail",
                    "1 of 25 rows unreadable", {"n_unreadable": 1}),
        CheckResult("outliers", "Points far from the consensus fit", "fail",
                    "2 rejected, 1 suspect", {"n_reject": 2, "n_suspect": 1, "alpha": 0.001}),
        CheckResult("monotonic", "Pressure rises with temperature", "pass", "no falls",
                    {"n_violating_pairs": 0}),
        CheckResult("ancillary", "Agreement with a reference correlation", "skipped",
                    "no reference correlation known for this substance"),
    )
    if not with_products:
        fits, enthalpy, sources, tp, plot_data = (), (), (), None, {}
    else:
        enthalpy = []
        for fit in fits:
            B = fit.parameters["B / K"]
            uB = math.sqrt(fit.covariance[1][1])
            for T in np.linspace(*fit.T_range_K, 5):
                # ΔH_apparent = −R·B for the straight line (Clausius–Clapeyron)
                enthalpy.append(EnthalpyValue(fit.branch, float(T), -R * B * 0.998, R * uB, True,
                                              dH_apparent_J_per_mol=-R * B, delta_z=0.998))
        sources = tuple(SourceAgreement(s, 12, b, 0.1, t, pat, st) for s, b, t, pat, st in
                        zip(source_names or (), (0.35, -0.2, 0.0), (0.05, -0.03, 0.0),
                            ("constant offset", "random", "random"), ("warn", "pass", "pass")))
        tp = TriplePointRecord(273.2, 0.15, 612.5, 4.0, 6010.0, 300.0,
                               {"T_K": T_TRIPLE, "P_Pa": P_TRIPLE, "name": "IAPWS R14-08(2011)"})
        T_ref = np.linspace(275, 370, 30)
        plot_data = {
            "local_enthalpy": [{"branch": "liquid", "T_K": float(T), "dH_J_per_mol": 44500 - 50 * (T - 300),
                                "u_dH_J_per_mol": 400.0} for T in np.linspace(285, 360, 6)],
            "reference": {"name": "IAPWS-95", "curves": {"liquid": {
                "T_K": T_ref.tolist(), "P_Pa": iapws_saturation_pressure(T_ref).tolist()}}},
        }
    return AuditResult(
        dataset=ds, profile_name="default", profile_sha256="cd" * 32,
        profile_text='[profile]\nname = "default"\n', tool_version="0.1.0", audited_at=AUDIT_TIME,
        checks=checks, points=tuple(verdicts), fits=tuple(fits), enthalpy=tuple(enthalpy),
        sources=tuple(sources), triple_point=tp, notes=("fits exclude rejected rows",),
        plot_data=plot_data)


HOSTILE = '<script>alert(1)</script> file:///etc/passwd <img src="http://example.invalid/x.png">'


@pytest.fixture(scope="session")
def rich_result() -> AuditResult:
    return build_result()


@pytest.fixture(scope="session")
def hostile_result() -> AuditResult:
    return build_result(source_names=("<script>alert(1)</script>", "file:///etc/passwd",
                                      'http://example.invalid/x.png', '<img src="x.png">'),
                        hostile_text=HOSTILE)


@pytest.fixture(scope="session")
def bare_result() -> AuditResult:
    """A result with no fits, enthalpy, sources or triple point."""
    return build_result(source_names=(), with_products=False)


def _run_pipeline(ds):
    from audit.pipeline import run_audit
    from audit.profiles import load_profile

    return run_audit(ds, load_profile("default"), audited_at=AUDIT_TIME)


@pytest.fixture(scope="session")
def pipeline_fault_result() -> AuditResult:
    """A real run of the pipeline on IAPWS water data with a planted fault: the
    pressure of row 6 multiplied by 10 (a shifted decimal point), which makes
    p fall as T rises between rows 6 and 7."""
    from audit.model import from_arrays

    T = np.linspace(280.0, 370.0, 20)
    P = iapws_saturation_pressure(T)
    P[5] *= 10.0
    ds = from_arrays(T, P, substance="water", file_name="planted.csv")
    return _run_pipeline(ds)


def with_time(result: AuditResult, audited_at: str) -> AuditResult:
    return replace(result, audited_at=audited_at)


def _audit_bundled_demo(name: str) -> AuditResult:
    """The audit of a bundled demo table (SYNTHETIC data, see reports_demo/README.md)."""
    from importlib import resources

    from audit.cli import audit_file

    with resources.as_file(resources.files("audit.demo_data").joinpath(name)) as path:
        return audit_file(str(path), audited_at=AUDIT_TIME)[2]


@pytest.fixture(scope="session")
def demo_literature_result() -> AuditResult:
    return _audit_bundled_demo("literature_benzene.csv")


@pytest.fixture(scope="session")
def demo_supplier_result() -> AuditResult:
    return _audit_bundled_demo("supplier_toluene.csv")


#: the rows of the large compilation printed in kPa under its Pa header (×10⁻³), and the
#: source printed 4 % high throughout
LARGE_KPA_ROWS = tuple(range(101, 2001, 40))
LARGE_BIASED_SOURCE = "Series C (synthetic)"


@pytest.fixture(scope="session")
def large_compilation_result(tmp_path_factory) -> AuditResult:
    """2 000 SYNTHETIC rows of water vapor pressure in four invented series (IAPWS-IF97 region 4,
    ``iapws.iapws97._PSat_T``, 0.1–0.3 % noise), one series 4 % high, and 48 rows printed in
    kPa under the Pa header: a long report for the page budget."""
    from iapws.iapws97 import _PSat_T  # MPa

    from audit.cli import audit_file

    rng = np.random.default_rng(20261205)
    series = (("Series A (synthetic)", 0.0, 0.1), ("Series B (synthetic)", 0.0, 0.2),
              (LARGE_BIASED_SOURCE, 4.0, 0.15), ("Series D (synthetic)", 0.0, 0.3))
    lines = ["# SYNTHETIC DATA: water saturation pressure from IAPWS-IF97 with invented series",
             "T/K,p/Pa,phase,source,u(p)/%"]
    for row in range(1, 2001):
        name, bias, u = series[(row - 1) * 4 // 2000]
        T = float(rng.uniform(280.0, 600.0))
        P = _PSat_T(T) * 1e6 * (1 + bias / 100) * (1 + rng.normal(0.0, u / 100))
        if row in LARGE_KPA_ROWS:
            P /= 1000.0
        lines.append(f"{T:.3f},{P:.6g},liquid,{name},{u}")
    path = tmp_path_factory.mktemp("large") / "large_compilation.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return audit_file(str(path), audited_at=AUDIT_TIME)[2]


@pytest.fixture(scope="session")
def demo_sheet_result() -> AuditResult:
    """The check of the bundled demo supplier sheet (SYNTHETIC, reports_demo/README.md)."""
    from importlib import resources

    from audit.cli import audit_sheet_file

    with resources.as_file(resources.files("audit.demo_data").joinpath("supplier_toluene.sheet.toml")) as path:
        return audit_sheet_file(str(path), audited_at=AUDIT_TIME)[2]
