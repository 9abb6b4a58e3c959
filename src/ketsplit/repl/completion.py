"""Tab completion from what the session knows.

First word of a statement: commands, declaration words, the shell's own
directives and bound names.  After ``help``: topics.  After ``save`` or
``open``: file names (directories and worksheets).  Elsewhere: bound names,
declared parameters, figure names, functions, constants and ``with``.  Nothing is offered inside a ket.
"""

from __future__ import annotations

import os
import re
from typing import Iterable, Iterator

from prompt_toolkit.completion import CompleteEvent, Completer, Completion, PathCompleter
from prompt_toolkit.document import Document

from ..figures import NAMES as FIGURE_NAMES
from ..language.build import CONSTANTS, KET_FUNCTIONS, SCALAR_FUNCTIONS, KetValue
from ..sheets.format import EXTENSION
from ..states import State

DIRECTIVES = {"more": "show the last folded output whole",
              "display": "display pretty|linear: 2-D or linear output"}
DISPLAY_MODES = (("pretty", "2-D Unicode math"), ("linear", "one-line text"))
FILE_COMMANDS = ("save", "open")
OPEN_KET = re.compile(r"(?<![\w,])\|[0-9A-Za-z_+\-, ]*$")
FIRST = re.compile(r"^\s*([A-Za-z_]\w*)(\s+)?")
WORD = re.compile(r"[A-Za-z_]\w*$")


def current_statement(text: str) -> str:
    """The statement the cursor is in: what follows the last ';'."""
    return text[text.rfind(";") + 1:]


class ShellCompleter(Completer):
    def __init__(self, session, topics: Iterable[str] = ()) -> None:
        self.session = session
        self.topics = tuple(topics)
        self.paths = PathCompleter(expanduser=True, file_filter=self._worksheet_or_folder)

    def get_completions(self, document: Document, event: CompleteEvent) -> Iterator[Completion]:
        statement = current_statement(document.text_before_cursor)
        if OPEN_KET.search(statement):
            return
        first = FIRST.match(statement)
        if first is None or first.group(2) is None:
            yield from self._matching(statement, self.first_words())
            return
        word = first.group(1)
        if word in FILE_COMMANDS:
            yield from self.paths.get_completions(Document(statement[first.end():]), event)
        elif word == "help":
            yield from self._matching(statement, self.help_topics())
        elif word == "display":
            yield from self._matching(statement, DISPLAY_MODES)
        else:
            yield from self._matching(statement, self.inner_words())

    @staticmethod
    def _matching(statement: str, candidates: Iterable[tuple[str, str]]) -> Iterator[Completion]:
        found = WORD.search(statement)
        stem = found.group() if found else ""
        seen = set()
        for name, meta in candidates:
            if name.startswith(stem) and name not in seen:
                seen.add(name)
                yield Completion(name, -len(stem), display_meta=meta)

    # -- the candidates ------------------------------------------------
    def first_words(self) -> list[tuple[str, str]]:
        from ..commands import COMMANDS, declarations
        words = [(name, "command") for name in sorted(COMMANDS)]
        words += [(name, "declaration") for name in sorted(declarations.STATEMENTS)]
        words += sorted(DIRECTIVES.items())
        return words + self.bound()

    def help_topics(self) -> list[tuple[str, str]]:
        from ..commands import COMMANDS
        return [(name, "command") for name in sorted(COMMANDS)] + [(t, "topic") for t in self.topics]

    def inner_words(self) -> list[tuple[str, str]]:
        words = self.bound() + [(p.name, f"{p.kind} parameter") for p in self.session.params.values()]
        words += [(name, "figure") for name in FIGURE_NAMES]
        words += [(name, "function") for name in sorted(SCALAR_FUNCTIONS)]
        words += [(name, "ket function") for name in sorted(KET_FUNCTIONS)]
        words += [(name, "constant") for name in sorted(CONSTANTS)]
        return words + [("with", "at a parameter point: with t=pi/6")]

    def bound(self) -> list[tuple[str, str]]:
        return [(name, describe(value)) for name, value in sorted(self.session.bindings.items())]

    @staticmethod
    def _worksheet_or_folder(path: str) -> bool:
        return os.path.isdir(path) or path.endswith(EXTENSION)


def describe(value: object) -> str:
    if isinstance(value, State):
        return "state of " + "×".join(str(d) for d in value.dims)
    if isinstance(value, KetValue):
        return "ket"
    return "value"
