"""The archive's schema: created at head on open, kept on reopen, upgraded from an older revision."""

from __future__ import annotations

import datetime as dt
import hashlib

import pytest
import sqlalchemy as sa
from alembic.autogenerate import compare_metadata
from alembic.runtime.migration import MigrationContext

from audit.archive import migrate, models, open_archive
from audit.archive.store import resolve_url
from audit.errors import InputError

from .conftest import table_rows

#: the revisions shipped, oldest first (a new migration script adds its id here)
REVISIONS = ["0001", "0002"]


def _engine(url: str) -> sa.Engine:
    return sa.create_engine(resolve_url(url))


def _version_rows(url: str) -> list[str]:
    engine = _engine(url)
    try:
        with engine.connect() as conn:
            return list(conn.execute(sa.text(f"SELECT version_num FROM {models.VERSION_TABLE}")).scalars())
    finally:
        engine.dispose()


def test_the_shipped_revisions_form_one_line_to_head():
    assert migrate.head_revision() == REVISIONS[-1]
    chain = [s.revision for s in migrate.script_directory().walk_revisions()]
    assert chain == list(reversed(REVISIONS))


def test_open_creates_the_schema_at_head_and_records_it(archive_url):
    open_archive(archive_url).close()
    assert _version_rows(archive_url) == [REVISIONS[-1]]
    engine = _engine(archive_url)
    try:
        with engine.connect() as conn:
            mc = MigrationContext.configure(conn, opts={"version_table": models.VERSION_TABLE})
            # the tables the migrations built are the tables the queries are written against
            assert compare_metadata(mc, models.metadata) == []
            names = set(sa.inspect(conn).get_table_names())
    finally:
        engine.dispose()
    assert names == {"vpaudit_audits", "vpaudit_checks", "vpaudit_outputs", models.VERSION_TABLE}


def test_reopening_keeps_the_data_and_runs_no_migration(archive_url, benzene_default, monkeypatch):
    with open_archive(archive_url) as archive:
        audit_id = archive.record(benzene_default.result)
        before = archive.get(audit_id)

    def no_upgrade(*args, **kwargs):
        raise AssertionError("an archive at head must not be migrated again")

    monkeypatch.setattr(migrate, "upgrade", no_upgrade)
    with open_archive(archive_url) as archive:
        assert archive.revision == REVISIONS[-1]
        assert archive.get(audit_id) == before
        assert [a.id for a in archive.search()] == [audit_id]
    assert _version_rows(archive_url) == [REVISIONS[-1]]


def test_archive_at_the_first_revision_is_upgraded_with_its_records(archive_url, benzene_default, outputs_of):
    """An archive written by a vpaudit that knew only revision 0001, opened by this one."""
    result = benzene_default.result
    written = outputs_of(benzene_default)
    from audit.report.findings_json import findings_text

    text = findings_text(result)
    engine = _engine(archive_url)
    with engine.connect() as conn:
        with conn.begin():
            migrate.upgrade(conn, REVISIONS[0])
        # a record as the 0001 layout holds it: no findings hash, no schema revision
        audits_0001 = sa.table("vpaudit_audits", *(sa.column(c) for c in (
            "id", "kind", "input_name", "input_sha256", "profile_name", "profile_sha256", "profile_text",
            "tool_version", "audited_at", "verdict", "n_rows", "n_ok", "n_suspect", "n_reject",
            "n_unreadable", "substance", "findings_json")),
            sa.column("audited_at_utc", sa.DateTime), sa.column("recorded_at", sa.DateTime))
        outputs_0001 = sa.table("vpaudit_outputs", *(sa.column(c) for c in (
            "audit_id", "position", "format", "path", "sha256", "size_bytes")))
        with conn.begin():
            audit_id = conn.execute(audits_0001.insert().values(
                kind="table", input_name="literature_benzene.csv", input_sha256=result.dataset.sha256,
                profile_name="default", profile_sha256=result.profile_sha256, profile_text="",
                tool_version="0.0.9", audited_at="2026-12-01T00:00:00Z",
                audited_at_utc=dt.datetime(2026, 12, 1), recorded_at=dt.datetime(2026, 12, 1, 0, 5),
                verdict="warn", n_rows=63, n_ok=58, n_suspect=0, n_reject=5, n_unreadable=0,
                substance="benzene", findings_json=text).returning(audits_0001.c.id)).scalar_one()
            conn.execute(outputs_0001.insert().values(
                audit_id=audit_id, position=0, format="json", path=str(written["json"]),
                sha256=hashlib.sha256(written["json"].read_bytes()).hexdigest(),
                size_bytes=written["json"].stat().st_size))
    engine.dispose()
    assert _version_rows(archive_url) == [REVISIONS[0]]

    with open_archive(archive_url) as archive:
        assert archive.revision == REVISIONS[-1]
        old = archive.get(audit_id)
        # revision 0002 filled what it added: the hash of the findings text as it stood
        assert old.findings_sha256 == hashlib.sha256(text.encode("utf-8")).hexdigest()
        assert old.schema_revision == "0001"
        assert (old.verdict, old.n_reject, old.tool_version) == ("warn", 5, "0.0.9")
        assert old.findings["verdict"] == "warn"
        assert archive.verify().ok
        new = archive.record(result)
        assert archive.get(new).schema_revision == REVISIONS[-1]
    assert _version_rows(archive_url) == [REVISIONS[-1]]
    assert table_rows(archive_url, "vpaudit_audits") == 2


def test_archive_from_a_newer_vpaudit_is_refused(archive_url, benzene_default):
    with open_archive(archive_url) as archive:
        archive.record(benzene_default.result)
    engine = _engine(archive_url)
    with engine.begin() as conn:
        conn.execute(sa.text(f"UPDATE {models.VERSION_TABLE} SET version_num = '0099'"))
    engine.dispose()
    with pytest.raises(InputError, match="schema revision '0099' is newer than this vpaudit knows"):
        open_archive(archive_url)
    assert table_rows(archive_url, "vpaudit_audits") == 1  # and it was left alone


def test_reading_commands_do_not_create_an_archive(tmp_path):
    path = tmp_path / "none.sqlite"
    with pytest.raises(InputError, match="no archive there"):
        open_archive(path, create=False)
    assert not path.exists()
    other = tmp_path / "other.sqlite"
    engine = sa.create_engine(f"sqlite:///{other}")
    with engine.begin() as conn:
        conn.execute(sa.text("CREATE TABLE notes (x TEXT)"))
    engine.dispose()
    with pytest.raises(InputError, match="holds no vpaudit archive"):
        open_archive(other, create=False)
    engine = sa.create_engine(f"sqlite:///{other}")
    with engine.connect() as conn:
        # looked at, not touched: still in SQLite's default journal mode, no table added
        assert conn.exec_driver_sql("PRAGMA journal_mode").scalar_one() == "delete"
        assert sa.inspect(conn).get_table_names() == ["notes"]
    engine.dispose()
    junk = tmp_path / "junk.sqlite"
    junk.write_bytes(b"not a database at all\n" * 200)
    with pytest.raises(InputError, match="cannot use the archive"):
        open_archive(junk, create=False)


def test_sqlite_archive_runs_in_wal_mode(tmp_path):
    path = tmp_path / "a.sqlite"
    open_archive(path).close()
    engine = sa.create_engine(f"sqlite:///{path}")
    with engine.connect() as conn:
        # WAL is a property of the file: it stays after the archive is closed
        assert conn.exec_driver_sql("PRAGMA journal_mode").scalar_one() == "wal"
    engine.dispose()
