"""The package's import graph has no circles: a module never imports, directly or through
others, a module that imports it — at module level or inside a function, ``from . import x``
counted as importing ``x``.  Circles are what made the registry, the context and the profile
reader depend on one another, and the CLI and the demo."""

from __future__ import annotations

import ast
import sys
from pathlib import Path

AUDIT = Path(__file__).resolve().parents[1] / "audit"


def _graph() -> dict[str, set[str]]:
    mods = {}
    for p in AUDIT.rglob("*.py"):
        if "migrations" in p.parts:  # alembic's scripts are run by alembic, never imported
            continue
        name = ".".join(p.relative_to(AUDIT.parent).with_suffix("").parts)
        mods[name[:-9] if name.endswith(".__init__") else name] = p
    graph = {m: set() for m in mods}
    for m, p in mods.items():
        pkg = m if p.name == "__init__.py" else m.rsplit(".", 1)[0]
        for node in ast.walk(ast.parse(p.read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom):
                if node.level:
                    base = pkg.split(".")[:len(pkg.split(".")) - (node.level - 1)]
                    target = ".".join(base + ([node.module] if node.module else []))
                else:
                    target = node.module or ""
                subs = {f"{target}.{a.name}" for a in node.names} & set(mods)
                graph[m] |= (subs or ({target} & set(mods))) - {m}
            elif isinstance(node, ast.Import):
                graph[m] |= {a.name for a in node.names if a.name in mods and a.name != m}
    return graph


def _circles(graph: dict[str, set[str]]) -> list[list[str]]:
    """Strongly connected components of more than one module (Tarjan 1972)."""
    sys.setrecursionlimit(max(10000, sys.getrecursionlimit()))
    index, low, stack, on, out, counter = {}, {}, [], set(), [], [0]

    def visit(v):
        index[v] = low[v] = counter[0]
        counter[0] += 1
        stack.append(v)
        on.add(v)
        for w in graph[v]:
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = []
            while True:
                w = stack.pop()
                on.discard(w)
                comp.append(w)
                if w == v:
                    break
            if len(comp) > 1:
                out.append(sorted(comp))

    for v in graph:
        if v not in index:
            visit(v)
    return out


def test_the_package_has_no_import_circles():
    graph = _graph()
    assert len(graph) > 60 and "audit.pipeline" in graph
    assert _circles(graph) == []


def test_the_circle_finder_finds_a_circle():
    assert _circles({"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}}) == [["a", "b", "c"]]
