"""The import graph of gibbsmin (issue 12, layering): no circle, no import of a gibbsmin module inside a function,
no module importing one of a layer above it.

The graph is read from the source by ``benchmarks/import_graph.py`` (ast, nothing imported; its docstring says what
counts as an edge). Imports inside functions are counted in the circles: a circle closed only at call time is still
one module needing another that needs it.

Pending exceptions would be listed one by one below, so that a new one fails the test and a removed one must be
struck from the list; none is left.
"""

from __future__ import annotations

import importlib.util
import sys
from pathlib import Path

import pytest

_SCRIPT = Path(__file__).resolve().parents[1] / "benchmarks" / "import_graph.py"
_spec = importlib.util.spec_from_file_location("import_graph", _SCRIPT)
import_graph = importlib.util.module_from_spec(_spec)
sys.modules.setdefault("import_graph", import_graph)  # its dataclasses look their module up there
_spec.loader.exec_module(import_graph)

# (importing module, imported module) of in-function imports still to move: none left.
PENDING_IN_FUNCTION: set[tuple[str, str]] = set()

# Imports of a module of a layer above: none left (streams.py, which imports only errors, thermo and units, sits
# in layer 1, so the API can take a Stream as a feed).
PENDING_BREACHES: set[tuple[str, str]] = set()


@pytest.fixture(scope="module")
def graph():
    return import_graph.build()


def test_the_graph_sees_the_package(graph):
    # A reader that found nothing would pass every check below.
    assert len(graph.modules) > 80
    assert ("gibbsmin.api", "gibbsmin.prepared") in {(i.source, i.target) for i in graph.imports}
    assert ("gibbsmin.prepared", "gibbsmin.thermo.datasets") in {(i.source, i.target) for i in graph.imports}


def test_an_import_inside_a_function_is_seen(tmp_path):
    package = tmp_path / "gibbsmin"
    package.mkdir()
    (package / "__init__.py").write_text("")
    (package / "low.py").write_text("def f():\n    from . import high\n    return high\n")
    (package / "high.py").write_text("from .low import f\n")
    graph = import_graph.build(package)
    assert [(i.source, i.target) for i in graph.in_function_imports()] == [("gibbsmin.low", "gibbsmin.high")]
    assert import_graph.circles(graph.edges()) == [["gibbsmin.high", "gibbsmin.low"]]


def test_circles_are_found_where_there_are_some():
    edges = {"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}, "e": {"e"}}
    assert import_graph.circles(edges) == [["a", "b", "c"]]


def test_no_import_circle_counting_imports_inside_functions(graph):
    assert import_graph.circles(graph.edges()) == []


def test_no_new_import_of_a_gibbsmin_module_inside_a_function(graph):
    found = {(i.source, i.target) for i in graph.in_function_imports()}
    new = sorted(f"{i.source}:{i.line} -> {i.target}" for i in graph.in_function_imports()
                 if (i.source, i.target) not in PENDING_IN_FUNCTION)
    assert new == [], "import these at module level (or move the code to the layer it belongs to)"
    assert sorted(PENDING_IN_FUNCTION - found) == [], "gone: strike them from PENDING_IN_FUNCTION"


def test_no_module_imports_one_of_a_layer_above_it(graph):
    breaches = {(i.source, i.target) for i in import_graph.layer_breaches(graph)}
    assert sorted(breaches - PENDING_BREACHES) == []
    assert sorted(PENDING_BREACHES - breaches) == [], "gone: strike them from PENDING_BREACHES"
