"""The lowest versions pyproject.toml allows really work: install each dependency at its
floor in a fresh virtual environment, install ketsplit there, and run a smoke test.

Slow (it downloads and installs packages): run with ``-m slow``.  Skipped, saying
why, when the package registry cannot be reached; a floor that cannot be
installed once the registry answers is a failure.
"""

from __future__ import annotations

import re
import subprocess
import venv
from pathlib import Path

import mpmath
import pytest

try:
    import tomllib
except ModuleNotFoundError:  # Python 3.10
    tomllib = None

ROOT = Path(__file__).resolve().parent.parent
FLOOR = re.compile(r"^\s*([A-Za-z0-9_.\-]+)\s*(?:\[[^\]]*\])?\s*>=\s*([0-9][0-9A-Za-z.]*)")
PIP_SECONDS = 900
OFFLINE = re.compile(r"NewConnectionError|Max retries exceeded|Temporary failure in name resolution|"
                     r"Network is unreachable|Name or service not known|ConnectionError|ProxyError|"
                     r"Read timed out")


def floors() -> list[str]:
    """``name==floor`` for every dependency of the project (each must have a floor)."""
    project = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))["project"]
    pinned = []
    for requirement in project["dependencies"]:
        found = FLOOR.match(requirement.split(";")[0])
        assert found, f"{requirement!r} has no '>=' floor"
        pinned.append(f"{found.group(1)}=={found.group(2)}")
    return pinned


def pip(python: Path, *args: str) -> subprocess.CompletedProcess:
    return subprocess.run([str(python), "-m", "pip", "--disable-pip-version-check", *args],
                          capture_output=True, text=True, timeout=PIP_SECONDS)


@pytest.fixture(scope="module")
def floor_env(tmp_path_factory) -> Path:
    """A virtual environment holding the floors and ketsplit (not editable)."""
    if tomllib is None:
        pytest.skip("reading pyproject.toml needs tomllib (Python 3.11+)")
    where = tmp_path_factory.mktemp("floors")
    venv.create(where, with_pip=True)
    python = where / "bin" / "python"
    for step in (floors(), ["--no-deps", str(ROOT)]):   # building needs the registry too
        installed = pip(python, "install", *step)
        if installed.returncode != 0 and OFFLINE.search(installed.stderr):
            pytest.skip(f"the package registry cannot be reached: {installed.stderr.strip()[-300:]}")
        assert installed.returncode == 0, installed.stderr[-3000:]
    return python


def run(python: Path, statements: str) -> subprocess.CompletedProcess:
    return subprocess.run([str(python), "-m", "ketsplit", "-c", statements], capture_output=True,
                          text=True, timeout=300, cwd=python.parent)


@pytest.mark.slow
def test_the_floors_are_what_is_installed(floor_env):
    listed = pip(floor_env, "list", "--format=freeze").stdout.lower().replace("_", "-")
    for pinned in floors():
        assert pinned.lower().replace("_", "-") in listed, pinned


@pytest.mark.slow
def test_certified_digits_at_the_floors(floor_env):
    # |00> + 2|11>, normalised, has Schmidt coefficients 2/sqrt(5) and 1/sqrt(5)
    # (fact of the trade); reference digits from mpmath
    done = run(floor_env, "digits 25; numeric |00> + 2|11>")
    assert done.returncode == 0, done.stderr
    with mpmath.workdps(50):
        for value in (2 / mpmath.sqrt(5), 1 / mpmath.sqrt(5)):
            assert mpmath.nstr(value, 25) in done.stdout


@pytest.mark.slow
def test_exact_schmidt_and_checks_at_the_floors(floor_env):
    # cos(t)|00> + sin(t)|11> at t = pi/6 has coefficients sqrt(3)/2 and 1/2; the
    # Pythagorean identity holds and cos^2 = sin^2 fails at t = 0 (fact of the trade)
    done = run(floor_env, "real t; schmidt cos(t)|00> + sin(t)|11> with t=pi/6; "
                          "check cos(t)^2 + sin(t)^2 = 1")
    assert done.returncode == 0, done.stderr
    assert "coefficients: [sqrt(3)/2, 1/2]" in done.stdout and "holds" in done.stdout
    assert run(floor_env, "real t; check cos(t)^2 = sin(t)^2").returncode == 1


@pytest.mark.slow
def test_the_shell_imports_at_the_floors(floor_env):
    done = subprocess.run([str(floor_env), "-c", "import ketsplit.repl.loop"], capture_output=True,
                          text=True, timeout=120)
    assert done.returncode == 0, done.stderr
    piped = subprocess.run([str(floor_env), "-m", "ketsplit"], input="rank |00> + |11>\n",
                           capture_output=True, text=True, timeout=120)
    assert piped.returncode == 0 and "rank: 2" in piped.stdout   # a Bell pair (fact of the trade)


@pytest.mark.slow
def test_strata_at_the_floors(floor_env):
    # By hand: cos t = 1/2 only at t = pi/3 > 1, so (cos t - 1/2)^2 + s^4 has no zero for
    # t, s in [0, 1] and the rank stays 2 (this search needs sympy's lift() over QQ<sqrt(2)>,
    # which fails before sympy 1.14)
    done = run(floor_env, "real t, s in [0, 1]; strata |00> + ((cos(t) - 1/2)^2 + s^4)|11>")
    assert done.returncode == 0, done.stderr
    assert "2     for every parameter value in the ranges" in done.stdout
