"""A pygments lexer of our own for the state language, and the shell's colours.

Besides the fixed classes (kets, cuts, numbers, operators, comments) the
lexer tells apart words by what the session knows about them: commands,
declaration words, declared parameters, bound names, functions and
constants.  It asks a :class:`Vocabulary` (the shell passes one built on its
Session), so that a parameter is coloured as a parameter the moment it is
declared.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Callable, Iterator

from prompt_toolkit.styles import Style, merge_styles, style_from_pygments_dict
from pygments.lexer import Lexer
from pygments.token import Comment, Keyword, Name, Number, Operator, Punctuation, Text, Token, \
    _TokenType

KET = Token.Ket
CUT = Token.Cut
COMMAND = Keyword
DECLARATION = Keyword.Declaration
CLAUSE = Keyword.Pseudo           # with, in, over, sum
PARAMETER = Name.Variable
BOUND = Name.Bound
FUNCTION = Name.Builtin
CONSTANT = Name.Constant
NAME = Name
NUMBER = Number
OPERATOR = Operator
PUNCTUATION = Punctuation
COMMENT = Comment.Single
ERROR = Token.Error

CLAUSE_WORDS = frozenset({"with", "in", "over", "sum", "to"})


@dataclass(frozen=True)
class Vocabulary:
    """What the lexer needs to know about words; every field is a live query."""

    commands: Callable[[], frozenset[str]] = field(default=lambda: frozenset())
    declarations: Callable[[], frozenset[str]] = field(default=lambda: frozenset())
    parameters: Callable[[], frozenset[str]] = field(default=lambda: frozenset())
    bound: Callable[[], frozenset[str]] = field(default=lambda: frozenset())
    functions: Callable[[], frozenset[str]] = field(default=lambda: frozenset())
    constants: Callable[[], frozenset[str]] = field(default=lambda: frozenset())


def default_vocabulary() -> Vocabulary:
    """Commands, declaration words, functions and constants of the language (no session)."""
    from ..commands import COMMANDS, declarations
    from ..language.build import CONSTANTS, KET_FUNCTIONS, SCALAR_FUNCTIONS
    return Vocabulary(
        commands=lambda: frozenset(COMMANDS),
        declarations=lambda: frozenset(declarations.STATEMENTS),
        functions=lambda: frozenset(SCALAR_FUNCTIONS) | frozenset(KET_FUNCTIONS),
        constants=lambda: frozenset(CONSTANTS) | {"π"})


def session_vocabulary(session) -> Vocabulary:
    """The language's words plus the parameters and names of ``session``."""
    base = default_vocabulary()
    return Vocabulary(base.commands, base.declarations,
                      parameters=lambda: frozenset(session.params),
                      bound=lambda: frozenset(session.bindings),
                      functions=base.functions, constants=base.constants)


# The order matters: a cut (``1|2``, ``A|BC``) is tried before a ket, and a
# ket before the operators, so that ``|+>`` is one token.
PATTERNS: tuple[tuple[str, re.Pattern[str]], ...] = tuple((kind, re.compile(rx)) for kind, rx in (
    ("comment", r"#[^\n]*"),
    ("newline", r"\n"),
    ("space", r"[ \t\r]+"),
    ("cut", r"(?<![\w>|)\]])[A-Za-z0-9_,]+\|[A-Za-z0-9_,]+(?![\w,>|])"),
    ("ket", r"\|[0-9A-Za-z_+\-, ]*>"),
    ("number", r"(?:\d+(?:\.(?!\.)\d*)?|\.\d+)(?:[eE][+-]?\d+)?"),
    ("word", r"[^\W\d]\w*|π"),
    ("separator", r";"),
    ("punctuation", r"[()\[\],:]"),
    ("operator", r"\.\.|\*\*|[+\-*/^=~⊗·√|]"),
))

FIXED = {"comment": COMMENT, "newline": Text, "space": Text, "cut": CUT, "ket": KET,
         "number": NUMBER, "separator": PUNCTUATION, "punctuation": PUNCTUATION,
         "operator": OPERATOR}


class KetLexer(Lexer):
    """Highlights statements of the state language.

    Pass ``vocabulary=`` (a :class:`Vocabulary`) to colour session words;
    without it only the language's own words are known.
    """

    name = "ketsplit"
    aliases = ["ketsplit", "ket"]
    filenames: list[str] = []

    def __init__(self, **options) -> None:
        self.vocabulary: Vocabulary = options.pop("vocabulary", None) or default_vocabulary()
        super().__init__(**options)

    def get_tokens_unprocessed(self, text: str) -> Iterator[tuple[int, _TokenType, str]]:
        pos, at_start = 0, True
        while pos < len(text):
            kind, match = next(((k, m) for k, p in PATTERNS if (m := p.match(text, pos))),
                               ("error", None))
            end = match.end() if match else pos + 1
            piece = text[pos:end]
            if kind == "word":
                yield pos, self.word_token(piece, at_start, text[end:]), piece
            else:
                yield pos, FIXED.get(kind, ERROR), piece
            if kind in ("newline", "separator"):
                at_start = True
            elif kind not in ("space", "comment"):
                at_start = False
            pos = end

    def word_token(self, word: str, at_start: bool, rest: str) -> _TokenType:
        words = self.vocabulary
        if at_start and not rest.lstrip().startswith("="):
            if word in words.commands():
                return COMMAND
            if word in words.declarations():
                return DECLARATION
        if word in CLAUSE_WORDS:
            return CLAUSE
        for kind, known in ((PARAMETER, words.parameters), (BOUND, words.bound),
                            (FUNCTION, words.functions), (CONSTANT, words.constants)):
            if word in known():
                return kind
        return NAME


# Colours chosen to read on dark and on light backgrounds: mid-tone hues
# (no pure white, black or yellow), emphasis by weight and hue together.
PALETTE = {
    KET: "#2e9fa6 bold",
    CUT: "#c0569e bold",
    COMMAND: "#3b7dd8 bold",
    DECLARATION: "#7a63d2 bold",
    CLAUSE: "#7a63d2",
    PARAMETER: "#d2772e",
    BOUND: "#4c9a3f bold",
    FUNCTION: "#3b7dd8",
    CONSTANT: "#b0822a",
    NUMBER: "#b0822a",
    OPERATOR: "#8a8a8a",
    PUNCTUATION: "#8a8a8a",
    COMMENT: "#8a8a8a italic",
    ERROR: "#d0453c underline",
}

SHELL_CLASSES = {
    "prompt": "#2e9fa6 bold",
    "continuation": "#8a8a8a",
    "bottom-toolbar": "noreverse bg:#3a3f4b #d8dde6",
    "bottom-toolbar.key": "bg:#3a3f4b #8fd3d8 bold",
    "error": "#d0453c bold",
    "caret": "#d0453c",
    "folded": "#8a8a8a italic",
    "spinner": "#2e9fa6",
}


def shell_style() -> Style:
    """The prompt_toolkit style: token colours and the shell's own classes."""
    return merge_styles([style_from_pygments_dict(PALETTE), Style.from_dict(SHELL_CLASSES)])
