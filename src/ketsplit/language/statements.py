"""The statement grammar: the parts of a statement around its expressions.

Each function reads one kind of clause with the expression parser's tokens
and returns a typed value whose pieces keep their spans, so that every error
names its line and column the way expression errors do.

    statement    := KIND declaration | 'space' space | COMMAND arguments
                  | NAME '=' BINDER arguments | NAME '=' expr | expr
    arguments    := word* ('with' with_clause)? END   (settings and worksheets: word* END)
    with_clause  := NAME '=' expr (',' NAME '=' expr)* END
    declaration  := NAME ((',')? NAME)* ('in' '[' expr ',' expr ']')? END
    space        := (NAME ':' INTEGER | INTEGER)+ END

The words of a command's arguments are the expression lexer's tokens, read by
:func:`read_arguments`, and besides them words of the statement's own:

    cut          := parts '|' parts    one word after a space, its bar opening no ket
                                       (so 1|2> stays the term 1 |2>)
    parts        := part (',' part)* | PARTNAMES    one word: 13, 1,3, AC, A,C
    part         := DIGITS | NAME       ASCII letters, digits and '_'; which letters of AC
                                        name parts, the state tells (cuts.parse_parts)
    option       := '--' NAME VALUE     after a space, for the commands that take options
                                        (plot, map); VALUE is the next word as typed
    run          := a stretch of plain terms (|01> - 2|10> + ...), one word, read by the
                    expression parser's own run pattern (grammar.RUN_FIRST)

Each command reads its words with one of these rules:

    state_cut    := expr cut?                       schmidt, rank, numeric, strata, negativity, ...
    state        := expr                            class, tangle, classes (no cut)
    state_parts  := expr parts                      reduce; ptranspose (parts optional)
    figures      := expr (cut figure* | figure*)    figures, cuts; without a cut, the trailing
                                                    words the command takes as figures
    figure       := NAME | NAME '(' expr ')'        entropy, bits, renyi(2)
    pair         := (expr ',' expr | expr expr) cut?    compare (two spaced words or a comma),
                                                        fidelity (a comma, no cut)
    plot         := figure (',' figure)* expr (',' expr)* cut? 'over' NAME (',' NAME)* option*
    claim        := expr ('=' | '~') expr           check (its left side: 'schmidt' state_cut,
                                                    'reduce' state_parts, 'rank' state_cut,
                                                    or state_cut)
    setting      := WORD                            digits, method, units, budget, help
    limits       := (NAME '=' NUMBER ('^' NUMBER)? ','?)*

An expression's end is the first word that cannot belong to it: ``with``, a
cut, an option, the keyword ``over``, or the trailing words the rule takes (a
part list only after a word that can end an expression, figures).
"""

from __future__ import annotations

from dataclasses import dataclass

from ..base.errors import InputError, Span
from .grammar import RUN_FIRST, Parser, is_name
from .syntax import Binary, Name, Node, Number
from .tokens import DIGITS, TOKEN, Kind, Lexer, kind_of_text


@dataclass(frozen=True)
class Assignment:
    """``name = value`` inside a with clause."""

    name: str
    span: Span   # of the name
    value: Node


@dataclass(frozen=True)
class WithClause:
    assignments: tuple[Assignment, ...]


@dataclass(frozen=True)
class Declaration:
    """``real t, phi in [0, pi]``: the names and the range's two bounds, if any."""

    names: tuple[tuple[str, Span], ...]
    bounds: tuple[Node, Node] | None
    range_span: Span | None


@dataclass(frozen=True)
class Part:
    name: str | None   # None: a dimension given alone
    dimension: int
    span: Span


@dataclass(frozen=True)
class SpaceDeclaration:
    parts: tuple[Part, ...]


def _parser(statement: str, start: int, line: int) -> Parser:
    """A parser of ``statement`` from its 0-based column ``start`` on."""
    return Parser(Lexer(statement, line, start))


def parse_with_clause(statement: str, start: int, line: int) -> WithClause:
    """``t=pi/6, phi=0``: the statement's text from ``start``, just after ``with``."""
    parser = _parser(statement, start, line)
    assignments: list[Assignment] = []
    while True:
        name = parser.text
        if not is_name(name):
            parser.fail(f"expected NAME=VALUE after 'with', as in with t=pi/6, found "
                        f"{parser.describe()}")
        span = parser.advance()
        if any(a.name == name for a in assignments):
            parser.fail(f"{name} is set twice in the with clause", span)
        parser.expect_op("=", f"'=' after {name}, as in with {name}=pi/6")
        if parser.at_end() or parser.at_op(","):
            parser.fail(f"expected the value of {name} after '='")
        assignments.append(Assignment(name, span, parser.parse_expression()))
        if parser.at_end():
            return WithClause(tuple(assignments))
        parser.expect_op(",", f"',' or the end of the statement after the value of {name}")


def trailing_words(value: Node) -> list[Name | Number]:
    """The bare names and numbers juxtaposed at the end of ``value`` (``pi/6 purity`` ->
    [purity]), left to right: where words typed after a with clause land in the value."""
    words: list[Name | Number] = []
    while isinstance(value, Binary) and value.implicit and isinstance(value.right, (Name, Number)):
        words.insert(0, value.right)
        value = value.left
    return words


def parse_declaration(statement: str, start: int, line: int) -> Declaration:
    """``t, phi in [0, pi]``: the statement's text from ``start``, after the kind word."""
    parser = _parser(statement, start, line)
    names: list[tuple[str, Span]] = []
    while is_name(parser.text) and parser.text != "in":
        names.append((parser.text, parser.advance()))
        if parser.at_op(","):
            parser.advance()
    if not parser.at_end() and parser.text != "in":
        parser.fail(f"expected a parameter name, found {parser.describe()}")
    if parser.at_end():
        return Declaration(tuple(names), None, None)
    keyword = parser.advance()
    opened = parser.expect_op("[", "a range written as [lo, hi] after 'in'")
    low = parser.parse_expression()
    parser.expect_op(",", "',' between the two bounds of the range [lo, hi]")
    high = parser.parse_expression()
    if parser.at_op(","):
        parser.fail("a range needs exactly two bounds: [lo, hi]")
    closed = parser.expect_op("]", "']' to close the range", opened)
    parser.expect_end("the end of the declaration after the range")
    whole = Span(line, keyword.column, closed.column - keyword.column + 1)
    return Declaration(tuple(names), (low, high), whole)


def parse_space(statement: str, start: int, line: int) -> SpaceDeclaration:
    """``A:2 B:3`` or ``2 3``: the statement's text from ``start``, after ``space``."""
    parser = _parser(statement, start, line)
    parts: list[Part] = []
    while not parser.at_end():
        name, start = None, parser.span()
        if is_name(parser.text):
            name = parser.text
            parser.advance()
            parser.expect_op(":", f"':' and a dimension after the part name, as in {name}:2")
        size = parser.text
        if not (size and all(ch in DIGITS for ch in size)):
            parser.fail(f"expected NAME:DIMENSION (as in A:2) or a dimension, found "
                        f"{parser.describe()}")
        end = parser.advance()
        span = Span(line, start.column, end.column + end.length - start.column)
        parts.append(Part(name, int(size) if len(size) <= 20 else 10 ** 20, span))
    return SpaceDeclaration(tuple(parts))



# -- the words of a command's arguments ------------------------------------------------------

CUT, OPTION, VALUE, RUN = "cut", "option", "value", "run"   # kinds of the statement's own words
NAME, NUMBER, OPERATOR = Kind.NAME.value, Kind.NUMBER.value, Kind.OP.value
PART_CHARS = frozenset("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789_,")
_ENDS_EXPRESSION = frozenset((NAME, NUMBER, Kind.KET.value, Kind.BRA.value, RUN))
_RUN_START = frozenset("|0123456789(+-i")
_WHITESPACE = frozenset(" \t\r\n")


@dataclass(frozen=True)
class Word:
    """One word of a command's arguments: a token of the expression lexer, a cut, or an
    option and its value."""

    kind: str       # a tokens.Kind value ("name", "number", "ket", ...), CUT, OPTION, VALUE,
                    # or RUN: plain terms |01> + 2|10> - ... passed over in one step
    text: str       # as the grammar reads it (π is "pi"; an option's name without '--')
    span: Span
    spaced: bool    # whitespace stood right before it
    depth: int      # brackets open around it; '(' and ')' themselves stand outside

    @property
    def start(self) -> int:
        """0-based column of its first character."""
        return self.span.column - 1

    @property
    def end(self) -> int:
        return self.span.column - 1 + self.span.length

    def ends_expression(self) -> bool:
        """Whether an expression may end with this word (a name, a number, a ket, ')')."""
        return self.kind in _ENDS_EXPRESSION or self.text in (")", "]")


@dataclass(frozen=True)
class Expression:
    """An expression's text as typed, placed at its 0-based column on its line."""

    text: str
    start: int
    line: int


@dataclass(frozen=True)
class Words:
    """A stretch of a statement's words, from 0-based column ``start`` to ``end``."""

    statement: str
    line: int
    items: tuple[Word, ...]
    start: int
    end: int

    def __len__(self) -> int:
        return len(self.items)

    def __getitem__(self, index: slice) -> "Words":
        items = self.items[index]
        first, stop, _ = index.indices(len(self.items))
        start = self.items[first].start if first < len(self.items) else self.end
        end = self.items[stop - 1].end if stop > first else start
        return Words(self.statement, self.line, items, start, end)

    def text(self) -> str:
        return self.statement[self.start:self.end]

    def expression(self) -> Expression:
        return Expression(self.text(), self.start, self.line)

    def span(self) -> Span:
        return Span(self.line, self.start + 1, max(1, self.end - self.start))

    def fail(self, message: str, span: Span | None = None) -> None:
        raise InputError(message, span or self.span(), self.statement)

    def expect_end(self, what: str) -> None:
        """Nothing may be left: the first word left over is an error at its column."""
        if self.items:
            word = self.items[0]
            self.fail(f"expected {what}, found {describe(word)}", word.span)


def describe(word: Word) -> str:
    return f"--{word.text}" if word.kind == OPTION else repr(word.text)


@dataclass(frozen=True)
class Arguments:
    """A command's words, and the span of ``with`` when a with clause follows them."""

    words: Words
    with_span: Span | None


def read_arguments(statement: str, start: int, line: int, point: bool = True,
                   options: bool = False) -> Arguments:
    """The words of ``statement`` from its 0-based column ``start`` on, up to ``with``
    (when the command takes a with clause: ``point``) or the end; ``options``: the
    command takes ``--NAME VALUE`` options."""
    lexer = Lexer(statement, line, start)
    words: list[Word] = []
    depth = 0
    while lexer.token:
        at, text = lexer.start, lexer.token
        if point and text == "with":
            return Arguments(_words(statement, line, words, at), Span(line, at + 1, 4))
        cut = cut_end(statement, at) if lexer.spaced and text[0] in PART_CHARS else None
        if cut is not None:
            words.append(Word(CUT, statement[at:cut], Span(line, at + 1, cut - at), True, depth))
            lexer.skip_to(cut)
        elif options and text == "-" and lexer.spaced and statement.startswith("--", at) and \
                is_name(statement[at + 2:at + 3]):
            words.extend(_option(lexer, statement, at, depth))
        elif (run := _run_end(statement, at, lexer)) is not None:
            words.append(Word(RUN, statement[at:run], Span(line, at + 1, run - at), lexer.spaced,
                              depth))
            lexer.skip_to(run)
        else:
            depth = max(0, depth - 1) if text in (")", "]") else depth
            words.append(Word(kind_of_text(text).value, text, lexer.span(), lexer.spaced, depth))
            depth += text in ("(", "[")
            lexer.advance()
    return Arguments(_words(statement, line, words, lexer.start), None)


def _run_end(statement: str, at: int, lexer: Lexer) -> int | None:
    """Where a run of plain terms of more than one token, starting at ``at``, ends: the
    expression parser's own runs (grammar.RUN_FIRST), so that the words of a state of many
    thousand terms are read at the speed of one regular-expression pass."""
    if lexer.token[0] not in _RUN_START:
        return None
    found = RUN_FIRST.match(statement, at)
    return found.end() if found is not None and found.end() > at + lexer.width else None


def _words(statement: str, line: int, words: list[Word], end: int) -> Words:
    """The words read, from the first to the last (``end``: where none was read)."""
    if not words:
        return Words(statement, line, (), end, end)
    return Words(statement, line, tuple(words), words[0].start, words[-1].end)


def cut_end(text: str, at: int) -> int | None:
    """Where the cut word starting at ``at`` ends: part characters, a bar that opens no ket
    (``|2>`` would be a ket), part characters; None when no cut starts there."""
    bar = at
    while bar < len(text) and text[bar] in PART_CHARS:
        bar += 1
    if bar == at or text[bar:bar + 1] != "|" or opens_ket(text, bar):
        return None
    end = bar + 1
    while end < len(text) and text[end] in PART_CHARS:
        end += 1
    return end if end > bar + 1 else None


def _option(lexer: Lexer, statement: str, at: int, depth: int) -> list[Word]:
    """``--NAME VALUE``: the option word and its value, the value as typed (a file name)."""
    lexer.skip_to(at + 2)
    name = lexer.token
    option = Word(OPTION, name, Span(lexer.line, at + 1, lexer.start + lexer.width - at), True,
                  depth)
    begin = lexer.after
    while begin < len(statement) and statement[begin] in _WHITESPACE:
        begin += 1
    end = begin
    while end < len(statement) and statement[end] not in _WHITESPACE:
        end += 1
    if end == begin:
        raise InputError(f"expected a value after --{name}, as in --{name} FILE",
                         Span(lexer.line, end + 1, 1), statement)
    lexer.skip_to(end)
    return [option, Word(VALUE, statement[begin:end], Span(lexer.line, begin + 1, end - begin),
                         True, depth)]


def opens_ket(text: str, bar: int) -> bool:
    """Whether the lexer reads a ket from the bar at ``bar`` (else the bar is a cut's)."""
    found = TOKEN.match(text, bar)
    return found is not None and len(found.group(2)) > 1


# -- cuts and part lists -------------------------------------------------------------------

@dataclass(frozen=True)
class PartsSpec:
    """A part list as typed: ``13``, ``1,3``, ``AC`` or ``A,C``.  Without a comma the word
    is one part's name or one part a character; which, only the state's part names tell
    (cuts.resolve_parts)."""

    text: str
    pieces: tuple[tuple[str, Span], ...]   # the pieces between commas (one without a comma)
    span: Span

    @property
    def commas(self) -> bool:
        return len(self.pieces) > 1

    def characters(self) -> tuple[tuple[str, Span], ...]:
        """The word read one part a character, each with its column."""
        span = self.span
        return tuple((ch, Span(span.line, span.column + k, 1)) for k, ch in enumerate(self.text))


@dataclass(frozen=True)
class CutSpec:
    """A cut as typed, ``13|2`` or ``A|BC``: its two part lists."""

    text: str
    left: PartsSpec
    right: PartsSpec
    span: Span


def parts_spec(text: str, start: int, line: int, statement: str) -> PartsSpec:
    """The part list ``text`` found at 0-based column ``start``."""
    pieces, at = [], start
    for piece in text.split(","):
        if not piece:
            raise InputError("expected a part (a number or a name) on each side of ','",
                             Span(line, min(at, start + len(text) - 1) + 1, 1), statement)
        pieces.append((piece, Span(line, at + 1, len(piece))))
        at += len(piece) + 1
    return PartsSpec(text, tuple(pieces), Span(line, start + 1, max(1, len(text))))


def cut_spec(word: Word, statement: str) -> CutSpec:
    left, right = word.text.split("|")
    line, start = word.span.line, word.start
    return CutSpec(word.text, parts_spec(left, start, line, statement),
                   parts_spec(right, start + len(left) + 1, line, statement), word.span)


def parse_cut_text(text: str, line: int = 1) -> CutSpec:
    """A cut given alone (the Python API's ``"1|2"``): the whole text must be one cut."""
    stripped = text.strip()
    start = text.index(stripped) if stripped else 0
    end = cut_end(text, start) if stripped else None
    if end is None or text[end:].strip():
        raise InputError(f"expected a cut such as 1|2 or A|BC, found {text!r}",
                         Span(line, start + 1, max(1, len(stripped))), text)
    bar = text.index("|", start)
    return CutSpec(stripped, parts_spec(text[start:bar], start, line, text),
                   parts_spec(text[bar + 1:end], bar + 1, line, text),
                   Span(line, start + 1, end - start))


def parse_parts_text(text: str, line: int = 1) -> PartsSpec:
    """A part list given alone (the Python API's ``"13"``)."""
    stripped = text.strip()
    start = text.index(stripped) if stripped else 0
    if not stripped or any(ch not in PART_CHARS for ch in stripped):
        raise InputError(f"expected parts such as 13, 1,3 or AC, found {text!r}",
                         Span(line, start + 1, max(1, len(stripped))), text)
    return parts_spec(stripped, start, line, text)


def split_cut(words: Words) -> tuple[Words, CutSpec | None, Words]:
    """``expr cut? rest``: the words before the first cut, the cut, and the words after it."""
    for k, word in enumerate(words.items):
        if word.kind == CUT:
            return words[:k], cut_spec(word, words.statement), words[k + 1:]
    return words, None, words[len(words):]


def trailing_parts(words: Words) -> tuple[Words, PartsSpec | None]:
    """``expr parts``: the last word is a part list when it is one (digits, names, commas,
    nothing else), stands after a space and after something that ends an expression."""
    items = words.items
    first = max((k for k, w in enumerate(items) if w.spaced), default=0)
    if first == 0 or not items[first - 1].ends_expression() or items[first].depth:
        return words, None
    group = words[first:]
    text = group.text()
    if not all(ch in PART_CHARS for ch in text) or \
            any(w.kind not in (NAME, NUMBER) and w.text != "," for w in group.items):
        return words, None
    return words[:first], parts_spec(text, group.start, words.line, words.statement)


# -- figures, pairs, plots -------------------------------------------------------------------

@dataclass(frozen=True)
class Figure:
    """A figure word: ``entropy``, ``bits``, ``renyi(2)`` (the order as an expression)."""

    name: str
    text: str      # the whole word as typed
    span: Span     # of the whole word
    argument: Expression | None


def _closing(items: tuple[Word, ...], opened: int) -> int | None:
    """The index of the bracket that closes the one at ``opened``."""
    depth = items[opened].depth
    return next((k for k in range(opened + 1, len(items))
                 if items[k].depth == depth and items[k].text in (")", "]")), None)


def _opening(items: tuple[Word, ...], closed: int) -> int | None:
    depth = items[closed].depth
    return next((k for k in range(closed - 1, -1, -1)
                 if items[k].depth == depth and items[k].text in ("(", "[")), None)


def figure_at(words: Words, k: int) -> tuple[Figure, int] | None:
    """The figure word starting at ``words[k]`` and the index after it; None if none starts."""
    items = words.items
    if k >= len(items) or items[k].kind != NAME:
        return None
    word = items[k]
    if k + 1 < len(items) and items[k + 1].text == "(" and not items[k + 1].spaced:
        close = _closing(items, k + 1)
        if close is None:
            return None
        inner = words[k + 2:close]
        text = words.statement[word.start:items[close].end]
        span = Span(words.line, word.span.column, len(text))
        return Figure(word.text, text, span, inner.expression()), close + 1
    return Figure(word.text, words.statement[word.start:word.end], word.span, None), k + 1


def figure_list(words: Words) -> tuple[Figure, ...]:
    """``figure*``: every word a figure, else an error at the first that is not one."""
    figures, k = [], 0
    while k < len(words):
        found = figure_at(words, k)
        if found is None:
            words.fail(f"expected a figure's name (as entropy, purity, renyi(2)) or bits|nats, "
                       f"found {describe(words.items[k])}", words.items[k].span)
        figures.append(found[0])
        k = found[1]
    return tuple(figures)


def trailing_figures(words: Words, accept) -> tuple[Words, tuple[Figure, ...]]:
    """The figure words at the end of ``words`` that ``accept(figure)`` takes, peeled from
    the right; at least one word stays for the expression before them."""
    items, end, found = words.items, len(words), []
    while end > 1:
        last = end - 1
        first = last if items[last].kind == NAME else _opening(items, last) \
            if items[last].text == ")" else None
        if first is not None and first != last:
            first = first - 1 if first > 0 and not items[first].spaced else None
        if not first or not items[first].spaced or items[first].depth:
            break
        figure = figure_at(words, first)
        if figure is None or figure[1] != end or not accept(figure[0]):
            break
        found.insert(0, figure[0])
        end = first
    return words[:end], tuple(found)


def split_commas(words: Words, depth: int = 0) -> list[Words]:
    """The pieces between the commas ``depth`` brackets deep (0: outside brackets)."""
    pieces, start = [], 0
    for k, word in enumerate(words.items):
        if word.text == "," and word.depth == depth and word.kind == OPERATOR:
            pieces.append(words[start:k])
            start = k + 1
    pieces.append(words[start:])
    return pieces


def bracketed(words: Words) -> Words | None:
    """The words inside when the stretch is one bracketed group ``[ ... ]``, else None."""
    items = words.items
    if len(items) >= 2 and items[0].text == "[" and _closing(items, 0) == len(items) - 1:
        return words[1:len(items) - 1]
    return None


def split_spaced(words: Words) -> list[Words]:
    """The pieces that a space outside brackets separates (``psi chi`` -> psi, chi)."""
    starts = [k for k, w in enumerate(words.items) if k == 0 or w.spaced and w.depth == 0]
    return [words[a:b] for a, b in zip(starts, starts[1:] + [len(words)])]


@dataclass(frozen=True)
class Option:
    """``--to FILE``: the option's name (its span covers ``--NAME``) and its value."""

    name: str
    span: Span
    value: str
    value_span: Span


@dataclass(frozen=True)
class PlotStatement:
    """``plot``/``map``: figures, states, the cut, the parameters after ``over``, options."""

    figures: tuple[Figure, ...]
    figures_span: Span
    states: tuple[Expression, ...]
    states_span: Span
    cut: CutSpec | None
    over: tuple[tuple[str, Span], ...]
    options: tuple[Option, ...]


def read_plot(words: Words, usage: str) -> PlotStatement:
    """``figure (',' figure)* expr (',' expr)* cut? 'over' NAME (',' NAME)* option*``: the
    figure list is one word (no spaces); ``usage`` is the error when ``over`` is missing."""
    items, figures, k = words.items, [], 0
    while True:
        found = figure_at(words, k)
        if found is None:
            words.fail(f"expected a figure's name first, as in {usage}",
                       items[k].span if k < len(items) else None)
        figures.append(found[0])
        k = found[1]
        if not (k + 1 < len(items) and items[k].text == "," and not items[k].spaced and
                not items[k + 1].spaced):
            break
        k += 1
    over = next((j for j in range(k, len(items)) if items[j].text == "over" and
                 items[j].kind == NAME and items[j].depth == 0 and items[j].spaced), None)
    if over is None or over == k:
        words.fail(f"expected '{usage}'")
    body, cut, rest = split_cut(words[k:over])
    rest.expect_end("'over' after the cut")
    states = tuple(piece.expression() for piece in split_commas(body))
    names, j = [], over + 1
    while True:
        if j >= len(items) or items[j].kind != NAME:
            words.fail(f"expected a parameter's name after "
                       f"{'over' if not names else repr(',')}, as in {usage}",
                       items[j].span if j < len(items) else Span(words.line, words.end + 1, 1))
        names.append((items[j].text, items[j].span))
        j += 1
        if j >= len(items) or items[j].text != ",":
            break
        j += 1
    options = []
    for option, value in zip(items[j::2], items[j + 1::2]):
        if option.kind != OPTION:
            words.fail(f"expected an option such as --to FILE or the end of the statement, "
                       f"found {describe(option)}", option.span)
        options.append(Option(option.text, option.span, value.text, value.span))
    if (len(items) - j) % 2:
        words.fail(f"expected an option such as --to FILE or the end of the statement, "
                   f"found {describe(items[-1])}", items[-1].span)
    return PlotStatement(tuple(figures), words[:k].span(), states, body.span(), cut,
                         tuple(names), tuple(options))


# -- claims and settings -----------------------------------------------------------------------

def split_claim(words: Words, operators: tuple[str, ...] = ("=", "~")
                ) -> list[tuple[Word | None, Words]]:
    """The sides of ``expr ('=' | '~') expr``: [(None, left), (operator, right), ...], split
    at every ``operators`` word outside brackets (the caller says how many it takes)."""
    sides: list[tuple[Word | None, Words]] = []
    operator, start = None, 0
    for k, word in enumerate(words.items):
        if word.kind == OPERATOR and word.text in operators and word.depth == 0:
            sides.append((operator, words[start:k]))
            operator, start = word, k + 1
    sides.append((operator, words[start:]))
    return sides


def setting_word(words: Words) -> Word | None:
    """``setting := WORD``: the one word of a setting (a number, a name), or None when the
    words are not exactly one token."""
    return words.items[0] if len(words) == 1 else None


def limit_assignments(words: Words) -> tuple[tuple[str, str, Span], ...]:
    """``limits := (NAME '=' NUMBER ('^' NUMBER)? ','?)*``: (name, value as typed, span of
    the assignment)."""
    items, found, k = words.items, [], 0
    while k < len(items):
        name = items[k]
        if name.kind != NAME or k + 1 >= len(items) or items[k + 1].text != "=":
            words.fail(f"expected NAME=VALUE, as in parts=128, found {describe(name)}", name.span)
        value_start, k = k + 2, k + 2
        while k < len(items) and items[k].text != "," and not (items[k].spaced and
                                                              items[k].kind == NAME):
            k += 1
        value = words[value_start:k]
        if not value.items:
            words.fail(f"expected the value of {name.text} after '='",
                       Span(words.line, items[value_start - 1].end + 1, 1))
        found.append((name.text, value.text(), Span(words.line, name.span.column,
                                                    value.end - name.start)))
        k += k < len(items) and items[k].text == ","
    return tuple(found)


# -- the head of a statement -------------------------------------------------------------------

def leading_words(statement: str, line: int, count: int, start: int = 0) -> tuple[Word, ...]:
    """The first ``count`` tokens of a statement from 0-based column ``start`` (fewer at its
    end), read no further: the rest may be a file name that is no token (``open a.kss``)."""
    lexer = Lexer(statement, line, start)
    words: list[Word] = []
    while lexer.token and len(words) < count:
        words.append(Word(kind_of_text(lexer.token).value, lexer.token, lexer.span(),
                          lexer.spaced, 0))
        if len(words) < count:
            lexer.advance()
    return tuple(words)


def first_name(statement: str, line: int = 1) -> Word | None:
    """The statement's first word when it is a name (a command, a declaration's kind, an
    assigned name); None otherwise, and when the first token is no token (the expression
    grammar says why when the statement runs)."""
    try:
        words = leading_words(statement, line, 1)
    except InputError:
        return None
    return words[0] if words and words[0].kind == NAME else None


def assigned_name(statement: str, line: int) -> Word | None:
    """``NAME '=' ...`` (not ``NAME == ...``): the name assigned to."""
    words = leading_words(statement, line, 3)
    if len(words) >= 2 and words[0].kind == NAME and words[1].text == "=" and \
            not (len(words) == 3 and words[2].text == "=" and not words[2].spaced):
        return words[0]
    return None
