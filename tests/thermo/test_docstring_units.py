"""Every argument of the public thermodynamics API documents its unit.

A vapor-pressure tool mixes K and °C, Pa and mmHg, P and ln P; an argument
whose unit is not written down is a unit error waiting to happen.  This test
walks every submodule of ``audit.thermo`` and ``audit.consensus`` and checks
the numpydoc docstring of each public function and public method.

The rule enforced
-----------------
*Which callables.*  Functions defined in the module (not re-exported ones),
and the methods, static methods and class methods defined in the body of a
class defined in the module, whose names do not start with ``_`` and whose
signature has at least one argument other than ``self``, ``cls``, ``*args``
and ``**kwargs``.  Properties take no argument and are not checked.

*Documented.*  The docstring has a ``Parameters`` section (a ``Parameters``
line underlined with dashes) in which every such argument is named in an
entry line ``name : type`` (or ``name1, name2 : type``, or a bare ``name``);
the entry's text is that line plus the more-indented lines below it.

*Unit.*  The entry's text contains a unit in square brackets: ``[K]``,
``[Pa]``, ``[J/mol]``, ``[ln Pa]``, ``[-]`` for a dimensionless number, ...
A bracket counts as a unit when its content is not empty, contains no comma
(``[0, 1]`` is an interval, not a unit), is not just digits, and is not
followed by ``_`` (``[1]_`` is a citation).

*Declared exceptions.*  An argument that is not a physical quantity may
instead say what it is with one of the whole words ``callable``, ``name``,
``flag``, ``count`` or ``label`` (singular or plural), or the phrase
``no unit`` (for objects such as a fit or an equation).  The words are matched case-insensitively
anywhere in the entry's text, so "labels of each point's source" or "number
of points (a count)" pass, while an entry that only says "Temperatures" fails.
"""

from __future__ import annotations

import importlib
import inspect
import pkgutil
import re

import pytest

PACKAGES = ("audit.thermo", "audit.consensus")

UNIT = re.compile(r"\[(?P<body>[^\[\]\n]+)\](?!_)")
EXEMPT = re.compile(r"\b(callables?|names?|flags?|counts?|labels?)\b|\bno unit\b", re.IGNORECASE)
SKIP_ARGS = {"self", "cls"}


def _modules():
    mods = []
    for pkg_name in PACKAGES:
        pkg = importlib.import_module(pkg_name)
        mods.append(pkg)
        for info in pkgutil.iter_modules(pkg.__path__, pkg_name + "."):
            mods.append(importlib.import_module(info.name))
    return mods


def _public_callables():
    """(qualified name, function) for every callable the rule covers."""
    out = []
    for mod in _modules():
        for name, obj in vars(mod).items():
            if name.startswith("_") or getattr(obj, "__module__", None) != mod.__name__:
                continue
            if inspect.isfunction(obj) or inspect.isfunction(getattr(obj, "__wrapped__", None)):
                out.append((f"{mod.__name__}.{name}", obj))
            elif inspect.isclass(obj):
                for mname, member in vars(obj).items():
                    if mname.startswith("_"):
                        continue
                    if isinstance(member, (staticmethod, classmethod)):
                        member = member.__func__
                    if inspect.isfunction(member):
                        out.append((f"{mod.__name__}.{name}.{mname}", member))
    return out


def _arguments(func) -> list[str]:
    sig = inspect.signature(func)
    return [p.name for p in sig.parameters.values()
            if p.name not in SKIP_ARGS
            and p.kind not in (inspect.Parameter.VAR_POSITIONAL, inspect.Parameter.VAR_KEYWORD)]


def parse_parameters(doc: str | None) -> dict[str, str] | None:
    """Map each name in the numpydoc Parameters section to its entry's text.

    Returns None when there is no Parameters section.  ``*args``/``**kw``
    entries are stored without their stars.
    """
    if not doc:
        return None
    lines = inspect.cleandoc(doc).splitlines()
    start = None
    for i in range(len(lines) - 1):
        if lines[i].strip() == "Parameters" and set(lines[i + 1].strip()) == {"-"}:
            start = i + 2
            break
    if start is None:
        return None
    base = len(lines[start - 2]) - len(lines[start - 2].lstrip())
    entries: dict[str, str] = {}
    current: list[str] = []
    names: list[str] = []

    def flush():
        for n in names:
            entries[n] = "\n".join(current)

    for j in range(start, len(lines)):
        line = lines[j]
        indent = len(line) - len(line.lstrip())
        # the next section: a header line underlined with dashes
        if (line.strip() and indent <= base and j + 1 < len(lines)
                and set(lines[j + 1].strip()) == {"-"}):
            break
        if line.strip() and indent <= base:
            flush()
            head = line.strip().split(" : ", 1)[0].rstrip(":")
            names = [n.strip().lstrip("*") for n in head.split(",") if n.strip()]
            current = [line.strip()]
        elif names:
            current.append(line.strip())
    flush()
    return entries


def has_unit_or_exemption(text: str) -> bool:
    for m in UNIT.finditer(text):
        body = m.group("body").strip()
        if body and "," not in body and not body.isdigit():
            return True
    return bool(EXEMPT.search(text))


CALLABLES = _public_callables()


def test_the_walk_finds_the_api():
    # guards against a walk that silently checks nothing
    names = {q for q, _ in CALLABLES}
    assert "audit.thermo.fitting.fit_equation" in names
    assert "audit.consensus.build.build_branch_consensus" in names
    assert len(CALLABLES) > 40


@pytest.mark.parametrize("qualname,func", [c for c in CALLABLES if _arguments(c[1])],
                         ids=[q for q, f in CALLABLES if _arguments(f)])
def test_every_argument_is_documented_with_its_unit(qualname, func):
    entries = parse_parameters(inspect.getdoc(func))
    assert entries is not None, f"{qualname} has no numpydoc Parameters section"
    missing = [a for a in _arguments(func) if a not in entries]
    assert not missing, f"{qualname}: arguments not in Parameters: {missing}"
    unitless = [a for a in _arguments(func) if not has_unit_or_exemption(entries[a])]
    assert not unitless, (f"{qualname}: no unit in brackets (or declared non-quantity) for {unitless}")


# -- the checker itself must be able to fail ------------------------------------------
def _doc(body: str) -> str:
    return "Summary.\n\nParameters\n----------\n" + body + "\nReturns\n-------\nfloat\n    Value [Pa].\n"


def test_checker_rejects_a_missing_unit():
    entries = parse_parameters(_doc("T : float\n    Temperature.\nP : float\n    Pressure [Pa].\n"))
    assert not has_unit_or_exemption(entries["T"])
    assert has_unit_or_exemption(entries["P"])


def test_checker_does_not_take_intervals_or_citations_for_units():
    entries = parse_parameters(_doc("w : array_like\n    Weights in [0, 1], see [1]_.\n"))
    assert not has_unit_or_exemption(entries["w"])


def test_checker_reads_shared_entries_and_stops_at_the_next_section():
    entries = parse_parameters(_doc("T, P : array_like\n    Temperatures [K], pressures [Pa].\n"
                                    "**fixed\n    Held quantities (by name).\n"))
    assert set(entries) == {"T", "P", "fixed"}
    assert "Returns" not in entries["fixed"]


def test_checker_sees_a_missing_parameters_section():
    assert parse_parameters("Just a summary.") is None
