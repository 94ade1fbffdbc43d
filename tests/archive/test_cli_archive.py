"""``vpaudit archive list | show | verify | compare``, through the parser the CLI gets."""

from __future__ import annotations

import argparse
import subprocess
import sys

import pytest

from audit.archive import open_archive
from audit.cli_archive import DEFAULT_ARCHIVE, add_archive_commands, cmd_archive
from audit.errors import InputError

from .conftest import BENZENE, ROOT


class _RaisingParser(argparse.ArgumentParser):
    """Like vpaudit's own parser: a usage error is an InputError (exit 2), not SystemExit."""

    def error(self, message):
        raise InputError(message)


def run(argv: list[str]) -> int:
    parser = _RaisingParser(prog="vpaudit")
    sub = parser.add_subparsers(dest="command", parser_class=_RaisingParser)
    add_archive_commands(sub)
    return cmd_archive(parser.parse_args(argv))


@pytest.fixture
def filled(archive_url, benzene_default, benzene_strict, outputs_of):
    """An archive with the demo table audited under default (#a) and strict (#b), with outputs."""
    out_a, out_b = outputs_of(benzene_default, name="a"), outputs_of(benzene_strict, name="b")
    with open_archive(archive_url) as archive:
        a = archive.record(benzene_default.result, outputs=out_a, input_path=BENZENE)
        b = archive.record(benzene_strict.result, outputs=out_b, input_path=BENZENE)
    return archive_url, a, b, out_a, out_b


def test_list_prints_one_line_per_audit_with_filters(filled, capsys):
    url, a, b, *_ = filled
    assert run(["archive", "list", "--archive", url]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert [line.split()[0] for line in lines] == [f"#{b}", f"#{a}"]  # newest first
    assert "profile strict" in lines[0] and "profile default" in lines[1]
    assert "rows 63 (ok 58, suspect 0, reject 5, unreadable 0)" in lines[1]

    assert run(["archive", "list", "--archive", url, "--since", "2026-12-02", "--substance", "benzene"]) == 0
    assert [line.split()[0] for line in capsys.readouterr().out.splitlines()] == [f"#{b}"]
    assert run(["archive", "list", "--archive", url, "--verdict", "FAIL"]) == 0
    captured = capsys.readouterr()
    assert captured.out == "" and "no archived audit matches" in captured.err


def test_show_prints_the_record_and_the_findings(filled, capsys):
    url, a, _, out_a, _ = filled
    assert run(["archive", "show", str(a), "--archive", url]) == 0
    text = capsys.readouterr().out
    assert text.startswith(f"audit #{a} (table;")
    assert "verdict    WARN" in text
    assert "  warn    outliers" in text and "n_reject = 5" in text
    assert f"  json {out_a['json']}  sha256 " in text
    assert run(["archive", "show", str(a), "--archive", url, "--findings"]) == 0
    assert capsys.readouterr().out == out_a["json"].read_text(encoding="utf-8")


def test_verify_exits_1_and_lists_what_changed(filled, capsys):
    url, a, b, out_a, out_b = filled
    assert run(["archive", "verify", "--archive", url]) == 0
    assert "0 changed, 0 missing" in capsys.readouterr().out
    out_a["csv"].write_bytes(out_a["csv"].read_bytes() + b"\n")
    out_b["json"].unlink()
    assert run(["archive", "verify", "--archive", url]) == 1
    text = capsys.readouterr().out
    assert f"CHANGED    audit #{a} csv      {out_a['csv']}" in text
    assert f"MISSING    audit #{b} json     {out_b['json']}" in text
    # only audit a asked for: its change alone
    assert run(["archive", "verify", str(a), "--archive", url]) == 1
    text = capsys.readouterr().out
    assert str(out_a["csv"]) in text and str(out_b["json"]) not in text


def test_compare_prints_the_summary(filled, capsys):
    url, a, b, *_ = filled
    assert run(["archive", "compare", str(a), str(b), "--archive", url]) == 0
    text = capsys.readouterr().out
    assert text.startswith(f"audit #{a} → audit #{b}\ninput: the same file")
    assert "checks.readability.severity: 'warn' → 'fail'" in text


def test_user_errors_are_input_errors(filled, tmp_path, monkeypatch):
    url, *_ = filled
    with pytest.raises(InputError, match="no audit #999"):
        run(["archive", "show", "999", "--archive", url])
    with pytest.raises(InputError, match="invalid int value"):
        run(["archive", "compare", "1", "two", "--archive", url])
    with pytest.raises(InputError, match="list, show, verify or compare"):
        run(["archive"])
    with pytest.raises(InputError, match="unsupported archive database"):
        run(["archive", "list", "--archive", "oracle://x/y"])
    # the default archive, in the current folder, is not there: reading commands do not create it
    monkeypatch.chdir(tmp_path)
    with pytest.raises(InputError, match="no archive there"):
        run(["archive", "list"])
    assert not (tmp_path / DEFAULT_ARCHIVE).exists()


def test_default_archive_is_in_the_current_folder(tmp_path, monkeypatch, benzene_default, capsys):
    monkeypatch.chdir(tmp_path)
    with open_archive(DEFAULT_ARCHIVE) as archive:
        audit_id = archive.record(benzene_default.result)
    assert (tmp_path / DEFAULT_ARCHIVE).is_file()
    assert run(["archive", "list"]) == 0
    assert capsys.readouterr().out.startswith(f"#{audit_id}  2026-12-01T00:00:00Z  WARN  benzene")


def test_importing_the_commands_loads_no_database_library():
    """audit.cli imports these commands; batch workers import audit: neither may pay for SQLAlchemy."""
    code = ("import sys, audit, audit.cli_archive, audit.archive; "
            "heavy = sorted(m for m in ('sqlalchemy', 'alembic', 'psycopg') if m in sys.modules); "
            "print(','.join(heavy))")
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT, check=True)
    assert proc.stdout.strip() == ""
