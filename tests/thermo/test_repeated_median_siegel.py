"""Siegel's repeated-median line (A. F. Siegel, Biometrika 69, 242 (1982),
doi:10.1093/biomet/69.1.242), as the high-breakdown start of the outlier screen."""

import numpy as np
import pytest


def test_repeated_median_line_ignores_a_block_of_unit_slips_at_one_end():
    # Siegel (1982): 50 % breakdown.  Reference values: the line through exact
    # ln P = 20 − 5000/T that the 9 good points lie on; a block of 3 values printed
    # 1000× too high (a Pa/kPa slip) at the low-temperature end must not move it.
    # Tolerance 1e-9: the good points are exact, so the repeated medians are exact.
    from audit.thermo.stats import repeated_median_line

    T = np.linspace(280.0, 370.0, 12)
    y = 20.0 - 5000.0 / T
    y[:3] += np.log(1000.0)
    line = repeated_median_line(1.0 / T, y)
    assert line.slope == pytest.approx(-5000.0, rel=1e-9)
    assert line.intercept == pytest.approx(20.0, rel=1e-9)
    assert np.allclose(line.residuals[:3], np.log(1000.0), atol=1e-9)
    # least squares, by contrast, is dragged by the block
    slope_ls = np.polyfit(1.0 / T, y, 1)[0]
    assert abs(slope_ls + 5000.0) > 1000.0


def test_pairs_with_no_finite_slope_are_left_out_of_the_line():
    # Rows printed at 1e-320 K have 1/T = inf.  scipy's siegelslopes, which the line used
    # to hand such input to, never returned when every x was infinite (two fuzz tables,
    # seeds 45419 and 46127, stopped a campaign).  Reference: the exact line
    # ln P = 20 − 5000/T through the finite rows (Siegel 1982; exact data, so exact medians).
    from audit.thermo.stats import repeated_median_line

    T = np.linspace(280.0, 370.0, 9)
    x, y = 1.0 / T, 20.0 - 5000.0 / T
    x[[2, 6]] = np.inf
    line = repeated_median_line(x, y)
    assert line.slope == pytest.approx(-5000.0, rel=1e-9)
    assert line.intercept == pytest.approx(20.0, rel=1e-9)
    finite = np.isfinite(x)
    assert np.allclose(line.residuals[finite], 0.0, atol=1e-9)
    assert not np.isfinite(line.residuals[~finite]).any()
    # no finite pair at all: a level line at 0, every residual not finite
    every = repeated_median_line(np.full(9, np.inf), y)
    assert (every.slope, every.intercept) == (0.0, 0.0)
    assert not np.isfinite(every.residuals).any()


def test_beyond_max_partners_a_block_of_slips_still_does_not_move_the_line():
    # 6 000 points of the exact line ln P = 20 − 5000/T (reference values as above) with
    # noise of 0.2 %, and the 1 500 coldest printed 1000× too high: the line whose medians
    # are taken over 2 000 evenly spread partners keeps the good points' slope as the exact
    # repeated median does (Siegel 1982: breakdown 50 %), to within the noise's effect
    from audit.thermo.stats import repeated_median_line

    rng = np.random.default_rng(11)
    T = np.sort(rng.uniform(280.0, 370.0, 6000))
    y = 20.0 - 5000.0 / T + 0.002 * rng.standard_normal(T.size)
    y[:1500] += np.log(1000.0)
    sampled = repeated_median_line(1.0 / T, y)
    exact = repeated_median_line(1.0 / T, y, max_partners=T.size)
    assert sampled.slope == pytest.approx(-5000.0, rel=0.01)
    assert sampled.slope == pytest.approx(exact.slope, rel=0.01)
    assert np.median(np.abs(sampled.residuals[1500:])) < 0.003
