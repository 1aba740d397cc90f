"""The import graph of gibbsmin (issue 12, layering): no circle, no import of a gibbsmin module inside a function,
no module importing one of a layer above it.

The graph is read from the source by ``benchmarks/import_graph.py`` (ast, nothing imported; its docstring says what
counts as an edge). Imports inside functions are counted in the circles: a circle closed only at call time is still
one module needing another that needs it.

The imports that remain inside functions, and the three layer breaches, are in files the lead is editing in
parallel (prepared.py, api.py, case/run.py, sweep/); they are listed here one by one, so that a new
one fails the test and a removed one must be struck from the list.
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

# (importing module, imported module) of the in-function imports still in the lead's files.
PENDING_IN_FUNCTION = {
    ("gibbsmin.case.run", "gibbsmin.energy"),
    ("gibbsmin.case.run", "gibbsmin.nonideal"),
    ("gibbsmin.prepared", "gibbsmin.thermo.datasets"),
    ("gibbsmin.sweep.chunk", "gibbsmin.uncertainty"),
    ("gibbsmin.sweep.command", "gibbsmin.case"),
    ("gibbsmin.sweep.command", "gibbsmin.sweep.plots"),  # defers matplotlib: plots.py imports it at module level
    ("gibbsmin.sweep.command", "gibbsmin.sweep.run"),  # defers pandas: run.py imports it at module level
    ("gibbsmin.sweep.grid", "gibbsmin.eos"),
    ("gibbsmin.sweep.grid", "gibbsmin.errors"),
    ("gibbsmin.sweep.grid", "gibbsmin.thermo.datasets"),
    ("gibbsmin.sweep.grid", "gibbsmin.units"),
}

# streams.py (layer 5 in the stated layering) is imported by the API, which takes a Stream as a feed, and by the
# gas a quotient is taken of; it imports only errors, thermo and units itself.
PENDING_BREACHES = {
    ("gibbsmin.api", "gibbsmin.streams"),
    ("gibbsmin.prepared", "gibbsmin.streams"),
    ("gibbsmin.reactions.state", "gibbsmin.streams"),
}


@pytest.fixture(scope="module")
def graph():
    return import_graph.build()


def test_the_graph_sees_the_package(graph):
    # A reader that found nothing would pass every check below.
    assert len(graph.modules) > 80
    assert ("gibbsmin.api", "gibbsmin.prepared") in {(i.source, i.target) for i in graph.imports}
    assert ("gibbsmin.prepared", "gibbsmin.thermo.datasets") in {
        (i.source, i.target) for i in graph.in_function_imports()}


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
