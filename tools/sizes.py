"""Module and function sizes of the ``workbench`` package, against the style limits.

    python tools/sizes.py                   # modules over 700 lines, functions over 120
    python tools/sizes.py --modules 500 --functions 80 --top 10
    python tools/sizes.py --root OTHER/workbench   # another checkout, e.g. an older one

A module's size is its number of lines (``wc -l``); a function's, the lines from its
``def`` to its last line (methods and nested functions each count on their own, and a
nested function's lines count in its parent too). Generated tables (a module whose
docstring's first line says ``GENERATED``) are left out. Prints one line per module or
function over a limit, largest first, then a summary line; exits 1 when any is over.
"""

from __future__ import annotations

import argparse
import ast
import sys
from dataclasses import dataclass
from pathlib import Path

PACKAGE = Path(__file__).resolve().parents[1] / "workbench"

#: The limits of /work/shared/STYLE.md (module lines, function lines).
MODULE_LIMIT = 700
FUNCTION_LIMIT = 120


@dataclass(frozen=True)
class Size:
    """A module (``function`` empty) or a function, and its length [lines]."""

    module: str
    """Path relative to the package's parent, e.g. ``workbench/core/network.py``."""
    function: str
    """Qualified name within the module (``Class.method``, ``outer.inner``), or ``""``."""
    lines: int
    line: int = 1
    """Where it starts."""

    def __str__(self) -> str:
        where = f"{self.module}:{self.line} {self.function}" if self.function else self.module
        return f"{self.lines:6d}  {where}"


def is_generated(tree: ast.Module) -> bool:
    """Whether a module says it is a generated table (first docstring line)."""
    doc = ast.get_docstring(tree) or ""
    return "GENERATED" in doc.split("\n", 1)[0]


def _functions(node: ast.AST, prefix: str = ""):
    for child in ast.iter_child_nodes(node):
        if isinstance(child, (ast.FunctionDef, ast.AsyncFunctionDef)):
            name = f"{prefix}{child.name}"
            yield name, child.lineno, child.end_lineno - child.lineno + 1
            yield from _functions(child, f"{name}.")
        elif isinstance(child, ast.ClassDef):
            yield from _functions(child, f"{prefix}{child.name}.")
        else:
            yield from _functions(child, prefix)


def sizes(root: Path = PACKAGE) -> tuple[list[Size], list[Size]]:
    """``(modules, functions)`` of every non-generated module under ``root``."""
    modules: list[Size] = []
    functions: list[Size] = []
    for path in sorted(root.rglob("*.py")):
        text = path.read_text(encoding="utf-8")
        tree = ast.parse(text, str(path))
        if is_generated(tree):
            continue
        rel = path.relative_to(root.parent).as_posix()
        modules.append(Size(rel, "", text.count("\n") + (not text.endswith("\n") and bool(text))))
        functions += [Size(rel, name, n, line) for name, line, n in _functions(tree)]
    return modules, functions


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--modules", type=int, default=MODULE_LIMIT, metavar="N",
                        help=f"module limit [lines] (default {MODULE_LIMIT})")
    parser.add_argument("--functions", type=int, default=FUNCTION_LIMIT, metavar="M",
                        help=f"function limit [lines] (default {FUNCTION_LIMIT})")
    parser.add_argument("--top", type=int, default=0, metavar="K",
                        help="also list the K largest modules and functions")
    parser.add_argument("--root", type=Path, default=PACKAGE, help="the package folder")
    args = parser.parse_args(argv)
    modules, functions = sizes(args.root)
    big_modules = sorted((s for s in modules if s.lines > args.modules), key=lambda s: -s.lines)
    big_functions = sorted((s for s in functions if s.lines > args.functions),
                           key=lambda s: -s.lines)
    print(f"modules over {args.modules} lines: {len(big_modules)}")
    for s in big_modules:
        print(s)
    print(f"functions over {args.functions} lines: {len(big_functions)}")
    for s in big_functions:
        print(s)
    if args.top:
        print(f"largest {args.top} modules:")
        for s in sorted(modules, key=lambda s: -s.lines)[: args.top]:
            print(s)
        print(f"largest {args.top} functions:")
        for s in sorted(functions, key=lambda s: -s.lines)[: args.top]:
            print(s)
    total = sum(s.lines for s in modules)
    print(f"{len(modules)} modules, {total} lines, {len(functions)} functions; largest module "
          f"{max(s.lines for s in modules)} lines, largest function "
          f"{max(s.lines for s in functions)} lines (generated tables left out)")
    return 1 if big_modules or big_functions else 0


if __name__ == "__main__":
    sys.exit(main())
