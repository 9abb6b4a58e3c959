"""Tokenizer of the state language.

A ket ``|...>`` is one token: inside the bars the characters are labels, not
operators, so ``|0,1,10>`` and ``|+->`` never reach the expression grammar.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from enum import Enum

from .. import limits
from .errors import InputError, Span


class Kind(Enum):
    NUMBER = "number"
    NAME = "name"
    KET = "ket"
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


# longest first, so that ".." wins over "."
OPERATORS = ("..", "**", "+", "-", "*", "/", "^", "(", ")", "[", "]", ",", "=", "~",
             "⊗", "·", "√", ":", ";")
UNICODE_NAMES = {"π": "pi"}
KET = re.compile(r"\|[0-9A-Za-z_+\-, ]*>")
ASCII_NAME = re.compile(r"[A-Za-z_][A-Za-z0-9_]*")
KET_CHARS = set("0123456789+-,abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ_ ")


def _is_name_start(ch: str) -> bool:
    return ch.isascii() and (ch.isalpha() or ch == "_") or ch in UNICODE_NAMES or (
        not ch.isascii() and ch.isalpha())


def _is_name_char(ch: str) -> bool:
    return _is_name_start(ch) or (ch.isascii() and ch.isdigit())


def tokenize(text: str, line: int = 1) -> list[Token]:
    """Split one line of the state language into tokens (``#`` ends it)."""
    limits.check(len(text), "input_length", f"input of {len(text)} characters", Span(line, 1, 1),
                 text[:200])
    tokens: list[Token] = []
    pos = 0
    spaced = False
    while pos < len(text):
        ch = text[pos]
        if ch in " \t\r\n":
            pos += 1
            spaced = True
            continue
        if ch == "#":
            break
        start = pos
        ket = KET.match(text, pos)
        if ket:
            pos = ket.end()
            tokens.append(Token(Kind.KET, ket.group(), Span(line, start + 1, pos - start), spaced))
        elif ch == "|":
            end = text.find(">", pos + 1)
            bad = next((k for k in range(pos + 1, end if end >= 0 else len(text))
                        if text[k] not in KET_CHARS), None)
            if end < 0 and bad is None:
                raise InputError("the ket opened here is not closed: expected '>'",
                                 Span(line, start + 1, 1), text)
            if bad is not None:
                raise InputError(f"unexpected {text[bad]!r} inside a ket: labels are digits, "
                                 "letters, '+', '-' and ','", Span(line, bad + 1, 1), text)
            pos = end + 1
            tokens.append(Token(Kind.KET, text[start:pos], Span(line, start + 1, pos - start), spaced))
        elif ch.isascii() and ch.isdigit() or (ch == "." and "0" <= text[pos + 1:pos + 2] <= "9"):
            pos = _scan_number(text, pos)
            tokens.append(Token(Kind.NUMBER, text[start:pos], Span(line, start + 1, pos - start), spaced))
        elif (name := ASCII_NAME.match(text, pos)) and text[name.end():name.end() + 1].isascii():
            pos = name.end()
            tokens.append(Token(Kind.NAME, text[start:pos], Span(line, start + 1, pos - start), spaced))
        elif _is_name_start(ch):
            while pos < len(text) and _is_name_char(text[pos]) and text[pos] not in UNICODE_NAMES:
                pos += 1
            if pos == start:  # a lone unicode name such as π
                pos += 1
            word = UNICODE_NAMES.get(text[start:pos], text[start:pos])
            tokens.append(Token(Kind.NAME, word, Span(line, start + 1, pos - start), spaced))
        else:
            op = text[pos:pos + 2] if text[pos:pos + 2] in OPERATORS else (
                ch if ch in OPERATORS else None)
            if op is None:
                raise InputError(f"unexpected character {ch!r}", Span(line, pos + 1, 1), text)
            pos += len(op)
            tokens.append(Token(Kind.OP, "^" if op == "**" else op,
                                Span(line, start + 1, len(op)), spaced))
        spaced = False
    tokens.append(Token(Kind.END, "", Span(line, len(text.rstrip()) + 1, 1), spaced))
    return tokens


def _scan_number(text: str, pos: int) -> int:
    """End of a decimal number starting at ``pos``: digits, one dot, an exponent."""
    n = len(text)
    while pos < n and "0" <= text[pos] <= "9":
        pos += 1
    if pos < n and text[pos] == "." and not text.startswith("..", pos):
        pos += 1
        while pos < n and "0" <= text[pos] <= "9":
            pos += 1
    if pos < n and text[pos] in "eE":
        k = pos + 1
        if k < n and text[k] in "+-":
            k += 1
        if k < n and "0" <= text[k] <= "9":
            pos = k
            while pos < n and "0" <= text[pos] <= "9":
                pos += 1
    return pos
