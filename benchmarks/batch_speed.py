"""Speed of whole collections: process start, audit time against size, batch
throughput, memory, and Dask scale-out.

SYNTHETIC tables: water saturation pressures from IAPWS-IF97 region 4
(``iapws.iapws97._PSat_T``) with 0.1–0.3 % noise, written by
``benchmarks/large_input.py``'s ``write_table``.  Prints, for a plain 2-core CPU:

* whole-process ``vpaudit check`` of a 50-point file (JSON only) against the bare
  import of pandas + scipy + statsmodels in the same run (medians; ratio);
* in-process audit time per dataset at 20, 50, 200, 2 000 and 20 000 points,
  and the exponent of its growth between sizes;
* batch throughput on 50-point tables, JSON only and with HTML, local workers;
* peak resident memory of the batch's processes;
* the ratio of throughput with 2 Dask workers to 1.

Targets (issue: whole collections): check ≤ 1.2× the import floor and ≤ 1 s;
≥ 100 datasets/s JSON-only in batch; time per dataset no worse than n·log n;
10⁵ datasets in 20 min within 2 GB.  No assertions: a measurement.

Run:  python benchmarks/batch_speed.py [--repeats 3] [--tables 200] [--skip-large]
"""

from __future__ import annotations

import argparse
import math
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "benchmarks"))


def _wall(cmd, repeats):
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        subprocess.run(cmd, cwd=ROOT, capture_output=True, check=False)
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def _write_tables(folder: Path, n: int, size: int, seed: int = 1) -> None:
    from large_input import write_table

    folder.mkdir(parents=True, exist_ok=True)
    for k in range(n):
        write_table(folder / f"t{k:05d}.csv", size, "four", seed=seed + k)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeats", type=int, default=3)
    ap.add_argument("--tables", type=int, default=200, help="tables in each batch run")
    ap.add_argument("--skip-large", action="store_true", help="leave out the 20 000-point audit")
    args = ap.parse_args(argv)
    tmp = Path(tempfile.mkdtemp(prefix="vpaudit-batch-speed-"))
    py = sys.executable

    # 1. process start and a whole check against the import floor
    one = tmp / "one"
    _write_tables(one, 1, 50)
    floor = _wall([py, "-c", "import pandas, scipy.stats, statsmodels.api"], args.repeats)
    check = _wall([py, "-m", "audit", "check", str(one / "t00000.csv"), "--format", "json", "--out",
                   str(tmp / "check-out")], args.repeats)
    print(f"whole-process check, 50 points, JSON only: {check:.2f} s; import floor (pandas, scipy.stats, "
          f"statsmodels) {floor:.2f} s; ratio {check / floor:.2f} (target ≤ 1.2 and ≤ 1 s)")

    # 2. in-process audit time against size
    from audit.ingest import read_table
    from audit.pipeline import run_audit
    from audit.profiles import load_profile

    profile_path = tmp / "big.toml"
    profile_path.write_text('[profile]\nname = "big"\nextends = "default"\n[limits]\nmax_rows = 25000\n',
                            encoding="utf-8")
    prof = load_profile(str(profile_path))
    sizes = [20, 50, 200, 2000] + ([] if args.skip_large else [20000])
    per = {}
    for n in sizes:
        d = tmp / f"size{n}"
        _write_tables(d, 1, n, seed=7)
        ds = read_table(d / "t00000.csv", row_limit=prof.row_limit)
        run_audit(ds, prof)  # warm
        reps = args.repeats if n <= 2000 else 1
        times = []
        for _ in range(reps):
            t0 = time.perf_counter()
            run_audit(ds, prof)
            times.append(time.perf_counter() - t0)
        per[n] = statistics.median(times)
    line = ", ".join(f"{n}: {1000 * t:.0f} ms" for n, t in per.items())
    print(f"in-process audit time per dataset: {line}")
    grow = [f"{a}→{b}: n^{math.log(per[b] / per[a]) / math.log(b / a):.2f}" for a, b in zip(sizes, sizes[1:])]
    print(f"  growth between sizes: {', '.join(grow)} (n·log n is n^1.0–1.2 over these ranges)")

    # 3. batch throughput, local workers
    batch_in = tmp / "batch-in"
    _write_tables(batch_in, args.tables, 50, seed=100)
    rates = {}
    for fmt in ("json", "json,html"):
        out = tmp / f"batch-{fmt.replace(',', '-')}"
        t0 = time.perf_counter()
        subprocess.run([py, "-m", "audit", "batch", str(batch_in), "--out", str(out), "--jobs", "2", "--format", fmt,
                        "--no-progress"], cwd=ROOT, capture_output=True, check=False)
        rates[fmt] = args.tables / (time.perf_counter() - t0)
    usage = resource.getrusage(resource.RUSAGE_CHILDREN)
    print(f"batch of {args.tables} 50-point tables, 2 workers (whole command): JSON only {rates['json']:.1f}/s, "
          f"with HTML {rates['json,html']:.1f}/s (target ≥ 100/s JSON only)")
    print(f"  peak resident memory of a child process: {usage.ru_maxrss / 1024:.0f} MB")
    print(f"  10⁵ datasets at this rate: {1e5 / rates['json'] / 60:.0f} min (target ≤ 20 min)")

    # 4. Dask scale-out
    from audit.batch.jobs import collect_jobs
    from audit.batch.run import run_batch
    from audit.batch.work import BatchSettings

    jobs = collect_jobs([batch_in])
    dask_rates = {}
    for w in (1, 2):
        s = run_batch(jobs, BatchSettings(str(tmp / f"dask{w}"), formats=("json",)), workers=w, backend="dask",
                      progress=False)
        dask_rates[w] = len(s.outcomes) / s.seconds
    print(f"Dask LocalCluster: 1 worker {dask_rates[1]:.1f}/s, 2 workers {dask_rates[2]:.1f}/s, "
          f"ratio {dask_rates[2] / dask_rates[1]:.2f} (cluster start included)")
    print(f"(scratch folder {tmp}; cores {os.cpu_count()})")
    return 0


if __name__ == "__main__":
    sys.exit(main())
