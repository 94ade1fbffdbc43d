"""Every registered check documents itself the same way (`vpaudit explain` prints it):
What it checks, Why it matters, Example and Options in its docstring, the options it names
there exactly those it declares, and a ``method`` paragraph with published ``references``."""

from __future__ import annotations

import re

import pytest

from audit.checks import all_checks

SECTIONS = ("**What it checks.**", "**Why it matters.**", "**Example.**", "**Options.**")


@pytest.mark.parametrize("check_id", list(all_checks()))
def test_the_check_is_documented(check_id):
    cls = all_checks()[check_id]
    doc = cls.__doc__ or ""
    missing = [s for s in SECTIONS if s not in doc]
    assert missing == [], f"{check_id}: docstring lacks {missing}"
    positions = [doc.index(s) for s in SECTIONS]
    assert positions == sorted(positions), f"{check_id}: sections out of order"
    options_text = doc[doc.index("**Options.**"):]
    # every check has `enabled` and `severity`; a check may name them
    named = set(re.findall(r"``([A-Za-z_][A-Za-z0-9_]*)``", options_text)) - {"enabled", "severity"}
    assert named == set(cls.options), f"{check_id}: Options names {sorted(named)}, declares {sorted(cls.options)}"
    assert cls.method.strip() and cls.references, f"{check_id}: method and references are required"
    assert cls.applies_to in ("table", "sheet")
