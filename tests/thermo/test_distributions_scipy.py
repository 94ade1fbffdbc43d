"""audit.thermo.distributions against the general-purpose libraries it stands in for.

References: ``scipy.stats`` (norm, t, chi2, f, levene with center='median') and
statsmodels ``robust.scale.qn_scale`` (Rousseeuw & Croux, J. Am. Stat. Assoc. 88,
1273 (1993)), evaluated here in the test, never by the audit.
"""

import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from scipy import stats
from statsmodels.robust.scale import qn_scale as sm_qn_scale

from audit.thermo import distributions as D

ROOT = Path(__file__).resolve().parents[2]


@pytest.mark.parametrize("z", [-8.0, -1.5, 0.0, 0.3, 2.0, 6.0, 12.0])
def test_normal_tails_match_scipy(z):
    assert D.normal_cdf(z) == pytest.approx(stats.norm.cdf(z), rel=1e-12, abs=1e-300)
    assert D.normal_sf(z) == pytest.approx(stats.norm.sf(z), rel=1e-12, abs=1e-300)


@pytest.mark.parametrize("p", [0.4, 0.05, 1e-3, 1e-10])
@pytest.mark.parametrize("dof", [1.0, 3.0, 7.5, 40.0, 1e5])
def test_critical_values_match_scipy(p, dof):
    assert D.normal_isf(p) == pytest.approx(stats.norm.isf(p), rel=1e-12)
    assert D.t_isf(p, dof) == pytest.approx(stats.t.isf(p, dof), rel=1e-9)


@pytest.mark.parametrize("x, dof", [(0.5, 1), (3.84, 1), (20.0, 5), (300.0, 200), (1e3, 3)])
def test_chi2_tail_matches_scipy(x, dof):
    assert D.chi2_sf(x, dof) == pytest.approx(stats.chi2.sf(x, dof), rel=1e-10, abs=1e-300)


@pytest.mark.parametrize("F, d1, d2", [(0.3, 1, 10), (4.96, 1, 10), (12.0, 2, 30), (2.5, 7.3, 19.6), (80.0, 1, 4)])
def test_f_tail_matches_scipy(F, d1, d2):
    assert D.f_sf(F, d1, d2) == pytest.approx(stats.f.sf(F, d1, d2), rel=1e-10)


@pytest.mark.parametrize("seed", range(5))
def test_brown_forsythe_matches_scipy_levene(seed):
    rng = np.random.default_rng(seed)
    groups = [rng.normal(0, s, n) for s, n in zip((1.0, 2.5, 0.7, 1.2), (8, 12, 3, 30))]
    assert D.levene_median_pvalue(*groups) == pytest.approx(
        stats.levene(*groups, center="median").pvalue, rel=1e-10)


def test_durbin_watson_matches_statsmodels():
    from statsmodels.stats.stattools import durbin_watson

    e = np.random.default_rng(3).standard_normal(40).cumsum()
    assert D.durbin_watson(e) == pytest.approx(float(durbin_watson(e)), rel=1e-12)


@pytest.mark.parametrize("n", [2, 3, 9, 50, 2000, 2001, 7000])
def test_qn_matches_statsmodels(n):
    rng = np.random.default_rng(n)
    x = rng.standard_t(3, n)
    x[: n // 5] = np.round(x[: n // 5], 1)  # ties, as printed data have
    assert D.qn_scale(x) == pytest.approx(float(sm_qn_scale(x)), rel=1e-12)


def test_qn_of_a_sample_mostly_tied_is_zero_as_in_statsmodels():
    x = np.r_[np.zeros(3000), np.arange(10.0)]
    assert D.qn_scale(x) == 0.0 == float(sm_qn_scale(x))


def test_an_audit_imports_neither_scipy_stats_nor_statsmodels(tmp_path):
    # 0.5 s of imports for a handful of tail probabilities: a one-table check must not pay it
    # water's saturation pressures, IAPWS-95 rounded to four digits (values from memory; this
    # test checks what is imported, not the values)
    table = tmp_path / "t.csv"
    table.write_text("T/K,P/kPa\n" + "".join(f"{t},{p}\n" for t, p in zip(
        (280, 290, 300, 310, 320, 330, 340, 350), (0.99, 1.92, 3.54, 6.23, 10.55, 17.21, 27.19, 41.68))))
    code = ("import sys; from audit.files import audit_file; audit_file(sys.argv[1], profile='default'); "
            "print(','.join(sorted(m for m in ('scipy.stats', 'statsmodels') if m in sys.modules)))")
    proc = subprocess.run([sys.executable, "-c", code, str(table)], capture_output=True, text=True, cwd=ROOT,
                          check=True)
    assert proc.stdout.strip().splitlines()[-1:] in ([], [""])
