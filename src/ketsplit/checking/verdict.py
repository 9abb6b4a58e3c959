"""The answer to "does my derivation hold?": a small immutable value."""

from __future__ import annotations

from dataclasses import dataclass, replace

import sympy

DIFFERENCE = "lhs - rhs"   # counterexample key of the certified difference (never a parameter name)
WHERE = "at"               # counterexample key of the entry that differs


@dataclass(frozen=True)
class Verdict:
    """``holds`` is True (proved exactly, over the declared range, or with the probability
    bound its ``method`` states), False (a counterexample checked exactly or in balls), or
    None (undecided: ``reason`` says what was tried and ``hint`` how to decide).

    ``counterexample`` maps parameter names to exact values, and the keys
    ``"lhs - rhs"`` (the certified difference there, as text) and ``"at"``
    (which entry differs) when a point refutes the claim.
    """

    holds: bool | None
    method: str
    reason: str
    domain: str = ""                   # 'real t in [0, pi]', for the line
    counterexample: dict | None = None
    digits: int = 0                    # certified digits in the difference (0: exact)
    quantity: str = DIFFERENCE         # what the difference is of, for the line
    hint: str = ""                     # undecided: how to decide it

    def line(self) -> str:
        """A verdict a user can paste into notes."""
        if self.holds is True:
            where = f" for all {self.domain}" if self.domain else ""
            return f"holds{where} ({self.method})"
        if self.holds is False:
            return "fails" + self._failure()
        how = f"; to decide: {self.hint}" if self.hint else ""
        return f"undecided: {self.reason}{how}"

    def _failure(self) -> str:
        if not self.counterexample:
            return f": {self.reason}"
        point = ", ".join(f"{k} = {_value_text(v)}" for k, v in self.counterexample.items()
                          if k not in (DIFFERENCE, WHERE))
        at = f" at {self.counterexample[WHERE]}" if self.counterexample.get(WHERE) else ""
        difference = self.counterexample.get(DIFFERENCE, "")
        digits = "exact" if self.digits == 0 else f"{self.digits} digits"
        head = f" at {point}" if point else ""
        return f"{head}: {self.quantity}{at} = {difference} ({digits})"

    def __hash__(self) -> int:
        """By value, as ``==``; the counterexample dict is hashed as its items."""
        point = frozenset(self.counterexample.items()) if self.counterexample else None
        return hash((self.holds, self.method, self.reason, self.domain, point, self.digits,
                     self.quantity, self.hint))

    def __str__(self) -> str:
        return self.line()

    def _repr_latex_(self) -> str:
        from ..display import verdict_latex
        return verdict_latex(self)


def _value_text(value) -> str:
    from ..language.printer import text
    return text(value) if isinstance(value, sympy.Basic) else str(value)


def all_of(parts: tuple[tuple[Verdict, str], ...], domain: str, summary: str) -> Verdict:
    """Holds (for ``summary``) when every part holds; else the first failure, its ``what``
    said first; else undecided."""
    for verdict, what in parts:
        if verdict.holds is False:
            return replace(verdict, reason=f"{what}: {verdict.reason}", domain=domain)
    undecided = [v for v, _ in parts if v.holds is None]
    if undecided:
        return replace(undecided[0], domain=domain)
    method = "; ".join(dict.fromkeys(v.method for v, _ in parts))
    return Verdict(True, method, summary, domain)
