"""Fuzzing the state language: every input ends in a result or an InputError.

Two kinds of input: random character soup (the alphabet of the language,
any Unicode, control characters), and grammar-shaped near-misses built from
valid pieces and then broken (unbalanced brackets, stray '|' and '>', huge
exponents, deep nesting, unknown names, kets of mismatched lengths,
non-ASCII), as statements and inside commands.  Any exception other than
InputError is a bug; so is a statement that runs past its time limit without
saying so (the limit 'seconds' is lowered here, and a hard watchdog fails the
test if even that does not stop it).

About 450 examples in all by default, deterministic.  For a long random run:

    KETSPLIT_FUZZ_EXAMPLES=5000 python -m pytest -q -m slow tests/test_fuzz_language.py
"""

from __future__ import annotations

import os

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from fuzzing import in_sandbox, outcome, scratch_directory
from ketsplit import InputError, Session
from ketsplit.language.grammar import parse_expression

MANY = int(os.environ.get("KETSPLIT_FUZZ_EXAMPLES", "0"))
QUIET = [HealthCheck.too_slow, HealthCheck.filter_too_much]


def examples(count: int) -> settings:
    """The default run: ``count`` deterministic examples (about 450 over this file)."""
    return settings(max_examples=count, deadline=None, derandomize=True, database=None,
                    suppress_health_check=QUIET)


LONG = settings(max_examples=MANY or 2000, deadline=None, derandomize=False, database=None,
                suppress_health_check=QUIET)


@pytest.fixture(scope="module", autouse=True)
def sandbox():
    with scratch_directory():
        yield

# -- character soup ------------------------------------------------------------------------------

LANGUAGE_CHARS = list("|<>()[],+-*/^=.~⊗·√:;#_ 0123456789eEabcijnptxyzAB") + ["π", "..", "**"]
soup = st.lists(st.sampled_from(LANGUAGE_CHARS), max_size=40).map("".join)
unicode_soup = st.text(st.characters(blacklist_categories=("Cs",)), max_size=30)


# -- grammar-shaped pieces -----------------------------------------------------------------------

labels = st.text("0123+-", min_size=1, max_size=3)
kets = st.one_of(labels.map(lambda s: f"|{s}>"),
                 st.lists(st.integers(0, 12).map(str), min_size=1, max_size=3)
                 .map(lambda xs: "|" + ",".join(xs) + ">"))
names = st.sampled_from(["t", "phi", "x", "a", "b", "i", "pi", "n", "psi", "chi", "undeclared",
                         "é", "π", "ψ", "sum", "sqrt", "schmidt", "with", "_"])
numbers = st.one_of(st.integers(0, 40).map(str), st.sampled_from(
    ["0.5", "1e3", "1e-40", "2.", ".5", "1e999", "1e1001", "10^1000", "9" * 60, "0", "1e"]))
functions = st.sampled_from(["sqrt", "exp", "sin", "cos", "tan", "tanh", "log", "conj", "abs",
                             "dicke", "sum", "nosuch", "__import__", "eval"])
scalars = st.one_of(numbers, names)


def combine(children):
    return st.one_of(
        st.tuples(children, st.sampled_from([" + ", " - ", " ", "*", "/", "^", " ⊗ ", "·"]), children)
        .map("".join),
        st.tuples(functions, children).map(lambda fa: f"{fa[0]}({fa[1]})"),
        children.map(lambda c: f"({c})"),
        children.map(lambda c: f"-{c}"),
        children.map(lambda c: f"√{c}"),
        st.tuples(names, children).map(lambda nc: f"sum({nc[0]}=0..3, {nc[1]})"),
        st.lists(children, min_size=1, max_size=2).map(lambda r: f"[[{', '.join(r)}]]"),
    )


expressions = st.recursive(st.one_of(scalars, kets), combine, max_leaves=8)


@st.composite
def broken(draw, source=expressions):
    """A valid-looking expression with one or two of the usual slips made in it."""
    text = draw(source)
    for _ in range(draw(st.integers(1, 2))):
        slip = draw(st.sampled_from(["insert", "delete", "duplicate", "truncate", "swap"]))
        k = draw(st.integers(0, len(text)))
        if slip == "insert":
            text = text[:k] + draw(st.sampled_from(
                ["(", ")", "[", "]", "|", ">", "<", ",", "^", "^99999", "e99999", "..", "=",
                 "((((((((((", "|0", "0>", "é", "\u200b", "\t", "#", ";", " 1|2", " with t=1"])) + text[k:]
        elif slip == "delete" and text:
            text = text[:k] + text[k + 1:]
        elif slip == "duplicate":
            text = text[:k] + text[k:k + 3] * 3 + text[k:]
        elif slip == "truncate":
            text = text[:k]
        elif slip == "swap" and len(text) > 1:
            j = draw(st.integers(0, len(text) - 1))
            chars = list(text)
            chars[j], chars[k % len(text)] = chars[k % len(text)], chars[j]
            text = "".join(chars)
    return text


mismatched = st.tuples(kets, kets, kets).map(lambda ks: " + ".join(ks))
deep = st.tuples(st.integers(1, 400), st.sampled_from(["(", "-", "√", "sqrt(", "[[", "2^"]),
                 st.sampled_from(["1", "|0>", "x"])).map(
    lambda d: d[1] * d[0] + d[2] + {"(": ")", "sqrt(": ")", "[[": "]]"}.get(d[1], "") * d[0])
huge = st.tuples(st.sampled_from(["x", "2", "(1+x)", "10", "|0>", "1/3"]),
                 st.sampled_from(["^", "^-", "^(", "e"]),
                 st.sampled_from(["999", "1001", "99999", "10^10", "1/2", "9" * 30, "9" * 5000])
                 ).map(lambda p: p[0] + p[1] + p[2] + (")" if p[1] == "^(" else ""))


COMMANDS = ["", "schmidt ", "reduce ", "rank ", "figures ", "numeric ", "cuts ", "strata ",
            "compare ", "check ", "tex schmidt ", "psi = ", "x = ", "real ", "integer ", "space ",
            "digits ", "budget ", "limits ", "help ", "plot entropy ", "save ", "open "]
CUTS = ["", " 1|2", " 2|1", " 1|", " |2", " 12|3", " A|B", " 1,1|2", " 1|2|3", " 1", " 3",
        " with t=pi/6", " with t=", " with =1", " with t=1, t=2", " over t"]
statements = st.tuples(st.sampled_from(COMMANDS), st.one_of(broken(), expressions, mismatched),
                       st.sampled_from(CUTS)).map("".join).filter(in_sandbox)
ODD_ARGUMENTS = st.one_of(unicode_soup, st.sampled_from(
    ["/", "..", "~", ".", "²", "١", "-1", "1e5", "nan", "inf", "0x10", "x" * 300 + ".svg", "a b", '""',
     "--to", "--to x.svg", "over", "with", "1|2|3", "renyi(", "renyi(²)"]))
odd_statements = st.tuples(st.sampled_from(COMMANDS), ODD_ARGUMENTS).map("".join).filter(in_sandbox)
PRELUDES = ["", "real t in [0, pi]", "space A:2 B:3", "psi = cos(t)|00> + sin(t)|11>",
            "real t in [0, pi]; psi = cos(t)|00> + sin(t)|11>; chi = |01>"]


# -- the properties ------------------------------------------------------------------------------

def parses_or_refuses(text: str) -> None:
    try:
        parse_expression(text)
    except InputError as err:
        assert err.span is not None


@examples(200)
@given(st.one_of(soup, unicode_soup, broken(), deep, huge))
def test_the_parser_gives_a_tree_or_an_input_error(text):
    parses_or_refuses(text)


@examples(80)
@given(st.one_of(soup, unicode_soup).filter(in_sandbox))
def test_character_soup(text):
    outcome(text)


@examples(80)
@given(st.one_of(broken(), mismatched, deep, huge).filter(in_sandbox))
def test_near_misses_of_expressions(text):
    outcome(text)


@examples(80)
@given(statements, st.sampled_from(PRELUDES))
def test_near_misses_of_statements(text, prelude):
    outcome(text, prelude)


@examples(30)
@given(st.lists(st.one_of(statements, soup), min_size=2, max_size=4).map("\n".join).filter(in_sandbox))
def test_several_lines_at_once(text):
    outcome(text, PRELUDES[-1])


# -- inputs that once crashed (each was a traceback before its fix) ---------------------------------

ONCE_CRASHED = [
    ("", "9" * 5000),                       # ValueError: int() of more than 4300 digits
    ("", "1e" + "9" * 5000),                # the same, in the exponent
    ("", "|0," + "9" * 5000 + ">"),         # the same, in a ket label
    ("", "space A:" + "9" * 5000),          # the same, in a dimension
    ("", "digits " + "9" * 5000),           # the same, in digits
    ("", "(10^1000)^1000"),                 # printing a 10^6-digit integer
    ("", "10^999/(10^999-1)|0> + 10^999/(10^999-3)|1> + 10^999/(10^999-7)|2>"),  # its norm
    ("", "1²"), ("", ".²"), ("", "space A:²"), ("", "digits ²"),  # str.isdigit() is not int()
    ("", "x = 1١"),                         # an Arabic-Indic digit read as a decimal digit
    ("", " + ".join(f"|{k},{k}>" for k in range(3000))),  # RecursionError in a flat sum
    ("", "+".join(["x"] * 2000)),
    ("real t in [0, pi]; psi = cos(t)|00> + sin(t)|11>", "schmidt psi with t=i"),  # TypeError
    ("", "save \x00"),                     # ValueError: embedded null byte, in write_atomic
    ("", "open \x00"),                     # ValueError from Path.stat, in sheets/format.py
    ("", "open /"), ("", "save ."),         # ValueError from Path.with_suffix, in sheets/statements.py
    ("", "save ~nosuchuser/x"),             # RuntimeError from expanduser, in sheets/statements.py
    ("", "budget ²"),                       # str.isdigit() accepts '²', float() does not
    ("", "save " + "x" * 300),              # OSError from Path.is_dir: file name too long
    ("", "-((1e-0))"),                      # int('') of an exponent of zeros
    ("real t in [0, pi]; psi = cos(t)|00> + sin(t)|11>",
     "plot entropy psi 1|2 over t --to " + "x" * 300 + ".svg"),  # OSError: file name too long
]


@pytest.mark.parametrize("prelude, text", ONCE_CRASHED, ids=lambda s: s[:30])
def test_inputs_that_once_crashed(prelude, text):
    outcome(text, prelude)


def test_a_flat_sum_of_thousands_of_kets_is_a_state():
    results = Session().run("x = " + " + ".join(f"|{k},{k}>" for k in range(3000)))
    assert len(results[0].report.items[0].value.terms) == 3000


# -- the long run (documented in DEVELOPERS.md) --------------------------------------------------

@pytest.mark.slow
@LONG
@given(st.one_of(soup, unicode_soup, broken(), mismatched, deep, huge).filter(in_sandbox)
       | st.tuples(st.one_of(statements, odd_statements), st.sampled_from(PRELUDES)))
def test_many_fuzzed_inputs(item):
    if isinstance(item, tuple):
        outcome(*item)
    else:
        outcome(item)
