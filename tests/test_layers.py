"""The house: layers only point down, and no module imports itself round a cycle.

The layers contract is in pyproject.toml ([tool.importlinter]); imports inside
functions count, imports made only for type checking do not.
"""

from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

import grimp
import pytest

ROOT = Path(__file__).resolve().parents[1]


def test_the_layers_contract_is_kept():
    command = shutil.which("lint-imports")
    if command is None:
        pytest.skip("import-linter is not installed (pip install -e '.[test]')")
    done = subprocess.run([command, "--no-cache"], cwd=ROOT, capture_output=True, text=True,
                          timeout=240)
    assert done.returncode == 0, done.stdout + done.stderr
    assert "1 kept, 0 broken" in done.stdout


def test_a_back_import_inside_a_function_breaks_the_contract(tmp_path):
    """The contract sees imports placed inside functions: a copy of the package with one
    such back-import (states -> api) must fail it."""
    command = shutil.which("lint-imports")
    if command is None:
        pytest.skip("import-linter is not installed")
    copy = tmp_path / "src"
    shutil.copytree(ROOT / "src" / "ketsplit", copy / "ketsplit",
                    ignore=shutil.ignore_patterns("__pycache__"))
    states = copy / "ketsplit" / "states.py"
    states.write_text(states.read_text() + "\n\ndef _probe():\n    from .api import ket\n    return ket\n")
    shutil.copy(ROOT / "pyproject.toml", tmp_path / "pyproject.toml")
    done = subprocess.run([command, "--no-cache"], cwd=tmp_path, capture_output=True, text=True,
                          timeout=240, env={"PYTHONPATH": str(copy), "PATH": "/usr/bin:/bin"})
    assert done.returncode != 0
    assert "ketsplit.states is not allowed to import ketsplit.api" in done.stdout


def strongly_connected(graph: grimp.ImportGraph) -> list[set[str]]:
    """Tarjan's algorithm over the module graph: the groups that import each other round."""
    sys.setrecursionlimit(max(sys.getrecursionlimit(), 10_000))
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    groups: list[set[str]] = []

    def visit(module: str) -> None:
        index[module] = low[module] = len(index)
        stack.append(module)
        for other in graph.find_modules_directly_imported_by(module):
            if other not in index:
                visit(other)
                low[module] = min(low[module], low[other])
            elif other in stack:
                low[module] = min(low[module], index[other])
        if low[module] == index[module]:
            group = set()
            while True:
                member = stack.pop()
                group.add(member)
                if member == module:
                    break
            if len(group) > 1:
                groups.append(group)

    for module in sorted(graph.modules):
        if module not in index:
            visit(module)
    return groups


def test_no_import_cycle_remains():
    graph = grimp.build_graph("ketsplit", exclude_type_checking_imports=True)
    assert strongly_connected(graph) == []
