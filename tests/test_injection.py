"""No code execution: injection attempts end in an InputError or a harmless value.

Three lines of defence are checked:

1. at run time, with a tripwire on ``eval``, ``exec``, ``compile``, sympy's
   ``parse_expr`` and ``pickle`` loading: none of them sees the text of any
   injection attempt, typed as a statement, inside a command, in a ``with``
   point, or in a worksheet (as statements, as recorded results, as pickled
   data), and a canary file that each payload tries to create never appears;
2. format-string tricks come back in error messages literally, never expanded;
3. statically, an AST scan of every module under src/ forbids calls of
   ``eval``, ``exec``, ``compile``, ``__import__``, ``parse_expr``,
   ``lambdify``, ``S(...)``, pickle/marshal loading, string literals given to
   sympy constructors, and any ``sympify`` without ``strict=True`` in the
   modules that handle user text (language/, commands/, session, sheets/,
   repl/, cli, api, limits).  The engine's other modules sympify values only,
   which the run-time tripwire checks.
"""

from __future__ import annotations

import ast
import builtins
import json
import os
import pickle
import subprocess
import sys
from pathlib import Path

import pytest
import sympy
import sympy.parsing.sympy_parser as sympy_parser

import ketsplit
from ketsplit import InputError, Session

SRC = Path(ketsplit.__file__).resolve().parent
CANARY = "ksplit_canary"

PAYLOADS = [
    "__import__('os').system('touch {canary}')",
    "__import__(os).system(touch)",
    "().__class__.__bases__[0].__subclasses__()",
    "x.__class__.__mro__",
    "psi.__dict__",
    "__builtins__",
    "__import__",
    "globals()",
    "lambda: __import__('os')",
    "lambda x: x",
    "exec(\"open('{canary}', 'w')\")",
    "eval(\"__import__('os').system('touch {canary}')\")",
    "compile('1', 'f', 'exec')",
    "getattr(psi, '__globals__')",
    "open('{canary}', 'w').write('x')",
    "sympify('__import__(\"os\").system(\"touch {canary}\")')",
    "S('1/3')",
    "Rational('1/3')",
    "Symbol('x')",
    "{0.__class__.__init__.__globals__}",
    "{psi.__class__}",
    "%s%s%s%n",
    "%(x)s",
    "'{}'.format(psi)",
    "f'{psi}'",
    "$(touch {canary})",
    "`touch {canary}`",
    "|0>; import os; os.system('touch {canary}')",
    "\\x5f\\x5fimport\\x5f\\x5f",
    "__import__\u2028('os')",
]

TEMPLATES = [
    "{p}",
    "x = {p}",
    "schmidt {p}",
    "schmidt |00> + {p}|11> 1|2",
    "reduce {p} 1",
    "rank |00> + |11> with t={p}",
    "real {p}",
    "space {p}:2",
    "{p} = |0>",
    "digits {p}",
    "budget {p}",
    "limits {p}",
    "help {p}",
    "tex schmidt {p}",
    "check {p} = |0>",
    "figures {p}",
    "plot entropy {p} over t",
]


class Tripwire:
    """Records every call of a code-running function that is handed the payload being tried.

    sympy and the standard library use eval/exec/compile for their own code
    (imports, dataclasses, namedtuples); only a call whose text contains a
    distinctive piece of the payload counts.  Any call of sympy's parse_expr
    and any unpickling counts, whatever its argument.
    """

    def __init__(self, monkeypatch):
        self.calls: list[tuple[str, str]] = []
        self.fragments: set[str] = {CANARY}
        for name in ("eval", "exec", "compile"):
            monkeypatch.setattr(builtins, name, self.watch(name, getattr(builtins, name)))
        monkeypatch.setattr(sympy_parser, "parse_expr", self.watch("parse_expr", sympy_parser.parse_expr))
        monkeypatch.setattr(pickle, "loads", self.watch("pickle.loads", pickle.loads))
        monkeypatch.setattr(pickle, "load", self.watch("pickle.load", pickle.load))

    def arm(self, payload: str) -> str:
        """Watch for ``payload`` from now on; returns it with the canary's name filled in."""
        self.fragments = fragments(payload)
        return payload.replace("{canary}", CANARY)

    def watch(self, name, original):
        def watched(*args, **kwargs):
            for arg in list(args) + list(kwargs.values()):
                text = arg.decode("latin-1") if isinstance(arg, bytes) else arg
                if name.startswith("pickle") or name == "parse_expr" or (
                        isinstance(text, str) and any(f in text for f in self.fragments)):
                    self.calls.append((name, repr(arg)[:200]))
            return original(*args, **kwargs)
        return watched


def fragments(payload: str) -> set[str]:
    """Distinctive pieces of a payload: the whole of it and its punctuated runs of 8 or more."""
    runs = [r for r in payload.replace("{canary}", " ").split() if len(r) >= 8]
    return {payload.replace("{canary}", CANARY), CANARY, *runs}


@pytest.fixture
def tripwire(monkeypatch, tmp_path):
    monkeypatch.chdir(tmp_path)  # a payload that did run would leave its canary here
    warm_up()
    wire = Tripwire(monkeypatch)
    yield wire
    assert not wire.calls, f"code-running functions saw user text: {wire.calls}"
    assert not any(CANARY in p.name for p in tmp_path.iterdir()), "a payload ran: the canary exists"


def warm_up() -> None:
    """Run every statement once with harmless text, so that lazy imports happen before the wire."""
    if WARM:
        return
    WARM.append(True)
    session = Session()
    session.run("real t in [0, pi]; psi = cos(t)|00> + sin(t)|11>")
    for template in TEMPLATES:
        try:
            for result in session.run(template.format(p="psi")):
                result.text(), result.latex(), result.to_json()
        except InputError:
            pass


WARM: list[bool] = []


def harmless(result) -> None:
    """A result from a payload may only be a value of our own: no Python object leaks out."""
    for text in (result.text(), result.latex(), json.dumps(result.to_json())):
        for leak in ("<class", "<function", "<module", "<built-in", "object at 0x", "__globals__"):
            assert leak not in text, f"{leak!r} in the output of {result.statement!r}:\n{text}"


def run_payload(text: str, session: Session) -> None:
    try:
        for result in session.run(text):
            harmless(result)
    except InputError as err:
        assert err.line is not None and err.column is not None, err.message


@pytest.mark.parametrize("template", TEMPLATES)
def test_no_payload_runs_in_any_statement(template, tripwire):
    session = Session()
    session.run("real t in [0, pi]; psi = cos(t)|00> + sin(t)|11>; x = |0>")
    for payload in PAYLOADS:
        run_payload(template.format(p=tripwire.arm(payload)), session)
    assert all(isinstance(v, (ketsplit.State, sympy.Basic)) for v in session.bindings.values())
    assert session.run("rank psi")[0].report.items[0].value == 2


def test_the_python_api_does_not_parse_strings_with_sympify(tripwire):
    payload = tripwire.arm("__import__('os').system('touch {canary}')")
    with pytest.raises(InputError):
        ketsplit.ket(payload)
    with pytest.raises(ValueError):  # sympy's SympifyError: a string amplitude is refused
        ketsplit.State((2,), {(0,): payload})
    state = ketsplit.ket("cos(t)|0> + sin(t)|1>", real="t")
    with pytest.raises(ValueError):
        state.subs({"t": payload})


@pytest.mark.parametrize("trick", ["{0.__class__}", "{psi!r:>{width}}", "%(psi)s%n", "{}"])
def test_format_string_tricks_come_back_literally(trick, tripwire):
    tripwire.arm(trick)
    with pytest.raises(InputError) as info:
        Session().run(f"help {trick}")
    assert trick in str(info.value)


# -- worksheets from strangers -------------------------------------------------------------------

class Payload:
    """Unpickling this would run os.system: the classic pickle attack."""

    def __reduce__(self):
        return (os.system, (f"touch {CANARY}",))


def worksheet_files(folder: Path) -> dict[str, bytes]:
    saved = folder / "made.kss"
    Session().run(f"x = |00> + |11>\nschmidt x\nsave {saved}")
    good = saved.read_text(encoding="utf-8")
    injected = f"__import__('os').system('touch {CANARY}')"
    return {
        "binary-pickle.kss": pickle.dumps(Payload(), protocol=4),
        "text-pickle.kss": pickle.dumps(Payload(), protocol=0),
        "statements.kss": "\n".join(p.replace("{canary}", CANARY) for p in PAYLOADS).encode(),
        "recorded.kss": good.replace("sqrt(2)/2, sqrt(2)/2", f"{injected}, {injected}").encode(),
        "header.kss": good.replace("#! digits: 30", f"#! digits: {injected}").encode(),
        "pickle-inside.kss": good.encode() + b"\n" + pickle.dumps(Payload(), protocol=0),
    }


def test_worksheets_with_payloads_run_nothing(tmp_path, tripwire, capsys):
    from ketsplit.cli import main
    files = worksheet_files(tmp_path)
    tripwire.arm("__import__('os').system('touch {canary}')")
    for name, data in files.items():
        path = tmp_path / name
        path.write_bytes(data)
        for action in ("run", "verify", "export"):
            main([action, str(path)] + (["--to", "md"] if action == "export" else []))
            assert not (tmp_path / CANARY).exists(), f"{action} {name} ran the payload"
        session = Session()
        try:
            session.run(f"open {path}")
        except InputError as err:
            assert err.line is not None
    # and in a process of its own, the binary pickle is refused without a traceback
    done = subprocess.run([sys.executable, "-m", "ketsplit", "run", str(tmp_path / "binary-pickle.kss")],
                          capture_output=True, text=True, timeout=300, cwd=tmp_path)
    assert done.returncode != 0 and "Traceback" not in done.stderr and done.stderr.strip()
    assert not (tmp_path / CANARY).exists()
    # the pickles are real: each names os.system and the canary command
    assert all(b"system" in files[n] and CANARY.encode() in files[n]
               for n in ("binary-pickle.kss", "text-pickle.kss"))


# -- the static check ----------------------------------------------------------------------------

FORBIDDEN_CALLS = {"eval", "exec", "compile", "__import__", "parse_expr", "parse_latex",
                   "parse_mathematica", "lambdify", "S", "literal_eval"}
FORBIDDEN_ATTRIBUTES = {("pickle", "load"), ("pickle", "loads"), ("pickle", "Unpickler"),
                        ("marshal", "load"), ("marshal", "loads"), ("shelve", "open"),
                        ("yaml", "load"), ("dill", "loads"), ("importlib", "__import__")}
SYMPY_CONSTRUCTORS = {"sympify", "Rational", "Integer", "Float", "Poly", "Matrix", "Expr", "Symbol",
                      "nsimplify", "simplify", "Function"}
TEXT_FACING = ("language/", "commands/", "sheets/", "repl/", "session.py", "cli.py", "api.py",
               "limits.py")
# sympify calls without strict=True in text-facing modules, each with why it sees no user text
ALLOWED_SYMPIFY: dict[tuple[str, str], str] = {}


def called_name(call: ast.Call) -> tuple[str | None, str]:
    func = call.func
    if isinstance(func, ast.Name):
        return None, func.id
    if isinstance(func, ast.Attribute):
        owner = func.value.id if isinstance(func.value, ast.Name) else None
        return owner, func.attr
    return None, ""


def violations(path: Path, root: Path = SRC) -> list[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"), str(path))
    relative = path.relative_to(root).as_posix()
    text_facing = relative.startswith(TEXT_FACING)
    found = []
    for function in [tree] + [n for n in ast.walk(tree) if isinstance(n, (ast.FunctionDef, ast.AsyncFunctionDef))]:
        name = getattr(function, "name", "<module>")
        for node in ast.walk(function):
            if not isinstance(node, ast.Call):
                continue
            owner, called = called_name(node)
            where = f"{relative}:{node.lineno} in {name}"
            if called in FORBIDDEN_CALLS and (owner is None or owner in ("sympy", "builtins", "ast")):
                found.append(f"{where}: calls {called}")
            if (owner, called) in FORBIDDEN_ATTRIBUTES:
                found.append(f"{where}: calls {owner}.{called}")
            if called in SYMPY_CONSTRUCTORS and any(
                    isinstance(a, ast.JoinedStr) or (isinstance(a, ast.Constant) and isinstance(a.value, str)
                                                     and called != "Symbol")
                    for a in node.args[:1]):
                found.append(f"{where}: gives a string to {called}")
            strict = any(k.arg == "strict" and isinstance(k.value, ast.Constant) and k.value.value is True
                         for k in node.keywords)
            if called == "sympify" and text_facing and not strict and \
                    (relative, name) not in ALLOWED_SYMPIFY:
                found.append(f"{where}: sympify without strict=True in a module that handles text")
    return sorted(set(found))


def test_no_module_hands_text_to_a_code_runner():
    problems = [v for path in sorted(SRC.rglob("*.py")) for v in violations(path)]
    assert not problems, "\n".join(problems)


def test_the_static_check_catches_what_it_forbids(tmp_path):
    # the scanner itself, tried on a module that does everything it forbids
    probe = tmp_path / "language" / "probe.py"
    probe.parent.mkdir()
    probe.write_text("import pickle, sympy\n"
                     "def f(text):\n"
                     "    eval(text); exec(text); sympy.sympify(text); sympy.S(text)\n"
                     "    pickle.loads(text); sympy.Rational('1/3'); sympy.parse_expr(text)\n")
    found = violations(probe, tmp_path)
    for fragment in ("calls eval", "calls exec", "calls S", "calls pickle.loads", "calls parse_expr",
                     "gives a string to Rational", "sympify without strict=True"):
        assert any(fragment in v for v in found), (fragment, found)


def test_the_tripwire_sees_text_handed_to_sympify(monkeypatch):
    # the run-time check itself: sympify of a string goes through parse_expr and eval, and is seen
    wire = Tripwire(monkeypatch)
    wire.arm("ksplit_probe_name + 1")
    sympy.sympify("ksplit_probe_name + 1")
    assert {"parse_expr", "eval"} <= {name for name, _ in wire.calls}
