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

*Returns.*  The same unit rule holds for the entries of the ``Returns``
section (a ``Returns`` line underlined with dashes; each entry is a line
``name : type`` or a bare ``type`` at the section's indent, plus the
more-indented lines below it).  It applies to every covered public callable
(with or without arguments) that returns something: one whose return
annotation is not ``None`` and whose own body (nested functions and classes
excluded) has at least one ``return <value>`` statement.  Such a callable
must have a ``Returns`` section with at least one entry, and every entry
needs a unit in brackets or a declared exception; a returned object (a fit,
an equation, a result dataclass) says ``no unit`` and documents its fields'
units in its own class docstring.
"""

from __future__ import annotations

import importlib
import inspect
import ast
import pkgutil
import re
import textwrap

import pytest

PACKAGES = ("audit.thermo", "audit.consensus")

UNIT = re.compile(r"\[(?P<body>[^\[\]\n]+)\](?!_)")
EXEMPT = re.compile(r"\b(callables?|names?|flags?|counts?|labels?)\b|\bno\s+unit\b", re.IGNORECASE)
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


def _section_entries(doc: str | None, header: str) -> list[tuple[str, str]] | None:
    """(entry head line, entry text) for each entry of a numpydoc section.

    Returns None when the docstring has no ``header`` section.
    """
    if not doc:
        return None
    lines = inspect.cleandoc(doc).splitlines()
    start = None
    for i in range(len(lines) - 1):
        if lines[i].strip() == header and set(lines[i + 1].strip()) == {"-"}:
            start = i + 2
            break
    if start is None:
        return None
    base = len(lines[start - 2]) - len(lines[start - 2].lstrip())
    entries: list[tuple[str, list[str]]] = []
    for j in range(start, len(lines)):
        line = lines[j]
        indent = len(line) - len(line.lstrip())
        # the next section: a header line underlined with dashes
        if (line.strip() and indent <= base and j + 1 < len(lines)
                and set(lines[j + 1].strip()) == {"-"}):
            break
        if line.strip() and indent <= base:
            entries.append((line.strip(), [line.strip()]))
        elif entries:
            entries[-1][1].append(line.strip())
    return [(head, "\n".join(text)) for head, text in entries]


def parse_parameters(doc: str | None) -> dict[str, str] | None:
    """Map each name in the numpydoc Parameters section to its entry's text.

    Returns None when there is no Parameters section.  ``*args``/``**kw``
    entries are stored without their stars.
    """
    found = _section_entries(doc, "Parameters")
    if found is None:
        return None
    entries: dict[str, str] = {}
    for head, text in found:
        head = head.split(" : ", 1)[0].rstrip(":")
        for n in head.split(","):
            if n.strip():
                entries[n.strip().lstrip("*")] = text
    return entries


def parse_returns(doc: str | None) -> list[str] | None:
    """The text of each entry of the numpydoc Returns section, in order.

    Returns None when there is no Returns section.
    """
    found = _section_entries(doc, "Returns")
    return None if found is None else [text for _, text in found]


class _ReturnFinder(ast.NodeVisitor):
    """Finds ``return <value>`` in a function's own body (not in nested scopes)."""

    def __init__(self):
        self.found = False

    def visit_Return(self, node):
        if node.value is not None:
            self.found = True

    def _skip(self, node):
        pass

    visit_FunctionDef = visit_AsyncFunctionDef = visit_Lambda = visit_ClassDef = _skip


def returns_a_value(func) -> bool:
    """True when ``func`` is not annotated ``-> None`` and has a ``return <value>``."""
    func = inspect.unwrap(func)
    ann = inspect.signature(func).return_annotation
    if ann is None or ann == "None":
        return False
    tree = ast.parse(textwrap.dedent(inspect.getsource(func)))
    node = tree.body[0]
    finder = _ReturnFinder()
    for stmt in node.body:
        finder.visit(stmt)
    return finder.found


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


RETURNING = [c for c in CALLABLES if returns_a_value(c[1])]


def test_the_walk_finds_callables_that_return():
    names = {q for q, _ in RETURNING}
    assert "audit.thermo.fitting.fit_equation" in names
    assert len(RETURNING) > 40


@pytest.mark.parametrize("qualname,func", RETURNING, ids=[q for q, _ in RETURNING])
def test_every_returned_value_is_documented_with_its_unit(qualname, func):
    entries = parse_returns(inspect.getdoc(func))
    assert entries, f"{qualname} returns a value but has no numpydoc Returns section"
    unitless = [e.splitlines()[0] for e in entries if not has_unit_or_exemption(e)]
    assert not unitless, (f"{qualname}: Returns entries with no unit in brackets "
                          f"(or declared non-quantity): {unitless}")


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


def test_returns_checker_rejects_a_missing_unit():
    doc = ("Summary.\n\nReturns\n-------\nT : ndarray\n    Temperatures.\n"
           "P : ndarray\n    Pressures [Pa].\nfit : Fit\n    The fit (no unit).\n\nNotes\n-----\nx [K]\n")
    entries = parse_returns(doc)
    assert len(entries) == 3
    assert [has_unit_or_exemption(e) for e in entries] == [False, True, True]
    assert parse_returns("Just a summary.") is None


def _returns_value(x) -> float:
    def inner():
        return 1.0
    return x


def _returns_nothing(x):
    def inner():
        return 1.0
    inner()


def _annotated_none(x) -> None:
    return print(x)


def test_returns_rule_selects_callables_that_return_a_value():
    assert returns_a_value(_returns_value)
    assert not returns_a_value(_returns_nothing)
    assert not returns_a_value(_annotated_none)
