"""Every registered check documents itself the same way (`vpaudit explain` prints it):
What it checks, Why it matters, Method, Example and Options in its docstring, in that order;
the options it names there exactly those it declares, each with its unit (or said to be
dimensionless); and a ``method`` summary with published ``references``."""

from __future__ import annotations

import re

import pytest

from audit.checks import all_checks
from audit.cli import main

SECTIONS = ("**What it checks.**", "**Why it matters.**", "**Method.**", "**Example.**", "**Options.**")

#: how an option without a unit says it is a pure number (a count, probability, coverage factor, ratio)
DIMENSIONLESS_MARKS = ("[-]", "dimensionless")

CHECK_IDS = list(all_checks())


def _section(doc: str, title: str) -> str:
    """The text of one ``**Title.**`` paragraph, up to the next section title."""
    start = doc.index(title) + len(title)
    following = [doc.index(s) for s in SECTIONS if s in doc and doc.index(s) >= start]
    return doc[start:min(following, default=len(doc))]


def test_every_registered_check_is_audited_here():
    # the parametrized tests below only cover what the registry lists: guard against an empty registry
    assert len(CHECK_IDS) == 19
    assert {"outliers", "sheet-units", "sheet-range"} <= set(CHECK_IDS)


@pytest.mark.parametrize("check_id", CHECK_IDS)
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
    assert all(ref.strip() for ref in cls.references), f"{check_id}: empty reference"
    assert cls.applies_to in ("table", "sheet")


@pytest.mark.parametrize("check_id", CHECK_IDS)
def test_the_method_paragraph_says_what_is_computed(check_id):
    # a heading alone, or the one-line ``method`` summary pasted in, is not a Method paragraph
    method = " ".join(_section(all_checks()[check_id].__doc__, "**Method.**").split())
    assert len(method) >= 200, f"{check_id}: Method paragraph is {len(method)} characters"


@pytest.mark.parametrize("check_id", CHECK_IDS)
def test_every_option_states_its_unit(check_id):
    for name, opt in all_checks()[check_id].options.items():
        if opt.kind is str:
            # a choice among named methods is no quantity; it must say what it may be
            assert opt.choices, f"{check_id}.{name}: a text option must list its choices"
            continue
        dimensionless = any(mark in opt.doc for mark in DIMENSIONLESS_MARKS)
        assert opt.unit.strip() or dimensionless, (
            f"{check_id}.{name}: give a unit, or say in the doc that it is dimensionless ({DIMENSIONLESS_MARKS})")
        assert not (opt.unit.strip() and dimensionless), f"{check_id}.{name}: a unit and '[-]' contradict"


def test_dois_are_written_the_same_way():
    # a DOI is cited as doi:10.<registrant>/<suffix>, never as a bare 10.x or a resolver URL
    for check_id, cls in all_checks().items():
        for ref in cls.references:
            assert "doi.org/" not in ref, f"{check_id}: {ref}"
            for doi in re.findall(r"doi:(\S+)", ref):
                assert re.fullmatch(r"10\.\d{4,9}/\S+?[^.,;)]", doi.rstrip(".,;)")), f"{check_id}: {doi}"


@pytest.mark.parametrize("check_id", ["outliers", "readability", "sheet-table"])
def test_explain_prints_the_method_and_the_units(check_id, capsys):
    cls = all_checks()[check_id]
    assert main(["explain", check_id]) == 0
    out = capsys.readouterr().out
    assert "**Method.**" in out
    # the paragraph itself, not just its heading: its first words as printed (the docstring is dedented)
    first_words = " ".join(_section(cls.__doc__, "**Method.**").split()[:6])
    assert first_words in " ".join(out.split())
    for name, opt in cls.options.items():
        line = next(ln for ln in out.splitlines() if ln.strip().startswith(f"{name} ="))
        assert (f"[{opt.unit}]" in line) if opt.unit else ("[-]" in line or opt.kind is str), line
