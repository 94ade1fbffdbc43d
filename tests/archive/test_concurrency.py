"""Several worker processes recording into one archive at once, the archive not yet created.

The workers start together (a barrier), so they race to create and migrate
the archive and then to write; every record must be there afterwards, whole.
Nothing here is timed: the test counts and compares what was written.
"""

from __future__ import annotations

import hashlib
import json
import multiprocessing
from dataclasses import replace

import pytest

from audit.archive import open_archive
from audit.errors import InputError
from audit.report.findings_json import findings_text

from .conftest import table_rows

WORKERS = 4
RECORDS_EACH = 5


def _stamp(worker: int, k: int) -> str:
    """A distinct audit time per record, so that each record can be told from the others."""
    return f"2026-12-{worker + 1:02d}T{k:02d}:00:00Z"


@pytest.mark.parametrize("workers", [2, WORKERS])
def test_concurrent_writers_lose_nothing(archive_url, benzene_default, outputs_of, workers):
    base = benzene_default.result
    written = outputs_of(benzene_default)
    ctx = multiprocessing.get_context("fork")  # the workers inherit the audit result; nothing to pickle
    barrier = ctx.Barrier(workers)

    def worker(w: int) -> None:
        barrier.wait()
        with open_archive(archive_url) as archive:
            for k in range(RECORDS_EACH):
                archive.record(replace(base, audited_at=_stamp(w, k)), outputs=written,
                               input_path=benzene_default.input_path)

    procs = [ctx.Process(target=worker, args=(w,)) for w in range(workers)]
    for p in procs:
        p.start()
    for p in procs:
        p.join()
    assert [p.exitcode for p in procs] == [0] * workers

    expected = {_stamp(w, k) for w in range(workers) for k in range(RECORDS_EACH)}
    with open_archive(archive_url) as archive:
        audits = archive.search()
        assert len(audits) == workers * RECORDS_EACH
        assert {a.audited_at for a in audits} == expected
        assert len({a.id for a in audits}) == len(audits)
        for a in audits:
            # whole: the findings are those of this record's result, its checks and outputs all there
            text = findings_text(replace(base, audited_at=a.audited_at))
            assert a.findings_json == text
            assert a.findings_sha256 == hashlib.sha256(text.encode("utf-8")).hexdigest()
            assert json.loads(a.findings_json)["audited_at"] == a.audited_at
            assert [(c.id, c.status) for c in a.checks] == [(c.id, c.status) for c in base.checks]
            assert [(f.role, f.path) for f in a.outputs] == [(fmt, str(p)) for fmt, p in written.items()]
            assert (a.n_rows, a.n_reject) == (63, 5)
        assert archive.verify().ok
    n = workers * RECORDS_EACH
    assert table_rows(archive_url, "vpaudit_checks") == n * len(base.checks)
    assert table_rows(archive_url, "vpaudit_outputs") == n * len(written)


def test_lock_held_throughout_gives_up_with_an_input_error(tmp_path, benzene_default, monkeypatch):
    """Another process holds SQLite's write lock for good: the record retries, then says so."""
    import sqlite3

    from audit.archive import store

    path = tmp_path / "a.sqlite"
    open_archive(path).close()
    monkeypatch.setattr(store, "BUSY_TIMEOUT_S", 0.01)  # SQLite's own wait, shortened for the test
    sleeps = []
    monkeypatch.setattr(store.time, "sleep", sleeps.append)  # the back-off between attempts, recorded
    holder = sqlite3.connect(path, isolation_level=None)
    holder.execute("BEGIN IMMEDIATE")
    try:
        with open_archive(path) as archive, pytest.raises(InputError, match="stayed locked by another process"):
            archive.record(benzene_default.result)
    finally:
        holder.execute("ROLLBACK")
        holder.close()
    assert len(sleeps) == store.MAX_ATTEMPTS - 1
    assert all(s > 0 for s in sleeps)
    with open_archive(path) as archive:
        assert archive.search() == []
        archive.record(benzene_default.result)  # the lock released, the same record goes through
        assert len(archive.search()) == 1


def test_contention_is_retried_and_other_errors_are_not(monkeypatch):
    import sqlite3

    import sqlalchemy as sa

    from audit.archive import store

    monkeypatch.setattr(store.time, "sleep", lambda s: None)
    calls = []

    def locked_twice():
        calls.append(1)
        if len(calls) <= 2:
            raise sa.exc.OperationalError("INSERT …", {}, sqlite3.OperationalError("database is locked"))
        return 42

    assert store._retrying(locked_twice) == 42 and len(calls) == 3

    def broken():
        raise sa.exc.OperationalError("INSERT …", {}, sqlite3.OperationalError("no such table: x"))

    with pytest.raises(sa.exc.OperationalError, match="no such table"):
        store._retrying(broken)
