"""Long fuzzing campaign of the whole audit: many generated tables, failures by kind.

Every table is SYNTHETIC and drawn by the generator of ``tests/fuzz/tables.py``
(the same one the fast profile in ``make test`` uses) from a seeded
``random.Random``: table ``i`` of a campaign is ``table_for_seed(seed + i)``,
so a campaign is deterministic per seed and one failing table is re-created
from its seed alone.  Each table is written in its layout and encoding, read,
audited under the default profile, findings.json and annotated.csv are written
(``--reports K``: HTML and PDF too for the first K tables), and the contract is
checked (see ``tests.fuzz.tables.run_table``).

Prints the number of runs and outcomes, failures by kind (stage, exception
type, innermost ``audit/`` frame, message head) with the first seed of each,
the 10 slowest tables with their row counts, the runs over 10 s, the most
common InputError messages and warnings.  ``--save-failures DIR`` writes each
failing input to ``DIR/raw/`` and one minimised reproducer per kind to ``DIR``
(the file as generated, its metadata, ``.spec.json`` for
``tests/fuzz/test_fuzz_audit.py`` and ``.txt`` with the traceback).

Target: 0 failures in >= 10 000 tables; no run over 10 s at <= 300 rows.

``--sheets``: supplier sheets instead of tables, drawn by ``tests/fuzz/sheets.py``
(families realistic, wild, expression, hostile) and checked by its
``run_sheet``; ``--save-failures`` then writes each failing sheet as it was
generated (``DIR/raw/``) and the first of each kind as ``DIR/sheet_<kind>.toml``
with its traceback beside, not minimised (a sheet is small: cut it by hand
before it goes to ``tests/fuzz/found/``).

Run:  python benchmarks/fuzz_campaign.py [--tables 10000] [--seed 0] [--jobs 2]
          [--family realistic] [--save-failures DIR] [--reports 0] [--timeout 120] [--sheets]
"""

from __future__ import annotations

import argparse
import os
import re
import signal
import sys
import tempfile
import time
from collections import Counter, defaultdict
from multiprocessing import Pool
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ.setdefault(_var, "1")  # one thread per worker: --jobs decides the parallelism

from tests.fuzz.tables import (Failure, Outcome, minimise, run_table, table_for_seed,  # noqa: E402
                               table_to_json)

SLOW_S = 10.0


class _Timeout(Exception):
    pass


def _alarm(signum, frame):
    raise _Timeout()


def _timed(run, timeout: int, n_rows: int) -> "Outcome":
    """``run(folder)`` in a scratch folder, a timeout counted as a failure (SIGALRM)."""
    signal.signal(signal.SIGALRM, _alarm)
    signal.alarm(timeout)
    with tempfile.TemporaryDirectory(prefix="vpaudit-fuzz-") as folder:
        try:
            return run(Path(folder))
        except _Timeout:
            return Outcome("failure", (Failure("timeout", "Timeout", f"no result within {timeout} s"),),
                           seconds=float(timeout), n_rows=n_rows, cpu_seconds=float(timeout))
        finally:
            signal.alarm(0)


def _report(seed: int, outcome, rows: int, family: str, layout: str) -> dict:
    """An outcome as plain data (picklable), the same for a table and a sheet."""
    return {"seed": seed, "kind": outcome.kind, "seconds": outcome.seconds, "cpu": outcome.cpu_seconds, "rows": rows,
            "family": family, "layout": layout,
            "failures": [(f.key, f.stage, f.exc_type, f.frame, str(f), f.trace) for f in outcome.failures],
            "message": outcome.message, "warnings": list(outcome.warnings)}


def _run(job) -> dict:
    """One table in a worker: its outcome as plain data (picklable)."""
    seed, family, formats, timeout = job
    table = table_for_seed(seed, family)
    outcome = _timed(lambda folder: run_table(table, folder, formats), timeout, len(table.rows))
    return _report(seed, outcome, len(table.rows), table.family, f"{table.layout}/{table.encoding}")


def _run_sheet(job) -> dict:
    """One sheet in a worker, reported like a table (see ``_run``)."""
    from tests.fuzz.sheets import run_sheet, sheet_for_seed

    seed, family, formats, timeout = job
    case = sheet_for_seed(seed, family)
    outcome = _timed(lambda folder: run_sheet(case, folder, formats), timeout, 0)
    return _report(seed, outcome, outcome.n_rows, case.family, "sheet/toml")


def _save_sheets(out: Path, results: list, by_key: dict, family) -> None:
    from tests.fuzz.sheets import sheet_for_seed

    (out / "raw").mkdir(parents=True, exist_ok=True)
    for r in results:
        if r["failures"]:
            (out / "raw" / f"sheet-seed-{r['seed']}.toml").write_bytes(sheet_for_seed(r["seed"], family).data)
    for hits in by_key.values():
        r, f = hits[0]
        name = "sheet_" + _slug(f[1], f[2], f[3])
        if not (out / f"{name}.toml").exists():
            (out / f"{name}.toml").write_bytes(sheet_for_seed(r["seed"], family).data)
            (out / f"{name}.txt").write_text(f"seed {r['seed']}\n{f[4]}\n\n{f[5]}\n", encoding="utf-8")
            print(f"saved {out / name}.toml (seed {r['seed']})")


def _same_kind(key_parts):
    stage, exc_type, frame = key_parts

    def still_fails(table) -> bool:
        with tempfile.TemporaryDirectory(prefix="vpaudit-min-") as folder:
            out = run_table(table, Path(folder))
        return any((f.stage, f.exc_type, f.frame) == (stage, exc_type, frame) for f in out.failures)

    return still_fails


def _minimise(job) -> tuple:
    seed, family, parts, timeout = job
    table = table_for_seed(seed, family)
    signal.signal(signal.SIGALRM, _alarm)
    signal.alarm(timeout * 20)
    try:
        small = minimise(table, _same_kind(parts), budget=150)
    except _Timeout:
        small = table
    finally:
        signal.alarm(0)
    return seed, parts, small


def _slug(stage: str, exc_type: str, frame: str) -> str:
    where = re.sub(r"\s*\(.*\)$", "", frame).replace("audit/", "").replace("/", "-").replace(".py:", "-")
    text = f"{stage}-{exc_type}-{where or 'nowhere'}"
    return re.sub(r"[^A-Za-z0-9._-]+", "_", text)[:90]


def _save(folder: Path, name: str, table, text: str) -> None:
    folder.mkdir(parents=True, exist_ok=True)
    data = folder / f"{name}{Path(table.file_name).suffix}"
    data.write_bytes(table.encode())
    if table.metadata_toml is not None:
        (folder / f"{name}.toml").write_text(table.metadata_toml, encoding="utf-8")
    (folder / f"{name}.spec.json").write_text(table_to_json(table), encoding="utf-8")
    (folder / f"{name}.txt").write_text(text, encoding="utf-8")


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--tables", type=int, default=10_000)
    ap.add_argument("--seed", type=int, default=0)
    ap.add_argument("--jobs", type=int, default=os.cpu_count() or 1)
    ap.add_argument("--family", default=None, help="realistic, water, garbage or degenerate (default: all)")
    ap.add_argument("--save-failures", metavar="DIR", default=None)
    ap.add_argument("--reports", type=int, default=0, metavar="K",
                    help="also write HTML and PDF for the first K tables (slow)")
    ap.add_argument("--timeout", type=int, default=120, help="seconds before one table counts as hung")
    ap.add_argument("--sheets", action="store_true",
                    help="supplier sheets (tests/fuzz/sheets.py) instead of tables; --family: realistic, wild, "
                         "expression or hostile")
    args = ap.parse_args(argv)

    jobs = [(args.seed + i, args.family,
             ("json", "csv", "html", "pdf") if i < args.reports else ("json", "csv"), args.timeout)
            for i in range(args.tables)]
    t0 = time.perf_counter()
    results = []
    with Pool(args.jobs, maxtasksperchild=200) as pool:
        for k, r in enumerate(pool.imap_unordered(_run_sheet if args.sheets else _run, jobs, chunksize=1), start=1):
            results.append(r)
            if k % 200 == 0:
                n_fail = sum(1 for x in results if x["failures"])
                print(f"  … {k}/{args.tables} tables, {n_fail} failing, {time.perf_counter() - t0:.0f} s",
                      file=sys.stderr, flush=True)
        wall = time.perf_counter() - t0
        results.sort(key=lambda r: r["seed"])

        outcomes = Counter(r["kind"] for r in results)
        by_key: dict[str, list] = defaultdict(list)
        for r in results:
            for f in r["failures"]:
                by_key[f[0]].append((r, f))
        print(f"fuzz campaign: {len(results)} runs (seeds {args.seed}..{args.seed + args.tables - 1}, "
              f"family {args.family or 'all'}), {args.jobs} jobs, {wall:.0f} s wall")
        print("outcomes: " + ", ".join(f"{k} {v}" for k, v in sorted(outcomes.items())))
        print("families: " + ", ".join(f"{k} {v}" for k, v in sorted(Counter(r["family"] for r in results).items())))
        n_fail_tables = sum(1 for r in results if r["failures"])
        print(f"\nerrors: {sum(len(v) for v in by_key.values())} in {n_fail_tables} tables, "
              f"{len(by_key)} distinct kinds")
        for key, hits in sorted(by_key.items(), key=lambda kv: -len(kv[1])):
            r, f = hits[0]
            print(f"  {len(hits):5d}  {key}\n         first seed {r['seed']} ({r['family']}, {r['layout']}, "
                  f"{r['rows']} rows): {f[4][:220]}")
        print("\n10 slowest tables (wall time; processor time beside it):")
        for r in sorted(results, key=lambda r: -r["seconds"])[:10]:
            print(f"  {r['seconds']:7.2f} s ({r['cpu']:6.2f} s cpu)  seed {r['seed']:<7d} {r['rows']:4d} rows  {r['family']:<10s} "
                  f"{r['layout']:<18s} {r['kind']}")
        slow = [r for r in results if r["seconds"] > SLOW_S and r["rows"] <= 300]
        slow_cpu = [r for r in slow if r["cpu"] > SLOW_S]
        print(f"runs over {SLOW_S:.0f} s at <= 300 rows: {len(slow)} wall, {len(slow_cpu)} in processor time")
        for what in ("seconds", "cpu"):
            secs = sorted(r[what] for r in results)
            print(f"  {'wall' if what == 'seconds' else 'cpu '}: median {secs[len(secs) // 2]:.2f} s, "
                  f"95th percentile {secs[int(0.95 * (len(secs) - 1))]:.2f} s, total {sum(secs):.0f} s")
        inputs = Counter(re.sub(r"^.*?table\.\w+(, [^:]*)?: ", "", r["message"])[:90]
                         for r in results if r["kind"] == "input-error")
        if inputs:
            print("\nmost common InputError messages:")
            for msg, n in inputs.most_common(8):
                print(f"  {n:5d}  {msg}")
        warns = Counter(w for r in results for w in r["warnings"])
        if warns:
            print("\nmost common warnings (information, not failures):")
            for w, n in warns.most_common(8):
                print(f"  {n:5d}  {w}")

        if args.save_failures and by_key and args.sheets:
            _save_sheets(Path(args.save_failures), results, by_key, args.family)
        elif args.save_failures and by_key:
            out = Path(args.save_failures)
            for r in results:
                if r["failures"]:
                    table = table_for_seed(r["seed"], args.family)
                    _save(out / "raw", f"seed-{r['seed']}", table,
                          "\n\n".join(f"{f[4]}\n{f[5]}" for f in r["failures"]))
            kinds = {}
            for key, hits in by_key.items():
                r, f = hits[0]
                kinds.setdefault((f[1], f[2], f[3]), (r["seed"], f))
            mjobs = [(seed, args.family, parts, args.timeout) for parts, (seed, _) in kinds.items()]
            for seed, parts, small in pool.imap_unordered(_minimise, mjobs):
                f = kinds[parts][1]
                name = _slug(*parts)
                _save(out, name, small, f"seed {seed}\n{f[4]}\n\n{f[5]}\n\nminimised table (CSV view):\n"
                                        f"{small.as_csv_text()}")
                print(f"saved {out / name}.* ({len(small.rows)} rows, from seed {seed})")
    return 1 if by_key else 0


if __name__ == "__main__":
    sys.exit(main())
