"""The shape of the package: no import circles, small modules, a headless engine that reads
and writes no files, and no Textual outside the terminal interface.

Common practice, no source: a numerical core that imports a UI toolkit or touches files
cannot be scripted or tested without them (DESIGN.md: "engine/ imports neither Textual nor
files"); modules that import each other cannot be understood, tested or loaded one at a
time; the project's rule is modules under ~400 lines (DEVELOPERS.md).

The checks read the source with :mod:`ast`, so they see imports inside functions too. The
small synthetic cases below show that each check finds what it looks for.
"""

from __future__ import annotations

import ast
import subprocess
import sys
from pathlib import Path

import pytest

PACKAGE = Path(__file__).resolve().parent.parent / "screening"
MAX_LINES = 400

FILE_MODULES = (
    "os",
    "io",
    "pathlib",
    "shutil",
    "tempfile",
    "glob",
    "tomllib",
    "tomli_w",
    "csv",
    "pickle",
    "importlib.resources",
)
"""Modules whose import in the engine would mean it reads or writes files."""
FILE_METHODS = ("read_text", "write_text", "read_bytes", "write_bytes", "open", "tofile")
"""Method calls that read or write a file (``Path.read_text``, ``ndarray.tofile`` ...)."""
NUMPY_FILE_FUNCTIONS = (
    "load",
    "save",
    "savez",
    "savez_compressed",
    "loadtxt",
    "savetxt",
    "genfromtxt",
    "fromfile",
)


# ------------------------------------------------------------------ reading the package


def module_files(root: Path = PACKAGE) -> dict[str, Path]:
    """Every module under ``root`` by dotted name (a package by its ``__init__``)."""
    out = {}
    for path in sorted(root.rglob("*.py")):
        parts = path.relative_to(root.parent).with_suffix("").parts
        if parts[-1] == "__init__":
            parts = parts[:-1]
        out[".".join(parts)] = path
    return out


def _is_type_checking(test: ast.expr) -> bool:
    return (isinstance(test, ast.Name) and test.id == "TYPE_CHECKING") or (
        isinstance(test, ast.Attribute) and test.attr == "TYPE_CHECKING"
    )


def _import_nodes(tree: ast.AST):
    """Import statements anywhere in the module (functions included), except those under
    ``if TYPE_CHECKING:``, which never run."""
    stack = [tree]
    while stack:
        node = stack.pop()
        if isinstance(node, ast.Import | ast.ImportFrom):
            yield node
        if isinstance(node, ast.If) and _is_type_checking(node.test):
            stack.extend(node.orelse)
            continue
        stack.extend(ast.iter_child_nodes(node))


def _resolve(name: str, modules: dict[str, Path]) -> str | None:
    """The module ``name`` stands for: itself, or the longest known package above it."""
    parts = name.split(".")
    while parts:
        candidate = ".".join(parts)
        if candidate in modules:
            return candidate
        parts.pop()
    return None


def imports_of(module: str, source: str, modules: dict[str, Path]) -> set[str]:
    """The modules of ``modules`` that ``module`` imports (relative imports resolved).

    ``from pkg import name`` counts as importing ``pkg.name`` when that is a module, else
    ``pkg`` itself. The parent packages Python runs first are not counted: package
    ``__init__`` files re-export their modules, so every module would "import" its package.
    """
    is_package = modules[module].name == "__init__.py"
    here = module.split(".") if is_package else module.split(".")[:-1]
    found: set[str] = set()
    for node in _import_nodes(ast.parse(source)):
        if isinstance(node, ast.Import):
            targets = [alias.name for alias in node.names]
        else:
            if node.level:
                base = here[: len(here) - (node.level - 1)]
                prefix = ".".join(base + ([node.module] if node.module else []))
            else:
                prefix = node.module or ""
            targets = [f"{prefix}.{alias.name}" for alias in node.names]
            targets = [t if t in modules else prefix for t in targets]
        for target in targets:
            resolved = _resolve(target, modules)
            if resolved is not None and resolved != module:
                found.add(resolved)
    return found


def import_graph(root: Path = PACKAGE) -> dict[str, set[str]]:
    modules = module_files(root)
    return {
        name: imports_of(name, path.read_text(encoding="utf-8"), modules)
        for name, path in modules.items()
    }


def find_cycle(graph: dict[str, set[str]]) -> list[str] | None:
    """One import circle as ``[a, b, ..., a]``, or None (depth-first search)."""
    state: dict[str, int] = {}  # 1 on the current path, 2 done
    path: list[str] = []

    def visit(node: str) -> list[str] | None:
        state[node] = 1
        path.append(node)
        for nxt in sorted(graph.get(node, ())):
            if state.get(nxt) == 1:
                return path[path.index(nxt) :] + [nxt]
            if nxt not in state:
                cycle = visit(nxt)
                if cycle:
                    return cycle
        path.pop()
        state[node] = 2
        return None

    for node in sorted(graph):
        if node not in state:
            cycle = visit(node)
            if cycle:
                return cycle
    return None


def file_io_uses(source: str) -> list[str]:
    """Places in ``source`` that read or write files, as ``line: what``."""
    found = []
    for node in ast.walk(ast.parse(source)):
        names: list[str] = []
        if isinstance(node, ast.Import):
            names = [alias.name for alias in node.names]
        elif isinstance(node, ast.ImportFrom) and not node.level and node.module:
            names = [node.module] + [f"{node.module}.{alias.name}" for alias in node.names]
        for name in names:
            if any(name == m or name.startswith(m + ".") for m in FILE_MODULES):
                found.append(f"{node.lineno}: import {name}")
        if isinstance(node, ast.Call):
            func = node.func
            if isinstance(func, ast.Name) and func.id == "open":
                found.append(f"{node.lineno}: open()")
            elif isinstance(func, ast.Attribute):
                if func.attr in FILE_METHODS:
                    found.append(f"{node.lineno}: .{func.attr}()")
                elif (
                    func.attr in NUMPY_FILE_FUNCTIONS
                    and isinstance(func.value, ast.Name)
                    and func.value.id in ("np", "numpy")
                ):
                    found.append(f"{node.lineno}: {func.value.id}.{func.attr}()")
    return found


# ------------------------------------------------------------------ the package


def test_no_import_circles() -> None:
    graph = import_graph()
    assert "screening.engine.checks.internal" in graph["screening.engine.sizing"]
    cycle = find_cycle(graph)
    assert cycle is None, "import circle: " + " -> ".join(cycle or [])


def test_no_import_circles_between_folders() -> None:
    """model <- profile, engine <- corridor <- store, report <- cli, tui (DEVELOPERS.md)."""
    folders: dict[str, set[str]] = {}
    for module, targets in import_graph().items():
        here = ".".join(module.split(".")[:2])
        folders.setdefault(here, set()).update(
            there for t in targets if (there := ".".join(t.split(".")[:2])) != here
        )
    assert folders["screening.model"] <= {"screening"}
    cycle = find_cycle(folders)
    assert cycle is None, "import circle between folders: " + " -> ".join(cycle or [])


def test_no_module_over_the_line_limit() -> None:
    over = {
        name: n
        for name, path in module_files().items()
        if (n := len(path.read_text(encoding="utf-8").splitlines())) > MAX_LINES
    }
    assert not over, f"modules over {MAX_LINES} lines (split them by idea): {over}"


def test_engine_reads_and_writes_no_files() -> None:
    offenders = {}
    for path in sorted((PACKAGE / "engine").rglob("*.py")):
        uses = file_io_uses(path.read_text(encoding="utf-8"))
        if uses:
            offenders[str(path.relative_to(PACKAGE.parent))] = uses
    assert not offenders, f"file I/O in the engine: {offenders}"


def _imported_in_subprocess(modules: list[str], probe: str) -> bool:
    code = (
        "import importlib, sys\n"
        f"for name in {modules!r}:\n    importlib.import_module(name)\n"
        f"print({probe!r} in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert out.returncode == 0, out.stderr
    return out.stdout.strip() == "True"


def test_engine_does_not_import_textual() -> None:
    engine = sorted(m for m in module_files() if m.split(".")[:2] == ["screening", "engine"])
    assert "screening.engine.slip.compound" in engine
    assert not _imported_in_subprocess(engine, "textual")


def test_nothing_outside_the_interface_imports_textual() -> None:
    """The model, store, engine, corridor tools, reports and the CLI's modules are headless."""
    headless = sorted(m for m in module_files() if not m.startswith("screening.tui"))
    headless.remove("screening.__main__")  # runs the command line when imported
    assert not _imported_in_subprocess(headless, "textual")


def test_cli_help_does_not_import_textual() -> None:
    code = (
        "import sys; from screening import cli\n"
        "try:\n    cli.main(['check', '--help'])\nexcept SystemExit:\n    pass\n"
        "print('textual' in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip().splitlines()[-1] == "False", out.stderr


def test_public_entry_points() -> None:
    """What other code and scripts import by name keeps working after the move."""
    from screening import cli, engine, model, report, store

    assert callable(cli.main) and callable(engine.screen) and callable(engine.screen_iter)
    assert callable(store.load) and callable(store.save) and callable(store.load_with_screen)
    assert callable(report.write_report) and model.Corridor.__module__ == "screening.model.inputs"
    assert engine.PLUGIN_MODULES == (
        "screening.engine.slip.compound",
        "screening.engine.checks.seismic",
    )
    assert {c.name for c in engine.default_extra_checks()} == {"compound", "global", "seismic"}


# ------------------------------------------------------------------ the checks find things


def test_find_cycle_names_the_circle() -> None:
    assert find_cycle({"a": {"b"}, "b": {"c"}, "c": {"a"}, "d": {"a"}}) == ["a", "b", "c", "a"]
    assert find_cycle({"a": {"b"}, "b": {"c"}, "c": set()}) is None


def test_import_graph_resolves_relative_and_function_level_imports(tmp_path: Path) -> None:
    pkg = tmp_path / "pkg"
    (pkg / "sub").mkdir(parents=True)
    (pkg / "__init__.py").write_text("")
    (pkg / "sub" / "__init__.py").write_text("from .a import thing\n")
    (pkg / "sub" / "a.py").write_text("def f():\n    from ..b import g\n")
    (pkg / "sub" / "c.py").write_text(
        "from typing import TYPE_CHECKING\nif TYPE_CHECKING:\n    from pkg import b\n"
    )
    (pkg / "b.py").write_text("from pkg.sub import a\nimport pkg.sub.c\n")
    graph = import_graph(pkg)
    assert graph["pkg.sub"] == {"pkg.sub.a"}
    assert graph["pkg.sub.a"] == {"pkg.b"}
    assert graph["pkg.sub.c"] == set()
    assert graph["pkg.b"] == {"pkg.sub.a", "pkg.sub.c"}
    assert find_cycle(graph) == ["pkg.b", "pkg.sub.a", "pkg.b"]


@pytest.mark.parametrize(
    "source",
    [
        "import os\n",
        "from pathlib import Path\n",
        "import tomli_w\n",
        "from importlib.resources import files\n",
        "def f(p):\n    return p.read_text()\n",
        "def f():\n    with open('x') as fh:\n        return fh\n",
        "import numpy as np\ndef f(a):\n    np.save('x', a)\n",
    ],
)
def test_file_io_scan_finds_file_access(source: str) -> None:
    assert file_io_uses(source)


def test_file_io_scan_passes_plain_numerics() -> None:
    source = "import importlib\nimport numpy as np\ndef f(a):\n    return np.clip(a, 0, 1)\n"
    assert file_io_uses(source) == []
