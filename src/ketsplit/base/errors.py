"""Errors caused by what the user typed.

Every problem with user input is an :class:`InputError`.  It carries the
position (1-based line and column) and the source line, so that every front
end (shell, worksheet runner, ``-c``) can print the message with a caret under
the spot.  Any other exception escaping the engine is a bug.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Span:
    """A place in the source: 1-based line, 1-based column, and a length."""

    line: int = 1
    column: int = 1
    length: int = 1

    def shifted(self, line: int, column_offset: int = 0) -> "Span":
        """The same span placed on ``line``, moved right by ``column_offset``."""
        return Span(line, self.column + column_offset, self.length)


class InputError(Exception):
    """A problem with the user's input, located at line and column."""

    def __init__(self, message: str, span: Span | None = None, source: str | None = None):
        super().__init__(message)
        self.message = message
        self.span = span
        self.source = source

    @property
    def line(self) -> int | None:
        return self.span.line if self.span else None

    @property
    def column(self) -> int | None:
        return self.span.column if self.span else None

    def located(self, span: Span | None = None, source: str | None = None,
                line: int | None = None) -> "InputError":
        """A copy that knows its place (used when a statement sits inside a file)."""
        new_span = span or self.span
        if new_span is not None and line is not None:
            new_span = new_span.shifted(line)
        err = type(self).__new__(type(self))
        InputError.__init__(err, self.message, new_span, source if source is not None else self.source)
        return err

    def caret(self) -> str:
        """The source line with a caret (or a run of them) under the spot."""
        if self.span is None or self.source is None:
            return ""
        lines = self.source.splitlines() or [""]
        index = min(max(self.span.line, 1), len(lines)) - 1
        text = lines[index] if len(lines) > 1 else lines[0]
        marks = "^" * max(1, min(self.span.length, max(1, len(text) - self.span.column + 1)))
        return f"  {text}\n  {' ' * (self.span.column - 1)}{marks}"

    def __str__(self) -> str:
        where = f"line {self.span.line}, column {self.span.column}: " if self.span else ""
        caret = self.caret()
        return f"{where}{self.message}" + (f"\n{caret}" if caret else "")


class LimitError(InputError):
    """A request that would exceed a documented resource limit."""
