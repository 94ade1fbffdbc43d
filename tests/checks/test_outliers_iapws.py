"""Faults planted in IAPWS-95 water saturation pressures (iapws package), printed
like a table (T to 0.01 K, P in kPa to 5 significant figures, 0.1 % noise).

Each test asserts that the faulty row is rejected by ``outliers`` with the right
cause and suggested value, and that no other row is flagged by ``outliers``.
Suggested values: the fault is undone exactly in the printed text, so the
suggestion must equal the unfaulted printed value re-read (tolerance 1e-9
relative: floating point only) — except for unit slips, where the printed
value was rounded in the other unit (tolerance 0.1 %, i.e. 5 printed digits).
"""

import numpy as np
import pytest


from audit.pipeline import run_audit
from tests.checks._planted import water_table, with_stated_u

T_GRID = np.linspace(285.0, 365.0, 21)


def _outliers(res):
    return next(c for c in res.checks if c.id == "outliers")


def _audit(ds, default_profile):
    res = run_audit(ds, default_profile, audited_at="2024-01-01T00:00:00Z")
    return res, _outliers(res)


def _only_flagged(out, row):
    # the faulty row is rejected; no neighbour is rejected (a lone suspect from the 30 %
    # family-wise suspect level is tolerated, see the clean-table test)
    assert out.point_status.get(row) == "reject", out.point_status
    rejected = {r for r, s in out.point_status.items() if s == "reject"}
    assert rejected == {row}, out.point_status
    assert len(out.point_status) <= 2, out.point_status


def test_clean_table_has_no_outlier(default_profile):
    ds, _ = water_table(T_GRID, seed=3)
    _, out = _audit(ds, default_profile)
    # reject_alpha is a family-wise 1 % per table: no rejection expected.  suspect_alpha is a
    # family-wise 30 %, so a clean table may hold a suspect row (this noise draw has two values
    # near 2.4 σ); such a row is noise, so no cause may be claimed for it.
    assert "reject" not in out.point_status.values()
    assert len(out.point_status) <= 2
    assert not out.causes
    assert len(out.residual_sigma) == len(T_GRID)


def test_false_suspect_rate_on_clean_tables_matches_the_family_wise_level(default_profile):
    # 40 clean tables (seeds 100–139).  With suspect_alpha = 0.3 family-wise, the number of
    # tables with any suspect row is Binomial(40, 0.3) if the test is calibrated: mean 12,
    # P(X > 20) < 0.1 %.  Rejections: Binomial(40, 0.01), P(X > 2) < 1 %.
    alpha = default_profile.settings("outliers")["suspect_alpha"]
    assert alpha == pytest.approx(0.3)
    with_suspect = rejections = 0
    for seed in range(100, 140):
        ds, _ = water_table(T_GRID, seed=seed)
        _, out = _audit(ds, default_profile)
        with_suspect += bool(out.point_status)
        rejections += sum(1 for v in out.point_status.values() if v == "reject")
    assert with_suspect <= 20
    assert rejections <= 2


def test_a_suspect_row_alone_does_not_make_a_clean_table_warn(default_profile):
    # IAPWS-95 water, 300-370 K, 0.05 % noise (seed 1): row 4 lies 3.4 σ off, beyond the suspect
    # limit (family-wise 30 %) and within the reject limit; it is listed as suspect without a
    # cause, and the dataset's verdict stays pass
    from audit.model import from_arrays
    from tests.conftest import iapws_saturation_pressure

    rng = np.random.default_rng(1)
    T = np.linspace(300.0, 370.0, 20)
    P = iapws_saturation_pressure(T) * (1 + 5e-4 * rng.standard_normal(T.size))
    res, out = _audit(from_arrays(T, P, substance="water"), default_profile)
    assert out.point_status == {4: "suspect"} and not out.causes
    assert out.status == "pass" and "worth a look" in out.message
    assert res.verdict == "pass"


def test_a_row_with_a_likely_cause_warns(default_profile):
    # the same table clean (pass) and with two digits of row 11's temperature transposed
    # (325.00 printed 352.00): rejected with its cause, so the check warns
    ds0, _ = water_table(T_GRID, seed=4)
    _, out0 = _audit(ds0, default_profile)
    assert out0.status == "pass"
    ds, _ = water_table(T_GRID, seed=4, edits={10: lambda t, p: ("352.00" if t == "325.00" else t, p)})
    _, out = _audit(ds, default_profile)
    assert out.point_status.get(11) == "reject" and out.causes[11].kind == "digit-swap"
    assert out.status == "warn"


def test_transposed_pressure_digits(default_profile):
    ds0, _ = water_table(T_GRID, seed=4)
    i = 10
    good = ds0.points[i].P_text  # e.g. '31.198' -> swap the 2nd and 3rd digit

    def swap(t, p):
        d = list(p)
        j = 3 if d[2] == "." else 2
        k = j + 1 if d[j + 1] != "." else j + 2
        assert d[j] != d[k]
        d[j], d[k] = d[k], d[j]
        return t, "".join(d)

    ds, _ = water_table(T_GRID, seed=4, edits={i: swap})
    res, out = _audit(ds, default_profile)
    _only_flagged(out, i + 1)
    assert out.point_status[i + 1] == "reject"
    cause = out.causes[i + 1]
    assert cause.kind == "digit-swap"
    assert cause.suggested_P_Pa == pytest.approx(float(good) * 1e3, rel=1e-9)
    assert "σ" in cause.explanation and ds.points[i].P_text in cause.explanation


def test_value_printed_in_mmhg_in_a_kpa_column(default_profile):
    i = 6
    ds, P = water_table(T_GRID, seed=5, edits={i: lambda t, p: (t, f"{float(p) * 1e3 / 133.322387415:.5g}")})
    _, out = _audit(ds, default_profile)
    _only_flagged(out, i + 1)
    cause = out.causes[i + 1]
    assert cause.kind == "pressure-unit" and "mmHg" in cause.explanation
    assert cause.suggested_P_Pa == pytest.approx(P[i], rel=2e-3)  # 0.1 % noise + 5-digit rounding


def test_decimal_point_misplaced(default_profile):
    # a kPa value printed ten times too small: no pair of common units is a factor 10 apart
    # that way (10 kPa is no unit), so the reading is a misplaced decimal point
    i = 14
    ds, _ = water_table(T_GRID, seed=6, edits={i: lambda t, p: (t, f"{float(p) / 10:.5g}")})
    good = water_table(T_GRID, seed=6)[0].points[i].P_Pa
    _, out = _audit(ds, default_profile)
    _only_flagged(out, i + 1)
    cause = out.causes[i + 1]
    assert cause.kind == "decimal-shift"
    assert cause.suggested_P_Pa == pytest.approx(good, rel=1e-9)


@pytest.mark.parametrize("P_unit, factor, written_in", [("Pa", 1e-3, "kPa"), ("kPa", 10.0, "hPa"),
                                                        ("kPa", 1e-3, "MPa")])
def test_a_power_of_ten_that_is_a_unit_ratio_is_read_as_the_unit(default_profile, P_unit, factor, written_in):
    # a single value 1000 times too small in a Pa column is kPa written as Pa, not a decimal
    # point three places off: the two print the same, and the unit is the reading kept
    i = 9
    edit = {i: lambda t, p: (t, f"{float(p) * factor:.5g}")}
    ds, _ = water_table(T_GRID, seed=6, P_unit=P_unit, edits=edit)
    good = water_table(T_GRID, seed=6, P_unit=P_unit)[0].points[i].P_Pa
    _, out = _audit(ds, default_profile)
    _only_flagged(out, i + 1)
    cause = out.causes[i + 1]
    assert cause.kind == "pressure-unit" and f"written in {written_in}" in cause.explanation
    assert cause.suggested_P_Pa == pytest.approx(good, rel=1e-9)


def test_celsius_written_in_a_kelvin_column(default_profile):
    i = 8
    ds, _ = water_table(T_GRID, seed=7, edits={i: lambda t, p: (f"{float(t) - 273.15:.2f}", p)})
    _, out = _audit(ds, default_profile)
    rej = {r for r, s in out.point_status.items() if s == "reject"}
    assert rej == {i + 1}
    cause = out.causes[i + 1]
    assert cause.kind == "temperature-unit"
    assert cause.suggested_T_K == pytest.approx(T_GRID[i], abs=0.006)  # printed to 0.01 K


def test_transposed_temperature_digits_at_the_end_of_the_range(default_profile):
    # the last point has the highest leverage: the leave-one-out residual must still catch it
    i = len(T_GRID) - 1
    ds, _ = water_table(T_GRID, seed=8, edits={i: lambda t, p: (t[0] + t[2] + t[1] + t[3:], p)})
    assert ds.points[i].T_text == "356.00"
    _, out = _audit(ds, default_profile)
    _only_flagged(out, i + 1)
    cause = out.causes[i + 1]
    assert cause.kind == "digit-swap"
    assert cause.suggested_T_K == pytest.approx(365.0, abs=1e-9)


def test_heavily_rounded_low_pressure_is_not_an_outlier(default_profile):
    # Two significant figures at the low end: '1.2' kPa at 285 K is 2 % off the truth,
    # far beyond the 0.1 % noise but within its printed precision (u = 0.05/√3/1.2 = 2.4 %).
    T = np.linspace(285.0, 365.0, 21)
    ds, _ = water_table(T, seed=9, edits={0: lambda t, p: (t, f"{float(p):.2g}")})
    _, out = _audit(ds, default_profile)
    assert 1 not in out.point_status


def test_shared_products_for_the_report(default_profile):
    from audit.context import AuditContext
    from audit.checks.outliers import Outliers

    ds, _ = water_table(T_GRID, seed=10)
    ctx = AuditContext(dataset=ds, profile=default_profile)
    Outliers().run(ctx)
    branch = ctx.consensus.get("unknown")
    fit = branch.fit
    assert fit.n_used >= len(T_GRID) - 1  # the consensus fit of the points kept
    # the fit of record lists exactly the points it was fitted to, in order of temperature
    assert branch.fit_data.n == fit.n_used and np.all(np.diff(branch.fit_data.T) >= 0)
    dev = ctx.consensus.deviation_percent
    u = ctx.consensus.u_percent
    assert set(dev) == set(u) == {p.row for p in ds.points}
    # 0.1 % noise planted: deviations a few tenths of a percent at most, u about 0.1 %
    assert max(abs(v) for v in dev.values()) < 0.5
    assert 0.03 < np.median(list(u.values())) < 0.3


def test_block_of_unit_slips_at_the_low_end_of_a_short_table(default_profile):
    # 3 of 12 rows printed in Pa in a kPa column, at the low-temperature end, with stated
    # uncertainties: a least-squares start is dragged into the block and the robust fit then
    # keeps it; the repeated-median screen must not.  The suggested value re-reads the
    # printed text in Pa (tolerance 1e-9: floating point only).
    T = np.linspace(284.0, 356.0, 12)
    block = (1, 2, 3)
    edits = {i: (lambda t, p: (t, f"{float(p) * 1e3:.5g}")) for i in block}
    ds, _ = water_table(T, seed=12, edits=edits)
    ds = with_stated_u(ds, u_P_relative=0.001, u_T_K=0.01)
    _, out = _audit(ds, default_profile)
    rejected = {r for r, s in out.point_status.items() if s == "reject"}
    assert rejected == {i + 1 for i in block}, out.point_status
    for i in block:
        cause = out.causes[i + 1]
        assert cause.kind == "pressure-unit"
        assert cause.suggested_P_Pa == pytest.approx(ds.points[i].P_Pa / 1e3, rel=1e-9)


def test_a_celsius_value_below_zero_in_a_kelvin_column_gets_its_cause(tmp_path, default_profile):
    # ice Ih, 230-270 K (IAPWS R14-08 through iapws); row 6 (250 K) printed as -23.15 in the
    # kelvin column: physical-range rejects it before any fit (T < 0 K), and the cause is still
    # named once the curve is known
    from audit.ingest import read_table
    from tests.conftest import iapws_sublimation_pressure

    T = np.linspace(230.0, 270.0, 11)
    P = iapws_sublimation_pressure(T)
    lines = ["T/K,P/Pa,phase"] + [f"{t - 273.15 if k == 5 else t:.2f},{p:.5g},solid"
                                  for k, (t, p) in enumerate(zip(T, P))]
    path = tmp_path / "ice.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    res = run_audit(read_table(path), default_profile)
    row = res.points[5]
    assert row.status == "reject"
    assert any(f.check == "physical-range" for f in row.flags)
    assert row.cause is not None and row.cause.kind == "temperature-unit", row.flags
    assert row.cause.suggested_T_K == pytest.approx(250.0, abs=1e-9)
    assert [p.row for p in res.points if p.status != "ok"] == [6]


def test_a_kelvin_value_in_a_celsius_column_of_unlabelled_ice_is_judged_with_the_ice(tmp_path, default_profile):
    # ice Ih 230-270 K (IAPWS R14-08 through iapws), °C column, no phase column, water named;
    # row 6 printed as its kelvin value (250.00 in the °C column reads 523.15 K, above the triple
    # point): it must not become a one-row "liquid" branch that no fit judges
    from audit.cli import audit_file
    from tests.conftest import iapws_sublimation_pressure

    T = np.linspace(230.0, 270.0, 11)
    P = iapws_sublimation_pressure(T)
    lines = ["t/°C,P/Pa"] + [f"{t if k == 5 else t - 273.15:.2f},{p:.5g}" for k, (t, p) in enumerate(zip(T, P))]
    path = tmp_path / "ice_celsius.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    _, _, res = audit_file(str(path), substance="water")
    row = res.points[5]
    assert row.status == "reject" and row.phase == "solid"
    assert row.cause is not None and row.cause.kind == "temperature-unit"
    assert row.cause.suggested_T_K == pytest.approx(250.0, abs=1e-9)
    assert {p.phase for p in res.points} == {"solid"}


def test_a_liquid_row_labelled_solid_above_the_triple_point_gets_a_phase_label_cause(tmp_path, default_profile):
    # ice Ih 240-272 K (IAPWS R14-08) and liquid water 274-330 K (IAPWS-95), labelled; the row at
    # 300 K is labelled "solid": physical-range rejects it (a solid above the triple point), and as
    # printed it lies on the liquid curve, so triple-point names the label as its cause
    from audit.ingest import read_table
    from tests.conftest import iapws_saturation_pressure, iapws_sublimation_pressure

    Ti, Tl = np.linspace(240.0, 272.0, 9), np.linspace(274.0, 330.0, 12)
    rows = [(t, p, "solid") for t, p in zip(Ti, iapws_sublimation_pressure(Ti))]
    rows += [(t, p, "solid" if abs(t - 299.45) < 1 else "liquid") for t, p in zip(Tl, iapws_saturation_pressure(Tl))]
    path = tmp_path / "labels.csv"
    path.write_text("T/K,P/Pa,phase\n" + "".join(f"{t:.2f},{p:.6g},{ph}\n" for t, p, ph in rows), encoding="utf-8")
    # the metadata file beside the table gives the triple point, so physical-range sets the row aside
    (tmp_path / "labels.toml").write_text('[constants]\nT_triple = { value = 273.16, unit = "K", '
                                          'source = "IAPWS R10-06(2009)" }\n', encoding="utf-8")
    res = run_audit(read_table(path), default_profile, audited_at="2024-01-01T00:00:00Z")
    bad = [p for p in res.points if p.status == "reject"]
    assert [round(p.T_K, 2) for p in bad] == [299.45]
    assert any(f.check == "physical-range" for f in bad[0].flags)
    assert bad[0].cause is not None and bad[0].cause.kind == "phase-label", bad[0].flags
