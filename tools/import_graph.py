"""The import graph of the ``workbench`` package, read from the source files, and its layers.

    python tools/import_graph.py            # layers, edges between layers, cycles, upward edges
    python tools/import_graph.py --edges    # also every module's workbench imports

The graph is built statically with :mod:`ast` (no module is imported), so it shows what a
reader sees. What counts as an edge:

* every ``import workbench...`` and ``from workbench... import ...`` (relative imports
  resolved), at module level **and inside functions**: a lazy import keeps start-up fast but
  is still a dependency, and a circle through one still means neither module can be read or
  changed without the other;
* ``from package import name`` is an edge to ``package.name`` when that is a module, else to
  ``package`` (its ``__init__``);
* imports under ``if TYPE_CHECKING:`` are left out (annotations only, never executed);
* importing ``a.b.c`` is not counted as importing the packages ``a.b`` and ``a`` above it.

The layers, lowest first (an edge may point to its own layer or lower, never up):

====  ==========================================  ============================================
  0   ``workbench``, ``workbench.cautions``,      shared leaves (words, the version, the text
      ``workbench.printable``, any other           sanitiser); import only each other
      single module directly under ``workbench``
  1   ``workbench.core``                          the numeric core
  2   ``workbench.project``                       the project document
  3   ``workbench.output``                        results as JSON, tables, the record
  4   ``workbench.sweep_runner``                  sweeps across the layers, no UI
  5   ``workbench.cli``, ``workbench.app``        the front ends (the app never imports the CLI)
  6   ``workbench.__main__``                      ``python -m workbench``
====  ==========================================  ============================================
"""

from __future__ import annotations

import argparse
import ast
import sys
from pathlib import Path

PACKAGE = Path(__file__).resolve().parents[1] / "workbench"

#: Layer of each top-level part of the package (``workbench.X``); ``workbench`` itself is 0.
LAYERS = {
    "cautions": 0,
    "printable": 0,
    "core": 1,
    "project": 2,
    "output": 3,
    "sweep_runner": 4,
    "cli": 5,
    "app": 5,
    "__main__": 6,
}
LAYER_NAMES = {0: "shared", 1: "core", 2: "project", 3: "output", 4: "sweep_runner",
               5: "front ends", 6: "entry point"}

#: Edges refused within a layer: (importer part, imported part).
FORBIDDEN_SIDEWAYS = {("app", "cli")}


def module_name(path: Path, package: Path = PACKAGE) -> str:
    """``workbench/core/fluid/water.py`` -> ``workbench.core.fluid.water`` (``__init__`` ->
    the package)."""
    parts = list(path.relative_to(package.parent).with_suffix("").parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def modules(package: Path = PACKAGE) -> dict[str, Path]:
    """Every module of the package (sub-packages included) by dotted name."""
    return {module_name(p, package): p for p in sorted(package.rglob("*.py"))}


def _is_type_checking(node: ast.If) -> bool:
    test = node.test
    return (isinstance(test, ast.Name) and test.id == "TYPE_CHECKING") or (
        isinstance(test, ast.Attribute) and test.attr == "TYPE_CHECKING")


def _statements(tree: ast.AST):
    """Every import statement of a tree, module level and nested, outside TYPE_CHECKING."""
    for child in ast.iter_child_nodes(tree):
        if isinstance(child, ast.If) and _is_type_checking(child):
            for stmt in child.orelse:
                yield from _statements_of(stmt)
            continue
        yield from _statements_of(child)


def _statements_of(node: ast.AST):
    if isinstance(node, (ast.Import, ast.ImportFrom)):
        yield node
    yield from _statements(node)


def imports_of(name: str, path: Path, known: dict[str, Path]) -> set[str]:
    """The workbench modules that module ``name`` (source ``path``) imports."""
    root = name.split(".")[0]
    package = name if path.name == "__init__.py" else name.rpartition(".")[0]

    def owner(dotted: str) -> str:
        while dotted and dotted not in known:
            dotted = dotted.rpartition(".")[0]
        return dotted

    out: set[str] = set()
    for stmt in _statements(ast.parse(path.read_text(encoding="utf-8"), str(path))):
        if isinstance(stmt, ast.Import):
            out |= {owner(a.name) for a in stmt.names if a.name.split(".")[0] == root}
            continue
        base = stmt.module or ""
        if stmt.level:
            parts = package.split(".")[: len(package.split(".")) - stmt.level + 1]
            base = ".".join(parts + ([base] if base else []))
        if base.split(".")[0] != root:
            continue
        for alias in stmt.names:
            full = f"{base}.{alias.name}"
            out.add(full if full in known else owner(base))
    out.discard(name)
    out.discard("")
    return out


def import_graph(package: Path = PACKAGE) -> dict[str, set[str]]:
    """Module -> the workbench modules it imports."""
    known = modules(package)
    return {name: imports_of(name, path, known) for name, path in known.items()}


def cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """The strongly connected components of more than one module (each a circle of
    imports), by Tarjan's algorithm, iteratively."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on_stack: set[str] = set()
    found: list[list[str]] = []
    counter = 0
    for start in sorted(graph):
        if start in index:
            continue
        work = [(start, iter(sorted(graph[start])))]
        index[start] = low[start] = counter
        counter += 1
        stack.append(start)
        on_stack.add(start)
        while work:
            node, children = work[-1]
            child = next(children, None)
            if child is not None:
                if child not in graph:
                    continue
                if child not in index:
                    index[child] = low[child] = counter
                    counter += 1
                    stack.append(child)
                    on_stack.add(child)
                    work.append((child, iter(sorted(graph[child]))))
                elif child in on_stack:
                    low[node] = min(low[node], index[child])
                continue
            work.pop()
            if work:
                low[work[-1][0]] = min(low[work[-1][0]], low[node])
            if low[node] == index[node]:
                component = []
                while True:
                    member = stack.pop()
                    on_stack.discard(member)
                    component.append(member)
                    if member == node:
                        break
                if len(component) > 1:
                    found.append(sorted(component))
    return sorted(found)


def part(module: str) -> str:
    """``workbench.core.fluid.water`` -> ``core``; ``workbench`` -> ``""``."""
    pieces = module.split(".")
    return pieces[1] if len(pieces) > 1 else ""


def layer(module: str, graph: dict[str, set[str]] | None = None) -> int | None:
    """The layer of a module, or ``None`` for a part no layer names. A single module
    directly under the package that :data:`LAYERS` does not name (no module of ``graph``
    lies under it) is a shared leaf, layer 0."""
    name = part(module)
    if name == "":
        return 0
    if name in LAYERS:
        return LAYERS[name]
    prefix = f"{module.split('.')[0]}.{name}."
    if graph is not None and module.count(".") == 1 and not any(m.startswith(prefix) for m in graph):
        return 0
    return None


def bad_edges(graph: dict[str, set[str]]) -> list[tuple[str, str, str]]:
    """``(importer, imported, why)`` for each edge that points up, or sideways where
    refused, or from or to a module in no layer."""
    out = []
    for source in sorted(graph):
        for target in sorted(graph[source]):
            ls, lt = layer(source, graph), layer(target, graph)
            if ls is None or lt is None:
                out.append((source, target, "a module in no layer (add it to LAYERS)"))
            elif lt > ls:
                out.append((source, target, f"upward: {LAYER_NAMES[ls]} imports {LAYER_NAMES[lt]}"))
            elif (part(source), part(target)) in FORBIDDEN_SIDEWAYS:
                out.append((source, target, f"{part(source)} must not import {part(target)}"))
    return out


def layer_edges(graph: dict[str, set[str]]) -> dict[tuple[str, str], int]:
    """How many module imports go from each part of the package to each other part."""
    counts: dict[tuple[str, str], int] = {}
    for source, targets in graph.items():
        for target in targets:
            key = (part(source) or "workbench", part(target) or "workbench")
            if key[0] != key[1]:
                counts[key] = counts.get(key, 0) + 1
    return counts


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--edges", action="store_true", help="list every module's imports")
    args = parser.parse_args(argv)
    graph = import_graph()
    print(f"{len(graph)} modules, {sum(len(t) for t in graph.values())} imports between them")
    for n in sorted(LAYER_NAMES):
        parts = ["workbench"] * (n == 0) + [p for p, v in LAYERS.items() if v == n]
        print(f"  layer {n}: {', '.join(parts)}")
    print("imports between parts (importer -> imported: count):")
    for (source, target), count in sorted(layer_edges(graph).items(),
                                          key=lambda kv: (LAYERS.get(kv[0][0], 0), kv[0])):
        print(f"  {source:>12} -> {target:<12} {count:4d}")
    found = cycles(graph)
    print(f"circles: {len(found)}")
    for component in found:
        print("  " + " <-> ".join(component))
    wrong = bad_edges(graph)
    print(f"edges against the layers: {len(wrong)}")
    for source, target, why in wrong:
        print(f"  {source} -> {target}: {why}")
    if args.edges:
        for source in sorted(graph):
            print(f"{source}: {', '.join(sorted(graph[source])) or '-'}")
    return 1 if found or wrong else 0


if __name__ == "__main__":
    sys.exit(main())
