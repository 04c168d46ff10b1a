"""The modules of `predictor` import each other in one direction only (no cycle).

Every import counts, also those inside functions (lazy ones): a cycle hidden in a function
body still ties two modules together, as `cli.py` and `report.py` once were. Fact of the
trade (layered design), no source.
"""

from __future__ import annotations

import ast
import pathlib

import predictor

ROOT = pathlib.Path(predictor.__file__).parent


def _imported(path: pathlib.Path) -> set[str]:
    """Sibling modules of `predictor` that `path` imports anywhere in its body."""
    found = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if not isinstance(node, ast.ImportFrom):
            continue
        if node.level == 1:
            names = [node.module] if node.module else [a.name for a in node.names]
        elif node.level == 0 and node.module and node.module.split(".")[0] == "predictor":
            parts = node.module.split(".")
            names = parts[1:2] or [a.name for a in node.names]
        else:
            continue
        found.update(n.split(".")[0] for n in names)
    return {n for n in found if (ROOT / f"{n}.py").exists()} - {path.stem}


def graph() -> dict[str, set[str]]:
    return {p.stem: _imported(p) for p in ROOT.glob("*.py")}


def cycles(edges: dict[str, set[str]]) -> list[list[str]]:
    """One cycle per strongly connected group of more than one module (Tarjan's algorithm)."""
    index, low, stack, on_stack, groups = {}, {}, [], set(), []

    def visit(v):
        index[v] = low[v] = len(index)
        stack.append(v)
        on_stack.add(v)
        for w in edges.get(v, ()):
            if w not in index:
                visit(w)
                low[v] = min(low[v], low[w])
            elif w in on_stack:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            group = []
            while True:
                w = stack.pop()
                on_stack.discard(w)
                group.append(w)
                if w == v:
                    break
            if len(group) > 1:
                groups.append(sorted(group))

    for v in sorted(edges):
        if v not in index:
            visit(v)
    return groups


def test_the_cycle_finder_finds_a_cycle():
    assert cycles({"cli": {"report"}, "report": {"cli", "units"}, "units": set()}) == [
        ["cli", "report"]]
    assert cycles({"a": {"b"}, "b": {"c"}, "c": set()}) == []


def test_predictor_has_no_import_cycle():
    edges = graph()
    assert {"cli", "report", "formulation"} <= set(edges)
    assert "cli" not in edges["report"]
    assert cycles(edges) == [], f"import cycles: {cycles(edges)}"
