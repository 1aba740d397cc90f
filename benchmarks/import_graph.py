"""gibbsmin's module import graph, read from the source with `ast` (nothing is imported).

    python benchmarks/import_graph.py            # circles, in-function imports, layer breaches

An edge A -> B means module A names module B in an import statement: `import gibbsmin.x.y` and
`from gibbsmin.x import y` (y a submodule) name gibbsmin.x.y; `from gibbsmin.x import name` names gibbsmin.x.
Relative imports are resolved against A's package. Imports under `if TYPE_CHECKING:` are left out (they never
run). The implicit import of a parent package that Python performs before a submodule is not an edge: every
module would otherwise hang on `gibbsmin/__init__.py`, which imports the API on purpose.

Edges are kept apart by where the statement sits: at module level (run on import) or inside a function body
(run on call). A circle "with in-function imports counted" is a strongly connected component of the union.
`tests/test_layering.py` asserts the graph's shape with these functions.
"""

from __future__ import annotations

import ast
from dataclasses import dataclass, field
from pathlib import Path

PACKAGE = "gibbsmin"
ROOT = Path(__file__).resolve().parents[1] / PACKAGE

# Bottom to top (DEVELOPERS.md, "Layers"). A module may import its own layer and those below. Entries are module
# names or package prefixes; the longest matching entry decides.
LAYERS: dict[str, int] = {
    "gibbsmin.errors": 0, "gibbsmin.formula": 0, "gibbsmin.compiled": 0, "gibbsmin.thermo": 0,
    "gibbsmin.units": 0, "gibbsmin.version": 0, "gibbsmin.frozen": 0,
    "gibbsmin.eos": 1, "gibbsmin.system": 1, "gibbsmin.solve": 1, "gibbsmin.streams": 1,
    "gibbsmin.equilibrium": 2, "gibbsmin.fixed_step": 2, "gibbsmin.reactions": 2,
    "gibbsmin.restricted": 3, "gibbsmin.sensitivity": 3, "gibbsmin.energy": 3, "gibbsmin.nonideal": 3,
    "gibbsmin.uncertainty": 3,
    "gibbsmin.prepared": 4, "gibbsmin.api": 4,
    "gibbsmin.carbon": 5, "gibbsmin.flash": 5, "gibbsmin.audit": 5, "gibbsmin.case": 5,
    "gibbsmin.sweep": 5, "gibbsmin.report": 5, "gibbsmin.flowsheet": 5,
    "gibbsmin.cli": 6,
    "gibbsmin": 7,  # the package's own __init__: the public names, above everything
}
# Order inside a layer, where the layering asks for one: (lower, upper) means lower must not import upper.
WITHIN_LAYER: tuple[tuple[str, str], ...] = (
    ("gibbsmin.sensitivity", "gibbsmin.energy"),
    ("gibbsmin.energy", "gibbsmin.nonideal"),
    ("gibbsmin.sensitivity", "gibbsmin.uncertainty"),
    ("gibbsmin.prepared", "gibbsmin.api"),
    ("gibbsmin.case", "gibbsmin.flowsheet"),
    ("gibbsmin.flowsheet", "gibbsmin.report"),
    ("gibbsmin.flowsheet", "gibbsmin.sweep"),
)


@dataclass(frozen=True)
class Import:
    source: str  # importing module
    target: str  # imported gibbsmin module
    line: int
    in_function: bool


@dataclass
class Graph:
    modules: set[str] = field(default_factory=set)
    imports: list[Import] = field(default_factory=list)

    def edges(self, *, in_function: bool | None = None) -> dict[str, set[str]]:
        """Adjacency: all imports, or only module-level (False) or only in-function ones (True)."""
        out: dict[str, set[str]] = {m: set() for m in self.modules}
        for imp in self.imports:
            if in_function is None or imp.in_function == in_function:
                out[imp.source].add(imp.target)
        return out

    def in_function_imports(self) -> list[Import]:
        return [imp for imp in self.imports if imp.in_function]


def module_name(path: Path, root: Path = ROOT) -> str:
    parts = path.relative_to(root.parent).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def _type_checking_lines(tree: ast.Module) -> set[int]:
    """Line numbers of statements under `if TYPE_CHECKING:` (never run)."""
    lines: set[int] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.If):
            test = node.test
            name = test.id if isinstance(test, ast.Name) else test.attr if isinstance(test, ast.Attribute) else ""
            if name == "TYPE_CHECKING":
                for stmt in node.body:
                    for sub in ast.walk(stmt):
                        if hasattr(sub, "lineno"):
                            lines.add(sub.lineno)
    return lines


def _statements(tree: ast.AST, inside: bool = False):
    """(import statement, inside a function body?) for every import in the tree."""
    for node in ast.iter_child_nodes(tree):
        if isinstance(node, (ast.Import, ast.ImportFrom)):
            yield node, inside
        nested = inside or isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef, ast.Lambda))
        yield from _statements(node, nested)


def build(root: Path = ROOT) -> Graph:
    files = sorted(p for p in root.rglob("*.py") if "__pycache__" not in p.parts)
    modules = {module_name(p, root) for p in files}
    graph = Graph(modules=modules)
    seen: set[Import] = set()
    for path in files:
        source = module_name(path, root)
        package = source if path.name == "__init__.py" else source.rpartition(".")[0]
        tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
        skipped = _type_checking_lines(tree)
        for stmt, inside in _statements(tree):
            if stmt.lineno in skipped:
                continue
            targets: list[str] = []
            if isinstance(stmt, ast.Import):
                targets = [alias.name for alias in stmt.names]
            else:
                if stmt.level:
                    base_parts = package.split(".")
                    base_parts = base_parts[: len(base_parts) - (stmt.level - 1)]
                    base = ".".join(base_parts + ([stmt.module] if stmt.module else []))
                else:
                    base = stmt.module or ""
                for alias in stmt.names:
                    sub = f"{base}.{alias.name}"
                    targets.append(sub if sub in modules else base)
            for target in targets:
                # `import gibbsmin.a.b` names a.b; keep only our own modules, longest known prefix.
                while target and target not in modules:
                    target = target.rpartition(".")[0]
                found = Import(source, target, stmt.lineno, inside)
                if target and target.split(".")[0] == PACKAGE and target != source and found not in seen:
                    seen.add(found)
                    graph.imports.append(found)
    return graph


def circles(edges: dict[str, set[str]]) -> list[list[str]]:
    """Strongly connected components with more than one module (Tarjan's, iterative), each sorted, largest first."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on_stack: set[str] = set()
    found: list[list[str]] = []
    for root in sorted(edges):
        if root in index:
            continue
        index[root] = low[root] = len(index)
        stack.append(root)
        on_stack.add(root)
        work = [(root, iter(sorted(edges.get(root, ()))))]
        while work:
            v, successors = work[-1]
            w = next(successors, None)
            if w is not None:
                if w not in index:
                    index[w] = low[w] = len(index)
                    stack.append(w)
                    on_stack.add(w)
                    work.append((w, iter(sorted(edges.get(w, ())))))
                elif w in on_stack:
                    low[v] = min(low[v], index[w])
                continue
            work.pop()
            if work:
                parent = work[-1][0]
                low[parent] = min(low[parent], low[v])
            if low[v] == index[v]:
                component = []
                while True:
                    w = stack.pop()
                    on_stack.discard(w)
                    component.append(w)
                    if w == v:
                        break
                if len(component) > 1:
                    found.append(sorted(component))
    return sorted(found, key=lambda c: (-len(c), c))


def layer_of(module: str) -> int:
    best = max((k for k in LAYERS if module == k or module.startswith(k + ".")), key=len)
    return LAYERS[best]


def _under(module: str, prefix: str) -> bool:
    return module == prefix or module.startswith(prefix + ".")


def layer_breaches(graph: Graph) -> list[Import]:
    """Imports of a module in a higher layer, or of a higher module within a layer's stated order."""
    out = []
    for imp in graph.imports:
        upward = layer_of(imp.target) > layer_of(imp.source)
        upward |= any(_under(imp.source, lo) and _under(imp.target, hi) for lo, hi in WITHIN_LAYER)
        if upward:
            out.append(imp)
    return out


def main() -> int:
    graph = build()
    every = circles(graph.edges())
    top = circles(graph.edges(in_function=False))
    inner = graph.in_function_imports()
    breaches = layer_breaches(graph)
    print(f"{len(graph.modules)} modules, {len(graph.imports)} imports of gibbsmin modules")
    print(f"circles, module-level imports only: {len(top)}")
    print(f"circles, in-function imports counted: {len(every)}")
    for component in every:
        print(f"  {len(component)} modules: {', '.join(component)}")
    print(f"in-function imports of gibbsmin modules: {len(inner)}")
    for imp in sorted(inner, key=lambda i: (i.source, i.line)):
        print(f"  {imp.source}:{imp.line} -> {imp.target}")
    print(f"layer breaches (a module importing one above it): {len(breaches)}")
    for imp in sorted(breaches, key=lambda i: (i.source, i.line)):
        where = " (in function)" if imp.in_function else ""
        print(f"  {imp.source}:{imp.line} [{layer_of(imp.source)}] -> {imp.target} [{layer_of(imp.target)}]{where}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
