"""physical-range, duplicates, monotonic and readability on water data.

Check values: water's saturation pressure from IAPWS-95 (Wagner & Pruss,
J. Phys. Chem. Ref. Data 31, 387 (2002), doi:10.1063/1.1461829) through the
``iapws`` package; critical constants Tc = 647.096 K, pc = 22.064 MPa
(IAPWS R6-95(2018)).
"""

from __future__ import annotations

import numpy as np

from audit.frozen import thawed
from audit.model import Point, from_arrays
from audit.pipeline import run_audit
from tests.conftest import iapws_saturation_pressure

from ..references.wagner_pruss_2002 import PC, TC  # IAPWS R6-95(2018)


def _water(T, P=None, **kw):
    T = np.asarray(T, float)
    P = iapws_saturation_pressure(T) if P is None else np.asarray(P, float)
    return from_arrays(T, P, phase="liquid", **kw)


def _check(result, check_id):
    return next(c for c in result.checks if c.id == check_id)


def test_clean_iapws_water_passes_foundation_checks(default_profile):
    ds = _water(np.linspace(280, 640, 25), constants={"T_critical": TC, "P_critical": PC})
    res = run_audit(ds, default_profile)
    for cid in ("readability", "physical-range", "duplicates", "monotonic"):
        assert _check(res, cid).status == "pass", _check(res, cid).message
    assert [p.status for p in res.points] == ["ok"] * 25


def test_supercritical_and_nonpositive_rows_rejected(default_profile):
    T = np.array([300.0, 350.0, 660.0, 400.0, -5.0])
    P = iapws_saturation_pressure(np.array([300.0, 350.0, 400.0, 400.0, 300.0]))
    P[1] = 0.0  # zero pressure
    ds = from_arrays(T, P, constants={"T_critical": TC, "P_critical": PC})
    res = run_audit(ds, default_profile)
    chk = _check(res, "physical-range")
    assert chk.status == "fail"
    assert [p.status for p in res.points] == ["ok", "reject", "reject", "ok", "reject"]
    assert f"above the critical temperature {TC} K" in res.points[2].flags[0].message
    assert chk.metrics["n_outside"] == 3


def test_conflicting_duplicate_marks_both_rows(profile_without):
    T = np.array([300.0, 310.0, 310.0, 320.0])
    P = iapws_saturation_pressure(T)
    P[2] *= 1.06  # 6 % apart at the same temperature, above the 1 % default
    res = run_audit(from_arrays(T, P), profile_without("outliers"))
    chk = _check(res, "duplicates")
    assert chk.metrics["n_conflicting_rows"] == 2
    assert [p.status for p in res.points] == ["ok", "suspect", "suspect", "ok"]
    assert "from row 3" in res.points[1].flags[0].message


def test_pressure_falling_with_temperature_names_both_rows(profile_without):
    T = np.array([300.0, 305.0, 310.0, 315.0, 320.0])
    P = iapws_saturation_pressure(T)
    P[2], P[3] = P[3], P[2]  # pressures of rows 3 and 4 swapped: P falls from row 3 to row 4
    res = run_audit(from_arrays(T, P), profile_without("outliers"))
    chk = _check(res, "monotonic")
    assert chk.status == "fail"
    assert thawed(chk.metrics["pairs"]) == [[3, 4]]
    assert {p.row for p in res.points if p.status == "suspect"} == {3, 4}


def test_monotonic_compares_rows_of_the_same_source_only(profile_without):
    # Two series interleaved in T; series B reads 3 % high (a gauge error).  Row 2 (A, 301 K) then
    # lies below row 1 (B, 300 K) in pressure — a disagreement of the sources, not a fall
    # within a series (IAPWS-95 P rises 6.0 %/K here, so B's 3 % covers 0.5 K).  A fall inside
    # series A (rows 3 and 5 swapped) is still found.
    T = np.array([300.0, 300.2, 305.0, 305.1, 310.0, 310.1])
    src = ["B", "A", "A", "B", "A", "B"]
    P = iapws_saturation_pressure(T) * np.where(np.array(src) == "B", 1.03, 1.0)
    P[2], P[4] = P[4], P[2]
    res = run_audit(from_arrays(T, P, source=src), profile_without("outliers"))
    chk = _check(res, "monotonic")
    assert thawed(chk.metrics["pairs"]) == [[3, 5]]


def test_monotonic_respects_branches(default_profile):
    # ice below and liquid above Tt may interleave in a table sorted by source
    from tests.conftest import iapws_sublimation_pressure

    T = np.array([260.0, 300.0, 265.0, 310.0])
    P = np.concatenate([iapws_sublimation_pressure([260.0]), iapws_saturation_pressure([300.0]),
                        iapws_sublimation_pressure([265.0]), iapws_saturation_pressure([310.0])])
    res = run_audit(from_arrays(T, P, phase=["solid", "liquid", "solid", "liquid"]), default_profile)
    assert _check(res, "monotonic").status == "pass"


def test_unreadable_rows_are_kept_and_reported(default_profile):
    from audit.model import Dataset

    pts = (Point(1, 300.0, 3536.8, T_text="300", P_text="3536.8"),
           Point(2, None, None, T_text="310", P_text="6.2*", status="unreadable",
                 reason="pressure cell '6.2*' is not a number (footnote mark?)"))
    res = run_audit(Dataset(points=pts, header=("T/K", "P/Pa"), cells=(("300", "3536.8"), ("310", "6.2*"))),
                    default_profile)
    assert [p.status for p in res.points] == ["ok", "unreadable"]
    assert _check(res, "readability").status == "warn"
    assert "6.2*" in res.points[1].flags[0].message


def test_a_rejected_slip_does_not_make_its_neighbour_suspect(default_profile):
    # one pressure typed in kPa inside a Pa column (×1/1000): P falls to row 6.
    # The outlier screening rejects row 6; monotonic then judges the rows kept,
    # so row 5 — a correct IAPWS-95 value — stays ok.
    T = np.linspace(290.0, 350.0, 13)
    P = iapws_saturation_pressure(T)
    P[5] /= 1000.0
    res = run_audit(from_arrays(T, P, phase="liquid"), default_profile)
    assert res.points[5].status == "reject"
    assert [p.row for p in res.points if p.status != "ok"] == [6]
    assert _check(res, "monotonic").status == "pass"
