"""Benchmarks: files named bench_*.py, collected only when this folder is run on purpose.

The default run ignores this folder (pyproject's addopts); run it with

    python -m pytest tests/benchmarks -o addopts="" -s
"""

from __future__ import annotations

import pytest


def pytest_collect_file(file_path, parent):
    named = file_path.suffix == ".py" and file_path.name.startswith("bench_")
    if named and not parent.session.isinitpath(file_path):  # pytest collects named files itself
        return pytest.Module.from_parent(parent, path=file_path)
    return None
