"""The modules of engine/ and desktop/ import only what they need, and never hide a failed import.

Read with ``ast`` (nothing is imported), so it runs without Qt and finds imports inside
functions too.
"""

from __future__ import annotations

import ast
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
PACKAGES = ("engine", "desktop")


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(ROOT).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def _modules() -> dict[str, ast.Module]:
    """Every module of the project by dotted name, parsed."""
    return {_module_name(path): ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
            for package in PACKAGES for path in sorted((ROOT / package).rglob("*.py"))}


def _absolute(module: str, node: ast.ImportFrom, is_package: bool) -> str:
    """The dotted name ``from ... import`` reads from, with a relative level resolved."""
    if not node.level:
        return node.module or ""
    base = module.split(".") if is_package else module.split(".")[:-1]
    base = base[: len(base) - (node.level - 1)]
    return ".".join(base + ([node.module] if node.module else []))


def _imported_names(module: str, node: ast.Import | ast.ImportFrom, is_package: bool) -> list[str]:
    """The dotted names an import statement may load (``from p import m`` may load ``p.m``)."""
    if isinstance(node, ast.Import):
        return [alias.name for alias in node.names]
    source = _absolute(module, node, is_package)
    return [source] + [f"{source}.{alias.name}" for alias in node.names if alias.name != "*"]


def _is_project(name: str) -> bool:
    return name.split(".")[0] in PACKAGES


def _catches_import_error(handler: ast.ExceptHandler) -> bool:
    caught = handler.type
    names = caught.elts if isinstance(caught, ast.Tuple) else [caught]
    return caught is None or any(isinstance(n, ast.Name) and n.id in {"ImportError", "ModuleNotFoundError"}
                                 for n in names)


def test_no_project_import_is_guarded_against_its_failure():
    # A project module is always there: an ImportError around one can only hide a real error
    # (a renamed name, a broken module) behind a fallback. An optional outside library may be
    # guarded, and then the fallback must say what is missing.
    modules = _modules()
    guarded = []
    for module, tree in modules.items():
        is_package = module in PACKAGES or (ROOT / module.replace(".", "/") / "__init__.py").exists()
        for node in ast.walk(tree):
            if not isinstance(node, ast.Try) or not any(_catches_import_error(h) for h in node.handlers):
                continue
            for inner in (n for statement in node.body for n in ast.walk(statement)):
                if isinstance(inner, (ast.Import, ast.ImportFrom)) and any(
                        _is_project(name) for name in _imported_names(module, inner, is_package)):
                    guarded.append(f"{module}:{inner.lineno}")
    assert guarded == []
