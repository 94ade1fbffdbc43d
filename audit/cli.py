"""The ``vpaudit`` command.

``vpaudit check DATA``   audit one table and write findings.json (and more);
``vpaudit demo``         regenerate the bundled demonstration audits;
``vpaudit profiles``     list rule profiles and their thresholds;
``vpaudit explain ID``   what a check tests, its method, source and options.

Exit codes: 0 verdict pass or warn; 1 fail (with ``--strict``, warn too);
2 the input or the command line cannot be used (one message, no traceback);
3 a bug in vpaudit: a check stopped on an unexpected exception (it is skipped
with "internal error: …", the other checks ran and every output is written);
130 interrupted (Ctrl-C, SIGINT); 143 stopped by SIGTERM.  An interrupted run
leaves no output file half-written: the outputs appear together or not at all.
"""

from __future__ import annotations

import argparse
import os
import sys
import textwrap
from pathlib import Path

from . import __version__
from .errors import InputError
from .files import audit_file, audit_sheet_file  # noqa: F401 (public here too: tests and scripts use them)

EXIT_OK, EXIT_FAIL, EXIT_UNUSABLE, EXIT_INTERNAL = 0, 1, 2, 3
#: the shell's convention, 128 + the signal number
EXIT_INTERRUPTED, EXIT_TERMINATED = 130, 143


class Terminated(KeyboardInterrupt):
    """SIGTERM, raised like Ctrl-C so that the same clean-up runs."""


def _raise_terminated(signum, frame):
    raise Terminated()


class _Parser(argparse.ArgumentParser):
    """argparse that reports usage errors as InputError (exit 2, one message)."""

    def error(self, message):  # noqa: D401
        raise InputError(message, hint=f"see '{self.prog} --help'")


def build_parser() -> argparse.ArgumentParser:
    p = _Parser(prog="vpaudit", description="Audit vapor-pressure data for thermodynamic consistency.")
    p.add_argument("--version", action="version", version=f"vpaudit {__version__}")
    sub = p.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)

    c = sub.add_parser("check", help="audit one pressure–temperature table")
    c.add_argument("data", metavar="DATA", help="CSV, TSV, semicolon CSV, XLSX or JSON table")
    c.add_argument("--substance", help="substance name or CAS number (looks up reference constants)")
    c.add_argument("--profile", default="default", help="rule profile name or .toml path (default: default)")
    c.add_argument("--out", help="output folder (default: audit-<data file stem>)")
    c.add_argument("--format", default=None,
                   help="comma-separated outputs among json,csv,html,pdf (default: all available)")
    c.add_argument("--strict", action="store_true", help="exit 1 on a warn verdict too")
    c.add_argument("--metadata", help="metadata .toml (default: beside DATA with the same stem)")
    g = c.add_argument_group("column overrides (otherwise found from the header)")
    g.add_argument("--temperature-column", metavar="NAME")
    g.add_argument("--temperature-unit", metavar="UNIT", help="e.g. K, degC, degF, degR")
    g.add_argument("--pressure-column", metavar="NAME")
    g.add_argument("--pressure-unit", metavar="UNIT", help="e.g. Pa, kPa, mmHg, Torr, bar, log10(P/kPa)")
    g.add_argument("--phase-column", metavar="NAME")
    g.add_argument("--source-column", metavar="NAME")
    g.add_argument("--u-temperature-column", metavar="NAME")
    g.add_argument("--u-pressure-column", metavar="NAME")
    g.add_argument("--u-pressure-unit", metavar="UNIT", help="unit of u(P), or %% for relative")
    g.add_argument("--sheet", metavar="NAME", help="XLSX sheet (default: the first)")
    c.add_argument("--audit-time", metavar="ISO8601",
                   help="time stamp to record (default: now, or SOURCE_DATE_EPOCH)")
    c.add_argument("--archive", metavar="URL", help="record the audit in this archive (SQLite path or URL)")

    sh = sub.add_parser("sheet", help="check a supplier sheet's vapor-pressure equation (a sheet file) "
                                      "against its units, its table, a reference and its stated range")
    sh.add_argument("sheet_file", metavar="SHEET", help="sheet file (.toml; see the README's example)")
    sh.add_argument("--profile", default="default", help="rule profile name or .toml path (default: default)")
    sh.add_argument("--out", help="output folder (default: sheet-<sheet file stem>)")
    sh.add_argument("--format", default=None, help="as for check")
    sh.add_argument("--strict", action="store_true", help="exit 1 on a warn verdict too")
    sh.add_argument("--audit-time", metavar="ISO8601",
                    help="time stamp to record (default: now, or SOURCE_DATE_EPOCH)")
    sh.add_argument("--archive", metavar="URL", help="record the check in this archive (SQLite path or URL)")

    b = sub.add_parser("batch", help="audit a collection: folders, globs, or one long table grouped by columns")
    b.add_argument("inputs", metavar="INPUT", nargs="+",
                   help="table files, sheet files (*.sheet.toml), folders or glob patterns")
    b.add_argument("--out", default="batch-out", help="output folder (default: batch-out)")
    b.add_argument("--jobs", type=int, default=None, help="worker processes (default: every core)")
    b.add_argument("--profile", default="default", help="rule profile name or .toml path (default: default)")
    b.add_argument("--format", default="json,csv",
                   help="outputs per dataset among json,csv,html,pdf (default: json,csv)")
    b.add_argument("--group-by", metavar="COLUMNS",
                   help="one long table: comma-separated columns whose values make one dataset each "
                        "(a column named 'substance' names the substance)")
    b.add_argument("--dask", action="store_true", help="run on a Dask LocalCluster of --jobs workers")
    b.add_argument("--scheduler", metavar="ADDRESS", help="run on the Dask scheduler at ADDRESS (tcp://host:8786)")
    b.add_argument("--archive", metavar="URL", help="record every audit in this archive (SQLite path or URL)")
    b.add_argument("--strict", action="store_true", help="exit 1 on a warn verdict too")
    b.add_argument("--no-progress", action="store_true", help="no progress bar even at a terminal")
    b.add_argument("--audit-time", metavar="ISO8601", help="time stamp to record in every audit")

    from .cli_archive import add_archive_commands

    add_archive_commands(sub)

    d = sub.add_parser("demo", help="audit the bundled synthetic demo data")
    d.add_argument("--out", default="reports_demo", help="output folder (default: reports_demo)")
    d.add_argument("--format", default=None, help="as for check")

    sub.add_parser("profiles", help="list rule profiles and their thresholds")

    e = sub.add_parser("explain", help="what a check tests, its method, source and thresholds")
    e.add_argument("check", metavar="CHECK", nargs="?", help="check id (omit to list them)")
    e.add_argument("--profile", default="default", help="show the thresholds of this profile")
    return p


def _available_formats() -> str:
    from .report import available_formats

    return ",".join(available_formats())


def _overrides(args):
    from .ingest import ColumnOverrides

    return ColumnOverrides(
        temperature=args.temperature_column, temperature_unit=args.temperature_unit,
        pressure=args.pressure_column, pressure_unit=args.pressure_unit,
        phase=args.phase_column, source=args.source_column,
        u_temperature=args.u_temperature_column, u_pressure=args.u_pressure_column,
        u_pressure_unit=args.u_pressure_unit, sheet=args.sheet, substance=args.substance,
    )


def cmd_check(args) -> int:
    from .report import parse_formats, write_outputs

    formats = parse_formats(args.format or _available_formats())
    _, _, result = audit_file(args.data, profile=args.profile, overrides=_overrides(args),
                              metadata=args.metadata, substance=args.substance,
                              audited_at=args.audit_time)
    out = Path(args.out or f"audit-{Path(args.data).stem}")
    written = write_outputs(result, out, formats, input_bytes=Path(args.data).read_bytes())
    print(result.summary(max_rows=CONSOLE_ROWS))
    if args.archive:
        _record(args.archive, result, written, args.data, args.metadata)
    for fmt, path in written.items():
        print(f"  {fmt:4s} {path}")
    for error in result.internal_errors:
        check, _, what = error.partition(": ")
        print(f"vpaudit: internal error in '{check}': {what} — a bug in vpaudit, not in your data; the other "
              "checks ran and the outputs are written; please report it with the input file "
              "(VPAUDIT_DEBUG=1 shows the traceback)", file=sys.stderr)
    if result.internal_errors:
        return EXIT_INTERNAL
    return _exit_code(result.verdict, args.strict)


def cmd_sheet(args) -> int:
    from .report import parse_formats, write_outputs

    formats = parse_formats(args.format or _available_formats())
    _, _, result = audit_sheet_file(args.sheet_file, profile=args.profile, audited_at=args.audit_time)
    out = Path(args.out or f"sheet-{Path(args.sheet_file).stem}")
    written = write_outputs(result, out, formats, input_bytes=Path(args.sheet_file).read_bytes())
    print(result.summary(max_rows=CONSOLE_ROWS))
    if args.archive:
        _record(args.archive, result, written, args.sheet_file, None)
    for fmt, path in written.items():
        print(f"  {fmt:4s} {path}")
    if result.internal_errors:
        return EXIT_INTERNAL
    return _exit_code(result.verdict, args.strict)


def cmd_batch(args) -> int:
    from .batch.jobs import collect_jobs, split_long_table
    from .batch.run import run_batch
    from .batch.work import BatchSettings
    from .report import parse_formats

    formats = parse_formats(args.format)
    from .profiles import load_profile

    load_profile(args.profile)  # a wrong profile is the command's error, before any worker starts
    out = Path(args.out)
    out.mkdir(parents=True, exist_ok=True)
    if args.group_by:
        if len(args.inputs) != 1:
            raise InputError("--group-by splits one long table: give exactly one input")
        columns = tuple(c.strip() for c in args.group_by.split(",") if c.strip())
        # the groups are kept beside the outputs: they are the inputs the findings name
        jobs = split_long_table(args.inputs[0], columns, out / "_groups")
    else:
        jobs = collect_jobs(args.inputs)
    if not jobs:
        raise InputError("no dataset found in the inputs", hint="tables are .csv .tsv .txt .xlsx .json; sheets *.sheet.toml")
    settings = BatchSettings(out_root=str(out), profile=args.profile, formats=tuple(formats),
                             audited_at=args.audit_time, archive=args.archive)
    backend = "dask" if (args.dask or args.scheduler) else "local"
    summary = run_batch(jobs, settings, workers=args.jobs, backend=backend, scheduler=args.scheduler,
                        progress=False if args.no_progress else None)
    print(summary.summary())
    for o in sorted(summary.outcomes, key=lambda o: o.sort_key())[:10]:
        if o.severity in ("error", "fail") or (args.strict and o.severity == "warn"):
            print(f"  {o.severity:5s} {o.name}: {o.error or o.worst_check or ''}")
    print(f"  index {summary.index_html}")
    if summary.interrupted:
        return EXIT_INTERRUPTED
    worst = {o.severity for o in summary.outcomes}
    if "error" in worst or "fail" in worst or (args.strict and "warn" in worst):
        return EXIT_FAIL
    return EXIT_OK


#: flagged rows listed on the console; the rest are in the report and findings.json
CONSOLE_ROWS = 25


def _record(url: str, result, written, input_path, metadata) -> None:
    """Record an audit, its outputs (absolute paths) and its input in the archive at ``url``."""
    from .archive import record_audit

    audit_id = record_audit(url, result, written, input_path, metadata)
    print(f"  archived as audit #{audit_id} in {url}")


def _exit_code(verdict: str, strict: bool) -> int:
    if verdict == "fail" or (strict and verdict == "warn"):
        return EXIT_FAIL
    return EXIT_OK


def cmd_demo(args) -> int:
    from .demo import run_demo

    run_demo(Path(args.out), formats=args.format)
    return EXIT_OK


def cmd_profiles(args) -> int:
    from .checks import all_checks
    from .profiles import load_profile, shipped_profiles

    for name in shipped_profiles():
        prof = load_profile(name)
        extends = f" (extends {' → '.join(Path(c).stem for c in prof.chain[:-1])})" if len(prof.chain) > 1 else ""
        print(f"{prof.name}{extends}: {prof.description}")
        print(f"  {'limits':24s} {'':8s} max_rows={prof.limits.max_rows} (data rows per audit)")
        for check_id in all_checks():
            s = prof.settings(check_id)
            opts = ", ".join(f"{k}={v}" for k, v in s.options.items())
            state = f"{s.severity}" if s.enabled else "disabled"
            print(f"  {check_id:24s} {state:8s} {opts}")
        print()
    return EXIT_OK


def cmd_explain(args) -> int:
    from .checks import all_checks, get_check
    from .profiles import load_profile

    if not args.check:
        for check_id, cls in all_checks().items():
            print(f"{check_id:24s} {cls.title}")
        return EXIT_OK
    cls = get_check(args.check)
    settings = load_profile(args.profile).settings(cls.id)
    width = 88
    print(f"{cls.id} — {cls.title}\n")
    print(textwrap.dedent(cls.__doc__ or "").strip() + "\n")
    print("Method in brief:\n" + textwrap.fill(cls.method, width, initial_indent="  ", subsequent_indent="  "))
    if cls.references:
        print("Published sources:")
        for ref in cls.references:
            print(textwrap.fill(ref, width, initial_indent="  - ", subsequent_indent="    "))
    print(f"\nIn profile '{args.profile}': {'enabled' if settings.enabled else 'disabled'}, "
          f"severity {settings.severity}")
    for name, opt in cls.options.items():
        unit = f" [{opt.unit}]" if opt.unit else ""
        print(f"  {name} = {settings.options[name]}{unit}  — {opt.doc}")
    return EXIT_OK


def main(argv: list[str] | None = None) -> int:
    import signal

    try:
        previous_sigterm, installed = signal.signal(signal.SIGTERM, _raise_terminated), True
    except ValueError:  # not the main thread: signals are not ours to handle
        previous_sigterm, installed = None, False
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
        if args.command is None:
            parser.print_help()
            return EXIT_UNUSABLE
        from .cli_archive import cmd_archive

        handler = {"check": cmd_check, "sheet": cmd_sheet, "batch": cmd_batch, "demo": cmd_demo,
                   "profiles": cmd_profiles, "explain": cmd_explain, "archive": cmd_archive}[args.command]
        return handler(args)
    except InputError as exc:
        print(f"vpaudit: error: {exc.message}", file=sys.stderr)
        return EXIT_UNUSABLE
    except Terminated:
        print("vpaudit: terminated; no output was left half-written", file=sys.stderr)
        return EXIT_TERMINATED
    except KeyboardInterrupt:
        print("vpaudit: interrupted; no output was left half-written", file=sys.stderr)
        return EXIT_INTERRUPTED
    except Exception as exc:  # a bug of ours, not the user's input
        if os.environ.get("VPAUDIT_DEBUG"):
            raise
        print(f"vpaudit: internal error: {type(exc).__name__}: {exc} — this is a bug in vpaudit; "
              "rerun with VPAUDIT_DEBUG=1 for details and report it", file=sys.stderr)
        return EXIT_INTERNAL
    finally:
        if installed:
            signal.signal(signal.SIGTERM, previous_sigterm if previous_sigterm is not None
                          else signal.SIG_DFL)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
