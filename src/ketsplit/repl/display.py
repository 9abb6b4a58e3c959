"""How the shell shows results and errors: 2-D or linear text, folding, colour.

Results are rendered by ``render/text.py`` (``pretty=True`` for 2-D Unicode
math, linear text folded to the terminal's width); this module only decides
the mode, folds outputs taller than the terminal allows and keeps the last
output whole for ``more`` (or F3).
"""

from __future__ import annotations

import shutil
from dataclasses import dataclass
from typing import Iterable, TextIO

from prompt_toolkit import print_formatted_text
from prompt_toolkit.formatted_text import FormattedText
from prompt_toolkit.output import create_output

from ..base.errors import InputError
from ..render.text import fitted_text, wrap_lines
from .lexer import shell_style

FOLD_LINES = 40


@dataclass(frozen=True)
class Mode:
    """Display settings: 2-D or linear, and how many lines show before folding."""

    pretty: bool = True
    fold: int = FOLD_LINES

    def toggled(self) -> "Mode":
        return Mode(not self.pretty, self.fold)

    @property
    def name(self) -> str:
        return "2-D" if self.pretty else "linear"


@dataclass(frozen=True)
class Folded:
    shown: str
    hidden: int   # lines left out


def fold(text: str, limit: int) -> Folded:
    """The first ``limit`` lines, if there are more than ``limit + 2`` (folding two
    lines away would save nothing)."""
    lines = text.split("\n")
    if limit <= 0 or len(lines) <= limit + 2:
        return Folded(text, 0)
    return Folded("\n".join(lines[:limit]), len(lines) - limit)


def results_text(results: Iterable, pretty: bool, width: int | None = None) -> str:
    """Results in 2-D when asked for and they fit ``width``; else linear text folded to it."""
    return "\n".join(fitted_text(r.report, pretty, width) for r in results)


def error_lines(err: InputError, width: int | None = None) -> list[tuple[str, str]]:
    """(style class, text) lines: the message (wrapped to ``width``), then the statement
    with a caret (never wrapped, so that the caret stays under its place)."""
    lines = [("class:error", wrap_lines(f"error: {err.message}", width))]
    caret = err.caret()
    if caret:
        source, marks = caret.split("\n", 1)
        lines += [("", source), ("class:caret", marks)]
    return lines


class Console:
    """Writes the shell's output to a stream, in colour when it is a terminal."""

    def __init__(self, stream: TextIO, colour: bool | None = None) -> None:
        self.stream = stream
        self.colour = stream.isatty() if colour is None else colour
        self._output = create_output(stream) if self.colour else None
        self._style = shell_style()

    @property
    def width(self) -> int | None:
        """Columns of the terminal, or None when the output is not one."""
        return shutil.get_terminal_size().columns if self.colour else None

    def line(self, text: str, style: str = "") -> None:
        if self._output is None or not style:
            self.stream.write(text + "\n")
            self.stream.flush()
            return
        print_formatted_text(FormattedText([(style, text)]), style=self._style,
                             output=self._output)

    def lines(self, styled: Iterable[tuple[str, str]]) -> None:
        for style, text in styled:
            self.line(text, style)

    def folded(self, text: str, mode: Mode) -> bool:
        """Print ``text`` folded to the mode's height; True when something was left out."""
        piece = fold(text, mode.fold)
        self.line(piece.shown)
        if piece.hidden:
            self.line(f"  … {piece.hidden} more lines folded: type 'more' (or press F3) "
                      "to see them whole", "class:folded")
        return bool(piece.hidden)
