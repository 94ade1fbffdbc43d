"""Comparing archived audits: what really changed, and only that.

rules/strict.toml extends the default profile with three settings:
``checks.readability.severity = "fail"`` (default "warn"),
``checks.duplicates.severity = "fail"`` (default "warn") and
``checks.duplicates.P_tolerance_percent = 0.5`` (default 1.0).  The demo
table of benzene has no unreadable cell and no replicate rows, so under
strict no check, row, source or fit of it may change — only the profile.
The hand-edited copy (conftest: row 8's temperature corrected, row 23's
pressure made unreadable) changes exactly those two rows, and under strict
its unreadable cell fails the audit.
"""

from __future__ import annotations

import json
import math

from audit.archive import open_archive
from audit.archive.compare import compare_audits, profile_setting_changes
from audit.archive.records import ArchivedAudit, ArchivedCheck

from .conftest import ROOT

STRICT_SETTINGS = [("checks.readability.severity", "warn", "fail"),
                   ("checks.duplicates.severity", "warn", "fail"),
                   ("checks.duplicates.P_tolerance_percent", 1.0, 0.5)]


def test_default_and_strict_on_the_demo_table_differ_only_in_the_profile(archive_url, benzene_default,
                                                                          benzene_strict):
    with open_archive(archive_url) as archive:
        a = archive.record(benzene_default.result)
        b = archive.record(benzene_strict.result)
        c = archive.compare(a, b)
    assert c.same_input
    assert c.profile_changed and c.profile_before[0] == "default" and c.profile_after[0] == "strict"
    assert [(s.key, s.before, s.after) for s in c.profile_settings] == STRICT_SETTINGS
    assert not c.tool_changed
    assert (c.verdict_before, c.verdict_after) == ("warn", "warn")
    assert c.checks == () and c.rows == () and c.sources == () and c.fits == () and c.parameters == ()
    assert not c.changed
    text = c.summary()
    assert "input: the same file" in text
    assert "profile: default" in text and "→ strict" in text
    assert "checks.duplicates.P_tolerance_percent: 1.0 → 0.5" in text
    assert "checks whose status changed: none" in text
    assert "rows whose status or cause changed: none" in text


def test_corrected_table_under_strict(archive_url, benzene_default, corrected_strict):
    with open_archive(archive_url) as archive:
        a = archive.record(benzene_default.result)
        b = archive.record(corrected_strict.result)
        c = archive.compare(a, b)
    assert not c.same_input
    assert (c.verdict_before, c.verdict_after) == ("warn", "fail")
    # the unreadable cell: readability finds it, and strict makes that a failure
    assert [(x.check_id, x.before, x.after) for x in c.checks] == [("readability", "pass", "fail")]
    # row 8 (45.10 "K", planted temperature-unit fault) corrected; row 23 spoiled
    assert [(r.row, r.status_before, r.cause_before, r.status_after, r.cause_after) for r in c.rows] == [
        (8, "reject", "temperature-unit", "ok", None),
        (23, "ok", None, "unreadable", None)]
    # 'Castell et al. 1994' stays the one source off the others
    assert c.sources == ()
    assert [(s.key, s.before, s.after) for s in c.profile_settings] == STRICT_SETTINGS
    text = c.summary()
    assert text.splitlines()[1].startswith("input: DIFFERENT files")
    assert "row 8: reject (temperature-unit) → ok" in text
    assert "row 23: ok → unreadable" in text
    assert "verdict: WARN → FAIL" in text


def _archived(audit_id: int, fits: list[dict], *, points=(), sources=(), checks=(), verdict="pass"):
    findings = {"fits": fits, "points": list(points), "sources": list(sources)}
    return ArchivedAudit(
        id=audit_id, kind="table", input_name="x.csv", input_sha256="0" * 64, input_path=None,
        input_file_sha256=None, metadata_path=None, metadata_sha256=None, profile_name="default",
        profile_sha256="1" * 64, profile_text="", tool_version="0.1.0", audited_at="2026-12-01T00:00:00Z",
        audited_at_utc=None, recorded_at=None, verdict=verdict, n_rows=0, n_ok=0, n_suspect=0, n_reject=0,
        n_unreadable=0, substance=None, checks=tuple(checks), outputs=(), findings_json=json.dumps(findings))


def _fit(branch, equation, params: dict, variances: list[float], **extra):
    n = len(params)
    cov = [[variances[i] if i == j else 0.0 for j in range(n)] for i in range(n)]
    return {"branch": branch, "equation": equation, "parameters": params, "covariance": cov, **extra}


def test_parameters_beyond_their_standard_uncertainty():
    # liquid antoine: u(A) = 0.1, u(B) = 20, u(C) = 1 before; after u(A) = 0.2
    before = _fit("liquid", "antoine", {"A": 9.0, "B": 1200.0, "C": -55.0}, [0.01, 400.0, 1.0])
    after = _fit("liquid", "antoine", {"A": 9.15, "B": 1230.0, "C": -55.5}, [0.04, 400.0, 1.0])
    c = compare_audits(_archived(1, [before]), _archived(2, [after]))
    # A moved 0.15 < max(0.1, 0.2): not reported; B moved 30 > 20; C moved 0.5 < 1
    assert [(p.branch, p.name, p.before, p.after) for p in c.parameters] == [("liquid", "B", 1200.0, 1230.0)]
    assert math.isclose(c.parameters[0].shift_in_u, 1.5)
    assert c.fits == ()
    assert "liquid antoine B: 1200 → 1230 (shift 1.5 × u = 20)" in c.summary()


def test_equation_changes_are_reported_per_branch_without_comparing_parameters():
    before = [_fit("liquid", "antoine", {"A": 9.0, "B": 1200.0, "C": -55.0}, [0.01, 400.0, 1.0]),
              _fit("solid", "clausius-clapeyron-2", {"A": 27.0, "B": -5400.0}, [0.1, 100.0],
                   crystal_form="II")]
    after = [_fit("liquid", "clarke-glew-4", {"A": 1.0, "B": 2.0, "C": 3.0, "D": 4.0}, [1, 1, 1, 1])]
    c = compare_audits(_archived(1, before), _archived(2, after))
    assert [(f.branch, f.equation_before, f.equation_after) for f in c.fits] == [
        ("liquid", "antoine", "clarke-glew-4"), ("solid II", "clausius-clapeyron-2", None)]
    assert c.parameters == ()


def test_sources_and_checks_present_in_one_audit_only():
    checks_a = (ArchivedCheck("outliers", "warn", ""), ArchivedCheck("duplicates", "pass", ""))
    checks_b = (ArchivedCheck("outliers", "warn", ""), ArchivedCheck("copied-values", "warn", ""))
    src_a = [{"source": "S1", "branch": "liquid", "status": "suspect", "pattern": "pressure-scale"}]
    src_b = [{"source": "S1", "branch": "liquid", "status": "ok", "pattern": "none"},
             {"source": "S2", "branch": "liquid", "status": "ok", "pattern": "none"}]
    c = compare_audits(_archived(1, [], sources=src_a, checks=checks_a),
                       _archived(2, [], sources=src_b, checks=checks_b))
    assert [(x.check_id, x.before, x.after) for x in c.checks] == [("duplicates", "pass", None),
                                                                    ("copied-values", None, "warn")]
    assert [(s.source, s.status_before, s.pattern_before, s.status_after, s.pattern_after) for s in c.sources] == [
        ("S1", "suspect", "pressure-scale", "ok", "none"), ("S2", None, None, "ok", "none")]


def test_profile_settings_between_unrelated_profiles():
    default = (ROOT / "rules" / "default.toml").read_text(encoding="utf-8")
    mine = '[profile]\nname = "mine"\n\n[checks.outliers]\nseverity = "fail"\n'
    changes = profile_setting_changes("mine", mine, "strict", (ROOT / "rules" / "strict.toml").read_text())
    # neither extends the other: every setting either file makes and the other does not match
    assert {c.key for c in changes} == {"checks.outliers.severity", "checks.readability.severity",
                                        "checks.duplicates.severity", "checks.duplicates.P_tolerance_percent"}
    # a profile against itself: nothing
    assert profile_setting_changes("default", default, "default", default) == ()
