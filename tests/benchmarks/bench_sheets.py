"""What a worksheet costs on top of its statements, as ratios.

Run on demand: ``python -m pytest tests/benchmarks/bench_sheets.py -o addopts="" -s``.

The reference is the plainest way to get the same results: the worksheet's
statements given, as one text, to ``Session().run``.  Ours is reading the
file, replaying it line by line, and comparing every result with the one
recorded (``verify``).  Each time is the best of three runs with sympy's
cache cleared before each, both measured in this run.  Goal: verify within
1.25 times the plain run, so that keeping a worksheet costs little more than
running it.  A second figure: comparing a result that differs only in its
printed form (proved equal by simplification) against comparing identical text.
"""

from __future__ import annotations

import time
from pathlib import Path

import pytest
from sympy.core.cache import clear_cache

from ketsplit import Session
from ketsplit.session import split_statements
from ketsplit.sheets.format import read_sheet
from ketsplit.sheets.matching import first_difference
from ketsplit.sheets.runner import ValueEquality, differences, replay

pytestmark = pytest.mark.benchmark

SHEETS = sorted((Path(__file__).resolve().parents[2] / "worksheets").glob("*.kss"))


def best_of(runs: int, action) -> float:
    times = []
    for _ in range(runs):
        clear_cache()
        start = time.perf_counter()
        action()
        times.append(time.perf_counter() - start)
    return min(times)


def statements_of(path: Path) -> str:
    return "\n".join(s for line in read_sheet(path).lines for s, _ in split_statements(line.source))


def verify(path: Path) -> None:
    session, outcomes = replay(read_sheet(path))
    differences(outcomes, session)


def test_verify_against_plain_running():
    print()
    total_ours = total_reference = 0.0
    for path in SHEETS:
        text = statements_of(path)
        reference = best_of(3, lambda: Session().run(text))
        ours = best_of(3, lambda: verify(path))
        total_ours, total_reference = total_ours + ours, total_reference + reference
        print(f"  {path.name:24s} plain run {reference:7.3f} s   verify {ours:7.3f} s   "
              f"ratio {ours / reference:5.2f}")
    ratio = total_ours / total_reference
    print(f"  total: verify / plain run = {ratio:.2f} (goal at most 1.25)")
    assert ratio <= 1.25


def test_proving_a_rewritten_result_equal_against_reading_it_as_text():
    # 1 - sin(t)^2 = cos(t)^2 (fact of the trade)
    recorded = ["  rho_1: [[cos(t)^2, 0], [0, sin(t)^2]]"] * 20
    rewritten = ["  rho_1: [[1 - sin(t)^2, 0], [0, sin(t)^2]]"] * 20
    session = Session()
    session.run("real t in [0, pi]")
    equal = ValueEquality(session)
    same = best_of(3, lambda: first_difference(recorded, recorded, equal))
    proved = best_of(3, lambda: first_difference(recorded, rewritten, equal))
    assert first_difference(recorded, rewritten, equal) is None
    print(f"\n  identical text {same * 1e3:.3f} ms, proved equal {proved * 1e3:.1f} ms "
          f"(ratio {proved / max(same, 1e-9):.0f})")
