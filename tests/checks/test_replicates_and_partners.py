"""Replicates and innocent partners in ``duplicates`` and ``monotonic``.

Check values: water's saturation pressure from IAPWS-95 (Wagner & Pruss,
J. Phys. Chem. Ref. Data 31, 387 (2002), doi:10.1063/1.1461829) through the
``iapws`` package (``tests.conftest.iapws_saturation_pressure``).  The
scatter, the replicates, the faults and the source labels ("Lab A", "Lab B")
are synthetic: drawn with a fixed seed from a log-normal scatter about the
IAPWS-95 curve and printed the way a paper prints them.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.stats import median_abs_deviation

from audit.frozen import thawed
from audit.model import Dataset, Point
from audit.pipeline import run_audit
from audit.thermo.replicates import (
    departure_from_median,
    median_departures,
    pooled_replicate_scale,
    replicate_groups,
)
from tests.checks._planted import water_table
from tests.conftest import iapws_saturation_pressure

CHECKS = ("duplicates", "monotonic")


def _check(result, check_id):
    return next(c for c in result.checks if c.id == check_id)


def _flagged_by(result, check_ids=CHECKS):
    return {p.row for p in result.points for f in p.flags if f.check in check_ids}


# -- the pure helpers ---------------------------------------------------------------------------

def test_pooled_scale_is_the_normal_mad_of_within_group_differences():
    # synthetic: 3000 groups of 4 replicates, σ = 0.2 in ln P
    rng = np.random.default_rng(7)
    x = rng.normal(0.0, 0.2, (3000, 4)) + rng.normal(0.0, 5.0, (3000, 1))  # group means differ widely
    groups = [np.arange(4 * g, 4 * g + 4) for g in range(3000)]
    scale, n = pooled_replicate_scale(x.ravel(), groups)
    assert n == 3000 * 6
    # independent computation: scipy's normal-consistent MAD about zero of the differences, /√2
    diffs = np.concatenate([[a[i] - a[j] for i in range(4) for j in range(i + 1, 4)] for a in x])
    expected = median_abs_deviation(diffs, center=lambda d, axis: 0.0, scale="normal") / math.sqrt(2)
    assert scale == pytest.approx(expected, rel=1e-12)
    # and it recovers the σ drawn: 18 000 correlated differences, the MAD's relative SE is ~1 %
    assert scale == pytest.approx(0.2, rel=0.04)
    assert math.isnan(pooled_replicate_scale([1.0, 2.0], [[0], [1]])[0])


def test_groups_follow_the_printed_resolution_with_complete_linkage():
    # "300" (±0.5 K) holds "300.3"; "300.1" and "300.2" (±0.05 K) are two temperatures
    T = [300.0, 300.3, 310.1, 310.2]
    radius = [0.5, 0.05, 0.05, 0.05]
    groups = replicate_groups(T, radius, [0.0] * 4, 2.0)
    assert [list(g) for g in groups] == [[0, 1], [2], [3]]
    # closely spaced rows do not chain: 300.00, 300.04, 300.08 at ±0.05 K → two groups
    groups = replicate_groups([300.0, 300.04, 300.08], [0.05] * 3, [0.0] * 3, 2.0)
    assert [list(g) for g in groups] == [[0, 1], [2]]
    # a stated u(T) = 0.1 K with k = 2 joins rows 0.25 K apart (2·√2·0.1 = 0.28 K)
    assert len(replicate_groups([300.0, 300.25], [0.005] * 2, [0.1, 0.1], 2.0)) == 1


def test_departures_of_a_pair_and_of_a_group():
    # a pair: each half the difference, σ half the combined σ (GUM §5 for a difference)
    d = median_departures([0.0, 0.1], [0.03, 0.04], [0.001, 0.003])
    assert list(d.departure) == pytest.approx([-0.05, 0.05])
    assert list(d.sigma) == pytest.approx([0.025, 0.025])
    assert list(d.resolution) == pytest.approx([0.002, 0.002])
    # five rows with one far off: the median stays with the four that agree
    d = median_departures([0.0, 0.01, -0.01, 0.005, 2.3], [0.01] * 5, [0.0] * 5)
    assert d.median == pytest.approx(0.005)
    assert d.departure[-1] == pytest.approx(2.295)
    assert d.sigma[0] == pytest.approx(0.01 * math.sqrt(1 + math.pi / 10))
    dep, sd, res = departure_from_median(2.3, 0.01, 0.001, [0.0, 0.01], [0.01, 0.01], [0.002, 0.002])
    assert (dep, sd, res) == pytest.approx((2.295, 0.01 * math.sqrt(1.5), 0.003))


# -- (a) replicates at ±20 % ---------------------------------------------------------------------

@pytest.mark.parametrize("seed", range(8))
def test_replicates_scattering_20_percent_are_not_conflicts(default_profile, seed):
    # synthetic: one source, 5 temperatures × 4 replicates, log-normal σ = 0.2 about IAPWS-95
    T = np.repeat([290.0, 310.0, 330.0, 350.0, 370.0], 4)
    ds, _ = water_table(T, noise=0.2, seed=seed, source="Lab A", phase="liquid")
    P = np.array([p.P_Pa for p in ds.points]).reshape(5, 4)
    # the groups do disagree far beyond the old fixed 1 %: the scatter, not the limit, decides
    assert np.all(P.max(axis=1) / P.min(axis=1) > 1.05)
    res = run_audit(ds, default_profile)
    assert not _flagged_by(res)
    assert [p.row for p in res.points if p.cause is not None] == []
    assert _check(res, "duplicates").metrics["n_replicate_groups"] == 5


# -- (b) one replicate 10× off in a precise group ---------------------------------------------

def _precise_with_slip(factor=10.0):
    # synthetic: 5 temperatures × 4 replicates at 0.1 % scatter; row 10 (320 K) printed 10× too large
    T = np.repeat([290.0, 305.0, 320.0, 335.0, 350.0], 4)
    return water_table(T, noise=0.001, seed=3, source="Lab A", phase="liquid",
                       edits={9: lambda t, p: (t, f"{float(p) * factor:.5g}")})[0]


def test_a_replicate_ten_times_off_is_flagged_and_its_partners_are_not(default_profile, profile_without):
    ds = _precise_with_slip()
    res = run_audit(ds, default_profile)
    assert res.points[9].status == "reject"  # by outliers
    dup = [f for f in res.points[9].flags if f.check == "duplicates"]
    assert len(dup) == 1 and "kept replicates of source 'Lab A' at 320 K (rows 9, 11, 12)" in dup[0].message
    departs = float(dup[0].message.split("P departs ")[1].split(" %")[0])
    assert departs == pytest.approx(900.0, rel=0.01)  # 10× is +900 %, the 0.1 % scatter aside
    assert _flagged_by(res) == {10}
    # judged by duplicates alone, it is the one suspect: the median of four stays with the three
    res = run_audit(ds, profile_without("outliers", "source-agreement"))
    assert _check(res, "duplicates").metrics["n_conflicting_rows"] == 1
    assert {p.row for p in res.points if p.status == "suspect"} == {10}


# -- (c) a handbook series printed to two significant digits ------------------------------------

def test_replicates_within_their_printed_digits_are_not_flagged(default_profile):
    # synthetic replicates 0.5 % either side of IAPWS-95, printed to 2 significant digits in kPa
    # (T to 0.01 K): where the rounding boundary falls between them they print one digit apart,
    # 1–10 % of P, which a fixed 1 % limit called a conflict
    pts, row = [], 0
    for t in np.arange(280.0, 372.0, 2.0):
        p = float(iapws_saturation_pressure([t])[0]) / 1000
        lo, hi = f"{p * 0.995:.2g}", f"{p * 1.005:.2g}"
        if lo == hi:
            continue
        assert float(hi) / float(lo) > 1.01
        for text in (lo, hi):
            row += 1
            pts.append(Point(row, t, float(text) * 1000, phase="liquid", T_text=f"{t:.2f}", P_text=text,
                             P_text_unit="kPa"))
    assert row >= 10
    res = run_audit(Dataset(points=tuple(pts)), default_profile)
    chk = _check(res, "duplicates")
    assert chk.metrics["n_replicate_groups"] == row // 2
    assert chk.metrics["n_conflicting_rows"] == 0 and not _flagged_by(res, ("duplicates",)), chk.message


# -- (d) two sources at one temperature are not replicates -------------------------------------

def test_two_sources_3_percent_apart_are_left_to_source_agreement(default_profile):
    # synthetic: Lab A and Lab B measure the same ten temperatures; Lab B reads 3 % high
    T = np.tile(np.linspace(290.0, 360.0, 10), 2)
    src = ["Lab A"] * 10 + ["Lab B"] * 10
    ds, _ = water_table(T, noise=0.001, seed=5, source=src, phase="liquid", P_scale={"Lab B": 1.03})
    res = run_audit(ds, default_profile)
    chk = _check(res, "duplicates")
    assert chk.status == "pass" and chk.metrics["n_replicate_groups"] == 0
    assert not _flagged_by(res, ("duplicates",))


# -- (e) no innocent partners ------------------------------------------------------------------

def test_a_rejected_row_drags_neither_its_replicate_nor_its_neighbour(default_profile):
    # synthetic: 13 temperatures 290–350 K; row 14 repeats 320 K (row 7) and is printed ×1000
    T = np.append(np.linspace(290.0, 350.0, 13), 320.0)
    ds, _ = water_table(T, noise=0.001, seed=11, phase="liquid",
                        edits={13: lambda t, p: (t, f"{float(p) * 1000:.5g}")})
    res = run_audit(ds, default_profile)
    assert res.points[13].status == "reject"  # by outliers
    # neither its replicate (row 7) nor its neighbour (row 8) is flagged by either check
    assert _flagged_by(res) == {14}
    mono, dup = _check(res, "monotonic"), _check(res, "duplicates")
    assert mono.status == "pass" and thawed(mono.metrics["pairs"]) == []
    assert thawed(mono.metrics["pairs_left_to_explained"]) == [[14, 8]]  # P falls from ×1000 at 320 K to 325 K
    assert "1 pair left to the rows already rejected or explained (row 14)" in mono.message
    assert dup.status == "pass" and dup.metrics["n_partners_left"] == 1
    assert "1 replicate row left to the 1 row already rejected or explained" in dup.message


def test_monotonic_partners_of_a_rejected_row_without_outliers_are_still_paired(profile_without):
    # without the outlier screening nothing is explained: the fall is a pair, as before
    T = np.linspace(290.0, 350.0, 13)
    ds, _ = water_table(T, noise=0.001, seed=11, phase="liquid",
                        edits={6: lambda t, p: (t, f"{float(p) * 1000:.5g}")})
    res = run_audit(ds, profile_without("outliers", "source-agreement"))
    assert thawed(_check(res, "monotonic").metrics["pairs"]) == [[7, 8]]


# -- (f) false flags on clean tables with replicates --------------------------------------------

def test_false_flag_rate_on_clean_tables_with_replicates(default_profile):
    # synthetic: 40 tables of 20 rows at 0.2 % log-normal scatter about IAPWS-95: 8 single
    # temperatures and 4 temperatures measured three times each, 280–370 K
    n_rows = n_flagged = 0
    for seed in range(40):
        rng = np.random.default_rng(1000 + seed)
        temps = np.sort(rng.choice(np.arange(280.0, 371.0, 2.5), 12, replace=False))
        T = np.concatenate([temps[:8], np.repeat(temps[8:], 3)])
        ds, _ = water_table(T, noise=0.002, seed=seed, source="Lab A", phase="liquid")
        res = run_audit(ds, default_profile)
        n_rows += len(res.points)
        n_flagged += len(_flagged_by(res))
    assert n_rows == 800
    assert n_flagged <= 0.01 * n_rows, f"{n_flagged} of {n_rows} rows flagged"


@pytest.mark.parametrize("seed", range(4))
def test_monotonic_allows_the_falls_a_scattered_series_makes(default_profile, seed):
    # synthetic: one source at 5 % log-normal scatter, 21 rows 0.2 K apart (IAPWS-95 rises ~1.2 %
    # per step): neighbours fall by several percent from noise alone, beyond the 0.5 % floor
    ds, _ = water_table(np.arange(300.0, 304.1, 0.2), noise=0.05, seed=seed, source="Lab A", phase="liquid")
    P = np.array([p.P_Pa for p in ds.points])
    assert np.any(P[1:] < P[:-1] * 0.995)
    res = run_audit(ds, default_profile)
    assert thawed(_check(res, "monotonic").metrics["pairs"]) == []


def test_a_replicate_of_a_small_scattered_source_is_judged_with_its_scale_uncertain(default_profile):
    # a clean acetone compilation (CoolProp curve; see the file's first line): one of three
    # replicates of 'Adams 1932' at 352.5 K departs -21.8 % from their median, 1.3 k sigma with sigma
    # known only from that source's rows and a prior's; at the Student t quantile of those degrees
    # of freedom (as outliers and monotonic judge a named source) that is the source's noise
    from pathlib import Path

    from audit.ingest import read_table

    path = Path(__file__).parents[1] / "regressions" / "data" / "clean_compilation_replicate_on_noise.csv"
    res = run_audit(read_table(path), default_profile)
    dup = next(c for c in res.checks if c.id == "duplicates")
    assert dup.status == "pass", dup.message


def test_coverage_for_a_source_follows_how_its_sigma_is_known():
    # Student t quantiles from scipy.stats, independently: a named source of 12 rows without stated
    # u(P) has 0.37·11 + 0.37·7 degrees of freedom (its MAD and the prior's, min_points_source_scale 8)
    from types import SimpleNamespace

    from scipy.stats import norm, t

    from audit.checks._util import coverage_for_source

    ctx = SimpleNamespace(dataset=SimpleNamespace(sources=("Lab A",)),
                          settings=lambda check: {"min_points_source_scale": 8})
    bare = [SimpleNamespace(u_P_Pa=None)] * 12
    stated = [SimpleNamespace(u_P_Pa=10.0)] * 12
    assert coverage_for_source(ctx, 3.0, "Lab A", bare) == pytest.approx(t.isf(norm.sf(3.0), 0.37 * 11 + 0.37 * 7))
    assert coverage_for_source(ctx, 3.0, "Lab A", stated) == 3.0
    assert coverage_for_source(ctx, 3.0, None, bare) == 3.0
