"""The import graph of the ``server`` package: print its cycles and its api <-> web edges.

Every ``import`` and ``from ... import`` is read with :mod:`ast`, at module level and inside
functions alike (an import inside a function still ties the two modules together; it only hides
the cycle from Python's start-up). ``from a.b import c`` is an edge to ``a.b.c`` when that is a
module of the package, else to ``a.b``. A package's ``__init__`` is the module named by the
package. Exit status 1 when there is a cycle or an edge between ``server.api`` and ``server.web``.

    .venv/bin/python scripts/import_graph.py            # prints nothing and exits 0 when clean
"""

from __future__ import annotations

import ast
import sys
from collections.abc import Iterable
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
PACKAGE = "server"
SEPARATE = (("server.api", "server.web"), ("server.web", "server.api"))


def module_names(root: Path = ROOT, package: str = PACKAGE) -> dict[str, Path]:
    """Every module of the package by its dotted name (``server.web.deps``)."""
    names: dict[str, Path] = {}
    for path in sorted((root / package).rglob("*.py")):
        parts = list(path.relative_to(root).with_suffix("").parts)
        if parts[-1] == "__init__":
            parts.pop()
        names[".".join(parts)] = path
    return names


def _resolve(module: str | None, level: int, here: str, is_package: bool) -> str:
    """The absolute name of ``from <level dots><module> import ...`` written in ``here``."""
    if level == 0:
        return module or ""
    base = here.split(".")
    if not is_package:
        base = base[:-1]
    base = base[: len(base) - (level - 1)] if level > 1 else base
    return ".".join([*base, module] if module else base)


def edges_of(name: str, path: Path, known: Iterable[str]) -> set[str]:
    """The package's modules that ``name`` (at ``path``) imports anywhere in its text."""
    modules = set(known)
    tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
    found: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for alias in node.names:
                target = alias.name
                while target and target not in modules:  # `import a.b.c` binds the module a.b.c
                    target = target.rpartition(".")[0]
                if target:
                    found.add(target)
        elif isinstance(node, ast.ImportFrom):
            source = _resolve(node.module, node.level, name, path.name == "__init__.py")
            for alias in node.names:
                child = f"{source}.{alias.name}"
                if child in modules:
                    found.add(child)
                elif source in modules:
                    found.add(source)
    found.discard(name)
    return found


def import_graph(root: Path = ROOT, package: str = PACKAGE) -> dict[str, set[str]]:
    """Module -> the package's modules it imports."""
    names = module_names(root, package)
    return {name: edges_of(name, path, names) for name, path in names.items()}


def cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """The strongly connected components of more than one module (Tarjan), each sorted."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on_stack: set[str] = set()
    found: list[list[str]] = []
    counter = 0

    def visit(start: str) -> None:  # iterative, so a deep graph cannot hit the recursion limit
        nonlocal counter
        work = [(start, iter(sorted(graph.get(start, ()))))]
        index[start] = low[start] = counter
        counter += 1
        stack.append(start)
        on_stack.add(start)
        while work:
            node, children = work[-1]
            child = next(children, None)
            if child is not None:
                if child not in index:
                    index[child] = low[child] = counter
                    counter += 1
                    stack.append(child)
                    on_stack.add(child)
                    work.append((child, iter(sorted(graph.get(child, ())))))
                elif child in on_stack:
                    low[node] = min(low[node], index[child])
                continue
            work.pop()
            if work:
                parent = work[-1][0]
                low[parent] = min(low[parent], low[node])
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

    for node in sorted(graph):
        if node not in index:
            visit(node)
    return sorted(found)


def _inside(name: str, prefix: str) -> bool:
    return name == prefix or name.startswith(prefix + ".")


def forbidden_edges(graph: dict[str, set[str]]) -> list[tuple[str, str]]:
    """Imports from server.api into server.web and back."""
    return sorted(
        (source, target)
        for source, targets in graph.items()
        for target in targets
        for left, right in SEPARATE
        if _inside(source, left) and _inside(target, right)
    )


def main() -> int:
    graph = import_graph()
    problems = 0
    for component in cycles(graph):
        problems += 1
        print("cycle: " + " <-> ".join(component))
    for source, target in forbidden_edges(graph):
        problems += 1
        print(f"api/web edge: {source} imports {target}")
    return 1 if problems else 0


if __name__ == "__main__":
    sys.exit(main())
