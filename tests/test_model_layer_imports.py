"""The model layer imports nothing from above it (issue 11): proved by reading the source.

Every file under ``rheoline/model/`` is parsed with :mod:`ast`; every import statement
(and every ``importlib.import_module`` / ``__import__`` call with a literal name) is
resolved to an absolute module name.  Arrows point down only: the model never imports the
scenario layer, the command line, the widgets, pint, plotly or ipywidgets, anywhere in a
file; pandas only inside a function (a result's table built on first access), never at
module level, so that ``import rheoline.model`` stays light.
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

MODEL = Path(__file__).resolve().parents[1] / "rheoline" / "model"
FILES = sorted(MODEL.rglob("*.py"))

#: Never imported by the model, at any level.
FORBIDDEN = (
    "rheoline.scenario",
    "rheoline.widgets",
    "rheoline.cli",
    "pint",
    "plotly",
    "ipywidgets",
)
#: Not imported by the model at module level (inside a function is allowed).
NOT_AT_MODULE_LEVEL = ("pandas",)


def _package_of(path: Path) -> str:
    parts = path.relative_to(MODEL.parents[1]).with_suffix("").parts
    return ".".join(parts[:-1]) if parts[-1] != "__init__" else ".".join(parts)


def _imports(path: Path):
    """(absolute module name, at module level?, line) of every import in the file."""
    return _imports_in(path.read_text(), _package_of(path))


def _imports_in(source: str, package: str):
    """(absolute module name, at module level?, line) of every import in ``source``."""
    tree = ast.parse(source)
    function_nodes = set()
    for node in ast.walk(tree):
        if isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef, ast.Lambda)):
            function_nodes.update(id(n) for n in ast.walk(node) if n is not node)
    for node in ast.walk(tree):
        top = id(node) not in function_nodes
        if isinstance(node, ast.Import):
            for alias in node.names:
                yield alias.name, top, node.lineno
        elif isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.split(".")
                base = base[: len(base) - node.level + 1]
                name = ".".join(base + ([node.module] if node.module else []))
            else:
                name = node.module or ""
            yield name, top, node.lineno
            for alias in node.names:  # "from rheoline import scenario"
                yield f"{name}.{alias.name}", top, node.lineno
        elif isinstance(node, ast.Call) and node.args and isinstance(node.args[0], ast.Constant):
            func = node.func
            called = getattr(func, "attr", None) or getattr(func, "id", None)
            if called in ("import_module", "__import__") and isinstance(node.args[0].value, str):
                yield node.args[0].value, top, node.lineno


def _matches(name: str, prefix: str) -> bool:
    return name == prefix or name.startswith(prefix + ".")


def test_the_model_has_files_to_check():
    names = {p.name for p in FILES}
    assert {"line.py", "line_result.py", "entry.py", "fluids.py"} <= names


@pytest.mark.parametrize("path", FILES, ids=lambda p: p.name)
def test_model_file_imports_nothing_from_above(path):
    bad = []
    for name, top, line in _imports(path):
        for prefix in FORBIDDEN:
            if _matches(name, prefix):
                bad.append(f"line {line}: {name}")
        for prefix in NOT_AT_MODULE_LEVEL:
            if top and _matches(name, prefix):
                bad.append(f"line {line}: {name} at module level")
    assert not bad, f"{path.name} imports from above the model layer: {bad}"


def test_the_checker_catches_an_upward_import():
    # a file that breaks every rule must be caught, or the test above proves nothing
    source = (
        "import pandas as pd\n"
        "from ..scenario import compare\n"
        "def f():\n"
        "    import plotly\n"
        "    import pandas\n"
        "    importlib.import_module('rheoline.widgets.app')\n"
    )
    names = {(n, top) for n, top, _ in _imports_in(source, "rheoline.model")}
    assert ("pandas", True) in names and ("rheoline.scenario", True) in names
    assert ("rheoline.scenario.compare", True) in names
    assert ("plotly", False) in names and ("pandas", False) in names
    assert ("rheoline.widgets.app", False) in names
