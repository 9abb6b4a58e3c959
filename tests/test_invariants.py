"""Semantic invariants of the Schmidt decomposition as property tests (issue 16: "keep them").

For random states with Gaussian-integer amplitudes (a pure state of two or three
parts), the certified Schmidt coefficients (python-flint balls) must

- square to a sum whose ball holds 1 (normalisation: tr rho = 1);
- be the same across A|B and B|A (the two reduced states share their nonzero
  spectrum: fact of the trade, from the singular values of the coefficient matrix);
- be the same after an exact local unitary on one side (a permutation of its levels
  with phases 1, -1, i, -i, or a Hadamard on a qubit), after scaling the state by a
  nonzero Gaussian integer, and after permuting the parts (the cut moved along).

"The same" is decided by ball overlap: two balls that do not overlap are a
certified difference, never a tolerance.  About 40 examples by default; more with
KETSPLIT_FUZZ_EXAMPLES.
"""

from __future__ import annotations

import itertools
import os

import sympy
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import ketsplit

MANY = int(os.environ.get("KETSPLIT_FUZZ_EXAMPLES", "0"))
SHAPES = [((2, 2), "1|2"), ((2, 3), "1|2"), ((3, 3), "1|2"), ((2, 2, 2), "1|23"),
          ((2, 3, 2), "12|3")]
PHASES = [sympy.Integer(1), sympy.Integer(-1), sympy.I, -sympy.I]


@st.composite
def gaussian_states(draw):
    """(dims, cut, amplitudes by label): small Gaussian integers, not all zero."""
    dims, cut = draw(st.sampled_from(SHAPES))
    labels = list(itertools.product(*(range(d) for d in dims)))
    parts = st.integers(-3, 3)
    values = [draw(parts) + sympy.I * draw(parts) for _ in labels]
    if all(v == 0 for v in values):
        values[0] = sympy.Integer(1)
    return dims, cut, dict(zip(labels, values))


def state_of(dims, amplitudes) -> ketsplit.State:
    labels = itertools.product(*(range(d) for d in dims))
    return ketsplit.ket([amplitudes[label] for label in labels], dims=dims)


def balls(dims, cut, amplitudes):
    """The certified Schmidt coefficients, largest first."""
    return ketsplit.schmidt(state_of(dims, amplitudes), cut, method="certified").coefficients


def assert_same(first, second) -> None:
    assert len(first) == len(second) or _tail_holds_zero(first, second), (first, second)
    for a, b in zip(first, second):
        assert a.overlaps(b), (first, second)


def _tail_holds_zero(first, second) -> bool:
    """An undecided rank on one side: the extra balls must all hold zero."""
    longer, shorter = (first, second) if len(first) > len(second) else (second, first)
    return all(ball.contains(0) for ball in longer[len(shorter):])


def on_first_part(dims, amplitudes, matrix) -> dict:
    """The amplitudes after the unitary ``matrix`` acts on the first part."""
    moved = {label: sympy.Integer(0) for label in amplitudes}
    for label, value in amplitudes.items():
        for row in range(dims[0]):
            moved[(row,) + label[1:]] += matrix[row, label[0]] * value
    return {label: sympy.expand(value) for label, value in moved.items()}


PROPERTIES = settings(max_examples=MANY or 40, deadline=None, derandomize=not MANY,
                      database=None, suppress_health_check=[HealthCheck.too_slow])


@PROPERTIES
@given(gaussian_states())
def test_squared_coefficients_sum_to_one(case):
    coefficients = balls(*case)
    assert sum((c * c for c in coefficients), 0 * coefficients[0]).contains(1)


@PROPERTIES
@given(gaussian_states())
def test_both_sides_of_the_cut_have_the_same_spectrum(case):
    dims, cut, amplitudes = case
    left, right = cut.split("|")
    assert_same(balls(dims, cut, amplitudes), balls(dims, f"{right}|{left}", amplitudes))


@PROPERTIES
@given(gaussian_states(), st.data())
def test_exact_local_unitaries_leave_the_coefficients(case, data):
    dims, cut, amplitudes = case
    order = data.draw(st.permutations(range(dims[0])))
    phases = [data.draw(st.sampled_from(PHASES)) for _ in order]
    matrix = sympy.zeros(dims[0])
    for column, row in enumerate(order):
        matrix[row, column] = phases[column]
    if dims[0] == 2 and data.draw(st.booleans()):
        matrix = sympy.Matrix([[1, 1], [1, -1]]) / sympy.sqrt(2) * matrix  # Hadamard after it
    assert_same(balls(dims, cut, amplitudes), balls(dims, cut, on_first_part(dims, amplitudes, matrix)))


@PROPERTIES
@given(gaussian_states(), st.integers(-5, 5), st.integers(1, 5))
def test_scaling_the_state_leaves_the_coefficients(case, real, imaginary):
    dims, cut, amplitudes = case
    factor = real + sympy.I * imaginary
    scaled = {label: sympy.expand(factor * value) for label, value in amplitudes.items()}
    assert_same(balls(dims, cut, amplitudes), balls(dims, cut, scaled))


@PROPERTIES
@given(gaussian_states(), st.data())
def test_permuting_the_parts_moves_the_cut_along(case, data):
    dims, cut, amplitudes = case
    order = data.draw(st.permutations(range(len(dims))))   # new part k is old part order[k]
    moved = {tuple(label[p] for p in order): value for label, value in amplitudes.items()}
    new_place = {old + 1: new + 1 for new, old in enumerate(order)}
    new_cut = "|".join("".join(sorted(str(new_place[int(p)]) for p in side))
                       for side in cut.split("|"))
    assert_same(balls(dims, cut, amplitudes),
                balls(tuple(dims[p] for p in order), new_cut, moved))
