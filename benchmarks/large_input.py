"""Large inputs: time and peak memory of reading and auditing 5·10³ to 10⁶ rows.

Writes SYNTHETIC tables (water saturation pressures from IAPWS-IF97 region 4,
``iapws.iapws97._PSat_T``, with 0.1–0.3 % noise, four invented sources, one of
them 0.3 % high) to a temporary folder and, for each size, runs in a fresh
subprocess:

* ``read``  — ``read_table(FILE)`` alone, without a row limit (what the ingest
  costs, to show it grows in proportion to the file);
* ``check`` — ``python -m audit check FILE --substance water --format json``
  with the profile's row limit, as a user would run it: either the audit
  finishes, or it ends with the one row-limit message.

Each line gives the wall time (median of ``--repeats``), the CPU time of the
subprocess (user + system; less sensitive than the wall time to other work on
a shared machine), its peak resident memory (``ru_maxrss`` from ``os.wait4``),
the file size and the outcome.  ``--layout skewed`` puts 95 % of the rows in one source (the
costliest layout for the per-source comparison).  No assertions: this is a
measurement, not a test.

Run:  python benchmarks/large_input.py [--sizes 5e3,1e4,1e5,1e6] [--repeats 1]
                                       [--layout four|skewed] [--profile default]
"""

from __future__ import annotations

import argparse
import json
import os
import random
import signal
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]

#: (share of rows, source name, pressure bias [%], noise u(P) [%]) — invented sources
LAYOUTS = {
    "four": ((0.25, "Series A (synthetic)", 0.0, 0.1), (0.25, "Series B (synthetic)", 0.0, 0.2),
             (0.25, "Series C (synthetic)", 0.3, 0.15), (0.25, "Series D (synthetic)", 0.0, 0.3)),
    "skewed": ((0.95, "Series A (synthetic)", 0.0, 0.1), (0.05, "Series B (synthetic)", 0.0, 0.2)),
}

_READ_ONLY = """
import json, sys, time
t0 = time.perf_counter()
from audit.ingest import read_table
ds = read_table(sys.argv[1])
print(json.dumps({"seconds": time.perf_counter() - t0, "rows": len(ds.points)}))
"""


def write_table(path: Path, n: int, layout: str, seed: int = 1) -> None:
    """Write n SYNTHETIC rows of water vapor pressure (T/K, p/kPa, phase, source, u(p)/%)."""
    from iapws.iapws97 import _PSat_T  # returns MPa

    rng = random.Random(seed)
    sources = LAYOUTS[layout]
    cumulative, total = [], 0.0
    for share, *_ in sources:
        total += share
        cumulative.append(total)
    with open(path, "w", encoding="utf-8", newline="\n") as fh:
        fh.write("# SYNTHETIC DATA for benchmarks/large_input.py: water saturation pressure from\n"
                 "# IAPWS-IF97 (iapws package) with invented sources and noise\n")
        fh.write("T/K,p/kPa,phase,source,u(p)/%\n")
        for _ in range(n):
            x = rng.random()
            _, name, bias, u = next((s for c, s in zip(cumulative, sources) if x < c), sources[-1])
            T = rng.uniform(280.0, 620.0)
            P = _PSat_T(T) * 1e3 * (1 + bias / 100) * (1 + rng.gauss(0.0, u / 100))
            fh.write(f"{T:.3f},{P:.6g},liquid,{name},{u}\n")


def _run(cmd: list[str], timeout: float) -> tuple[float, float, float, int, str, str]:
    """(wall s, CPU s, peak RSS MB, exit code, stdout, stderr) of one fresh subprocess."""
    with tempfile.TemporaryFile("w+") as out, tempfile.TemporaryFile("w+") as err:
        t0 = time.perf_counter()
        proc = subprocess.Popen(cmd, stdout=out, stderr=err, cwd=ROOT, start_new_session=True)
        deadline = t0 + timeout
        while True:
            pid, status, usage = os.wait4(proc.pid, os.WNOHANG)
            if pid:
                break
            if time.perf_counter() > deadline:
                os.killpg(proc.pid, signal.SIGKILL)
                pid, status, usage = os.wait4(proc.pid, 0)
                status = -1
                break
            time.sleep(0.05)
        wall = time.perf_counter() - t0
        proc.returncode = 0  # reaped by wait4 above
        out.seek(0)
        err.seek(0)
        code = os.waitstatus_to_exitcode(status) if status != -1 else -1
        cpu = usage.ru_utime + usage.ru_stime
        return wall, cpu, usage.ru_maxrss / 1024.0, code, out.read(), err.read()


def _outcome(code: int, stdout: str, stderr: str, timeout: float) -> str:
    if code == -1:
        return f"timed out after {timeout:.0f} s"
    if code in (0, 1):
        first = stdout.splitlines()[0] if stdout else ""
        return "finished: " + first.split(": ", 1)[-1]
    return (stderr.strip().splitlines() or [f"exit code {code}"])[-1]


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", default="5e3,1e4,1e5,1e6", help="comma-separated row counts")
    ap.add_argument("--repeats", type=int, default=1, help="runs per size (median reported)")
    ap.add_argument("--layout", choices=sorted(LAYOUTS), default="four")
    ap.add_argument("--profile", default="default")
    ap.add_argument("--timeout", type=float, default=900.0, help="seconds per run before it is stopped")
    args = ap.parse_args(argv)
    sizes = [int(float(s)) for s in args.sizes.split(",")]

    print(f"layout {args.layout}, profile {args.profile}, {args.repeats} repeat(s), "
          f"{os.cpu_count()} CPU(s); SYNTHETIC water tables")
    print(f"{'rows':>9} {'file MB':>8} {'read s':>8} {'read MB':>8} {'check s':>8} {'CPU s':>7} "
          f"{'check MB':>9}  outcome")
    with tempfile.TemporaryDirectory(prefix="vpaudit-large-") as tmp:
        for n in sizes:
            data = Path(tmp) / f"water_{n}.csv"
            write_table(data, n, args.layout)
            size_mb = data.stat().st_size / 1e6
            reads, checks = [], []
            for _ in range(args.repeats):
                _, _, peak, code, out, err = _run([sys.executable, "-c", _READ_ONLY, str(data)], args.timeout)
                if code != 0:
                    raise SystemExit(f"read_table failed on {n} rows: {err.strip()[-400:]}")
                reads.append((json.loads(out)["seconds"], peak))
                cmd = [sys.executable, "-m", "audit", "check", str(data), "--substance", "water",
                       "--profile", args.profile, "--format", "json", "--out", str(Path(tmp) / f"out_{n}")]
                wall, cpu, peak, code, out, err = _run(cmd, args.timeout)
                checks.append((wall, cpu, peak, _outcome(code, out, err, args.timeout)))
            read_s = statistics.median(r[0] for r in reads)
            read_mb = max(r[1] for r in reads)
            check_s = statistics.median(c[0] for c in checks)
            cpu_s = statistics.median(c[1] for c in checks)
            check_mb = max(c[2] for c in checks)
            print(f"{n:9d} {size_mb:8.2f} {read_s:8.2f} {read_mb:8.0f} {check_s:8.1f} {cpu_s:7.1f} "
                  f"{check_mb:9.0f}  {checks[-1][3]}", flush=True)
            data.unlink()
    print("read: read_table alone, no row limit, in-process time; check: the whole "
          "'vpaudit check' subprocess (imports and the JSON report included), wall and CPU time; "
          "MB: peak RSS; load average at the end: " + " ".join(f"{x:.1f}" for x in os.getloadavg()))
    return 0


if __name__ == "__main__":
    sys.exit(main())
