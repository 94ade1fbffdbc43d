"""The rule profile's row limit: a table above ``limits.max_rows`` ends in one message.

Pressures are IAPWS-IF97 saturation pressures of water (``iapws.iapws97._PSat_T``,
which returns MPa), so a table at the limit is a real, clean table that the audit
reads in full.
"""

from __future__ import annotations

import json
import tomllib
from importlib import resources

import openpyxl
import pytest
from iapws.iapws97 import _PSat_T

from audit.cli import audit_file, main
from audit.errors import InputError
from audit.model import from_arrays
from audit.pipeline import run_audit
from audit.profiles import load_profile

LIMIT = 8


def _water(n):
    """n (T [K], P [kPa]) pairs on the IAPWS-IF97 saturation line from 300 K in steps of 5 K."""
    T = [300.0 + 5.0 * i for i in range(n)]
    return T, [_PSat_T(t) * 1e3 for t in T]


def _csv(n, *, blank_inside=False, blank_after=0):
    T, P = _water(n)
    lines = ["T/K,p/kPa"] + [f"{t:.2f},{p:.6g}" for t, p in zip(T, P)]
    if blank_inside:
        lines.insert(3, "")
    return "\n".join(lines) + "\n" + "\n" * blank_after


@pytest.fixture
def small_profile(tmp_path):
    """A profile of one's own: the default checks, at most LIMIT data rows."""
    path = tmp_path / "small.toml"
    path.write_text(f'[profile]\nname = "small"\nextends = "default"\n\n'
                    f"[limits]\nmax_rows = {LIMIT}\n", encoding="utf-8")
    return str(path)


def _refused(exc: InputError, file, n):
    msg = exc.message
    assert str(file) in msg
    assert f"the table has {n} data rows" in msg
    assert f"profile 'small' audits at most {LIMIT} (limits.max_rows)" in msg
    assert "split the table by source or raise the limit" in msg


def test_a_table_above_the_limit_is_one_clear_error(tmp_path, small_profile):
    data = tmp_path / "big.csv"
    data.write_text(_csv(LIMIT + 1), encoding="utf-8")
    with pytest.raises(InputError) as err:
        audit_file(str(data), profile=small_profile)
    _refused(err.value, data, LIMIT + 1)


def test_the_cli_refuses_it_with_exit_2_and_one_line(tmp_path, small_profile, capsys):
    data = tmp_path / "big.csv"
    data.write_text(_csv(3 * LIMIT), encoding="utf-8")
    out = tmp_path / "out"
    code = main(["check", str(data), "--profile", small_profile, "--out", str(out), "--format", "json"])
    err = capsys.readouterr().err
    assert code == 2
    assert err.count("\n") == 1 and f"the table has {3 * LIMIT} data rows" in err
    assert not out.exists()


def test_a_table_at_the_limit_is_audited(tmp_path, small_profile):
    data = tmp_path / "at.csv"
    data.write_text(_csv(LIMIT, blank_after=3), encoding="utf-8")  # empty lines after the table are no rows
    dataset, prof, result = audit_file(str(data), profile=small_profile)
    assert prof.limits.max_rows == LIMIT
    assert len(result.points) == LIMIT
    assert all(p.status == "ok" for p in result.points)
    T, P = _water(LIMIT)
    assert result.points[-1].P_Pa == pytest.approx(P[-1] * 1e3, rel=1e-5)  # printed to 6 digits


def test_an_empty_line_inside_the_table_is_a_row(tmp_path, small_profile):
    # it stays in the dataset as an unreadable row, so it counts against the limit
    data = tmp_path / "gap.csv"
    data.write_text(_csv(LIMIT, blank_inside=True), encoding="utf-8")
    with pytest.raises(InputError) as err:
        audit_file(str(data), profile=small_profile)
    _refused(err.value, data, LIMIT + 1)


def test_json_records_count_against_the_limit(tmp_path, small_profile):
    T, P = _water(LIMIT + 2)
    records = [{"T/K": t, "p/kPa": p} for t, p in zip(T, P)]
    for name in ("big.json", "big.txt"):  # by extension, and recognised by content
        data = tmp_path / name
        data.write_text(json.dumps(records), encoding="utf-8")
        with pytest.raises(InputError) as err:
            audit_file(str(data), profile=small_profile)
        _refused(err.value, data, LIMIT + 2)


def test_xlsx_rows_count_against_the_limit(tmp_path, small_profile):
    book = openpyxl.Workbook()
    ws = book.active
    ws.append(["T/K", "p/kPa"])
    for t, p in zip(*_water(LIMIT + 1)):
        ws.append([t, p])
    ws.append([])  # an empty row after the table is no row
    data = tmp_path / "big.xlsx"
    book.save(data)
    with pytest.raises(InputError) as err:
        audit_file(str(data), profile=small_profile)
    _refused(err.value, data, LIMIT + 1)


def test_run_audit_refuses_a_dataset_above_the_limit(small_profile):
    T, P = _water(LIMIT + 1)
    dataset = from_arrays(T, [p * 1e3 for p in P], phase="liquid")
    with pytest.raises(InputError) as err:
        run_audit(dataset, load_profile(small_profile))
    assert "<arrays>" in err.value.message
    assert f"the table has {LIMIT + 1} data rows; profile 'small' audits at most {LIMIT}" in err.value.message


def test_the_default_limit_is_shown_by_vpaudit_profiles(capsys):
    text = resources.files("audit.rules").joinpath("default.toml").read_text(encoding="utf-8")
    declared = tomllib.loads(text)["limits"]["max_rows"]
    assert load_profile("default").limits.max_rows == declared
    assert load_profile("strict").limits.max_rows == declared  # inherited through extends
    assert main(["profiles"]) == 0
    out = capsys.readouterr().out
    assert f"max_rows={declared} (data rows per audit)" in out


@pytest.mark.parametrize("value, expected", [
    ('"many"', "[limits] max_rows must be of type int, got 'many'"),
    ("1.5e4", "[limits] max_rows must be of type int, got 15000.0"),
    ("true", "[limits] max_rows must be of type int, got True"),
    ("0", "[limits] max_rows must be >= 1, got 0"),
    ("-5", "[limits] max_rows must be >= 1, got -5"),
])
def test_the_loader_rejects_a_bad_limit_with_file_and_key(tmp_path, value, expected):
    path = tmp_path / "mine.toml"
    path.write_text(f'[profile]\nextends = "default"\n\n[limits]\nmax_rows = {value}\n', encoding="utf-8")
    with pytest.raises(InputError) as err:
        load_profile(str(path))
    assert expected in err.value.message
    assert "mine.toml" in err.value.message


def test_the_loader_rejects_an_unknown_limit(tmp_path):
    path = tmp_path / "mine.toml"
    path.write_text('[profile]\nextends = "default"\n\n[limits]\nmax_points = 5\n', encoding="utf-8")
    with pytest.raises(InputError, match=r"mine\.toml: \[limits\] has unknown key\(s\): max_points"):
        load_profile(str(path))
