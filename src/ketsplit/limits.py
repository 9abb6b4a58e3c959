"""Every resource limit of ketsplit, in one place, with the way to change it.

A request beyond a limit is refused up front with a :class:`LimitError` whose
message names the limit, so that nobody waits for a computation that was
never going to finish (or for memory that was never going to be there).

=================  ==========  ==================================================
limit              default     what it bounds
=================  ==========  ==================================================
input_length       200000      characters of one statement
nesting            100         depth of brackets, signs and powers in an expression
exponent           1000        size of a numeric exponent (``x^e``, ``1e-40``)
number_digits      2000        decimal digits of an exact number (numerator or
                               denominator); Python refuses to print integers of
                               more than 4300 digits, so keep this below that
sum_terms          100000      terms of one ``sum(n=a..b, ...)``
terms              1048576     basis kets of one ket expression
parts              64          parts of one state (a state kept in the Dicke
                               basis, dicke(n, k), never lists its labels and
                               has its own bound, ketsplit.symmetric)
part_dimension     10000       dimension of one part (and so its largest label)
dimension          2^64        total dimension of a state (the product of the
                               parts' dimensions); states are stored sparsely,
                               so this bounds the labels, not the memory
dense_entries      4194304     entries of a dense coefficient or density matrix
min_digits         5           smallest precision accepted by ``digits``
max_digits         10000       largest precision accepted by ``digits``
seconds            600         wall-clock seconds one statement may run before it
                               is stopped (0 switches the limit off)
memory             1024        MiB of resident memory one statement may add to the
                               process before it is stopped (0 switches the limit
                               off); sampled by ketsplit.timebudget every 10 ms of
                               CPU time in the main thread, beside the size limits
                               above, which refuse large objects before they exist
=================  ==========  ==================================================

How to change them (each Session holds its own; new Sessions start from the defaults):

- in the state language: ``limits`` lists them, ``limits parts=128 seconds=60``
  sets some for that Session (in the shell or ``ketsplit -c``; a worksheet read
  from a file may not change the limits that protect its reader);
- from Python: ``Session(limits=...)``, ``ketsplit.limits.set_limits(parts=128)``
  (the defaults of new Sessions and of API calls; returns the limits it
  replaced), or for a block ``with ketsplit.limits.limits_set(parts=128): ...``;
- from the environment, read once at import:
  ``KETSPLIT_LIMITS="parts=128,seconds=60"``.
"""

from __future__ import annotations

import os
import warnings
from contextlib import contextmanager
from contextvars import ContextVar
from dataclasses import asdict, dataclass, fields, replace
from typing import Iterator

from .base.errors import LimitError, Span
from .timebudget import statement_limited

ENVIRONMENT = "KETSPLIT_LIMITS"


@dataclass(frozen=True)
class Limits:
    """The resource limits in force; see the module docstring for each one."""

    input_length: int = 200_000
    nesting: int = 100
    exponent: int = 1000
    number_digits: int = 2000
    sum_terms: int = 100_000
    terms: int = 1 << 20
    parts: int = 64
    part_dimension: int = 10_000
    dimension: int = 1 << 64
    dense_entries: int = 1 << 22
    min_digits: int = 5
    max_digits: int = 10_000
    seconds: float = 600.0
    memory: int = 1024

    def __post_init__(self) -> None:
        for item in fields(self):
            value = getattr(self, item.name)
            if isinstance(value, bool) or not isinstance(value, (int, float)) or value < 0:
                raise ValueError(f"limit {item.name} must be a nonnegative number, found {value!r}")
            if item.type == "int" and not isinstance(value, int):
                raise ValueError(f"limit {item.name} must be a whole number, found {value!r}")
        if self.min_digits > self.max_digits:
            raise ValueError(f"min_digits {self.min_digits} exceeds max_digits {self.max_digits}")

    def as_dict(self) -> dict[str, int | float]:
        return asdict(self)


NAMES = tuple(item.name for item in fields(Limits))

MEANINGS = {  # one line each, for the 'limits' table
    "input_length": "characters of one statement",
    "nesting": "depth of brackets, signs and powers",
    "exponent": "size of a numeric exponent",
    "number_digits": "digits of an exact number",
    "sum_terms": "terms of one sum(...)",
    "terms": "basis kets of one ket expression",
    "parts": "parts of one state",
    "part_dimension": "dimension of one part",
    "dimension": "total dimension of a state",
    "dense_entries": "entries of a dense matrix",
    "min_digits": "smallest precision for 'digits'",
    "max_digits": "largest precision for 'digits'",
    "seconds": "seconds one statement may run (0: no limit)",
    "memory": "MiB of memory one statement may add (0: no limit)",
}


def shown(value: int | float) -> str:
    """A limit's value as text: whole numbers in full, seconds in short form."""
    return f"{value:g}" if isinstance(value, float) else str(value)

_default = Limits()   # for Sessions made from now on, and for API calls outside a Session
_in_force: ContextVar[Limits | None] = ContextVar("ketsplit_limits", default=None)


def current() -> Limits:
    """The limits in force now: those of the Session running a statement, else the default."""
    return _in_force.get() or _default


def default() -> Limits:
    """The limits a new Session starts with (the defaults, KETSPLIT_LIMITS, set_limits)."""
    return _default


def changed(base: Limits, **changes: int | float) -> Limits:
    """``base`` with some limits changed by name; ValueError for an unknown name or value."""
    unknown = sorted(set(changes) - set(NAMES))
    if unknown:
        raise ValueError(f"no limit named {unknown[0]!r}; the limits are {', '.join(NAMES)}")
    return replace(base, **changes)


def set_limits(**changes: int | float) -> Limits:
    """Change some of the limits in force now (by name); returns those that were in force.

    Outside any block this changes the defaults: new Sessions and API calls
    take them.  Inside a ``limits_set`` block it changes that block's limits.
    Sessions keep the limits they were made with; the ``limits`` statement
    changes its own Session's."""
    global _default
    previous = current()
    if _in_force.get() is not None:
        _in_force.set(changed(previous, **changes))
    else:
        _default = changed(_default, **changes)
    return previous


@contextmanager
def limits_set(**changes: int | float) -> Iterator[Limits]:
    """Run a block with some limits changed, restoring the previous ones after it."""
    with using(changed(current(), **changes)) as found:
        yield found


@contextmanager
def using(found: Limits) -> Iterator[Limits]:
    """Run a block with ``found`` in force (a Session runs each statement so)."""
    token = _in_force.set(found)
    try:
        yield found
    finally:
        _in_force.reset(token)


def how_to_change(name: str) -> str:
    """The words every refusal ends with: which limit, its value, and how to change it."""
    return f"the limit {name} = {shown(getattr(current(), name))} (change it with 'limits {name}=N')"


def over_time(seconds: float, span: Span | None = None, source: str | None = None) -> LimitError:
    """The error of a computation stopped by the time limit (statements and the Python API)."""
    return LimitError(f"stopped after {seconds:g} s: the computation ran longer than "
                      f"{how_to_change('seconds')}; it had no effect", span, source)


def over_memory(used: int, span: Span | None = None, source: str | None = None) -> LimitError:
    """The error of a computation stopped by the memory ceiling (statements and the API)."""
    return LimitError(f"stopped after taking {used >> 20} MiB of memory: the computation needed "
                      f"more than {how_to_change('memory')}; it had no effect", span, source)


@contextmanager
def enforced(span: Span | None = None, source: str | None = None) -> Iterator[None]:
    """Run a block (a statement, an API call) under the time limit and the memory ceiling
    in force, each stopping it with its LimitError."""
    found = current()
    try:
        with statement_limited(found.seconds, found.memory,
                               lambda: over_time(found.seconds, span, source),
                               lambda used: over_memory(used, span, source)):
            yield
    except MemoryError:  # an allocation refused at once, before the ceiling could see it grow
        raise out_of_memory(span, source) from None


def out_of_memory(span: Span | None = None, source: str | None = None) -> LimitError:
    """The error of an allocation the machine refused: sympy and mpmath ask for the digits
    of numbers such as exp(exp(30)) (about 10^13 of them) when they compare or simplify."""
    return LimitError("stopped: a value in this statement needs more memory than the machine "
                      "has (a number such as exp(exp(30)) has about 10^13 digits, and comparing "
                      "or simplifying it asks for them); write such numbers in a smaller form or "
                      "give the parameter a value; it had no effect", span, source)


def refuse(what: str, name: str, span: Span | None = None, source: str | None = None) -> LimitError:
    """A LimitError saying what was asked for and which limit stands in the way."""
    return LimitError(f"{what} is beyond {how_to_change(name)}", span, source)


def check(value: int | float, name: str, what: str, span: Span | None = None,
          source: str | None = None) -> None:
    """Refuse when ``value`` exceeds the limit ``name``; ``what`` describes the request."""
    if value > getattr(current(), name):
        raise refuse(what, name, span, source)


def check_shape(dims: tuple[int, ...], span: Span | None = None, source: str | None = None) -> None:
    """Refuse a state whose number of parts, part dimension or total dimension is too large."""
    check(len(dims), "parts", f"a state of {len(dims)} parts", span, source)
    check(max(dims, default=1), "part_dimension", f"a part of dimension {max(dims, default=1)}",
          span, source)
    total = 1
    for d in dims:
        total *= d
    check(total, "dimension", f"a state of total dimension {total}", span, source)


def parse_assignments(text: str) -> dict[str, int | float]:
    """``"parts=128, seconds=60"`` -> {"parts": 128, "seconds": 60.0}; ValueError if malformed."""
    changes: dict[str, int | float] = {}
    for piece in text.replace(",", " ").split():
        name, equals, value = piece.partition("=")
        if not equals or name not in NAMES:
            raise ValueError(f"expected NAME=VALUE with NAME one of {', '.join(NAMES)}, "
                             f"found {piece!r}")
        changes[name] = parse_value(name, value)
    return changes


def parse_value(name: str, text: str) -> int | float:
    """A limit's value from text: whole numbers, ``2^64`` powers, and decimals for seconds."""
    base, caret, power = text.partition("^")
    if caret and base.isdigit() and power.isdigit() and len(power) <= 3:
        value = int(base) ** int(power)
        if value.bit_length() <= 1024:
            return value
    if text.isdigit():
        return int(text)
    if name == "seconds" and text.replace(".", "", 1).isdigit():
        return float(text)
    raise ValueError(f"limit {name}: expected a whole number, found {text!r}")


def _from_environment() -> None:
    text = os.environ.get(ENVIRONMENT, "").strip()
    if not text:
        return
    try:
        set_limits(**parse_assignments(text))
    except ValueError as err:
        warnings.warn(f"{ENVIRONMENT} ignored: {err}", stacklevel=2)


_from_environment()
