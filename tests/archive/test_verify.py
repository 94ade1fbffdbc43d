"""Proving archived audits: every recorded file re-hashed, each change and loss named."""

from __future__ import annotations

import shutil

import sqlalchemy as sa

from audit.archive import open_archive
from audit.archive.store import resolve_url

from .conftest import BENZENE_META


def test_verify_finds_every_file_intact(archive_url, benzene_default, outputs_of, tmp_path):
    data = tmp_path / "input.csv"
    shutil.copy(benzene_default.input_path, data)
    with open_archive(archive_url) as archive:
        audit_id = archive.record(benzene_default.result, outputs=outputs_of(benzene_default),
                                  input_path=data, metadata_path=BENZENE_META)
        report = archive.verify()
    assert report.ok
    assert report.n_audits == 1
    assert [(f.audit_id, f.role, f.status) for f in report.files] == [
        (audit_id, "json", "ok"), (audit_id, "csv", "ok"), (audit_id, "input", "ok"),
        (audit_id, "metadata", "ok"), (audit_id, "findings", "ok")]


def test_verify_names_a_changed_and_a_missing_output(archive_url, benzene_default, benzene_strict,
                                                     outputs_of, tmp_path):
    data = tmp_path / "input.csv"
    shutil.copy(benzene_default.input_path, data)
    first = outputs_of(benzene_default, name="first")
    second = outputs_of(benzene_strict, name="second")
    with open_archive(archive_url) as archive:
        a = archive.record(benzene_default.result, outputs=first, input_path=data)
        b = archive.record(benzene_strict.result, outputs=second, input_path=data)

        # someone "tidies" a report by hand, and deletes another audit's findings
        with first["csv"].open("a", encoding="utf-8") as fh:
            fh.write("# checked by hand\n")
        second["json"].unlink()
        report = archive.verify()

        assert not report.ok
        problems = {(f.audit_id, f.role, f.status) for f in report.problems}
        assert problems == {(a, "csv", "changed"), (b, "json", "missing")}
        changed = next(f for f in report.problems if f.status == "changed")
        assert changed.path == str(first["csv"])
        assert changed.actual_sha256 != changed.recorded_sha256
        # the shared input was hashed once and found intact for both audits
        assert [(f.audit_id, f.status) for f in report.files if f.role == "input"] == [(a, "ok"), (b, "ok")]
        summary = report.summary()
        assert f"CHANGED    audit #{a} csv      {first['csv']}" in summary
        assert f"MISSING    audit #{b} json     {second['json']}" in summary
        assert "1 changed, 1 missing" in summary

        # only the audits asked for
        assert archive.verify([a]).problems == tuple(f for f in report.problems if f.audit_id == a)

        # the input changed on disk: that is found too
        data.write_text(data.read_text(encoding="utf-8").replace("283.21,6.08", "283.21,6.09"),
                        encoding="utf-8")
        assert {(f.audit_id, f.role) for f in archive.verify().problems if f.role == "input"} == {
            (a, "input"), (b, "input")}


def test_verify_finds_archived_findings_edited_in_the_database(archive_url, benzene_default):
    with open_archive(archive_url) as archive:
        audit_id = archive.record(benzene_default.result)
        assert archive.verify().ok
    # an edit made past the archive (a database tool, a script) to soften a verdict
    engine = sa.create_engine(resolve_url(archive_url))
    with engine.begin() as conn:
        conn.execute(sa.text("UPDATE vpaudit_audits SET findings_json = replace(findings_json, "
                             "'\"verdict\": \"warn\"', '\"verdict\": \"pass\"')"))
    engine.dispose()
    with open_archive(archive_url) as archive:
        report = archive.verify()
    assert [(f.audit_id, f.role, f.status) for f in report.problems] == [(audit_id, "findings", "changed")]
