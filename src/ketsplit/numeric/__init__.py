"""Certified high-precision numerics: every printed digit certain, every rank proved.

- :mod:`.digits`    certain-digit text of a ball (``certain_text``, ``digits_cell``)
- :mod:`.enclose`   exact sympy numbers as rigorous python-flint balls
- :mod:`.values`    certified digits of one exact number (``exact_cell``)
- :mod:`.hermitian` certified eigenvalues and eigenvectors of a Hermitian integer matrix
                    (exact fixed-point refinement, one certificate)
- :mod:`.blocks`    one block of a coefficient matrix: its spectrum, vectors and exact facts
- :mod:`.schmidt`   certified Schmidt coefficients and vectors with a proved rank
- :mod:`.certified` the value: coefficients, vectors and clusters as balls that pickle
- :mod:`.point`     a state at a numeric parameter point, checked
- :mod:`.budget`    a wall-clock timer for one step of a check (the route itself is chosen by
                    :mod:`ketsplit.planner`, never by the clock)
"""
