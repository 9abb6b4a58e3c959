"""Fuzzers that know the grammar (issue 16): statements built from the language's own pieces.

The strategies below write what a user could type: declarations with ranges, a
space, states with parameters, sums, dicke(n, k), scalar functions, tensor
products and named bindings; bras, outer products, id, adj and on(...);
mixtures of projectors and matrix literals; cuts that fit the state's parts;
``with`` points; and every statement of the command table
(``ketsplit.commands.registry.COMMANDS``, read from their usage lines) with its
options.  A fraction of them are then slipped (a character inserted, deleted,
doubled or the statement cut short), as careless typing does.

Worksheets are written by running a generated program and saving it (so the
recorded ``#>``/``#|``/``#=`` lines are real), then damaged: a recorded token
changed, a header value replaced by one outside its allowed set, control
characters or bytes inserted, lines dropped or doubled.  Each is run, verified,
exported or opened.

The oracle (tests/fuzzing.py): every input ends in a result or an
InputError/LimitError naming line and column; another exception, "internal
error", a hang past the watchdog or memory past the ceiling fails.

Default run: 160 examples (about 20 s), deterministic.  The long run (DEVELOPERS.md):

    KETSPLIT_FUZZ_EXAMPLES=20000 python -m pytest -m slow tests/test_fuzz_grammar.py

runs 20,000 statements and 3,000 damaged worksheets; with KETSPLIT_FUZZ_LOG=FILE it
writes every failure to FILE and goes on instead of stopping at the first.
"""

from __future__ import annotations

import os
import re
from contextlib import redirect_stderr, redirect_stdout
from io import StringIO
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from fuzzing import in_sandbox, logged, outcome, scratch_directory
from ketsplit import InputError, Session
from ketsplit.cli import main
from ketsplit.commands.registry import COMMANDS
from ketsplit.figures import NAMES as FIGURE_NAMES
from ketsplit.language.build import KET_FUNCTIONS, SCALAR_FUNCTIONS
from ketsplit.limits import NAMES as LIMIT_NAMES
from ketsplit.sheets.header import RULES

MANY = int(os.environ.get("KETSPLIT_FUZZ_EXAMPLES", "0"))
QUIET = [HealthCheck.too_slow, HealthCheck.filter_too_much, HealthCheck.data_too_large,
         HealthCheck.function_scoped_fixture]


def examples(count: int) -> settings:
    return settings(max_examples=count, deadline=None, derandomize=True, database=None,
                    suppress_health_check=QUIET)


def long_timeout(share: float) -> int:
    """The test's own time limit in a long run: a second per input (each statement also has
    its own limit); pytest's 300 s stands for the default run."""
    return max(300, int((MANY or 2000) * share))


def long_run(share: float) -> settings:
    """``share`` of KETSPLIT_FUZZ_EXAMPLES (default 2000) for a slow test."""
    return settings(max_examples=max(1, int((MANY or 2000) * share)), deadline=None,
                    derandomize=False, database=None, suppress_health_check=QUIET)


@pytest.fixture(scope="module", autouse=True)
def sandbox():
    with scratch_directory():
        yield


# -- numbers and scalars ---------------------------------------------------------------------------

PARAMETERS = ["t", "phi", "r", "z"]   # declared by the preludes below (z stays complex)
small = st.integers(0, 12).map(str)
constants = st.sampled_from(["1", "2", "3", "1/2", "1/3", "-1", "i", "-i", "pi", "sqrt(2)",
                             "sqrt(3)/2", "1 + i", "0.25", "1e-3", "10^(-40)", "2^(1/3)",
                             "exp(i pi/4)", "exp(2 pi i/3)", "cos(pi/8)", "(1 + sqrt(5))/2",
                             "0", "exp(-exp(30))", "1e-300", "10^999", "log(2)", "abs(-3)"])
functions = st.sampled_from(sorted(SCALAR_FUNCTIONS))


def scalar_expressions(names: list[str]) -> st.SearchStrategy[str]:
    leaves = st.one_of(constants, small, st.sampled_from(names)) if names else st.one_of(
        constants, small)

    def grow(inner):
        return st.one_of(
            st.tuples(inner, st.sampled_from([" + ", " - ", " ", "*", "/"]), inner).map("".join),
            st.tuples(functions, inner).map(lambda fa: f"{fa[0]}({fa[1]})"),
            st.tuples(inner, st.sampled_from(["2", "3", "1/2", "-1", "n"])).map(
                lambda ip: f"({ip[0]})^{ip[1]}"),
            inner.map(lambda x: f"({x})"), inner.map(lambda x: f"-{x}"))
    return st.recursive(leaves, grow, max_leaves=4)


scalars = scalar_expressions(PARAMETERS)


# -- kets, states, bras, operators, mixtures -------------------------------------------------------

@st.composite
def labels(draw, parts: int, dim: int) -> str:
    digits = [draw(st.integers(0, dim - 1)) for _ in range(parts)]
    if max(digits) >= 10 or draw(st.booleans()) and parts > 1 and draw(st.booleans()):
        return "|" + ",".join(map(str, digits)) + ">"
    return "|" + "".join(map(str, digits)) + ">"


@st.composite
def states(draw, parts: int | None = None, names: list[str] = PARAMETERS) -> str:
    """A state of ``parts`` parts, written in one of the ways the language allows."""
    parts = parts or draw(st.integers(1, 4))
    dim = draw(st.sampled_from([2, 2, 2, 3, 4, 11]))
    form = draw(st.sampled_from(["terms", "terms", "terms", "sum", "dicke", "tensor", "normalised",
                                 "bound", "operator"]))
    if form == "sum":
        body = draw(st.sampled_from(["|{v}>", "{v}|{v}>", "(-1)^{v} |{v}>", "t^{v}|{v}>",
                                     "sqrt({v} + 1)|{v}>", "exp(i pi {v}/3)|{v}>"]))
        body = body.format(v="n")
        high = draw(st.integers(0, min(dim, 10) - 1))
        ket = "|" + ",".join(["n"] * parts) + ">" if parts > 1 else "|n>"
        body = body.replace("|n>", ket)
        return f"sum(n=0..{high}, {body})"
    if form == "dicke":
        n = draw(st.integers(2, 40))
        ks = draw(st.lists(st.integers(0, n + 1), min_size=1, max_size=3))
        return " + ".join(f"{draw(st.sampled_from(['', '2 ', 'i ', 't ', '-']))}dicke({n}, {k})"
                          for k in ks)
    if form == "tensor":
        left = draw(states(1, names))
        right = draw(states(max(1, parts - 1), names))
        return f"({left}) ⊗ ({right})"
    if form == "normalised":
        return f"({draw(states(parts, names))})/sqrt({draw(st.integers(1, 6))})"
    if form == "bound":
        return draw(st.sampled_from(["psi", "chi", "psi + chi", "(psi - chi)/sqrt(2)", "2 psi"]))
    if form == "operator":
        return f"{draw(operators(parts))} ({draw(states(parts, names))})"
    terms = []
    for _ in range(draw(st.integers(1, 4))):
        coefficient = draw(st.one_of(st.just(""), scalar_expressions(names).map(
            lambda c: f"({c})")))
        terms.append(f"{coefficient}{draw(labels(parts, dim))}")
    return draw(st.sampled_from([" + ", " - "])).join(terms)


def bra(ket: str) -> str:
    """<01| for |01>."""
    return "<" + ket[1:-1] + "|"


PAULIS = ["[[0, 1], [1, 0]]", "[[0, -i], [i, 0]]", "[[1, 0], [0, -1]]", "[[1, 1], [1, -1]]/sqrt(2)",
          "[[cos(t), -sin(t)], [sin(t), cos(t)]]", "id(2)"]


@st.composite
def operators(draw, parts: int = 2) -> str:
    kind = draw(st.sampled_from(["outer", "on", "tensor", "adj", "id", "matrix", "bra"]))
    if kind == "outer":
        return f"{draw(labels(parts, 2))}{bra(draw(labels(parts, 2)))}"
    if kind == "on":
        return f"on({draw(st.sampled_from(PAULIS))}, {draw(st.integers(1, parts + 1))})"
    if kind == "tensor":
        return " ⊗ ".join(draw(st.sampled_from(PAULIS)) for _ in range(parts))
    if kind == "adj":
        return f"adj({draw(operators(parts))})"
    if kind == "id":
        return draw(st.sampled_from(["id", f"id({2 ** parts})", "2 id"]))
    if kind == "bra":  # <0| |psi> is a number: a bra then a ket, as written
        return f"{bra(draw(labels(parts, 2)))} psi"
    return draw(st.sampled_from(PAULIS))


@st.composite
def mixtures(draw) -> str:
    """A density matrix: a weighted sum of projectors, a matrix literal, or a reduced state."""
    kind = draw(st.sampled_from(["projectors", "matrix", "werner", "bound"]))
    if kind == "projectors":
        pieces = []
        for _ in range(draw(st.integers(1, 3))):
            ket = draw(labels(2, 2))
            weight = draw(st.sampled_from(['', '1/2 ', '1/3 ', 'p ', '(1 - p) ']))
            pieces.append(f"{weight}{ket}{bra(ket)}")
        return " + ".join(pieces)
    if kind == "werner":
        return f"{draw(st.sampled_from(['p', '1/2', '1/3', '2']))} |psi><psi| + (1 - p) id/4"
    if kind == "bound":
        return "rho"
    size = draw(st.sampled_from([2, 4, 4, 3]))
    rows = [[draw(st.sampled_from(["0", "1", "1/2", "i", "-i", "p", "1/4"])) for _ in range(size)]
            for _ in range(size)]
    return "[" + ", ".join("[" + ", ".join(row) + "]" for row in rows) + "]"


@st.composite
def cuts(draw, parts: int = 2) -> str:
    """A cut that fits ``parts`` parts (1|2, 12|3, 1,2|3, A|B with a space), or a near one."""
    if draw(st.integers(0, 9)) == 0:
        return draw(st.sampled_from(["1|1", "1|5", "0|1", "|2", "1|", "A|C", "12", "1|2|3"]))
    order = draw(st.permutations(range(1, parts + 1)))
    k = draw(st.integers(1, max(1, parts - 1)))
    left, right = sorted(order[:k]), sorted(order[k:])
    join = draw(st.sampled_from(["", ","]))
    return join.join(map(str, left)) + "|" + join.join(map(str, right))


points = st.lists(st.tuples(st.sampled_from(PARAMETERS + ["p"]),
                            st.sampled_from(["pi/6", "1/3", "0", "pi", "1/2", "i", "2", "-1"])),
                  min_size=1, max_size=2).map(
    lambda pairs: " with " + ", ".join(f"{n}={v}" for n, v in pairs))
maybe_point = st.one_of(st.just(""), st.just(""), points)
figure_names = st.sampled_from(list(FIGURE_NAMES) + ["renyi(3)", "renyi(1/2)", "renyi(0)"])


# -- every statement of the command table ----------------------------------------------------------

@st.composite
def state_and_cut(draw) -> tuple[str, str, int]:
    parts = draw(st.integers(1, 4))
    return draw(states(parts)), draw(st.one_of(st.just(""), cuts(parts).map(lambda c: " " + c))), \
        parts


@st.composite
def on_state(draw, name: str) -> str:
    state, cut, _ = draw(state_and_cut())
    return f"{name} {state}{cut}{draw(maybe_point)}"


@st.composite
def figures_statement(draw) -> str:
    state, cut, _ = draw(state_and_cut())
    unit = draw(st.sampled_from(["", " bits", " nats"]))
    chosen = draw(st.lists(figure_names, max_size=3))
    return f"figures {state}{cut}{unit}{''.join(' ' + f for f in chosen)}{draw(maybe_point)}"


@st.composite
def over_statement(draw, name: str) -> str:
    """plot FIGURE[,FIGURE] STATE[, STATE] CUT over NAME [--to F] [--data F], or map ... over t, phi."""
    chosen = draw(st.lists(figure_names, min_size=1, max_size=2 if name == "plot" else 1))
    state = draw(st.sampled_from(["cos(t)|00> + sin(t)|11>", "psi", "cos(t)|00> + sin(phi)|11>",
                                  "cos(t)|00> + sin(t)(cos(phi)|11> + sin(phi)|22>)", "z|00> + |11>"]))
    over = " over t" if name == "plot" else " over t, phi"
    over = draw(st.sampled_from([over, over, " over z", " over", ""]))
    files = draw(st.sampled_from(["", " --to out.svg", " --data out.csv", " --to out.txt",
                                  " --to out.png --data out.csv"]))
    return f"{name} {','.join(chosen)} {state} 1|2{over}{files}{draw(maybe_point)}"


@st.composite
def check_statement(draw) -> str:
    form = draw(st.sampled_from(["identity", "approx", "form", "schmidt", "reduce", "rank"]))
    if form in ("identity", "approx"):
        mark = " = " if form == "identity" else " ~ "
        return f"check {draw(scalars)}{mark}{draw(scalars)}"
    state, cut = draw(states(2)), draw(cuts(2))
    if form == "form":
        return f"check {state} {cut} = {draw(scalars)} (|0>)(|0>) + {draw(scalars)} (|1>)(|1>)"
    if form == "schmidt":
        return f"check schmidt {state} {cut} = [{draw(scalars)}, {draw(scalars)}]"
    if form == "reduce":
        return f"check reduce {state} 1 = [[1/2, 0], [0, 1/2]]"
    return f"check rank {state} {cut} = {draw(st.integers(0, 4))}"


def limits_statement() -> st.SearchStrategy[str]:
    values = st.sampled_from(["1", "64", "600", "2^64", "0", "1.5", "-1", "nan", "x"])
    return st.lists(st.tuples(st.sampled_from(list(LIMIT_NAMES) + ["colour"]), values),
                    max_size=2).map(
        lambda pairs: "limits" + "".join(f" {n}={v}" for n, v in pairs
                                         if n not in ("seconds", "memory")))  # keep the watchdog's


MIXED = {"density", "ptranspose", "negativity", "concurrence", "mixedness", "separable"}


@st.composite
def mixed_statement(draw, name: str) -> str:
    rho = draw(mixtures())
    extra = ""
    if name == "ptranspose":
        extra = draw(st.sampled_from(["", " 1", " 2", " 1,2", " 3"]))
    elif name in ("negativity", "separable"):
        extra = draw(st.sampled_from(["", " 1|2", " 2|1", " 1|3"]))
    return f"{name} {rho}{extra}{draw(maybe_point)}"


GENERATORS: dict[str, st.SearchStrategy[str]] = {
    "numeric": on_state("numeric"), "schmidt": on_state("schmidt"), "rank": on_state("rank"),
    "strata": on_state("strata"), "schmidtbasis": on_state("schmidtbasis"),
    "reduce": st.tuples(states(), st.sampled_from(["1", "2", "1,2", "3", "A", ""]), maybe_point)
    .map(lambda p: f"reduce {p[0]} {p[1]}{p[2]}"),
    "cuts": st.tuples(states(), maybe_point).map(lambda p: f"cuts {p[0]}{p[1]}"),
    "class": st.tuples(states(3), maybe_point).map(lambda p: f"class {p[0]}{p[1]}"),
    "tangle": st.tuples(states(3), maybe_point).map(lambda p: f"tangle {p[0]}{p[1]}"),
    "classes": st.tuples(states(3), maybe_point).map(lambda p: f"classes {p[0]}{p[1]}"),
    "compare": st.tuples(states(2), states(2), st.sampled_from(["", " 1|2"]), maybe_point)
    .map(lambda p: f"compare {p[0]}, {p[1]}{p[2]}{p[3]}"),
    "fidelity": st.tuples(st.one_of(states(2), mixtures()), st.one_of(states(2), mixtures()),
                          maybe_point).map(lambda p: f"fidelity {p[0]}, {p[1]}{p[2]}"),
    "opschmidt": st.tuples(operators(2), st.sampled_from(["", " 1|2"]), maybe_point)
    .map(lambda p: f"opschmidt {p[0]}{p[1]}{p[2]}"),
    "figures": figures_statement(), "plot": over_statement("plot"), "map": over_statement("map"),
    "check": check_statement(),
    "method": st.sampled_from(["auto", "exact", "certified", "fast", ""]).map(
        lambda m: f"method {m}"),
    "budget": st.sampled_from(["0", "1", "20", "-5", "inf", "nan", "1e9"]).map(
        lambda b: f"budget {b}"),
    "strata_budget": st.sampled_from(["0", "5", "60", "-1", "x"]).map(
        lambda b: f"strata_budget {b}"),
    "digits": st.sampled_from(["5", "12", "30", "4", "10001", "x"]).map(lambda d: f"digits {d}"),
    "units": st.sampled_from(["bits", "nats", "dits"]).map(lambda u: f"units {u}"),
    "help": st.sampled_from(sorted(COMMANDS) + ["", "nosuch", "operators"]).map(
        lambda c: f"help {c}".rstrip()),
    "limits": limits_statement(),
    "save": st.sampled_from(["sheet.kss", "sheet", "", "a b.kss", "."]).map(lambda f: f"save {f}"),
    "open": st.sampled_from(["sheet.kss", "nosuch.kss", "", "."]).map(lambda f: f"open {f}"),
    **{name: mixed_statement(name) for name in MIXED},
}

declarations = st.sampled_from(["real t in [0, pi]", "real phi in [0, pi/2]", "positive r",
                                "complex z", "integer n in [0, 3]", "real p in [0, 1]",
                                "real t", "space A:2 B:2", "space 2 3"])
assignments = st.tuples(st.sampled_from(["x", "psi2", "rho2"]), st.one_of(states(), mixtures()))\
    .map(lambda p: f"{p[0]} = {p[1]}")
binders = st.tuples(states(2), st.sampled_from(["1", "2"])).map(
    lambda p: f"rho3 = reduce {p[0]} {p[1]}")
command_statements = st.sampled_from(sorted(GENERATORS)).flatmap(lambda name: GENERATORS[name])
statements = st.one_of(command_statements, command_statements, declarations, assignments,
                       binders, states())

PRELUDE = ("real t in [0, pi]; real phi in [0, pi]; positive r; real p in [0, 1]; "
           "psi = cos(t)|00> + sin(t)|11>; chi = |01>; rho = reduce |000> + |111> 1,2")


@st.composite
def slipped(draw, source: st.SearchStrategy[str]) -> str:
    """A generated statement, kept as it is or with one slip of typing in it."""
    text = draw(source)
    slip = draw(st.sampled_from(["none", "none", "none", "insert", "delete", "double", "cut"]))
    k = draw(st.integers(0, len(text)))
    if slip == "insert":
        return text[:k] + draw(st.sampled_from(["(", ")", "|", ">", "<", ",", "^", " with ", "..",
                                                "=", "é", "\u200b", ";", " 1|2", "⊗", "#"])) + text[k:]
    if slip == "delete":
        return text[:k] + text[k + 1:]
    if slip == "double":
        return text[:k] + text[k:k + 4] * 2 + text[k + 4:]
    if slip == "cut":
        return text[:k]
    return text


def test_every_command_of_the_table_has_a_generator():
    assert set(GENERATORS) == set(COMMANDS)
    assert set(KET_FUNCTIONS) == {"dicke"}  # a new ket function needs its place in states()


@examples(110)
@given(slipped(statements).filter(in_sandbox))
def test_statements_of_every_command(text):
    outcome(text, PRELUDE)


@examples(30)
@given(st.lists(slipped(statements), min_size=2, max_size=4).map("; ".join).filter(in_sandbox))
def test_several_statements_on_one_line(text):
    outcome(text, PRELUDE)


@pytest.mark.slow
@pytest.mark.timeout(long_timeout(1.0))
@long_run(1.0)
@given(slipped(statements).filter(in_sandbox), st.sampled_from(["", PRELUDE]))
def test_many_statements(text, prelude):
    with logged(text):
        outcome(text, prelude)


# -- worksheets written by ketsplit, then damaged --------------------------------------------------

TOKEN = re.compile(r"[0-9]+|[A-Za-z_]+|\S")
CONTROLS = ["\x1b[2J\x1b[H", "\x1b]0;owned\x07", "\r", "\x00", "\x9b31m", "\u202e", "\x7f"]
HEADER_VALUES = {name: ["inf", "nan", "-5", "1e9", "²", "", "auto", "bits", "9" * 50, "1", "30"]
                 for name in RULES}
SAFE_PROGRAM = st.lists(st.one_of(command_statements, declarations, assignments),
                        min_size=1, max_size=4).map(
    lambda lines: [line for line in lines if not line.startswith(("save", "open", "plot", "map",
                                                                 "limits"))])


@st.composite
def damaged_sheet(draw, lines: list[str]) -> list[str]:
    """The saved lines of a worksheet with one to three kinds of damage done to them."""
    lines = list(lines)
    for _ in range(draw(st.integers(1, 3))):
        kind = draw(st.sampled_from(["record", "record", "header", "control", "drop", "double",
                                     "bytes", "statement"]))
        if not lines:
            break
        k = draw(st.integers(0, len(lines) - 1))
        line = lines[k]
        if kind == "record":
            recorded = [j for j, text in enumerate(lines) if text.startswith(("#>", "#|", "#="))]
            if recorded:
                k = draw(st.sampled_from(recorded))
                tokens = list(TOKEN.finditer(lines[k]))[1:]
                if tokens:
                    m = draw(st.sampled_from(tokens))
                    new = draw(st.sampled_from(["0", "x", "nan", "1e999", "(", "|", "sum(a=0..9, a)",
                                                m.group() * 2, ""]))
                    lines[k] = lines[k][:m.start()] + new + lines[k][m.end():]
        elif kind == "header":
            name = draw(st.sampled_from(sorted(RULES)))
            lines.insert(1, f"#! {name.replace('_', ' ')}: {draw(st.sampled_from(HEADER_VALUES[name]))}")
        elif kind == "control":
            where = draw(st.integers(0, len(line)))
            lines[k] = line[:where] + draw(st.sampled_from(CONTROLS)) + line[where:]
        elif kind == "drop":
            del lines[k]
        elif kind == "double":
            lines.insert(k, line)
        elif kind == "bytes":
            lines[k] = line + draw(st.text(max_size=3))
        else:
            lines.insert(k, draw(slipped(statements)))
    return lines


def saved_worksheet(program: list[str], path) -> list[str] | None:
    """The lines of the worksheet that running ``program`` and saving it writes (None if the
    program stopped before its save: a later line failed)."""
    session = Session()
    try:
        session.run("\n".join(program + [f"save {path}"]))
    except InputError:
        return None
    return path.read_text(encoding="utf-8").splitlines()


def worksheet_outcome(lines: list[str], path, action: str) -> None:
    """Write ``lines`` and run, verify, export or open them; fail on anything but a clean end."""
    path.write_bytes("\n".join(lines).encode("utf-8", "surrogatepass") + b"\n")
    if action == "open":
        outcome(f"open {path.name}")
        return
    extra = ["--to", "md"] if action == "export" else []
    out, err = StringIO(), StringIO()
    with redirect_stdout(out), redirect_stderr(err):
        status = main([action, str(path), *extra])
    assert status in (0, 1, 2), err.getvalue()
    assert "internal error" not in out.getvalue() + err.getvalue(), err.getvalue()
    assert not re.search("[\x00-\x08\x0b-\x1f\x7f-\x9f\u202a-\u202e]", out.getvalue() + err.getvalue())


def damaged_worksheet_run(program, damage, action, directory) -> None:
    saved = directory / "saved.kss"
    lines = saved_worksheet([line for line in program if in_sandbox(line)], saved)
    if lines is None:
        lines = program
    worksheet_outcome(damage(lines), directory / "damaged.kss", action)


ACTIONS = st.sampled_from(["run", "verify", "export", "open"])


@examples(20)
@given(SAFE_PROGRAM, st.data(), ACTIONS)
def test_damaged_worksheets_written_by_ketsplit(program, data, action):
    damaged_worksheet_run(program, lambda lines: data.draw(damaged_sheet(lines)), action,
                          Path.cwd())


@pytest.mark.slow
@pytest.mark.timeout(long_timeout(0.15))
@long_run(0.15)
@given(SAFE_PROGRAM, st.data(), ACTIONS)
def test_many_damaged_worksheets(program, data, action):
    with logged(f"{action} {program}"):
        damaged_worksheet_run(program, lambda lines: data.draw(damaged_sheet(lines)), action,
                              Path.cwd())
