"""Tokenizer of the state language.

A ket ``|...>`` is one token: inside the bars the characters are labels, not
operators, so ``|0,1,10>`` and ``|+->`` never reach the expression grammar.

One regular expression (:data:`TOKEN`) matches every token, whitespace
before it included; only the rare tokens that need a closer look (non-ASCII
letters, a ``|`` that opens no ket, ``#``, a character outside the language)
are examined further, in :func:`_resolve`.  The parser reads tokens one at a
time from a :class:`Lexer`, so that it can pass over a long stretch of plain
terms in one step; :func:`tokenize` gives all the tokens of a line as objects.
"""

from __future__ import annotations

import re
import unicodedata
from dataclasses import dataclass
from enum import Enum

from .. import limits
from ..base.errors import InputError, Span


class Kind(Enum):
    NUMBER = "number"
    NAME = "name"
    KET = "ket"
    BRA = "bra"
    OP = "operator"
    END = "end of input"


@dataclass(frozen=True)
class Token:
    kind: Kind
    text: str
    span: Span
    spaced: bool = False  # whitespace stood right before this token

    def describe(self) -> str:
        return "end of input" if self.kind is Kind.END else repr(self.text)


OPERATORS = frozenset(("..", "**", "+", "-", "*", "/", "^", "(", ")", "[", "]", ",", "=", "~",
                       "⊗", "·", "√", ":", ";"))
UNICODE_NAMES = {"π": "pi"}
KET_LABEL_CHARS = r"0-9A-Za-z_+\-, "
KET_CHARS = set("0123456789+-,abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ_ ")
DIGITS = frozenset("0123456789")

# (whitespace before, token): every character of the line lands in one token
TOKEN = re.compile(r"""([ \t\r\n]*)(
      \|[""" + KET_LABEL_CHARS + r"""]*>                       # a ket
    | <[""" + KET_LABEL_CHARS + r"""]*(?:(?=\|[""" + KET_LABEL_CHARS + r"""]*>)|\|)  # a bra; <0 in <0|1>
    | [0-9]+(?:\.(?!\.)[0-9]*)?(?:[eE][+-]?[0-9]+)?            # a number: 12, 1.5, 2e-3
    | \.[0-9]+(?:[eE][+-]?[0-9]+)?                             # .5
    | [A-Za-z_][A-Za-z0-9_]*+(?![^\W\dπ])                       # an ASCII name
    | \.\.|\*\*|[-+*/^()\[\],=~⊗·√:;]                          # an operator
    | (?:[^\W\dπ]|[0-9])+                                      # a name with other letters
    | \#.*                                                     # a comment, to the end
    | [^ \t\r\n]                                              # anything else: refused
    )""", re.VERBOSE | re.DOTALL)
PLAIN_START = frozenset("0123456789.ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz_"
                        "+-*/^()[],=~:;⊗·√")


class Lexer:
    """Reads the tokens of one line one at a time: ``token`` is the current one ("" at
    the end of input, or at a ``#`` comment), ``start`` its 0-based column.

    Tokens are matched where they are needed, so that the parser can pass over a
    stretch of the line in one step (see grammar's term runs) without tokens for it."""

    def __init__(self, text: str, line: int = 1, start: int = 0):
        limits.check(len(text), "input_length", f"input of {len(text)} characters",
                     Span(line, 1, 1), text[:200])
        self.text = text
        self.line = line
        self.token = ""
        self.start = 0
        self.width = 0      # source width (** is read as ^, π as pi)
        self.spaced = False  # whitespace stood right before the token
        self.after = start  # where the next token is looked for
        self.advance()

    def advance(self) -> None:
        """Move to the next token."""
        found = TOKEN.match(self.text, self.after)
        space, token = found.groups() if found else ("", "#")
        end = found.end() if found else len(self.text)
        start = end - len(token) if found else end
        if token[0] not in PLAIN_START and (token[0] not in "|<" or len(token) == 1) or \
                token in ("**", ".", "#") or not token.isascii():
            token = _resolve(token, start, self.text, self.line)
        if token == "#":
            self.spaced = self.text[:start][-1:] in WHITESPACE
            self.token, self.start, self.width = "", len(self.text.rstrip()), 1
            self.after = len(self.text)
            return
        self.token, self.start, self.after = token, start, end
        self.width = end - start
        self.spaced = bool(space)

    def skip_to(self, position: int) -> None:
        """Pass over the text up to ``position`` (the end of a token) and read on from there."""
        self.after = position
        self.advance()

    def span(self) -> Span:
        return Span(self.line, self.start + 1, self.width)


WHITESPACE = (" ", "\t", "\r", "\n")


def kind_of_text(text: str) -> Kind:
    if not text:
        return Kind.END
    if text[0] == "|":
        return Kind.KET
    if text[0] == "<":
        return Kind.BRA
    if text[0] in DIGITS or (text[0] == "." and text != ".."):
        return Kind.NUMBER
    return Kind.OP if text in OPERATORS else Kind.NAME


def _resolve(token: str, start: int, source: str, line: int) -> str:
    """A token that needs a closer look: its text as the grammar reads it ("#" for a
    comment), or an InputError."""
    if token == "**":
        return "^"
    if token[0] == "#":
        return "#"
    if token[0] == "|":
        raise _ket_error(source, start, line)
    if token in UNICODE_NAMES:
        return UNICODE_NAMES[token]
    if token in OPERATORS:
        return token
    if token != "." and all(ch.isalpha() or ch == "_" or ch in DIGITS for ch in token):
        check_confusable(token, Span(line, start + 1, len(token)), source)
        return token
    bad = next((k for k, ch in enumerate(token) if not (ch.isalpha() or ch == "_" or
                                                         ch in DIGITS)), 0)
    raise InputError(f"unexpected character {token[bad]!r}", Span(line, start + bad + 1, 1),
                     source)


def _ket_error(text: str, pos: int, line: int) -> InputError:
    """Why the ``|`` at ``pos`` opens no ket."""
    end = text.find(">", pos + 1)
    bad = next((k for k in range(pos + 1, end if end >= 0 else len(text))
                if text[k] not in KET_CHARS), None)
    if bad is None:
        return InputError("the ket opened here is not closed: expected '>'",
                          Span(line, pos + 1, 1), text)
    return InputError(f"unexpected {text[bad]!r} inside a ket: labels are digits, letters, "
                      "'+', '-' and ','", Span(line, bad + 1, 1), text)


# Letters of other scripts that look like Latin letters (after Unicode's confusables.txt,
# the letters a reader cannot tell apart in a monospace font)
LOOK_ALIKES = {
    **dict(zip("аеорсухіјѕԁһӏԛԝүӀ", "aeopcyxijsdhlqwyI")),          # Cyrillic small
    **dict(zip("АВЕКМНОРСТХЅІЈ", "ABEKMHOPCTXSIJ")),                # Cyrillic capital
    **dict(zip("οναιρκ", "ovairk")),                                # Greek small
    **dict(zip("ΑΒΕΖΗΙΚΜΝΟΡΤΥΧ", "ABEZHIKMNOPTYX")),                # Greek capital
}


def check_confusable(name: str, span: Span, source: str) -> None:
    """Refuse a name with a letter that looks like an ASCII one but is not (``ѕchmidt``
    with a Cyrillic ѕ would otherwise become a new parameter without a word)."""
    for offset, ch in enumerate(name):
        if ch.isascii():
            continue
        latin = LOOK_ALIKES.get(ch) or unicodedata.normalize("NFKC", ch)
        if latin.isascii() and latin.isalnum():
            raise InputError(
                f"the name {name!r} contains {ch!r} ({unicodedata.name(ch, 'U+%04X' % ord(ch))}),"
                f" a non-ASCII letter that looks like the ASCII {latin!r} (a confusable): "
                f"type {latin!r} instead", Span(span.line, span.column + offset, 1), source)


def tokenize(text: str, line: int = 1) -> list[Token]:
    """The tokens of one line as objects, the last one of kind END."""
    lexer = Lexer(text, line)
    tokens = [Token(kind_of_text(lexer.token), lexer.token, lexer.span(), lexer.spaced)]
    while lexer.token:
        lexer.advance()
        tokens.append(Token(kind_of_text(lexer.token), lexer.token, lexer.span(), lexer.spaced))
    return tokens
