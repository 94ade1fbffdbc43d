"""Consistency checks on water and ice data generated from the IAPWS releases.

Reference values:
- saturation pressure of liquid water, IAPWS-95 (Wagner & Pruss, J. Phys. Chem.
  Ref. Data 31, 387 (2002), doi:10.1063/1.1461829), and sublimation pressure of
  ice Ih, IAPWS R14-08(2011) (Wagner et al., J. Phys. Chem. Ref. Data 40, 043103
  (2011), doi:10.1063/1.3657937), both through the ``iapws`` package;
- triple point 273.16 K, 611.657 Pa (IAPWS R10-06(2009));
- enthalpies from IAPWS-95 and IAPWS-06 (computed with ``iapws`` 1.5.5):
  ΔH_vap(373.124 K) = 40.651 kJ/mol, ΔH_fus(Tt) = 6.007 kJ/mol, and the
  Clapeyron quantity ΔH/Δz = 44.061 kJ/mol at 298.15 K and 41.317 kJ/mol at
  373.124 K.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

from audit.model import from_arrays
from audit.pipeline import run_audit

from ..references.iapws95_enthalpy import DH_FUS_TT, DH_VAP_TB, T_BOILING
from ..references.iapws_r10_06 import P_TRIPLE, T_TRIPLE
from tests.conftest import iapws_saturation_pressure, iapws_sublimation_pressure


def _check(result, check_id):
    return next(c for c in result.checks if c.id == check_id)


def _ice_and_water(seed=7, labelled=True, noise_ice=0.001, noise_liq=0.0005):
    rng = np.random.default_rng(seed)
    Ts = np.linspace(230.0, 272.0, 12)
    Tl = np.linspace(274.0, 372.0, 25)
    Ps = iapws_sublimation_pressure(Ts) * (1 + noise_ice * rng.standard_normal(Ts.size))
    Pl = iapws_saturation_pressure(Tl) * (1 + noise_liq * rng.standard_normal(Tl.size))
    phase = ["solid"] * Ts.size + ["liquid"] * Tl.size if labelled else None
    return from_arrays(np.r_[Ts, Tl], np.r_[Ps, Pl], phase=phase, substance="water")


def test_ice_plus_liquid_table_gives_the_triple_point(default_profile):
    res = run_audit(_ice_and_water(), default_profile)
    tp = res.triple_point
    chk = _check(res, "triple-point")
    assert chk.status == "pass", chk.message
    # 12 ice points at 0.1 % and 25 liquid points at 0.05 %: the crossing is
    # determined to about 0.05 K (the curves differ in slope by only 0.97 %/K
    # at Tt); allow 3 u, and check the stated u is honest about it.
    assert abs(tp.T_K - T_TRIPLE) < 3 * tp.u_T_K
    assert tp.u_T_K < 0.1
    assert tp.P_Pa == pytest.approx(P_TRIPLE, rel=0.015)
    # ΔH_fus(Tt) = 6.007 kJ/mol (IAPWS-95 and IAPWS-06); extrapolated slopes: 2 %
    assert tp.dH_fus_J_per_mol == pytest.approx(DH_FUS_TT, rel=0.02)
    assert tp.reference["source"].startswith("IAPWS R10-06")


def test_unlabelled_ice_and_water_are_split_at_the_triple_point(default_profile):
    # no substance named: the slope break of the data is found and offered for confirmation
    ds = _ice_and_water(labelled=False)
    res = run_audit(replace(ds, metadata=replace(ds.metadata, substance=None)), default_profile)
    split = _check(res, "branch-split")
    assert split.status == "warn"  # inferred phases are worth confirming
    phases = [(p.T_K, p.phase) for p in res.points]
    assert all((ph == "solid") == (T < T_TRIPLE) for T, ph in phases)
    assert all(p.phase_inferred for p in res.points)
    assert all(p.to_dict()["phase_inferred_from"].startswith("the slope break at") for p in res.points)
    assert _check(res, "triple-point").status == "pass"


def test_unlabelled_water_is_split_at_the_known_triple_point_273_16_K(default_profile):
    # water named: its triple point (IAPWS R10-06: 273.16 K) decides the phases, no search
    res = run_audit(_ice_and_water(labelled=False), default_profile)
    split = _check(res, "branch-split")
    assert split.status == "pass", split.message
    assert split.metrics["T_triple_K"] == T_TRIPLE
    assert all((p.phase == "solid") == (p.T_K < T_TRIPLE) for p in res.points)
    assert all(f"{T_TRIPLE} K (IAPWS R10-06" in p.to_dict()["phase_inferred_from"] for p in res.points)
    assert _check(res, "triple-point").status == "pass"


def test_a_normal_melting_point_in_the_metadata_stands_in_for_the_triple_point(default_profile):
    # the normal melting point of water, 273.152519 K (IAPWS R10-06(2009), at 101.325 kPa), given
    # as a constant of an unnamed substance; rows 272.9 and 273.4 K lie on either side of it
    from audit.model import Constant

    T = np.r_[np.linspace(240.0, 272.9, 10), np.linspace(273.4, 330.0, 15)]
    P = np.r_[iapws_sublimation_pressure(T[:10]), iapws_saturation_pressure(T[10:])]
    Tm = Constant(273.152519, "K", "IAPWS R10-06(2009), normal melting point")
    res = run_audit(from_arrays(T, P, constants={"T_melting": Tm}), default_profile)
    assert _check(res, "branch-split").metrics["T_triple_K"] == pytest.approx(273.152519)
    assert [p.phase for p in res.points] == ["solid"] * 10 + ["liquid"] * 15


def test_unlabelled_liquid_water_named_water_is_liquid_and_compared_with_iapws_95(tmp_path):
    # 300-370 K without phase labels, audited as a user would with --substance water: the
    # library's triple point (chemicals) makes every row liquid, so the IAPWS-95 comparison runs
    from audit.cli import audit_file

    rng = np.random.default_rng(3)
    T = np.linspace(300.0, 370.0, 15)
    P = iapws_saturation_pressure(T) * (1 + 3e-4 * rng.standard_normal(T.size))
    path = tmp_path / "water.csv"
    path.write_text("T/K,P/Pa\n" + "".join(f"{t:.2f},{p:.6g}\n" for t, p in zip(T, P)), encoding="utf-8")
    _, _, res = audit_file(str(path), substance="water")
    assert {p.phase for p in res.points} == {"liquid"}
    assert all("chemicals" in p.to_dict()["phase_inferred_from"] for p in res.points)
    ref = _check(res, "reference-agreement")
    assert ref.status == "pass", ref.message
    assert "IAPWS" in ref.message
    assert res.verdict in ("pass", "warn")
    assert [e.branch for e in res.enthalpy] and {e.branch for e in res.enthalpy} == {"liquid"}


def test_enthalpy_at_the_normal_boiling_point_is_real_gas_corrected(default_profile):
    res = run_audit(_ice_and_water(), default_profile)
    liq = [e for e in res.enthalpy if e.branch == "liquid"]
    top = max(liq, key=lambda e: e.T_K)  # 372 K, nearest to Tb = 373.124 K
    assert top.real_gas_corrected
    # IAPWS-95 at 372 K: ΔH_vap = 40.70 kJ/mol (40.651 at 373.124 K, dΔH/dT ≈ −44 J/(mol K));
    # 25 points at 0.05 % noise: the slope at the range's end is good to ~0.5 %
    assert top.dH_J_per_mol == pytest.approx(DH_VAP_TB + 44 * (T_BOILING - 372.0), rel=0.006)
    # the apparent value is larger by 1/Δz; IAPWS-95 gives Δz = 0.98389 at Tb
    assert top.dH_apparent_J_per_mol / top.dH_J_per_mol == pytest.approx(1 / 0.98389, rel=0.002)


def test_water_0_to_100_C_is_curved_with_a_plausible_negative_dCp(default_profile):
    rng = np.random.default_rng(11)
    T = np.linspace(T_TRIPLE, 373.15, 30)
    P = iapws_saturation_pressure(T) * (1 + 0.0005 * rng.standard_normal(T.size))
    res = run_audit(from_arrays(T, P, phase="liquid", substance="water"), default_profile)
    chk = _check(res, "clapeyron-linearity")
    assert chk.status == "pass", chk.message
    m = chk.metrics["liquid"]
    assert m["curvature_p_value"] < 1e-6
    # the apparent ΔCp = d(ΔH/Δz)/dT; IAPWS-95 secant 298.15–373.124 K:
    # (41.317 − 44.061) kJ/mol / 74.97 K = −36.6 J/(mol K); the fitted value is a
    # tangent at T_ref ≈ 320 K, so allow 12 %
    assert m["dCp_J_per_mol_K"] == pytest.approx(-36.6, rel=0.12)
    fit = res.fits[0]
    assert fit.rms_percent < 0.07  # the noise is 0.05 %
    assert fit.equation != "clausius-clapeyron-2"


def test_reference_agreement_finds_a_pressure_scale_bias(default_profile):
    rng = np.random.default_rng(3)
    T = np.linspace(280.0, 360.0, 20)
    P = iapws_saturation_pressure(T) * (1 + 0.0005 * rng.standard_normal(T.size))
    clean = run_audit(from_arrays(T, P, phase="liquid", substance="water"), default_profile)
    assert _check(clean, "reference-agreement").status == "pass"
    biased = run_audit(from_arrays(T, P * 1.003, phase="liquid", substance="water"), default_profile)
    chk = _check(biased, "reference-agreement")
    assert chk.status == "warn"
    assert chk.metrics["liquid"]["bias_percent"] == pytest.approx(0.3, abs=0.03)
    assert biased.points[0].reference_deviation_percent == pytest.approx(
        100 * (P[0] * 1.003 / iapws_saturation_pressure([T[0]])[0] - 1), rel=1e-3)


def test_a_step_in_enthalpy_is_located(default_profile):
    # a second 'source' above 330 K whose pressures imply ΔH 2 kJ/mol higher
    # (continuous in P at 330 K): ln P gains (2000/R)(1/330 − 1/T)
    rng = np.random.default_rng(5)
    T = np.linspace(290.0, 370.0, 33)
    P = iapws_saturation_pressure(T) * (1 + 0.0003 * rng.standard_normal(T.size))
    R = 8.314462618
    P = np.where(T > 330.0, P * np.exp(2000.0 / R * (1 / 330.0 - 1 / T)), P)
    res = run_audit(from_arrays(T, P, phase="liquid", substance="water"), default_profile)
    chk = _check(res, "enthalpy-continuity")
    assert chk.status == "warn", chk.message
    m = chk.metrics["liquid"]
    assert m["step_T_K"] == pytest.approx(330.0, abs=5.0)
    assert m["step_dH_J_per_mol"] == pytest.approx(2000.0, rel=0.3)


def test_falling_pressure_implies_negative_enthalpy_and_fails(default_profile):
    T = np.linspace(290.0, 350.0, 12)
    P = iapws_saturation_pressure(T)[::-1].copy()
    res = run_audit(from_arrays(T, P, phase="liquid"), default_profile)
    assert _check(res, "enthalpy-continuity").status == "fail"
    assert res.verdict == "fail"


def test_curvature_of_one_liquid_branch_is_not_taken_for_a_triple_point(default_profile):
    # 280-370 K liquid water (IAPWS-95), unlabelled: two straight lines beat one
    # (ΔH falls by 4 % over the range), but one curved branch explains it; no substance is
    # named, so the data alone decide
    rng = np.random.default_rng(4)
    T = np.linspace(280.0, 370.0, 25)
    P = iapws_saturation_pressure(T) * (1 + 0.0005 * rng.standard_normal(T.size))
    res = run_audit(from_arrays(T, P), default_profile)
    split = _check(res, "branch-split")
    assert split.status == "pass"
    assert split.metrics["p_vs_one_curve_adjusted"] > 0.001
    assert {p.phase for p in res.points} == {"unknown"}


def _clean_compilation_csv(path, seed):
    """Five invented series of IAPWS-95 water: scatters 0.01-3 %, printed to 2-6 digits, replicates."""
    rng = np.random.default_rng(seed)
    series = (("Ames 1931", 280.0, 330.0, 12, 0.03, 2, 1), ("Brandt 1958", 300.0, 370.0, 20, 0.005, 3, 3),
              ("Cho 1977", 320.0, 372.0, 15, 5e-4, 5, 1), ("Dahl 1990", 274.0, 300.0, 8, 1e-4, 6, 1),
              ("Eng 2004", 290.0, 350.0, 18, 0.01, 3, 2))
    lines = ["source,T/K,P/kPa"]
    for name, lo, hi, n, scatter, digits, reps in series:
        for t in np.round(np.linspace(lo, hi, n), 2):
            for _ in range(reps):
                p = iapws_saturation_pressure([t])[0] * np.exp(scatter * rng.standard_normal()) / 1000.0
                lines.append(f"{name},{t:.2f},{p:.{digits}g}")
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


@pytest.mark.parametrize("seed", range(6))
def test_a_clean_compilation_has_smooth_enthalpy(tmp_path, default_profile, seed):
    # windows stay inside one source and weigh points by the consensus scatter of their
    # source; a window of values printed alike, or of two series' levels, is no slope
    from audit.ingest import read_table

    res = run_audit(read_table(_clean_compilation_csv(tmp_path / "water.csv", seed)), default_profile)
    chk = _check(res, "enthalpy-continuity")
    assert chk.status == "pass", chk.message
    m = chk.metrics["unknown"]
    assert m["windows_within"] == "source" and m["n_windows"] > 20


def _ice_or_liquid(T):
    T = np.atleast_1d(np.asarray(T, float))
    out = np.empty(T.size)
    ice = T < T_TRIPLE
    if ice.any():
        out[ice] = iapws_sublimation_pressure(T[ice])
    if (~ice).any():
        out[~ice] = iapws_saturation_pressure(T[~ice])
    return out


def _unlabelled_compilation(series, seed):
    """(source, T_lo, T_hi, n, scatter, level) -> a dataset of IAPWS water/ice without phase labels."""
    rng = np.random.default_rng(seed)
    T, P, src = [], [], []
    for name, lo, hi, n, scatter, level in series:
        t = np.linspace(lo, hi, n)
        T.append(t)
        P.append(_ice_or_liquid(t) * level * np.exp(scatter * rng.standard_normal(n)))
        src += [name] * n
    return from_arrays(np.concatenate(T), np.concatenate(P), source=src)


@pytest.mark.parametrize("seed", range(3))
def test_an_unlabelled_compilation_through_the_triple_point_is_split_there(default_profile, seed):
    # three invented series of ice Ih (IAPWS R14-08) and liquid water (IAPWS-95), one of them
    # 0.5 % high, scatters 0.2-1 %: the drop of ΔH by ΔH_fus at 273.16 K is found
    ds = _unlabelled_compilation((("Ames 1961", 240.0, 300.0, 16, 0.002, 1.0),
                                  ("Bell 1974", 280.0, 360.0, 12, 0.01, 1.005),
                                  ("Cruz 1990", 230.0, 272.0, 10, 0.005, 1.0)), seed)
    res = run_audit(ds, default_profile)
    split = _check(res, "branch-split")
    assert split.status == "warn" and "slope break" in split.message, split.message
    assert abs(split.metrics["T_break_K"] - T_TRIPLE) < 3.0
    assert res.triple_point is not None and abs(res.triple_point.T_K - T_TRIPLE) < 3 * res.triple_point.u_T_K + 0.5


@pytest.mark.parametrize("seed", range(3))
def test_an_unlabelled_liquid_compilation_of_unequal_series_is_one_branch(default_profile, seed):
    # liquid water 280-470 K (IAPWS-95) from four invented series of 0.01-5 % scatter and levels
    # within ±1 %: ΔH falls smoothly by 12 % over the range; no series change makes a phase change
    ds = _unlabelled_compilation((("Dore 1931", 285.0, 420.0, 30, 0.05, 0.99),
                                  ("Egan 1960", 280.0, 370.0, 25, 0.003, 1.0),
                                  ("Falk 1985", 330.0, 470.0, 28, 1e-4, 1.0),
                                  ("Gray 2001", 300.0, 450.0, 20, 0.01, 1.01)), seed)
    res = run_audit(ds, default_profile)
    split = _check(res, "branch-split")
    assert split.status == "pass", split.message
    assert {p.phase for p in res.points} == {"unknown"}


def test_gross_errors_do_not_move_the_phase_break(default_profile):
    # unlabelled ice Ih and liquid water, no substance named; row 3 printed in °C in the kelvin
    # column (a point near 0 K in 1/T) and rows 20-22 in kPa under a Pa header: the least-squares
    # break search, dragged by them, put the break anywhere; on the rows a robust line keeps it
    # finds 273.16 K (IAPWS R10-06)
    T = np.r_[np.linspace(232.0, 272.0, 17), np.linspace(274.0, 330.0, 19)]
    P = _ice_or_liquid(T) * (1 + 5e-4 * np.random.default_rng(9).standard_normal(T.size))
    T_printed = T.copy()
    T_printed[2] = T[2] - 273.15
    P[19:22] /= 1000.0
    res = run_audit(from_arrays(T_printed, P), default_profile)
    split = _check(res, "branch-split")
    assert split.status == "warn" and abs(split.metrics["T_break_K"] - T_TRIPLE) < 2.0, split.message
    good = [p for k, p in enumerate(res.points) if k not in (2, 19, 20, 21)]
    assert all((p.phase == "solid") == (p.T_K < T_TRIPLE) for p in good)


def test_window_of_a_small_scattered_source_is_judged_with_its_scale_uncertain(default_profile):
    # a clean toluene compilation (see the file's first line): five rows of one source scattering
    # 5 % make a window 4.2 u off the smooth ΔH, u from a σ known from those five rows and a prior;
    # with the Student t quantile for that σ's few degrees of freedom this is noise, not a cluster
    from pathlib import Path

    from audit.ingest import read_table

    path = Path(__file__).parents[1] / "regressions" / "data" / "clean_compilation_window_on_noise.csv"
    res = run_audit(read_table(path), default_profile)
    assert _check(res, "enthalpy-continuity").status == "pass", _check(res, "enthalpy-continuity").message


def test_a_bent_stretch_of_a_large_named_source_is_still_flagged(default_profile):
    # IAPWS-95 water, two named series of 80 rows at 1 %; in one, six neighbouring rows (41-46)
    # carry a ramp of 0 to +7 % in P, a local slope no smooth ΔH follows.  Each source's σ is known
    # with 0.37·(n − 1) + 0.37·(8 − 1) degrees of freedom (its MAD and the prior's), so the limit
    # is the Student t quantile of the one-sided probability of 4 σ (scipy.stats, independently)
    from scipy.stats import norm, t

    rng = np.random.default_rng(12)
    T = np.concatenate([np.linspace(290.0, 370.0, 80), np.linspace(292.0, 368.0, 80)])
    P = iapws_saturation_pressure(T) * (1 + 0.01 * rng.standard_normal(T.size))
    P[40:46] *= 1 + np.linspace(0.0, 0.07, 6)
    res = run_audit(from_arrays(T, P, phase="liquid", source=["Lab A"] * 80 + ["Lab B"] * 80), default_profile)
    chk = _check(res, "enthalpy-continuity")
    assert chk.status == "warn", chk.message
    import re

    n_used = sum(p.status != "reject" for p in res.points if p.source == "Lab A")  # rows the fit used
    limit = t.isf(norm.sf(4.0), 0.37 * (n_used - 1) + 0.37 * 7)
    printed = float(re.search(r"limits ([0-9.]+) u", chk.message).group(1))
    assert printed == pytest.approx(limit, abs=0.005)
    flagged = {f.row for f in chk.flags}
    assert flagged and flagged <= set(range(38, 50))


def test_unlabelled_ice_with_positive_dcp_is_not_taken_for_a_bad_liquid(default_profile):
    # ice Ih at 180-245 K from IAPWS R14-08, two series without phase labels: the sublimation
    # curve's own ΔCp is positive here (vapour minus crystal), as a straight-plus-log-T fit of the
    # exact IAPWS values shows (numpy least squares, below).  With the phase not known the sign is
    # reported, not flagged.  (The equation of record still refuses a curve with ΔH rising on a
    # branch of unknown phase — without that rule a curve bends through a series in °C under a
    # kelvin header and the rest — so the straight line's residual runs may still warn.)
    rng = np.random.default_rng(5)
    T = np.concatenate([np.linspace(180, 240, 20), np.linspace(185, 245, 18)])
    exact = iapws_sublimation_pressure(T)
    X = np.column_stack([np.ones_like(T), 1 / T, np.log(T)])
    C_exact = np.linalg.lstsq(X, np.log(exact), rcond=None)[0][2]
    assert C_exact > 0
    P = exact * (1 + 0.0005 * rng.standard_normal(T.size))
    res = run_audit(from_arrays(T, P, source=["Lab A"] * 20 + ["Lab B"] * 18), default_profile)
    chk = _check(res, "clapeyron-linearity")
    m = chk.metrics["unknown"]
    assert m["dCp_J_per_mol_K"] == pytest.approx(8.314462618 * C_exact, abs=3 * m["u_dCp_J_per_mol_K"] + 0.5)
    assert "possible for a sublimation" in chk.message
    assert not any("ΔH rising" in f.message for f in chk.flags)


def test_positive_dcp_of_a_labelled_liquid_is_flagged(default_profile):
    # IAPWS-95 water at 280-370 K printed at temperatures stretched 1.5-fold about 280 K (a
    # thermometer scale error): the implied ΔH then rises with T, impossible for a vaporization
    rng = np.random.default_rng(5)
    T = np.linspace(280, 370, 25)
    P = iapws_saturation_pressure(T) * (1 + 0.0005 * rng.standard_normal(T.size))
    res = run_audit(from_arrays(280 + (T - 280) * 1.5, P, phase="liquid"), default_profile)
    chk = _check(res, "clapeyron-linearity")
    assert chk.status == "warn" and "ΔH rising with T" in chk.message
    assert chk.metrics["liquid"]["dCp_J_per_mol_K"] > 0


def test_reference_agreement_does_not_judge_a_one_row_source_against_zero_scatter(default_profile):
    # two sources of 12 rows at 0.05 % noise and a third of one row printed to three significant
    # digits (rounding up to ±0.5 % here), 0.3 % off IAPWS-95 by its rounding alone: its bias has
    # no sample scatter, and its own uncertainty (the consensus's, at least its rounding) is the
    # floor — it must not be flagged against the tolerance alone (it was, limit 0.1 %)
    rng = np.random.default_rng(11)
    T = np.concatenate([np.linspace(290.0, 360.0, 24), [325.0]])
    P = iapws_saturation_pressure(T) * (1 + 0.0005 * rng.standard_normal(T.size))
    P[-1] = float(f"{iapws_saturation_pressure([325.0])[0] * 1.003:.3g}")
    src = ["A", "B"] * 12 + ["C"]
    res = run_audit(from_arrays(T, P, phase="liquid", source=src, substance="water"), default_profile)
    chk = _check(res, "reference-agreement")
    assert abs(chk.metrics["liquid/C"]["bias_percent"]) > 0.1  # beyond the tolerance alone
    assert chk.metrics["liquid/C"]["u_bias_percent"] > 0.05
    assert chk.status == "pass"
