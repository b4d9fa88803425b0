"""The solver's and the app's modules import each other in one direction only (no import circle).

A circle (the catalogue and the model once imported each other) makes import order matter and
hides which module owns what. Type-checking-only imports count too: a circle drawn for a type hint
is still a circle for a reader.
"""

from __future__ import annotations

import pytest

grimp = pytest.importorskip("grimp")  # installed with import-linter (dev dependency)


def _cycle_edges(graph, package: str = "solver") -> list[tuple[str, str]]:
    modules = sorted(m for m in graph.modules if m.startswith(package + "."))
    return [
        (a, b)
        for a in modules
        for b in sorted(graph.find_modules_directly_imported_by(a))
        if b.startswith(package + ".") and graph.chain_exists(importer=b, imported=a)
    ]


def test_solver_import_graph_has_no_circle():
    graph = grimp.build_graph("solver", exclude_type_checking_imports=False, cache_dir=None)
    assert _cycle_edges(graph) == []


def test_app_import_graph_has_no_circle():
    """Imports inside functions count: units once imported messages lazily while messages imported units."""
    graph = grimp.build_graph("app", exclude_type_checking_imports=False, cache_dir=None)
    assert _cycle_edges(graph, "app") == []


def test_circle_finder_finds_a_circle():
    """The finder itself must see a circle, or the test above could not fail."""
    graph = grimp.build_graph("solver", exclude_type_checking_imports=False, cache_dir=None)
    graph.add_import(importer="solver.results", imported="solver.march")  # march imports results
    assert ("solver.results", "solver.march") in _cycle_edges(graph)
