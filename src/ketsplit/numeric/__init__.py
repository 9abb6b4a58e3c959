"""Certified high-precision numerics: every printed digit certain, every rank proved.

- :mod:`.digits`    certain-digit text of a ball (``certain_text``, ``digits_cell``)
- :mod:`.enclose`   exact sympy numbers as rigorous python-flint balls
- :mod:`.values`    certified digits of one exact number (``exact_cell``)
- :mod:`.hermitian` certified eigenvalues of Hermitian ball matrices
- :mod:`.blocks`    one block of a coefficient matrix: balls and exact facts
- :mod:`.schmidt`   certified Schmidt coefficients with a proved rank
- :mod:`.point`     a state at a numeric parameter point, checked
- :mod:`.budget`    a wall-clock timer for one step of a check (the route itself is chosen by
                    :mod:`ketsplit.planner`, never by the clock)
"""
