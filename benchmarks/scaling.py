"""How four statistics routines scale with the number of rows: before and after.

For each routine, size n and version, a fresh subprocess builds SYNTHETIC
water data (IAPWS-IF97 region 4 saturation pressures, ``iapws.iapws97._PSat_T``,
with 10⁻⁴ relative noise; sublimation pressures of ice from IAPWS R14-08 below
273.16 K for the slope break), runs the routine ``--repeats`` times and
reports the median wall time, the tracemalloc peak (Python and numpy
allocations) and the growth of the resident set over the process's size
before the run (``ru_maxrss``; it also sees scipy's compiled siegelslopes,
whose tables tracemalloc does not).

Routines, "before" being the former algorithm:

* ``gls``     — the two one-parameter GLS fits of one source in
  ``source_offsets`` (n points, three-constant consensus from n/3 others):
  before, the dense V = diag(σ²) + J C Jᵀ and its Cholesky factor
  (``gls_one_parameter``, kept in the module); after, ``LowRankCovariance``.
* ``siegel``  — ``repeated_median_line``: before, ``scipy.stats.siegelslopes``
  (full n×n tables); after, per-point medians in row blocks.
* ``steps``   — ``enthalpy_steps``: before, one weighted fit per split (the
  former scan, kept as the reference copy in
  ``tests/thermo/test_scaling_equivalence.py`` and imported from there);
  after, running sums.
* ``break``   — ``find_slope_break``: likewise.

The dense GLS is O(n³) (about 450 s and 2.3 GB at 10⁴ rows); it is run only
up to ``--gls-before-max`` rows.  No assertions: this is a measurement.

Run:  python benchmarks/scaling.py [--sizes 1e3,3e3,1e4,3e4] [--repeats 3]
                                   [--routines gls,siegel,steps,break] [--gls-before-max 3e3]
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import time
import tracemalloc
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
ROUTINES = ("gls", "siegel", "steps", "break")


def _water(n, seed, lo=275.0, hi=370.0):
    """n SYNTHETIC (T [K], P [Pa]) pairs on the IAPWS-IF97 saturation line (region 4)."""
    import numpy as np
    from iapws.iapws97 import _PSat_T  # MPa

    rng = np.random.default_rng(seed)
    T = np.sort(rng.uniform(lo, hi, n))
    P = np.array([_PSat_T(float(t)) * 1e6 for t in T])
    return T, P * (1.0 + 1e-4 * rng.standard_normal(n))


def _ice_and_liquid(n, seed):
    import numpy as np
    from iapws._iapws import _Sublimation_Pressure  # MPa

    rng = np.random.default_rng(seed)
    n_ice = n // 2
    T_liq, P_liq = _water(n - n_ice, seed, 273.16, 300.0)
    T_ice = np.sort(rng.uniform(250.0, 273.16, n_ice))
    P_ice = np.array([_Sublimation_Pressure(float(t)) * 1e6 for t in T_ice])
    P_ice *= 1.0 + 1e-4 * rng.standard_normal(n_ice)
    return np.concatenate([T_ice, T_liq]), np.concatenate([P_ice, P_liq])


def _prepare(routine, version, n):
    """Return a zero-argument callable that runs one version of the routine on n rows."""
    import numpy as np

    if routine == "gls":
        from audit.thermo.fitting import fit_equation
        from audit.thermo.source_bias import LowRankCovariance, gls_one_parameter, gls_one_parameter_low_rank

        To, Po = _water(max(n // 3, 30), 2)
        T, P = _water(n, 3, 280.0, 365.0)
        sig_o, sig = np.full(To.size, 1e-4), np.full(n, 1e-4)
        fit = fit_equation(To, Po, "cc3", u_P=Po * sig_o, robust=True)
        r = np.log(P) - fit.equation.ln_p(T)
        J = fit.equation.jacobian_ln_p(T)
        cov = np.asarray(fit.covariance) * max(1.0, fit.scale) ** 2
        slope = fit.equation.dlnp_dT(T)
        if version == "before":
            def run():
                V = np.diag(sig ** 2) + J @ cov @ J.T
                return gls_one_parameter(np.ones(n), r, V), gls_one_parameter(-slope, r, V)
        else:
            def run():
                V = LowRankCovariance(sig ** 2, J, cov)
                return (gls_one_parameter_low_rank(np.ones(n), r, V),
                        gls_one_parameter_low_rank(-slope, r, V))
        return run
    if routine == "siegel":
        T, P = _water(n, 4)
        x, y = 1.0 / T, np.log(P)
        if version == "before":
            from scipy import stats
            return lambda: stats.siegelslopes(y, x)
        from audit.thermo.stats import repeated_median_line
        return lambda: repeated_median_line(x, y)
    sys.path.insert(0, str(ROOT))
    if routine == "steps":
        T, P = _water(n, 5)
        if version == "before":
            from tests.thermo.test_scaling_equivalence import _former_enthalpy_steps_scan as f
        else:
            from audit.thermo.enthalpy import enthalpy_steps as f
        return lambda: f(T, P)
    T, P = _ice_and_liquid(n, 6)
    if version == "before":
        from tests.thermo.test_scaling_equivalence import _former_slope_break_scan as f
    else:
        from audit.thermo.triple_point import find_slope_break as f
    return lambda: f(T, P, 4)


def _child(routine, version, n, repeats):
    import resource

    run = _prepare(routine, version, n)
    rss0 = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    times, peak = [], 0
    for i in range(repeats):
        if i == 0:
            tracemalloc.start()
        t0 = time.perf_counter()
        run()
        times.append(time.perf_counter() - t0)
        if i == 0:
            peak = tracemalloc.get_traced_memory()[1]
            tracemalloc.stop()
    # the first run is also traced (slower); report the median of the untraced ones when there are any
    untraced = times[1:] or times
    rss1 = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    print(json.dumps({"seconds": statistics.median(untraced), "traced_MB": peak / 1e6,
                      "rss_growth_MB": max(rss1 - rss0, 0) / 1e3}))


def _measure(routine, version, n, repeats, timeout):
    cmd = [sys.executable, __file__, "--child", routine, version, str(n), str(repeats)]
    try:
        out = subprocess.run(cmd, capture_output=True, text=True, timeout=timeout, cwd=ROOT,
                             env={**os.environ, "PYTHONPATH": str(ROOT)})
    except subprocess.TimeoutExpired:
        return None
    if out.returncode != 0:
        raise RuntimeError(out.stderr)
    return json.loads(out.stdout.strip().splitlines()[-1])


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", default="1e3,3e3,1e4,3e4", help="comma-separated row counts")
    ap.add_argument("--repeats", type=int, default=3, help="runs per measurement (median reported)")
    ap.add_argument("--routines", default=",".join(ROUTINES))
    ap.add_argument("--gls-before-max", type=float, default=3e3,
                    help="largest n for the dense (O(n³)) GLS")
    ap.add_argument("--before-max", type=float, default=1e4,
                    help="largest n for the other former (O(n²)) algorithms")
    ap.add_argument("--timeout", type=float, default=600.0, help="seconds per measurement")
    ap.add_argument("--child", nargs=4, help=argparse.SUPPRESS)
    a = ap.parse_args(argv)
    if a.child:
        routine, version, n, repeats = a.child
        _child(routine, version, int(n), int(repeats))
        return
    sizes = [int(float(s)) for s in a.sizes.split(",")]
    print(f"{'routine':8s} {'n':>6s} | {'before s':>9s} {'MB tr':>7s} {'MB rss':>7s} | "
          f"{'after s':>9s} {'MB tr':>7s} {'MB rss':>7s} | {'time ×':>8s} {'mem ×':>7s}")
    for routine in a.routines.split(","):
        limit = a.gls_before_max if routine == "gls" else a.before_max
        for n in sizes:
            # the slow versions are run once at the sizes where a run takes minutes
            before = (_measure(routine, "before", n, 1 if n >= 3000 else a.repeats, a.timeout)
                      if n <= limit else None)
            after = _measure(routine, "after", n, a.repeats, a.timeout)

            def cols(m):
                if m is None:
                    return f"{'—':>9s} {'—':>7s} {'—':>7s}"
                return f"{m['seconds']:9.4f} {m['traced_MB']:7.1f} {m['rss_growth_MB']:7.1f}"

            ratio_t = ratio_m = "—"
            if before and after:
                ratio_t = f"{before['seconds'] / max(after['seconds'], 1e-9):8.1f}"
                mb = max(before["traced_MB"], before["rss_growth_MB"])
                ma = max(after["traced_MB"], after["rss_growth_MB"])
                ratio_m = f"{mb / max(ma, 1e-3):7.1f}"
            print(f"{routine:8s} {n:6d} | {cols(before)} | {cols(after)} | {ratio_t:>8s} {ratio_m:>7s}",
                  flush=True)


if __name__ == "__main__":
    main()
