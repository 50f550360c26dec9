"""The modules of engine/ and desktop/ import downwards only, in no circle, and never hide a
failed import.

Read with ``ast`` (nothing is imported), so it runs without Qt and sees the imports inside
functions too: an import put in a function to dodge a circle is still a backwards import.
"""

from __future__ import annotations

import ast
from fnmatch import fnmatchcase
from functools import lru_cache
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
PACKAGES = ("engine", "desktop")

# The layers, lowest first: a module may import from its own layer or any layer below, never
# from one above. Lower means knows less. A name with "*" covers the modules of a folder; a
# name given exactly takes precedence over a pattern. A new module goes into one of them
# (the test says which module has no place).
LAYERS: tuple[tuple[str, ...], ...] = (
    # engine: the words, the errors and the typed results everything else speaks in
    ("engine", "engine.text", "engine.errors", "engine.wording", "engine.results", "engine.rounding",
     "engine.tasks"),
    # what the user asks and decided: plain records the analysis reads
    ("engine.question", "engine.spec"),
    # the shared statistics rules (SD, quartiles, fences, tails), a root finder, Shapiro-Wilk,
    # the noncentral t limits
    ("engine.stats_basics", "engine.root_finding", "engine.shapiro_wilk", "engine.noncentral_t"),
    # statistics helpers of one group (sorted values, the common scale, SD), also used by io
    ("engine.summary", "engine.group_stats", "engine.multiplicity", "engine.draw_log"),
    # from a file to a table and two groups; the package's front last, so io's own modules
    # never import through it
    ("engine.io.*",),
    ("engine.io",),
    # one module per procedure family and the checks they share; the registry of them above
    ("engine.procedures", "engine.procedures.*"),
    ("engine.procedures.registry",),
    # planning the next study: sizes, power and detectable differences, run on the procedures'
    # own formulas; its front last
    ("engine.planning.plan", "engine.planning.shapes", "engine.planning.summary_pilot"),
    ("engine.planning.result", "engine.planning.exact_power", "engine.planning.sentence",
     "engine.planning.rank_approximation", "engine.planning.batch_tests"),
    ("engine.planning.equivalence_power", "engine.planning.simulation"),
    ("engine.planning.planner",),
    ("engine.planning",),
    # a plan in words for a document, and as the saved-analysis file keeps it
    ("engine.plan_words", "engine.plan_member"),
    # what the data look like, and effect sizes built on the procedures
    ("engine.diagnostics", "engine.effects", "engine.paired_effects"),
    # the checks of matched pairs, built on the checks of one sample
    ("engine.paired_diagnostics",),
    # the suggested procedure from the checks (for a margin question, carried over to its
    # margin record); for matched pairs, on the same types
    ("engine.advice", "engine.margin_advice"),
    ("engine.paired_advice",),
    # every part of one comparison together
    ("engine.analysis",),
    # the comparison of two groups known by their summary statistics
    ("engine.summary_analysis",),
    # an analysis in words, tables and JSON
    ("engine.side_by_side", "engine.report", "engine.report.*", "engine.jsonout"),
    # the path from a file to an analysis
    ("engine.pipeline",),
    # the same two groups compared on several measurements
    ("engine.outcomes",),
    # the saved-analysis file (its several-outcomes member beside it), the window's session
    ("engine.saved", "engine.saved_outcomes", "engine.session"),
    # where the command may write a report; the command's question and design flags
    ("engine.audit", "engine.question_flags", "engine.column_flags"),
    # the headless command (planning's, summaries' and outcomes' parts below the rest)
    ("engine.plan_cli", "engine.summary_cli", "engine.outcomes_cli"),
    ("engine.cli",),
    ("engine.__main__",),
    # desktop, above all of engine: parts that know no panel
    ("desktop", "desktop.artwork", "desktop.collector", "desktop.recent", "desktop.clipboard",
     "desktop.plain_text"),
    ("desktop.table_model", "desktop.icons", "desktop.plots", "desktop.workers", "desktop.desktop_entry",
     "desktop.panel_parts"),
    ("desktop.messages", "desktop.export", "desktop.paired_plots"),
    ("desktop.margin_entry",),
    # one panel on its own over a file (each panel's __main__)
    ("desktop.panel_alone",),
    ("desktop.data_panel", "desktop.setup_panel", "desktop.choice_panel", "desktop.findings_panel",
     "desktop.plan_panel"),
    # summary statistics and several outcomes, each in a window of its own (an outcome's findings
    # in the findings panel)
    ("desktop.summary_form", "desktop.outcomes_panel"),
    ("desktop.main_window", "desktop.first_start"),
    # the program and the README pictures
    ("desktop.app", "desktop.screens"),
    ("desktop.__main__",),
)

# Imports that go against LAYERS or close a circle today, each as (importer, imported). The set
# only shrinks: the test fails when one of them is gone, so take it out here with its fix.
STILL_TO_REMOVE: frozenset[tuple[str, str]] = frozenset({
})


def _module_name(path: Path) -> str:
    parts = list(path.relative_to(ROOT).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


@lru_cache(maxsize=None)
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


def _is_package(module: str) -> bool:
    return module in PACKAGES or (ROOT / module.replace(".", "/") / "__init__.py").exists()


@lru_cache(maxsize=None)
def _import_graph() -> dict[str, set[str]]:
    """Each module's project imports, at the top and inside functions alike.

    ``from p import m`` is an import of the module ``p.m`` where there is one, else of ``p``.
    """
    modules = _modules()
    graph: dict[str, set[str]] = {}
    for module, tree in modules.items():
        is_package = _is_package(module)
        imported = set()
        for node in ast.walk(tree):
            if isinstance(node, ast.Import):
                imported.update(alias.name for alias in node.names)
            elif isinstance(node, ast.ImportFrom):
                source = _absolute(module, node, is_package)
                imported.update(f"{source}.{alias.name}" if f"{source}.{alias.name}" in modules else source
                                for alias in node.names)
        graph[module] = {name for name in imported if name in modules and name != module}
    return graph


def _layer_of(module: str) -> int | None:
    for index, layer in enumerate(LAYERS):
        if module in layer:
            return index
    for index, layer in enumerate(LAYERS):
        if any("*" in name and fnmatchcase(module, name) for name in layer):
            return index
    return None


def _edges(graph: dict[str, set[str]]) -> set[tuple[str, str]]:
    return {(importer, imported) for importer, targets in graph.items() for imported in targets}


def _cycles(edges: set[tuple[str, str]]) -> list[list[str]]:
    """One circle through each group of modules that import each other (Tarjan's components)."""
    following: dict[str, list[str]] = {}
    for importer, imported in sorted(edges):
        following.setdefault(importer, []).append(imported)
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on_stack: set[str] = set()
    components: list[list[str]] = []

    def visit(node: str) -> None:
        index[node] = low[node] = len(index)
        stack.append(node)
        on_stack.add(node)
        for nxt in following.get(node, []):
            if nxt not in index:
                visit(nxt)
                low[node] = min(low[node], low[nxt])
            elif nxt in on_stack:
                low[node] = min(low[node], index[nxt])
        if low[node] == index[node]:
            component = []
            while True:
                top = stack.pop()
                on_stack.discard(top)
                component.append(top)
                if top == node:
                    break
            if len(component) > 1:
                components.append(component)

    for node in sorted(following):
        if node not in index:
            visit(node)
    return [_circle_in(set(component), following) for component in components]


def _circle_in(component: set[str], following: dict[str, list[str]]) -> list[str]:
    """A path from the component's first module back to itself, inside the component."""
    start = min(component)
    paths = {start: [start]}
    queue = [start]
    while queue:
        node = queue.pop(0)
        for nxt in following.get(node, []):
            if nxt == start:
                return paths[node] + [start]
            if nxt in component and nxt not in paths:
                paths[nxt] = paths[node] + [nxt]
                queue.append(nxt)
    raise AssertionError(f"no circle in {sorted(component)}")  # a component always has one


def test_every_module_has_a_layer():
    unplaced = sorted(module for module in _modules() if _layer_of(module) is None)
    assert unplaced == [], f"put each of these modules into LAYERS in tests/test_layers.py: {unplaced}"


def test_every_layer_name_is_used_once():
    names = [name for layer in LAYERS for name in layer]
    assert len(names) == len(set(names))


def test_no_module_imports_from_a_layer_above_it():
    edges = _edges(_import_graph())
    backwards = {(importer, imported) for importer, imported in edges
                 if None not in (_layer_of(importer), _layer_of(imported))
                 and _layer_of(importer) < _layer_of(imported)}
    new = sorted(backwards - STILL_TO_REMOVE)
    assert new == [], "imports from a higher layer:\n" + "\n".join(f"{a} imports {b}" for a, b in new)


def test_no_import_circle():
    circles = [" -> ".join(circle) for circle in _cycles(_edges(_import_graph()) - STILL_TO_REMOVE)]
    assert circles == [], "import circles:\n" + "\n".join(circles)


def test_the_imports_still_to_remove_are_still_there():
    # Once one is gone, take it out of STILL_TO_REMOVE so that it cannot come back unnoticed.
    gone = sorted(STILL_TO_REMOVE - _edges(_import_graph()))
    assert gone == [], f"these imports are gone: take them out of STILL_TO_REMOVE: {gone}"


def test_the_window_has_no_import_to_remove():
    assert sorted(edge for edge in STILL_TO_REMOVE if edge[0].startswith("desktop")) == []


def test_the_checks_find_a_backwards_import_and_a_circle():
    # the rules themselves, on a made-up graph: a lower module importing a higher one, and a
    # circle between two modules of one layer
    edges = {("engine.text", "engine.cli"), ("engine.io.read", "engine.io.table"),
             ("engine.io.table", "engine.io.cells"), ("engine.io.cells", "engine.io.read")}
    assert [(a, b) for a, b in sorted(edges) if _layer_of(a) < _layer_of(b)] == [("engine.text", "engine.cli")]
    assert _cycles(edges) == [["engine.io.cells", "engine.io.read", "engine.io.table", "engine.io.cells"]]
