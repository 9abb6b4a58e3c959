"""The statement grammar: with clauses, declarations and space as typed values, and their
errors at line:column (issue 12, item 2).  The expected columns are counted by hand on the
statements below (1-based, as the shell prints them)."""

import pytest
import sympy

import ketsplit
from ketsplit import InputError
from ketsplit.language.statements import (Declaration, SpaceDeclaration, WithClause,
                                          parse_declaration, parse_space, parse_with_clause)
from ketsplit.language.syntax import Binary, Name, Number

FAMILY = "real t; psi = cos(t)|00> + sin(t)|11>"


def failure(text: str, prelude: str = FAMILY) -> InputError:
    session = ketsplit.Session()
    session.run(prelude)
    before = dict(session.params)
    with pytest.raises(InputError) as info:
        session.run(text)
    assert session.params == before  # no parameter was made up on the way
    return info.value


# -- the two statements of issue 12 ------------------------------------------------------
@pytest.mark.parametrize("text, word, column", [
    ("figures psi with t=pi/6 purity", "purity", 25),
    ("rank psi with t=7 k", "k", 19),
    ("rank psi with t=pi/6 purity entropy", "purity", 22),
])
def test_a_word_after_a_with_value_is_an_error_at_its_column(text, word, column):
    err = failure(text)
    assert err.message.startswith(f"expected ',' or the end of the statement after the value "
                                  f"of t, found {word!r}")
    assert (err.line, err.column) == (1, column) and err.span.length == len(word)


def test_with_values_may_use_declared_parameters_and_constants():
    session = ketsplit.Session()
    session.run("real t, s; psi = cos(t)|00> + sin(t)|11>")
    s = sympy.Symbol("s", real=True)
    from ketsplit.commands.registry import parse_point
    statement = "rank psi with t=2 s, s=pi/6"
    point = parse_point(session, statement[14:], 14, 1, statement)
    assert point == {"t": 2 * s, "s": sympy.pi / 6}
    assert session.run("rank psi with t=pi/6")[0].report.title.startswith("Schmidt rank")


@pytest.mark.parametrize("text, column, fragment", [
    ("rank psi with t=cos(q)", 21, "'q' is not a declared parameter or a bound name"),
    ("rank psi with t=1, t=2", 20, "t is set twice"),
    ("rank psi with t=1,", 19, "expected NAME=VALUE after 'with'"),
    ("rank psi with t=", 17, "expected the value of t after '='"),
    ("rank psi with t 1", 17, "expected '=' after t"),
    ("rank psi with 3=1", 15, "expected NAME=VALUE after 'with', as in with t=pi/6, found '3'"),
    ("rank psi with t=|0>", 17, "t must be set to a number"),
    ("rank psi with t=1 2", 19, "expected ',' or the end of the statement after the value of t"),
])
def test_with_clause_errors(text, column, fragment):
    err = failure(text)
    assert fragment in err.message and (err.line, err.column) == (1, column)


def test_errors_name_the_line_of_a_worksheet():
    session = ketsplit.Session()
    with pytest.raises(InputError) as info:
        session.run(f"{FAMILY}\nrank psi with t=7 k")
    assert (info.value.line, info.value.column) == (2, 19)


# -- typed values ---------------------------------------------------------------------------
def test_with_clause_value():
    clause = parse_with_clause("rank psi with t=2, phi = 3 x", 14, 4)
    assert isinstance(clause, WithClause)
    assert [(a.name, a.span.line, a.span.column) for a in clause.assignments] == \
        [("t", 4, 15), ("phi", 4, 20)]
    first, second = (a.value for a in clause.assignments)
    assert isinstance(first, Number) and first.text == "2"
    assert isinstance(second, Binary) and second.implicit and isinstance(second.right, Name)


def test_declaration_value():
    declaration = parse_declaration("real t, phi in [0, pi/2]", 4, 1)
    assert isinstance(declaration, Declaration)
    assert [(n, s.column) for n, s in declaration.names] == [("t", 6), ("phi", 9)]
    assert declaration.range_span.column == 13
    assert parse_declaration("positive r", 8, 1).bounds is None


def test_space_value():
    space = parse_space("space A:2 B:3 4", 5, 1)
    assert isinstance(space, SpaceDeclaration)
    assert [(p.name, p.dimension, p.span.column, p.span.length) for p in space.parts] == \
        [("A", 2, 7, 3), ("B", 3, 11, 3), (None, 4, 15, 1)]


# -- declarations and space: results and errors ---------------------------------------------
def test_declarations_still_declare():
    session = ketsplit.Session()
    session.run("real t, phi in [0, pi]; positive r; space A:2 B:3")
    assert session.params["phi"].range == (0, sympy.pi) and session.params["t"].range == (0, sympy.pi)
    assert session.params["r"].kind == "positive"
    assert session.space.names == ("A", "B") and session.space.dims == (2, 3)


@pytest.mark.parametrize("text, column, fragment", [
    ("real t in [0, pi] x", 19, "expected the end of the declaration after the range"),
    ("real t in [0 pi]", 16, "expected ',' between the two bounds"),  # 0 pi is a product
    ("real t in [0, 1, 2]", 16, "exactly two bounds"),
    ("real t in [1, 0]", 8, "the range is empty"),
    ("real t in [0, q]", 15, "'q' is not a declared parameter"),
    ("real t in [0, i]", 15, "a range bound must be a real constant"),
    ("real t in", 10, "a range written as [lo, hi] after 'in'"),
    ("complex z in [0, 1]", 11, "a complex parameter cannot have a range"),
    ("real sin", 6, "reserved word"),
    ("real 3", 6, "expected a parameter name, found '3'"),
    ("space A:x", 9, "expected NAME:DIMENSION"),
    ("space A:0", 7, "dimension 1 or more"),
    ("space A 2", 9, "expected ':' and a dimension after the part name"),
    ("space A:2 A:3", 6, "a part name is used twice"),
])
def test_declaration_errors(text, column, fragment):
    err = failure(text, prelude="")
    assert fragment in err.message and (err.line, err.column) == (1, column)


# -- the words of a command's arguments (read_arguments) ------------------------------------
# Every rule of the statement grammar in language/statements.py, with good inputs here and bad
# ones in test_grammar_errors below.  Columns are 1-based, counted by hand on the statement.
from ketsplit.language.statements import (CUT, OPTION, RUN, VALUE, CutSpec, PlotStatement,
                                          figure_list, read_arguments, read_plot, split_claim,
                                          split_cut, trailing_figures, trailing_parts)

NAMED = ("ghz = (|000> + |111>)/sqrt(2); real t in [0, pi]; psi = cos(t)|00> + sin(t)|11>; "
         "chi = |00>")
SPACED = "space A:2 B:2 C:2; abc = (|000> + |111>)/sqrt(2)"


def words(statement: str, start: int, options: bool = False):
    return read_arguments(statement, start, 1, options=options).words


def test_arguments_stop_at_with_and_keep_their_columns():
    read = read_arguments("rank psi 1|2 with t=1", 4, 1)
    assert [(w.kind, w.text, w.span.column) for w in read.words.items] == \
        [("name", "psi", 6), (CUT, "1|2", 10)]
    assert (read.with_span.column, read.with_span.length) == (14, 4)
    assert read_arguments("help with", 4, 1, point=False).with_span is None  # settings: no clause


def test_a_bar_that_opens_a_ket_is_no_cut():
    # the lexer's rule decides: |2> is a ket, so 1|2> is the term 1 |2>; 1|2 is a cut
    assert [w.kind for w in words("rank psi 1|2>", 4).items] == ["name", RUN]
    assert [w.kind for w in words("rank x|01> + y|10> 1|2", 4).items][-1] == CUT
    assert all(w.kind != CUT for w in words("rank cos(t)|00> + sin(t)|11>", 4).items)


def test_a_run_of_plain_terms_is_one_word():
    terms = " + ".join(f"{k % 7 + 1}|{k:012b}>" for k in range(4096))
    found = words(f"rank {terms} + |111111111111> 123456|789101112", 4)
    assert [w.kind for w in found.items] == [RUN, "operator", "ket", CUT]
    assert found.items[0].text == terms


# cut := parts '|' parts ------------------------------------------------------------------
def test_cut_value():
    body, cut, rest = split_cut(words("schmidt ghz 1,3|2", 7))
    assert isinstance(cut, CutSpec) and body.text() == "ghz" and not rest.items
    assert [(p, s.column) for p, s in cut.left.pieces] == [("1", 13), ("3", 15)]
    assert [(p, s.column) for p, s in cut.right.characters()] == [("2", 17)]
    _, named, _ = split_cut(words("schmidt abc A|BC", 7))  # which letters are parts: cuts.py
    assert named.left.text == "A" and [p for p, _ in named.right.characters()] == ["B", "C"]


def test_cuts_by_number_and_by_name_give_the_same_decomposition():
    session = ketsplit.Session()
    session.run(SPACED)
    by_number = session.run("schmidt abc 1|23")[0].report.title
    assert by_number == session.run("schmidt abc A|BC")[0].report.title
    assert "across A|BC" in by_number  # the parts keep the names of the declared space


# parts := part (',' part)* | PARTNAMES ------------------------------------------------------
@pytest.mark.parametrize("text, kept", [
    ("reduce ghz 13", "13"), ("reduce ghz 1,3", "13"), ("reduce abc AC", "AC"),
    ("reduce abc A,C", "AC"), ("reduce abc 13", "AC")])
def test_part_lists(text, kept):
    session = ketsplit.Session()
    session.run(NAMED if "ghz" in text else SPACED)
    assert session.run(text)[0].report.title == f"reduced state on {kept}"


def test_parts_value_and_what_is_not_a_part_list():
    body, parts = trailing_parts(words("reduce ghz 1,3", 6))
    assert body.text() == "ghz" and [(p, s.column) for p, s in parts.pieces] == [("1", 12), ("3", 14)]
    assert trailing_parts(words("reduce ghz / 2", 6))[1] is None   # 2 belongs to the expression
    assert trailing_parts(words("reduce ghz", 6))[1] is None        # nothing before the word


# figure := NAME | NAME '(' expr ')' -----------------------------------------------------------
def test_figure_values():
    found = figure_list(split_cut(words("figures ghz 1|23 renyi(1/2) nats entropy", 7))[2])
    assert [(f.name, f.text, f.span.column) for f in found] == \
        [("renyi", "renyi(1/2)", 18), ("nats", "nats", 29), ("entropy", "entropy", 34)]
    assert found[0].argument.text == "1/2" and found[0].argument.start == 23
    body, trailing = trailing_figures(words("figures psi purity renyi(2)", 7), lambda f: True)
    assert body.text() == "psi" and [f.name for f in trailing] == ["purity", "renyi"]


def test_figures_read_their_words():
    session = ketsplit.Session()
    session.run(NAMED)
    rows = session.run("figures psi with t=pi/4")[0].report.items[1].rows
    assert len(rows) > 2  # every figure by default
    chosen = session.run("figures ghz 1|23 renyi(2) nats entropy")[0].report.items[1].rows
    assert [row[0] for row in chosen] == ["renyi(2) (nats)", "entropy (nats)"]


# plot := figure (',' figure)* expr (',' expr)* cut? 'over' NAME (',' NAME)* option* ----------
def test_plot_value_and_options():
    statement = "plot entropy,purity psi, chi 1|2 over t --to a-1.svg --data /tmp/b.csv"
    found = words(statement, 4, options=True)
    assert [w.kind for w in found.items][-4:] == [OPTION, VALUE, OPTION, VALUE]
    plot = read_plot(found, "plot ...")
    assert isinstance(plot, PlotStatement)
    assert [f.name for f in plot.figures] == ["entropy", "purity"]
    assert [e.text for e in plot.states] == ["psi", "chi"] and plot.cut.text == "1|2"
    assert [(n, s.column) for n, s in plot.over] == [("t", 39)]
    assert [(o.name, o.span.column, o.value) for o in plot.options] == \
        [("to", 41, "a-1.svg"), ("data", 54, "/tmp/b.csv")]


# pair := (expr ',' expr | expr expr) cut? -------------------------------------------------------
def test_pairs():
    session = ketsplit.Session()
    session.run(NAMED)
    spaced = session.run("compare psi chi with t=pi/4")[0].report.title
    assert spaced == session.run("compare psi, chi with t=pi/4")[0].report.title


# claim := expr ('=' | '~') expr ------------------------------------------------------------------
def test_claim_sides():
    sides = split_claim(words("check schmidt psi 1|2 = [1, 0]", 5))
    assert [(op.text if op else None, side.text()) for op, side in sides] == \
        [(None, "schmidt psi 1|2"), ("=", "[1, 0]")]
    assert len(split_claim(words("check f(a = 1) ~ 2", 5))) == 2  # '=' inside brackets stays


# limits := (NAME '=' NUMBER ('^' NUMBER)? ','?)* --------------------------------------------------
def test_limits_assignments():
    session = ketsplit.Session()
    session.run("limits parts=30, seconds=2.5 dimension=2^70")
    assert (session.limits.parts, session.limits.seconds, session.limits.dimension) == \
        (30, 2.5, 2 ** 70)


# statement := KIND ... | COMMAND arguments | NAME '=' ... | expr --------------------------------
def test_statement_heads():
    session = ketsplit.Session()
    session.run(NAMED)
    assert session.run("x = 2 chi")[0].kind == "assign"
    assert session.run("rho = reduce psi 1 with t=pi/6")[0].kind == "assign"


# -- every rule's errors, at their columns -----------------------------------------------------
@pytest.mark.parametrize("rule, text, column, length, fragment", [
    ("cut", "schmidt ghz 1|4", 15, 1, "no part named '4'"),
    ("cut", "schmidt ghz 11|23", 14, 1, "part '1' is named twice"),      # the second 1
    ("cut", "schmidt ghz 1|13", 13, 4, "stands on both sides of the cut"),
    ("cut", "schmidt ghz 1|2", 13, 3, "leaves out part(s) 3"),
    ("cut", "schmidt ghz 1,|23", 14, 1, "a part (a number or a name) on each side of ','"),
    ("cut", "schmidt ghz", 12, 1, "name a cut such as 1|23"),            # just after the state
    ("cut", "schmidt 1|23", 9, 4, "expected a state before the cut"),
    ("cut", "rank ghz 1|23 nats", 15, 4, "nothing after the cut but a with clause, found 'nats'"),
    ("cut", "cuts ghz 1|23", 10, 4, "every cut is listed"),
    ("cut", "class ghz 1|23", 11, 4, "class: takes a state or matrix alone, no cut"),
    ("cut", "mixedness [[1, 0], [0, 0]] 1|2", 28, 3, "mixedness: takes a state or matrix alone"),
    ("parts", "reduce ghz 4", 12, 1, "no part named '4'"),
    ("parts", "reduce ghz 11", 13, 1, "part '1' is named twice"),
    ("parts", "reduce ghz", 11, 1, "name the parts to keep after the state"),
    ("parts", "reduce ghz / 2", 15, 1, "name the parts to keep after the state"),
    ("figure", "figures ghz 1|23 3", 18, 1, "expected a figure's name"),
    ("figure", "figures ghz 1|23 entropx", 18, 7, "no figure named 'entropx'"),
    ("figure", "figures psi entropx", 13, 7, "no figure named 'entropx'"),  # unbound: misspelt
    ("figure", "figures ghz 1|23 renyi(-1)", 18, 9, "renyi(ALPHA) needs a real order ALPHA >= 0"),
    ("option", "plot entropy psi over t --colour red", 25, 8, "unknown option --colour"),
    ("option", "plot entropy psi over t --to", 29, 1, "expected a value after --to"),
    ("option", "plot entropy psi over t x", 25, 1, "expected an option such as --to FILE"),
    ("plot", "plot entropy psi 1|2 x over t", 22, 1, "expected 'over' after the cut, found 'x'"),
    ("plot", "plot entropy psi over t, phi", 26, 3, "over NAME [--to"),
    ("plot", "plot entropy psi 1|2", 6, 15, "over NAME"),
    ("plot", "map entropy psi over t", 22, 1, "over NAME, NAME"),
    ("pair", "compare psi", 9, 3, "expected two states"),
    ("pair", "fidelity psi, chi, psi", 18, 1, "two states or density matrices"),
    ("claim", "check 1 = 1 = 1", 13, 1, "expected one '=' or '~' between the two sides"),
    ("claim", "check 1", 6, 1, "expected LHS = RHS or LHS ~ RHS"),
    ("claim", "check schmidt psi = [1/sqrt(2), , 1]", 33, 1, "a coefficient between the commas"),
    ("claim", "check psi 1|2 ~ |00>", 11, 3, "a cut goes with '='"),
    ("setting", "digits 5 x", 8, 3, "digits: expected a whole number, found '5 x'"),
    ("setting", "units foo", 7, 3, "units: expected bits or nats"),
    ("setting", "method fast", 8, 4, "method: expected one of auto, exact, certified"),
    ("setting", "help with", 6, 4, "no help topic 'with'"),     # settings take no with clause
    ("setting", "budget 5 s", 8, 3, "budget: expected seconds"),
    ("limits", "limits parts=", 14, 1, "expected the value of parts after '='"),
    ("limits", "limits parts=3 nesting", 16, 7, "expected NAME=VALUE"),
    ("statement", "x == 1", 3, 1, "expected an operator or the end of the expression, found '='"),
    ("statement", "foo bar", 1, 3, "unknown command 'foo'"),
    ("statement", "rho = reduce psi 1 with t=pi/6 purity", 32, 6,
     "after the value of t, found 'purity'"),
])
def test_grammar_errors(rule, text, column, length, fragment):
    err = failure(text, NAMED)
    assert fragment in err.message, rule
    assert (err.line, err.column, err.span.length) == (1, column, length)


def test_statement_modules_hold_no_regular_expression():
    # issue 12, item 2: statements are read by the grammar; regular expressions belong to the
    # tokenizer (language/tokens.py) alone
    from pathlib import Path
    root = Path(ketsplit.__file__).parent
    modules = [*(root / "commands").glob("*.py"), root / "cuts.py",
               root / "language" / "statements.py", root / "repl" / "loop.py"]
    for path in modules:
        source = path.read_text(encoding="utf-8")
        assert "import re\n" not in source and "re.compile" not in source, path.name
