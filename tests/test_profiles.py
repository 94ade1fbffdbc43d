"""Rule profiles: loading, extending and validation."""

from __future__ import annotations

import pytest

from audit.checks import all_checks
from audit.errors import InputError
from audit.profiles import load_profile, shipped_profiles


def test_default_profile_declares_every_option_of_every_check():
    prof = load_profile("default")
    for check_id, cls in all_checks().items():
        s = prof.settings(check_id)
        assert set(s.options) == set(cls.options), check_id
    assert len(prof.sha256) == 64


def test_every_shipped_profile_loads():
    names = shipped_profiles()
    assert "default" in names and "strict" in names
    for name in names:
        load_profile(name)


def test_extends_changes_only_named_keys():
    base, strict = load_profile("default"), load_profile("strict")
    assert strict.settings("duplicates")["P_tolerance_percent"] == 0.5
    assert base.settings("duplicates")["P_tolerance_percent"] == 1.0
    assert strict.settings("duplicates")["k"] == base.settings("duplicates")["k"]
    assert strict.settings("readability").severity == "fail"
    assert strict.chain[0].endswith("default.toml")


def _write(tmp_path, text):
    path = tmp_path / "mine.toml"
    path.write_text(text, encoding="utf-8")
    return str(path)


@pytest.mark.parametrize("body, expected", [
    ('[checks.duplicates]\nk_factor = 2.0\n', "unknown option(s): k_factor"),
    ('[checks.duplicates]\nk = "two"\n', "must be of type float"),
    ('[checks.duplicates]\nk = 0.0\n', "must be >= 0.5"),
    ('[checks.no-such-check]\nenabled = true\n', "unknown check(s) in profile: no-such-check"),
    ('[checks.monotonic]\nseverity = "error"\n', "severity must be one of"),
    ('[profile]\nextends = "default"\ncolour = "red"\n', "[profile] has unknown key(s): colour"),
    ('[checks.duplicates\n', "not a valid TOML profile"),
])
def test_bad_profile_is_a_clear_error(tmp_path, body, expected):
    text = body if body.startswith("[profile]") else '[profile]\nextends = "default"\n' + body
    with pytest.raises(InputError) as err:
        load_profile(_write(tmp_path, text))
    assert expected in err.value.message
    assert "mine.toml" in err.value.message


def test_profile_without_base_must_be_complete(tmp_path):
    with pytest.raises(InputError, match="no section"):
        load_profile(_write(tmp_path, '[profile]\nname = "bare"\n'))


def test_unknown_profile_name_lists_shipped_ones():
    with pytest.raises(InputError, match="shipped profiles: default"):
        load_profile("nonesuch")
