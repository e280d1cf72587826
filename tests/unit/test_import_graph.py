"""The layers' import graph: no cycle, and neither of server.api and server.web imports the other.

scripts/import_graph.py reads every import with ast, at module level and inside functions (an
import inside a function hides a cycle from Python's start-up, not from the reader).
"""

from __future__ import annotations

import importlib.util
import subprocess
import sys
from pathlib import Path
from types import ModuleType

ROOT = Path(__file__).resolve().parents[2]
SCRIPT = ROOT / "scripts" / "import_graph.py"
#: the layers the page and API routes live in, and what they share
LAYERS = ("server.web", "server.api", "server.deps", "server.errors", "server.app")


def _script() -> ModuleType:
    spec = importlib.util.spec_from_file_location("import_graph", SCRIPT)
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def _write(root: Path, files: dict[str, str]) -> None:
    for name, text in files.items():
        path = root / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(text, encoding="utf-8")


def test_finds_a_cycle_hidden_inside_a_function(tmp_path: Path) -> None:
    # pkg.a imports pkg.b inside a function, pkg.b imports pkg.a at the top: one cycle of two.
    # pkg.c imports pkg.b relatively (from . import b) and nothing imports pkg.c: no cycle.
    _write(tmp_path, {
        "pkg/__init__.py": "",
        "pkg/a.py": "def f():\n    from pkg.b import g\n    return g\n",
        "pkg/b.py": "import pkg.a\n\ndef g():\n    return 1\n",
        "pkg/c.py": "from . import b\n",
        "pkg/sub/__init__.py": "from ..a import f\n",
    })  # fmt: skip
    script = _script()
    graph = script.import_graph(tmp_path, "pkg")
    assert graph["pkg.a"] == {"pkg.b"}
    assert graph["pkg.b"] == {"pkg.a"}
    assert graph["pkg.c"] == {"pkg.b"}
    assert graph["pkg.sub"] == {"pkg.a"}  # two dots from a package's __init__: the parent
    assert script.cycles(graph) == [["pkg.a", "pkg.b"]]


def test_an_api_module_importing_web_is_reported() -> None:
    script = _script()
    graph = {
        "server.api.routes.houses": {"server.web.deps", "server.deps"},
        "server.web.layer_form": {"server.errors"},
        "server.webhooks": {"server.api"},  # a name that merely starts like server.web
    }
    assert script.forbidden_edges(graph) == [("server.api.routes.houses", "server.web.deps")]


def test_the_package_has_no_api_web_edge_and_no_cycle_in_its_layers() -> None:
    script = _script()
    graph = script.import_graph()
    assert script.forbidden_edges(graph) == []
    found = script.cycles(graph)
    assert found == []  # no cycle anywhere in the package, services and physics included


def test_no_route_module_imports_another() -> None:
    script = _script()
    graph = script.import_graph()
    routes = {name for name in graph if name.startswith("server.web.routes.")}
    importers = sorted(name for name, targets in graph.items() if targets & routes)
    assert importers == ["server.web"]  # the one registry of HTML routes


def test_the_script_exits_with_what_it_prints() -> None:
    run = subprocess.run(
        [sys.executable, str(SCRIPT)], capture_output=True, text=True, cwd=ROOT, check=False
    )
    lines = run.stdout.splitlines()
    assert run.returncode == (1 if lines else 0)
    assert not any(line.startswith("api/web edge") for line in lines)
