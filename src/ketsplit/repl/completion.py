"""Tab completion: only the words that may stand at the cursor.

First word of a statement: commands, declaration words, the shell's own
directives and bound names.  After a command, what its usage line (in the
command registry) allows there: a state (bound names, parameters, functions,
constants), a figure name where the usage has FIGURE, its literal choices
(``bits|nats``, ``auto|exact|certified``), help topics after ``help``, file
names after ``save`` and ``open``, and ``with`` or ``over`` only once an
argument stands before the cursor; after ``with`` or ``over``, the declared
parameters.  After a declaration word nothing is offered (it introduces new
names), nor inside a ket.  A completed word ends with a space, a function
with its opening bracket (``sqrt(``), a folder with its slash.
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
              "display": "display pretty|linear: 2-D or linear output",
              "exit": "leave the shell", "quit": "leave the shell"}
DISPLAY_MODES = (("pretty", "2-D Unicode math"), ("linear", "one-line text"))
FILE_COMMANDS = ("save", "open")
OPEN_KET = re.compile(r"(?<![\w,])\|[0-9A-Za-z_+\-, ]*$")
FIRST = re.compile(r"^\s*([A-Za-z_]\w*)(\s+)?")
WORD = re.compile(r"[A-Za-z_]\w*$")
CHOICES = re.compile(r"^\[?([a-z]+(?:\|[a-z]+)+)\]?$")   # bits|nats, auto|exact|certified
PARAMETER_SLOT = re.compile(r"\b(?:with|over)\s+(?:[^=\s]+\s*=\s*[^,\s]*\s*,\s*)*[A-Za-z_]*$")
NOT_EXPRESSIONS = frozenset({"N", "SECONDS", "NAME", "NAME=VALUE", "FILE", "COMMAND"})
USAGE_PUNCTUATION = re.compile(r"[\[\],]|\.\.\.")
WITH = re.compile(r"\swith\s")
FUNCTION, WORD_END = "(", " "


def current_statement(text: str) -> str:
    """The statement the cursor is in: what follows the last ';'."""
    return text[text.rfind(";") + 1:]


def usage_words(usage: str) -> list[str]:
    """The words of a usage line after the command's name, its first form only,
    brackets, commas and ellipses dropped: 'figures STATE [CUT] [FIGURE ...]' gives
    ['STATE', 'CUT', 'FIGURE'], 'plot FIGURE[,FIGURE...] STATE' ['FIGURE', 'FIGURE', 'STATE']."""
    first_form = usage.split(" | ")[0] if " | " in usage and "[" not in usage else usage
    return USAGE_PUNCTUATION.sub(" ", first_form).split()[1:]


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
        else:
            yield from self._matching(statement, self.words_after(word, statement[first.end():]))

    def words_after(self, word: str, rest: str) -> list[tuple[str, str]]:
        """What may follow the statement's first word ``word`` when ``rest`` is typed."""
        from ..commands import COMMANDS, declarations
        if word == "help":
            return self.help_topics()
        if word == "display" and word not in self.session.bindings:
            return list(DISPLAY_MODES)
        if word in declarations.STATEMENTS or word in DIRECTIVES:
            return []
        if word not in COMMANDS or word in self.session.bindings:
            return self.state_words()
        return self.argument_words(usage_words(COMMANDS[word].usage), rest)

    def argument_words(self, usage: list[str], rest: str) -> list[tuple[str, str]]:
        """Words for a command's argument: the first slot of its usage while no argument
        is typed yet; afterwards a state, and the figures, choices and keywords it takes."""
        if PARAMETER_SLOT.search(rest):
            return self.parameters()
        if WITH.search(rest):
            return self.state_words()   # a value in the 'with' clause
        if not usage:
            return []
        if not rest.strip() or WORD.fullmatch(rest.strip()) and not rest.endswith(" "):
            return self.slot_words(usage[0])
        words = self.state_words()
        if "FIGURE" in usage[1:]:
            words += self.figures()
        for slot in usage:
            words += self.slot_words(slot) if CHOICES.match(slot) else []
        return words + [(keyword, "keyword") for keyword in ("with", "over") if keyword in usage]

    def slot_words(self, slot: str) -> list[tuple[str, str]]:
        choices = CHOICES.match(slot)
        if choices:
            return [(choice, "choice") for choice in choices.group(1).split("|")]
        if slot == "FIGURE":
            return self.figures()
        if slot in NOT_EXPRESSIONS or not slot.isupper():
            return []
        return self.state_words()   # STATE, LHS, EXPR, A, ...

    @staticmethod
    def _matching(statement: str, candidates: Iterable[tuple[str, str]]) -> Iterator[Completion]:
        found = WORD.search(statement)
        stem = found.group() if found else ""
        seen = set()
        for name, meta in candidates:
            if name.startswith(stem) and name not in seen:
                seen.add(name)
                end = FUNCTION if "function" in meta else WORD_END
                yield Completion(name + end, -len(stem), display=name, display_meta=meta)

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

    def state_words(self) -> list[tuple[str, str]]:
        words = self.bound() + self.parameters()
        words += [(name, "function") for name in sorted(SCALAR_FUNCTIONS)]
        words += [(name, "ket function") for name in sorted([*KET_FUNCTIONS, "sum"])]
        return words + [(name, "constant") for name in sorted(CONSTANTS)]

    def parameters(self) -> list[tuple[str, str]]:
        return [(p.name, f"{p.kind} parameter") for p in self.session.params.values()]

    @staticmethod
    def figures() -> list[tuple[str, str]]:
        return [(name, "figure") for name in FIGURE_NAMES]

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
