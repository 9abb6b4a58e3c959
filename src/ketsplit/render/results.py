"""Results that can show themselves: text, LaTeX, JSON, and notebook display.

The session layer produces plain :class:`ketsplit.session.Result` values; the
Session that the shells and the Python API use wraps each in a
:class:`ShownResult`, so rendering stays above the session.
"""

from __future__ import annotations

from dataclasses import dataclass, fields

from ..session import Result
from .described import described
from .jsonout import to_data
from .latex import to_display_latex, to_latex
from .text import to_text


@dataclass(frozen=True)
class ShownResult(Result):
    """A Result with its renderings."""

    def text(self, pretty: bool = False) -> str:
        return to_text(self.report, pretty)

    def latex(self) -> str:
        return to_latex(self.report)

    def to_json(self) -> dict:
        data = to_data(self.report)
        return {"schema": data.pop("schema"), "statement": self.statement, "kind": self.kind,
                "line": self.line, **data, "value": described(self.value)}

    def __str__(self) -> str:
        return self.text()

    def __repr__(self) -> str:
        return f"<{self.kind}: {self.statement}>\n{self.text()}"

    def _repr_latex_(self) -> str:
        return "$$" + to_display_latex(self.report) + "$$"

    def _repr_png_(self) -> bytes | None:
        """A chart (``plot``, ``map``) shows itself inline in a notebook; other results do not."""
        picture = getattr(self.report.value, "_repr_png_", None)
        return picture() if picture is not None else None


def shown(result: Result) -> ShownResult:
    """The result with its renderings (itself when it has them already)."""
    if isinstance(result, ShownResult):
        return result
    return ShownResult(**{f.name: getattr(result, f.name) for f in fields(result)})
