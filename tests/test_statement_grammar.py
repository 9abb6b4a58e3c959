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
