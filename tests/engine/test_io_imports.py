"""The modules of engine.io import one another in one direction only: no circle, lazy or not."""

from __future__ import annotations

import ast
from pathlib import Path

IO = Path(__file__).resolve().parents[2] / "engine" / "io"


def _imports_within_io() -> dict[str, set[str]]:
    """Each module of engine/io and the engine/io modules it imports (at the top or inside a
    function), read from the source."""
    graph: dict[str, set[str]] = {}
    for path in sorted(IO.glob("*.py")):
        if path.stem == "__init__":
            continue
        found: set[str] = set()
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.ImportFrom) and node.level == 1 and node.module:
                found.add(node.module.split(".")[0])
            elif isinstance(node, ast.ImportFrom) and node.level == 1:
                found.update(alias.name for alias in node.names)
            elif isinstance(node, (ast.Import, ast.ImportFrom)):
                module = node.module if isinstance(node, ast.ImportFrom) else None
                names = [module] if module else [alias.name for alias in node.names]
                found.update(n.split(".")[2] for n in names if n and n.startswith("engine.io."))
        graph[path.stem] = found
    return graph


def _circles(graph: dict[str, set[str]]) -> list[list[str]]:
    """Every module that can reach itself, with one path back (depth-first search)."""
    circles = []
    for start in graph:
        stack = [(start, [start])]
        seen: set[str] = set()
        while stack:
            module, path = stack.pop()
            for target in graph.get(module, ()):
                if target == start:
                    circles.append(path + [start])
                    stack.clear()
                    break
                if target not in seen:
                    seen.add(target)
                    stack.append((target, path + [target]))
    return circles


def test_engine_io_imports_form_no_circle():
    graph = _imports_within_io()
    assert {"read", "sheets", "build", "table"} <= graph.keys()
    assert "build" in graph["read"] and "build" in graph["sheets"]  # the shared builder sits below both
    assert _circles(graph) == []


def test_a_circle_is_found_when_there_is_one():
    # the search itself, on the circle this package once had (read <-> sheets over build_table)
    assert _circles({"read": {"sheets", "table"}, "sheets": {"read"}, "table": set()}) == [
        ["read", "sheets", "read"], ["sheets", "read", "sheets"]]
    assert _circles({"read": {"sheets"}, "sheets": {"build"}, "build": set()}) == []
